"""A changed recipe field in the words of the bench: ``voids[0].height_mm = 6`` reads
"chamber height 6 mm", ``mold.wall_mm = 5`` "mold wall 5 mm".

The words come from the field declarations that validate the recipe
(:mod:`soft_molds.recipe.fields`; the body and void kinds' ``FIELDS`` and the settings
blocks of :mod:`soft_molds.recipe.schema`): the field's name without its unit suffix, its
unit after the value. So a renamed or added field is worded without touching this module.
Who the field belongs to is the block's name, ``body``, or for a void the noun of its kind
(numbered when the recipe has several voids).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from ..recipe.fields import Field
from ..recipe.registry import body_kinds, void_kinds
from ..recipe.schema import BLOCKS, TOP_FIELDS
from ..recipe.variants import split_path

#: The noun of a void kind whose name is a plural (a row of chambers is worded per chamber).
_NOUNS = {"chambers": "chamber"}
#: How a unit is spelled at the end of a field name (``height_mm``, ``waste_pct``, ...).
_SUFFIX = {"%": "pct", "g/cm3": "g_cm3"}


def _unit_suffix(unit: str) -> str:
    return "_" + _SUFFIX.get(unit, unit.lower())


def _value_text(f: Field | None, value: object) -> str:
    if isinstance(value, bool) or value is None:
        text = str(value)
    elif isinstance(value, float):
        text = f"{value:g}"
    elif isinstance(value, (list, tuple)):
        text = ", ".join(f"{x:g}" if isinstance(x, float) else str(x) for x in value)
    elif isinstance(value, dict) and set(value) == {"from", "to"}:  # a graded size
        text = f"{value['from']:g} to {value['to']:g}"
    else:
        text = str(value)
    if f is not None and f.unit and f.kind in ("number", "pair", "triple", "points", "rounds",
                                               "graded"):
        text += f" {f.unit}" if f.unit != "%" else " %"
    return text


def _field_name(f: Field) -> str:
    name = f.name.removesuffix(_unit_suffix(f.unit)) if f.unit else f.name
    return name.replace("_", " ")


def _owner(keys: Sequence[str | int], params: Mapping[str, object]
           ) -> tuple[str, tuple[Field, ...], int]:
    """(owner words, the owner's fields, how many path keys name the owner)."""
    top = keys[0]
    if top == "body":
        body = params.get("body")
        kind = body.get("kind") if isinstance(body, dict) else None
        cls = body_kinds().get(str(kind))
        return "body", (cls.FIELDS if cls is not None else ()), 1
    if top == "voids" and len(keys) > 1 and isinstance(keys[1], int):
        voids = params.get("voids")
        voids = voids if isinstance(voids, list) else []
        i = keys[1]
        kind = voids[i].get("kind") if i < len(voids) and isinstance(voids[i], dict) else None
        vcls = void_kinds().get(str(kind))
        noun = _NOUNS.get(str(kind), str(kind) if kind is not None else "void")
        if len(voids) > 1:
            noun += f" (void {i + 1})"
        return noun, (vcls.FIELDS if vcls is not None else ()), 2
    if isinstance(top, str) and top in BLOCKS:
        return top, BLOCKS[top], 1
    return "", TOP_FIELDS, 0


def field_words(path: str, value: object, params: Mapping[str, object]) -> tuple[str, str]:
    """``(name, value)`` words for the recipe field at ``path`` set to ``value``, e.g.
    ("chamber height", "6 mm"). ``params``: the resolved recipe as the manifest echoes it
    (it names the body's and each void's kind)."""
    keys = split_path(path)
    owner, fields, used = _owner(keys, params)
    rest = keys[used:]
    f = next((x for x in fields if len(rest) == 1 and x.name == rest[0]), None)
    if f is None:
        tail = " ".join(str(k) if isinstance(k, str) else f"[{k}]" for k in rest)
        name = " ".join(p for p in (owner, tail.replace("_", " ")) if p)
        return name or path, _value_text(None, value)
    return " ".join(p for p in (owner, _field_name(f)) if p), _value_text(f, value)
