"""The public build result: :class:`BuiltMoldSet` with the methods that hand it to the export
stage (the manifest it will write, its files' bytes, writing them).

Frame: mm, world (see :mod:`soft_molds.recipe.model`).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from .analysis.result import BuiltMoldSet, Part
from .export.manifest import Manifest, manifest_of
from .export.writer import encode_mold_set, output_dir, write_mold_set

__all__ = ["MoldSet", "Part"]


@dataclass(frozen=True, eq=False)
class MoldSet(BuiltMoldSet):
    """Everything built from one recipe; :meth:`export` writes it (through
    :mod:`soft_molds.export`). Nothing here changes after the build."""

    def output_dir(self, root: str | os.PathLike[str]) -> Path:
        return output_dir(root, self.recipe.name, self.recipe.label)

    def manifest(self) -> Manifest:
        """What ``manifest.json`` will say, typed, without ``files`` (the digests are
        known once the files are encoded: see :func:`soft_molds.export.encode_mold_set`).
        ``manifest().to_json()`` gives it as JSON-shaped dicts and lists."""
        return manifest_of(self)

    def files(self) -> dict[str, bytes]:
        """File name -> bytes of every output (every registered format), manifest last."""
        return dict(encode_mold_set(self).files)

    def export(self, root: str | os.PathLike[str] = "out") -> list[Path]:
        """Write every registered format (STL and STEP per part, the casting card) and
        ``manifest.json`` under ``root/<recipe>/<label>/``; each file appears complete or
        not at all. Returns the paths written; changes nothing in this value (the time
        taken is in :func:`soft_molds.export.write_mold_set`'s result)."""
        return list(write_mold_set(self, root).paths)
