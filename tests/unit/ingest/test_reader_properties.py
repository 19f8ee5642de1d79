"""Property tests: no input bytes make a reader raise, and every record read is accounted for."""

from __future__ import annotations

import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from reporter.config import InputConfig, LimitsConfig
from reporter.ingest import read_inputs
from reporter.ingest.formats import READERS

SUFFIX = {"bibtex": ".bib", "ris": ".ris", "csv": ".csv"}
# Text made of each format's own punctuation finds parser corner cases sooner than random text.
MARKUP = st.text(alphabet=st.sampled_from(list('@{}"#,;=\\%~\t\n\r -TYERAUPI12article string and')), max_size=300)
INPUTS = st.one_of(st.binary(max_size=400), st.text(max_size=300), MARKUP)
FAST = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _write(folder: Path, fmt: str, data: bytes | str) -> Path:
    path = folder / f"input{SUFFIX[fmt]}"
    path.write_bytes(data if isinstance(data, bytes) else data.encode("utf-8", "surrogatepass"))
    return path


@pytest.mark.parametrize("fmt", sorted(READERS))
@FAST
@given(data=INPUTS)
def test_readers_never_raise_and_count_what_they_read(fmt: str, data: bytes | str) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = _write(Path(folder), fmt, data)
        result = READERS[fmt](path, path.name, InputConfig(path=path), 100)
    assert result.n_read == len(result.entries) + len(result.rejected)
    assert all(len(str(v)) <= 100 for e in result.entries for v in e.fields.values() if isinstance(v, str))


@pytest.mark.parametrize("fmt", sorted(READERS))
@FAST
@given(data=INPUTS)
def test_intake_counts_reconcile(fmt: str, data: bytes | str) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = _write(Path(folder), fmt, data)
        cfg = InputConfig(path=path, format=fmt)
        result = read_inputs((cfg,), (2020, 2021), LimitsConfig(), Path(folder))
        n_read = READERS[fmt](path, path.name, cfg, LimitsConfig().max_field_length).n_read
    log = result.log
    assert len(log) == n_read, "one log row per record read"
    assert int((log["status"] == "kept").sum()) == len(result.records), "kept rows are the record table"
    assert set(log["status"]) <= {"kept", "set_aside"}
    assert log["record_id"].is_unique
