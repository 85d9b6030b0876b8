"""The symbolic kernel's fast paths agree with plain sympy done the slow way."""

from __future__ import annotations

import random

import sympy as sp

from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant
from plantlint.analysis.structure import analyse_structure, certify_envelope

x1, x2, x3, u, v = sp.symbols("x1 x2 x3 u v")


def _tree_lie(expr: sp.Expr, field: list[sp.Expr], states: list[sp.Symbol]) -> sp.Expr:
    return sum((sp.diff(expr, s) * X for s, X in zip(states, field)), sp.Integer(0))


def test_polynomial_towers_match_tree_differentiation() -> None:
    """Lie derivatives and brackets of a polynomial plant through the sparse
    polynomial ring equal plain sympy diff (common practice), over seeded random plants."""
    rng = random.Random(7)
    states = [x1, x2, x3]
    for _ in range(4):
        def poly() -> sp.Expr:
            return sum((rng.randint(-3, 3) * s**rng.randint(0, 2) * t for s in states for t in (1, x1 * x2)),
                       sp.Integer(0)) / rng.randint(1, 4)
        f = [poly() for _ in states]
        g = [poly() for _ in states]
        h = poly()
        kernel = Kernel(Plant.from_matrices("p", states, [u], f, [g], [h]))
        assert kernel.polynomial_ring
        phi = h
        for k in range(3):
            assert sp.expand(kernel.lf(0, k) - phi) == 0
            assert sp.expand(kernel.lglf(0, 0, k) - _tree_lie(phi, g, states)) == 0
            phi = _tree_lie(phi, f, states)
        ad = list(g)
        for k in range(2):
            assert all(sp.expand(a - b) == 0 for a, b in zip(kernel.ad(0, k), ad))
            F, G = sp.Matrix(f), sp.Matrix(ad)
            ad = list(G.jacobian(states) * F - F.jacobian(states) * G)
        assert all(sp.expand(a - b) == 0 for a, b in zip(kernel.gradient(h), [sp.diff(h, s) for s in states]))


def test_non_polynomial_plants_take_the_general_path() -> None:
    kernel = Kernel(Plant.from_matrices("p", [x1, x2], [u], [x2, -sp.sin(x1)], [[0, 1]], [x1]))
    assert not kernel.polynomial_ring
    assert kernel.lglf(0, 0, 1) == 1


def test_factored_row_is_certified_factor_by_factor() -> None:
    """L_g L_f h = 3 (1 + x1^2)(4 - x2^2) on x2 in [-1, 1]: never zero; the smallest
    value over the box is 3 * 1 * 3 = 9 (by hand), so the certified margin lies in (0, 9]."""
    f = [x2, 0]
    g = [0, 3 * (1 + x1**2) * (4 - x2**2)]
    box = {x1: (sp.Integer(-2), sp.Integer(2)), x2: (sp.Integer(-1), sp.Integer(1))}
    kernel = Kernel(Plant.from_matrices("p", [x1, x2], [u], f, [g], [x1], state_box=box))
    structure = analyse_structure(kernel)
    assert [str(p) for p, _ in kernel.factors(structure.decoupling[0, 0])[1:]] == ['x2 - 2', 'x2 + 2', 'x1**2 + 1']
    env = certify_envelope(kernel, structure)
    assert env.regular is True and env.margin is not None and 0 < env.margin <= 9
    # across the zero of a factor (x2 = 2 inside the box) the witness lies on it
    wide = {x1: (sp.Integer(-2), sp.Integer(2)), x2: (sp.Integer(-1), sp.Integer(3))}
    kernel = Kernel(Plant.from_matrices("p", [x1, x2], [u], f, [g], [x1], state_box=wide))
    env = certify_envelope(kernel, analyse_structure(kernel))
    assert env.regular is False and env.witness is not None and abs(env.witness["x2"] - 2) < 1e-9


def test_zero_decisions_share_one_type() -> None:
    """The kernel's identity test, its values at points and its constants answer with the
    one decision type; the expected answers are standard identities and handbook values."""
    from flint import arb

    from plantlint.kernel import decision as zd
    from plantlint.kernel.exact import number_decider, rank

    kernel = Kernel(Plant.from_matrices("p", [x1, x2], [u], [x2, -sp.sin(x1)], [[0, 1]], [x1]))
    # sin^2 + cos^2 = 1 (Pythagorean identity): proven zero, symbolically
    pythagoras = kernel.is_zero(sp.sin(x1) ** 2 + sp.cos(x1) ** 2 - 1)
    assert pythagoras.proven_zero and pythagoras.certain and pythagoras.taken_zero
    assert pythagoras.how == "simplify"
    # x1^2 + 1 > 0 for real x1: proven non-zero by a ball at a sample
    positive = kernel.is_zero(x1**2 + 1)
    assert positive.proven_nonzero and positive.certain and not positive.taken_zero
    # forty shifted copies of the identity: zero at every sample, too large for the bounded
    # simplification, so zero unconfirmed (taken as zero, listed as uncertain)
    big = sum((sp.sin(x1 + k) ** 2 + sp.cos(x1 + k) ** 2 - 1 for k in range(1, 41)), sp.Integer(0))
    unconfirmed = kernel.is_zero(big)
    assert unconfirmed.outcome is zd.Outcome.ZERO_UNCONFIRMED and unconfirmed.taken_zero
    assert not unconfirmed.certain and big in kernel.uncertain
    # sin(pi/3) = sqrt(3)/2 (handbook value): exactly zero as a constant
    assert kernel.constant_is_zero(sp.sin(sp.pi / 3) - sp.sqrt(3) / 2).proven_zero
    assert kernel.constant_is_zero(sp.sin(sp.Rational(1, 3))).proven_nonzero
    # 1/(x1 - 1) at x1 = 1 is undefined: neither zero nor non-zero
    pole = kernel.value_at(1 / (x1 - 1), {x1: sp.Integer(1), x2: sp.Integer(0)}).decision
    assert pole.outcome is zd.Outcome.UNDEFINED and not pole.taken_zero and not pole.proven_nonzero
    # balls: exactly 0 is zero, a ball without 0 non-zero, a ball around 0 undecided
    assert [zd.of_ball(b).outcome for b in (arb(0), arb(1), arb(0, 1e-3), arb("nan"))] == [
        zd.Outcome.ZERO, zd.Outcome.NONZERO, zd.Outcome.UNDECIDED, zd.Outcome.UNDECIDED]
    # the exact rank reads the same type: rank 1 as sympy's Matrix.rank finds it
    rows = [[sp.sin(sp.Rational(1, 3)), sp.Integer(1)], [2 * sp.sin(sp.Rational(1, 3)), sp.Integer(2)]]
    assert rank(rows, number_decider(kernel)) == (sp.Matrix(rows).rank(), True) == (1, True)


def test_the_simplification_that_confirms_a_zero_is_bounded(monkeypatch) -> None:
    """sympy's trigsimp has no limit of its own (on huge rational coefficients it can
    factor for minutes): past SIMPLIFY_SECONDS the zero stays unconfirmed, never a hang
    and never a proof. A trigsimp that never returns stands in for the slow one."""
    import time

    from plantlint.kernel import lie
    from plantlint.kernel.decision import Outcome

    def endless(e: object) -> object:  # "never" returns: 3 s here, so that a regression fails, not hangs
        start = time.monotonic()
        while time.monotonic() - start < 3.0:
            time.sleep(0.01)
        return e

    monkeypatch.setattr(lie, "SIMPLIFY_SECONDS", 0.2)
    monkeypatch.setattr(lie.sp, "trigsimp", endless)
    x = sp.Symbol("x")
    # zero by sin^2 + cos^2 = 1, which neither expand nor cancel sees
    decision = lie.confirm_zero(sp.sin(x) ** 2 + sp.cos(x) ** 2 - 1)
    assert decision.outcome is Outcome.ZERO_UNCONFIRMED


def test_values_without_a_real_value_are_undefined() -> None:
    """sympy writes a real function outside its domain as a non-real number (sqrt(-3) is
    sqrt(3)*I, log(-2) is log(2) + I*pi) or leaves it unevaluated where it knows it is not
    real (asin(27), acos(3/2)); the model's functions are real, so each has no value there.
    Finite real numbers, exact or not, have one."""
    from plantlint.kernel.exact import has_undefined

    for value in (sp.sqrt(-3), sp.log(-2), sp.asin(27), sp.acos(sp.Rational(3, 2)), sp.zoo, sp.nan):
        assert has_undefined([sp.Integer(1), value]), value
    assert not has_undefined([sp.Rational(1, 3), sp.pi / 6, sp.asin(sp.Rational(1, 2)), sp.sqrt(2), sp.exp(40)])


def test_cancelled_leaves_large_function_arguments_as_written(monkeypatch) -> None:
    """Kernel.cancelled puts small quotients over a common denominator (sympy's cancel is
    the reference) but does not even try with an expression that has a large function
    argument, a magic-formula tyre force: sympy's together and cancel multiplied out inside
    the argument for seconds (the planar vehicle fixture's envelope stage: 2.65 -> 0.09 s
    in one process), and the result was no smaller, so it was dropped anyway."""
    import plantlint.kernel.lie as lie

    x, a = sp.symbols("x a", real=True)
    kernel = Kernel(Plant.from_matrices("cancel", [x], [sp.Symbol("u")], [-x], [[sp.Integer(1)]], [x]))
    small = (x**2 - 1) / (x - 1)
    assert kernel.cancelled(small) == sp.cancel(small) == x + 1
    tyre = 6000 * sp.sin(sp.Rational(19, 10) * sp.atan(10 * a - sp.Rational(97, 100) * (10 * a - sp.atan(10 * a))))
    total = sp.diff(tyre, a) + (x**2 - 1) / (x - 1)

    def refuse(e: sp.Expr) -> sp.Expr:
        raise AssertionError(f"put over a common denominator: {e}")

    monkeypatch.setattr(lie, "cancel_together", refuse)
    assert kernel.cancelled(total) == total
