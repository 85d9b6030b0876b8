"""Exact linear algebra on numbers that may be transcendental (``sin(1/3)``).

Every "is this entry zero?" goes through a :data:`ZeroDecider` (rigorous balls, then
exact confirmation in the kernel), never through a float comparison; it answers with the
one zero-decision type (:class:`plantlint.kernel.decision.ZeroDecision`). One routine per
question: :func:`rank` (with whether every pivot decision was certain),
:func:`gauss_jordan` (the reduced rows, for the solvers), :func:`laplace_det` (a
determinant without division, for symbolic matrices).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any

import sympy as sp
from flint import arb

from plantlint.kernel import decision as zd
from plantlint.kernel.decision import ZeroDecision
from plantlint.kernel.plant import as_expr

#: ``decide(c)``: whether c is zero (proven non-zero, zero, zero unconfirmed, undefined,
#: undecided).
ZeroDecider = Callable[[sp.Expr], ZeroDecision]


def number_decider(kernel: "object") -> ZeroDecider:
    """The kernel's exact-constant zero decision as a :data:`ZeroDecider`."""

    def decide(value: sp.Expr) -> ZeroDecision:
        return kernel.constant_is_zero(as_expr(value))  # type: ignore[attr-defined]

    return decide


def has_undefined(values: Any) -> bool:
    """True when a value at a point is infinite or undefined (``zoo``, ``oo``, ``nan``): a
    rate, or a derivative, that does not exist there (d sqrt(w)/dw at w = 0); or when a
    number there is not real (d asin(h)/dh = 1/sqrt(1 - h^2) at h = 27 is imaginary; asin(27)
    stays unevaluated, and sympy knows it is not real): the model's functions are real."""
    return any(_undefined(as_expr(v)) for v in values)


def _undefined(v: sp.Expr) -> bool:
    if v.is_Rational:
        return False
    if v.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
        return True
    return not v.free_symbols and v.is_extended_real is False


def magnitude(value: sp.Expr) -> float:
    """A float size for pivot choice only (never for a zero decision)."""
    if value.is_Rational:
        return abs(float(value))
    try:
        return abs(complex(value.evalf(30)))
    except (TypeError, ValueError):
        return 0.0


def gauss_jordan(
    rows: list[list[Any]], ncols: int, decide: ZeroDecider,
    size: Callable[[Any], float] = magnitude, zero: Any = sp.Integer(0), one: Any = sp.Integer(1),
) -> tuple[list[list[Any]], list[int], bool]:
    """Reduced row echelon form over the first ``ncols`` columns, exactly.

    Entries not proven non-zero are replaced by an exact 0 so that later tests stay cheap;
    an entry that is not taken as zero (undefined, undecided) makes the result uncertain.
    The pivot in each column is the entry of largest ``size`` (for the later numeric use
    of the exact expressions). Returns the rows, the pivot columns and whether every
    skipped entry was taken as zero.

    The same elimination serves other number types: rigorous balls (``decide`` says
    non-zero only for a ball that excludes zero, ``size`` its lower bound), with their own
    ``zero`` and ``one``; the rank found is then a proven lower bound, certain when every
    skipped entry was exactly zero.
    """
    work = [list(r) for r in rows]
    pivots: list[int] = []
    certain = True
    top = 0
    for col in range(ncols):
        best, best_size = -1, -1.0
        for i in range(top, len(work)):
            if _exactly_zero(work[i][col]):
                continue
            z = decide(work[i][col])
            if not z.proven_nonzero:
                certain = certain and z.taken_zero
                work[i][col] = zero
                continue
            here = size(work[i][col])
            if here > best_size:
                best, best_size = i, here
        if best < 0:
            continue
        work[top], work[best] = work[best], work[top]
        piv = work[top][col]
        work[top] = [e if _exactly_zero(e) else e / piv for e in work[top]]
        work[top][col] = one
        for i in range(len(work)):
            if i == top or _exactly_zero(work[i][col]):
                continue
            factor = work[i][col]
            work[i] = [a if _exactly_zero(b) else a - factor * b for a, b in zip(work[i], work[top])]
            work[i][col] = zero
        pivots.append(col)
        top += 1
        if top == len(work):
            break
    return work, pivots, certain


def _exactly_zero(e: Any) -> bool:
    """A literal zero (a sympy 0, or a ball that is exactly 0): no decision needed."""
    return e.is_zero() if isinstance(e, arb) else e == 0


def rank(rows: Sequence[Sequence[sp.Expr]], decide: ZeroDecider) -> tuple[int, bool]:
    """Rank of a matrix of exact numbers, and whether it is certain.

    An entry that could not be decided is taken as zero, so an uncertain rank is a
    lower bound.
    """
    rows = [list(r) for r in rows]
    if not rows or not rows[0]:
        return 0, True
    _, pivots, certain = gauss_jordan([[as_expr(e) for e in r] for r in rows], len(rows[0]), decide)
    return len(pivots), certain


def laplace_det(M: sp.Matrix) -> sp.Expr:
    """Determinant by cofactor expansion with memoised minors, no simplification
    (fraction-free, and cheap for the small matrices met here)."""
    n = M.rows
    memo: dict[tuple[int, ...], sp.Expr] = {}

    def minor(row: int, cols: tuple[int, ...]) -> sp.Expr:
        if row == n:
            return sp.Integer(1)
        if cols in memo:
            return memo[cols]
        total = sp.Integer(0)
        for pos, c in enumerate(cols):
            entry = M[row, c]
            if entry == 0:
                continue
            rest = minor(row + 1, cols[:pos] + cols[pos + 1 :])
            if rest == 0:
                continue
            total += (-1) ** pos * entry * rest
        memo[cols] = total
        return total

    return minor(0, tuple(range(M.cols)))


def ball_elimination(rows: Sequence[Sequence[arb]]) -> tuple[list[list[arb]], list[int], bool]:
    """:func:`gauss_jordan` over rigorous balls: a pivot is a ball that excludes zero, the
    largest lower bound first. The pivots found are proven; the rank is a lower bound,
    certain when every entry skipped was exactly zero."""
    return gauss_jordan([list(r) for r in rows], len(rows[0]) if rows else 0, decide=zd.of_ball,
                        size=lambda e: float(e.abs_lower()), zero=arb(0), one=arb(1))


def ball_rank(rows: Sequence[Sequence[arb]]) -> tuple[int, bool]:
    """Rank of a ball matrix: a proven lower bound, and whether it is certain."""
    if not rows or not rows[0]:
        return 0, True
    _, pivots, certain = ball_elimination(rows)
    return len(pivots), certain


def sign(value: sp.Expr) -> int:
    """The exact sign of a constant: rigorous balls first, then a bounded exact test.

    Returns -1, 0 or 1; 0 only for a value proven zero. A value the balls cannot separate
    from zero and the exact test cannot settle is given sympy's own sign assumption
    (``is_positive``), as a last resort."""
    from plantlint.kernel.balls import UnsupportedExpression, to_arb

    if value.is_Rational:
        return int(bool(value > 0)) - int(bool(value < 0))
    try:
        b = to_arb(value)
        if b > 0:
            return 1
        if b < 0:
            return -1
    except UnsupportedExpression:
        pass
    from plantlint.kernel.lie import bounded_equals_zero

    return 0 if bounded_equals_zero(value).proven_zero else (1 if value.is_positive else -1)
