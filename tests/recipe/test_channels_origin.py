"""A channel network written from a plate hub's centre (``origin: hub``) is the network
written in the body's frame, moved by the hub's centre; its echo keeps what was written.

Recipe: the bundled four-arm hub gripper (our scenario). Where the plate puts the hub's
centre, worked out by hand (closed-form plane geometry): the outline's leftmost point lies
on the tip rounding of the 135 and 225 deg arms, whose corner circles' centres are
(arm_length - tip_round) = 42 mm along the arm and (arm_width / 2 - tip_round) = 4 mm
across it, so that point is (42 + 4) / sqrt(2) + 3 mm left of the hub's centre, and the
plate puts it on x = 0: the hub's centre is at x = 3 + 46 / sqrt(2), y = 0.
"""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
from recipe_text import edit, planned_from_text

HUB = (Path(__file__).resolve().parents[2] / "recipes" / "seedling-hub-gripper.yaml"
       ).read_text()
CENTRE_X = 3.0 + 46.0 / math.sqrt(2.0)
#: 42 mm along a diagonal (the branch ends), as the recipe writes it.
D = 29.698484809835
HUB_PATHS = """\
      - [[-15, 0], [0, 0]]                               # feed: hub edge at 180 deg to the centre
      - [[0, 0], [29.698484809835, 29.698484809835]]     # 45 deg arm
      - [[0, 0], [-29.698484809835, 29.698484809835]]    # 135 deg arm
      - [[0, 0], [-29.698484809835, -29.698484809835]]   # 225 deg arm
      - [[0, 0], [29.698484809835, -29.698484809835]]    # 315 deg arm
"""


def _body_frame_text() -> str:
    """The same network written in the body's frame (points moved by the closed-form
    centre, written with repr so nothing is lost)."""
    def pt(x: float, y: float) -> str:
        return f"[{x + CENTRE_X!r}, {y!r}]"

    c = pt(0.0, 0.0)
    lines = [f"      - [{pt(-15.0, 0.0)}, {c}]\n"]
    lines += [f"      - [{c}, {pt(sx * D, sy * D)}]\n"
              for sx, sy in ((1, 1), (-1, 1), (-1, -1), (1, -1))]
    return edit(edit(HUB, HUB_PATHS, "".join(lines)), "    origin: hub", "    origin: body")


def _numbers(prims) -> np.ndarray:
    out: list[float] = []
    for p in prims:
        for v in dataclasses.astuple(p):
            out += [float(x) for x in np.ravel(v) if not isinstance(x, (str, bool))] \
                if not isinstance(v, (str, bool)) else []
    return np.array(out)


def test_a_network_written_from_the_hub_is_the_one_written_in_the_body_frame():
    hub = planned_from_text(HUB).voids[0]
    body = planned_from_text(_body_frame_text()).voids[0]
    a, b = hub.primitives(100.0), body.primitives(100.0)
    assert [type(p) for p in a] == [type(p) for p in b]
    assert np.max(np.abs(_numbers(a) - _numbers(b))) < 1e-9
    # The mouth lies on the hub's edge at 180 deg: 15 mm left of the closed-form centre.
    assert math.isclose(hub.mouth_mm()[0], CENTRE_X - 15.0, abs_tol=1e-9)


def test_the_echo_keeps_the_paths_as_written_and_the_origin():
    echo = planned_from_text(HUB).params()["voids"][0]
    assert echo["origin"] == "hub"
    assert echo["paths"][0] == ((-15.0, 0.0), (0.0, 0.0))
    assert echo["paths"][1][1] == (D, D)
    # Left at its default the option is not echoed (recipes written before keep their hash).
    assert "origin" not in planned_from_text(_body_frame_text()).params()["voids"][0]


def test_a_mouth_a_hair_off_the_hubs_edge_is_snapped_onto_it():
    # 5e-7 mm outside the 15 mm hub radius: within the 1e-6 mm of float noise, so the mouth
    # is moved onto the outline (the hub disc's edge: distance from its centre 15 mm).
    r = planned_from_text(edit(HUB, "[[-15, 0], [0, 0]]", "[[-15.0000005, 0], [0, 0]]"))
    v = r.voids[0]
    x0, y0 = v.mouth_mm()
    assert abs(math.hypot(x0 - CENTRE_X, y0) - 15.0) < 1e-9
    assert abs(v.mouth_offset_mm(r.body.primitives())) < 1e-9
    assert r.params()["voids"][0]["paths"][0][0] == (-15.0000005, 0.0)
