"""Exit status and files of ``build`` and ``check`` when the manufacturability checks
fail or warn (test recipes of the demo scenario)."""

from __future__ import annotations

import json
from pathlib import Path

from recipe_text import FINGER_TEXT, edit

from soft_molds.cli import main

#: The test finger in a silicone that stretches only 300 %: pulling the core out tears the
#: inlet (allowed stretch 1 + 3 / 2 = 2.5 against 3.05 needed; hand arithmetic).
STIFF = edit(FINGER_TEXT, "checks:\n", "material:\n  elongation_pct: 300\nchecks:\n")

ROOT = Path(__file__).resolve().parents[2]


def test_build_refuses_to_write_on_a_failed_check_and_force_writes_it(tmp_path, capsys):
    recipe = tmp_path / "stiff.yaml"
    recipe.write_text(STIFF)
    out = tmp_path / "out"
    assert main(["build", str(recipe), "--out", str(out)]) == 1
    cap = capsys.readouterr()
    assert "core-extraction" in cap.out and "nothing written" in cap.err
    assert "Traceback" not in cap.err
    assert not out.exists()
    assert main(["build", str(recipe), "--out", str(out), "--force"]) == 0
    man = json.loads((out / "finger-test" / "A" / "manifest.json").read_text())
    assert man["verdict"] == "error"
    assert [f["check"] for f in man["checks"] if f["severity"] == "error"] == ["core-extraction"]
    assert "--force" in capsys.readouterr().out


def test_check_exits_1_on_an_error_and_strict_also_on_a_warning(tmp_path, capsys):
    stiff = tmp_path / "stiff.yaml"
    stiff.write_text(STIFF)
    assert main(["check", str(stiff)]) == 1
    assert "FAIL" in capsys.readouterr().out
    # The stem cushion with a stricter slenderness limit passes but warns: its 4 mm bore
    # reaches 32 mm past the inlet face with nothing wider to hold it, span / width
    # 32 / 4 = 8 > 5 (recipe numbers). Fine by default, a failure with --strict.
    slender = tmp_path / "slender.yaml"
    slender.write_text((ROOT / "recipes" / "stem-cushion.yaml").read_text()
                       + "checks:\n  core_slenderness_max: 5\n")
    assert main(["check", str(slender)]) == 0
    out = capsys.readouterr().out
    assert "WARNING core-slenderness" in out
    assert main(["check", "--strict", str(slender)]) == 1
    assert ("0 of 1 variant passed (no errors or warnings); 0 of 1 recipe passed in every "
            "variant") in capsys.readouterr().out


def test_check_of_a_folder_checks_every_variant_and_lists_the_failures(tmp_path, capsys):
    # Two variants of the test finger; B's silicone stretches only 300 %: its core tears
    # the inlet (hand arithmetic above), A passes.
    text = FINGER_TEXT + ("variants:\n  labels:\n    A: {}\n    B:\n"
                          "      material.elongation_pct: 300\n")
    (tmp_path / "pair.yaml").write_text(text)
    assert main(["check", str(tmp_path)]) == 1
    out = capsys.readouterr().out
    # two variants of one recipe file: counted as variants, and the file as one recipe
    assert "1 of 2 variants passed (no errors); 0 of 1 recipe passed in every variant" in out
    failed = [line for line in out.splitlines() if line.startswith("  failed:")]
    assert len(failed) == 1 and " B: core-extraction" in failed[0]


def test_the_tally_counts_variants_and_recipes_each_by_its_own_name():
    from soft_molds.cli import check_tally

    assert check_tally(10, 10, 8, 8, False) == (
        "10 of 10 variants passed (no errors); 8 of 8 recipes passed in every variant")
    assert check_tally(1, 1, 1, 1, True) == (
        "1 of 1 variant passed (no errors or warnings); 1 of 1 recipe passed in every "
        "variant")
