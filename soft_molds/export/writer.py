"""A built mold set as files: every registered format, then the manifest with their digests.

:func:`encode_mold_set` turns a :class:`~soft_molds.moldset.MoldSet` into file name ->
bytes in memory; :func:`write_mold_set` writes that set atomically under
``root/<recipe>/<label>/`` (manifest last, see :func:`~soft_molds.export.files.write_file_set`)
and reports what it wrote and how long it took.
"""

from __future__ import annotations

import os
import time
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from .files import write_file_set
from .formats import output_formats
from .manifest import MANIFEST_NAME, Manifest, manifest_bytes, manifest_of

if TYPE_CHECKING:
    from ..analysis.result import BuiltMoldSet


@dataclass(frozen=True)
class EncodedSet:
    """Every file of one mold set in memory (name -> bytes, manifest last) and the
    manifest it ends with (``files`` filled in)."""

    files: Mapping[str, bytes]
    manifest: Manifest


@dataclass(frozen=True)
class WrittenSet:
    """What :func:`write_mold_set` wrote: the folder, the paths (in the order of
    :attr:`EncodedSet.files`), the manifest, and the seconds spent encoding and writing."""

    directory: Path
    paths: tuple[Path, ...]
    manifest: Manifest
    write_s: float


def output_dir(root: str | os.PathLike[str], recipe: str, label: str) -> Path:
    """Where a variant's files go: ``root/<recipe>/<label>``."""
    return Path(root) / recipe / label


def encode_mold_set(molds: BuiltMoldSet, formats: Sequence[str] | None = None) -> EncodedSet:
    """The files of ``molds`` in the ``formats`` named (default: every registered one),
    then ``manifest.json`` recording every other file's SHA-256, so a resumed sweep can
    tell a finished set from one a killed run left behind. ValueError for an unknown
    format or two formats writing the same file name."""
    known = output_formats()
    names = list(known) if formats is None else list(formats)
    unknown = [n for n in names if n not in known]
    if unknown:
        raise ValueError(f"unknown output format(s) {', '.join(unknown)}; "
                         f"known: {', '.join(known)}")
    man = manifest_of(molds)
    out: dict[str, bytes] = {}
    owner: dict[str, str] = {}
    for name in names:
        for file, data in known[name].encode(molds, man).items():
            if file == MANIFEST_NAME or file in out:
                raise ValueError(f"output format {name!r} writes {file!r}, which "
                                 f"{owner.get(file, 'the manifest')!r} writes too")
            out[file], owner[file] = data, name
    man = man.with_files(out)
    out[MANIFEST_NAME] = manifest_bytes(man)
    return EncodedSet(out, man)


def write_mold_set(molds: BuiltMoldSet, root: str | os.PathLike[str] = "out",
                   formats: Sequence[str] | None = None) -> WrittenSet:
    """Encode ``molds`` (see :func:`encode_mold_set`) and write the set under
    ``root/<recipe>/<label>/``: each file appears complete or not at all, the manifest
    last. Nothing in ``molds`` changes."""
    t = time.perf_counter()
    encoded = encode_mold_set(molds, formats)
    directory = output_dir(root, molds.recipe.name, molds.recipe.label)
    paths = write_file_set(directory, encoded.files, last=MANIFEST_NAME)
    return WrittenSet(directory, tuple(paths), encoded.manifest, time.perf_counter() - t)
