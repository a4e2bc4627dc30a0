"""The recipe's settings blocks (everything but the body and void kinds)."""

from __future__ import annotations

from ..constants import CORE_DENSITY_G_CM3
from .fields import Field, choice, integer, number, pair, text
from .materials import DENSITY_G_CM3, ELONGATION_PCT, GRADE_NAMES, MODULUS_MPA, SHORE

TOP_FIELDS: tuple[Field, ...] = (
    text("name", "recipe name: lower case letters, digits, - and _ (the output folder); "
         "default: the file name", None),
    text("label", "variant label stamped into the output path", "A"),
    text("description", "free text for people", ""),
)

INLET_FIELDS: tuple[Field, ...] = (
    number("socket_diameter_mm", "diameter of the tube socket left in the cast", 4.0, hi=30.0),
    number("socket_depth_mm", "depth of the tube socket into the body from its face", 6.0,
           hi=50.0),
    pair("center_mm", "(y, z) of the socket on its face; default (one inlet only): where "
         "the first void meets the x = 0 face", None),
    choice("face", "the end face the socket enters: start (x = 0, the socket runs along "
           "+x) or end (x = the body's length, along -x); the core of the voids it feeds "
           "is pulled out through it", ("start", "end"), "start"),
)

#: Most inlets a recipe may list (one core each).
MAX_INLETS = 4

#: Blocks written as a list of mappings: name -> (fields of each item, most items).
LIST_BLOCKS: dict[str, tuple[tuple[Field, ...], int]] = {
    "inlets": (INLET_FIELDS, MAX_INLETS),
}

PARTING_FIELDS: tuple[Field, ...] = (
    choice("axis", "normal of the parting plane (up in pour orientation); `auto` lets the "
           "analysis choose the plane with the least locked undercut, then the most draft; "
           "default: the body's thinner cross direction (z on a tie)", ("y", "z", "auto"),
           None),
    number("offset_mm", "position of the parting plane along its axis; default: through the "
           "tube socket's axis (the body's mid-plane when the voids are centred); not "
           "allowed with axis auto", None,
           lo=-500.0, hi=500.0, lo_open=False),
)

MOLD_FIELDS: tuple[Field, ...] = (
    number("wall_mm", "mold material around the cavity on every side", 5.0, lo=4.0, hi=50.0,
           lo_open=False),
    number("flange_mm", "extra band around the cavity in the parting plane for keys and "
           "clamp holes", 12.0, lo=10.0, hi=60.0, lo_open=False),
    number("clearance_mm", "per-side gap of printed fits (common practice 0.2-0.5)", 0.3,
           lo=0.1, hi=1.0, lo_open=False),
    choice("clamp_bolt", "bolt for the clamp holes (ISO 273 medium clearance) or none",
           ("M3", "M4", "M5", "none"), "M4"),
    number("sprue_diameter_mm", "pour sprue diameter where it meets the cavity", 6.0,
           lo=3.0, hi=15.0, lo_open=False),
    number("funnel_diameter_mm", "pour funnel diameter at the top face", 14.0, lo=6.0,
           hi=40.0, lo_open=False),
    number("vent_diameter_mm", "vent diameter", 2.0, lo=1.0, hi=5.0, lo_open=False),
    number("key_diameter_mm", "registration key base diameter", 6.0, lo=3.0, hi=15.0,
           lo_open=False),
    number("key_height_mm", "registration key height above the parting plane", 3.0, lo=1.5,
           hi=10.0, lo_open=False),
    number("core_handle_mm", "length of core print standing out of the mold", 10.0, lo=3.0,
           hi=60.0, lo_open=False),
)

CHECKS_FIELDS: tuple[Field, ...] = (
    number("min_wall_mm", "thinnest silicone wall accepted (common practice ~1 mm for small "
           "actuators)", 1.0, lo=0.3, hi=20.0, lo_open=False),
    number("min_draft_deg", "draft below which a wall is reported (common practice 0.5-2 "
           "deg for rigid molds)", 0.5, unit="deg", lo=0.0, hi=10.0, lo_open=False),
    number("core_safety_factor", "safety factor on the silicone's elongation at break when "
           "the core is pulled out through the inlet", 2.0, unit="", lo=1.0, hi=10.0,
           lo_open=False),
    number("core_slenderness_max", "longest unsupported span of the core over its narrowest "
           "width (a span ends at the inlet face, at any section 1.5 x as wide, e.g. a "
           "chamber, or at the far end) above which it is reported as likely to bend or "
           "break (rule of thumb, from memory)",
           15.0, unit="", lo=2.0, hi=200.0, lo_open=False),
)

MATERIAL_FIELDS: tuple[Field, ...] = (
    text("grade", "silicone grade from the shipped table (" + ", ".join(GRADE_NAMES)
         + "; typical values, from memory) or from table_file", "A10"),
    text("table_file", "a YAML file of your own grades in the shipped table's format "
         "(relative to the recipe); adds to and overrides the shipped grades", None),
    number("shore_a", "measured Shore A hardness of your batch; default: the grade's",
           None, unit="", lo=SHORE[0], hi=SHORE[1]),
    number("youngs_modulus_mpa", "measured Young's modulus; default: from Shore A by "
           "Gent's relation", None, unit="MPa", lo=MODULUS_MPA[0], hi=MODULUS_MPA[1]),
    number("density_g_cm3", "measured density of the mixed silicone; default: the grade's",
           None, unit="g/cm3", lo=DENSITY_G_CM3[0], hi=DENSITY_G_CM3[1]),
    number("elongation_pct", "elongation at break of your silicone, measured or from its "
           "data sheet; default: the grade's", None, unit="%", lo=ELONGATION_PCT[0],
           hi=ELONGATION_PCT[1]),
    text("blend_with", "a second grade of the same cure to mix with grade (needs "
         "target_shore_a)", None),
    number("target_shore_a", "Shore A the blend of grade and blend_with should land on "
           "(mixed by modulus via Gent's relation; an approximation)", None, unit="",
           lo=SHORE[0], hi=SHORE[1]),
)

INFLATE_FIELDS: tuple[Field, ...] = (
    number("working_pressure_kpa", "gauge pressure you mean to inflate to (typical soft "
           "bending actuators: about 70-140 kPa, 10-20 psi; common practice)", None,
           unit="kPa", lo=0.0, hi=2000.0),
    number("working_pressure_psi", "the same in psi (give one of the two)", None, unit="psi",
           lo=0.0, hi=300.0),
)

CASTING_FIELDS: tuple[Field, ...] = (
    number("waste_pct", "silicone mixed beyond what the mold holds (cup, stirrer, spills)",
           15.0, unit="%", lo=0.0, hi=200.0, lo_open=False),
    number("scale_resolution_g", "resolution of the scale used to weigh parts A and B "
           "(weights are rounded up to it)", 0.1, unit="g", lo=0.001, hi=10.0),
    number("infill_pct", "infill of the printed mold parts, for the print estimate", 20.0,
           unit="%", lo=0.0, hi=100.0, lo_open=False),
    number("filament_density_g_cm3", "density of the filament, for the print estimate "
           "(about 1.24 for PLA, from memory)", 1.24, unit="g/cm3", lo=0.5, hi=3.0),
)

LABEL_FIELDS: tuple[Field, ...] = (
    choice("mode", "cut the variant label into every printed part (deboss) or not",
           ("deboss", "none"), "deboss"),
    text("tag", "short recipe tag cut before the variant label (A-Z, 0-9, '-', '.'); "
         "default: the initials of the recipe name", None),
    number("height_mm", "capital height of the label glyphs (shrunk to fit a low face)",
           5.0, lo=3.0, hi=20.0, lo_open=False),
    number("depth_mm", "how deep the glyphs are cut", 0.6, lo=0.3, hi=3.0, lo_open=False),
    number("stroke_mm", "glyph stroke width (at least two nozzle widths prints cleanly)", 1.0,
           lo=0.5, hi=3.0, lo_open=False),
)

PRINTER_FIELDS: tuple[Field, ...] = (
    pair("bed_mm", "printable area of the bed (x, y)", (220.0, 220.0), lo=10.0, hi=2000.0),
    number("height_mm", "largest printable height", 250.0, lo=10.0, hi=2000.0),
    number("nozzle_mm", "nozzle (extrusion width) used for mold walls", 0.4, lo=0.1, hi=2.0),
    integer("perimeters", "perimeters a mold wall must hold (common practice: 4 for "
            "watertight FDM walls)", 4, lo=1, hi=20),
    number("overhang_deg", "steepest printable overhang, from vertical (common practice "
           "45)", 45.0, unit="deg", lo=10.0, hi=80.0),
)

MESH_FIELDS: tuple[Field, ...] = (
    number("chord_mm", "largest facet-to-surface distance", 0.02, lo=0.002, hi=0.5,
           lo_open=False),
    number("angle_deg", "largest angle between neighbouring facets on a curve", 12.0,
           unit="deg", lo=1.0, hi=30.0, lo_open=False),
)

PROCESS_FIELDS: tuple[Field, ...] = (
    choice("kind", "how the actuator is cast: one-shot (one pour into a two-part shell "
           "around a pull-out core) or layered (a chambered layer poured in an open tray "
           "around posts, then pressed face down onto a liquid base layer) or overmold (a "
           "round or half-round bladder with helical thread guides cast around a rod core, "
           "wound with thread, then a skin cast over it on the same core)",
           ("one-shot", "layered", "overmold"), "one-shot"),
    number("draft_deg", "draft on the posts of the layered first step (1 deg or more "
           "releases cleanly from a printed post; common practice)", 1.0, unit="deg",
           lo=0.5, hi=10.0, lo_open=False),
    number("base_mm", "thickness of the base layer poured in the layered second step; the "
           "bond face lies this far above the body's bottom", 4.0, lo=1.0, hi=50.0,
           lo_open=False),
    number("cover_margin_mm", "how far the strain-limiting sheet stays inside the "
           "footprint (layered) or the bladder's flat face (half-round overmold), so "
           "silicone covers its edge", 2.0, lo=0.0, hi=20.0,
           lo_open=False),
    choice("sheet", "strain-limiting sheet laid on the liquid base layer (layered) or on "
           "the wound bladder's flat face before the skin is cast (half-round overmold)",
           ("paper", "fabric", "none"), "paper"),
    number("skin_mm", "thickness of the skin cast over the wound bladder, over the guide "
           "ridges and beyond the far end (overmold)", 1.5, lo=0.3, hi=20.0, lo_open=False),
    choice("guides", "helical thread guides on the bladder: none, single (one helix) or "
           "double (two opposite-handed helices, each ridge gapped where the other crosses "
           "it) (overmold)", ("none", "single", "double"), "double"),
    number("guide_pitch_mm", "axial advance of each guide helix per turn (overmold)", 6.0,
           lo=1.0, hi=100.0, lo_open=False),
    number("guide_height_mm", "how far the guide ridges stand out of the bladder (overmold)",
           0.8, lo=0.2, hi=5.0, lo_open=False),
    number("guide_width_mm", "axial width of a guide ridge (overmold)", 1.2, lo=0.2,
           hi=10.0, lo_open=False),
    number("thread_diameter_mm", "diameter of the thread wound along the guides; the skin "
           "covers it too (overmold)", 0.5, lo=0.05, hi=3.0, lo_open=False),
    choice("bladder", "section of the overmolded bladder: round (the rod and its bore) or "
           "half-round (the rod's half above its axis, flat face down, around the bore's "
           "part above a flat wall as thick as the curved one; it bends towards the flat "
           "face) (overmold)",
           ("round", "half-round"), "round"),
)

CORE_FIELDS: tuple[Field, ...] = (
    choice("kind", "what becomes of the core after the cure: pulled (drawn out through its "
           "tube socket), dissolved (printed in a water-soluble filament and dissolved "
           "out through the socket, for voids too wide to pull through it) or melted (cast "
           "in core.material in a core mold made as a first step, then melted out through "
           "the socket)", ("pulled", "dissolved", "melted"), "pulled"),
    choice("material", "what a melted core is cast in: wax (paraffin-type casting wax) or "
           "low-melt-alloy (a bismuth-based alloy melting below boiling water); read only "
           "with kind melted", tuple(CORE_DENSITY_G_CM3), "wax"),
    choice("support", "what holds the core in the closed mold: prints (its core print, "
           "seated in both shells), magnets (a disc magnet pressed into the underside of "
           "the print's key and one into the lower shell's seat below it, attracting) or "
           "both (the print and the magnet pair counted as two supports); magnets need a "
           "printed core print (one-shot process, core pulled or dissolved)",
           ("prints", "magnets", "both"), "prints"),
    number("magnet_diameter_mm", "diameter of each disc magnet (read only with support "
           "magnets or both)", 2.0, lo=0.5, hi=50.0),
    number("magnet_thickness_mm", "thickness of each disc magnet (read only with support "
           "magnets or both)", 1.0, lo=0.3, hi=20.0),
    number("press_fit_mm", "pocket diameter minus magnet diameter: negative presses the "
           "magnet in (-0.1 mm is a usual press fit on a printed hole, common practice), "
           "positive leaves it loose for glue", -0.1, lo=-0.5, hi=0.5, lo_open=False),
)

BLOCKS: dict[str, tuple[Field, ...]] = {
    "inlet": INLET_FIELDS,
    "parting": PARTING_FIELDS,
    "mold": MOLD_FIELDS,
    "checks": CHECKS_FIELDS,
    "material": MATERIAL_FIELDS,
    "inflate": INFLATE_FIELDS,
    "casting": CASTING_FIELDS,
    "marking": LABEL_FIELDS,
    "printer": PRINTER_FIELDS,
    "mesh": MESH_FIELDS,
    "process": PROCESS_FIELDS,
    "core": CORE_FIELDS,
}
