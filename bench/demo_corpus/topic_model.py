"""The shape of one research topic in the demo corpus, and the helper that builds it.

A topic holds hand-written pools of sentences for each move of an abstract
(background, aim, method, result, implication) plus slot words, so records on
the same topic differ in wording, place and numbers.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Topic:
    key: str
    goals: tuple[str, ...]  # goals a careful reviewer assigns; () for none
    dept: str  # department code of the leading staff author (see people.DEPARTMENTS)
    partners: tuple[str, ...]  # departments that sometimes co-author
    keywords: tuple[str, ...]
    slots: dict[str, tuple[str, ...]]
    titles: tuple[str, ...]
    background: tuple[str, ...]
    aim: tuple[str, ...]
    method: tuple[str, ...]
    result: tuple[str, ...]
    implication: tuple[str, ...]
    note: str  # reviewer note for the labelled sample
    journals: tuple[str, ...] = field(default=())
    weight: float = 1.0


def topic(key: str, goals: str, dept: str, **parts: object) -> Topic:
    """Build a Topic; `goals` is a ';'-joined string such as "6;3" or "" for none."""
    tuples = {k: tuple(v) if isinstance(v, (list, tuple)) else v for k, v in parts.items()}
    slots = {k: tuple(v) for k, v in dict(parts.get("slots", {})).items()}  # type: ignore[arg-type]
    tuples["slots"] = slots
    tuples.setdefault("partners", ())
    return Topic(key=key, goals=tuple(g for g in goals.split(";") if g), dept=dept, **tuples)  # type: ignore[arg-type]
