"""The stored corpus of recipe mutants (tests/data/mutants/corpus.json): every mutant is
refused with one located line per problem naming the mutated field, or accepted; nothing
else ever escapes the loader, and a sample of accepted mutants builds to a verdict, never
to a kernel failure.

Outside references: the field declarations are the project's own, but what a mutant's
value *is* comes from outside it: PyYAML's safe loader reads the bundled recipes the
mutants start from, and the YAML 1.1 spec and type repository (yaml.org/spec/1.1 4.2.2
and 6.1 for tabs, yaml.org/type/int.html for base-60 and octal integers,
yaml.org/type/float.html for .nan and .inf) and IEEE 754 (the range of a double) say what
the changed text means. Lines are those of the emitter in tests/mutants.py, known by
construction. tests/make_mutant_corpus.py writes the corpus; it is a tool, this is the test.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from collections import Counter
from pathlib import Path

import pytest
from make_mutant_corpus import plan_mutants, spec
from mutants import Mutant, load_corpus, render

from soft_molds import RecipeError, load_variants

ROOT = Path(__file__).resolve().parents[2]
CORPUS = load_corpus()
BY_ID = {m.id: m for m in CORPUS}

#: One printed problem: FILE[:LINE]:[ PATH:] MESSAGE[ (got GOT)][; allowed: ALLOWED]
#: (DEVELOPERS.md, house style). A field path is dotted keys and [index] steps, after an
#: optional variant label in brackets.
PATH_RE = r"(?:\[[A-Z0-9, -]+\] )?[A-Za-z_][\w-]*(?:\[\d+\])*(?:\.[^\s.:\[]+(?:\[\d+\])*)*"


def line_re(src: str) -> re.Pattern[str]:
    return re.compile(rf"^{re.escape(src)}(?::(?P<line>\d+))?:(?: (?P<path>{PATH_RE}):)? "
                      r"(?P<message>\S.*?)(?: \(got (?P<got>.+)\))?"
                      r"(?:; allowed: (?P<allowed>.+))?$")


class Result:
    """What the public loader did with one mutant: the source name, and the RecipeError's
    lines, or the other exception (never expected)."""

    def __init__(self, src: str, outcome: str, lines: list[str], problems: tuple = (),
                 other: BaseException | None = None):
        self.src, self.outcome, self.lines = src, outcome, lines
        self.problems, self.other = problems, other


@pytest.fixture(scope="module")
def files(tmp_path_factory) -> dict[str, Path]:
    """Each mutant written out as a recipe file."""
    folder = tmp_path_factory.mktemp("mutants")
    out = {}
    for m in CORPUS:
        text, _, _ = render(m.base, m.op, m.path, m.value)
        out[m.id] = folder / f"{m.id}.yaml"
        out[m.id].write_text(text)
    return out


@pytest.fixture(scope="module")
def results(files) -> dict[str, Result]:
    """Every mutant through ``soft_molds.load_variants`` (the loader the CLI uses)."""
    out = {}
    for m in CORPUS:
        src = str(files[m.id])
        try:
            load_variants(files[m.id])
        except RecipeError as exc:
            out[m.id] = Result(src, "refused", exc.lines(), exc.problems)
        except BaseException as exc:  # noqa: BLE001 - the point is that none comes
            out[m.id] = Result(src, "other", [], (), exc)
        else:
            out[m.id] = Result(src, "accepted", [])
    return out


def _names(found: str, name: str) -> bool:
    return found == name or found.startswith((name + "[", name + "."))


def _expected_line(m: Mutant) -> int | None:
    """Where the refusal must point: the mutated key's line, or for a missing key the line
    of the block that lacks it (None at the top level, where no key line exists)."""
    _, key, parent = render(m.base, m.op, m.path, m.value)
    return parent if m.op == "delete" else key


def _describe(m: Mutant, r: Result) -> str:
    return (f"{m.id} {m.base}: {m.op} {m.path} = {m.value!r} ({m.why}): {r.outcome}\n  "
            + "\n  ".join(r.lines) + (f"\n  {r.other!r}" if r.other else ""))


def test_corpus_is_what_the_generator_writes():
    """A changed declaration or bundled recipe makes the stored corpus stale: rerun
    tests/make_mutant_corpus.py (the generator is seeded, so it writes the same file)."""
    assert [spec(m) for m in plan_mutants()] == [spec(m) for m in CORPUS]


def test_corpus_covers_every_kind_of_mutation():
    assert len(CORPUS) >= 200
    whys = Counter(m.why for m in CORPUS)
    for why in ("text", "quoted number", "list", "mapping", "nan", "inf", "-inf", "null",
                "bool", "huge int", "empty string", "base-60", "octal", "beyond double",
                "above by a step", "below by a step", "at the top", "at the bottom",
                "inside the gap", "fraction", "unknown top-level key", "misspelt key",
                "key in the wrong block", "block as a number", "voids as a mapping",
                "tab after the colon", "tab in the indentation", "duplicate key",
                "missing required key", "variant value as text"):
        assert whys[why] >= 1, why
    assert {m.path.split(".")[0].split("[")[0] for m in CORPUS} >= {
        "body", "voids", "inlet", "parting", "mold", "checks", "material", "inflate",
        "casting", "marking", "printer", "mesh", "name", "label", "variants"}


def test_nothing_but_a_recipe_error_leaves_the_loader(results):
    other = [_describe(m, results[m.id]) for m in CORPUS if results[m.id].outcome == "other"]
    assert not other, "\n".join(other)


def test_every_refusal_line_has_the_house_form(results):
    bad = []
    for m in CORPUS:
        r = results[m.id]
        form = line_re(r.src)
        for text in r.lines:
            if "\n" in text or "Traceback" in text or form.match(text) is None:
                bad.append(f"{m.id}: {text!r}")
    assert not bad, "\n".join(bad[:20])


def test_declared_refusals_name_the_mutated_field_on_its_line(results):
    """A value outside its declaration is refused on the line that wrote it, naming the
    field (the document, for a syntax error) and saying what the declaration allows."""
    wrong = []
    for m in (m for m in CORPUS if m.basis == "declared"):
        r = results[m.id]
        line = _expected_line(m)
        form = line_re(r.src)
        hits = []
        for text in r.lines:
            got = form.match(text)
            if got is None:
                continue
            path = got["path"] or ""
            if not any(_names(path, n) for n in m.names):
                continue
            if line is not None and got["line"] != str(line):
                continue
            if m.allowed is not None and got["allowed"] != m.allowed:
                continue
            hits.append(text)
        if r.outcome != "refused" or not hits:
            wrong.append(f"expected {m.names} on line {line}"
                         + (f" allowing {m.allowed!r}" if m.allowed else "") + ": "
                         + _describe(m, r))
    assert not wrong, "\n".join(wrong[:10])


def test_recorded_outcomes_still_hold(results):
    """In-range values: accepted, or refused naming the same first field as when the corpus
    was written (a wall, a cross-check or a rule of the mold)."""
    changed = []
    for m in (m for m in CORPUS if m.basis == "recorded"):
        r = results[m.id]
        paths = [p.path for p in r.problems]
        if r.outcome != m.outcome or (m.names and m.names[0] not in paths):
            changed.append(f"recorded {m.outcome} {m.names[:1]}: " + _describe(m, r))
    assert not changed, "\n".join(changed[:10])


def _cli(*args: str | Path, timeout: float) -> subprocess.CompletedProcess:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "soft_molds", *map(str, args)],
                          capture_output=True, text=True, env=env, timeout=timeout, cwd=ROOT)


@pytest.mark.parametrize("mid", [m.id for m in CORPUS if m.extra.get("cli")])
def test_check_command_refuses_with_the_same_lines_and_exit_2(mid, files, results):
    """``soft_molds check FILE`` prints the loader's lines, one per problem, on stderr,
    nothing else, and exits 2 (cli.py: bad input)."""
    run = _cli("check", files[mid], timeout=120)
    assert run.returncode == 2, _describe(BY_ID[mid], results[mid]) + run.stderr
    assert run.stdout == ""
    assert run.stderr.splitlines() == ["error: " + ln for ln in results[mid].lines]


def _verdicts(stdout: str, files: list[Path]) -> dict[Path, str]:
    """Per recipe file: ok, findings (built, a check failed) or kernel (the build itself
    failed: cli.py prints ``FAIL FILE LABEL: <error>``, the error's text beginning
    ``geometry failed`` or naming a mesh integrity failure)."""
    out = {}
    for f in files:
        mine = [ln for ln in stdout.splitlines() if ln[5:].startswith(str(f))]
        if any(ln.startswith(f"ok   {f}: ") for ln in mine):
            out[f] = "ok"
        elif any(ln.startswith(f"FAIL {f}: ") and "parts closed and consistent" in ln
                 for ln in mine):
            out[f] = "findings"
        elif any(ln.startswith(f"FAIL {f} ") for ln in mine):
            out[f] = "kernel"
        else:
            out[f] = "missing"
    return out


def test_accepted_sample_builds_to_a_verdict_never_a_kernel_failure(files, results, capsys):
    """A recipe that passes validation never fails in the kernel (DEVELOPERS.md): the
    sample of accepted mutants builds with exit 0 (no failed check) or 1 (a check failed),
    every one to a verdict."""
    sample = [m for m in CORPUS if m.extra.get("build")]
    assert 1 <= len(sample) <= 6
    assert all(results[m.id].outcome == "accepted" for m in sample)
    paths = [files[m.id] for m in sample]
    run = _cli("check", *paths, timeout=900)
    verdicts = _verdicts(run.stdout, paths)
    built = Counter(verdicts.values())
    outcomes = Counter(results[m.id].outcome for m in CORPUS)
    with capsys.disabled():
        print(f"\nmutant corpus: {len(CORPUS)} mutants, {outcomes['refused']} refused, "
              f"{outcomes['accepted']} accepted, {outcomes['other']} other; build sample "
              f"{len(sample)}: {built['ok']} built ok, {built['findings']} built with "
              f"findings, {built['kernel']} kernel failure(s)")
    kernel = [f"{m.id} {m.base}: {m.path} = {m.value!r}" for m, f in zip(sample, paths)
              if verdicts[f] != "ok" and verdicts[f] != "findings"]
    assert not kernel, "\n".join(kernel) + "\n" + run.stdout + run.stderr
    assert run.returncode == (1 if built["findings"] else 0), run.stdout + run.stderr
    assert "Traceback" not in run.stderr
