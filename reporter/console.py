"""What a command shows on stderr, set for the length of one command and put back afterwards.

Default: Waymark's own progress lines and warnings; other libraries' logging only from ERROR up,
their Python warnings not at all (they speak of their internals: WeasyPrint's layout steps,
tokenizer lengths that Waymark has already split below the limit). -v shows third-party logging
from INFO up and their warnings as log lines, -vv everything from DEBUG; -q shows warnings only.
"""

from __future__ import annotations

import contextlib
import logging
import os
import sys
import warnings
from typing import Iterator

OWN = "reporter"
# Read by transformers / huggingface_hub when first imported (often inside the run): their own
# stderr handler and the weight-loading bar of the one-off int8 export.
_QUIET_ENV = {"TRANSFORMERS_VERBOSITY": "error", "HF_HUB_DISABLE_PROGRESS_BARS": "1"}
_VERBOSE_ENV = {"TRANSFORMERS_VERBOSITY": "info"}


class _Format(logging.Formatter):
    """Our INFO lines as plain progress lines; everything else with its level and source."""

    def format(self, record: logging.LogRecord) -> str:
        if record.levelno == logging.INFO and (record.name == OWN or record.name.startswith(OWN + ".")):
            return record.getMessage()
        source = "" if record.name.startswith(OWN) else f"{record.name}: "
        return f"{record.levelname} {source}{record.getMessage()}"


def levels(verbose: int, quiet: bool) -> tuple[int, int]:
    """(level for Waymark's loggers, level for everyone else's)."""
    if quiet:
        return logging.WARNING, logging.ERROR
    if verbose >= 2:
        return logging.DEBUG, logging.DEBUG
    if verbose == 1:
        return logging.INFO, logging.INFO
    return logging.INFO, logging.ERROR


@contextlib.contextmanager
def console(verbose: int = 0, quiet: bool = False) -> Iterator[None]:
    """Logging levels, a stderr handler, warning filters and library switches for one command."""
    own_level, other_level = levels(verbose, quiet)
    root, own = logging.getLogger(), logging.getLogger(OWN)
    saved_levels = (root.level, own.level)
    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(_Format())
    env = _VERBOSE_ENV if verbose else _QUIET_ENV
    saved_env = {key: os.environ.get(key) for key in env}
    # An environment setting the user made wins over ours.
    os.environ.update({key: value for key, value in env.items() if key not in os.environ})
    library = logging.getLogger("transformers")  # has its own handler once imported; its level is ours too
    saved_library = library.level
    root.setLevel(other_level)
    own.setLevel(own_level)
    root.addHandler(handler)
    if "transformers" in sys.modules:
        library.setLevel(other_level)
    try:
        with warnings.catch_warnings():
            if verbose:
                logging.captureWarnings(True)
            else:
                warnings.filterwarnings("ignore")
                warnings.filterwarnings("default", module=rf"{OWN}(\.|$)")
            yield
    finally:
        logging.captureWarnings(False)
        root.removeHandler(handler)
        root.setLevel(saved_levels[0])
        own.setLevel(saved_levels[1])
        library.setLevel(saved_library)
        for key, value in saved_env.items():
            if value is None:
                os.environ.pop(key, None)
            else:
                os.environ[key] = value
