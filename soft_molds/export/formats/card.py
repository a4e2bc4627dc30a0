"""The casting card of one variant, in Markdown and HTML (see :mod:`soft_molds.export.card`)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..card import card_files
from . import output_format
from .assembly import assembly_pictures

if TYPE_CHECKING:
    from ...analysis.result import BuiltMoldSet
    from ..manifest import Manifest


@output_format("casting-card", "what to weigh, the steps of a cast and the cautions")
def casting_card_files(molds: BuiltMoldSet, manifest: Manifest) -> dict[str, bytes]:
    if manifest.casting is None:
        return {}
    pictures, _ = assembly_pictures(molds, manifest)
    return card_files([manifest], f"{manifest.recipe} {manifest.label}",
                      pictures={manifest.label: pictures})
