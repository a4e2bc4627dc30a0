"""A JSON Schema (draft 2020-12) of the recipe file, for editors that check YAML as it is
typed, generated from the same field declarations that validate recipes and write the
README reference (:mod:`.fields`, :mod:`.schema` and the registered kinds), so the three
cannot drift apart. ``soft-molds schema`` prints it.

What the schema cannot say is left to the loader, which stays the judge: checks across
fields (a chamber deeper than its pitch, a fillet too large for the bar), the geometry's
sanity, the printer rules, the grade table, and the values a ``variants`` block sets (it
checks only the block's shape). A recipe the loader accepts always meets the schema.
"""

from __future__ import annotations

import json
import re
from typing import Any

from .fields import MAX_PATHS, MAX_POINTS, MAX_RECORDS, Field
from .load import LABEL_RE, MAX_VOIDS, NAME_RE, TAG_RE
from .registry import body_kinds, void_kinds
from .schema import BLOCKS, LIST_BLOCKS, TOP_FIELDS
from .variants import HARD_MAX_VARIANTS, PATH_RE
from .variants import LABEL_RE as VARIANT_LABEL_RE

DRAFT = "https://json-schema.org/draft/2020-12/schema"

#: Text fields the loader also matches against a pattern: (block, key) -> pattern.
PATTERNS: dict[tuple[str, str], re.Pattern[str]] = {
    ("", "name"): NAME_RE,
    ("", "label"): LABEL_RE,
    ("marking", "tag"): TAG_RE,
}

Schema = dict[str, Any]


def _bounded(f: Field) -> Schema:
    """One number within the field's bounds (``gap_below``: 0, or at least the gap)."""
    out: Schema = {"type": "number"}
    if f.lo is not None:
        out["exclusiveMinimum" if f.lo_open else "minimum"] = f.lo
    if f.hi is not None:
        out["maximum"] = f.hi
    if f.gap_below > 0.0:
        out["anyOf"] = [{"const": 0}, {"minimum": f.gap_below}, {"maximum": -f.gap_below}]
    return out


def _value(f: Field, pattern: re.Pattern[str] | None = None) -> Schema:
    if f.kind == "choice":
        return {"enum": list(f.choices)}
    if f.kind == "text":
        # the loader strips the text and refuses an empty one
        return {"type": "string", "pattern": pattern.pattern if pattern else r"\S"}
    if f.kind == "integer":
        out: Schema = {"type": "integer"}
        if f.lo is not None:
            out["minimum"] = int(f.lo)
        if f.hi is not None:
            out["maximum"] = int(f.hi)
        return out
    if f.kind in ("pair", "triple"):
        count = 2 if f.kind == "pair" else 3
        return {"type": "array", "items": _bounded(f), "minItems": count, "maxItems": count}
    if f.kind == "points":
        point = {"type": "array", "items": _bounded(f), "minItems": 2, "maxItems": 2}
        return {"type": "array", "items": point, "minItems": 2, "maxItems": MAX_POINTS}
    if f.kind == "paths":
        point = {"type": "array", "items": _bounded(f), "minItems": 2, "maxItems": 2}
        one = {"type": "array", "items": point, "minItems": 2, "maxItems": MAX_POINTS}
        return {"type": "array", "items": one, "minItems": 1, "maxItems": MAX_PATHS}
    if f.kind == "records":
        return {"type": "array", "items": block_schema(f.fields), "minItems": 1,
                "maxItems": MAX_RECORDS}
    if f.kind == "rounds":
        return {"anyOf": [_bounded(f), {"type": "array", "items": _bounded(f), "minItems": 1,
                                        "maxItems": MAX_POINTS}]}
    if f.kind == "graded":
        grade = {"type": "object", "properties": {"from": _bounded(f), "to": _bounded(f)},
                 "required": ["from", "to"], "additionalProperties": False}
        return {"anyOf": [_bounded(f), {"type": "array", "items": _bounded(f), "minItems": 1,
                                        "maxItems": MAX_POINTS}, grade]}
    if f.kind == "number":
        return _bounded(f)
    raise ValueError(f"field {f.name!r}: no schema for kind {f.kind!r}")


def _jsonable(x: object) -> object:
    return list(x) if isinstance(x, tuple) else x


def field_schema(f: Field, block: str = "") -> Schema:
    """The schema of one field: its value, its meaning and what it allows."""
    out = _value(f, PATTERNS.get((block, f.name)))
    unit = f" [{f.unit}]" if f.unit else ""
    out["description"] = f"{f.doc}{unit}. Allowed: {f.allowed()}."
    if not f.required and f.default is not None and f.default != "":
        # (an empty text default means "none": the key itself must not be empty)
        out["default"] = _jsonable(f.default)
    return out


def block_schema(fields: tuple[Field, ...], block: str = "",
                 extra: Schema | None = None) -> Schema:
    """An object of ``fields`` (plus ``extra`` properties), no other key allowed."""
    props = dict(extra or {})
    props.update({f.name: field_schema(f, block) for f in fields})
    out: Schema = {"type": "object", "properties": props, "additionalProperties": False}
    required = [*(["kind"] if extra and "kind" in extra else []),
                *(f.name for f in fields if f.required)]
    if required:
        out["required"] = required
    return out


def _kinds(what: str, kinds: dict[str, type]) -> Schema:
    """A body or void: ``kind`` names one of the registered kinds, which then sets the keys."""
    branches = []
    for name, cls in kinds.items():
        then = block_schema(cls.FIELDS, extra={"kind": {"const": name}})  # type: ignore[attr-defined]
        then["description"] = " ".join((cls.__doc__ or "").split())
        branches.append({"if": {"properties": {"kind": {"const": name}}, "required": ["kind"]},
                         "then": then})
    return {"type": "object", "description": f"one {what}: `kind` chooses its keys",
            "required": ["kind"],
            "properties": {"kind": {"enum": list(kinds)}},
            "allOf": branches}


def _variants() -> Schema:
    path = {"pattern": PATH_RE.pattern}
    rng = {"type": "object", "required": ["from", "to", "count"],
           "additionalProperties": False,
           "properties": {"from": {"type": "number"}, "to": {"type": "number"},
                          "count": {"type": "integer", "minimum": 2,
                                    "maximum": HARD_MAX_VARIANTS}}}
    return {
        "type": "object",
        "description": "labelled variants (labels) or a sweep (vary); the values they set "
                       "are checked by the loader, per variant",
        "additionalProperties": False,
        "properties": {
            "labels": {"type": "object", "minProperties": 1,
                       "propertyNames": {"pattern": VARIANT_LABEL_RE.pattern},
                       "additionalProperties": {"type": "object", "propertyNames": path}},
            "vary": {"type": "object", "minProperties": 1, "propertyNames": path,
                     "additionalProperties": {"anyOf": [{"type": "array", "minItems": 1},
                                                        rng]}},
            "combine": {"enum": ["product", "zip"]},
            "max_variants": {"type": "integer", "minimum": 1, "maximum": HARD_MAX_VARIANTS},
        },
        "oneOf": [{"required": ["labels"]}, {"required": ["vary"]}],
    }


def recipe_schema() -> Schema:
    """The JSON Schema of a recipe file, as a JSON-ready dict."""
    top = block_schema(TOP_FIELDS)
    props = top["properties"]
    props["body"] = _kinds("body", body_kinds())
    props["voids"] = {"type": "array", "minItems": 1, "maxItems": MAX_VOIDS,
                      "items": _kinds("void", void_kinds())}
    for block, fields in BLOCKS.items():
        props[block] = block_schema(fields, block)
    for block, (fields, most) in LIST_BLOCKS.items():
        props[block] = {"type": "array", "minItems": 1, "maxItems": most,
                        "items": block_schema(fields, block)}
    props["variants"] = _variants()
    return {"$schema": DRAFT, "title": "soft_molds recipe",
            "description": "A YAML recipe for a cast silicone actuator and its mold "
                           "(lengths in mm). Generated by `soft-molds schema`.",
            **top, "required": ["body", "voids"],
            "not": {"required": ["inlet", "inlets"]}}


def schema_text() -> str:
    """:func:`recipe_schema` as JSON text: two-space indent, keys in the order made."""
    return json.dumps(recipe_schema(), indent=2, ensure_ascii=False) + "\n"


if __name__ == "__main__":
    print(schema_text(), end="")
