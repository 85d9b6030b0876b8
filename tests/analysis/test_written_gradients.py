"""Candidate coordinates whose differentials are written down instead of derived.

The normal form's internal coordinates (x_a, x_a +- x_b) and the linearizing-output
search's candidates (x_a +- c x_b, c x_a +- x_b, x_a x_b) carry their gradients and
their Lie derivatives along a field without differentiation. Each is held against
sympy's ``diff`` of the candidate (a general-purpose reference library, done the plain
way), over every candidate of a four-state plant.
"""

from __future__ import annotations

import sympy as sp

from plantlint.analysis import linearizing_output, normal_form
from plantlint.kernel.lie import Kernel
from plantlint.kernel.plant import Plant

X = sp.symbols("x1:5")


def _kernel() -> Kernel:
    x1, x2, x3, x4 = X
    f = [x2, -sp.sin(x1) + x3 * x4, x4, -x3 + x1 * x2]
    return Kernel(Plant.from_matrices("four", list(X), [sp.Symbol("u")], f, [[0, 1 + x1**2, 0, sp.cos(x3)]], [x1]))


def test_search_candidates_carry_sympys_gradients() -> None:
    seen = 0
    for phi, gradient in linearizing_output._candidates(X):
        assert list(gradient) == [sp.diff(phi, x) for x in X], phi
        seen += 1
    assert seen == 4 + 6 * 10 + 10 + 12 * 4  # states, two-state combinations (10 weights), products, x_a + c x_b^2


def test_normal_form_candidates_carry_sympys_gradients_and_lie_derivatives() -> None:
    kernel = _kernel()
    field = kernel.plant.g[0]
    seen = 0
    for candidate in normal_form._candidates(kernel, prefer_input_free=False):
        assert candidate.gradient(4) == [sp.diff(candidate.phi, x) for x in X]
        by_sympy = sum((sp.diff(candidate.phi, x) * e for x, e in zip(X, field)), sp.Integer(0))
        assert sp.expand(candidate.along(field) - by_sympy) == 0
        seen += 1
    assert seen == 4 + 2 * 6
