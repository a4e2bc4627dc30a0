"""The casting card written with every build (demo scenario)."""

from __future__ import annotations

import re
from dataclasses import replace

import pytest

from soft_molds.export.assembly import read_pictures
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
    for fetch in ("http:", "https:", "<script", "@import", "<link"):
        assert fetch not in page
    # pictures only as data URIs (RFC 2397), nothing fetched
    assert page.count("src=") == page.count('src="data:image/png;base64,') == 2


def test_card_lists_steps_pot_life_and_the_cautions(finger):
    md = finger.files()["casting-card.md"].decode()
    g = finger.casting.grade
    # The handling times are said once: the recipe's figures, then the data sheet.
    assert md.count("Pot life") == 1 and md.count("demold after") == 1
    assert f"Pot life {g.pot_life_min:g} min; demold after {g.demold_h:g} h" in md
    assert "check your data sheet" in md
    assert "pot life about" not in md and "Note:" not in md
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
    # The card reads only the typed manifest and the pictures, so memory and disk give
    # the same bytes.
    written = write_mold_set(finger, tmp_path)
    back = read_manifest(written.directory)
    names = ("casting-card.md", "casting-card.html")
    pictures = {"A": read_pictures(written.directory)}
    assert len(pictures["A"]) == 2
    assert card_files([back], "seedling-finger A", pictures=pictures) == {
        n: (written.directory / n).read_bytes() for n in names}


def test_a_family_without_any_casting_plan_has_no_card(finger):
    with pytest.raises(ValueError, match="no casting plan"):
        card_blocks([replace(finger.manifest(), casting=None)], "none")


# ISO 4762 socket head cap screw lengths (from memory), written out here independently of
# the module; ISO 4032 nut height M4 3.2 mm (casting-facts), ISO 7089 washer M4 0.8 mm
# (from memory), ISO 261 coarse pitch M4 0.7 mm; two pitches past the nut (common practice).
_SERIES = (6, 8, 10, 12, 16, 20, 25, 30, 35, 40)


def test_card_names_the_clamp_screws_counted_and_sized_from_the_manifest(finger):
    man = finger.manifest()
    md = finger.files()["casting-card.md"].decode()
    assert man.clamp.bolt == "M4"
    count = len(man.clamp.holes_uv_mm)
    # z is up for the finger: the stack runs from the lower shell's bottom to the upper
    # shell's top
    lower, upper = man.part("shell-lower"), man.part("shell-upper")
    stack = upper.bbox_mm[1][2] - lower.bbox_mm[0][2]
    assert stack == pytest.approx(24.0)   # the 14 mm bar plus a 5 mm mold wall each side
    needed = stack + 2 * 0.8 + 3.2 + 2 * 0.7
    length = min(n for n in _SERIES if n >= needed)
    assert (count, length) == (6, 35)
    assert f"{count} M4 x {length} socket head cap screws (ISO 4762)" in md
    assert f"{count} nuts" in md and f"{2 * count} washers" in md
    assert f"stack {stack:g} mm" in md and f"{needed:.1f} mm long" in md


def test_card_says_which_face_of_each_part_goes_on_the_bed_and_its_text(finger):
    man = finger.manifest()
    md = finger.files()["casting-card.md"].decode()
    rows = {r.split(" | ")[1]: r.split(" | ") for r in md.splitlines()
            if r.startswith("| A | ")}
    for name, rec in man.prints.items():
        axis = "xyz"[max(range(3), key=lambda i: abs(rec.down[i]))]
        sign = "+" if rec.down["xyz".index(axis)] > 0 else "-"
        assert f"{sign}{axis}" in rows[name][2], (name, rows[name])
    # both shells lie on their outer back face: the face put down is along their pull
    assert man.prints["shell-lower"].down == man.part("shell-lower").pull_dir
    assert rows["shell-lower"][2].startswith("back face (-z) down")
    assert rows["shell-upper"][2].startswith("back face (+z) down")
    for lab in man.labels:
        assert rows[lab.part][3] == f"{lab.text} (5 mm letters, 0.6 mm deep)"
    assert {lab.text for lab in man.labels} == {"SF A"}   # initials of seedling-finger


def test_card_names_the_tube_that_fits_the_socket(finger):
    md = finger.files()["casting-card.md"].decode()
    r = finger.recipe.inlet
    assert f"Tube: {r.socket_diameter_mm:g} mm outer diameter" in md
    assert f"pushed {r.socket_depth_mm:g} mm in" in md


def test_card_gives_the_degassing_vacuum_in_kpa_too(finger):
    md = finger.files()["casting-card.md"].decode()
    # 1 inHg = 3.386389 kPa (NIST SP 811): 29 inHg = 98.2 kPa
    assert "29 inHg, that is 98 kPa" in md


def test_card_says_what_to_do_about_each_finding_it_lists(finger):
    from soft_molds.analysis.findings import Severity, finding
    from soft_molds.export.advice import ADVICE

    man = finger.manifest()
    warn = finding("pressure", Severity.WARNING, "cast", "top wall balloons at 50 kPa")
    md = "\n".join(str(b) for b in card_blocks([replace(man, checks=(warn,))], "w"))
    assert "What to do about these findings" in md
    assert ADVICE["pressure"] in md


def test_a_stack_past_a_series_length_takes_the_next_and_past_the_series_a_rod():
    from soft_molds.export.fasteners import screw_length_needed_mm, series_length_mm

    # twin-row-finger's 36 mm stack with M4: 36 + 1.6 + 3.2 + 1.4 = 42.2 mm -> 45 mm
    assert screw_length_needed_mm("M4", 36.0) == pytest.approx(42.2)
    assert series_length_mm(42.2) == 45
    assert series_length_mm(40.0) == 40     # an exact length needs no rounding
    assert series_length_mm(100.5) is None  # beyond the series: threaded rod


def test_bed_face_words_a_shell_on_its_parting_face_or_side_and_a_turn(finger):
    from soft_molds.export.card import bed_face

    man = finger.manifest()
    rec = man.prints["shell-upper"]     # pulls along +z

    def on(down, turn=0.0):
        return bed_face(replace(man, prints={**man.prints, "shell-upper": replace(
            rec, down=down, turn_deg=turn)}), "shell-upper")

    assert on((0.0, 0.0, 1.0)) == "back face (+z) down, parting face up"
    assert on((0.0, 0.0, -1.0)) == "parting face (-z) down"
    assert on((0.0, 1.0, 0.0), 90.0) == "+y side down, turned 90 deg on the bed to fit"


def test_a_family_says_a_shared_line_once_and_labels_lines_that_differ(finger):
    from soft_molds.export.manifest import RecipeEcho

    a = finger.manifest()
    inlet = {**a.params.data["inlet"], "socket_diameter_mm": 5.0}
    b = replace(a, label="B", params=RecipeEcho({**a.params.data, "inlet": inlet}))
    items = next(blk[1] for blk in card_blocks([a, b], "pair")
                 if blk[0] == "ul" and any(t.startswith(("Clamp", "A: Clamp")) for t in blk[1]))
    assert sum(t.startswith("Clamp screws: 6 M4 x 35") for t in items) == 1  # both alike
    assert "A: Tube: 4 mm outer diameter" in " ".join(items)
    assert "B: Tube: 5 mm outer diameter" in " ".join(items)


def test_a_magnet_held_core_lists_its_magnets_the_poles_and_the_cautions(finger):
    # The dissolved tray-lift pad's core is held by a 2 x 1 mm disc pair (one core: two
    # magnets); the finger's by its print alone: no magnet line, no magnet caution.
    from conftest import built_variant

    pad = built_variant("tray-lift-pad", "A").manifest()
    assert pad.params.core_magnets_mm == (2.0, 1.0)
    blocks = card_blocks([pad], "pad")
    have = next(b[1] for i, b in enumerate(blocks) if blocks[i - 1] == ("h2", "Have at hand"))
    (line,) = [x for x in have if x.startswith("Disc magnets")]
    assert "Disc magnets: 2 (2 mm across x 1 mm thick)" in line
    assert "attracts" in line and "north face of one towards the south face" in line
    cautions = blocks[-1][1]
    (caution,) = [c for c in cautions if "magnet" in c]
    assert "swallowing hazard" in caution and "children" in caution
    assert "data sheet" in caution
    plain = card_blocks([finger.manifest()], "finger")
    assert not any("magnet" in str(b).lower() for b in plain)
