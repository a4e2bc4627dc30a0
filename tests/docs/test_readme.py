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
    assert "soft-molds check recipes/\n" in ci  # every variant of every bundled recipe
    assert "recipes/seedling-finger.yaml" in build_cmd
