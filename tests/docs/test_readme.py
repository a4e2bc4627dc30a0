"""The README is a contract: its recipe reference is the one the validator uses, and its
two set-up commands are the ones CI runs."""

from __future__ import annotations

import re
from pathlib import Path

from soft_molds.recipe.reference import reference_markdown

ROOT = Path(__file__).resolve().parents[2]


def test_readme_recipe_reference_matches_the_validating_field_lists():
    text = (ROOT / "README.md").read_text()
    m = re.search(r"<!-- recipe-reference:start[^>]*-->\n\n(.*?)\n<!-- recipe-reference:end -->",
                  text, re.S)
    assert m, "reference markers missing"
    assert m.group(1) == reference_markdown()


def test_ci_runs_the_readme_install_and_test_commands():
    readme = (ROOT / "README.md").read_text()
    blocks = re.findall(r"```sh\n(.*?)\n```", readme, re.S)
    build_cmd, test_cmd = blocks[0], blocks[1]
    ci = (ROOT / ".ci" / "run").read_text()
    assert test_cmd in ci
    # every variant of every bundled recipe, two at a time (CI has two cores)
    assert "soft-molds check recipes/ --jobs 2\n" in ci
    assert "recipes/seedling-finger.yaml" in build_cmd


def _runnable_examples() -> list[str]:
    """The command lines of every ``sh`` block after the two set-up commands."""
    readme = (ROOT / "README.md").read_text()
    blocks = re.findall(r"```sh\n(.*?)\n```", readme, re.S)[2:]
    return [line for b in blocks for line in b.splitlines() if line.strip()]


def test_every_command_example_calls_the_console_script_the_set_up_installs():
    # The set-up makes .venv and installs the package into it: its console scripts land
    # in .venv/bin (Python's venv layout on POSIX, PEP 405), not on PATH.
    import tomllib

    scripts = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["scripts"]
    assert scripts == {"soft-molds": "soft_molds.cli:main"}
    lines = _runnable_examples()
    assert len(lines) >= 6
    for line in lines:
        assert line.startswith(".venv/bin/soft-molds "), line
    readme = (ROOT / "README.md").read_text()
    # no command in running text or a synopsis that starts with a bare `soft-molds`
    assert re.findall(r"(?:`|^)soft-molds ", readme, re.M) == []


def test_every_command_example_parses_and_its_files_exist():
    import shlex

    from soft_molds.cli import make_parser

    for line in _runnable_examples():
        argv = shlex.split(line)[1:]
        try:
            args = make_parser().parse_args(argv)
        except SystemExit as exc:      # --help prints and exits 0
            assert exc.code == 0 and "--help" in argv, line
            continue
        named = getattr(args, "recipes", None) or [getattr(args, "recipe", None)]
        for path in filter(None, named):
            assert (ROOT / path).exists(), (line, path)


def test_the_quick_examples_run_as_printed(capsys, monkeypatch):
    # reference, blend and --help need no CAD kernel: run them as printed, from the
    # README's folder (build, check and sweep are run by CI and the CLI tests).
    import shlex

    from soft_molds.cli import main

    monkeypatch.chdir(ROOT)
    quick = [line for line in _runnable_examples()
             if shlex.split(line)[1] in ("reference", "blend", "--help")]
    assert len(quick) == 3
    for line in quick:
        argv = shlex.split(line)[1:]
        try:
            code = main(argv)
        except SystemExit as exc:
            code = exc.code
        assert code == 0, line
    out = capsys.readouterr().out
    assert "A10" in out and "### Top level" in out and "usage: soft-molds" in out


def test_readme_advice_section_is_the_advice_of_every_registered_check():
    from soft_molds.export.advice import ADVICE, advice_markdown, advice_section, finding_names

    # a check that reports a name without advice fails here
    assert [n for n in finding_names() if n not in ADVICE] == []
    assert sorted(ADVICE) == sorted(finding_names())   # and no advice for a name gone
    assert advice_section((ROOT / "README.md").read_text()) == advice_markdown()
