"""Expressions in the ranged parameters (kernel/parameter_box.py), held against sympy's
own numeric evaluation and scipy.signal's transmission zeros."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.signal
import sympy as sp

from plantlint.kernel.lie import Kernel
from plantlint.kernel.parameter_box import NotCovered, ParameterBox, cancel_rational, clock, zero_polynomial
from plantlint.kernel.plant import Plant
from conftest import integer_system, markov_degrees

g = sp.Symbol("g", real=True)
x = sp.Symbol("x", real=True)


def _box(lo: sp.Expr, hi: sp.Expr) -> ParameterBox:
    plant = Plant.from_matrices("p", [x], [], [-g * x], [], [x], params=(g,), param_nominal={g: (lo + hi) / 2},
                                param_box={g: (lo, hi)})
    return ParameterBox(Kernel(plant), clock(5.0, 20000))


def test_square_root_of_a_square_follows_the_certified_sign() -> None:
    # a level written from a flow: sqrt(2*981*h) with h = ((1 - g)*q)^2/(2*981), q = 3/10
    level = ((1 - g) * sp.Rational(3, 10)) ** 2 / (2 * 981)
    flow = sp.sqrt(2 * 981 * level)
    box = _box(sp.Rational(3, 10), sp.Rational(9, 10))
    tidy = box.tidy(flow)
    assert not tidy.has(sp.Abs)
    for value in (0.3, 0.55, 0.9):  # reference: sympy's evaluation of the untouched expression
        assert abs(float(tidy.subs(g, value)) - float(flow.subs(g, value).evalf(30))) < 1e-15
    with pytest.raises(NotCovered):
        _box(sp.Integer(0), sp.Integer(2)).tidy(flow)  # 1 - g changes sign on [0, 2]


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_zero_polynomial_equals_scipy_transmission_zeros() -> None:
    # reference: scipy.signal.ss2zpk (zeros of the SISO transfer function's numerator)
    rng = np.random.default_rng(11)
    checked = 0
    while checked < 20:
        n = int(rng.integers(2, 6))
        A, B, C = integer_system(rng, n, 1, 1)
        degrees = markov_degrees(A, B, C)
        if degrees is None:
            continue
        r = degrees[0]
        markov = [int((C @ np.linalg.matrix_power(A, k) @ B)[0, 0]) for k in range(r)]
        coeffs, higher = zero_polynomial(sp.Matrix(A), sp.Matrix(B), sp.Matrix(C), n - r)
        assert all(sp.expand(e) == 0 for e in higher)
        assert coeffs[0] == markov[r - 1]  # leading coefficient C A^(r-1) B
        ours = np.roots([float(c) for c in coeffs]) if n - r else np.array([])
        zeros, _, _ = scipy.signal.ss2zpk(A.astype(float), B.astype(float), C.astype(float), np.zeros((1, 1)))
        assert len(ours) == len(zeros)
        for z in ours:
            assert min(abs(zeros - z)) < 1e-6 * (1 + abs(z))
        checked += 1


def _random_rational(rng: "random.Random", symbols: list[sp.Symbol], depth: int) -> sp.Expr:
    if depth == 0 or rng.random() < 0.25:
        return rng.choice(symbols) if rng.random() < 0.5 else sp.Rational(rng.randint(-9, 9), rng.randint(1, 7))
    a, b = _random_rational(rng, symbols, depth - 1), _random_rational(rng, symbols, depth - 1)
    op = rng.randrange(5)
    return [a + b, a - b, a * b, a / b, a ** rng.choice([2, 3, -1, -2])][op]


def test_cancel_in_the_field_is_sympys_cancel_of_together() -> None:
    # reference: sympy's expression route, sp.cancel(sp.together(e)) (gcd_terms, factor_terms,
    # then the polynomial cancel); the field route must give the same expression, not only
    # an equal rational function (srepr compared), including the sign convention with
    # several generators and generators that cancel out
    import random

    rng = random.Random(20261202)
    symbols = [sp.Symbol("gam1", real=True), sp.Symbol("gam2", real=True), sp.Symbol("k", positive=True),
               sp.Symbol("a")]
    compared = 0
    for _ in range(400):
        e = _random_rational(rng, symbols, rng.randint(2, 6))
        if e.is_Number or e.has(sp.zoo, sp.nan):
            continue
        ours = cancel_rational(e)
        assert ours is not None, e
        assert sp.srepr(ours) == sp.srepr(sp.cancel(sp.together(e))), e
        compared += 1
    assert compared > 250
    # the palletizer's inverse mass-matrix entry at a point (demo model)
    m = sp.Symbol("m_p", real=True)
    R = sp.Rational
    entry = -(R(77, 100) * m + R(91, 50)) / ((R(49, 100) * m + R(49, 50)) * (R(169, 100) * m + R(257, 25))
                                             - (R(77, 100) * m + R(91, 50)) ** 2)
    assert cancel_rational(entry) == (-550 * m - 1300) / (168 * m**2 + 2779 * m + 4830)


def test_cancel_in_the_field_declines_what_is_not_rational() -> None:
    m = sp.Symbol("m_p", real=True)
    for e in (sp.sqrt(3) * m / (m + 1), sp.sin(m) / m, sp.Float(0.5) * m / (m + 1), sp.sqrt(m) + 1,
              sp.Integer(1) / (m * (m + 1) - m**2 - m)):
        assert cancel_rational(e) is None, e
