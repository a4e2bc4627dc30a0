"""The sweep's progress display: one line per finished variant with the time spent and an
estimate of the time left; on a terminal, a live bar under those lines as well.

The bar is drawn by ``rich``. On anything that is not a terminal (a CI log, a pipe, a
file) the output is plain text, one line per finished variant, without control codes.
"""

from __future__ import annotations

import sys
import time
from types import TracebackType
from typing import Protocol, TextIO, cast

from rich.console import Console
from rich.file_proxy import FileProxy
from rich.progress import BarColumn, MofNCompleteColumn, TaskID, TextColumn, TimeElapsedColumn
from rich.progress import Progress as Bar

from .outcome import Outcome, Status


class ProgressSink(Protocol):
    """Anything the sweep can report to: ``step`` once per finished variant, and a text
    ``stream`` for the odd note (an interruption)."""

    stream: TextIO

    def step(self, o: Outcome) -> None: ...


class Progress:
    """One line per finished variant. The rate counts built variants only, from when
    building starts: up-to-date ones cost nothing and would make a resumed night look
    nearly finished.

    On a terminal the bar is live from the start of building until the last variant
    (or ``close``);
    use the object as a context manager so an interrupted run restores the cursor.
    While the bar is live, ``stream`` prints above it rather than through it."""

    def __init__(self, total: int, stream: TextIO | None = None) -> None:
        self.total, self.done, self.worked = total, 0, 0
        self.start = time.perf_counter()
        self.first_work: float | None = None
        self._raw: TextIO = stream if stream is not None else sys.stderr
        self.stream: TextIO = self._raw
        # Colour and cursor movement only where a person watches: decided by the stream
        # alone, so a forced-colour setting in a CI log or pipe still gets plain lines.
        self._console = Console(file=self._raw, highlight=False,
                                force_terminal=is_terminal(self._raw))
        self._bar: Bar | None = None
        self._task = TaskID(0)

    def __enter__(self) -> Progress:
        return self

    def __exit__(self, kind: type[BaseException] | None, exc: BaseException | None,
                 tb: TracebackType | None) -> None:
        self.close()

    def start_work(self) -> None:
        """Building starts now (after the up-to-date variants were listed)."""
        self.first_work = time.perf_counter()
        if self._console.is_terminal and self.done < self.total:
            self._live_bar()  # shown while the first variant builds

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
        what = o.status if not o.reason else f"{o.status}: {o.reason[:60]}"
        line = (f"{self.done}/{self.total} {o.recipe} {o.label} {what} "
                f"({o.seconds:.1f} s) elapsed {clock(now - self.start)} left {clock(eta)}")
        if not self._console.is_terminal:
            print(line, file=self._raw, flush=True)
            return
        bar = self._live_bar()
        bar.console.print(line, markup=False, highlight=False)
        bar.update(self._task, completed=self.done, left=clock(eta))
        if self.done >= self.total:
            self.close()

    def close(self) -> None:
        """Stop the live bar (if any), leaving it drawn at its last state. Idempotent."""
        if self._bar is not None:
            self._bar.stop()
            self._bar = None
            self.stream = self._raw

    def _live_bar(self) -> Bar:
        if self._bar is None:
            self._bar = Bar(TextColumn("sweep"), BarColumn(), MofNCompleteColumn(),
                            TextColumn("elapsed"), TimeElapsedColumn(),
                            TextColumn("left {task.fields[left]}"),
                            console=self._console, redirect_stderr=True)
            self._task = self._bar.add_task("sweep", total=self.total, completed=0,
                                            left="-:--:--")
            self._bar.start()
            # Notes (an interruption) go above the bar, not through it.
            self.stream = cast(TextIO, FileProxy(self._console, self._raw))
        return self._bar


def is_terminal(stream: TextIO) -> bool:
    """Whether ``stream`` is a terminal a person watches (not a log, pipe or file)."""
    try:
        return stream.isatty()
    except (AttributeError, ValueError):  # no isatty, or a closed stream
        return False


def clock(s: float) -> str:
    """Seconds as h:mm:ss."""
    n = int(round(s))
    return f"{n // 3600}:{n % 3600 // 60:02d}:{n % 60:02d}"
