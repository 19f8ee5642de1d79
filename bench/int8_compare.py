"""int8 against fp32: throughput on the same sentences and agreement of decisions on the demo.

Run through `python bench/benchmark.py --int8`.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np
import pandas as pd

from synthetic_corpus import make_corpus

ROOT = Path(__file__).resolve().parents[1]
ROUNDS = 4


def run_int8(n_sentences: int, threads: int | None) -> dict:
    """Throughput of both precisions on the same sentences, and agreement of decisions on the demo."""
    from reporter.config import load_config
    from reporter.pipeline import run_intake
    from reporter.score import score
    from reporter.score.embedder import SentenceEmbedder
    from reporter.score.framework import load_framework
    from reporter.score.quantised import QuantisedEmbedder

    fp32 = SentenceEmbedder(threads=threads)
    int8 = QuantisedEmbedder(threads=threads, export_dir=ROOT / "bench" / "results" / "onnx")
    records, _, _ = make_corpus(max(50, n_sentences // 7))
    from benchmark import scored_texts

    texts = scored_texts(records, load_framework("un-sdg-2030"), fp32, ("title", "abstract", "keywords"))
    texts = texts[-n_sentences:]  # corpus sentences, not descriptors
    out: dict = {"n_sentences": len(texts), "checksum_fp32": fp32.info.checksum, "checksum_int8": int8.info.checksum}
    vectors, rates = {}, {"fp32": [], "int8": []}
    fp32.encode(texts[:64]), int8.encode(texts[:64])
    # Alternating rounds, best of each: the machine is shared, so one slow spell should not decide.
    # The ratio per round (each int8 pass against the fp32 pass just before it) shows the spread.
    for _ in range(ROUNDS):
        for name, model in (("fp32", fp32), ("int8", int8)):
            began = time.perf_counter()
            vectors[name] = model.encode(texts)
            rates[name].append(round(len(texts) / (time.perf_counter() - began), 1))
    for name in rates:
        out[f"sentences_per_second_{name}_rounds"] = rates[name]
        out[f"sentences_per_second_{name}"] = max(rates[name])
    out["throughput_ratio_int8_over_fp32"] = round(out["sentences_per_second_int8"] / out["sentences_per_second_fp32"], 3)
    per_round = [i / f for i, f in zip(rates["int8"], rates["fp32"])]
    out["throughput_ratio_rounds"] = [round(r, 3) for r in per_round]
    out["throughput_ratio_median"] = round(float(np.median(per_round)), 3)
    # A sentence's int8 vector must not depend on its neighbours in the call (dynamic scales would).
    alone = np.vstack([int8.encode([t]) for t in texts[:200]])
    out["int8_max_drift_alone_vs_in_list"] = float(np.max(np.abs(alone - vectors["int8"][:200])))
    cosine = np.sum(vectors["fp32"] * vectors["int8"], axis=1)  # both unit length
    out["cosine_fp32_int8_mean"] = round(float(cosine.mean()), 4)
    out["cosine_fp32_int8_p05"] = round(float(np.quantile(cosine, 0.05)), 4)

    config = load_config(ROOT / "example_input" / "waymark.toml")
    intake = run_intake(config)
    framework = load_framework(config.score.framework)
    tables = {}
    for name, model in (("fp32", fp32), ("int8", int8)):
        result = score(intake.records, framework, model, config.score, cache=None, show_progress=False)
        tables[name] = result.table.set_index(["record_id", "goal"])["is_aligned"]
    both = pd.concat(tables, axis=1)
    same = both["fp32"] == both["int8"]
    out["demo_n_publications"] = int(len(intake.records))
    out["demo_n_aligned_fp32"] = int(both["fp32"].sum())
    out["demo_n_aligned_int8"] = int(both["int8"].sum())
    out["demo_agreement_pairs"] = round(float(same.mean()), 4)
    out["demo_agreement_publications"] = round(float(same.groupby(level="record_id").all().mean()), 4)
    out["meets_targets"] = out["throughput_ratio_median"] >= 1.8 and out["demo_agreement_pairs"] >= 0.99
    return out
