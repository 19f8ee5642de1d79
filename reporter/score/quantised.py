"""The embedding backend with int8 weights: the model exported to ONNX and quantised per channel.

On first use the local sentence-transformers folder is exported to ONNX (mean pooling and
normalisation included in the graph), its weights quantised to int8 per output channel (ONNX
Runtime dynamic quantisation), and the result kept in `export_dir` under the model checksum, so
later runs load it in a second. Nothing is downloaded. The export, the tokenizer and the ONNX
session are made on first use: a rebuild whose every score comes from the cache needs none of
them, nor onnxruntime, transformers or torch. Per-channel scales keep the vectors close
to fp32 (mean cosine 0.99 measured, against 0.94 for torch's per-tensor dynamic quantisation);
the vectors still differ, so they are cached under their own key (checksum + ":onnx-int8").
"""

from __future__ import annotations

import contextlib
import json
import logging
import os
import tempfile
import threading
import warnings
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np

from reporter.errors import ModelError, Problem
from reporter.score.embedder import (
    BUILTIN_MODEL, ModelInfo, _force_offline, count_word_pieces, model_checksum, resolve_model_dir,
)

INT8_SUFFIX = ":onnx-int8"
_INPUTS = ("input_ids", "attention_mask", "token_type_ids")
_OPSET = 17


class QuantisedEmbedder:
    """Same interface as `SentenceEmbedder` (info, encode, count_tokens), run by ONNX Runtime in int8."""

    def __init__(self, spec: str = BUILTIN_MODEL, threads: int | None = None, batch_size: int = 64,
                 export_dir: Path | None = None):
        _force_offline()
        model_id, folder = resolve_model_dir(spec)
        max_length, dimension = _check_supported(folder)
        checksum = model_checksum(folder)
        export_dir = Path(export_dir) if export_dir is not None else Path(tempfile.gettempdir()) / "waymark-onnx"
        self.onnx_path = export_dir / f"{checksum[:24]}-int8-per-channel.onnx"
        self.threads = threads or os.cpu_count() or 1
        self._folder, self._max_length = folder, max_length
        self._tokenizer = self._session = self._pool = None
        self._loading = threading.Lock()
        del batch_size  # batches do not apply: see _open_session
        self.info = ModelInfo(
            id=model_id, path=str(folder), checksum=checksum + INT8_SUFFIX, dimension=dimension,
            max_tokens=max_length - 2,  # two places go to the [CLS] and [SEP] markers
            backend="embedding-int8",
        )

    def _load(self) -> None:
        """Export (once per export folder), then open the tokenizer and the ONNX session."""
        with self._loading:
            if self._session is not None:
                return
            import onnxruntime
            from transformers import AutoTokenizer

            if not self.onnx_path.exists():
                logging.getLogger(__name__).info("Exporting the model with int8 weights (once per cache folder)")
                _export_int8(self._folder, self.onnx_path)
            self._tokenizer = AutoTokenizer.from_pretrained(str(self._folder), local_files_only=True)
            self._session = self._open_session(onnxruntime)
            self._pool = ThreadPoolExecutor(self.threads, thread_name_prefix="waymark-int8")

    def _open_session(self, onnxruntime):
        options = onnxruntime.SessionOptions()
        # One sentence per call, each on one core, as many calls at once as there are threads: int8
        # activations are scaled per call, so a sentence's vector must not depend on what else is
        # in the batch (batched, the same sentence moved by up to 0.017 in cosine). Unpadded
        # single calls cost nothing against batches here (measured 2.3x fp32 either way).
        options.intra_op_num_threads = 1
        options.inter_op_num_threads = 1
        options.log_severity_level = 3  # warnings about unused initialisers are not the user's concern
        session = onnxruntime.InferenceSession(str(self.onnx_path), options, providers=["CPUExecutionProvider"])
        if int(session.get_outputs()[0].shape[-1]) != self.info.dimension:
            raise ModelError(Problem(self._folder, None, "score.model", (
                f"the int8 export gives vectors of {session.get_outputs()[0].shape[-1]} numbers, the pooling "
                f"settings (1_Pooling/config.json) {self.info.dimension}; delete {self.onnx_path} to export again"
            )))
        return session

    def encode(self, texts: list[str]) -> np.ndarray:
        if not texts:
            return np.zeros((0, self.info.dimension), dtype=np.float32)
        self._load()
        encoded = self._tokenizer(list(texts), truncation=True, max_length=self._max_length)
        columns = [encoded[name] for name in _INPUTS]

        def one(i: int) -> np.ndarray:
            feed = {name: np.asarray([column[i]], dtype=np.int64) for name, column in zip(_INPUTS, columns)}
            return self._session.run(None, feed)[0][0]  # onnxruntime releases the GIL while it runs

        return np.vstack(list(self._pool.map(one, range(len(texts)), chunksize=16))).astype(np.float32)

    def count_tokens(self, texts: list[str]) -> list[int]:
        """Word pieces per text, without the special markers."""
        self._load()
        return count_word_pieces(self._tokenizer, texts)


def _check_supported(folder: Path) -> tuple[int, int]:
    """The model's input length and vector size; a ModelError unless it is a BERT-style encoder with mean pooling."""
    modules = folder / "modules.json"
    pooling = folder / "1_Pooling" / "config.json"
    if not modules.exists() or not pooling.exists():
        raise ModelError(Problem(folder, None, "score.backend",
                                 "embedding-int8 needs a sentence-transformers folder with modules.json and 1_Pooling"))
    pooling_settings = json.loads(pooling.read_text())
    if not pooling_settings.get("pooling_mode_mean_tokens"):
        raise ModelError(Problem(pooling, None, "score.backend",
                                 "embedding-int8 supports mean pooling only; use backend = \"embedding\""))
    if not isinstance(pooling_settings.get("word_embedding_dimension"), int):
        raise ModelError(Problem(pooling, None, "score.backend",
                                 "embedding-int8 needs word_embedding_dimension in the pooling settings"))
    settings = folder / "sentence_bert_config.json"
    max_length = int(json.loads(settings.read_text()).get("max_seq_length", 256)) if settings.exists() else 256
    # Pooling and normalisation keep the encoder's width: the exported graph's output size.
    return max_length, pooling_settings["word_embedding_dimension"]


def _export_int8(folder: Path, path: Path) -> None:
    """Export the fp32 model with its pooling to ONNX, quantise it, and move it into place atomically."""
    import torch
    from onnxruntime.quantization import QuantType, quantize_dynamic
    from transformers import AutoModel, AutoTokenizer

    class _Pooled(torch.nn.Module):
        """The encoder, then mean pooling over real tokens and L2 normalisation, as sentence-transformers does."""

        def __init__(self, encoder):
            super().__init__()
            self.encoder = encoder

        def forward(self, input_ids, attention_mask, token_type_ids):
            hidden = self.encoder(input_ids=input_ids, attention_mask=attention_mask,
                                  token_type_ids=token_type_ids).last_hidden_state
            mask = attention_mask.unsqueeze(-1).to(hidden.dtype)
            pooled = (hidden * mask).sum(1) / mask.sum(1).clamp(min=1e-9)
            return torch.nn.functional.normalize(pooled, p=2, dim=1)

    path.parent.mkdir(parents=True, exist_ok=True)
    tokenizer = AutoTokenizer.from_pretrained(str(folder), local_files_only=True)
    model = _Pooled(AutoModel.from_pretrained(str(folder), local_files_only=True)).eval()
    sample = tokenizer(["A first sentence.", "A second, longer sentence for the trace."], padding=True,
                       return_tensors="pt")
    axes = {name: {0: "batch", 1: "tokens"} for name in _INPUTS} | {"embedding": {0: "batch"}}
    with tempfile.TemporaryDirectory(dir=path.parent) as work:
        fp32, int8 = Path(work) / "fp32.onnx", Path(work) / "int8.onnx"
        with torch.no_grad(), warnings.catch_warnings():
            warnings.simplefilter("ignore")  # tracer notes on Python-side conditions; the graph is checked by tests
            torch.onnx.export(model, tuple(sample[name] for name in _INPUTS), str(fp32), input_names=list(_INPUTS),
                              output_names=["embedding"], dynamic_axes=axes, opset_version=_OPSET, dynamo=False)
        root = logging.getLogger()
        level = root.level
        root.setLevel(logging.ERROR)  # the quantiser's advice on pre-processing goes to the root logger
        try:
            # onnxruntime's shape inference saves "sym_shape_infer_temp.onnx" (and its external data)
            # into the working folder when it cannot infer every shape; run it from the temporary folder
            # so those by-products go with it. Once per export, before any scoring thread starts.
            with contextlib.chdir(work):
                quantize_dynamic(str(fp32), str(int8), weight_type=QuantType.QInt8, per_channel=True)
        finally:
            root.setLevel(level)
        os.replace(int8, path)
