"""A lexical signal beside the semantic one: distinct goal keywords found in a text.

Embeddings blur rare technical terms ("sanitation", "microfinance"); a
framework's keyword list catches them. Scored as 1 - exp(-hits / scale), so one
hit is weak evidence and several are strong.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Sequence


_WORD = re.compile(r"\w+")


@dataclass(frozen=True)
class KeywordMatcher:
    goal_codes: tuple[str, ...]
    patterns: tuple[re.Pattern[str] | None, ...]
    # Per goal, the words a match can start with (None: some keyword starts with punctuation). A
    # match starts with a whole word of the text: a keyword's first word or, for a one-word keyword,
    # that word plus the plural ending. A goal none of whose first words is in the text is skipped,
    # and the pattern is tried only where one occurs (4x faster than a scan of the whole text).
    first_words: tuple[frozenset[str] | None, ...] = ()

    @classmethod
    def build(cls, goal_codes: Sequence[str], keywords: Sequence[Sequence[str]]) -> "KeywordMatcher":
        patterns, firsts = [], []
        for words in keywords:
            words = sorted({w.strip().lower() for w in words if w.strip()}, key=len, reverse=True)
            if not words:
                patterns.append(None)
                firsts.append(frozenset())
                continue
            # Word boundaries so "aid" does not fire inside "said"; optional plural "s"/"es".
            alternation = "|".join(re.escape(w) for w in words)
            # Matched against lower-cased text: twice as fast as IGNORECASE on these long alternations.
            patterns.append(re.compile(rf"\b(?:{alternation})(?:e?s)?\b"))
            firsts.append(_first_words(words))
        return cls(tuple(goal_codes), tuple(patterns), tuple(firsts))

    def hits(self, text: str) -> list[int]:
        """Distinct keywords of each goal found in `text`."""
        lowered = text.lower()
        words = set(_WORD.findall(lowered))
        places: dict[str, list[int]] = {}  # where each first word occurs (as a substring: a superset)
        counts = []
        for pattern, firsts in zip(self.patterns, self.first_words or (None,) * len(self.patterns)):
            if pattern is None:
                counts.append(0)
            elif firsts is None:
                counts.append(len({m.group(0) for m in pattern.finditer(lowered)}))
            else:
                present = firsts.intersection(words)
                counts.append(len(_matches_from(pattern, lowered, present, places)) if present else 0)
        return counts


def _first_words(words: Sequence[str]) -> frozenset[str] | None:
    firsts: set[str] = set()
    for word in words:
        first = _WORD.match(word)
        if first is None:
            return None
        firsts.add(first.group(0))
        if first.end() == len(word):  # a one-word keyword: the text's word may carry the plural ending
            firsts.update((word + "s", word + "es"))
    return frozenset(firsts)


def _matches_from(pattern: re.Pattern[str], text: str, present: set[str], places: dict[str, list[int]]) -> set[str]:
    """What `pattern.finditer(text)` would find, trying only where a first word of a keyword occurs.

    A place inside a longer word fails the pattern's own leading \\b, so a superset of places is safe.
    """
    for word in present:
        if word not in places:
            found, at = [], text.find(word)
            while at >= 0:
                found.append(at)
                at = text.find(word, at + 1)
            places[word] = found
    candidates = sorted({at for word in present for at in places[word]})
    found_text, done = set(), 0
    for at in candidates:
        if at < done:  # inside the previous match: finditer does not overlap matches
            continue
        m = pattern.match(text, at)
        if m is not None:
            found_text.add(m.group(0))
            done = m.end()
    return found_text


def lexical_score(hits: int, scale: float) -> float:
    return 1.0 - math.exp(-hits / scale) if hits > 0 else 0.0
