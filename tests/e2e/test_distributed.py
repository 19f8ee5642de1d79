"""Scoring on a Dask LocalCluster gives what a local run gives (issue #9): real model, real workers.

A subset of the demo keeps this under ~3 minutes on two cores: every 5th kept record, so all three
input files take part. Scores may differ in the last rounded place (1e-6): BLAS sums a matrix
product in an order that depends on the matrix's shape, and partitions give other shapes than a
local run's chunk (a local run with another score.batch_size differs the same way). Everything else,
decisions and evidence included, must be identical.
"""

import contextlib
import json
import shutil
import sqlite3
from pathlib import Path

import pandas as pd
import pytest
from click.testing import CliRunner

from reporter.cli import main
from reporter.config import load_config
from reporter.pipeline import run_intake

EXAMPLE = Path(__file__).resolve().parents[2] / "example_input"
SUBSET_STEP = 5
FLOATS = ["alignment_score", "evidence_score"]
LAST_PLACE = 1e-6 * (1 + 1e-9)  # scores are rounded to 6 decimals; one unit of that place, no more


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    folder = tmp_path_factory.mktemp("distributed") / "example_input"
    shutil.copytree(EXAMPLE, folder, ignore=shutil.ignore_patterns(".waymark-cache"))
    config = load_config(folder / "waymark.toml")
    records = run_intake(config).records.iloc[::SUBSET_STEP].reset_index(drop=True)
    return config, records


@pytest.fixture(scope="module")
def local_run(demo):
    from reporter.score import load_scoring_parts, score

    config, records = demo
    parts = load_scoring_parts(config.score)
    try:
        return score(records, parts.framework, parts.embedder, config.score, cache=parts.cache,
                     thresholds=parts.thresholds, show_progress=False)
    finally:
        parts.close()


@pytest.fixture(scope="module")
def cluster():
    from distributed import LocalCluster

    with LocalCluster(n_workers=2, processes=True, threads_per_worker=1, dashboard_address=":0") as running:
        yield running


def _on_dask(config, records, **score_updates):
    from reporter.score import load_scoring_parts
    from reporter.score.distributed import score_on_dask

    cfg = config.score.model_copy(update={"execution": "dask", **score_updates})
    parts = load_scoring_parts(cfg)
    try:
        return score_on_dask(records, parts, cfg, show_progress=False)
    finally:
        parts.close()


def _cached_keys(path: Path) -> set:
    with contextlib.closing(sqlite3.connect(path)) as db:
        return set(db.execute("SELECT model, text_hash FROM embeddings"))


def _assert_same_scores(local, dist) -> None:
    pd.testing.assert_frame_equal(local.table.drop(columns=FLOATS), dist.table.drop(columns=FLOATS), check_exact=True)
    pd.testing.assert_frame_equal(local.table[FLOATS], dist.table[FLOATS], check_exact=False, rtol=0, atol=LAST_PLACE)
    exact = [c for c in local.evidence.columns if c != "sentence_score"]
    pd.testing.assert_frame_equal(local.evidence[exact], dist.evidence[exact], check_exact=True)
    pd.testing.assert_series_equal(local.evidence["sentence_score"], dist.evidence["sentence_score"],
                                   check_exact=False, rtol=0, atol=LAST_PLACE)
    pd.testing.assert_frame_equal(local.general_mentions, dist.general_mentions, check_exact=True)
    assert (local.thresholds, local.policy, local.method) == (dist.thresholds, dist.policy, dist.method)
    for key in ("n_records", "n_sentences"):
        assert dist.stats[key] == local.stats[key], f"{key}: the goal space is counted once, as in a local run"


@pytest.mark.model
def test_cold_run_on_two_workers_matches_local_run(demo, local_run, cluster):
    config, records = demo
    cache = config.score.cache.with_name("cold.sqlite")
    dist = _on_dask(config, records, scheduler=cluster.scheduler_address, cache=cache)

    _assert_same_scores(local_run, dist)
    assert dist.stats["n_workers"] == 2 and dist.stats["n_partitions"] > 2, "work was spread over both workers"
    assert dist.stats["n_worker_caches_merged"] == 2, "each worker wrote its own cache file"
    assert not list(cache.parent.glob("cold.worker-*")), "merged worker files are removed"
    # The client merged the workers' files: the cache holds the vectors the local run stored, no more.
    assert _cached_keys(cache) == _cached_keys(config.score.cache)


@pytest.mark.model
def test_warm_run_on_own_local_cluster_reads_the_main_cache(demo, local_run):
    config, records = demo
    dist = _on_dask(config, records, workers=2)  # scheduler unset: a LocalCluster of two processes

    _assert_same_scores(local_run, dist)
    assert dist.stats["n_encoded"] == 0, "workers read the vectors the local run stored; no model inference"
    assert dist.stats["n_vectors_merged"] == 0


def test_scheduler_option_needs_dask_execution(demo):
    config, _ = demo
    result = CliRunner().invoke(main, ["build", str(config.config_path), "--scheduler", "tcp://127.0.0.1:8786"])
    assert result.exit_code == 2
    assert '--scheduler needs --execution dask (or score.execution = "dask")' in result.output


def test_scheduler_option_is_validated_like_the_config_key(demo):
    config, _ = demo
    result = CliRunner().invoke(main, ["build", str(config.config_path), "--execution", "dask",
                                       "--scheduler", "host/8786"])
    assert result.exit_code == 2
    assert "score.scheduler: expected a scheduler address such as 'tcp://host:8786', got 'host/8786'" in result.output


def test_workers_with_a_scheduler_is_a_config_error(tmp_path):
    text = (EXAMPLE / "waymark.toml").read_text(encoding="utf-8")
    for name in ("publications-2025.bib", "publications-2024.ris", "cris-export-2022-2023.csv", "staff.csv",
                 "labelled-sample.csv"):
        shutil.copy(EXAMPLE / name, tmp_path / name)
    path = tmp_path / "waymark.toml"
    path.write_text(text + '\n[score]\nexecution = "dask"\nscheduler = "tcp://cluster-head:8786"\nworkers = 4\n',
                    encoding="utf-8")
    from reporter.errors import ConfigError

    with pytest.raises(ConfigError) as caught:
        load_config(path)
    line = len(text.splitlines()) + 5
    assert str(caught.value) == f"{path.resolve()}:{line}: score.workers: only sizes the local cluster; remove it or score.scheduler"


TINY_CSV = """id,title,abstract,year,authors,affiliations
t1,Chlorinated wells in three river towns,"Household latrines and chlorinated drinking water reduced diarrhoeal disease. We followed 400 families for two years.",2025,"Quill, Ada","Kestrel Heath University, Ireland"
t2,Rooftop solar for island schools,"Rooftop solar panels and battery storage brought electricity to off-grid schools. Diesel use fell by half.",2025,"Marsh, Tobin","Kestrel Heath University, Ireland; Lakeside Institute, Kenya"
t3,On the rank of curves over function fields,"We bound the rank of elliptic curves by the conductor degree. The proof uses a descent argument.",2025,"Quill, Ada","Kestrel Heath University, Ireland"
"""


@pytest.mark.model
def test_build_with_execution_dask_scores_on_the_cluster(tmp_path):
    """`waymark build --execution dask` goes through the cluster branch of the pipeline."""
    (tmp_path / "pubs.csv").write_text(TINY_CSV, encoding="utf-8")
    (tmp_path / "waymark.toml").write_text(
        '[report]\ninstitution = "Kestrel Heath University"\nhome_country = "IE"\nreporting_year = 2025\n\n'
        '[[inputs]]\npath = "pubs.csv"\n\n[score]\nworkers = 1\n', encoding="utf-8")
    out = tmp_path / "out"
    result = CliRunner().invoke(main, ["build", str(tmp_path / "waymark.toml"), "--out", str(out), "-q",
                                       "--execution", "dask"])
    assert result.exit_code == 0, result.output + repr(result.exception)
    assert "Scored 3 publications" in result.output
    manifest = json.loads((out / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["config"]["score"]["execution"] == "dask", "the manifest records where scoring ran"
    assert not list((tmp_path / ".waymark-cache").glob("*.worker-*")), "the worker's cache file was merged"
