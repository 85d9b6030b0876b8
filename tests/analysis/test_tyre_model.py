"""A single-track vehicle with magic-formula tyres (tests/fixtures/models/
single_track_vehicle.plant, invented numbers): a realistic vehicle model whose brackets
sympy's expand used to multiply out for tens of seconds (the distributions stage ran out of
the 20 s budget and the model could not be checked at all).

The tyre force is Pacejka's magic formula D sin(C atan(B a - E (B a - atan(B a)))) (the
form recalled from memory; any vehicle dynamics text). References used here, none of them
plantlint's: both rates depend on the steering angle only through Fyf cos(delta), so
ad_f g = -(df/d delta) has the constant direction (1/m, lf/Iz, 0) and D_1 = span{g, ad_f g}
is involutive (worked by hand); the linearisation at straight running by sympy's Jacobian,
its Kalman rank by numpy and its invariant zero by scipy's Rosenbrock pencil; the sign change
of the steering's effect on the yaw rate (past the tyre's peak slip) by numpy sampling.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import sympy as sp

from conftest import FIXTURES, kalman, rosenbrock_zeros
from plantlint.cli import main

MODEL = FIXTURES / "models" / "single_track_vehicle.plant"

m, Iz, lf, lr, vx = 1500, 2500, sp.Rational(12, 10), sp.Rational(15, 10), 20
Bt, Ct, Dt, Et = 10, sp.Rational(19, 10), 6000, sp.Rational(97, 100)
vy, r, delta = X = sp.symbols("vy r delta")


def _force(alpha: sp.Expr) -> sp.Expr:
    return Dt * sp.sin(Ct * sp.atan(Bt * alpha - Et * (Bt * alpha - sp.atan(Bt * alpha))))


FYF, FYR = _force(delta - (vy + lf * r) / vx), _force(-(vy - lr * r) / vx)
F = [(FYF * sp.cos(delta) + FYR) / m - vx * r, (lf * FYF * sp.cos(delta) - lr * FYR) / Iz, sp.Integer(0)]
G = [sp.Integer(0), sp.Integer(0), sp.Integer(1)]


def _report(tmp_path: Path) -> dict:
    """The model through the real program with a 10 s budget: before, the distributions
    stage ran out of any budget below about 20 s."""
    out = tmp_path / "report.json"
    main(["check", "--no-cache", "--timeout", "10", "--format", "json", "--output", str(out), str(MODEL)])
    return json.loads(out.read_text(encoding="utf-8"))["files"][0]


def test_the_tyre_model_is_checked_completely(tmp_path: Path) -> None:
    report = _report(tmp_path)
    analysis = report["analysis"]
    assert analysis["stages"]["not_completed"] == []
    rules = sorted(f["rule"] for f in report["findings"])
    # the envelope reaches past the front tyre's peak: see the next test; every claim is decided
    assert rules == ["envelope-singular", "expectation-failed"]
    (failed,) = [f for f in report["findings"] if f["rule"] == "expectation-failed"]
    assert failed["message"].startswith("`expect regular` does not hold")
    assert not any(f.get("undecided") for f in report["findings"])


def test_the_steering_loses_yaw_authority_past_the_peak_inside_the_envelope() -> None:
    """L_g L_f r = d(rate r)/d delta changes sign in the envelope (numpy sampling), so a zero
    lies inside it: plantlint's envelope-singular finding is right."""
    term = sp.lambdify(X, sp.diff(F[1], delta), "numpy")
    rng = np.random.default_rng(7)
    points = rng.uniform([-3, -0.8, -0.4], [3, 0.8, 0.4], size=(20000, 3)).T
    values = term(*points)
    assert values.min() < 0 < values.max()


def test_the_distributions_and_zero_dynamics_at_straight_running(tmp_path: Path) -> None:
    straight = _report(tmp_path)["analysis"]["points"]["straight"]
    at = {vy: 0, r: 0, delta: 0}
    A = np.array(sp.Matrix(F).jacobian(X).subs(at), dtype=float)
    B = np.array(G, dtype=float).reshape(3, 1)
    C = np.array([[0.0, 1.0, 0.0]])
    assert straight["controllability_rank"] == np.linalg.matrix_rank(kalman(A, B)) == 3
    assert straight["involutive"] is True and straight["state_linearizable"] is True
    # ad_f g = -(df/d delta): its first two entries keep the ratio (1/m) : (lf/Iz) everywhere
    adg = [-sp.diff(e, delta) for e in F]
    assert sp.simplify(adg[0] * lf / Iz - adg[1] / m) == 0
    zero_dynamics = straight["zero_dynamics"]
    assert zero_dynamics["dimension"] == 1
    (ours,) = [complex(*e) for e in zero_dynamics["eigenvalues"]]
    (reference,) = rosenbrock_zeros(A, B, C)
    assert abs(ours - reference) <= 1e-9 * (1 + abs(reference))
    assert zero_dynamics["verdict"] == "minimum_phase" and reference.real < 0


def test_the_planar_vehicle_with_a_drive_force_is_checked_completely(tmp_path: Path) -> None:
    """The same tyres with the longitudinal speed as a state and a drive force as a second
    input (tests/fixtures/models/planar_vehicle.plant). The decoupling matrix of (speed, yaw
    rate) against (steering rate, drive force) is [[0, 1/m], [d(rate r)/d delta, *]], so its
    determinant vanishes where the steering loses yaw authority: numpy finds the sign change
    of d(rate r)/d delta in this envelope too."""
    path = FIXTURES / "models" / "planar_vehicle.plant"
    out = tmp_path / "report.json"
    main(["check", "--no-cache", "--timeout", "10", "--format", "json", "--output", str(out), str(path)])
    report = json.loads(out.read_text(encoding="utf-8"))["files"][0]
    assert report["analysis"]["stages"]["not_completed"] == []
    (singular,) = [f for f in report["findings"] if f["rule"] == "envelope-singular"]
    assert "det A (the decoupling matrix) vanishes" in singular["message"]
    vx = sp.Symbol("vx")
    front = _force(delta - (vy + lf * r) / vx)
    rear = _force(-(vy - lr * r) / vx)
    yaw = (lf * front * sp.cos(delta) - lr * rear) / Iz
    term = sp.lambdify((vx, vy, r, delta), sp.diff(yaw, delta), "numpy")
    points = np.random.default_rng(11).uniform([5, -3, -0.8, -0.4], [30, 3, 0.8, 0.4], size=(20000, 4)).T
    values = term(*points)
    assert values.min() < 0 < values.max()
