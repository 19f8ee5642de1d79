"""run(config) -> RunResult: the only place that orders the stages.

ingest -> enrich -> score -> analyse -> render. Each stage receives only its
own config section and returns new data; nothing here computes figures.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from reporter.config import Config
from reporter.enrich import enrich
from reporter.ingest import read_inputs
from reporter.records import IntakeResult


def run_intake(config: Config) -> IntakeResult:
    """Read and enrich the inputs; the intake log accounts for every record read."""
    intake = read_inputs(config.inputs, config.report.years, config.limits, config.base_dir)
    # Duplicates are found after reading every file, so the log can name the record kept instead.
    return enrich(intake, config.report, config.departments)


@dataclass(frozen=True)
class RunResult:
    intake: IntakeResult
    written: dict[str, Path] = field(default_factory=dict)  # label -> file written


def write_intake(config: Config, intake: IntakeResult) -> dict[str, Path]:
    """Write only the intake log (the `intake` command)."""
    from reporter.render.exports import write_intake_log

    path = write_intake_log(intake.log, config.output_dir)
    return {"intake log": path}
