"""Recipe file -> validated :class:`Recipe`, reporting every problem at once."""

from __future__ import annotations

import os
import re
from dataclasses import replace
from pathlib import Path

from ..errors import Problem, RecipeError
from ..units import psi_to_kpa
from .contracts import bounds_of
from .fields import MapReader, join_path
from .materials import resolve
from .model import (
    CastingSettings,
    Checks,
    Inflate,
    Inlet,
    LabelSettings,
    Material,
    MeshSettings,
    MoldSettings,
    Parting,
    PrinterSettings,
    Recipe,
)
from .registry import body_kinds, void_kinds
from .sanity import sanity_problems
from .schema import BLOCKS, TOP_FIELDS
from .variants import (
    VariantSpec,
    apply_changes,
    expand,
    merge_problems,
    prefix_problems,
    without_variants,
)
from .yamlsource import Node, parse_recipe_text, read_recipe_file

NAME_RE = re.compile(r"^[a-z0-9][a-z0-9_-]{0,63}$")
LABEL_RE = re.compile(r"^[A-Z0-9][A-Z0-9-]{0,11}$")
TAG_RE = re.compile(r"^[A-Za-z0-9.-]{1,8}$")
MAX_VOIDS = 16


def load_recipe(path: str | os.PathLike) -> Recipe:
    """Read, validate and sanity-check a recipe file; raise :class:`RecipeError` listing
    every problem (field path, line, value found, what is allowed)."""
    root, source = read_recipe_file(path)
    return recipe_from_node(root, source, default_name=_stem_name(path),
                            base_dir=Path(path).resolve().parent)


def recipe_from_text(text: str, source: str = "recipe", default_name: str = "recipe",
                     base_dir: str | os.PathLike | None = None) -> Recipe:
    """Like :func:`load_recipe` for recipe text; ``base_dir`` is where relative file names
    in it (``material.table_file``) are found."""
    return recipe_from_node(parse_recipe_text(text, source), source, default_name,
                            None if base_dir is None else Path(base_dir))


def _stem_name(path: str | os.PathLike) -> str:
    stem = Path(path).stem.lower()
    stem = re.sub(r"[^a-z0-9_-]+", "-", stem).strip("-_") or "recipe"
    return stem[:64]


def _read_kind(node: Node | None, path: str, registry: dict, problems: list[Problem],
               line: int | None, what: str):
    r = MapReader(node, path, problems, line, what=f"a mapping describing the {what}")
    if node is None or not isinstance(node.value, dict):
        return None
    kind_node = r.node("kind")
    names = ", ".join(registry)
    if kind_node is None:
        r.problem(f"{path}.kind", "is required", r.line, None, names)
        return None
    cls = registry.get(kind_node.value) if isinstance(kind_node.value, str) else None
    if cls is None:
        from .fields import _suggest

        hint = _suggest(str(kind_node.value), list(registry))
        r.problem(f"{path}.kind", f"is not a known {what} kind{hint}",
                  kind_node.key_line or kind_node.line, kind_node.plain(), names)
        return None
    values = r.take_all(cls.FIELDS)
    r.finish()
    if not r.ok:
        return None
    extra = cls.cross_check(values, path, r.line)
    if extra:
        # A kind's cross-check only knows the block's line; point at the field's own key
        # when the recipe wrote it (a default keeps the block's line).
        prefix = path + "."
        problems.extend(
            replace(p, line=r.line_of(p.path[len(prefix):]))
            if p.path.startswith(prefix) and p.path[len(prefix):] in r.items else p
            for p in extra)
        return None
    return cls(**values)


def load_variants(path: str | os.PathLike) -> tuple[tuple[VariantSpec, Recipe], ...]:
    """Every variant of a recipe file (one, labelled as the recipe says, when it has no
    ``variants`` block), each validated; a :class:`RecipeError` lists every problem, those
    of a variant naming its label."""
    root, source = read_recipe_file(path)
    return variants_from_node(root, source, _stem_name(path), Path(path).resolve().parent)


def variants_from_text(text: str, source: str = "recipe", default_name: str = "recipe",
                       base_dir: str | os.PathLike | None = None
                       ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    return variants_from_node(parse_recipe_text(text, source), source, default_name,
                              None if base_dir is None else Path(base_dir))


def variants_from_node(root: Node, source: str, default_name: str = "recipe",
                       base_dir: Path | None = None) -> tuple[tuple[VariantSpec, Recipe], ...]:
    specs, problems = expand(root)
    if problems:
        raise RecipeError(problems, source)
    base = without_variants(root)
    # The recipe as written first: its own problems are reported once, not per variant.
    base_recipe = recipe_from_node(base, source, default_name, base_dir)
    out = []
    for spec in specs:
        if not spec.changes:
            r = base_recipe
        else:
            found: list[Problem] = []
            node = apply_changes(base, spec.changes, found, spec.label)
            if found:
                problems.extend(found)
                continue
            try:
                r = recipe_from_node(node, source, default_name, base_dir)
            except RecipeError as exc:
                problems.extend(prefix_problems(exc, spec))
                continue
        if spec.label:
            r = replace(r, label=spec.label)
        out.append((spec, r))
    if problems:
        raise RecipeError(merge_problems(problems), source)
    labels = [r.label for _, r in out]
    if len(set(labels)) != len(labels):
        raise RecipeError([Problem("variants", "gives two variants the same label", None,
                                   labels, "distinct labels")], source)
    return tuple(out)


def recipe_from_node(root: Node, source: str, default_name: str = "recipe",
                     base_dir: Path | None = None) -> Recipe:
    """Validate a recipe document (its ``variants`` block, if any, is left to
    :func:`variants_from_node`)."""
    root = without_variants(root)
    problems: list[Problem] = []
    top = MapReader(root, "", problems, 1, what="a mapping (the recipe's top level)")
    if not isinstance(root.value, dict):
        raise RecipeError(problems, source)

    vals = top.take_all(TOP_FIELDS)
    name = vals["name"] if top.node("name") is not None else default_name
    if isinstance(name, str) and not NAME_RE.match(name):
        top.problem("name", "is not a usable folder name", top.line_of("name"), name,
                    "lower case letters, digits, '-' and '_', 1-64 characters")
    label = vals["label"]
    if isinstance(label, str) and not LABEL_RE.match(label):
        top.problem("label", "is not a valid label", top.line_of("label"), label,
                    "upper case letters, digits and '-', starting with a letter or digit")

    body = _read_kind(top.node("body"), "body", body_kinds(), problems, top.line, "body")
    if top.items.get("body") is None:
        top.problem("body", "is required", top.line, None, "a mapping with kind: "
                    + " | ".join(body_kinds()))

    voids = []
    vnode = top.node("voids")
    if vnode is None:
        top.problem("voids", "is required", top.line, None,
                    "a list of voids, each with kind: " + " | ".join(void_kinds()))
    elif not isinstance(vnode.value, list) or not vnode.value:
        top.problem("voids", "must be a non-empty list", vnode.key_line or vnode.line,
                    vnode.plain(), f"1 to {MAX_VOIDS} void entries")
    elif len(vnode.value) > MAX_VOIDS:
        top.problem("voids", "has too many entries", vnode.key_line or vnode.line,
                    len(vnode.value), f"at most {MAX_VOIDS}")
    else:
        for i, item in enumerate(vnode.value):
            voids.append(_read_kind(item, join_path("voids", i), void_kinds(), problems,
                                    item.line, "void"))

    blocks = {}
    for block, fields in BLOCKS.items():
        r = MapReader(top.node(block), block, problems, top.line)
        blocks[block] = r.take_all(fields)
        r.finish()
    top.finish()

    if problems or body is None or any(v is None for v in voids):
        raise RecipeError(problems, source)

    inlet_v = blocks["inlet"]
    if inlet_v["center_mm"] is None:
        inlet_v["center_mm"] = voids[0].entry()[0]
    parting_v = blocks["parting"]
    if parting_v["axis"] is None:
        lo, hi = bounds_of(body.primitives())
        parting_v["axis"] = "y" if hi[1] - lo[1] < hi[2] - lo[2] else "z"
    if parting_v["axis"] == "auto":
        if parting_v["offset_mm"] is not None:
            problems.append(Problem("parting.offset_mm", "is set while parting.axis is auto",
                                    _lines(root).get("parting.offset_mm"),
                                    parting_v["offset_mm"],
                                    "leave it out (the build chooses the plane) or give axis "
                                    "y or z"))
            raise RecipeError(problems, source)
    elif parting_v["offset_mm"] is None:
        # The core print must be seated in both halves, so the plane runs through the
        # socket's axis; for centred voids that is the body's mid-plane.
        cy, cz = inlet_v["center_mm"]
        parting_v["offset_mm"] = cz if parting_v["axis"] == "z" else cy

    lines = _lines(root)

    def line(path: str) -> int | None:
        while path and path not in lines:
            path = path.rsplit(".", 1)[0] if "." in path else ""
        return lines.get(path)

    silicone, blend, mat_problems = resolve(blocks["material"], base_dir, line)
    problems.extend(mat_problems)
    inf = blocks["inflate"]
    kpa, psi = inf["working_pressure_kpa"], inf["working_pressure_psi"]
    if kpa is not None and psi is not None:
        problems.append(Problem("inflate.working_pressure_psi", "is given with "
                                "working_pressure_kpa", line("inflate.working_pressure_psi"),
                                psi, "one of the two"))
    if problems:
        raise RecipeError(problems, source)
    working = psi_to_kpa(psi) if psi is not None else kpa
    lab = dict(blocks["marking"])
    if lab["tag"] is None:
        lab["tag"] = "".join(w[0] for w in re.split(r"[-_]+", str(name)) if w).upper()[:4]
    elif not TAG_RE.match(lab["tag"]):
        problems.append(Problem("marking.tag", "has characters the label font does not draw",
                                line("marking.tag"), lab["tag"],
                                "up to 8 of A-Z, 0-9, '-' and '.' (lower case is raised)"))
        raise RecipeError(problems, source)
    lab["tag"] = lab["tag"].upper()

    recipe = Recipe(
        name=name, label=label, description=vals["description"] or "", body=body,
        voids=tuple(voids), inlet=Inlet(**inlet_v), parting=Parting(**parting_v),
        mold=MoldSettings(**blocks["mold"]), checks=Checks(**blocks["checks"]),
        mesh=MeshSettings(**blocks["mesh"]),
        material=Material(**blocks["material"], silicone=silicone, blend=blend),
        inflate=Inflate(working), casting=CastingSettings(**blocks["casting"]),
        label_settings=LabelSettings(**lab),
        printer=PrinterSettings(**blocks["printer"]), source=source, lines=lines)

    problems.extend(sanity_problems(recipe, lines))
    if problems:
        raise RecipeError(problems, source, recipe)
    return recipe


def _lines(root: Node) -> dict[str, int]:
    """Field path -> source line, for problems found after validation."""
    out: dict[str, int] = {}

    def walk(n: Node, path: str) -> None:
        out[path] = n.key_line if n.key_line is not None else n.line
        if isinstance(n.value, dict):
            for k, c in n.value.items():
                walk(c, join_path(path, k))
        elif isinstance(n.value, list):
            for i, c in enumerate(n.value):
                walk(c, join_path(path, i))

    walk(root, "")
    return out
