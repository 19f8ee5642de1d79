"""Titles and summaries of invented awards, written as grant summaries (what the award will do).

The subject matter comes from the demo's topic pools (bench/demo_corpus: background and implication
sentences, keywords, places); the framing sentences here are written for awards.
"""

from __future__ import annotations

import random
import re

import compose
from topic_model import Topic

_TITLES = {
    "studentship": ("Doctoral studentship: {Kw0} and {kw1}{in_place}", "Doctoral training in {kw0}{in_place}",
                    "Postdoctoral fellowship on {kw0} and {kw1}"),
    "project": ("{Kw0} and {kw1}{in_place}", "Understanding {kw0}{in_place}",
                "New approaches to {kw0}: {kw1}{in_place}", "From evidence to practice: {kw0}{in_place}",
                "What works for {kw0}? {Kw1}{in_place}"),
    "consortium": ("{ACR}: a consortium on {kw0} and {kw1}{in_place}", "{ACR}: {Kw0}, {kw1} and {kw2} at scale"),
}
_AIMS = {
    "studentship": ("The award funds a doctoral researcher for four years to work on {kw0}{in_place}.",
                    "A doctoral student will be trained in {kw0} and {kw1}, with supervisors from two research groups.",
                    "The fellowship gives an early-career researcher three years to establish a programme on {kw0}."),
    "project": ("This project will examine {kw0} and {kw1}{in_place}, asking what would make the largest difference.",
                "The project sets out to build the evidence on {kw0}{in_place} that decision makers have asked for.",
                "Over {months} months the team will study {kw0}, {kw1} and {kw2}{in_place}."),
    "consortium": ("The award brings together partner institutions in several countries to work on {kw0} and "
                   "{kw1}{in_place} at a scale no single group could reach.",
                   "A consortium of universities, agencies and practitioners will spend {months} months on {kw0}, "
                   "{kw1} and {kw2}{in_place}."),
}
#: Basic research (topics with no goal) is framed by the questions it asks, not by who will use it.
_BASIC_AIMS = ("The project will develop the theory of {kw0}, with a focus on {kw1}.",
               "The award funds {months} months of work on open questions in {kw0} and {kw1}.",
               "This fellowship will pursue a programme on {kw0}, building on recent progress in {kw1}.")
_BASIC_PLANS = ("The work proceeds by {b0} and {b1}, with results checked against known special cases.",
                "The team will combine {b0} with {b1}, and visit collaborators for intensive working periods.")
_BASIC_METHODS = ("new proofs", "computer experiments", "careful reading of the sources", "small worked examples",
                  "formal verification", "numerical tests", "seminars with visiting researchers")
_BASIC_CLOSINGS = ("Results will be posted as preprints and published in open-access journals.",
                   "Software and notes written during the project will be released under an open licence.")
_METHODS = ("field measurements", "household surveys", "statistical modelling", "archival research",
            "workshops with practitioners", "laboratory experiments", "analysis of administrative data",
            "case studies", "simulation", "interviews")
_PLANS = ("The work combines {m0} with {m1}, in three work packages that feed one another.",
          "The team will use {m0} and {m1}, and test early findings with the people who will use them.",
          "The first year is given to {m0}; the second and third to {m1} and to writing up.")
_CLOSINGS = ("Results will be shared openly with the communities and agencies involved.",
             "All outputs will be open access, and the data will be deposited in a public repository.",
             "A final workshop will bring the findings to the partners who helped shape the questions.")
_MENTIONS = ("The award contributes to {m}.", "The project is designed to support progress on {m}.",
             "The funder asked applicants to show how their work serves {m}; this project addresses it directly.")


class Writer:
    def __init__(self, rng: random.Random):
        self.rng = rng
        self.titles: set[str] = set()

    def award_text(self, topic: Topic, kind: str, large: bool) -> dict:
        """title, summary, keywords, place (the filled slots, for partner choice) and mentioned_goals."""
        rng = self.rng
        for _ in range(50):
            chosen = compose.choose_slots(topic, rng)
            words = _words(topic, chosen, rng)
            title = _fill(rng.choice(_TITLES[kind]), words)
            if title_key(title) not in self.titles:
                break
        else:
            raise RuntimeError(f"no unique award title left for topic {topic.key}")
        self.titles.add(title_key(title))
        sentences = [compose._fill(s, chosen, rng) for s in _some(topic.background, rng, 2)]
        if topic.goals:
            sentences.append(_fill(rng.choice(_AIMS[kind]), words))
            m0, m1 = rng.sample(_METHODS, 2)
            sentences.append(_fill(rng.choice(_PLANS), {"m0": m0, "m1": m1}))
        else:
            sentences.append(_fill(rng.choice(_BASIC_AIMS), words))
            b0, b1 = rng.sample(_BASIC_METHODS, 2)
            sentences.append(_fill(rng.choice(_BASIC_PLANS), {"b0": b0, "b1": b1}))
        sentences.append(compose._fill(rng.choice(topic.implication), chosen, rng))
        sentences.append(rng.choice(_CLOSINGS if topic.goals else _BASIC_CLOSINGS))
        mentioned: tuple[str, ...] = ()
        if topic.goals and rng.random() < (0.6 if large else 0.2):
            text, mentioned = compose.compose_mention(topic, "single", rng)
            sentences.append(_fill(rng.choice(_MENTIONS), {"m": text}))
        keywords = rng.sample(topic.keywords, rng.randint(min(3, len(topic.keywords)), len(topic.keywords)))
        return {"title": title, "summary": " ".join(sentences), "keywords": keywords,
                "place": " ".join(chosen.values()), "mentioned_goals": mentioned}


def _words(topic: Topic, chosen: dict[str, str], rng: random.Random) -> dict[str, str]:
    kws = rng.sample(topic.keywords, 3) if len(topic.keywords) >= 3 else list(topic.keywords) * 3
    words = {f"kw{i}": kw for i, kw in enumerate(kws)}
    words.update({f"Kw{i}": kw[0].upper() + kw[1:] for i, kw in enumerate(kws)})
    place = chosen.get("place")
    words["in_place"] = f" in {place}" if place else ""
    words["ACR"] = "".join(re.sub(r"[^A-Za-z]", "", kw)[:2].upper() for kw in kws[:2]) + rng.choice(("NET", "LINK", "HUB"))
    words["months"] = str(rng.choice((24, 30, 36, 48)))
    return words


def _fill(template: str, words: dict[str, str]) -> str:
    return template.format(**words)


def _some(pool: tuple[str, ...], rng: random.Random, most: int) -> list[str]:
    """One or two sentences of a pool, in the order written (general before specific)."""
    picked = rng.sample(range(len(pool)), rng.randint(1, min(most, len(pool))))
    return [pool[i] for i in sorted(picked)]


def title_key(title: str) -> str:
    return re.sub(r"[^a-z0-9]+", " ", title.lower()).strip()
