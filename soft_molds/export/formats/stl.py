"""Binary STL of every part (mm), named as the manifest's ``parts[].file`` says."""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..stl import encode_binary_stl
from . import output_format

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest


@output_format("stl", "binary STL of every part, mm (for the slicer)")
def stl_files(molds: BuiltMoldSet, manifest: Manifest) -> dict[str, bytes]:
    head = f"{manifest.recipe} {manifest.label}"
    return {rec.file: encode_binary_stl(part.mesh, f"{head} {part.name}")
            for part, rec in zip(molds.parts, manifest.parts)}
