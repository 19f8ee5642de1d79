"""Generate the grant portfolio demo in example_input/grants/ (Kestrel Heath University, all invented).

Run: python bench/grant_corpus/make_grants.py
Writes two award exports, the conversion table and README facts to example_input/grants/, and
known_numbers.json here. Deterministic: the same seed gives byte-identical files.
"""

from __future__ import annotations

import copy
import csv
import io
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent / "demo_corpus"))  # the demo's topics, people and text helpers

import awards  # noqa: E402
import known  # noqa: E402
from writers import plain  # noqa: E402

SEED = 20250417
EXAMPLE = HERE.parents[1] / "example_input" / "grants"
FILES = {"office": "grants-office-2022-2024.csv", "finance": "finance-awards-2025.csv"}
RATES_FILE = "rates.csv"
OFFICE_HEADER = ("Award Ref", "Project Title", "Summary", "Award Year", "Investigators", "Lead Department",
                 "Partner Institutions", "Funder", "Award Amount", "Currency", "Keywords")
FINANCE_HEADER = ("Reference", "Title", "Abstract", "Start Year", "Principal Investigators", "Department",
                  "Partners", "Sponsor", "Value", "Currency Code")
#: Awards whose amount cannot be used, one per reason: (year, what the export holds, the reason intake gives).
FAULTY = ((2022, {"amount_text": "-45000"}, "amount is negative"), (2023, {"amount_text": ""}, "no amount"),
          (2024, {"amount_text": "0"}, "amount is zero"), (2024, {"currency_text": "EURO"}, "unknown currency"),
          (2025, {"amount_text": "TBC"}, "amount not readable"))
SAME_TITLE = "Doctoral studentship in catchment science"  # two 2023 awards, two amounts: not one award


def add_faults(portfolio: list[dict], planner: awards.Planner) -> None:
    rng = planner.rng
    for year, change, reason in FAULTY:
        pool = [a for a in portfolio if a["year"] == year and a["kind"] != "consortium" and not a["note"]]
        award = rng.choice(pool)
        award.update(change, note=reason)
    pair = [a for a in portfolio if a["year"] == 2023 and a["kind"] == "studentship" and not a["note"]][:2]
    for award in pair:
        award["title"], award["note"] = SAME_TITLE, "same title and year as another award, other amount"
    if pair[0]["amount"] == pair[1]["amount"]:
        pair[1]["amount"] += 1500.0


def add_duplicate(portfolio: list[dict], planner: awards.Planner) -> dict:
    """A late-2024 award that the finance system's 2025 export also lists (same title, year and amount)."""
    candidates = [a for a in portfolio if a["year"] == 2024 and not a["note"] and a["kind"] == "project"]
    original = planner.rng.choice(candidates)
    copy_ = copy.deepcopy(original) | {"role": "duplicate", "file": "finance", "_original": original}
    return copy_


def assign_ids(entries: list[dict], planner: awards.Planner) -> None:
    office = iter(planner.rng.sample(range(100, 999), 200))
    finance = iter(planner.rng.sample(range(1000, 9999), 100))
    for entry in entries:
        if entry["file"] == "office":
            entry["native_id"] = f"KHU-G-{entry['year'] % 100}-{next(office)}"
        else:
            entry["native_id"] = f"AW{entry['year'] % 100}-{next(finance):05d}"
        entry["record_id"] = f"{Path(FILES[entry['file']]).stem}:{entry['native_id']}"


def amount_cell(entry: dict) -> str:
    if entry["amount_text"] or entry["note"] in ("no amount", "amount is zero", "amount is negative",
                                                 "amount not readable"):
        return entry["amount_text"]
    if entry["file"] == "office":
        return f"{entry['amount']:.0f}"
    return f"{entry['amount']:,.2f}"  # the finance system writes thousands separators


def write_export(entries: list[dict], header: tuple[str, ...]) -> str:
    """One system's CSV export; the grants office also writes keywords, the finance system does not."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(header)
    for e in entries:
        row = [e["native_id"], plain(e["title"]), plain(e["summary"]), e["year"], "; ".join(e["investigators"]),
               "; ".join(e["departments"]), "; ".join(p[0] for p in e["partners"]), e["funder"], amount_cell(e),
               e["currency_text"], plain("; ".join(e["keywords"]))]
        writer.writerow(row[: len(header)])
    return out.getvalue()


def write_rates() -> str:
    lines = ["currency,rate,note", "EUR,1,base currency of the report"]
    lines += [f"{code},{rate},fixed demo rate (invented)" for code, rate in awards.RATES.items() if code != "EUR"]
    return "\n".join(lines) + "\n"


def main() -> None:
    planner, portfolio = awards.plan_portfolio(SEED)
    for award in portfolio:
        award["file"] = "finance" if award["year"] == 2025 else "office"
    add_faults(portfolio, planner)
    duplicate = add_duplicate(portfolio, planner)
    entries = portfolio + [duplicate]
    planner.rng.shuffle(entries)
    entries.sort(key=lambda e: (e["file"], e["year"]))
    assign_ids(entries, planner)
    duplicate["duplicate_of"] = duplicate.pop("_original")["record_id"]
    by_file = {kind: [e for e in entries if e["file"] == kind] for kind in FILES}
    EXAMPLE.mkdir(parents=True, exist_ok=True)
    (EXAMPLE / FILES["office"]).write_text(write_export(by_file["office"], OFFICE_HEADER), encoding="utf-8", newline="")
    (EXAMPLE / FILES["finance"]).write_text(write_export(by_file["finance"], FINANCE_HEADER), encoding="utf-8", newline="")
    (EXAMPLE / RATES_FILE).write_text(write_rates(), encoding="utf-8")
    (HERE / "known_numbers.json").write_text(known.known_numbers(entries, FILES, SEED), encoding="utf-8")
    print(f"wrote {len(entries)} entries: " + ", ".join(f"{FILES[k]} {len(v)}" for k, v in by_file.items()))


if __name__ == "__main__":
    main()
