"""Typed tables -> one .xlsx file (openpyxl, streaming): numbers stay numbers, text stays inert.

Each column has a kind that fixes its cell type and number format, so a share is a 0-1 float
shown as a percentage and a count an integer, and a missing value is an empty cell, never
"nan". Text goes through the CSV exports' formula neutralisation. The bytes depend only on
the tables: no timestamp is written, so identical findings give an identical file.
"""

from __future__ import annotations

import io
import math
import re
import zipfile
from dataclasses import dataclass
from typing import Sequence

import pandas as pd
from openpyxl import Workbook
from openpyxl.cell import WriteOnlyCell
from openpyxl.cell.cell import ILLEGAL_CHARACTERS_RE, Cell
from openpyxl.styles import Alignment, Border, Font, Side
from openpyxl.utils import get_column_letter

from reporter.render.exports import SIGNED_NUMBER, safe_cell

#: Spreadsheet limits (the same in Excel and LibreOffice Calc): rows per sheet, characters per cell.
MAX_ROWS = 1_048_576
MAX_CELL_TEXT = 32_767

#: kind -> number format. "count" and "year" show whole numbers as they are and switch to a decimal
#: format for a non-integral value (fractional counting gives weighted counts); text kinds have none.
FORMATS = {
    "count": "General",
    "year": "General",
    "share": "0.0%",
    "diff": "+0.0%;-0.0%;0.0%",  # a difference of shares, signed
    "score": "0.000",
    "p": "[<0.001]0.0E+00;0.000",  # small p-values in scientific notation rather than 0.000
    "amount": "#,##0",  # money in whole units of the base currency
}
TEXT_KINDS = ("text", "long_text", "code", "flag")
_DECIMAL = "0.00"
_WRAP_WIDTH = 60  # long text wraps in a column this wide
_MAX_WIDTH = 45  # other text is cut off on screen beyond this, but kept whole in the cell
_WIDTH_SAMPLE = 500  # rows looked at to size a column
_SUMMARY_WIDTH = 100
_CHARS_PER_WIDTH = 1.1  # ordinary text is a little narrower than the digit a width unit measures
_LINE_HEIGHT = 15  # points per line at the default font
_MAX_ROW_HEIGHT = 409  # the largest row height a sheet allows
_BOLD = Font(name="Calibri", size=11, bold=True)  # the workbook's own font, in bold
#: How a cell looks, apart from its number format.
LOOKS = {
    "wrap": {"alignment": Alignment(wrap_text=True)},
    "header": {"font": _BOLD, "border": Border(bottom=Side(style="thin")),
               "alignment": Alignment(wrap_text=True, vertical="bottom")},
    "label": {"font": _BOLD, "alignment": Alignment(vertical="top")},  # beside a value that may wrap
    # Summary values: numbers beside their label rather than at the far right of a wide column.
    "left": {"alignment": Alignment(wrap_text=True, vertical="top", horizontal="left")},
}
_FIXED_ZIP_TIME = (1980, 1, 1, 0, 0, 0)  # the earliest time a zip entry can hold
_CORE_TIMES = re.compile(rb"<dcterms:(created|modified)\b[^>]*>[^<]*</dcterms:\1>")


@dataclass(frozen=True)
class Column:
    key: str  # column of the source table
    header: str  # as the reader sees it
    kind: str  # a key of FORMATS or one of TEXT_KINDS
    optional: bool = False  # a column analyse may add (FINDINGS_SCHEMA.md); left out when absent


@dataclass(frozen=True)
class Table:
    title: str  # sheet name (at most 31 characters)
    columns: tuple[Column, ...]
    frame: pd.DataFrame
    source: str  # the export holding the same table in full, named when rows do not fit


def write_workbook(summary_title: str, summary: Sequence[tuple[str, object, str]], tables: Sequence[Table]) -> bytes:
    """The workbook: a summary sheet of (label, value, kind) lines, then one sheet per table."""
    for table in tables:
        unknown = [c.kind for c in table.columns if c.kind not in FORMATS and c.kind not in TEXT_KINDS]
        if unknown:
            raise ValueError(f"write_workbook: sheet {table.title!r} has unknown column kinds {unknown}")
    book = Workbook(write_only=True)
    first = book.create_sheet(summary_title)  # created first so it opens first; filled last
    notes: list[str] = []
    for table in tables:
        notes.extend(_write_table(book.create_sheet(table.title), table))
    lines = [*summary, *(("Note", note, "long_text") for note in notes)]
    first.column_dimensions["A"].width = max((len(label) for label, _v, _k in lines), default=8) + 2
    first.column_dimensions["B"].width = _SUMMARY_WIDTH
    _print_setup(first)
    cells = _Cells(first)
    for row, (label, value, kind) in enumerate(lines, start=1):
        label_cell, value_cell = cells.make(label, "text", "label"), cells.make(value, kind, "left")
        _fit_height(first, row, [(value_cell, _SUMMARY_WIDTH)])
        first.append([label_cell, value_cell])
    buffer = io.BytesIO()
    book.save(buffer)
    return _without_timestamps(buffer.getvalue())


def _write_table(sheet, table: Table) -> list[str]:
    """Write one table with a frozen, filterable header row; return notes on anything cut."""
    frame = table.frame
    columns = [c for c in table.columns if c.key in frame.columns or not c.optional]
    missing = [c.key for c in columns if c.key not in frame.columns]
    if missing:
        raise KeyError(f"write_workbook: sheet {table.title!r} lacks columns {', '.join(missing)}")
    notes = []
    room = MAX_ROWS - 1
    if len(frame) > room:
        notes.append(f"{table.title}: the first {room:,} of {len(frame):,} rows (a sheet's limit); "
                     f"every row is in {table.source}.")
        frame = frame.iloc[:room]
    widths = [_width(column, frame[column.key]) for column in columns]
    for index, width in enumerate(widths, start=1):
        sheet.column_dimensions[get_column_letter(index)].width = width
    sheet.freeze_panes = "A2"
    sheet.auto_filter.ref = f"A1:{get_column_letter(len(columns))}{len(frame) + 1}"
    _print_setup(sheet)
    sheet.print_title_rows = "1:1"  # the header on every printed page
    wrapped = [i for i, column in enumerate(columns) if column.kind == "long_text"]
    cells = _Cells(sheet)
    header = [cells.make(column.header, "text", "header") for column in columns]
    _fit_height(sheet, 1, list(zip(header, widths)))
    sheet.append(header)
    kinds = [column.kind for column in columns]
    rows = zip(*(frame[column.key].tolist() for column in columns))
    for index, row in enumerate(rows, start=2):
        made = [cells.make(value, kind) for value, kind in zip(row, kinds)]
        if wrapped:
            _fit_height(sheet, index, [(made[i], widths[i]) for i in wrapped])
        sheet.append(made)
    if cells.n_cut:
        notes.append(f"{table.title}: {cells.n_cut} text cells longer than {MAX_CELL_TEXT:,} characters (a cell's "
                     f"limit) were cut; {table.source} holds them whole.")
    return notes


class _Cells:
    """Typed cells for one sheet; counts the text cut to the cell limit.

    A cell that needs no format (whole numbers, flags, plain text, blanks) is handed over as a bare
    value, which costs half of a styled cell; the rest copy the style of a model cell set up once
    per look, since setting styles cell by cell costs more than the cell itself.
    """

    def __init__(self, sheet):
        self.sheet, self.n_cut = sheet, 0
        self._styles: dict[tuple[str, str], object] = {}

    def make(self, value: object, kind: str, look: str = "") -> object:
        """`value` as a column of `kind` holds it: a bare value or a styled cell. `look` is a key of
        LOOKS; by default long text wraps and everything else looks plain."""
        look = look or ("wrap" if kind == "long_text" else "")
        value = _plain(value)
        if value is None:
            return self._styled(None, "General", look)
        if kind in FORMATS:
            number = _number(value, kind)
            if number is None:  # not a number after all (a year typed as text): kept, as text
                return self._text(value, look)
            whole = kind not in ("count", "year") or isinstance(number, int)
            return self._styled(number, FORMATS[kind] if whole else _DECIMAL, look)
        if kind == "flag":  # as words: spreadsheet programs disagree on showing TRUE or 1
            return self._styled("yes" if value else "no", "General", look)
        if kind == "code" and isinstance(value, str) and value.isdigit():
            return self._styled(int(value), "General", look)  # goal "6" sorts and filters as the number 6
        return self._text(value, look)

    def _text(self, value: object, look: str) -> object:
        # Neutralised first: a bare text starting with "=" would be written as a formula.
        text = ILLEGAL_CHARACTERS_RE.sub("\ufffd", str(safe_cell(value)))
        if len(text) > MAX_CELL_TEXT:
            text = text[:MAX_CELL_TEXT - 1] + "\u2026"
            self.n_cut += 1
        return self._styled(text or None, "General", look)

    def _styled(self, value: object, number_format: str, look: str) -> object:
        if number_format == "General" and not look:
            return value
        key = (number_format, look)
        if key not in self._styles:
            model = WriteOnlyCell(self.sheet)
            model.number_format = number_format
            for attribute, setting in LOOKS.get(look, {}).items():
                setattr(model, attribute, setting)
            self._styles[key] = model._style
        return Cell(self.sheet, row=1, column=1, value=value, style_array=self._styles[key])


def _fit_height(sheet, row: int, wrapped: list[tuple[object, float]]) -> None:
    """Give `row` (before it is appended) the height its wrapped text needs: spreadsheet programs do
    not always measure rows when they open a file, and a default-height row shows one line of a paragraph."""
    lines = 1
    for cell, width in wrapped:
        text = getattr(cell, "value", cell)
        if isinstance(text, str):
            per_line = max(int(width * _CHARS_PER_WIDTH), 1)
            lines = max(lines, sum(math.ceil(max(len(part), 1) / per_line) for part in text.split("\n")))
    if lines > 1:
        sheet.row_dimensions[row].height = min(lines * _LINE_HEIGHT, _MAX_ROW_HEIGHT)


def _print_setup(sheet) -> None:
    """Printed or exported to PDF, a sheet is landscape and one page wide."""
    sheet.page_setup.orientation = "landscape"
    sheet.page_setup.fitToWidth, sheet.page_setup.fitToHeight = 1, 0
    sheet.sheet_properties.pageSetUpPr.fitToPage = True
    sheet.print_options.gridLines = True


def _plain(value: object) -> object:
    """None for every form of missing; tuples and lists stay as they are for safe_cell to join."""
    if value is None or value is pd.NA or value is pd.NaT or (isinstance(value, str) and not value):
        return None
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def _number(value: object, kind: str) -> int | float | None:
    """The value as a finite number (an integer for whole counts and years), or None."""
    if isinstance(value, str) and not SIGNED_NUMBER.fullmatch(value.strip()):
        return None  # float() would also take "nan", "inf" and "1_000"
    try:
        number = float(value)
    except (TypeError, ValueError):
        return None
    if not math.isfinite(number):
        return None
    if kind in ("count", "year") and number.is_integer() and abs(number) < 2**53:
        return int(number)
    return number


def _width(column: Column, values: pd.Series) -> float:
    if column.kind == "long_text":
        return _WRAP_WIDTH
    # The header wraps onto two lines at most, so a long name does not widen a column of numbers.
    words = column.header.split()
    longest = max(max(len(word) for word in words), math.ceil(len(column.header) / 2))
    for value in values.iloc[:_WIDTH_SAMPLE]:
        value = _plain(value)
        if value is not None:
            longest = max(longest, len(_shown(value, column.kind)))
    return min(longest + 2, _MAX_WIDTH)


def _shown(value: object, kind: str) -> str:
    if kind in ("share", "diff"):
        return "+100.0%"
    if kind in ("score", "p"):
        return "0.000"
    return str(safe_cell(value))


def _without_timestamps(data: bytes) -> bytes:
    """The same workbook with fixed zip entry times and no creation or modification time."""
    source, target = io.BytesIO(data), io.BytesIO()
    with zipfile.ZipFile(source) as old, zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as new:
        for entry in old.infolist():
            content = old.read(entry)
            if entry.filename == "docProps/core.xml":
                content = _CORE_TIMES.sub(b"", content)  # when it was made is in manifest.json
            fixed = zipfile.ZipInfo(entry.filename, date_time=_FIXED_ZIP_TIME)
            fixed.compress_type = zipfile.ZIP_DEFLATED
            fixed.external_attr = entry.external_attr
            new.writestr(fixed, content)
    return target.getvalue()
