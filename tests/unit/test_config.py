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


# --- where a build writes (issue 15): checked when the config loads, before any input is read ---


def test_output_folder_holding_the_inputs_is_refused_naming_each_key(tmp_path):
    (tmp_path / "data").mkdir()
    (tmp_path / "data" / "scores.csv").write_text("title\nx\n")
    path = _write(tmp_path, GOOD.replace("comparison_years = [2023, 2024]\n", 'comparison_years = [2023, 2024]\noutput = "."\n')
                  + '\n[[inputs]]\npath = "data/scores.csv"\n')
    inside = "lies inside the output folder {out} (report.output), which the build fills with its own files; " \
             "move the file or choose another output folder"
    assert _problems(path) == [
        f"{path}: score.cache: {tmp_path / '.waymark-cache' / 'embeddings.sqlite'} " + inside.format(out=tmp_path),
        f"{path}:9: inputs[0].path: {tmp_path / 'a.bib'} " + inside.format(out=tmp_path),
        f"{path}:12: inputs[1].path: {tmp_path / 'data' / 'scores.csv'} " + inside.format(out=tmp_path),
    ]


def test_review_file_inside_the_output_folder_is_refused(tmp_path):
    (tmp_path / "out").mkdir()
    (tmp_path / "out" / "review.csv").write_text("record_id,goal,decision\n")
    path = _write(tmp_path, GOOD.replace("comparison_years = [2023, 2024]\n", 'comparison_years = [2023, 2024]\noutput = "out"\n')
                  + '\n[validation]\nreview_file = "out/review.csv"\n')
    [problem] = _problems(path)
    assert problem.startswith(f"{path}:12: validation.review_file: {tmp_path / 'out' / 'review.csv'} lies inside the output folder")


def test_output_naming_an_existing_file_is_refused_for_the_config_and_for_out(tmp_path):
    (tmp_path / "report.pdf").write_text("")
    path = _write(tmp_path, GOOD.replace("comparison_years = [2023, 2024]\n", 'comparison_years = [2023, 2024]\noutput = "report.pdf"\n'))
    assert _problems(path) == [
        f"{path}:6: report.output: {tmp_path / 'report.pdf'} is a file; expected a folder for the report and its exports"]
    with pytest.raises(ConfigError) as caught:
        load_config(_write(tmp_path, GOOD), output=tmp_path / "report.pdf")
    assert str(caught.value) == (
        f"{tmp_path / 'waymark.toml'}: --out: {tmp_path / 'report.pdf'} is a file; expected a folder for the report and its exports")


def test_output_under_a_link_loop_is_a_message_not_a_traceback(tmp_path):
    (tmp_path / "loop").symlink_to(tmp_path / "loop")
    with pytest.raises(ConfigError) as caught:
        load_config(_write(tmp_path, GOOD), output=tmp_path / "loop" / "x")
    assert str(caught.value).endswith(f"--out: cannot create {tmp_path / 'loop' / 'x'}: {tmp_path / 'loop'} "
                                      "is a link that leads nowhere (broken, or a loop)")


def test_tilde_means_the_home_folder(tmp_path, monkeypatch):
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    path = _write(tmp_path, GOOD.replace("comparison_years = [2023, 2024]\n", 'comparison_years = [2023, 2024]\noutput = "~/reports"\n'))
    assert load_config(path).report.output == tmp_path / "home" / "reports"
    assert load_config(path, output=Path("~/elsewhere")).report.output == tmp_path / "home" / "elsewhere"


def test_blank_institution_and_impossible_comparison_years_are_refused(tmp_path):
    path = _write(tmp_path, GOOD.replace('"Test University"', '"  "').replace("[2023, 2024]", "[-5, 2024]"))
    assert _problems(path) == [
        f"{path}:2: report.institution: expected a name to print on the cover, got an empty text",
        f"{path}:5: report.comparison_years[0]: input should be greater than or equal to 1900, got -5",
    ]


def test_empty_output_is_refused_rather_than_meaning_the_config_folder(tmp_path):
    path = _write(tmp_path, GOOD.replace("comparison_years = [2023, 2024]\n", 'comparison_years = [2023, 2024]\noutput = ""\n'))
    assert _problems(path) == [
        f"{path}:6: report.output: expected a folder for the report, got an empty text (use \".\" for the config's folder)"]


def test_csv_only_options_on_a_bibtex_or_ris_input_are_refused(tmp_path):
    (tmp_path / "b.ris").write_text("")
    text = GOOD.replace('path = "a.bib"\n', 'path = "a.bib"\ncolumns = { title = "Output Title" }\n') + \
        '\n[[inputs]]\npath = "b.ris"\ndelimiter = ";"\n\n[[inputs]]\npath = "a.bib"\nformat = "csv"\ndelimiter = ";"\n'
    path = _write(tmp_path, text)
    assert _problems(path) == [
        f"{path}:9: inputs[0].columns: applies to CSV files only, but a.bib is read as bibtex; remove it, "
        'or set format = "csv" if the file is a CSV export',
        f"{path}:13: inputs[1].delimiter: applies to CSV files only, but b.ris is read as ris; remove it, "
        'or set format = "csv" if the file is a CSV export',
    ]


def test_a_cache_path_that_is_not_a_cache_is_refused_before_scoring(tmp_path):
    (tmp_path / "notes.txt").write_text("my notes, not a database\n")
    path = _write(tmp_path, GOOD + '\n[score]\ncache = "notes.txt"\n')
    assert _problems(path) == [
        f"{path}:11: score.cache: {tmp_path / 'notes.txt'} is not an embedding cache (file is not a database); "
        "point score.cache at another file, or delete this one if it is an old cache"]
    (tmp_path / "folder").mkdir()
    path = _write(tmp_path, GOOD + '\n[score]\ncache = "folder"\n')
    assert _problems(path) == [f"{path}:11: score.cache: {tmp_path / 'folder'} is a folder; expected the cache file's path"]


# --- department briefs (issue 16) ---


def test_briefs_are_off_by_default_and_take_true_or_false_only(tmp_path):
    assert load_config(_write(tmp_path, GOOD)).report.briefs is False
    assert load_config(_write(tmp_path, GOOD.replace("reporting_year = 2025", "reporting_year = 2025\nbriefs = true"))).report.briefs
    path = _write(tmp_path, GOOD.replace("reporting_year = 2025", 'reporting_year = 2025\nbriefs = "yes"'))
    assert _problems(path) == [f"{path}:5: report.briefs: expected true or false (without quotes), got 'yes'"]
