"""The console of one command: our progress lines at default verbosity, other libraries' only with -v."""

import logging
import os
import warnings

import pytest

from reporter.console import console, levels
from reporter.stages import format_times, stage, timed_run

THIRD_PARTY = "weasyprint.progress"  # a library logger that reports each layout step at INFO


def _emit_everything() -> None:
    logging.getLogger(THIRD_PARTY).info("Step 5 - Creating layout - Page 3")
    logging.getLogger("fontTools.subset").warning("glyph names dropped")
    logging.getLogger("reporter.pipeline").info("Scoring 12 publications")
    logging.getLogger("reporter.render.pdf").warning("report.pdf: refused to fetch http://x")
    warnings.warn_explicit("a library's advice", FutureWarning, "lib.py", 1, module="somelib")


def test_default_shows_our_lines_and_warnings_only(capsys):
    with console(verbose=0):
        _emit_everything()
    err = capsys.readouterr().err.splitlines()
    assert err == ["Scoring 12 publications", "WARNING report.pdf: refused to fetch http://x"]


def test_quiet_shows_our_warnings_only(capsys):
    with console(quiet=True):
        _emit_everything()
    assert capsys.readouterr().err.splitlines() == ["WARNING report.pdf: refused to fetch http://x"]


def test_verbose_shows_third_party_logging_and_warnings_by_name(capsys):
    with console(verbose=1):
        _emit_everything()
    err = capsys.readouterr().err
    assert "INFO weasyprint.progress: Step 5 - Creating layout - Page 3" in err
    assert "WARNING fontTools.subset: glyph names dropped" in err
    assert "Scoring 12 publications" in err
    assert "a library's advice" in err  # Python warnings as log lines


def test_everything_is_put_back_afterwards(monkeypatch):
    monkeypatch.delenv("HF_HUB_DISABLE_PROGRESS_BARS", raising=False)
    root, own = logging.getLogger(), logging.getLogger("reporter")

    def state():
        return (root.level, list(root.handlers), own.level, os.environ.get("HF_HUB_DISABLE_PROGRESS_BARS"),
                list(warnings.filters), warnings.showwarning)

    before = state()
    for verbose in (0, 1):
        with console(verbose=verbose):
            assert state() != before
        assert state() == before


def test_a_setting_the_user_made_in_the_environment_wins(monkeypatch):
    monkeypatch.setenv("TRANSFORMERS_VERBOSITY", "debug")
    with console(verbose=0):
        assert os.environ["TRANSFORMERS_VERBOSITY"] == "debug"
    assert os.environ["TRANSFORMERS_VERBOSITY"] == "debug"


@pytest.mark.parametrize("verbose, quiet, expected", [
    (0, False, (logging.INFO, logging.ERROR)),
    (1, False, (logging.INFO, logging.INFO)),
    (2, False, (logging.DEBUG, logging.DEBUG)),
    (0, True, (logging.WARNING, logging.ERROR)),
])
def test_levels(verbose, quiet, expected):
    assert levels(verbose, quiet) == expected


def test_stages_nest_and_are_listed_in_the_order_they_start(capsys):
    with console(verbose=0), timed_run() as times:
        with stage("report", "Writing the report"):
            with stage("pdf", "Laying out report.pdf"):
                pass
            with stage("data"):
                pass
        with stage("report"):  # a stage met twice adds up
            pass
    assert list(times.seconds) == ["report", "report/pdf", "report/data"]
    assert all(seconds >= 0 for seconds in times.seconds.values())
    assert times.seconds["report"] >= times.seconds["report/pdf"] + times.seconds["report/data"]
    assert capsys.readouterr().err.splitlines() == ["Writing the report", "Laying out report.pdf"]
    assert format_times({"intake": 1.234, "intake/language": 0.5}) == (
        "seconds per stage: intake 1.23, intake/language 0.50")


def test_a_stage_outside_a_timed_run_only_announces_itself(capsys):
    with console(verbose=0), stage("score", "Scoring 3 publications"):
        pass
    assert capsys.readouterr().err == "Scoring 3 publications\n"
