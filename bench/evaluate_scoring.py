"""Measure scoring quality on a labelled set of abstracts, and sweep the method's parameters.

    python bench/evaluate_scoring.py REALSET/abstracts.jsonl                       # real abstracts (see README)
    python bench/evaluate_scoring.py tests/data/devset/abstracts.jsonl            # the invented dev set
    python bench/evaluate_scoring.py REALSET/abstracts.jsonl --sweep --tune-half A  # tune on one half only
    python bench/evaluate_scoring.py REALSET/abstracts.jsonl --write-accuracy      # figures the report cites

Input: JSON lines with id, title, abstract, keywords, goals (list of codes; [] = no goal) and,
where known, primary (the main goal), confidence (high/medium/low) and repo (the source file's
repository). Figures: per-goal precision, recall and F1; macro-F1; top-1 on the primary goal and
on any labelled goal (the highest-scoring goal); the share of no-goal papers left unaligned. They
are given for all rows, for two halves split by repository (tune on one, check on the other),
for high-confidence rows, and for English and non-English rows (language detected as the
pipeline does). Sentence embeddings are computed once (through the cache), so a sweep costs
numpy time only.
"""

from __future__ import annotations

import argparse
import datetime
import hashlib
import itertools
import json
import sys
from pathlib import Path

import numpy as np
import pandas as pd
from sklearn.metrics import f1_score, precision_recall_fscore_support

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from reporter.score.align import AlignParams, record_scores, sentence_scores  # noqa: E402
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
        self.unit_is_title = np.array([u.kind == "title" for u in units], dtype=bool)
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
        self.model_id, self.backend, self.framework_checksum = embedder.info.id, backend, self.framework.checksum


def scores_for(prep: Prepared, method: ScoringMethod) -> np.ndarray:
    per_sentence, _ = sentence_scores(prep.vectors, prep.space, method.align)
    semantic = record_scores(prep.unit_record, prep.unit_is_title, per_sentence, len(prep.frame), method.align)
    lexical = np.vectorize(lambda h: lexical_score(int(h), method.lexical_scale))(prep.hits)
    return semantic + (1 - semantic) * method.lexical_weight * lexical


def metrics(prep: Prepared, scores: np.ndarray, threshold: float, use_mentions: bool = True,
            rows: np.ndarray | None = None) -> dict:
    """Figures of the aligned decisions at `threshold` over `rows` (a boolean mask; all rows by default)."""
    rows = np.ones(len(scores), dtype=bool) if rows is None else rows
    aligned = scores >= threshold
    if use_mentions:
        aligned |= prep.explicit
    truth, aligned, scores = prep.truth[rows], aligned[rows], scores[rows]
    has_goal = truth.any(axis=1)
    top = scores.argmax(axis=1)
    top1 = truth[np.arange(len(top)), top][has_goal].mean() if has_goal.any() else float("nan")
    precision, recall, per_goal, support = precision_recall_fscore_support(truth, aligned, zero_division=0)
    out = {
        "n": int(rows.sum()),
        "top1": round(float(top1), 3),
        # Over the goals present in these rows: a goal with no labelled paper in a half has no F1.
        "macro_f1": round(float(per_goal[support > 0].mean()), 3),
        "micro_f1": round(float(f1_score(truth, aligned, average="micro", zero_division=0)), 3),
        "no_goal_unaligned": round(float((~aligned[~has_goal].any(axis=1)).mean()), 3) if (~has_goal).any() else None,
        "goal_papers_aligned_correctly": round(float((aligned & truth)[has_goal].any(axis=1).mean()), 3) if has_goal.any() else None,
        "per_goal_f1": {c: round(float(f), 2) for c, f in zip(prep.codes, per_goal)},
        "per_goal": {c: {"precision": round(float(p), 3), "recall": round(float(r), 3), "f1": round(float(f), 3),
                         "support": int(n)} for c, p, r, f, n in zip(prep.codes, precision, recall, per_goal, support)},
        "n_goal_papers": int(has_goal.sum()),
        "n_no_goal_papers": int((~has_goal).sum()),
    }
    primary = prep.frame["primary"].to_numpy()[rows] if "primary" in prep.frame else None
    if primary is not None:
        known = np.array([isinstance(p, str) and p in prep.codes for p in primary])
        if known.any():
            index = np.array([prep.codes.index(p) if k else -1 for p, k in zip(primary, known)])
            out["top1_primary"] = round(float((top[known] == index[known]).mean()), 3)
    return out


def repository_halves(repos: pd.Series) -> np.ndarray:
    """'A' or 'B' per row: whole repositories in each half (ordered by a hash of their name, so the
    split is fixed and blind to content), sizes balanced greedily."""
    sizes = repos.value_counts()
    side, n = {}, {"A": 0, "B": 0}
    for repo in sorted(sizes.index, key=lambda r: hashlib.md5(str(r).encode()).hexdigest()):
        half = "A" if n["A"] <= n["B"] else "B"
        side[repo] = half
        n[half] += int(sizes[repo])
    return repos.map(side).to_numpy()


def subsets(prep: Prepared) -> dict[str, np.ndarray]:
    """The row groups every figure is given for (those the labelled file supports)."""
    frame = prep.frame
    out = {"all": np.ones(len(frame), dtype=bool)}
    if "repo" in frame:
        halves = repository_halves(frame["repo"])
        out["half A"], out["half B"] = halves == "A", halves == "B"
    if "confidence" in frame:
        out["high confidence"] = (frame["confidence"] == "high").to_numpy()
    english = english_rows(frame)
    if not english.all():
        out["English"], out["non-English"] = english, ~english
    return out


def english_rows(frame: pd.DataFrame) -> np.ndarray:
    """Rows the pipeline's language detection calls English (reporter.enrich.language)."""
    from reporter.enrich.language import add_languages

    records = pd.DataFrame({"record_id": frame["record_id"], "title": frame["title"],
                            "abstract": frame["abstract"], "language": ""})
    return add_languages(records)[0]["is_english"].to_numpy()


TARGETS = {"macro_f1": 0.85, "no_goal_unaligned": 0.93, "top1_primary": 0.90, "min_recall": 0.70}  # issue 14


def print_report(prep: Prepared, scores: np.ndarray, threshold: float) -> dict:
    """Summary per subset, per-goal table for all rows and both halves; returns every figure."""
    groups = subsets(prep)
    figures = {name: metrics(prep, scores, threshold, rows=rows) for name, rows in groups.items()}
    print(f"\nAt threshold {threshold:.2f} ({prep.backend}, {len(prep.frame)} labelled abstracts)")
    print(f"{'rows':16} {'n':>4} {'macro-F1':>8} {'top1 prim':>9} {'top1 any':>8} {'no-goal un':>10} {'goal->any':>9}  recall < 0.70 (goals with >= 10 papers)")
    for name, m in figures.items():
        low = [f"{c}:{g['recall']:.2f}" for c, g in m["per_goal"].items() if g["support"] >= 10 and g["recall"] < TARGETS["min_recall"]]
        print(f"{name:16} {m['n']:>4} {m['macro_f1']:>8.3f} {_fmt(m.get('top1_primary')):>9} {m['top1']:>8.3f} "
              f"{_fmt(m['no_goal_unaligned']):>10} {_fmt(m['goal_papers_aligned_correctly']):>9}  {' '.join(low)}")
    shown = [n for n in ("all", "half A", "half B") if n in figures]
    print("\nper goal: " + "   ".join(f"{n}: P / R / F1 (n)" for n in shown))
    for code in prep.codes:
        cells = [figures[n]["per_goal"][code] for n in shown]
        print(f"goal {code:>2}  " + "   ".join(f"{c['precision']:.2f} / {c['recall']:.2f} / {c['f1']:.2f} ({c['support']:>2})" for c in cells))
    return figures


def _fmt(value) -> str:
    return "-" if value is None or (isinstance(value, float) and np.isnan(value)) else f"{value:.3f}"


def accuracy_record(prep: Prepared, figures: dict, threshold: float, set_name: str) -> str:
    """The TOML text of the accuracy the report's method section cites (reporter/frameworks/*.accuracy.toml)."""
    m = figures["all"]
    recalls = {c: g["recall"] for c, g in m["per_goal"].items() if g["support"] >= 10}
    low, high = min(recalls, key=recalls.get), max(recalls, key=recalls.get)
    lines = [
        "# Scoring accuracy measured on real abstracts with this framework; written by",
        "# bench/evaluate_scoring.py --write-accuracy. The report cites it when a run uses the same",
        "# framework (checksum), backend and threshold.",
        f'set = "{set_name}"',
        f'measured_on = "{datetime.date.today().isoformat()}"',
        f'framework_checksum = "{prep.framework_checksum}"',
        f'backend = "{prep.backend}"',
        f"threshold = {threshold}",
        f"n_abstracts = {m['n']}",
        f"n_no_goal = {m['n_no_goal_papers']}",
        f"macro_f1 = {m['macro_f1']}",
        f"top1_primary = {m.get('top1_primary', m['top1'])}",
        f"no_goal_unaligned = {m['no_goal_unaligned']}",
        f'recall_lowest = {{ goal = "{low}", recall = {recalls[low]} }}',
        f'recall_highest = {{ goal = "{high}", recall = {recalls[high]} }}',
    ]
    if "non-English" in figures:
        ne = figures["non-English"]
        lines += [f"n_non_english = {ne['n']}",
                  f"non_english_goal_papers_aligned = {ne['goal_papers_aligned_correctly']}",
                  f"english_goal_papers_aligned = {figures['English']['goal_papers_aligned_correctly']}"]
    return "\n".join(lines) + "\n"


def sweep(prep: Prepared, rows: np.ndarray | None = None) -> list[dict]:
    """Grid over the tunables, each scored at its best threshold on `rows` (tune on one half)."""
    grid = {
        "temperature": [0.03, 0.05, 0.08],
        "floor": [0.25, 0.30, 0.35],
        "floor_width": [0.04],
        "top_k": [2, 3],
        "pool_top": [2, 3],
        "lexical_weight": [0.35],
        "competition": [1.0, 0.5, 0.0],
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
            (dict(metrics(prep, scores, t, rows=rows), threshold=t) for t in np.arange(0.3, 0.8, 0.05).round(2)),
            key=lambda m: m["macro_f1"] + 0.5 * min(m["no_goal_unaligned"] or 0, 0.93),
        )
        results.append({**p, **{k: v for k, v in best.items() if k not in ("per_goal_f1", "per_goal")}})
    return sorted(results, key=lambda r: -(r["macro_f1"] + 0.5 * min(r["no_goal_unaligned"] or 0, 0.93)))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("labelled", type=Path)
    parser.add_argument("--framework", default="un-sdg-2030")
    parser.add_argument("--threshold", type=float, default=None)
    parser.add_argument("--sweep", action="store_true")
    parser.add_argument("--tune-half", choices=("A", "B"), help="sweep on this repository half only")
    parser.add_argument("--cache", type=Path, default=Path("bench/results/eval-cache.sqlite"))
    parser.add_argument("--backend", default="embedding-int8", choices=("embedding", "embedding-int8"))
    parser.add_argument("--json", type=Path, help="write every figure to this file")
    parser.add_argument("--write-accuracy", action="store_true",
                        help="write the figures the report cites to reporter/frameworks/<framework>.accuracy.toml")
    args = parser.parse_args()
    prep = Prepared(load_labelled(args.labelled), args.framework, args.cache, args.backend)
    if args.sweep:
        rows = None
        if args.tune_half:
            rows = repository_halves(prep.frame["repo"]) == args.tune_half
        for row in sweep(prep, rows)[:15]:
            print(json.dumps(row))
        return
    from reporter.config import ScoreConfig

    threshold = args.threshold if args.threshold is not None else ScoreConfig().threshold
    scores = scores_for(prep, ScoringMethod())
    for t in sorted({threshold, *np.arange(0.4, 0.75, 0.05).round(2)}):
        m = metrics(prep, scores, t)
        marker = "  <- default" if t == threshold else ""
        print(f"threshold {t:.2f}: top1 {m['top1']:.3f}  macro-F1 {m['macro_f1']:.3f}  "
              f"no-goal unaligned {m['no_goal_unaligned']}{marker}")
    figures = print_report(prep, scores, threshold)
    if args.json:
        args.json.write_text(json.dumps(figures, indent=1), encoding="utf-8")
    if args.write_accuracy:
        target = Path(__file__).resolve().parents[1] / "reporter" / "frameworks" / f"{args.framework}.accuracy.toml"
        target.write_text(accuracy_record(prep, figures, threshold, "Waymark realset (real abstracts, labelled by one reader)"),
                          encoding="utf-8")
        print(f"wrote {target}")


if __name__ == "__main__":
    main()
