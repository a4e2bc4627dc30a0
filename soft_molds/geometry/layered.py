"""Solids of the layered process (see :mod:`soft_molds.plan.processes.layered`).

Built in the actuator frame (mm; body from the inlet face x = 0, z up, the bond face z =
``layer.bond_z_mm``); the chambered step's parts are then turned over (a half turn about
the x axis: (x, y, z) -> (x, -y, -z)) into pour orientation, where the tray's floor is at
the bottom and the post bridge pulls along +z. The base step is poured as the actuator
stands.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import cadquery as cq

from ..plan.model import CastingStep, Footprint, LayerKind, Post
from ..recipe.model import Recipe
from ..recipe.primitives import RoundedBox, Slab
from .kernel import (
    box,
    build_primitive,
    build_slit,
    checked,
    cut,
    fuse,
    outline_prism,
    split_at,
)
from .mold import Label, cut_label

Box = tuple[tuple[float, float, float], tuple[float, float, float]]

#: Thickness of the post bridge's plate (mm): stiff enough not to sag between the posts.
PLATE_MM = 4.0
#: Skirt of the post bridge: how far it reaches down over the tray's rim, and its wall (mm).
SKIRT_DROP_MM, SKIRT_WALL_MM = 4.0, 2.0


@dataclass(frozen=True)
class LayerSolids:
    """The solids of one layered step by part name (pour orientation), and the cast in
    the actuator frame (for the two layers' checks against each other)."""

    parts: dict[str, cq.Shape]
    cast_in_actuator_frame: cq.Shape
    #: The world box (lo, hi) of the label cut into each labelled part (pour orientation).
    label_boxes: dict[str, Box] = field(default_factory=dict)


def _turned_box(b: Box) -> Box:
    """The box ``b`` after :func:`turn_over`."""
    (x0, y0, z0), (x1, y1, z1) = b
    return (x0, -y1, -z1), (x1, -y0, -z0)


def _side_label(r: Recipe, shape: cq.Shape, part: str, y_mm: float, z0: float, z1: float,
                upright: bool) -> tuple[cq.Shape, Label | None]:
    """Cut the recipe's label into the flat -y side face of ``shape`` (at y = ``y_mm``,
    spanning z0..z1), centred along the body; ``upright``: read with up along +z, else
    along -z (a part turned over afterwards then reads upright in pour orientation)."""
    lo, hi = r.body_bounds()
    up = (0.0, 0.0, 1.0 if upright else -1.0)
    # right x up must be the outward normal (-y): right = up x normal.
    right = (1.0 if upright else -1.0, 0.0, 0.0)
    centre = ((lo[0] + hi[0]) / 2.0, y_mm, (z0 + z1) / 2.0)
    return cut_label(r, shape, part, centre, right, up, z1 - z0)


def turn_over(shape: cq.Shape) -> cq.Shape:
    """A half turn about the x axis: (x, y, z) -> (x, -y, -z); a rotation, so solids keep
    their orientation and volume."""
    return shape.rotate(cq.Vector(0, 0, 0), cq.Vector(1, 0, 0), 180.0)


def post_solid(p: Post) -> cq.Shape:
    """The drafted post: its bond-face outline extruded ``height_mm`` along +z with every
    side face leaning in by ``draft_deg`` (a tapered prism of planar faces)."""
    wp = cq.Workplane("XY", origin=(0.0, 0.0, p.base_z_mm))
    solid = wp.polyline(list(p.outline_mm())).close().extrude(p.height_mm,
                                                              taper=p.draft_deg).val()
    assert isinstance(solid, cq.Shape)
    return checked(solid, p.name, "post", volume_mm3=p.volume_mm3())


def footprint_prism(f: Footprint, z0: float, z1: float, part: str) -> cq.Shape:
    """The footprint extruded from z0 to z1 (mm)."""
    if f.outline is not None:
        return outline_prism(f.outline.pieces(), z0, z1, part, "footprint prism",
                             f.area_mm2() * (z1 - z0))
    lx, ly = f.size_mm
    wp = cq.Workplane("XY", origin=(f.center_mm[0], f.center_mm[1], z0))
    if f.corner_radius_mm > 0.0:
        solid = (wp.sketch().rect(lx, ly).vertices().fillet(f.corner_radius_mm).finalize()
                 .extrude(z1 - z0).val())
    else:
        solid = wp.rect(lx, ly).extrude(z1 - z0).val()
    return checked(solid, part, "footprint prism", volume_mm3=f.area_mm2() * (z1 - z0))


def _block(r: Recipe, grow_mm: float, z0: float, z1: float) -> cq.Shape:
    lo, hi = r.body_bounds()
    return box((lo[0] - grow_mm, lo[1] - grow_mm, z0), (hi[0] + grow_mm, hi[1] + grow_mm, z1))


def build_layers(r: Recipe, steps: tuple[CastingStep, ...]) -> dict[str, LayerSolids]:
    """Every layered step's solids by step name."""
    body_p = r.body_primitives()[0]
    assert isinstance(body_p, RoundedBox | Slab)
    body = build_primitive(body_p, "body")
    layer0 = steps[0].layer
    assert layer0 is not None
    below, above = split_at(body, 2, layer0.bond_z_mm, "body")
    out = {}
    for s in steps:
        layer = s.layer
        assert layer is not None
        if layer.kind is LayerKind.CHAMBERED:
            out[s.name] = _chambered(r, s, above)
        else:
            out[s.name] = _base(r, s, below)
    return out


def _chambered(r: Recipe, step: CastingStep, above: cq.Shape) -> LayerSolids:
    layer = step.layer
    assert layer is not None
    _, hi = r.body_bounds()
    bond, wall = layer.bond_z_mm, layer.wall_mm
    posts = [post_solid(p) for p in layer.posts]
    # Slits between chambers are cut from the actuator's top, the tray's floor: the cast
    # loses them and the tray keeps them as fins standing on its floor.
    slits = [build_slit(c, "tray") for c in r.outer_cuts()]
    if slits:
        above = cut(above, slits, "tray", "slits from the top face")
    cast = cut(above, posts, "cast", "chambered layer")
    # The feed groove's post runs on through the tray's inlet wall (so the groove opens
    # cleanly on the inlet face): the wall takes a notch open to the rim, the post's shape
    # with the locating clearance on every side, so the bridge drops in wherever its skirt
    # lets it sit.
    notches = [post_solid(_grown(p, layer.clearance_mm)) for p in layer.notched_posts()]
    tray = cut(_block(r, wall, bond, hi[2] + wall), [above, *notches], "tray",
               "chambered tray")
    lo, _ = r.body_bounds()
    tray, tray_label = _side_label(r, tray, "tray", lo[1] - wall, bond, hi[2] + wall,
                                   upright=False)
    # The bridge: a plate on the tray's rim, a skirt over the rim's outside (locates it
    # in x and y), an overflow hole beyond the last chamber, and the posts below it.
    plate = _block(r, wall + layer.clearance_mm + SKIRT_WALL_MM, bond - PLATE_MM,
                   bond + SKIRT_DROP_MM)
    pocket = _block(r, wall + layer.clearance_mm, bond, bond + SKIRT_DROP_MM + 1.0)
    cutters = [pocket]
    hole = _hole_at(layer.overflow_xy_mm, r, bond)
    if hole is not None:
        cutters.append(hole)
    plate = cut(plate, cutters, "post-bridge", "bridge plate")
    bridge = fuse([plate, *posts], "post-bridge", "bridge posts")
    # The bridge's label goes on the plate's outer face (the face the posts stand on the
    # other side of), centred over the posts so it clears the overflow hole.
    far = max(p.x_span_mm()[1] for p in layer.posts)
    side = wall + layer.clearance_mm + SKIRT_WALL_MM
    bridge, bridge_label = cut_label(
        r, bridge, "post-bridge", ((lo[0] + far) / 2.0, (lo[1] + hi[1]) / 2.0, bond - PLATE_MM),
        (-1.0, 0.0, 0.0), (0.0, 1.0, 0.0), hi[1] - lo[1] + 2.0 * side)
    parts = {"tray": turn_over(tray), "post-bridge": turn_over(bridge),
             "cast": turn_over(cast)}
    boxes = {name: _turned_box(lab.box) for name, lab in
             (("tray", tray_label), ("post-bridge", bridge_label)) if lab is not None}
    return LayerSolids(parts, cast, boxes)


def _grown(p: Post, by_mm: float) -> Post:
    """``p`` wider by ``by_mm`` on every side (same height and draft)."""
    return replace(p, name=f"{p.name} notch", size_mm=(p.size_mm[0] + 2 * by_mm,
                                                       p.size_mm[1] + 2 * by_mm))


def _hole_at(xy: tuple[float, float] | None, r: Recipe, bond: float) -> cq.Shape | None:
    """The overflow hole through the plate at ``xy`` (None: no room for one)."""
    if xy is None:
        return None
    return cq.Solid.makeCylinder(r.mold.vent_diameter_mm / 2.0, PLATE_MM + 2.0,
                                 cq.Vector(xy[0], xy[1], bond - PLATE_MM - 1.0),
                                 cq.Vector(0, 0, 1))


def _base(r: Recipe, step: CastingStep, below: cq.Shape) -> LayerSolids:
    layer = step.layer
    assert layer is not None
    lo, hi = r.body_bounds()
    bond, wall, c = layer.bond_z_mm, layer.wall_mm, layer.clearance_mm
    # The guide above the pocket locates the pressed part in x and y and ends level with
    # the finished actuator's top: a flat plate laid across the rim stops the part with its
    # bond face exactly on the base.
    top = hi[2]
    guide = footprint_prism(layer.footprint.inset(-c), bond, top + 1.0, "tray")
    block = _block(r, c + wall, lo[2] - wall, top)
    tray = cut(block, [below, guide], "tray", "base tray")
    tray, lab = _side_label(r, tray, "tray", lo[1] - c - wall, lo[2] - wall, top,
                            upright=True)
    return LayerSolids({"tray": tray, "cast": below}, below,
                       {} if lab is None else {"tray": lab.box})


def assembled_actuator(solids: dict[str, LayerSolids]) -> cq.Shape:
    """The finished actuator (actuator frame): every step's cast joined at the bond face.
    Its faces split where a chamber's floor meets the base, so a mesh of it tells void
    surface from the bond."""
    return fuse([s.cast_in_actuator_frame for s in solids.values()], "actuator",
                "join the layers")
