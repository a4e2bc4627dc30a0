"""A ``records`` field's items (a channel network's chamber rows) are values: hashable,
read-only, equal after a round trip through pickle (the sweep's workers get recipes that
way) and echoed as plain mappings (the recipe's hash is computed from JSON)."""

from __future__ import annotations

import json
import pickle

import pytest

from soft_molds.recipe.fields import Record


def test_a_record_is_a_read_only_hashable_mapping_that_survives_pickle():
    rec = Record({"path": 0, "count": 4, "pitch_mm": 8.0})
    assert hash(rec) == hash(Record({"pitch_mm": 8.0, "count": 4, "path": 0}))
    with pytest.raises(TypeError):
        rec["count"] = 5
    with pytest.raises(TypeError):
        rec.update(count=5)
    back = pickle.loads(pickle.dumps(rec))
    assert back == rec and type(back) is Record
    assert json.loads(json.dumps(rec)) == {"path": 0, "count": 4, "pitch_mm": 8.0}
