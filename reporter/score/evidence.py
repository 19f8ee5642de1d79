"""Evidence sentences: for every aligned (publication, goal), the sentences that put it there.

A sentence that mentions the goal explicitly comes first; then the sentences
with the highest semantic score for that goal.
"""

from __future__ import annotations

import numpy as np

from reporter.score.mentions import find_mentions
from reporter.score.sentences import TextUnit


def pick_evidence(
    units: list[TextUnit],
    unit_record: np.ndarray,
    per_sentence: np.ndarray,
    aligned: np.ndarray,
    explicit: np.ndarray,
    record_ids: list[str],
    goal_codes: tuple[str, ...],
    patterns,
    per_pair: int,
) -> tuple[list[tuple], np.ndarray, np.ndarray]:
    """Evidence rows plus, per (record, goal), the best sentence (aligned pairs only) and its score."""
    n_records, n_goals = aligned.shape
    best_text = np.full((n_records, n_goals), "", dtype=object)
    best_score = np.zeros((n_records, n_goals), dtype=np.float32)
    rows: list[tuple] = []
    if not units:
        return rows, best_text, best_score
    order = np.argsort(unit_record, kind="stable")
    bounds = np.searchsorted(unit_record[order], np.arange(n_records + 1))
    for i in range(n_records):
        idx = order[bounds[i] : bounds[i + 1]]
        if idx.size == 0:
            continue
        block = per_sentence[idx]
        best_score[i] = block.max(axis=0)
        mentions_by_unit = None
        for g in np.flatnonzero(aligned[i]):
            chosen: list[tuple[int, bool]] = []
            if explicit[i, g]:
                if mentions_by_unit is None:
                    mentions_by_unit = [find_mentions(units[j].text, patterns).by_goal for j in idx]
                chosen.extend((j, True) for j, found in zip(idx, mentions_by_unit) if goal_codes[g] in found)
            for k in np.argsort(-block[:, g], kind="stable"):
                j = idx[k]
                if all(j != c for c, _ in chosen):
                    chosen.append((j, False))
                if len(chosen) >= per_pair:
                    break
            chosen = chosen[:per_pair]
            for rank, (j, is_mention) in enumerate(chosen, start=1):
                rows.append((record_ids[i], goal_codes[g], rank, units[j].kind, units[j].text,
                             round(float(per_sentence[j, g]), 6), is_mention))
            best_text[i, g] = units[chosen[0][0]].text
    return rows, best_text, best_score
