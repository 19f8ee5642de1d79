"""A real build as a user runs it, in its own process: what the console shows, the mode of every
file written, and what a rebuild from the cache leaves unloaded (issue 16, items 6-8)."""

from __future__ import annotations

import os
import re
import stat
import subprocess
import sys
from pathlib import Path

import pytest

from tests.e2e.small_project import make_small_project

pytestmark = pytest.mark.model

# The model's libraries; scipy.stats with the libraries that import it (about a second: the statistics
# and metrics are computed in reporter/analyse without them); Altair (every chart is found by its arguments).
HEAVY = ("torch", "onnxruntime", "transformers", "sentence_transformers", "scipy.stats", "sklearn", "statsmodels",
         "altair")
# One sentence far beyond the model's 512 word pieces: scoring splits it before encoding, so the
# tokenizer's "sequence length is longer than the specified maximum" is not the user's concern.
LONG_RECORD = (
    "TY  - JOUR\nID  - 9001\nTI  - A very long unpunctuated abstract about river floods\n"
    "AU  - Moretti, Lorenzo\nPY  - 2024\nAB  - "
    + " ".join(["flood water levels rose across the river basin towns and farms"] * 70)
    + "\nER  - \n"
)
NOT_AT_DEFAULT = ("Token indices sequence length", "Step ", "INFO", "weasyprint", "fontTools",
                  "Loading weights", "Warning", "warn(")
# Runs the CLI, then says which heavy libraries the process imported.
RUN = (
    "import sys\nfrom reporter.cli import main\n"
    "try:\n    main(sys.argv[1:], standalone_mode=False)\n"
    f"finally:\n    print('imported:', sorted(m for m in {HEAVY!r} if m in sys.modules))\n"
)


def _build(folder: Path, out: str, umask: int, *flags: str) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-c", RUN, "build", "waymark.toml", "--out", out, *flags],
        cwd=folder, capture_output=True, text=True, timeout=900, preexec_fn=lambda: os.umask(umask),
    )


@pytest.fixture(scope="module")
def project(tmp_path_factory) -> Path:
    folder = make_small_project(tmp_path_factory.mktemp("quiet") / "project", 12)
    with (folder / "publications-2024.ris").open("a", encoding="utf-8") as ris:
        ris.write("\n" + LONG_RECORD)
    return folder


@pytest.fixture(scope="module")
def cold(project):
    done = _build(project, "out-cold", 0o022)
    assert done.returncode == 0, done.stdout[-2000:] + done.stderr[-4000:]
    return done


@pytest.fixture(scope="module")
def warm_verbose(project, cold):
    done = _build(project, "out-warm", 0o077, "-v")
    assert done.returncode == 0, done.stdout[-2000:] + done.stderr[-4000:]
    return done


def _progress_lines(stderr: str) -> list[str]:
    # tqdm redraws its bar with carriage returns; each redraw is a piece of one line.
    return [piece.strip() for line in stderr.splitlines() for piece in line.split("\r") if piece.strip()]


def test_default_verbosity_shows_progress_lines_and_nothing_from_other_libraries(cold):
    lines = _progress_lines(cold.stderr)
    for line in lines:
        assert not any(mark in line for mark in NOT_AT_DEFAULT), line
    ours = [line for line in lines if not line.startswith("Scoring:")]  # the scoring bar's redraws
    assert ours == ["Reading 1 input file", "Detecting the language of 12 publications",  # one gives its own
                    "Scoring 13 publications", "Exporting the model with int8 weights (once per cache folder)",
                    "Drawing the charts", "Laying out report.pdf"]
    assert "Scored 13 publications" in cold.stdout


def test_verbose_shows_third_party_logging_and_the_time_of_each_stage(warm_verbose):
    err = warm_verbose.stderr
    assert "INFO weasyprint.progress: Step 5 - Creating layout" in err
    times = [line for line in err.splitlines() if line.startswith("seconds per stage:")]
    assert len(times) == 1 and "report/pdf" in times[0] and "intake" in times[0]


def _modes(folder: Path) -> dict[str, int]:
    return {str(p.relative_to(folder)): stat.S_IMODE(p.stat().st_mode) for p in folder.rglob("*") if p.is_file()}


def test_files_follow_the_umask(project, cold, warm_verbose):
    for out, expected in (("out-cold", 0o644), ("out-warm", 0o600)):
        modes = _modes(project / out)
        assert {"report.pdf", "report.html", "manifest.json", "intake-log.csv", "data/scores.csv"} <= set(modes)
        assert {name: oct(mode) for name, mode in modes.items() if mode != expected} == {}, out


def test_a_rebuild_from_the_cache_loads_neither_the_model_nor_the_language_detector(cold, warm_verbose):
    assert "imported: []" in warm_verbose.stdout
    assert "imported: []" not in cold.stdout, "the cold build needs the model"
    assert "13 publications' results reused" in warm_verbose.stdout
    # lingua itself imports in milliseconds; its language models load only to detect.
    assert "Detecting the language" not in warm_verbose.stderr


def test_a_rebuild_prints_the_same_pdf_from_pages_kept_in_the_cache(project, cold, warm_verbose):
    """The warm build lays out only the cover (its build time changed) and keeps every section's pages
    (render/pdf_parts.py); a reader sees the cold build's report, page for page, with the same links
    and bookmarks."""
    from pypdf import PdfReader

    def read(out: str) -> dict:
        reader = PdfReader(project / out / "report.pdf")
        pages = [re.sub(r"Made on \S+", "Made on <time>", p.extract_text()) for p in reader.pages]
        return {
            "pages": pages,
            "dests": {n: reader.get_destination_page_number(d) for n, d in reader.named_destinations.items()},
            "outline": [item.title for item in reader.outline if not isinstance(item, list)],
        }

    cold_pdf, warm_pdf = read("out-cold"), read("out-warm")
    assert warm_pdf == cold_pdf
    assert len(cold_pdf["pages"]) > 10 and "Page 3 of" in cold_pdf["pages"][2]
    assert cold_pdf["dests"]["method"] > cold_pdf["dests"]["at-a-glance"] >= 1
