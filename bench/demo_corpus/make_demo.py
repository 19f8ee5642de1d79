"""Generate the demo scenario in example_input/ (Kestrel Heath University, all invented).

Run: python bench/demo_corpus/make_demo.py
Writes the three publication exports, staff.csv and labelled-sample.csv to
example_input/, and known_numbers.json and truth.csv (one row per entry) here.
Deterministic: the same seed gives byte-identical files.
"""

from __future__ import annotations

import copy
import csv
import io
import re
from pathlib import Path

import facts
import people
import plan
import writers

SEED = 20250214
HERE = Path(__file__).resolve().parent
EXAMPLE = HERE.parents[1] / "example_input"
FILES = {"bib": "publications-2025.bib", "ris": "publications-2024.ris", "csv": "cris-export-2022-2023.csv"}
STEMS = {kind: Path(name).stem for kind, name in FILES.items()}
NO_ABSTRACT = {("csv", 2022): 3, ("csv", 2023): 3, ("ris", 2024): 4, ("bib", 2025): 5}


def assign_ids(records: list[dict], rng) -> None:
    csv_ids = iter(rng.sample(range(40000, 99999), 400))
    ris_ids = iter(rng.sample(range(1000, 9999), 300))
    keys: set[str] = set()
    for rec in records:
        if rec["file"] == "csv":
            rec["native_id"] = str(next(csv_ids))
        elif rec["file"] == "ris":
            rec["native_id"] = str(next(ris_ids))
        else:
            last = plan.ascii_fold(rec["authors"][0].split(",")[0]).lower() if rec["authors"] else "anon"
            word = next((w for w in re.findall(r"[a-z]+", plan.ascii_fold(rec["title"]).lower()) if len(w) > 3), "untitled")
            base = re.sub(r"[^a-z]", "", last) + str(rec["year_text"]).replace(" ", "") + word
            key, n = base, 0
            while key in keys:
                n += 1
                key = base + "abcdefgh"[n - 1]
            keys.add(key)
            rec["native_id"] = key
        rec["record_id"] = f"{STEMS[rec['file']]}:{rec['native_id']}"


def add_duplicates(pubs: list[dict], rng) -> list[dict]:
    """The same paper exported twice: late-2024 papers in RIS and BibTeX, a 2023 paper in RIS, CSV double entries."""
    english = [r for r in pubs if r["language"] == "en" and not r.get("no_staff")]
    ris_doi = [r for r in english if r["file"] == "ris" and r["doi"] and r["doc_type"] == "article"]
    ris_nodoi = [r for r in english if r["file"] == "ris" and not r["doi"]]
    csv_nodoi = [r for r in english if r["file"] == "csv" and r["year"] == 2023 and not r["doi"]]
    csv_multi = [r for r in english if r["file"] == "csv" and r["doi"] and len(r["units"]) > 1]
    picked = rng.sample(ris_doi, 6) + rng.sample(ris_nodoi, 1)
    how = ["DOI in upper case"] * 3 + ["DOI written as a doi.org URL", "DOI written as a doi.org URL in the RIS copy",
                                       "identical DOI", "no DOI; same title and year"]
    dups: list[dict] = []
    for orig, note in zip(picked, how):
        month = rng.choice(("nov", "dec"))
        orig["ris_date"] = f"2024/{'11' if month == 'nov' else '12'}/{rng.randint(1, 28):02d}/"
        copy_ = copy.deepcopy(orig) | {"file": "bib", "month": month, "role": "duplicate", "how": note, "_orig": orig}
        if note == "DOI in upper case":
            copy_["doi_as_written"] = orig["doi"].upper()
        elif note == "DOI written as a doi.org URL":
            copy_["doi_as_written"] = "https://doi.org/" + orig["doi"]
        elif note.endswith("RIS copy"):
            orig["doi_as_written"] = "https://doi.org/" + orig["doi"]
            orig["ris_url"] = False
        elif note.startswith("no DOI"):
            copy_["bib_double_brace"] = True
        dups.append(copy_)
    orig = rng.choice(csv_nodoi)
    dups.append(copy.deepcopy(orig) | {"file": "ris", "role": "duplicate", "_orig": orig,
                                       "how": "2023 paper also in the 2024 RIS export; no DOI; same title and year"})
    for orig in rng.sample(csv_multi, 2):
        copy_ = copy.deepcopy(orig) | {"role": "duplicate", "_orig": orig,
                                       "how": "entered twice in the research system, once per unit"}
        orig["units"], copy_["units"] = orig["units"][:1], orig["units"][1:]
        copy_["doi_as_written"] = "https://doi.org/" + orig["doi"] if not orig["doi_as_written"].startswith("http") else orig["doi"]
        dups.append(copy_)
    return dups


def add_set_aside(planner: plan.Planner) -> list[dict]:
    """Entries the intake must set aside, one reason each."""
    rng = planner.rng
    by_key = {t.key: t for t in plan.TOPICS}
    specs = (("bib", 2025, "no title"), ("bib", 2025, "year is not a number: 'in press'"),
             ("ris", 2019, "year 2019 is outside the report years 2022-2025"), ("ris", 2024, "no title"),
             ("csv", 2023, "no year (status 'In press')"))
    out = []
    for kind, year, reason in specs:
        rec = planner.record(by_key[rng.choice(sorted(by_key))], year)
        rec.update(file=kind, role="set_aside", set_aside_reason=reason)
        if reason == "no title":
            planner.titles.discard(plan.title_key(rec["title"]))
            rec["title"] = ""
        elif "in press" in reason:
            rec["year_text"] = "in press"
        elif "status" in reason:
            rec["year_text"], rec["status"] = "", "In press"
        out.append(rec)
    return out


def write_staff(rng) -> str:
    rows = []
    for name, dept, variants in people.STAFF:
        orcid = facts.orcid(rng)
        rows.extend((n, people.DEPARTMENTS[dept], orcid) for n in (name, *variants))
    rows.sort(key=lambda r: plan.ascii_fold(r[0]).lower())
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(("name", "department", "orcid"))
    writer.writerows(rows)
    return out.getvalue()


def main() -> None:
    planner, pubs = plan.plan_publications(SEED)
    rng = planner.rng
    for rec in pubs:
        if rec["file"] == "ris" and rng.random() < 0.35:
            rec["ris_date"] = f"{rec['year']}/{rng.randint(1, 12):02d}/{rng.randint(1, 28):02d}/"
    dups = add_duplicates(pubs, rng)
    in_pairs = {id(d["_orig"]) for d in dups}
    for (kind, year), n in NO_ABSTRACT.items():
        pool = [r for r in pubs if r["file"] == kind and r["year"] == year and r["language"] == "en"
                and id(r) not in in_pairs and not r.get("no_staff") and r["abstract"]]
        for rec in rng.sample(pool, n):
            rec["abstract"], rec["has_abstract"], rec["mention"], rec["explicit_goals"] = "", False, "", ()
    set_aside = add_set_aside(planner)
    entries = pubs + dups + set_aside
    assign_ids(entries, rng)
    for dup in dups:
        dup["duplicate_of"] = dup.pop("_orig")["record_id"]

    by_file = {kind: [e for e in entries if e["file"] == kind] for kind in FILES}
    rng.shuffle(by_file["bib"])
    by_file["ris"].sort(key=lambda e: int(e["native_id"]))
    by_file["csv"].sort(key=lambda e: (e["year_text"] == "", e["year_text"], int(e["native_id"])))
    EXAMPLE.mkdir(exist_ok=True)
    (EXAMPLE / FILES["bib"]).write_text(writers.write_bibtex(by_file["bib"]), encoding="utf-8")
    (EXAMPLE / FILES["ris"]).write_text(writers.write_ris(by_file["ris"]), encoding="utf-8")
    (EXAMPLE / FILES["csv"]).write_text(writers.write_cris_csv(by_file["csv"]), encoding="utf-8", newline="")
    (EXAMPLE / "staff.csv").write_text(write_staff(rng), encoding="utf-8")
    sample = facts.labelled_sample(pubs, in_pairs, rng)
    (EXAMPLE / "labelled-sample.csv").write_text(facts.labelled_sample_csv(sample), encoding="utf-8")
    (HERE / "known_numbers.json").write_text(facts.known_numbers(entries, FILES, sample, SEED), encoding="utf-8")
    (HERE / "truth.csv").write_text(facts.truth_csv(entries, FILES), encoding="utf-8")
    print(f"wrote {len(entries)} entries: " + ", ".join(f"{FILES[k]} {len(v)}" for k, v in by_file.items()))


if __name__ == "__main__":
    main()
