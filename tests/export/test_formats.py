"""The registry of output formats and the file set a build writes through it.

Outside references: SHA-256 (FIPS 180-4, through hashlib) for the digests in the manifest;
the STL and STEP contents themselves are checked in test_outputs.py (numpy-stl; ISO
10303-21).
"""

from __future__ import annotations

import hashlib
import json
import subprocess
import sys
from pathlib import Path

import pytest

from soft_molds.export import formats
from soft_molds.export.formats import output_format, output_formats
from soft_molds.export.manifest import MANIFEST_NAME
from soft_molds.export.writer import encode_mold_set, write_mold_set

PART_NAMES = ["shell-lower", "shell-upper", "core", "cast"]


@pytest.fixture(scope="module")
def encoded(finger):
    return encode_mold_set(finger)


def test_the_registry_lists_stl_step_plates_the_casting_card_and_the_assembly_views():
    assert list(output_formats()) == ["assembly", "casting-card", "plates", "step", "stl"]
    assert all(f.summary for f in output_formats().values())


@pytest.mark.parametrize("name, files", [
    ("stl", {f"{n}.stl" for n in PART_NAMES}),
    ("step", {f"{n}.step" for n in PART_NAMES}),
    ("casting-card", {"casting-card.md", "casting-card.html"}),
    ("plates", {"plate-1.3mf", "plate-1.png"}),
    ("assembly", {"assembly-exploded.png", "assembly-cutaway.png", "preview.html"}),
])
def test_each_format_writes_exactly_its_own_files(finger, encoded, name, files):
    got = output_formats()[name].encode(finger, finger.manifest())
    assert set(got) == files
    for file, data in got.items():
        assert data == encoded.files[file]


def test_every_format_and_the_manifest_last_make_todays_file_set(encoded):
    names = list(encoded.files)
    assert names[-1] == MANIFEST_NAME
    assert sorted(names) == sorted([f"{n}.stl" for n in PART_NAMES]
                                   + [f"{n}.step" for n in PART_NAMES]
                                   + ["casting-card.md", "casting-card.html", MANIFEST_NAME]
                                   + ["plate-1.3mf", "plate-1.png"]
                                   + ["assembly-exploded.png", "assembly-cutaway.png",
                                      "preview.html"])
    # the manifest lists every other file with its SHA-256 (FIPS 180-4, via hashlib)
    listed = json.loads(encoded.files[MANIFEST_NAME])["files"]
    assert listed == {n: hashlib.sha256(encoded.files[n]).hexdigest()
                      for n in sorted(names[:-1])}
    assert dict(encoded.manifest.files) == listed


def test_a_chosen_subset_of_formats_writes_only_those_and_the_manifest(finger):
    enc = encode_mold_set(finger, ["stl"])
    assert sorted(enc.files) == sorted([f"{n}.stl" for n in PART_NAMES] + [MANIFEST_NAME])
    assert sorted(enc.manifest.files) == sorted(f"{n}.stl" for n in PART_NAMES)


def test_an_unknown_format_is_refused_naming_the_known_ones(finger):
    with pytest.raises(ValueError, match="unknown output format.*obj; known: "
                                         "assembly, casting-card, plates, step, stl"):
        encode_mold_set(finger, ["stl", "obj"])


def test_two_formats_writing_one_file_name_are_refused(finger, monkeypatch):
    monkeypatch.setattr(formats, "_FORMATS", dict(formats._FORMATS))
    output_format("stl-again", "a second STL")(
        lambda molds, man: {"cast.stl": b"not an STL"})
    with pytest.raises(ValueError, match="'stl-again' writes 'cast.stl', which 'stl'"):
        encode_mold_set(finger, ["stl", "stl-again"])
    with pytest.raises(ValueError, match="registered twice"):
        output_format("stl", "again")(lambda molds, man: {})


def test_a_format_may_not_write_the_manifest(finger, monkeypatch):
    monkeypatch.setattr(formats, "_FORMATS", dict(formats._FORMATS))
    output_format("own-manifest", "a rogue manifest")(
        lambda molds, man: {MANIFEST_NAME: b"{}"})
    with pytest.raises(ValueError, match="writes 'manifest.json'"):
        encode_mold_set(finger, ["own-manifest"])


def test_writing_changes_nothing_in_the_mold_set_and_reports_the_time(finger, tmp_path):
    before = dict(finger.timings_s)
    written = write_mold_set(finger, tmp_path)
    assert dict(finger.timings_s) == before and "write" not in finger.timings_s
    assert written.write_s > 0.0
    assert written.directory == tmp_path / "seedling-finger" / "A"
    assert sorted(p.name for p in written.paths) == sorted([*written.manifest.files,
                                                           MANIFEST_NAME])


def test_listing_the_formats_does_not_load_the_cad_kernel():
    code = ("import sys; from soft_molds.export.formats import output_formats; "
            "output_formats(); print(sorted(m for m in ('OCP', 'cadquery') "
            "if m in sys.modules))")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=Path(__file__).resolve().parents[2])
    assert res.stdout.strip() == "[]"
