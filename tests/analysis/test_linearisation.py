"""The linearisation at operating points, held against outside sources: numpy
(eigenvalues, ranks of Kalman matrices built here independently, PBH tests),
scipy.signal.ss2zpk (SISO zeros), scipy.linalg.eig of the Rosenbrock pencil
(square MIMO zeros) on seeded random linear plants, and published worked examples
(book or paper beside each test; "from memory" where recalled)."""

from __future__ import annotations

import json
import math
import re

import jsonschema
import numpy as np
import pytest
import scipy.linalg
import scipy.signal
import sympy as sp

import plantlint.analysis.engine as engine
from plantlint.analysis.equilibria import solve_point
from plantlint.analysis.linearisation import Linearisation, cross_check, linearise_at
from plantlint.analysis.zero_dynamics import ZeroDynamics
from plantlint.core.catalogue import load_catalogue
from plantlint.core.findings import Severity
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant
from plantlint.analysis.serialise import analysis_json
from plantlint.core.settings import AnalysisSettings
from plantlint.report.explain import explain_data, render_text
from plantlint.report.formats.json_report import report_schema
from plantlint.run.pipeline import read_model
from conftest import FIXTURES as FIXTURE_ROOT, REPO, assert_same_set, integer_system, kalman, linear_plant, rosenbrock_zeros

FIXTURES = FIXTURE_ROOT / "models"


# -- helpers -------------------------------------------------------------------------------

def linearise_origin(P: Plant) -> Linearisation:
    kernel = Kernel(P)
    eq = solve_point(P, "origin", {s: sp.Integer(0) for s in (*P.states, *P.inputs)}, kernel)
    assert eq.equilibrium
    return linearise_at(kernel, eq, None)


def vector(text: str, n: int) -> np.ndarray:
    """A direction as printed ("x1 - 2*x3") back to a vector (test-side reading of our own output)."""
    v = np.zeros(n)
    for sign, coeff, index in re.findall(r"([+-]?)\s*(?:([0-9.]+)\*)?x(\d+)", text):
        v[int(index) - 1] = (-1 if sign == "-" else 1) * (float(coeff) if coeff else 1.0)
    return v


# -- random linear plants against numpy / scipy ---------------------------------------------
@pytest.mark.parametrize("deficient", [False, True])
def test_poles_and_ranks_against_numpy(deficient: bool) -> None:
    # references: numpy.linalg.eigvals (poles), numpy.linalg.matrix_rank of the Kalman
    # matrices [B, AB, ...] and [C; CA; ...] built here, and the PBH test with numpy
    rng = np.random.default_rng(7 if deficient else 11)
    for _ in range(12):
        n, m, p = int(rng.integers(2, 6)), int(rng.integers(1, 3)), int(rng.integers(1, 3))
        A, B, C = integer_system(rng, n, m, p, deficient)
        lin = linearise_origin(linear_plant(A, B, C))
        assert lin.exact and lin.status == "computed"
        assert_same_set(list(lin.poles), list(np.linalg.eigvals(A.astype(float))), tol=1e-5)
        Af = A.astype(float)
        ctrl = np.linalg.matrix_rank(kalman(Af, B.astype(float)))
        obs = np.linalg.matrix_rank(kalman(Af.T, C.T.astype(float)).T)
        assert lin.controllability_rank == ctrl and lin.observability_rank == obs
        K, O = kalman(Af, B.astype(float)), kalman(Af.T, C.T.astype(float)).T
        left = [vector(d, n) for g in lin.uncontrollable for d in g.directions]
        right = [vector(d, n) for g in lin.unobservable for d in g.directions]
        assert len(left) == n - ctrl and len(right) == n - obs
        for w in left:
            assert np.allclose(w @ K, 0)
        for v in right:
            assert np.allclose(O @ v, 0)
        if left:
            assert np.linalg.matrix_rank(np.array(left)) == n - ctrl
        # PBH: lambda is an uncontrollable mode iff rank [lambda I - A, B] < n
        modes = [z for g in lin.uncontrollable for z in g.eigenvalues]
        for lam in set(np.round(np.linalg.eigvals(Af), 6)):
            pbh = np.linalg.matrix_rank(np.hstack([lam * np.eye(n) - Af, B.astype(float)]), tol=1e-6)
            assert (pbh < n) == any(abs(z - lam) < 1e-5 for z in modes), (A, B, lam)


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_siso_zeros_against_scipy_ss2zpk() -> None:
    # reference: scipy.signal.ss2zpk (the zeros of the transfer function numerator);
    # minimal realisations only, where transmission and invariant zeros coincide
    rng = np.random.default_rng(2026)
    checked = 0
    while checked < 25:
        n = int(rng.integers(2, 6))
        A, B, C = integer_system(rng, n, 1, 1, deficient=False)
        Af, Bf, Cf = A.astype(float), B.astype(float), C.astype(float)
        if np.linalg.matrix_rank(kalman(Af, Bf)) < n or np.linalg.matrix_rank(kalman(Af.T, Cf.T)) < n:
            continue
        if not np.any(np.abs([(Cf @ np.linalg.matrix_power(Af, k) @ Bf).item() for k in range(n)]) > 0):
            continue
        lin = linearise_origin(linear_plant(A, B, C))
        z, _, _ = scipy.signal.ss2zpk(Af, Bf, Cf, np.zeros((1, 1)))
        assert lin.zeros is not None
        assert_same_set(list(lin.zeros), list(z), tol=1e-5)
        checked += 1


def test_square_mimo_zeros_against_rosenbrock_pencil() -> None:
    # reference: scipy.linalg.eig(M, N) of the pencil M - s N, M = [[A, B], [-C, 0]],
    # N = diag(I, 0): the finite generalized eigenvalues are the invariant zeros
    rng = np.random.default_rng(99)
    checked = 0
    while checked < 20:
        n = int(rng.integers(3, 6))
        A, B, C = integer_system(rng, n, 2, 2, deficient=False)
        finite = rosenbrock_zeros(A, B, C)
        lin = linearise_origin(linear_plant(A, B, C))
        if lin.zeros is None:  # pencil singular for every s: scipy's eigenvalues are then arbitrary
            assert "vanishes for every s" in lin.zeros_note
            continue
        assert_same_set(list(lin.zeros), finite, tol=1e-5)
        checked += 1


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_irrational_entries_take_the_numeric_route() -> None:
    # A scaled by sqrt(2): poles and zeros scale with it; references numpy.linalg.eigvals,
    # numpy.linalg.matrix_rank and scipy.signal.ss2zpk on the scaled floats
    rng = np.random.default_rng(5)
    checked = 0
    while checked < 6:
        n = int(rng.integers(2, 5))
        A, B, C = integer_system(rng, n, 1, 1, deficient=checked % 2 == 1)
        lin = linearise_origin(linear_plant(A, B, C, scale=sp.sqrt(2)))
        As, Bf, Cf = math.sqrt(2) * A.astype(float), B.astype(float), C.astype(float)
        assert not lin.exact
        assert_same_set(list(lin.poles), list(np.linalg.eigvals(As)), tol=1e-6)
        # (a tolerance above the rounding of the irrational products)
        assert lin.controllability_rank == np.linalg.matrix_rank(kalman(As, Bf), tol=1e-9)
        assert lin.observability_rank == np.linalg.matrix_rank(kalman(As.T, Cf.T), tol=1e-9)
        # the uncontrollable quantities w satisfy w K = 0 (numpy); a rank drop found only to the
        # working precision is reported as a proven lower bound, never as a certain rank
        for w in (vector(d, n) for g in lin.uncontrollable for d in g.directions):
            assert np.allclose(w @ kalman(As, Bf), 0, atol=1e-6)
        if lin.controllability_rank < n:
            assert "proven lower bound" in lin.reason
        if lin.zeros is not None and lin.controllability_rank == n and lin.observability_rank == n:
            z, _, _ = scipy.signal.ss2zpk(As, Bf, Cf, np.zeros((1, 1)))
            assert_same_set(list(lin.zeros), list(z), tol=1e-5)
        checked += 1


def test_named_directions_of_a_hand_built_plant() -> None:
    # two identical first-order lags driven by the same input cannot be told apart by
    # it (x1 - x2 obeys d/dt (x1 - x2) = -(x1 - x2)); x3 is neither driven nor measured;
    # PBH by hand: rank [sI - A, B] < 3 at s = -1 and s = -3
    A = np.diag([-1, -1, -3])
    B = np.array([[1], [1], [0]])
    C = np.array([[1, 1, 0]])
    lin = linearise_origin(linear_plant(A, B, C))
    assert lin.controllability_rank == 1 and lin.observability_rank == 1
    assert [(g.polynomial, g.directions) for g in lin.uncontrollable] == [("s + 1", ("x1 - x2",)), ("s + 3", ("x3",))]
    assert [(g.polynomial, g.directions) for g in lin.unobservable] == [("s + 1", ("x1 - x2",)), ("s + 3", ("x3",))]
    assert lin.zeros == (-3, -1)  # the decoupling zeros: invariant zeros of a non-minimal realisation


def test_non_square_plant_has_no_zeros_but_says_why() -> None:
    lin = linearise_origin(linear_plant(np.array([[0, 1], [0, 0]]), np.array([[0], [1]]), np.eye(2, dtype=int)))
    assert lin.zeros is None and "not square" in lin.zeros_note
    assert lin.controllability_rank == 2 and lin.observability_rank == 2


# -- published worked examples -------------------------------------------------------------
CART_PENDULUM = """
# Inverted pendulum on a cart, point mass on a massless rod, numbers of Ogata's example
plant cart_pendulum "Inverted pendulum on a cart"
const g = 9.81
param M = 2
param m = 0.1
param l = 0.5
state th
state w
state x
state v
input u
let ddx = (u + m*l*w^2*sin(th) - m*g*sin(th)*cos(th)) / (M + m*sin(th)^2)
rate th = w
rate w = (g*sin(th) - cos(th)*ddx) / l
rate x = v
rate v = ddx
output y = x
point up: th = 0, w = 0, x = 0, v = 0
"""


def analyse_text(text: str) -> engine.Analysis:
    model, findings = read_model(text.encode(), "model.plant")
    assert model is not None, findings
    return engine.run_analysis(model, AnalysisSettings())


def test_inverted_pendulum_on_a_cart_ogata() -> None:
    # Ogata, Modern Control Engineering (4th/5th ed.), inverted-pendulum pole-placement
    # example (from memory): M = 2 kg, m = 0.1 kg, l = 0.5 m, states (th, th', x, x'),
    # A = [[0, 1, 0, 0], [20.601, 0, 0, 0], [0, 0, 0, 1], [-0.4905, 0, 0, 0]],
    # B = [0, -1, 0, 0.5]; x/u = (l s^2 - g) / (s^2 (M l s^2 - (M + m) g)), derived from
    # the linearised equations: zeros +-sqrt(g/l), which are also the zero dynamics
    a = analyse_text(CART_PENDULUM)
    (pa,) = a.points
    lin = pa.linearisation
    assert lin is not None and lin.exact
    assert [[float(e) for e in row] for row in lin.A] == [[0, 1, 0, 0], [20.601, 0, 0, 0], [0, 0, 0, 1],
                                                         [-0.4905, 0, 0, 0]]
    assert [float(row[0]) for row in lin.B] == [0, -1, 0, 0.5]
    assert lin.C == ((0, 0, 1, 0),)
    assert_same_set(list(lin.poles), [0, 0, -math.sqrt(20.601), math.sqrt(20.601)], tol=1e-12)
    assert lin.characteristic_polynomial == "s^4 - 20601*s^2/1000"
    assert lin.controllability_rank == 4 and lin.observability_rank == 4
    assert lin.zero_polynomial == "s^2 - 981/50"
    assert_same_set(list(lin.zeros or ()), [-math.sqrt(9.81 / 0.5), math.sqrt(9.81 / 0.5)], tol=1e-12)
    assert lin.cross_check.status == "agrees"
    assert not [f for f in a.findings if f.rule == "internal-inconsistency"]


def test_pvtol_hauser_sastry_meyer() -> None:
    # Hauser, Sastry & Meyer, "Nonlinear control design for slightly non-minimum phase
    # systems: application to V/STOL aircraft", Automatica 28(4), 1992 (from memory):
    # with outputs (x, y) the zero dynamics at hover are eps th'' = g sin th, eigenvalues
    # +-sqrt(g/eps); the linearisation there has the gravity term -g th in x'' and eps u2
    a = analyse_text((FIXTURES / "pvtol.plant").read_text())
    (pa,) = a.points
    lin = pa.linearisation
    assert lin is not None and lin.exact
    states = [str(s) for s in a.kernel.plant.states]
    assert float(lin.A[states.index("vx")][states.index("th")]) == -9.81
    assert float(lin.B[states.index("vx")][1]) == 0.05
    assert lin.zero_polynomial == "s^2 - 981/5"  # g/eps = 9.81/0.05
    assert_same_set(list(lin.zeros or ()), [-math.sqrt(196.2), math.sqrt(196.2)], tol=1e-12)
    assert lin.controllability_rank == 6 and lin.observability_rank == 6
    assert lin.cross_check.status == "agrees"


def test_boost_converter_right_half_plane_zero_erickson() -> None:
    # Erickson & Maksimovic, Fundamentals of Power Electronics (2nd ed.), ch. 8, the
    # boost converter's control-to-output transfer function (from memory): RHP zero at
    # D'^2 R / L, poles from s^2 + s/(R C) + D'^2/(L C), D' = 1 - D = v_in / v_out.
    # The model's numbers are invented (example_repo); the formulas are the book's.
    a = analyse_text((REPO / "example_repo" / "models" / "power" / "dc_bus_boost.plant").read_text())
    R, L, C, v_in = 12, 0.0005, 0.0022, 24
    for pa in a.points:
        lin = pa.linearisation
        assert lin is not None and lin.exact
        v_out = float(next(v for k, v in pa.equilibrium.values.items() if str(k) == "v_C"))
        d_prime = v_in / v_out
        assert_same_set(list(lin.zeros or ()), [d_prime**2 * R / L], tol=1e-12)
        poles = np.roots([1, 1 / (R * C), d_prime**2 / (L * C)])
        assert_same_set(list(lin.poles), list(poles), tol=1e-12)
        assert lin.cross_check.status == "agrees"


def test_uncontrollable_mode_named_on_a_nonlinear_model() -> None:
    # a tank level h that no input reaches and no output sees, beside a driven cart
    # (invented). By hand: d/dh (1/4 - k sqrt(h)) = -k / (2 sqrt(h)) = -1/2 at h = 1/4,
    # k = 1/2, so the mode s = -1/2 lives on h alone
    text = """
plant side_tank "cart beside an undriven tank (invented)"
param k = 0.5
state p
state v
state h
input F
rate p = v
rate v = F
rate h = 0.25 - k*sqrt(h)
output y = p
point rest: p = 0, v = 0, h = 0.25
"""
    a = analyse_text(text)
    lin = a.points[0].linearisation
    assert lin is not None and lin.exact  # sqrt(1/4) = 1/2: rational
    assert [(g.polynomial, g.directions) for g in lin.uncontrollable] == [("s + 1/2", ("h",))]
    assert [(g.polynomial, g.directions) for g in lin.unobservable] == [("s + 1/2", ("h",))]


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_transcendental_point_numeric_route_and_cross_check() -> None:
    # held at th = 1/3 by the input (invented model): A = [[0, 1, 0], [-cos(1/3), 0, 0],
    # [cos(1/3), 0, -1]], B = e2, C = [1, 0, 1] by hand; references numpy.linalg.eigvals
    # and scipy.signal.ss2zpk on those floats
    a = analyse_text("""
plant held_arm "arm held off vertical (invented)"
state th
state w
state z
input u
rate th = w
rate w = -sin(th) + u
rate z = -z + sin(th)
output y = th + z
point held: th = 1/3, w = 0, z = sin(1/3)
""")
    lin = a.points[0].linearisation
    assert lin is not None and not lin.exact and lin.status == "computed"
    c = math.cos(1 / 3)
    A = np.array([[0, 1, 0], [-c, 0, 0], [c, 0, -1]])
    B, C = np.array([[0], [1], [0]]), np.array([[1, 0, 1]])
    assert np.allclose(np.array([[float(e) for e in row] for row in lin.A]), A)
    assert_same_set(list(lin.poles), list(np.linalg.eigvals(A)), tol=1e-9)
    z, _, _ = scipy.signal.ss2zpk(A, B, C, np.zeros((1, 1)))
    assert_same_set(list(lin.zeros or ()), list(z), tol=1e-9)
    assert lin.controllability_rank == 3 and lin.observability_rank == 3
    assert lin.cross_check.status == "agrees"


def test_numeric_route_proves_a_structural_rank_drop() -> None:
    # an undriven, unmeasured state h beside a pendulum held at 1/3 (invented): its row of
    # the Kalman matrix is exactly zero, so the rank drop is proven, not just numerical;
    # by hand: d/dh (-h cos(1/3)) = -cos(1/3), the mode of h
    a = analyse_text("""
plant held_with_tank "held arm beside an undriven tank (invented)"
state th
state w
state h
input u
rate th = w
rate w = -sin(th) - w + u
rate h = -h*cos(1/3)
output y = th
point held: th = 1/3, w = 0, h = 0
""")
    lin = a.points[0].linearisation
    assert lin is not None and not lin.exact
    assert lin.controllability_rank == 2 and lin.observability_rank == 2 and lin.reason == ""
    (group,) = lin.uncontrollable
    assert group.directions == ("h",)
    assert_same_set(list(group.eigenvalues), [-math.cos(1 / 3)], tol=1e-9)


# -- the cross-check ------------------------------------------------------------------------
def test_disagreement_is_an_internal_inconsistency(monkeypatch: pytest.MonkeyPatch) -> None:
    # no honest model can make the two computations disagree, so one of them is
    # replaced by a wrong one: the zero dynamics shifted by +1
    real = engine.zero_dynamics_at

    def shifted(*args: object, **kwargs: object) -> ZeroDynamics:
        zd = real(*args, **kwargs)  # type: ignore[arg-type]
        from dataclasses import replace

        return replace(zd, eigenvalues=tuple(z + 1 for z in zd.eigenvalues))

    monkeypatch.setattr(engine, "zero_dynamics_at", shifted)
    a = analyse_text(CART_PENDULUM)
    (finding,) = [f for f in a.findings if f.rule == "internal-inconsistency"]
    assert finding.point == "up" and "disagree" in finding.message
    assert load_catalogue().get("internal-inconsistency").severity is Severity.ERROR
    lin = a.points[0].linearisation
    assert lin is not None and lin.cross_check.status == "disagrees"
    assert analysis_json(a)["points"]["up"]["linearisation"]["cross_check"]["status"] == "disagrees"


def test_cross_check_not_applicable_without_zero_dynamics() -> None:
    lin = linearise_origin(linear_plant(np.diag([-1, -2]), np.array([[1], [1]]), np.array([[1, 0]])))
    assert cross_check(lin, None).status == "not_applicable"


def test_full_relative_degree_agrees_with_no_zeros() -> None:
    # double integrator, y = position: r = n, no zero dynamics and (scipy ss2zpk agrees) no zeros
    a = analyse_text("""
plant dint "double integrator"
state p
state v
input F
rate p = v
rate v = F
output y = p
point rest: p = 0, v = 0
""")
    lin = a.points[0].linearisation
    assert lin is not None and lin.zeros == () and lin.cross_check.status == "agrees"


# -- reports --------------------------------------------------------------------------------
def test_analysis_json_validates_and_non_equilibria_have_none() -> None:
    a = analyse_text(CART_PENDULUM + "point off: th = 0.1, w = 0, x = 0, v = 0, u = 0\n")
    data = json.loads(json.dumps(analysis_json(a)))
    schema = report_schema()
    validator = jsonschema.Draft202012Validator({"$defs": schema["$defs"], **schema["$defs"]["linearisation"]})
    up = data["points"]["up"]["linearisation"]
    validator.validate(up)
    assert up["parameters"] == "nominal" and up["D"] == [[0.0]]
    assert data["points"]["off"]["linearisation"] is None  # not an equilibrium


def test_explain_shows_the_linearisation() -> None:
    import io

    a = analyse_text((FIXTURES / "pvtol.plant").read_text())
    data = explain_data(a, None, [])
    lin = data["points"][0]["linearisation"]
    assert lin["A"][1][4] == "-9.81" and lin["zero_polynomial"] == "s^2 - 981/5"
    assert lin["poles"] == "0 (6 times)"
    out = io.StringIO()
    render_text(data, out, color=False)
    text = out.getvalue()
    assert "linearisation (nominal parameter values, exact)" in text
    assert "transmission zeros: -14.0071, 14.0071" in text
    assert "cross-check with the zero dynamics: agrees" in text


def test_check_json_carries_the_linearisation_and_validates() -> None:
    # the whole `plantlint check --format json` report against the shipped schema
    import subprocess
    import sys

    run = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "--format", "json",
                          str(FIXTURES / "pvtol.plant")], capture_output=True, text=True, timeout=300)
    data = json.loads(run.stdout)
    jsonschema.Draft202012Validator(report_schema()).validate(data)
    lin = data["files"][0]["analysis"]["points"]["hover"]["linearisation"]
    assert lin["exact"] and lin["zero_polynomial"] == "s^2 - 981/5"
    assert lin["A"][1][4] == -9.81 and lin["D"] == [[0.0, 0.0], [0.0, 0.0]]
    assert lin["cross_check"]["status"] == "agrees"



# -- A, B, C at rational points by dual numbers ------------------------------------------------
def _symbolic_matrices(kernel: Kernel, point: dict, u0: list) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix]:
    """The reference: sympy's own differentiation (sp.Matrix.jacobian, not the kernel's
    memoised one), then the point substituted."""
    P = kernel.plant
    x = sp.Matrix(P.states)
    A = sp.Matrix(P.f).jacobian(x) + sum((sp.Matrix(P.g[j]).jacobian(x) * u0[j] for j in range(P.m)),
                                         sp.zeros(P.n, P.n))
    B = sp.Matrix(P.n, P.m, lambda i, j: P.g[j][i])
    C = sp.Matrix(P.h).jacobian(x)
    return tuple(M.xreplace(point).applyfunc(sp.nsimplify) for M in (A, B, C))  # type: ignore[return-value]


def test_dual_numbers_give_the_jacobians_at_rational_points() -> None:
    from plantlint.analysis.linearisation import _rational_matrices

    model, _ = read_model(b"""
plant mixed "rational point through transcendental functions (invented)"
param k = 0.5
state p
state v
state h
input F
rate p = v*cos(p) + sqrt(h)*v
rate v = -sin(p) - k*v^3/(1 + h) + exp(p)*F - 0.5
rate h = 0.25 - k*sqrt(h) + atan(p)*v + log(1 + p)*F
output y = p + tanh(v)*h
point rest: p = 0, v = 0, h = 0.25
point pushed: p = 0, v = 1/3, h = 1/4
""")
    assert model is not None
    P = model.plant()
    kernel = Kernel(P)
    checked = 0
    for op in model.points:
        eq = solve_point(P, op.name, {model.symbol(k): v for k, v in op.values.items()}, kernel)
        if not eq.equilibrium:
            continue
        point = dict(P.param_nominal)
        point.update({s: v for s, v in eq.values.items() if s in P.states})
        u0 = [eq.values.get(u, sp.Integer(0)) for u in P.inputs]
        assert u0 == [sp.Rational(1, 2)]  # solved: the input's own column enters A
        ours = _rational_matrices(kernel, point, u0)
        assert ours is not None
        for M, R in zip(ours, _symbolic_matrices(kernel, point, u0)):
            assert M.shape == R.shape and all(a.is_Rational and a == b for a, b in zip(M, R))
        checked += 1
    assert checked >= 1
    # not rational (sin(1/3)), not smooth (sqrt at 0) or an irrational point: None, sympy decides
    th, w = sp.symbols("th w", real=True)
    u = sp.Symbol("u", real=True)
    P2 = Plant.from_matrices("arm", [th, w], [u], [w, -sp.sin(th) + sp.sqrt(w)], [[0, 1]], [th])
    k2 = Kernel(P2)
    assert _rational_matrices(k2, {th: sp.Rational(1, 3), w: sp.Rational(1, 4)}, [sp.Integer(0)]) is None
    assert _rational_matrices(k2, {th: sp.Integer(0), w: sp.Integer(0)}, [sp.Integer(0)]) is None
    assert _rational_matrices(k2, {th: sp.pi, w: sp.Integer(1)}, [sp.Integer(0)]) is None
    A, B, C = _rational_matrices(k2, {th: sp.Integer(0), w: sp.Integer(1)}, [sp.Integer(2)])
    # by hand: d/dth (-sin th) = -cos 0 = -1, d/dw sqrt(w) = 1/(2 sqrt 1) = 1/2
    assert A == sp.Matrix([[0, 1], [-1, sp.Rational(1, 2)]]) and B == sp.Matrix([[0], [1]])
    assert C == sp.Matrix([[1, 0]])


def test_rational_a_keeps_exact_poles_when_c_is_irrational() -> None:
    """A planar arm driven by joint accelerations is two double integrators: A is rational
    (0s and 1s), and only C holds cos(1), sin(1). The poles are then exactly 0 (four times)
    with det(sI - A) = s^4 (sympy's charpoly of the same A, built here), not tiny numbers
    from a ball eigenvalue solver; numpy's eigvals of A agree to rounding."""
    text = (b"plant arm\nparam l1 = 0.5\nparam l2 = 0.4\nstate q1 in -1 .. 1\nstate q2 in -2 .. 2\n"
            b"state w1 in -2 .. 2\nstate w2 in -2 .. 2\ninput a1\ninput a2\nrate q1 = w1\nrate q2 = w2\n"
            b"rate w1 = a1\nrate w2 = a2\noutput px = l1*cos(q1) + l2*cos(q1 + q2)\n"
            b"output py = l1*sin(q1) + l2*sin(q1 + q2)\npoint bent: q1 = 0, q2 = 1, w1 = 0, w2 = 0\n")
    model, _ = read_model(text)
    plant = model.plant()
    kernel = Kernel(plant)
    eq = solve_point(plant, "bent", {s: v for s, v in zip(plant.states, [0, 1, 0, 0])}, kernel)
    lin = linearise_at(kernel, eq, None)
    assert not lin.exact  # C is irrational: the numeric route
    A = sp.Matrix(lin.A)
    s = sp.Symbol("s")
    assert sp.Poly(A.charpoly(s).as_expr(), s) == sp.Poly(s**4, s)
    assert lin.characteristic_polynomial == "s^4"
    assert list(lin.poles) == [0j] * 4
    assert np.allclose(np.linalg.eigvals(np.array(A.tolist(), dtype=float)), 0)


def test_irrational_entries_give_transmission_zeros_to_full_precision() -> None:
    """A reviewer's model (numbers invented): sqrt(2 + x1), tan, atan and exp in the rates;
    at the origin B and C are rational and A holds sqrt(2). The zero polynomial
    det [[sI - A, -B], [C, 0]] is formed here by sympy from its own Jacobians (reference);
    its root is -4/5 exactly, and the ball route must give it to far better than the 1e-9
    that root isolation alone leaves."""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant transcendental
state x1 in -1 .. 1
state x2 in -1 .. 1
state x3 in -1 .. 1
input u1
input u2
rate x1 = -tan(x1/2) + exp(x3)*u1 + 0.5*u2
rate x2 = -sqrt(2 + x1)*x2 + x3 + u1 + (1 + x1^2)*u2
rate x3 = -x3 + atan(x2) + 0.2*u1
output y1 = atan(x1)
output y2 = x2
point origin: x1 = 0, x2 = 0, x3 = 0, u1 = 0, u2 = 0
"""
    x1, x2, x3, u1, u2, s = sp.symbols("x1 x2 x3 u1 u2 s")
    rates = sp.Matrix([-sp.tan(x1 / 2) + sp.exp(x3) * u1 + u2 / 2,
                       -sp.sqrt(2 + x1) * x2 + x3 + u1 + (1 + x1**2) * u2,
                       -x3 + sp.atan(x2) + u1 / 5])
    outputs = sp.Matrix([sp.atan(x1), x2])
    at = {x1: 0, x2: 0, x3: 0, u1: 0, u2: 0}
    A = rates.jacobian([x1, x2, x3]).subs(at)
    B = rates.jacobian([u1, u2]).subs(at)
    C = outputs.jacobian([x1, x2, x3]).subs(at)
    pencil = sp.Matrix(sp.BlockMatrix([[s * sp.eye(3) - A, -B], [C, sp.zeros(2, 2)]]))
    ref = sp.solve(sp.expand(pencil.det()), s)
    assert ref == [sp.Rational(-4, 5)]
    zeros = analyse_bytes(text).analysis["points"]["origin"]["linearisation"]["transmission_zeros"]
    assert len(zeros) == 1 and abs(zeros[0][0] + 0.8) < 1e-15 and zeros[0][1] == 0


def test_large_transmission_zeros_are_not_lost_to_the_sampling_circle() -> None:
    """A reviewer's probe (invented numbers): with x3 held at 0, x1'' = -1e30 (x1^2 - pi^2) - x1'
    linearises at x1 = pi to s^2 + s + 2e30 pi (by hand), zeros -1/2 +- 2.5e15 i. Sampled on a
    circle of radius 1.3 the pencil's coefficients were 1e30 apart and the leading one was
    dropped (a false internal-inconsistency); the circle now follows the size of A."""
    from plantlint.run.pipeline import analyse_bytes

    text = b"""plant stiff
state x1 in -10 .. 10
state x2 in -10 .. 10
state x3 in -10 .. 10
input u in -100 .. 100
rate x1 = x2
rate x2 = -1e30*(x1^2 - pi^2) - x2 + x3
rate x3 = u
output y = x3
point p: x1 = pi, x2 = 0, x3 = 0, u = 0
"""
    ref = np.roots([1.0, 1.0, 2e30 * math.pi])
    raw = analyse_bytes(text)
    assert not [f for f in raw.findings if f.rule == "internal-inconsistency"]
    zeros = [complex(a, b) for a, b in raw.analysis["points"]["p"]["linearisation"]["transmission_zeros"]]
    assert len(zeros) == 2
    for z in zeros:
        assert min(abs(z - r) / abs(r) for r in ref) < 1e-12
        assert abs(z.real + 0.5) < 1e-6


def test_formal_route_gives_the_symbolic_jacobians_numbers() -> None:
    # The example repository's two-link arm at q2 = pi/2 and at q1 = pi/3, q2 = -pi/3, holding
    # its weight (u0 != 0, solved): A, B, C from dual numbers over formal numbers (no Jacobian
    # formed) against sympy done another way: Matrix.jacobian of the rates with u0 put in,
    # evaluated at the point, the difference simplified to 0 entry by entry.
    from plantlint.analysis.linearisation import _formal_matrices

    model, _ = read_model((REPO / "example_repo/models/handling/palletizer_arm.plant").read_bytes(), "arm.plant")
    assert model is not None
    P = model.plant()
    kernel = Kernel(P)
    xs = sp.Matrix(P.states)
    checked = irrational = 0
    for point in model.points:
        if all(v.is_Rational for v in point.values.values()):
            continue
        eq = solve_point(P, point.name, {model.symbol(k): v for k, v in point.values.items()}, kernel)
        assert eq.equilibrium
        at = {**P.param_nominal, **{s: v for s, v in eq.values.items() if s in P.states}}
        u0 = [eq.values[u] for u in P.inputs]
        formal = _formal_matrices(kernel, at, u0)
        assert formal is not None
        A, B, C = formal
        field = sp.Matrix([fi + sum(P.g[j][i] * u0[j] for j in range(P.m)) for i, fi in enumerate(P.f)])
        reference = (field.jacobian(xs).subs(at), sp.Matrix(P.n, P.m, lambda i, j: P.g[j][i]).subs(at),
                     sp.Matrix(P.h).jacobian(xs).subs(at))
        for mine, theirs in zip((A, B, C), reference):
            assert mine.shape == theirs.shape
            for a, b in zip(mine, theirs):
                assert sp.simplify(a - b) == 0
        irrational += any(not e.is_Rational for e in A)
        checked += 1
    assert checked == 3 and irrational >= 1  # at pi/2 the arm's A is rational after all; at pi/3 it is not
