"""The posts of a ``channels`` network in the layered process (see
:mod:`soft_molds.plan.processes.layered` and :mod:`soft_molds.recipe.kinds.channels`).

Every channel segment is a drafted rectangular post turned with its segment; a round post
stands on every bend and branch point, and the segments run into it by the draft's lean at
their top, so the groove has no notch at a joint however the posts lean; the inlet's
segment runs ``FEED_OVERRUN_MM`` beyond the body's outline (the tray wall takes a notch
there). Every chamber is a post of its length and width with its vertical edges rounded,
turned with its path. Frame: the actuator's (mm, deg), posts standing on the bond face.
"""

from __future__ import annotations

import math

from ...errors import Problem
from ...recipe.kinds.channels import Channels
from ...recipe.model import Recipe
from ..lines import LineOf
from ..model import Post

#: Float noise when a floor is compared with the bond face (mm).
ON_FACE_MM = 1e-6


def network_posts(v: Channels, index: int, bond_z_mm: float, draft_deg: float,
                  overrun_mm: float) -> tuple[Post, ...]:
    """Segment posts (path order), joint posts, chamber posts (row order)."""
    w, h = v.width_mm, v.height_mm
    lean = h * math.tan(math.radians(draft_deg))
    joints = v.joints()
    out = []
    for i, k, a, b in v.segments():
        ang = math.degrees(math.atan2(b[1] - a[1], b[0] - a[0]))
        back = overrun_mm if i == 0 and k == 0 else (
            lean if any(math.dist(a, j) <= 1e-6 for j in joints) else 0.0)
        ahead = lean if any(math.dist(b, j) <= 1e-6 for j in joints) else 0.0
        length = math.dist(a, b)
        t = math.radians(ang)
        shift = (ahead - back) / 2.0
        centre = ((a[0] + b[0]) / 2.0 + shift * math.cos(t),
                  (a[1] + b[1]) / 2.0 + shift * math.sin(t))
        out.append(Post(f"voids[{index}].paths[{i}] segment {k + 1}", centre,
                        (length + back + ahead, w), 0.0, bond_z_mm, h, draft_deg, ang))
    for p in joints:
        jx, jy = v.as_written(*p)  # named as the recipe wrote it
        out.append(Post(f"voids[{index}] joint at ({jx:g}, {jy:g}){v.frame_words()}", p,
                        (w, w), w / 2.0, bond_z_mm, h, draft_deg))
    for j, k, c, ang in v.chamber_frames():
        row = v.row(j)
        out.append(Post(f"voids[{index}].rows[{j}] chamber {k + 1}", c,
                        (row.length_mm, row.width_mm), row.corner_radius_mm, bond_z_mm,
                        row.height_mm, draft_deg, ang))
    return tuple(out)


def network_problems(r: Recipe, v: Channels, index: int, bond_z_mm: float,
                     line: LineOf) -> list[Problem]:
    """The network's floor on the bond face, and every rounded post corner round enough
    for the draft (a drafted corner smaller than the lean would close)."""
    at = f"voids[{index}]"
    if abs(v.z_mm - bond_z_mm) > ON_FACE_MM:
        return [Problem(f"{at}.z_mm", "puts the channels' floor off the bond face", line(
            f"{at}.z_mm"), v.z_mm, f"{bond_z_mm:g} (the bond face: the body's bottom + "
            f"process.base_mm = {r.process.base_mm:g} mm)")]
    tan = math.tan(math.radians(r.process.draft_deg))
    for j in range(len(v.rows)):
        row = v.row(j)
        least = row.height_mm * tan
        if 0.0 < row.corner_radius_mm < least:
            path = f"{at}.rows[{j}].corner_radius_mm"
            return [Problem(path, "is too small for the draft", line(path),
                            row.corner_radius_mm, f"0 or at least {least:.3g} mm")]
    if v.width_mm / 2.0 <= v.height_mm * tan:
        path = f"{at}.width_mm"
        return [Problem(path, "closes the round joint posts under the draft", line(path),
                        v.width_mm, f"more than {2.0 * v.height_mm * tan:.3g} mm")]
    return []
