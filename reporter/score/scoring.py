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
from reporter.score.align import AlignParams, GoalSpace, record_scores, sentence_scores
from reporter.score.cache import EmbeddingCache, text_hash
from reporter.score.encode import EncodeStats, embed_texts
from reporter.score.evidence import pick_evidence
from reporter.score.framework import GoalFramework
from reporter.score.lexical import KeywordMatcher, lexical_score
from reporter.score.mentions import compile_mentions, find_mentions
from reporter.score.reuse import RecordResult, decode_result, encode_result, method_key, record_key
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

    reuse = None
    if cache is not None:
        reuse = (cache, method_key(
            model=embedder.info.checksum, framework=framework.checksum, codes=codes, thresholds=thresholds,
            policy=cfg.policy, text_fields=list(cfg.text_fields), method=asdict(method), splitter=splitter.name,
        ))

    tables, evidence_rows, general_rows, sentence_tables = [], [], [], []
    n_units = n_reused = 0
    progress = _progress(len(records), show_progress)
    for start in range(0, len(records), CHUNK_RECORDS):
        chunk = records.iloc[start : start + CHUNK_RECORDS]
        chunk_splitter = _known_splits(chunk, cfg, splitter, cache)
        result = _score_chunk(
            chunk, cfg, codes, scorer, patterns, keywords, chunk_splitter, embedder, method, threshold_row,
            keep_sentences, reuse,
        )
        if cache is not None and chunk_splitter.new:
            cache.put_splits(chunk_splitter.name, ((text_hash(t), s) for t, s in chunk_splitter.new.items()))
        table, evidence, general = _chunk_tables(chunk["record_id"].tolist(), codes, result.results)
        tables.append(table)
        evidence_rows.extend(evidence)
        general_rows.extend(general)
        n_units += sum(r.n_units for r in result.results)
        n_reused += result.n_reused
        if keep_sentences and result.sentences is not None:
            sentence_tables.append(result.sentences)
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
            # Sentences of every publication, reused ones included; the rest count this run's work only.
            "n_sentences": n_units,
            "n_records_reused": n_reused,
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


@dataclass
class _ChunkResults:
    """Per-publication results of one chunk, in record order, whether computed now or reused."""

    results: list[RecordResult]
    sentences: pd.DataFrame | None = None
    n_reused: int = 0


def _score_chunk(chunk, cfg, codes, scorer, patterns, keywords, splitter, embedder, method, threshold_row,
                 keep_sentences, reuse) -> _ChunkResults:
    """Results for the chunk: stored ones where the record and method are unchanged, the rest computed."""
    fields = [{f: getattr(row, f) for f in ("title", "abstract", "keywords") if hasattr(row, f)}
              for row in chunk.itertuples(index=False)]
    keys = [record_key(f, cfg.text_fields) for f in fields] if reuse is not None else []
    stored: dict[int, RecordResult] = {}
    if reuse is not None and not keep_sentences:  # the per-sentence table needs every sentence scored
        cache, key = reuse
        found = cache.get_results(key, keys)
        for i, k in enumerate(keys):
            if k in found and (result := decode_result(*found[k], len(codes))) is not None:
                stored[i] = result
    todo = [i for i in range(len(chunk)) if i not in stored]
    computed, sentences = _compute_results(
        [fields[i] for i in todo], [chunk["record_id"].iat[i] for i in todo], cfg, codes, scorer, patterns,
        keywords, splitter, embedder, method, threshold_row, keep_sentences,
    )
    if reuse is not None and computed:
        cache, key = reuse
        cache.put_results(key, ((keys[i], encode_result(r)) for i, r in zip(todo, computed)))
    stored.update(zip(todo, computed))
    return _ChunkResults([stored[i] for i in range(len(chunk))], sentences, len(chunk) - len(todo))


def _compute_results(fields, record_ids, cfg, codes, scorer, patterns, keywords, splitter, embedder, method,
                     threshold_row, keep_sentences) -> tuple[list[RecordResult], pd.DataFrame | None]:
    units: list[TextUnit] = []
    n, n_goals = len(record_ids), len(codes)
    explicit_counts = np.zeros((n, n_goals), dtype=np.int32)
    lexical = np.zeros((n, n_goals), dtype=np.float32)
    n_general = []
    code_index = {code: g for g, code in enumerate(codes)}
    for i, (record_id, texts) in enumerate(zip(record_ids, fields)):
        units.extend(record_units(i, texts, cfg.text_fields, splitter))  # local index; ids set below
        full_text = _joined_text(texts, cfg.text_fields)
        found = find_mentions(full_text, patterns)
        for code, mentions in found.by_goal.items():
            if code in code_index:
                explicit_counts[i, code_index[code]] = len(mentions)
        n_general.append(found.n_general)
        hits = keywords.hits(full_text)
        lexical[i] = [lexical_score(h, method.lexical_scale) for h in hits]

    units = fit_to_model(units, embedder.info.max_tokens, embedder.count_tokens)
    per_sentence = scorer([u.text for u in units]) if units else np.zeros((0, n_goals), np.float32)
    unit_record = np.array([u.record_id for u in units], dtype=np.int64)
    is_title = np.array([u.kind == "title" for u in units], dtype=bool)
    semantic = record_scores(unit_record, is_title, per_sentence, n, method.align)
    # Noisy-or: the keyword signal can lift a score but never lower it.
    combined = semantic + (1.0 - semantic) * method.lexical_weight * lexical
    explicit = explicit_counts > 0
    aligned = decide(combined, explicit, threshold_row, cfg.policy)

    evidence_rows, best_text, best_score = pick_evidence(
        units, unit_record, per_sentence, aligned, explicit, list(range(n)), codes, patterns, EVIDENCE_PER_PAIR,
    )
    evidence_by_record: list[list[tuple]] = [[] for _ in range(n)]
    for row in evidence_rows:
        evidence_by_record[row[0]].append(row[1:])
    units_per_record = np.bincount(unit_record, minlength=n) if units else np.zeros(n, dtype=np.int64)
    results = [
        RecordResult(
            score=combined[i].astype(np.float32), n_explicit=explicit_counts[i], aligned=aligned[i],
            best_score=best_score[i], best_text=tuple(best_text[i]), evidence=tuple(evidence_by_record[i]),
            n_general=int(n_general[i]), n_units=int(units_per_record[i]),
        )
        for i in range(n)
    ]
    sentences = None
    if keep_sentences:
        sentences = _sentence_table(units, per_sentence, codes)
        sentences["record_id"] = [record_ids[i] for i in sentences["record_id"]]
    return results, sentences


def _chunk_tables(record_ids: list, codes: tuple[str, ...], results: list[RecordResult]):
    """The score-table rows, evidence rows and general-mention rows of a chunk's results."""
    n, g = len(record_ids), len(codes)

    def stacked(name: str, dtype) -> np.ndarray:
        return np.vstack([getattr(r, name) for r in results]).astype(dtype).reshape(-1) if n else np.zeros(0, dtype)

    n_explicit = stacked("n_explicit", np.int32)
    table = pd.DataFrame({
        "record_id": np.repeat(record_ids, g),
        "goal": np.tile(codes, n),
        "alignment_score": np.round(stacked("score", np.float32).astype(float), 6),
        "n_explicit_mentions": n_explicit,
        "is_explicit": n_explicit > 0,
        "is_aligned": stacked("aligned", bool),
        "evidence": [t for r in results for t in r.best_text],
        "evidence_score": np.round(stacked("best_score", np.float32).astype(float), 6),
    })
    evidence = [(rid, *row) for rid, r in zip(record_ids, results) for row in r.evidence]
    general = [(rid, r.n_general) for rid, r in zip(record_ids, results)]
    return table, evidence, general


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
