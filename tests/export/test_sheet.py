"""The family sheet picture (PNG and SVG of one A4 page).

Outside references: the PNG format (ISO/IEC 15948, RFC 2083: signature, chunk layout, CRC-32
over type and data, IHDR fields, pHYs in pixels per metre); SVG 1.1 (W3C: an XML document,
lengths in pt, 72 pt per inch); ISO 216 (A4 is 210 mm x 297 mm); 25.4 mm per inch
(exact, by definition of the inch).
"""

from __future__ import annotations

import re
import struct
import xml.etree.ElementTree as ET
import zlib
from types import SimpleNamespace

import matplotlib as mpl
import numpy as np
import pytest

from soft_molds.export.sheet import DPI, SheetData, SheetVariant, render_sheet

SVG_NS = "{http://www.w3.org/2000/svg}"
VERDICTS = ("ok", "warnings", "errors", "failed", "ok")


def _square(side_mm: float, x0: float = 0.0, y0: float = 0.0) -> np.ndarray:
    c = np.array([(x0, y0), (x0 + side_mm, y0), (x0 + side_mm, y0 + side_mm),
                  (x0, y0 + side_mm)], dtype=float)
    return np.stack([c, np.roll(c, -1, axis=0)], axis=1)


def _variant(label: str, verdict: str = "ok", section: np.ndarray | None = None,
             changed: tuple[tuple[str, str], ...] = (("chamber height", "7 mm"),)
             ) -> SheetVariant:
    return SheetVariant(
        label=label, changed=changed,
        figures=(("silicone", "12.0 cm3"), ("mix", "7.6 g A + 7.6 g B"),
                 ("walls", "2.00 mm"), ("limit", "97 kPa")),
        verdict=verdict,
        section=_square(10.0) if section is None else section,
        section_axes=("x", "z"))


def _family(n: int) -> SheetData:
    variants = tuple(_variant(f"F2-{'ABCDEF'[i]}", VERDICTS[i % 5],
                              section=_square(10.0 + 8.0 * i)) for i in range(n))
    return SheetData("seedling-finger family F2",
                     "recipes/seedling-finger.yaml, soft_molds 0.1.0", variants)


@pytest.fixture(scope="module")
def five():
    return render_sheet(_family(5))


def _png_chunks(png: bytes) -> list[tuple[bytes, bytes]]:
    """(type, data) of each chunk, checking each CRC-32 (ISO/IEC 15948 sec. 5.3)."""
    chunks, i = [], 8
    while i < len(png):
        (n,) = struct.unpack(">I", png[i:i + 4])
        kind, body = png[i + 4:i + 8], png[i + 8:i + 8 + n]
        (crc,) = struct.unpack(">I", png[i + 8 + n:i + 12 + n])
        assert crc == zlib.crc32(kind + body), kind
        chunks.append((kind, body))
        i += 12 + n
    return chunks


def _svg_texts(svg: bytes) -> list[str]:
    root = ET.fromstring(svg)
    return ["".join(t.itertext()) for t in root.iter(SVG_NS + "text")]


def _group_extent_pt(svg: bytes, gid: str) -> tuple[float, float]:
    """Width and height in pt of every path inside the SVG group ``gid``."""
    root = ET.fromstring(svg)
    group = next(g for g in root.iter(SVG_NS + "g") if g.get("id") == gid)
    pts = [float(v) for p in group.iter(SVG_NS + "path")
           for v in re.findall(r"-?\d+(?:\.\d+)?", p.get("d", ""))]
    xs, ys = np.array(pts[0::2]), np.array(pts[1::2])
    return float(np.ptp(xs)), float(np.ptp(ys))


def test_same_input_gives_identical_png_and_identical_svg_bytes(five):
    png2, svg2 = render_sheet(_family(5))
    assert five[0] == png2
    assert five[1] == svg2
    # nothing in either file depends on the clock
    assert b"Date" not in five[1] and b"<dc:date>" not in five[1]
    assert b"Software" not in five[0]


def test_a_user_style_neither_changes_the_bytes_nor_leaks_out(five):
    hostile = {"lines.linewidth": 5.0, "font.family": "serif", "svg.fonttype": "path",
               "figure.facecolor": "red", "savefig.dpi": 300, "svg.hashsalt": None}
    with mpl.rc_context(hostile):
        before = dict(mpl.rcParams.copy())   # copy(): reading "backend" off the live
        again = render_sheet(_family(5))     # rcParams would resolve a backend
        after = dict(mpl.rcParams.copy())
    assert again == five
    assert before == after


def test_png_signature_and_ihdr_size_are_a4_at_the_dpi(five):
    png = five[0]
    # PNG signature, ISO/IEC 15948 sec. 5.2 / RFC 2083 sec. 3.1
    assert png[:8] == bytes([0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A])
    chunks = _png_chunks(png)
    assert chunks[0][0] == b"IHDR" and len(chunks[0][1]) == 13   # IHDR comes first
    assert chunks[-1] == (b"IEND", b"")
    width, height, depth = struct.unpack(">IIB", chunks[0][1][:9])
    # A4 = 210 x 297 mm (ISO 216) = 8.27 x 11.69 in; matplotlib's canvas truncates the
    # float pixel size to whole pixels (int() in FigureCanvasBase.get_width_height).
    assert (width, height) == (int(210 / 25.4 * DPI), int(297 / 25.4 * DPI)) == (1240, 1753)
    assert depth == 8
    # pHYs states the dpi, so a print at 100 % comes out A4: pixels per metre, unit 1
    phys = dict(chunks)[b"pHYs"]
    ppm_x, ppm_y, unit = struct.unpack(">IIB", phys)
    assert unit == 1 and ppm_x == ppm_y == round(DPI / 0.0254)


def test_svg_is_xml_a4_in_points_and_every_label_and_verdict_is_text(five):
    svg = five[1]
    root = ET.fromstring(svg)   # SVG is XML (W3C SVG 1.1); raises on malformed output
    assert root.tag == SVG_NS + "svg"
    # 72 pt per inch: A4 is 595.28 x 841.89 pt
    w, h = (float(root.get(k).removesuffix("pt")) for k in ("width", "height"))
    assert w == pytest.approx(210 / 25.4 * 72, abs=1e-3)
    assert h == pytest.approx(297 / 25.4 * 72, abs=1e-3)
    texts = _svg_texts(svg)
    for v in _family(5).variants:
        assert v.label in texts
        assert v.verdict in texts
    for word in ("ok", "warnings", "errors", "failed"):
        assert word in texts
    assert "seedling-finger family F2" in texts
    assert any("relief valve" in t and "never exceed a tested pressure" in t for t in texts)
    assert "chamber height 7 mm" in texts
    assert "mix: 7.6 g A + 7.6 g B" in texts


def test_sections_of_10_and_20_mm_squares_draw_in_ratio_2_at_the_stated_scale():
    data = SheetData("scale", "two squares", (
        _variant("A", section=_square(10.0)),
        _variant("B", section=_square(20.0, x0=-300.0, y0=50.0)),  # offset must not matter
    ))
    _, svg = render_sheet(data)
    wa, ha = _group_extent_pt(svg, "section-0")
    wb, hb = _group_extent_pt(svg, "section-1")
    assert wb / wa == pytest.approx(2.0, rel=0.01)
    assert hb / ha == pytest.approx(2.0, rel=0.01)
    assert wa == pytest.approx(ha, rel=0.01)   # equal aspect: a square stays square
    texts = _svg_texts(svg)
    # The header's print ratio is true: 10 mm at "p : q" is 10 * p / q mm on paper,
    # and 1 mm on paper is 72 / 25.4 pt.
    note = next(t for t in texts if t.startswith("All sections at one scale"))
    p, q = (float(x) for x in re.search(r"([\d.]+) : ([\d.]+)", note).groups())
    assert wa == pytest.approx(10.0 * p / q * 72 / 25.4, rel=0.01)
    # The scale bar is as long as it says, at the same scale as the drawing.
    bar_mm = float(re.search(r"scale bars ([\d.]+) mm", note).group(1))
    assert f"{bar_mm:g} mm" in texts
    bar_w, _ = _group_extent_pt(svg, "scalebar-0")
    assert bar_w / wa == pytest.approx(bar_mm / 10.0, rel=0.01)


def test_one_and_five_variants_render_and_six_or_none_raise():
    for n in (1, 5):
        png, svg = render_sheet(_family(n))
        width, height = struct.unpack(">II", png[16:24])
        assert (width, height) == (1240, 1753)   # same A4 page whatever the row count
        texts = _svg_texts(svg)
        assert [t for t in texts if re.fullmatch(r"F2-[A-F]", t)] == \
            [f"F2-{c}" for c in "ABCDE"[:n]]
    six = SheetData("too many", "", tuple(_variant(c) for c in "ABCDEF"))
    with pytest.raises(ValueError, match="1 to 5 variants, got 6"):
        render_sheet(six)
    with pytest.raises(ValueError, match="got 0"):
        render_sheet(SheetData("none", "", ()))


def test_empty_section_renders_no_section_text():
    data = SheetData("with a failed build", "", (
        _variant("A", "ok"),
        _variant("B", "failed", section=np.zeros((0, 2, 2))),
        _variant("C", "failed", section=np.array([])),
    ))
    png, svg = render_sheet(data)
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    assert _svg_texts(svg).count("no section") == 2
    ids = {g.get("id") for g in ET.fromstring(svg).iter(SVG_NS + "g")}
    assert "section-0" in ids and "section-1" not in ids and "section-2" not in ids


def test_all_sections_empty_still_renders_without_a_scale_note():
    data = SheetData("all failed", "", (_variant("A", "failed", section=np.zeros((0, 2, 2))),))
    _, svg = render_sheet(data)
    texts = _svg_texts(svg)
    assert "no section" in texts and "failed" in texts
    assert not any(t.startswith("All sections") for t in texts)


def test_bad_verdict_or_section_shape_is_refused():
    with pytest.raises(ValueError, match="verdict"):
        render_sheet(SheetData("t", "", (_variant("A", "fine"),)))
    with pytest.raises(ValueError, match=r"\(n, 2, 2\)"):
        render_sheet(SheetData("t", "", (_variant("A", section=np.zeros((3, 4))),)))
    bad = _square(10.0)
    bad[0, 0, 0] = np.nan
    with pytest.raises(ValueError, match="non-finite"):
        render_sheet(SheetData("t", "", (_variant("A", section=bad),)))


def test_dollar_signs_and_long_values_stay_literal_text():
    long_value = "x" * 400
    data = SheetData("cost $5 per cast", "", (
        _variant("A", changed=(("note", "$a$ and $b$"), ("body.label", long_value))),))
    texts = _svg_texts(render_sheet(data)[1])
    assert "cost $5 per cast" in texts          # not parsed as mathtext
    assert "note $a$ and $b$" in texts
    cut = next(t for t in texts if t.startswith("body.label x"))
    assert cut.endswith("\u2026") and len(cut) < 100   # cut to the column, not spilled


def test_a_long_parameter_path_gives_way_before_its_value():
    path = "voids[0]." + "very_long_field_name_" * 4 + "height_mm"
    texts = _svg_texts(render_sheet(SheetData("t", "", (
        _variant("A", changed=((path, "7.25"),)),)))[1])
    line = next(t for t in texts if t.startswith("voids[0]."))
    assert line.endswith("height_mm 7.25") and "\u2026" in line and len(line) < len(path)


def test_a_row_from_a_written_variant_reads_its_manifest_and_cuts_its_cast(finger,
                                                                         tmp_path):
    from soft_molds.analysis.findings import verdict
    from soft_molds.export.card import verdict_word
    from soft_molds.export.manifest import read_manifest
    from soft_molds.export.sheet import manifest_row
    from soft_molds.export.writer import write_mold_set

    folder = write_mold_set(finger, tmp_path).directory
    row = manifest_row(read_manifest(folder), folder, (("voids[0].count", "7"),))
    assert (row.label, row.changed) == ("A", (("voids[0].count", "7"),))
    assert row.verdict == verdict_word(verdict(finger.findings))
    figs = dict(row.figures)
    assert figs["silicone"] == f"{finger.silicone_volume_mm3 / 1000:.2f} cm3"
    assert figs["mix"] == " + ".join(f"{p.grams:g} g {p.what[-1]}"
                                     for p in finger.casting.quantities.portions)
    # chambers 8 mm high centred 1 mm above the middle of the 14 mm bar: the top wall is
    # 7 - (1 + 4) = 2 mm, the thinnest (closed form)
    assert figs["thinnest wall"] == "2.00 mm"
    # the row names its build: the first 12 hex digits of the recipe's hash, no date
    assert figs["recipe hash"] == finger.manifest().source_params_sha256[:12]
    assert row.badge == "ok" or row.badge.startswith(("warning: ", "error: "))
    # z is up, so the cut is across y through the socket centre (y = 0): the outline of
    # the 70 mm x 14 mm bar from x = 0 (closed form from the recipe)
    assert row.section_axes == ("x", "z")
    s = row.section
    assert s.shape[1:] == (2, 2) and len(s) > 100
    assert s[:, :, 0].min() == pytest.approx(0.0, abs=1e-6)
    assert s[:, :, 0].max() == pytest.approx(70.0, abs=1e-6)
    assert (s[:, :, 1].min(), s[:, :, 1].max()) == pytest.approx((-7.0, 7.0), abs=1e-6)


def test_a_variant_without_files_gets_a_row_saying_why():
    from soft_molds.export.sheet import unbuilt_row

    failed = unbuilt_row("B", (), "failed", "kernel: " + "x" * 200)
    refused = unbuilt_row("C", (), "refused", "trapped-air: a bubble")
    assert (failed.verdict, refused.verdict) == ("failed", "errors")
    assert (failed.badge, refused.badge) == ("failed", "refused: trapped-air")
    assert dict(failed.figures)["reason"] == ("kernel: " + "x" * 200)[:80]
    assert failed.section.size == 0


def test_the_badge_names_the_worst_finding_errors_before_warnings():
    from soft_molds.analysis.findings import Severity, finding
    from soft_molds.export.sheet import worst_finding

    def man(*fs):
        return SimpleNamespace(checks=fs)

    warn_p = finding("pressure", Severity.WARNING, "cast", "balloons")
    warn_u = finding("undercut", Severity.WARNING, "shell-upper", "flexes 2 mm")
    err = finding("core-lock", Severity.ERROR, "shell-lower", "locked")
    note = finding("overhang", Severity.INFO, "core", "12 mm2")
    assert worst_finding(man(note)) == "ok"
    assert worst_finding(man(note, warn_p)) == "warning: pressure"
    assert worst_finding(man(warn_p, warn_u, warn_p)) == "warning: pressure +1"
    assert worst_finding(man(warn_p, err)) == "error: core-lock"


def test_a_long_badge_is_drawn_whole_in_a_smaller_size_in_the_label_column():
    texts = _svg_texts(render_sheet(SheetData("t", "", (
        SheetVariant("A", (), (), "warnings", _square(10.0), ("x", "z"),
                     "warning: core-extraction +2"),)))[1])
    assert "warning: core-extraction +2" in texts


def test_header_gives_description_and_version_and_no_date():
    data = SheetData("seedling-finger", "soft-molds 0.1.0", (_variant("A"),),
                     "Bending finger of the gripper")
    png, svg = render_sheet(data)
    texts = _svg_texts(svg)
    assert "Bending finger of the gripper  \u2014  soft-molds 0.1.0" in texts
    assert not any(re.search(r"\b20\d\d-\d\d-\d\d\b", t) for t in texts)
    assert render_sheet(data) == (png, svg)
