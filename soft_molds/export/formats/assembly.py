"""Assembly pictures of one variant: an exploded and a cut-away PNG and an offline 3-D
preview page (see :mod:`soft_molds.export.assembly`); the casting card embeds the PNGs."""

from __future__ import annotations

import weakref
from typing import TYPE_CHECKING

from ..assembly import PREVIEW_HTML, Picture, variant_pictures
from . import output_format

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest

# Drawn once per built set: the casting card embeds the same pictures this format writes.
_drawn: weakref.WeakKeyDictionary[BuiltMoldSet, tuple[tuple[Picture, ...], bytes]] = \
    weakref.WeakKeyDictionary()


def assembly_pictures(molds: BuiltMoldSet, manifest: Manifest
                      ) -> tuple[tuple[Picture, ...], bytes]:
    """The pictures and preview page of ``molds`` (drawn on first use, then shared)."""
    if molds not in _drawn:
        _drawn[molds] = variant_pictures(manifest, {p.name: p.mesh for p in molds.parts})
    return _drawn[molds]


@output_format("assembly", "exploded and cut-away PNG pictures and an offline 3-D preview")
def assembly_files(molds: BuiltMoldSet, manifest: Manifest) -> dict[str, bytes]:
    pictures, page = assembly_pictures(molds, manifest)
    return {**{p.file: p.png for p in pictures}, PREVIEW_HTML: page}
