"""The numeric route (default) and the symbolic route agree on every model we ship.

Both routes analyse every model under tests/fixtures, example_repo/models and
benchmarks/results/models; relative degrees, ranks, verdicts, findings and
zero-dynamics eigenvalues must agree. The reference is the symbolic route
(sympy towers, the confirmation route). Tolerance for eigenvalues: 1e-9
relative (both routes feed the same exact or 40-digit eigenvalue code; the
numbers at the point are the same rationals). The only allowed difference is
an envelope left unproven by the symbolic route and proven by the numeric one
(a tighter certificate, never a changed verdict).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

import plantlint.kernel.lie as lie
from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import REPO

ROOT = REPO
#: Benchmark models whose symbolic route takes longer than a unit test should.
HEAVY = {"spring_chain_5", "spring_bank_12_6", "spring_bank_10_5", "quadrotor", "pendulum_bank_10",
         "spring_chain_4", "pendulum_bank_8", "spring_bank_8_4"}


def _models() -> list[Path]:
    paths = sorted((ROOT / "tests" / "fixtures").rglob("*.plant"))
    paths += sorted((ROOT / "example_repo" / "models").rglob("*.plant"))
    bench = sorted((ROOT / "benchmarks" / "results" / "models").glob("*.plant"))
    paths += [p for p in bench if p.stem not in HEAVY and not _large_chain(p.stem)]
    return paths


def _large_chain(stem: str) -> bool:
    """pendulum_chain_n / dense_chain_n beyond n = 3: the symbolic route needs minutes."""
    for family in ("pendulum_chain_", "dense_chain_"):
        if stem.startswith(family) and stem[len(family):].isdigit():
            return int(stem[len(family):]) > 3
    return False


def _run(path: Path, route: str, monkeypatch: pytest.MonkeyPatch) -> Any:
    monkeypatch.setattr(lie, "DEFAULT_ROUTE", route)
    return analyse_bytes(path.read_bytes(), Config())


def _summary(raw: Any) -> dict[str, Any]:
    a = raw.analysis or {}
    points = {}
    for name, pt in (a.get("points") or {}).items():
        zd = pt.get("zero_dynamics") or {}
        points[name] = {
            "relative_degree": pt.get("relative_degree"),
            "well_defined": pt.get("well_defined"),
            "decoupling_rank": pt.get("decoupling_rank"),
            "zero_dynamics": zd.get("verdict"),
            "controllability_rank": pt.get("controllability_rank"),
            "state_linearizable": pt.get("state_linearizable"),
        }
    return {
        "relative_degree": a.get("relative_degree"),
        "decoupling_rank": a.get("decoupling_rank"),
        "points": points,
        "distributions": (a.get("distributions") or {}).get("ranks"),
        "involutive": (a.get("distributions") or {}).get("involutive"),
    }


def _eigenvalues(raw: Any) -> dict[str, list[list[float]]]:
    a = raw.analysis or {}
    return {name: ((pt.get("zero_dynamics") or {}).get("eigenvalues") or [])
            for name, pt in (a.get("points") or {}).items()}


def _rules(raw: Any) -> list[tuple[str, str | None]]:
    out = []
    for f in raw.findings:
        if f.rule in ("envelope-unproven", "analysis-budget", "analysis-incomplete") or getattr(f, "undecided", False):
            continue  # budget-dependent (time budgets on a loaded machine); verdicts are compared above
        out.append((f.rule, f.point))
    return sorted(out, key=str)


@pytest.mark.parametrize("path", _models(), ids=lambda p: str(p.relative_to(ROOT)))
def test_numeric_and_symbolic_routes_agree(path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    symbolic = _run(path, "symbolic", monkeypatch)
    numeric = _run(path, "numeric", monkeypatch)
    assert _summary(numeric) == _summary(symbolic)
    assert _rules(numeric) == _rules(symbolic)
    s_env = ((symbolic.analysis or {}).get("envelope") or {}).get("regular")
    n_env = ((numeric.analysis or {}).get("envelope") or {}).get("regular")
    assert n_env == s_env or (s_env is None and n_env is True)
    s_eig, n_eig = _eigenvalues(symbolic), _eigenvalues(numeric)
    assert s_eig.keys() == n_eig.keys()
    for name in s_eig:
        assert len(s_eig[name]) == len(n_eig[name])
        for (a, b), (c, d) in zip(s_eig[name], n_eig[name]):
            assert abs(a - c) <= 1e-9 * (1 + abs(a)) and abs(b - d) <= 1e-9 * (1 + abs(b))
