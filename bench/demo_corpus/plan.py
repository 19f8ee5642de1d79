"""Plan the demo corpus: which topic each publication is on, its authors, identifiers and quirks.

Everything is drawn from one seeded random.Random, so the corpus repeats exactly.
A planned record is a plain dict; writers.py renders it, make_demo.py adds the
duplicates and set-aside entries and writes the files.
"""

from __future__ import annotations

import random
import re
import unicodedata

import compose
import people
import topics_economy_society
import topics_environment
import topics_health_food
import topics_nature_governance
import topics_no_goal
import topics_no_goal_2
from foreign import FOREIGN
from topic_model import Topic

TOPICS: list[Topic] = (topics_environment.TOPICS + topics_health_food.TOPICS + topics_economy_society.TOPICS
                       + topics_nature_governance.TOPICS + topics_no_goal.TOPICS + topics_no_goal_2.TOPICS)
YEAR_SIZES = {2022: 105, 2023: 110, 2024: 112, 2025: 120}  # publications after duplicates are merged
YEAR_FILE = {2022: "csv", 2023: "csv", 2024: "ris", 2025: "bib"}
NO_GOAL_SHARE = 0.30
MENTION_RATE = 0.21  # of records on goal topics; about 12% of all records
N_NO_STAFF = 14

_PLACE_COUNTRY = {
    "Malawi": "MW", "Kenya": "KE", "Bangladesh": "BD", "Viet Nam": "VN", "Mekong": "VN", "Red River": "VN",
    "Hanoi": "VN", "Ho Chi Minh": "VN", "Ghana": "GH", "Nigeria": "NG", "Lagos": "NG", "Tanzania": "TZ",
    "Ethiopia": "ET", "Ethiopian": "ET", "Zambia": "ZM", "Peru": "PE", "Andean": "PE", "India": "IN",
    "Ahmedabad": "IN", "Western Ghats": "IN", "Pakistan": "PK", "Sindh": "PK", "Colombia": "CO",
    "Bogotá": "CO", "Brazil": "BR", "São Paulo": "BR", "Portugal": "PT", "Lisbon": "PT", "Spain": "ES",
    "Seville": "ES", "Madrid": "ES", "Barcelona": "ES", "Iberian": "ES", "Germany": "DE", "France": "FR",
    "Brittany": "FR", "Netherlands": "NL", "Wadden": "NL", "Kraków": "PL", "Dhaka": "BD", "Nairobi": "KE",
    "Kampala": "UG", "England": "GB", "Scotland": "GB", "Northern Ireland": "GB", "Kent": "GB",
    "New Zealand": "NZ", "Argentina": "AR", "Chile": "CL", "Qatar": "QA", "Mozambique": "MZ",
    "Zimbabwe": "ZW", "Niger": "NE", "Burkina": "BF", "Uganda": "UG", "Sri Lanka": "LK", "Nepal": "NP",
}
_DEPT_CONFERENCES = {
    "CS": ("Proceedings of the Symposium on Reliable Software Systems",
           "Proceedings of the International Conference on Data and Energy Systems"),
    "CEE": ("Proceedings of the European Congress on Water and Infrastructure",),
    "EPP": ("Proceedings of the Annual Conference on Development and Public Policy",),
    "LSM": ("Proceedings of the Global Health Research Forum",),
    "MP": ("Proceedings of the Workshop on Computational Mathematics",),
    "ESS": ("Proceedings of the European Conference on Educational Research Practice",),
    "AFS": ("Proceedings of the Congress on Agricultural Systems",),
    "HUM": ("Proceedings of the Conference on Language, History and Culture",),
}
_FOREIGN_JOURNALS = {"de": "Zeitschrift für Umwelt und Gesellschaft", "es": "Revista de Estudios del Desarrollo Rural",
                     "fr": "Revue Internationale de Recherche Appliquée", "pt": "Revista Brasileira de Estudos Rurais"}
_BOOKS = ("Sustainable Futures: Research from Kestrel Heath", "Perspectives in the Humanities and Social Sciences",
          "Water, Land and People: Essays in Honour of a Teacher", "Methods and Models in Applied Science")


def ascii_fold(text: str) -> str:
    return unicodedata.normalize("NFKD", text).encode("ascii", "ignore").decode()


def allocate(n: int, weights: list[float]) -> list[int]:
    """Largest-remainder split of n into integer counts proportional to weights."""
    total = sum(weights)
    raw = [n * w / total for w in weights]
    counts = [int(x) for x in raw]
    order = sorted(range(len(raw)), key=lambda i: raw[i] - counts[i], reverse=True)
    for i in order[: n - sum(counts)]:
        counts[i] += 1
    return counts


def year_multiplier(topic: Topic, year: int) -> float:
    """The intended shifts: energy and climate work grows in 2025; health work was strongest in 2022."""
    factor = 1.0
    if "7" in topic.goals:
        factor *= {2022: 0.9, 2023: 1.0, 2024: 1.0, 2025: 7.0}[year]
    elif "13" in topic.goals:
        factor *= {2022: 0.9, 2023: 1.0, 2024: 1.0, 2025: 5.0}[year]
    if topic.goals and topic.goals[0] == "3":
        factor *= {2022: 1.7, 2023: 1.2, 2024: 1.0, 2025: 0.9}[year]
    return factor


def topic_counts(year: int, n_foreign: int) -> dict[str, int]:
    n_general = YEAR_SIZES[year] - n_foreign
    n_none = round(NO_GOAL_SHARE * YEAR_SIZES[year])
    none = [t for t in TOPICS if not t.goals]
    goal = [t for t in TOPICS if t.goals]
    counts = dict(zip((t.key for t in none), allocate(n_none, [t.weight for t in none])))
    counts.update(zip((t.key for t in goal),
                      allocate(n_general - n_none, [t.weight * year_multiplier(t, year) for t in goal])))
    return counts


class Planner:
    def __init__(self, seed: int):
        self.rng = random.Random(seed)
        self.titles: set[str] = set()
        self.dois: set[str] = set()
        self.staff_by_dept: dict[str, list[tuple[str, tuple[str, ...]]]] = {}
        for name, dept, variants in people.STAFF:
            self.staff_by_dept.setdefault(dept, []).append((name, variants))

    # --- people ---------------------------------------------------------------------------
    def _external(self, inst: tuple[str, str | None, str], taken: set[str]) -> dict:
        firsts, lasts = people.NAME_POOLS[inst[2]]
        first = self.rng.choice([f for f in firsts if f not in taken] or list(firsts))
        last = self.rng.choice([n for n in lasts if n not in taken] or list(lasts))
        taken.update((first, last))
        return {"name": f"{last}, {first}", "staff": None, "dept": None, "affiliation": inst[0], "iso": inst[1]}

    def _institutions_for(self, place_text: str) -> list[tuple[str, str | None, str]]:
        isos = {iso for key, iso in _PLACE_COUNTRY.items() if key in place_text}
        local = [inst for inst in people.INSTITUTIONS if inst[1] in isos]
        return local

    def authors(self, topic_dept: str, partners: tuple[str, ...], place_text: str, pure: bool,
                no_staff: bool = False, fixed_partner: int | None = None) -> list[dict]:
        rng = self.rng
        home_pattern = rng.choices(people.HOME_AFFILIATIONS, weights=(30, 20, 15, 12, 6, 5))[0]
        authors: list[dict] = []
        if not no_staff:
            n_staff = rng.choices((1, 2, 3), weights=(45, 38, 17))[0]
            depts = [topic_dept] + [rng.choice(partners) if partners and rng.random() < 0.35 else topic_dept
                                    for _ in range(n_staff - 1)]
            used: set[str] = set()
            for dept in depts:
                pool = [s for s in self.staff_by_dept[dept] if s[0] not in used]
                name, variants = rng.choice(pool)
                used.add(name)
                form = rng.choice(variants) if variants and rng.random() < 0.5 else name
                authors.append({"name": form, "staff": name, "dept": dept,
                                "affiliation": home_pattern[0].format(dept=people.DEPARTMENTS[dept]), "iso": home_pattern[1]})
        n_unmapped = (rng.choice((1, 2)) if no_staff else int(rng.random() < 0.3))
        for name in rng.sample(people.UNMAPPED_HOME, n_unmapped):
            dept_name = people.DEPARTMENTS[topic_dept]
            authors.append({"name": name, "staff": None, "dept": None,
                            "affiliation": home_pattern[0].format(dept=dept_name), "iso": home_pattern[1]})
        international = rng.random() < (0.35 if pure else 0.6) or fixed_partner is not None or no_staff
        if international:
            local = self._institutions_for(place_text)
            insts = []
            if fixed_partner is not None:
                insts.append(people.INSTITUTIONS[fixed_partner])
            elif local and rng.random() < 0.85:
                insts.append(rng.choice(local))
            if not insts or rng.random() < 0.35:
                insts.append(rng.choice(people.INSTITUTIONS))
            taken: set[str] = set()
            for inst in insts:
                for _ in range(rng.choices((1, 2, 3), weights=(50, 35, 15))[0]):
                    authors.append(self._external(inst, taken))
        cap = 3 if pure else 9
        if len(authors) > cap:
            authors = authors[:1] + rng.sample(authors[1:], cap - 1)
        if len(authors) > 1 and rng.random() < 0.3:
            authors.insert(0, authors.pop(rng.randrange(1, len(authors))))
        return authors

    # --- text -----------------------------------------------------------------------------
    def unique_title(self, topic: Topic, strand: int) -> tuple[str, dict[str, str]]:
        for attempt in range(40):
            chosen = compose.choose_slots(topic, self.rng)
            title = compose.compose_title(topic, chosen, self.rng, strand if attempt < 20 else None)
            if title_key(title) not in self.titles:
                self.titles.add(title_key(title))
                return title, chosen
        suffixes = (": a case study", ": new evidence", ": implications for practice", " revisited",
                    ": a comparative analysis", ": lessons from a decade of data")
        for suffix in self.rng.sample(suffixes, len(suffixes)):
            if title_key(title + suffix) not in self.titles:
                self.titles.add(title_key(title + suffix))
                return title + suffix, chosen
        raise RuntimeError(f"no unique title left for topic {topic.key}")

    def mention(self, topic: Topic) -> tuple[str | None, tuple[str, ...], str]:
        if not topic.goals or self.rng.random() >= MENTION_RATE:
            return None, (), ""
        styles = ["single", "general", "pair", "target"]
        style = self.rng.choices(styles, weights=(45, 20, 17, 18))[0]
        if style == "pair" and len(topic.goals) < 2 or style == "target" and topic.key not in compose.TOPIC_TARGETS:
            style = "single"
        text, goals = compose.compose_mention(topic, style, self.rng)
        return text, goals, style

    # --- records ---------------------------------------------------------------------------
    def doc_type(self, dept: str) -> str:
        weights = {"CS": (60, 35, 5, 0), "HUM": (70, 5, 20, 5)}.get(dept, (85, 8, 6, 1))
        return self.rng.choices(("article", "conference", "chapter", "book"), weights=weights)[0]

    def venue(self, topic_dept: str, journals: tuple[str, ...], doc_type: str) -> str:
        if doc_type == "article":
            return self.rng.choice(journals)
        if doc_type == "conference":
            return self.rng.choice(_DEPT_CONFERENCES[topic_dept])
        return self.rng.choice(_BOOKS)

    def doi(self, venue: str, year: int, doc_type: str) -> str:
        rate = {"article": 0.9, "conference": 0.8, "chapter": 0.4, "book": 0.3}[doc_type]
        if self.rng.random() >= rate:
            return ""
        abbrev = "".join(w[0] for w in re.findall(r"[A-Za-z]+", venue) if w[0].isupper()).lower()[:5] or "khu"
        if doc_type in ("chapter", "book"):
            abbrev = "khup"
        while True:
            doi = f"10.99999/{abbrev}.{year}.{self.rng.randint(1, 2999):04d}"
            if doi not in self.dois:
                self.dois.add(doi)
                return doi

    def record(self, topic: Topic, year: int, no_staff: bool = False) -> dict:
        rng = self.rng
        strand = rng.randrange(min(len(topic.aim), len(topic.method), len(topic.result)))
        title, chosen = self.unique_title(topic, strand)
        mention, explicit, style = self.mention(topic)
        abstract = compose.compose_abstract(topic, chosen, rng, strand, mention)
        keywords = rng.sample(topic.keywords, rng.randint(min(3, len(topic.keywords)), len(topic.keywords)))
        if mention and explicit and rng.random() < 0.3:
            keywords.append(f"SDG {explicit[0]}")
        place_text = " ".join(chosen.values())
        pure = not topic.goals and topic.dept in ("MP", "HUM")
        authors = self.authors(topic.dept, topic.partners, place_text, pure, no_staff)
        return self._finish(dict(topic=topic.key, goals=topic.goals, year=year, title=title, abstract=abstract,
                                 keywords=keywords, authors_info=authors, mention=mention or "",
                                 explicit_goals=explicit, mention_style=style, language="en",
                                 journals=topic.journals, dept=topic.dept))

    def foreign_record(self, spec: dict) -> dict:
        partner = next(i for i, inst in enumerate(people.INSTITUTIONS) if spec["partner"] in inst[0])
        authors = self.authors(spec["dept"], (), "", False, fixed_partner=partner)
        names = {"de": "German", "es": "Spanish", "fr": "French", "pt": "Portuguese"}
        return self._finish(dict(topic=f"foreign_{spec['lang']}", goals=spec["goals"], year=spec["year"],
                                 title=spec["title"], abstract=spec["abstract"], keywords=list(spec["keywords"]),
                                 authors_info=authors, mention="", explicit_goals=(), mention_style="",
                                 language=spec["lang"], language_name=names[spec["lang"]] if self.rng.random() < 0.6 else "",
                                 journals=(_FOREIGN_JOURNALS[spec["lang"]],), dept=spec["dept"]))

    def _finish(self, rec: dict) -> dict:
        rng = self.rng
        doc_type = self.doc_type(rec["dept"]) if not rec["topic"].startswith("foreign") else "article"
        venue = self.venue(rec["dept"], rec.pop("journals"), doc_type)
        doi = self.doi(venue, rec["year"], doc_type)
        first_page = rng.randint(1, 1800)
        infos = rec["authors_info"]
        affiliations = list(dict.fromkeys(a["affiliation"] for a in infos))
        depts = sorted({people.DEPARTMENTS[a["dept"]] for a in infos if a["dept"]})
        units = list(dict.fromkeys(people.CRIS_UNIT_NAMES.get(a["dept"], people.DEPARTMENTS[a["dept"]])
                                   for a in infos if a["dept"]))
        rec.update(
            doc_type=doc_type, venue=venue, doi=doi, doi_as_written=doi, year_text=str(rec["year"]),
            volume=rng.randint(3, 68), issue=rng.randint(1, 12), first_page=first_page,
            last_page=first_page + rng.randint(6, 28), authors=[a["name"] for a in infos],
            affiliations=affiliations, departments=depts, units=units,
            countries=sorted({a["iso"] for a in infos if a["iso"]}),
            staff=sorted({a["staff"] for a in infos if a["staff"]}),
            bib_accents=rng.random() < 0.6, bib_formulas=rng.random() < 0.6, bib_first_last=rng.random() < 0.35,
            kw_semicolon=rng.random() < 0.7, ris_date="", ris_url=rng.random() < 0.4, status="Published",
            language_name=rec.get("language_name", ""), native_id="", file=YEAR_FILE.get(rec["year"], "ris"),
            has_abstract=bool(rec["abstract"]), role="original", duplicate_of="", set_aside_reason="",
        )
        if doi and rec["file"] == "csv" and rng.random() < 0.2:
            rec["doi_as_written"] = "https://doi.org/" + doi
        return rec


def title_key(title: str) -> str:
    return re.sub(r"[^a-z0-9]+", " ", ascii_fold(title).lower()).strip()


def plan_publications(seed: int) -> tuple[Planner, list[dict]]:
    """All unique publications of all years, before duplicates and faulty entries are added."""
    planner = Planner(seed)
    records: list[dict] = []
    by_key = {t.key: t for t in TOPICS}
    for year in YEAR_SIZES:
        specs = [f for f in FOREIGN if f["year"] == year]
        for key, n in topic_counts(year, len(specs)).items():
            records.extend(planner.record(by_key[key], year) for _ in range(n))
        records.extend(planner.foreign_record(spec) for spec in specs)
    candidates = [i for i, r in enumerate(records) if r["language"] == "en"]
    for i in planner.rng.sample(candidates, N_NO_STAFF):
        old = records[i]
        topic = by_key[old["topic"]]
        fresh = planner.authors(topic.dept, topic.partners, old["title"], False, no_staff=True)
        records[i] = {**old, "authors_info": fresh}
        records[i] = planner._finish({k: old[k] for k in ("topic", "goals", "year", "title", "abstract", "keywords",
                                                          "mention", "explicit_goals", "mention_style", "language",
                                                          "dept")} | {"authors_info": fresh, "journals": topic.journals})
        records[i]["no_staff"] = True
    return planner, records
