"""Wall time of cold and warm builds of the demo, and where it goes (issue 16, item 8).

    python bench/rebuild_timing.py                         # cold once, warm 3 times, warm after an alias edit
    python bench/rebuild_timing.py --compare /tmp/before   # the same, alternating with another source tree
    python bench/rebuild_timing.py --imports               # also: importing each heavy library alone

A cold build starts from a copy of example_input/ without any cache (so it exports the int8 model
too); a warm build runs `waymark build` again on the same copy, with the SQLite cache the cold one
left; "edited" is a warm build after a department alias was taken out of the config, as a research
office does between two builds (the departments section and its charts change). Every build is a fresh `python -m reporter build ... -v` process,
so imports and interpreter exit count as they do for a user. The seconds per stage come from the
line `-v` prints (reporter/stages.py; a tree from before it existed shows none); "outside stages"
is the rest: interpreter start, imports before the first stage, config checks, writing, exit.
CPU seconds (user + system of the build process) move less than wall seconds on a shared machine.

On a shared machine the load changes over minutes; `--compare` alternates the two trees build by
build (cold A, cold B, warm A, warm B, ...), so both meet the same spells. Results are printed and
written to bench/results/rebuild-timing.json.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
RESULTS = ROOT / "bench" / "results"
PREFIX = "seconds per stage:"  # reporter.stages.SUMMARY_PREFIX
HEAVY = ("pandas", "pydantic", "lingua", "sklearn.metrics", "statsmodels.stats.proportion", "altair", "vl_convert",
         "weasyprint", "onnxruntime", "transformers", "torch")
# A department alias taken out of the config: the departments section and its charts change.
ALIAS = '"Agriculture and Food Science" = "Agriculture & Food Science"\n'


def _env(tree: Path) -> dict[str, str]:
    return {**os.environ, "PYTHONPATH": str(tree)}


def build(tree: Path, config: Path, out: Path) -> dict:
    """One build with the `reporter` of `tree`, in its own process: wall and CPU seconds, seconds per stage."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    began = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "reporter", "build", str(config), "--out", str(out), "-v"],
                          capture_output=True, text=True, env=_env(tree), cwd=config.parent)
    wall = time.perf_counter() - began
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode != 0:
        raise SystemExit(f"build failed ({done.returncode}):\n{done.stdout[-2000:]}\n{done.stderr[-4000:]}")
    line = next((l for l in done.stderr.splitlines() if l.startswith(PREFIX)), PREFIX)
    stages = {name: float(value) for name, value in re.findall(r"([\w/]+) ([\d.]+)", line[len(PREFIX):])}
    top = sum(v for k, v in stages.items() if "/" not in k)
    return {
        "wall": round(wall, 2),
        "cpu": round(after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime, 2),
        "outside stages": round(wall - top, 2) if stages else None,
        "stages": stages,
        "stderr_lines": len(done.stderr.splitlines()),
    }


def import_seconds(module: str, repeats: int = 3) -> float:
    """Fastest of `repeats` fresh interpreters importing `module`, less a bare interpreter's start."""
    def fastest(code: str) -> float:
        times = []
        for _ in range(repeats):
            began = time.perf_counter()
            subprocess.run([sys.executable, "-c", code], check=True, env=_env(ROOT), capture_output=True)
            times.append(time.perf_counter() - began)
        return min(times)

    return round(fastest(f"import {module}") - fastest("pass"), 2)


def measure(trees: dict[str, Path], n_warm: int, work: Path) -> dict:
    """Cold, warm and edited builds of the demo for each tree, alternating between the trees."""
    projects = {}
    for name, tree in trees.items():
        project = work / name / "example_input"
        shutil.copytree(tree / "example_input", project, ignore=shutil.ignore_patterns(".waymark-cache"))
        projects[name] = project
    runs = {name: {"cold": None, "warm": [], "edited": None} for name in trees}

    def each(kind: str) -> None:
        for name, tree in trees.items():
            result = build(tree, projects[name] / "waymark.toml", work / name / "out")
            if kind == "warm":
                runs[name]["warm"].append(result)
            else:
                runs[name][kind] = result

    each("cold")
    for _ in range(n_warm):
        each("warm")
    for project in projects.values():
        config = project / "waymark.toml"
        text = config.read_text(encoding="utf-8")
        if ALIAS not in text:
            raise SystemExit(f"{config}: the alias this benchmark edits is not there any more: {ALIAS.strip()}")
        config.write_text(text.replace(ALIAS, "", 1), encoding="utf-8")
    each("edited")
    return runs


def main(argv: list[str] | None = None) -> dict:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--warm", type=int, default=3, help="warm builds per tree (the median is reported)")
    parser.add_argument("--compare", type=Path, default=None, metavar="TREE",
                        help="another source tree (with reporter/ and example_input/) to build alternately")
    parser.add_argument("--imports", action="store_true", help="also time importing each heavy library alone")
    args = parser.parse_args(argv)

    trees = {"this tree": ROOT} | ({"compared": args.compare.resolve()} if args.compare else {})
    out: dict = {"load average at start": os.getloadavg()}
    with tempfile.TemporaryDirectory(prefix="waymark-rebuild-") as work:
        out["runs"] = measure(trees, args.warm, Path(work))
    out["load average at end"] = os.getloadavg()
    if args.imports:
        out["import seconds"] = {module: import_seconds(module) for module in HEAVY}
    for name, runs in out["runs"].items():
        print(f"\n{name}: {trees[name]}")
        _print(runs)
    print(f"\nload average: {out['load average at start'][0]:.2f} at start, {out['load average at end'][0]:.2f} at end")
    for module, seconds in out.get("import seconds", {}).items():
        print(f"import {module:34} {seconds:6.2f}")
    RESULTS.mkdir(parents=True, exist_ok=True)
    (RESULTS / "rebuild-timing.json").write_text(json.dumps(out, indent=2) + "\n", encoding="utf-8")
    return out


def _median_run(runs: list[dict]) -> dict:
    return sorted(runs, key=lambda r: r["wall"])[len(runs) // 2]


def _cell(value) -> str:
    return f"{value:>20.2f}" if isinstance(value, (int, float)) else f"{'-':>20}"


def _print(runs: dict) -> None:
    columns = {"cold": runs["cold"], "warm (median)": _median_run(runs["warm"]), "warm, alias edited": runs["edited"]}
    names = list(dict.fromkeys(name for run in columns.values() for name in run["stages"]))
    print(f"{'seconds':28}" + "".join(f"{title:>20}" for title in columns))
    for key in ("wall", "cpu", "outside stages"):
        print(f"{key:28}" + "".join(_cell(run[key]) for run in columns.values()))
    for name in names:
        print(f"{name:28}" + "".join(_cell(run["stages"].get(name)) for run in columns.values()))
    walls = [r["wall"] for r in runs["warm"]]
    print("warm walls: " + ", ".join(f"{w:.2f}" for w in walls) + f" (median {statistics.median(walls):.2f})")


if __name__ == "__main__":
    main()
