"""Mode bits for files the build writes: 0666 less the umask, as `open()` and other tools give.

`tempfile.mkstemp` creates its file 0600 whatever the umask, so a file written through a
temporary name and `os.replace` would otherwise stay private to its owner.
"""

from __future__ import annotations

import os
import threading

_LOCK = threading.Lock()


def current_umask() -> int:
    """The process umask, read without changing it where the system allows (Linux: /proc)."""
    try:
        with open("/proc/self/status", encoding="ascii", errors="replace") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    # Elsewhere the only way to read it is to set it; set it back at once, one thread at a time.
    with _LOCK:
        mask = os.umask(0o022)
        os.umask(mask)
    return mask


def give_default_mode(fd: int) -> None:
    """Set an open file's mode to 0666 & ~umask, as a newly created ordinary file gets."""
    os.fchmod(fd, 0o666 & ~current_umask())
