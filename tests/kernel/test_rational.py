"""Rational functions in the field QQ(p) (kernel/rational.py), held against sympy's
expression route (cancel of together; equals) and mpmath's high-precision evaluation."""

from __future__ import annotations

import random

import mpmath
import sympy as sp

from plantlint.kernel.rational import cancel_rational, cancel_together, rational_zero, vanishes_identically


def _random_rational(rng: random.Random, atoms: list[sp.Expr], depth: int, atom_share: float = 0.5,
                     denominators: int = 7) -> sp.Expr:
    """A seeded random rational function of ``atoms`` (symbols, or function values of them)."""
    if depth == 0 or rng.random() < 0.25:
        return rng.choice(atoms) if rng.random() < atom_share else sp.Rational(rng.randint(-9, 9),
                                                                               rng.randint(1, denominators))
    a = _random_rational(rng, atoms, depth - 1, atom_share, denominators)
    b = _random_rational(rng, atoms, depth - 1, atom_share, denominators)
    return [a + b, a - b, a * b, a / b, a ** rng.choice([2, 3, -1, -2])][rng.randrange(5)]


def _compared_with_sympy(exprs: list[sp.Expr]) -> int:
    """How many of ``exprs`` (numbers, zoo and nan left out) cancel in the field to the very
    expression sympy's cancel of together writes (srepr compared); fails on the first that
    does not."""
    compared = 0
    for e in exprs:
        if e.is_Number or not e.free_symbols or e.has(sp.zoo, sp.nan):
            continue
        ours = cancel_rational(e)
        assert ours is not None, e
        assert sp.srepr(ours) == sp.srepr(sp.cancel(sp.together(e))), e
        compared += 1
    return compared


def test_cancel_in_the_field_is_sympys_cancel_of_together() -> None:
    # reference: sympy's expression route, sp.cancel(sp.together(e)) (gcd_terms, factor_terms,
    # then the polynomial cancel); the field route must give the same expression, not only
    # an equal rational function (srepr compared), including the sign convention with
    # several generators and generators that cancel out
    rng = random.Random(20261202)
    symbols = [sp.Symbol("gam1", real=True), sp.Symbol("gam2", real=True), sp.Symbol("k", positive=True),
               sp.Symbol("a")]
    assert _compared_with_sympy([_random_rational(rng, symbols, rng.randint(2, 6)) for _ in range(400)]) > 250
    # the palletizer's inverse mass-matrix entry at a point (demo model, invented numbers)
    m = sp.Symbol("m_p", real=True)
    R = sp.Rational
    entry = -(R(77, 100) * m + R(91, 50)) / ((R(49, 100) * m + R(49, 50)) * (R(169, 100) * m + R(257, 25))
                                             - (R(77, 100) * m + R(91, 50)) ** 2)
    assert cancel_rational(entry) == (-550 * m - 1300) / (168 * m**2 + 2779 * m + 4830)


def test_cancel_in_the_field_declines_what_is_not_rational() -> None:
    m = sp.Symbol("m_p", real=True)
    q = sp.Symbol("q", real=True)
    for e in (sp.sqrt(3) * m / (m + 1), sp.Float(0.5) * m / (m + 1), sp.sqrt(m) + 1,
              sp.Integer(1) / (m * (m + 1) - m**2 - m), sp.Rational(1, 3),
              sp.sin(1) * m / (m + 1),  # a function value that is a number, not a generator
              sp.cos(2 * m + 2 * q) / (m + 1),  # sympy's cancel would first write cos(2*(m + q))
              sp.Piecewise((m, q > 0), (1, True)) / m):
        assert cancel_rational(e) is None, e


def test_cancel_with_function_values_as_generators_is_sympys_cancel_of_together() -> None:
    # reference: sympy's sp.cancel(sp.together(e)), which reads cos(q2), exp(-q1) (as 1/exp(q1))
    # and exp(2*q1) (as exp(q1)^2) as generators of its polynomials; the field route, with the
    # same generators in sympy's order, must write the same expression (srepr compared). The
    # palletizer arm's decoupling entries are of this kind (cos(q2) and a ranged mass).
    rng = random.Random(20261203)
    q1, q2, m = sp.symbols("q1 q2 m_p", real=True)
    atoms = [q1, q2, m, sp.cos(q2), sp.sin(q2), sp.cos(q1 + q2), sp.exp(-q1), sp.exp(2 * q1), sp.tan(q1),
             sp.atan(m), sp.cos(q2) ** 2]
    assert _compared_with_sympy([_random_rational(rng, atoms, 4, 0.7, 5) for _ in range(120)]) > 90


def test_constants_that_vanish_as_rational_functions_of_their_transcendental_parts() -> None:
    # a stirred-tank equilibrium residual (demo syrup reactor): c = q/(q + V k) solves
    # q (1 - c) / V - k c = 0 for k = k0 exp(-E/T); reference: sympy's equals(0)
    k = 3_000_000_000 * sp.exp(sp.Rational(-160, 7))
    c = 10 / (10 + 200 * k)
    residual = sp.Rational(10, 200) * (1 - c) - k * c
    assert residual != 0  # not zero by sympy's automatic evaluation
    assert residual.equals(0) is True
    assert vanishes_identically(residual)
    # radicals and pi as unknowns (an identity in them, not one that needs sqrt(2)^2 = 2)
    r = sp.sqrt(2)
    zero = (r + 1) / (r - 1) - 1 - 2 / (r - 1) + sp.pi / (sp.pi + r) - sp.pi * (1 - r / (sp.pi + r)) / sp.pi
    assert zero != 0
    assert zero.equals(0) is True
    assert vanishes_identically(zero)
    # zero only through sqrt(2)^2 = 2: not proven here (the caller asks sympy), never wrong
    assert (1 + r) / (3 - r) - (1 + r) * (3 + r) / 7 != 0
    assert not vanishes_identically((1 + r) / (3 - r) - (1 + r) * (3 + r) / 7)


def test_non_zero_constants_are_never_taken_for_zero() -> None:
    # reference: mpmath at 50 digits says each is far from zero; a relation between the
    # parts (sin^2 + cos^2 = 1) is zero but not as a rational function: not proven, not wrong
    mpmath.mp.dps = 50
    for c in (sp.exp(sp.Rational(1, 3)) - 1, sp.sqrt(2) / (1 + sp.sqrt(2)) - sp.Rational(1, 2),
              sp.pi - sp.Rational(355, 113), sp.exp(-sp.Rational(160, 7)) * 10**9):
        assert abs(mpmath.mpf(sp.N(c, 50))) > mpmath.mpf(10) ** -10
        assert not vanishes_identically(c)
    assert not vanishes_identically(sp.sin(1) ** 2 + sp.cos(1) ** 2 - 1)
    assert not vanishes_identically(sp.Symbol("x") - sp.Symbol("x") + sp.Symbol("y"))


def test_rational_value_is_sympys_substitution() -> None:
    # reference: sympy's xreplace and its automatic evaluation of the substituted tree
    from plantlint.kernel.rational import rational_value

    rng = random.Random(7)
    symbols = [sp.Symbol("gam1", real=True), sp.Symbol("gam2", real=True), sp.Symbol("k", positive=True)]
    compared = declined = 0
    for _ in range(400):
        e = _random_rational(rng, symbols, rng.randint(2, 6))
        if e.has(sp.zoo, sp.nan):
            continue
        values = {s: sp.Rational(rng.randint(-6, 6), rng.randint(1, 4)) for s in symbols}
        reference = e.xreplace(values)
        ours = rational_value(e, values)
        if ours is None:  # only where sympy meets a division by zero on the way
            assert not reference.is_Rational or any(
                (node.is_Pow and node.exp.is_negative and node.base.xreplace(values) == 0)
                for node in sp.preorder_traversal(e)), e
            declined += 1
            continue
        assert reference.is_Rational and ours == reference, e
        compared += 1
    assert compared > 300 and declined > 0
    g = symbols[0]
    assert rational_value(sp.sqrt(2) * g, {g: sp.Integer(1)}) is None
    assert rational_value(g + symbols[1], {g: sp.Integer(1)}) is None  # a symbol without a value
    assert rational_value(g / 2, {g: sp.Float(0.5)}) is None


def test_cancel_together_is_sympys_cancel_of_together_on_either_route() -> None:
    # reference: sympy's cancel(together(e)), to the expression (srepr), for a rational
    # function (field route) and for one with a function in it (sympy's route)
    x, y = sp.symbols("x y", real=True)
    for e in ((x**2 - y**2) / (x - y) + 1 / (x + 1), (sp.sin(x)**2 - 1) / (sp.sin(x) - 1) + y / x):
        assert sp.srepr(cancel_together(e)) == sp.srepr(sp.cancel(sp.together(e)))


def test_zero_test_in_flint_agrees_with_sympys_cancel() -> None:
    # reference: sympy's cancel of together, a zero test by another library's arithmetic;
    # half the cases are made zero on purpose (e - e rewritten by expand), so both answers occur
    rng = random.Random(7)
    symbols = [sp.Symbol("x"), sp.Symbol("y"), sp.Symbol("w", positive=True)]
    seen = {True: 0, False: 0}
    for _ in range(600):
        e = _random_rational(rng, symbols, rng.randint(2, 5))
        if e.is_Number or e.has(sp.zoo, sp.nan):
            continue
        if rng.random() < 0.5:
            e = e - sp.expand(e) + (sp.Rational(1, 3) if rng.random() < 0.2 else 0)
        ours = rational_zero(e)
        if ours is None:  # a denominator zero as written: sympy's route decides those
            continue
        assert ours == (sp.cancel(sp.together(e)) == 0), e
        seen[ours] += 1
    assert seen[True] > 30 and seen[False] > 30
    # not rational functions, or without symbols: not decided here
    x = symbols[0]
    assert rational_zero(sp.sin(x) - sp.sin(x) + x * sp.cos(x)) is None
    assert rational_zero(sp.Rational(3, 4)) is None
    # a tiny coefficient that cancels against nothing is still a non-zero function
    eps = sp.Rational(1, 10**300)
    assert rational_zero(x / (x - eps) - 1) is False
    assert rational_zero(x / (x - eps) - 1 - eps / (x - eps)) is True
