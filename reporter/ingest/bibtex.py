"""BibTeX file -> ReadResult, with bibtexparser v2 doing the parsing and LaTeX decoding.

The file is split first without any middleware, so failed blocks can be salvaged (duplicate
keys, duplicate fields) or rejected with their line before the decoding stack runs.
"""

from __future__ import annotations

import re
from pathlib import Path

import bibtexparser
from bibtexparser.exceptions import ParsingException
from bibtexparser.library import Library
from bibtexparser.middlewares import (
    MergeNameParts,
    NormalizeFieldKeys,
    RemoveEnclosingMiddleware,
    ResolveStringReferencesMiddleware,
    SeparateCoAuthors,
)
from bibtexparser.middlewares.names import NameParts
from bibtexparser.model import (
    Block,
    DuplicateBlockKeyBlock,
    DuplicateFieldKeyBlock,
    Entry,
    ImplicitComment,
    ParsingFailedBlock,
    String,
)

from reporter.config import InputConfig
from reporter.ingest.bibtex_steps import ConcatenateStrings, DecodeLatex, EscapePercent, SplitNamesLeniently
from reporter.ingest.entry import find_orcids, make_entry, split_keywords, split_list
from reporter.ingest.text import decode_bytes
from reporter.records import RawEntry, ReadResult, Rejected

FORMAT = "bibtex"
_NAMES = ("author",)
# First field present wins. "address" is not an affiliation: BibTeX defines it as the
# publisher's address (Patashnik 1988); exports put author affiliations in custom fields.
_VENUE_FIELDS = ("journal", "journaltitle", "booktitle")
_KEYWORD_FIELDS = ("keywords", "keyword", "author_keywords", "author-keywords")
_AFFILIATION_FIELDS = ("affiliation", "affiliations", "author-address", "authoraddress", "addresses")
_DEPARTMENT_FIELDS = ("department", "departments")
_ORCID_FIELDS = ("orcid", "orcids", "orcid-numbers", "orcid-ids")
_YEAR_FIELDS = ("year", "date")
_LANGUAGE_FIELDS = ("language", "langid")
# Identifiers are read verbatim: LaTeX decoding would turn "~" into a space in URLs.
_VERBATIM_FIELDS = ("doi", "url")
_LATEX_ESCAPES = re.compile(r"\\([_%&#~$])")
_KEY_IN_RAW = re.compile(r"@\s*\w+\s*[{(]\s*([^,\s{}()]+)\s*,")
# Text between entries is a comment, but "name = {" there means an entry was closed too early.
_STRAY_FIELD = re.compile(r"(?:^|[,\n])\s*[A-Za-z][\w-]*\s*=\s*[{\"\d]")


def read_bibtex(path: Path, source_name: str, cfg: InputConfig, max_field_length: int) -> ReadResult:
    """Read one BibTeX file; @comment, @preamble and @string blocks are not records."""
    decoded = decode_bytes(path.read_bytes(), cfg.encoding)
    warnings = list(decoded.warnings)
    try:
        split = bibtexparser.parse_string(decoded.text, parse_stack=[])
    except ParsingException as exc:  # the splitter's own "invalid state" errors
        warnings.append(f"BibTeX parser stopped: {type(exc).__name__}; nothing read")
        return ReadResult(source_name, FORMAT, (), (), tuple(warnings))
    blocks, rejected, notes = _salvage(split.blocks, source_name, decoded.text, warnings)
    verbatim = {
        b.key: {f.key.lower(): _verbatim(f.value) for f in b.fields if f.key.lower() in _VERBATIM_FIELDS}
        for b in blocks
        if isinstance(b, Entry)
    }
    library = Library(blocks, fail_on_duplicate_key=False)
    for middleware in _decoding_stack():
        library = middleware.transform(library=library)

    decoded_entries = [(e, extra) for e, extra in map(_decoded_entry, library.blocks) if e is not None]
    # Crossref keys are case-insensitive in BibTeX; the first entry of a key is the parent.
    parents: dict[str, Entry] = {}
    for entry, _ in decoded_entries:
        parents.setdefault((entry.key or "").lower(), entry)
    entries: list[RawEntry] = []
    for entry, extra in decoded_entries:
        line = (entry.start_line or 0) + 1
        values, crossref_notes = _inherit(_values(entry, verbatim.get(entry.key, {})), entry, parents)
        native_id = entry.key or f"line{line}"
        entry_notes = (*notes.get(entry.key, ()), *extra, *crossref_notes)
        entries.append(make_entry(source_name, line, FORMAT, native_id, values, max_field_length, entry_notes))
    return ReadResult(source_name, FORMAT, tuple(entries), tuple(rejected), tuple(warnings))


def _decoding_stack() -> list:
    # Order matters: strings before enclosing removal (the library requires it); names are
    # split before LaTeX decoding, because braces protect "{Water Lab}" from being split.
    return [
        NormalizeFieldKeys(),
        ConcatenateStrings(),
        ResolveStringReferencesMiddleware(),
        RemoveEnclosingMiddleware(),
        EscapePercent(),
        SeparateCoAuthors(name_fields=_NAMES),
        SplitNamesLeniently(name_fields=_NAMES),
        DecodeLatex(),
        MergeNameParts(style="last", name_fields=_NAMES),
    ]


def _salvage(
    blocks: list[Block], source_name: str, text: str, warnings: list[str]
) -> tuple[list[Block], list[Rejected], dict[str, tuple[str, ...]]]:
    """Keep what can be kept from failed blocks; the rest becomes Rejected with its line."""
    kept: list[Block] = []
    rejected: list[Rejected] = []
    notes: dict[str, tuple[str, ...]] = {}
    taken = {entry.key for entry in map(_entry_of, blocks) if entry is not None}
    seen: set[str] = set()
    previous: str | None = None  # key of the last entry, to name it when its fields spill over
    for block in blocks:
        line = (block.start_line or 0) + 1
        entry = _entry_of(block)
        if entry is None:
            if isinstance(block, DuplicateBlockKeyBlock) and isinstance(block.ignore_error_block, String):
                warnings.append(f"line {line}: @string {block.key} is defined again; the first definition is used")
            elif isinstance(block, ParsingFailedBlock):
                rejected.append(Rejected(source_name, line, _key_of(block.raw), _failure(block, line, text)))
            else:
                if isinstance(block, ImplicitComment) and previous is not None and _STRAY_FIELD.search(block.raw or ""):
                    warnings.append(
                        f"line {line}: text after entry {previous} looks like more of its fields "
                        "(a closing brace too many?); it was ignored"
                    )
                kept.append(block)  # strings, comments, preambles: needed by or ignored in decoding
            continue
        previous = entry.key
        entry_notes: list[str] = []
        if isinstance(block, DuplicateFieldKeyBlock):
            # BibTeX itself keeps the first value of a repeated field and ignores the rest.
            first: dict[str, object] = {}
            for field in entry.fields:
                first.setdefault(field.key, field)
            entry.fields = list(first.values())  # type: ignore[arg-type]
            entry_notes.append("repeated_field:" + ",".join(sorted(block.duplicate_keys)))
        if entry.key and entry.key in seen:
            # Both entries stay: they may be different works that share a key by mistake;
            # enrich's duplicate detection merges them if they are the same work.
            _add_note(notes, entry.key, "duplicate_key")
            entry.key = _free_key(entry.key, taken)
            entry_notes.append("duplicate_key")
        for note in entry_notes:
            _add_note(notes, entry.key, note)
        seen.add(entry.key)
        kept.append(entry)
    return kept, rejected, notes


def _entry_of(block: Block) -> Entry | None:
    """The entry in a block: itself, or the one behind a duplicate key or repeated field."""
    if isinstance(block, Entry):
        return block
    if isinstance(block, (DuplicateBlockKeyBlock, DuplicateFieldKeyBlock)):
        inner = block.ignore_error_block
        return inner if isinstance(inner, Entry) else None
    return None


def _failure(block: ParsingFailedBlock, line: int, text: str) -> str:
    error = block.error
    why = getattr(error, "abort_reason", None) or str(error) or type(error).__name__
    end_index = getattr(error, "end_index", None)
    where = ""
    if isinstance(end_index, int):
        # end_index is where the splitter gave up, e.g. at the "@" of the next block.
        end_line = text.count("\n", 0, max(end_index, 0)) + 1
        if end_line > line:
            where = f" (noticed at line {end_line})"
    return f"unparseable entry at line {line}: {' '.join(why.split())}{where}"


def _add_note(notes: dict[str, tuple[str, ...]], key: str, note: str) -> None:
    if note not in notes.get(key, ()):
        notes[key] = (*notes.get(key, ()), note)


def _free_key(key: str, taken: set[str]) -> str:
    number = 2
    while f"{key}~{number}" in taken:
        number += 1
    taken.add(f"{key}~{number}")
    return f"{key}~{number}"


def _key_of(raw: str | None) -> str | None:
    match = _KEY_IN_RAW.match(raw or "")
    return match.group(1) if match else None


def _decoded_entry(block: Block) -> tuple[Entry | None, tuple[str, ...]]:
    if isinstance(block, Entry):
        return block, ()
    if isinstance(block, ParsingFailedBlock) and isinstance(block.ignore_error_block, Entry):
        # A middleware (LaTeX decoding) failed on some value: keep the entry as far as decoded.
        return block.ignore_error_block, ("latex_not_fully_decoded",)
    return None, ()


def _verbatim(value: object) -> str:
    text = str(value).strip()
    if len(text) >= 2 and (text[0], text[-1]) in (("{", "}"), ('"', '"')):
        text = text[1:-1]
    return _LATEX_ESCAPES.sub(r"\1", text).replace("{", "").replace("}", "")


def _values(entry: Entry, verbatim: dict[str, str]) -> dict[str, object]:
    fields = {f.key.lower(): f.value for f in entry.fields}

    def first(names: tuple[str, ...]) -> str | None:
        for name in names:
            value = fields.get(name)
            if isinstance(value, (str, int)) and str(value).strip():
                return str(value)
        return None

    def joined(names: tuple[str, ...]) -> list[str]:
        return [str(fields[n]) for n in names if isinstance(fields.get(n), (str, int))]

    keywords = first(_KEYWORD_FIELDS)
    return {
        "title": first(("title",)),
        "abstract": first(("abstract",)),
        "keywords": split_keywords(keywords) if keywords else [],
        "year": first(_YEAR_FIELDS),
        "doi": verbatim.get("doi"),
        "authors": _authors(fields.get("author")),
        "venue": first(_VENUE_FIELDS),
        "doc_type": entry.entry_type.lower(),
        # ";" separates affiliations in exports; " and " does not, as it occurs inside names
        # such as "Department of Land and Water".
        "affiliations": [a for value in joined(_AFFILIATION_FIELDS) for a in split_list(value, ";")],
        "departments": [d for value in joined(_DEPARTMENT_FIELDS) for d in split_list(value, ";")],
        "orcids": find_orcids(joined(_ORCID_FIELDS)),
        "language": first(_LANGUAGE_FIELDS),
        "url": verbatim.get("url"),
        "issn": first(("issn",)),
        # An award's funding: no BibTeX standard field, so the plain names that exports of awards use.
        "amount": first(("amount",)),
        "currency": first(("currency",)),
    }


def _inherit(
    values: dict[str, object], entry: Entry, parents: dict[str, Entry]
) -> tuple[dict[str, object], tuple[str, ...]]:
    """Fill the year, language and venue an entry lacks from the entry its crossref names.

    BibTeX takes every missing field from the cross-referenced entry (Patashnik 1988); only
    these three are taken here, since a chapter's DOI, abstract or keywords are not the book's,
    and a shared DOI would make duplicate detection merge two chapters.
    """
    target = next((f.value for f in entry.fields if f.key.lower() == "crossref"), None)
    if not isinstance(target, str) or not target.strip():
        return values, ()
    parent = parents.get(target.strip().lower())
    if parent is None or parent is entry:
        return values, (f"crossref_not_found:{target.strip()}",)
    inherited = _values(parent, {})
    out = dict(values)
    for name in ("year", "language"):
        if not out.get(name):
            out[name] = inherited[name]
    if not out.get("venue"):
        # A chapter's venue is the book: its booktitle or journal when given, else its title.
        out["venue"] = inherited["venue"] or inherited["title"]
    return out, ()


def _authors(value: object) -> list[str]:
    """Names as "von Last, Jr, First"; "and others" (BibTeX's et al.) is not a person."""
    if value is None:
        return []
    items = value if isinstance(value, list) else [value]
    names = []
    for item in items:
        name = item.merge_last_name_first if isinstance(item, NameParts) else str(item)
        if name.strip().lower() != "others":
            names.append(name)
    return names
