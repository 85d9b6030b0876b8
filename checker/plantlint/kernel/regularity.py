"""Regularity over a box by branch and bound on the Taylor-mode towers, without sympy.

The decoupling matrix A(x) (rows L_gj L_f^(r_i - 1) h_i) is enclosed over a box in its
mean-value form A(c) + sum_a dA/dx_a(box) (x_a - c_a) (Moore, Kearfott and Cloud,
Introduction to Interval Analysis, SIAM 2009, sec. 6.4), intersected with its direct
enclosure over the box: the values at the centre, over the box and the gradients over the
box come from :meth:`Towers.lglf` and :meth:`Towers.decoupling_gradients` run on arb balls.
A box is proven when f, the g columns and h are finite over it (no division by a ball
holding 0, no function at or past its domain's edge) and det A excludes 0. An undecided box
is split across the side that moves A the most (|dA/dx_a| times width); where a value is not
defined over it (a ball of x*x that holds 0), across the side whose midpoint makes it
defined, else across the sides in turn. The order of the boxes is fixed (depth first), so a
proof within a number of boxes is the same proof on every machine.

Before the balls, each box is tried by second-order Taylor forms
(:mod:`plantlint.kernel.taylor_forms`) where the matrix's rows are g components with a common
factor (:class:`RowFactors`: an output that is a position whose rate is a velocity state,
and rows that share a node of the graph, like 1/det M in every entry of an inverted mass
matrix): det A = prod(common factors) det A', and over the box the model is defined (f, g
and h as forms), every common factor and det A' exclude 0. A' has no quotient by det M left,
so the cancellation between the products of M^-1's entries that no ball or mean-value form
keeps (20,000 mean-value boxes did not close the demo palletizer's arm over its payload
range) does not arise; the forms keep the second-order terms of det M exactly. An undecided
box is then split across the side whose terms move the failing value the most. Measured on
the palletizer (2026-12-04): 71 boxes, 0.06 s.

Two callers: the light route (:mod:`plantlint.analysis.light`), which answers a model only
when this proves its envelope within a few boxes, and the full analysis's envelope stage
(:func:`plantlint.analysis.structure.certify_envelope`), which tries it when its own proof
by factors leaves the envelope undecided, with at least as many boxes, so that the light
route never proves what the full analysis leaves open.
"""

from __future__ import annotations

import sys
import time
from collections import Counter
from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Callable, Sequence

from flint import arb, arb_mat, fmpq, fmpq_mat

from plantlint.kernel import decision as zd
from plantlint.kernel.enclosures import tighter
from plantlint.kernel.taylor_forms import Form, FormField, UndefinedOver, box_forms, value_range
from plantlint.kernel.taylor_forms import determinant as form_determinant
from plantlint.kernel.taylor import ArbField, Undefined, evaluate

#: Boxes the full analysis's second try may examine; the light route uses no more (a proof
#: it finds within them is found by the full analysis too).
SECOND_TRY_BOXES = 256
#: Largest model (states) either caller tries it on.
MAX_STATES = 16


@dataclass(frozen=True)
class RegularityProof:
    """``proven``: every box was proven; ``margin``: a lower bound of |det A| over the box
    (when proven); ``boxes``: how many were examined; ``stopped``: why not proven
    ("boxes", "seconds", "stopped"), "" when proven."""

    proven: bool
    margin: float | None
    boxes: int
    stopped: str = ""


def prove_regular(towers: Any, box: Sequence[tuple[Fraction, Fraction]], orders: Sequence[int],
                  max_boxes: int = SECOND_TRY_BOXES, seconds: float | None = None,
                  stop: Callable[[], bool] | None = None) -> RegularityProof:
    """Is the model defined and the decoupling matrix (rows at ``orders``, r_i - 1)
    nonsingular on the whole ``box`` (one rational interval per variable of the towers:
    the states, then the ranged parameters)? Each box is tried by second-order forms through
    the rows' common factors where the rows allow it (:func:`_by_forms`), else or then by
    balls in mean-value form (:func:`_by_balls`); one that neither proves is split across
    the side the forms name, else the side the balls name. ``stop``, when given, is asked
    before each box: True ends the proof unfinished ("stopped": the answer is no longer
    needed, the full analysis beside it has given its own)."""
    field = ArbField(64)
    forms_field = FormField(64)
    rows = RowFactors.of(towers, orders)
    todo: list[tuple[list[tuple[Fraction, Fraction]], int]] = [(list(box), 0)]  # a box and its depth
    examined = 0
    margin = float("inf")
    until = None if seconds is None else time.perf_counter() + seconds
    while todo:
        if examined >= max_boxes:
            return RegularityProof(False, None, examined, "boxes")
        if until is not None and time.perf_counter() > until:
            return RegularityProof(False, None, examined, "seconds")
        if stop is not None and stop():
            return RegularityProof(False, None, examined, "stopped")
        here, depth = todo.pop()
        examined += 1
        bound, side = _by_forms(towers, rows, here, orders, forms_field)
        if bound is None:
            bound, balls_side = _by_balls(towers, here, orders, field, depth)
            side = balls_side if side is None else side
        if bound is not None:
            margin = min(margin, bound)
            continue
        side = depth % len(here) if side is None else side
        lo, hi = here[side]
        middle = (lo + hi) / 2
        todo.append(([*here[:side], (lo, middle), *here[side + 1:]], depth + 1))
        todo.append(([*here[:side], (middle, hi), *here[side + 1:]], depth + 1))
    return RegularityProof(True, margin, examined)


def _by_balls(towers: Any, here: list[tuple[Fraction, Fraction]], orders: Sequence[int], field: Any,
              depth: int) -> tuple[float | None, int | None]:
    """The box by balls in mean-value form: (a lower bound of |det A| when proven, else
    None; the side to split)."""
    balls = [ball(lo, hi) for lo, hi in here]
    try:
        _defined(towers, balls, field)
        matrix, spread = _mean_value_matrix(towers, here, balls, orders, field)
        det = determinant(matrix)
        if nonzero(det):
            return lower_bound(det), None
        return None, max(range(len(here)), key=lambda a: spread[a])
    except Undefined:
        # no gradient to go by: the first side whose midpoint makes the values defined
        # (the air gap under c I^2 / x^2), else the sides in turn (widths in different
        # units say nothing: an air gap of 1.5 cm next to a speed range of 2 m/s)
        side = _culprit(towers, here, balls, field)
        return None, depth % len(here) if side is None else side


def _by_forms(towers: Any, rows: "RowFactors | None", box: Sequence[tuple[Fraction, Fraction]],
              orders: Sequence[int], field: Any) -> tuple[float | None, int | None]:
    """The box by second-order forms (:mod:`plantlint.kernel.taylor_forms`), when the decoupling
    matrix's rows are g components (:class:`RowFactors`): (a lower bound of |det A| when
    proven, else None; the side that moves det A', or the undefined argument, the most)."""
    if rows is None:
        return None, None
    forms = box_forms(box)
    try:
        _defined(towers, forms, field)
        factors, det = rows.evaluate(forms, field)
    except UndefinedOver as why:
        return None, _largest_side(why.form, len(box))
    except Undefined:
        return None, None
    ranges = [value_range(v) for v in (*factors, det)]
    if all(nonzero(r) for r in ranges):
        bound = 1.0
        for r in ranges:
            bound *= lower_bound(r)
        return bound, None
    worst = min(range(len(ranges)), key=lambda k: lower_bound(ranges[k]))
    return None, _largest_side([*factors, det][worst], len(box))


@dataclass(frozen=True)
class RowFactors:
    """The decoupling matrix written through common factors of its rows, where each row is a
    g component: L_f^(r_i - 1) h_i is a state x_k (a position output whose rate is a
    velocity state: q, dq/dt = w), so A_ij = g_j[k], a node of the model's graph. A factor
    common to every entry of row i (a node the products share, like 1/det M in the rows of
    an inverted mass matrix) comes out: det A = prod(common factors) det A'. Over a box A is
    nonsingular when every common factor and det A' exclude 0; A' has no quotient by det M
    left, so its determinant is enclosed without the cancellation between the products of
    M^-1's entries. ``program`` computes the common factors, then A' row by row."""

    program: Any
    common: int
    size: int

    @staticmethod
    def of(towers: Any, orders: Sequence[int]) -> "RowFactors | None":
        graph = towers.graph
        if towers.m != towers.p or towers.m < 2:
            return None
        common_nodes: list[int] = []
        reduced: list[int] = []
        for i, order in enumerate(orders):
            node = towers.h_nodes[i]
            for _ in range(order):
                k = _state(graph, node, towers.n)
                if k is None:
                    return None
                node = towers.f_nodes[k]
            k = _state(graph, node, towers.n)
            if k is None:
                return None
            entries = [_factors(graph, towers.g_nodes[j][k]) for j in range(towers.m)]
            shared = Counter(entries[0])
            for e in entries[1:]:
                shared &= Counter(e)
            shared = Counter({f: c for f, c in shared.items() if not graph.is_const(f)})
            common_nodes.extend(shared.elements())
            reduced.extend(graph.mul(list((Counter(e) - shared).elements())) for e in entries)
        if not common_nodes:
            return None
        return RowFactors(graph.compile([*common_nodes, *reduced]), len(common_nodes), towers.m)

    def evaluate(self, forms: Sequence[Any], field: Any) -> tuple[list[Any], Any]:
        """The common factors and det A' over the box of ``forms``."""
        values = evaluate(self.program, forms, field)
        factors, rest = values[:self.common], values[self.common:]
        matrix = [rest[i * self.size:(i + 1) * self.size] for i in range(self.size)]
        return factors, form_determinant(matrix)


def _state(graph: Any, node: int, n: int) -> int | None:
    """The state a node is, or None."""
    op, _, data = graph.nodes[node]
    return data if op == "var" and data < n else None


def _factors(graph: Any, node: int) -> list[int]:
    """The factors of a product node, nested products flattened."""
    op, args, _ = graph.nodes[node]
    if op != "mul":
        return [node]
    return [f for a in args for f in _factors(graph, a)]


def _largest_side(form: Any, sides: int) -> int | None:
    """The side of the box whose terms move ``form`` the most (None: no side moves it)."""
    if not isinstance(form, Form):
        return None
    sizes = form.side_sizes(sides)
    best = max(range(sides), key=lambda a: sizes[a])
    return best if sizes[best] > 0 else None


def _defined(towers: Any, balls: Sequence[arb], field: Any) -> None:
    """f, the g columns and h finite over the balls, else :class:`Undefined`."""
    f, G, h = towers.values(None, field, start=balls)
    if not all(value_range(x).is_finite() for x in [*f, *(x for col in G for x in col), *h]):
        raise Undefined("a value that is not finite over the box")


def _culprit(towers: Any, box: Sequence[tuple[Fraction, Fraction]], balls: Sequence[arb], field: Any
             ) -> int | None:
    """A side that, held at its midpoint, makes the values defined over the rest of the box."""
    for side in sorted(range(len(box)), key=lambda a: box[a][0] - box[a][1]):  # widest first
        middle = (box[side][0] + box[side][1]) / 2
        try:
            _defined(towers, [*balls[:side], ball(middle, middle), *balls[side + 1:]], field)
        except Undefined:
            continue
        return side
    return None


def rational_ball(q: Fraction) -> arb:
    """The ball of one rational number (exact when it is a binary fraction at the precision)."""
    return arb(fmpq(q.numerator, q.denominator))


def ball(lo: Fraction, hi: Fraction) -> arb:
    """A ball that holds [lo, hi]."""
    return rational_ball(lo).union(rational_ball(hi))


def determinant(matrix: Sequence[Sequence[Any]]) -> Any:
    """det of exact rationals (fmpq) exactly, else of balls (an arb; not finite when an
    entry is not)."""
    if all(isinstance(x, fmpq) for row in matrix for x in row):
        return fmpq_mat([list(row) for row in matrix]).det()
    balls = [[x if isinstance(x, arb) else arb(x) for x in row] for row in matrix]
    if not all(x.is_finite() for row in balls for x in row):
        return arb("nan")
    return arb_mat(balls).det()


def lower_bound(det: Any) -> float:
    """A lower bound of |det| as a float (0 when it may be zero or is not finite; the
    largest float when |det| is beyond it, a value below 2^-1074 rounds to 0)."""
    if isinstance(det, fmpq):
        bound = abs(det)
    elif not det.is_finite() or det.contains(0):
        return 0.0
    else:
        bound = abs(det).lower()
    try:
        return min(float(bound), sys.float_info.max)
    except OverflowError:  # an exact rational beyond the floats
        return sys.float_info.max


def nonzero(det: Any) -> bool:
    """A determinant proven non-zero: exactly (fmpq), or by a finite ball that excludes 0."""
    return (zd.exactly(det == 0) if isinstance(det, fmpq) else zd.of_ball(det)).proven_nonzero


def nonsingular(matrix: Sequence[Sequence[Any]]) -> bool:
    """:func:`nonzero` of the matrix's determinant."""
    return nonzero(determinant(matrix))


def _mean_value_matrix(towers: Any, box: Sequence[tuple[Fraction, Fraction]], balls: Sequence[arb],
                       orders: Sequence[int], field: Any) -> tuple[list[list[Any]], list[float]]:
    """The decoupling matrix enclosed over ``box`` (held by ``balls``) in mean-value form,
    and per side of the box how far the gradients can move it across that side (the side
    to split). The ranged parameters are sides like the states: the gradient is taken
    along them too (they are constant along the flow)."""
    centre = [rational_ball((lo + hi) / 2) for lo, hi in box]
    top = max(orders)
    at_centre = towers.lglf(None, top, field, start=centre)
    gradients = towers.decoupling_gradients(balls, top, field, params=len(box) > towers.n)
    spread = [0.0] * len(box)
    matrix = []
    for i, d in enumerate(orders):
        row = []
        for j in range(len(gradients)):
            direct, grad = gradients[j][i][d]
            entry = at_centre[i][d][j]
            for a in range(len(box)):
                term = grad[a] * (balls[a] - centre[a])
                entry += term
                spread[a] = max(spread[a], float(abs(term).upper()) if term.is_finite() else float("inf"))
            # both enclose the entry over the box: the mean-value form wins on small boxes, the
            # direct one where a factor's sign settles it (c I / x^2 with I, x away from 0)
            row.append(tighter(entry, direct))
        matrix.append(row)
    return matrix, spread


__all__ = ["MAX_STATES", "SECOND_TRY_BOXES", "RegularityProof", "ball", "determinant", "lower_bound",
           "nonsingular", "nonzero", "prove_regular", "rational_ball"]
