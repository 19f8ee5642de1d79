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


@dataclass(frozen=True)
class KeywordMatcher:
    goal_codes: tuple[str, ...]
    patterns: tuple[re.Pattern[str] | None, ...]

    @classmethod
    def build(cls, goal_codes: Sequence[str], keywords: Sequence[Sequence[str]]) -> "KeywordMatcher":
        patterns = []
        for words in keywords:
            words = sorted({w.strip().lower() for w in words if w.strip()}, key=len, reverse=True)
            if not words:
                patterns.append(None)
                continue
            # Word boundaries so "aid" does not fire inside "said"; optional plural "s"/"es".
            alternation = "|".join(re.escape(w) for w in words)
            # Matched against lower-cased text: twice as fast as IGNORECASE on these long alternations.
            patterns.append(re.compile(rf"\b(?:{alternation})(?:e?s)?\b"))
        return cls(tuple(goal_codes), tuple(patterns))

    def hits(self, text: str) -> list[int]:
        """Distinct keywords of each goal found in `text`."""
        lowered = text.lower()
        return [len({m.group(0) for m in p.finditer(lowered)}) if p else 0 for p in self.patterns]


def lexical_score(hits: int, scale: float) -> float:
    return 1.0 - math.exp(-hits / scale) if hits > 0 else 0.0
