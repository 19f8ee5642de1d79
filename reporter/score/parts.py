"""The heavy parts scoring needs (framework, model, cache, per-goal thresholds), built from ScoreConfig."""

from __future__ import annotations

import csv
from dataclasses import dataclass
from pathlib import Path

from reporter.config import ScoreConfig
from reporter.errors import Problem, ReporterError
from reporter.score.cache import EmbeddingCache
from reporter.score.framework import GoalFramework, load_framework, measured_accuracy


@dataclass
class ScoringParts:
    framework: GoalFramework
    embedder: object
    cache: EmbeddingCache | None
    thresholds: dict[str, float]

    def framework_info(self) -> dict:
        fw = self.framework
        return {"id": fw.id, "title": fw.title, "version": fw.version, "checksum": fw.checksum, "source": fw.source,
                "n_goals": len(fw.goals), "accuracy_on_real_abstracts": measured_accuracy(fw)}

    def model_info(self) -> dict:
        info = self.embedder.info
        return {"id": info.id, "checksum": info.checksum, "backend": info.backend, "dimension": info.dimension,
                "max_tokens": info.max_tokens}

    def close(self) -> None:
        if self.cache is not None:
            self.cache.close()


def load_scoring_parts(cfg: ScoreConfig) -> ScoringParts:
    framework = load_framework(cfg.framework)
    if cfg.backend == "nli":
        from reporter.score.entailment import EntailmentScorer

        embedder = EntailmentScorer(cfg.model, threads=cfg.threads, batch_size=cfg.batch_size)
    elif cfg.backend == "embedding-int8":
        from reporter.score.quantised import QuantisedEmbedder

        # The int8 export is kept beside the embedding cache, so it is made once per project.
        export_dir = Path(cfg.cache).parent / "onnx" if cfg.cache is not None else None
        embedder = QuantisedEmbedder(cfg.model, threads=cfg.threads, batch_size=cfg.batch_size, export_dir=export_dir)
    else:
        from reporter.score.embedder import SentenceEmbedder

        embedder = SentenceEmbedder(cfg.model, threads=cfg.threads, batch_size=cfg.batch_size)
    cache = None
    # Both embedding backends cache, each under its own checksum; the nli backend has no vectors.
    if cfg.use_cache and cfg.cache is not None and cfg.backend != "nli":
        cache = EmbeddingCache(Path(cfg.cache), embedder.info.checksum, embedder.info.dimension)
    thresholds = read_thresholds(cfg.thresholds_file, framework) if cfg.thresholds_file else {}
    return ScoringParts(framework, embedder, cache, thresholds)


def read_thresholds(path: Path, framework: GoalFramework) -> dict[str, float]:
    """Per-goal thresholds from a CSV with columns goal, threshold (as written by the label check)."""
    problems: list[Problem] = []
    out: dict[str, float] = {}
    with Path(path).open(newline="", encoding="utf-8-sig") as handle:
        reader = csv.DictReader(handle)
        if not reader.fieldnames or not {"goal", "threshold"} <= set(reader.fieldnames):
            raise ReporterError(Problem(Path(path), 1, "header", "expected columns goal,threshold"))
        for row in reader:
            line = reader.line_num
            goal = (row.get("goal") or "").strip()
            if goal not in framework.goal_codes:
                problems.append(Problem(Path(path), line, "goal", f"unknown goal {goal!r} for framework {framework.id}"))
                continue
            try:
                value = float(row["threshold"])
            except (TypeError, ValueError):
                problems.append(Problem(Path(path), line, "threshold", f"expected a number, got {row['threshold']!r}"))
                continue
            if not 0 <= value <= 1:
                problems.append(Problem(Path(path), line, "threshold", f"expected a number from 0 to 1, got {value}"))
                continue
            out[goal] = value
    if problems:
        raise ReporterError(problems)
    return out
