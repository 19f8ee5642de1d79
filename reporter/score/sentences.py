"""Records -> scored text units (sentences) with their kind and position.

The model reads at most `max_tokens` word pieces, so every unit is split until it
fits: abstracts by sentence (pysbd), and any sentence still too long into word
windows. Nothing is silently truncated.
"""

from __future__ import annotations

from dataclasses import dataclass
import re
from typing import Callable, Iterable, Sequence

import pysbd
from pysbd.lang.english import English

# Units shorter than this carry no goal signal of their own ("Methods:", "2.").
_MIN_CHARS = 12
# Word pieces a backend may add around a text when it counts tokens (the NLI hypothesis: 16).
_TOKEN_MARGIN = 16
# Publisher and licence lines that exports append to abstracts; they say nothing about the research.
_BOILERPLATE = re.compile(
    r"(©|\(c\)\s*\d{4}|\bcopyright\b|all rights reserved|published by\b|this is an open access article"
    r"|creative commons|\bCC[ -]BY\b|this article is protected by)",
    re.IGNORECASE,
)
# One of these is in the case-folded text wherever the pattern above matches: a text with none is
# passed without running the (slow, case-blind) pattern on each of its sentences.
_BOILERPLATE_MARKS = ("©", "(c)", "copyright", "all rights reserved", "published by", "open access article",
                      "creative commons", "cc by", "cc-by", "protected by")


@dataclass(frozen=True)
class TextUnit:
    record_id: str
    kind: str  # "title" | "abstract" | "keywords"
    position: int  # order within the record
    text: str


# Plain prose: every ".", "!" or "?" either ends the text, sits inside a number (3.5), or ends a
# lowercase word or a number and is followed by one space and a capitalised word. pysbd splits
# such text exactly at those boundaries (tests check this against pysbd itself), so the fast path
# below gives its answer in a fraction of its time; anything else (abbreviations, initials,
# ellipses, quotes or brackets at a boundary, URLs) goes to pysbd.
_TERMINAL = re.compile(r"[.!?]")
_PLAIN_BOUNDARY = re.compile(r"(?<=[a-z])[.!?] (?=[A-Z])")
_DECIMAL_POINT = re.compile(r"(?<=[0-9])\.(?=[0-9])")
_WORD_BEFORE = re.compile(r"([A-Za-z]+)$")
_ABBREVIATIONS = frozenset(
    a.lower() for a in (*English.Abbreviation.ABBREVIATIONS, *English.Abbreviation.PREPOSITIVE_ABBREVIATIONS,
                        *English.Abbreviation.NUMBER_ABBREVIATIONS)
)


def _plain_split(text: str) -> list[str] | None:
    """The sentences of plain prose (see above), or None when the text needs pysbd's rules."""
    boundaries = [m.start() for m in _PLAIN_BOUNDARY.finditer(text)]
    n_terminals = len(_TERMINAL.findall(text))
    n_decimals = len(_DECIMAL_POINT.findall(text))
    ends_with_terminal = text[-1] in ".!?"
    if n_terminals != len(boundaries) + n_decimals + ends_with_terminal:
        return None
    if ends_with_terminal and len(text) > 1 and not text[-2].isalnum():
        return None
    sentences, start = [], 0
    for at in boundaries:
        word = _WORD_BEFORE.search(text, start, at)
        if word is not None and (len(word.group(1)) < 2 or word.group(1).lower() in _ABBREVIATIONS):
            return None
        sentences.append(text[start : at + 1])
        start = at + 2
    sentences.append(text[start:])
    return sentences


class SentenceSplitter:
    """Splits text into sentences; built once per run (pysbd compiles its rules on creation)."""

    def __init__(self) -> None:
        self._segmenter = pysbd.Segmenter(language="en", clean=False)
        # Names the rules in use: splits stored under another name (another pysbd) are not reused.
        self.name = f"pysbd-{pysbd.__version__}:en"

    def split(self, text: str) -> list[str]:
        text = " ".join(text.split())
        if not text:
            return []
        plain = _plain_split(text)
        if plain is not None:
            return plain
        return self.split_by_rules(text)

    def split_by_rules(self, text: str) -> list[str]:
        """pysbd's answer, for any text (whitespace already collapsed).

        pysbd's `segment` maps each sentence back onto the text with a regular expression built
        from that sentence (compiled anew every time: half its run time, measured); `_in_text`
        does the same mapping with str.find. Tests check the result against `segment` itself.
        """
        sentences = self._segmenter.processor(text).process()
        if not all(sentences):  # an empty sentence would need the regex's zero-width behaviour
            return [s.strip() for s in self._segmenter.segment(text) if s.strip()]
        return [s.strip() for s in _in_text(sentences, text) if s.strip()]


def _in_text(sentences: list[str], text: str) -> list[str]:
    """pysbd's `sentences_with_char_spans` for non-empty sentences: each sentence with the whitespace
    after it, at its first occurrence in the text that ends beyond the previous one's; a sentence
    not found there is dropped."""
    out, prior_end = [], 0
    for sentence in sentences:
        at = text.find(sentence)
        while at >= 0:
            end = at + len(sentence)
            while end < len(text) and text[end].isspace():
                end += 1
            if end > prior_end:
                out.append(text[at:end])
                prior_end = end
                break
            at = text.find(sentence, end)  # the regex scan resumes after the match it passed over
    return out


class KnownSplits:
    """A splitter that answers from splits found beforehand (the cache) and keeps what it had to split."""

    def __init__(self, splitter: SentenceSplitter, known: dict[str, list[str]]):
        self.name = splitter.name
        self._splitter, self._known = splitter, known
        self.new: dict[str, list[str]] = {}  # text -> sentences split here, for the caller to store

    def split(self, text: str) -> list[str]:
        found = self._known.get(text)
        if found is None:
            found = self._known[text] = self.new[text] = self._splitter.split(text)
        return list(found)


def record_units(
    record_id: str,
    fields: dict[str, object],
    text_fields: Sequence[str],
    splitter: SentenceSplitter | KnownSplits,
) -> list[TextUnit]:
    """The text units of one record, in reading order: title, abstract sentences, keywords."""
    pieces: list[tuple[str, str]] = []
    if "title" in text_fields and fields.get("title"):
        pieces.append(("title", " ".join(str(fields["title"]).split())))
    if "abstract" in text_fields and fields.get("abstract"):
        abstract = str(fields["abstract"])
        sentences = splitter.split(abstract)
        folded = " ".join(abstract.split()).casefold()
        if any(mark in folded for mark in _BOILERPLATE_MARKS):
            sentences = [s for s in sentences if not _BOILERPLATE.search(s)]
        pieces.extend(("abstract", s) for s in sentences)
    keywords = fields.get("keywords") or ()
    if "keywords" in text_fields and keywords:
        pieces.append(("keywords", "Keywords: " + "; ".join(str(k) for k in keywords)))
    units = [
        TextUnit(record_id, kind, i, text)
        for i, (kind, text) in enumerate(p for p in pieces if len(p[1]) >= _MIN_CHARS)
    ]
    return units


def fit_to_model(
    units: Iterable[TextUnit], max_tokens: int, count_tokens: Callable[[list[str]], list[int]]
) -> list[TextUnit]:
    """Split units longer than the model's input into word windows that fit."""
    units = list(units)
    # A word piece covers at least one character, so a text no longer than the budget (less the
    # room a backend adds for its own markers) fits without tokenising it; only longer ones are counted.
    long = [i for i, u in enumerate(units) if len(u.text) + _TOKEN_MARGIN > max_tokens]
    counted = count_tokens([units[i].text for i in long]) if long else []
    lengths = [0] * len(units)
    for i, n in zip(long, counted):
        lengths[i] = n
    out: list[TextUnit] = []
    for unit, n_tokens in zip(units, lengths):
        if n_tokens <= max_tokens:
            out.append(unit)
            continue
        words = unit.text.split()
        # Word pieces per word vary; size windows from this unit's own ratio, with a margin.
        per_window = max(8, int(len(words) * max_tokens / n_tokens * 0.9))
        for start in range(0, len(words), per_window):
            out.append(TextUnit(unit.record_id, unit.kind, unit.position, " ".join(words[start : start + per_window])))
    return out
