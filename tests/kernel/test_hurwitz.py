"""The Lienard-Chipart criterion and its certification over parameter boxes, held
against numpy.roots and a textbook determinant."""

from __future__ import annotations

import numpy as np
import sympy as sp

from plantlint.kernel.hurwitz import certify_hurwitz, hurwitz_determinant, lienard_chipart


# -- the criterion itself --------------------------------------------------------------------
def test_lienard_chipart_agrees_with_numpy_roots() -> None:
    # reference: numpy.roots (companion-matrix eigenvalues) on random real polynomials
    rng = np.random.default_rng(7)
    for _ in range(300):
        d = int(rng.integers(1, 7))
        coeffs = [1.0] + list(rng.uniform(-1.0, 3.0, d))
        stable = bool(np.all(np.roots(coeffs).real < 0))
        ours = all(float(c.expr) > 0 for c in lienard_chipart([sp.Float(c) for c in coeffs]))
        assert ours == stable, coeffs


def test_hurwitz_determinant_of_a_cubic() -> None:
    # Gantmacher, The Theory of Matrices vol. 2, ch. XV (from memory): for
    # a0 s^3 + a1 s^2 + a2 s + a3 the second Hurwitz determinant is a1 a2 - a0 a3
    a = sp.symbols("a0:4")
    assert sp.expand(hurwitz_determinant(a, 2) - (a[1] * a[2] - a[0] * a[3])) == 0


def test_hurwitz_over_a_box_gives_a_witness_on_the_unstable_side() -> None:
    # s^3 + 2 s^2 + k s + 1: Hurwitz iff 2k > 1; the witness is checked with numpy.roots
    k = sp.Symbol("k", real=True)
    verdict = certify_hurwitz(lienard_chipart([1, 2, k, 1]), {k: (sp.Rational(3, 10), 2)})
    assert verdict.stable is False and verdict.verdict is not None
    kw = verdict.verdict.witness["k"]
    assert max(np.roots([1, 2, kw, 1]).real) >= 0
    inside = certify_hurwitz(lienard_chipart([1, 2, k, 1]), {k: (sp.Rational(6, 10), 2)})
    assert inside.stable is True
