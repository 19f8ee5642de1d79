"""Interruption: kill -9 during scoring, then run again.

The second run resumes from the SQLite cache and ends with outputs byte-identical to an
uninterrupted run; a killed build leaves the previous report as it was.
"""

import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from tests.e2e.small_project import make_small_project

pytestmark = pytest.mark.model

COMPARED = ("data/scores.csv", "data/evidence.csv", "data/findings.json", "intake-log.csv")

N_RECORDS = 30  # enough sentences for several cache batches, few enough to keep the test short


def _project(tmp_path: Path, cache: str) -> Path:
    extra = f'\n[score]\ncache = "{cache}.sqlite"\nbatch_size = 32\n'
    return make_small_project(tmp_path / cache, N_RECORDS, extra)


def _n_descriptors() -> int:
    from reporter.score.framework import load_framework

    framework = load_framework("un-sdg-2030")
    return sum(len(goal.descriptors) for goal in framework.goals) + len(framework.background)


def _build(folder: Path) -> subprocess.Popen:
    return subprocess.Popen(
        [sys.executable, "-m", "reporter", "build", str(folder / "waymark.toml"), "-q"],
        stdout=subprocess.PIPE, stderr=subprocess.STDOUT, cwd=folder,
    )


def _cached_rows(path: Path) -> int:
    if not path.exists():
        return 0
    try:
        with sqlite3.connect(path, timeout=0.1) as db:
            return db.execute("SELECT COUNT(*) FROM embeddings").fetchone()[0]
    except sqlite3.Error:
        return 0


def _kill_during_scoring(folder: Path, cache: Path, min_rows: int) -> int:
    process = _build(folder)
    deadline = time.monotonic() + 240
    while _cached_rows(cache) < min_rows:
        assert process.poll() is None, "build ended before it could be interrupted"
        assert time.monotonic() < deadline, "scoring never started"
        time.sleep(0.05)
    os.kill(process.pid, signal.SIGKILL)
    process.wait()
    return _cached_rows(cache)


def test_killed_run_resumes_and_matches_an_uninterrupted_run(tmp_path):
    clean = _project(tmp_path, "clean")
    done = _build(clean)
    assert done.wait(timeout=600) == 0, done.stdout.read().decode()

    resumed = _project(tmp_path, "resumed")
    cache = resumed / "resumed.sqlite"
    # Descriptors are embedded first; wait until the first batch of sentences is stored too.
    floor = _n_descriptors() + 32
    kept = _kill_during_scoring(resumed, cache, min_rows=floor)
    assert kept >= floor, "work finished before the kill stays in the cache"
    assert not (resumed / "out" / "report.html").exists(), "no report from a killed run"

    again = _build(resumed)
    output = again.communicate(timeout=600)[0].decode()
    assert again.returncode == 0, output
    hits = int(output.split(" from the cache")[0].rsplit(", ", 1)[1])
    assert hits >= kept, f"the second run reused everything the killed run stored ({hits} hits, {kept} rows kept)"
    for name in COMPARED:
        assert (resumed / "out" / name).read_bytes() == (clean / "out" / name).read_bytes(), name


def test_killed_build_leaves_the_previous_report_intact(tmp_path):
    folder = _project(tmp_path, "previous")
    first = _build(folder)
    assert first.wait(timeout=600) == 0
    before = {name: (folder / "out" / name).read_bytes() for name in ("report.html", "report.pdf", *COMPARED)}
    # A fresh cache makes the second build slow enough to be killed mid-way.
    (folder / "previous.sqlite").unlink()
    for suffix in ("-wal", "-shm"):
        Path(str(folder / "previous.sqlite") + suffix).unlink(missing_ok=True)
    _kill_during_scoring(folder, folder / "previous.sqlite", min_rows=_n_descriptors() + 32)
    after = {name: (folder / "out" / name).read_bytes() for name in before}
    assert after == before
    assert not list((folder / "out").rglob("*.tmp")), "no temporary files left behind"
