"""A ``file`` body whose drawing cannot be used is refused at the command line: exit 2, one
located line naming ``body.path`` (or ``body.translate_mm``), the value and what is
allowed, nothing written, no traceback, and no build stage run.

Outside references: ISO 10303-21 (a STEP exchange structure opens with
``ISO-10303-21;``), the STL format (an ASCII STL opens with ``solid``), 1 in = 25.4 mm
exactly (NIST SP 811). The files are written here with cadquery, so what each holds is
known by construction.
"""

from __future__ import annotations

from pathlib import Path

import pytest
import stepfiles
from refusals import refused_once

# A flat pad: a 40 x 24 x 12 mm rounded box with one bore (the bundled stem cushion's body,
# drawn as a file). Line 3 is the body's path, line 4 its translation when written.
RECIPE = """\
body:
  kind: file
  path: {path}
{extra}voids:
  - {{kind: bore, diameter_mm: 4, length_mm: 32, end_round_mm: 2}}
inlet: {{socket_diameter_mm: 5, socket_depth_mm: 6}}
mold: {{clamp_bolt: M3}}
material: {{grade: 00-30}}
"""


def text(path: str, extra: str = "") -> str:
    return RECIPE.format(path=path, extra=extra)


def refused(tmp_path: Path, capsys, name: str, data: bytes | None, extra: str = ""
            ) -> tuple[Path, str]:
    if data is not None:
        (tmp_path / name).write_bytes(data)
    return refused_once(text(name, extra), tmp_path, capsys)


def assert_line(path: Path, got: str, line: int, field: str, message: str,
                allowed: str) -> None:
    assert got.startswith(f"{path}:{line}: {field}: "), got
    assert message in got, got
    assert "; allowed: " in got and allowed in got.split("; allowed: ", 1)[1], got


def assert_kept(tmp_path: Path, name: str) -> None:
    """Nothing but the recipe and the drawing in the folder (refused_once checks the
    output root)."""
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted({"recipe.yaml", name})


def test_a_missing_file_is_refused(tmp_path, capsys, no_cad_work):
    path, got = refused(tmp_path, capsys, "pad.step", None)
    assert_line(path, got, 3, "body.path", "names no file", "a STEP file")
    assert f"(looked for {tmp_path / 'pad.step'})" in got
    assert "(got 'pad.step')" in got


@pytest.mark.parametrize("data", [b"a pad, drawn on paper\n",
                                  b"solid pad\n  facet normal 0 0 1\n    outer loop\n"],
                         ids=["text", "stl-renamed"])
def test_a_file_that_is_not_step_is_refused(data, tmp_path, capsys, no_cad_work):
    path, got = refused(tmp_path, capsys, "pad.step", data)
    assert_line(path, got, 3, "body.path", "is not a STEP file", "one closed solid")
    assert_kept(tmp_path, "pad.step")


def test_a_step_file_without_a_shape_is_refused(tmp_path, capsys, no_cad_work):
    path, got = refused(tmp_path, capsys, "pad.step", stepfiles.empty_bytes())
    assert_line(path, got, 3, "body.path", "holds no solid", "one closed solid")


def test_two_solids_are_refused(tmp_path, capsys, no_cad_work):
    path, got = refused(tmp_path, capsys, "pad.step", stepfiles.two_boxes_bytes())
    assert_line(path, got, 3, "body.path", "holds more than one solid: found 2 solids",
                "one closed solid")


# (STEP keeps a lone face in a shell of its own.)
@pytest.mark.parametrize("make, found", [(stepfiles.open_face_bytes, "1 open shell(s), 1 "
                                          "face(s)"),
                                         (stepfiles.open_shell_bytes, "1 open shell(s), 5 "
                                          "face(s)")], ids=["one-face", "open-shell"])
def test_an_open_surface_is_refused(make, found, tmp_path, capsys, no_cad_work):
    path, got = refused(tmp_path, capsys, "pad.step", make())
    assert_line(path, got, 3, "body.path", f"holds no closed solid: found {found}",
                "one closed solid")


def test_a_body_drawn_in_inches_is_refused_with_the_factor(tmp_path, capsys, no_cad_work):
    # The 40 x 24 x 12 mm pad drawn in inches and written without units: 1.575 x 0.945 x
    # 0.472 "mm"; times 25.4 (NIST SP 811) it fits the default 220 x 220 x 250 mm printer.
    inch = 25.4
    data = stepfiles.rounded_box_bytes(40 / inch, 24 / inch, 12 / inch, 2 / inch)
    path, got = refused(tmp_path, capsys, "pad.step", data)
    assert_line(path, got, 3, "body.path", "holds a body only 1.575 x 0.9449 x 0.4724 mm: "
                "looks like inches: multiply by 25.4", "drawn in mm")


def test_a_body_too_large_for_the_printer_is_refused_with_both_sizes(tmp_path, capsys,
                                                                     no_cad_work):
    data = stepfiles.rounded_box_bytes(400.0, 24.0, 12.0, 2.0)
    path, got = refused(tmp_path, capsys, "pad.step", data)
    assert_line(path, got, 3, "body.path", "holds a body 400 x 24 x 12 mm after placement, "
                "larger than the printer (bed 220 x 220 mm, height 250 mm)",
                "fits the printer")


def test_a_body_off_the_inlet_face_is_told_the_translation_that_fixes_it(
        tmp_path, capsys, no_cad_work):
    # Drawn centred on the origin (CAD programs' habit): x in [-20, 20]. Moved by
    # [5, 1, 0] it starts at x = -15; [20, 1, 0] puts its end on x = 0.
    data = stepfiles.rounded_box_bytes(40.0, 24.0, 12.0, 2.0, at_mm=(-20.0, 0.0, 0.0))
    path, got = refused(tmp_path, capsys, "pad.step", data,
                        extra="  translate_mm: [5, 1, 0]\n")
    assert_line(path, got, 4, "body.translate_mm", "puts the body's lowest x at -15 mm, "
                "not on the inlet face x = 0", "translate_mm: [20, 1, 0]")
    assert "(got [5.0, 1.0, 0.0])" in got
