"""The benchmark suite: plantlint against the naive notebook analysis, one command.

    python benchmarks/run.py [--quick] [--cap SECONDS] [--timeout SECONDS]
    python benchmarks/run.py --profile MODEL.plant     # where the time goes, by stage

For every generated model (``benchmarks/generate.py``) and every model of
``example_repo/`` it measures, each in its own subprocess, wall time and peak
memory (``ru_maxrss`` from ``os.wait4``, which includes the worker process) of

    plantlint check --no-cache --jobs 1 --format json MODEL

and of ``benchmarks/naive.py`` (capped: a capped run is recorded as "> cap" and its
ratio is a lower bound). It writes ``benchmarks/results/results.json`` and
``results.md``, fits the exponent of time against state count (log-log least
squares) and times ``plantlint --version``. A PNG plot is added when matplotlib
happens to be installed.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import signal
import subprocess
import sys
import tempfile
import time
from dataclasses import asdict, dataclass
from pathlib import Path
from typing import Any

import numpy as np

HERE = Path(__file__).resolve().parent
REPO = HERE.parent
RESULTS = HERE / "results"
sys.path.insert(0, str(HERE))
from generate import ModelSpec, extended_names, quadrotor, scaling_suite, spring_chain, write_suite  # noqa: E402

TARGET_RATIO = 100.0
TARGET_12x4_SECONDS = 10.0
TARGET_VERSION_SECONDS = 0.3
TARGET_CHAIN6_SECONDS = 1.0
TARGET_CHAIN20_SECONDS = 10.0
TARGET_CHAIN20_MB = 200.0
TARGET_EXPONENT = 3.0
TARGET_SMALL_SECONDS = 0.5
TARGET_STARTUP_SECONDS = 0.25


@dataclass
class Measured:
    """One subprocess: wall time, peak resident memory, exit code, output."""

    seconds: float
    peak_mb: float
    exit_code: int | None  # None: stopped at the cap
    stdout: str
    stderr: str

    @property
    def capped(self) -> bool:
        return self.exit_code is None


def user_environment() -> dict[str, str]:
    """The environment of a user's run: Python's bytecode cache on (an environment that
    sets PYTHONDONTWRITEBYTECODE would compile every plantlint module from source in every
    run, which no installed copy does). "Cold" in these tables means a fresh process
    with the bytecode already written, as on any second run after installing."""
    env = dict(os.environ)
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    return env


def measure(cmd: list[str], cap: float, cwd: Path = REPO) -> Measured:
    """Run ``cmd``; wall time and ru_maxrss of it and its waited-for children."""
    with tempfile.TemporaryFile() as out, tempfile.TemporaryFile() as err:
        start = time.perf_counter()
        proc = subprocess.Popen(cmd, stdout=out, stderr=err, cwd=cwd, start_new_session=True,
                                env=user_environment())
        capped = False
        while True:
            pid, status, usage = os.wait4(proc.pid, os.WNOHANG)
            if pid:
                break
            if time.perf_counter() - start > cap:
                capped = True
                os.killpg(proc.pid, signal.SIGKILL)
                pid, status, usage = os.wait4(proc.pid, 0)
                break
            time.sleep(0.005)
        seconds = time.perf_counter() - start
        proc.returncode = os.waitstatus_to_exitcode(status)
        out.seek(0)
        err.seek(0)
        return Measured(seconds, usage.ru_maxrss / 1024.0, None if capped else proc.returncode,
                        out.read().decode("utf-8", "replace"), err.read().decode("utf-8", "replace"))


def plantlint_command() -> list[str]:
    """The installed console script next to this interpreter (no shell shims in the timing)."""
    script = Path(sys.executable).parent / "plantlint"
    return [str(script)] if script.exists() else [sys.executable, "-m", "plantlint"]


@dataclass
class Row:
    model: str
    source: str  # generated | example_repo
    family: str
    states: int
    inputs: int
    outputs: int
    plantlint_s: float
    plantlint_peak_mb: float
    plantlint_exit: int | None
    budget_hit: bool
    stages: list[str]
    findings: dict[str, int]
    naive_s: float | None
    naive_peak_mb: float | None
    naive_capped: bool
    ratio: float | None  # naive / plantlint; a lower bound when naive_capped
    naive_agrees: bool | None  # same relative degrees as plantlint
    analysis_s: float | None = None  # in-process analysis of the model, imports excluded
    naive_recorded: bool = False  # the naive figure comes from results/naive.json, not this run
    #: the same check in the default text format (what a pre-commit hook runs), median wall time
    text_s: float | None = None
    #: the route that answers the text format: "light" (proven clean without sympy) or "full"
    route: str | None = None


def _findings(report: dict[str, Any]) -> tuple[dict[str, int], bool, dict[str, Any]]:
    counts: dict[str, int] = {}
    analysis: dict[str, Any] = {}
    for file in report.get("files", []):
        analysis = file.get("analysis") or {}
        for f in file.get("findings", []):
            counts[f["rule"]] = counts.get(f["rule"], 0) + 1
    return counts, "analysis-budget" in counts or "analysis-incomplete" in counts, analysis


def _stages(report: dict[str, Any]) -> list[str]:
    for file in report.get("files", []):
        for f in file.get("findings", []):
            if f["rule"] in ("analysis-budget", "analysis-incomplete"):
                text = f["message"].split("completed: ", 1)[-1].split(";")[0]
                return [s.strip() for s in text.split(",") if s.strip() and s.strip() != "none"]
    return ["all"]


NAIVE_FILE = RESULTS / "naive.json"


def naive_only(suite: list[tuple[ModelSpec, Path]], cap: float) -> None:
    """Only the naive analysis, one model after another, each capped at ``cap`` seconds.

    Written to ``results/naive.json`` after every model (a long run stopped part-way keeps
    what it measured). ``--naive-from`` makes a later full run take these figures instead of
    measuring the naive way again at a lower cap."""
    done: dict[str, Any] = json.loads(NAIVE_FILE.read_text(encoding="utf-8")) if NAIVE_FILE.exists() else {}
    for spec, _ in suite:
        nv = measure([sys.executable, str(HERE / "naive.py"), spec.name], cap)
        done[spec.name] = {"seconds": round(cap if nv.capped else nv.seconds, 3), "capped": nv.capped, "cap": cap,
                           "peak_mb": round(nv.peak_mb, 1), "exit_code": nv.exit_code,
                           "stdout": nv.stdout.strip().splitlines()[-1] if nv.stdout.strip() else "",
                           "date": time.strftime("%Y-%m-%d")}
        NAIVE_FILE.write_text(json.dumps(done, indent=2) + "\n", encoding="utf-8")
        print(spec.name, done[spec.name]["seconds"], "capped" if nv.capped else "", flush=True)


def _naive(spec: ModelSpec, cap: float, recorded: dict[str, Any] | None) -> tuple[Measured, bool]:
    """The naive run of ``spec`` and whether it is a recorded one: from ``recorded`` (a
    ``--naive-only`` file) when it has the model at a cap at least ``cap``, measured now
    otherwise."""
    entry = (recorded or {}).get(spec.name)
    if entry and entry["cap"] >= cap:
        return Measured(entry["seconds"], entry["peak_mb"], None if entry["capped"] else entry["exit_code"],
                        entry["stdout"], ""), True
    run = measure([sys.executable, str(HERE / "naive.py"), spec.name], cap)
    if run.capped:
        run.seconds = cap
    return run, False


#: With recorded naive figures, the smallest recorded model whose naive run took at least
#: this long (not capped) is run again now, to measure how the host's speed has drifted.
CALIBRATION_SECONDS = 2.0


def host_drift(recorded: dict[str, Any], names: set[str], cap: float) -> dict[str, Any] | None:
    """How much slower (factor > 1) or faster this host runs the naive analysis now than when
    ``recorded`` was measured: one recorded model run again. A ratio of plantlint timed now to
    a naive run timed on another day compares two host speeds; this says by how much. None
    when no recorded model serves (none long enough, or the run now fails or hits the cap)."""
    candidates = sorted((e["seconds"], name) for name, e in recorded.items()
                        if name in names and not e["capped"] and e["exit_code"] == 0
                        and e["seconds"] >= CALIBRATION_SECONDS)
    if not candidates:
        return None
    then, name = candidates[0]
    now = measure([sys.executable, str(HERE / "naive.py"), name], cap)
    if now.capped or now.exit_code != 0:
        return None
    return {"model": name, "recorded_s": then, "recorded_date": recorded[name]["date"],
            "now_s": round(now.seconds, 3), "factor": round(now.seconds / then, 3)}


def bench_model(path: Path, spec: ModelSpec | None, cap: float, timeout: float, repeat: int = 3,
                recorded: dict[str, Any] | None = None) -> Row:
    """plantlint and (for generated models) the naive analysis on one model.

    plantlint (``--jobs 1``) is timed alone, ``repeat`` times, and the run of median wall
    time is kept: a single cold run of about a second varies by a few tenths on a shared
    machine. The naive analysis runs once, after it, also alone (or comes from ``recorded``,
    see :func:`naive_only`)."""
    command = plantlint_command() + ["check", "--no-cache", "--jobs", "1", "--timeout", f"{timeout:g}",
                                     "--format", "json", str(path)]
    pl = _median_run(command, timeout + 60, repeat)
    nv, from_file = _naive(spec, cap, recorded) if spec else (None, False)
    try:
        report = json.loads(pl.stdout)
    except ValueError:
        report = {}
    counts, budget, analysis = _findings(report)
    if report.get("files") == []:
        counts = {"(not checked: excluded by the repository's configuration)": 1}
    naive_s = naive_mb = ratio = None
    agrees = None
    capped = False
    if nv is not None:
        naive_s, naive_mb, capped = nv.seconds, nv.peak_mb, nv.capped
        ratio = naive_s / pl.seconds
        if not nv.capped and nv.exit_code == 0 and analysis.get("relative_degree") is not None:
            naive = json.loads(nv.stdout.strip().splitlines()[-1])
            agrees = naive["relative_degree"] == analysis.get("relative_degree")
    analysis_s = analysis_time(path, timeout)
    text_run = _median_run([c for c in command if c not in ("--format", "json")], timeout + 60, repeat)
    from plantlint.analysis.light import light_check

    route = "light" if light_check(path.read_bytes()) is not None else "full"
    text = path.read_text(encoding="utf-8")
    words = [line.split()[0] for line in text.splitlines() if line.strip() and not line.lstrip().startswith("#")]
    return Row(
        model=spec.name if spec else str(path.relative_to(REPO)), source="generated" if spec else "example_repo",
        family=spec.family if spec else "example", states=words.count("state"), inputs=words.count("input"),
        outputs=words.count("output"), plantlint_s=round(pl.seconds, 3), plantlint_peak_mb=round(pl.peak_mb, 1),
        plantlint_exit=pl.exit_code, budget_hit=budget, stages=_stages(report), findings=counts,
        naive_s=round(naive_s, 3) if naive_s is not None else None,
        naive_peak_mb=round(naive_mb, 1) if naive_mb is not None else None, naive_capped=capped,
        ratio=round(ratio, 3) if ratio is not None else None, naive_agrees=agrees, analysis_s=analysis_s,
        naive_recorded=from_file, text_s=round(text_run.seconds, 3), route=route,
    )


def _median_run(command: list[str], cap: float, repeat: int) -> Measured:
    """The run of median wall time of ``repeat`` runs (at least one)."""
    runs = sorted((measure(command, cap) for _ in range(max(repeat, 1))), key=lambda m: m.seconds)
    return runs[len(runs) // 2]


_ANALYSIS_TIMER = """
import sys, time
from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
import plantlint.analysis.engine  # imports are not the analysis
# warm-up on a one-state model with units: parser tables, the unit registry, other lazy caches
analyse_bytes(b"plant warm\\nstate x [m] in -1 .. 1\\ninput u [m/s] in -1 .. 1\\nrate x = -x + u\\noutput y [m] = x\\n", Config())
data = open(sys.argv[1], "rb").read()
start = time.perf_counter()
analyse_bytes(data, Config())
print(time.perf_counter() - start)
"""


def analysis_time(path: Path, timeout: float) -> float | None:
    """Reading and analysing one model in a fresh process after the imports and a warm-up
    (parser tables, unit registry): what the model costs, apart from the start-up that
    every run pays."""
    run = measure([sys.executable, "-c", _ANALYSIS_TIMER, str(path)], cap=timeout)
    try:
        return round(float(run.stdout.strip().splitlines()[-1]), 3)
    except (ValueError, IndexError):
        return None


def fit_exponent(states: list[int], seconds: list[float]) -> float | None:
    """Slope of log(time) against log(states): time ~ n^slope."""
    if len(set(states)) < 2:
        return None
    slope, _ = np.polyfit(np.log(states), np.log(seconds), 1)
    return float(slope)


def exponential_rate(states: list[int], seconds: list[float]) -> float | None:
    """Slope of log(time) against n (time ~ exp(rate n)); compared with the power law."""
    if len(set(states)) < 2:
        return None
    rate, _ = np.polyfit(np.array(states, dtype=float), np.log(seconds), 1)
    return float(rate)


def offset_fits(states: list[int], seconds: list[float]) -> dict[str, Any] | None:
    """t = a + b n^p against t = a + b exp(c n), least squares on log t (scipy's curve_fit,
    a, b, p, c >= 0). The offset a is the fixed cost of any model (reading, the stages'
    set-up); without it, a cost that is flat at small n and then polynomial looks
    exponential to a two-parameter fit."""
    from scipy.optimize import curve_fit

    if len(set(states)) < 4:
        return None
    n, y = np.array(states, dtype=float), np.log(np.maximum(seconds, 1e-3))
    models = {"power law": (lambda n, a, b, p: np.log(a + b * n ** p), (0.01, 1e-3, 1.5)),
              "exponential": (lambda n, a, b, c: np.log(a + b * np.exp(c * n)), (0.01, 0.01, 0.05))}
    out: dict[str, Any] = {}
    for name, (f, start) in models.items():
        try:
            params, _ = curve_fit(f, n, y, p0=start, bounds=([0, 1e-12, 0], [100, 100, 10]), maxfev=20000)
        except (RuntimeError, ValueError):
            return None
        out[name] = {"residual": round(float(np.sum((f(n, *params) - y) ** 2)), 4),
                     "params": [float(f"{v:.4g}") for v in params]}
    out["better_fit"] = min(("power law", "exponential"), key=lambda k: out[k]["residual"])
    out["exponent"] = round(out["power law"]["params"][2], 2)
    return out


def growth(rows: list[Row], floor: float) -> dict[str, Any]:
    """Power-law and exponential fits of (time - start-up floor) against states, per family and
    overall, on the sizes of the issue; and, with the extended sizes as well, the offset fits
    of the analysis times that tell polynomial from exponential growth."""
    extended = extended_names()
    usable = [r for r in rows if r.source == "generated" and not r.budget_hit]
    out: dict[str, Any] = {"startup_floor_s": round(floor, 3)}
    groups: dict[str, list[Row]] = {"all generated": [r for r in usable if r.model not in extended]}
    wide: dict[str, list[Row]] = {}
    for r in usable:
        wide.setdefault(r.family, []).append(r)
        if r.model not in extended:
            groups.setdefault(r.family, []).append(r)
    for name, group in groups.items():
        ns = [r.states for r in group]
        raw = [r.plantlint_s for r in group]
        net = [max(r.plantlint_s - floor, 0.05) for r in group]
        if len(set(ns)) < 3:
            continue
        p_net, p_raw = fit_exponent(ns, net), fit_exponent(ns, raw)
        e_net = exponential_rate(ns, net)
        resid_p = _residual(np.log(ns), np.log(net))
        resid_e = _residual(np.array(ns, dtype=float), np.log(net))
        inner = [(r.states, max(r.analysis_s, 0.01)) for r in group if getattr(r, "analysis_s", None)]
        p_inner = fit_exponent([a for a, _ in inner], [b for _, b in inner]) if len({a for a, _ in inner}) >= 3 else None
        out[name] = {"states": ns, "exponent_raw": round(p_raw or 0, 2), "exponent_net": round(p_net or 0, 2),
                     "exponent_analysis": round(p_inner, 2) if p_inner is not None else None,
                     "exp_rate_per_state": round(e_net or 0, 3),
                     "better_fit": "power law" if resid_p <= resid_e else "exponential"}
        timed = [(r.states, r.analysis_s) for r in wide.get(name, []) if r.analysis_s]
        if name != "all generated" and timed:
            out[name]["offset_fits_analysis"] = offset_fits([a for a, _ in timed], [b for _, b in timed])
            out[name]["largest_states"] = max(a for a, _ in timed)
    return out


def _residual(x: np.ndarray, y: np.ndarray) -> float:
    coeffs = np.polyfit(x, y, 1)
    return float(np.sum((np.polyval(coeffs, x) - y) ** 2))


def version_time(repeats: int = 7) -> dict[str, float]:
    runs = [measure(plantlint_command() + ["--version"], cap=30).seconds for _ in range(repeats)]
    bare = [measure([sys.executable, "-c", "pass"], cap=30).seconds for _ in range(repeats)]
    return {"median_s": round(float(np.median(runs)), 3), "min_s": round(min(runs), 3),
            "python_startup_median_s": round(float(np.median(bare)), 3)}


def trivial_floor(folder: Path, timeout: float) -> float:
    """plantlint on a one-state model: process start, imports and worker start."""
    path = folder / "_floor.plant"
    path.write_text("# start-up floor; invented\nplant floor\nstate x in -1 .. 1\ninput u in -1 .. 1\n"
                    "rate x = -x + u\noutput y = x\npoint rest: x = 0\n", encoding="utf-8")
    runs = [measure(plantlint_command() + ["check", "--no-cache", "--jobs", "1", "--format", "json", str(path)],
                    cap=timeout).seconds for _ in range(3)]
    path.unlink()
    return float(np.median(runs))


def _complete(r: Row) -> bool:
    return not r.budget_hit and r.stages == ["all"] and r.plantlint_exit in (0, 1)


def targets(rows: list[Row], fits: dict[str, Any], version: dict[str, float],
            drift: dict[str, Any] | None = None) -> dict[str, Any]:
    slow = [r for r in rows if r.naive_s is not None and r.naive_s > 10]
    ratio_ok = all((r.ratio or 0) >= TARGET_RATIO for r in slow)
    # a recorded naive time scaled by the host's drift: what it would take on this host now
    # (an estimate from one calibration run, shown beside the ratio, never instead of it)
    factor = drift["factor"] if drift else 1.0
    adjusted = {r.model: round((r.ratio or 0) * (factor if r.naive_recorded else 1.0), 3) for r in slow}
    big = [r for r in rows if r.states == 12 and r.inputs == 4]
    families = {k: v for k, v in fits.items() if isinstance(v, dict) and k != "all generated"}
    stopped = sorted(r.model for r in rows if r.source == "generated" and r.budget_hit)
    by_name = {r.model: r for r in rows}
    chain6, chain20 = by_name.get("pendulum_chain_6"), by_name.get("pendulum_chain_20")
    small = [r for r in rows if r.source == "example_repo" or r.model == "quadrotor"]
    two = [r for r in rows if r.model == "spring_chain_1"]
    chain_fits = {k: f for k, f in families.items() if k in ("pendulum_chain", "dense_chain")}
    out = {
        "pendulum_chain_6_complete_under_1s": {
            "met": bool(chain6) and _complete(chain6) and chain6.plantlint_s < TARGET_CHAIN6_SECONDS
            and "envelope-unproven" not in chain6.findings if chain6 else None,
            "seconds": chain6.plantlint_s if chain6 else None, "findings": chain6.findings if chain6 else None},
        "pendulum_chain_20_under_10s_200MB": {
            "met": bool(chain20) and _complete(chain20) and chain20.plantlint_s < TARGET_CHAIN20_SECONDS
            and chain20.plantlint_peak_mb < TARGET_CHAIN20_MB if chain20 else None,
            "seconds": chain20.plantlint_s if chain20 else None, "peak_mb": chain20.plantlint_peak_mb if chain20 else None},
        "chain_growth_exponent_at_most_3": {
            "met": all((f.get("exponent_analysis") or f["exponent_net"]) <= TARGET_EXPONENT
                       for f in chain_fits.values()) if chain_fits else None,
            "exponents_analysis": {k: f.get("exponent_analysis") for k, f in chain_fits.items()},
            "exponents_net": {k: f["exponent_net"] for k, f in chain_fits.items()},
            "exponents_raw": {k: f["exponent_raw"] for k, f in chain_fits.items()}},
        # measured in the default text format (what `plantlint check` prints, and a pre-commit
        # hook reads); the json report, which shows the analysis, beside it
        "example_repo_and_quadrotor_under_0.5s": {
            "met": all(r.text_s is not None and r.text_s < TARGET_SMALL_SECONDS for r in small) if small else None,
            "text": {r.model: r.text_s for r in small}, "routes": {r.model: r.route for r in small},
            "json": {r.model: r.plantlint_s for r in small}},
        "two_state_check_under_0.25s": {
            "met": all(r.text_s is not None and r.text_s < TARGET_STARTUP_SECONDS for r in two) if two else None,
            "text": {r.model: r.text_s for r in two}, "routes": {r.model: r.route for r in two},
            "json": {r.model: r.plantlint_s for r in two}},
        "ratio_100x_where_naive_over_10s": {"met": ratio_ok if slow else None,
                                            "models": {r.model: r.ratio for r in slow},
                                            "naive_capped": {r.model: r.naive_capped for r in slow},
                                            **({"host_drift": drift, "ratios_at_this_host_speed": adjusted,
                                                "met_at_this_host_speed": all(v >= TARGET_RATIO
                                                                              for v in adjusted.values())}
                                               if drift and slow else {})},
        "12_state_4_input_under_10s": {"met": bool(big) and all(r.plantlint_s < TARGET_12x4_SECONDS and not r.budget_hit
                                                                 for r in big),
                                       "models": {r.model: r.plantlint_s for r in big}},
        "polynomial_growth": {"met": (all((f.get("offset_fits_analysis") or {}).get("better_fit") == "power law"
                                          and (f.get("offset_fits_analysis") or {}).get("exponent", 99) <= TARGET_EXPONENT
                                          for f in chain_fits.values()) and not stopped) if chain_fits else None,
                              "offset_fits_analysis": {k: {"better_fit": (f.get("offset_fits_analysis") or {}).get("better_fit"),
                                                           "exponent": (f.get("offset_fits_analysis") or {}).get("exponent"),
                                                           "largest_states": f.get("largest_states")}
                                                       for k, f in chain_fits.items()},
                              "exponents_net": {k: f["exponent_net"] for k, f in families.items()},
                              "better_fit": {k: f["better_fit"] for k, f in families.items()},
                              "stopped_by_budget": stopped},
        "version_under_0.3s": {"met": version["median_s"] < TARGET_VERSION_SECONDS, **version},
    }
    return out


def check_import_profile(model: Path, top: int = 12) -> list[tuple[str, float]]:
    """The slowest top-level imports of an in-process `check` of one model."""
    code = ("import sys; from plantlint.cli import main; "
            f"sys.argv = ['plantlint', 'check', '--no-cache', '--jobs', '1', {str(model)!r}]\n"
            "try:\n    main()\nexcept SystemExit:\n    pass")
    err = measure([sys.executable, "-X", "importtime", "-c", code], cap=120).stderr
    rows: list[tuple[str, float]] = []
    for line in err.splitlines():
        if not line.startswith("import time:") or "cumulative" in line:
            continue
        parts = line[len("import time:"):].split("|")
        if len(parts) == 3 and parts[1].strip().isdigit():
            name = parts[2].strip()
            # package roots (sympy, pint, lark, numpy, ...) wherever they are first imported,
            # and plantlint's own modules
            if "." not in name or name.startswith("plantlint."):
                rows.append((name, int(parts[1]) / 1e6))
    return sorted(rows, key=lambda r: -r[1])[:top]


def markdown(rows: list[Row], fits: dict[str, Any], goals: dict[str, Any], meta: dict[str, Any]) -> str:
    lines = [
        "# Benchmark results", "",
        f"Run {meta['date']} on {meta['machine']} (Python {meta['python']}), plantlint {meta['version']}, "
        f"`{meta['command']}`; naive cap {meta['cap']:g} s, plantlint budget {meta['timeout']:g} s."
        + (" Naive figures of the generated models from `results/naive.json` (measured alone, "
           + "; ".join(f"{date} at a cap of {cap:g} s" for date, cap in meta["naive_from"]) + ")."
           if meta.get("naive_from") else "") + _drift_text(meta.get("naive_host_drift")), "",
        "| model | n | m | p | plantlint s | text s (route) | analysis s | peak MB | naive s | ratio | stages | findings |",
        "|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---|---|",
    ]
    for r in rows:
        naive = "-" if r.naive_s is None else (f"> {r.naive_s:g}" if r.naive_capped else f"{r.naive_s:.2f}")
        ratio = "-" if r.ratio is None else (f">= {r.ratio:.2g}" if r.naive_capped else f"{r.ratio:.2g}")
        time_s = f"{r.plantlint_s:.2f}" + (" (budget)" if r.budget_hit else "")
        found = ", ".join(f"{k} x{v}" if v > 1 else k for k, v in sorted(r.findings.items())) or "none"
        if r.naive_agrees is False:
            found += "; naive relative degrees differ"
        stages = "all" if r.stages == ["all"] else ("stopped after: " + (", ".join(r.stages) or "nothing"))
        analysis = "-" if r.analysis_s is None else f"{r.analysis_s:.2f}"
        shown = "-" if r.text_s is None else f"{r.text_s:.2f} ({r.route})"
        lines.append(f"| {r.model} | {r.states} | {r.inputs} | {r.outputs} | {time_s} | {shown} | {analysis} | "
                     f"{r.plantlint_peak_mb:.0f} | "
                     f"{naive} | {ratio} | {stages} | {found} |")
    lines += ["", "n states, m inputs, p outputs. plantlint s: `plantlint check --no-cache --jobs 1 --format json` "
              f"cold, wall time (median of {meta.get('repeat', 1)} runs); text s: the same in the default text "
              "format, what a pre-commit hook runs, and the route that answered it (light: proven clean without "
              "sympy; full: the analysis); "
              "analysis s: the same model read and analysed in a fresh process after the imports and a "
              "warm-up on a one-state model (what the model costs apart from start-up). ratio = naive / plantlint wall time (\">=\" when the naive run "
              "hit its cap). The naive run does only the structure (relative degrees, decoupling matrix, its "
              "determinant); plantlint also proves regularity over the envelope, solves the points and computes "
              "zero dynamics and distributions.", "", "## Growth", ""]
    lines.append(f"Start-up floor (one-state model): {fits['startup_floor_s']} s. Exponents fitted to "
                 "time minus the floor, log-log least squares, on the sizes of the issue (pendulum chain to "
                 "40 states, dense chain to 16); models stopped by the budget are left out. \"better fit\" "
                 "compares that power law with an exponential fitted the same way.")
    lines.append("")
    for name, fit in fits.items():
        if isinstance(fit, dict):
            lines.append(f"- {name}: time ~ n^{fit['exponent_net']} (raw {fit['exponent_raw']}; analysis only "
                         f"{fit.get('exponent_analysis')}); "
                         f"exponential rate {fit['exp_rate_per_state']}/state; better fit: {fit['better_fit']}")
    lines += ["", "Polynomial or exponential: the analysis times (start-up excluded), with the extended sizes "
              "(pendulum chain to 80 states, dense chain to 32), fitted as t = a + b n^p and as "
              "t = a + b exp(c n) (least squares on log t; the offset a is what any model costs). Without "
              "the offset, a cost that is flat at small n and then polynomial looks exponential.", ""]
    for name, fit in fits.items():
        off = fit.get("offset_fits_analysis") if isinstance(fit, dict) else None
        if off:
            pw, ex = off["power law"], off["exponential"]
            lines.append(f"- {name} (to {fit.get('largest_states')} states): a + b n^p with p = {off['exponent']}, "
                         f"residual {pw['residual']}; a + b exp(c n) with c = {ex['params'][2]:.3g}/state, residual "
                         f"{ex['residual']}; better fit: {off['better_fit']}")
    lines += ["", "## Targets", "", "| target | verdict | measured |", "|---|---|---|"]
    for name, goal in goals.items():
        verdict = "**" + {True: "met", False: "NOT met", None: "not applicable"}[goal["met"]] + "**"
        if goal["met"] is False and goal.get("met_at_this_host_speed"):
            verdict += " (met with the recorded naive times scaled to this host's speed)"
        detail = {k: v for k, v in goal.items() if k != "met"}
        lines.append(f"| {name} | {verdict} | `{json.dumps(detail)}` |")
    if meta.get("imports"):
        lines += ["", "## Start-up: slowest imports of `check` on a 2-state model (python -X importtime)", "",
                  "| module | cumulative s |", "|---|---:|"]
        lines += [f"| {name} | {seconds:.3f} |" for name, seconds in meta["imports"]]
    return "\n".join(lines) + "\n"


def _drift_text(drift: dict[str, Any] | None) -> str:
    if not drift:
        return ""
    return (f" Host drift: the naive run of {drift['model']} took {drift['now_s']:.2f} s in this run against "
            f"{drift['recorded_s']:.2f} s on {drift['recorded_date']} (x{drift['factor']:.2f}), so ratios to the "
            "recorded naive figures compare two host speeds; the ratio target also shows them scaled to this "
            "host's speed. Absolute times move with the host as well.")


def plot(rows: list[Row], path: Path) -> bool:
    try:
        import matplotlib

        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:
        return False
    from matplotlib.ticker import NullFormatter, ScalarFormatter

    fig, ax = plt.subplots(figsize=(6.5, 4.2))
    for fam in sorted({r.family for r in rows if r.source == "generated"}):
        family = sorted((r for r in rows if r.family == fam), key=lambda r: r.states)
        line, = ax.loglog([r.states for r in family], [r.plantlint_s for r in family], "o-", label=f"{fam}: check, cold")
        timed = [r for r in family if r.analysis_s]
        if len(timed) > 1:
            ax.loglog([r.states for r in timed], [r.analysis_s for r in timed], "s--", color=line.get_color(),
                      markersize=3, label=f"{fam}: analysis only")
    for axis in (ax.xaxis, ax.yaxis):
        axis.set_major_formatter(ScalarFormatter())
        axis.set_minor_formatter(NullFormatter())
    ax.set_xticks([2, 4, 8, 16, 32, 64])
    ax.set_yticks([0.01, 0.1, 1, 10])
    ax.set_xlabel("states")
    ax.set_ylabel("seconds")
    ax.set_title("plantlint check: wall time (start-up included) and analysis time", fontsize=9)
    ax.legend(fontsize=6)
    fig.tight_layout()
    fig.savefig(path, dpi=100)
    return True


class _Stop(Exception):
    """Raised by the alarm that ends a profile."""


def profile(model: Path, limit: float) -> None:
    """cProfile of the in-process analysis of one model, with the time of each stage
    (stopped after ``limit`` seconds, so a runaway stage is profiled too)."""
    import cProfile
    import pstats

    sys.path.insert(0, str(REPO))
    from plantlint.run.config import Config
    from plantlint.run.pipeline import analyse_bytes

    start = time.perf_counter()
    last = [start]

    def stage(name: str, _snapshot: Any = None) -> None:
        now = time.perf_counter()
        print(f"stage {name:>14}: {now - last[0]:8.2f} s", flush=True)
        last[0] = now

    def alarm(_signum: int, _frame: Any) -> None:
        raise _Stop

    signal.signal(signal.SIGALRM, alarm)
    signal.setitimer(signal.ITIMER_REAL, limit)
    prof = cProfile.Profile()
    prof.enable()
    try:
        raw = analyse_bytes(model.read_bytes(), Config(), stage)
        summary = f"findings: {sorted(f.rule for f in raw.findings)}"
    except _Stop:
        summary = f"stopped after {limit:g} s in the stage after the last one printed"
    finally:
        prof.disable()
        signal.setitimer(signal.ITIMER_REAL, 0)
    print(f"total {time.perf_counter() - start:.2f} s; {summary}")
    stats = pstats.Stats(prof)
    stats.sort_stats("cumulative").print_stats(40)
    stats.sort_stats("tottime").print_stats(15)


def report_only() -> None:
    data = json.loads((RESULTS / "results.json").read_text(encoding="utf-8"))
    rows = [Row(**r) for r in data["rows"]]
    fits = growth(rows, data["growth"]["startup_floor_s"])
    goals = targets(rows, fits, {k: v for k, v in data["targets"]["version_under_0.3s"].items() if k != "met"},
                    data["meta"].get("naive_host_drift"))
    data.update(growth=fits, targets=goals)
    write(data, rows)


def write(data: dict[str, Any], rows: list[Row]) -> None:
    (RESULTS / "results.json").write_text(json.dumps(data, indent=2) + "\n", encoding="utf-8")
    (RESULTS / "results.md").write_text(markdown(rows, data["growth"], data["targets"], data["meta"]), encoding="utf-8")
    if plot(rows, RESULTS / "scaling.png"):
        print("plot: benchmarks/results/scaling.png")
    print((RESULTS / "results.md").read_text(encoding="utf-8"))


def main() -> None:
    ap = argparse.ArgumentParser(description="plantlint benchmark suite")
    ap.add_argument("--quick", action="store_true", help="a smaller set of models")
    ap.add_argument("--cap", type=float, default=120.0, help="time cap of the naive analysis (s)")
    ap.add_argument("--timeout", type=float, default=120.0, help="plantlint's per-model budget (s)")
    ap.add_argument("--profile", metavar="MODEL", help="profile one model in-process and stop (a path, or the "
                    "name of a generated model such as pendulum_chain_6)")
    ap.add_argument("--profile-seconds", type=float, default=120.0, help="stop the profile after this long")
    ap.add_argument("--scaling", action="store_true",
                    help="only the scaling families (pendulum chain to n = 20, dense chain to 16 states), "
                         "the 2-state spring chain, the quadrotor and example_repo")
    ap.add_argument("--repeat", type=int, default=3, help="runs of plantlint per model; the median is kept")
    ap.add_argument("--naive-only", action="store_true",
                    help="measure only the naive analysis of the generated models (with --cap) into "
                         "results/naive.json")
    ap.add_argument("--naive-from", action="store_true",
                    help="take the naive figures from results/naive.json where it holds the model at a "
                         "cap at least --cap")
    ap.add_argument("--models", metavar="NAMES",
                    help="comma-separated generated models to keep (e.g. a longer --naive-only cap for one)")
    ap.add_argument("--report-only", action="store_true",
                    help="recompute fits, targets and the table from results/results.json (no measuring)")
    args = ap.parse_args()
    if args.report_only:
        report_only()
        return
    if args.profile:
        model = Path(args.profile)
        if not model.is_file():  # a generated model's name: its file in results/models
            model = RESULTS / "models" / f"{args.profile}.plant"
        if not model.is_file():
            ap.error(f"--profile: no model file {args.profile!r} (a path, or the name of a generated model "
                     f"in {RESULTS / 'models'})")
        profile(model, args.profile_seconds)
        return
    models = RESULTS / "models"
    RESULTS.mkdir(parents=True, exist_ok=True)
    if args.scaling:
        from generate import pendulum_chain

        chosen = [spring_chain(1), pendulum_chain(2), pendulum_chain(3), quadrotor(), *scaling_suite()]
        suite = write_suite(models, specs=chosen)
    else:
        suite = write_suite(models, args.quick)
    if args.models:
        keep = set(args.models.split(","))
        unknown = keep - {spec.name for spec, _ in suite}
        if unknown:
            ap.error(f"--models: no generated model {', '.join(sorted(unknown))}")
        suite = [(spec, path) for spec, path in suite if spec.name in keep]
    if args.naive_only:
        naive_only(sorted(suite, key=lambda sp: len(sp[0].resolved()[0])), args.cap)  # smallest first
        return
    recorded = json.loads(NAIVE_FILE.read_text(encoding="utf-8")) if args.naive_from and NAIVE_FILE.exists() else None
    # one unmeasured run writes the bytecode cache of every module a check imports
    measure([*plantlint_command(), "check", "--no-cache", str(suite[0][1])], cap=args.timeout)
    rows: list[Row] = []
    for spec, path in suite:
        rows.append(bench_model(path, spec, args.cap, args.timeout, args.repeat, recorded))
        print(json.dumps(asdict(rows[-1])), flush=True)
    for path in sorted((REPO / "example_repo").rglob("*.plant")):
        rows.append(bench_model(path, None, args.cap, args.timeout, args.repeat))
        print(json.dumps(asdict(rows[-1])), flush=True)
    floor = trivial_floor(models, args.timeout)
    fits = growth(rows, floor)
    version = version_time()
    drift = host_drift(recorded, {spec.name for spec, _ in suite}, args.cap) if recorded else None
    goals = targets(rows, fits, version, drift)
    from plantlint import __version__

    meta = {"date": time.strftime("%Y-%m-%d"), "machine": f"{platform.machine()}, {os.cpu_count()} CPUs",
            "python": platform.python_version(), "version": __version__,
            "command": "python benchmarks/run.py" + (" --quick" if args.quick else "")
            + (" --scaling" if args.scaling else "") + (f" --cap {args.cap:g}" if args.cap != 120 else "")
            + (f" --timeout {args.timeout:g}" if args.timeout != 120 else "")
            + (f" --repeat {args.repeat}" if args.repeat != 3 else "") + (" --naive-from" if recorded else "")
            + (f" --models {args.models}" if args.models else ""),
            "naive_from": (sorted({(e["date"], e["cap"]) for e in recorded.values()}) if recorded else None),
            "naive_host_drift": drift,
            "cap": args.cap, "timeout": args.timeout, "repeat": args.repeat, "bytecode": "cached (one unmeasured run first)",
            "imports": check_import_profile(models / "spring_chain_1.plant")}
    data = {"meta": meta, "rows": [asdict(r) for r in rows], "growth": fits, "targets": goals}
    write(data, rows)


if __name__ == "__main__":
    main()
