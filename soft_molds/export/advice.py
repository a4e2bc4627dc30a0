"""What to do about each finding, one short paragraph per name a registered check emits.

The casting card prints the paragraph beside a finding, and the README's section "What to
do about a finding" is generated from the same table (``.venv/bin/soft-molds reference
--update README.md`` rewrites it; a test keeps the two identical and fails when a
registered check emits a name without advice). The remedies are the usual ones of the trade (common
practice) and the recipe fields that move each measured figure.
"""

from __future__ import annotations

import re

from ..analysis.registry import registered_checks

ADVICE: dict[str, str] = {
    "draft": (
        "A note only: silicone flexes off walls without draft. If a shell sticks when you "
        "open the mold, round the body's edges (`edge_radius_mm`, `round_mm`) or use more "
        "release agent."),
    "undercut": (
        "The silicone must flex by the stated depth to leave that shell. Up to a few mm is "
        "usually fine for soft grades; otherwise move the parting plane through the widest "
        "section (`parting.offset_mm`, or `parting.axis: auto`) or round the edge that "
        "hooks."),
    "core-lock": (
        "The rigid core print cannot leave a shell: the mold cannot be opened. Move the "
        "parting plane through the core's axis (`parting.offset_mm`, `inlet.center_mm`; with "
        "several cores, through every socket: `inlets[i].center_mm`) or let the build choose "
        "it (`parting.axis: auto`)."),
    "core-draft": (
        "A note only: the void faces that face against the core's pull are released by "
        "stretching the silicone; `core-extraction` says whether it can stretch that far."),
    "plate-release": (
        "Only for a ring's open groove: a plate that cannot slide out of the groove along "
        "its pull (+y or -y) would tear the lips or the bore wall. The plates are flat and "
        "split through the ring's axis, so this means the groove is not the one the plates "
        "were made for: rebuild the set from the recipe."),
    "core-extraction": (
        "Pulling the core out through the inlet would stretch the silicone past its "
        "elongation at break: the inlet would tear. Make the tube socket wider "
        "(`inlet.socket_diameter_mm`, or that core's `inlets[i].socket_diameter_mm`: "
        "core-n leaves through inlets[n-1]), the chambers narrower, or use a stretchier grade "
        "(`material.grade`, or your measured `material.elongation_pct`); or print the core "
        "in a water-soluble filament and dissolve it out (`core.kind: dissolved`)."),
    "motion": (
        "No bend or stretch is predicted for this body: the motion estimates take the cast "
        "for a beam along its length, and a ring has none, nor does a channel network whose "
        "arms turn away from it. Measure the squeeze on a cast "
        "part, raising the pressure slowly up to the working pressure only."),
    "drain": (
        "A dissolved core's solution cannot leave that pocket when the part stands "
        "inlet-down: its only way out lies above it. Join the pocket's low end to the "
        "socket (a feed passage along the bottom of the chambers), turn the chamber so it "
        "opens downward, or add a drain hole there and plug it with silicone after."),
    "core-support": (
        "The liquid silicone lifts a core lighter than itself and lets a heavier one sink; "
        "held by its one print, the core bends it. Shorten the core's reach from the "
        "socket, widen the socket (a thicker print), cast it in a stiffer material "
        "(`core.material`), or hold the far end (a thin silicone spacer of the same grade "
        "under or over the core, cast in with it)."),
    "core-slenderness": (
        "The core print is long and thin between supports and may bend or break when cast "
        "or pulled. Make the void wider or shorter, or accept the risk after a trial "
        "print; the limit is `checks.core_slenderness_max`."),
    "silicone-wall": (
        "A silicone wall is thinner than `checks.min_wall_mm`: it may tear or balloon. Move "
        "the void away from the outer surface (`center_mm`), make it smaller or the body "
        "bigger."),
    "trapped-air": (
        "Air stays caught at a high point the vents do not reach, leaving a bubble in the "
        "cast. Change the pour orientation (`parting.axis`), raise the body's ceiling "
        "toward the sprue, or drill a vent through the upper shell at the stated point "
        "after printing."),
    "build-volume": (
        "A part fits the printer in no orientation. Check `printer.bed_mm` and "
        "`printer.height_mm`, or make the mold smaller (`mold.wall_mm`, `mold.flange_mm`)."),
    "flat-face": (
        "The part has no flat face big enough to stand on: print it with a brim or "
        "supports, or add a flat by changing the mold settings."),
    "print-wall": (
        "A mold wall is thinner than `printer.perimeters` x `printer.nozzle_mm`: it may "
        "leak or crack. Raise `mold.wall_mm`, or print with more perimeters if your "
        "slicer allows."),
    "fin-print": (
        "The fins that form the slits (on the upper shell, or on a layered chambered tray's "
        "floor) are thinner than the printed wall or "
        "too tall for their thickness: they print weak, wobble under the nozzle or are "
        "dropped by the slicer. Widen the slits (`width_mm` of the slits void, within the "
        "gap between chambers less twice `checks.min_wall_mm`), make them shallower "
        "(`depth_mm`) or lessen their `draft_deg`, which thins the fin's tip."),
    "fin-opening": (
        "The sprue or a vent lands over a slit and would be cut down through the fin beside "
        "it. Leave wider top faces between the slits (a larger chamber `pitch_mm`, narrower "
        "slits `width_mm`) or a smaller opening (`mold.sprue_diameter_mm`, "
        "`mold.vent_diameter_mm`); with `span_mm` shorter than the body's width, cut the "
        "slits through both side faces instead, so each stretch of top face is vented on "
        "its own."),
    "fin-draft": (
        "The fins must leave the slits along their part's pull (the upper shell's, or a "
        "layered chambered tray's as the cast is lifted out). With no draft they "
        "drag on the silicone walls beside each slit; wider at the tip than at the root they "
        "tear them. Give the slits `draft_deg` (common practice 0.5-2 deg)."),
    "overhang": (
        "A note only: that area needs supports or bridging in the slicer; clean any "
        "support off the cavity before casting."),
    "pressure": (
        "At the working pressure that wall is estimated to balloon (an estimate, not a "
        "rating). Thicken the wall, make the chamber's span smaller, use a harder grade, "
        "or lower `inflate.working_pressure_kpa`; test behind a relief valve."),
}


def finding_names() -> tuple[str, ...]:
    """Every ``Finding.check`` name the registered checks emit, in review order."""
    return tuple(n for c in registered_checks() for n in c.names)


def advice_for(name: str) -> str:
    """The paragraph for finding ``name`` (a generic one for a name without advice)."""
    return ADVICE.get(name, "See the message and the README's section on the checks.")


def advice_markdown() -> str:
    """The README section's body: one paragraph per registered finding name."""
    return "\n\n".join(f"`{n}`: {advice_for(n)}" for n in finding_names()) + "\n"


_MARKERS = re.compile(r"(<!-- finding-advice:start[^>]*-->)(.*?)(<!-- finding-advice:end -->)",
                      re.S)


def advice_section(document: str) -> str | None:
    """The generated text between the advice markers of ``document`` (None without them),
    as :func:`splice_advice` writes it."""
    m = _MARKERS.search(document)
    return None if m is None else m.group(2).removeprefix("\n\n").removesuffix("\n")


def splice_advice(document: str) -> str:
    """``document`` with the text between the advice markers replaced by
    :func:`advice_markdown`; ValueError when the markers are missing."""
    if not _MARKERS.search(document):
        raise ValueError("finding-advice markers not found")
    return _MARKERS.sub(lambda m: f"{m.group(1)}\n\n{advice_markdown()}\n{m.group(3)}",
                        document, count=1)
