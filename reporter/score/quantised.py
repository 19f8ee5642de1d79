"""The embedding backend with int8 weights: torch dynamic quantisation of the model's Linear layers.

Linear weights are stored as int8 and activations quantised per batch on the fly, which trades a
little accuracy for CPU speed. Its vectors differ from the fp32 model's, so its cache key differs
too (checksum + ":int8") and the run manifest names the backend.
"""

from __future__ import annotations

import dataclasses
import warnings

from reporter.score.embedder import BUILTIN_MODEL, SentenceEmbedder

INT8_SUFFIX = ":int8"


class QuantisedEmbedder(SentenceEmbedder):
    """A `SentenceEmbedder` whose Linear layers run in int8 (backend "embedding-int8")."""

    def __init__(self, spec: str = BUILTIN_MODEL, threads: int | None = None, batch_size: int = 64):
        super().__init__(spec, threads=threads, batch_size=batch_size)
        import torch

        # Only the Linear layers: they hold nearly all the arithmetic; embeddings and layer norms
        # stay fp32, as dynamic quantisation supports.
        with warnings.catch_warnings():
            # torch flags torch.ao.quantization and its quantised tensors as deprecated (successor:
            # the separate torchao package); they still work in the torch this project installs.
            warnings.filterwarnings("ignore", message=".*quantize_per_tensor", category=UserWarning)
            warnings.filterwarnings("ignore", message="torch.ao.quantization is deprecated", category=DeprecationWarning)
            self._model = torch.ao.quantization.quantize_dynamic(self._model, {torch.nn.Linear}, dtype=torch.qint8)
        self._model.eval()
        self.info = dataclasses.replace(
            self.info, checksum=self.info.checksum + INT8_SUFFIX, backend="embedding-int8"
        )
