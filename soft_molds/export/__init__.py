"""The export stage: a built mold set as files (the only package that writes any).

``manifest.py`` is the typed ``manifest.json`` (make, write, read back); ``formats/``
registers the output formats (STL, STEP, casting card); ``writer.py`` encodes a mold set in
every format and writes the set with its manifest last; ``files.py`` does the atomic
writing; ``card.py`` and ``sheet.py`` lay out the casting card and the family sheet.
"""

from __future__ import annotations

from .manifest import Manifest, ManifestError, manifest_of, read_manifest
from .writer import EncodedSet, WrittenSet, encode_mold_set, write_mold_set

__all__ = ["EncodedSet", "Manifest", "ManifestError", "WrittenSet", "encode_mold_set",
           "manifest_of", "read_manifest", "write_mold_set"]
