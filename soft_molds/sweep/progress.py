"""The sweep's progress display: one line per finished variant with a bar, the time
spent and an estimate of the time left."""

from __future__ import annotations

import sys
import time
from typing import Protocol, TextIO

from .outcome import Outcome, Status


class ProgressSink(Protocol):
    """Anything the sweep can report to: ``step`` once per finished variant, and a text
    ``stream`` for the odd note (an interruption)."""

    stream: TextIO

    def step(self, o: Outcome) -> None: ...


class Progress:
    """One line per finished variant. The rate counts built variants only, from when
    building starts: up-to-date ones cost nothing and would make a resumed night look
    nearly finished."""

    def __init__(self, total: int, stream: TextIO | None = None) -> None:
        self.total, self.done, self.worked = total, 0, 0
        self.start = time.perf_counter()
        self.first_work: float | None = None
        self.stream: TextIO = stream if stream is not None else sys.stderr

    def start_work(self) -> None:
        """Building starts now (after the up-to-date variants were listed)."""
        self.first_work = time.perf_counter()

    def step(self, o: Outcome) -> None:
        now = time.perf_counter()
        self.done += 1
        if o.status != Status.UP_TO_DATE:
            self.worked += 1
            if self.first_work is None:
                self.first_work = self.start
        left = self.total - self.done
        eta = ((now - self.first_work) / self.worked * left
               if self.worked and self.first_work is not None else 0.0)
        width = 20
        fill = round(width * self.done / max(self.total, 1))
        bar = "#" * fill + "." * (width - fill)
        what = o.status if not o.reason else f"{o.status}: {o.reason[:60]}"
        print(f"[{bar}] {self.done}/{self.total} {o.recipe} {o.label} {what} "
              f"({o.seconds:.1f} s) elapsed {clock(now - self.start)} left {clock(eta)}",
              file=self.stream, flush=True)


def clock(s: float) -> str:
    """Seconds as h:mm:ss."""
    n = int(round(s))
    return f"{n // 3600}:{n % 3600 // 60:02d}:{n % 60:02d}"
