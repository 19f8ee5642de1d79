"""Builders for tiny record and score tables of an invented university (no model involved)."""

from __future__ import annotations

import pandas as pd
import pytest

GOALS = (("1", "No poverty"), ("2", "Zero hunger"), ("3", "Good health and well-being"))


def build_records(rows: list[dict]) -> pd.DataFrame:
    """Record table with the enriched columns analyse reads; unspecified fields get plain defaults."""
    full = []
    for i, row in enumerate(rows):
        partners = tuple(row.get("partner_countries", ()))
        full.append(
            {
                "record_id": row.get("record_id", f"demo:{i}"),
                "year": row.get("year", 2024),
                "departments": tuple(row.get("departments", ())),
                "partner_countries": partners,
                "countries": tuple(sorted({"IE", *partners})),
                "is_international": bool(partners),
                "has_abstract": row.get("has_abstract", True),
                "is_english": row.get("is_english", True),
            }
        )
    return pd.DataFrame(full)


def build_scores(records: pd.DataFrame, values: dict[str, list], goals=GOALS) -> pd.DataFrame:
    """Long score table: `values[goal]` lists (alignment_score, is_explicit, is_aligned) per record."""
    rows = []
    for position, record_id in enumerate(records["record_id"]):
        for code, _ in goals:
            score, explicit, aligned = values[code][position]
            rows.append(
                {
                    "record_id": record_id,
                    "goal": code,
                    "alignment_score": score,
                    "n_explicit_mentions": int(explicit),
                    "is_explicit": explicit,
                    "is_aligned": aligned,
                    "evidence": "",
                    "evidence_score": 0.0,
                }
            )
    return pd.DataFrame(rows)


def build_year_corpus(spec: dict[int, tuple[int, int]], goals=GOALS):
    """Records and scores where year y has n publications, the first k aligned with goal 1 only.

    `spec` maps year -> (n, k). Aligned publications score 0.8, the rest 0.2; no explicit mentions.
    """
    rows, flags = [], []
    for year, (n, k) in sorted(spec.items()):
        for i in range(n):
            rows.append({"record_id": f"demo-{year}:{i}", "year": year})
            flags.append(i < k)
    records = build_records(rows)
    values = {code: [(0.2, False, False)] * len(rows) for code, _ in goals}
    values[goals[0][0]] = [(0.8, False, True) if f else (0.2, False, False) for f in flags]
    return records, build_scores(records, values, goals)


@pytest.fixture
def year_corpus():
    return build_year_corpus


@pytest.fixture
def goals():
    return GOALS


@pytest.fixture
def make_records():
    return build_records


@pytest.fixture
def make_scores():
    return build_scores
