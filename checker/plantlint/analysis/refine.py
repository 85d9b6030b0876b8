"""A declared point that misses an equilibrium: by how much, and where the equilibrium is.

Engineers write operating points with rounded numbers (``i = 0.7004`` where the
equilibrium needs 0.700357...). This module measures the miss relative to the
model's own scale and finds the equilibrium nearby:

* **relative residual**: each rate F_i(x0, u0) divided by the size of its terms
  at the point (the largest |term| of f_i and of each g_ij u_j), the inputs left
  out of the point at their least-squares values; the largest ratio counts. It is
  dimensionless: 1e-4 means the rate is ten thousand times smaller than the
  forces that make it up, the mark of a rounded value. A term written as a
  product or quotient of sums counts the terms it has when multiplied out, its
  denominators kept as values (:func:`_size_tree`): a robot's inverse mass matrix,
  ``(a22*r1 - a12*r2)/dM``, has the terms ``a22*r1/dM`` and ``a12*r2/dM``, so a
  rate written as one quotient is not a miss of 100 % until it is exactly zero. A
  rate whose only non-zero terms are inputs left out of the point (fitted to the
  miss) has no scale of its own and is measured against the model's largest term
  instead.
* **refined point**: Newton's method (least squares, 200-bit balls through
  :class:`~plantlint.kernel.balls.Program`, never a float comparison for a
  decision) with one written value free at a time, plus the inputs left out. A
  change within a unit in the last written place wins (0.0643 may move by 0.0001;
  an integer, 1/3 or pi/2 reads as chosen), values written with more digits first
  (0.0974146 was computed and rounded, 0.1 was chosen); then the smallest relative
  change. When no single value will
  do, one state with the written inputs, then two written values (of at most
  twelve), then every written value by the smallest scaled step (minimum norm).

Nothing here decides that a point *is* an equilibrium: the caller checks exact
candidates exactly and reports refined ones as what they are.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

import mpmath
import sympy as sp
from flint import arb

from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.plant import Plant
from plantlint.kernel.precision import precision
from plantlint.language.printer import decimal_places

PREC = 200  # bits for every evaluation (about 60 digits)
DIGITS = 50  # mpmath working digits
CONVERGED = mpmath.mpf("1e-40")  # relative residual taken as converged (far below any rounding)
#: What a refined point's residuals may be, relative to the size of their rates, where it is
#: used as an equilibrium (its zero dynamics, its equilibrium over a parameter box): far
#: above what the refinement leaves (CONVERGED), far below any rounding in a model.
REFINED_RESIDUAL = 1e-25
MAX_STEPS = 40
#: Pairs of written values are tried when at most this many values are written (66 pairs).
MAX_PAIRED = 12
FAR = 1.0  # a refined value may differ from the written one by at most its own size (or range)
#: A Gauss-Newton step this small (scaled) without convergence: stalled at a least-squares
#: minimum that is not a zero (a converging step is the size of the residual, above 1e-40).
STALLED = mpmath.mpf("1e-45")


@dataclass(frozen=True)
class NearMiss:
    """How far a declared point is from an equilibrium, and the equilibrium near it."""

    relative: float  # largest |rate| / size of its terms (inputs left out at their best values)
    rates: tuple[tuple[sp.Symbol, float, float], ...]  # (state, rate, size of its terms), rates not zero
    changed: tuple[tuple[sp.Symbol, sp.Expr, sp.Expr], ...]  # (name, written, refined) written values moved
    values: dict[sp.Symbol, sp.Expr] | None  # the refined point (states and every input); None: not found
    candidates: tuple[tuple[sp.Symbol, sp.Expr], ...] = ()  # short exact values worth an exact check

    @property
    def found(self) -> bool:
        return self.values is not None


class _System:
    """F(x, u) = f + g u at the nominal parameters, its terms and its Jacobian, as one program."""

    def __init__(self, plant: Plant):
        self.plant = plant
        self.symbols = (*plant.states, *plant.inputs)
        n = plant.n
        rates = []
        leaves: list[sp.Expr] = []
        #: per rate, the size tree of each part (f_i, then each g_ij u_j) and its input
        #: (None for f_i): fitted inputs' parts carry the miss, not the rate's own size
        self.parts: list[list[tuple[tuple, sp.Symbol | None]]] = []
        #: inputs whose values are fitted (left out of the point): their terms carry the miss
        self.fitted: frozenset[sp.Symbol] = frozenset()
        for i in range(n):
            f_i = plant.nominal(plant.f[i])
            parts: list[tuple[tuple, sp.Symbol | None]] = []
            if f_i != 0:
                parts.append((_size_tree(f_i, leaves), None))
            rate = f_i
            for j, u in enumerate(plant.inputs):
                g_ij = plant.nominal(plant.g[j][i])
                if g_ij != 0:
                    parts.append((("prod", (_size_tree(g_ij, leaves), _size_tree(u, leaves))), u))
                    rate = rate + g_ij * u
            rates.append(rate)
            self.parts.append(parts)
        self.n = n
        self.leaves = len(leaves)
        jac = [sp.diff(r, v) for r in rates for v in self.symbols]
        self.program = Program(rates + leaves + jac, self.symbols)

    def run(self, point: dict[sp.Symbol, mpmath.mpf]) -> tuple[list, list, list[list]] | None:
        """(rates, size of each rate's terms, Jacobian rows) at a point, or None when undefined."""
        with precision(PREC):  # the decimal inputs are read at full precision too
            try:
                inputs = [arb(mpmath.nstr(point[s], DIGITS + 10, min_fixed=-mpmath.inf, max_fixed=mpmath.inf))
                          for s in self.symbols]
                values = self.program.run(inputs, PREC)
            except (UnsupportedExpression, ValueError, ZeroDivisionError):
                return None
        if not all(b.is_finite() for b in values):
            return None
        mids = [_mid(b) for b in values]
        n, k = self.n, len(self.symbols)
        rates = mids[:n]
        leaves = mids[n:n + self.leaves]
        sizes = []
        for parts in self.parts:
            measured = [(_size(tree, leaves), u) for tree, u in parts]
            size = max((v for v, _ in measured), default=mpmath.mpf(0))
            own = max((v for v, u in measured if u not in self.fitted), default=mpmath.mpf(0))
            # a rate whose only non-zero terms are fitted inputs (x2' = -x2 + u2 at x2 = 0, u2
            # left out) is made of the miss itself: it has no size of its own (None)
            sizes.append(size if own != 0 or size == 0 else None)
        at = n + self.leaves
        jac = [mids[at + i * k: at + (i + 1) * k] for i in range(n)]
        return rates, sizes, jac


def _size_tree(expr: sp.Expr, leaves: list[sp.Expr]) -> tuple:
    """How to measure the size of ``expr``'s terms: the largest |term| it has when its
    products and positive integer powers of sums are multiplied out, every other
    sub-expression (a denominator, a function, a fractional power) kept as a value. The
    largest term of a product of sums is the product of each sum's largest term, so no
    expansion is formed: the tree is as large as the expression. Leaves are appended to
    ``leaves`` (evaluated with the rates); nodes are ("max" | "prod", children),
    ("pow", (child,), k) and ("leaf", index)."""
    if expr.is_Add:
        return ("max", tuple(_size_tree(a, leaves) for a in expr.args))
    if expr.is_Mul:
        return ("prod", tuple(_size_tree(a, leaves) for a in expr.args))
    if expr.is_Pow and expr.exp.is_Integer and expr.exp > 1 and (expr.base.is_Add or expr.base.is_Mul):
        return ("pow", (_size_tree(expr.base, leaves),), int(expr.exp))
    leaves.append(expr)
    return ("leaf", len(leaves) - 1)


def _size(tree: tuple, leaves: Sequence[mpmath.mpf]) -> mpmath.mpf:
    """The size a :func:`_size_tree` describes, from the values of its leaves."""
    kind = tree[0]
    if kind == "leaf":
        return abs(leaves[tree[1]])
    sizes = [_size(child, leaves) for child in tree[1]]
    if kind == "max":
        return max(sizes)
    if kind == "pow":
        return sizes[0] ** tree[2]
    product = mpmath.mpf(1)
    for size in sizes:
        product *= size
    return product


def _mid(ball: arb) -> mpmath.mpf:
    """A ball's midpoint as an mpmath number (from its binary mantissa and exponent, not
    through decimal text: the text took most of the time of a Newton step)."""
    man, exp = ball.mid().man_exp()
    return mpmath.ldexp(mpmath.mpf(int(man)), int(exp))


def _relative(rates: Sequence, sizes: Sequence) -> mpmath.mpf:
    """The largest |rate| / size of its terms. A rate whose only non-zero terms are inputs
    fitted to the miss (size None: x2' = -x2 + u2 at x2 = 0 with u2 left out of the point)
    has no scale of its own and is measured against the largest term of the model; a
    written input is a term like any other (u2 = 0.5 written there is a miss of 100 %)."""
    scale = max((s for s in sizes if s is not None), default=mpmath.mpf(0))
    worst = mpmath.mpf(0)
    for r, s in zip(rates, sizes):
        if r != 0:
            own = s if s is not None else scale
            worst = max(worst, abs(r) / own if own != 0 else mpmath.inf)
    return worst


def _promising(A: list[list], step: list, rates: list) -> bool:
    """Whether the first step's linear model removes nine tenths of the residual (by its
    norm). When it does not, the free values cannot cancel the rates to first order (two
    values that no rate in the miss depends on): Newton is not started, which would take
    its forty steps to stall."""
    left = [sum(a * d for a, d in zip(row, step)) + r for row, r in zip(A, rates)]
    return mpmath.norm(mpmath.matrix(left)) <= mpmath.norm(mpmath.matrix(rates)) / 10


def _at_least(sizes: Sequence, floor: Sequence) -> list:
    """Each rate's size, or its size at the written point where that is larger. At an
    equilibrium where every term vanishes (a crane's swing angle and the force that holds
    it, both 0), the residual and the terms shrink together as Newton approaches it, and
    their ratio never does: the written point's forces are the scale there."""
    out = []
    for s, f in zip(sizes, floor):
        if s is None:
            out.append(f if f else None)
        else:
            out.append(max(s, f) if f is not None else s)
    return out


#: Columns whose norms differ by more than this factor are equilibrated before solving.
BADLY_SCALED = mpmath.mpf(10) ** 20


def _least_squares(A: list[list], b: list) -> list | None:
    """The minimum-norm x minimising |A x - b| (pseudo-inverse by the SVD: any shape or rank).

    Columns whose norms differ by more than BADLY_SCALED (a rate of 1e400 u next to one of
    v, with u scaled by its range) are divided by their norms first and the solution scaled
    back: unscaled, the LU calls the product singular and the SVD drops the small column's
    singular value as rounding, so the step never moves that value (minimum norm is then
    taken in the equilibrated variables)."""
    rows, cols = len(A), len(A[0]) if A else 0
    if cols == 0 or rows == 0:
        return [mpmath.mpf(0)] * cols
    norms = [mpmath.sqrt(sum(row[j] ** 2 for row in A)) for j in range(cols)]
    present = [c for c in norms if c != 0]
    if present and max(present) > BADLY_SCALED * min(present):
        scaled = _solve([[a / c if c != 0 else a for a, c in zip(row, norms)] for row in A], b, rows, cols)
        return None if scaled is None else [y / c if c != 0 else y for y, c in zip(scaled, norms)]
    return _solve(A, b, rows, cols)


def _solve(A: list[list], b: list, rows: int, cols: int) -> list | None:
    fast = _full_rank_least_squares(A, b)
    if fast is not None:
        return fast
    try:
        U, S, V = mpmath.svd_r(mpmath.matrix(A))
    except (ZeroDivisionError, ValueError):
        return None
    top = max((abs(S[i]) for i in range(len(S))), default=mpmath.mpf(0))
    x = [mpmath.mpf(0)] * cols
    for k in range(len(S)):
        if top == 0 or abs(S[k]) <= top * mpmath.mpf(10) ** (-DIGITS + 5):
            continue
        coefficient = sum(U[i, k] * b[i] for i in range(rows)) / S[k]
        for j in range(cols):
            x[j] += coefficient * V[k, j]
    return x


def _full_rank_least_squares(A: list[list], b: list) -> list | None:
    """The same x for an A of full rank, by LU on the normal equations. Wide or square (full
    row rank): A A^T y = b, x = A^T y, the minimum-norm solution of A x = b. Tall (full
    column rank: more rates than free values, the pairs of written values): A^T A x = A^T b,
    the unique least-squares solution. An SVD of 20 x 21 entries at 50 digits takes most of
    a second in mpmath, of 8 x 4 a hundredth, this a few thousandths. None when the LU finds
    the product singular, or when x does not satisfy its equations to 30 digits (a badly
    scaled A squares its condition number): the SVD decides then."""
    M = mpmath.matrix(A)
    B = mpmath.matrix(b)
    tall = M.rows > M.cols
    try:
        x = mpmath.lu_solve(M.T * M, M.T * B) if tall else M.T * mpmath.lu_solve(M * M.T, B)
    except (ZeroDivisionError, ValueError):
        return None
    # tall: the normal equations' residual A^T (A x - b), against the size of A^T b
    left, right = (M.T * (M * x - B), M.T * B) if tall else (M * x - B, B)
    if mpmath.norm(left) > mpmath.mpf("1e-30") * (mpmath.norm(right) + mpmath.mpf("1e-300")):
        return None
    return [x[j] for j in range(M.cols)]


def _newton(system: _System, start: dict[sp.Symbol, mpmath.mpf], free: list[sp.Symbol],
            scales: dict[sp.Symbol, mpmath.mpf]) -> dict[sp.Symbol, mpmath.mpf] | None:
    """Gauss-Newton on the ``free`` variables (scaled) until the relative residual vanishes."""
    point = dict(start)
    index = {s: i for i, s in enumerate(system.symbols)}
    written: list = []  # the sizes of the rates' terms at the start
    for count in range(MAX_STEPS):
        out = system.run(point)
        if out is None:
            return None
        rates, sizes, jac = out
        if count == 0:
            written = sizes
        if _relative(rates, _at_least(sizes, written)) < CONVERGED:
            return point
        A = [[row[index[v]] * scales[v] for v in free] for row in jac]
        step = _least_squares(A, [-r for r in rates])
        if step is None:
            return None
        if count == 0 and not _promising(A, step, rates):
            return None
        if all(abs(d) <= STALLED for d in step):
            return None  # a least-squares minimum that is not a zero: no later step moves it
        for v, d in zip(free, step):
            point[v] = point[v] + d * scales[v]
    return None


def _decimal(written: sp.Expr) -> tuple[int, int] | None:
    """(places after the point, significant digits) of a value written as a decimal with
    digits after the point (0.0643: 4 places, 3 digits), read off its exact rational
    (:func:`~plantlint.language.printer.decimal_places`); None for a value
    that reads as chosen, not rounded: an integer (0 for a rest position), a fraction that
    is no decimal (1/3), an irrational constant (pi/2). Trailing zeros are not seen (0.50
    reads as 0.5)."""
    if not (isinstance(written, sp.Rational) and not written.is_Integer):
        return None
    places = decimal_places(written)
    if places is None:
        return None
    digits = abs(int(written.p)) * 10**places // int(written.q)
    return places, len(str(digits))


def _rounding(given: dict[sp.Symbol, sp.Expr], start: dict[sp.Symbol, mpmath.mpf], found: dict[sp.Symbol, mpmath.mpf],
              scales: dict[sp.Symbol, mpmath.mpf], free: Sequence[sp.Symbol]) -> int | None:
    """Is the miss explained as rounding: does every value this candidate moves stay within
    a unit in its last written place (two half units: a value cut off rather than rounded)?
    The fewest significant digits among them if so (a value written with many digits was
    computed and rounded; one written 0.1 was chosen), else None."""
    fewest = None
    for z in free:
        change = abs(found[z] - start[z])
        if change <= mpmath.mpf("1e-30") * scales[z]:
            continue  # not moved
        decimal = _decimal(given[z])
        if decimal is None or change > mpmath.mpf(10) ** -decimal[0]:
            return None
        fewest = decimal[1] if fewest is None else min(fewest, decimal[1])
    return fewest


def _scale(plant: Plant, s: sp.Symbol, value: mpmath.mpf) -> mpmath.mpf:
    if value != 0:
        return abs(value)
    box = {**plant.state_box, **plant.input_box}.get(s)
    if box is not None:
        lo, hi = (plant.nominal(b) for b in box)
        width = mpmath.mpf(str(sp.N(hi - lo, DIGITS)))
        if width > 0:
            return width
    return mpmath.mpf(1)


def _exact(value: sp.Expr) -> mpmath.mpf:
    return mpmath.mpf(str(sp.N(value, DIGITS + 10)))


def _rational(value: mpmath.mpf) -> sp.Rational:
    """A refined value as an exact rational of 40 significant digits (no text is parsed as code)."""
    f = Fraction(mpmath.nstr(value, 40, min_fixed=-mpmath.inf, max_fixed=mpmath.inf))
    return sp.Rational(f.numerator, f.denominator)


def _short(value: mpmath.mpf) -> sp.Rational | None:
    """A short rational (denominator <= 10^6) within 1e-35 of a refined value, worth an exact check."""
    f = Fraction(mpmath.nstr(value, 45, min_fixed=-mpmath.inf, max_fixed=mpmath.inf)).limit_denominator(10**6)
    if abs(mpmath.mpf(f.numerator) / f.denominator - value) <= mpmath.mpf("1e-35") * max(1, abs(value)):
        return sp.Rational(f.numerator, f.denominator)
    return None


def relative_at(plant: Plant, given: dict[sp.Symbol, sp.Expr], unknown: Sequence[sp.Symbol]) -> float | None:
    """The relative residual at a point, measured as :func:`near_miss` measures it (the
    inputs left out at their best values); None when the rates cannot be evaluated there."""
    with mpmath.workdps(DIGITS):
        measured = _measured(plant, given, unknown)
        return None if measured is None else float(_relative(*measured[2][:2]))


#: The plant measured last and its compiled system: the check of a rounded refined value
#: (:func:`relative_at`) follows the search (:func:`near_miss`) on the same plant, and
#: compiling the rates, terms and Jacobian again cost as much as a few Newton steps.
_LAST: list[tuple[Plant, _System]] = []


def _system(plant: Plant) -> _System:
    if not (_LAST and _LAST[0][0] is plant):
        _LAST[:] = [(plant, _System(plant))]
    return _LAST[0][1]


def _measured(plant: Plant, given: dict[sp.Symbol, sp.Expr], unknown: Sequence[sp.Symbol]
              ) -> tuple[_System, dict[sp.Symbol, mpmath.mpf], tuple[list, list, list[list]]] | None:
    """The system, the point (the inputs left out at their least-squares values: the rates
    are affine in them) and (rates, sizes, Jacobian) there; None when undefined."""
    try:
        system = _system(plant)
    except UnsupportedExpression:
        return None
    system.fitted = frozenset(unknown)
    start = {s: _exact(v) for s, v in given.items()}
    start.update({u: mpmath.mpf(0) for u in unknown})
    out = system.run(start)
    if out is None:
        return None
    if unknown:
        index = {s: i for i, s in enumerate(system.symbols)}
        best = _least_squares([[row[index[u]] for u in unknown] for row in out[2]], [-r for r in out[0]])
        if best is not None:
            start.update({u: b for u, b in zip(unknown, best)})
            out = system.run(start) or out
    return system, start, out


def near_miss(plant: Plant, given: dict[sp.Symbol, sp.Expr], unknown: Sequence[sp.Symbol]) -> NearMiss | None:
    """Measure the miss and look for the equilibrium nearby. ``given`` holds every state and
    the inputs written in the point; ``unknown`` the inputs left out. None when the rates
    cannot be evaluated there (a function outside the balls' reach)."""
    with mpmath.workdps(DIGITS):
        measured = _measured(plant, given, unknown)
        if measured is None:
            return None
        system, start, (rates, sizes, _) = measured
        relative = _relative(rates, sizes)
        scale = max((z for z in sizes if z is not None), default=mpmath.mpf(0))
        sizes = [z if z is not None else scale for z in sizes]  # measured as _relative measures them
        shown = tuple((s, float(r), float(z)) for s, r, z in zip(plant.states, rates, sizes)
                      if r != 0 and (z == 0 or abs(r) / z > CONVERGED))
        written = [s for s in (*plant.states, *plant.inputs) if s in given]
        scales = {s: _scale(plant, s, start[s]) for s in (*written, *unknown)}
        # one written value free (with the inputs left out); else one state with every input;
        # else two written values (an elastic joint's motor angles for a link pose written);
        # else every written value by the smallest scaled step
        given_inputs = [u for u in plant.inputs if u in given]
        pairs = list(itertools.combinations(written, 2)) if len(written) <= MAX_PAIRED else []
        stages = ([[z] for z in written], [[z, *given_inputs] for z in plant.states] if given_inputs else [],
                  [list(pair) for pair in pairs])
        tried: list[tuple[mpmath.mpf, list[sp.Symbol], dict[sp.Symbol, mpmath.mpf]]] = []
        for stage in stages:
            for free in stage:
                found = _newton(system, start, [*free, *unknown], scales)
                if found is None:
                    continue
                change = max(abs(found[z] - start[z]) / scales[z] for z in free)
                if change <= FAR:
                    tried.append((change, free, found))
            if tried:
                break
        if tried:
            # a change within the rounding of the written digits explains the miss best (motor
            # angles written 0.0643 and 1.0071 rather than a link angle written 0), the values
            # written with more digits first; then the smallest relative change
            def preference(t: tuple[mpmath.mpf, list[sp.Symbol], dict[sp.Symbol, mpmath.mpf]]) -> tuple:
                digits = _rounding(given, start, t[2], scales, t[1])
                return (digits is None, -(digits or 0), t[0], [str(s) for s in t[1]])

            _, free, found = min(tried, key=preference)
            moved = [z for z in free if abs(found[z] - start[z]) > mpmath.mpf("1e-30") * scales[z]]
        else:
            found = _newton(system, start, [*written, *unknown], scales)
            if found is None or any(abs(found[v] - start[v]) / scales[v] > FAR for v in written):
                return NearMiss(float(relative), shown, (), None)
            moved = [v for v in written if abs(found[v] - start[v]) > mpmath.mpf("1e-30") * scales[v]]
        values = {s: (given[s] if s not in moved else _rational(found[s])) for s in written}
        # an input Newton leaves at rounding level (1e-59 where the equilibrium needs 0) is 0
        values.update({u: sp.Integer(0) if abs(found[u]) <= mpmath.mpf("1e-30") * scales[u] else _rational(found[u])
                       for u in unknown})
        changed = tuple((v, given[v], values[v]) for v in moved)
        candidates = tuple((v, c) for v in moved if (c := _short(found[v])) is not None)
        return NearMiss(float(relative), shown, changed, values, candidates)
