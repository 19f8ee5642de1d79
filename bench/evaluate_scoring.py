"""Measure scoring quality on a labelled set of abstracts, and sweep the method's parameters.

    python bench/evaluate_scoring.py tests/data/devset/abstracts.jsonl            # figures at the defaults
    python bench/evaluate_scoring.py tests/data/devset/abstracts.jsonl --sweep    # grid over the tunables

Input: JSON lines with id, title, abstract, keywords, goals (list of codes; [] = no goal).
Figures: top-1 accuracy on papers with a goal (the highest-scoring goal is one of the labelled
goals), macro-F1 over the goals of the aligned decisions, and the share of no-goal papers left
unaligned. Sentence embeddings are computed once (through the cache), so a sweep costs numpy time only.
"""

from __future__ import annotations

import argparse
import itertools
import json
import sys
from pathlib import Path

import numpy as np
import pandas as pd
from sklearn.metrics import f1_score

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from reporter.score.align import AlignParams, aggregate_by_record, sentence_scores  # noqa: E402
from reporter.score.cache import EmbeddingCache  # noqa: E402
from reporter.score.embedder import SentenceEmbedder  # noqa: E402
from reporter.score.encode import EncodeStats, embed_texts  # noqa: E402
from reporter.score.framework import load_framework  # noqa: E402
from reporter.score.lexical import KeywordMatcher, lexical_score  # noqa: E402
from reporter.score.mentions import compile_mentions, find_mentions  # noqa: E402
from reporter.score.scoring import ScoringMethod, build_goal_space  # noqa: E402
from reporter.score.sentences import SentenceSplitter, fit_to_model, record_units  # noqa: E402


def load_labelled(path: Path) -> pd.DataFrame:
    rows = [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines() if line.strip()]
    frame = pd.DataFrame(rows)
    frame["record_id"] = frame["id"]
    frame["keywords"] = frame["keywords"].map(lambda k: tuple(k or ()))
    frame["goals"] = frame["goals"].map(lambda g: tuple(str(x) for x in g))
    return frame


class Prepared:
    """Everything that does not depend on the tunables, computed once."""

    def __init__(self, frame: pd.DataFrame, framework_spec: str, cache_path: Path, backend: str = "embedding"):
        self.frame = frame
        self.framework = load_framework(framework_spec)
        self.codes = self.framework.goal_codes
        if backend == "embedding-int8":
            from reporter.score.quantised import QuantisedEmbedder

            embedder = QuantisedEmbedder(export_dir=cache_path.parent / "onnx")
        else:
            embedder = SentenceEmbedder()
        cache = EmbeddingCache(cache_path, embedder.info.checksum, embedder.info.dimension)
        stats = EncodeStats()
        self.space = build_goal_space(self.framework, embedder, cache, stats)
        splitter = SentenceSplitter()
        units = []
        for row in frame.itertuples(index=False):
            fields = {"title": row.title, "abstract": row.abstract, "keywords": row.keywords}
            units.extend(record_units(row.record_id, fields, ("title", "abstract", "keywords"), splitter))
        units = fit_to_model(units, embedder.info.max_tokens, embedder.count_tokens)
        self.vectors = embed_texts([u.text for u in units], embedder, cache, stats)
        cache.close()
        position = {rid: i for i, rid in enumerate(frame["record_id"])}
        self.unit_record = np.array([position[u.record_id] for u in units])
        patterns = compile_mentions(self.framework)
        matcher = KeywordMatcher.build(self.codes, [g.keywords for g in self.framework.goals])
        self.explicit = np.zeros((len(frame), len(self.codes)), dtype=bool)
        self.hits = np.zeros((len(frame), len(self.codes)), dtype=np.int32)
        for i, row in enumerate(frame.itertuples(index=False)):
            text = "\n".join([row.title, row.abstract or "", "; ".join(row.keywords)])
            for code in find_mentions(text, patterns).by_goal:
                self.explicit[i, self.codes.index(code)] = True
            self.hits[i] = matcher.hits(text)
        self.truth = np.array([[code in goals for code in self.codes] for goals in frame["goals"]])


def scores_for(prep: Prepared, method: ScoringMethod) -> np.ndarray:
    per_sentence, _ = sentence_scores(prep.vectors, prep.space, method.align)
    semantic = aggregate_by_record(prep.unit_record, per_sentence, len(prep.frame), method.align.top_k)
    lexical = np.vectorize(lambda h: lexical_score(int(h), method.lexical_scale))(prep.hits)
    return semantic + (1 - semantic) * method.lexical_weight * lexical


def metrics(prep: Prepared, scores: np.ndarray, threshold: float, use_mentions: bool = True) -> dict:
    aligned = scores >= threshold
    if use_mentions:
        aligned |= prep.explicit
    has_goal = prep.truth.any(axis=1)
    top = scores.argmax(axis=1)
    top1 = prep.truth[np.arange(len(top)), top][has_goal].mean()
    per_goal = f1_score(prep.truth, aligned, average=None, zero_division=0)
    return {
        "top1": round(float(top1), 3),
        "macro_f1": round(float(per_goal.mean()), 3),
        "micro_f1": round(float(f1_score(prep.truth, aligned, average="micro", zero_division=0)), 3),
        "no_goal_unaligned": round(float((~aligned[~has_goal].any(axis=1)).mean()), 3),
        "per_goal_f1": {c: round(float(f), 2) for c, f in zip(prep.codes, per_goal)},
        "n_goal_papers": int(has_goal.sum()),
        "n_no_goal_papers": int((~has_goal).sum()),
    }


def sweep(prep: Prepared) -> list[dict]:
    grid = {
        "temperature": [0.03, 0.05, 0.08],
        "floor": [0.25, 0.30, 0.35],
        "floor_width": [0.04],
        "top_k": [2, 3],
        "pool_top": [2, 3],
        "lexical_weight": [0.35],
        "competition": [1.0, 0.7, 0.5, 0.3, 0.0],
    }
    results = []
    for values in itertools.product(*grid.values()):
        p = dict(zip(grid, values))
        method = ScoringMethod(
            align=AlignParams(p["temperature"], p["floor"], p["floor_width"], p["top_k"], p["pool_top"],
                              p["competition"]),
            lexical_weight=p["lexical_weight"],
        )
        scores = scores_for(prep, method)
        best = max(
            (dict(metrics(prep, scores, t), threshold=t) for t in np.arange(0.1, 0.8, 0.05).round(2)),
            key=lambda m: m["macro_f1"] + 0.5 * min(m["no_goal_unaligned"], 0.9),
        )
        results.append({**p, **{k: v for k, v in best.items() if k != "per_goal_f1"}})
    return sorted(results, key=lambda r: -(r["macro_f1"] + 0.5 * min(r["no_goal_unaligned"], 0.9)))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("labelled", type=Path)
    parser.add_argument("--framework", default="un-sdg-2030")
    parser.add_argument("--threshold", type=float, default=None)
    parser.add_argument("--sweep", action="store_true")
    parser.add_argument("--cache", type=Path, default=Path("bench/results/eval-cache.sqlite"))
    parser.add_argument("--backend", default="embedding", choices=("embedding", "embedding-int8"))
    args = parser.parse_args()
    prep = Prepared(load_labelled(args.labelled), args.framework, args.cache, args.backend)
    if args.sweep:
        for row in sweep(prep)[:15]:
            print(json.dumps(row))
        return
    from reporter.config import ScoreConfig

    threshold = args.threshold if args.threshold is not None else ScoreConfig().threshold
    scores = scores_for(prep, ScoringMethod())
    for t in sorted({threshold, *np.arange(0.2, 0.75, 0.05).round(2)}):
        m = metrics(prep, scores, t)
        marker = "  <- default" if t == threshold else ""
        print(f"threshold {t:.2f}: top1 {m['top1']:.3f}  macro-F1 {m['macro_f1']:.3f}  "
              f"no-goal unaligned {m['no_goal_unaligned']:.3f}{marker}")
    print(json.dumps(metrics(prep, scores, threshold), indent=1))


if __name__ == "__main__":
    main()
