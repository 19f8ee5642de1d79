"""Fixtures for the ingest tests: the tiny hand-written inputs in tests/data/ingest and a reader call."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from reporter.config import InputConfig
from reporter.ingest.formats import READERS
from reporter.records import ReadResult

DATA_DIR = Path(__file__).resolve().parents[2] / "data" / "ingest"


@pytest.fixture
def data_dir() -> Path:
    return DATA_DIR


@pytest.fixture
def read() -> Callable[..., ReadResult]:
    """read(fmt, path, max_field_length=20000, **input_options) -> ReadResult, named by the file name."""

    def _read(fmt: str, path: Path, max_field_length: int = 20000, **options: object) -> ReadResult:
        cfg = InputConfig(path=path, **options)
        return READERS[fmt](path, path.name, cfg, max_field_length)

    return _read
