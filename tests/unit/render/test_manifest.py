"""A build's folder holds only its own files: what an earlier manifest listed and this build did not write goes."""

import json

from reporter.render.manifest import previous_outputs, remove_stale_outputs, write_manifest


def _earlier_build(folder, names):
    for name in names:
        (folder / name).parent.mkdir(parents=True, exist_ok=True)
        (folder / name).write_text("earlier", encoding="utf-8")
    write_manifest({}, {n: folder / n for n in names}, folder, folder / "manifest.json")


def test_files_of_an_earlier_build_not_written_now_are_removed_and_nothing_else(tmp_path):
    _earlier_build(tmp_path, ["data/scores.csv", "data/sentences.csv", "review-worksheet.csv"])
    (tmp_path / "notes.txt").write_text("the user's own", encoding="utf-8")
    previous = previous_outputs(tmp_path)
    assert set(previous) == {"data/scores.csv", "data/sentences.csv", "review-worksheet.csv"}
    (tmp_path / "data" / "scores.csv").write_text("now", encoding="utf-8")
    removed = remove_stale_outputs(tmp_path, previous, {"data/scores.csv": tmp_path / "data" / "scores.csv"})
    assert sorted(p.name for p in removed) == ["review-worksheet.csv", "sentences.csv"]
    assert (tmp_path / "data" / "scores.csv").read_text(encoding="utf-8") == "now"
    assert (tmp_path / "notes.txt").exists(), "a file no manifest listed is never touched"


def test_a_manifest_naming_files_outside_the_folder_is_not_obeyed(tmp_path):
    outside = tmp_path / "precious.csv"
    outside.write_text("keep", encoding="utf-8")
    folder = tmp_path / "out"
    folder.mkdir()
    (folder / "manifest.json").write_text(json.dumps({"outputs": {
        "x": {"path": "../precious.csv", "sha256": "0" * 64}, "y": {"path": str(outside), "sha256": "0" * 64}}}))
    assert remove_stale_outputs(folder, previous_outputs(folder), {}) == []
    assert outside.read_text(encoding="utf-8") == "keep"


def test_no_manifest_or_not_ours_means_nothing_to_remove(tmp_path):
    assert previous_outputs(tmp_path) == ()
    (tmp_path / "manifest.json").write_text("[1, 2]", encoding="utf-8")
    assert previous_outputs(tmp_path) == ()


def test_briefs_of_an_earlier_build_go_with_their_emptied_folder(tmp_path):
    _earlier_build(tmp_path, ["report.html", "briefs/hydrology.html", "briefs/hydrology.pdf"])
    previous = previous_outputs(tmp_path)
    removed = remove_stale_outputs(tmp_path, previous, {"report.html": tmp_path / "report.html"})
    assert sorted(p.name for p in removed) == ["hydrology.html", "hydrology.pdf"]
    assert not (tmp_path / "briefs").exists(), "a folder only our briefs were in goes with them"


def test_a_folder_holding_anything_else_stays(tmp_path):
    _earlier_build(tmp_path, ["briefs/hydrology.pdf"])
    (tmp_path / "briefs" / "notes.txt").write_text("the user's own", encoding="utf-8")
    remove_stale_outputs(tmp_path, previous_outputs(tmp_path), {})
    assert (tmp_path / "briefs" / "notes.txt").exists() and not (tmp_path / "briefs" / "hydrology.pdf").exists()
