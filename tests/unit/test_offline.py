"""The offline guarantee: loading the real model and encoding a sentence never touches the network.

The check runs in a fresh interpreter, so every import (torch, transformers, huggingface_hub,
sentence-transformers) happens with sockets blocked, with no offline switch set beforehand and
with an empty model-hub cache: anything that tried a download or a "ping" would be recorded.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]

#: Installed first in the child interpreter: records and refuses every attempt to reach the network.
GUARD = r"""
import json, socket, sys

attempts = []

def _refuse(what):
    def blocked(*args, **kwargs):
        attempts.append(f"{what}{args!r}"[:200])
        raise OSError(f"network blocked by test_offline: {what}")
    return blocked

# Every way out: a new connection, a name lookup, a datagram.
socket.socket.connect = _refuse("connect")
socket.socket.connect_ex = _refuse("connect_ex")
socket.socket.sendto = _refuse("sendto")
socket.create_connection = _refuse("create_connection")
socket.getaddrinfo = _refuse("getaddrinfo")
socket.gethostbyname = _refuse("gethostbyname")
"""

_CHILD = GUARD + r"""
from reporter.score.embedder import SentenceEmbedder

embedder = SentenceEmbedder(threads=1)
vectors = embedder.encode(["Constructed wetlands clean village wastewater."])
print(json.dumps({"attempts": attempts, "shape": list(vectors.shape),
                  "norm": float((vectors ** 2).sum() ** 0.5), "model": embedder.info.id}))
"""


def run_offline(script: str, tmp_path: Path, timeout: int = 180) -> subprocess.CompletedProcess:
    """Run `script` in a fresh interpreter with no hub settings and an empty hub cache."""
    env = {k: v for k, v in os.environ.items() if not k.startswith(("HF_", "TRANSFORMERS_", "SENTENCE_TRANSFORMERS_"))}
    # An empty hub cache: a model found only there would mean something had been fetched before.
    env.update(HF_HOME=str(tmp_path / "hf-home"), PYTHONPATH=str(REPO))
    return subprocess.run([sys.executable, "-c", script], cwd=tmp_path, env=env, capture_output=True, text=True,
                          timeout=timeout)


@pytest.mark.model
def test_model_loads_and_encodes_with_sockets_blocked(tmp_path) -> None:
    done = run_offline(_CHILD, tmp_path)
    assert done.returncode == 0, done.stderr[-3000:]
    result = json.loads(done.stdout.strip().splitlines()[-1])
    assert result["attempts"] == [], "something tried the network"
    # all-MiniLM-L6-v2 gives 384-dimensional vectors; ours are normalised (from memory: model card).
    assert result["shape"] == [1, 384]
    assert result["norm"] == pytest.approx(1.0, abs=1e-5)
    assert result["model"] == "sentence-transformers/all-MiniLM-L6-v2"
