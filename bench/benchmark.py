"""Speed and memory of the scoring stage and the stages after it, on a synthetic corpus (issue #7).

    python bench/benchmark.py --sizes 1000 10000            # cold, warm and bare encode per size
    python bench/benchmark.py --sizes 100000 --prefill      # warm path and memory only (see README)
    python bench/benchmark.py --int8 --int8-sentences 3000  # int8 vs fp32: throughput and demo agreement

Each size runs in its own subprocess, so the peak RSS reported is that size's own. Results are
printed as a table and written as JSON to bench/results/ (gitignored).
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
RESULTS = ROOT / "bench" / "results"

from synthetic_corpus import make_corpus  # noqa: E402  (beside this file)

def scored_texts(records: pd.DataFrame, framework, embedder, text_fields) -> list[str]:
    """The distinct texts scoring embeds (descriptors, background, sentences), found independently."""
    from reporter.score.sentences import SentenceSplitter, fit_to_model, record_units

    splitter = SentenceSplitter()
    texts = [d for goal in framework.goals for d in goal.descriptors] + list(framework.background)
    for row in records.itertuples(index=False):
        fields = {"title": row.title, "abstract": row.abstract, "keywords": row.keywords}
        units = fit_to_model(record_units(row.record_id, fields, text_fields, splitter),
                             embedder.info.max_tokens, embedder.count_tokens)
        texts.extend(u.text for u in units)
    return list(dict.fromkeys(texts))


# --- one size, in its own process ------------------------------------------------------------


def _rss_mib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # Linux reports KiB


def _frame_mib(frame: pd.DataFrame) -> float:
    return float(frame.memory_usage(deep=True).sum()) / 2**20


def run_size(n: int, prefill: bool, threads: int | None, backend: str, tracemalloc_warm: bool) -> dict:
    from reporter.config import ReportConfig, ScoreConfig
    from reporter.score import load_scoring_parts, score
    from reporter.score.sentences import SentenceSplitter

    out: dict = {"n_publications": n, "mode": "prefilled-warm" if prefill else "full", "backend": backend}
    began = time.perf_counter()
    records, log, composed = make_corpus(n)
    out["seconds_corpus"] = round(time.perf_counter() - began, 2)
    cache_path = RESULTS / f"cache-{n}-{backend}.sqlite"
    for suffix in ("", "-wal", "-shm"):
        Path(f"{cache_path}{suffix}").unlink(missing_ok=True)
    cfg = ScoreConfig(cache=cache_path, threads=threads, backend=backend)
    parts = load_scoring_parts(cfg)
    framework, embedder = parts.framework, parts.embedder
    out["rss_mib_after_model_load"] = round(_rss_mib(), 1)
    if prefill:
        began = time.perf_counter()
        distinct, out["prefill_vectors"] = _prefill(parts.cache, records, composed, embedder)
        out["seconds_prefill"] = round(time.perf_counter() - began, 2)
        out["n_distinct_texts"] = len(distinct)
        del distinct, composed  # the harness's own copies; the pipeline figures below should not carry them
        from reporter.score.encode import EncodeStats, embed_texts

        # The goal descriptors are embedded for real, as the cold run would have left them cached.
        goal_texts = [d for goal in framework.goals for d in goal.descriptors] + list(framework.background)
        embed_texts(goal_texts, embedder, parts.cache, EncodeStats())
    else:
        distinct = scored_texts(records, framework, embedder, cfg.text_fields)
        out["n_distinct_texts"] = len(distinct)
        embedder.encode(distinct[:64])  # warm-up: first calls pay for lazy initialisation
        out["load_average_before_cold"] = os.getloadavg()
        began, cpu = time.perf_counter(), _cpu_seconds()
        cold = score(records, framework, embedder, cfg, cache=parts.cache, thresholds=parts.thresholds,
                     show_progress=False)
        out["seconds_score_cold"] = round(time.perf_counter() - began, 2)
        out["cpu_seconds_score_cold"] = round(_cpu_seconds() - cpu, 2)
        # The generator's own sentences against pysbd's split, so the --prefill stand-in is honest.
        stored = parts.cache.get_splits(SentenceSplitter().name, [_hash(a) for a in composed])
        out["share_abstracts_split_as_composed"] = round(
            float(np.mean([stored.get(_hash(a)) == parts_ for a, parts_ in composed.items()])), 4)
        del composed
        out["cold_stats"] = cold.stats
        out["rss_mib_after_cold_score"] = round(_rss_mib(), 1)
        # Duplicates embedded once: every distinct text encoded exactly once, none twice.
        out["n_cache_rows"] = parts.cache.count()
        out["duplicates_embedded_once"] = cold.stats["n_encoded"] == len(distinct) == out["n_cache_rows"]
        del cold
    parts.cache.close()

    cache = _reopen(cfg, embedder)
    if tracemalloc_warm:
        tracemalloc.start()
    began = time.perf_counter()
    warm = score(records, framework, embedder, cfg, cache=cache, thresholds=parts.thresholds, show_progress=False)
    out["seconds_score_warm"] = round(time.perf_counter() - began, 2)
    if tracemalloc_warm:
        out["tracemalloc_peak_mib_warm_score"] = round(tracemalloc.get_traced_memory()[1] / 2**20, 1)
        tracemalloc.stop()
    cache.close()
    out["warm_stats"] = warm.stats
    out["rss_mib_after_warm_score"] = round(_rss_mib(), 1)
    out["mib_score_table"] = round(_frame_mib(warm.table), 1)
    out["mib_evidence_table"] = round(_frame_mib(warm.evidence), 1)
    out["n_evidence_rows"] = len(warm.evidence)
    out["n_aligned_pairs"] = int(warm.table["is_aligned"].sum())

    report = ReportConfig(institution="Bench University", home_country="IE", reporting_year=2025,
                          comparison_years=(2022, 2023, 2024), output=RESULTS / f"report-{n}")
    out.update(_analyse_and_render(records, log, warm, framework, embedder, report))
    out["rss_mib_peak_pipeline"] = round(_rss_mib(), 1)

    if not prefill:
        out.update(_bare_encode(distinct, embedder, threads))
        out["ratio_pipeline_over_bare"] = round(out["seconds_bare_encode"] / out["seconds_score_cold"], 3)
        out["ratio_pipeline_over_bare_cpu"] = round(out["cpu_seconds_bare_encode"] / out["cpu_seconds_score_cold"], 3)
        out["ratio_warm_speedup"] = round(out["seconds_score_cold"] / out["seconds_score_warm"], 1)
        out["seconds_cold_total"] = round(out["seconds_score_cold"] + out["seconds_analyse"] + out["seconds_render"], 2)
        out["share_render_of_cold_total"] = round(out["seconds_render"] / out["seconds_cold_total"], 4)
    out["rss_mib_peak_process"] = round(_rss_mib(), 1)
    return out


def _cpu_seconds() -> float:
    usage = resource.getrusage(resource.RUSAGE_SELF)
    return usage.ru_utime + usage.ru_stime


def _prefill(cache, records: pd.DataFrame, composed: dict[str, list[str]], embedder) -> tuple[list[str], str]:
    """Fill the cache as a cold run would leave it, without splitting or embedding the corpus.

    The generator knows each abstract's sentences (the full runs measure how often pysbd agrees).
    Vectors are stand-ins: each text gets a real vector of a random sentence from the same generator,
    taken from a full run's cache (1000 publications), so per-sentence scores follow the real
    distribution and about as many pairs are aligned; without that cache, random unit vectors.
    The warm path reads them exactly as real ones, but the scores of a given record mean nothing.
    """
    import sqlite3

    from reporter.score.sentences import SentenceSplitter

    cache.put_splits(SentenceSplitter().name, ((_hash(a), parts) for a, parts in composed.items()))
    texts = []
    for row in records.itertuples(index=False):
        texts.append(" ".join(row.title.split()))
        texts.extend(composed[row.abstract])
        texts.append("Keywords: " + "; ".join(row.keywords))
    distinct = list(dict.fromkeys(texts))
    rng = np.random.default_rng(1)
    source = RESULTS / "cache-1000-embedding.sqlite"
    pool, kind = None, "random unit vectors"
    if source.exists():
        with sqlite3.connect(source) as db:
            rows = db.execute("SELECT vector FROM embeddings WHERE model = ?", [embedder.info.checksum]).fetchall()
        if rows:
            pool = np.vstack([np.frombuffer(blob, dtype=np.float32) for (blob,) in rows])
            kind = f"real vectors of {len(pool)} generated sentences, assigned at random"
    for start in range(0, len(distinct), 20000):
        block = distinct[start:start + 20000]
        if pool is not None:
            vectors = pool[rng.integers(0, len(pool), size=len(block))]
        else:
            vectors = rng.standard_normal((len(block), embedder.info.dimension)).astype(np.float32)
            vectors /= np.linalg.norm(vectors, axis=1, keepdims=True)
        cache.put_many(zip((_hash(t) for t in block), vectors))
    return distinct, kind


def _hash(text: str) -> bytes:
    from reporter.score.cache import text_hash

    return text_hash(text)


def _reopen(cfg, embedder):
    from reporter.score.cache import EmbeddingCache

    return EmbeddingCache(Path(cfg.cache), embedder.info.checksum, embedder.info.dimension)


def _analyse_and_render(records, log, scores, framework, embedder, report) -> dict:
    from reporter.analyse import analyse
    from reporter.render import RenderInputs, render

    goals = tuple((goal.code, goal.short_title) for goal in framework.goals)
    began = time.perf_counter()
    findings = analyse(records, scores.table, goals, _analysis_config(), report.reporting_year,
                       report.comparison_years, scores.thresholds, scores.policy,
                       general_mentions=scores.general_mentions)
    seconds_analyse = time.perf_counter() - began
    info = embedder.info
    inputs = RenderInputs(
        findings=findings, records=records, scores=scores.table, intake_log=log, goals=goals,
        framework_info={"id": framework.id, "title": framework.title, "version": framework.version,
                        "checksum": framework.checksum},
        model_info={"id": info.id, "checksum": info.checksum, "backend": info.backend},
        score_settings={"threshold": 0.6, "thresholds": scores.thresholds, "policy": scores.policy,
                        "text_fields": ["title", "abstract", "keywords"], "method": scores.method},
        manifest={"benchmark": True}, generated_at="2025-01-01T00:00:00+00:00",
    )
    began = time.perf_counter()
    written = render(inputs, report, report.output)
    seconds_render = time.perf_counter() - began
    html = written["report.html"].read_text(encoding="utf-8")
    return {
        "seconds_analyse": round(seconds_analyse, 2),
        "seconds_render": round(seconds_render, 2),
        "mib_report_html": round(written["report.html"].stat().st_size / 2**20, 2),
        "mib_report_pdf": round(written["report.pdf"].stat().st_size / 2**20, 2),
        "mib_data_exports": round(sum(p.stat().st_size for k, p in written.items() if k.startswith("data/")) / 2**20, 1),
        "evidence_appendix_capped": "strongest of" in html,
    }


def _analysis_config():
    from reporter.config import AnalysisConfig

    return AnalysisConfig()


def _bare_encoder(embedder, threads: int | None):
    """The backend's model called directly on a list of texts: the floor scoring is measured against.

    fp32: `SentenceTransformer.encode(batch_size=64)`. int8: the same exported ONNX file through
    ONNX Runtime alone, one sentence per call on each core, as the backend runs it.
    """
    if embedder.info.backend != "embedding-int8":
        from sentence_transformers import SentenceTransformer

        model = SentenceTransformer(embedder.info.path, device="cpu", local_files_only=True)
        return "SentenceTransformer.encode fp32", lambda texts: model.encode(texts, batch_size=64, show_progress_bar=False)
    from concurrent.futures import ThreadPoolExecutor

    import onnxruntime
    from transformers import AutoTokenizer

    tokenizer = AutoTokenizer.from_pretrained(embedder.info.path, local_files_only=True)
    options = onnxruntime.SessionOptions()
    options.intra_op_num_threads = options.inter_op_num_threads = 1
    session = onnxruntime.InferenceSession(str(embedder.onnx_path), options, providers=["CPUExecutionProvider"])
    pool = ThreadPoolExecutor(threads or os.cpu_count() or 1)
    names = ("input_ids", "attention_mask", "token_type_ids")

    def encode(texts: list[str]) -> list[np.ndarray]:
        encoded = tokenizer(texts, truncation=True, max_length=256)
        run = lambda i: session.run(None, {k: np.asarray([encoded[k][i]], dtype=np.int64) for k in names})[0]  # noqa: E731
        return list(pool.map(run, range(len(texts)), chunksize=16))

    return "onnxruntime InferenceSession.run int8", encode


def _bare_encode(texts: list[str], embedder, threads: int | None) -> dict:
    """The same texts through the bare model alone (see `_bare_encoder`)."""
    name, encode = _bare_encoder(embedder, threads)
    encode(texts[:64])
    load = os.getloadavg()
    began, cpu = time.perf_counter(), _cpu_seconds()
    encode(texts)
    seconds = time.perf_counter() - began
    return {"bare_reference": name, "seconds_bare_encode": round(seconds, 2),
            "cpu_seconds_bare_encode": round(_cpu_seconds() - cpu, 2),
            "bare_sentences_per_second": round(len(texts) / seconds, 1), "load_average_before_bare": load}


def run_interleaved(n: int, blocks: int, threads: int | None, backend: str) -> dict:
    """Cold scoring and bare encode in alternating blocks of the corpus, each block's pipeline run
    followed by the bare encode of the same block's distinct texts: on a shared machine, load that
    changes over minutes then weighs on both sides alike."""
    from reporter.config import ScoreConfig
    from reporter.score import load_scoring_parts, score

    records, _, _ = make_corpus(n)
    cache_path = RESULTS / f"cache-interleaved-{n}-{backend}.sqlite"
    for suffix in ("", "-wal", "-shm"):
        Path(f"{cache_path}{suffix}").unlink(missing_ok=True)
    cfg = ScoreConfig(cache=cache_path, threads=threads, backend=backend)
    parts = load_scoring_parts(cfg)
    bare_name, bare = _bare_encoder(parts.embedder, threads)
    score(records.head(5), parts.framework, parts.embedder, cfg, cache=parts.cache, show_progress=False)
    bare(["warm-up sentence"] * 64)
    seen: set[str] = set()
    pipeline_s = bare_s = 0.0
    n_texts = 0
    size = -(-n // blocks)
    for start in range(0, n, size):
        block = records.iloc[start:start + size]
        texts = [t for t in scored_texts(block, parts.framework, parts.embedder, cfg.text_fields) if t not in seen]
        seen.update(texts)
        began = time.perf_counter()
        score(block, parts.framework, parts.embedder, cfg, cache=parts.cache, show_progress=False)
        pipeline_s += time.perf_counter() - began
        began = time.perf_counter()
        bare(texts)
        bare_s += time.perf_counter() - began
        n_texts += len(texts)
    parts.close()
    return {"n_publications": n, "backend": backend, "bare_reference": bare_name, "blocks": blocks, "n_texts_encoded": n_texts,
            "seconds_score_cold": round(pipeline_s, 2), "seconds_bare_encode": round(bare_s, 2),
            "ratio_pipeline_over_bare": round(bare_s / pipeline_s, 3), "load_average_after": os.getloadavg()}


# --- driver ----------------------------------------------------------------------------------

_TABLE = (
    ("publications", "n_publications"), ("mode", "mode"), ("backend", "backend"), ("distinct texts", "n_distinct_texts"),
    ("cold score s", "seconds_score_cold"), ("warm score s", "seconds_score_warm"),
    ("analyse s", "seconds_analyse"), ("render s", "seconds_render"),
    ("bare encode s", "seconds_bare_encode"), ("bare sent/s", "bare_sentences_per_second"),
    ("pipeline/bare", "ratio_pipeline_over_bare"), ("pipeline/bare cpu", "ratio_pipeline_over_bare_cpu"),
    ("warm speed-up", "ratio_warm_speedup"),
    ("render share", "share_render_of_cold_total"), ("peak RSS MiB", "rss_mib_peak_pipeline"),
    ("duplicates once", "duplicates_embedded_once"), ("appendix capped", "evidence_appendix_capped"),
)


def _print_table(results: list[dict]) -> None:
    width = max(len(label) for label, _ in _TABLE)
    for label, key in _TABLE:
        cells = "".join(f"{str(r.get(key, '-')):>16}" for r in results)
        print(f"{label:<{width}}{cells}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000])
    parser.add_argument("--prefill", action="store_true",
                        help="fill the cache with stand-in vectors and time only the warm path (for sizes too large to embed)")
    parser.add_argument("--threads", type=int, default=None)
    parser.add_argument("--backend", default=None, choices=("embedding", "embedding-int8"),
                        help="scoring backend (default: the configuration's default)")
    parser.add_argument("--tracemalloc", action="store_true", help="also trace Python allocations in the warm run")
    parser.add_argument("--int8", action="store_true", help="compare int8 with fp32 instead of timing sizes")
    parser.add_argument("--int8-sentences", type=int, default=3000)
    parser.add_argument("--interleaved", type=int, default=None, metavar="N",
                        help="cold score vs bare encode of N publications in 4 alternating blocks")
    parser.add_argument("--one", type=int, default=None, help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.backend is None:
        from reporter.config import ScoreConfig

        args.backend = ScoreConfig().backend
    RESULTS.mkdir(parents=True, exist_ok=True)
    stamp = time.strftime("%Y%m%d-%H%M%S")
    if args.int8:
        from int8_compare import run_int8

        result = run_int8(args.int8_sentences, args.threads)
        print(json.dumps(result, indent=2))
        (RESULTS / f"int8-{stamp}.json").write_text(json.dumps(result, indent=2) + "\n", encoding="utf-8")
        return 0
    if args.interleaved:
        result = run_interleaved(args.interleaved, 4, args.threads, args.backend)
        print(json.dumps(result, indent=2))
        (RESULTS / f"interleaved-{stamp}.json").write_text(json.dumps(result, indent=2) + "\n", encoding="utf-8")
        return 0
    if args.one is not None:
        result = run_size(args.one, args.prefill, args.threads, args.backend, args.tracemalloc)
        print(json.dumps(result))
        return 0
    results = []
    for n in args.sizes:
        command = [sys.executable, __file__, "--one", str(n), "--backend", args.backend]
        command += ["--prefill"] * args.prefill + ["--tracemalloc"] * args.tracemalloc
        command += ["--threads", str(args.threads)] if args.threads else []
        done = subprocess.run(command, check=True, stdout=subprocess.PIPE, text=True, env={**os.environ})
        results.append(json.loads(done.stdout.strip().splitlines()[-1]))
        print(json.dumps(results[-1]), file=sys.stderr)
    _print_table(results)
    path = RESULTS / f"benchmark-{stamp}.json"
    path.write_text(json.dumps(results, indent=2) + "\n", encoding="utf-8")
    print(f"written: {path}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
