"""Config validation: every problem at once, each with file, line and key."""

from pathlib import Path

import pytest
from pydantic import BaseModel

from reporter.config import Config, load_config
from reporter.errors import ConfigError

GOOD = """\
[report]
institution = "Test University"
home_country = "ie"
reporting_year = 2025
comparison_years = [2023, 2024]

[[inputs]]
path = "a.bib"
"""


def _write(tmp_path: Path, text: str) -> Path:
    (tmp_path / "a.bib").write_text("")
    path = tmp_path / "waymark.toml"
    path.write_text(text)
    return path


def _problems(path: Path) -> list[str]:
    with pytest.raises(ConfigError) as caught:
        load_config(path)
    return str(caught.value).splitlines()


def test_good_config_resolves_paths_against_its_folder(tmp_path):
    config = load_config(_write(tmp_path, GOOD))
    assert config.inputs[0].path == tmp_path / "a.bib"
    assert config.report.output == tmp_path / "output"
    assert config.report.home_country == "IE"
    assert config.report.years == (2023, 2024, 2025)
    assert config.score.cache == tmp_path / ".waymark-cache" / "embeddings.sqlite"


def test_every_problem_is_listed_at_once_with_line_and_key(tmp_path):
    text = GOOD.replace('"ie"', '"XX"') + '\n[[inputs]]\npath = "missing.ris"\nformt = "ris"\n\n[score]\nthreshold = 2\ntreshold = 1\n'
    path = _write(tmp_path, text)
    assert _problems(path) == [
        f"{path}:3: report.home_country: expected an ISO 3166-1 alpha-2 code such as 'IE' or 'DE', got 'XX'",
        f"{path}:11: inputs[1].path: file not found: {tmp_path / 'missing.ris'}",
        f"{path}:12: inputs[1].formt: unknown key (did you mean 'format'?)",
        f"{path}:15: score.threshold: input should be less than or equal to 1, got 2",
        f"{path}:16: score.treshold: unknown key (did you mean 'threshold'?)",
    ]


def test_missing_required_key_and_bad_choice(tmp_path):
    text = GOOD.replace('institution = "Test University"\n', "") + '\n[analysis]\ncounting = "half"\n'
    path = _write(tmp_path, text)
    assert _problems(path) == [
        f"{path}:1: report.institution: required key is missing",
        f"{path}:10: analysis.counting: input should be 'full' or 'fractional', got 'half'",
    ]


def test_logo_url_is_refused(tmp_path):
    path = _write(tmp_path, GOOD.replace("comparison_years", 'logo = "https://example.org/l.png"\ncomparison_years'))
    assert _problems(path) == [
        f"{path}:5: report.logo: expected a local image file, got the URL 'https://example.org/l.png'; download it and give its path"
    ]


def test_comparison_years_must_precede_reporting_year(tmp_path):
    path = _write(tmp_path, GOOD.replace("[2023, 2024]", "[2024, 2026]"))
    assert _problems(path) == [
        f"{path}:5: report.comparison_years: comparison years must be earlier than the reporting year 2025, got 2026"
    ]


def test_toml_syntax_error_names_the_line(tmp_path):
    path = _write(tmp_path, GOOD + "\n[score\nthreshold = 0.4\n")
    (line,) = _problems(path)
    assert line.startswith(f"{path}:10: not valid TOML")


def test_missing_config_file(tmp_path):
    assert _problems(tmp_path / "nope.toml") == [f"{tmp_path / 'nope.toml'}: config file not found"]


def _fields(model: type[BaseModel], prefix: str = ""):
    for name, info in model.model_fields.items():
        yield f"{prefix}{name}", info
        annotation = info.annotation
        for candidate in (annotation, *getattr(annotation, "__args__", ())):
            if isinstance(candidate, type) and issubclass(candidate, BaseModel):
                yield from _fields(candidate, f"{prefix}{name}.")


def test_every_config_key_is_documented():
    undocumented = [key for key, info in _fields(Config) if not (info.description or "").strip()]
    assert undocumented == [], "every config key needs a description (it is the documentation)"
