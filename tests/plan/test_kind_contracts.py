"""A kind is checked against its contract when it registers: a class that lacks a method,
takes the wrong arguments, is mutable or whose fields differ from FIELDS is refused at once
(a TypeError naming what is missing), not silently planned without it."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import pytest

from soft_molds.recipe.contracts import Entry
from soft_molds.recipe.fields import Field, number
from soft_molds.recipe.primitives import RoundedRod
from soft_molds.recipe.registry import VOID_KINDS, body_kinds, void_kind, void_kinds


def _void_class(**methods):
    @dataclass(frozen=True)
    class Probe:
        FIELDS: ClassVar[tuple[Field, ...]] = (number("diameter_mm", "bore diameter"),)
        diameter_mm: float

        @classmethod
        def cross_check(cls, v, path, line):
            return []

        def primitives(self, body_length_mm):
            return (RoundedRod("x", 0.0, 10.0, (0.0, 0.0), self.diameter_mm / 2.0),)

        def entry(self):
            return Entry((0.0, 0.0), self.diameter_mm / 2.0, 0.0)

        def membranes(self, body_length_mm):
            return ()

    for name, fn in methods.items():
        if fn is None:
            delattr(Probe, name)
        else:
            setattr(Probe, name, fn)
    return Probe


def test_a_complete_void_kind_registers():
    cls = _void_class()
    try:
        assert void_kind("probe-complete")(cls) is cls
        assert void_kinds()["probe-complete"] is cls
    finally:
        VOID_KINDS.pop("probe-complete", None)


def test_a_void_kind_without_membranes_is_refused_not_left_unchecked():
    with pytest.raises(TypeError, match="missing method membranes"):
        void_kind("probe-no-membranes")(_void_class(membranes=None))
    assert "probe-no-membranes" not in VOID_KINDS


def test_a_method_with_the_wrong_arguments_is_refused():
    with pytest.raises(TypeError, match=r"primitives\(\) takes 0 argument"):
        void_kind("probe-arity")(_void_class(primitives=lambda self: ()))


def test_fields_must_match_the_dataclass():
    @dataclass(frozen=True)
    class Mismatch:
        FIELDS: ClassVar[tuple[Field, ...]] = (number("length_mm", "length"),)
        width_mm: float

    with pytest.raises(TypeError, match="differ from FIELDS"):
        void_kind("probe-fields")(Mismatch)


def test_a_mutable_kind_is_refused():
    @dataclass
    class Loose:
        FIELDS: ClassVar[tuple[Field, ...]] = ()

    with pytest.raises(TypeError, match="frozen dataclass"):
        void_kind("probe-mutable")(Loose)


def test_every_bundled_kind_meets_its_contract():
    # Registration already checked them; the registries list what the reference documents.
    assert set(body_kinds()) >= {"bar", "rod"}
    assert set(void_kinds()) >= {"bore", "chambers"}
