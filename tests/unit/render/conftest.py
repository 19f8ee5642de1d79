"""Fixtures for the render tests: full renders shared across tests (each takes a few seconds)."""

from __future__ import annotations

from pathlib import Path

import pytest

from reporter.render import render
from tests.unit.render.render_inputs import make_inputs, make_report

LATER = "2025-03-02T17:30:00+00:00"


@pytest.fixture(scope="session")
def rendered(tmp_path_factory) -> dict[str, Path]:
    """One full render with the default theme, shared by the read-only tests."""
    return render(make_inputs(), make_report(), tmp_path_factory.mktemp("report"))


@pytest.fixture(scope="session")
def rendered_later(tmp_path_factory) -> dict[str, Path]:
    """The same inputs rendered again at a later time, for the determinism checks."""
    inputs = make_inputs(generated_at=LATER, manifest={**make_inputs().manifest, "generated_at": LATER})
    return render(inputs, make_report(), tmp_path_factory.mktemp("report-later"))


@pytest.fixture(scope="session")
def rendered_compact(tmp_path_factory) -> dict[str, Path]:
    return render(make_inputs(), make_report(theme="compact"), tmp_path_factory.mktemp("report-compact"))
