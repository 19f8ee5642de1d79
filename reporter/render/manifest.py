"""The run manifest: what went in (files, framework, model, settings) and what came out (checksums)."""

from __future__ import annotations

import hashlib
from pathlib import Path

from reporter.render.exports import write_json


def sha256_file(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def build_manifest(
    *,
    waymark_version: str,
    generated_at: str,
    input_files: list[dict],
    framework_info: dict,
    model_info: dict,
    score_settings: dict,
    analysis_meta: dict,
) -> dict:
    """A plain dict for `RenderInputs.manifest`; the pipeline may fill it from its own records."""
    return {
        "waymark_version": waymark_version,
        "generated_at": generated_at,
        "inputs": list(input_files),  # e.g. {"path": ..., "format": ..., "sha256": ..., "n_read": ...}
        "framework": dict(framework_info),
        "model": dict(model_info),
        "score": dict(score_settings),
        "analysis": {k: v for k, v in analysis_meta.items() if k != "methods"},
    }


def write_manifest(manifest: dict, outputs: dict[str, Path], output_dir: Path, path: Path) -> Path:
    """Write the manifest with the SHA-256 of each data export, so a reader can check the files."""
    checksums = {label: sha256_file(p) for label, p in sorted(outputs.items())}
    document = {**manifest, "outputs": {label: {"path": str(p.relative_to(output_dir)), "sha256": checksums[label]}
                                        for label, p in sorted(outputs.items())}}
    return write_json(document, path, root=output_dir)
