"""Rewrite the recipe reference inside a document (the README), in place and atomically."""

from __future__ import annotations

from pathlib import Path

from ..recipe.reference import splice
from .advice import advice_section, splice_advice
from .files import write_atomic


def update_reference(path: Path) -> None:
    """Replace the text between the reference markers in ``path`` with the reference
    generated from the field declarations, and the text between the finding-advice
    markers, if it has them, with the advice for every registered check. OSError when it
    cannot be read or written, ValueError when the reference markers are missing."""
    text = splice(path.read_text())
    if advice_section(text) is not None:
        text = splice_advice(text)
    write_atomic(path, text.encode())
