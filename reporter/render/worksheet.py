"""Review worksheet (score.review.borderline_pairs) -> review-worksheet.csv, plus .xlsx when openpyxl is present.

The CSV has the review file's columns, so a reviewer fills in decision/reviewer/note and the
file can be given as `validation.review_file` as it is.
"""

from __future__ import annotations

import importlib.util
import io
from pathlib import Path

import pandas as pd

from reporter.render.atomic import write_bytes_atomic, write_text_atomic

WORKSHEET_NAME = "review-worksheet"


def write_worksheet(worksheet: pd.DataFrame, out_dir: Path) -> dict[str, Path]:
    """Write the worksheet; returns label -> path. XLSX only when openpyxl is already installed."""
    out_dir = Path(out_dir)
    written = {"review worksheet": write_text_atomic(out_dir / f"{WORKSHEET_NAME}.csv", worksheet.to_csv(index=False))}
    if importlib.util.find_spec("openpyxl") is not None:
        buffer = io.BytesIO()
        worksheet.to_excel(buffer, index=False, sheet_name="review")
        written["review worksheet (xlsx)"] = write_bytes_atomic(out_dir / f"{WORKSHEET_NAME}.xlsx", buffer.getvalue())
    return written
