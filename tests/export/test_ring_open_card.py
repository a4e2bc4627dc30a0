"""What a ring with an open groove tells its user (recipes/stem-ring-cuff-open.yaml: ring
16/32 mm, groove bottom at radius 10, 6 mm high): the collar record of the manifest against
closed forms, read back from disk typed and unchanged; the card's collar line, steps and
cautions. Built once per session (conftest ``built``)."""

from __future__ import annotations

import json
import math

import pytest
from conftest import built

from soft_molds.export.card import CUFF_CAUTIONS, card_blocks, card_files
from soft_molds.export.manifest import read_manifest
from soft_molds.export.writer import write_mold_set

R_OUT, R_G, G = 16.0, 10.0, 6.0


@pytest.fixture(scope="module")
def cuff():
    return built("stem-ring-cuff-open")


def test_collar_record_is_the_rings_outer_diameter_and_the_grooves_closed_forms(cuff):
    c = cuff.manifest().collar
    assert c is not None
    assert c.inner_diameter_mm == 2 * R_OUT
    assert c.groove_bottom_diameter_mm == 2 * R_G and c.groove_height_mm == G
    # The groove bottom, a cylinder: 2 pi r h; seen across a diameter: 2 r h.
    assert c.groove_area_mm2 == pytest.approx(2 * math.pi * R_G * G, abs=1e-3)
    assert c.projected_area_mm2 == pytest.approx(2 * R_G * G, abs=1e-3)
    # F = p A: 1 kPa = 1e-3 N/mm2 (SI), on 120 mm2 -> 0.12 N.
    assert c.squeeze_n_per_kpa == pytest.approx(1e-3 * 2 * R_G * G, abs=1e-5)


def test_the_written_manifest_reads_back_with_its_collar_and_no_inlet(cuff, tmp_path):
    written = write_mold_set(cuff, tmp_path)
    back = read_manifest(written.directory)
    assert back.collar == cuff.manifest().collar
    assert back.params.inlets == ()
    raw = json.loads((written.directory / "manifest.json").read_text())
    assert raw["params"]["inlets"] == [] and "inlet" not in raw["params"]
    # The card reads only the typed manifest: memory and disk give the same text.
    assert card_files([back], "t")["casting-card.md"] == \
        card_files([cuff.manifest()], "t")["casting-card.md"]


def test_an_optional_field_left_at_none_is_not_written_and_reads_back_as_none():
    """Other manifests keep their bytes: the typed writer leaves out a field marked
    ``optional`` while it is None, and the reader gives None for the missing key (and still
    refuses a missing key that is not optional)."""
    from dataclasses import dataclass, field

    from soft_molds.export.typedjson import ShapeError, from_json, to_json

    @dataclass(frozen=True)
    class Rec:
        a: float
        extra: float | None = field(default=None, metadata={"optional": True})

    assert to_json(Rec(1.0)) == {"a": 1.0}
    assert to_json(Rec(1.0, 2.0)) == {"a": 1.0, "extra": 2.0}
    assert from_json(Rec, {"a": 1.0}) == Rec(1.0)
    assert from_json(Rec, {"a": 1.0, "extra": 2.0}) == Rec(1.0, 2.0)
    with pytest.raises(ShapeError, match="a: missing"):
        from_json(Rec, {"extra": 2.0})


def test_card_names_the_collar_its_steps_and_the_cuff_cautions(cuff):
    blocks = card_blocks([cuff.manifest()], "cuff")
    have = next(b[1] for b in blocks if b[0] == "ul" and any("Clamp screws" in i
                                                              for i in b[1]))
    collar = [i for i in have if i.startswith("Collar:")]
    assert len(collar) == 1 and "bore of 32 mm" in collar[0] and "0.12 N per kPa" in collar[0]
    assert not any(i.startswith("Tube") for i in have)  # no socket in the silicone
    steps = next(b[1] for b in blocks if b[0] == "ol")
    text = " ".join(steps)
    assert "plate-1 out along +y and plate-2 along -y" in text
    assert "Remove the core" not in text and "collar" in steps[-1]
    cautions = blocks[-1][1]
    assert all(c in cautions for c in CUFF_CAUTIONS)
    assert any("licensed practice" in c and "person" in c for c in cautions)
