"""The numeric route: expression DAG, Taylor-mode towers, structural zeros, tight enclosures.

Every value is held against sympy differentiation done the slow way (plain ``diff``
of the symbolic towers, common practice), numpy (the Kalman matrix), math/mpmath
(elementary function values), or the rank lemma of Isidori, Nonlinear Control
Systems, 3rd ed., Lemma 4.1.2 (from memory).
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import numpy as np
import pytest
import sympy as sp
from flint import arb

from plantlint.kernel.balls import unary
from plantlint.kernel.dag import Graph, UnsupportedNode
from plantlint.kernel.structural import StructuralPlant
from plantlint.kernel.taylor import ArbField, Inexact, QField, Towers

x1, x2, x3, x4, p = sp.symbols("x1 x2 x3 x4 p")
X = [x1, x2, x3]


def _lie(expr: sp.Expr, field: list[sp.Expr], states: list[sp.Symbol]) -> sp.Expr:
    return sum((sp.diff(expr, s) * F for s, F in zip(states, field)), sp.Integer(0))


def _close(ball: object, exact: sp.Expr, tol: float = 1e-25) -> bool:
    """The ball (or exact rational) agrees with sympy's 60-digit value of ``exact``."""
    value = sp.N(exact, 60)
    if isinstance(ball, arb):
        mid, rad = sp.Float(ball.mid().str(60, radius=False), 60), float(ball.rad())
    else:
        mid, rad = sp.Rational(int(ball.p), int(ball.q)), 0.0
    return bool(abs(mid - value) <= rad + tol * (1 + abs(value)))


def test_dag_shares_common_subexpressions_and_keeps_exact_constants() -> None:
    g = Graph(["x1", "x2"])
    a = g.from_sympy(sp.sin(x1 - x2) * 3 + sp.Rational(1, 3))
    b = g.from_sympy(sp.Rational(1, 3) + 3 * sp.sin(x1 - x2))
    assert a == b  # one node for equal expressions, whatever the order of the arguments
    inner = g.from_sympy(sp.sin(x1 - x2))
    prog = g.compile([a, inner])
    assert sum(1 for ins in prog.code if ins.op == "sin") == 1
    assert any(ins.op == "const" and ins.data == Fraction(1, 3) for ins in prog.code)
    with pytest.raises(UnsupportedNode):
        g.from_sympy(sp.Symbol("z"))


def test_taylor_towers_match_symbolic_towers_on_elementary_functions() -> None:
    """L_f^k h, L_g L_f^k h, dL_f^k h and ad_f^k g at a rational point against plain sympy."""
    f = [x2 * sp.exp(x3) / (1 + x1**2), sp.sin(x1 - x3) + sp.atan(x2) * x3 + sp.sqrt(2 + x1**2),
         sp.cos(x2) * x1**3 - sp.tan(x3) + sp.log(3 + x2**2) + p * x1]
    g = [0, 1 + x1**2, sp.asin(x1 / 3) + sp.tanh(x2)]
    h = x1 * x3 + sp.atan2(x2 + 2, 1 + x3**2) + sp.cosh(x1) * (2 + x3) ** sp.Rational(1, 3)
    towers = Towers(X, [p], f, [g], [h])
    point = [Fraction(1, 3), Fraction(-1, 5), Fraction(2, 7), Fraction(3, 2)]
    subs = {s: sp.Rational(v.numerator, v.denominator) for s, v in zip(X + [p], point)}
    field = ArbField(200)
    values = towers.lie_values(point, 2, field)[0]
    lglf = towers.lglf(point, 2, field)[0]
    _, grads = towers.gradients(point, 2, field)
    phi = h
    for k in range(3):
        assert _close(values[k], phi.xreplace(subs))
        assert _close(lglf[k][0], _lie(phi, g, X).xreplace(subs))
        for s, ball in zip(X, grads[0][k]):
            assert _close(ball, sp.diff(phi, s).xreplace(subs))
        phi = _lie(phi, f, X)
    ad = towers.brackets(point, 2, field)[0]
    F, Y = sp.Matrix(f), sp.Matrix(g)
    for k in range(3):
        for ball, e in zip(ad[k], Y):
            assert _close(ball, e.xreplace(subs))
        Y = Y.jacobian(X) * F - F.jacobian(X) * Y  # [f, Y] = DY f - Df Y


def test_exact_field_on_a_rational_plant() -> None:
    """fmpq towers equal the sympy towers exactly; a transcendental value is refused."""
    f = [x2 * x3 / (1 + x1**2), x1 - x3**2, x1**3 * x2]
    g = [0, 1, x1]
    towers = Towers(X, [], f, [g], [x3])
    point = [Fraction(1, 3), Fraction(-1, 5), Fraction(2, 7)]
    subs = {s: sp.Rational(v.numerator, v.denominator) for s, v in zip(X, point)}
    values = towers.lie_values(point, 4, QField())[0]
    lglf = towers.lglf(point, 4, QField())[0]
    phi = x3
    for k in range(5):
        exact = sp.Rational(phi.xreplace(subs))
        assert (int(values[k].p), int(values[k].q)) == (int(exact.p), int(exact.q))
        lg = sp.Rational(_lie(phi, g, X).xreplace(subs))
        assert (int(lglf[k][0].p), int(lglf[k][0].q)) == (int(lg.p), int(lg.q))
        phi = sp.expand(_lie(phi, f, X))
    trig = Towers([x1], [], [sp.sin(x1)], [[1]], [x1])
    assert trig.lie_values([Fraction(0)], 3, QField())[0][:2] == [0, 0]  # sin(0) = 0 exactly
    with pytest.raises(Inexact):
        trig.lie_values([Fraction(1, 3)], 3, QField())


def test_brackets_at_an_equilibrium_are_the_kalman_columns() -> None:
    """At f(x0) = 0, ad_f^k g(x0) = (-A)^k g(x0) with A = Df(x0) (numpy matrix powers)."""
    f = [x2, -sp.sin(x1) - x2 + x3 * x1, -x3 + x1**2]
    g = [0, sp.cos(x3), 1 + x1]
    towers = Towers(X, [], f, [g], [x1])
    ad = towers.brackets([Fraction(0)] * 3, 3, QField())[0]
    A = np.array(sp.Matrix(f).jacobian(X).subs({x1: 0, x2: 0, x3: 0}), dtype=float)
    col = np.array([0.0, 1.0, 1.0])
    for k in range(4):
        assert np.allclose([float(v) for v in ad[k]], col)
        col = -A @ col


def test_pairings_of_gradients_and_brackets_are_anti_triangular() -> None:
    """<dL_f^j h, ad_f^i g>(x0) = 0 for i + j < r - 1 and (-1)^i L_g L_f^(r-1) h(x0) on the
    anti-diagonal (Isidori, Nonlinear Control Systems, 3rd ed., Lemma 4.1.2, from memory)."""
    xs = [x1, x2, x3, x4]
    f = [x2, x3 + sp.sin(x2) * x1, x4 - x1 * x2, -x4 + sp.exp(x1)]
    g = [0, 0, 0, 2 + x1**2]
    towers = Towers(xs, [], f, [g], [x1])
    point = [Fraction(1, 5), Fraction(-1, 3), Fraction(1, 7), Fraction(2, 9)]
    field = ArbField(256)
    r = 4
    _, grads = towers.gradients(point, r - 1, field)
    ad = towers.brackets(point, r - 1, field)[0]
    top = towers.lglf(point, r - 1, field)[0][r - 1][0]
    assert not top.contains(0)
    for i in range(r):
        for j in range(r):
            pairing = sum((a * b for a, b in zip(grads[0][j], ad[i])), arb(0))
            if i + j < r - 1:
                assert pairing.contains(0) and pairing.rad() < 1e-12
            elif i + j == r - 1:
                assert pairing.overlaps((-1) ** i * top)


def test_structural_zeros_and_layered_term_match_the_symbolic_tower() -> None:
    """Below the structural index L_g L_f^k h is identically zero (sympy towers expanded);
    at the index the layered product equals the tower (their difference simplifies to 0)."""
    xs = [x1, x2, x3, x4]
    f = [-x1 + x1 * x2, x1**2 * sp.cos(x2) + x2, sp.exp(x2) * x3 + x4, x2 * x3 - x4]
    g = [1 + x2**2, 0, 0, 0]
    sp_plant = StructuralPlant(xs, f, [g], [x3 + x4**2])
    layers = sp_plant.layers(0)
    d, entry = sp_plant.decoupling_entry(0, 0)
    assert d == 2 and layers.structural_degree == 3
    phi = x3 + x4**2
    for k in range(d):
        assert sp_plant.proven_zero(0, 0, k)
        assert sp.expand(_lie(phi, g, xs)) == 0
        phi = _lie(phi, f, xs)
    assert not sp_plant.proven_zero(0, 0, d)
    assert sp.simplify(_lie(phi, g, xs) - entry) == 0


def test_chain_term_is_one_product_of_link_factors() -> None:
    """Spring-coupled pendulums (invented numbers): the tip's decoupling term is a product
    of cos(q_i - q_(i+1)) factors and constants, equal to the sympy tower."""
    q1, q2, q3, w1, w2, w3 = sp.symbols("q1 q2 q3 w1 w2 w3")
    xs = [q1, q2, q3, w1, w2, w3]
    f = [w1, w2, w3, -4 * sp.sin(q1 - q2) - sp.sin(q1), 4 * sp.sin(q1 - q2) - 4 * sp.sin(q2 - q3),
         4 * sp.sin(q2 - q3) - w3]
    g = [0, 0, 0, 1, 0, 0]
    plant = StructuralPlant(xs, f, [g], [q3])
    d, entry = plant.decoupling_entry(0, 0)
    assert d == 5 and plant.links(0, d) is not None
    assert entry.is_Mul and sum(1 for a in entry.args if isinstance(a, sp.cos)) == 2
    phi = q3
    for _ in range(d):
        phi = _lie(phi, f, xs)
    tower = _lie(phi, g, xs)
    rng = random.Random(3)
    for _ in range(3):
        subs = {s: sp.Rational(rng.randint(-50, 50), 97) for s in xs}
        assert sp.N((tower - entry).xreplace(subs), 30) == 0 or abs(sp.N((tower - entry).xreplace(subs), 30)) < 1e-25


def test_bracket_support_is_the_forward_closure() -> None:
    f = [x2, x3, -x3]
    g = [0, 0, 1]
    plant = StructuralPlant(X, f, [g], [x1])
    assert plant.bracket_support(0, 0) == {2}
    assert plant.bracket_support(0, 1) == {1, 2}
    F, Y = sp.Matrix(f), sp.Matrix(g)
    Y = Y.jacobian(X) * F - F.jacobian(X) * Y
    assert Y[0] == 0  # outside the support: zero in the tower too (sympy)


@pytest.mark.parametrize("name, fn", [("sin", math.sin), ("cos", math.cos), ("tan", math.tan), ("exp", math.exp),
                                      ("log", math.log), ("atan", math.atan), ("sqrt", math.sqrt)])
def test_tight_enclosures_on_wide_intervals(name: str, fn: object) -> None:
    """Enclosures contain every sampled value (math) and are within 1e-6 of the true
    range; cos([-1, -0.5]) is [cos 1, cos 0.5] (handbook values), not +-0.878."""
    intervals = [(-1.0, -0.5), (0.25, 1.25), (0.5, 2.0), (2.0, 5.0), (-0.2, 0.1), (3.0, 3.5)]
    if name in ("log", "sqrt"):
        intervals = [(0.25, 1.25), (0.5, 2.0), (2.0, 5.0), (3.0, 3.5)]
    if name == "tan":
        intervals = [(-1.0, -0.5), (-1.2, 1.3), (2.0, 4.0)]
    for lo, hi in intervals:
        enclosure = unary(name, arb(lo).union(arb(hi)))
        samples = [fn(lo + (hi - lo) * t / 400) for t in range(401)]  # type: ignore[operator]
        shift = {"cos": 0.0, "sin": math.pi / 2}.get(name)
        if shift is not None:  # the true extrema inside (k pi for cos, pi/2 + k pi for sin)
            samples += [fn(shift + k * math.pi) for k in range(-4, 5) if lo <= shift + k * math.pi <= hi]
        low, high = float(enclosure.lower().mid()), float(enclosure.upper().mid())
        assert low <= min(samples) + 1e-12 and high >= max(samples) - 1e-12
        assert low >= min(samples) - 1e-6 and high <= max(samples) + 1e-6
    cos = unary("cos", arb(-1).union(arb(-0.5)))
    assert not cos.contains(0)
    assert float(cos.lower().mid()) == pytest.approx(math.cos(1), abs=1e-8)
    assert float(cos.upper().mid()) == pytest.approx(math.cos(0.5), abs=1e-8)
    assert not unary("tan", arb(1).union(arb(2))).is_finite()  # a pole inside: no enclosure


def _chain_text(n: int) -> str:
    """Spring-coupled pendulums (invented numbers, as in benchmarks/generate.py)."""
    lines = [f"plant chain{n}", "const k = 40", "const J = 0.25", "const c = 0.3", "const mgl = 4.905"]
    lines += [f"state q{i} in -1/2 .. 1/2" for i in range(1, n + 1)]
    lines += [f"state w{i} in -3 .. 3" for i in range(1, n + 1)]
    lines.append("input tau in -50 .. 50")
    for i in range(1, n + 1):
        torque = f"-mgl*sin(q{i}) - c*w{i}"
        if i > 1:
            torque += f" - k*sin(q{i} - q{i - 1})"
        if i < n:
            torque += f" + k*sin(q{i + 1} - q{i})"
        if i == 1:
            torque += " + tau"
        lines += [f"rate q{i} = w{i}", f"rate w{i} = ({torque})/J"]
    lines += [f"output tip = q{n}", "point hang: " + ", ".join(f"{s}{i} = 0" for s in "qw" for i in range(1, n + 1))]
    return "\n".join(lines) + "\n"


def test_eight_state_chain_is_proven_regular_factor_by_factor() -> None:
    """4 pendulums: L_g L_f^7 tip = (1/J) (k/J)^3 prod cos(q_i - q_(i+1)) (chain rule, by hand),
    positive on the envelope since |q_i - q_(i+1)| <= 1 < pi/2; its minimum there is
    4 * 160^3 * cos(1)^3 (math.cos), so a certified margin lies in (0, that]."""
    from plantlint.kernel.lie import Kernel
    from plantlint.analysis.structure import analyse_structure, certify_envelope
    from plantlint.run.pipeline import read_model

    model, _ = read_model(_chain_text(4).encode())
    kernel = Kernel(model.plant())
    structure = analyse_structure(kernel)
    assert structure.relative_degree == {"tip": 8}
    env = certify_envelope(kernel, structure)
    assert env.regular is True
    assert 0 < env.margin <= 4 * 160**3 * math.cos(1) ** 3 * (1 + 1e-9)
    assert kernel._lf.get((0, 7)) is None  # the tower L_f^7 tip was never formed


def test_cancellation_at_the_structural_index_falls_back_to_the_symbolic_route() -> None:
    """g reaches x2 and x3, h = x1 reads both through x2 - x3: the layered term at the
    structural index is 1 - 1 = 0, so the relative degree is 3, not 2 (plain sympy towers)."""
    from plantlint.kernel.lie import Kernel
    from plantlint.kernel.plant import Plant
    from plantlint.analysis.structure import analyse_structure

    u = sp.Symbol("u")
    f = [x2 - x3, x1**2, -x2]
    g = [0, 1, 1]
    kernel = Kernel(Plant.from_matrices("cancel", X, [u], f, [g], [x1]))
    phi, expected = x1, None
    for k in range(3):
        if sp.expand(_lie(phi, g, X)) != 0:
            expected = k + 1
            break
        phi = _lie(phi, f, X)
    assert expected == 3
    assert analyse_structure(kernel).relative_degree == {"y1": 3}


def test_twelve_state_chain_completes_every_stage() -> None:
    """6 pendulums (12 states): the symbolic route did not finish this in 200 s (issue 12);
    the numeric route completes every stage. The relative degree is the pole excess of the
    linearisation at the hanging point, computed with scipy.signal.ss2tf."""
    from scipy.signal import ss2tf

    from plantlint.run.config import Config
    from plantlint.run.pipeline import analyse_bytes

    n, k, J, c, mgl = 6, 40.0, 0.25, 0.3, 4.905
    A = np.zeros((2 * n, 2 * n))
    for i in range(n):
        A[i, n + i] = 1.0
        A[n + i, i] = -(mgl + k * ((i > 0) + (i < n - 1))) / J
        A[n + i, n + i] = -c / J
        if i > 0:
            A[n + i, i - 1] = k / J
        if i < n - 1:
            A[n + i, i + 1] = k / J
    B = np.zeros((2 * n, 1))
    B[n, 0] = 1 / J
    C = np.zeros((1, 2 * n))
    C[0, n - 1] = 1.0
    num, den = ss2tf(A, B, C, np.zeros((1, 1)))
    numerator = np.trim_zeros(np.where(np.abs(num[0]) > 1e-9 * np.abs(num[0]).max(), num[0], 0.0), "f")
    pole_excess = (len(den) - 1) - (len(numerator) - 1)

    raw = analyse_bytes(_chain_text(n).encode(), Config())
    assert [f.rule for f in raw.findings] == []
    assert raw.analysis["relative_degree"] == {"tip": pole_excess} == {"tip": 12}
    assert raw.analysis["envelope"]["regular"] is True
    assert raw.analysis["points"]["hang"]["well_defined"] is True
