"""The benchmark harness's honesty about host speed (benchmarks/run.py): naive figures taken
from an earlier run are compared with plantlint timed now, so the run measures how the host
has drifted and shows the ratios both as measured and scaled to this host's speed. Plain
arithmetic, no timing in the test (common practice: timings belong in benchmarks/)."""

from __future__ import annotations

import importlib.util
import sys
from typing import Any

import pytest

from conftest import REPO

_SPEC = importlib.util.spec_from_file_location("bench_run", REPO / "benchmarks" / "run.py")
assert _SPEC is not None and _SPEC.loader is not None
bench = importlib.util.module_from_spec(_SPEC)
sys.modules["bench_run"] = bench  # its dataclasses look their module up while it loads
_SPEC.loader.exec_module(bench)


def _row(model: str, ratio: float, recorded: bool) -> Any:
    return bench.Row(model=model, source="generated", family="pendulum_chain", states=10, inputs=1, outputs=1,
                     plantlint_s=1.0, plantlint_peak_mb=80.0, plantlint_exit=0, budget_hit=False, stages=["all"],
                     findings={}, naive_s=ratio, naive_peak_mb=80.0, naive_capped=False, ratio=ratio,
                     naive_agrees=True, naive_recorded=recorded)


def test_recorded_naive_times_are_scaled_by_the_measured_drift_and_only_they() -> None:
    rows = [_row("recorded", 80.0, True), _row("measured_now", 150.0, False)]
    drift = {"model": "pendulum_chain_4", "recorded_s": 4.0, "recorded_date": "2026-12-02", "now_s": 5.6,
             "factor": 1.4}
    goal = bench.targets(rows, {}, {"median_s": 0.1}, drift)["ratio_100x_where_naive_over_10s"]
    assert goal["met"] is False  # as measured: 80 < 100
    assert goal["ratios_at_this_host_speed"] == {"recorded": 112.0, "measured_now": 150.0}
    assert goal["met_at_this_host_speed"] is True
    text = bench.markdown(rows, {"startup_floor_s": 0.2}, {"ratio_100x_where_naive_over_10s": goal},
                          {"date": "2026-12-03", "machine": "x", "python": "3", "version": "0", "command": "c",
                           "cap": 300, "timeout": 60, "naive_from": [("2026-12-02", 300.0)],
                           "naive_host_drift": drift})
    assert "**NOT met** (met with the recorded naive times scaled to this host's speed)" in text
    assert "took 5.60 s in this run against 4.00 s on 2026-12-02 (x1.40)" in text
    without = bench.targets(rows, {}, {"median_s": 0.1})["ratio_100x_where_naive_over_10s"]
    assert "ratios_at_this_host_speed" not in without


def test_the_calibration_model_is_the_smallest_recorded_run_long_enough(monkeypatch: pytest.MonkeyPatch) -> None:
    recorded = {
        "tiny": {"seconds": 0.7, "capped": False, "exit_code": 0, "date": "2026-12-02"},
        "capped": {"seconds": 300.0, "capped": True, "exit_code": None, "date": "2026-12-02"},
        "long": {"seconds": 114.0, "capped": False, "exit_code": 0, "date": "2026-12-02"},
        "chosen": {"seconds": 4.5, "capped": False, "exit_code": 0, "date": "2026-12-02"},
        "elsewhere": {"seconds": 3.0, "capped": False, "exit_code": 0, "date": "2026-12-02"},  # not in this suite
    }
    ran: list[list[str]] = []

    def fake_measure(cmd: list[str], cap: float, cwd: Any = None) -> Any:
        ran.append(cmd)
        return bench.Measured(6.3, 80.0, 0, "", "")

    monkeypatch.setattr(bench, "measure", fake_measure)
    drift = bench.host_drift(recorded, {"tiny", "capped", "long", "chosen"}, 300.0)
    assert drift == {"model": "chosen", "recorded_s": 4.5, "recorded_date": "2026-12-02", "now_s": 6.3, "factor": 1.4}
    assert len(ran) == 1 and ran[0][-1] == "chosen"
    assert bench.host_drift({"tiny": recorded["tiny"]}, {"tiny"}, 300.0) is None
