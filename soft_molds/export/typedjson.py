"""Frozen dataclasses to JSON-shaped values and back, checked against their type hints.

:func:`to_json` walks a dataclass's fields in declaration order, so the JSON object's keys
come out in that order; a field's key is its name unless ``field(metadata={"json": ...})``
names another (for keys that are Python keywords, such as ``with``). :func:`from_json`
builds the dataclass back from ``json.loads`` output and raises :class:`ShapeError`
naming the path of the first value that is missing or of the wrong type
(``casting.portions[1].g``).

Supported field types: ``str``, ``int``, ``float`` (an integer is accepted and kept as
written, so a value read back is written out with the same bytes), ``bool``, string
enums, ``X | None``, ``tuple[X, ...]``, fixed ``tuple[X, Y]``, ``Mapping[str, X]``,
nested dataclasses, and classes that convert themselves (:class:`JsonConvertible`).
"""

from __future__ import annotations

import dataclasses
import types
import typing
from collections.abc import Mapping
from enum import Enum
from functools import cache
from typing import Protocol, TypeAlias, TypeVar, runtime_checkable

JsonValue: TypeAlias = "None | bool | int | float | str | list[JsonValue] | dict[str, JsonValue]"

T = TypeVar("T")


class ShapeError(ValueError):
    """A JSON value does not have the shape a dataclass field asks for.

    ``where``: the path of the value (``checks[3].severity``; ``""`` for the document);
    ``problem``: what is wrong, with the value found."""

    def __init__(self, where: str, problem: str):
        self.where = where
        self.problem = problem
        super().__init__(f"{where or 'document'}: {problem}")


@runtime_checkable
class JsonConvertible(Protocol):
    """A class that writes and reads its own JSON value (e.g. a free-form mapping)."""

    def json_value(self) -> JsonValue: ...

    @classmethod
    def from_json_value(cls, data: JsonValue, where: str) -> JsonConvertible: ...


def json_key(f: dataclasses.Field) -> str:
    return str(f.metadata.get("json", f.name))


def to_json(value: object) -> JsonValue:
    """``value`` (dataclass, enum, tuple, mapping or plain JSON scalar) as JSON-shaped data:
    dataclasses become objects in field order, tuples lists, enums their value."""
    if isinstance(value, JsonConvertible):
        return value.json_value()
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        # A field marked ``optional`` is left out while it is None (so records that gained
        # it later keep their bytes) and read back as None when missing.
        return {json_key(f): to_json(getattr(value, f.name)) for f in dataclasses.fields(value)
                if not (f.metadata.get("optional") and getattr(value, f.name) is None)}
    if isinstance(value, Enum):
        return to_json(value.value)
    if isinstance(value, tuple | list):
        return [to_json(v) for v in value]
    if isinstance(value, Mapping):
        return {str(k): to_json(v) for k, v in value.items()}
    if value is None or isinstance(value, bool | int | float | str):
        return value
    raise TypeError(f"{type(value).__name__} has no JSON form")


@cache
def _hints(cls: type) -> dict[str, object]:
    return typing.get_type_hints(cls)


def _describe(data: object) -> str:
    text = repr(data)
    return text if len(text) <= 40 else text[:37] + "..."


def _kind(data: object) -> str:
    if isinstance(data, dict):
        return "an object"
    if isinstance(data, list):
        return "a list"
    return _describe(data)


def _at(where: str, key: str | int) -> str:
    if isinstance(key, int):
        return f"{where}[{key}]"
    return f"{where}.{key}" if where else key


def from_json(tp: type[T], data: object, where: str = "") -> T:
    """``data`` (as ``json.loads`` gives it) as a value of ``tp``; ShapeError when it does
    not fit, naming the path of the offending value."""
    return typing.cast(T, convert(tp, data, where))


def convert(tp: object, data: object, where: str) -> object:
    """As :func:`from_json`, for any supported type form (``tuple[float, float]``, ...)."""
    origin = typing.get_origin(tp)
    if origin is typing.Union or origin is types.UnionType:
        return _union(typing.get_args(tp), data, where)
    if origin is tuple:
        return _tuple(typing.get_args(tp), data, where)
    if origin is Mapping or origin is dict:
        return _mapping(typing.get_args(tp)[1], data, where)
    if isinstance(tp, type):
        if issubclass(tp, JsonConvertible):
            return tp.from_json_value(typing.cast(JsonValue, data), where)
        if dataclasses.is_dataclass(tp):
            return _dataclass(tp, data, where)
        if issubclass(tp, Enum):
            return _enum(tp, data, where)
        return _scalar(tp, data, where)
    raise TypeError(f"{where}: unsupported field type {tp!r}")


def _union(args: tuple[object, ...], data: object, where: str) -> object:
    if data is None and type(None) in args:
        return None
    rest = [a for a in args if a is not type(None)]
    if len(rest) != 1:
        raise TypeError(f"{where}: only X | None unions are supported, got {args!r}")
    return convert(rest[0], data, where)


def _tuple(args: tuple[object, ...], data: object, where: str) -> tuple[object, ...]:
    if not isinstance(data, list):
        raise ShapeError(where, f"expected a list, got {_kind(data)}")
    if len(args) == 2 and args[1] is Ellipsis:
        return tuple(convert(args[0], v, _at(where, i)) for i, v in enumerate(data))
    if len(data) != len(args):
        raise ShapeError(where, f"expected a list of {len(args)}, got {len(data)} items")
    return tuple(convert(a, v, _at(where, i)) for i, (a, v) in enumerate(zip(args, data)))


def _mapping(value_type: object, data: object, where: str) -> dict[str, object]:
    if not isinstance(data, dict):
        raise ShapeError(where, f"expected an object, got {_kind(data)}")
    return {k: convert(value_type, v, _at(where, k)) for k, v in data.items()}


def _dataclass(cls: type, data: object, where: str) -> object:
    if not isinstance(data, dict):
        raise ShapeError(where, f"expected an object, got {_kind(data)}")
    hints = _hints(cls)
    values: dict[str, object] = {}
    for f in dataclasses.fields(cls):
        key = json_key(f)
        if key not in data and f.metadata.get("optional"):
            values[f.name] = None
            continue
        if key not in data:
            raise ShapeError(_at(where, key), "missing")
        values[f.name] = convert(hints[f.name], data[key], _at(where, key))
    # Nothing is dropped silently: the typed value holds everything the file says.
    extra = [k for k in data if k not in {json_key(f) for f in dataclasses.fields(cls)}]
    if extra:
        raise ShapeError(_at(where, extra[0]), "unexpected key")
    return cls(**values)


def _enum(cls: type[Enum], data: object, where: str) -> Enum:
    try:
        return cls(data)
    except ValueError:
        allowed = ", ".join(repr(m.value) for m in cls)
        raise ShapeError(where, f"expected one of {allowed}, got {_describe(data)}") from None


_SCALAR_NAMES = {str: "a string", int: "an integer", float: "a number", bool: "true or false"}


def _scalar(tp: type, data: object, where: str) -> object:
    # bool is an int in Python but not a number in a manifest; an integer is a number
    # (JSON does not tell 2 from 2.0 once written by another tool) and is kept as it is.
    ok = (isinstance(data, bool) if tp is bool
          else not isinstance(data, bool) and isinstance(data, int | float) if tp is float
          else not isinstance(data, bool) and isinstance(data, tp))
    if not ok:
        name = _SCALAR_NAMES.get(tp, tp.__name__)
        raise ShapeError(where, f"expected {name}, got {_describe(data)}")
    return data
