"""Rigorous branch-and-bound over boxes: is an expression free of zeros on a box?

The question "is the decoupling matrix nonsingular on the whole operating
envelope?" becomes "does det A (or a row, or a denominator) keep away from zero
on a box of states and ranged parameters?". Ball arithmetic answers it soundly:

* the balls that cover a box give an enclosure of the expression's range (the
  natural interval extension); on small boxes it is intersected with the
  centred (mean-value) form f(c) + grad f(X) . (X - c), which is much tighter;
* an enclosure that excludes zero *proves* the box clean; otherwise the box is
  bisected along the dimension that is widest relative to its original width;
* a zero is *proved* by continuity (two points of certain opposite sign, joined
  by a segment on which the expression is finite) or by exact evaluation at a
  rational point; the witness is reported;
* when the budget (boxes, seconds) runs out, the open boxes are reported as
  undecided, never rounded to a verdict.

Enclosures and gradient enclosures come from one straight-line program run in
interval forward mode (:mod:`plantlint.kernel.forward`), whose integer powers and
elementary functions are tight over wide balls (the lower end of an even power is
exactly 0; sin and cos are period-aware); no symbolic derivative is formed.
"""

from __future__ import annotations

import math
from fractions import Fraction
import time
from collections import deque
from dataclasses import dataclass
from typing import Callable, Sequence

import sympy as sp
from flint import arb

from plantlint.core import deadline
from plantlint.kernel import decision as zd
from plantlint.kernel.balls import UnsupportedExpression, to_arb
from plantlint.kernel.enclosures import tighter
from plantlint.kernel.forward import ForwardProgram
from plantlint.kernel.precision import precision

Interval = tuple[float, float]
FloatBox = tuple[Interval, ...]
#: per coordinate (outer lower face, its exact ball, outer upper face, its exact ball)
Faces = list[tuple[float, arb, float, arb]]
Bound = object  # sympy number, int, float or fractions.Fraction

#: Precision (bits) of enclosures over boxes, and of evaluations at points.
BOX_PREC = 64
POINT_PREC = 128
#: Use the centred form once every used dimension is at most this share of its range.
CENTRED_BELOW = 0.25
#: Boxes narrower than this share of the original range in every used dimension are not split.
MIN_RELATIVE_WIDTH = 1e-10
#: Exact (symbolic) zero checks at rational points are capped: they cost a sympy evaluation each.
MAX_EXACT_CHECKS = 40


@dataclass(frozen=True)
class Budget:
    """How much work a certification may do before it says "undecided"."""

    max_boxes: int = 20000
    max_seconds: float = 5.0


@dataclass(frozen=True)
class EnvelopeVerdict:
    """Outcome of certifying a condition over a box.

    ``regular`` is True when proven on the whole box, False when a witness was
    proven, None when the budget ran out (see ``undecided``). ``margin`` is a
    certified lower bound of |value| (or of the value, for sign conditions)
    over the box, only when proven.
    """

    regular: bool | None
    margin: float | None
    witness: dict[str, float] | None
    undecided: list[dict[str, Interval]]
    boxes_examined: int
    undecided_count: int = 0
    #: every open box is too narrow to split at double precision (not a budget that ran out)
    too_narrow: bool = False
    witness_exact: bool = False  # the expression is exactly zero at the witness (else: bracketed)
    seconds: float = 0.0


# -- boxes ----------------------------------------------------------------------------
def _bound_ball(value: Bound) -> arb:
    if isinstance(value, Fraction):
        return arb(value.numerator) / value.denominator
    return to_arb(value)


def _float_below(x: arb) -> float:
    """A float certainly at or below every value in the ball (margins, box bounds)."""
    v = float(x.lower().mid())
    while not (arb(v) <= x.lower()):
        v = math.nextafter(v, -math.inf)
    return v


def _float_above(x: arb) -> float:
    v = float(x.upper().mid())
    while not (arb(v) >= x.upper()):
        v = math.nextafter(v, math.inf)
    return v


def outward_box(box: dict[sp.Symbol, tuple[Bound, Bound]]) -> dict[sp.Symbol, Interval]:
    """Float intervals that certainly contain the exact ranges (rounded outward)."""
    out: dict[sp.Symbol, Interval] = {}
    for s, (lo, hi) in box.items():
        a, b = _bound_ball(lo), _bound_ball(hi)
        out[s] = (_float_below(a), _float_above(b))
    return out


class _Inside:
    """The exact box, against which every witness is held: the float box the search
    splits is rounded outward, so its outer faces can lie just outside the declared
    ranges (a bound of 1/3, or a decimal just below pi/2), where a witness proves nothing.
    Points are clamped to the floats inside the exact ranges; rational points are tested
    exactly (balls for irrational bounds)."""

    def __init__(self, box: dict[sp.Symbol, tuple[Bound, Bound]], used: Sequence[sp.Symbol]):
        self.bounds = [(_exact(box[s][0]), _exact(box[s][1])) for s in used]
        self.symbolic = [(_symbolic(box[s][0]), _symbolic(box[s][1])) for s in used]
        self.inner = [(_float_at_least(lo), _float_at_most(hi)) for lo, hi in self.bounds]

    def clamp(self, point: Sequence[float]) -> tuple[float, ...] | None:
        """The nearest point with every coordinate inside its exact range (None when a
        range holds no float)."""
        if any(lo > hi for lo, hi in self.inner):
            return None
        return tuple(min(max(v, lo), hi) for v, (lo, hi) in zip(point, self.inner))

    def faces(self, root: FloatBox) -> Faces:
        """The outer faces of the float box with the exact bounds they stand for."""
        with precision(BOX_PREC):
            ball = [(_ball_of(lo), _ball_of(hi)) for lo, hi in self.bounds]
        return [(lo, a, hi, b) for (lo, hi), (a, b) in zip(root, ball)]

    def on_face(self, b: FloatBox, root: FloatBox) -> list[sp.Expr] | None:
        """For a tiny sub-box on outer faces of the float box: the point with the exact
        bound on each face it touches (pi/2, not the float next to it) and a simple
        rational inside the box elsewhere; None when it touches no face or a coordinate
        has no simple rational."""
        out: list[sp.Expr] = []
        touched = False
        for (lo, hi), (root_lo, root_hi), (exact_lo, exact_hi) in zip(b, root, self.symbolic):
            if lo == root_lo or hi == root_hi:
                out.append(exact_lo if lo == root_lo else exact_hi)
                touched = True
                continue
            simple = _simple_point([lo + (hi - lo) / 2], ((lo, hi),))
            if simple is None:
                return None
            out.append(simple[0])
        return out if touched else None

    def contains(self, point: Sequence[float | sp.Rational]) -> bool:
        return all(_at_least(v, lo) and _at_least(hi, v) for v, (lo, hi) in zip(point, self.bounds))


def _exact(value: Bound) -> Fraction | arb:
    """A bound as an exact rational when it is one, else a ball."""
    if isinstance(value, (Fraction, int)):
        return Fraction(value)
    if isinstance(value, sp.Basic) and value.is_Rational:
        return Fraction(int(value.p), int(value.q))
    return _bound_ball(value)


def _symbolic(value: Bound) -> sp.Expr:
    """A bound as an exact sympy number (a float is the dyadic rational it is)."""
    if isinstance(value, sp.Basic):
        return value
    if isinstance(value, Fraction):
        return sp.Rational(value.numerator, value.denominator)
    return sp.Rational(value) if isinstance(value, float) else sp.Integer(value)


def _ball_of(v: Fraction | arb) -> arb:
    return v if isinstance(v, arb) else _bound_ball(v)


def _as_exact(v: float | sp.Rational | Fraction | arb) -> Fraction | arb:
    if isinstance(v, (Fraction, arb)):
        return v
    if isinstance(v, float):
        return Fraction(v)
    return Fraction(int(v.p), int(v.q))


def _at_least(a: float | sp.Rational | Fraction | arb, b: float | sp.Rational | Fraction | arb) -> bool:
    """a >= b, certainly (exactly for rationals; by balls when one side is irrational)."""
    x, y = _as_exact(a), _as_exact(b)
    if isinstance(x, Fraction) and isinstance(y, Fraction):
        return x >= y
    return bool(_ball_of(x) >= _ball_of(y))


def _float_at_least(bound: Fraction | arb) -> float:
    """The smallest float certainly at or above ``bound``."""
    v = float(bound) if isinstance(bound, Fraction) else float(bound.mid())
    while not _at_least(v, bound):
        v = math.nextafter(v, math.inf)
    while _at_least(math.nextafter(v, -math.inf), bound):
        v = math.nextafter(v, -math.inf)
    return v


def _float_at_most(bound: Fraction | arb) -> float:
    """The largest float certainly at or below ``bound``."""
    v = float(bound) if isinstance(bound, Fraction) else float(bound.mid())
    while not _at_least(bound, v):
        v = math.nextafter(v, -math.inf)
    while _at_least(bound, math.nextafter(v, math.inf)):
        v = math.nextafter(v, math.inf)
    return v


def _cover(box: FloatBox, faces: Faces | None = None) -> list[arb]:
    """Balls covering a float box; with ``faces``, a side on an outer face of the search's
    box reaches the exact bound, not the float rounded outward from it (see :class:`_Inside`)."""
    with precision(BOX_PREC):
        if faces is None:
            return [arb(lo).union(arb(hi)) if lo != hi else arb(lo) for lo, hi in box]
        return [(exact_lo if lo == outer_lo else arb(lo)).union(exact_hi if hi == outer_hi else arb(hi))
                for (lo, hi), (outer_lo, exact_lo, outer_hi, exact_hi) in zip(box, faces)]


def _centre(box: FloatBox) -> tuple[float, ...]:
    return tuple(lo + (hi - lo) / 2 for lo, hi in box)


def _corners(box: FloatBox) -> list[tuple[float, ...]]:
    """Corners (up to 4 dimensions) or the end points of the axes through the centre."""
    c = _centre(box)
    if len(box) <= 4:
        pts: list[tuple[float, ...]] = [()]
        for lo, hi in box:
            pts = [p + (v,) for p in pts for v in (lo, hi)]
        return pts
    out = []
    for k, (lo, hi) in enumerate(box):
        for v in (lo, hi):
            out.append(c[:k] + (v,) + c[k + 1 :])
    return out


# -- evaluation over boxes and at points -----------------------------------------------
class _Evaluator:
    """Enclosures of a list of expressions over boxes, and balls at points.

    One straight-line program (:class:`plantlint.kernel.forward.ForwardProgram`)
    serves all three: values at a point, the natural enclosure over a box, and,
    for the centred form, the natural enclosure together with the gradient
    enclosure (interval forward mode: no symbolic derivative is formed).
    """

    def __init__(self, exprs: Sequence[sp.Expr], symbols: Sequence[sp.Symbol]):
        self.exprs = list(exprs)
        self.symbols = tuple(symbols)
        self.program = ForwardProgram(self.exprs, self.symbols)

    #: the outer faces of the search's box and the exact bounds they stand for (_cover)
    faces: Faces | None = None

    def natural(self, box: FloatBox) -> list[arb]:
        return self.program.values(_cover(box, self.faces), BOX_PREC)

    def enclose(self, box: FloatBox, centred: bool) -> list[arb]:
        cover = _cover(box, self.faces)
        if not centred or not self.symbols:
            return self.program.values(cover, BOX_PREC)
        c = _centre(box)
        at_c = self.program.values([arb(v) for v in c], BOX_PREC)
        duals = self.program.with_gradients(cover, BOX_PREC)
        with precision(BOX_PREC):
            offsets = [x - arb(v) for x, v in zip(cover, c)]
            out = []
            for (nat, grad), mv in zip(duals, at_c):
                for g, off in zip(grad, offsets):
                    mv = mv + g * off
                out.append(tighter(nat, mv))
            return out

    def at(self, point: Sequence[float]) -> list[arb]:
        return self.program.values([arb(v) for v in point], POINT_PREC)

    def exactly_zero(self, point: Sequence[float | sp.Rational], indices: Sequence[int]) -> bool:
        """Exact symbolic check at a rational point (floats are exact dyadic rationals)."""
        subs = {s: sp.Rational(v) if isinstance(v, float) else v for s, v in zip(self.symbols, point)}
        return all(self.exprs[i].xreplace(subs) == 0 for i in indices)

    def snapped_zero(self, box: FloatBox, indices: Sequence[int]) -> tuple[float, ...] | None:
        """Try the simple rational nearest the centre of a tiny box: singular sets
        often pass through points like (1/3, 0) that bisection never hits exactly."""
        point = _simple_point([lo + (hi - lo) / 2 for lo, hi in box], box)
        if point is not None and self.exactly_zero(point, indices):
            return tuple(float(v) for v in point)
        return None


def _certain_sign(x: arb) -> int:
    if not x.is_finite():
        return 0
    if x > 0:
        return 1
    if x < 0:
        return -1
    return 0


# -- the search -------------------------------------------------------------------------
#: One box's step of the search: ("proven", margin) | ("violated", (point, exact)) | ("split", None).
#: A verdict on a condition over a box (for ``certify_sign`` a violation is a negative
#: value, not a zero), so not a :class:`~plantlint.kernel.decision.ZeroDecision`; the
#: zero tests inside it (an enclosure without 0) are.
BoxStep = tuple[str, object]


class _Search:
    """Breadth-first bisection of the used dimensions of a box."""

    def __init__(self, box: dict[sp.Symbol, Interval], used: Sequence[sp.Symbol], budget: Budget):
        self.all_symbols = tuple(box)
        self.full = box
        self.used = tuple(used)
        self.root: FloatBox = tuple(box[s] for s in self.used)
        self.widths = [max(hi - lo, 1e-300) for lo, hi in self.root]
        self.budget = budget
        self.exact_checks = 0

    def relative_widths(self, box: FloatBox) -> list[float]:
        return [(hi - lo) / w for (lo, hi), w in zip(box, self.widths)]

    def run(self, decide: Callable[[FloatBox, bool], BoxStep]) -> EnvelopeVerdict:
        start = time.perf_counter()
        queue: deque[FloatBox] = deque([self.root])
        stuck: list[FloatBox] = []
        margin = math.inf
        examined = 0
        while queue:
            if examined >= self.budget.max_boxes:
                break  # a size bound: the same stop on every machine
            if time.perf_counter() - start > self.budget.max_seconds:
                deadline.ran_out()  # a time bound: the result depends on the machine
                break
            box = queue.popleft()
            examined += 1
            rel = self.relative_widths(box)
            kind, data = decide(box, bool(rel) and max(rel) <= CENTRED_BELOW)
            if kind == "proven":
                margin = min(margin, float(data))  # type: ignore[arg-type]
                continue
            if kind == "violated":
                point, exact = data  # type: ignore[misc]
                return EnvelopeVerdict(
                    False, None, self.named_point(point), [], examined,
                    witness_exact=exact, seconds=time.perf_counter() - start,
                )
            if not rel or max(rel) < MIN_RELATIVE_WIDTH:
                stuck.append(box)
                continue
            k = max(range(len(rel)), key=rel.__getitem__)
            lo, hi = box[k]
            mid = lo + (hi - lo) / 2
            queue.append(box[:k] + ((lo, mid),) + box[k + 1 :])
            queue.append(box[:k] + ((mid, hi),) + box[k + 1 :])
        seconds = time.perf_counter() - start
        open_boxes = stuck + list(queue)
        if open_boxes:
            return EnvelopeVerdict(
                None, None, None, [self.named_box(b) for b in open_boxes[:3]], examined,
                undecided_count=len(open_boxes), seconds=seconds, too_narrow=not queue,
            )
        return EnvelopeVerdict(True, margin, None, [], examined, seconds=seconds)

    def named_point(self, point: Sequence[float]) -> dict[str, float]:
        values = dict(zip(self.used, point))
        return {
            str(s): float(values[s]) if s in values else (self.full[s][0] + self.full[s][1]) / 2
            for s in self.all_symbols
        }

    def named_box(self, box: FloatBox) -> dict[str, Interval]:
        values = dict(zip(self.used, box))
        return {str(s): values.get(s, self.full[s]) for s in self.all_symbols}


def _used_symbols(exprs: Sequence[sp.Expr], box: dict[sp.Symbol, Interval]) -> list[sp.Symbol]:
    free = set().union(*(e.free_symbols for e in exprs)) if exprs else set()
    missing = free - set(box)
    if missing:
        raise UnsupportedExpression(f"no range for {sorted(map(str, missing))}")
    return [s for s in box if s in free]


def certify_nonzero(
    exprs: Sequence[sp.Expr] | sp.Expr,
    box: dict[sp.Symbol, tuple[Bound, Bound]],
    budget: Budget = Budget(),
) -> EnvelopeVerdict:
    """Prove that at every point of ``box`` at least one of ``exprs`` is non-zero.

    One expression: "never zero" (det A, a denominator). Several: a row of the
    decoupling matrix or the p x p minors of a wide one ("never all zero at
    once"). A witness is proved by continuity for a single expression (sign
    change on a segment where the expression is finite), and by exact
    evaluation at a rational point otherwise.
    """
    exprs = [exprs] if isinstance(exprs, sp.Basic) else list(exprs)
    fbox = outward_box(box)
    used = _used_symbols(exprs, fbox)
    ev = _Evaluator(exprs, used)
    search = _Search(fbox, used, budget)
    inside = _Inside(box, used)
    ev.faces = inside.faces(search.root)
    single = len(exprs) == 1 and not exprs[0].has(sp.atan2)

    def decide(b: FloatBox, centred: bool) -> BoxStep:
        enclosures = ev.enclose(b, centred)
        clean = [_float_below(x.abs_lower()) for x in enclosures if zd.of_ball(x).proven_nonzero]
        if clean:
            return "proven", max(clean)
        points = _witness_candidates(b, inside)
        values = [ev.at(p) for p in points]
        for p, vals in zip(points, values):
            if all(v.is_finite() and v.contains(0) for v in vals) and search.exact_checks < MAX_EXACT_CHECKS:
                search.exact_checks += 1
                if ev.exactly_zero(p, range(len(exprs))):
                    return "violated", (_plainer(ev, p, range(len(exprs)), inside, search), True)
        if max(search.relative_widths(b), default=0.0) < 1e-6 and search.exact_checks < MAX_EXACT_CHECKS:
            search.exact_checks += 1
            exact, face = _exact_zero_in(ev, b, range(len(exprs)), inside, search.root)
            if exact is not None:
                return "violated", (_plainer(ev, exact, range(len(exprs)), inside, search), True)
            if face is not None and single and _sign_change_to_face(ev, b, face, inside):
                # the value at the exact bound has the other sign than inside: the zero lies
                # between them, in the box (a bound just past pi/2, with no float beyond pi/2)
                return "violated", (tuple(float(v) for v in face), False)
        if single:
            signs = [_certain_sign(vals[0]) for vals in values]
            if 1 in signs and -1 in signs:
                a, c = points[signs.index(1)], points[signs.index(-1)]
                found = _bracket_zero(ev, a, c)
                if found is not None:
                    snapped = _simple_point(found)
                    if snapped is not None and inside.contains(snapped) and search.exact_checks < MAX_EXACT_CHECKS:
                        # q2 = -1.6e-38 next to a zero that is exactly at q2 = 0: say the exact one
                        search.exact_checks += 1
                        if ev.exactly_zero(snapped, [0]):
                            return "violated", (_plainer(ev, tuple(float(v) for v in snapped), [0], inside, search), True)
                    return "violated", (found, False)
        return "split", None

    return search.run(decide)


def certify_sign(
    expr: sp.Expr,
    box: dict[sp.Symbol, tuple[Bound, Bound]],
    strict: bool,
    budget: Budget = Budget(),
) -> EnvelopeVerdict:
    """Prove ``expr > 0`` (strict) or ``expr >= 0`` on the box (domains of log, sqrt, asin).

    A witness is a point where the value is certainly negative, or (strict)
    exactly zero.
    """
    fbox = outward_box(box)
    used = _used_symbols([expr], fbox)
    ev = _Evaluator([expr], used)
    search = _Search(fbox, used, budget)
    inside = _Inside(box, used)
    ev.faces = inside.faces(search.root)

    def decide(b: FloatBox, centred: bool) -> BoxStep:
        x = ev.enclose(b, centred)[0]
        if x.is_finite() and (x > 0 if strict else x >= 0):
            return "proven", _float_below(x)
        for p in _witness_candidates(b, inside):
            v = ev.at(p)[0]
            if v.is_finite() and v < 0:
                return "violated", (p, False)
            if strict and v.is_finite() and v.contains(0) and search.exact_checks < MAX_EXACT_CHECKS:
                search.exact_checks += 1
                if ev.exactly_zero(p, [0]):
                    return "violated", (p, True)
        if strict and max(search.relative_widths(b), default=0.0) < 1e-6 and search.exact_checks < MAX_EXACT_CHECKS:
            search.exact_checks += 1
            exact, _ = _exact_zero_in(ev, b, [0], inside, search.root)
            if exact is not None:
                return "violated", (exact, True)
        return "split", None

    return search.run(decide)


def _exact_zero_in(ev: _Evaluator, b: FloatBox, indices: Sequence[int], inside: _Inside, root: FloatBox
                   ) -> tuple[tuple[float, ...] | None, list[sp.Expr] | None]:
    """A tiny sub-box's exact zero of the expressions (``indices``), if there is one in the
    declared box: at the simple rational nearest its centre, or at the exact bounds of the
    outer faces it touches (pi/2, not the float beside it). Also returns that face point
    (None when the sub-box touches no face) for a sign test."""
    snapped = ev.snapped_zero(b, indices)
    if snapped is not None and inside.contains(snapped):
        return snapped, None
    face = inside.on_face(b, root)
    if face is not None and ev.exactly_zero(face, indices):
        return tuple(float(v) for v in face), face
    return None, face


def _sign_change_to_face(ev: _Evaluator, b: FloatBox, face: Sequence[sp.Expr], inside: _Inside) -> bool:
    """Certain opposite signs at the exact face point and at the sub-box's centre (moved
    into the box), with the expression finite on the whole sub-box: a zero between them."""
    centre = inside.clamp(_centre(b))
    if centre is None:
        return False
    with precision(POINT_PREC):
        try:
            at_face = ev.program.values([to_arb(v) for v in face], POINT_PREC)[0]
        except (UnsupportedExpression, ValueError, ZeroDivisionError):
            return False
    at_centre = ev.at(centre)[0]
    if not (at_face.is_finite() and at_centre.is_finite()):
        return False
    signs = {_certain_sign(at_face), _certain_sign(at_centre)}
    return signs == {1, -1} and ev.natural(b)[0].is_finite()


def _witness_candidates(b: FloatBox, inside: _Inside) -> list[tuple[float, ...]]:
    """The centre and corners of a sub-box, each moved into the exact box (distinct)."""
    out: list[tuple[float, ...]] = []
    for p in [_centre(b)] + _corners(b):
        q = inside.clamp(p)
        if q is not None and q not in out:
            out.append(q)
    return out


def _simple_point(point: Sequence[float], box: FloatBox | None = None) -> list[sp.Rational] | None:
    """The simple rationals (denominator up to 10^4) nearest each coordinate: inside ``box``
    when one is given, else within 1e-9 (relative); None when a coordinate has none."""
    from fractions import Fraction

    out = []
    for i, x in enumerate(point):
        q = Fraction(x).limit_denominator(10**4)
        near = box[i][0] <= q <= box[i][1] if box is not None else abs(float(q) - x) <= 1e-9 * max(1.0, abs(x))
        if not near:
            return None
        out.append(sp.Rational(q.numerator, q.denominator))
    return out


#: The longest straight-line program (instructions) whose exact witness is made plainer.
PLAIN_WITNESS_SIZE = 500


def _plainer(ev: _Evaluator, point: Sequence[float], indices: Sequence[int], inside: _Inside,
             search: _Search) -> tuple[float, ...]:
    """An exact witness with its coordinates as plain as the zero allows, for the reader: each
    in turn set to 0, to the nearest integer or to one decimal, kept where the expressions
    are still exactly zero and the point inside the box. A two-link arm's det A vanishes
    at the stretched elbow, q2 = 0, for every q1: bisection finds q1 = -1.16667, and
    q1 = 0 says the same more plainly. Display only: the witness stays an exact zero. Not
    for long expressions (more than :data:`PLAIN_WITNESS_SIZE` instructions), whose exact
    checks cost more than the plainer text is worth."""
    plain = list(point)
    if len(ev.program) > PLAIN_WITNESS_SIZE:
        return tuple(plain)
    for k, x in enumerate(point):
        for v in (0.0, float(round(x)), round(x, 1)):
            if v == plain[k]:
                break
            trial = plain[:k] + [v] + plain[k + 1:]
            if search.exact_checks >= MAX_EXACT_CHECKS:
                return tuple(plain)
            if not inside.contains(trial):
                continue
            search.exact_checks += 1
            if ev.exactly_zero(trial, indices):
                plain = trial
                break
    return tuple(plain)


def _bracket_zero(ev: _Evaluator, positive: tuple[float, ...], negative: tuple[float, ...]) -> tuple[float, ...] | None:
    """Bisect the segment between points of certain opposite sign down to a tiny
    segment on which the expression is finite: by continuity it has a zero there."""
    a, b = positive, negative
    for _ in range(200):
        m = tuple(x + (y - x) / 2 for x, y in zip(a, b))
        if m == a or m == b:
            break
        v = ev.at(m)[0]
        if not v.is_finite():
            return None  # the expression is undefined there: a pole, not a zero
        s = _certain_sign(v)
        if s == 0:
            break  # the ball already touches zero: [a, b] brackets it
        if s > 0:
            a = m
        else:
            b = m
    hull = tuple((min(x, y), max(x, y)) for x, y in zip(a, b))
    enclosure = ev.natural(hull)[0]
    if not enclosure.is_finite():
        return None
    return tuple(x + (y - x) / 2 for x, y in zip(a, b))
