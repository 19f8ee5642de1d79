"""The whole build (intake, language detection, model, scoring, charts, PDF) with sockets blocked."""

import json
import shutil
from pathlib import Path

import pytest

from tests.unit.test_offline import GUARD, run_offline

pytestmark = pytest.mark.model

REPO = Path(__file__).resolve().parents[2]

BUILD = GUARD + r"""
from reporter.cli import main
try:
    main(["build", "waymark.toml", "--out", "out", "-q"], standalone_mode=False)
finally:
    print(json.dumps({"attempts": attempts}))
"""

CONFIG = """\
[report]
institution = "Kestrel Heath University"
home_country = "IE"
reporting_year = 2024
output = "out"

[[inputs]]
path = "publications-2024.ris"

[departments]
staff_map = "staff.csv"
"""


def test_full_build_never_tries_the_network(tmp_path):
    shutil.copy(REPO / "example_input" / "staff.csv", tmp_path / "staff.csv")
    ris = (REPO / "example_input" / "publications-2024.ris").read_text(encoding="utf-8")
    (tmp_path / "publications-2024.ris").write_text("ER  -".join(ris.split("ER  -")[:25]) + "ER  -\n", encoding="utf-8")
    (tmp_path / "waymark.toml").write_text(CONFIG)
    done = run_offline(BUILD, tmp_path, timeout=600)
    assert done.returncode == 0, done.stderr[-3000:]
    result = json.loads(done.stdout.strip().splitlines()[-1])
    assert result["attempts"] == [], "something tried the network during the build"
    assert (tmp_path / "out" / "report.pdf").stat().st_size > 0
    assert (tmp_path / "out" / "report.html").stat().st_size > 0
