"""Send a built mold set to the CAD library's optional viewer (the ``viewer`` extra).

The viewer is another process (an editor pane or a browser page) that takes the kernel's
solids; nothing is written to disk. Parts keep the world frame of the build (mm, x along
the body from the inlet face, z up in pour orientation) and are coloured by role as in the
pictures of the mold.
"""

from __future__ import annotations

import importlib
from collections.abc import Sequence
from types import ModuleType

from ..constants import ROLE_COLOURS
from ..errors import SoftMoldsError

#: The module of the optional viewer; installed with ``pip install -e ".[viewer]"``.
VIEWER_MODULE = "ocp_vscode"
OTHER_COLOUR = "#b0b0b0"


class ViewerMissing(SoftMoldsError):
    """The optional viewer is not installed."""


def viewer() -> ModuleType:
    """The viewer module, or :class:`ViewerMissing` saying how to install it."""
    try:
        return importlib.import_module(VIEWER_MODULE)
    except ImportError as exc:
        raise ViewerMissing(f"the optional viewer ({VIEWER_MODULE}) is not installed: "
                            "install it with .venv/bin/pip install -e \".[viewer]\" and "
                            "start it as its documentation says") from exc


def send_to_viewer(parts: Sequence[tuple[str, str, object]]) -> int:
    """Show ``parts`` (name, role, the kernel's solid) in the viewer; returns how many."""
    mod = viewer()
    mod.show(*[solid for _, _, solid in parts], names=[name for name, _, _ in parts],
             colors=[ROLE_COLOURS.get(role, OTHER_COLOUR) for _, role, _ in parts])
    return len(parts)
