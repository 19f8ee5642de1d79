"""Scoring throughput in this process vs a Dask LocalCluster of 1 and 2 workers (issue #9).

    python bench/distributed_throughput.py                 # 300 synthetic publications
    python bench/distributed_throughput.py --n 1000

The corpus is `synthetic_corpus.make_corpus` (seeded, invented). Each mode first scores a small
warm-up corpus on its own fresh cache, so the model load and the goal space are out of the timed
run; the timed run is then cold for every publication sentence. Sentences/s counts the corpus's
distinct sentences (what a local run embeds) over wall time. Results are printed and written as
JSON to bench/results/.
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "bench"))
RESULTS = ROOT / "bench" / "results"

from synthetic_corpus import make_corpus  # noqa: E402  (beside this file)

WARM_UP = 8  # publications scored before timing, from a corpus of other text (another seed)


def run_mode(mode: str, records, warm_up, workdir: Path) -> dict:
    from reporter.config import ScoreConfig
    from reporter.score import load_scoring_parts, score

    cache = workdir / mode / "embeddings.sqlite"
    shutil.rmtree(cache.parent, ignore_errors=True)
    n_workers = None if mode == "local" else int(mode.split("-")[1])
    cores = os.cpu_count() or 1
    cfg = ScoreConfig(cache=cache, execution="local" if n_workers is None else "dask", workers=n_workers)
    out: dict = {"mode": mode, "n_publications": len(records), "cores": cores,
                 "torch_threads_per_process": cores if n_workers is None else max(1, cores // n_workers)}
    began = time.perf_counter()
    parts = load_scoring_parts(cfg)
    try:
        if n_workers is None:
            def run(frame):
                return score(frame, parts.framework, parts.embedder, cfg, cache=parts.cache,
                             thresholds=parts.thresholds, show_progress=False)

            run(warm_up)
            out["seconds_start_and_warm_up"] = round(time.perf_counter() - began, 2)
            timed = _timed(run, records, lambda: 0.0)
        else:
            from distributed import Client, LocalCluster

            from reporter.score.distributed import score_on_dask

            with LocalCluster(n_workers=n_workers, threads_per_worker=max(1, cores // n_workers), processes=True,
                              dashboard_address=":0") as cluster, Client(cluster) as client:
                def run(frame):
                    return score_on_dask(frame, parts, cfg, show_progress=False, client=client)

                run(warm_up)
                out["seconds_start_and_warm_up"] = round(time.perf_counter() - began, 2)
                timed = _timed(run, records, lambda: sum(client.run(time.process_time).values()))
    finally:
        parts.close()
    out.update(timed)
    return out


def _timed(run, records, worker_cpu) -> dict:
    """Wall time, and CPU seconds of this process and the workers: steadier on a shared machine."""
    load_before = os.getloadavg()[0]
    workers_began = worker_cpu()
    began = time.perf_counter()
    cpu_began = time.process_time()
    scores = run(records)
    seconds = time.perf_counter() - began
    client_cpu = time.process_time() - cpu_began
    stats = scores.stats
    return {
        "seconds_wall": round(seconds, 2),
        "seconds_client_cpu": round(client_cpu, 2),
        "seconds_worker_cpu": round(worker_cpu() - workers_began, 2),
        "n_sentences": stats["n_sentences"],
        "n_encoded": stats["n_encoded"],
        "n_partitions": stats.get("n_partitions", 1),
        "load_average_1min_before": round(load_before, 2),
        "load_average_1min_after": round(os.getloadavg()[0], 2),
        "table": scores.table,
    }


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=300, help="synthetic publications to score")
    parser.add_argument("--modes", nargs="+", default=["local", "dask-1", "dask-2"])
    args = parser.parse_args(argv)

    records = make_corpus(args.n)[0]
    warm_up = make_corpus(WARM_UP, seed=11)[0]
    workdir = RESULTS / "distributed-cache"
    results = [run_mode(mode, records, warm_up, workdir) for mode in args.modes]
    shutil.rmtree(workdir, ignore_errors=True)

    reference = results[0]["table"]
    # The useful work is what a local run embeds: each distinct sentence once.
    useful = next((r["n_encoded"] for r in results if r["mode"] == "local"), results[0]["n_encoded"])
    for result in results:
        table = result.pop("table")
        result["sentences_per_second"] = round(useful / result["seconds_wall"], 1)
        cpu = result["seconds_client_cpu"] + result["seconds_worker_cpu"]
        result["sentences_per_cpu_second"] = round(useful / cpu, 1)
        result["same_decisions_as_first_mode"] = bool((table["is_aligned"] == reference["is_aligned"]).all())
        result["max_score_difference"] = float((table["alignment_score"] - reference["alignment_score"]).abs().max())
    base = results[0]["sentences_per_second"]
    for result in results:
        result["speedup_vs_first_mode"] = round(result["sentences_per_second"] / base, 2)

    print(f"{'mode':8} {'wall s':>8} {'sent/s':>8} {'speedup':>8} {'sent/cpu-s':>10} {'encoded':>8} "
          f"{'parts':>6} {'load':>11}")
    for r in results:
        load = f"{r['load_average_1min_before']:.1f}->{r['load_average_1min_after']:.1f}"
        print(f"{r['mode']:8} {r['seconds_wall']:8.1f} {r['sentences_per_second']:8.1f} "
              f"{r['speedup_vs_first_mode']:8.2f} {r['sentences_per_cpu_second']:10.1f} {r['n_encoded']:8d} "
              f"{r['n_partitions']:6d} {load:>11}")
    RESULTS.mkdir(parents=True, exist_ok=True)
    path = RESULTS / f"distributed-{time.strftime('%Y%m%d-%H%M%S')}.json"
    path.write_text(json.dumps({"n_publications": args.n, "useful_sentences": useful, "modes": results}, indent=2) + "\n")
    print(f"written: {path}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
