"""Fuzz every reader with hypothesis for a while; a longer run than the unit property tests.

    python bench/fuzz_readers.py                      # 120 s per format
    python bench/fuzz_readers.py --seconds 600 --format bibtex

Inputs: random bytes, random text, text built from each format's own punctuation, and the
files in tests/data/ingest and tests/data/hostile cut, spliced and with bytes flipped.
Checked for every input: the reader does not raise; n_read = entries + rejected; every text
value is at most the field limit and free of control and format characters (except the
paragraph breaks kept in abstracts); the intake log has one row per entry read, with unique
ids, and every row not kept gives a reason. A failing input is printed, shrunk by hypothesis.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
import unicodedata
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

REPO = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(REPO))

from reporter.config import InputConfig, LimitsConfig  # noqa: E402
from reporter.ingest import read_inputs  # noqa: E402
from reporter.ingest.formats import READERS  # noqa: E402

SUFFIX = {"bibtex": ".bib", "ris": ".ris", "csv": ".csv"}
LIMIT = 200  # small, so cutting is exercised often
SEEDS = sorted(
    p.read_bytes() for folder in ("ingest", "hostile") for p in (REPO / "tests" / "data" / folder).iterdir()
    if p.is_file() and p.suffix != ".md"
)
MARKUP = st.text(
    alphabet=st.sampled_from(list('@{}()"#,;=\\%~$^_&\t\n\r -TYERAUPIDOKW12article string comment preamble')),
    max_size=600,
)


@st.composite
def mutated_seed(draw) -> bytes:
    data = bytearray(draw(st.sampled_from(SEEDS)))
    for _ in range(draw(st.integers(0, 6))):
        if not data:
            break
        kind = draw(st.sampled_from(("flip", "cut", "splice", "repeat")))
        at = draw(st.integers(0, len(data) - 1))
        if kind == "flip":
            data[at] = draw(st.integers(0, 255))
        elif kind == "cut":
            del data[at : at + draw(st.integers(1, 64))]
        elif kind == "splice":
            data[at:at] = draw(st.sampled_from(SEEDS))[: draw(st.integers(0, 200))]
        else:
            data[at:at] = data[at : at + draw(st.integers(1, 32))] * draw(st.integers(1, 20))
    return bytes(data)


INPUTS = st.one_of(st.binary(max_size=2000), st.text(max_size=600).map(str.encode), MARKUP.map(str.encode), mutated_seed())


def _bad_char(value: str, keep_newlines: bool) -> str | None:
    for ch in value:
        if ch == "\n" and keep_newlines:
            continue
        if unicodedata.category(ch) in ("Cc", "Cf", "Cs"):
            return ch
    return None


def check(fmt: str, data: bytes) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / f"input{SUFFIX[fmt]}"
        path.write_bytes(data)
        cfg = InputConfig(path=path, format=fmt)
        result = READERS[fmt](path, path.name, cfg, LIMIT)
        intake = read_inputs((cfg,), (), LimitsConfig(max_field_length=LIMIT), Path(folder))
    assert result.n_read == len(result.entries) + len(result.rejected)
    for entry in result.entries:
        for name, value in entry.fields.items():
            for text in value if isinstance(value, tuple) else (value,):
                assert len(text) <= LIMIT, f"{name} longer than the limit"
                bad = _bad_char(text, keep_newlines=name == "abstract")
                assert bad is None, f"{name} keeps {bad!r}"
    log = intake.log
    assert len(log) == result.n_read, "one log row per entry read"
    assert log["record_id"].is_unique
    assert (log.loc[log["status"] != "kept", "reason"] != "").all(), "a record not kept gives a reason"
    assert int((log["status"] == "kept").sum()) == len(intake.records)


def fuzz(fmt: str, seconds: float, batch: int) -> int:
    """Run batches of hypothesis examples until the time is up; return the number of inputs tried."""
    tried = 0

    @settings(max_examples=batch, deadline=None, database=None, suppress_health_check=list(HealthCheck))
    @given(data=INPUTS)
    def one(data: bytes) -> None:
        nonlocal tried
        tried += 1
        check(fmt, data)

    end = time.monotonic() + seconds
    while time.monotonic() < end:
        one()
    return tried


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=120, help="time per format (default 120)")
    parser.add_argument("--format", choices=sorted(READERS), action="append", help="fuzz only these formats")
    parser.add_argument("--batch", type=int, default=200, help="hypothesis examples per batch")
    args = parser.parse_args(argv)
    import logging

    logging.getLogger("bibtexparser").setLevel(logging.CRITICAL)  # it logs every broken block
    for fmt in args.format or sorted(READERS):
        started = time.monotonic()
        tried = fuzz(fmt, args.seconds, args.batch)
        print(f"{fmt}: {tried} inputs in {time.monotonic() - started:.0f} s, no failure", flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
