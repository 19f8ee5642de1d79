"""Compose one abstract and title from a topic's sentence pools, plus explicit goal mentions.

Text comes out as plain Unicode with two light markers the writers translate:
"*...*" for italics (species names) and "CO2"/"PM2.5" for formulas.
"""

from __future__ import annotations

import random
import re

from topic_model import Topic

GOAL_TITLES = {  # short titles of A/RES/70/1 (2015)
    "1": "No Poverty", "2": "Zero Hunger", "3": "Good Health and Well-being", "4": "Quality Education",
    "5": "Gender Equality", "6": "Clean Water and Sanitation", "7": "Affordable and Clean Energy",
    "8": "Decent Work and Economic Growth", "9": "Industry, Innovation and Infrastructure",
    "10": "Reduced Inequalities", "11": "Sustainable Cities and Communities",
    "12": "Responsible Consumption and Production", "13": "Climate Action", "14": "Life Below Water",
    "15": "Life on Land", "16": "Peace, Justice and Strong Institutions", "17": "Partnerships for the Goals",
}

#: A target that fits the topic, for mentions such as "SDG 6.1".
TOPIC_TARGETS = {
    "groundwater_nitrate": "6.1", "arsenic_wells": "6.1", "wetland_wastewater": "6.3", "school_wash": "6.2",
    "maternal_health": "3.1", "minigrids": "7.1", "heat_pumps": "7.3", "cash_transfers": "1.3",
    "fisheries": "14.4", "food_waste": "12.3", "gbv": "5.2", "procurement_corruption": "16.5",
    "statistical_capacity": "17.18", "farm_adaptation": "13.1", "drought_crops": "2.4",
    "early_literacy": "4.1", "transport_access": "11.2", "air_pollution": "3.9",
}

_SLOT = re.compile(r"\{(\w+)(?::(\d+)-(\d+))?\}")

# Sentences that carry a mention; {m} is the mention itself. Kept apart from topic pools
# so that a mention never changes what the abstract is about.
_MENTION_AFTER_AIM = (
    "The study was designed to inform national reporting on {m}.",
    "Our starting point is {m}, whose indicators say little about local conditions.",
    "The work responds to {m} and to calls for evidence from outside capital cities.",
)
_MENTION_CLOSING = (
    "These findings bear directly on {m}.",
    "We discuss what the results imply for progress towards {m}.",
    "The evidence is relevant to {m} and to the indicators used to track it.",
    "Taken together, the results speak to {m}.",
    "Progress on {m} will depend on measures of the kind examined here.",
)


def _fill(template: str, chosen: dict[str, str], rng: random.Random) -> str:
    def repl(match: re.Match[str]) -> str:
        name, low, high = match.group(1), match.group(2), match.group(3)
        if low is not None:
            value = rng.randint(int(low), int(high))
            if name == "p":
                if rng.random() < 0.3:
                    return f"{value + rng.randint(0, 9) / 10:.1f}%"
                return f"{value}%"
            return f"{value:,}" if value >= 10000 else str(value)
        return chosen[name]

    text = _SLOT.sub(repl, template)
    return text[0].upper() + text[1:]


def choose_slots(topic: Topic, rng: random.Random) -> dict[str, str]:
    return {name: rng.choice(values) for name, values in topic.slots.items()}


def compose_title(topic: Topic, chosen: dict[str, str], rng: random.Random, strand: int | None = None) -> str:
    template = topic.titles[strand % len(topic.titles)] if strand is not None else rng.choice(topic.titles)
    return _fill(template, chosen, rng)


def compose_abstract(
    topic: Topic, chosen: dict[str, str], rng: random.Random, strand: int, mention: str | None = None
) -> str:
    """Background, aim, method, result, implication; moves get a second sentence until long enough.

    Pools are written in parallel strands (the n-th aim goes with the n-th method and
    result), so the first sentence of those moves follows the strand and the paper
    stays coherent; extra sentences come from the other strands.
    """
    picks = {}
    for move in ("background", "aim", "method", "result", "implication"):
        pool = list(getattr(topic, move))
        if move in ("aim", "method", "result"):
            first = pool.pop(strand % len(pool))
            picks[move] = [first] + rng.sample(pool, len(pool))
        else:
            # keep the written order (general before specific) among the sentences used
            picks[move] = sorted(rng.sample(pool, len(pool)), key=pool.index)
            if rng.random() < 0.5:
                picks[move] = picks[move][1:] + picks[move][:1]
    counts = {move: 1 for move in picks}
    # At most two sentences per move while a target length is sought; a third only if still short.
    order = ["result", "method", "background", "implication"]

    def words() -> int:
        return sum(len(" ".join(picks[m][: counts[m]]).split()) for m in picks)

    target = rng.randint(135, 230)
    for move in order:
        if words() >= target:
            break
        if counts[move] < len(picks[move]):
            counts[move] += 1
    for move in ("method", "result"):
        if words() < 125 and counts[move] < len(picks[move]):
            counts[move] += 1
    sentences: list[str] = []
    place_mention = rng.random() < 0.35
    for move in picks:
        sentences.extend(_fill(s, chosen, rng) for s in picks[move][: counts[move]])
        if mention and move == "aim" and place_mention:
            sentences.append(_fill(rng.choice(_MENTION_AFTER_AIM), {"m": mention}, rng))
    if mention and not place_mention:
        sentences.append(_fill(rng.choice(_MENTION_CLOSING), {"m": mention}, rng))
    return " ".join(sentences)


def compose_mention(topic: Topic, style: str, rng: random.Random) -> tuple[str, tuple[str, ...]]:
    """Return the mention text and the goals it names explicitly (() for the goals in general)."""
    goal = topic.goals[0]
    if style == "general":
        return rng.choice(("the Sustainable Development Goals", "the SDGs",
                           "the 2030 Agenda for Sustainable Development", "the UN 2030 Agenda")), ()
    if style == "pair" and len(topic.goals) > 1:
        a, b = topic.goals[0], topic.goals[1]
        return rng.choice((f"SDGs {a} and {b}", f"SDG {a} and SDG {b}", f"SDG{a} and SDG{b}")), (a, b)
    if style == "target" and topic.key in TOPIC_TARGETS:
        target = TOPIC_TARGETS[topic.key]
        return rng.choice((f"SDG {target}", f"SDG {target}", f"SDG target {target}")), (goal,)
    forms = (f"SDG {goal}", f"SDG{goal}", f"Sustainable Development Goal {goal}",
             f"SDG {goal} ({GOAL_TITLES[goal]})", f"Goal {goal} of the Sustainable Development Goals",
             f"UN SDG {goal}", f"SDG-{goal}")
    return rng.choice(forms), (goal,)
