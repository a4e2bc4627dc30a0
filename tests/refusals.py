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


def assert_build_refused(text: str, expect: tuple[Expect, ...], tmp_path: Path, capsys,
                         monkeypatch) -> None:
    """``soft-molds build`` of recipe ``text`` (written as ``recipe.yaml`` in ``tmp_path``,
    the working folder) exits 2, prints nothing on stdout, one expected line per problem on
    stderr, and writes nothing: no output root, no other file beside the recipe."""
    from soft_molds.cli import main

    monkeypatch.chdir(tmp_path)  # anything written relative to the cwd would show here
    path = tmp_path / "recipe.yaml"
    path.write_text(text, encoding="utf-8")
    out = tmp_path / "out"
    status = main(["build", str(path), "--out", str(out)])
    cap = capsys.readouterr()
    assert status == 2, cap.err
    assert cap.out == ""
    assert_reported(cap.err, str(path), expect)
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["recipe.yaml"]


def refused_once(text: str, tmp_path: Path, capsys) -> tuple[Path, str]:
    """Build recipe ``text`` from a file in ``tmp_path`` and hold the refusal to the bad-input
    rules: exit 2, nothing on stdout, no traceback, nothing written, exactly one stderr line
    about the file. Returns the file and that line without its ``error: `` prefix."""
    from soft_molds.cli import main

    path = tmp_path / "recipe.yaml"
    path.write_text(text)
    out = tmp_path / "out"
    status = main(["build", str(path), "--out", str(out)])
    cap = capsys.readouterr()
    assert status == 2
    assert cap.out == ""
    assert "Traceback" not in cap.err
    assert not out.exists()
    lines = [ln.removeprefix("error: ") for ln in cap.err.splitlines() if str(path) in ln]
    assert len(lines) == 1, cap.err
    return path, lines[0]
