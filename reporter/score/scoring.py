"""score(records, ...) -> Scores: explicit mentions + semantic alignment per publication and goal.

Records are processed in chunks so memory stays flat however large the corpus:
per chunk, sentences are embedded (through the cache), scored against the goal
space, aggregated per publication, and only the small per-publication results
are kept. Columns of `Scores.table`: SCORE_COLUMNS (reporter/records.py).
"""

from __future__ import annotations

import logging
import sys
import time
from dataclasses import asdict, dataclass, field

import numpy as np
import pandas as pd

from reporter.config import ScoreConfig
from reporter.records import SCORE_COLUMNS, require_columns
from reporter.score.align import AlignParams, GoalSpace, aggregate_by_record, sentence_scores
from reporter.score.cache import EmbeddingCache, text_hash
from reporter.score.encode import EncodeStats, embed_texts
from reporter.score.evidence import pick_evidence
from reporter.score.framework import GoalFramework
from reporter.score.lexical import KeywordMatcher, lexical_score
from reporter.score.mentions import compile_mentions, find_mentions
from reporter.score.sentences import KnownSplits, SentenceSplitter, TextUnit, fit_to_model, record_units

log = logging.getLogger(__name__)

CHUNK_RECORDS = 1000  # publications per streaming chunk: bounded memory, still full model batches
EVIDENCE_PER_PAIR = 2  # evidence sentences kept per aligned (publication, goal)

#: Columns of `Scores.evidence`.
EVIDENCE_COLUMNS = ("record_id", "goal", "rank", "kind", "sentence", "sentence_score", "is_mention")


@dataclass(frozen=True)
class ScoringMethod:
    """Every tunable of the method in one place; recorded in the run manifest."""

    align: AlignParams = field(default_factory=AlignParams)
    lexical_weight: float = 0.35  # how much the keyword signal can lift a score (noisy-or weight)
    lexical_scale: float = 2.0  # distinct keywords for ~63% of the lexical signal


@dataclass(frozen=True)
class Scores:
    table: pd.DataFrame  # SCORE_COLUMNS, one row per (record, goal)
    evidence: pd.DataFrame  # EVIDENCE_COLUMNS, for aligned pairs
    general_mentions: pd.DataFrame  # record_id, n_general_mentions
    sentences: pd.DataFrame | None  # per-sentence scores when asked for
    thresholds: dict[str, float]
    policy: str
    method: dict
    stats: dict


def build_goal_space(framework: GoalFramework, embedder, cache: EmbeddingCache | None, stats: EncodeStats) -> GoalSpace:
    texts: list[str] = []
    owners: list[int] = []
    for g, goal in enumerate(framework.goals):
        texts.extend(goal.descriptors)
        owners.extend([g] * len(goal.descriptors))
    vectors = embed_texts(texts, embedder, cache, stats)
    background = embed_texts(list(framework.background), embedder, cache, stats)
    return GoalSpace(
        goal_codes=tuple(goal.code for goal in framework.goals),
        descriptors=vectors,
        descriptor_goal=np.asarray(owners),
        background=background,
    )


class _EmbeddingSentenceScorer:
    """Sentence texts -> goal scores through embeddings (cached) and the goal space."""

    def __init__(self, framework, embedder, cache, stats: EncodeStats, params: AlignParams):
        self.space = build_goal_space(framework, embedder, cache, stats)
        self._embedder, self._cache, self._stats, self._params = embedder, cache, stats, params

    def __call__(self, texts: list[str]) -> np.ndarray:
        vectors = embed_texts(texts, self._embedder, self._cache, self._stats)
        return sentence_scores(vectors, self.space, self._params)[0]


class _EntailmentSentenceScorer:
    """Sentence texts -> goal scores as entailment probabilities (each distinct sentence once)."""

    def __init__(self, framework, model, stats: EncodeStats):
        self._titles = [goal.short_title for goal in framework.goals]
        self._model, self._stats = model, stats

    def __call__(self, texts: list[str]) -> np.ndarray:
        distinct = list(dict.fromkeys(texts))
        self._stats.n_texts += len(texts)
        self._stats.n_unique += len(distinct)
        began = time.perf_counter()
        table = self._model.entailment(distinct, self._titles) if distinct else np.zeros((0, len(self._titles)))
        self._stats.seconds_encoding += time.perf_counter() - began
        self._stats.n_encoded += len(distinct)
        index = {t: i for i, t in enumerate(distinct)}
        return table[[index[t] for t in texts]] if texts else table


def decide(score: np.ndarray, explicit: np.ndarray, thresholds: np.ndarray, policy: str) -> np.ndarray:
    """The alignment decision under the configured policy."""
    by_score = score >= thresholds
    if policy == "score_only":
        return by_score
    if policy == "mention_only":
        return explicit
    return by_score | explicit


def score(
    records: pd.DataFrame,
    framework: GoalFramework,
    embedder,
    cfg: ScoreConfig,
    cache: EmbeddingCache | None = None,
    method: ScoringMethod | None = None,
    thresholds: dict[str, float] | None = None,
    keep_sentences: bool = False,
    show_progress: bool = True,
) -> Scores:
    """Score every record against every goal of the framework."""
    require_columns(records, ("record_id", *cfg.text_fields), "score")
    method = method or ScoringMethod()
    codes = tuple(goal.code for goal in framework.goals)
    thresholds = {code: (thresholds or {}).get(code, cfg.threshold) for code in codes}
    threshold_row = np.array([thresholds[c] for c in codes], dtype=np.float32)
    stats = EncodeStats()
    began = time.perf_counter()
    if embedder.info.backend == "nli":
        scorer = _EntailmentSentenceScorer(framework, embedder, stats)
    else:
        scorer = _EmbeddingSentenceScorer(framework, embedder, cache, stats, method.align)
    patterns = compile_mentions(framework)
    keywords = KeywordMatcher.build(codes, [goal.keywords for goal in framework.goals])
    splitter = SentenceSplitter()

    tables, evidence_rows, general_rows, sentence_tables = [], [], [], []
    progress = _progress(len(records), show_progress)
    for start in range(0, len(records), CHUNK_RECORDS):
        chunk = records.iloc[start : start + CHUNK_RECORDS]
        chunk_splitter = _known_splits(chunk, cfg, splitter, cache)
        result = _score_chunk(
            chunk, cfg, codes, scorer, patterns, keywords, chunk_splitter, embedder, method, threshold_row,
            keep_sentences,
        )
        if cache is not None and chunk_splitter.new:
            cache.put_splits(chunk_splitter.name, ((text_hash(t), s) for t, s in chunk_splitter.new.items()))
        tables.append(result[0])
        evidence_rows.extend(result[1])
        general_rows.extend(result[2])
        if keep_sentences:
            sentence_tables.append(result[3])
        if progress is not None:
            progress.update(len(chunk))
            elapsed = max(stats.seconds_encoding, 1e-9)
            progress.set_postfix_str(f"{stats.n_encoded / elapsed:.0f} sentences/s encoded")
    if progress is not None:
        progress.close()

    table = pd.concat(tables, ignore_index=True) if tables else pd.DataFrame(columns=list(SCORE_COLUMNS))
    seconds = time.perf_counter() - began
    return Scores(
        table=table.loc[:, list(SCORE_COLUMNS)],
        evidence=pd.DataFrame(evidence_rows, columns=list(EVIDENCE_COLUMNS)),
        general_mentions=pd.DataFrame(general_rows, columns=["record_id", "n_general_mentions"]),
        sentences=pd.concat(sentence_tables, ignore_index=True) if keep_sentences and sentence_tables else None,
        thresholds=thresholds,
        policy=cfg.policy,
        method=asdict(method),
        stats={
            "n_records": len(records),
            "n_sentences": stats.n_texts,
            "n_unique_sentences": stats.n_unique,
            "n_cache_hits": stats.n_cache_hits,
            "n_encoded": stats.n_encoded,
            "seconds_encoding": round(stats.seconds_encoding, 3),
            "seconds_total": round(seconds, 3),
            "sentences_per_second": round(stats.n_encoded / stats.seconds_encoding, 1) if stats.seconds_encoding else None,
        },
    )


def _progress(total: int, show: bool):
    if not show or total == 0:
        return None
    from tqdm import tqdm

    return tqdm(total=total, unit="pub", desc="Scoring", file=sys.stderr, leave=False)


def _known_splits(chunk: pd.DataFrame, cfg: ScoreConfig, splitter: SentenceSplitter, cache) -> KnownSplits:
    """The chunk's abstracts already split in an earlier run (read from the cache), wrapped round the splitter."""
    if cache is None or "abstract" not in cfg.text_fields or "abstract" not in chunk.columns:
        return KnownSplits(splitter, {})
    texts = list(dict.fromkeys(str(a) for a in chunk["abstract"] if isinstance(a, str) and a))
    keys = [text_hash(t) for t in texts]
    stored = cache.get_splits(splitter.name, keys)
    return KnownSplits(splitter, {t: stored[k] for t, k in zip(texts, keys) if k in stored})


def _score_chunk(chunk, cfg, codes, scorer, patterns, keywords, splitter, embedder, method, threshold_row,
                 keep_sentences):
    record_ids = chunk["record_id"].tolist()
    units: list[TextUnit] = []
    n_goals = len(codes)
    explicit_counts = np.zeros((len(chunk), n_goals), dtype=np.int32)
    lexical = np.zeros((len(chunk), n_goals), dtype=np.float32)
    general_rows = []
    code_index = {code: g for g, code in enumerate(codes)}
    for i, row in enumerate(chunk.itertuples(index=False)):
        fields = {f: getattr(row, f) for f in ("title", "abstract", "keywords") if hasattr(row, f)}
        units.extend(record_units(row.record_id, fields, cfg.text_fields, splitter))
        full_text = _joined_text(fields, cfg.text_fields)
        found = find_mentions(full_text, patterns)
        for code, mentions in found.by_goal.items():
            if code in code_index:
                explicit_counts[i, code_index[code]] = len(mentions)
        general_rows.append((row.record_id, found.n_general))
        hits = keywords.hits(full_text)
        lexical[i] = [lexical_score(h, method.lexical_scale) for h in hits]

    units = fit_to_model(units, embedder.info.max_tokens, embedder.count_tokens)
    per_sentence = scorer([u.text for u in units]) if units else np.zeros((0, n_goals), np.float32)
    position = {rid: i for i, rid in enumerate(record_ids)}
    unit_record = np.array([position[u.record_id] for u in units], dtype=np.int64)
    semantic = aggregate_by_record(unit_record, per_sentence, len(chunk), method.align.top_k)
    # Noisy-or: the keyword signal can lift a score but never lower it.
    combined = semantic + (1.0 - semantic) * method.lexical_weight * lexical
    explicit = explicit_counts > 0
    aligned = decide(combined, explicit, threshold_row, cfg.policy)

    evidence_rows, best_text, best_score = pick_evidence(
        units, unit_record, per_sentence, aligned, explicit, record_ids, codes, patterns, EVIDENCE_PER_PAIR,
    )
    n, g = len(chunk), n_goals
    table = pd.DataFrame({
        "record_id": np.repeat(record_ids, g),
        "goal": np.tile(codes, n),
        "alignment_score": np.round(combined.reshape(-1).astype(float), 6),
        "n_explicit_mentions": explicit_counts.reshape(-1),
        "is_explicit": explicit.reshape(-1),
        "is_aligned": aligned.reshape(-1),
        "evidence": best_text.reshape(-1),
        "evidence_score": np.round(best_score.reshape(-1).astype(float), 6),
    })
    sentences = None
    if keep_sentences:
        sentences = _sentence_table(units, per_sentence, codes)
    return table, evidence_rows, general_rows, sentences


def _joined_text(fields: dict, text_fields) -> str:
    parts = []
    if "title" in text_fields and fields.get("title"):
        parts.append(str(fields["title"]))
    if "abstract" in text_fields and fields.get("abstract"):
        parts.append(str(fields["abstract"]))
    if "keywords" in text_fields and fields.get("keywords"):
        parts.append("; ".join(fields["keywords"]))
    return "\n".join(parts)


def _sentence_table(units: list[TextUnit], per_sentence: np.ndarray, codes: tuple[str, ...]) -> pd.DataFrame:
    best = per_sentence.argmax(axis=1) if len(units) else np.zeros(0, dtype=int)
    return pd.DataFrame({
        "record_id": [u.record_id for u in units],
        "position": [u.position for u in units],
        "kind": [u.kind for u in units],
        "sentence": [u.text for u in units],
        "top_goal": [codes[b] for b in best],
        "top_score": [float(per_sentence[i, b]) for i, b in enumerate(best)],
        **{f"score_{c}": np.round(per_sentence[:, g].astype(float), 6) for g, c in enumerate(codes)},
    })
