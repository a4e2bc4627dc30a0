"""Overnight sweeps: build, check and write every variant of one or more recipes in a
pool of worker processes (or on a Dask cluster), resume an interrupted run, and leave a
morning report.

- ``plan``: the tasks, one per variant; two files writing one folder are refused.
- ``cache``: a variant whose manifest matches its parameter hash and tool version, and
  whose files all carry the recorded digests, is up to date and not built again.
- ``executors``: where variants run (:class:`ProcessPool`, :class:`DaskCluster`).
- ``runner``: one variant: build, refuse an error-level mold set unless forced, write.
- ``progress``: a line per finished variant (and a live bar on a terminal); ``driver``:
  the whole sweep.
- The report is written by :mod:`soft_molds.export.reports` (re-exported here).

Outputs are byte-identical whatever the number of workers: each variant is built alone,
from its recipe only.
"""

from ..export.reports import write_reports
from .cache import up_to_date
from .driver import run_sweep
from .executors import DEFAULT_RECYCLE_AFTER, DaskCluster, Executor, Job, ProcessPool, make_executor
from .outcome import Outcome, Status, Worker
from .plan import SweepInputError, Task, output_dir, plan_tasks
from .progress import Progress, ProgressSink
from .runner import run_variant

__all__ = [
    "DEFAULT_RECYCLE_AFTER", "DaskCluster", "Executor", "Job", "Outcome", "ProcessPool",
    "Progress", "ProgressSink", "Status", "SweepInputError", "Task", "Worker",
    "make_executor", "output_dir", "plan_tasks", "run_sweep", "run_variant", "up_to_date",
    "write_reports",
]
