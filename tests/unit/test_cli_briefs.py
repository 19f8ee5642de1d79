"""`build --briefs/--no-briefs` against report.briefs: the flag wins when given, the config when not."""

from pathlib import Path

import pytest
from click.testing import CliRunner

import reporter.pipeline
from reporter.cli import main
from reporter.errors import ReporterError, Problem

CONFIG = """\
[report]
institution = "Test University"
home_country = "IE"
reporting_year = 2025
{briefs}

[[inputs]]
path = "a.bib"
"""


@pytest.fixture
def seen(monkeypatch):
    """The config `build` hands to the pipeline; the run stops there (this tests the command line only)."""
    configs = []

    def stop(config, **_options):
        configs.append(config)
        raise ReporterError(Problem(Path("waymark.toml"), None, "", "stopped before the run"))

    monkeypatch.setattr(reporter.pipeline, "run", stop)
    return configs


@pytest.mark.parametrize(("in_config", "flag", "expected"), [
    ("", [], False),
    ("briefs = true", [], True),
    ("briefs = true", ["--no-briefs"], False),
    ("", ["--briefs"], True),
])
def test_the_flag_overrides_the_config_only_when_given(tmp_path, seen, in_config, flag, expected):
    (tmp_path / "a.bib").write_text("", encoding="utf-8")
    path = tmp_path / "waymark.toml"
    path.write_text(CONFIG.format(briefs=in_config), encoding="utf-8")
    result = CliRunner().invoke(main, ["build", str(path), "-q", *flag])
    assert result.exit_code == 1 and "stopped before the run" in result.output
    assert seen[0].report.briefs is expected
