"""What a refused recipe must print: one stderr line per problem,
``error: FILE[:LINE]:[ PATH:] MESSAGE... [(got GOT)][; allowed: ...]`` and no traceback.
Shared by the command-line bad-input tests of every kind."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path


@dataclass(frozen=True)
class Expect:
    """One stderr line: ``error: FILE[:LINE]:[ PATH:] MESSAGE... [(got GOT)][; allowed: ...]``.
    ``path`` "" is a problem of the document itself; ``line`` None where no line exists
    (no file, or nothing in it). ``file`` names another file of the case (a grades table)
    when the problem is located there. With ``exact`` the line is exactly
    ``MESSAGE (got GOT); allowed: ALLOWED`` (each part only when given)."""

    path: str
    line: int | None
    message: str
    got: str | None = None
    allowed: str | None = None
    file: str | None = None
    exact: bool = False


def assert_reported(stderr: str, label: str, expect: tuple[Expect, ...]) -> None:
    assert "Traceback" not in stderr
    lines = stderr.splitlines()
    assert len(lines) == len(expect), stderr
    for text, e in zip(lines, expect):
        file = label if e.file is None else str(Path(label).resolve().parent / e.file)
        where = f"{file}:{e.line}:" if e.line is not None else f"{file}:"
        prefix = f"error: {where}" + (f" {e.path}:" if e.path else "") + " "
        assert text.startswith(prefix), (text, prefix)
        body = text[len(prefix):]
        if e.exact:
            got = "" if e.got is None else f" (got {e.got})"
            allowed = "" if e.allowed is None else f"; allowed: {e.allowed}"
            assert body == e.message + got + allowed, body
            continue
        assert body.startswith(e.message), (body, e.message)
        if e.got is not None:
            assert f"(got {e.got})" in body, body
        if e.allowed is not None:
            assert "; allowed: " in body, body
            assert e.allowed in body.split("; allowed: ", 1)[1], body
