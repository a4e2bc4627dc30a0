"""`soft-molds show`: one variant's parts go to the optional viewer, coloured by role; a
missing viewer is said before anything is built. The viewer itself is replaced by a
recording stand-in (its real display needs an editor or browser)."""

from __future__ import annotations

import sys
import types

from conftest import recipe_path

from soft_molds.cli import main
from soft_molds.constants import ROLE_COLOURS


def test_show_sends_every_part_named_and_coloured_by_role(monkeypatch, capsys):
    calls = []
    fake = types.ModuleType("ocp_vscode")
    fake.show = lambda *objs, **kw: calls.append((objs, kw))  # type: ignore[attr-defined]
    monkeypatch.setitem(sys.modules, "ocp_vscode", fake)
    assert main(["show", str(recipe_path("stem-cushion"))]) == 0
    (objs, kw), = calls
    assert kw["names"] == ["shell-lower", "shell-upper", "core", "cast"]
    roles = ["shell", "shell", "core", "cast"]
    assert kw["colors"] == [ROLE_COLOURS[r] for r in roles]
    # the kernel's solids themselves, with their exact volumes (positive, one per part)
    assert len(objs) == 4 and all(o.Volume() > 0 for o in objs)
    assert "sent 4 parts to the viewer" in capsys.readouterr().out


def test_a_missing_viewer_is_said_before_any_build(monkeypatch, capsys, no_cad_work):
    monkeypatch.setitem(sys.modules, "ocp_vscode", None)  # import raises ImportError
    assert main(["show", str(recipe_path("stem-cushion"))]) == 1
    err = capsys.readouterr().err
    assert "the optional viewer (ocp_vscode) is not installed" in err
    assert '.[viewer]' in err and "Traceback" not in err
