"""Wall time of ``plantlint check`` over the demo repository, cold and warm (a script; not a test).

Cold: an empty cache folder, so every model is analysed in worker processes.
Warm: the same command again on the unchanged repository, served from the cache;
the target is under 0.5 s wall for 20 models on 2 cores, without importing sympy.

``example_repo/`` is measured as it is (with its own plantlint.toml). When it holds
fewer than 20 models, a copy in a temporary folder is topped up to 20 with variants
of its models (a comment line added, so each has its own cache entry) and measured too.
A model that the cold run had to stop at its time budget is left out of that copy:
such stops are not cached, so it would be analysed again on every warm run and the
figure would measure the budget, not the cache (the example_repo figure shows that).

    python benchmarks/bench_repo.py [--repeat 7] [--timeout SECONDS]

Appends the figures to benchmarks/results/repo.json and a line to benchmarks/results/repo.md.
"""

from __future__ import annotations

import argparse
import datetime as dt
import json
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent
PROJECT = HERE.parent
EXAMPLE = PROJECT / "example_repo"
RESULTS = HERE / "results"
TARGET_MODELS = 20
WARM_TARGET_SECONDS = 0.5


def plantlint(cwd: Path, args: list[str], python_flags: tuple[str, ...] = ()) -> tuple[float, subprocess.CompletedProcess[str]]:
    """One run of the command line in a fresh interpreter; its wall time in seconds."""
    env = {**os.environ, "NO_COLOR": "1"}
    start = time.perf_counter()
    out = subprocess.run([sys.executable, *python_flags, "-m", "plantlint", *args], cwd=cwd, env=env,
                         capture_output=True, text=True)
    return time.perf_counter() - start, out


def measure(cwd: Path, paths: list[str], repeat: int, timeout: float | None) -> dict[str, Any]:
    """Cold run into a fresh cache, then ``repeat`` warm runs on it."""
    with tempfile.TemporaryDirectory(prefix="plantlint-bench-cache-") as cache:
        args = ["check", "--format", "json", "--cache-dir", cache, *(["--timeout", str(timeout)] if timeout else []),
                *paths]
        cold_seconds, cold = plantlint(cwd, args)
        if cold.returncode not in (0, 1):
            raise SystemExit(f"cold run failed (exit {cold.returncode}):\n{cold.stderr}")
        report = json.loads(cold.stdout)
        warm = []
        for _ in range(repeat):
            seconds, again = plantlint(cwd, args)
            if again.stdout != cold.stdout:
                raise SystemExit("warm run gave a different report than the cold run")
            warm.append(seconds)
        _, traced = plantlint(cwd, args, ("-X", "importtime"))
        sympy_imported = any(line.rstrip().endswith("| sympy") for line in traced.stderr.splitlines())
    stopped = sorted(f["path"] for f in report["files"] for x in f["findings"]
                     if x["rule"] == "analysis-budget" and "time budget" in x["message"])
    return {
        "models": len(report["files"]),
        "exit_code": cold.returncode,
        "cold_seconds": round(cold_seconds, 3),
        "warm_seconds_median": round(statistics.median(warm), 3),
        "warm_seconds_min": round(min(warm), 3),
        "warm_runs": len(warm),
        "warm_imports_sympy": sympy_imported,
        "stopped_by_time_budget": stopped,
    }


def topped_up_copy(folder: Path, models: list[Path], leave_out: list[str]) -> None:
    """``example_repo`` (configuration and models) copied to ``folder``, without the models
    in ``leave_out``, and filled up to TARGET_MODELS models with commented variants."""
    shutil.copytree(EXAMPLE, folder, ignore=shutil.ignore_patterns(".plantlint", ".git"))
    for name in leave_out:
        (folder / name).unlink()
    kept = [m.relative_to(EXAMPLE) for m in models if m.relative_to(EXAMPLE).as_posix() not in leave_out]
    included = sorted(folder / m for m in kept)
    extra = folder / "models" / "variants"
    extra.mkdir(parents=True, exist_ok=True)
    k = 0
    while len(included) + k < TARGET_MODELS:
        source = included[k % len(included)]
        text = source.read_text(encoding="utf-8")
        (extra / f"{source.stem}_v{k + 1}.plant").write_text(f"# benchmark variant {k + 1} (invented copy)\n{text}",
                                                              encoding="utf-8")
        k += 1


def discovered(cwd: Path) -> list[Path]:
    """The models ``plantlint check`` picks up in ``cwd`` (its own discovery and configuration)."""
    code = ("import json, sys; from pathlib import Path; from plantlint.run.config import load_config; "
            "from plantlint.run.runner import discover; c = load_config(Path.cwd()); "
            "print(json.dumps([str(t.path.resolve()) for t in discover([str(c.root)], c.root, c.include, c.exclude)]))")
    out = subprocess.run([sys.executable, "-c", code], cwd=cwd, capture_output=True, text=True, check=True)
    return [Path(p) for p in json.loads(out.stdout)]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=7, help="warm runs to take the median of")
    parser.add_argument("--timeout", type=float, help="override the repository's per-model time budget")
    args = parser.parse_args()

    models = discovered(EXAMPLE)
    if not models:
        raise SystemExit("example_repo/ has no models yet")
    runs: dict[str, Any] = {"example_repo": measure(EXAMPLE, [], args.repeat, args.timeout)}
    if len(models) < TARGET_MODELS:
        leave_out = runs["example_repo"]["stopped_by_time_budget"]
        with tempfile.TemporaryDirectory(prefix="plantlint-bench-repo-") as tmp:
            folder = Path(tmp) / "repo"
            topped_up_copy(folder, models, leave_out)
            runs[f"{TARGET_MODELS}_models"] = measure(folder, [], args.repeat, args.timeout)
            runs[f"{TARGET_MODELS}_models"]["left_out"] = leave_out
    record = {
        "date": dt.datetime.now(dt.timezone.utc).isoformat(timespec="seconds"),
        "python": platform.python_version(),
        "cpus": os.cpu_count(),
        "load_average_1min": round(os.getloadavg()[0], 2) if hasattr(os, "getloadavg") else None,
        "timeout_override": args.timeout,
        "runs": runs,
    }
    RESULTS.mkdir(exist_ok=True)
    history_file = RESULTS / "repo.json"
    history = json.loads(history_file.read_text(encoding="utf-8")) if history_file.exists() else []
    history.append(record)
    history_file.write_text(json.dumps(history, indent=2) + "\n", encoding="utf-8")

    table = RESULTS / "repo.md"
    if not table.exists():
        table.write_text("# plantlint check over example_repo/ (benchmarks/bench_repo.py)\n\n"
                         f"Warm target: under {WARM_TARGET_SECONDS} s wall for {TARGET_MODELS} models on 2 cores.\n\n"
                         "| date (UTC) | cpus | load | set | models | cold s | warm s (median) | warm s (min) "
                         "| warm imports sympy | stopped by time budget |\n"
                         "|---|---|---|---|---|---|---|---|---|---|\n", encoding="utf-8")
    override = f" (--timeout {args.timeout:g})" if args.timeout else ""
    with table.open("a", encoding="utf-8") as fh:
        for name, r in runs.items():
            fh.write(f"| {record['date']} | {record['cpus']} | {record['load_average_1min']} | {name}{override} "
                     f"| {r['models']} "
                     f"| {r['cold_seconds']} | {r['warm_seconds_median']} | {r['warm_seconds_min']} "
                     f"| {'yes' if r['warm_imports_sympy'] else 'no'} | {', '.join(r['stopped_by_time_budget']) or '-'} |\n")
    for name, r in runs.items():
        verdict = "meets" if r["models"] >= TARGET_MODELS and r["warm_seconds_median"] < WARM_TARGET_SECONDS else "-"
        print(f"{name}: {r['models']} models, cold {r['cold_seconds']} s, warm median {r['warm_seconds_median']} s "
              f"(min {r['warm_seconds_min']} s), sympy on warm run: {r['warm_imports_sympy']}, "
              f"time-budget stops: {r['stopped_by_time_budget'] or 'none'}  [{verdict} warm target]")


if __name__ == "__main__":
    main()
