"""Checks of the files a config names, run when it loads, before any input is read or the model loads.

The output folder belongs to the build: it fills it with the report, the exports and the manifest.
So it must be a folder (or creatable) that can be written to, and no file the build reads may lie
inside it, or a build would replace the user's own data with its tables. An existing cache file must
be a cache, and options a reader would ignore are refused. Each check takes `problem(key, message)`,
which places a Problem at the key's line of the config file.
"""

from __future__ import annotations

import os
import sqlite3
from pathlib import Path
from typing import Callable, Iterable

from reporter.errors import Problem


def output_folder_problems(
    out_dir: Path, out_key: str, read_files: Iterable[tuple[str, Path | None]], problem: Callable[[str, str], Problem]
) -> list[Problem]:
    """Problems with `out_dir` (named `out_key` in messages) and with read files that lie inside it.

    `problem(key, message)` makes a Problem at the key's line of the config file.
    """
    problems = []
    where = _folder_state(out_dir)
    if where:
        problems.append(problem(out_key, where))
    for key, file in read_files:
        if file is not None and _inside(file, out_dir):
            problems.append(problem(key, (
                f"{file} lies inside the output folder {out_dir} ({out_key}), which the build fills with "
                f"its own files; move the file or choose another output folder"
            )))
    return problems


def _folder_state(folder: Path) -> str:
    """Why `folder` cannot take the build's files, or "" when it can (existing or creatable)."""
    try:
        if folder.is_dir():
            return "" if os.access(folder, os.W_OK | os.X_OK) else f"cannot write in {folder} (permission denied)"
        if folder.exists() or folder.is_symlink():
            kind = "a file" if folder.is_file() else "not a folder"
            return f"{folder} is {kind}; expected a folder for the report and its exports"
        parent = folder.parent
        while not parent.exists():
            if parent.is_symlink():
                return f"cannot create {folder}: {parent} is a link that leads nowhere (broken, or a loop)"
            if parent == parent.parent:
                return f"cannot create {folder}: no such drive or root {parent}"
            parent = parent.parent
        if not parent.is_dir():
            return f"cannot create {folder}: {parent} is a file"
        if not os.access(parent, os.W_OK | os.X_OK):
            return f"cannot create {folder}: no permission to write in {parent}"
    except OSError as exc:  # a symbolic link loop, a name too long
        return f"cannot use {folder} as the output folder: {exc.strerror or exc}"
    return ""


def _inside(file: Path, folder: Path) -> bool:
    """True when `file` is `folder` or lies below it (both as written and with links followed)."""
    pairs = [(file, folder)]
    try:
        pairs.append((file.resolve(), folder.resolve()))
    except (OSError, RuntimeError):  # a link loop: the plain comparison stands
        pass
    return any(f == d or d in f.parents for f, d in pairs)


#: Input options that only a CSV reader uses, with the value that means "not set".
CSV_ONLY = {"columns": {}, "delimiter": None, "list_separator": ";"}


def format_option_problems(inputs, formats: list[str | None], problem: Callable[[str, str], Problem]) -> list[Problem]:
    """CSV-only options on an input read as BibTeX or RIS (`formats`: by `format` or extension) would be
    ignored without a word: refuse them."""
    problems = []
    for i, (item, fmt) in enumerate(zip(inputs, formats)):
        if fmt is None or fmt == "csv":
            continue
        for option, unset in CSV_ONLY.items():
            if getattr(item, option) != unset:
                problems.append(problem(f"inputs[{i}].{option}", (
                    f"applies to CSV files only, but {item.path.name} is read as {fmt}; remove it, "
                    'or set format = "csv" if the file is a CSV export'
                )))
    return problems


def cache_problems(cache: Path, problem: Callable[[str, str], Problem]) -> list[Problem]:
    """An existing score.cache must be an SQLite file (a cache of ours, or empty): found now, not after scoring."""
    if cache.is_dir():
        return [problem("score.cache", f"{cache} is a folder; expected the cache file's path")]
    if not cache.exists():
        return []
    try:
        db = sqlite3.connect(f"{cache.resolve().as_uri()}?mode=ro", uri=True)
        try:
            db.execute("PRAGMA schema_version").fetchone()  # reads the header: fails on a file of another kind
        finally:
            db.close()
    except sqlite3.Error as exc:
        return [problem("score.cache", (
            f"{cache} is not an embedding cache ({exc}); point score.cache at another file, "
            "or delete this one if it is an old cache"
        ))]
    return []
