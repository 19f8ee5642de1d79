"""Plan the grant portfolio of the demo university: which topic each award is on, its size, funder,
currency, departments, investigators and partners. Everything is invented.

One seeded random.Random draws everything, so the portfolio repeats exactly. A planned award is a
plain dict; summaries.py writes its title and summary, make_grants.py writes the files.
"""

from __future__ import annotations

import random

import people  # bench/demo_corpus: the invented staff, departments and partner institutions
import plan
from summaries import Writer
from topic_model import Topic

YEAR_SIZES = {2022: 34, 2023: 36, 2024: 38, 2025: 42}  # awards after the one duplicate is merged
NO_GOAL_SHARE = 0.25
BASE_CURRENCY = "EUR"
#: Fixed demo rates (invented, not market rates): the value of one unit in EUR.
RATES = {"EUR": 1.0, "GBP": 1.17, "USD": 0.92}
#: (funder, currency, weight); invented names.
FUNDERS = (
    ("Banbha Research Council", "EUR", 34), ("Continental Research Programme", "EUR", 18),
    ("Midlands Regional Development Fund", "EUR", 8), ("Kestrel Heath Foundation", "EUR", 8),
    ("Atlantic Isles Research Trust", "GBP", 12), ("Lagan Cross-Border Fund", "GBP", 6),
    ("Brightwater Foundation", "USD", 8), ("Tamsin Global Health Initiative", "USD", 6),
)
#: Award kinds drawn at random: (name, weight, low, high) amounts in the funder's currency. Consortia
#: (the large awards) are planned below, so that chance does not make a shift of its own.
KINDS = (("studentship", 35, 60_000, 160_000), ("project", 65, 150_000, 900_000))
MAX_HUMANITIES = 7  # a department under the small-group rule of 10 awards, however large its funding
#: Planned large awards: (year, topic, amount in EUR, funder). Energy funding grows in 2025; health
#: funding was largest in 2022; the humanities hold one large infrastructure award.
LARGE = (
    (2025, "minigrids", 2_900_000, "Continental Research Programme"),
    (2025, "offshore_wind", 3_200_000, "Continental Research Programme"),
    (2025, "grid_storage", 2_600_000, "Banbha Research Council"),
    (2025, "heat_pumps", 2_100_000, "Banbha Research Council"),
    (2025, "pv_forecasting", 1_400_000, "Midlands Regional Development Fund"),
    (2022, "maternal_health", 2_500_000, "Tamsin Global Health Initiative"),
    (2022, "amr", 2_200_000, "Continental Research Programme"),
    (2022, "vaccine_hesitancy", 1_500_000, "Brightwater Foundation"),
    (2024, "medieval_manuscripts", 1_800_000, "Continental Research Programme"),
)


def year_multiplier(topic: Topic, year: int) -> float:
    """More energy awards in 2025, more health awards in 2022."""
    if topic.goals and topic.goals[0] == "7":
        return {2022: 0.6, 2023: 0.8, 2024: 0.8, 2025: 3.0}[year]
    if topic.goals and topic.goals[0] == "3":
        return {2022: 2.0, 2023: 1.2, 2024: 1.0, 2025: 0.4}[year]
    return 1.0


class Planner:
    def __init__(self, seed: int):
        self.rng = random.Random(seed)
        self.writer = Writer(self.rng)
        self.staff = {}
        for name, dept, _variants in people.STAFF:
            self.staff.setdefault(dept, []).append(name)
        self.n_humanities = 0

    def topics_for(self, year: int, n: int) -> list[Topic]:
        none = [t for t in plan.TOPICS if not t.goals]
        goal = [t for t in plan.TOPICS if t.goals]
        n_none = round(NO_GOAL_SHARE * n)
        picked = [self.rng.choice(none) for _ in range(n_none)]
        weights = [t.weight * year_multiplier(t, year) for t in goal]
        picked += self.rng.choices(goal, weights=weights, k=n - n_none)
        out = []
        for topic in picked:
            if topic.dept == "HUM":
                if self.n_humanities >= MAX_HUMANITIES:
                    topic = self.rng.choice([t for t in none if t.dept == "MP"])
                else:
                    self.n_humanities += 1
            out.append(topic)
        return out

    def award(self, topic: Topic, year: int, large: tuple | None = None) -> dict:
        rng = self.rng
        if large is not None:
            kind, funder = "consortium", large[3]
            currency = next(c for f, c, _ in FUNDERS if f == funder)
            amount = round(large[2] / RATES[currency], -3)
        else:
            funder, currency, _ = rng.choices(FUNDERS, weights=[w for *_, w in FUNDERS])[0]
            kind, _, low, high = rng.choices(KINDS, weights=[k[1] for k in KINDS])[0]
            amount = round(low * (high / low) ** rng.random() / 500) * 500
        text = self.writer.award_text(topic, kind, large is not None)
        depts = [topic.dept]
        if topic.partners and rng.random() < 0.25:
            depts.append(rng.choice(topic.partners))
        investigators = []
        for dept in depts:
            pool = [s for s in self.staff[dept] if s not in investigators]
            investigators += rng.sample(pool, 1 if dept != topic.dept else rng.choice((1, 1, 2, 3)))
        return {
            "topic": topic.key, "goals": topic.goals, "year": year, "kind": kind, "funder": funder,
            "currency": currency, "amount": float(amount), "amount_text": "", "currency_text": currency,
            "departments": [people.DEPARTMENTS[d] for d in depts], "investigators": investigators,
            "partners": self.partners(text["place"], kind), "mentioned_goals": text["mentioned_goals"],
            "title": text["title"], "summary": text["summary"], "keywords": text["keywords"],
            "role": "award", "note": "", "duplicate_of": "",
        }

    def partners(self, place: str, kind: str) -> list[tuple[str, str | None]]:
        """Partner institutions (affiliation, ISO code): a consortium always has some, others often."""
        rng = self.rng
        if kind != "consortium" and rng.random() > 0.45:
            return []
        local = [inst for inst in people.INSTITUTIONS
                 if inst[1] and any(key in place and iso == inst[1] for key, iso in plan._PLACE_COUNTRY.items())]
        named = [inst for inst in people.INSTITUTIONS if inst[1]]
        chosen = [rng.choice(local)] if local and rng.random() < 0.8 else []
        for _ in range(rng.choice((1, 2)) if kind != "consortium" else rng.choice((2, 3))):
            chosen.append(rng.choice(named))
        unique = list({inst[0]: inst for inst in chosen}.values())
        return [(inst[0], inst[1]) for inst in unique]


def plan_portfolio(seed: int) -> tuple[Planner, list[dict]]:
    """Every award of every year (one record each; the duplicate and faulty amounts come later)."""
    planner = Planner(seed)
    by_key = {t.key: t for t in plan.TOPICS}
    awards: list[dict] = []
    for year, size in YEAR_SIZES.items():
        large = [spec for spec in LARGE if spec[0] == year]
        planner.n_humanities += sum(by_key[spec[1]].dept == "HUM" for spec in large)
        awards.extend(planner.award(by_key[spec[1]], year, spec) for spec in large)
        awards.extend(planner.award(topic, year) for topic in planner.topics_for(year, size - len(large)))
    return planner, awards
