"""The record noun in the written report: "publications" becomes the user's word ("awards", "projects").

Templates, chart labels and method sentences all say "publication"; one pass over the finished HTML
puts the configured noun into what a reader sees (text, alt and label attributes), leaving ids,
classes, links, scripts and styles alone, so themes need no noun logic of their own.
"""

from __future__ import annotations

import re

_WORD = re.compile(r"\b(?:(an?|An?) )?(publication|Publication|PUBLICATION)([sS]?)\b")
#: Skipped whole: what a browser runs or styles is not read.
_SKIP = re.compile(r"(<script\b.*?</script>|<style\b.*?</style>)", re.S | re.I)
_TAG = re.compile(r"<[^>]*>")
_READ_ATTRIBUTES = re.compile(r'\b(alt|aria-label|title|placeholder|data-noun)="([^"]*)"')


def noun_in_text(text: str, singular: str, plural: str) -> str:
    """Every "publication(s)" in plain text as the configured noun, with "a"/"an" to match."""
    if (singular, plural) == ("publication", "publications"):
        return text

    def swap(match: re.Match) -> str:
        article, word, many = match.group(1), match.group(2), match.group(3)
        noun = plural if many else singular
        if word.isupper():
            noun = noun.upper()
        elif word[0].isupper():
            noun = noun[0].upper() + noun[1:]
        if article:
            an = noun[0].lower() in "aeiou"
            article = ("An" if an else "A") if article[0] == "A" else ("an" if an else "a")
            return f"{article} {noun}"
        return noun

    return _WORD.sub(swap, text)


def noun_in_html(html: str, singular: str, plural: str) -> str:
    """`noun_in_text` over the text and the read attributes of an HTML page (inline SVG included)."""
    if (singular, plural) == ("publication", "publications"):
        return html
    parts = _SKIP.split(html)
    for i in range(0, len(parts), 2):  # odd parts are scripts and styles
        parts[i] = _in_markup(parts[i], singular, plural)
    return "".join(parts)


def _in_markup(markup: str, singular: str, plural: str) -> str:
    out, end = [], 0
    for tag in _TAG.finditer(markup):
        out.append(noun_in_text(markup[end:tag.start()], singular, plural))
        out.append(_READ_ATTRIBUTES.sub(
            lambda m: f'{m.group(1)}="{noun_in_text(m.group(2), singular, plural)}"', tag.group(0)))
        end = tag.end()
    out.append(noun_in_text(markup[end:], singular, plural))
    return "".join(out)


def report_nouns(report) -> tuple[str, str]:
    """(singular, plural) of what a record is called; a report config without the key means publications."""
    nouns = getattr(report, "nouns", None)
    return (nouns.singular, nouns.plural) if nouns is not None else ("publication", "publications")
