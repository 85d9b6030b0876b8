"""Expressions in the ranged parameters of a plant, over their box.

The verdicts over a parameter box (:mod:`plantlint.analysis.parametric`) evaluate the
quantities of an operating point as functions of the ranged parameters p only: x0(p),
u0(p), the linearisation A(p), B(p), C(p). This module keeps those expressions small
and sound:

* ``sqrt(c*a^2)`` is ``sqrt(c)*|a|`` for real symbols, so radicands are factored first,
  and ``|a|`` is replaced by ``a`` or ``-a`` only where the sign of a is certified on the
  box (:func:`plantlint.kernel.intervals.certify_sign`); otherwise the box cannot be
  covered (:class:`NotCovered`) and the caller says so;
* rational functions of p are brought over one denominator (bounded by size);
* determinants are formed over placeholder symbols (:class:`Holders`), so that they
  stay polynomial, and the entries are put back afterwards;
* every evaluation at a parameter value is a rigorous ball, and witnesses are exact
  rationals (a float found by bisection is an exact dyadic rational; short decimals
  near it are tried first).
"""

from __future__ import annotations

import itertools
import time
from dataclasses import dataclass
from fractions import Fraction

import sympy as sp
from flint import arb

from plantlint.kernel import decision as zd
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.exact import laplace_det
from plantlint.kernel.intervals import Budget, EnvelopeVerdict, certify_sign
from plantlint.kernel.lie import Kernel, random_samples
from plantlint.kernel.plant import as_expr
from plantlint.kernel.precision import precision
from plantlint.kernel.rational import cancel_together, rational_value

#: Expressions larger than this (operations) are not brought over a common denominator.
TIDY_OPS = 1500
#: Largest Rosenbrock pencil (n + m) formed symbolically.
MAX_PENCIL = 10
#: Random parameter values tried (after the corners) when looking for a witness.
SCREEN_VALUES = 12
#: Boundary factors are looked for only in expressions up to this size.
BOUNDARY_OPS = 600


class NotCovered(Exception):
    """The parametric form could not be built; the message says why."""


@dataclass
class Clock:
    """One budget for every certification of a model (boxes and seconds)."""

    deadline: float
    boxes_left: int

    def budget(self) -> Budget:
        return Budget(max(self.boxes_left, 1), max(self.deadline - time.perf_counter(), 0.0))

    def spent(self, v: EnvelopeVerdict) -> EnvelopeVerdict:
        self.boxes_left -= v.boxes_examined
        return v


def clock(seconds: float, boxes: int) -> Clock:
    return Clock(time.perf_counter() + seconds, boxes)


class ParameterBox:
    """The ranged parameters, their box and helpers to keep expressions in p small."""

    def __init__(self, kernel: Kernel, timer: Clock):
        plant = kernel.plant
        self.kernel = kernel
        self.symbols = tuple(plant.params)
        self.box = {s: plant.param_box[s] for s in self.symbols if s in plant.param_box}
        self.nominal = dict(plant.param_nominal)
        self.clock = timer
        self._signs: dict[sp.Expr, sp.Expr | None] = {}
        self._tidied: dict[sp.Expr, sp.Expr] = {}  # tidy is pure for one box (signs are memoised too)

    def tidy(self, e: sp.Expr) -> sp.Expr:
        """Absolute values resolved by certified signs, then a common denominator when
        the expression is a rational function of p (with numeric radicals)."""
        e = as_expr(e)
        if e.is_Number:
            return e
        done = self._tidied.get(e)
        if done is None:
            done = self._tidied[e] = self._tidy(e)
        return done

    def _tidy(self, e: sp.Expr) -> sp.Expr:
        e = self.resolve_signs(factor_radicands(e))
        if e.is_Number:
            return e
        ops = sp.count_ops(e)
        if ops > TIDY_OPS or has_symbolic_functions(e):
            return e
        try:
            out = cancel_together(e)
        except (sp.PolynomialError, ValueError, TypeError):
            return e
        return out if sp.count_ops(out) <= ops + 20 else e

    def resolve_signs(self, e: sp.Expr) -> sp.Expr:
        """|a| -> a or -a where the sign of a is certified on the box (sqrt of a square
        in real symbols gives |a|); otherwise the box cannot be covered."""
        while True:
            nodes = sorted(e.atoms(sp.Abs), key=sp.count_ops)
            if not nodes:
                return e
            node = nodes[0]
            arg = node.args[0]
            if arg not in self._signs:
                self._signs[arg] = self._signed(arg)
            rep = self._signs[arg]
            if rep is None:
                raise NotCovered(f"the sign of {_short(arg)} is not constant (or not certified) on the "
                                 "parameter box")
            e = e.xreplace({node: rep})

    def _signed(self, a: sp.Expr) -> sp.Expr | None:
        if a.free_symbols - set(self.symbols):
            return None
        for candidate in (a, -a):
            try:
                v = self.clock.spent(certify_sign(candidate, self.box, False, self.clock.budget()))
            except UnsupportedExpression:
                return None
            if v.regular:
                return candidate
        return None

    def at(self, e: sp.Expr, values: dict[sp.Symbol, sp.Expr]) -> sp.Expr:
        return e.xreplace(values) if e.free_symbols else e

    def ball(self, e: sp.Expr, values: dict[sp.Symbol, sp.Expr], prec: int = 128) -> arb:
        """A rigorous ball for e at exact parameter values."""
        exact = rational_value(e, values)  # the same number, without sympy building it
        if exact is None:
            exact = e.xreplace(values)
        if exact.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
            return arb("nan")
        try:
            return Program([exact], []).run([], prec=prec)[0]
        except (UnsupportedExpression, ZeroDivisionError, ValueError):
            return arb("nan")

    def candidates(self) -> list[dict[sp.Symbol, sp.Expr]]:
        """Corners, the centre, then reproducible random values of the box (exact)."""
        syms = [s for s in self.symbols if s in self.box]
        out: list[dict[sp.Symbol, sp.Expr]] = []
        if len(syms) <= 4:
            for corner in itertools.product(*[self.box[s] for s in syms]):
                out.append(dict(zip(syms, corner)))
        out.append({s: (self.box[s][0] + self.box[s][1]) / 2 for s in syms})
        seed = int(self.kernel.seed) % (2**32)
        for sample in random_samples(syms, self.box, seed, count=SCREEN_VALUES):
            out.append({s: sp.Rational(v.numerator, v.denominator) for s, v in sample.items()})
        return out

    def named(self, values: dict[sp.Symbol, sp.Expr]) -> dict[str, sp.Expr]:
        return {str(s): values[s] for s in self.symbols if s in values}


def factor_radicands(e: sp.Expr) -> sp.Expr:
    """sqrt(c*a^2) becomes sqrt(c)*|a| (real symbols) only when the radicand is
    factored; a multiplied-out square hides it."""
    swap = {}
    for node in e.atoms(sp.Pow):
        if node.exp.is_Rational and not node.exp.is_Integer and node.base.free_symbols \
                and node.base.is_Add and sp.count_ops(node.base) <= 200:
            try:
                base = sp.factor(node.base)
            except (sp.PolynomialError, ValueError, TypeError):
                continue
            if base != node.base:
                swap[node] = sp.Pow(base, node.exp)
    return e.xreplace(swap) if swap else e


def has_symbolic_functions(e: sp.Expr) -> bool:
    for node in sp.preorder_traversal(e):
        if isinstance(node, sp.Function) and node.free_symbols:
            return True
        if node.is_Pow and not node.exp.is_Integer and node.base.free_symbols:
            return True
    return False


def exact_point(params: ParameterBox, point: dict[str, float]) -> dict[sp.Symbol, sp.Expr]:
    """A float witness as exact rationals (a float is an exact dyadic rational)."""
    by_name = {str(s): s for s in params.symbols}
    return {by_name[k]: sp.Rational(Fraction(v)) for k, v in point.items() if k in by_name}


def snapped(params: ParameterBox, point: dict[str, float]) -> list[dict[sp.Symbol, sp.Expr]]:
    """The point rounded to 1, 2, 3, 4 and 6 decimals (kept inside the box)."""
    raw = exact_point(params, point)
    out = []
    for den in (10, 100, 1000, 10**4, 10**6):
        snapped: dict[sp.Symbol, sp.Expr] = {}
        for s, v in raw.items():
            lo, hi = params.box.get(s, (v, v))
            q = sp.Rational(round(float(v) * den), den)
            snapped[s] = min(max(q, lo), hi)
        out.append(snapped)
    return out


class Holders:
    """Entries replaced by placeholder symbols, so that determinants are polynomial."""

    def __init__(self) -> None:
        self.by_entry: dict[sp.Expr, sp.Symbol] = {}
        self.back: dict[sp.Symbol, sp.Expr] = {}

    def hold(self, e: sp.Expr) -> sp.Expr:
        if e.is_Number:
            return e
        s = self.by_entry.get(e)
        if s is None:
            s = sp.Dummy(f"e{len(self.by_entry)}")
            self.by_entry[e] = s
            self.back[s] = e
        return s

    def matrix(self, M: sp.Matrix) -> sp.Matrix:
        return M.applyfunc(self.hold)

    def restore(self, e: sp.Expr) -> sp.Expr:
        return e.xreplace(self.back)


def zero_polynomial(A: sp.Matrix, B: sp.Matrix, C: sp.Matrix, degree: int) -> tuple[list[sp.Expr], list[sp.Expr]]:
    """Coefficients (leading first) of det [[sI - A, -B], [C, 0]] up to s^degree, and the
    higher ones (which vanish identically when the relative degree is well defined)."""
    n, m, p = A.rows, B.cols, C.rows
    if n + m > MAX_PENCIL:
        raise NotCovered(f"the Rosenbrock pencil of size {n + m} is too large to form symbolically "
                           f"(limit {MAX_PENCIL})")
    holders = Holders()
    s = sp.Dummy("s")
    P = sp.zeros(n + p, n + m)
    P[:n, :n] = s * sp.eye(n) - holders.matrix(A)
    P[:n, n:] = -holders.matrix(B)
    P[n:, :n] = holders.matrix(C)
    poly = sp.Poly(laplace_det(P), s)
    coeffs = [holders.restore(poly.coeff_monomial(s**k)) for k in range(degree, -1, -1)]
    higher = [holders.restore(poly.coeff_monomial(s**k)) for k in range(degree + 1, poly.degree() + 1)]
    return coeffs, higher


def ball_det(rows: list[list[arb]]) -> arb:
    """Determinant of a small ball matrix by cofactor expansion (rigorous, no pivoting)."""
    if len(rows) == 1:
        return rows[0][0]
    total = arb(0)
    for j, a in enumerate(rows[0]):
        if a == 0:
            continue
        minor = [r[:j] + r[j + 1:] for r in rows[1:]]
        term = a * ball_det(minor)
        total = total + term if j % 2 == 0 else total - term
    return total




def boundary_factor(params: ParameterBox, e: sp.Expr, witness: dict[sp.Symbol, sp.Expr]
                    ) -> tuple[sp.Expr, str, bool] | None:
    """(f, "<", numerator) when e factors into one factor f whose sign is not constant on
    the box (to an odd power) and factors of certified constant sign, so that e < 0 exactly
    where f < 0 (or f > 0, as the witness says); f has a positive leading sign. ``numerator``
    says whether f divides e's numerator (e = 0 on f = 0) or its denominator (e has a pole there)."""
    if sp.count_ops(e) > BOUNDARY_OPS or has_symbolic_functions(e):
        return None
    try:
        num, den = cancel_together(e).as_numer_denom()
        in_num = sp.factor_list(num)[1]
        factors = in_num + sp.factor_list(den)[1]
    except (sp.PolynomialError, ValueError, TypeError):
        return None
    numerator_factors = len(in_num)
    open_factors = []
    for index, (f, mult) in enumerate(factors):
        if not f.free_symbols:
            continue
        fixed = False
        for cand in (f, -f):
            v = params.clock.spent(certify_sign(cand, params.box, True, params.clock.budget()))
            fixed = fixed or bool(v.regular)
        if not fixed:
            open_factors.append((f, mult, index < numerator_factors))
    if len(open_factors) != 1 or open_factors[0][1] % 2 == 0:
        return None
    f, _, in_numerator = open_factors[0]
    b = params.ball(f, witness)
    if not b.is_finite() or b.contains(0):
        return None
    op = "<" if b < 0 else ">"
    if f.could_extract_minus_sign():
        f, op = -f, (">" if op == "<" else "<")
    return f, op, in_numerator


def crossing(params: ParameterBox, e: sp.Expr, witness: dict[sp.Symbol, sp.Expr]) -> dict[str, float] | None:
    """Where the segment from the nominal values to the witness crosses e = 0 (bisection
    on certain signs): the boundary value itself when there is one parameter."""
    start = {s: params.nominal[s] for s in params.symbols}
    end = {s: witness.get(s, start[s]) for s in params.symbols}
    b0 = params.ball(e, start)
    if not (b0.is_finite() and b0 > 0):
        return None
    lo, hi = sp.Rational(0), sp.Rational(1)
    for _ in range(40):
        mid = (lo + hi) / 2
        point = {s: start[s] + mid * (end[s] - start[s]) for s in params.symbols}
        b = params.ball(e, point)
        if not b.is_finite() or b.contains(0):
            break
        if b > 0:
            lo = mid
        else:
            hi = mid
    t = (lo + hi) / 2
    return {str(s): float(start[s] + t * (end[s] - start[s])) for s in params.symbols}


def independent_sets(params: ParameterBox, holders: Holders, columns: list[sp.Matrix], n: int,
                     most: int = 8) -> list[tuple[int, ...]]:
    """Up to ``most`` sets of n Kalman columns (from the first 2n) whose determinant is
    certainly non-zero at the nominal values; over the box at least one of them must
    stay non-zero at every parameter value."""
    with precision(256):
        pool = columns[: 2 * n]
        nominal = [[params.ball(holders.restore(e), params.nominal, 256) for e in col] for col in pool]
        out: list[tuple[int, ...]] = []
        for chosen in itertools.combinations(range(len(pool)), n):
            det = ball_det([[nominal[k][i] for k in chosen] for i in range(n)])
            if zd.of_ball(det).proven_nonzero:
                out.append(chosen)
                if len(out) == most:
                    break
        return out


def _short(e: sp.Expr, limit: int = 60) -> str:
    text = sp.sstr(e)
    return text if len(text) <= limit else text[: limit - 3] + "..."
