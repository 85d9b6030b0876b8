"""Whole-model analyses through the pipeline, held against published results and numpy."""

from __future__ import annotations

import json
import math

import numpy as np
import sympy as sp

from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import FIXTURES

MODELS = FIXTURES / "models"


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


def _plain_sympy_ranks(f: sp.Matrix, gs: list[sp.Matrix], X: list[sp.Symbol], at: dict) -> list[int]:
    """Ranks of G_k = span{ad_f^j g_i, j <= k} at a point, brackets by Matrix.jacobian
    (sympy done another way, common practice)."""
    Xm = sp.Matrix(X)
    columns, current, ranks = [], list(gs), []
    for _ in range(len(X)):
        columns += current
        ranks.append(sp.Matrix.hstack(*columns).subs(at).rank())
        current = [c.jacobian(Xm) * f - f.jacobian(Xm) * c for c in current]
    return ranks


def test_ranks_known_from_the_outputs_match_brackets() -> None:
    """When the outputs' vector relative degree sums to n with a nonsingular decoupling
    matrix, the plant is feedback equivalent to chains of integrators (Isidori, 3rd ed.,
    sec. 5.2, from memory), so rank G_k = sum_i min(k+1, r_i); checked against brackets."""
    from plantlint.analysis.engine import outputs_linearize
    from plantlint.kernel.lie import Kernel
    from plantlint.kernel.plant import Plant
    from plantlint.analysis.structure import analyse_structure

    # flexible joint (Spong 1987; Khalil 3rd ed. sec. 13.2, from memory), invented numbers
    q1, w1, q2, w2, u = sp.symbols("q1 w1 q2 w2 u")
    f = sp.Matrix([w1, -10 * sp.sin(q1) - 4 * (q1 - q2), w2, 2 * (q1 - q2)])
    g = sp.Matrix([0, 0, 0, 3])
    plant = Plant.from_matrices("joint", [q1, w1, q2, w2], [u], list(f), [list(g)], [q1])
    ds = outputs_linearize(analyse_structure(Kernel(plant)), 4, 1)
    at = {q1: sp.Rational(1, 3), w1: sp.Rational(-1, 5), q2: sp.Rational(2, 7), w2: sp.Rational(1, 11)}
    assert ds is not None and list(ds.ranks) == _plain_sympy_ranks(f, [g], [q1, w1, q2, w2], at) == [1, 2, 3, 4]

    # two inputs acting on two double integrators with a coupling: r = (2, 2)
    x1, v1, x2, v2, a, b = sp.symbols("x1 v1 x2 v2 a b")
    f2 = sp.Matrix([v1, -x1 + x2**2, v2, -sp.sin(x2)])
    g1, g2 = sp.Matrix([0, 1, 0, 0]), sp.Matrix([0, x1, 0, 2])
    plant2 = Plant.from_matrices("pair", [x1, v1, x2, v2], [a, b], list(f2), [list(g1), list(g2)], [x1, x2])
    ds2 = outputs_linearize(analyse_structure(Kernel(plant2)), 4, 2)
    at2 = {x1: sp.Rational(1, 2), v1: sp.Rational(1, 3), x2: sp.Rational(-1, 4), v2: sp.Rational(2, 5)}
    assert ds2 is not None and list(ds2.ranks) == _plain_sympy_ranks(f2, [g1, g2], [x1, v1, x2, v2], at2) == [2, 4, 4, 4]


def test_no_shortcut_when_the_outputs_leave_internal_dynamics() -> None:
    from plantlint.analysis.engine import outputs_linearize
    from plantlint.kernel.lie import Kernel
    from plantlint.kernel.plant import Plant
    from plantlint.analysis.structure import analyse_structure

    x1, x2, u = sp.symbols("x1 x2 u")
    plant = Plant.from_matrices("tail", [x1, x2], [u], [x1 + x2, 0], [[0, 1]], [x2])
    assert outputs_linearize(analyse_structure(Kernel(plant)), 2, 1) is None


def test_output_claims_on_a_plant_without_outputs_say_why() -> None:
    text = b"plant b\nstate x in -1 .. 1\ninput u\nrate x = -x + u\npoint p: x = 0\nexpect minimum_phase\nexpect regular\n"
    raw = analyse_bytes(text, Config())
    failed = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert len(failed) == 2 and all("declares no output" in f.message for f in failed)


def test_regular_claim_without_a_box_says_the_envelope_is_not_one() -> None:
    """A state without a range leaves no box to certify on: the claim is not decided, and
    it must say why (no budget was involved), pointing at the envelope-unproven finding."""
    text = (b"plant b\nstate x in -1 .. 1\nstate v\ninput u in -1 .. 1\nrate x = v\nrate v = -x + u\n"
            b"output y = x\nexpect regular\n")
    raw = analyse_bytes(text, Config())
    (unproven,) = [f for f in raw.findings if f.rule == "envelope-unproven"]
    assert "state v has no range" in unproven.message
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert claim.undecided and "not a box: state v has no range" in claim.message
    assert "budget" not in claim.message


def _claims_failed_once(text: bytes) -> tuple[object, list]:
    """The analysis of a model whose `expect regular` and `expect minimum_phase` must each
    fail once, for the whole model (no copy per point)."""
    raw = analyse_bytes(text, Config())
    failed = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert len(failed) == 2 and all(f.point is None for f in failed), [f.message for f in failed]
    return raw, failed


#: Two sensors on a one-pump tank pair (invented demo data).
TWO_SENSOR_TANK = b"""plant tank2
state h1 in 0.1 .. 2
state h2 in 0.1 .. 2
input q in 0 .. 1
rate h1 = q - h1
rate h2 = h1 - h2
output level2 = h2
output level1 = h1
point low: h1 = 0.5, h2 = 0.5, q = 0.5
"""


def test_a_decoupling_matrix_singular_everywhere_fails_each_claim_once() -> None:
    """Two outputs of a plant with one input (a second sensor added to a SISO loop): the
    decoupling matrix is 2 x 1, so its rank is at most 1 < 2 for every state (numpy's
    matrix_rank of A = [[L_g L_f y1], [L_g y2]] at the points, below, is 1). Every point
    fails `expect regular` and `expect minimum_phase` for that one reason: each claim is
    reported once, without a copy per point. The tank is invented demo data."""
    text = TWO_SENSOR_TANK + b"""point high: h1 = 1, h2 = 1, q = 1
expect regular
expect minimum_phase
"""
    raw, failed = _claims_failed_once(text)
    assert "singular everywhere" in failed[0].message and "not defined at any point" in failed[1].message
    # the reference, sympy done another way: each row of A is the first L_g L_f^k h not zero
    h1, h2, = sp.symbols("h1 h2")
    X, f, g = sp.Matrix([h1, h2]), sp.Matrix([-h1, h1 - h2]), sp.Matrix([1, 0])
    rows = []
    for y in (h2, h1):
        lie = sp.Matrix([y])
        while (lie.jacobian(X) * g)[0] == 0:
            lie = lie.jacobian(X) * f
        rows.append([float((lie.jacobian(X) * g)[0].subs({h1: 0.5, h2: 0.5}))])
    assert np.linalg.matrix_rank(np.array(rows)) == 1
    assert "decoupling-singular" in [f.rule for f in raw.findings]


def test_a_claim_at_a_point_names_the_singular_decoupling_matrix() -> None:
    """The same two-sensor tank, with `expect minimum_phase at low`: the claim at the point
    says why the zero dynamics are not defined there, the decoupling matrix (rank 1 for 2
    outputs, 1 input, as numpy's matrix_rank in the test above), not an ill-defined
    relative degree: each output's own relative degree is well defined (2 and 1)."""
    text = TWO_SENSOR_TANK + b"expect minimum_phase at low\n"
    raw = analyse_bytes(text)
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert not claim.undecided
    assert claim.message.endswith("the zero dynamics are not defined: the decoupling matrix is singular "
                                  "(rank 1 for 2 outputs, 1 input) there")
    assert raw.analysis["relative_degree"] == {"level2": 2, "level1": 1}


def test_a_failed_regular_claim_says_whether_the_model_or_the_decoupling_matrix_is_singular() -> None:
    """Two tanks with an uncertain flow split: det A = (g1 + g2 - 1)/(a1 a2) (by hand, and
    sympy's det below), zero on the line g1 + g2 = 1 inside the parameter box, so the vector
    relative degree is not defined there. A rate whose denominator vanishes in the envelope
    is another failure: the model itself is undefined there. Invented demo data."""
    tanks = b"""plant tanks
param g1 = 0.7 in 0.3 .. 0.9
param g2 = 0.6 in 0.2 .. 0.8
state h1 in 0.1 .. 1
state h2 in 0.1 .. 1
input q1 in 0 .. 1
input q2 in 0 .. 1
rate h1 = -sqrt(h1) + g1*q1 + (1 - g2)*q2
rate h2 = -sqrt(h2) + g2*q2 + (1 - g1)*q1
output y1 = h1
output y2 = h2
expect regular
"""
    g1, g2 = sp.symbols("g1 g2")
    assert sp.factor(sp.Matrix([[g1, 1 - g2], [1 - g1, g2]]).det()) == g1 + g2 - 1
    (claim,) = [f for f in analyse_bytes(tanks).findings if f.rule == "expectation-failed"]
    assert "the vector relative degree is not well defined everywhere in the envelope" in claim.message
    broken = b"""plant broken
state x in -1 .. 1
input u in -1 .. 1
rate x = -x + u + 1/x
output y = x
expect regular
"""
    (claim,) = [f for f in analyse_bytes(broken).findings if f.rule == "expectation-failed"]
    assert "the model itself is undefined somewhere in the envelope" in claim.message
    assert claim.message.endswith("see the singular-model finding)")


def test_an_output_the_inputs_never_reach_fails_each_claim_once() -> None:
    """y = x1 of two decoupled first-order lags, the input on the second: the transfer
    function from u to y is zero (scipy.signal.ss2tf, below), so the output has no relative
    degree at any state. `expect regular` and `expect minimum_phase` each fail once for that
    reason, not once more per point nor with an envelope 'witness' that means nothing."""
    import scipy.signal

    num, _ = scipy.signal.ss2tf(np.array([[-1.0, 0.0], [0.0, -2.0]]), np.array([[0.0], [1.0]]),
                                np.array([[1.0, 0.0]]), np.array([[0.0]]))
    assert np.allclose(num, 0)
    text = b"""plant lags
state x1 in -1 .. 1
state x2 in -1 .. 1
input u in -1 .. 1
rate x1 = -x1
rate x2 = -2*x2 + u
output y = x1
point rest: x1 = 0, x2 = 0, u = 0
point held: x1 = 0, x2 = 0.5, u = 1
expect regular
expect minimum_phase
"""
    raw, failed = _claims_failed_once(text)
    assert all("y never sees the inputs" in f.message for f in failed)
    assert "singular at" not in failed[0].message
    assert "relative-degree-undefined" in [f.rule for f in raw.findings]
