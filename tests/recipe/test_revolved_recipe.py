"""The revolved body and bellows void as the recipe stage reads them: the bellows shortcut's
points (elementary geometry of a V pleat), the cavity fitted to its body when the recipe is
read, and that fitted cavity surviving the copies a sweep makes (pickle, deepcopy)."""

from __future__ import annotations

import copy
import math
import pickle
from pathlib import Path

import numpy as np
import pytest

from soft_molds import load_recipe
from soft_molds.recipe.kinds.revolved import bellows_profile

ROOT = Path(__file__).resolve().parents[2]


def test_the_bellows_shortcut_puts_crests_half_a_pitch_after_each_root():
    pts = bellows_profile(3, 8.0, 7.0, 13.0, 10.0, 6.0)
    assert pts[0] == (0.0, 7.0) and pts[-1] == (10.0 + 3 * 8.0 + 6.0, 7.0)
    crests = [p for p in pts if p[1] == 13.0]
    assert [x for x, _ in crests] == [14.0, 22.0, 30.0]
    # every flank rises 6 mm over 4 mm
    flanks = [math.dist(a, b) for a, b in zip(pts[1:-1], pts[2:-1])]
    assert flanks == pytest.approx([math.hypot(4.0, 6.0)] * 6, rel=1e-12)


def test_the_bellows_void_is_fitted_to_its_body_when_read():
    r = load_recipe(ROOT / "recipes" / "plug-bellows.yaml")
    cav = r.voids[0].cavity()
    body = r.body_primitives()[0]
    # the cavity's surface lies one wall (1.5 mm) inside the body everywhere
    s = cav.surface_samples(0.5)
    assert np.allclose(body.sdf(s), -1.5, atol=1e-6)
    assert r.voids[0].entry() == ((0.0, 0.0), 0.0, 1.5)


def test_a_fitted_bellows_survives_pickle_and_deepcopy():
    r = load_recipe(ROOT / "recipes" / "plug-bellows.yaml")
    for twin in (pickle.loads(pickle.dumps(r)), copy.deepcopy(r)):
        assert twin == r and twin.voids[0].cavity() == r.voids[0].cavity()
