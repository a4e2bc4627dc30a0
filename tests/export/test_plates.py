"""The print plates a build writes (3MF, core specification), read back by an independent
reader: lib3mf, the 3MF Consortium's reference library.

Each object is compared with the part's STL read by numpy-stl: the triangle count, and the
volume by the divergence theorem on the triangles lib3mf returns against numpy-stl's
``get_mass_properties`` volume. A pose is a rotation and a shift, which keep volume.
Footprints: axis-aligned boxes of the read vertices (numpy), exact for what the packer
promises: disjoint boxes hold disjoint footprints; shapely is not installed here."""

from __future__ import annotations

import io
import itertools
import zipfile

import lib3mf
import pytest
from stl import mesh as npstl

from soft_molds.analysis.plates import PLATE_GAP_MM
from soft_molds.export.formats import output_formats
from soft_molds.export.threemf import DECIMALS
from tests.readers import read_3mf, volume


@pytest.fixture(scope="module")
def plate_set(finger):
    return output_formats()["plates"].encode(finger, finger.manifest())


@pytest.fixture(scope="module")
def stl_set(finger):
    return output_formats()["stl"].encode(finger, finger.manifest())


def test_one_plate_holds_the_three_printed_parts_of_the_finger(plate_set):
    assert sorted(plate_set) == ["plate-1.3mf", "plate-1.png"]
    assert plate_set["plate-1.png"].startswith(b"\x89PNG\r\n\x1a\n")  # PNG signature


def test_each_object_has_the_volume_and_triangles_of_its_stl(finger, plate_set, stl_set,
                                                             tmp_path):
    unit, objects = read_3mf(plate_set["plate-1.3mf"], tmp_path)
    assert unit == lib3mf.ModelUnit.MilliMeter
    printed = [p.name for p in finger.manifest().parts if p.printable]
    assert sorted(objects) == sorted(f"{n} A" for n in printed)
    for name in printed:
        v, t = objects[f"{name} A"]
        ref = npstl.Mesh.from_file(f"{name}.stl", fh=io.BytesIO(stl_set[f"{name}.stl"]))
        assert len(t) == len(ref.vectors)
        want, _, _ = ref.get_mass_properties()
        # the STL holds float32 world coordinates, the 3MF 4-decimal bed coordinates
        assert volume(v, t) == pytest.approx(float(want), rel=1e-5)


def test_every_part_lies_on_the_bed_in_its_print_pose_and_apart(finger, plate_set, tmp_path):
    _, objects = read_3mf(plate_set["plate-1.3mf"], tmp_path)
    man = finger.manifest()
    bx, by = finger.recipe.printer.bed_mm
    tol = 10.0 ** -DECIMALS
    boxes = []
    for name, (v, _) in objects.items():
        lo, hi = v.min(axis=0), v.max(axis=0)
        assert lo[2] == pytest.approx(0.0, abs=tol)
        assert lo[0] >= -tol and lo[1] >= -tol and hi[0] <= bx + tol and hi[1] <= by + tol
        # the pose is the print plan's: height and footprint as the manifest records them
        # (its size to 1e-3 mm, its turn to 1e-3 deg)
        size = man.prints[name.split()[0]].size_mm
        assert hi[2] == pytest.approx(size[2], abs=0.01)
        assert sorted(hi[:2] - lo[:2]) == pytest.approx(sorted(size[:2]), abs=0.05)
        boxes.append((lo, hi))
    for (la, ha), (lb, hb) in itertools.combinations(boxes, 2):
        sep = max(lb[0] - ha[0], la[0] - hb[0], lb[1] - ha[1], la[1] - hb[1])
        assert sep >= PLATE_GAP_MM - 2 * tol


def test_the_plates_are_byte_identical_from_run_to_run(finger, plate_set):
    again = output_formats()["plates"].encode(finger, finger.manifest())
    assert again == plate_set
    with zipfile.ZipFile(io.BytesIO(plate_set["plate-1.3mf"])) as zf:
        infos = zf.infolist()
    assert [i.filename for i in infos] == sorted(i.filename for i in infos) == [
        "3D/3dmodel.model", "[Content_Types].xml", "_rels/.rels"]
    assert {i.date_time for i in infos} == {(1980, 1, 1, 0, 0, 0)}


def test_a_family_report_packs_every_variant_together_on_the_plates(finger, tmp_path):
    import json
    import shutil
    from types import SimpleNamespace

    from soft_molds.analysis.findings import Verdict
    from soft_molds.export.reports import write_reports
    from soft_molds.export.writer import write_mold_set

    # The finger written once as variant A and copied as variant B: two variants whose
    # three printed parts each should share a bed.
    a = write_mold_set(finger, tmp_path / "out").directory
    b = a.parent / "B"
    shutil.copytree(a, b)
    man = json.loads((b / "manifest.json").read_text())
    man["label"] = "B"
    (b / "manifest.json").write_text(json.dumps(man))
    rows = [SimpleNamespace(recipe="seedling-finger", label=x, family="", status="built",
                            reason="", verdict=Verdict.OK, errors=0, warnings=0, seconds=1.0,
                            silicone_cm3=1.0, mix_g=1.0, changed={}, out_dir=str(d), ok=True,
                            description="", bend_deg=None, extension_mm=None)
            for x, d in (("A", a), ("B", b))]
    # an earlier report's plate beyond today's count, and another family's plate
    folder = tmp_path / "out" / "seedling-finger"
    (folder / "family-plate-7.3mf").write_bytes(b"stale")
    (folder / "family-plate-F2-1.3mf").write_bytes(b"other family")
    written = write_reports(rows, tmp_path / "out")
    assert not (folder / "family-plate-7.3mf").exists()
    assert (folder / "family-plate-F2-1.3mf").read_bytes() == b"other family"
    plates = sorted(p for p in written if p.name.startswith("family-plate"))
    models = [p for p in plates if p.suffix == ".3mf"]
    assert len(plates) == 2 * len(models) and 1 <= len(models) <= 2
    printed = [p.name for p in finger.manifest().parts if p.printable]
    seen: dict[str, set[int]] = {"A": set(), "B": set()}
    for k, path in enumerate(models):
        _, objects = read_3mf(path.read_bytes(), tmp_path, f"fam-{k}.3mf")
        for name, (v, t) in objects.items():
            part, label = name.split()
            seen[label].add(k)
            assert len(t) == finger.part(part).mesh.triangle_count
            # the STL's float32 corners, joined again into shared vertices
            assert volume(v, t) == pytest.approx(finger.part(part).mesh.volume_mm3(),
                                                 rel=1e-5)
    assert all(len(s) == 1 for s in seen.values())  # each variant on one bed
    names = {n for path in models
             for n in read_3mf(path.read_bytes(), tmp_path, "again.3mf")[1]}
    assert names == {f"{p} {x}" for p in printed for x in "AB"}
