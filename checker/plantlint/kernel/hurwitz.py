"""Hurwitz stability of a polynomial whose coefficients depend on parameters.

A real polynomial c_0 s^d + c_1 s^(d-1) + ... + c_d with c_0 > 0 has every root in the
open left half-plane exactly when (Lienard-Chipart criterion; Gantmacher, *The Theory
of Matrices*, vol. 2, ch. XV, from memory) every coefficient is positive and the
Hurwitz determinants Delta_(d-1), Delta_(d-3), ... are positive. Fewer and smaller
determinants than the full Routh-Hurwitz list, and the coefficient conditions name
the boundary in the simplest terms (c_d = 0: a root crosses at s = 0; a Hurwitz
determinant = 0: a pair crosses at s = +-i w).

Over a box of parameters every condition is certified positive with the
branch-and-bound of :mod:`plantlint.kernel.intervals`; a point where one is certainly
negative (or exactly zero) is a witness that the polynomial is not Hurwitz there.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import sympy as sp

from plantlint.kernel.exact import laplace_det
from plantlint.kernel.intervals import Bound, Budget, EnvelopeVerdict, certify_sign
from plantlint.kernel.plant import as_expr


@dataclass(frozen=True)
class Condition:
    """One inequality ``expr > 0`` of the criterion, with a name for messages."""

    label: str
    expr: sp.Expr


def hurwitz_matrix(coeffs: Sequence[sp.Expr]) -> sp.Matrix:
    """The d x d Hurwitz matrix of c_0 s^d + ... + c_d (``coeffs`` from the leading one):
    entry (i, j) (from 1) is c_(2j - i), zero outside 0..d."""
    d = len(coeffs) - 1

    def c(k: int) -> sp.Expr:
        return as_expr(coeffs[k]) if 0 <= k <= d else sp.Integer(0)

    return sp.Matrix(d, d, lambda i, j: c(2 * (j + 1) - (i + 1)))


def hurwitz_determinant(coeffs: Sequence[sp.Expr], k: int) -> sp.Expr:
    """Delta_k: the leading k x k principal minor of the Hurwitz matrix."""
    H = hurwitz_matrix(coeffs)
    return sp.expand(laplace_det(H[:k, :k]))


def lienard_chipart(coeffs: Sequence[sp.Expr]) -> list[Condition]:
    """The conditions (each ``> 0``) for Hurwitz stability, given c_0 > 0.

    The constant coefficient comes first (its sign change is a real root crossing
    s = 0, the commonest boundary), then the other coefficients, then the
    determinants Delta_(d-1), Delta_(d-3), ... down to Delta_2 (Delta_1 = c_1 is
    already a coefficient condition).
    """
    d = len(coeffs) - 1
    out = [Condition("the constant coefficient" if d > 0 else "the leading coefficient", as_expr(coeffs[d]))]
    for k in range(d - 1, 0, -1):
        out.append(Condition(f"the coefficient of s^{d - k}" if d - k > 1 else "the coefficient of s",
                             as_expr(coeffs[k])))
    for k in range(d - 1, 1, -2):
        out.append(Condition(f"the Hurwitz determinant Delta_{k}", hurwitz_determinant(coeffs, k)))
    return out


@dataclass(frozen=True)
class HurwitzVerdict:
    """Outcome over a box: ``stable`` True (proven), False (witness), None (undecided)."""

    stable: bool | None
    failed: Condition | None  # the condition with the witness, or the first undecided one
    verdict: EnvelopeVerdict | None  # of ``failed`` (witness, undecided boxes)
    boxes: int
    seconds: float


def certify_hurwitz(
    conditions: Sequence[Condition],
    box: dict[sp.Symbol, tuple[Bound, Bound]],
    budget: Budget = Budget(),
) -> HurwitzVerdict:
    """Certify every condition positive on ``box`` (strictly), in order, within one budget.

    A witness of one condition settles the answer (not Hurwitz somewhere); an
    undecided condition is remembered and the others are still tried, because a
    later one may give a witness.
    """
    boxes, seconds = 0, 0.0
    undecided: tuple[Condition, EnvelopeVerdict] | None = None
    for cond in conditions:
        left = Budget(max(budget.max_boxes - boxes, 1), max(budget.max_seconds - seconds, 0.0))
        v = certify_sign(cond.expr, box, True, left)
        boxes += v.boxes_examined
        seconds += v.seconds
        if v.regular is False:
            return HurwitzVerdict(False, cond, v, boxes, seconds)
        if v.regular is None and undecided is None:
            undecided = (cond, v)
    if undecided is not None:
        return HurwitzVerdict(None, undecided[0], undecided[1], boxes, seconds)
    return HurwitzVerdict(True, None, None, boxes, seconds)


__all__ = ["Condition", "HurwitzVerdict", "certify_hurwitz", "hurwitz_determinant", "hurwitz_matrix",
           "lienard_chipart"]
