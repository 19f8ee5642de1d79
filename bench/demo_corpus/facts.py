"""What the generator knows about the demo: labelled sample, known numbers, per-entry truth."""

from __future__ import annotations

import csv
import io
import json
from collections import Counter

import people
from plan import TOPICS, YEAR_SIZES

_NOTES = {t.key: t.note for t in TOPICS}
_NOTES.update({"foreign_de": "non-English (German)", "foreign_es": "non-English (Spanish)",
               "foreign_fr": "non-English (French)", "foreign_pt": "non-English (Portuguese)"})
GOALS = tuple(str(g) for g in range(1, 18))


def orcid(rng) -> str:
    """An ORCID-shaped id with a valid ISO 7064 11,2 check digit, in the block 0000-0000-*, which ORCID does not issue (from memory)."""
    digits = "00000000" + "".join(str(rng.randint(0, 9)) for _ in range(7))
    total = 0
    for d in digits:
        total = (total + int(d)) * 2
    check = (12 - total % 11) % 11
    full = digits + ("X" if check == 10 else str(check))
    return "-".join(full[i:i + 4] for i in range(0, 16, 4))


def labelled_sample(pubs: list[dict], in_pairs: set[int], rng, size: int = 80) -> list[dict]:
    """About 80 publications as a careful reviewer would label them: no-goal papers included, all goals covered."""
    pool = [r for r in pubs if r["has_abstract"] and r["language"] == "en" and id(r) not in in_pairs]
    rng.shuffle(pool)
    chosen: list[dict] = [r for r in pool if not r["goals"]][:22]
    for goal in GOALS:
        have = sum(goal in r["goals"] for r in chosen)
        extra = [r for r in pool if goal in r["goals"] and r not in chosen]
        extra.sort(key=lambda r: r["goals"].index(goal))  # papers where the goal is the main one first
        chosen.extend(extra[: max(0, 3 - have)])
    rest = [r for r in pool if r["goals"] and r not in chosen]
    chosen.extend(rest[: size - len(chosen)])
    return sorted(chosen, key=lambda r: (r["year"], r["record_id"]))


def labelled_sample_csv(sample: list[dict]) -> str:
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(("record_id", "doi", "goals", "note"))
    for rec in sample:
        note = _NOTES[rec["topic"]]
        if rec["explicit_goals"]:
            note += "; names SDG " + " and ".join(rec["explicit_goals"]) + " explicitly"
        elif rec["mention"]:
            note += "; refers to the SDGs in general"
        writer.writerow(("" if rec["doi"] else rec["record_id"], rec["doi"],
                         ";".join(rec["goals"]) or "none", note))
    return out.getvalue()


def _goal_counts(kept: list[dict]) -> dict:
    out = {}
    for year in YEAR_SIZES:
        group = [r for r in kept if r["year"] == year]
        counts = Counter(g for r in group for g in r["goals"])
        out[str(year)] = {"n": len(group), "no_goal": sum(not r["goals"] for r in group),
                          "per_goal": {g: counts.get(g, 0) for g in GOALS}}
    return out


def known_numbers(entries: list[dict], files: dict[str, str], sample: list[dict], seed: int) -> str:
    kept = [e for e in entries if e["role"] == "original"]
    dups = [e for e in entries if e["role"] == "duplicate"]
    aside = [e for e in entries if e["role"] == "set_aside"]
    per_file = {}
    for kind, name in files.items():
        mine = [e for e in entries if e["file"] == kind]
        per_file[name] = {
            "entries": len(mine),
            "set_aside": sum(e["role"] == "set_aside" for e in mine),
            "duplicates_of_entries_elsewhere": sum(e["role"] == "duplicate" for e in mine),
            "per_year": dict(sorted(Counter(str(e["year_text"]) for e in mine).items())),
        }
    partner = Counter(c for r in kept for c in r["countries"] if c != "IE")
    depts = Counter(d for r in kept for d in r["departments"])
    facts = {
        "about": "Facts the generator (bench/demo_corpus/make_demo.py) knows about example_input/. "
                 "Publications are counted after duplicates are merged; set-aside entries are in no year.",
        "seed": seed,
        "entries_read": len(entries),
        "files": per_file,
        "publications_after_dedupe": len(kept),
        "publications_per_year": {str(y): sum(r["year"] == y for r in kept) for y in YEAR_SIZES},
        "duplicates": {"count": len(dups), "pairs": [
            {"kept_candidate": d["duplicate_of"], "duplicate": d["record_id"], "how": d["how"]} for d in dups]},
        "set_aside": {"count": len(aside), "entries": [
            {"record_id": e["record_id"], "reason": e["set_aside_reason"]} for e in aside]},
        "no_abstract": {"count": sum(not r["has_abstract"] for r in kept),
                        "record_ids": [r["record_id"] for r in kept if not r["has_abstract"]]},
        "non_english": {"count": sum(r["language"] != "en" for r in kept),
                        "by_language": dict(sorted(Counter(r["language"] for r in kept if r["language"] != "en").items())),
                        "record_ids": [r["record_id"] for r in kept if r["language"] != "en"]},
        "no_staff_author": {"count": sum(not r["departments"] for r in kept),
                            "record_ids": [r["record_id"] for r in kept if not r["departments"]]},
        "explicit_mentions": {
            "count": sum(bool(r["mention"]) for r in kept),
            "naming_goals": sum(bool(r["explicit_goals"]) for r in kept),
            "general_only": sum(bool(r["mention"]) and not r["explicit_goals"] for r in kept),
            "records": [{"record_id": r["record_id"], "text": r["mention"], "goals": list(r["explicit_goals"])}
                        for r in kept if r["mention"]]},
        "departments_full_counting": dict(sorted(depts.items())),
        "department_aliases_in_csv": {v: people.DEPARTMENTS[k] for k, v in people.CRIS_UNIT_NAMES.items()},
        "international_publications": sum(bool(set(r["countries"]) - {"IE"}) for r in kept),
        "partner_countries": dict(sorted(partner.items(), key=lambda kv: (-kv[1], kv[0]))),
        "intended_goals_per_year": _goal_counts(kept),
        "intended_shifts": "Goals 7 and 13 rise in 2025 (weights of energy topics x7, other climate topics x5, against x0.9-1.0 before); goal 3 is highest in 2022 "
                           "(health topics x1.7, fading to x0.9 by 2025). No-goal share is 30% every year.",
        "labelled_sample": {"rows": len(sample), "none": sum(not r["goals"] for r in sample),
                            "multi_goal": sum(len(r["goals"]) > 1 for r in sample),
                            "goals_covered": sorted({g for r in sample for g in r["goals"]}, key=int)},
    }
    return json.dumps(facts, indent=2, ensure_ascii=False) + "\n"


def truth_csv(entries: list[dict], files: dict[str, str]) -> str:
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    cols = ("record_id", "file", "native_id", "year", "role", "duplicate_of", "set_aside_reason", "topic", "goals",
            "explicit_goals", "mention", "has_abstract", "language", "departments", "countries", "doi", "title")
    writer.writerow(cols)
    for e in sorted(entries, key=lambda e: e["record_id"]):
        writer.writerow((e["record_id"], files[e["file"]], e["native_id"], e["year_text"], e["role"],
                         e["duplicate_of"], e["set_aside_reason"], e["topic"], ";".join(e["goals"]),
                         ";".join(e["explicit_goals"]), e["mention"], e["has_abstract"], e["language"],
                         ";".join(e["departments"]), ";".join(e["countries"]), e["doi"], e["title"]))
    return out.getvalue()
