"""Long stages of a run: one progress line as each starts, and the time each took.

A stage anywhere in the pipeline writes `with stage("pdf", "Laying out report.pdf"):`; the line
goes to the "reporter" logger at INFO (shown at default verbosity, hidden by -q), and the time is
added to the `StageTimes` that `timed_run` made active, if any. Names nest with "/" ("report/pdf"
inside "report"): a stage's time includes its inner stages'.
"""

from __future__ import annotations

import contextlib
import contextvars
import logging
import time
from typing import Iterator

LOG = logging.getLogger("reporter")

_ACTIVE: contextvars.ContextVar["StageTimes | None"] = contextvars.ContextVar("waymark_stage_times", default=None)
_PATH: contextvars.ContextVar[tuple[str, ...]] = contextvars.ContextVar("waymark_stage_path", default=())


class StageTimes:
    """Seconds per stage, in the order the stages first started."""

    def __init__(self) -> None:
        self.seconds: dict[str, float] = {}

    def add(self, name: str, seconds: float) -> None:
        self.seconds[name] = self.seconds.get(name, 0.0) + seconds


SUMMARY_PREFIX = "seconds per stage:"


def format_times(seconds: dict[str, float]) -> str:
    """One line, "seconds per stage: intake 1.23, intake/language 0.80, ...", for -v and the benchmark."""
    return " ".join([SUMMARY_PREFIX, ", ".join(f"{name} {value:.2f}" for name, value in seconds.items())])


@contextlib.contextmanager
def timed_run() -> Iterator[StageTimes]:
    """Collect the times of the stages run inside the block."""
    times = StageTimes()
    token = _ACTIVE.set(times)
    try:
        yield times
    finally:
        _ACTIVE.reset(token)


@contextlib.contextmanager
def stage(name: str, line: str | None = None) -> Iterator[None]:
    """Announce the stage (when `line` is given) and time it into the active StageTimes."""
    if line:
        LOG.info("%s", line)
    path = (*_PATH.get(), name)
    times = _ACTIVE.get()
    if times is not None:
        times.seconds.setdefault("/".join(path), 0.0)  # listed in the order the stages start
    token = _PATH.set(path)
    began = time.perf_counter()
    try:
        yield
    finally:
        _PATH.reset(token)
        if times is not None:
            times.add("/".join(path), time.perf_counter() - began)
