"""Files written through a temporary name get 0666 less the umask, as a plain open() would give them."""

import os
import stat
import subprocess
import sys

import pytest

from reporter.analyse.validation import write_thresholds
from reporter.filemode import current_umask
from reporter.render.atomic import write_bytes_atomic, write_text_atomic


@pytest.fixture
def umask():
    """Set the process umask for one test and restore it afterwards."""
    saved = os.umask(0o022)
    os.umask(saved)

    def set_to(value: int) -> None:
        os.umask(value)

    yield set_to
    os.umask(saved)


def _mode(path) -> int:
    return stat.S_IMODE(os.stat(path).st_mode)


@pytest.mark.parametrize("mask", [0o022, 0o077, 0o002, 0o027])
def test_current_umask_reads_what_was_set_without_changing_it(umask, mask):
    umask(mask)
    assert current_umask() == mask
    assert current_umask() == mask  # reading it left it as it was


@pytest.mark.parametrize("mask, expected", [(0o022, 0o644), (0o077, 0o600), (0o002, 0o664)])
def test_atomic_writes_follow_the_umask(umask, tmp_path, mask, expected):
    umask(mask)
    assert _mode(write_text_atomic(tmp_path / "a.csv", "x\n")) == expected
    assert _mode(write_bytes_atomic(tmp_path / "b.pdf", b"%PDF")) == expected
    assert _mode(write_thresholds(tmp_path / "t.csv", {"1": 0.5})) == expected
    # The same as a file made the ordinary way under this umask.
    plain = tmp_path / "plain"
    plain.write_text("x")
    assert _mode(plain) == expected


def test_replacing_a_file_takes_the_mode_of_the_new_write(umask, tmp_path):
    umask(0o077)
    path = write_text_atomic(tmp_path / "a.csv", "old\n")
    umask(0o022)
    write_text_atomic(path, "new\n")
    assert _mode(path) == 0o644 and path.read_text() == "new\n"


def test_umask_read_matches_the_shell(tmp_path):
    # The shell's own `umask` builtin is the outside reference for what the process inherits.
    code = "from reporter.filemode import current_umask; print(oct(current_umask()))"
    done = subprocess.run(["sh", "-c", f"umask 0037; umask; {sys.executable} -c '{code}'"],
                          capture_output=True, text=True, check=True, env={**os.environ})
    shell, ours = done.stdout.split()
    assert int(shell, 8) == int(ours, 8) == 0o037


def test_without_proc_the_umask_is_read_and_put_back(umask, monkeypatch):
    def no_proc(*args, **kwargs):
        raise FileNotFoundError("/proc/self/status")

    monkeypatch.setattr("reporter.filemode.open", no_proc, raising=False)
    umask(0o027)
    assert current_umask() == 0o027
    assert os.umask(0o027) == 0o027  # still what the test set
