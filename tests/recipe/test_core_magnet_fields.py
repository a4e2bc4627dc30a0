"""The magnet fields of the core block echo (and hash) only when magnets hold the core:
a core held by its print hashes as before the fields existed, whatever sizes it lists.
Reference: the recipe's own echo before these fields, rebuilt here by hand
({"kind": "dissolved"} for the dissolved pad, no core block for a pulled core)."""

from __future__ import annotations

from conftest import recipe_path
from recipe_text import edit

from soft_molds.recipe import recipe_from_text

PAD = recipe_path("tray-lift-pad").read_text()
LINES = ("  support: magnets           # a disc magnet pair holds the print's key in its seat\n"
         "  magnet_diameter_mm: 2      # 2 x 1 mm discs: the 6 mm key keeps a printed wall "
         "round one\n  magnet_thickness_mm: 1\n")


def load(text: str):
    return recipe_from_text(text, "pad.yaml", "pad")


def test_a_core_held_by_its_print_echoes_and_hashes_as_before_the_magnet_fields():
    plain = load(edit(PAD, LINES, ""))
    assert plain.params()["core"] == {"kind": "dissolved"}
    sized = load(edit(PAD, LINES, "  support: prints\n  magnet_diameter_mm: 3\n"))
    assert sized.params() == plain.params()
    assert sized.params_sha256() == plain.params_sha256()


def test_magnets_echo_their_sizes_and_fit_and_change_the_hash():
    r = load(PAD)
    assert r.params()["core"] == {"kind": "dissolved", "support": "magnets",
                                  "magnet_diameter_mm": 2.0, "magnet_thickness_mm": 1.0,
                                  "press_fit_mm": -0.1}
    assert r.params_sha256() != load(edit(PAD, LINES, "")).params_sha256()


def test_magnets_on_a_pulled_core_bring_its_core_block_into_the_echo():
    pulled = edit(edit(PAD, LINES, "  support: both\n"), "kind: dissolved ", "kind: pulled ")
    core = load(pulled).params()["core"]
    assert core["kind"] == "pulled" and core["support"] == "both"
    assert "core" not in load(edit(pulled, "  support: both\n", "")).params()
