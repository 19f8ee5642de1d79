"""Alternative backend: zero-shot entailment with a local NLI cross-encoder (slower, no cache).

Each (sentence, goal) pair is read as premise and hypothesis "This text is about
<goal title>."; the entailment probability is the sentence's score for that goal.
One forward pass per sentence *and* goal, so about n_goals times the embedding cost.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from reporter.errors import ModelError, Problem
from reporter.score.embedder import ModelInfo, count_word_pieces, model_checksum

HYPOTHESIS = "This text is about {title}."


def _entailment_index(id2label: dict) -> int:
    for index, label in id2label.items():
        if str(label).lower().startswith("entail"):
            return int(index)
    # Common NLI heads order contradiction, neutral, entailment; without names, take the last.
    return max(int(i) for i in id2label)


class EntailmentScorer:
    """Scores sentences against goal hypotheses with a sequence-classification NLI model."""

    def __init__(self, spec: str, threads: int | None = None, batch_size: int = 32):
        os.environ["HF_HUB_OFFLINE"] = "1"
        os.environ["TRANSFORMERS_OFFLINE"] = "1"
        import torch
        from transformers import AutoModelForSequenceClassification, AutoTokenizer

        torch.set_num_threads(threads or os.cpu_count() or 1)
        folder = Path(spec)
        if not (folder / "config.json").exists():
            raise ModelError(Problem(folder, None, "score.model", "the nli backend needs a local cross-encoder folder (config.json not found)"))
        try:
            self._tokenizer = AutoTokenizer.from_pretrained(folder, local_files_only=True)
            self._model = AutoModelForSequenceClassification.from_pretrained(folder, local_files_only=True).eval()
        except Exception as exc:  # any loader failure is a model-folder problem the user can fix
            raise ModelError(Problem(folder, None, "score.model", f"cannot load the NLI model: {exc}")) from None
        self._torch = torch
        self._batch_size = batch_size
        self._entail = _entailment_index(self._model.config.id2label)
        self.info = ModelInfo(
            id=folder.name, path=str(folder), checksum=model_checksum(folder), dimension=0,
            max_tokens=int(min(getattr(self._tokenizer, "model_max_length", 512), 512)) - 3,
            backend="nli",
        )

    def count_tokens(self, texts: list[str]) -> list[int]:
        # Leave room for the hypothesis (about a dozen word pieces).
        return [n + 16 for n in count_word_pieces(self._tokenizer, texts)]

    def entailment(self, sentences: list[str], titles: list[str]) -> np.ndarray:
        """(n_sentences, n_goals) entailment probabilities."""
        hypotheses = [HYPOTHESIS.format(title=t) for t in titles]
        pairs = [(s, h) for s in sentences for h in hypotheses]
        probs = np.zeros(len(pairs), dtype=np.float32)
        with self._torch.inference_mode():
            for start in range(0, len(pairs), self._batch_size):
                chunk = pairs[start : start + self._batch_size]
                batch = self._tokenizer([p for p, _ in chunk], [h for _, h in chunk], padding=True,
                                        truncation="only_first", return_tensors="pt")
                logits = self._model(**batch).logits
                probs[start : start + len(chunk)] = logits.softmax(dim=-1)[:, self._entail].numpy()
        return probs.reshape(len(sentences), len(hypotheses))
