"""One real demo build per test session: the packaged model, SQLite cache, WeasyPrint; nothing stubbed."""

import shutil
from dataclasses import dataclass
from pathlib import Path

import pytest
from click.testing import CliRunner

from reporter.cli import main

REPO = Path(__file__).resolve().parents[2]
EXAMPLE = REPO / "example_input"


@dataclass(frozen=True)
class DemoBuild:
    config: Path
    out: Path
    stdout: str


@pytest.fixture(scope="session")
def demo_copy(tmp_path_factory) -> Path:
    """A private copy of example_input/, so the cache and outputs never touch the repository."""
    target = tmp_path_factory.mktemp("demo") / "example_input"
    shutil.copytree(EXAMPLE, target, ignore=shutil.ignore_patterns(".waymark-cache"))
    return target


@pytest.fixture(scope="session")
def demo_build(demo_copy) -> DemoBuild:
    out = demo_copy.parent / "out"
    result = CliRunner().invoke(main, ["build", str(demo_copy / "waymark.toml"), "--out", str(out), "-q"])
    assert result.exit_code == 0, result.output + repr(result.exception)
    return DemoBuild(config=demo_copy / "waymark.toml", out=out, stdout=result.output)
