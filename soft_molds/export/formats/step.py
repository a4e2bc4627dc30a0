"""STEP (ISO 10303-21, AP214) of every part's BRep, named as ``parts[].step`` says.

The text comes from the geometry stage's encoder, the only code that touches the kernel."""

from __future__ import annotations

from typing import TYPE_CHECKING

from . import output_format

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest


@output_format("step", "STEP AP214 of every part, mm (for CAD)")
def step_files(molds: BuiltMoldSet, manifest: Manifest) -> dict[str, bytes]:
    # Imported here: listing the formats must not load the CAD kernel.
    from ...geometry.tessellate import step_bytes

    tag = f"{manifest.recipe}-{manifest.label}"
    return {rec.step: step_bytes(part.brep, f"{tag}-{part.name}")
            for part, rec in zip(molds.parts, manifest.parts)}
