"""Print plates of one variant: its printable parts in their print pose, packed onto as few
beds of the recipe's printer as they fit, one 3MF and one top-view PNG per bed (see
:mod:`soft_molds.export.plates`)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..plates import variant_plate_files
from . import output_format

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest


@output_format("plates", "3MF print plates of the printable parts, posed and packed per bed")
def plates_files(molds: BuiltMoldSet, manifest: Manifest) -> dict[str, bytes]:
    bed = molds.recipe.printer.bed_mm
    return variant_plate_files(manifest, {p.name: p.mesh for p in molds.parts},
                               (float(bed[0]), float(bed[1])))
