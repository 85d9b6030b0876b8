"""Taylor mode on formal numbers: zero proofs by polynomial identity, non-zero proofs by
balls, and nothing claimed that neither gives.

References: the brackets ad_f^k g by sympy done the slow way (symbolic Lie brackets
[f, g] = Dg f - Df g, substituted at the point and evaluated to 60 digits by sympy's
evalf), and the identity sin(a)^2 + cos(a)^2 = 1 (common knowledge) as the case the
formal test must leave open.
"""

from __future__ import annotations

from fractions import Fraction

import flint
import pytest
import sympy as sp

from plantlint.kernel.formal import PREC, FormalField, Unsettled
from plantlint.kernel.taylor import Towers, Undefined

x1, x2, x3 = sp.symbols("x1 x2 x3")
X = [x1, x2, x3]


def _bracket(f: sp.Matrix, g: sp.Matrix) -> sp.Matrix:
    return g.jacobian(X) * f - f.jacobian(X) * g


def test_brackets_on_formal_numbers_are_the_symbolic_brackets_at_the_point() -> None:
    """A rational point of a plant with sin, exp and sqrt: the values are not rational, so
    the exact field stops; the formal numbers rebuilt as sympy numbers equal the symbolic
    brackets there to 50 digits, and each ball contains its value."""
    f = sp.Matrix([x2, -sp.sin(x1) + x3 * sp.exp(x2), -x3 + sp.sqrt(1 + x1**2)])
    g = sp.Matrix([0, sp.cos(x1), 1 + x2])
    point = {x1: sp.Rational(1, 4), x2: sp.Rational(-1, 3), x3: sp.Rational(2, 5)}
    towers = Towers(X, [], list(f), [list(g)], [x1])
    old = flint.ctx.prec
    flint.ctx.prec = PREC
    try:
        formal = towers.brackets([Fraction(1, 4), Fraction(-1, 3), Fraction(2, 5)], 2, FormalField())[0]
    finally:
        flint.ctx.prec = old
    ad = g
    for k in range(3):
        for i in range(3):
            exact = sp.N(ad[i].subs(point), 60)
            number = formal[k][i]
            rebuilt = sp.N(number.to_sympy(), 60)
            assert abs(rebuilt - exact) < sp.Float("1e-50"), (k, i)
            flint.ctx.prec = PREC
            try:  # the ball of the value overlaps sympy's 60 digits (to 1e-50)
                assert number.ball.overlaps(flint.arb(str(exact), "1e-50")), (k, i)
                assert number.ball.rad() < 1e-60
            finally:
                flint.ctx.prec = old
        ad = _bracket(f, ad)


def test_zero_by_identity_nonzero_by_ball_and_the_rest_left_open() -> None:
    field = FormalField()
    quarter = field.const(Fraction(1, 4))
    s, c = field.base("sin", quarter), field.base("cos", quarter)
    assert field.base("sin", field.const(Fraction(0))) == 0  # sin(0) = 0 exactly: a rational, no unknown
    assert (s * c - c * s).decision().proven_zero  # an identity of the polynomial ring
    assert (s * s + c * c).decision().proven_nonzero  # = 1: away from 0 in its ball
    assert s is not field.base("sin", quarter) and (field.base("sin", quarter) - s).decision().proven_zero
    # sin^2 + cos^2 - 1 = 0 needs the identity between the unknowns: neither test settles it
    assert not (s * s + c * c - 1).decision().certain
    with pytest.raises(Undefined):
        _ = s / (s - s)  # a proven zero divisor
    with pytest.raises(Unsettled):
        _ = s / (s * s + c * c - 1)  # a divisor not proven non-zero
    # a proven domain error of an exact argument is undefined, as in the exact field
    with pytest.raises(Undefined):
        field.base("log", field.const(Fraction(-1)))


@pytest.mark.parametrize("name, turns", [("sin", Fraction(1, 4)), ("cos", Fraction(1, 4)), ("sin", Fraction(2, 3)),
                                         ("cos", Fraction(-5, 6)), ("tan", Fraction(1, 3)), ("sin", Fraction(7, 2)),
                                         ("tan", Fraction(3, 4)), ("sin", Fraction(1, 12))])
def test_trigonometric_values_at_multiples_of_pi_are_those_sympy_writes(name: str, turns: Fraction) -> None:
    """sympy evaluates sin(pi/4) to sqrt(2)/2 in the values a model is written with, so the
    formal numbers must take the same values: at multiples of 30 and 45 degrees the formal
    number is sympy's radical (rebuilt and compared exactly), with sqrt(c)^2 = c built in;
    at 15 degrees (pi/12) it stays an unknown whose ball holds sympy's value."""
    field = FormalField()
    angle = field.pi() * turns
    value = field.base(name, angle)
    reference = getattr(sp, name)(sp.pi * sp.Rational(turns.numerator, turns.denominator))
    rebuilt = value.to_sympy()
    if turns.denominator in (1, 2, 3, 4, 6):
        assert sp.simplify(rebuilt - reference) == 0 and "pi" not in str(rebuilt)
        assert (value * value - field.const(Fraction(int(sp.Rational(reference**2).p),
                                                     int(sp.Rational(reference**2).q)))).decision().proven_zero
    else:
        assert rebuilt == reference
    old = flint.ctx.prec
    flint.ctx.prec = PREC
    try:
        assert value.ball.overlaps(flint.arb(str(sp.N(reference, 60)), "1e-50"))
    finally:
        flint.ctx.prec = old


def test_square_roots_reduce_and_tan_at_a_right_angle_is_undefined() -> None:
    field = FormalField()
    root2 = field.base("sqrt", field.const(Fraction(2)))
    assert (root2 * root2 * root2 - 2 * root2).decision().proven_zero  # sqrt(2)^3 = 2 sqrt(2)
    assert (field.base("sin", field.pi() / 4) - field.base("cos", field.pi() / 4)).decision().proven_zero
    with pytest.raises(Undefined):
        field.base("tan", field.pi() / 2)
    # sympy writes sqrt(2) as 2^(1/2) and 1/sqrt(2) as 2^(-1/2): the same unknown, reduced
    assert (field.powq(field.const(Fraction(2)), Fraction(1, 2)) - root2).decision().proven_zero
    assert (field.powq(field.const(Fraction(2)), Fraction(-3, 2)) * 4 - root2).decision().proven_zero


# -- parameters: unknowns that stand for a whole interval ---------------------------------------

def _random_rational_function(rng, field, params):  # type: ignore[no-untyped-def]
    """(a formal number, a numpy function of the parameters' values) built the same way:
    sums, products and quotients of the parameters, sin of them and small integers."""
    import numpy as np

    def leaf():  # type: ignore[no-untyped-def]
        k = rng.integers(0, len(params) + 2)
        if k < len(params):
            return params[k][0], (lambda v, k=k: v[k])
        if k == len(params):
            c = int(rng.integers(-3, 4))
            return field.const(Fraction(c)), (lambda v, c=c: np.full_like(v[0], float(c)))
        j = int(rng.integers(0, len(params)))
        return field.base("sin", params[j][0]), (lambda v, j=j: np.sin(v[j]))

    def build(depth):  # type: ignore[no-untyped-def]
        if depth == 0:
            return leaf()
        (a, fa), (b, fb) = build(depth - 1), build(depth - 1)
        op = rng.integers(0, 4)
        if op == 0:
            return a + b, (lambda v: fa(v) + fb(v))
        if op == 1:
            return a - b, (lambda v: fa(v) - fb(v))
        if op == 2:
            return a * b, (lambda v: fa(v) * fb(v))
        # a quotient by 2 + b^2 (never zero): dependency between terms, but always defined
        d = b * b + 2
        return a / d, (lambda v: fa(v) / (fb(v) ** 2 + 2))

    return build(3)


def test_a_ball_tightened_over_a_parameter_interval_holds_every_value_numpy_samples() -> None:
    """Formal.refined over one or two parameters (unknowns whose balls are whole intervals)
    against numpy, on 40 random rational functions of them (sums, products, quotients by
    b^2 + 2, sines): the number evaluated in double precision at 2000 sampled parameter
    values (interval ends included) must lie in the tightened ball (to rounding), and the
    tightened ball is no wider than the ball carried along. Most of them must be settled
    (a few are left open by the formal numbers, which is allowed)."""
    import numpy as np

    checked = 0
    for seed in range(40):
        rng = np.random.default_rng(seed)
        field = FormalField()
        params = []
        for k in range(1 + seed % 2):
            lo = Fraction(int(rng.integers(-20, 10)), 4)
            hi = lo + Fraction(int(rng.integers(1, 20)), 4)
            params.append((field.parameter(f"p{k}", _interval(lo, hi)), (lo, hi)))
        try:
            number, reference = _random_rational_function(rng, field, params)
            tight = number.refined()
        except (Unsettled, Undefined, AttributeError):  # left open, or a plain constant
            continue
        samples = [np.concatenate([[float(lo), float(hi)], rng.uniform(float(lo), float(hi), 1998)])
                   for _, (lo, hi) in params]
        values = reference(samples)
        lower, upper = float(tight.lower()), float(tight.upper())
        slack = 1e-9 * (1 + np.max(np.abs(values)))
        assert np.all(values >= lower - slack) and np.all(values <= upper + slack), (seed, lower, upper)
        if number.ball.is_finite():  # (arb keeps a radius to about 30 bits: equal up to that)
            assert float(tight.rad()) <= float(number.ball.rad()) * (1 + 1e-6), seed
        checked += 1
    assert checked >= 30, checked


def _interval(lo: Fraction, hi: Fraction):  # type: ignore[no-untyped-def]
    from flint import arb, fmpq

    return arb(fmpq(lo.numerator, lo.denominator)).union(arb(fmpq(hi.numerator, hi.denominator)))
