"""Bytes -> text for every reader, and the cleaning applied to every field value.

Decoding order: the configured encoding, a byte-order mark, strict UTF-8, then cp1252
(with a warning). Text that is mostly control characters is treated as not text at all.
"""

from __future__ import annotations

import codecs
import re
import unicodedata
from dataclasses import dataclass

# UTF-32 marks first: the UTF-32-LE mark starts with the UTF-16-LE one.
_BOMS = (
    (codecs.BOM_UTF32_LE, "utf-32-le"),
    (codecs.BOM_UTF32_BE, "utf-32-be"),
    (codecs.BOM_UTF8, "utf-8"),
    (codecs.BOM_UTF16_LE, "utf-16-le"),
    (codecs.BOM_UTF16_BE, "utf-16-be"),
)
# Above this share of control characters a file is binary, whatever it decoded to.
_MAX_CONTROL_SHARE = 0.05
_WHITESPACE = re.compile(r"[ \t\f\v\u00a0\u2000-\u200a\u2028\u202f\u205f\u3000]+")
_PARAGRAPH = "\u2029"  # Unicode paragraph separator, used as a placeholder while folding lines
_BLANK_LINES = re.compile(r"\n\s*\n")
# Control characters that separate words (vertical tab, form feed, the four information
# separators, NEL) become spaces rather than nothing, so the words around them stay apart;
# FileMaker exports write a line break inside a field as a vertical tab (from memory).
_SPACING_CONTROLS = dict.fromkeys((0x0B, 0x0C, 0x1C, 0x1D, 0x1E, 0x1F, 0x85), " ")


@dataclass(frozen=True)
class DecodedText:
    text: str  # newlines normalised to "\n"; "" when the bytes were not text
    encoding: str  # codec actually used ("" when not text)
    warnings: tuple[str, ...] = ()


def decode_bytes(data: bytes, encoding: str | None = None) -> DecodedText:
    """Decode a whole file; never raises on bad bytes (they become U+FFFD with a warning)."""
    warnings: list[str] = []
    text, used = _decode(data, encoding, warnings)
    if _looks_binary(text):
        # Encoding notes about bytes that are not text would only distract from this one.
        return DecodedText("", "", ("file does not look like text (binary content); nothing read",))
    return DecodedText(normalise_newlines(text), used, tuple(warnings))


def _decode(data: bytes, encoding: str | None, warnings: list[str]) -> tuple[str, str]:
    if encoding:
        try:
            text = data.decode(encoding)
        except UnicodeDecodeError as exc:
            warnings.append(f"bytes not valid {encoding} (first at byte {exc.start}); replaced with U+FFFD")
            text = data.decode(encoding, errors="replace")
        # Python's utf-8 codec keeps a BOM as U+FEFF; drop it like "utf-8-sig" would.
        return text.removeprefix("\ufeff"), encoding
    for bom, codec in _BOMS:
        if data.startswith(bom):
            body = data[len(bom):]
            try:
                return body.decode(codec), codec
            except UnicodeDecodeError as exc:
                warnings.append(f"bytes not valid {codec} after its byte-order mark (byte {exc.start}); replaced")
                return body.decode(codec, errors="replace"), codec
    unmarked = _utf16_without_bom(data)
    if unmarked:
        warnings.append(f"no byte-order mark; read as {unmarked.upper()} (every other byte is zero)")
        return data.decode(unmarked, errors="replace"), unmarked
    try:
        return data.decode("utf-8"), "utf-8"
    except UnicodeDecodeError:
        pass
    # cp1252 is what spreadsheet programs on Windows write; five byte values are undefined in it.
    warnings.append("decoded as cp1252 after UTF-8 failed")
    return data.decode("cp1252", errors="replace"), "cp1252"


def _utf16_without_bom(data: bytes) -> str | None:
    """"utf-16-le" or "utf-16-be" when the bytes look like UTF-16 text that lost its byte-order mark.

    Latin-script text in UTF-16 has a zero in every other byte (the high byte of each character);
    such text also decodes as UTF-8, full of NULs, so this is asked first. A binary file has zeros
    in both positions and is left to the binary check.
    """
    head = data[:4096]
    pairs = len(head) // 2
    if pairs < 2:
        return None
    zeros_odd = sum(1 for b in head[1:2 * pairs:2] if b == 0) / pairs
    zeros_even = sum(1 for b in head[0:2 * pairs:2] if b == 0) / pairs
    if zeros_odd > 0.6 and zeros_even < 0.05:
        return "utf-16-le"
    if zeros_even > 0.6 and zeros_odd < 0.05:
        return "utf-16-be"
    return None


def _looks_binary(text: str) -> bool:
    if not text:
        return False
    # NUL counts like any control character: one stray NUL in a large text export must not
    # discard the whole file, while UTF-16 read as UTF-8 (every other character NUL) still does.
    # Control characters are not printable, so a printable text (its line breaks and tabs aside)
    # has none and skips the count by character.
    if text.replace("\n", "").replace("\t", "").replace("\r", "").replace("\f", "").isprintable():
        controls = 0
    else:
        controls = sum(1 for ch in text if unicodedata.category(ch) == "Cc" and ch not in "\t\n\r\f")
    replaced = text.count("\ufffd")
    return (controls + replaced) / len(text) > _MAX_CONTROL_SHARE


def normalise_newlines(text: str) -> str:
    """CRLF and lone CR become LF, so line numbers agree whatever wrote the file."""
    return text.replace("\r\n", "\n").replace("\r", "\n")


def clean_value(value: str, keep_paragraphs: bool = False) -> str:
    """Strip invisible characters and normalise whitespace.

    With `keep_paragraphs` (abstracts), a blank line survives as one "\\n"; single line breaks
    are hard wraps from the export and become spaces.
    """
    value = unicodedata.normalize("NFC", value).translate(_SPACING_CONTROLS)
    # Printable text (tabs and line breaks aside) holds no character of the categories dropped
    # below, so only the rest is looked at character by character (most of intake's time, measured).
    if not value.replace("\n", "").replace("\t", "").isprintable():
        value = "".join(ch for ch in value if _is_kept(ch))
    if keep_paragraphs:
        value = _BLANK_LINES.sub(_PARAGRAPH, value)  # mark paragraph breaks before folding lines
    else:
        value = value.replace(_PARAGRAPH, " ")
    value = _WHITESPACE.sub(" ", value.replace("\n", " "))
    if keep_paragraphs:
        value = "\n".join(part.strip() for part in value.split(_PARAGRAPH) if part.strip())
    return value.strip()


def _is_kept(ch: str) -> bool:
    if ch in "\n\t":
        return True
    # Cc: control characters; Cf: zero-width spaces/joiners, soft hyphens, bidi marks, BOMs.
    # Cs/Co/Cn: lone surrogates, private use and unassigned code points carry no text.
    return unicodedata.category(ch) not in ("Cc", "Cf", "Cs", "Co", "Cn")


def cut(value: str, max_length: int) -> tuple[str, bool]:
    """Cut a value to `max_length` characters; say whether it was cut."""
    if len(value) <= max_length:
        return value, False
    return value[:max_length].rstrip(), True
