"""Theme lookup and the Jinja environment: a theme folder -> `Theme`; `Theme` -> sandboxed environment.

Lookup order: a user theme folder (or `themes/<name>/`), the theme it extends, then
`themes/default/`. Templates come from the first folder that has them; stylesheets
cascade (every folder's copy is used, most general first). Nothing outside these
folders can be read by a template.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

import jinja2
from jinja2.loaders import split_template_path
from jinja2.sandbox import SandboxedEnvironment
from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from reporter.errors import ReporterError
from reporter.render.filters import FILTERS

THEMES_ROOT = Path(__file__).resolve().parents[2] / "themes"
DEFAULT_THEME = "default"
_NAME = re.compile(r"^[A-Za-z0-9_-]+$")
_COLOUR = re.compile(r"^#[0-9a-fA-F]{6}$")
# A font stack is pasted into CSS; these characters could end the declaration or the style block.
_UNSAFE_CSS = re.compile(r"[;{}<>\\]")
_PAGE_SIZE = re.compile(r"^(A3|A4|A5|B5|letter|legal)( landscape| portrait)?$|^\d+(\.\d+)?mm \d+(\.\d+)?mm$")


class ThemeError(ReporterError):
    """A theme is missing, its theme.toml is invalid, or one of its templates fails."""


class _FontFile(BaseModel):
    """A font file shipped in the theme folder, inlined into the report as @font-face."""

    model_config = ConfigDict(extra="forbid", frozen=True)
    family: str = Field(pattern=r"^[A-Za-z0-9 _-]+$")
    file: str = Field(pattern=r"(?i)\.(woff2|woff|ttf|otf)$")
    weight: int = Field(default=400, ge=100, le=900)
    style: Literal["normal", "italic"] = "normal"


class _ThemeFile(BaseModel):
    """One theme.toml; every key optional so a theme can set only what it changes."""

    model_config = ConfigDict(extra="forbid", frozen=True)
    name: str | None = None
    extends: str | None = None
    page_size: str | None = None
    evidence_per_goal: int | None = Field(default=None, ge=1, le=500)
    palette: dict[str, str | list[str]] = Field(default_factory=dict)
    fonts: dict[str, str] = Field(default_factory=dict)
    font_files: list[_FontFile] = Field(default_factory=list)

    @field_validator("palette")
    @classmethod
    def _colours(cls, value: dict[str, str | list[str]]) -> dict[str, str | list[str]]:
        for key, colour in value.items():
            for item in colour if isinstance(colour, list) else [colour]:
                if not _COLOUR.fullmatch(item):
                    raise ValueError(f"palette.{key}: expected colours as #rrggbb, got {item!r}")
        return value

    @field_validator("fonts")
    @classmethod
    def _fonts(cls, value: dict[str, str]) -> dict[str, str]:
        for key, stack in value.items():
            if _UNSAFE_CSS.search(stack):
                raise ValueError(f"fonts.{key}: a font list may not contain ; {{ }} < > or \\, got {stack!r}")
        return value

    @field_validator("page_size")
    @classmethod
    def _page(cls, value: str | None) -> str | None:
        if value is not None and not _PAGE_SIZE.fullmatch(value):
            raise ValueError(f"page_size: expected e.g. 'A4', 'letter' or '210mm 297mm', got {value!r}")
        return value


_REQUIRED_PALETTE = ("ink", "muted", "rule", "paper", "wash", "too_small", "categorical", "sequential")
_REQUIRED_FONTS = ("body", "heading", "chart", "mono")


@dataclass(frozen=True)
class Theme:
    name: str
    folders: tuple[Path, ...]  # resolved, most specific first
    page_size: str
    evidence_per_goal: int
    palette: dict[str, Any]  # colour name -> "#rrggbb"; categorical/sequential -> list of colours
    fonts: dict[str, str]  # role -> CSS font stack (chart: one family name for vl-convert)
    font_files: tuple[_FontFile, ...]

    def find(self, name: str) -> Path:
        """Path of a theme file, from the most specific folder that has it."""
        found = self.find_all(name)
        if found:
            return found[-1]
        raise ThemeError(f"theme {self.name!r}: no file {name!r} in {', '.join(map(str, self.folders))}")

    def find_all(self, name: str) -> list[Path]:
        """Every folder's copy of a file, most general first (for cascading stylesheets)."""
        return [p for p in (_inside(folder, name) for folder in reversed(self.folders)) if p is not None]

    def stylesheet(self, name: str) -> str:
        """A stylesheet with every folder's copy appended, so a theme overrides only what it changes."""
        return "\n".join(path.read_text(encoding="utf-8") for path in self.find_all(name))


def _inside(folder: Path, name: str) -> Path | None:
    """A file under `folder`, or None; '..', absolute names and symlinks out of the folder are refused."""
    try:
        pieces = split_template_path(name)
    except jinja2.TemplateNotFound:
        return None
    candidate = folder.joinpath(*pieces).resolve()
    if candidate.is_relative_to(folder) and candidate.is_file():
        return candidate
    return None


class _ThemeLoader(jinja2.BaseLoader):
    """Serves templates from the theme folders only."""

    def __init__(self, theme: Theme):
        self._theme = theme

    def get_source(self, environment: jinja2.Environment, template: str) -> tuple[str, str, Any]:
        for folder in self._theme.folders:
            path = _inside(folder, template)
            if path is not None:
                mtime = path.stat().st_mtime
                return path.read_text(encoding="utf-8"), str(path), lambda: path.stat().st_mtime == mtime
        raise jinja2.TemplateNotFound(template)


def build_environment(theme: Theme) -> SandboxedEnvironment:
    """A fresh environment per render: sandboxed, autoescaped, undefined names are errors."""
    env = SandboxedEnvironment(
        loader=_ThemeLoader(theme),
        autoescape=True,
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )
    env.filters.update(FILTERS)
    return env


def load_theme(setting: str, themes_root: Path = THEMES_ROOT) -> Theme:
    """Resolve `report.theme` (a name under `themes_root` or a folder path) to a `Theme`."""
    root = themes_root.resolve()
    chain = _chain(setting, root)
    files = [_read_theme_file(folder) for folder in chain]
    # Merge most general first so the specific theme wins key by key.
    palette: dict[str, Any] = {}
    fonts: dict[str, str] = {}
    font_files: list[_FontFile] = []
    page_size, evidence_per_goal = "A4", 15
    for spec in reversed(files):
        palette.update(spec.palette)
        fonts.update(spec.fonts)
        font_files.extend(spec.font_files)
        page_size = spec.page_size or page_size
        evidence_per_goal = spec.evidence_per_goal or evidence_per_goal
    missing = [f"palette.{k}" for k in _REQUIRED_PALETTE if k not in palette]
    missing += [f"fonts.{k}" for k in _REQUIRED_FONTS if k not in fonts]
    if missing:
        raise ThemeError(f"theme {setting!r}: theme.toml lacks {', '.join(missing)}")
    name = files[0].name or chain[0].name
    return Theme(name, tuple(chain), page_size, evidence_per_goal, palette, fonts, tuple(font_files))


def _chain(setting: str, root: Path) -> list[Path]:
    default = root / DEFAULT_THEME
    if _NAME.fullmatch(setting):
        first = root / setting
        if not first.is_dir():
            known = sorted(p.name for p in root.iterdir() if (p / "theme.toml").is_file())
            raise ThemeError(f"report.theme: no theme named {setting!r}; available: {', '.join(known)}")
    else:
        first = Path(setting).expanduser().resolve()
        if not first.is_dir():
            raise ThemeError(f"report.theme: theme folder not found: {first}")
    chain = [first.resolve()]
    extends = _read_theme_file(chain[0]).extends
    if extends:
        if not _NAME.fullmatch(extends) or not (root / extends).is_dir():
            raise ThemeError(f"{chain[0] / 'theme.toml'}: extends: no theme named {extends!r}")
        chain.append((root / extends).resolve())
    if default.resolve() not in chain:
        chain.append(default.resolve())
    return chain


def _read_theme_file(folder: Path) -> _ThemeFile:
    path = folder / "theme.toml"
    if not path.is_file():
        return _ThemeFile()
    try:
        return _ThemeFile.model_validate(tomllib.loads(path.read_text(encoding="utf-8")))
    except tomllib.TOMLDecodeError as exc:
        raise ThemeError(f"{path}: not valid TOML: {exc}") from None
    except ValidationError as exc:
        problems = "; ".join(
            f"{'.'.join(str(p) for p in err['loc'])}: {err['msg'].removeprefix('Value error, ')}"
            for err in exc.errors()
        )
        raise ThemeError(f"{path}: {problems}") from None
