"""The sweep's progress display: plain lines without control codes where nobody watches a
terminal (a CI log, a pipe), a live bar where someone does. No CAD work: outcomes are made
by hand.

ESC (0x1b) starts every ANSI/ECMA-48 control sequence (ECMA-48, 5th ed., section 5.3), so
"no ESC character" means "no colour, no cursor movement"."""

from __future__ import annotations

import io

import pytest

from soft_molds.sweep import Outcome, Progress, Status

ESC = "\x1b"


def _outcomes() -> list[Outcome]:
    return [Outcome("cushion-sweep", "A", "f", Status.UP_TO_DATE),
            Outcome("cushion-sweep", "B", "f", Status.BUILT, seconds=2.5),
            Outcome("cushion-sweep", "C", "f", Status.FAILED, reason="kernel: no solid",
                    seconds=1.0)]


class FakeTerminal(io.StringIO):
    """A stream that says it is a terminal."""

    def isatty(self) -> bool:
        return True


@pytest.mark.parametrize("forced", ["", "1"])
def test_a_non_terminal_gets_one_plain_line_per_finished_variant(monkeypatch, forced):
    # FORCE_COLOR is rich's documented switch for colour in pipes; the stream decides here.
    monkeypatch.setenv("FORCE_COLOR", forced)
    monkeypatch.delenv("TTY_COMPATIBLE", raising=False)
    out = io.StringIO()
    with Progress(3, stream=out) as prog:
        prog.step(_outcomes()[0])
        prog.start_work()
        for o in _outcomes()[1:]:
            prog.step(o)
        print("interrupted: a note", file=prog.stream)
    text = out.getvalue()
    assert ESC not in text and "\r" not in text
    lines = text.splitlines()
    assert len(lines) == 4  # three variants and the note
    assert lines[0].startswith("1/3 cushion-sweep A up to date (0.0 s)")
    assert lines[1].startswith("2/3 cushion-sweep B built (2.5 s)")
    assert lines[2].startswith("3/3 cushion-sweep C failed: kernel: no solid (1.0 s)")
    assert lines[2].endswith("left 0:00:00")
    assert lines[3] == "interrupted: a note"


def test_the_time_left_counts_built_variants_only():
    out = io.StringIO()
    prog = Progress(4, stream=out)
    prog.step(_outcomes()[0])  # up to date: costs nothing, sets no rate
    prog.start_work()
    prog.first_work = prog.first_work - 60.0  # as if the first build took a minute
    prog.step(_outcomes()[1])
    # 60 s for one built variant, two left: about 2 minutes (the rate excludes A).
    assert out.getvalue().splitlines()[1].endswith("left 0:02:00")


def test_a_terminal_gets_a_live_bar_that_is_closed_after_the_last_variant():
    term = FakeTerminal()
    prog = Progress(3, stream=term)
    prog.start_work()
    assert prog.stream is not term  # notes go above the live bar
    for o in _outcomes():
        prog.step(o)
    assert prog.stream is term  # the bar stopped by itself after 3 of 3
    text = term.getvalue()
    assert ESC in text  # cursor control: the bar is redrawn in place
    for label in "ABC":
        assert f"cushion-sweep {label}" in text
    assert "3/3" in text


def test_closing_an_interrupted_terminal_display_restores_the_stream():
    term = FakeTerminal()
    with Progress(3, stream=term) as prog:
        prog.start_work()
        prog.step(_outcomes()[1])
    assert prog.stream is term
    prog.close()  # idempotent
