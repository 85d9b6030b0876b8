"""Operating points: solved inputs, residuals, undetermined and impossible inputs,
envelope. References are numpy's linear solver and hand solutions written beside
each test; plants are invented unless a source is named."""

from __future__ import annotations

import math
import random

import numpy as np
import sympy as sp

from plantlint.analysis.equilibria import solve_point
from plantlint.analysis.serialise import equilibrium_json
from plantlint.kernel.exact import number_decider, rank
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant

x1, x2, x3 = sp.symbols("x1 x2 x3")
u, u1, u2, u3 = sp.symbols("u u1 u2 u3")


def rules(eq) -> list[str]:  # type: ignore[no-untyped-def]
    return sorted(f.rule for f in eq.findings)


def crane(**boxes: object) -> Plant:
    """The gantry crane of the plant-language contract (demo numbers, invented)."""
    x, v, th, w, F = sp.symbols("x v th w F")
    g, m_c, m_p, L = sp.Rational(981, 100), sp.Integer(12), sp.Rational(7, 2), sp.Rational(11, 5)
    den = m_c + m_p * sp.sin(th) ** 2
    f = [v, m_p * sp.sin(th) * (L * w**2 + g * sp.cos(th)) / den, w,
         -(m_p * L * w**2 * sp.sin(th) * sp.cos(th) + (m_c + m_p) * g * sp.sin(th)) / (L * den)]
    gcol = [0, 1 / den, 0, -sp.cos(th) / (L * den)]
    return Plant.from_matrices("crane", [x, v, th, w], [F], f, [gcol], [x], **boxes)  # type: ignore[arg-type]


def test_crane_rest_solves_force_zero() -> None:
    # hand solution: with the payload hanging still, no force is needed
    P = crane()
    x, v, th, w = P.states
    eq = solve_point(P, "rest", {x: 0, v: 0, th: 0, w: 0})
    assert eq.equilibrium and eq.status == "equilibrium"
    assert eq.values[P.inputs[0]] == 0
    assert eq.solved_inputs == P.inputs
    assert eq.findings == ()


def test_pendulum_input_is_exact_transcendental() -> None:
    # hand solution: x2' = -sin(x1) + u = 0 at x1 = 1/3 needs u = sin(1/3); value from math.sin
    P = Plant.from_matrices("pend", [x1, x2], [u], [x2, -sp.sin(x1)], [[0, 1]], [x1])
    eq = solve_point(P, "tilted", {x1: sp.Rational(1, 3), x2: 0})
    assert eq.equilibrium
    assert eq.values[u] == sp.sin(sp.Rational(1, 3))
    assert abs(equilibrium_json(eq)["values"]["u"] - math.sin(1 / 3)) < 1e-15  # type: ignore[index]


def test_solved_inputs_match_numpy_solve() -> None:
    # reference: numpy.linalg.solve on the same data in floats (random, seeded)
    rng = random.Random(7)
    for _ in range(15):
        n = rng.choice([2, 3])
        while True:
            B = [[rng.randint(-3, 3) for _ in range(n)] for _ in range(n)]
            if round(np.linalg.det(np.array(B, dtype=float))) != 0:
                break
        c = [rng.randint(-5, 5) for _ in range(n)]
        xs = sp.symbols(f"z1:{n + 1}")
        us = sp.symbols(f"v1:{n + 1}")
        f = [c[i] + xs[i] ** 2 for i in range(n)]
        cols = [[B[i][j] * (1 + xs[0] ** 2) for i in range(n)] for j in range(n)]
        P = Plant.from_matrices("rand", list(xs), list(us), f, cols, [xs[0]])
        point = {s: sp.Rational(rng.randint(-4, 4), rng.randint(1, 3)) for s in xs}
        eq = solve_point(P, "p", point)
        assert eq.equilibrium
        x0 = np.array([float(point[s]) for s in xs])
        G = np.array(B, dtype=float) * (1 + x0[0] ** 2)
        ref = np.linalg.solve(G, -(np.array(c, dtype=float) + x0**2))
        got = np.array([float(eq.values[s]) for s in us])
        assert np.allclose(got, ref, atol=1e-12)
        assert all(r == 0 for r in eq.residual)


def test_dc_motor_point_with_given_and_solved_inputs() -> None:
    # field-controlled DC motor (Khalil 3rd ed. ch. 13, from memory; numbers invented):
    # x1' = -a x1 + u, x2' = -b x2 + k - c x1 x3, x3' = th x1 x2. Hand solution at x1 = 0,
    # x2 = k/b: u = 0 for any speed x3.
    a, b, c, th, k = 2, 3, 1, 5, 6
    P = Plant.from_matrices("dc", [x1, x2, x3], [u], [-a * x1, -b * x2 + k - c * x1 * x3, th * x1 * x2],
                            [[1, 0, 0]], [x3])
    eq = solve_point(P, "run", {x1: 0, x2: 2, x3: 7})
    assert eq.equilibrium and eq.values[u] == 0
    bad = solve_point(P, "run", {x1: 0, x2: 1, x3: 7, u: 0})
    assert not bad.equilibrium and rules(bad) == ["point-not-equilibrium"]
    assert "dx2/dt = 3" in bad.findings[0].message  # -3*1 + 6 = 3, shown exactly


def test_residual_shown_exact_or_decimal() -> None:
    # hand values: x1' = x2 + 1/2 -> 3/2 at x2 = 1; x2' = sin(1/3) - u -> ~0.327195 at u = 0
    P = Plant.from_matrices("r", [x1, x2], [u], [x2 + sp.Rational(1, 2), sp.sin(x1)], [[0, -1]], [x1])
    eq = solve_point(P, "p", {x1: sp.Rational(1, 3), x2: 1, u: 0})
    assert not eq.equilibrium
    (f,) = eq.findings
    assert f.rule == "point-not-equilibrium" and f.anchor == "point p" and f.point == "p"
    assert "dx1/dt = 1.5" in f.message and "dx2/dt = ~0.327195" in f.message  # 3/2 written exactly as a decimal


def test_undetermined_inputs_are_named() -> None:
    # hand: x1' = u1 fixes u1 = -x1; x2' = u2 + u3 leaves u2, u3 free
    P = Plant.from_matrices("und", [x1, x2], [u1, u2, u3], [x1, 0], [[1, 0], [0, 1], [0, 1]], [x1])
    eq = solve_point(P, "p", {x1: 2, x2: 0})
    assert eq.status == "undetermined" and not eq.equilibrium
    assert eq.values[u1] == -2
    assert set(eq.undetermined_inputs) == {u2, u3}
    (f,) = eq.findings
    assert f.rule == "point-incomplete" and "u2" in f.message and "u3" in f.message and "u1" not in f.message
    given = solve_point(P, "p", {x1: 2, x2: 0, u2: 1})
    assert given.equilibrium and given.values[u3] == -1


def test_no_solution_names_rates() -> None:
    # hand: x1' = x2 + 1 at x2 = 0 is 1 whatever u
    P = Plant.from_matrices("nos", [x1, x2], [u], [x2 + 1, 0], [[0, 1]], [x1])
    eq = solve_point(P, "p", {x1: 0, x2: 0})
    # one rule for a point that misses an equilibrium, inputs given or not
    assert eq.status == "no_solution" and rules(eq) == ["point-not-equilibrium"]
    assert "no input acts on dx1/dt = 1" in eq.findings[0].message
    assert "it is an exact equilibrium with x2 = -1 (written 0)" in eq.findings[0].message  # hand: x2 + 1 = 0
    # hand: x1' = u + 1 and x2' = u - 1 need u = -1 and u = 1 at once
    P2 = Plant.from_matrices("nos2", [x1, x2], [u], [1, -1], [[1, 1]], [x1])
    eq2 = solve_point(P2, "p", {x1: 0, x2: 0})
    assert eq2.status == "no_solution"
    assert "x1, x2 cannot vanish together" in eq2.findings[0].message


def test_missing_states_and_undefined_rates() -> None:
    P = Plant.from_matrices("m", [x1, x2], [u], [x2, 1 / x1], [[0, 1]], [x1])
    eq = solve_point(P, "p", {x1: 1})
    # the model reports the missing state (one cause, one finding): nothing here
    assert eq.status == "missing_states" and eq.findings == ()
    eq2 = solve_point(P, "p", {x1: 0, x2: 0})
    assert eq2.status == "undefined" and rules(eq2) == ["point-not-equilibrium"]


def test_outside_envelope_decided_exactly() -> None:
    x, v, th, w = sp.symbols("x v th w")
    F = sp.Symbol("F")
    half = sp.Rational(1, 2)
    P = crane(state_box={x: (sp.Integer(-4), sp.Integer(4)), th: (-half, half)},
              input_box={F: (sp.Integer(-400), sp.Integer(400))})
    on_edge = solve_point(P, "edge", {x: 4, v: 0, th: 0, w: 0})
    assert on_edge.findings == ()  # the range is closed: 4 is inside
    out = solve_point(P, "far", {x: 5, v: 0, th: 0, w: 0})
    assert rules(out) == ["point-outside-envelope"] and out.equilibrium
    # pi/4 ~ 0.785 > 1/2 (and sin(pi/4) is irrational: decided with balls, not floats).
    # Hand: a tilted payload cannot rest, v' = 0 needs F = -m_p g sin cos while w' = 0 then
    # needs g sin(th) (m_c + m_p sin^2) = 0, so no force makes it an equilibrium.
    tilted = solve_point(P, "tilt", {x: 0, v: 0, th: sp.pi / 4, w: 0})
    assert rules(tilted) == ["point-not-equilibrium", "point-outside-envelope"]
    assert "v, w cannot vanish together" in tilted.findings[-1].message
    big = solve_point(P, "big", {x: 0, v: 0, th: 0, w: 0, F: 500})
    assert rules(big) == ["point-not-equilibrium", "point-outside-envelope"]
    assert any("input F = 500" in f.message for f in big.findings)


def test_solved_input_outside_its_range() -> None:
    # hand: x1' = -x1 + u at x1 = 3 needs u = 3, outside -1 .. 1
    P = Plant.from_matrices("sat", [x1], [u], [-x1], [[1]], [x1],
                            input_box={u: (sp.Integer(-1), sp.Integer(1))})
    eq = solve_point(P, "p", {x1: 3})
    assert eq.equilibrium and eq.values[u] == 3
    assert rules(eq) == ["point-outside-envelope"] and "input needed u = 3" in eq.findings[0].message


def test_ranged_parameter_taken_at_nominal() -> None:
    k = sp.Symbol("k")
    P = Plant.from_matrices("par", [x1], [u], [-k * x1], [[1]], [x1], params=(k,),
                            param_nominal={k: sp.Integer(3)}, param_box={k: (sp.Integer(1), sp.Integer(5))})
    eq = solve_point(P, "p", {x1: 2})
    assert eq.values[u] == 6  # hand: u = k x1 at k = 3


def test_exact_rank_with_transcendental_entries() -> None:
    # sympy's own rank on the simplified matrix is the reference
    P = Plant.from_matrices("r", [x1], [u], [0], [[1]], [x1])
    decide = number_decider(Kernel(P))
    s, c = sp.sin(sp.Rational(1, 3)), sp.cos(sp.Rational(1, 3))
    rows = [[s, c], [s**2, s * c]]
    assert rank(rows, decide) == (sp.Matrix(rows).rank(), True) == (1, True)
    rows2 = [[s**2 + c**2, 1], [1, 1]]  # the first entry is exactly 1 but not written so
    assert rank(rows2, decide)[0] == 1
