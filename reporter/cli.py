"""The `waymark` command line. Thin: load config, run the pipeline, print a summary.

Results go to stdout, progress and logs to stderr. Exit 0 done, 1 a problem the
user can fix (printed as Problem lines), 2 usage. Anything else is a bug and
keeps its traceback.
"""

from __future__ import annotations

import logging
from pathlib import Path

import click

from reporter import __version__
from reporter.errors import ReporterError


def _fail(error: ReporterError) -> None:
    raise click.ClickException(str(error))


def _setup_logging(verbose: int, quiet: bool) -> None:
    """The console for this command (see reporter/console.py), put back when the command ends."""
    from reporter.console import console

    click.get_current_context().with_resource(console(verbose, quiet))
    # bibtexparser logs every failed block with 0-based lines; the intake log already lists them, 1-based.
    logging.getLogger("bibtexparser").setLevel(logging.ERROR)


def _with_execution(config, execution: str | None, scheduler: str | None):
    """The config with --execution/--scheduler applied (unset options never override), validated again."""
    from pydantic import ValidationError

    updates = {k: v for k, v in (("execution", execution), ("scheduler", scheduler)) if v is not None}
    if not updates:
        return config
    try:
        score_cfg = type(config.score).model_validate({**dict(config.score), **updates})
    except ValidationError as exc:
        messages = (f"score.{e['loc'][0]}: {e['msg'].removeprefix('Value error, ')}" for e in exc.errors())
        raise click.UsageError("; ".join(messages)) from None
    if scheduler is not None and score_cfg.execution != "dask":
        raise click.UsageError("--scheduler needs --execution dask (or score.execution = \"dask\")")
    return config.model_copy(update={"score": score_cfg})


@click.group()
@click.version_option(__version__, prog_name="waymark")
def main() -> None:
    """Waymark: goal-alignment reports from a publication list."""
    _skip_the_last_collection()


_EXIT_HOOK: list[bool] = []


def _skip_the_last_collection() -> None:
    """At interpreter exit, leave the objects a command made out of the final cycle collection.

    Everything a build held would otherwise be walked once more after its work is done (about a
    second, bench/README.md). The outputs are written and closed by then; the system frees the memory.
    """
    if not _EXIT_HOOK:
        import atexit
        import gc

        atexit.register(gc.freeze)
        _EXIT_HOOK.append(True)


@main.command()
@click.argument("config_path", metavar="CONFIG", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", type=click.Path(path_type=Path), default=None, help="Output folder (overrides report.output).")
@click.option("-v", "--verbose", count=True, help="More detail on stderr.")
@click.option("-q", "--quiet", is_flag=True, help="No progress bars; warnings only.")
def intake(config_path: Path, out_dir: Path | None, verbose: int, quiet: bool) -> None:
    """Check the config and inputs, print the intake summary, write intake-log.csv beside the config or into --out (no model)."""
    from reporter.config import load_config
    from reporter.pipeline import check_intake, run_intake, write_intake
    from reporter.summary import format_intake_summary

    _setup_logging(verbose, quiet)
    try:
        config = load_config(config_path, output=out_dir)
        result = run_intake(config)
        written = write_intake(config, result, config.output_dir if out_dir is not None else None)
    except ReporterError as error:
        _fail(error)
    click.echo(format_intake_summary(result))
    for label, path in written.items():
        click.echo(f"{label}: {path}")
    try:
        check_intake(config, result)  # what `build` would refuse, said here too
    except ReporterError as error:
        _fail(error)


@main.command()
@click.argument("config_path", metavar="CONFIG", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", type=click.Path(path_type=Path), default=None, help="Output folder (overrides report.output).")
@click.option("--sentences", is_flag=True, help="Also export per-sentence scores (data/sentences.csv).")
@click.option("--review-worksheet", is_flag=True,
              help="Also write review-worksheet.csv: borderline pairs near the threshold, for people to decide.")
@click.option("--briefs/--no-briefs", default=None,
              help="Also write one department brief per department into briefs/ (overrides report.briefs).")
@click.option("--threads", type=click.IntRange(min=1), default=None,
              help="CPU threads for the model (overrides score.threads; all cores when both are unset).")
@click.option("--execution", type=click.Choice(["local", "dask"]), default=None,
              help="Score in this process or on a Dask cluster (overrides score.execution).")
@click.option("--scheduler", metavar="ADDR", default=None,
              help="Dask scheduler address such as tcp://host:8786 (overrides score.scheduler).")
@click.option("-v", "--verbose", count=True, help="More detail on stderr.")
@click.option("-q", "--quiet", is_flag=True, help="No progress bars; warnings only.")
def build(config_path: Path, out_dir: Path | None, sentences: bool, review_worksheet: bool, briefs: bool | None,
          threads: int | None, execution: str | None, scheduler: str | None, verbose: int, quiet: bool) -> None:
    """Run the whole job: intake, scoring, analysis, report (HTML + PDF), exports, manifest."""
    from reporter.config import load_config
    from reporter.pipeline import run
    from reporter.summary import format_intake_summary

    _setup_logging(verbose, quiet)
    try:
        config = load_config(config_path, output=out_dir)
        if threads is not None:
            config = config.model_copy(update={"score": config.score.model_copy(update={"threads": threads})})
        config = _with_execution(config, execution, scheduler)
        if briefs is not None:
            config = config.model_copy(update={"report": config.report.model_copy(update={"briefs": briefs})})
        result = run(config, show_progress=not quiet, keep_sentences=sentences, review_worksheet=review_worksheet)
    except ReporterError as error:
        _fail(error)
    click.echo(format_intake_summary(result.intake))
    stats = result.scores.stats
    noun = config.report.nouns.plural
    click.echo(
        f"Scored {stats['n_records']} {noun} ({stats['n_sentences']} sentences, "
        f"{stats['n_encoded']} embedded, {stats['n_cache_hits']} from the cache; "
        f"{stats.get('n_records_reused', 0)} {noun}' results reused from an earlier run)."
    )
    click.echo(f"Written to {config.output_dir}:")
    for label, path in result.written.items():
        if not label.startswith("briefs/"):
            click.echo(f"  {label}: {path}")
    if result.briefs is not None:
        from reporter.render.briefs import briefs_summary

        click.echo(briefs_summary(result.briefs, config.output_dir))
    for path in result.removed:
        click.echo(f"  removed (from an earlier build, not made this time): {path}")
    if verbose:
        from reporter.stages import LOG, format_times

        LOG.info("%s", format_times(result.timings))


@main.command("check-labels")
@click.argument("config_path", metavar="CONFIG", type=click.Path(path_type=Path))
@click.option("--out", "out_dir", type=click.Path(path_type=Path), default=None, help="Output folder (overrides report.output).")
@click.option("--write-thresholds", "thresholds_path", type=click.Path(path_type=Path), default=None,
              help="Where to write the recommended thresholds CSV (default: OUT/recommended-thresholds.csv).")
@click.option("-q", "--quiet", is_flag=True, help="No progress bars; warnings only.")
def check_labels(config_path: Path, out_dir: Path | None, thresholds_path: Path | None, quiet: bool) -> None:
    """Score the labelled sample, compare with its labels, recommend per-goal thresholds."""
    from reporter.analyse.validation import format_validation
    from reporter.config import load_config
    from reporter.pipeline import check_labels as run_check

    _setup_logging(0, quiet)
    try:
        config = load_config(config_path, output=out_dir)
        validation, written = run_check(config, thresholds_path, show_progress=not quiet)
    except ReporterError as error:
        _fail(error)
    click.echo(format_validation(validation))
    for label, path in written.items():
        click.echo(f"{label}: {path}")
