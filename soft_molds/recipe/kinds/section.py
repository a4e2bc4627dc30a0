"""Body kind ``section``: a plane outline in the y-z plane swept along x, optionally tapered.

Fingers whose cross-section is not a rectangle: a D shape whose flat side (the strain-
limiting side, which stretches least) lies down, a round or oval limb, or any polygon with
rounded corners. A taper scales the section about one point from full size at the inlet
face to ``tip_scale`` at the far end, so a finger thins towards its tip; every section is
similar to the first, and the body is a loft between the two end sections.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, ClassVar

from ...errors import Problem
from ..fields import MIN_SIZE_MM, Field, choice, number, pair, points, rounds
from ..outline import Ellipse, Outline, RoundedPolygon, polygon_problems
from ..polygon_fields import per_point, polygon_field_problems
from ..primitives import Extruded, Primitive
from ..registry import body_kind

OUTLINES = ("rounded-rectangle", "circle", "ellipse", "half-round", "polygon")

#: The fields each outline takes (``length_mm``, ``tip_scale`` and ``scale_center_mm``
#: apply to every one); the first are required, ``corner_radius_mm`` and ``round_mm``
#: optional.
OUTLINE_FIELDS = {
    "rounded-rectangle": ("width_mm", "height_mm", "corner_radius_mm"),
    "circle": ("diameter_mm",),
    "ellipse": ("width_mm", "height_mm"),
    "half-round": ("diameter_mm",),
    "polygon": ("points_mm", "round_mm"),
}
OPTIONAL = ("corner_radius_mm", "round_mm")
SHAPE_FIELDS = ("width_mm", "height_mm", "corner_radius_mm", "diameter_mm", "points_mm",
                "round_mm")


@body_kind("section")
@dataclass(frozen=True)
class Section:
    """The outline lies in the y-z plane (z up) and is swept along x from the inlet face
    (x = 0) to x = length. ``rounded-rectangle``, ``circle`` and ``ellipse`` are centred
    on y = z = 0; ``half-round`` is a D shape with its flat side down on z = 0 (the
    strain-limiting side), centred on y = 0, rising to z = diameter/2; ``polygon`` lies
    where its points say. With ``tip_scale`` below 1 the section shrinks linearly along x
    about ``scale_center_mm`` (default: the middle of the outline's lowest extent, so a
    tapered D keeps its flat side on z = 0) to that fraction at the far end. A
    half-round's widest section is its flat side, so its mold parts upright through its
    middle (``parting`` axis y, offset 0; ``axis: auto`` finds that plane)."""

    FIELDS: ClassVar[tuple[Field, ...]] = (
        number("length_mm", "length along x, from the inlet face"),
        choice("outline", "shape of the section in the y-z plane", OUTLINES),
        number("width_mm", "rounded-rectangle, ellipse: extent along y", None),
        number("height_mm", "rounded-rectangle, ellipse: extent along z", None),
        number("corner_radius_mm", "rounded-rectangle: rounding of its four corners "
               "(default 0)", None, lo=0.0, lo_open=False),
        number("diameter_mm", "circle, half-round: diameter (the half-round's flat side)",
               None),
        points("points_mm", "polygon: its corners [y, z] in order round it (either way)",
               coords=("y", "z"), signed=True),
        rounds("round_mm", "polygon: rounding of every corner, or a list with one per point "
               "(default 0, sharp)", None),
        number("tip_scale", "size of the far end's section relative to the inlet face's (1: "
               "no taper)", 1.0, unit="", lo=0.3, hi=1.0, lo_open=False),
        pair("scale_center_mm", "point (y, z) the taper scales the section about; default "
             "the middle of the outline's lowest extent", None),
    )
    length_mm: float
    outline: str
    width_mm: float | None
    height_mm: float | None
    corner_radius_mm: float | None
    diameter_mm: float | None
    points_mm: tuple[tuple[float, float], ...] | None
    round_mm: float | tuple[float, ...] | None
    tip_scale: float
    scale_center_mm: tuple[float, float] | None

    @classmethod
    def cross_check(cls, v: Mapping[str, Any], path: str, line: int | None) -> list[Problem]:
        kind = v["outline"]
        takes = OUTLINE_FIELDS[kind]
        out = [Problem(f"{path}.{k}", f"is not used by outline {kind}", line, _plain(v[k]),
                       f"for {kind}: {', '.join(takes)}")
               for k in SHAPE_FIELDS if k not in takes and v[k] is not None]
        out += [Problem(f"{path}.{k}", f"is required with outline {kind}", line, None,
                        _field(k).allowed())
                for k in takes if k not in OPTIONAL and v[k] is None]
        if out:
            return out
        if kind == "rounded-rectangle" and v["corner_radius_mm"] is not None:
            limit = min(v["width_mm"], v["height_mm"]) / 2.0
            if v["corner_radius_mm"] > limit:
                return [Problem(f"{path}.corner_radius_mm", "does not fit the rectangle",
                                line, v["corner_radius_mm"],
                                f"at most {limit:g} mm (half the smaller of width and height)")]
        if kind == "polygon":
            return polygon_field_problems(v["points_mm"], v["round_mm"], path, line,
                                          "points_mm", "round_mm", "[y, z]")
        return []

    def shape(self) -> Outline:
        """The section at the inlet face (mm, y-z plane). ValueError for fields that failed
        the cross-check."""
        k = self.outline
        if k == "rounded-rectangle" and self.width_mm and self.height_mm:
            w, h = self.width_mm / 2.0, self.height_mm / 2.0
            r = self.corner_radius_mm or 0.0
            return RoundedPolygon(((-w, -h), (w, -h), (w, h), (-w, h)), (r,) * 4)
        if k == "circle" and self.diameter_mm:
            # A square with corners rounded by half its side is the circle.
            r = self.diameter_mm / 2.0
            return RoundedPolygon(((-r, -r), (r, -r), (r, r), (-r, r)), (r,) * 4)
        if k == "half-round" and self.diameter_mm:
            r = self.diameter_mm / 2.0
            return RoundedPolygon(((-r, 0.0), (r, 0.0), (r, r), (-r, r)), (0.0, 0.0, r, r))
        if k == "ellipse" and self.width_mm and self.height_mm:
            return Ellipse((0.0, 0.0), self.width_mm / 2.0, self.height_mm / 2.0)
        if k == "polygon" and self.points_mm is not None:
            rr = per_point(self.points_mm, self.round_mm)
            if len(rr) == len(self.points_mm) and \
                    not polygon_problems(self.points_mm, rr, MIN_SIZE_MM):
                return RoundedPolygon(self.points_mm, rr)
        raise ValueError(f"the {k} section's fields are not valid (see cross_check)")

    def solid(self) -> Extruded:
        shape = self.shape()
        if self.scale_center_mm is not None:
            centre = self.scale_center_mm
        else:
            (y0, z0), (y1, _) = shape.bounds()
            centre = ((y0 + y1) / 2.0 + 0.0, z0)
        return Extruded(shape, self.length_mm, self.tip_scale, centre)

    def primitives(self) -> tuple[Primitive, ...]:
        return (self.solid(),)




def _field(name: str) -> Field:
    return next(f for f in Section.FIELDS if f.name == name)


def _plain(value: object) -> object:
    if isinstance(value, tuple):
        return [_plain(x) for x in value]
    return value
