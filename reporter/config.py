"""waymark.toml -> frozen `Config`; every problem is collected into one `ConfigError`.

The schema below is the only place where defaults live. Each field carries a
description (a test fails on an undocumented key). Relative paths resolve
against the config file's folder.
"""

from __future__ import annotations

import difflib
import os
import re
import tomllib
from pathlib import Path
from typing import Annotated, Any, Callable, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, field_validator

from reporter.errors import ConfigError, Problem
from reporter.config_files import cache_problems, format_option_problems, output_folder_problems
from reporter.config_funding import (
    CurrencyCode, FundingConfig, RecordNoun, RecordNounValue, conversion_table_problems, record_noun,
)

CONFIG_FILE_NAME = "waymark.toml"
BUILTIN_FRAMEWORK = "un-sdg-2030"
BUILTIN_MODEL = "all-MiniLM-L6-v2"

#: Fields a CSV column may be mapped to (see `InputConfig.columns`).
CSV_FIELDS = (
    "id", "title", "abstract", "keywords", "year", "doi", "authors", "affiliations",
    "departments", "orcids", "doc_type", "venue", "language", "url", "issn", "amount", "currency",
)


class _Section(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class ReportConfig(_Section):
    institution: str = Field(description="Name of the institution, shown on the cover and in every heading.")
    home_country: str = Field(
        description="ISO 3166-1 alpha-2 code of the institution's country; other countries count as partners."
    )
    reporting_year: int = Field(ge=1900, le=2100, description="The year the report is about.")
    comparison_years: tuple[Annotated[int, Field(ge=1900, le=2100)], ...] = Field(
        default=(), description="Earlier years to compare the reporting year with."
    )
    title: str = Field(
        default="Research and the Sustainable Development Goals", description="Report title on the cover."
    )
    allow_empty_years: bool = Field(
        default=False,
        description=(
            "Build even when the reporting year or a comparison year has no publication (by default that is "
            "an error: a comparison with an empty year would read as a finding)."
        ),
    )
    output: Path = Field(default=Path("output"), description="Folder the report and exports are written to.")
    theme: str = Field(
        default="default", description="Theme name under themes/, or a path to a theme folder of your own."
    )
    logo: Path | None = Field(default=None, description="Local image file shown on the cover (no URLs).")
    accent_colour: str = Field(
        default="#1f5f8b", description="Accent colour for headings and rules, as #rrggbb."
    )
    record_noun: RecordNounValue = Field(
        default="publications",
        description=(
            'What the records are called in report text, table headers and exports: "publications", "awards", '
            '"projects", or a [singular, plural] pair such as ["grant", "grants"].'
        ),
    )
    briefs: bool = Field(
        default=False,
        description=(
            "Also write one short department brief per department into briefs/ of the output folder "
            "(HTML and PDF): its goal profile against the institution's, its changes and strongest evidence."
        ),
    )

    @field_validator("institution", "title")
    @classmethod
    def _not_blank(cls, value: str) -> str:
        # An empty name prints as nothing on the cover and in every heading ("Small test ·  · 2025").
        if not value.strip():
            raise ValueError("expected a name to print on the cover, got an empty text")
        return value.strip()

    @field_validator("home_country")
    @classmethod
    def _known_country(cls, value: str) -> str:
        import pycountry  # ISO 3166-1 is the reference for country codes

        code = value.strip().upper()
        if len(code) != 2 or pycountry.countries.get(alpha_2=code) is None:
            raise ValueError(f"expected an ISO 3166-1 alpha-2 code such as 'IE' or 'DE', got {value!r}")
        return code

    @field_validator("accent_colour")
    @classmethod
    def _hex_colour(cls, value: str) -> str:
        if not re.fullmatch(r"#[0-9a-fA-F]{6}", value):
            raise ValueError(f"expected a colour as #rrggbb, got {value!r}")
        return value.lower()

    @field_validator("briefs", mode="before")
    @classmethod
    def _true_or_false(cls, value: Any) -> Any:
        # TOML has real booleans; "yes" or 1 would otherwise pass as true without a word.
        if not isinstance(value, bool):
            raise ValueError(f"expected true or false (without quotes), got {value!r}")
        return value

    @field_validator("output", mode="before")
    @classmethod
    def _named_folder(cls, value: Any) -> Any:
        # Path("") is the current folder: an empty value would quietly mean the config's own folder.
        if isinstance(value, str) and not value.strip():
            raise ValueError('expected a folder for the report, got an empty text (use "." for the config\'s folder)')
        return value

    @field_validator("logo", mode="before")
    @classmethod
    def _local_logo(cls, value: Any) -> Any:
        if isinstance(value, str) and re.match(r"^[a-zA-Z][a-zA-Z0-9+.-]*://", value):
            raise ValueError(f"expected a local image file, got the URL {value!r}; download it and give its path")
        return value

    @property
    def years(self) -> tuple[int, ...]:
        """All years in scope, oldest first."""
        return tuple(sorted({*self.comparison_years, self.reporting_year}))

    @property
    def nouns(self) -> RecordNoun:
        """What one record and several are called ("award", "awards")."""
        return record_noun(self.record_noun)


class InputConfig(_Section):
    path: Path = Field(description="Publication export to read (BibTeX, RIS or CSV).")
    format: Literal["bibtex", "ris", "csv"] | None = Field(
        default=None, description="File format; guessed from the extension, then from the content, when unset."
    )
    encoding: str | None = Field(
        default=None, description="Text encoding; detected (UTF-8, UTF-16 with BOM, cp1252) when unset."
    )
    delimiter: str | None = Field(default=None, description="CSV delimiter; sniffed from the file when unset.")
    columns: dict[str, str] = Field(
        default_factory=dict,
        description="CSV only: our field name -> the file's header, for headers the automatic guess misses.",
    )
    list_separator: str = Field(
        default=";", description="CSV only: separator inside cells holding several authors, keywords, etc."
    )
    allow_empty: bool = Field(
        default=False,
        description="Accept this input yielding no records (an export that may be empty); otherwise that stops intake and build.",
    )
    currency: CurrencyCode = Field(
        default=None,
        description=(
            "ISO 4217 code of the amounts in this input when a record names none (no currency column or field), "
            "such as \"EUR\"."
        ),
    )

    @field_validator("columns")
    @classmethod
    def _known_fields(cls, value: dict[str, str]) -> dict[str, str]:
        unknown = [k for k in value if k not in CSV_FIELDS]
        if unknown:
            hints = [_hint(k, CSV_FIELDS) for k in unknown]
            raise ValueError("unknown field " + ", ".join(f"{k!r}{h}" for k, h in zip(unknown, hints)))
        return value


class DepartmentConfig(_Section):
    staff_map: Path | None = Field(
        default=None,
        description="CSV with columns name, department and optionally orcid, mapping staff to departments.",
    )
    aliases: dict[str, str] = Field(
        default_factory=dict, description="Department name variants -> the name to report."
    )


class ScoreConfig(_Section):
    framework: str = Field(
        default=BUILTIN_FRAMEWORK, description="Goal framework: the built-in id, or a path to a framework file."
    )
    model: str = Field(
        default=BUILTIN_MODEL,
        description="Sentence-embedding model: the built-in default, or a local sentence-transformers folder.",
    )
    backend: Literal["embedding", "embedding-int8", "nli"] = Field(
        default="embedding-int8",
        description=(
            "embedding-int8 (default): cosine similarity to descriptors, with the model's weights quantised "
            "to int8 (ONNX Runtime; about twice as fast on CPU, 99.75% of decisions equal to full precision "
            "on the demo); embedding: the same in full precision (float32); "
            "nli: entailment with a local cross-encoder (slower)."
        ),
    )
    text_fields: tuple[Literal["title", "abstract", "keywords"], ...] = Field(
        default=("title", "abstract", "keywords"), description="Record fields that make up the scored text."
    )
    threshold: float = Field(
        default=0.6, ge=0, le=1, description="Alignment score at or above which a publication is aligned."
    )
    policy: Literal["score_or_mention", "score_only", "mention_only"] = Field(
        default="score_or_mention",
        description="When a publication counts as aligned: by score, by explicit mention, or either.",
    )
    cache: Path | None = Field(
        default=Path(".waymark-cache/embeddings.sqlite"),
        description="SQLite embedding cache file; relative to the config folder.",
    )
    use_cache: bool = Field(default=True, description="Set false to embed everything afresh and store nothing.")
    batch_size: int = Field(
        default=64, ge=1, le=4096,
        description="Sentences per model call (embedding and nli backends; embedding-int8 runs one per call).",
    )
    threads: int | None = Field(
        default=None, ge=1, description="CPU threads for the model; all cores when unset."
    )
    thresholds_file: Path | None = Field(
        default=None, description="Per-goal thresholds (CSV goal,threshold) that replace the single threshold."
    )
    execution: Literal["local", "dask"] = Field(
        default="local",
        description="local: score in this process; dask: score on a Dask cluster (needs the 'distributed' extra).",
    )
    scheduler: str | None = Field(
        default=None,
        description="Dask scheduler address such as tcp://host:8786; a local cluster on this machine when unset.",
    )
    workers: int | None = Field(
        default=None, ge=1,
        description="Worker processes of the local Dask cluster (scheduler unset); one per CPU core when unset.",
    )

    @field_validator("scheduler")
    @classmethod
    def _scheduler_address(cls, value: str | None) -> str | None:
        if value is not None and not re.fullmatch(r"([a-z][a-z0-9+.-]*://)?[^\s/:]+(:\d+)?", value.strip()):
            raise ValueError(f"expected a scheduler address such as 'tcp://host:8786', got {value!r}")
        return value.strip() if value is not None else None

    @field_validator("workers")
    @classmethod
    def _local_cluster_only(cls, value: int | None, info) -> int | None:
        # A remote cluster has the workers its operator started; a count here would be ignored silently.
        if value is not None and info.data.get("scheduler") is not None:
            raise ValueError("only sizes the local cluster; remove it or score.scheduler")
        return value


class AnalysisConfig(_Section):
    counting: Literal["full", "fractional"] = Field(
        default="full",
        description="full: a publication counts 1 for each department/country; fractional: 1/k each.",
    )
    confidence: float = Field(default=0.95, gt=0.5, lt=1, description="Confidence level of every interval.")
    min_group_size: int = Field(
        default=10, ge=1, description="Groups with fewer publications are marked too small (common practice)."
    )
    fdr: float = Field(default=0.05, gt=0, lt=1, description="False discovery rate for calling a change a change.")
    sensitivity_step: float = Field(
        default=0.05, gt=0, lt=0.5, description="Threshold step for the sensitivity table (threshold +/- step)."
    )
    bootstrap_resamples: int = Field(default=2000, ge=100, description="Resamples for bootstrap intervals.")
    seed: int = Field(default=20250101, description="Seed for every random step, so runs repeat exactly.")


class ValidationConfig(_Section):
    labelled_sample: Path | None = Field(
        default=None, description="CSV of publications judged by people: id or DOI, goals separated by ';'."
    )
    review_file: Path | None = Field(
        default=None, description="CSV of reviewer decisions (record_id, goal, include/exclude, note)."
    )
    target_precision: float | None = Field(
        default=None, gt=0, le=1, description="Tune per-goal thresholds to reach this precision instead of best F1."
    )


class LimitsConfig(_Section):
    max_field_length: int = Field(
        default=20000, ge=100, description="Longer text fields are cut, with a note in the intake log."
    )


class Config(_Section):
    report: ReportConfig = Field(description="What the report is about and where it goes.")
    inputs: Annotated[tuple[InputConfig, ...], Field(min_length=1)] = Field(
        description="Publication exports to read; one [[inputs]] table each."
    )
    departments: DepartmentConfig = Field(
        default_factory=DepartmentConfig, description="How authors map to departments."
    )
    score: ScoreConfig = Field(default_factory=ScoreConfig, description="How publications are scored.")
    analysis: AnalysisConfig = Field(default_factory=AnalysisConfig, description="How figures are computed.")
    validation: ValidationConfig = Field(
        default_factory=ValidationConfig, description="Labelled sample and human review."
    )
    limits: LimitsConfig = Field(default_factory=LimitsConfig, description="Safety limits for inputs.")
    funding: FundingConfig = Field(
        default_factory=FundingConfig,
        description="Award amounts of a portfolio: counting across goals, currencies (used when records have amounts).",
    )
    # Not from the file: where it was read, so relative paths and messages can name it.
    config_path: Path = Field(default=Path(CONFIG_FILE_NAME), exclude=True, description="(set by the loader)")

    @property
    def base_dir(self) -> Path:
        return self.config_path.parent

    @property
    def output_dir(self) -> Path:
        return self.report.output


# --- loading -------------------------------------------------------------------------------


def load_config(path: Path | str, output: Path | None = None) -> Config:
    """Read, validate and resolve a config file; raise ConfigError listing every problem."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ConfigError(Problem(path, None, "", "config file not found")) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ConfigError(Problem(path, None, "", f"cannot read config file: {exc}")) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        match = re.search(r"line (\d+)", str(exc))
        raise ConfigError(
            Problem(path, int(match.group(1)) if match else None, "", f"not valid TOML: {exc}")
        ) from None

    lines = _key_lines(text)
    # File checks run on the raw values too, so a bad path is reported beside schema problems.
    problems = _missing_files(data, path, lines)
    try:
        config = Config.model_validate({**data, "config_path": path.resolve()})
    except ValidationError as exc:
        errors = exc.errors()
        # A table of [[inputs]] that fails validation also leaves the list "too short"; its own problem says more.
        inner = {err["loc"][0] for err in errors if len(err["loc"]) > 1 and isinstance(err["loc"][1], int)}
        errors = [err for err in errors if not (err["type"] == "too_short" and err["loc"] and err["loc"][0] in inner)]
        problems.extend(_problem_from_error(path, lines, err) for err in errors)
        config = None
    if config is not None:
        config = _resolve_paths(config, path, lines, problems, output)
    if problems:
        raise ConfigError(sorted(problems, key=lambda p: (p.line or 0, p.key)))
    return config


#: Config keys naming files that must exist (dotted; "inputs[].path" means every input).
_FILE_KEYS = (
    "inputs[].path", "report.logo", "departments.staff_map", "score.thresholds_file",
    "validation.labelled_sample", "validation.review_file", "funding.conversion_table",
)


def _missing_files(data: dict, path: Path, lines: dict[str, int]) -> list[Problem]:
    base = path.resolve().parent
    found: list[tuple[str, object]] = []
    for key in _FILE_KEYS:
        section, _, name = key.partition(".")
        if section.endswith("[]"):
            items = data.get(section[:-2])
            if isinstance(items, list):
                found.extend(
                    (f"{section[:-2]}[{i}].{name}", item.get(name)) for i, item in enumerate(items) if isinstance(item, dict)
                )
        elif isinstance(data.get(section), dict):
            found.append((key, data[section].get(name)))
    score = data.get("score")
    if isinstance(score, dict):
        for name, builtin in (("framework", BUILTIN_FRAMEWORK), ("model", BUILTIN_MODEL)):
            if isinstance(score.get(name), str) and score[name] != builtin:
                found.append((f"score.{name}", score[name]))
    problems = []
    for key, value in found:
        if not isinstance(value, str) or re.match(r"^[a-zA-Z][a-zA-Z0-9+.-]*://", value):
            continue  # type and URL problems are the schema's to report
        full = Path(value) if Path(value).is_absolute() else base / value
        if not full.exists():
            problems.append(Problem(path, _line_of(lines, key), key, f"file not found: {full}"))
    return problems


def _resolve_paths(
    config: Config, path: Path, lines: dict[str, int], problems: list[Problem], output: Path | None
) -> Config:
    base = path.resolve().parent

    def resolve(value: Path | None, key: str, must_exist: bool) -> Path | None:
        # Existence was checked on the raw values (`_missing_files`); here paths only resolve.
        if value is None:
            return None
        value = value.expanduser()  # "~/reports" means the home folder, as in a shell
        return Path(os.path.normpath(value if value.is_absolute() else base / value))

    inputs = tuple(
        item.model_copy(update={"path": resolve(item.path, f"inputs[{i}].path", True)})
        for i, item in enumerate(config.inputs)
    )
    # --out is relative to the working folder, report.output to the config's; links are not followed
    # here (a link loop is reported by the output-folder check, not raised).
    out_dir = (Path(os.path.normpath(os.path.abspath(output.expanduser()))) if output is not None
               else resolve(config.report.output, "report.output", False))
    theme = config.report.theme
    if "/" in theme or "\\" in theme or theme.startswith("."):
        # A theme folder of the user's own resolves against the config folder like every other path.
        theme = str(resolve(Path(theme), "report.theme", False))
    report = config.report.model_copy(
        update={"output": out_dir, "logo": resolve(config.report.logo, "report.logo", True), "theme": theme}
    )
    departments = config.departments.model_copy(
        update={"staff_map": resolve(config.departments.staff_map, "departments.staff_map", True)}
    )
    framework = config.score.framework
    if framework != BUILTIN_FRAMEWORK:
        framework = str(resolve(Path(framework), "score.framework", True))
    model = config.score.model
    if model != BUILTIN_MODEL:
        model = str(resolve(Path(model), "score.model", True))
    score = config.score.model_copy(
        update={
            "framework": framework,
            "model": model,
            "cache": resolve(config.score.cache, "score.cache", False),
            "thresholds_file": resolve(config.score.thresholds_file, "score.thresholds_file", True),
        }
    )
    validation = config.validation.model_copy(
        update={
            "labelled_sample": resolve(config.validation.labelled_sample, "validation.labelled_sample", True),
            "review_file": resolve(config.validation.review_file, "validation.review_file", True),
        }
    )
    funding = config.funding.model_copy(
        update={"conversion_table": resolve(config.funding.conversion_table, "funding.conversion_table", True)}
    )

    def problem(key: str, message: str) -> Problem:
        return Problem(path, _line_of(lines, key), key, message)

    from reporter.ingest.formats import EXTENSIONS  # here, not at the top: ingest imports this module

    formats = [item.format or EXTENSIONS.get(item.path.suffix.lower()) for item in inputs]
    problems.extend(format_option_problems(inputs, formats, problem))
    if score.cache is not None and config.score.use_cache:
        problems.extend(cache_problems(score.cache, problem))
    problems.extend(conversion_table_problems(funding, problem))
    read_files = [(f"inputs[{i}].path", item.path) for i, item in enumerate(inputs)]
    read_files += [("departments.staff_map", departments.staff_map), ("score.thresholds_file", score.thresholds_file),
                   ("score.cache", score.cache), ("validation.labelled_sample", validation.labelled_sample),
                   ("validation.review_file", validation.review_file), ("report.logo", report.logo),
                   ("funding.conversion_table", funding.conversion_table)]
    problems.extend(output_folder_problems(out_dir, "--out" if output is not None else "report.output", read_files, problem))
    for year in config.report.comparison_years:
        if year >= config.report.reporting_year:
            problems.append(
                Problem(
                    path,
                    _line_of(lines, "report.comparison_years"),
                    "report.comparison_years",
                    f"comparison years must be earlier than the reporting year {config.report.reporting_year}, got {year}",
                )
            )
    return config.model_copy(
        update={
            "report": report,
            "inputs": inputs,
            "departments": departments,
            "score": score,
            "validation": validation,
            "funding": funding,
        }
    )


def problem_at(config: Config) -> Callable[[str, str], Problem]:
    """`problem(key, message)` -> a Problem at the key's line of the config file (for checks after loading)."""
    try:
        lines = _key_lines(config.config_path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError):
        lines = {}
    return lambda key, message: Problem(config.config_path, _line_of(lines, key), key, message)


def intake_problems(config: Config, years_present: set[int], n_kept: int,
                    files: tuple[tuple[str, int, str], ...]) -> list[Problem]:
    """What stops a build after intake, before the model loads: an input that yielded no record (unless
    its allow_empty is set), a year in scope without a kept publication (unless report.allow_empty_years)."""
    path = config.config_path
    try:
        lines = _key_lines(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError):
        lines = {}
    problems = []
    for i, (item, (name, n_read, note)) in enumerate(zip(config.inputs, files)):
        if n_read == 0 and not item.allow_empty:
            key = f"inputs[{i}].path"
            problems.append(Problem(path, _line_of(lines, key), key, (
                f"{name}: {note or 'no records found'}; if this export may be empty, set allow_empty = true for it"
            )))
    report = config.report
    if report.allow_empty_years:
        return problems
    found = ", ".join(str(y) for y in sorted(years_present)) or "none"
    nouns = report.nouns
    fix = "remove it, add the export that holds it, or set report.allow_empty_years = true"
    for key, years in (("report.reporting_year", (report.reporting_year,)),
                       ("report.comparison_years", report.comparison_years)):
        for year in years:
            if year not in years_present:
                problems.append(Problem(path, _line_of(lines, key), key, (
                    f"no {nouns.singular} from {year} among the {n_kept} kept (years in scope with {nouns.plural}: "
                    f"{found}); {fix}"
                )))
    return problems


def _problem_from_error(path: Path, lines: dict[str, int], err: dict[str, Any]) -> Problem:
    loc = [part for part in err["loc"] if part != "config_path"]
    key = _dotted(loc)
    kind = err["type"]
    if kind == "extra_forbidden":
        parent = _model_at(loc[:-1])
        known = list(parent.model_fields) if parent is not None else []
        known = [k for k in known if k != "config_path"]
        message = f"unknown key{_hint(str(loc[-1]), known)}"
    elif kind == "missing":
        message = "required key is missing"
    else:
        message = _plain_message(err)
    line = _line_of(lines, key)
    return Problem(path, line, key, message)


def _plain_message(err: dict[str, Any]) -> str:
    msg = err["msg"]
    for prefix in ("Value error, ", "Assertion failed, "):
        if msg.startswith(prefix):
            return msg[len(prefix):]
    found = err.get("input")
    if isinstance(found, (str, int, float, bool)):
        return f"{msg[0].lower()}{msg[1:]}, got {found!r}"
    return msg[0].lower() + msg[1:]


def _hint(word: str, choices: list[str] | tuple[str, ...]) -> str:
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


def _model_at(loc: list[Any]) -> type[BaseModel] | None:
    """Walk the schema along a pydantic error location to the model that owns the last key."""
    model: type[BaseModel] | None = Config
    for part in loc:
        if isinstance(part, int) or model is None:
            continue
        info = model.model_fields.get(str(part))
        if info is None:
            return None
        model = _model_in(info.annotation)
    return model


def _model_in(annotation: Any) -> type[BaseModel] | None:
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return annotation
    for arg in getattr(annotation, "__args__", ()) or ():
        found = _model_in(arg)
        if found is not None:
            return found
    return None


def _dotted(loc: list[Any]) -> str:
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += ("." if out else "") + str(part)
    return out


_HEADER = re.compile(r"^\s*(\[\[?)\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]\]?\s*(#.*)?$")
_KEY = re.compile(r"^\s*([A-Za-z0-9_\-]+|\"[^\"]+\")\s*=")


def _key_lines(text: str) -> dict[str, int]:
    """Map dotted keys ("inputs[1].path", "score.threshold") to the line that sets them."""
    lines: dict[str, int] = {}
    table = ""
    array_counts: dict[str, int] = {}
    for number, line in enumerate(text.splitlines(), start=1):
        header = _HEADER.match(line)
        if header:
            name = header.group(2).replace('"', "").replace(" ", "")
            if header.group(1) == "[[":
                index = array_counts.get(name, -1) + 1
                array_counts[name] = index
                table = f"{name}[{index}]"
            else:
                parent, _, child = name.rpartition(".")
                if parent in array_counts:
                    table = f"{parent}[{array_counts[parent]}].{child}"
                else:
                    table = name
            lines.setdefault(table, number)
            continue
        key = _KEY.match(line)
        if key:
            name = key.group(1).strip('"')
            lines.setdefault(f"{table}.{name}" if table else name, number)
    return lines


def _line_of(lines: dict[str, int], key: str) -> int | None:
    """Line of a key, else of its nearest enclosing table."""
    probe = key
    while probe:
        if probe in lines:
            return lines[probe]
        cut = max(probe.rfind("."), probe.rfind("["))
        probe = probe[:cut] if cut > 0 else ""
    return None
