"""Small bibtexparser v2 middlewares for what its own stack leaves undone.

- `ConcatenateStrings`: `jn # " (B)"` concatenation, which ResolveStringReferencesMiddleware
  (bibtexparser 2.x) leaves untouched; it only replaces values that are a single @string name.
- `EscapePercent`: a bare "%" in a field value is a percent sign in exports, but the LaTeX
  decoder reads it as the start of a comment and drops the rest of the value.
- `SplitNamesLeniently`: bibtexparser's BibTeX name splitting without its strict mode, so one
  malformed name (too many commas, a stray brace) does not fail the whole entry.
- `DecodeLatex`: LatexDecodingMiddleware that also decodes a list of split names; the library
  (2.1) decodes a single NameParts value but passes a list of them through undecoded. Values
  decoded by an earlier build are read back when a memo is active (latex_memo.py).
"""

from __future__ import annotations

import re

from bibtexparser.library import Library
from bibtexparser.exceptions import PartialMiddlewareException
from bibtexparser.middlewares import LatexDecodingMiddleware, LibraryMiddleware, SplitNameParts
from bibtexparser.middlewares.middleware import BlockMiddleware
from bibtexparser.middlewares.names import NameParts, parse_single_name_into_parts
from bibtexparser.model import Block, Entry, MiddlewareErrorBlock

from reporter.ingest.latex_memo import active_memo

_BARE_PERCENT = re.compile(r"(?<!\\)%")
# A value with none of these decodes to itself (tests/unit/ingest/test_hostile_inputs.py checks
# it against the library's decoder); skipping the LaTeX walker for such values makes reading a
# large export about five times faster.
_LATEX_MARKUP = re.compile(r"[\\{}$&#^_~%]|--|``|''|[!?]`|<<|>>")


def split_concatenation(value: str) -> list[str]:
    """Split a raw BibTeX value on `#` outside braces and quotes; one part means no concatenation."""
    parts: list[str] = []
    depth, in_quotes, start = 0, False, 0
    for index, char in enumerate(value):
        if char == "{":
            depth += 1
        elif char == "}":
            depth = max(depth - 1, 0)
        elif char == '"' and depth == 0:
            in_quotes = not in_quotes
        elif char == "#" and depth == 0 and not in_quotes:
            parts.append(value[start:index].strip())
            start = index + 1
    parts.append(value[start:].strip())
    return parts


def _part_text(part: str, macros: dict[str, str]) -> str:
    if len(part) >= 2 and ((part[0], part[-1]) in (("{", "}"), ('"', '"'))):
        return part[1:-1]
    # An undefined name stays as written: BibTeX warns and uses nothing, but losing text is worse.
    return macros.get(part.lower(), part)


class ConcatenateStrings(LibraryMiddleware):
    """Expand `#` concatenations in @string definitions (in file order) and in entry fields."""

    @classmethod
    def metadata_key(cls) -> str:
        return "waymark_concatenate_strings"

    def transform(self, library: Library) -> Library:
        macros: dict[str, str] = {}
        for string in library.strings:
            if not isinstance(string.value, str):
                continue
            text = "".join(_part_text(p, macros) for p in split_concatenation(string.value))
            macros[string.key.lower()] = text
            string.value = "{" + text + "}"
        for entry in library.entries:
            for field in entry.fields:
                if isinstance(field.value, str):
                    parts = split_concatenation(field.value)
                    if len(parts) > 1:
                        field.value = "{" + "".join(_part_text(p, macros) for p in parts) + "}"
        return library


class EscapePercent(BlockMiddleware):
    """Escape bare "%" so LaTeX decoding keeps it as a character."""

    def __init__(self) -> None:
        super().__init__(allow_inplace_modification=True, allow_parallel_execution=True)

    def transform_entry(self, entry: Entry, library: Library) -> Entry:
        for field in entry.fields:
            if isinstance(field.value, str) and "%" in field.value:
                enclosing = field.enclosing  # the value setter resets it
                field.value = _BARE_PERCENT.sub(r"\\%", field.value)
                field.enclosing = enclosing
        return entry


class SplitNamesLeniently(SplitNameParts):
    """First/von/Last/Jr splitting by the BibTeX rules, non-strict."""

    def _transform_field_value(self, name: list[str]) -> list[NameParts]:
        if not isinstance(name, list):
            name = [str(name)]
        return [parse_single_name_into_parts(n, strict=False) for n in name]


class DecodeLatex(LatexDecodingMiddleware):
    """LaTeX -> Unicode for every value, split names included."""

    def _transform_python_value_string(self, python_string: str) -> tuple[str, str]:
        if not _LATEX_MARKUP.search(python_string):
            return python_string, ""
        memo = active_memo()
        if memo is None:
            return super()._transform_python_value_string(python_string)
        # A rebuild finds what the library decoded before (latex_memo.py).
        return memo.decoded(python_string, super()._transform_python_value_string)

    def transform_entry(self, entry: Entry, library: Library) -> Block:
        errors: list[str] = []
        for field in entry.fields:
            if isinstance(field.value, list) and all(isinstance(v, NameParts) for v in field.value):
                for parts in field.value:
                    parts.first = self._transform_all_strings(parts.first, errors)
                    parts.von = self._transform_all_strings(parts.von, errors)
                    parts.last = self._transform_all_strings(parts.last, errors)
                    parts.jr = self._transform_all_strings(parts.jr, errors)
        decoded = super().transform_entry(entry, library)
        errors = [e for e in errors if e]
        if errors and not isinstance(decoded, MiddlewareErrorBlock):
            return MiddlewareErrorBlock(block=entry, error=PartialMiddlewareException(errors))
        return decoded
