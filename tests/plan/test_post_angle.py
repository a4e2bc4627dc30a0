"""A post turned about z keeps its section and volume and turns its outline.

Sources: a rotation about the post's centre preserves lengths and areas, and turns the
rectangle's corners by the angle (elementary plane geometry); the shoelace area of the
unturned outline.
"""

from __future__ import annotations

import math

import numpy as np

from soft_molds.plan.model import Post


def shoelace(pts) -> float:
    v = np.asarray(pts)
    return 0.5 * float(np.sum(v[:, 0] * np.roll(v[:, 1], -1) - np.roll(v[:, 0], -1) * v[:, 1]))


def test_a_turned_post_has_the_same_section_and_volume():
    flat = Post("p", (10.0, 4.0), (8.0, 3.0), 1.0, -2.0, 5.0, 2.0)
    for angle in (30.0, 90.0, -135.0):
        turned = Post("p", (10.0, 4.0), (8.0, 3.0), 1.0, -2.0, 5.0, 2.0, angle)
        assert abs(shoelace(turned.outline_mm()) - shoelace(flat.outline_mm())) < 1e-9
        assert abs(turned.volume_mm3() - flat.volume_mm3()) < 1e-9
        # Every corner of the outline keeps its distance from the centre.
        r0 = np.hypot(*(np.asarray(flat.outline_mm()) - (10.0, 4.0)).T)
        r1 = np.hypot(*(np.asarray(turned.outline_mm()) - (10.0, 4.0)).T)
        assert np.allclose(r0, r1, atol=1e-12)


def test_a_quarter_turn_swaps_the_extents():
    p = Post("p", (10.0, 4.0), (8.0, 3.0), 0.0, 0.0, 5.0, 1.0, 90.0)
    v = np.asarray(p.outline_mm())
    assert np.allclose([v[:, 0].min(), v[:, 0].max()], [8.5, 11.5], atol=1e-12)
    assert np.allclose([v[:, 1].min(), v[:, 1].max()], [0.0, 8.0], atol=1e-12)
    assert np.allclose(p.x_span_mm(), (8.5, 11.5), atol=1e-12)
    # The first corner (+x, -y) turns to (+y, +x) of the centre.
    assert np.allclose(v[0], (10.0 + 1.5, 4.0 + 4.0), atol=1e-12)
    assert math.isclose(Post("q", (0.0, 0.0), (8.0, 3.0), 0.0, 0.0, 5.0, 1.0).x_span_mm()[1],
                        4.0)
