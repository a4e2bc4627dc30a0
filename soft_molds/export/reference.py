"""Rewrite the recipe reference inside a document (the README), in place and atomically."""

from __future__ import annotations

from pathlib import Path

from ..recipe.reference import splice
from .advice import splice_advice
from .files import write_atomic


def update_reference(path: Path) -> None:
    """Replace the text between the reference markers in ``path`` with the reference
    generated from the field declarations, and the text between the finding-advice
    markers with the advice for every registered check. OSError when it cannot be read or
    written, ValueError when the markers are missing."""
    write_atomic(path, splice_advice(splice(path.read_text())).encode())
