"""Goal framework files (TOML) -> frozen `GoalFramework`; every problem is collected into one `FrameworkError`.

A spec is either a built-in id (a file shipped in `reporter/frameworks/`) or a path to a file of the
same schema. Checksum and source travel with the framework into the run manifest.
"""

from __future__ import annotations

import hashlib
import re
import tomllib
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any

from reporter.config import _hint, _key_lines, _line_of
from reporter.errors import FrameworkError, Problem

MIN_DESCRIPTORS = 3  # fewer cannot describe a goal's range of ground
MIN_BACKGROUND = 3

# Schema: key -> (kind, required). Kinds: "text" (non-empty str), "texts" (list of non-empty str),
# "number" (int >= 1).
_FRAMEWORK_KEYS = {
    "id": ("text", True),
    "title": ("text", True),
    "version": ("text", True),
    "description": ("text", True),
    "context_terms": ("texts", False),
}
_BACKGROUND_KEYS = {"statements": ("texts", True)}
_GOAL_KEYS = {
    "code": ("text", True),
    "number": ("number", False),
    "short_title": ("text", True),
    "statement": ("text", True),
    "descriptors": ("texts", True),
    "keywords": ("texts", False),
    "mention_titles": ("texts", False),
}
_TABLES = ("framework", "background", "goals")


@dataclass(frozen=True)
class Goal:
    code: str  # stable id used in every table, e.g. "6" or "T2"
    number: int | None  # official number when the framework numbers its goals; enables "SDG 6" patterns
    short_title: str
    statement: str
    descriptors: tuple[str, ...]
    keywords: tuple[str, ...] = ()
    mention_titles: tuple[str, ...] = ()


@dataclass(frozen=True)
class GoalFramework:
    id: str
    title: str
    version: str
    description: str
    goals: tuple[Goal, ...]
    background: tuple[str, ...]  # the "no goal" class: statements that address no goal
    checksum: str  # sha256 of the file bytes
    source: str  # file path, or "builtin:<id>"
    context_terms: tuple[str, ...] = ()  # extra words that put a goal title in goal context

    @property
    def goal_codes(self) -> tuple[str, ...]:
        return tuple(goal.code for goal in self.goals)

    def goal_by_code(self, code: str) -> Goal:
        for goal in self.goals:
            if goal.code == code:
                return goal
        raise KeyError(f"framework {self.id!r} has no goal {code!r}; codes: {', '.join(self.goal_codes)}")


def builtin_frameworks() -> tuple[str, ...]:
    """Ids of the frameworks shipped in the package."""
    folder = resources.files("reporter.frameworks")
    return tuple(sorted(p.name[: -len(".toml")] for p in folder.iterdir()
                        if p.name.endswith(".toml") and not p.name.endswith(ACCURACY_SUFFIX)))


ACCURACY_SUFFIX = ".accuracy.toml"  # beside a built-in framework: its accuracy measured on real abstracts


def measured_accuracy(framework: GoalFramework) -> dict[str, Any] | None:
    """Accuracy measured on real abstracts for a built-in framework (bench/evaluate_scoring.py
    --write-accuracy), or None: for other frameworks, and when the figures were measured on
    another version of the file (checksums differ), since they would not describe this one."""
    if not framework.source.startswith("builtin:"):
        return None
    file = resources.files("reporter.frameworks") / f"{framework.id}{ACCURACY_SUFFIX}"
    if not file.is_file():
        return None
    figures = tomllib.loads(file.read_text(encoding="utf-8"))
    return figures if figures.get("framework_checksum") == framework.checksum else None


def load_framework(spec: str) -> GoalFramework:
    """Read and validate a framework given by built-in id or file path; raise FrameworkError listing every problem."""
    if spec in builtin_frameworks():
        data = (resources.files("reporter.frameworks") / f"{spec}.toml").read_bytes()
        return parse_framework(data, Path(f"{spec}.toml"), source=f"builtin:{spec}")
    path = Path(spec)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        known = ", ".join(builtin_frameworks())
        raise FrameworkError(
            Problem(path, None, "", f"framework file not found (built-in frameworks: {known})")
        ) from None
    except OSError as exc:
        raise FrameworkError(Problem(path, None, "", f"cannot read framework file: {exc}")) from None
    return parse_framework(data, path, source=str(path))


def parse_framework(data: bytes, path: Path, source: str) -> GoalFramework:
    """Validate framework file bytes; `path` only names the file in problems."""
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        byte = data[exc.start : exc.start + 1].hex()
        raise FrameworkError(Problem(path, line, "", f"not UTF-8 text (byte 0x{byte}); save the file as UTF-8")) from None
    try:
        raw = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        match = re.search(r"line (\d+)", str(exc))
        raise FrameworkError(
            Problem(path, int(match.group(1)) if match else None, "", f"not valid TOML: {exc}")
        ) from None

    check = _Checker(path, _key_lines(text))
    check.unknown(raw, "", _TABLES)
    head = check.table(raw, "framework", _FRAMEWORK_KEYS)
    background = check.table(raw, "background", _BACKGROUND_KEYS)
    if background.get("statements") is not None and len(background["statements"]) < MIN_BACKGROUND:
        n = len(background["statements"])
        check.add("background.statements", f"expected at least {MIN_BACKGROUND} statements, got {n}")
    goals = check.goals(raw.get("goals"))
    if check.problems:
        raise FrameworkError(check.problems)
    return GoalFramework(
        id=head["id"],
        title=head["title"],
        version=head["version"],
        description=head["description"],
        goals=tuple(Goal(**fields) for fields in goals),
        background=background["statements"],
        checksum=hashlib.sha256(data).hexdigest(),
        source=source,
        context_terms=head.get("context_terms") or (),
    )


class _Checker:
    """Collects problems while reading the parsed TOML; returns cleaned values (None where invalid)."""

    def __init__(self, path: Path, lines: dict[str, int]):
        self.path = path
        self.lines = lines
        self.problems: list[Problem] = []

    def add(self, key: str, message: str) -> None:
        self.problems.append(Problem(self.path, _line_of(self.lines, key), key, message))

    def unknown(self, data: dict[str, Any], prefix: str, known: tuple[str, ...] | dict[str, Any]) -> None:
        for key in data:
            if key not in known:
                self.add(f"{prefix}{key}", f"unknown key{_hint(key, list(known))}")

    def table(self, raw: dict[str, Any], name: str, spec: dict[str, tuple[str, bool]]) -> dict[str, Any]:
        if name not in raw:
            self.add(name, f"required table [{name}] is missing")
            return {}
        if not isinstance(raw[name], dict):
            self.add(name, f"expected a [{name}] table, got {raw[name]!r}")
            return {}
        return self.fields(raw[name], f"{name}.", spec)

    def fields(self, data: dict[str, Any], prefix: str, spec: dict[str, tuple[str, bool]]) -> dict[str, Any]:
        self.unknown(data, prefix, spec)
        out: dict[str, Any] = {}
        for key, (kind, required) in spec.items():
            if key not in data:
                if required:
                    self.add(f"{prefix}{key}", "required key is missing")
                continue
            out[key] = getattr(self, f"_{kind}")(data[key], f"{prefix}{key}")
        return out

    def goals(self, raw: Any) -> list[dict[str, Any]]:
        if raw is None:
            self.add("goals", "required [[goals]] tables are missing")
            return []
        if not isinstance(raw, list) or not all(isinstance(item, dict) for item in raw):
            self.add("goals", "expected [[goals]] tables")
            return []
        if not raw:
            self.add("goals", "expected at least one goal")
        goals = []
        first_code: dict[str, int] = {}
        first_number: dict[int, int] = {}
        for index, item in enumerate(raw):
            prefix = f"goals[{index}]."
            fields = self.fields(item, prefix, _GOAL_KEYS)
            descriptors = fields.get("descriptors")
            if descriptors is not None and len(descriptors) < MIN_DESCRIPTORS:
                self.add(f"{prefix}descriptors", f"expected at least {MIN_DESCRIPTORS} descriptors, got {len(descriptors)}")
            code, number = fields.get("code"), fields.get("number")
            if code is not None and code in first_code:
                self.add(f"{prefix}code", f"duplicate goal code {code!r} (first used by goals[{first_code[code]}])")
            elif code is not None:
                first_code[code] = index
            if number is not None and number in first_number:
                self.add(f"{prefix}number", f"duplicate goal number {number} (first used by goals[{first_number[number]}])")
            elif number is not None:
                first_number[number] = index
            fields.setdefault("number", None)
            goals.append(fields)
        return goals

    def _text(self, value: Any, key: str) -> str | None:
        if not isinstance(value, str):
            # A bare 1 or 1.0 is the usual slip for codes and versions.
            fix = " (put it in quotes)" if isinstance(value, (int, float)) and not isinstance(value, bool) else ""
            self.add(key, f"expected a string, got {value!r}{fix}")
            return None
        if not value.strip():
            self.add(key, "must not be empty")
            return None
        return value.strip()

    def _texts(self, value: Any, key: str) -> tuple[str, ...] | None:
        if not isinstance(value, list):
            self.add(key, f"expected a list of strings, got {value!r}")
            return None
        items = tuple(self._text(item, f"{key}[{i}]") for i, item in enumerate(value))
        return None if None in items else items

    def _number(self, value: Any, key: str) -> int | None:
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            self.add(key, f"expected a whole number of at least 1, got {value!r}")
            return None
        return value
