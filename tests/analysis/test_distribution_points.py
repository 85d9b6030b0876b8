"""Full-state linearization conditions at a point: involutivity is a property near
the point (with a proven witness), a rank drop is the constant-rank condition and is
reported as such. Plants: the gantry crane of the language contract (demo numbers,
invented) and an invented plant whose input field vanishes at the point."""

from __future__ import annotations

import numpy as np
import sympy as sp

from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes
from conftest import CRANE_RATES

CRANE = CRANE_RATES + b"point upright: x = 0, v = 0, th = 0, w = 0\nexpect state_linearizable\n"

VANISH = b"""plant gain_through_x
state x1 in -1 .. 1
state x2 in -1 .. 1
input u
rate x1 = x2
rate x2 = -x1 + x1*u
output y = x1
point rest: x1 = 0, x2 = 0, u = 0
expect state_linearizable
"""


def _crane_fields() -> tuple[list[sp.Symbol], sp.Matrix, sp.Matrix]:
    x, v, th, w = sp.symbols("x v th w")
    g, m_c, m_p, L = sp.Rational(981, 100), 12, sp.Rational(7, 2), sp.Rational(11, 5)
    den = m_c + m_p * sp.sin(th) ** 2
    f = sp.Matrix([v, m_p * sp.sin(th) * (L * w**2 + g * sp.cos(th)) / den, w,
                   -(m_p * L * w**2 * sp.sin(th) * sp.cos(th) + (m_c + m_p) * g * sp.sin(th)) / (L * den)])
    gv = sp.Matrix([0, 1 / den, 0, -sp.cos(th) / (L * den)])
    return [x, v, th, w], f, gv


def test_involutivity_is_judged_near_the_point_with_a_proven_witness() -> None:
    raw = analyse_bytes(CRANE, Config())
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert "not involutive near 'upright'" in claim.message
    assert "at 'upright' itself it lies in D_1" in claim.message
    point = raw.analysis["points"]["upright"]
    assert point["involutive"] is False and point["constant_rank"] is True
    witness = point["involutivity_witness"]
    assert witness is not None and max(abs(v) for v in witness.values()) <= 0.01  # near the point
    # Reference, computed another way: the Lie bracket by plain sympy Jacobians,
    # evaluated in floats by numpy (singular values, not the checker's exact ranks).
    # The crane (a cart with a pendulum) is known not to be full-state linearizable
    # (Spong, Underactuated mechanical systems, 1998, from memory).
    X, f, gv = _crane_fields()
    ad = gv.jacobian(X) * f - f.jacobian(X) * gv
    bracket = ad.jacobian(X) * gv - gv.jacobian(X) * ad

    def singular_values(at: dict[sp.Symbol, float]) -> np.ndarray:
        M = np.array(sp.Matrix.hstack(gv, ad, bracket).subs(at).evalf(), dtype=float)
        return np.linalg.svd(M, compute_uv=False)

    at_point = singular_values({s: 0.0 for s in X})
    near = singular_values({s: witness[str(s)] for s in X})
    assert at_point[2] < 1e-12 * at_point[0]  # the bracket lies in D_1 at the point itself
    assert near[2] > 1e-6 * near[0]  # and leaves it at the witness


def test_rank_drop_is_the_constant_rank_condition_not_involutivity() -> None:
    raw = analyse_bytes(VANISH, Config())
    rules = sorted(f.rule for f in raw.findings)
    assert "distribution-rank-drop" in rules and "not-involutive" not in rules
    point = raw.analysis["points"]["rest"]
    # D_0 = span{g} is one-dimensional: always involutive; it has rank 0 at the point
    # (g = (0, x1) vanishes there) and rank 1 around it
    assert point["involutive"] is True
    assert point["constant_rank"] is False and point["rank_drops"] == ["D_0"]
    assert "involutivity_witness" not in point  # only written when not involutive
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert "constant-rank condition fails" in claim.message and "not involutive" not in claim.message


# -- brackets at a point from Taylor mode -------------------------------------------------

def _plain_brackets(f: sp.Matrix, g: sp.Matrix, x: list[sp.Symbol], order: int) -> list[sp.Matrix]:
    """ad_f^k g = [f, ad_f^(k-1) g] = D(ad) f - Df ad, by sympy's jacobian (a route of its own)."""
    out = [g]
    for _ in range(order):
        ad = out[-1]
        out.append(sp.simplify(ad.jacobian(x) * f - f.jacobian(x) * ad))
    return out


def test_brackets_at_a_point_from_taylor_mode_match_plain_sympy() -> None:
    from plantlint.analysis.distributions import _taylor_brackets
    from plantlint.kernel.lie import Kernel
    from plantlint.kernel.plant import Plant

    x1, x2, x3, u = sp.symbols("x1 x2 x3 u")
    x = [x1, x2, x3]
    # invented plants: polynomial, rational and trigonometric drift (sin(0) = 0 keeps the
    # point's values rational, so the exact field is used)
    drifts = [
        [x2 + x1 * x3, -x1 + x3**2, x1 * x2 - x3],
        [x2 / (1 + x1**2), sp.sin(x3) - x2, x1 * x3 + 2 * x2],
        [sp.sin(x2) * x3 + x1, x3 - x1**3, -x2 * sp.cos(x1)],
    ]
    point = {x1: sp.Rational(1, 2), x2: sp.Integer(0), x3: sp.Integer(0)}
    compared = 0
    for f in drifts:
        g = [1 + x2**2, x1, sp.Integer(1)]
        plant = Plant.from_matrices("p", x, [u], f, [g], [x1])
        kernel = Kernel(plant)
        ours = _taylor_brackets(kernel, point, 2)
        if ours is None:  # a value on the way is not rational (sin(1/2)): not this route
            assert any(e.has(sp.sin, sp.cos) for e in f)
            continue
        theirs = _plain_brackets(sp.Matrix(f), sp.Matrix(g), x, 2)
        for k in range(3):
            assert ours[0][k] == list(theirs[k].xreplace(point)), (f, k)
        compared += 1
    assert compared >= 2


def test_ranks_at_a_point_are_the_same_by_taylor_mode_and_by_symbolic_brackets(monkeypatch) -> None:
    from plantlint.analysis import distributions

    from conftest import FIXTURES

    # the one model of the suite where the generic analysis stops before order n - 1 and a
    # point needs the higher brackets
    text = (FIXTURES / "rules" / "decoupling-singular.plant").read_bytes()
    taylor = analyse_bytes(text, Config())
    monkeypatch.setattr(distributions, "_taylor_brackets", lambda *a, **k: None)
    symbolic = analyse_bytes(text, Config())
    assert taylor.analysis["points"]["rest"] == symbolic.analysis["points"]["rest"]
    assert [f.message for f in taylor.findings] == [f.message for f in symbolic.findings]


def test_no_distributions_where_the_rates_are_undefined() -> None:
    text = b"""plant pole
state x1 in -1 .. 1
state x2 in -1 .. 1
input u in -1 .. 1
rate x1 = x2/x1
rate x2 = u
output y = x1
point origin: x1 = 0, x2 = 0
expect state_linearizable at origin
"""
    raw = analyse_bytes(text, Config())
    origin = raw.analysis["points"]["origin"]
    assert origin["equilibrium"] is False
    assert origin.get("controllability_rank") is None
    (claim,) = [f for f in raw.findings if f.rule == "expectation-failed"]
    assert "at point 'origin' the rates are undefined" in claim.message


def test_ranks_proven_by_balls_are_the_exact_ranks(monkeypatch) -> None:
    """At a rational point where the brackets are not rational (the quadruple tank's
    square roots), balls give proven lower bounds of the ranks; equal to the generic ranks
    (an upper bound at any point: a rank can only drop at a point), they are the ranks.
    Held against the exact route: the same point analysis with the shortcut switched off."""
    from plantlint.analysis import distributions
    from conftest import FIXTURES

    text = (FIXTURES / "models" / "quadruple_tank.plant").read_bytes()
    seen: list[object] = []
    real = distributions._ball_ranks
    monkeypatch.setattr(distributions, "_ball_ranks", lambda *a: seen.append(real(*a)) or seen[-1])
    fast = analyse_bytes(text, Config())
    assert seen and seen[-1] == [2, 4, 4, 4]  # the shortcut was taken
    monkeypatch.setattr(distributions, "_ball_ranks", lambda *a: None)
    exact = analyse_bytes(text, Config())
    assert fast.analysis["points"] == exact.analysis["points"]
    assert [f.message for f in fast.findings] == [f.message for f in exact.findings]


BENT = b"""plant bent
state x1 in -1 .. 1
state x2 in -1 .. 1
input u in -1 .. 1
rate x1 = x2^2 + sin(x1)
rate x2 = -x1 + (1 + sin(x1)^2/2)*u
output y = x2
point p: x1 = 1/4, x2 = 0
point q: x1 = pi/4, x2 = 0
"""


def test_a_rank_drop_at_values_that_are_not_rational_is_decided_on_formal_numbers(monkeypatch: object) -> None:
    """f = (x2^2 + sin x1, -x1), g = (0, 1 + sin(x1)^2/2): by hand, [f, g] = Dg f - Df g has
    first entry -2 x2 g2, so D_1 = span{g, ad_f g} has rank 2 where x2 != 0 and rank 1 on
    x2 = 0, at x1 = 1/4 and pi/4 too, where the values are sin(1/4) and sqrt(2)/2. The ranks
    there come from Taylor mode on formal numbers (a formal zero proves the drop); the
    reference is the symbolic route (the fields substituted at the point, sympy), run by
    turning the formal one off: the same ranks, findings and combination x1 the input does not move."""
    import plantlint.analysis.distributions as distributions

    used = []
    formal = distributions._formal_ranks

    def spy(*args: object, **kwargs: object) -> object:
        out = formal(*args, **kwargs)
        used.append(isinstance(out, tuple))
        return out

    monkeypatch.setattr(distributions, "_formal_ranks", spy)  # type: ignore[attr-defined]
    fast = analyse_bytes(BENT, Config())
    assert used == [True, True]
    monkeypatch.setattr(distributions, "_formal_ranks", lambda *a, **k: None)  # type: ignore[attr-defined]
    slow = analyse_bytes(BENT, Config())
    assert fast.analysis["points"] == slow.analysis["points"]
    assert [(f.rule, f.message) for f in fast.findings] == [(f.rule, f.message) for f in slow.findings]
    notes = [f for f in fast.findings if f.rule == "not-controllable"]
    assert [n.point for n in notes] == ["p", "q"]
    assert all("rank 1 < 2; no input moves x1 there, to first order" in n.message and "singular point" in n.message for n in notes)
    # the generic rank by hand: the determinant of [g, [f, g]] is 2 x2 g2^2, not zero
    x1, x2 = sp.symbols("x1 x2")
    f = sp.Matrix([x2**2 + sp.sin(x1), -x1])
    g = sp.Matrix([0, 1 + sp.sin(x1) ** 2 / 2])
    bracket = g.jacobian([x1, x2]) * f - f.jacobian([x1, x2]) * g
    det = sp.Matrix.hstack(g, bracket).det()
    assert sp.simplify(det - 2 * x2 * g[1] ** 2) == 0
