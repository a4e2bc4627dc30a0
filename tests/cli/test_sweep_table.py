"""The sweep's morning table on stdout: fixed-width plain text in a log or pipe (no
control codes: ESC starts every ECMA-48 control sequence, ECMA-48 5th ed. section 5.3),
a drawn table on a terminal. Outcomes are made by hand: no CAD work."""

from __future__ import annotations

import io

from soft_molds.cli import print_sweep_table
from soft_molds.sweep import Outcome, Status

OUTCOMES = [
    Outcome("cushion-sweep", "A", "f", Status.BUILT, verdict=None, seconds=12.34,
            silicone_cm3=3.456, mix_g=4.2, extension_mm=1.234,
            changed={"voids[0].diameter_mm": 3}),
    Outcome("cushion-sweep", "B", "f", Status.FAILED, reason="kernel: no solid"),
]


class FakeTerminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_a_pipe_gets_fixed_width_plain_rows_without_control_codes():
    out = io.StringIO()
    print_sweep_table(OUTCOMES, out)
    lines = out.getvalue().splitlines()
    assert "\x1b" not in out.getvalue()
    assert lines == [
        "recipe             label  status      checks    silicone   mix g    motion      s"
        "  changed / reason",
        "cushion-sweep      A      built       -         3.46 cm3     4.2   1.23 mm   12.3"
        "  voids[0].diameter_mm=3",
        "cushion-sweep      B      failed      -                -       -         -    0.0"
        "  kernel: no solid",
    ]


def test_a_terminal_gets_a_drawn_table_with_every_row():
    out = FakeTerminal()
    print_sweep_table(OUTCOMES, out)
    text = out.getvalue()
    assert "\x1b[" in text  # the heading is set in bold
    for cell in ("3.46 cm3", "1.23 mm", "voids[0].diameter_mm=3", "kernel: no solid"):
        assert cell in text
    assert len(text.splitlines()) == 3  # heading and one row per variant
