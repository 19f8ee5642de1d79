"""Hand-built inputs for the render stage (shared by the render tests): a fictional university, four goals, two years.

Nothing here runs the model or the analyse stage; the figures are invented but
consistent (shares are n_aligned / n with Wilson bounds from statsmodels).
"""

from __future__ import annotations

from dataclasses import replace

import pandas as pd
from statsmodels.stats.proportion import proportion_confint

from reporter.analyse.findings import Findings
from reporter.config import ReportConfig
from reporter.records import ENRICHED_COLUMNS, INTAKE_LOG_COLUMNS, RECORD_COLUMNS, SCORE_COLUMNS
from reporter.render import RenderInputs

GOALS = (
    ("3", "Good Health and Well-being"),
    ("6", "Clean Water and Sanitation"),
    ("7", "Affordable and Clean Energy"),
    ("13", "Climate Action"),
)
INJECTED_TITLE = "<script>alert(1)</script> Well water in upland villages"
INJECTED_DEPARTMENT = "=HYPERLINK(\"x\")"
INJECTED_FORMULA_TITLE = "=1+2 Battery ageing in cold storage"
INJECTED_EVIDENCE = "<img src=x onerror=alert(2)> Wells were tested monthly for nitrate."
GENERATED_AT = "2025-03-01T09:00:00+00:00"

# record_id, year, department(s), partner countries, title, doi, aligned goals, explicit goals
_PUBLICATIONS = [
    ("nm:01", 2024, ("Hydrology",), ("DE",), INJECTED_TITLE, "10.5555/nm.0001", ("6",), ("6",)),
    ("nm:02", 2024, ("Hydrology",), (), "Groundwater recharge after wet winters", "10.5555/nm.0002", ("6", "13"), ()),
    ("nm:03", 2024, ("Public Health",), ("FR",), "Clinic waiting times in market towns", "10.5555/nm.0003", ("3",), ("3",)),
    ("nm:04", 2024, ("Public Health",), (), "Heat stress among older residents", "", ("3", "13"), ()),
    ("nm:05", 2024, ("Energy Systems",), ("DE", "NO"), "Small wind turbines on farm land", "10.5555/nm.0005", ("7", "13"), ("7",)),
    ("nm:06", 2024, ("Energy Systems",), (), INJECTED_FORMULA_TITLE, "10.5555/nm.0006", ("7",), ()),
    ("nm:07", 2024, (INJECTED_DEPARTMENT,), (), "A survey of reading habits", "10.5555/nm.0007", (), ()),
    ("nm:08", 2024, ("Hydrology", "Public Health"), ("FR",), "Waterborne illness after floods", "10.5555/nm.0008", ("3", "6"), ()),
    ("nm:09", 2023, ("Hydrology",), (), "River sediment loads in spring", "10.5555/nm.0009", ("6",), ()),
    ("nm:10", 2023, ("Public Health",), ("DE",), "Vaccination uptake in rural districts", "10.5555/nm.0010", ("3",), ("3",)),
    ("nm:11", 2023, ("Energy Systems",), (), "Heat pumps in old stone houses", "10.5555/nm.0011", ("7", "13"), ()),
    ("nm:12", 2023, ("Energy Systems",), (), "Grid frequency under high solar input", "10.5555/nm.0012", ("7",), ()),
]


def _wilson(k: float, n: float) -> tuple[float, float]:
    low, high = proportion_confint(k, n, alpha=0.05, method="wilson")
    return float(low), float(high)


def _share_row(base: dict, n: int, k: int, small: bool | None = None) -> dict:
    low, high = _wilson(k, n)
    row = {**base, "n": n, "n_aligned": k, "share": k / n, "share_low": low, "share_high": high}
    if small is not None:
        row["is_too_small"] = small
    return row


def make_records() -> pd.DataFrame:
    rows = []
    for i, (rid, year, depts, partners, title, doi, _aligned, _explicit) in enumerate(_PUBLICATIONS):
        countries = tuple(sorted({"IE", *partners}))
        rows.append({
            "record_id": rid, "source_file": "northmere.bib", "source_line": 1 + 12 * i, "format": "bibtex",
            "native_id": rid.split(":")[1], "title": title, "abstract": f"Abstract of {title.lower()}.",
            "keywords": ("fieldwork",), "year": year, "doi": doi, "authors": ("Quill, Orla",),
            "affiliations": ("University of Northmere",), "departments": depts, "orcids": (),
            "doc_type": "article", "venue": "Northmere Papers", "language": "en", "has_abstract": True,
            "countries": countries, "partner_countries": tuple(sorted(partners)),
            "is_international": bool(partners), "is_english": True,
        })
    return pd.DataFrame(rows, columns=list(RECORD_COLUMNS + ENRICHED_COLUMNS))


def make_scores() -> pd.DataFrame:
    rows = []
    for rank, (rid, _y, _d, _p, title, _doi, aligned, explicit) in enumerate(_PUBLICATIONS):
        for g, (code, _t) in enumerate(GOALS):
            is_aligned = code in aligned
            score = round(0.55 + 0.03 * ((rank + g) % 5), 3) if is_aligned else round(0.1 + 0.02 * g, 3)
            evidence = INJECTED_EVIDENCE if rid == "nm:01" else f"The study of {title.lower()} bears on goal {code}."
            rows.append({
                "record_id": rid, "goal": code, "alignment_score": score,
                "n_explicit_mentions": int(code in explicit), "is_explicit": code in explicit,
                "is_aligned": is_aligned, "evidence": evidence if is_aligned else "",
                "evidence_score": score if is_aligned else 0.0,
            })
    return pd.DataFrame(rows, columns=list(SCORE_COLUMNS))


def make_intake_log() -> pd.DataFrame:
    rows = [
        {"record_id": rid, "source_file": "northmere.bib", "source_line": 1 + 12 * i, "format": "bibtex",
         "native_id": rid.split(":")[1], "title": title, "year": year, "status": "kept", "reason": "",
         "merged_into": "", "flags": ""}
        for i, (rid, year, _d, _p, title, *_rest) in enumerate(_PUBLICATIONS)
    ]
    rows.append({"record_id": "nm:13", "source_file": "northmere.bib", "source_line": 200, "format": "bibtex",
                 "native_id": "13", "title": "Ein Bericht", "year": 2024, "status": "set_aside",
                 "reason": "language not English (de)", "merged_into": "", "flags": ""})
    rows.append({"record_id": "extra:1", "source_file": "extra.csv", "source_line": 2, "format": "csv",
                 "native_id": "1", "title": "Groundwater recharge after wet winters", "year": 2024,
                 "status": "merged", "reason": "same DOI as nm:02", "merged_into": "nm:02", "flags": ""})
    return pd.DataFrame(rows, columns=list(INTAKE_LOG_COLUMNS))


def make_findings(min_group_size: int = 3) -> Findings:
    n = len(_PUBLICATIONS)
    goals_rows, by_year, changes, sensitivity = [], [], [], []
    for code, title in GOALS:
        aligned = [p for p in _PUBLICATIONS if code in p[6]]
        explicit = [p for p in aligned if code in p[7]]
        row = _share_row({"goal": code, "title": title}, n, len(aligned))
        row.update(n_explicit=len(explicit), n_content_only=len(aligned) - len(explicit),
                   mean_score=0.3 + 0.05 * len(aligned), mean_score_low=0.25, mean_score_high=0.45)
        goals_rows.append(row)
        for year in (2023, 2024):
            in_year = [p for p in _PUBLICATIONS if p[1] == year]
            k = sum(code in p[6] for p in in_year)
            by_year.append(_share_row({"year": year, "goal": code}, len(in_year), k, len(in_year) < min_group_size))
        before, now = by_year[-2], by_year[-1]
        diff = now["share"] - before["share"]
        changes.append({
            "goal": code, "baseline": "2023", "year": 2024, "share_baseline": before["share"], "share": now["share"],
            "diff": diff, "diff_low": diff - 0.3, "diff_high": diff + 0.3, "p_value": 0.01 if code == "6" else 0.6,
            "p_adjusted": 0.04 if code == "6" else 0.8, "is_change": code == "6",
            "verdict": ("increase" if diff > 0 else "decrease") if code == "6" else "no clear change",
        })
        for label, step in (("low", -0.05), ("chosen", 0.0), ("high", 0.05)):
            k = max(len(aligned) + (1 if step < 0 else -1 if step > 0 else 0), 0)
            sensitivity.append({"goal": code, "threshold_label": label, "threshold": 0.5 + step,
                                "n_aligned": k, "share": k / n})
    departments = {"Hydrology": ["nm:01", "nm:02", "nm:08", "nm:09"],
                   "Public Health": ["nm:03", "nm:04", "nm:08", "nm:10"],
                   "Energy Systems": ["nm:05", "nm:06", "nm:11", "nm:12"], INJECTED_DEPARTMENT: ["nm:07"]}
    by_pub = {p[0]: p for p in _PUBLICATIONS}
    by_department = [
        _share_row({"department": name, "goal": code}, len(ids), sum(code in by_pub[i][6] for i in ids),
                   len(ids) < min_group_size)
        for name, ids in departments.items() for code, _ in GOALS
    ]
    partners = {"DE": ("Germany", ["nm:01", "nm:05", "nm:10"]), "FR": ("France", ["nm:03", "nm:08"]),
                "NO": ("Norway", ["nm:05"])}
    by_country = [
        _share_row({"country": c, "country_name": name, "goal": code}, len(ids),
                   sum(code in by_pub[i][6] for i in ids), len(ids) < min_group_size)
        for c, (name, ids) in partners.items() for code, _ in GOALS
    ]
    groups = {"international": [p for p in _PUBLICATIONS if p[3]], "domestic": [p for p in _PUBLICATIONS if not p[3]]}
    collaboration = [
        _share_row({"group": g, "goal": code}, len(pubs), sum(code in p[6] for p in pubs), len(pubs) < min_group_size)
        for g, pubs in groups.items() for code, _ in GOALS
    ]
    codes = [c for c, _ in GOALS]
    cooccurrence = [
        {"goal_a": a, "goal_b": b, "n": sum(a in p[6] and b in p[6] for p in _PUBLICATIONS)}
        for i, a in enumerate(codes) for b in codes[i + 1:]
    ]
    n_any = sum(bool(p[6]) for p in _PUBLICATIONS)
    low, high = _wilson(n_any, n)
    return Findings(
        meta={"counting": "full", "confidence": 0.95, "min_group_size": min_group_size, "fdr": 0.05,
              "threshold": 0.5, "thresholds": {c: 0.5 for c in codes}, "policy": "score_or_mention",
              "reporting_year": 2024, "comparison_years": (2023,), "years": (2023, 2024),
              "scope": "scored publications from 2023, 2024", "sensitivity_step": 0.05, "seed": 1,
              "bootstrap_resamples": 200, "methods": {"share_interval": "Wilson score interval (Wilson 1927)"}},
        headline={"n_publications": n, "n_aligned_any": n_any, "share_aligned_any": n_any / n,
                  "share_aligned_any_low": low, "share_aligned_any_high": high,
                  "n_explicit_any": sum(bool(p[7]) for p in _PUBLICATIONS), "n_general_mentions": None,
                  "n_too_small_groups": 1},
        goals=pd.DataFrame(goals_rows), by_year=pd.DataFrame(by_year), changes=pd.DataFrame(changes),
        by_department=pd.DataFrame(by_department), by_country=pd.DataFrame(by_country),
        collaboration=pd.DataFrame(collaboration), sensitivity=pd.DataFrame(sensitivity),
        cooccurrence=pd.DataFrame(cooccurrence),
        coverage={"n_records": n, "n_with_abstract": n, "share_with_abstract": 1.0, "n_with_department": n,
                  "share_with_department": 1.0, "n_with_country": n, "share_with_country": 1.0, "n_non_english": 0},
    )


def make_inputs(**changes) -> RenderInputs:
    inputs = RenderInputs(
        findings=make_findings(), records=make_records(), scores=make_scores(), intake_log=make_intake_log(),
        goals=GOALS,
        framework_info={"id": "un-sdg-2030", "title": "UN Sustainable Development Goals", "version": "1.0",
                        "checksum": "f" * 64},
        model_info={"id": "all-MiniLM-L6-v2", "checksum": "a" * 64, "backend": "embedding"},
        score_settings={"threshold": 0.5, "thresholds": {c: 0.5 for c, _ in GOALS}, "policy": "score_or_mention",
                        "text_fields": ("title", "abstract", "keywords")},
        manifest={"waymark_version": "0.1.0", "generated_at": GENERATED_AT},
        generated_at=GENERATED_AT,
    )
    return replace(inputs, **changes)


def make_report(**changes) -> ReportConfig:
    values = {"institution": "University of Northmere", "home_country": "IE", "reporting_year": 2024,
              "comparison_years": (2023,), **changes}
    return ReportConfig(**values)
