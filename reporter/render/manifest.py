"""The run manifest: what went in (files, framework, model, settings) and what came out (checksums)."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

from reporter.errors import OutputError
from reporter.render.atomic import ensure_inside
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
    """Write the manifest with the SHA-256 of each data export (and of the optional extras written before
    it: per-sentence scores, review worksheet), so a reader can check the files and a later build knows
    which files were its own."""
    checksums = {label: sha256_file(p) for label, p in sorted(outputs.items())}
    document = {**manifest, "outputs": {label: {"path": str(p.relative_to(output_dir)), "sha256": checksums[label]}
                                        for label, p in sorted(outputs.items())}}
    return write_json(document, path, root=output_dir)


def previous_outputs(output_dir: Path) -> tuple[str, ...]:
    """Paths (relative to the folder) that the manifest of an earlier build in `output_dir` lists."""
    try:
        document = json.loads((output_dir / "manifest.json").read_text(encoding="utf-8"))
        entries = document.get("outputs", {}).values()
        return tuple(str(entry["path"]) for entry in entries if isinstance(entry, dict) and "path" in entry)
    except (OSError, ValueError, AttributeError, TypeError):
        return ()  # no earlier build, or not a manifest of ours: nothing is ours to remove


def remove_stale_outputs(output_dir: Path, previous: tuple[str, ...], written: dict[str, Path]) -> list[Path]:
    """Remove files an earlier build wrote (listed in its manifest) that this build did not write again,
    so the folder holds only this build's files. Nothing outside the folder and nothing else is touched."""
    now = {Path(p).resolve() for p in written.values()}
    removed = []
    for relative in previous:
        try:
            target = ensure_inside(output_dir, output_dir / relative)
        except OutputError:
            continue  # a manifest naming a file outside the folder is not obeyed
        if target not in now and target.is_file():
            target.unlink()
            removed.append(target)
            _remove_if_empty(target.parent, output_dir)
    return removed


def _remove_if_empty(folder: Path, output_dir: Path) -> None:
    """A subfolder emptied by the removal (briefs/ of a build without briefs) goes too; the output folder stays."""
    if folder.resolve() != output_dir.resolve() and not any(folder.iterdir()):
        folder.rmdir()
