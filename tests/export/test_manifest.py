"""manifest.json as a typed value: written, read back equal, and refused when damaged.

Outside references: JSON (RFC 8259; a text cut short is not JSON, and Python's json module
parses it independently of our writer); SHA-256 (FIPS 180-4, through hashlib) for the
digests the manifest records of the files beside it.
"""

from __future__ import annotations

import copy
import hashlib
import json
from pathlib import Path

import pytest
from conftest import BUNDLED

from soft_molds import SoftMoldsError
from soft_molds.analysis.findings import Verdict, verdict
from soft_molds.export.manifest import (
    MANIFEST_NAME,
    Manifest,
    ManifestError,
    manifest_bytes,
    read_manifest,
)
from soft_molds.export.writer import write_mold_set
from soft_molds.version import __version__


@pytest.mark.parametrize("name", BUNDLED)
def test_every_bundled_manifest_reads_back_to_the_same_typed_value_and_bytes(
        name, bundled, tmp_path):
    molds = bundled(name)
    written = write_mold_set(molds, tmp_path)
    path = written.directory / MANIFEST_NAME
    back = read_manifest(path)
    assert isinstance(back, Manifest)
    assert back == written.manifest
    assert manifest_bytes(back) == path.read_bytes()
    # what json.loads sees is what the typed value says (RFC 8259 text, parsed by json)
    assert json.loads(path.read_bytes()) == back.to_json()
    assert (back.recipe, back.label) == (molds.recipe.name, molds.recipe.label)
    assert back.verdict is verdict(molds.findings)
    assert back.silicone_volume_mm3 == pytest.approx(molds.silicone_volume_mm3, abs=5e-4)
    assert back.casting is not None
    assert [p.g for p in back.casting.portions] == [
        p.grams for p in molds.casting.quantities.portions]
    # every other file written is listed with its SHA-256 (FIPS 180-4, via hashlib)
    beside = {p.name for p in written.paths} - {MANIFEST_NAME}
    assert set(back.files) == beside
    for file, digest in back.files.items():
        assert hashlib.sha256((written.directory / file).read_bytes()).hexdigest() == digest


def test_the_reader_takes_the_folder_of_a_variant_too(finger, tmp_path):
    written = write_mold_set(finger, tmp_path)
    assert read_manifest(written.directory) == written.manifest


def test_the_shared_attributes_are_typed(finger):
    man = finger.manifest()
    assert isinstance(man.recipe, str) and isinstance(man.tool_version, str)
    assert len(man.params_sha256) == 64 and len(man.source_params_sha256) == 64
    assert man.verdict in set(Verdict)
    assert all(f.severity in {"error", "warning", "info"} for f in man.checks)
    assert man.casting is not None and all(isinstance(p.g, float)
                                           for p in man.casting.portions)
    assert dict(man.files) == {}  # no digests before the files are encoded
    # the recipe echo is read through a typed accessor: the finger's inlet at (0, 1) mm
    assert man.inlet_center_mm == (0.0, 1.0)


def test_the_motion_block_reads_back_as_the_build_predicted_it(finger, tmp_path):
    written = write_mold_set(finger, tmp_path)
    mo = read_manifest(written.directory).motion
    curve = finger.motion
    assert mo is not None and curve is not None
    assert (mo.model, mo.kind, mo.stop) == (curve.model, curve.kind, curve.stop)
    assert len(mo.points) == len(curve.points)
    assert [p.angle_deg for p in mo.points] == pytest.approx(
        [p.angle_deg for p in curve.points], abs=5e-4)
    assert mo.at_working is not None and curve.at_working is not None
    assert mo.at_working.pressure_kpa == curve.working_pressure_kpa == 60.0
    assert mo.at_working.angle_deg == pytest.approx(curve.at_working.angle_deg, abs=5e-4)
    assert mo.valid_to_kpa == pytest.approx(curve.valid_to_kpa, abs=5e-4)


# --- refusals ---------------------------------------------------------------------------


@pytest.fixture(scope="module")
def good(finger) -> dict:
    """The finger's manifest as json.loads gives it, with one file digest."""
    data = finger.manifest().to_json()
    data["files"] = {"cast.stl": hashlib.sha256(b"cast").hexdigest()}
    return data


def _write(tmp_path: Path, data: object) -> Path:
    path = tmp_path / MANIFEST_NAME
    path.write_text(json.dumps(data, indent=2))
    return path


def _refusal(path: Path) -> ManifestError:
    with pytest.raises(ManifestError) as info:
        read_manifest(path)
    assert isinstance(info.value, SoftMoldsError)
    assert info.value.path == str(path)
    return info.value


def _at(data: dict, key: str) -> tuple[object, str | int]:
    """The container holding ``key`` (``a.b[2].c``) and the last step into it."""
    steps: list[str | int] = []
    for part in key.split("."):
        name, *idx = part.split("[")
        steps += [name] + [int(i.rstrip("]")) for i in idx]
    node: object = data
    for s in steps[:-1]:
        node = node[s]  # type: ignore[index]
    return node, steps[-1]


def test_the_unchanged_document_is_accepted(good, tmp_path):
    assert read_manifest(_write(tmp_path, good)).files == good["files"]


@pytest.mark.parametrize("key", ["recipe", "tool_version", "parts[1].triangles", "pour.up",
                                 "checks[0].where_mm", "casting.portions[0].g",
                                 "casting.blend", "pressure.walls[0].margin", "print",
                                 "motion", "motion.at_working", "motion.points[3].angle_deg",
                                 "params", "files"])
def test_a_missing_key_is_refused_naming_it(good, tmp_path, key):
    data = copy.deepcopy(good)
    node, last = _at(data, key)
    del node[last]  # type: ignore[attr-defined]
    path = _write(tmp_path, data)
    e = _refusal(path)
    assert e.key == key
    assert str(e) == f"{path}: {key}: missing"


@pytest.mark.parametrize("key, value, says", [
    ("silicone_volume_mm3", "12 cm3", "expected a number, got '12 cm3'"),
    ("silicone_volume_mm3", True, "expected a number, got True"),
    ("parts[0].triangles", 5870.5, "expected an integer, got 5870.5"),
    ("parts[2].watertight", "yes", "expected true or false, got 'yes'"),
    ("parts[0].bbox_mm[1]", [1.0, 2.0], "expected a list of 3, got 2 items"),
    ("checks[1].severity", "fatal",
     "expected one of 'error', 'warning', 'info', got 'fatal'"),
    ("parting.chosen_by", "luck", "expected one of 'recipe', 'analysis', got 'luck'"),
    ("casting.portions", {"what": "A10 part A"}, "expected a list, got an object"),
    ("casting.portions[1].g", None, "expected a number, got None"),
    ("pressure.walls[0].limit_kpa", "high", "expected a number, got 'high'"),
    ("params.inlet.center_mm", [0.0], "expected a list of 2, got 1 items"),
    ("motion.kind", "twisting", "expected one of 'bending', 'extending', got 'twisting'"),
    ("motion.sections", 2.5, "expected an integer, got 2.5"),
    ("motion.points[0].pressure_kpa", "0 kPa", "expected a number, got '0 kPa'"),
    ("units", "in", "expected 'mm', got 'in'"),
    ("params_sha256", "abc", "expected 64 lower-case hex digits (SHA-256)"),
    ("files.cast.stl", "not a digest", "expected 64 lower-case hex digits (SHA-256)"),
])
def test_a_value_of_the_wrong_type_is_refused_naming_the_key(good, tmp_path, key, value,
                                                             says):
    data = copy.deepcopy(good)
    if key.startswith("files."):
        data["files"] = {key.removeprefix("files."): value}
    else:
        node, last = _at(data, key)
        node[last] = value  # type: ignore[index]
    path = _write(tmp_path, data)
    e = _refusal(path)
    assert (e.key, e.problem) == (key, says)
    assert str(e) == f"{path}: {key}: {says}"


def test_a_key_this_version_does_not_write_is_refused(good, tmp_path):
    data = dict(good, timings_s={"write": 0.1})
    e = _refusal(_write(tmp_path, data))
    assert (e.key, e.problem) == ("timings_s", "unexpected key")


def test_a_verdict_that_contradicts_the_checks_is_refused(good, tmp_path, finger):
    worst = str(verdict(finger.findings))
    data = dict(good, verdict="ok" if worst != "ok" else "error")
    e = _refusal(_write(tmp_path, data))
    assert e.key == "verdict" and f"the checks make it {worst!r}" in e.problem


@pytest.mark.parametrize("cut", [0.0, 0.5, 0.999])
def test_a_truncated_file_is_refused_as_not_json(good, tmp_path, cut):
    path = _write(tmp_path, good)
    text = path.read_bytes()
    path.write_bytes(text[:int(len(text) * cut)])
    e = _refusal(path)
    assert e.key == "" and e.problem.startswith("not valid JSON (truncated or damaged?)")
    assert str(e).startswith(f"{path}: not valid JSON")


def test_a_manifest_of_another_version_is_refused_unless_asked(good, tmp_path):
    path = _write(tmp_path, dict(good, tool_version="0.0.1"))
    e = _refusal(path)
    assert e.key == "tool_version"
    assert "'0.0.1'" in e.problem and __version__ in e.problem
    assert read_manifest(path, any_version=True).tool_version == "0.0.1"


def test_a_missing_file_or_a_document_that_is_not_an_object_is_refused(good, tmp_path):
    e = _refusal(tmp_path / MANIFEST_NAME)
    assert e.problem == "no such file"
    e = _refusal(_write(tmp_path, [good]))
    assert e.problem == "expected a JSON object"
