"""The casting card written with every build (demo scenario)."""

from __future__ import annotations

import re
from dataclasses import replace

import pytest

from soft_molds.export.card import card_blocks, card_files
from soft_molds.export.manifest import read_manifest
from soft_molds.export.writer import write_mold_set


def test_card_markdown_and_html_say_the_same_numbers(finger):
    files = finger.files()
    md = files["casting-card.md"].decode()
    page = files["casting-card.html"].decode()
    q = finger.casting.quantities
    for p in q.portions:
        cell = f"{p.grams:g}"
        assert f"| {cell} |" in md and f"<td>{cell}</td>" in page
    nums_md = re.findall(r"\d+\.\d+", re.sub(r"<[^>]+>", " ", md))
    body = page.split("<body>", 1)[1]  # the head holds the style sheet's own numbers
    nums_html = re.findall(r"\d+\.\d+", re.sub(r"<[^>]+>", " ", body))
    assert nums_md == nums_html


def test_card_html_is_self_contained(finger):
    page = finger.files()["casting-card.html"].decode()
    assert page.startswith("<!DOCTYPE html>")
    for fetch in ("http:", "https:", "src=", "<script", "@import", "<link"):
        assert fetch not in page


def test_card_lists_steps_pot_life_and_the_cautions(finger):
    md = finger.files()["casting-card.md"].decode()
    g = finger.casting.grade
    assert f"pot life about {g.pot_life_min:g} min" in md
    assert f"demold after about {g.demold_h:g} h" in md
    for step in ("release agent", "Degas", "Pour from the sprue", "Remove the core"):
        assert step in md
    # cautions the trade asks for (common practice; casting-facts)
    for caution in ("sulfur", "tin-cure", "latex", "photopolymer", "eye protection",
                    "relief valve", "never exceed the tested pressure", "ventilated",
                    "not medical devices"):
        assert caution in md, caution


def test_a_family_of_different_grades_gets_a_column_per_component(finger):
    a = finger.manifest()
    c = a.casting
    b = replace(a, label="B", casting=replace(
        c, grade="A30", portions=tuple(replace(p, what=p.what.replace("A10", "A30"))
                                       for p in c.portions)))
    blocks = card_blocks([a, b], "mixed")
    (table,) = [blk for blk in blocks if blk[0] == "table" and blk[1][0] == "variant"
                and "checks" in blk[1]]
    head, rows = table[1], table[2]
    assert [h for h in head if h.endswith(" g") and "part" in h] == [
        "A10 part A g", "A10 part B g", "A30 part A g", "A30 part B g"]
    assert all(len(r) == len(head) for r in rows)
    assert rows[0][7] == "" and rows[1][5] == ""  # each variant fills its own columns
    assert sum(blk[0] == "p" and blk[1].startswith("Silicone (") for blk in blocks) == 2


def test_a_card_from_the_manifest_read_back_is_the_card_the_build_wrote(finger, tmp_path):
    # The card reads only the typed manifest, so memory and disk give the same bytes.
    written = write_mold_set(finger, tmp_path)
    back = read_manifest(written.directory)
    names = ("casting-card.md", "casting-card.html")
    assert card_files([back], "seedling-finger A") == {
        n: (written.directory / n).read_bytes() for n in names}


def test_a_family_without_any_casting_plan_has_no_card(finger):
    with pytest.raises(ValueError, match="no casting plan"):
        card_blocks([replace(finger.manifest(), casting=None)], "none")
