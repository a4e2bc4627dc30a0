"""Kernel and mesh failures: named, typed, and nothing half-written."""

from __future__ import annotations

import pytest

from soft_molds import GeometryError, MeshIntegrityError, build
from soft_molds.cli import main
from soft_molds.recipe import load_recipe

RECIPE = "recipes/stem-cushion.yaml"


def test_every_final_solid_passes_occt_validity(cushion):
    for part in cushion.parts:
        assert part.brep.isValid(), part.name
        assert len(part.brep.Solids()) == 1, part.name


def test_a_kernel_failure_names_the_variant_and_the_step(monkeypatch):
    from soft_molds.geometry import kernel

    real = kernel.cq.Shape._bool_op

    def broken_split(self, args, tools, op, parallel=True):
        if isinstance(op, kernel.BRepAlgoAPI_Splitter):
            raise RuntimeError("Standard_ConstructionError (simulated)")
        return real(self, args, tools, op, parallel)

    monkeypatch.setattr(kernel.cq.Shape, "_bool_op", broken_split)
    with pytest.raises(GeometryError) as err:
        build(load_recipe(RECIPE))
    text = str(err.value)
    assert "variant A" in text and "split at parting plane" in text and "simulated" in text


def test_build_command_exits_1_and_writes_nothing_when_the_kernel_fails(
        monkeypatch, tmp_path, capsys):
    from soft_molds.geometry import kernel

    def invalid(_self):
        return False

    monkeypatch.setattr(kernel.cq.Shape, "isValid", invalid)
    out = tmp_path / "out"
    assert main(["build", RECIPE, "--out", str(out)]) == 1
    err = capsys.readouterr().err
    assert "geometry failed" in err and "Traceback" not in err
    assert not out.exists() or not any(out.rglob("*"))


def test_check_command_exits_1_when_a_mesh_fails_its_integrity_check(monkeypatch, capsys):
    from soft_molds import pipeline
    from soft_molds.analysis.integrity import check_mesh

    def strict(mesh, part, brep_volume_mm3=None, **kw):
        # Pretend the BRep is 1 % larger than it is: the 0.5 % gate must trip.
        return check_mesh(mesh, part, brep_volume_mm3 * 1.01, **kw)

    monkeypatch.setattr(pipeline, "check_mesh", strict)
    assert main(["check", RECIPE]) == 1
    out = capsys.readouterr().out
    assert "FAIL" in out and "differs from BRep volume" in out


def test_mesh_integrity_error_is_a_soft_molds_error():
    from soft_molds import SoftMoldsError

    assert issubclass(MeshIntegrityError, SoftMoldsError)
    assert issubclass(GeometryError, SoftMoldsError)
