"""Reading the small UTF-8 files a user keeps beside the exports (staff map, labelled sample, review file).

One place for the messages, so every such file fails the same clear way.
"""

from __future__ import annotations

from pathlib import Path

from reporter.errors import InputError, Problem


def read_side_file(path: Path, key: str, what: str) -> str:
    """The file's text (a UTF-8 BOM is dropped); InputError naming the file and config key otherwise."""
    path = Path(path)
    try:
        return path.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise InputError(Problem(path, None, key, f"{what} not found")) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(Problem(path, None, key, f"cannot read {what} as UTF-8 text: {exc}")) from None
