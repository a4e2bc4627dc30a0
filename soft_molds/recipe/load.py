"""Recipe file -> validated :class:`Recipe`, reporting every problem at once.

A recipe file with a ``variants`` block stands for its variants: :func:`load_variants`
returns every one, and :func:`load_recipe` the first (``A``, or the first label written),
never the document with its ``variants`` block dropped, whose values may be those of no
variant at all (the bundled finger family's chambers are 8 mm high as written, 6 mm in A).
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path

from ..errors import Problem, RecipeError
from ..units import psi_to_kpa
from .contracts import BodyKind, bounds_of
from .fields import MapReader, join_path, suggest
from .materials import resolve
from .model import (
    CastingSettings,
    Checks,
    CoreSettings,
    Inflate,
    Inlet,
    InletFace,
    LabelSettings,
    Material,
    MeshSettings,
    MoldSettings,
    Parting,
    PrinterSettings,
    Process,
    Recipe,
)
from .registry import body_kinds, void_kinds
from .sanity import sanity_problems
from .schema import BLOCKS, INLET_FIELDS, MAX_INLETS, TOP_FIELDS
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

#: A body less than this across (width and height, in mm) gets one leading problem saying
#: lengths are millimetres. Below 5 mm a body cannot hold the default 4 mm tube socket with
#: even the thinnest wall allowed (checks.min_wall_mm >= 0.3 mm a side: 4.6 mm), so such a
#: recipe is far likelier written in centimetres than meant (a 7 x 1.6 x 1.4 "bar").
SCALE_HINT_BELOW_MM = 5.0
#: A network's mouth this close to x = 0 (mm, float noise) is on the inlet face, where a
#: socket block is still read; this close to the outline, on it.
MOUTH_ON_FACE_MM = 1e-6

Progress = Callable[[int, int], None]
"""Called as ``progress(done, total)`` after each variant is validated."""


def load_recipe(path: str | os.PathLike) -> Recipe:
    """Read, validate and sanity-check a recipe file; raise :class:`RecipeError` listing
    every problem (field path, line, value found, what is allowed).

    For a file with a ``variants`` block this is its first variant, the same recipe as
    ``load_variants(path)[0][1]`` (the recipe as written and that variant are validated;
    :func:`load_variants` validates every variant)."""
    root, source = read_recipe_file(path)
    return recipe_from_node(root, source, default_name=_stem_name(path),
                            base_dir=Path(path).resolve().parent)


def recipe_from_text(text: str, source: str = "recipe", default_name: str = "recipe",
                     base_dir: str | os.PathLike | None = None) -> Recipe:
    """Like :func:`load_recipe` for recipe text; ``base_dir`` is where relative file names
    in it (``material.table_file``) are found."""
    return recipe_from_node(parse_recipe_text(text, source), source, default_name,
                            None if base_dir is None else Path(base_dir))


def recipe_from_node(root: Node, source: str, default_name: str = "recipe",
                     base_dir: Path | None = None) -> Recipe:
    """Like :func:`load_recipe` for a parsed document: the recipe, or its first variant."""
    ((_, first),) = _variants(root, source, default_name, base_dir, None, first_only=True)
    return first


def load_variants(path: str | os.PathLike, progress: Progress | None = None
                  ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    """Every variant of a recipe file (one, labelled as the recipe says, when it has no
    ``variants`` block), each validated; a :class:`RecipeError` lists every problem, those
    of a variant naming its label. ``progress(done, total)`` is called after each variant
    is validated (how many there are is known, and bounded by ``variants.max_variants``,
    before the first)."""
    root, source = read_recipe_file(path)
    return variants_from_node(root, source, _stem_name(path), Path(path).resolve().parent,
                              progress)


def variants_from_text(text: str, source: str = "recipe", default_name: str = "recipe",
                       base_dir: str | os.PathLike | None = None,
                       progress: Progress | None = None
                       ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    return variants_from_node(parse_recipe_text(text, source), source, default_name,
                              None if base_dir is None else Path(base_dir), progress)


def variants_from_node(root: Node, source: str, default_name: str = "recipe",
                       base_dir: Path | None = None, progress: Progress | None = None
                       ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    return _variants(root, source, default_name, base_dir, progress)


def _stem_name(path: str | os.PathLike) -> str:
    stem = Path(path).stem.lower()
    stem = re.sub(r"[^a-z0-9_-]+", "-", stem).strip("-_") or "recipe"
    return stem[:64]


def _variants(root: Node, source: str, default_name: str, base_dir: Path | None,
              progress: Progress | None, first_only: bool = False
              ) -> tuple[tuple[VariantSpec, Recipe], ...]:
    specs, problems = expand(root)
    if problems:
        raise RecipeError(problems, source)
    if first_only:
        specs = specs[:1]
    base = without_variants(root)
    # The recipe as written first: its own problems are reported once, not per variant.
    base_recipe = _document_recipe(base, source, default_name, base_dir)
    out = []
    for done, spec in enumerate(specs, 1):
        r = _variant_recipe(base, base_recipe, spec, source, default_name, base_dir,
                            problems)
        if r is not None:
            out.append((spec, r))
        if progress is not None:
            progress(done, len(specs))
    if problems:
        raise RecipeError(merge_problems(problems), source)
    labels = [r.label for _, r in out]
    if len(set(labels)) != len(labels):
        raise RecipeError([Problem("variants", "gives two variants the same label", None,
                                   labels, "distinct labels")], source)
    return tuple(out)


def _variant_recipe(base: Node, base_recipe: Recipe, spec: VariantSpec, source: str,
                    default_name: str, base_dir: Path | None,
                    problems: list[Problem]) -> Recipe | None:
    """One variant validated, or None with its problems added to ``problems``."""
    if not spec.changes:
        r = base_recipe
    else:
        found: list[Problem] = []
        node = apply_changes(base, spec.changes, found, spec.label)
        if found:
            problems.extend(found)
            return None
        try:
            r = _document_recipe(node, source, default_name, base_dir)
        except RecipeError as exc:
            problems.extend(prefix_problems(exc, spec))
            return None
    return replace(r, label=spec.label) if spec.label else r


def _read_kind(node: Node | None, path: str, registry: dict, problems: list[Problem],
               line: int | None, what: str, follow_on: list[Problem]):
    """The kind object of the ``body`` or a void entry, or None; problems of the kind's
    cross-checks are listed in ``follow_on`` too."""
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
        hint = suggest(str(kind_node.value), list(registry))
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
        located = [replace(p, line=_field_line(r, p.path[len(prefix):]) or p.line)
                   if p.path.startswith(prefix) else p for p in extra]
        problems.extend(located)
        follow_on.extend(located)
        return None
    return cls(**values)


def _field_line(r: MapReader, sub: str) -> int | None:
    """The line of a kind's field (``round_mm``), of an item of it (``profile_mm[3]``) or
    of a key of such an item (``rows[1].count``) as the recipe wrote it; None when it was
    not written there."""
    m = re.fullmatch(r"([A-Za-z0-9_]+)((?:\[\d+\]|\.[A-Za-z0-9_]+)*)", sub)
    if m is None or m.group(1) not in r.items:
        return None
    node = r.items[m.group(1)]
    line = r.line_of(m.group(1))
    for index, key in re.findall(r"\[(\d+)\]|\.([A-Za-z0-9_]+)", m.group(2)):
        if key:
            child = node.value.get(key) if isinstance(node.value, dict) else None
            if child is None:
                return line
            node = child
            line = child.key_line if child.key_line is not None else child.line
            continue
        items = node.value if isinstance(node.value, list) else []
        if int(index) >= len(items):
            return line
        node = items[int(index)]
        line = node.line
    return line


def _body_size_mm(node: Node | None) -> tuple[float, float, float] | None:
    """(length, width, height) of the body as written when its own fields are valid (its
    cross-checks aside), else None."""
    if node is None or not isinstance(node.value, dict):
        return None
    kind = node.value.get("kind")
    name = kind.value if kind is not None else None
    cls = body_kinds().get(name) if isinstance(name, str) else None
    if cls is None:
        return None
    scratch: list[Problem] = []
    values = MapReader(node, "body", scratch).take_all(cls.FIELDS)
    if scratch:
        return None
    try:
        lo, hi = bounds_of(cls(**values).primitives())
    except ValueError:  # a kind whose cross-check failed may have no shape at all
        return None
    return (hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2])


def _scale_first(problems: list[Problem], follow_on: list[Problem],
                 size: tuple[float, float, float] | None, line: int | None) -> list[Problem]:
    """``problems``, led by one saying lengths are millimetres when the body is less than
    ``SCALE_HINT_BELOW_MM`` across; the follow-on problems of so small a body (its
    cross-checks and the geometric sanity checks) are then counted, not listed."""
    if size is None or not problems or max(size[1], size[2]) >= SCALE_HINT_BELOW_MM:
        return problems
    kept = [p for p in problems if not any(p is q for q in follow_on)]
    dropped = len(problems) - len(kept)
    more = (f"; {dropped} follow-on problem{'s' if dropped != 1 else ''} of so small a body "
            "not listed") if dropped else ""
    dims = " x ".join(f"{x:g}" for x in size)
    hint = Problem("body", f"is only {dims} mm: every length in a recipe is in millimetres "
                   f"(written in centimetres? multiply each length by 10){more}", line, None,
                   f"a body at least {SCALE_HINT_BELOW_MM:g} mm across (room for a tube "
                   "socket and its silicone walls)")
    return [hint, *kept]


def _document_recipe(root: Node, source: str, default_name: str = "recipe",
                     base_dir: Path | None = None) -> Recipe:
    """Validate one recipe document (a ``variants`` block, if any, is ignored: the callers
    above apply it)."""
    root = without_variants(root)
    problems: list[Problem] = []
    follow_on: list[Problem] = []
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

    body = _read_kind(top.node("body"), "body", body_kinds(), problems, top.line, "body",
                      follow_on)
    size = _body_size_mm(top.items.get("body"))

    def refused() -> RecipeError:
        return RecipeError(_scale_first(problems, follow_on, size, top.line_of("body")),
                           source)

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
                                    item.line, "void", follow_on))

    blocks = {}
    for block, fields in BLOCKS.items():
        r = MapReader(top.node(block), block, problems, top.line)
        blocks[block] = r.take_all(fields)
        r.finish()
    inlets_v = _read_inlets(top, blocks["inlet"], problems)
    top.finish()
    if body is not None and hasattr(body, "read_file"):
        # A body drawn elsewhere (``file``): read once its own fields are valid.
        body, found = body.read_file(base_dir, blocks["printer"], "body", _lines(root))
        problems.extend(found)

    if problems or body is None or any(v is None for v in voids):
        raise refused()
    voids = _follow_body(body, voids, problems, _lines(root))
    voids, outer = _split_outer(voids, problems, _lines(root))
    if problems:
        raise refused()

    socketless = not voids
    if not voids:
        # No cavity void: the outside cut inflates (an open groove); there is no socket.
        problems.extend(_no_socket_problems(top, outer))
        if problems:
            raise refused()
        inlets_v = [dict(inlets_v[0], center_mm=(0.0, 0.0))]
    elif getattr(voids[0], "MOUTH_ON_OUTLINE", False):
        # A network opening on the outline: its mouth is the first path's first point.
        problems.extend(_mouth_problems(top, voids[0].mouth_mm(), voids[0].mouth_written(),
                                        abs(voids[0].mouth_offset_mm(body.primitives()))
                                        <= MOUTH_ON_FACE_MM))
        if problems:
            raise refused()
        socketless = not any(top.node(k) is not None for k in ("inlet", "inlets"))
        if socketless or inlets_v[0]["center_mm"] is None:
            inlets_v[0] = dict(inlets_v[0], center_mm=voids[0].entry()[0])
    elif inlets_v[0]["center_mm"] is None:
        inlets_v[0]["center_mm"] = voids[0].entry()[0]
    inlet_v = inlets_v[0]
    # Default placements keep clear of the start face's sockets (the only face a void's
    # default placement starts from).
    start_depth = max((v["socket_depth_mm"] for v in inlets_v if v["face"] == "start"),
                      default=0.0) if not socketless else 0.0
    voids = _after_socket(body, voids, start_depth + blocks["checks"]["min_wall_mm"])
    parting_v = blocks["parting"]
    if parting_v["axis"] is None and parting_v["offset_mm"] is None:
        # A kind may ask for the chosen plane by default (a drawn body has no field the
        # plane could follow).
        parting_v["axis"] = getattr(body, "DEFAULT_PARTING", None)
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
            raise refused()
    elif parting_v["offset_mm"] is None:
        # The core print must be seated in both halves, so the plane runs through the
        # socket's axis; for centred voids that is the body's mid-plane.
        cy, cz = inlet_v["center_mm"]
        parting_v["offset_mm"] = cz if parting_v["axis"] == "z" else cy

    lines = _lines(root)
    _fit_outer(body, voids, outer, blocks, parting_v, problems, lines)
    if problems:
        raise refused()

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
    if problems or silicone is None:  # no grade comes without a problem saying why
        raise refused()
    working = psi_to_kpa(psi) if psi is not None else kpa
    lab = dict(blocks["marking"])
    if lab["tag"] is None:
        lab["tag"] = "".join(w[0] for w in re.split(r"[-_]+", str(name)) if w).upper()[:4]
    elif not TAG_RE.match(lab["tag"]):
        problems.append(Problem("marking.tag", "has characters the label font does not draw",
                                line("marking.tag"), lab["tag"],
                                "up to 8 of A-Z, 0-9, '-' and '.' (lower case is raised)"))
        raise refused()
    lab["tag"] = lab["tag"].upper()

    recipe = Recipe(
        name=name, label=label, description=vals["description"] or "", body=body,
        voids=tuple(voids),
        inlets=tuple(Inlet(**dict(v, face=InletFace(v["face"]))) for v in inlets_v
                     if not socketless),
        parting=Parting(**parting_v),
        mold=MoldSettings(**blocks["mold"]), checks=Checks(**blocks["checks"]),
        mesh=MeshSettings(**blocks["mesh"]),
        material=Material(**blocks["material"], silicone=silicone, blend=blend),
        inflate=Inflate(working), casting=CastingSettings(**blocks["casting"]),
        label_settings=LabelSettings(**lab),
        printer=PrinterSettings(**blocks["printer"]), source=source,
        process=Process(**blocks["process"]), core=CoreSettings(**blocks["core"]),
        outer=tuple(outer), lines=lines)

    found = sanity_problems(recipe, lines)
    problems.extend(found)
    follow_on.extend(found)
    if problems:
        exc = refused()
        # Only a recipe whose lengths look like millimetres is worth planning further.
        if size is None or max(size[1], size[2]) >= SCALE_HINT_BELOW_MM:
            exc.recipe = recipe
        raise exc
    return recipe


def _read_inlets(top: MapReader, single: dict, problems: list[Problem]) -> list[dict]:
    """The inlets' values: the ``inlets`` list, or the ``inlet`` block as a list of one.
    Problems (both given, a bad list or item, a list item without its centre) are added to
    ``problems``; the values returned then do not matter."""
    node = top.node("inlets")
    if node is None:
        return [single]
    where = node.key_line or node.line
    if top.node("inlet") is not None:
        top.problem("inlets", "is given with inlet", where, None,
                    "one of the two: `inlet` (one socket) or `inlets` (a list)")
        return [single]
    if not isinstance(node.value, list) or not node.value or len(node.value) > MAX_INLETS:
        top.problem("inlets", "must be a list of 1 to " f"{MAX_INLETS} inlet blocks", where,
                    node.plain(), f"1 to {MAX_INLETS} mappings with socket_diameter_mm, "
                    "socket_depth_mm, center_mm and face")
        return [single]
    out = []
    for i, item in enumerate(node.value):
        path = join_path("inlets", i)
        r = MapReader(item, path, problems, item.line)
        values = r.take_all(INLET_FIELDS)
        r.finish()
        if r.ok and values["center_mm"] is None and (i > 0 or values["face"] != "start"):
            r.problem(f"{path}.center_mm", "is required", r.line, None,
                      "(y, z) of the socket on its face, mm (only the first inlet on the "
                      "start face may follow the first void)")
        out.append(values)
    return out


def _follow_body(body: BodyKind, voids: list, problems: list[Problem],
                 lines: dict[str, int]) -> list:
    """The voids, those that follow the body's shape (a ``follow_body`` method, see
    :mod:`.contracts`) fitted to it; their problems, located by path, added to
    ``problems``."""
    out = []
    for i, v in enumerate(voids):
        follow = getattr(v, "follow_body", None)
        if follow is None:
            out.append(v)
            continue
        fitted, found = follow(body, join_path("voids", i))
        for p in found:
            path = p.path
            while p.line is None and path and path not in lines:
                path = path.rsplit(".", 1)[0] if "." in path else ""
            problems.append(p if p.line is not None else replace(p, line=lines.get(path)))
        out.append(fitted if fitted is not None else v)
    return out


def _split_outer(voids: list, problems: list[Problem], lines: dict[str, int]
                 ) -> tuple[list, list]:
    """The cavity voids and the voids cut from the outside (a kind with ``OUTER`` set,
    see :mod:`.kinds.slits`). The outside cuts come last in the recipe, so every cavity
    void keeps its index (its problems name ``voids[i]`` as the recipe wrote it)."""
    inner = [v for v in voids if not getattr(v, "OUTER", False)]
    outer = [v for v in voids if getattr(v, "OUTER", False)]
    last = max((i for i, v in enumerate(voids) if not getattr(v, "OUTER", False)), default=-1)
    for i, v in enumerate(voids):
        if getattr(v, "OUTER", False) and i < last:
            path = join_path("voids", i)
            problems.append(Problem(f"{path}.kind", "is cut from the outside and must be "
                                    "listed after every cavity void", lines.get(path),
                                    v.KIND, f"move it after voids[{last}]"))
            break
    # An outside cut that inflates (an open groove, closed by a collar after the cure) is
    # the cavity itself.
    if not inner and not any(getattr(v, "INFLATES", False) for v in outer):
        problems.append(Problem("voids", "has no cavity to inflate", lines.get("voids"),
                                [v.KIND for v in voids],
                                "at least one void that is not cut from the outside"))
    return inner, outer


def _no_socket_problems(top: MapReader, outer: list) -> list[Problem]:
    """An open groove is fed through the collar that closes it: the silicone has no tube
    socket, so an ``inlet`` or ``inlets`` block is refused (one line)."""
    for key in ("inlet", "inlets"):
        node = top.node(key)
        if node is not None:
            return [Problem(key, "is given, but the open groove has no tube socket: air "
                            "enters through the collar that closes the groove", node.key_line
                            or node.line, node.plain(), "leave out the inlet block (put "
                            "the tube's port in the collar, at the groove's mid-height)")]
    return []


def _mouth_problems(top: MapReader, mouth_mm: tuple[float, float], written: str,
                    on_outline: bool) -> list[Problem]:
    """A void whose mouth lies on the body's outline (a kind with ``MOUTH_ON_OUTLINE``,
    see :mod:`.kinds.channels`) needs no tube socket: the tube is sealed into the groove
    where it opens. A socket block is still read where a socket can be (the mouth on the
    inlet face x = 0, where it is checked as before); with the mouth elsewhere on the
    outline it is refused (one line). A mouth off the outline is the void's own problem
    (its wall check says where), whatever socket is given. ``mouth_mm`` is in the body's
    frame; ``written`` names the mouth as the recipe wrote it."""
    x0, y0 = mouth_mm
    if abs(x0) <= MOUTH_ON_FACE_MM or not on_outline:
        return []
    for key in ("inlet", "inlets"):
        node = top.node(key)
        if node is not None:
            return [Problem(key, f"is given, but the channels' mouth (voids[0].paths[0][0] "
                            f"= {written}) is not on the inlet face x = 0: the "
                            "groove opens on the outline there and the tube is sealed into "
                            "it, with no socket", node.key_line or node.line, node.plain(),
                            "leave out the inlet block (a socket is read only round a "
                            "mouth on x = 0)")]
    return []


def _fit_outer(body: BodyKind, voids: list, outer: list, blocks: dict, parting_v: dict,
               problems: list[Problem], lines: dict[str, int]) -> None:
    """Add the problems of each outside cut in this recipe (its ``fit``), located."""
    for k, v in enumerate(outer):
        path = join_path("voids", len(voids) + k)
        found = v.fit(body, voids, blocks["checks"]["min_wall_mm"],
                      (parting_v["axis"], parting_v["offset_mm"]), blocks["process"]["kind"],
                      blocks["mold"]["vent_diameter_mm"], path)
        for p in found:
            at = p.path
            while at and at not in lines:
                at = at.rsplit(".", 1)[0] if "." in at else ""
            problems.append(replace(p, line=lines.get(at, lines.get(path))))


def _after_socket(body: BodyKind, voids: list, clear_from_mm: float) -> list:
    """The voids, those with a default placement (an ``after_socket`` method, see
    :mod:`.contracts`) kept ``clear_from_mm`` beyond the inlet face (the socket floor plus
    the least wall)."""
    lo, hi = bounds_of(body.primitives())
    length = hi[0] - lo[0]
    return [v.after_socket(clear_from_mm, length) if hasattr(v, "after_socket") else v
            for v in voids]


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
