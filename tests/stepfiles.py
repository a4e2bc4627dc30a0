"""STEP files of bodies for the ``file`` body kind, written with cadquery.

``python tests/stepfiles.py`` rewrites the bundled demo's drawing,
``recipes/cad/seedling-pad.step`` (the same bytes every time: the header carries a fixed
time stamp, see ``soft_molds/geometry/tessellate.step_bytes``). The tests write theirs into
a temporary folder with the same functions.
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:  # run as a script from anywhere
    sys.path.insert(0, str(ROOT))

DEMO = ROOT / "recipes" / "cad" / "seedling-pad.step"

#: The seedling plug press pad (mm): a wedge, full height over its first part, its top
#: sloping down to a low, blunt nose that slips between the plugs; every edge rounded.
PAD_LENGTH_MM = 48.0
PAD_WIDTH_MM = 22.0
PAD_HEIGHT_MM = 12.0          # z in [-6, 6] at the inlet end
PAD_SLOPE_FROM_MM = 26.0      # the top starts to fall here
PAD_NOSE_TOP_MM = 0.0         # top of the nose at the far end (z)
PAD_ROUND_MM = 1.5


def rounded_box_bytes(length_mm: float, width_mm: float, height_mm: float,
                      radius_mm: float, at_mm: tuple[float, float, float] = (0.0, 0.0, 0.0)
                      ) -> bytes:
    """STEP text of a box x in [0, length] + at, y and z centred on ``at``, every edge and
    corner rounded by ``radius_mm``: the ``bar`` body's solid, drawn independently."""
    import cadquery as cq

    from soft_molds.geometry.tessellate import step_bytes

    box = cq.Workplane("XY").box(length_mm, width_mm, height_mm)
    if radius_mm > 0.0:
        box = box.edges().fillet(radius_mm)
    solid = box.val().translate(cq.Vector(length_mm / 2.0 + at_mm[0], at_mm[1], at_mm[2]))
    return step_bytes(solid, "bar")


def pad_solid():
    """The demo pad: its side outline (x, z) pushed along y, every edge rounded."""
    import cadquery as cq

    h = PAD_HEIGHT_MM / 2.0
    outline = [(0.0, -h), (PAD_LENGTH_MM, -h), (PAD_LENGTH_MM, PAD_NOSE_TOP_MM),
               (PAD_SLOPE_FROM_MM, h), (0.0, h)]
    prism = (cq.Workplane("XZ").polyline(outline).close()
             .extrude(PAD_WIDTH_MM / 2.0, both=True))
    return prism.edges().fillet(PAD_ROUND_MM).val()


def pad_bytes() -> bytes:
    from soft_molds.geometry.tessellate import step_bytes

    return step_bytes(pad_solid(), "seedling-pad")


def open_face_bytes() -> bytes:
    """STEP text of one square face: no solid, an open surface."""
    import cadquery as cq

    from soft_molds.geometry.tessellate import step_bytes

    return step_bytes(cq.Face.makePlane(20.0, 20.0), "face")


def open_shell_bytes() -> bytes:
    """STEP text of a box's shell less one face: closed nowhere, so no solid."""
    import cadquery as cq

    from soft_molds.geometry.tessellate import step_bytes

    box = cq.Solid.makeBox(30.0, 10.0, 10.0)
    shell = cq.Shell.makeShell(box.Faces()[1:])
    return step_bytes(shell, "open-shell")


def two_boxes_bytes() -> bytes:
    """STEP text of two separate boxes in one file."""
    import cadquery as cq

    from soft_molds.geometry.tessellate import step_bytes

    a = cq.Solid.makeBox(30.0, 10.0, 10.0)
    b = cq.Solid.makeBox(30.0, 10.0, 10.0, cq.Vector(0.0, 20.0, 0.0))
    return step_bytes(cq.Compound.makeCompound([a, b]), "two")


def empty_bytes() -> bytes:
    """STEP text with a header and no shape at all."""
    return (b"ISO-10303-21;\nHEADER;\nFILE_DESCRIPTION((''),'2;1');\n"
            b"FILE_NAME('empty','2000-01-01T00:00:00',(''),(''),'','','');\n"
            b"FILE_SCHEMA(('AUTOMOTIVE_DESIGN { 1 0 10303 214 1 1 1 1 }'));\nENDSEC;\n"
            b"DATA;\nENDSEC;\nEND-ISO-10303-21;\n")


def main() -> int:
    DEMO.parent.mkdir(parents=True, exist_ok=True)
    DEMO.write_bytes(pad_bytes())
    print(f"wrote {DEMO.relative_to(ROOT)} ({DEMO.stat().st_size} bytes)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
