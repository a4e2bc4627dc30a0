"""Changed recipe fields in the words of the bench, derived from the field declarations."""

from __future__ import annotations

import pytest

from soft_molds.export.fieldwords import field_words
from soft_molds.recipe.registry import void_kinds
from soft_molds.recipe.schema import BLOCKS

PARAMS = {"body": {"kind": "bar"}, "voids": [{"kind": "chambers"}]}


@pytest.mark.parametrize("path, value, words", [
    ("voids[0].height_mm", 6, ("chamber height", "6 mm")),
    ("mold.wall_mm", 5.0, ("mold wall", "5 mm")),
    ("material.grade", "A30", ("material grade", "A30")),
    ("voids[0].count", 7, ("chamber count", "7")),
    ("casting.waste_pct", 15.0, ("casting waste", "15 %")),
    ("inflate.working_pressure_kpa", 60, ("inflate working pressure", "60 kPa")),
    ("body.length_mm", 70, ("body length", "70 mm")),
])
def test_a_field_path_reads_as_owner_field_value_and_unit(path, value, words):
    assert field_words(path, value, PARAMS) == words


def test_every_declared_field_is_worded_without_its_unit_suffix_or_underscores():
    # Independently of the module: a declared field "<stem>_<unit>" reads "<stem>" with
    # the unit after the value, for every void kind and settings block.
    suffix = {"mm": "_mm", "deg": "_deg", "%": "_pct", "kPa": "_kpa", "psi": "_psi",
              "g": "_g", "g/cm3": "_g_cm3", "MPa": "_mpa", "": ""}
    cases = [(f"{block}.{f.name}", f, "bore") for block, fields in BLOCKS.items()
             for f in fields]
    for kind, cls in void_kinds().items():
        cases += [(f"voids[0].{f.name}", f, kind) for f in cls.FIELDS]
    for path, f, kind in cases:
        params = {"voids": [{"kind": kind}]}
        value_in: object = 3.0 if f.kind == "number" else "x"
        name, value = field_words(path, value_in, params)
        assert "_" not in name and "[" not in name, (path, name)
        assert name.endswith(f.name.removesuffix(suffix[f.unit]).replace("_", " ")), path
        if f.kind == "number" and f.unit:
            assert value == f"3 {f.unit}", (path, value)


def test_several_voids_are_numbered_and_an_unknown_path_still_reads():
    params = {"voids": [{"kind": "chambers"}, {"kind": "bore"}]}
    assert field_words("voids[1].diameter_mm", 3, params) == ("bore (void 2) diameter",
                                                              "3 mm")
    assert field_words("voids[0].kind", "bore", PARAMS) == ("chamber kind", "bore")


def test_a_graded_size_reads_from_first_to_last_with_its_unit():
    assert field_words("voids[0].width_mm", {"from": 12, "to": 8}, PARAMS) == \
        ("chamber width", "12 to 8 mm")
    assert field_words("voids[0].width_mm", [12.0, 10.5], PARAMS) == \
        ("chamber width", "12, 10.5 mm")
