"""Tests for recipe validation: defaults, the parameter hash, problem reporting and the
geometric sanity checks, all without the CAD kernel.

Outside references: elementary geometry (walls worked out by hand below), ISO 273
(clearance holes), the YAML 1.1 type repository (yaml.org/type/*.html), and common
practice of casting (values from /work/shared/reference/casting-facts.md).
"""

from __future__ import annotations

import dataclasses
import re
import subprocess
import sys
from pathlib import Path

import pytest
from recipe_text import FINGER_TEXT, edit, line_of, planned_from_text

from soft_molds.errors import RecipeError
from soft_molds.recipe import load_recipe, recipe_from_text
from soft_molds.recipe.schema import MESH_FIELDS

ROOT = Path(__file__).resolve().parents[2]
RECIPES = ROOT / "recipes"
BUNDLED = sorted(p.stem for p in RECIPES.glob("*.yaml"))

# Demo recipe from our own scenario (tests/data/finger-test.yaml): bar x in [0, 70],
# y in [-8, 8], z in [-7, 7], edges rounded 2 mm; chambers centred on the axis, 12 mm along
# y and 8 mm along z, so side walls are 2 mm and top/bottom walls 3 mm.
FINGER = FINGER_TEXT






def problems_of(text: str) -> list:
    with pytest.raises(RecipeError) as exc:
        planned_from_text(text, "t.yaml")
    return list(exc.value.problems)


def only_problem(text: str):
    found = problems_of(text)
    assert len(found) == 1, [p.format() for p in found]
    return found[0]


def wall_in(message: str) -> float:
    m = re.search(r"leaves a silicone wall of (\d+\.\d\d) mm", message)
    assert m, message
    return float(m.group(1))


def point_in(message: str) -> tuple[float, float, float]:
    m = re.search(r"at \((-?[\d.]+), (-?[\d.]+), (-?[\d.]+)\) mm", message)
    assert m, message
    return float(m.group(1)), float(m.group(2)), float(m.group(3))


# --- bundled recipes and defaults ---------------------------------------------------


KERNEL_FREE_SCRIPT = """\
import sys, pathlib
from soft_molds.recipe import load_recipe
paths = sorted(pathlib.Path(sys.argv[1]).glob("*.yaml"))
names = [load_recipe(p).name for p in paths]
print(len(names), "cadquery" in sys.modules, "OCP" in sys.modules)
"""


@pytest.fixture(scope="module", autouse=True)
def kernel_free_run():
    """A fresh interpreter loading every bundled recipe (in a full test run other layers
    have imported cadquery already). Started with the module's first test so its import
    time overlaps the in-process tests; read by the last test of the module."""
    proc = subprocess.Popen([sys.executable, "-c", KERNEL_FREE_SCRIPT, str(RECIPES)],
                            cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            text=True)
    yield proc
    if proc.poll() is None:
        proc.kill()
        proc.communicate()


@pytest.mark.parametrize("name", BUNDLED)
def test_every_bundled_recipe_loads_into_frozen_values(name):
    r = load_recipe(RECIPES / f"{name}.yaml")
    assert r.name == name  # each bundled recipe names its own output folder
    assert r.source.endswith(f"{name}.yaml")
    # A cavity: a listed void, or an open groove cut from the outside (closed by a collar).
    assert len(r.voids) >= 1 or r.groove() is not None
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.mold.wall_mm = 1.0  # type: ignore[misc]


def test_omitted_settings_get_documented_defaults():
    # stem-cushion writes only clamp_bolt in mold and nothing in checks, parting or mesh.
    r = load_recipe(RECIPES / "stem-cushion.yaml")
    # common practice: FDM fit clearance 0.2-0.5 mm per side; the default sits inside it.
    assert r.mold.clearance_mm == 0.3
    assert 0.2 <= r.mold.clearance_mm <= 0.5
    # common practice (from memory for the figure): ~1 mm silicone walls in small actuators.
    assert r.checks.min_wall_mm == 1.0
    assert r.label == "A"
    # The bar is 24 wide (y) and 12 high (z): the parting normal is the thinner direction,
    # and it passes through the socket axis, which defaults to the bore axis (0, 0).
    assert r.parting.axis == "z"
    assert r.parting.offset_mm == 0.0
    assert r.inlet.center_mm == (0.0, 0.0)
    assert r.voids[0].start_mm == 0.0


@pytest.mark.parametrize("bolt, hole", [("M3", 3.4), ("M4", 4.5), ("M5", 5.5)])
def test_clamp_holes_follow_iso_273_medium_series(bolt, hole):
    # ISO 273 clearance holes, fine / medium / coarse: M3 3.2/3.4/3.6, M4 4.3/4.5/4.8,
    # M5 5.3/5.5/5.8 mm. The medium series is the one for bolts through two printed parts.
    text = edit(FINGER, "clamp_bolt: M4", f"clamp_bolt: {bolt}")
    assert recipe_from_text(text).mold.clamp_hole_mm == hole


def test_no_clamp_bolt_means_no_clamp_hole():
    text = edit(FINGER, "clamp_bolt: M4", "clamp_bolt: none")
    assert recipe_from_text(text).mold.clamp_hole_mm is None


def test_bundled_clamp_bolts_get_iso_273_medium_holes():
    # ISO 273 medium series, as above.
    holes = {n: load_recipe(RECIPES / f"{n}.yaml").mold.clamp_hole_mm for n in BUNDLED}
    assert holes["stem-cushion"] == 3.4  # M3
    assert holes["seedling-finger"] == 4.5  # M4
    assert holes["tray-pusher"] == 4.5  # M4
    assert holes["wrist-twister"] == 5.5  # M5


def test_name_defaults_to_the_file_stem(tmp_path):
    path = tmp_path / "Spare Finger.yaml"
    path.write_text(edit(FINGER, "name: finger-test\n", ""))
    assert load_recipe(path).name == "spare-finger"


# --- parameter hash -------------------------------------------------------------------


def test_params_hash_is_stable_for_the_same_file(tmp_path):
    path = tmp_path / "finger.yaml"
    path.write_text(FINGER)
    first, second = load_recipe(path).params_sha256(), load_recipe(path).params_sha256()
    assert first == second
    assert re.fullmatch(r"[0-9a-f]{64}", first)  # FIPS 180-4 SHA-256: 256 bits, 64 hex digits
    assert recipe_from_text(FINGER, "elsewhere").params_sha256() == first


@pytest.mark.parametrize("old, new", [
    ("  length_mm: 70", "  length_mm: 71"),
    ("    count: 3", "    count: 2"),
    ("  wall_mm: 5", "  wall_mm: 6"),
    ("clamp_bolt: M4", "clamp_bolt: M5"),
    ("  min_wall_mm: 1.0", "  min_wall_mm: 1.2"),
])
def test_params_hash_changes_when_one_value_changes(old, new):
    assert (recipe_from_text(edit(FINGER, old, new)).params_sha256()
            != recipe_from_text(FINGER).params_sha256())


def test_writing_defaults_explicitly_gives_the_same_hash():
    bare = edit(FINGER, "  min_wall_mm: 1.0\n", "  min_wall_mm: 1\n")
    explicit = edit(bare, "  clamp_bolt: M4\n",
                    "  clamp_bolt: M4\n  clearance_mm: 0.3\n  flange_mm: 12\n")
    explicit = edit(explicit, "  socket_depth_mm: 6\n",
                    "  socket_depth_mm: 6\n  center_mm: [0, 0]\n")
    # Mesh defaults are the geometry stage's to tune; write whatever the schema declares.
    explicit += "mesh:\n" + "".join(f"  {f.name}: {f.default!r}\n" for f in MESH_FIELDS)
    explicit += "label: A\n"
    omitted = edit(FINGER, "checks:\n  min_wall_mm: 1.0\n", "")
    omitted = edit(omitted, "parting:\n  axis: z\n  offset_mm: 0\n", "")
    assert recipe_from_text(explicit).params_sha256() == recipe_from_text(omitted).params_sha256()


def test_negative_zero_hashes_like_zero():
    # IEEE 754: -0.0 == 0.0; the same geometry must not get a second hash.
    neg = edit(FINGER, "center_mm: [0, 0]", "center_mm: [-0.0, 0]")
    assert recipe_from_text(neg).params_sha256() == recipe_from_text(FINGER).params_sha256()


def test_description_does_not_shape_the_output_hash():
    told = FINGER + "description: pad for 72-cell trays\n"
    assert recipe_from_text(told).params_sha256() == recipe_from_text(FINGER).params_sha256()


# --- problem reporting ----------------------------------------------------------------


def test_three_independent_mistakes_are_reported_together_with_paths_and_lines():
    text = edit(FINGER, "  length_mm: 70", "  length_mm: seventy")
    text = edit(text, "  - kind: chambers", "  - kind: chamber")
    text = edit(text, "  wall_mm: 5", "  wal_mm: 5")
    found = [(p.path, p.line) for p in problems_of(text)]
    assert found == [
        ("body.length_mm", line_of(text, "length_mm: seventy")),
        ("voids[0].kind", line_of(text, "kind: chamber")),
        ("mold.wal_mm", line_of(text, "wal_mm")),
    ]


def test_unknown_key_suggests_the_nearest_valid_key():
    p = only_problem(edit(FINGER, "  wall_mm: 5", "  wal_mm: 5"))
    assert p.path == "mold.wal_mm"
    assert "did you mean 'wall_mm'?" in p.message
    assert "wall_mm" in p.allowed.split(", ")


@pytest.mark.parametrize("where, old, new, hint", [
    ("voids[0].kind", "  - kind: chambers", "  - kind: chamber", "chambers"),
    ("body.kind", "  kind: bar", "  kind: bars", "bar"),
])
def test_unknown_kind_suggests_the_nearest_kind(where, old, new, hint):
    p = only_problem(edit(FINGER, old, new))
    assert p.path == where
    assert f"did you mean '{hint}'?" in p.message
    assert p.value == new.split(": ")[1]


def test_missing_required_field_points_at_its_block():
    text = edit(FINGER, "  width_mm: 16\n", "")
    p = only_problem(text)
    assert (p.path, p.message, p.line) == ("body.width_mm", "is required", line_of(text, "body:"))


@pytest.mark.parametrize("literal, message", [
    ("yes", "must be a number"),  # YAML 1.1 bool (yaml.org/type/bool.html): yes is true
    ("off", "must be a number"),  # YAML 1.1 bool
    (".nan", "must be a finite number"),  # YAML 1.1 float (yaml.org/type/float.html)
    (".inf", "must be a finite number"),  # YAML 1.1 float
    ("1000000000.0", "is out of range"),  # absurd size; fields stop at 1000 mm
    ("1" + "0" * 400, "is out of range"),  # a YAML int far beyond any float
    ("-70", "is out of range"),
    ("0", "is out of range"),  # a size must be strictly positive
    ("[70]", "must be a number"),
], ids=["yes", "off", "nan", "inf", "1e9", "400-digit-int", "negative", "zero", "list"])
def test_bad_number_is_refused_with_the_value_found(literal, message):
    text = edit(FINGER, "  length_mm: 70", f"  length_mm: {literal}")
    p = only_problem(text)
    assert (p.path, p.line, p.message) == ("body.length_mm", line_of(text, "length_mm"), message)
    assert p.allowed == "a number, 0.05 <= value <= 1000 mm"


def test_whole_number_field_accepts_integral_float_only():
    assert recipe_from_text(edit(FINGER, "count: 3", "count: 3.0")).voids[0].count == 3
    p = only_problem(edit(FINGER, "count: 3", "count: 2.5"))
    assert (p.path, p.message, p.value) == ("voids[0].count", "must be a whole number", 2.5)


def test_cross_field_problem_points_at_the_fields_own_line():
    text = edit(FINGER, "  edge_radius_mm: 2", "  edge_radius_mm: 7")
    p = only_problem(text)
    # 0.45 x the smallest side (14 mm) = 6.3 mm
    assert (p.path, p.line) == ("body.edge_radius_mm", line_of(text, "edge_radius_mm"))
    assert p.allowed.startswith("at most 6.3 mm")


def test_list_where_a_mapping_belongs_is_refused():
    text = edit(FINGER, "mold:\n  wall_mm: 5\n  clamp_bolt: M4\n", "mold: [5, M4]\n")
    p = only_problem(text)
    assert (p.path, p.line, p.value) == ("mold", line_of(text, "mold:"), [5, "M4"])


# --- geometric sanity (numbers worked out by hand) ------------------------------------

# Rod of diameter D = 14 with flat ends (end_round_mm 0), length 60; a bore of diameter d
# centred on its axis, 50 long, fed by a socket of the same diameter.
ROD = """\
name: pusher-test
body: {{kind: rod, diameter_mm: 14, length_mm: 60, end_round_mm: 0}}
voids:
  - {{kind: bore, diameter_mm: {d}, length_mm: {length}}}
inlet:
  socket_diameter_mm: {d}
  socket_depth_mm: 6
"""


def test_bore_in_rod_just_thicker_than_min_wall_passes():
    # elementary geometry: wall = (D - d)/2 = (14 - 11.96)/2 = 1.02 mm >= 1.0 mm; the
    # socket rim (as wide as the bore) leaves the same 1.02 mm on the flat rod end.
    r = recipe_from_text(ROD.format(d=11.96, length=50))
    assert r.checks.min_wall_mm == 1.0
    assert r.inlet.center_mm == (0.0, 0.0)


def test_bore_in_rod_just_thinner_than_min_wall_is_refused_with_its_wall():
    # elementary geometry: wall = (14 - 12.04)/2 = 0.98 mm < checks.min_wall_mm = 1.0 mm.
    found = problems_of(ROD.format(d=12.04, length=50))
    by_path = {p.path: p for p in found}
    bore = by_path["voids[0]"]
    assert wall_in(bore.message) == pytest.approx(0.98, abs=0.005)
    _, y, z = point_in(bore.message)
    assert (y * y + z * z) ** 0.5 == pytest.approx(12.04 / 2, abs=0.01)  # on the bore's side
    # The socket is as wide as the bore, so its rim on the x = 0 face and its side wall
    # along its depth are as thin (the same (D - d)/2); nothing else is wrong.
    assert set(by_path) == {"voids[0]", "inlet.center_mm", "inlet"}
    assert wall_in(by_path["inlet"].message) == pytest.approx(0.98, abs=0.005)
    assert len(found) == 3


@pytest.mark.parametrize("length, wall", [(58.98, 1.02), (59.02, 0.98)])
def test_bore_end_wall_is_rod_length_minus_bore_length(length, wall):
    # elementary geometry: flat rod end at x = 60, bore end at x = length: wall = 60 - length
    text = ROD.format(d=6, length=length)
    if wall >= 1.0:
        recipe_from_text(text)
        return
    p = only_problem(text)
    assert p.path == "voids[0]"
    assert wall_in(p.message) == pytest.approx(wall, abs=0.005)
    assert point_in(p.message)[0] == pytest.approx(length, abs=0.01)


@pytest.mark.parametrize("width, wall", [(13.96, 1.02), (14.04, 0.98)])
def test_chamber_side_wall_is_half_the_width_difference(width, wall):
    # elementary geometry: chambers centred in a 16 mm wide bar leave (16 - w)/2 on each
    # side; with chamber height 6 (z in [-3, 3]) the walls meet the bar's flat sides, not
    # its 2 mm edge rounding (flat for |z| <= 7 - 2 = 5).
    text = edit(FINGER, "    width_mm: 12", f"    width_mm: {width}")
    text = edit(text, "    height_mm: 8", "    height_mm: 6")
    if wall >= 1.0:
        recipe_from_text(text)
        return
    p = only_problem(text)
    assert (p.path, p.line) == ("voids[0]", line_of(text, "- kind: chambers"))
    assert wall_in(p.message) == pytest.approx(wall, abs=0.005)
    assert abs(point_in(p.message)[1]) == pytest.approx(width / 2, abs=0.01)
    # A side wall (across y) names the keys that set it.
    assert p.allowed == ("at least checks.min_wall_mm = 1 mm (this wall is set by "
                         "voids[0].width_mm, voids[0].center_mm, the body's size, "
                         "checks.min_wall_mm)")


def test_chambers_poking_out_of_the_bar_break_through():
    # elementary geometry: chambers 15 high centred in a 14 high bar reach z = +-7.5,
    # 0.5 mm beyond the top and bottom faces at z = +-7.
    text = edit(FINGER, "    height_mm: 8", "    height_mm: 15")
    p = only_problem(text)
    assert p.path == "voids[0]"
    assert "breaks through the body surface" in p.message
    assert abs(point_in(p.message)[2]) == pytest.approx(7.5, abs=0.01)


def test_chambers_top_wall_just_above_min_wall_passes():
    # elementary geometry: height 11.96 centred in 14 leaves (14 - 11.96)/2 = 1.02 mm
    recipe_from_text(edit(FINGER, "    height_mm: 8", "    height_mm: 11.96"))


def test_more_chambers_than_the_bar_holds_break_through():
    # elementary geometry: 12 chambers at pitch 8, depth 5 span 11*8 + 5 = 93 mm > 70 mm;
    # centred, the row would start at x = (70 - 93)/2 = -11.5, outside the inlet face, so
    # the default starts it past the socket floor and the least wall (6 + 1 = 7 mm) and it
    # ends at 7 + 93 = 100 mm, beyond the far end.
    p = only_problem(edit(FINGER, "count: 3", "count: 12"))
    assert p.path == "voids[0]" and "breaks through" in p.message
    assert point_in(p.message)[0] == pytest.approx(100.0, abs=0.01)


# Bar 40 x 24 x 12 with edge radius e: the flat part of the x = 0 face spans
# |z| <= 12/2 - e. A socket of radius 2 plus a 1 mm wall fits while |cz| + 3 <= 6 - e.
CUSHION = """\
name: cushion-test
body: {{kind: bar, length_mm: 40, width_mm: 24, height_mm: 12, edge_radius_mm: {e}}}
voids:
  - {{kind: bore, diameter_mm: 2, length_mm: 30, center_mm: [0, {cz}]}}
inlet:
  socket_diameter_mm: 4
  center_mm: [0, {cz}]
parting: {{axis: y, offset_mm: 0}}
"""


@pytest.mark.parametrize("e, cz, fits", [
    (2, 0.95, True),   # 0.95 + 2 + 1 = 3.95 <= 6 - 2 = 4
    (2, 1.05, False),  # 4.05 > 4
    (1, 1.95, True),   # 4.95 <= 6 - 1 = 5: a smaller edge radius leaves more flat face
    (1, 2.05, False),  # 5.05 > 5
])
def test_inlet_rim_plus_min_wall_must_stay_on_the_flat_face(e, cz, fits):
    # elementary geometry: flat face half-height = height/2 - edge_radius
    text = CUSHION.format(e=e, cz=cz)
    if fits:
        assert recipe_from_text(text).inlet.center_mm == (0.0, cz)
        return
    p = only_problem(text)
    assert (p.path, p.line) == ("inlet.center_mm", line_of(text, "  center_mm"))
    assert p.value == [0.0, cz]


def test_parting_offset_off_the_inlet_axis_is_refused():
    # The chambers (and so the socket) sit at z = 1; a z parting plane at 0 misses it.
    text = edit(FINGER, "center_mm: [0, 0]", "center_mm: [0, 1]")
    p = only_problem(text)
    assert (p.path, p.line, p.value) == ("parting.offset_mm", line_of(text, "offset_mm"), 0.0)
    assert p.allowed.startswith("1 mm (the socket centre's z)")
    # The same plane is fine once it runs through the socket axis.
    recipe_from_text(edit(text, "offset_mm: 0", "offset_mm: 1"))


@pytest.mark.parametrize("start, reached", [(5.9, True), (6.1, False)])
def test_bore_must_start_inside_the_socket(start, reached):
    # The socket is 6 deep: a bore starting beyond x = 6 leaves a sealed gap.
    text = edit(ROD.format(d=6, length=40), "length_mm: 40}", f"length_mm: 40, start_mm: {start}}}")
    if reached:
        recipe_from_text(text)
        return
    p = only_problem(text)
    assert (p.path, p.message) == ("voids[0]", "is not reached from the inlet socket")
    assert "depth 6 mm" in p.allowed


def test_bore_off_the_socket_axis_is_not_reached():
    # Bore radius 1 at y = 2, socket radius 2 at y = 0: 2 + 1 > 2, so the bore's mouth
    # reaches y = 3, past the socket, and opens onto the bare inlet face.
    text = """\
body: {kind: bar, length_mm: 40, width_mm: 24, height_mm: 12}
voids:
  - {kind: bore, diameter_mm: 2, length_mm: 30, center_mm: [2, 0]}
inlet: {socket_diameter_mm: 4, center_mm: [0, 0]}
"""
    found = problems_of(text)
    assert [p.path for p in found] == ["voids[0]", "voids[0]"]
    assert "breaks through the body surface" in found[0].message
    assert point_in(found[0].message)[0] == pytest.approx(0.0, abs=0.01)  # on x = 0
    assert found[1].message == "is not reached from the inlet socket"


def test_large_parts_are_checked_in_bounded_time_with_exact_flat_walls():
    # Fields allow 1000 mm. A 999 mm chamber in a 1000 mm bar leaves (1000 - 999)/2 = 0.5 mm
    # (elementary geometry); the coarser sampling of large voids still lands on the flat
    # side exactly. Before sampling was bounded this took ~24 million points and ran out of
    # memory.
    text = """\
body: {kind: bar, length_mm: 1000, width_mm: 1000, height_mm: 1000}
voids:
  - {kind: chambers, count: 1, pitch_mm: 901, depth_mm: 900, width_mm: 999, height_mm: 900}
"""
    p = only_problem(text)
    assert wall_in(p.message) == pytest.approx(0.5, abs=0.005)


def test_bundled_recipes_load_without_importing_the_cad_kernel(kernel_free_run):
    stdout, stderr = kernel_free_run.communicate(timeout=60)
    assert kernel_free_run.returncode == 0, stderr
    assert stdout.split() == [str(len(BUNDLED)), "False", "False"]
    assert len(BUNDLED) >= 4


# ------------------------------------------------------------ lengths too small to make

@pytest.mark.parametrize("old, new, path, got, allowed", [
    ("pitch_mm: 8", "pitch_mm: 1.0e-300", "voids[0].pitch_mm", 1e-300,
     "a number, 0.05 <= value <= 1000 mm"),
    ("  width_mm: 16", "  width_mm: 0.049", "body.width_mm", 0.049,
     "a number, 0.05 <= value <= 1000 mm"),
    ("corner_radius_mm: 1", "corner_radius_mm: 0.001", "voids[0].corner_radius_mm", 0.001,
     "a number, 0 or 0.05 <= value <= 1000 mm"),
    ("socket_diameter_mm: 4", "socket_diameter_mm: 1.0e-9", "inlet.socket_diameter_mm",
     1e-9, "a number, 0.05 <= value <= 30 mm"),
], ids=["pitch-1e-300", "width-0.049", "corner-0.001", "socket-1e-9"])
def test_positive_lengths_below_what_can_be_made_are_refused_before_the_kernel(
        old, new, path, got, allowed):
    # 0.05 mm: at or below a printer's resolution and 2.5 x the default mesh chord (see
    # fields.MIN_SIZE_MM); a 1e-300 mm pitch used to reach the kernel as a domain error.
    text = edit(FINGER, old, new)
    p = only_problem(text)
    assert (p.path, p.line, p.message, p.value, p.allowed) == (
        path, line_of(text, new.strip()), "is out of range", got, allowed)


def test_zero_stays_allowed_where_a_length_may_be_zero_and_the_floor_itself_passes():
    r = recipe_from_text(edit(FINGER, "corner_radius_mm: 1", "corner_radius_mm: 0"))
    assert r.voids[0].corner_radius_mm == 0.0
    r = recipe_from_text(edit(FINGER, "corner_radius_mm: 1", "corner_radius_mm: 0.05"))
    assert r.voids[0].corner_radius_mm == 0.05


def test_every_length_field_has_the_absolute_floor():
    from soft_molds.recipe.fields import MIN_SIZE_MM
    from soft_molds.recipe.registry import body_kinds, void_kinds
    from soft_molds.recipe.schema import BLOCKS

    fields = [f for cls in (*body_kinds().values(), *void_kinds().values()) for f in cls.FIELDS]
    # mesh.chord_mm is a tolerance of the mesh, not a length of the part
    fields += [f for name, block in BLOCKS.items() if name != "mesh" for f in block]
    for f in fields:
        if f.kind == "number" and f.unit == "mm" and f.lo is not None and f.lo >= 0.0:
            # a size reaches the floor; a length that may be 0 is 0 or reaches it
            assert f.lo >= MIN_SIZE_MM or f.gap_below == MIN_SIZE_MM, f.name


# --------------------------------------------------------- a recipe written in centimetres

CM_FINGER = """\
# the finger typed in centimetres by mistake
name: finger-cm
body:
  kind: bar
  length_mm: 7
  width_mm: 1.6
  height_mm: 1.4
  edge_radius_mm: 0.2
voids:
  - kind: chambers
    count: 3
    pitch_mm: 0.8
    depth_mm: 0.5
    width_mm: 1.2
    height_mm: 0.8
    corner_radius_mm: 0.1
    center_mm: [0, 0]
    feed_diameter_mm: 0.2
"""


def test_a_body_a_few_millimetres_across_leads_with_one_problem_saying_lengths_are_mm():
    # 1.6 x 1.4 mm cannot hold the default 4 mm socket: the other problems (socket off the
    # face, walls, sprue) all follow from the scale, so they are counted, not listed.
    (p,) = problems_of(CM_FINGER)
    assert (p.path, p.line) == ("body", line_of(CM_FINGER, "body:"))
    assert p.message.startswith("is only 7 x 1.6 x 1.4 mm: every length in a recipe is in "
                                "millimetres (written in centimetres? multiply each length "
                                "by 10); ")
    assert re.search(r"; \d+ follow-on problems of so small a body not listed$", p.message)
    assert p.allowed == ("a body at least 5 mm across (room for a tube socket and its "
                         "silicone walls)")


def test_the_mm_hint_keeps_the_problems_of_fields_the_person_wrote():
    text = CM_FINGER + "mold:\n  wall_mm: 0.5\n"
    found = problems_of(text)
    assert [p.path for p in found] == ["body", "mold.wall_mm"]
    assert found[1].message == "is out of range"


def test_the_same_recipe_times_ten_passes():
    scaled = re.sub(r"(_mm: )([\d.]+)", lambda m: f"{m.group(1)}{float(m.group(2)) * 10:g}",
                    CM_FINGER)
    r = recipe_from_text(scaled)
    assert r.body_bounds() == ((0.0, -8.0, -7.0), (70.0, 8.0, 7.0))


def test_a_small_body_that_passes_gets_no_hint():
    # A 4.8 mm rod (under the 5 mm of the hint) with a 1.2 mm bore, a 1.6 mm socket and
    # 0.8 mm walls is a real, tiny recipe: nothing is wrong, so nothing is said.
    text = ("name: tiny\nbody: {kind: rod, diameter_mm: 4.8, length_mm: 20, end_round_mm: 0.3}\n"
            "voids:\n  - {kind: bore, diameter_mm: 1.2, length_mm: 12}\n"
            "inlet: {socket_diameter_mm: 1.6, socket_depth_mm: 3}\nparting: {axis: z}\n"
            "mold: {sprue_diameter_mm: 3, vent_diameter_mm: 1, key_diameter_mm: 3, "
            "key_height_mm: 1.5, clamp_bolt: M3}\ncheck: {min_wall_mm: 0.8}\n")
    assert recipe_from_text(text.replace("check:", "checks:")).body_bounds() == (
        (0.0, -2.4, -2.4), (20.0, 2.4, 2.4))
    # With a typo it is refused, the hint leading (the body is under 5 mm across).
    assert [p.path for p in problems_of(text)] == ["body", "check"]
