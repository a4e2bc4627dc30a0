"""Assembly pictures and the 3-D preview page of a variant.

Outside references: the PNGs are decoded with Pillow (an independent decoder) and their
chunks read by the PNG specification (ISO/IEC 15948: 8-byte signature, then length, type,
data, CRC per chunk); volumes by the divergence theorem; clipped areas against a unit
cube's closed-form surface; data URIs by RFC 2397; the page is run in a headless Chromium
where one is installed.
"""

from __future__ import annotations

import base64
import html as htmllib
import io
import itertools
import json
import re
import shutil
import struct
import subprocess
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from soft_molds.export import assembly as A
from soft_molds.export.formats import output_formats
from soft_molds.meshdata import TriMesh

FILES = {A.EXPLODED_PNG, A.CUTAWAY_PNG, A.PREVIEW_HTML}


@pytest.fixture(scope="module")
def files(finger):
    return output_formats()["assembly"].encode(finger, finger.manifest())


@pytest.fixture(scope="module")
def meshes(finger):
    return {p.name: p.mesh for p in finger.parts}


def _chunks(png: bytes) -> list[bytes]:
    # PNG chunk layout (ISO/IEC 15948 section 5.3)
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    out, i = [], 8
    while i < len(png):
        (n,) = struct.unpack(">I", png[i:i + 4])
        out.append(png[i + 4:i + 8])
        i += 12 + n
    return out


def test_the_format_writes_two_pictures_and_the_preview_page(files):
    assert set(files) == FILES


@pytest.mark.parametrize("name", [A.EXPLODED_PNG, A.CUTAWAY_PNG])
def test_each_picture_decodes_at_its_fixed_size_without_a_stamp(files, name):
    img = Image.open(io.BytesIO(files[name]))
    img.load()
    assert img.size == (int(A.PICTURE_IN[0] * A.PICTURE_DPI),
                        int(A.PICTURE_IN[1] * A.PICTURE_DPI))
    assert 20_000 < len(files[name]) < 400_000
    # something is drawn: at least 10 % of the pixels are not white
    px = np.asarray(img.convert("RGB"), dtype=int)
    assert (px.sum(axis=2) < 3 * 250).mean() > 0.10
    # no time or text chunks (no date, no software stamp)
    assert not {b"tIME", b"tEXt", b"iTXt", b"zTXt"} & set(_chunks(files[name]))


@pytest.mark.parametrize("name", [A.EXPLODED_PNG, A.CUTAWAY_PNG])
def test_every_role_colour_shows_in_each_picture(files, name, finger):
    px = np.asarray(Image.open(io.BytesIO(files[name])).convert("RGB"), dtype=float)
    flat = px.reshape(-1, 3)
    for role in sorted({p.role for p in finger.parts}):
        rgb = np.array([int(A.ROLE_COLOURS[role][i:i + 2], 16) for i in (1, 3, 5)], float)
        # shaded pixels are the colour times a light factor in [0.45, 1]: their direction
        # in RGB space matches the role's colour
        cos = flat @ rgb / (np.linalg.norm(flat, axis=1) * np.linalg.norm(rgb) + 1e-9)
        dark = flat.sum(axis=1) < 3 * 245
        assert ((cos > 0.999) & dark).sum() > 500, role


def test_the_same_meshes_draw_the_same_bytes_twice(finger, meshes):
    man = finger.manifest()
    first = A.variant_pictures(man, meshes)
    second = A.variant_pictures(man, meshes)
    assert first == second


def test_decimated_parts_stay_small_and_keep_their_volume(finger, meshes):
    man = finger.manifest()
    for part in A.view_parts(man, meshes):
        full = meshes[part.name]
        assert part.mesh.triangle_count <= A.TRIANGLES_PER_PART
        # the view frame is a rotation: volumes (divergence theorem) compare directly
        assert part.mesh.volume_mm3() == pytest.approx(full.volume_mm3(), rel=0.05)


def test_exploded_parts_do_not_overlap_along_an_explode_axis(finger, meshes):
    man = finger.manifest()
    parts = A.view_parts(man, meshes)
    offsets = A.explode_offsets(parts)
    rot = A.view_rotation(man.pour.up)
    moved = {p.name: meshes[p.name].vertices @ rot.T + offsets[p.name] for p in parts}
    axes = {p.name: np.asarray(p.pull) for p in parts if p.pull is not None}
    assert set(axes) == {"shell-lower", "shell-upper", "core"}
    for a, b in itertools.combinations(moved, 2):
        # projected on the pull of a part that moved, the two spans are disjoint
        disjoint = []
        for d in (axes[n] for n in (a, b) if n in axes):
            pa, pb = moved[a] @ d, moved[b] @ d
            disjoint.append(pa.max() < pb.min() or pb.max() < pa.min())
        assert any(disjoint), (a, b)
    # the cast stays where it was cast
    assert not offsets["cast"].any()


def test_a_clipped_unit_cube_keeps_half_its_side_faces_and_its_far_face():
    import trimesh

    cube = trimesh.creation.box(extents=(1, 1, 1))
    tris = np.asarray(cube.triangles) + 0.5
    polys = A.clip_half(tris, 0.5)

    def area(p):  # shoelace in 3-D: half the norm of the summed cross products
        return 0.5 * np.linalg.norm(sum(np.cross(p[i], p[(i + 1) % len(p)])
                                        for i in range(len(p))))
    # four side faces cut in half and the whole far face y = 1: 4 * 0.5 + 1
    assert sum(area(p) for p in polys) == pytest.approx(3.0, abs=1e-12)
    assert min(float(p[:, 1].min()) for p in polys) == pytest.approx(0.5, abs=1e-12)


def _page_data(page: bytes) -> dict:
    m = re.search(rb'<script type="application/json" id="mold-data">(.*?)</script>', page,
                  re.S)
    assert m is not None
    return json.loads(m.group(1).replace(b"<\\/", b"</"))


def test_the_preview_holds_every_part_as_decodable_quantised_arrays(files, finger, meshes):
    data = _page_data(files[A.PREVIEW_HTML])
    parts = A.view_parts(finger.manifest(), meshes)
    assert [p["name"] for p in data["parts"]] == [p.name for p in parts]
    lo, span = np.array(data["box_lo"]), np.array(data["box_span"])
    for rec, part in zip(data["parts"], parts):
        q = np.frombuffer(base64.b64decode(rec["vertices"]), "<u2").reshape(-1, 3)
        dtype = "<u2" if rec["index_bytes"] == 2 else "<u4"
        f = np.frombuffer(base64.b64decode(rec["faces"]), dtype).reshape(-1, 3)
        assert len(f) == rec["triangles"] == part.mesh.triangle_count > 0
        assert f.max() < len(q)
        v = lo + q / 65535.0 * span
        # uint16 over the set's box: within half a step (plus the box's 1e-6 rounding)
        assert np.abs(v - part.mesh.vertices).max() <= (span / 65535.0).max() / 2 + 1e-5
    assert len(files[A.PREVIEW_HTML]) < 1_000_000


def test_the_preview_fetches_nothing(files):
    page = files[A.PREVIEW_HTML].decode()
    assert "http://" not in page and "https://" not in page
    assert not re.search(r"<(script|link|img)[^>]*(src|href)=", page)


def _run_page(page: bytes, tmp_path: Path, extra: str = "") -> tuple[dict, str]:
    """What a headless Chromium's last frame drew of ``page`` (triangles per part) and its
    log; ``extra`` is a script run after the viewer's (as a person's clicks)."""
    path = tmp_path / A.PREVIEW_HTML
    path.write_bytes(page.replace(b"</body></html>",
                                  f"<script>{extra}</script></body></html>".encode()))
    run = subprocess.run(["chromium", "--headless", "--no-sandbox", "--disable-gpu",
                          "--enable-logging=stderr", "--v=0", "--dump-dom",
                          path.as_uri()], capture_output=True, text=True, timeout=120)
    m = re.search(r'data-drawn="([^"]*)"', run.stdout)
    assert m is not None, run.stderr[-2000:]
    return json.loads(htmllib.unescape(m.group(1))), run.stderr


BROWSER = pytest.mark.skipif(shutil.which("chromium") is None, reason="no headless Chromium")


@BROWSER
def test_the_preview_draws_every_part_in_a_headless_browser(files, tmp_path):
    drawn, log = _run_page(files[A.PREVIEW_HTML], tmp_path)
    want = {p["name"]: p["triangles"] for p in _page_data(files[A.PREVIEW_HTML])["parts"]}
    assert drawn == want
    # the browser logs page errors as CONSOLE lines on stderr
    assert not [ln for ln in log.splitlines() if "CONSOLE" in ln or "Uncaught" in ln], log


@BROWSER
def test_a_part_unticked_in_the_preview_is_not_drawn(files, tmp_path):
    click = ('var b = document.getElementById("part-1"); b.checked = false;'
             'b.dispatchEvent(new Event("change"));'
             'var s = document.getElementById("explode"); s.value = 0;'
             's.dispatchEvent(new Event("input"));')
    drawn, log = _run_page(files[A.PREVIEW_HTML], tmp_path, click)
    parts = _page_data(files[A.PREVIEW_HTML])["parts"]
    assert drawn == {p["name"]: 0 if i == 1 else p["triangles"] for i, p in enumerate(parts)}
    assert "Uncaught" not in log


def test_the_casting_card_embeds_both_pictures_and_the_markdown_links_them(finger, files):
    card = output_formats()["casting-card"].encode(finger, finger.manifest())
    page = card["casting-card.html"].decode()
    uris = re.findall(r'<img src="data:image/png;base64,([A-Za-z0-9+/=]+)"', page)
    assert [base64.b64decode(u) for u in uris] == [files[A.EXPLODED_PNG],
                                                  files[A.CUTAWAY_PNG]]
    md = card["casting-card.md"].decode()
    assert f"]({A.EXPLODED_PNG})" in md and f"]({A.CUTAWAY_PNG})" in md


def test_a_part_mesh_smaller_than_the_limit_is_left_as_it_is():
    m = TriMesh(np.eye(3), np.array([[0, 1, 2]]))
    assert A.decimate(m) is m


def test_the_viewer_script_ships_inside_the_package():
    path = Path(A.__file__).with_name(A.PREVIEW_SCRIPT)
    assert path.is_file() and "getContext(\"2d\")" in path.read_text()


def test_splitting_long_triangles_keeps_area_and_winding_and_bounds_every_edge():
    # a 100 x 1 mm sliver pair (a rectangle): area 100 mm2 (closed form), normals +z
    tris = np.array([[[0, 0, 0], [100, 0, 0], [100, 1, 0]],
                     [[0, 0, 0], [100, 1, 0], [0, 1, 0]]], dtype=float)
    out = A.split_long(tris, 5.0)
    n = np.cross(out[:, 1] - out[:, 0], out[:, 2] - out[:, 0])
    assert 0.5 * n[:, 2].sum() == pytest.approx(100.0, abs=1e-9)
    assert (n[:, 2] > 0).all()
    edges = np.linalg.norm(out - np.roll(out, -1, axis=1), axis=2)
    assert edges.max() <= 5.0


def test_the_cutaway_section_passes_through_the_middle_of_the_core(finger, meshes):
    parts = A.view_parts(finger.manifest(), meshes)
    core = next(p for p in parts if p.role == "core").mesh.vertices[:, 1]
    v = A.section_v(parts)
    assert core.min() < v < core.max()
    assert v == pytest.approx((core.min() + core.max()) / 2)


def test_a_family_card_embeds_each_members_pictures_and_links_them_in_its_folder(
        finger, files, tmp_path):
    from dataclasses import replace

    from soft_molds.export.card import card_files

    for label in ("A", "B"):
        (tmp_path / label).mkdir()
        for name in (A.EXPLODED_PNG, A.CUTAWAY_PNG):
            (tmp_path / label / name).write_bytes(files[name])
    man = finger.manifest()
    family = [man, replace(man, label="B")]
    pictures = {m.label: A.read_pictures(tmp_path / m.label, f"{m.label}/") for m in family}
    card = card_files(family, "seedling-finger", pictures=pictures)
    page = card["casting-card.html"].decode()
    assert page.count('src="data:image/png;base64,') == 4
    md = card["casting-card.md"].decode()
    for label in ("A", "B"):
        assert f"]({label}/{A.EXPLODED_PNG})" in md and f"]({label}/{A.CUTAWAY_PNG})" in md
    # a folder without pictures gives none (the card is written without them)
    assert A.read_pictures(tmp_path) == ()
