"""Interval forward mode (kernel/forward.py) held against two outside references:

* sympy's own differentiation (``sympy.diff``, done another way: symbolically)
  evaluated with mpmath at 60 digits at sample points: the derivative balls must
  contain the true values;
* numpy central finite differences (an independent floating-point evaluation of
  hand-written numpy functions) at points inside boxes: the gradient enclosures
  over a box must contain them (up to the finite-difference error), and the value
  enclosures the numpy values.
"""

from __future__ import annotations

import math

import mpmath
import numpy as np
import pytest
import sympy as sp
from flint import arb

from plantlint.kernel.forward import ForwardProgram

x, y, z = sp.symbols("x y z")
R = sp.Rational

#: (sympy expression, the same function written with numpy, box where it is smooth)
CASES = [
    (x**3 * y - 2 * x * y**2 + R(1, 3), lambda x, y, z: x**3 * y - 2 * x * y**2 + 1 / 3, {x: (-1.5, 2), y: (-1, 1)}),
    (sp.sin(x) * sp.cos(y) + sp.tan(z / 2), lambda x, y, z: np.sin(x) * np.cos(y) + np.tan(z / 2), {x: (-3, 3), y: (0.5, 4), z: (-2, 2)}),
    (sp.exp(-x**2 / 4) / (2 + y**2), lambda x, y, z: np.exp(-x**2 / 4) / (2 + y**2), {x: (-2, 2), y: (-1, 3)}),
    (sp.log(1 + x**2) * sp.atan(y - z), lambda x, y, z: np.log(1 + x**2) * np.arctan(y - z), {x: (-1, 1), y: (-2, 2), z: (0, 1)}),
    (sp.sqrt(2 + x * y) + (3 + x) ** R(1, 3), lambda x, y, z: np.sqrt(2 + x * y) + np.cbrt(3 + x), {x: (-1, 1), y: (-1, 1)}),
    (sp.asin(x / 2) - sp.acos(y / 3) + sp.tanh(x * y), lambda x, y, z: np.arcsin(x / 2) - np.arccos(y / 3) + np.tanh(x * y),
     {x: (-1.5, 1.5), y: (-2, 2)}),
    (sp.sinh(x) * sp.cosh(y - x), lambda x, y, z: np.sinh(x) * np.cosh(y - x), {x: (-1, 2), y: (-1, 1)}),
    ((1 + x**2) ** y, lambda x, y, z: (1 + x**2) ** y, {x: (-1, 1), y: (-2, 2)}),
    (sp.atan2(y, x), lambda x, y, z: np.arctan2(y, x), {x: (0.5, 2), y: (-1, 1)}),
    (x**-3 * sp.pi - sp.E * y / (x + y) ** 2, lambda x, y, z: math.pi / x**3 - math.e * y / (x + y) ** 2, {x: (1, 2), y: (0.5, 1)}),
    (x * y * z * sp.cos(x - y) * sp.cos(y - z), lambda x, y, z: x * y * z * np.cos(x - y) * np.cos(y - z),
     {x: (-0.5, 0.5), y: (-0.5, 0.5), z: (-0.5, 0.5)}),
    ((x - y) ** R(-3, 2) + sp.sin(x) ** 2 * sp.cos(x) ** 3, lambda x, y, z: (x - y) ** -1.5 + np.sin(x) ** 2 * np.cos(x) ** 3,
     {x: (1, 2), y: (-1, 0.5)}),
]


def _symbols(box: dict) -> list[sp.Symbol]:
    return [s for s in (x, y, z) if s in box]


def _points(box: dict, count: int, seed: int) -> list[list[float]]:
    rng = np.random.default_rng(seed)
    syms = _symbols(box)
    return [[float(rng.uniform(*box[s])) for s in syms] for _ in range(count)]


def _contains(ball: arb, value: mpmath.mpf) -> bool:
    """The ball meets a 1e-50 neighbourhood of the reference value."""
    ref = arb(mpmath.nstr(value, 60, min_fixed=-1, max_fixed=1), 1e-50 * (1 + abs(float(value))))
    return ball.overlaps(ref)


@pytest.mark.parametrize("k", range(len(CASES)))
def test_gradient_at_points_contains_sympy_derivative_evaluated_with_mpmath(k: int) -> None:
    """Reference: sympy.diff of the expression, evaluated by mpmath at 60 digits."""
    expr, _, box = CASES[k]
    syms = _symbols(box)
    program = ForwardProgram([expr], syms)
    mpmath.mp.dps = 60
    derivatives = [sp.lambdify(syms, sp.diff(expr, s), "mpmath") for s in syms]
    value_ref = sp.lambdify(syms, expr, "mpmath")
    try:
        for point in _points(box, 6, seed=k):
            (value, grad), = program.with_gradients([arb(v) for v in point], 128)
            args = [mpmath.mpf(v) for v in point]
            assert _contains(value, value_ref(*args))
            for g, d in zip(grad, derivatives):
                assert g.is_finite() and g.rad() < 1e-25 * (1 + abs(float(g.mid())))
                assert _contains(g, d(*args)), (expr, point, g, d(*args))
    finally:
        mpmath.mp.dps = 15


@pytest.mark.parametrize("k", range(len(CASES)))
def test_box_enclosures_contain_numpy_values_and_finite_differences(k: int) -> None:
    """Reference: numpy evaluation and central finite differences (step 1e-6, error
    about 1e-10 for these functions) at points inside sub-boxes."""
    expr, fn, box = CASES[k]
    syms = _symbols(box)
    program = ForwardProgram([expr], syms)
    rng = np.random.default_rng(100 + k)
    for _ in range(4):
        sub = []
        for s in syms:
            lo, hi = box[s]
            a, b = sorted(rng.uniform(lo, hi, 2))
            sub.append((float(a), float(b)))
        cover = [arb(a).union(arb(b)) for a, b in sub]
        (value, grad), = program.with_gradients(cover, 64)
        assert value.is_finite() and all(g.is_finite() for g in grad)
        assert program.values(cover, 64)[0].overlaps(value)
        for _ in range(20):
            p = [float(rng.uniform(a, b)) for a, b in sub]
            full = dict(zip(syms, p))
            args = [full.get(s, 0.0) for s in (x, y, z)]
            assert value.contains(arb(float(fn(*args)), 1e-12))
            for i, s in enumerate(syms):
                h = 1e-6
                up, down = list(args), list(args)
                j = (x, y, z).index(s)
                up[j] += h
                down[j] -= h
                fd = (fn(*up) - fn(*down)) / (2 * h)
                tol = 1e-6 * (1 + abs(fd))
                assert grad[i].lower() - tol <= fd <= grad[i].upper() + tol, (expr, s, sub, grad[i], fd)


def test_gradient_over_a_wide_box_keeps_the_tight_periodic_enclosure() -> None:
    """d/dx sin(x) over [0.1, 3] is cos over [0.1, 3] = [cos 3, cos 0.1] (math.cos), not
    the midpoint-radius bound [-1, 1]."""
    program = ForwardProgram([sp.sin(x)], [x])
    (value, (grad,)), = program.with_gradients([arb(0.1).union(arb(3))], 64)
    assert float(grad.lower()) == pytest.approx(math.cos(3), abs=1e-7)
    assert float(grad.upper()) == pytest.approx(math.cos(0.1), abs=1e-7)
    assert float(value.upper()) == pytest.approx(1, abs=1e-7)  # sin reaches 1 at pi/2 inside
    assert float(value.lower()) == pytest.approx(math.sin(0.1), abs=1e-7)


def test_undifferentiable_places_give_non_finite_derivatives() -> None:
    """sqrt at 0 (unbounded slope), tan across its pole and atan2 across its branch
    cut (y = 0, x < 0: numpy.arctan2 jumps from pi to -pi there) have no derivative
    enclosure; close to such a place the derivative enclosure is finite and large."""
    sqrt_p = ForwardProgram([sp.sqrt(x)], [x])
    (v, (g,)), = sqrt_p.with_gradients([arb(0).union(arb(1))], 64)
    assert not g.is_finite()
    (v, (g,)), = sqrt_p.with_gradients([arb(1e-6).union(arb(1))], 64)
    assert v.is_finite() and g.is_finite() and g.upper() >= 499  # 1/(2 sqrt(1e-6)) = 500
    tan_p = ForwardProgram([sp.tan(x)], [x])
    (v, (g,)), = tan_p.with_gradients([arb(1).union(arb(2))], 64)
    assert not g.is_finite()
    assert np.arctan2(1e-9, -1.0) - np.arctan2(-1e-9, -1.0) == pytest.approx(2 * math.pi)
    cut = ForwardProgram([sp.atan2(y, x)], [x, y])
    (v, grad), = cut.with_gradients([arb(-2).union(arb(-1)), arb(-0.1).union(arb(0.1))], 64)
    assert not any(g.is_finite() for g in grad)
    (v, grad), = cut.with_gradients([arb(1).union(arb(2)), arb(-0.1).union(arb(0.1))], 64)
    assert all(g.is_finite() for g in grad)


def test_sparse_gradients_are_zero_for_variables_an_output_does_not_read() -> None:
    """Two outputs over three variables: each gradient has exact zeros where sympy.diff is 0."""
    program = ForwardProgram([x * y, sp.cos(z) + 1], [x, y, z])
    point = [arb(0.5), arb(-2), arb(1)]
    (v0, g0), (v1, g1) = program.with_gradients(point, 128)
    assert g0[2] == 0 and g1[0] == 0 and g1[1] == 0
    assert g0[0].contains(-2) and g0[1].contains(0.5)
    assert g1[2].overlaps(arb(-math.sin(1), 1e-15))
