"""The casting card: a printable page per family of variants, in Markdown and as one
self-contained HTML file (no scripts, fonts or pictures fetched from anywhere: the
assembly pictures are embedded as data URIs; the Markdown links the PNG files beside it).

It says what to weigh, how long the mix stays workable and when to demold, the screws and
the tube to have at hand, the steps of a cast, what the checks found and what to do about
each finding, how much pressure each variant's walls are estimated to take, how each part
goes on the print bed and the text cut into it, and the cautions. The card is built once
as a list of blocks and rendered twice, so the two files always say the same thing.
Nothing in it depends on the time or the machine.
"""

from __future__ import annotations

import base64
import html
from collections.abc import Callable, Mapping, Sequence
from typing import Any

from ..analysis.casting import Quantities
from ..analysis.findings import Severity, Verdict
from ..units import inhg_to_kpa, kpa_to_psi, mm3_to_cm3
from .advice import advice_for
from .assembly import Picture
from .fasteners import NUT_MM, WASHER_MM, clamp_screws
from .manifest import CastingRecord, InletRecord, Manifest

CAUTIONS = (
    "Platinum-cure silicone fails to cure (stays tacky) where it touches sulfur or "
    "sulfur-bearing clay, tin-cure silicone or its catalyst, latex gloves, amines or "
    "uncured epoxy, and under-cured photopolymer (resin) prints: wash and fully post-cure "
    "resin prints or seal the mold, and cast a test patch first.",
    "Wear nitrile or vinyl gloves (not latex) and work in a ventilated space; uncured "
    "photopolymer resin is a skin sensitiser. Follow the material safety data sheets.",
    "When inflating, wear eye protection, use a regulator and a pressure relief valve set "
    "below the pressure you have tested, raise pressure slowly, restrain the tubing, and "
    "never exceed the tested pressure. The pressure figures here are estimates for "
    "choosing sweep ranges, not ratings.",
    "Actuators worn on a body are not medical devices unless certified under the local "
    "rules; defer to local codes and licensed practice.",
)

#: Vacuum for degassing (common practice: near full vacuum, about 29 inHg; silicone froths
#: near 28-29 inHg). Shown in kPa too: 1 inHg = 3.386389 kPa (NIST SP 811).
DEGAS_INHG = 29.0

STEPS = (
    "Check the prints: clean, dry, no strings in the cavity, vents and sprue open.",
    "Coat the cavity and the core with a thin release agent suited to silicone; let it dry.",
    "Seat the core print in the lower shell, close the upper shell on the keys (they fit "
    "one way only) and bolt the halves with the clamp screws listed above, a washer under "
    "each head and each nut, tightened evenly in a cross pattern.",
    "Weigh part A and part B as listed (stir each first), then mix for about three minutes, "
    "scraping the sides and bottom.",
    f"Degas under vacuum (common practice: near full vacuum, about {DEGAS_INHG:g} inHg, "
    f"that is {inhg_to_kpa(DEGAS_INHG):.0f} kPa below atmospheric pressure, in a container "
    "about four times the mixed volume) until the foam collapses.",
    "Pour from the sprue in a thin, steady stream into the funnel until silicone shows in "
    "every vent; keep the mold level.",
    "Let it cure for at least the demold time at room temperature (heat shortens it, cold "
    "lengthens it) without moving the mold.",
    "Demold: remove the bolts, pry the halves apart at the notches, lift the upper shell "
    "straight up and the cast off the lower shell.",
    "Remove the core: hold the cast at its inlet and draw the core out through the tube "
    "socket, slowly, along the body's axis (the inlet stretches as each chamber passes).",
    "Trim the sprue and vent stubs flush, then push the tube listed above into the socket.",
)

#: The core step of a dissolved core (``core.kind: dissolved``), in place of pulling it.
DISSOLVE_STEP = (
    "Dissolve the core: print it in a water-soluble filament (its STL and print plate as "
    "listed); after the cure, stand the cast inlet-down in warm water (follow the "
    "filament's data sheet for the temperature; hours, not minutes), change the water and "
    "flush through the tube socket until it runs clear, then dry the cast. Cut the core "
    "print off flush at the socket first.")

#: The steps of an open groove (``annulus`` with ``opens_to: outside``) in place of the
#: core's: its two plates are seated, slid out and the collar fitted.
GROOVE_SEAT_STEP = (
    "Lay the two groove plates (plate-1, plate-2) in the lower shell's pocket, their flat "
    "ends meeting at the ring's middle and their grips standing out of the +y and -y faces; "
    "close the upper shell on the keys (they fit one way only) and bolt the halves with the "
    "clamp screws listed above, a washer under each head and each nut, tightened evenly in "
    "a cross pattern.")
GROOVE_DEMOLD_STEP = (
    "Demold: remove the bolts, slide plate-1 out along +y and plate-2 along -y by their "
    "grips (straight, without twisting), pry the halves apart at the notches, lift the "
    "upper shell straight up and the cast off the lower shell.")
GROOVE_COLLAR_STEP = (
    "Trim the sprue and vent stubs flush. Seat the ring in its rigid collar (listed above) "
    "so that the collar covers the whole groove, and put the tube on the collar's port.")

#: The cautions a pressurised cuff adds.
CUFF_CAUTIONS = (
    "A pressurised cuff stores energy: if the collar cracks, slips or lets a lip out, or "
    "the bore wall bursts, the ring can whip off with the air. Inflate it only on the part "
    "it grips, behind a guard, first at low pressure, and check collar and lips each time.",
    "Do not put the cuff on a person (a finger, a wrist, a limb) without licensed practice: "
    "a cuff squeezes evenly all round and can cut off blood flow; defer to local codes and "
    "the silicone's and the collar material's data sheets.",
)

Block = tuple[Any, ...]


def _collar_line(man: Manifest) -> str | None:
    """The rigid collar that closes an open groove, and what the groove pushes."""
    c = man.collar
    if c is None:
        return None
    return (f"Collar: a rigid ring (printed, or an inextensible band wrapped round) with a "
            f"bore of {c.inner_diameter_mm:g} mm, the ring's outer diameter: print it "
            "line-to-line, or up to 0.5 mm under it on the diameter so the lips seal by "
            "compression (from memory; test one), with a port for the tube through its wall "
            f"at the groove's mid-height. The air enters there (no tube socket in the "
            f"silicone), fills the {c.groove_height_mm:g} mm high groove and pushes its "
            f"bottom ({c.groove_bottom_diameter_mm:g} mm across, {c.groove_area_mm2:.0f} mm2) "
            f"inward: each half of the bore wall is pressed towards the other with about "
            f"{c.squeeze_n_per_kpa:.3g} N per kPa (the pressure times the groove bottom's "
            f"area seen across a diameter, {c.projected_area_mm2:.0f} mm2), less what the "
            "bore wall's own stiffness takes.")


def _socket_words(rec: InletRecord, n: int) -> str:
    face = "the x = 0 end" if rec.face == "start" else "the far end"
    y, z = rec.center_mm
    return f"socket {n} ({face}, centre y = {y:g}, z = {z:g} mm)"


def steps_for(family: Sequence[Manifest]) -> list[str]:
    """The casting steps: :data:`STEPS` for one core; with several, the seating, removal
    and tube steps name each core and the socket it leaves through (core-n through
    socket n, as the first variant with several inlets places them)."""
    if any(man.collar is not None for man in family):
        out = list(STEPS)
        out[1] = ("Coat the cavity and the groove plates with a thin release agent suited "
                  "to silicone; let it dry.")
        out[2], out[7], out[9] = GROOVE_SEAT_STEP, GROOVE_DEMOLD_STEP, GROOVE_COLLAR_STEP
        del out[8]  # no core: the plates came out with the demold
        return out
    many = next((man for man in family if len(man.params.inlets) > 1), None)
    if many is None:
        out = list(STEPS)
        if any(man.params.core_dissolved for man in family):
            out[8] = DISSOLVE_STEP
        return out
    inlets = many.params.inlets
    names = [f"core-{n}" for n in range(1, len(inlets) + 1)]
    out = list(STEPS)
    out[2] = ("Seat every core print (" + ", ".join(names) + ") in the lower shell, each "
              "in the seat at its socket, close the upper shell on the keys (they fit one "
              "way only) and bolt the halves with the clamp screws listed above, a washer "
              "under each head and each nut, tightened evenly in a cross pattern.")
    out[8] = ("Remove the cores one at a time, each through its own tube socket, slowly, "
              "along the body's axis (the socket stretches as each chamber passes): "
              + "; ".join(f"{name} out of {_socket_words(rec, n)}, pulled "
                          + ("towards -x" if rec.face == "start" else "towards +x")
                          for n, (name, rec) in enumerate(zip(names, inlets), 1)) + ".")
    out[9] = ("Trim the sprue and vent stubs flush, then push one tube into each socket: "
              + "; ".join(f"a {rec.socket_diameter_mm:g} mm tube into "
                          f"{_socket_words(rec, n)}" for n, rec in enumerate(inlets, 1))
              + ". Each tube feeds the chambers its core formed.")
    return out


def _fmt(x: float, nd: int = 1) -> str:
    return f"{x:.{nd}f}"


def verdict_word(v: Verdict) -> str:
    """The verdict as a card or sheet says it: "ok", "warnings" or "errors"."""
    return {Verdict.OK: "ok", Verdict.WARNING: "warnings", Verdict.ERROR: "errors"}[v]


def card_blocks(family: Sequence[Manifest], title: str,
                pictures: Mapping[str, Sequence[Picture]] | None = None) -> list[Block]:
    """The card's content for ``family``: the manifests of its variants (built in memory or
    read back with :func:`~soft_molds.export.manifest.read_manifest`), in label order,
    with the assembly ``pictures`` of each variant label given (shown before the steps).
    Variants without a casting plan are left out; ValueError when none has one."""
    cast = [(man, man.casting) for man in family if man.casting is not None]
    if not cast:
        raise ValueError(f"no casting plan in the manifests of {title!r}")
    blocks: list[Block] = [("h1", f"Casting card: {title}")]
    blocks += _silicone_blocks(cast)
    blocks += _weigh_out_blocks(cast)
    blocks += _hardware_blocks([man for man, _ in cast])
    blocks += _picture_blocks([man for man, _ in cast], pictures or {})
    blocks.append(("h2", "Steps"))
    blocks.append(("ol", steps_for([man for man, _ in cast])))
    blocks += _pressure_blocks([man for man, _ in cast])
    blocks += _motion_blocks([man for man, _ in cast])
    blocks += _check_blocks([man for man, _ in cast])
    blocks += _print_blocks(cast)
    blocks.append(("h2", "Cautions"))
    magnets = any(man.params.core_magnets_mm is not None for man, _ in cast)
    cuff = any(man.collar is not None for man, _ in cast)
    blocks.append(("ul", [*CAUTIONS, *((MAGNET_CAUTION,) if magnets else ()),
                          *(CUFF_CAUTIONS if cuff else ())]))
    return blocks


def _silicone_blocks(cast: Sequence[tuple[Manifest, CastingRecord]]) -> list[Block]:
    blocks: list[Block] = []
    # One line per distinct silicone: a sweep may vary the grade or blend it.
    seen: dict[str, list[str]] = {}
    for man, c in cast:
        seen.setdefault(_silicone_line(c), []).append(man.label)
    for line, labels in seen.items():
        who = "" if len(seen) == 1 else f" ({', '.join(labels)})"
        blocks.append(("p", f"Silicone{who}: {line}"))
    for man, c in cast:
        b = c.blend
        if b is None:
            continue
        phi, w = b.volume_fraction_first, b.weight_fraction_first
        who = "" if len(cast) == 1 else f" ({man.label})"
        blocks.append(("p", f"Blend{who}: {phi * 100:.0f} % {b.first} and "
                       f"{(1 - phi) * 100:.0f} % {b.second} by volume ({w * 100:.0f} % / "
                       f"{(1 - w) * 100:.0f} % by "
                       f"weight) for about Shore A{b.target_shore_a:g}: interpolated in "
                       "modulus by Gent's relation, an approximation. Mix each grade's A and "
                       "B as listed, then combine."))
    return blocks


def _weigh_out_blocks(cast: Sequence[tuple[Manifest, CastingRecord]]) -> list[Block]:
    # Columns by component name (the union over the family), so variants of different
    # grades or blends each fill their own columns.
    names: list[str] = []
    for _, c in cast:
        for p in c.portions:
            if p.what not in names:
                names.append(p.what)
    head = ["variant", "cast cm3", "sprue+vents cm3", "mixed cm3", "mixed g",
            *[f"{n} g" for n in names], "checks"]
    rows = []
    totals = [0.0] * len(names)
    for man, c in cast:
        by = {p.what: p.g for p in c.portions}
        grams = [by.get(n) for n in names]
        totals = [t + (x or 0.0) for t, x in zip(totals, grams)]
        rows.append([man.label, _fmt(mm3_to_cm3(c.cast_volume_mm3), 2),
                     _fmt(mm3_to_cm3(c.fill_volume_mm3), 2),
                     _fmt(mm3_to_cm3(c.mixed_volume_mm3), 2),
                     _fmt(c.mixed_mass_g, 1), *["" if x is None else f"{x:g}" for x in grams],
                     verdict_word(man.verdict)])
    if len(cast) > 1:
        rows.append(["all", "", "", "", "", *[f"{round(t, 6):g}" for t in totals], ""])
    return [("h2", "Weigh out"),
            ("p", f"Includes {cast[0][1].waste_pct:g} % for waste; weights are rounded up "
             "to the scale's resolution. Mix each variant separately unless you can "
             "pour them all within the pot life."),
            ("table", head, rows)]


def _picture_blocks(family: Sequence[Manifest], pictures: Mapping[str, Sequence[Picture]]
                    ) -> list[Block]:
    blocks: list[Block] = []
    for man in family:
        for pic in pictures.get(man.label, ()):
            who = "" if len(family) == 1 else f"{man.label}: "
            blocks.append(("img", pic.file, who + pic.caption, pic.png))
    if blocks:
        blocks.insert(0, ("h2", "Assembly"))
        blocks.insert(1, ("p", "How the parts go together; the preview page beside this "
                          "card (preview.html) turns the set in 3-D."))
    return blocks


def _pressure_blocks(family: Sequence[Manifest]) -> list[Block]:
    prow = []
    for man in family:
        work = man.pressure.working_pressure_kpa
        for w in man.pressure.walls:
            lim = "no peak" if w.limit_kpa is None else f"{w.limit_kpa:.0f}"
            m = w.margin
            prow.append([man.label, w.group, _fmt(w.thickness_mm, 2), f"{w.span_mm:g}", lim,
                         "-" if work is None else f"{work:.0f} ({kpa_to_psi(work):.1f} psi)",
                         "-" if m is None else f"{m:.2f}" + (" balloons" if m < 1 else ""),
                         "rough" if w.thick_wall else ""])
    blocks: list[Block] = [("h2", "Wall pressure (estimate)")]
    if not prow:
        blocks.append(("p", "No estimate: the silicone's modulus is unknown (Shore 00 grade "
                       "without a measured modulus)."))
        return blocks
    blocks.append(("p", "Neo-Hookean membrane estimate from Gent's modulus (limit "
                   "pressure, after which a wall balloons); thick walls are rough; a tube "
                   "held at constant length has no limit point. For choosing sweep "
                   "ranges, not a rating: test every part behind a relief valve."))
    blocks.append(("table", ["variant", "wall", "thickness mm", "span mm", "limit kPa",
                             "working kPa", "margin", ""], prow))
    return blocks


def _motion_blocks(family: Sequence[Manifest]) -> list[Block]:
    rows = []
    for man in family:
        mo = man.motion
        if mo is None:
            continue
        w = mo.at_working
        at = ("-" if mo.working_pressure_kpa is None else
              f"beyond the curve ({mo.stop})" if w is None else
              f"{w.angle_deg:.1f} deg" if mo.kind == "bending" else f"{w.extension_mm:.2f} mm")
        rows.append([man.label, mo.model, str(mo.kind),
                     "-" if mo.working_pressure_kpa is None else f"{mo.working_pressure_kpa:.0f}",
                     at, f"{mo.valid_to_kpa:.0f} ({mo.stop})"])
    if not rows:
        return []
    return [("h2", "Predicted motion (estimate)"),
            ("p", "Beam model of the cast's own cross-sections with a neo-Hookean silicone: "
             "tip bend angle of a bender, extension of an extender, at the working "
             "pressure. The curve stops at the lowest balloon limit. Chamber walls that "
             "bulge make a real finger bend more; use the figures to compare variants, "
             "and measure the cast part."),
            ("table", ["variant", "model", "motion", "working kPa", "at working", "curve to kPa"],
             rows)]


def _check_blocks(family: Sequence[Manifest]) -> list[Block]:
    items, named = [], []
    for man in family:
        bad = [f for f in man.checks if f.severity in (Severity.ERROR, Severity.WARNING)]
        if not bad:
            items.append(f"{man.label}: no errors or warnings.")
        for f in bad:
            items.append(f"{man.label}: {f.severity} {f.check} ({f.part}): {f.message}")
            if f.check not in named:
                named.append(f.check)
    blocks: list[Block] = [("h2", "Checks"), ("ul", items)]
    if named:
        blocks.append(("p", "What to do about these findings:"))
        blocks.append(("ul", [f"{name}: {advice_for(name)}" for name in named]))
    return blocks


def _print_blocks(cast: Sequence[tuple[Manifest, CastingRecord]]) -> list[Block]:
    prows = []
    for man, c in cast:
        labels = {lab.part: lab for lab in man.labels}
        for pe in c.prints:
            lab = labels.get(pe.part)
            cut = "-" if lab is None else (f"{lab.text} ({lab.height_mm:g} mm letters, "
                                           f"{lab.depth_mm:g} mm deep)")
            prows.append([man.label, pe.part, bed_face(man, pe.part), cut,
                          _fmt(mm3_to_cm3(pe.volume_mm3), 1), f"{pe.infill_pct:g} %",
                          _fmt(pe.mass_g_estimate, 0)])
    return [("h2", "Printing (estimate; the slicer's figure wins)"),
            ("p", "On the bed: the face each part is printed on, as the print check chose "
             "it (flat, fits the printer, least overhang). Text: what is cut into the part, "
             "so casts and parts cannot be mixed up."),
            ("table", ["variant", "part", "on the bed", "text cut in", "volume cm3",
                       "infill", "filament g"], prows)]


def _axis_word(v: Sequence[float]) -> str:
    i = max(range(3), key=lambda k: abs(v[k]))
    return ("+" if v[i] > 0 else "-") + "xyz"[i]


def bed_face(man: Manifest, part: str) -> str:
    """Which face of ``part`` goes on the print bed, in words: for a shell, its back (the
    face away from the parting plane) or its parting face; else the world side facing
    down (e.g. "-y side"); with the turn on the bed when there is one."""
    rec = man.prints.get(part)
    if rec is None:
        return "-"
    down = rec.down
    rec_part = man.part(part)
    words = f"{_axis_word(down)} side down"
    along = (0.0 if rec_part.pull_dir is None
             else sum(a * b for a, b in zip(down, rec_part.pull_dir)))
    if rec_part.role == "shell" and along > 0.99:
        words = f"back face ({_axis_word(down)}) down, parting face up"
    elif rec_part.role == "shell" and along < -0.99:
        words = f"parting face ({_axis_word(down)}) down"
    elif rec_part.role == "core" and abs(down[0]) < 0.5:
        words += ", lying along x"
    if rec.turn_deg:
        words += f", turned {rec.turn_deg:g} deg on the bed to fit"
    return words


def _silicone_line(c: CastingRecord) -> str:
    """The silicone and its handling times, said once: the recipe's material figures (the
    short end of the pot life and the long end of the demold time where products differ,
    the range kept in the grade's note), then the data sheet."""
    hard = (f"Shore {c.scale}{c.hardness:g}" if c.scale == "A"
            else f"Shore {c.scale}-{c.hardness:g}")
    ratio = c.mix_ratio
    note = c.note.removesuffix(" by product")
    spread = f"; products differ: {note}" if note else ""
    return (f"{c.grade}, {c.cure}-cure, {hard}, density {c.density_g_cm3:g} g/cm3, "
            f"mix {ratio[0]:g}A : {ratio[1]:g}B by {c.mix_by}. Pot life {c.pot_life_min:g} "
            f"min; demold after {c.demold_h:g} h at room temperature. These are the "
            f"recipe's material figures (typical values{spread}); check your data sheet, "
            "its figures win.")


def _grouped(family: Sequence[Manifest], line: Callable[[Manifest], str | None]
             ) -> list[str]:
    """``line(man)`` for each variant, said once with the labels it applies to when the
    variants differ (variants with no line left out)."""
    seen: dict[str, list[str]] = {}
    for man in family:
        text = line(man)
        if text is not None:
            seen.setdefault(text, []).append(man.label)
    if len(seen) == 1 and sum(map(len, seen.values())) == len(family):
        return list(seen)
    return [f"{', '.join(labels)}: {text}" for text, labels in seen.items()]


def _screw_line(man: Manifest) -> str | None:
    s = clamp_screws(man)
    if s is None:
        return None
    if s.length_mm is None:
        size = f"{s.bolt} threaded rods at least {s.needed_mm:g} mm long"
    else:
        size = f"{s.bolt} x {s.length_mm} socket head cap screws (ISO 4762)"
    return (f"Clamp screws: {s.count} {size}, {s.count} nuts (ISO 4032) and {2 * s.count} "
            f"washers (ISO 7089). The shells stack {s.stack_mm:g} mm; with a "
            f"{WASHER_MM[s.bolt]:g} mm washer each side and a {NUT_MM[s.bolt]:g} mm nut the "
            f"screw must be {s.needed_mm:g} mm long to stand two threads past the nut "
            "(common practice), rounded up to the series' length (lengths from memory).")


def _tube_line(man: Manifest) -> str | None:
    inlet = man.params.data.get("inlet")
    if not isinstance(inlet, dict):
        return _tubes_line(man)
    d, depth = inlet.get("socket_diameter_mm"), inlet.get("socket_depth_mm")
    if not isinstance(d, (int, float)) or not isinstance(depth, (int, float)):
        return None
    return (f"Tube: {d:g} mm outer diameter (the socket's diameter; the silicone grips it), "
            f"pushed {depth:g} mm in to the bottom of the socket.")


def _tubes_line(man: Manifest) -> str | None:
    """One tube per socket of a recipe with an ``inlets`` list."""
    inlets = man.params.inlets
    if not inlets:  # an open groove: the tube goes on the collar (see _collar_line)
        return None
    parts = [f"{rec.socket_diameter_mm:g} mm outer diameter for {_socket_words(rec, n)}, "
             f"pushed {rec.socket_depth_mm:g} mm in" for n, rec in enumerate(inlets, 1)]
    return (f"Tubes ({len(inlets)}, one per socket; the silicone grips each): "
            + "; ".join(parts) + ".")


#: The caution a card with magnets adds.
MAGNET_CAUTION = (
    "Small magnets are a swallowing hazard: two swallowed magnets (or one and a piece of "
    "steel) can pinch the gut between them. Keep loose magnets, and the mold parts that "
    "hold them, away from children and pets. They can chip or shatter when they snap "
    "together; wear eye protection. Their pull, the heat they stand (a melted core or a "
    "heated cure) and their handling are the supplier's data sheet's: it wins.")


def _magnet_line(man: Manifest) -> str | None:
    size = man.params.core_magnets_mm
    if size is None:
        return None
    d, t = size
    cores = max(1, len(man.params.inlets))
    return (f"Disc magnets: {2 * cores} ({d:g} mm across x {t:g} mm thick), a pair per "
            "core: press one flush into the pocket under each core print's square key and "
            "one into the pocket in the lower shell's seat below it, turned so that the "
            "pair attracts (the north face of one towards the south face of the other; "
            "try each pair together before pressing it in). The pockets are a press fit; a "
            "drop of glue holds a loose one.")


def _hardware_blocks(family: Sequence[Manifest]) -> list[Block]:
    items = (_grouped(family, _screw_line) + _grouped(family, _tube_line)
             + _grouped(family, _collar_line) + _grouped(family, _magnet_line))
    return [("h2", "Have at hand"), ("ul", items)] if items else []


def card_files(family: Sequence[Manifest], title: str, stem: str = "casting-card",
               pictures: Mapping[str, Sequence[Picture]] | None = None) -> dict[str, bytes]:
    """``{stem}.md`` and ``{stem}.html`` for ``family`` (manifests, in label order); the
    HTML embeds ``pictures`` (by variant label), the Markdown links their files."""
    blocks = card_blocks(family, title, pictures)
    return {f"{stem}.md": render_markdown(blocks).encode(),
            f"{stem}.html": render_html(blocks).encode()}


def render_markdown(blocks: Sequence[Block]) -> str:
    out: list[str] = []
    for b in blocks:
        kind = b[0]
        if kind == "h1":
            out += [f"# {b[1]}", ""]
        elif kind == "h2":
            out += [f"## {b[1]}", ""]
        elif kind == "p":
            out += [b[1], ""]
        elif kind == "ol":
            out += [f"{i}. {t}" for i, t in enumerate(b[1], 1)] + [""]
        elif kind == "ul":
            out += [f"- {t}" for t in b[1]] + [""]
        elif kind == "img":
            out += [f"![{b[2]}]({b[1]})", ""]
        elif kind == "table":
            head, rows = b[1], b[2]
            out.append("| " + " | ".join(head) + " |")
            out.append("|" + "---|" * len(head))
            out += ["| " + " | ".join(str(c).replace("|", "/") for c in r) + " |" for r in rows]
            out.append("")
    return "\n".join(out).rstrip() + "\n"


_STYLE = ("body{font-family:sans-serif;max-width:60em;margin:1.5em auto;color:#111}"
          "table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #888;"
          "padding:.2em .5em;text-align:left}th{background:#eee}h1{font-size:1.5em}"
          "h2{font-size:1.15em;margin-top:1.2em}@media print{body{margin:0}}")


def render_html(blocks: Sequence[Block]) -> str:
    e = html.escape
    title = next((b[1] for b in blocks if b[0] == "h1"), "Casting card")
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
           f"<title>{e(title)}</title><style>{_STYLE}</style></head><body>"]
    for b in blocks:
        kind = b[0]
        if kind in ("h1", "h2", "p"):
            out.append(f"<{kind}>{e(b[1])}</{kind}>")
        elif kind in ("ol", "ul"):
            out.append(f"<{kind}>" + "".join(f"<li>{e(t)}</li>" for t in b[1]) + f"</{kind}>")
        elif kind == "img":
            # a data URI keeps the card one self-contained file (RFC 2397)
            src = "data:image/png;base64," + base64.b64encode(b[3]).decode("ascii")
            out.append(f'<figure><img src="{src}" alt="{e(b[2])}" style="max-width:100%">'
                       f"<figcaption>{e(b[2])}</figcaption></figure>")
        elif kind == "table":
            head, rows = b[1], b[2]
            out.append("<table><tr>" + "".join(f"<th>{e(h)}</th>" for h in head) + "</tr>"
                       + "".join("<tr>" + "".join(f"<td>{e(str(c))}</td>" for c in r) + "</tr>"
                                 for r in rows) + "</table>")
    out.append("</body></html>")
    return "\n".join(out) + "\n"


def silicone_pour_line(q: Quantities) -> str:
    """One pour of a multi-step card: the silicone it casts, what to mix (with the sprue,
    vents and waste) and what to weigh of each part (grams)."""
    weigh = ", ".join(f"{p.what} {p.grams:g} g" for p in q.portions)
    return (f"{mm3_to_cm3(q.cast_mm3):.2f} cm3 of silicone, {q.mixed_g:.1f} g mixed "
            f"({mm3_to_cm3(q.mixed_mm3):.2f} cm3 with the sprue and vents and "
            f"{q.waste_pct:g} % waste: {weigh})")
