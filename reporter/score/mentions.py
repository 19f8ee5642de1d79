"""Explicit goal mentions in a text: "SDG 6", "SDGs 3, 4 and 5", "SDG target 6.1", "sixth Sustainable
Development Goal", goal titles in goal context, plus general mentions ("the SDGs") that name no goal.

Number patterns speak the SDG vocabulary and apply only to goals that carry a number; titles apply
to every goal. Patterns are compiled once per framework (`compile_mentions`) and passed in.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from types import MappingProxyType
from typing import Mapping

from reporter.score.framework import GoalFramework

CONTEXT_CHARS = 150  # how far "Goal 6" or a goal title may sit from SDG wording; common practice

_ORDINALS = (
    "first second third fourth fifth sixth seventh eighth ninth tenth eleventh twelfth thirteenth "
    "fourteenth fifteenth sixteenth seventeenth"
).split()

# One goal number, optionally a target ("6.1", "6.a"). The guard rejects longer numbers ("SDG 180"),
# deeper numbering ("6.1.2" stays 6.1, "6.123" is no target), letters glued on ("SDG 3rd") and
# gene-allele suffixes such as "sdg8-1".
_ITEM = r"\d{1,2}(?:\.(?:\d{1,2}|[a-c]))?(?!\d|\.\d{3}|\.[a-c]\w|[a-z_]|-\d)"
_TARGET_ITEM = r"\d{1,2}\.(?:\d{1,2}|[a-c])(?!\d|[a-z_]|-\d)"
_LIST_SEP = r"(?:\s*,\s*(?:and\s+|or\s+|&\s*)?|\s+(?:and|or)\s+|\s*[&/]\s*)"
_NUM_SEP = r"(?:\s*[-_\u2010\u2013]\s*|\s*#\s*|\s+(?:no\.|nr\.|number)\s*|\s*)"
_SDG = r"SDG(?P<plural>s)?"
_SDG_WORD = r"\bSDGs?(?![a-z&]|-[a-z])"  # "SDG-based" and "SDG&E" are other things
_SUST = r"\bSustainable\s+Development\s+Goal"


def _numbered(prefix: str, item: str = _ITEM) -> re.Pattern[str]:
    return re.compile(rf"{prefix}{_NUM_SEP}(?P<items>{item}(?:{_LIST_SEP}{item})*)", re.IGNORECASE)


# (form, pattern, needs SDG context nearby). A list ("SDGs 6 and 7") counts only after a plural
# prefix, so "SDG 6 and 12 villages" is goal 6 alone.
_NUMBER_PATTERNS = (
    ("sdg_number", _numbered(rf"\b{_SDG}(?:\s+(?P<goalword>Goals?))?(?:\s+(?P<targets>targets?))?"), False),
    ("sdg_number", _numbered(rf"{_SUST}(?P<plural>s)?(?:\s*\(\s*SDGs?\s*\))?(?:\s+(?P<targets>targets?))?"), False),
    ("goal_number", _numbered(r"\bGoal(?P<plural>s)?"), True),
    ("target_number", _numbered(r"\bTarget(?P<plural>s)?", _TARGET_ITEM), True),
)
_ORDINAL = re.compile(
    rf"\b(?:(?P<word>{'|'.join(_ORDINALS)})|(?P<digits>\d{{1,2}})(?:st|nd|rd|th))\s+"
    rf"(?:(?:UN|United\s+Nations)\s+)?(?:Sustainable\s+Development\s+Goal|SDG)(?![\w&-])",
    re.IGNORECASE,
)
# "Global Goals" must be capitalised: "global goals for emissions" is ordinary prose.
_GENERAL = re.compile(
    rf"(?i:{_SUST}s?(?:\s*\(\s*SDGs?\s*\))?|\bSDGs\b|\b(?:the\s+)?2030\s+Agenda(?:\s+for\s+Sustainable\s+Development)?\b"
    r"|\bAgenda\s+2030\b)|\bGlobal\s+Goals\b"
)
_SDG_CONTEXT = rf"{_SDG_WORD}|\bSustainable\s+Development\b|\b2030\s+Agenda\b|\bAgenda\s+2030\b|\bGlobal\s+Goals\b"
_QUOTES_OPEN, _QUOTES_CLOSE = "\"'\u201c\u2018\u00ab", "\"'\u201d\u2019\u00bb"
_SMALL_WORDS = {"and", "&", "of", "on", "the", "for", "in", "to", "a", "an"}
# What may separate a number from its title or ordinal in one mention: "SDG 13 (Climate Action)".
_JOIN_GAP = re.compile(r"[\s()\[\]:;,\-\u2013\u2014\"'\u201c\u201d]{0,4}")
_FORM_RANK = ("sdg_number", "sdg_target", "ordinal", "goal_number", "target_number", "title")


@dataclass(frozen=True)
class Mention:
    goal: str  # goal code
    start: int
    end: int
    matched_text: str
    form: str  # one of _FORM_RANK


@dataclass(frozen=True)
class MentionResult:
    by_goal: Mapping[str, tuple[Mention, ...]]  # goals mentioned at least once, in framework order
    n_general: int  # mentions of the SDGs as a whole that name no goal

    def count(self, code: str) -> int:
        return len(self.by_goal.get(code, ()))

    @property
    def mentioned_goals(self) -> tuple[str, ...]:
        return tuple(self.by_goal)


@dataclass(frozen=True)
class MentionPatterns:
    """Everything `find_mentions` needs, compiled from one framework."""

    framework_id: str
    goal_codes: tuple[str, ...]
    by_number: Mapping[int, str]  # goal number -> code
    titles: tuple[tuple[str, re.Pattern[str]], ...]  # (code, pattern over all title forms)
    number_context: re.Pattern[str]
    title_context: re.Pattern[str]
    # Every pattern above needs one of these in the text (case-folded): most texts have none and
    # skip the patterns. "develop" stands for "Sustainable Development", "goal" for "Global Goals".
    needles: tuple[str, ...] = ("sdg", "goal", "agenda", "develop")


def compile_mentions(framework: GoalFramework) -> MentionPatterns:
    """Build the patterns for one framework; reuse the result for every text."""
    extra = "".join(rf"|\b{re.escape(term)}\b" for term in framework.context_terms)
    titles = []
    for goal in framework.goals:
        forms = sorted({goal.short_title, *goal.mention_titles}, key=len, reverse=True)
        titles.append((goal.code, re.compile("|".join(_title_regex(f) for f in forms), re.IGNORECASE)))
    return MentionPatterns(
        framework_id=framework.id,
        goal_codes=framework.goal_codes,
        by_number=MappingProxyType({g.number: g.code for g in framework.goals if g.number is not None}),
        titles=tuple(titles),
        number_context=re.compile(_SDG_CONTEXT + extra, re.IGNORECASE),
        # A capitalised "Goal" also puts a title in context ("the Goal on Climate Action").
        title_context=re.compile(rf"(?i:{_SDG_CONTEXT}{extra})|\bGoals?\b"),
        needles=("sdg", "goal", "agenda", "develop", *(_fold(term) for term in framework.context_terms)),
    )


def find_mentions(text: str, framework: GoalFramework | MentionPatterns) -> MentionResult:
    """Find explicit mentions of the framework's goals; pass `compile_mentions(framework)` when scoring many texts."""
    if not isinstance(text, str):
        raise TypeError(f"find_mentions: expected text as str, got {type(text).__name__}")
    patterns = compile_mentions(framework) if isinstance(framework, GoalFramework) else framework
    folded = _fold(text)
    if not any(needle in folded for needle in patterns.needles):
        return MentionResult(by_goal=MappingProxyType({}), n_general=0)
    found = _number_mentions(text, patterns) + _ordinal_mentions(text, patterns) + _title_mentions(text, patterns)
    spans = [(m.start, m.end) for m in found]
    n_general = sum(
        1
        for match in _GENERAL.finditer(text)
        if not any(start < match.end() and match.start() < end for start, end in spans)
    )
    merged = _merge(text, found)
    by_goal = {code: tuple(m for m in merged if m.goal == code) for code in patterns.goal_codes}
    by_goal = {code: hits for code, hits in by_goal.items() if hits}
    return MentionResult(by_goal=MappingProxyType(by_goal), n_general=n_general)


def _number_mentions(text: str, patterns: MentionPatterns) -> list[Mention]:
    out = []
    for form, pattern, needs_context in _NUMBER_PATTERNS:
        for match in pattern.finditer(text):
            if needs_context and not _near(text, match.start(), match.end(), patterns.number_context):
                continue
            groups = match.groupdict()
            words = (groups.get("goalword") or "", groups.get("targets") or "")
            items = list(re.finditer(_ITEM, match.group("items")))
            if not groups["plural"] and not any(w.lower().endswith("s") for w in words):
                items = items[:1]
            end = match.start("items") + items[-1].end()
            for item in items:
                number, _, target = item.group().partition(".")
                code = patterns.by_number.get(int(number))
                if code is None:
                    continue
                kind = "sdg_target" if form == "sdg_number" and (target or words[1]) else form
                out.append(Mention(code, match.start(), end, text[match.start():end], kind))
    return out


def _ordinal_mentions(text: str, patterns: MentionPatterns) -> list[Mention]:
    out = []
    for match in _ORDINAL.finditer(text):
        word = match.group("word")
        number = _ORDINALS.index(word.lower()) + 1 if word else int(match.group("digits"))
        code = patterns.by_number.get(number)
        if code is not None:
            out.append(Mention(code, match.start(), match.end(), match.group(), "ordinal"))
    return out


def _title_mentions(text: str, patterns: MentionPatterns) -> list[Mention]:
    out = []
    for code, pattern in patterns.titles:
        for match in pattern.finditer(text):
            start, end = match.span()
            quoted = start > 0 and text[start - 1] in _QUOTES_OPEN and end < len(text) and text[end] in _QUOTES_CLOSE
            if not (quoted or _is_capitalised(match.group())):
                continue
            if _near(text, start, end, patterns.title_context):
                out.append(Mention(code, start, end, match.group(), "title"))
    return out


def _merge(text: str, found: list[Mention]) -> list[Mention]:
    """Overlapping hits of a goal are one mention; so are adjacent hits of different forms, as a number
    and its title in "SDG 13 (Climate Action)". Adjacent hits of one form ("SDG6, SDG-6") stay apart."""
    merged: list[Mention] = []
    for mention in sorted(found, key=lambda m: (m.goal, m.start, -m.end)):
        last = merged[-1] if merged and merged[-1].goal == mention.goal else None
        touching = last is not None and (
            mention.start < last.end
            or (mention.form != last.form and _JOIN_GAP.fullmatch(text[last.end:mention.start]))
        )
        if not touching:
            merged.append(mention)
            continue
        end = max(last.end, mention.end)
        if text.count("(", last.start, end) > text.count(")", last.start, end) and text[end:end + 1] == ")":
            end += 1  # close the bracket the join opened
        form = min(last.form, mention.form, key=_FORM_RANK.index)
        merged[-1] = Mention(last.goal, last.start, end, text[last.start:end], form)
    return sorted(merged, key=lambda m: (m.start, m.goal))


def _fold(text: str) -> str:
    # casefold() covers what IGNORECASE matches ("ſ" for "s", the Kelvin sign for "k") except the
    # dotless "ı", which the regex engine also takes for "i".
    return text.casefold().replace("\u0131", "i")


def _near(text: str, start: int, end: int, context: re.Pattern[str]) -> bool:
    before = text[max(0, start - CONTEXT_CHARS):start]
    after = text[end:end + CONTEXT_CHARS]
    return bool(context.search(before) or context.search(after))


def _title_regex(title: str) -> str:
    """A title with flexible spacing, "and" or "&", and hyphen variants ("Well-being", "Wellbeing")."""
    words = []
    for word in title.split():
        word = word.rstrip(",")
        if word.lower() in ("and", "&"):
            words.append(r"(?:and|&)")
            continue
        # Commas are optional after any word: "Industry, Innovation, and Infrastructure".
        parts = [re.escape(part) for part in re.split(r"[-\u2010]", word)]
        words.append(r"[-\u2010\s]?".join(parts) + ",?")
    return r"\b" + r"\s+".join(words) + r"\b"


def _is_capitalised(phrase: str) -> bool:
    words = [w for w in re.split(r"\s+", phrase) if w.lower().strip(",") not in _SMALL_WORDS]
    return all(w[0].isupper() for w in words)
