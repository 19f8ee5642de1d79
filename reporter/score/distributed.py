"""Score on a Dask cluster: kept records -> partitions by publication -> `score()` on workers -> one `Scores`.

Each worker loads the model once (a worker plugin holds it) and runs the same `score()` with the
same framework, thresholds and method; the client puts the partitions' tables back in record order.
Embedding cache: a worker reads its own file `<cache stem>.worker-<name>.sqlite` and the main cache
(read-only, when it can see it) and writes only its own file; the client alone writes the main
cache, merging the worker files it can see at the end. Each SQLite file has one writer.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import logging
import math
import os
import re
import sqlite3
import sys
import threading
import time
from dataclasses import asdict
from pathlib import Path
from typing import Iterable, Iterator, Sequence

import numpy as np
import pandas as pd

from reporter.config import BUILTIN_FRAMEWORK, ScoreConfig
from reporter.errors import ReporterError
from reporter.records import require_columns
from reporter.score.cache import EmbeddingCache
from reporter.score.framework import GoalFramework
from reporter.score.parts import ScoringParts, load_scoring_parts
from reporter.score.scoring import CHUNK_RECORDS, EVIDENCE_COLUMNS, Scores, ScoringMethod, score

try:
    from distributed import Client, LocalCluster, WorkerPlugin, as_completed, get_worker
except ModuleNotFoundError as exc:  # an optional extra: say how to get it rather than show a traceback
    raise ReporterError(
        "score.execution = \"dask\" needs Dask distributed: pip install 'waymark[distributed]'"
    ) from exc

PLUGIN_NAME = "waymark-scoring"
PARTITIONS_PER_WORKER = 4  # enough to even out uneven partitions; few enough to keep model batches full
IN_FLIGHT_PER_WORKER = 2  # queued partitions per worker: none idles, yet the client never ships the whole corpus
WORKER_WAIT_SECONDS = 60  # a remote cluster may still be starting its workers


def score_on_dask(
    records: pd.DataFrame,
    parts: ScoringParts,
    cfg: ScoreConfig,
    method: ScoringMethod | None = None,
    keep_sentences: bool = False,
    show_progress: bool = True,
    client: Client | None = None,
) -> Scores:
    """Score every record on a Dask cluster, as `score()` would locally.

    Decisions, evidence and mention counts equal a local run's; scores may differ in the last
    rounded place, as a matrix product's rounding depends on its shape (partitions vs chunks).
    `client` is used as given (and left open); otherwise one is connected to `cfg.scheduler`, or a
    local cluster of `cfg.workers` processes is started and closed afterwards. A worker lost mid-run
    is Dask's to handle: its partitions run again elsewhere (cache writes are idempotent).
    `stats` adds execution, n_workers, n_partitions, n_worker_caches_merged and n_vectors_merged;
    n_cache_hits and n_encoded include each partition's goal-space lookups, and n_unique_sentences
    counts distinct sentences per partition (a local run counts them per chunk).
    """
    require_columns(records, ("record_id", *cfg.text_fields), "score_on_dask")
    method = method or ScoringMethod()
    if records.empty:
        return score(records, parts.framework, parts.embedder, cfg, cache=parts.cache, method=method,
                     thresholds=parts.thresholds, keep_sentences=keep_sentences, show_progress=False)
    began = time.perf_counter()
    plugin = _ScoringPlugin(cfg, parts.framework, parts.thresholds, method)
    with _connected(cfg, client) as dask_client:
        n_workers = _wait_for_workers(dask_client)
        _register(dask_client, plugin)
        size = partition_size(len(records), n_workers)
        results = _run_partitions(dask_client, records, size, n_workers, keep_sentences, show_progress)
    merged = {"n_worker_caches_merged": 0, "n_vectors_merged": 0}
    if _uses_cache(cfg):
        merged = merge_worker_caches(
            Path(cfg.cache), {Path(f) for _, f in results if f}, parts.embedder.info.checksum,
            parts.embedder.info.dimension,
        )
    return _combined([s for s, _ in results], parts.framework, cfg, {
        "execution": "dask", "n_workers": n_workers, "n_partitions": len(results),
        "seconds_total": round(time.perf_counter() - began, 3), **merged,
    })


def partition_size(n_records: int, n_workers: int) -> int:
    """Publications per partition: a few partitions per worker, never more than one local chunk."""
    return max(1, min(CHUNK_RECORDS, math.ceil(n_records / (max(n_workers, 1) * PARTITIONS_PER_WORKER))))


def worker_cache_path(cache: Path, worker_name: object) -> Path:
    """This worker's own cache file, next to the configured one."""
    safe = re.sub(r"[^A-Za-z0-9_.-]+", "_", str(worker_name)).strip("_") or "worker"
    return cache.with_name(f"{cache.stem}.worker-{safe}.sqlite")


def merge_worker_caches(main: Path, files: Iterable[Path], model_checksum: str, dimension: int) -> dict:
    """Copy every entry of the worker cache files the client can see into the main cache, then delete them.

    Each table is keyed by content (model or splitter checksum + text hash), so INSERT OR IGNORE
    merges in any order. Files on a worker's own disk stay there and keep serving that worker.
    """
    EmbeddingCache(main, model_checksum, dimension).close()  # creates the file and its tables when missing
    n_files = n_vectors = 0
    with contextlib.closing(sqlite3.connect(main, timeout=60)) as db:
        tables = {name: [col[1] for col in db.execute(f'PRAGMA main.table_info("{name}")')]
                  for (name,) in db.execute("SELECT name FROM main.sqlite_master WHERE type = 'table'").fetchall()}
        for path in sorted(files):
            if not path.exists() or path.resolve() == main.resolve():
                continue
            db.execute("ATTACH DATABASE ? AS worker", (str(path),))
            theirs = {name for (name,) in db.execute("SELECT name FROM worker.sqlite_master WHERE type = 'table'")}
            for name, columns in tables.items():
                if name not in theirs:
                    continue
                listed = ", ".join(f'"{c}"' for c in columns)
                before = db.total_changes
                db.execute(f'INSERT OR IGNORE INTO main."{name}" ({listed}) SELECT {listed} FROM worker."{name}"')
                n_vectors += (db.total_changes - before) if name == "embeddings" else 0
            db.commit()
            db.execute("DETACH DATABASE worker")
            n_files += 1
            for leftover in (path, path.with_name(path.name + "-wal"), path.with_name(path.name + "-shm")):
                leftover.unlink(missing_ok=True)
    return {"n_worker_caches_merged": n_files, "n_vectors_merged": n_vectors}


# --- client side ---------------------------------------------------------------------------


@contextlib.contextmanager
def _connected(cfg: ScoreConfig, client: Client | None) -> Iterator[Client]:
    if client is not None:
        yield client
        return
    if cfg.scheduler is not None:
        try:
            remote = Client(cfg.scheduler, timeout="20s")
        except (OSError, TimeoutError) as exc:
            raise ReporterError(
                f"score.scheduler: cannot reach the Dask scheduler at {cfg.scheduler} ({exc}); "
                "start it with `dask scheduler` or correct the address"
            ) from None
        with remote:
            yield remote
        return
    n_workers = cfg.workers or os.cpu_count() or 1
    # One model per process; its torch threads share the cores evenly (see _ScoringPlugin.setup).
    with LocalCluster(
        n_workers=n_workers, threads_per_worker=max(1, (os.cpu_count() or 1) // n_workers), processes=True,
        dashboard_address=":0", silence_logs=logging.ERROR,
    ) as cluster, Client(cluster) as local:
        yield local


def _wait_for_workers(client: Client) -> int:
    try:
        client.wait_for_workers(1, timeout=WORKER_WAIT_SECONDS)
    except TimeoutError:
        address = client.scheduler.address
        raise ReporterError(
            f"score.scheduler: no Dask worker joined {address} within {WORKER_WAIT_SECONDS} s; "
            f"start some with `dask worker {address}`"
        ) from None
    return len(client.nthreads())


def _register(client: Client, plugin: "_ScoringPlugin") -> None:
    # Registering again would reload the model on every worker; skip when all hold this very setup.
    held = client.run(_held_digest)
    if not held or any(digest != plugin.digest for digest in held.values()):
        client.register_plugin(plugin, name=PLUGIN_NAME)


def _held_digest(dask_worker) -> str | None:
    return getattr(dask_worker.plugins.get(PLUGIN_NAME), "digest", None)


def _run_partitions(client, records, size, n_workers, keep_sentences, show_progress):
    """(Scores, worker cache file) per partition, in record order; a bounded number in flight."""
    starts = iter(range(0, len(records), size))
    window = max(1, IN_FLIGHT_PER_WORKER * n_workers)

    def submit(start: int):
        part = records.iloc[start : start + size]
        return client.submit(_score_partition, start, part, keep_sentences, pure=False)

    in_flight = {submit(start) for _, start in zip(range(window), starts)}
    queue = as_completed(list(in_flight))
    done: dict[int, tuple[Scores, str | None]] = {}
    progress = _progress(len(records), show_progress)
    try:
        for future in queue:
            start, scores, cache_file = future.result()
            in_flight.discard(future)
            done[start] = (scores, cache_file)
            following = next(starts, None)
            if following is not None:
                added = submit(following)
                in_flight.add(added)
                queue.add(added)
            if progress is not None:
                progress.update(len(scores.general_mentions))
    finally:
        if in_flight:  # after a failure, stop the rest instead of finishing it for nobody
            client.cancel(list(in_flight))
        if progress is not None:
            progress.close()
    return [done[start] for start in sorted(done)]


def _progress(total: int, show: bool):
    if not show:
        return None
    from tqdm import tqdm

    return tqdm(total=total, unit="pub", desc="Scoring on Dask", file=sys.stderr, leave=False)


def _combined(parts: Sequence[Scores], framework: GoalFramework, cfg: ScoreConfig, run: dict) -> Scores:
    """One `Scores` from the partitions', built the way `score()` builds its own from chunks."""
    first = parts[0]
    sentences = [p.sentences for p in parts if p.sentences is not None]
    # Every partition embeds the goal space again; count those texts once, as a local run does.
    n_goal_unique = _goal_space_unique_texts(framework, cfg)
    repeats = len(parts) - 1
    summed = {k: sum(p.stats[k] for p in parts) for k in ("n_records", "n_sentences", "n_records_reused",
                                                         "n_unique_sentences", "n_cache_hits", "n_encoded",
                                                         "seconds_encoding")}
    stats = {
        **summed,
        "n_unique_sentences": summed["n_unique_sentences"] - repeats * n_goal_unique,
        "seconds_encoding": round(summed["seconds_encoding"], 3),  # worker-seconds, summed over workers
        "sentences_per_second": (
            round(summed["n_encoded"] / summed["seconds_encoding"], 1) if summed["seconds_encoding"] else None
        ),
        **run,
    }
    return Scores(
        table=pd.concat([p.table for p in parts], ignore_index=True),
        evidence=pd.DataFrame(_rows(p.evidence for p in parts), columns=list(EVIDENCE_COLUMNS)),
        general_mentions=pd.DataFrame(_rows(p.general_mentions for p in parts),
                                      columns=["record_id", "n_general_mentions"]),
        sentences=pd.concat(sentences, ignore_index=True) if sentences else None,
        thresholds=first.thresholds, policy=first.policy, method=first.method, stats=stats,
    )


def _rows(frames: Iterable[pd.DataFrame]) -> list[tuple]:
    # Rebuilt from rows, as `score()` builds these tables: a concat with an empty part would turn ints to objects.
    return [row for frame in frames for row in frame.itertuples(index=False, name=None)]


def _goal_space_unique_texts(framework: GoalFramework, cfg: ScoreConfig) -> int:
    """Distinct texts `score()` embeds for the goal space (descriptors, then background, each deduplicated)."""
    if cfg.backend == "nli":
        return 0
    return len({text for goal in framework.goals for text in goal.descriptors}) + len(set(framework.background))


def _uses_cache(cfg: ScoreConfig) -> bool:
    # As `load_scoring_parts`: every backend with vectors caches them; the nli backend has none.
    return cfg.use_cache and cfg.cache is not None and cfg.backend != "nli"


# --- worker side ---------------------------------------------------------------------------


def _score_partition(start: int, records: pd.DataFrame, keep_sentences: bool):
    plugin = get_worker().plugins[PLUGIN_NAME]
    return (start, *plugin.score(records, keep_sentences))


class _ScoringPlugin(WorkerPlugin):
    """Lives on each worker: the small scoring parts, shipped once, and the model, loaded on first use."""

    def __init__(self, cfg: ScoreConfig, framework: GoalFramework, thresholds: dict, method: ScoringMethod):
        self.cfg, self.framework, self.thresholds, self.method = cfg, framework, dict(thresholds), method
        setup = [cfg.model_dump_json(), framework.checksum, json.dumps(self.thresholds, sort_keys=True),
                 json.dumps(asdict(method), sort_keys=True)]
        self.digest = hashlib.sha256("\n".join(setup).encode()).hexdigest()

    def setup(self, worker) -> None:
        # One partition at a time per worker: the model's torch threads already use the worker's share
        # of the cores (its Dask thread count, or score.threads), and the cache file has one writer.
        self._lock = threading.Lock()
        self._threads = self.cfg.threads or worker.state.nthreads
        self._embedder = None
        self._cache_file = worker_cache_path(Path(self.cfg.cache), worker.name) if _uses_cache(self.cfg) else None

    def score(self, records: pd.DataFrame, keep_sentences: bool) -> tuple[Scores, str | None]:
        with self._lock:
            if self._embedder is None:
                self._embedder = _load_model(self.cfg, self._threads)
            # SQLite connections belong to one thread, and tasks run on the worker's thread pool.
            cache = None
            if self._cache_file is not None:
                info = self._embedder.info
                cache = _WorkerCache(self._cache_file, Path(self.cfg.cache), info.checksum, info.dimension)
            try:
                scores = score(records, self.framework, self._embedder, self.cfg, cache=cache, method=self.method,
                               thresholds=self.thresholds, keep_sentences=keep_sentences, show_progress=False)
            finally:
                if cache is not None:
                    cache.close()
        return scores, str(self._cache_file) if cache is not None else None


def _load_model(cfg: ScoreConfig, threads: int):
    """The configured model, as `load_scoring_parts` builds it for a local run.

    Only the model is wanted from it: the framework and thresholds travel with the plugin (the
    built-in framework stands in, so a framework file need not exist on the worker), and the
    cache is opened per task.
    """
    model_only = cfg.model_copy(
        update={"framework": BUILTIN_FRAMEWORK, "thresholds_file": None, "use_cache": False, "threads": threads}
    )
    return load_scoring_parts(model_only).embedder



class _WorkerCache(EmbeddingCache):
    """The worker's own cache file, read and written, over the main cache file, only read.

    Only the client writes the main file, and only after every task has ended.
    """

    def __init__(self, own: Path, main: Path, model_checksum: str, dimension: int):
        super().__init__(own, model_checksum, dimension)
        self._main = None
        if main.exists() and main.resolve() != own.resolve():
            self._main = EmbeddingCache(main, model_checksum, dimension, read_only=True)

    def _own_then_main(self, name: str, *args, hashes: Sequence[bytes]) -> dict:
        found = getattr(super(), name)(*args, hashes)
        if self._main is not None and len(found) < len(hashes):
            found.update(getattr(self._main, name)(*args, [h for h in hashes if h not in found]))
        return found

    def get_many(self, hashes: Sequence[bytes]) -> dict[bytes, np.ndarray]:
        return self._own_then_main("get_many", hashes=hashes)

    def get_splits(self, splitter: str, hashes: Sequence[bytes]) -> dict[bytes, list[str]]:
        return self._own_then_main("get_splits", splitter, hashes=hashes)

    def get_results(self, method: str, hashes: Sequence[bytes]) -> dict[bytes, tuple[bytes, str]]:
        return self._own_then_main("get_results", method, hashes=hashes)

    def close(self) -> None:
        super().close()
        if self._main is not None:
            self._main.close()
