"""known_numbers.json: what the generator knows about example_input/grants/, for the end-to-end test.

Amounts in the base currency are the export's amount times the fixed demo rate, as the report
computes them; departments and partner countries count an award's whole amount in each (full
counting, the config's analysis.counting). Goal figures depend on the model, so only the planned
goals and the intended shifts are given for them.
"""

from __future__ import annotations

import json
from collections import Counter, defaultdict

import awards as plan_awards

MIN_GROUP_SIZE = 10  # the report's small-group rule, in awards


def known_numbers(entries: list[dict], files: dict[str, str], seed: int) -> str:
    portfolio = [e for e in entries if e["role"] != "duplicate"]
    faulty = [a for a in portfolio if _is_faulty(a)]
    usable = [a for a in portfolio if not _is_faulty(a)]
    by_year = defaultdict(list)
    for award in usable:
        by_year[award["year"]].append(award)
    document = {
        "about": ("Facts the generator (bench/grant_corpus/make_grants.py) knows about example_input/grants/. "
                  "Awards are counted after the duplicate is merged; amounts are in EUR at the fixed demo rates."),
        "seed": seed,
        "entries_read": len(entries),
        "files": {name: {"entries": sum(e["file"] == kind for e in entries),
                         "per_year": dict(sorted(Counter(str(e["year"]) for e in entries if e["file"] == kind).items()))}
                  for kind, name in files.items()},
        "awards_after_dedupe": len(portfolio),
        "awards_per_year": {str(y): sum(a["year"] == y for a in portfolio) for y in plan_awards.YEAR_SIZES},
        "duplicates": [{"kept_candidate": e["duplicate_of"], "duplicate": e["record_id"]}
                       for e in entries if e["role"] == "duplicate"],
        "same_title_not_merged": sorted(a["record_id"] for a in portfolio if a["note"].startswith("same title")),
        "not_in_funding": {
            "count": len(faulty),
            "by_reason": dict(sorted(Counter(a["note"] for a in faulty).items())),
            "records": sorted(({"record_id": a["record_id"], "reason": a["note"]} for a in faulty),
                              key=lambda r: r["record_id"]),
        },
        "base_currency": plan_awards.BASE_CURRENCY,
        "rates": plan_awards.RATES,
        "in_funding": len(usable),
        "amount_total": _sum(usable),
        "per_year": {str(y): {"n_awards": len(by_year[y]), "amount_total": _sum(by_year[y])}
                     for y in plan_awards.YEAR_SIZES},
        "currencies": {code: {"n_awards": len(group), "amount": sum(a["amount"] for a in group),
                              "amount_base": _sum(group)}
                       for code, group in sorted(_groups(usable, lambda a: [a["currency"]]).items())},
        "departments": _group_facts(_groups(usable, lambda a: a["departments"])),
        "partner_countries": _group_facts(_groups(usable, lambda a: sorted({p[1] for p in a["partners"] if p[1]}))),
        "planned_funding_share_fractional": _planned_shares(by_year),
        "intended_shifts": ("Goal 7 (energy) funding share rises in 2025, carried by five large energy awards; "
                            "goal 3 (health) funding share falls from 2022, when three large health awards began. "
                            "Humanities hold one large award but fewer than 10 awards, so their shares are too small "
                            "to report."),
    }
    return json.dumps(document, indent=2, ensure_ascii=False) + "\n"


def _is_faulty(award: dict) -> bool:
    return award["note"] != "" and not award["note"].startswith("same title")


def _base(award: dict) -> float:
    return award["amount"] * plan_awards.RATES[award["currency"]]


def _sum(group: list[dict]) -> float:
    return sum(_base(a) for a in group)


def _groups(group: list[dict], keys) -> dict[str, list[dict]]:
    out: dict[str, list[dict]] = defaultdict(list)
    for award in group:
        for key in keys(award):
            out[key].append(award)
    return out


def _group_facts(groups: dict[str, list[dict]]) -> dict:
    return {name: {"n_awards": len(group), "amount_total": _sum(group), "is_too_small": len(group) < MIN_GROUP_SIZE}
            for name, group in sorted(groups.items())}


def _planned_shares(by_year: dict[int, list[dict]]) -> dict:
    """Per year, each goal's funding share if every award were aligned with exactly its planned goals."""
    out = {}
    for year in sorted(by_year):
        total = _sum(by_year[year])
        shares: dict[str, float] = defaultdict(float)
        for award in by_year[year]:
            for goal in award["goals"]:
                shares[goal] += _base(award) / len(award["goals"]) / total
        out[str(year)] = {goal: round(share, 4) for goal, share in sorted(shares.items(), key=lambda kv: int(kv[0]))}
    return out
