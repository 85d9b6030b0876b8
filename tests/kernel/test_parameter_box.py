"""Expressions in the ranged parameters (kernel/parameter_box.py), held against sympy's
own numeric evaluation and scipy.signal's transmission zeros."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.signal
import sympy as sp

from plantlint.kernel.lie import Kernel
from plantlint.kernel.parameter_box import NotCovered, ParameterBox, clock, zero_polynomial
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

