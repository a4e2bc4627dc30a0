"""What a mold set with two cores writes: a file per core, the manifest read back with both
inlets (face, centre, diameter) and both cores with their pulls, and a casting card that
says which core leaves through which socket and which tube goes into each. The reference
is the bundled two-way finger recipe itself: sockets at (y, z) = (0, 5.5) and (0, -5.5) on
the x = 0 face, 4 mm across, 6 mm deep."""

from __future__ import annotations

import pytest
from conftest import built

from soft_molds.export.manifest import read_manifest


@pytest.fixture(scope="module")
def two_way():
    return built("seedling-two-way-finger")


def test_each_core_is_its_own_file_and_the_manifest_lists_every_inlet(two_way, tmp_path):
    files = two_way.files()
    for name in ("core-1.stl", "core-2.stl", "core-1.step", "core-2.step"):
        assert name in files
    assert "core.stl" not in files
    path = tmp_path / "manifest.json"
    path.write_bytes(files["manifest.json"])
    man = read_manifest(path)
    assert [(i.face, i.center_mm, i.socket_diameter_mm, i.socket_depth_mm)
            for i in man.params.inlets] == [("start", (0.0, 5.5), 4.0, 6.0),
                                            ("start", (0.0, -5.5), 4.0, 6.0)]
    assert [(p.name, p.pull_dir) for p in man.parts if p.role == "core"] == [
        ("core-1", (-1.0, 0.0, 0.0)), ("core-2", (-1.0, 0.0, 0.0))]
    # Each core's label carries its number, so it goes back to its own socket.
    assert {lab.part: lab.text for lab in man.labels if lab.part.startswith("core")} == {
        "core-1": "STWF A 1", "core-2": "STWF A 2"}


def test_the_card_says_which_core_and_tube_go_with_which_socket(two_way):
    md = two_way.files()["casting-card.md"].decode()
    one = "socket 1 (the x = 0 end, centre y = 0, z = 5.5 mm)"
    two = "socket 2 (the x = 0 end, centre y = 0, z = -5.5 mm)"
    assert f"core-1 out of {one}, pulled towards -x" in md
    assert f"core-2 out of {two}, pulled towards -x" in md
    assert f"a 4 mm tube into {one}; a 4 mm tube into {two}" in md
    assert "Seat every core print (core-1, core-2)" in md
