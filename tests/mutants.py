"""Recipe mutants: a bundled recipe with one field changed, written out as recipe text.

Shared by the corpus generator (``tests/make_mutant_corpus.py``) and the test that runs
the stored corpus (``tests/recipe/test_mutant_corpus.py``). A mutant is a bundled recipe
(read with PyYAML's safe loader, an independent reader), one operation on one field path
and, for most operations, the raw YAML text of the new value. The recipe is written back
by the small block emitter below, which knows the line of every key, so the test can
say on which line the refusal must point.

Operations:

- ``set``: the key at ``path`` gets ``value`` verbatim (added when missing; a missing
  block is added with it);
- ``delete``: the key at ``path`` is left out;
- ``dup``: the key is written twice, the second time with ``value``;
- ``tab_value``: ``key:<TAB>value`` (YAML forbids a tab there: yaml.org/spec/1.1 6.1);
- ``tab_indent``: the key's line indented with a tab (YAML 1.1 spec 4.2.2 forbids it).

Paths are the recipe's own field paths: ``body.length_mm``, ``voids[0].count``,
``mold.wall_mm``, ``variants.vary``.
"""

from __future__ import annotations

import copy
import json
import re
from dataclasses import dataclass, field
from pathlib import Path

import yaml

ROOT = Path(__file__).resolve().parents[1]
RECIPES = ROOT / "recipes"
CORPUS = ROOT / "tests" / "data" / "mutants" / "corpus.json"

_STEP = re.compile(r"([^.\[\]]+)((?:\[\d+\])*)")


@dataclass(frozen=True)
class Mutant:
    id: str
    base: str                   # stem of a bundled recipe
    op: str                     # set, delete, dup, tab_value, tab_indent
    path: str                   # the mutated field
    value: str | None           # raw YAML text of the new value (None for delete)
    why: str                    # what kind of mutation (for counts and failure messages)
    outcome: str                # "refused" or "accepted"
    basis: str                  # "declared" (from the field declarations) or "recorded"
    names: tuple[str, ...] = ()  # field paths a refusal must name ("" = the document)
    allowed: str | None = None  # what the refusal must say is allowed (declared cases)
    extra: dict = field(default_factory=dict)


def steps(path: str) -> list[str | int]:
    """``voids[0].center_mm`` -> ["voids", 0, "center_mm"]."""
    out: list[str | int] = []
    for part in path.split("."):
        m = _STEP.fullmatch(part)
        if m is None:
            raise ValueError(f"not a field path: {path!r}")
        out.append(m.group(1))
        out += [int(i) for i in re.findall(r"\d+", m.group(2))]
    return out


def base_document(stem: str) -> dict:
    """The bundled recipe ``stem`` as plain data (PyYAML's safe loader)."""
    doc = yaml.safe_load((RECIPES / f"{stem}.yaml").read_text())
    assert isinstance(doc, dict), stem
    return doc


class _Raw(str):
    """A value written verbatim."""


_MARK = "\x00mutated\x00"  # key suffix marking the mutated key while emitting


def render(stem: str, op: str, path: str, value: str | None) -> tuple[str, int | None, int | None]:
    """(recipe text, line of the mutated key, line of its parent's key) for one mutant;
    the lines are 1-based (None: a deleted key, or a key at the top level)."""
    doc = copy.deepcopy(base_document(stem))
    *head, last = steps(path)
    parent = doc
    for s in head:
        if isinstance(s, int):
            parent = parent[s]
        else:
            parent = parent.setdefault(s, {})
    assert isinstance(last, str) and isinstance(parent, dict), path
    if op == "delete":
        parent.pop(last, None)
    else:
        old = parent.get(last)
        new = _Raw(value if value is not None else _scalar(old))
        items = list(parent.items())
        parent.clear()
        placed = False
        for k, v in items:
            if k == last:
                if op == "dup":
                    parent[k] = v
                parent[k + _MARK + op] = new
                placed = True
            else:
                parent[k] = v
        if not placed:
            parent[last + _MARK + op] = new
    lines: list[str] = []
    at: dict[str, int] = {}
    _emit_map(doc, 0, lines, at, "", first_prefix=None)
    text = "\n".join(lines) + "\n"
    parent_path = path.rsplit(".", 1)[0] if "." in path else ""
    return text, at.get(path), at.get(parent_path) if parent_path else None


def _scalar(v: object) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if v is None:
        return "~"
    if isinstance(v, (int, float)):
        return repr(v)
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, list):
        return "[" + ", ".join(_scalar(i) for i in v) + "]"
    if isinstance(v, dict):
        return "{" + ", ".join(f"{json.dumps(k)}: {_scalar(i)}" for k, i in v.items()) + "}"
    raise TypeError(type(v))


def _join(base: str, key: str | int) -> str:
    if isinstance(key, int):
        return f"{base}[{key}]"
    return f"{base}.{key}" if base else key


def _emit_map(m: dict, indent: int, lines: list[str], at: dict[str, int], path: str,
              first_prefix: str | None) -> None:
    """Block mapping at ``indent``; ``first_prefix`` replaces the first key's indentation
    (``"  - "`` for a mapping that is a list item). ``at`` gets the line of every key by
    field path (a list item's path: the line of its first key)."""
    for i, (k, v) in enumerate(m.items()):
        pad = first_prefix if (i == 0 and first_prefix is not None) else " " * indent
        key, op = k, None
        if _MARK in k:
            key, op = k.split(_MARK)
        here = _join(path, key)
        line_no = len(lines) + 1
        at[here] = line_no  # a duplicated key: the second (mutated) one's line
        if op is not None:
            if op == "tab_indent":
                pad = "\t" + pad.lstrip(" ")
            sep = ":\t" if op == "tab_value" else ": "
            lines.append(f"{pad}{key}{sep}{v}")
            continue
        if isinstance(v, dict) and v:
            lines.append(f"{pad}{key}:")
            _emit_map(v, indent + 2, lines, at, here, None)
        elif isinstance(v, list) and v and all(isinstance(i, dict) for i in v):
            lines.append(f"{pad}{key}:")
            for j, item in enumerate(v):
                at[_join(here, j)] = len(lines) + 1
                _emit_map(item, indent + 4, lines, at, _join(here, j),
                          " " * (indent + 2) + "- ")
        else:
            lines.append(f"{pad}{key}: {v if isinstance(v, _Raw) else _scalar(v)}")


def load_corpus(path: Path = CORPUS) -> list[Mutant]:
    data = json.loads(path.read_text())
    return [Mutant(**{"value": None, "allowed": None, **m, "names": tuple(m.get("names", ()))})
            for m in data["mutants"]]
