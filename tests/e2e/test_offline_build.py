"""The whole build (intake, language detection, model, scoring, charts, PDF) with sockets blocked."""

import json

import pytest

from tests.e2e.small_project import make_small_project
from tests.unit.test_offline import GUARD, run_offline

pytestmark = pytest.mark.model

BUILD = GUARD + r"""
from reporter.cli import main
try:
    main(["build", "waymark.toml", "--out", "out", "-q"], standalone_mode=False)
finally:
    print(json.dumps({"attempts": attempts}))
"""

def test_full_build_never_tries_the_network(tmp_path):
    make_small_project(tmp_path, 25)
    done = run_offline(BUILD, tmp_path, timeout=600)
    assert done.returncode == 0, done.stderr[-3000:]
    result = json.loads(done.stdout.strip().splitlines()[-1])
    assert result["attempts"] == [], "something tried the network during the build"
    assert (tmp_path / "out" / "report.pdf").stat().st_size > 0
    assert (tmp_path / "out" / "report.html").stat().st_size > 0
