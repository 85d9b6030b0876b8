"""Whole-model analyses through the pipeline, held against published results and numpy."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import sympy as sp

from checker.config import Config
from checker.pipeline import analyse_bytes

MODELS = Path(__file__).parent / "fixtures" / "models"


def _analyse(name: str) -> tuple[dict, list]:
    raw = analyse_bytes((MODELS / name).read_bytes(), Config(envelope_seconds=3.0))
    assert raw.analysis is not None
    return raw.analysis, raw.findings


def test_pvtol_zero_dynamics_and_decoupling() -> None:
    """Hauser, Sastry & Meyer, "Nonlinear control design for slightly non-minimum phase
    systems: application to V/STOL aircraft", Automatica 28(4), 1992 (from memory): with
    outputs x, y the decoupling matrix has det = -eps (regular everywhere), and the zero
    dynamics are eps*th'' = g*sin(th): a saddle with eigenvalues +-sqrt(g/eps) at hover."""
    analysis, findings = _analyse("pvtol.plant")
    assert analysis["relative_degree"] == {"px": 2, "py": 2}
    assert analysis["envelope"]["regular"] is True
    hover = analysis["points"]["hover"]
    assert hover["equilibrium"] and hover["values"]["thrust"] == 9.81 and hover["values"]["torque"] == 0
    zd = hover["zero_dynamics"]
    assert zd["verdict"] == "non_minimum_phase" and zd["dimension"] == 2
    expected = math.sqrt(9.81 / 0.05)
    assert [round(re, 9) for re, _ in zd["eigenvalues"]] == [round(-expected, 9), round(expected, 9)]
    rules = {f.rule for f in findings}
    assert {"zero-dynamics-unstable", "expectation-failed"} <= rules


def test_pvtol_controllability_rank_at_hover_is_the_kalman_rank() -> None:
    """At an equilibrium held by u0 != 0 the rank of [g, ad g, ...] is read with the drift
    f + g u0; it must equal the Kalman rank of the linearisation (numpy, common practice)."""
    analysis, _ = _analyse("pvtol.plant")
    x, vx, y, vy, th, w = X = sp.symbols("x vx y vy th w")
    thrust, torque = sp.symbols("thrust torque")
    eps, g = sp.Rational(1, 20), sp.Rational(981, 100)
    F = sp.Matrix([vx, -thrust * sp.sin(th) + eps * torque * sp.cos(th), vy,
                   thrust * sp.cos(th) + eps * torque * sp.sin(th) - g, w, torque])
    at = {x: 0, vx: 0, y: 1, vy: 0, th: 0, w: 0, thrust: g, torque: 0}
    A = np.array(F.jacobian(sp.Matrix(X)).subs(at), dtype=float)
    B = np.array(F.jacobian(sp.Matrix([thrust, torque])).subs(at), dtype=float)
    kalman = np.hstack([np.linalg.matrix_power(A, k) @ B for k in range(6)])
    assert analysis["points"]["hover"]["controllability_rank"] == np.linalg.matrix_rank(kalman) == 6


def test_report_is_plain_json() -> None:
    analysis, _ = _analyse("pvtol.plant")
    assert json.loads(json.dumps(analysis)) == analysis
