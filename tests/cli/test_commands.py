"""CLI commands beyond build/check input errors."""

from __future__ import annotations

from soft_molds.cli import main
from soft_molds.recipe.reference import reference_markdown


def test_reference_prints_every_field_list(capsys):
    assert main(["reference"]) == 0
    out = capsys.readouterr().out
    assert out == reference_markdown()
    for key in ("length_mm", "pitch_mm", "socket_diameter_mm", "clamp_bolt", "chord_mm"):
        assert f"`{key}`" in out


def test_reference_update_rewrites_only_between_the_markers(tmp_path, capsys):
    from soft_molds.recipe.reference import END, START

    doc = tmp_path / "doc.md"
    doc.write_text(f"before\n{START}\n\nstale\n{END}\nafter\n")
    assert main(["reference", "--update", str(doc)]) == 0
    text = doc.read_text()
    assert text.startswith("before\n") and text.endswith("after\n") and "stale" not in text
    assert reference_markdown() in text
    # with the finding-advice markers too, both copies are rewritten
    from soft_molds.export.advice import advice_markdown

    doc.write_text(f"{START}\n{END}\n<!-- finding-advice:start -->\nSTALE ADVICE\n"
                   "<!-- finding-advice:end -->\n")
    assert main(["reference", "--update", str(doc)]) == 0
    text = doc.read_text()
    assert "STALE ADVICE" not in text
    assert advice_markdown() in text and reference_markdown() in text


def test_build_into_an_unwritable_place_is_one_line_exit_1(tmp_path, capsys):
    blocker = tmp_path / "afile"
    blocker.write_text("x")
    assert main(["build", "recipes/stem-cushion.yaml", "--out", str(blocker / "sub")]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "cannot write" in err and "Traceback" not in err


def test_build_prints_the_predicted_motion_at_the_working_pressure(tmp_path, capsys):
    import json

    assert main(["build", "recipes/tray-pusher.yaml", "--out", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    (line,) = [x for x in out.splitlines() if "predicted motion" in x]
    # The same figure the manifest records at the working pressure (12 psi, NIST SP 811:
    # 82.74 kPa), rounded as the line prints it.
    man = json.loads(next(tmp_path.rglob("manifest.json")).read_text())
    ext = man["motion"]["at_working"]["extension_mm"]
    assert man["motion"]["kind"] == "extending"
    assert line.strip() == (f"predicted motion (axial-extending, an estimate): extends "
                            f"{ext:.1f} mm at 83 kPa")
