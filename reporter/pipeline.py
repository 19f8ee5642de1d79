"""run(config) -> RunResult: the only place that orders the stages.

ingest -> enrich -> score -> analyse -> render. Each stage receives only its
own config section and returns new data; nothing here computes figures.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from reporter.config import Config, intake_problems
from reporter.enrich import enrich
from reporter.errors import Problem, ReporterError
from reporter.ingest import read_inputs
from reporter.ingest.portfolio import conversion_for, funding_problems
from reporter.records import IntakeResult
from reporter.stages import stage, timed_run


def run_intake(config: Config, remember_languages: bool = False) -> IntakeResult:
    """Read and enrich the inputs; the intake log accounts for every record read.

    With `remember_languages`, language detection results and LaTeX decodings are read from and
    kept in the score cache's file (when the cache is used), so a rebuild of the same list detects
    and decodes nothing again. The intake check leaves it off: it writes nothing but its log.
    """
    from reporter.ingest.latex_memo import remembered_latex

    n_files = len(config.inputs)
    with stage("intake", f"Reading {n_files} input file{'s' if n_files != 1 else ''}"):
        with remembered_latex(_memo_file(config, remember_languages)):
            intake = read_inputs(config.inputs, config.report.years, config.limits, config.base_dir,
                                 default_currency=config.funding.base_currency)
        with _language_memo(config, remember_languages) as memo:
            # Duplicates are found after reading every file, so the log can name the record kept instead.
            return enrich(intake, config.report, config.departments, languages=memo)


def _memo_file(config: Config, wanted: bool) -> Path | None:
    """The score cache's file when intake may keep its results there, else None."""
    return config.score.cache if wanted and config.score.use_cache else None


def _language_memo(config: Config, wanted: bool):
    import contextlib

    path = _memo_file(config, wanted)
    if path is None:
        return contextlib.nullcontext()
    from reporter.enrich.language import default_detector_key
    from reporter.enrich.language_memo import LanguageMemo

    return LanguageMemo(path, default_detector_key())


@dataclass(frozen=True)
class RunResult:
    intake: IntakeResult
    written: dict[str, Path] = field(default_factory=dict)  # label -> file written
    scores: object = None  # score.Scores
    findings: object = None  # analyse.Findings
    removed: tuple[Path, ...] = ()  # files of an earlier build in the output folder that this one did not write
    briefs: object = None  # analyse.departments.DepartmentSplit, when department briefs were written
    timings: dict[str, float] = field(default_factory=dict)  # seconds per stage (reporter/stages.py)


def check_intake(config: Config, intake: IntakeResult) -> None:
    """Raise when an input yielded no record or a year in scope has no kept publication (see `intake_problems`)."""
    years = set(intake.records["year"].dropna().astype(int)) if len(intake.records) else set()
    problems = intake_problems(config, years & set(config.report.years), len(intake.records), intake.files)
    # A portfolio's currencies are known only now; several without a conversion table stop the build here.
    problems += funding_problems(config, intake.records, config.report.nouns.plural)
    if problems:
        raise ReporterError(problems)
    _parse_what_the_report_reads(config, intake)


def _parse_what_the_report_reads(config: Config, intake: IntakeResult) -> None:
    """Theme, review file and labelled sample, parsed now as the build will later: a mistake in them
    is found by `intake` and before the model loads, not after scoring."""
    from reporter.render.themes import load_theme
    from reporter.score.framework import load_framework

    load_theme(config.report.theme)
    validation = config.validation
    if validation.review_file is None and validation.labelled_sample is None:
        return
    codes = load_framework(config.score.framework).goal_codes
    if validation.review_file is not None:
        from reporter.score.review import read_review_file

        read_review_file(validation.review_file, intake.records["record_id"], codes)
    if validation.labelled_sample is not None:
        _labelled_sample(config, intake, codes)


def write_intake(config: Config, intake: IntakeResult, folder: Path | None = None) -> dict[str, Path]:
    """Write only the intake log (the `intake` command): into `folder` (--out), else beside the config.

    Never into the configured output folder: a built report there lists its own intake log in its
    manifest, and a check of other inputs must not replace it. A `folder` holding a built report
    (its manifest.json) is refused for the same reason.
    """
    from reporter.render.exports import write_intake_log

    target = folder if folder is not None else config.base_dir
    if (target / "manifest.json").exists():
        raise ReporterError(Problem(config.config_path, None, "--out", (
            f"{target} holds a built report (manifest.json); the intake check does not write into it: "
            "choose another --out, or leave --out out to write the log beside the config"
        )))
    return {"intake log": write_intake_log(intake.log, target)}


def run(config: Config, show_progress: bool = True, keep_sentences: bool = False,
        review_worksheet: bool = False) -> RunResult:
    """The whole job: intake, enrichment, scoring, analysis, rendering (and the review worksheet if asked)."""
    import dataclasses

    with timed_run() as times:
        result = _run(config, show_progress, keep_sentences, review_worksheet)
    return dataclasses.replace(result, timings=dict(times.seconds))


def _run(config: Config, show_progress: bool, keep_sentences: bool, review_worksheet: bool) -> RunResult:
    import datetime as dt

    from reporter.analyse import analyse
    from reporter.render import RenderInputs, render
    from reporter.score import load_scoring_parts, score

    started = dt.datetime.now(dt.timezone.utc).replace(microsecond=0)
    intake = run_intake(config, remember_languages=True)
    # Before the model loads: an input that gave nothing is a lost file, and a year with nothing in
    # it would compare as "no change" or a fall to 0%.
    check_intake(config, intake)
    # Scores are computed for every kept record of every year in one run, with one model,
    # framework and threshold: that is what makes year-on-year changes like-for-like.
    with stage("model"):
        parts = load_scoring_parts(config.score)
    n_records = len(intake.records)
    with stage("score", f"Scoring {n_records} publication{'s' if n_records != 1 else ''}"):
        try:
            if config.score.execution == "dask":
                # Same score() per partition on the cluster's workers; the table comes back in record order.
                from reporter.score.distributed import score_on_dask

                scores = score_on_dask(
                    intake.records, parts, config.score,
                    keep_sentences=keep_sentences or review_worksheet, show_progress=show_progress,
                )
            else:
                scores = score(
                    intake.records, parts.framework, parts.embedder, config.score, cache=parts.cache,
                    thresholds=parts.thresholds, keep_sentences=keep_sentences or review_worksheet,
                    show_progress=show_progress,
                )
        finally:
            parts.close()
    goals = tuple((goal.code, goal.short_title) for goal in parts.framework.goals)
    # Reviewers overrule the machine before any figure is computed; validation below still
    # measures the machine's own decisions, since that is what its error rates describe.
    decided, overrides = _apply_review(config, intake, scores)
    general_mentions = scores.general_mentions.set_index("record_id")["n_general_mentions"]
    with stage("analyse"):
        findings = analyse(
            intake.records, decided, goals, config.analysis,
            config.report.reporting_year, config.report.comparison_years,
            scores.thresholds, scores.policy,
            general_mentions=general_mentions,
            conversion=conversion_for(config, intake.records), funding=config.funding, noun=config.report.nouns,
        )
        findings = _with_human_judgement(config, intake, scores, findings, overrides)
    framework_info = parts.framework_info()
    model_info = parts.model_info()
    score_settings = {
        "threshold": config.score.threshold,
        "thresholds": scores.thresholds,
        "policy": scores.policy,
        "text_fields": list(config.score.text_fields),
        "method": scores.method,
    }
    manifest = _manifest(config, intake, scores, framework_info, model_info, score_settings, findings, started)
    inputs = RenderInputs(
        findings=findings, records=intake.records, scores=decided, intake_log=intake.log,
        goals=goals, framework_info=framework_info, model_info=model_info,
        score_settings=score_settings, manifest=manifest, generated_at=started.isoformat(),
    )
    from reporter.render.manifest import previous_outputs, remove_stale_outputs

    # The optional extras go in first, so the manifest lists them; what an earlier build listed and
    # this one did not write is removed at the end, so the folder matches its manifest.
    previous = previous_outputs(config.output_dir)
    extras: dict[str, Path] = {}
    if review_worksheet:
        extras.update(_write_review_worksheet(config, intake, scores))
    briefs = None
    if config.report.briefs:
        from reporter.analyse.departments import department_findings
        from reporter.render.briefs import write_briefs

        # The analyse stage once more per department, with the main run's years, thresholds and policy.
        briefs = department_findings(intake.records, decided, goals, config.analysis, findings,
                                     general_mentions=general_mentions)
        extras.update(write_briefs(briefs, inputs, config.report, config.output_dir, show_progress=show_progress))
    if keep_sentences and scores.sentences is not None:
        from reporter.render.exports import write_csv

        path = config.output_dir / "data" / "sentences.csv"
        extras["data/sentences.csv"] = write_csv(scores.sentences, path, root=config.output_dir)
    cache = config.score.cache if config.score.use_cache else None  # also keeps drawn charts
    with stage("report"):
        written = {**render(inputs, config.report, config.output_dir, extra_outputs=extras, cache=cache), **extras}
    removed = remove_stale_outputs(config.output_dir, previous, written)
    return RunResult(intake=intake, written=written, scores=scores, findings=findings, removed=tuple(removed),
                     briefs=briefs)


def _apply_review(config: Config, intake: IntakeResult, scores):
    """The score table after the review file's decisions, and the overrides (None without a review file)."""
    if config.validation.review_file is None:
        return scores.table, None
    from reporter.score.review import apply_review, read_review_file

    review = read_review_file(config.validation.review_file, intake.records["record_id"], tuple(scores.thresholds))
    return apply_review(scores.table, review)


def _write_review_worksheet(config: Config, intake: IntakeResult, scores) -> dict[str, Path]:
    """review-worksheet.csv: the machine's borderline pairs with their evidence, for people to decide."""
    from reporter.render.worksheet import write_worksheet
    from reporter.score.review import borderline_pairs

    # Pairs below the threshold have no evidence in the score table; the per-sentence
    # scores (kept for this) supply their best sentence.
    sheet = borderline_pairs(scores.table, intake.records, scores.thresholds, sentences=scores.sentences)
    return write_worksheet(sheet, config.output_dir)


def _with_human_judgement(config: Config, intake: IntakeResult, scores, findings, overrides):
    """Findings plus, where configured, validation on the labelled sample, corrected shares and review counts."""
    import dataclasses

    import numpy as np

    extra = dict(findings.extra)
    if overrides is not None:
        from reporter.score.review import review_summary

        extra["review"] = review_summary(overrides)
        extra["overrides"] = overrides
    if config.validation.labelled_sample is not None:
        from reporter.analyse.correction import EXPLANATION, correct_shares

        validation = validate_run(config, intake, scores)
        extra["validation"] = validation.to_dict()
        # Apparent shares from the machine decisions the error rates were measured on.
        machine = scores.table[scores.table["record_id"].isin(intake.records["record_id"])]
        shares = machine.groupby("goal", sort=False).agg(n=("is_aligned", "size"), n_aligned=("is_aligned", "sum"))
        shares = shares.reindex(list(scores.thresholds)).reset_index()
        rng = np.random.default_rng(config.analysis.seed)
        extra["corrected_shares"] = correct_shares(
            shares, validation.pairs, config.analysis.confidence, rng, config.analysis.bootstrap_resamples
        )
        extra["correction_explanation"] = EXPLANATION
    return dataclasses.replace(findings, extra=extra)


def _manifest(config, intake, scores, framework_info, model_info, score_settings, findings, started) -> dict:
    """What went in and how: enough to repeat the run or to tell whether two runs compare."""
    import hashlib

    from reporter import __version__
    from reporter.render.manifest import build_manifest

    per_file = intake.log.groupby("source_file").size().to_dict()
    files = []
    for item in config.inputs:
        name = _relative(item.path, config.base_dir)
        files.append({
            "path": name,
            "format": item.format or "",
            "sha256": hashlib.sha256(item.path.read_bytes()).hexdigest(),
            "n_read": int(per_file.get(name, 0)),
        })
    manifest = build_manifest(
        waymark_version=__version__, generated_at=started.isoformat(), input_files=files,
        framework_info=framework_info, model_info=model_info, score_settings=score_settings,
        analysis_meta=findings.meta,
    )
    # The flat keys `analyse.check_comparable` reads to tell whether two runs compare like for like.
    manifest.update({
        "model_checksum": model_info["checksum"],
        "framework_id": framework_info["id"],
        "framework_version": framework_info["version"],
        "framework_checksum": framework_info["checksum"],
        "thresholds": score_settings["thresholds"],
        "policy": score_settings["policy"],
        "text_fields": score_settings["text_fields"],
    })
    if findings.funding is not None:
        # The rates behind every funding figure: which table, and its checksum, so a rerun can tell.
        keys = ("counting", "group_counting", "base_currency", "conversion_table", "conversion_table_sha256")
        manifest["funding"] = {key: findings.funding.meta[key] for key in keys}
    counts = intake.log["status"].value_counts().to_dict()
    manifest["config"] = config.model_dump(mode="json", exclude={"config_path"})
    manifest["rows"] = {
        "read": int(len(intake.log)),
        **{status: int(counts.get(status, 0)) for status in ("kept", "merged", "set_aside")},
        "scores": int(len(scores.table)),
        "sentences": int(scores.stats["n_sentences"]),
    }
    # Cache hits, reused publications and timings differ between a cold and a warm run of the same
    # inputs (distinct sentences too: a warm run splits only what it scores anew); leave them out.
    manifest["scoring_run"] = {k: scores.stats[k] for k in ("n_records", "n_sentences")}
    return manifest


def _relative(path: Path, base: Path) -> str:
    try:
        return path.resolve().relative_to(base.resolve()).as_posix()
    except ValueError:
        return str(path)


# --- labelled sample check (`check-labels`, issue #6) ----------------------------------------


def validate_run(config: Config, intake: IntakeResult, scores, labelled=None):
    """A run's machine decisions against the config's labelled sample -> analyse.validation.Validation.

    Pass `scores` before any review overrides: validation measures the method, not the reviewers.
    """
    from reporter.analyse.validation import validate

    codes = tuple(scores.thresholds)  # framework order, one entry per goal
    if labelled is None:
        labelled = _labelled_sample(config, intake, codes)
    return validate(
        scores.table, labelled, codes, scores.thresholds, scores.policy,
        global_threshold=config.score.threshold, target_precision=config.validation.target_precision,
    )


def check_labels(config: Config, thresholds_path: Path | None = None, show_progress: bool = True):
    """Score the labelled publications only, validate, write recommended thresholds and validation.json.

    Only the labelled publications are scored: scores are per publication, so the rest of the
    corpus would change nothing here and would cost most of the time.
    """
    import json

    from reporter.analyse.validation import write_thresholds
    from reporter.render.atomic import write_text_atomic
    from reporter.score import load_scoring_parts, score

    intake = run_intake(config, remember_languages=True)
    parts = load_scoring_parts(config.score)
    try:
        labelled = _labelled_sample(config, intake, parts.framework.goal_codes)
        subset = intake.records[intake.records["record_id"].isin(labelled.labels["record_id"])]
        scores = score(subset, parts.framework, parts.embedder, config.score, cache=parts.cache,
                       thresholds=parts.thresholds, show_progress=show_progress)
    finally:
        parts.close()
    validation = validate_run(config, intake, scores, labelled)
    text = json.dumps(validation.to_dict(), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    written = {
        "recommended thresholds": write_thresholds(
            thresholds_path or config.output_dir / "recommended-thresholds.csv", validation.thresholds
        ),
        "validation": write_text_atomic(config.output_dir / "validation.json", text),
    }
    return validation, written


def _labelled_sample(config: Config, intake: IntakeResult, codes: tuple[str, ...]):
    from reporter.analyse.labelled import read_labelled_sample
    from reporter.errors import ConfigError

    path = config.validation.labelled_sample
    if path is None:
        raise ConfigError(Problem(config.config_path, None, "validation.labelled_sample",
                                  "not set; give the CSV of publications judged by people"))
    return read_labelled_sample(path, intake.records, codes)
