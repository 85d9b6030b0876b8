"""The symbolic kernel: Lie derivatives, brackets, and sound zero tests.

Every analysis asks this module its questions, so the expensive objects
(L_f^k h_i, L_gj L_f^k h_i, ad_f^k g_j) are computed once per plant and shared.

Zero testing follows the two-stage rule of the theory notes:

1. *Screening* evaluates the expression with ball arithmetic at reproducible
   random points of the envelope. A ball that excludes zero *proves* the
   expression is not identically zero.
2. Only when every ball contains zero is symbolic *confirmation* attempted
   (``cancel`` for rational expressions; a bounded trigonometric/general
   simplification for small ones). When confirmation is out of budget the answer
   is "zero, unconfirmed" and callers report the uncertainty.
"""

from __future__ import annotations

import hashlib
import math
import random
from dataclasses import dataclass
from fractions import Fraction
from typing import TYPE_CHECKING, Iterator, Sequence

import sympy as sp
from flint import arb

from plantlint.core.deadline import LATE, bounded
from plantlint.kernel import decision as zd
from plantlint.kernel.decision import ZeroDecision
from plantlint.kernel.balls import Program, UnsupportedExpression, to_arb
from plantlint.kernel.laurent import FieldRing, identically_zero
from plantlint.kernel.plant import Plant
from plantlint.kernel.rational import cancel_together, rational_zero, sympy_rational, vanishes_identically

if TYPE_CHECKING:
    from plantlint.kernel.structural import StructuralPlant
    from plantlint.kernel.taylor import Towers

Vector = tuple[sp.Expr, ...]

#: Expressions larger than this (in operations) are not simplified symbolically.
SIMPLIFY_OPS_LIMIT = 250
#: Expressions larger than this are not factored for envelope proofs.
FACTOR_LIST_OPS_LIMIT = 4000
#: Expressions larger than this are not brought over a common denominator.
CANCEL_OPS_LIMIT = 600
#: Nodes of a function's argument beyond which an expression is neither put over a common
#: denominator (Kernel.cancelled) nor multiplied out (distributions._normal): sympy's
#: together, cancel and expand all work inside function arguments, and a magic-formula tyre
#: force D sin(C atan(B a - E (B a - atan(B a)))) took them seconds to tens of seconds, for a
#: result no smaller (sin(q1 + q2) is still worked on).
NESTED_ARGUMENT = 12
#: Number of random points used to screen an expression.
SCREEN_POINTS = 6


@dataclass(frozen=True)
class PointValue:
    """An expression's value at a point: a rigorous ball, and whether it is zero
    (zero, non-zero, zero unconfirmed, or undefined there)."""

    ball: arb
    decision: ZeroDecision

    @property
    def value(self) -> float:
        return float(self.ball.mid())


#: "numeric": structural zeros, layered terms and Taylor-mode towers first, symbolic
#: towers only where those do not decide; "symbolic": the symbolic towers only (kept
#: as the confirmation route and for comparisons).
DEFAULT_ROUTE = "numeric"


@dataclass(frozen=True)
class FirstOrder:
    """Values and state gradients at one point: f_i, the g_j columns, h_i; ``Df[i]`` is the
    gradient of f_i, ``Dg[j][i]`` that of g_j's entry i, ``Dh[i]`` that of h_i."""

    f: list[sp.Expr]
    g: list[list[sp.Expr]]
    h: list[sp.Expr]
    Df: list[list[sp.Expr]]
    Dg: list[list[list[sp.Expr]]]
    Dh: list[list[sp.Expr]]

    @classmethod
    def of(cls, n: int, m: int, values: list[sp.Expr], gradients: list[list[sp.Expr]]) -> "FirstOrder":
        """From the program's outputs in their order: f, then g_1 .. g_m, then h."""
        cut = n + m * n
        return cls(values[:n], [values[n + j * n:n + (j + 1) * n] for j in range(m)], values[cut:],
                   gradients[:n], [gradients[n + j * n:n + (j + 1) * n] for j in range(m)], gradients[cut:])


class Kernel:
    """Memoised differential-geometric quantities of one plant."""

    def __init__(self, plant: Plant, seed: int | None = None, route: str | None = None):
        self.plant = plant
        self.route = route or DEFAULT_ROUTE
        self.x = plant.states
        self.f: Vector = plant.f
        self.g: tuple[Vector, ...] = plant.g
        self.h: Vector = plant.h
        self._lf: dict[tuple[int, int], sp.Expr] = {}
        self._lglf: dict[tuple[int, int, int], sp.Expr] = {}
        self._ad: dict[tuple[int, int], Vector] = {}
        self._zero: dict[sp.Expr, ZeroDecision] = {}
        self._jacobians: dict[Vector, sp.Matrix] = {}
        #: d e / d x memoised by (e, x): entries of Jacobians formed one at a time, only where a
        #: bracket needs them; shared with a feedback-shifted kernel of the same plant
        self._derivatives: dict[tuple[sp.Expr, sp.Symbol], sp.Expr] = {}
        self._free: dict[sp.Expr, frozenset[sp.Symbol]] = {}
        self._cancelled: dict[sp.Expr, sp.Expr] = {}
        self._first_order: dict[tuple[object, ...], "FirstOrder | None"] = {}  # (point..., outputs)
        self._poly: "_PolynomialTowers | None | bool" = False
        self._ring: "FieldRing | None | bool" = False
        self._expanded_ad: dict[tuple[int, int], tuple[object, ...] | None] = {}
        self._expanded_ad_exprs: dict[tuple[int, int], Vector | None] = {}
        self.seed = seed if seed is not None else _seed_for(plant)
        self._samples: list[dict[sp.Symbol, Fraction]] | None = None
        self.uncertain: list[sp.Expr] = []  # expressions taken as zero without proof
        self._structural: "StructuralPlant | None" = None
        self._towers: "Towers | None | bool" = False
        self._guard: "Program | None | bool" = False

    # -- the numeric route: dependency graph and Taylor-mode towers ----------
    def structural(self) -> "StructuralPlant":
        """The dependency graph of f, g, h (structural zeros, layered decoupling terms)."""
        if self._structural is None:
            from plantlint.kernel.structural import StructuralPlant

            self._structural = StructuralPlant(self.x, self.f, self.g, self.h)
        return self._structural

    def towers(self) -> "Towers | None":
        """f, g, h compiled for Taylor-mode towers at points; None when an expression
        is outside what the straight-line programs evaluate."""
        if self._towers is False:
            from plantlint.kernel.dag import UnsupportedNode
            from plantlint.kernel.taylor import Towers

            written = self.plant.as_written()
            try:
                if written is not None:  # the graph read from the parse tree: no sympy tree walked
                    self._towers = Towers(self.x, self.plant.params, written.f, written.g, written.h,
                                          graph=written.graph)
                else:
                    self._towers = Towers(self.x, self.plant.params, self.f, self.g, self.h)
            except UnsupportedNode:
                self._towers = None
        return self._towers  # type: ignore[return-value]

    def first_order_at(self, point: dict[sp.Symbol, object], outputs: bool = True) -> "FirstOrder | None":
        """f, the g_j columns and h at an exact rational point and their state gradients, as
        sympy Rationals: dual numbers through the straight-line program in exact fmpq (the
        numbers of the symbolic Jacobians at the point, without forming them); memoised per
        point. Without ``outputs`` h is left out (h and Dh empty), so that an output that is
        not rational or not defined there does not take f and g with it. None when a value
        on the way is not rational, a function is met where it is not smooth, or the program
        cannot hold the plant."""
        from plantlint.kernel.taylor import QField

        compiled = self._compiled_at(point)
        if compiled is None:
            return None
        towers, vector = compiled
        key = (*vector, outputs)
        if key not in self._first_order:
            try:
                values, gradients = towers.first_order(vector, QField(), outputs=outputs)
                out = FirstOrder.of(self.plant.n, self.plant.m, [sympy_rational(v) for v in values],
                                    [[sympy_rational(d) for d in g] for g in gradients])
            except (ArithmeticError, TypeError):  # not rational, undefined, a division by zero
                out = None
            self._first_order[key] = out
        return self._first_order[key]

    def towers_at(self, point: dict[sp.Symbol, object]) -> "tuple[Towers, list[Fraction]] | None":
        """The Taylor-mode towers and the point as their input vector, when the numeric route
        is on, the plant compiles and the point is rational; None otherwise."""
        return self._compiled_at(point) if self.route == "numeric" else None

    def _compiled_at(self, point: dict[sp.Symbol, object]) -> "tuple[Towers, list[Fraction]] | None":
        vector = self.point_vector(point)  # first: it is cheap, compiling the towers is not
        towers = self.towers() if vector is not None else None
        return (towers, vector) if towers is not None and vector is not None else None

    def point_vector(self, point: dict[sp.Symbol, object]) -> list[Fraction] | None:
        """States then ranged parameters of an exact rational point (missing parameters
        at their nominal values); None when a value is not rational."""
        full: dict[sp.Symbol, object] = dict(self.plant.param_nominal)
        full.update(point)
        out: list[Fraction] = []
        for s in self.free_symbols():
            v = full.get(s)
            if isinstance(v, Fraction):
                out.append(v)
            elif isinstance(v, sp.Basic) and v.is_Rational:
                out.append(Fraction(int(v.p), int(v.q)))
            elif isinstance(v, int) and not isinstance(v, bool):
                out.append(Fraction(v))
            else:
                return None
        return out

    # -- elementary operations ---------------------------------------------
    def lie(self, expr: sp.Expr, field: Vector) -> sp.Expr:
        """L_X phi = d(phi) . X."""
        total = sp.Integer(0)
        for xi, Xi in zip(self.x, field):
            if Xi == 0:
                continue
            d = sp.diff(expr, xi)
            if d != 0:
                total += d * Xi
        return total

    def gradient(self, expr: sp.Expr) -> Vector:
        poly = self._polynomial()
        if poly is not None and expr.free_symbols <= set(self.free_symbols()):
            try:
                p = poly.ring(expr)  # type: ignore[operator]
            except Exception:  # e.g. a rational function: the general path
                p = None
            if p is not None:
                return tuple(p.diff(x).as_expr() for x in poly.states)
        return tuple(sp.diff(expr, xi) for xi in self.x)

    def jacobian(self, field: Vector) -> sp.Matrix:
        J = self._jacobians.get(field)
        if J is None:
            # a derivative along a state the entry does not contain is 0 without asking sympy
            # (most entries of a large plant's Jacobian: the dependency graph is sparse)
            J = sp.Matrix([[self.partial(Fi, xj) for xj in self.x] for Fi in field])
            self._jacobians[field] = J
        return J

    def partial(self, e: sp.Expr, x: sp.Symbol) -> sp.Expr:
        """d e / d x (sympy's ``diff``), memoised; 0 without asking sympy when e lacks x."""
        free = self._free.get(e)
        if free is None:
            free = self._free[e] = frozenset(e.free_symbols)
        if x not in free:
            return sp.Integer(0)
        key = (e, x)
        d = self._derivatives.get(key)
        if d is None:
            d = self._derivatives[key] = sp.diff(e, x)
        return d

    def share_derivatives(self, other: "Kernel") -> None:
        """Use ``other``'s memo of derivatives (a kernel of the same states, e.g. the
        feedback-shifted drift: its input fields and their brackets are the same)."""
        if other.x == self.x:
            self._derivatives = other._derivatives
            self._free = other._free

    def bracket(self, X: Vector, Y: Vector) -> Vector:
        """[X, Y] = DY X - DX Y.

        Only the Jacobian entries the sum uses are formed (DY[i, k] where X[k] is not a
        literal 0, DX[i, k] where Y[k] is not), each once per kernel: the terms and their
        order are those of the full product."""
        n = len(self.x)
        out = []
        for i in range(n):
            term = sp.Integer(0)
            for k in range(n):
                if X[k] != 0:
                    d = self.partial(Y[i], self.x[k])
                    if d != 0:
                        term += d * X[k]
                if Y[k] != 0:
                    d = self.partial(X[i], self.x[k])
                    if d != 0:
                        term -= d * Y[k]
            out.append(term)
        return tuple(out)

    # -- brackets in the ring of Laurent polynomials (kernel/laurent.py) -----
    def field_ring(self) -> "FieldRing | None":
        """f and g read as Laurent polynomials in states, parameters, function atoms, roots
        and inverses of sums, closed under d/dx; None when they are not (a float, exp, ...)."""
        if self._ring is False:
            exprs = [e for e in self.f if e != 0] + [e for col in self.g for e in col if e != 0]
            self._ring = FieldRing.build(self.x, exprs)
        return self._ring  # type: ignore[return-value]

    def expanded_bracket(self, X: Vector, Y: Vector) -> Vector | None:
        """Every entry of [X, Y] multiplied out in the ring (sums of monomials, as
        :meth:`expanded_ad`); None when X or Y is not read there or it outgrows the ring."""
        ring = self.field_ring()
        if ring is None:
            return None
        LX, LY = [ring.read(e) for e in X], [ring.read(e) for e in Y]
        if any(e is None for e in LX) or any(e is None for e in LY):
            return None
        bracket = ring.bracket(LX, LY)  # type: ignore[arg-type]
        return None if bracket is None else tuple(ring.expr(e) for e in bracket)

    def expanded_ad(self, j: int, k: int) -> Vector | None:
        """Every entry of ad_f^k g_j multiplied out in the ring (``expand``'s form when the
        ring has no inverses of sums), memoised; None when f and g are not read there or a
        numerator outgrows the ring's bound."""
        ring = self.field_ring()
        if ring is None:
            return None
        key = (j, k)
        if key not in self._expanded_ad:
            if k == 0:
                value = tuple(ring.read(e) for e in self.g[j])
                if any(e is None for e in value):
                    self._ring = None  # a field outside the ring: no expanded brackets at all
                    return None
            else:
                below = self._laurent_ad(j, k - 1)
                if below is None:
                    return None
                F = tuple(ring.read(e) for e in self.f)
                if any(e is None for e in F):  # a rate outside the ring (v2^200): as for g above
                    self._ring = None
                    return None
                bracket = ring.bracket(F, below)  # type: ignore[arg-type]
                value = None if bracket is None else tuple(bracket)
            self._expanded_ad[key] = value  # type: ignore[assignment]
            self._expanded_ad_exprs[key] = None if value is None else tuple(ring.expr(e) for e in value)
        return self._expanded_ad_exprs[key]

    def _laurent_ad(self, j: int, k: int) -> tuple[object, ...] | None:
        if self.expanded_ad(j, k) is None:
            return None
        return self._expanded_ad[(j, k)]

    # -- memoised towers -----------------------------------------------------
    def lf(self, i: int, k: int) -> sp.Expr:
        """L_f^k h_i."""
        key = (i, k)
        if key not in self._lf:
            poly = self._polynomial()
            if k == 0:
                self._lf[key] = self.h[i]
            elif poly is not None:
                self._lf[key] = poly.lf(i, k).as_expr()
            else:
                self._lf[key] = self.lie(self.lf(i, k - 1), self.f)
        return self._lf[key]

    def lglf(self, j: int, i: int, k: int) -> sp.Expr:
        """L_gj L_f^k h_i."""
        key = (j, i, k)
        if key not in self._lglf:
            poly = self._polynomial()
            if poly is not None:
                self._lglf[key] = poly.lie(poly.lf(i, k), poly.g[j]).as_expr()
            else:
                self._lglf[key] = self.lie(self.lf(i, k), self.g[j])
        return self._lglf[key]

    def ad(self, j: int, k: int) -> Vector:
        """ad_f^k g_j."""
        key = (j, k)
        if key not in self._ad:
            poly = self._polynomial()
            if k == 0:
                self._ad[key] = tuple(self.g[j])
            elif poly is not None:
                self._ad[key] = tuple(e.as_expr() for e in poly.ad(j, k))
            else:
                self._ad[key] = self.bracket(self.f, self.ad(j, k - 1))
        return self._ad[key]

    @property
    def polynomial_ring(self) -> bool:
        """True when f, g and h are polynomials with rational coefficients, so the towers are
        computed in a sparse polynomial ring instead of by tree differentiation."""
        return self._polynomial() is not None

    def _polynomial(self) -> "_PolynomialTowers | None":
        """Exact sparse-polynomial arithmetic when f, g and h are polynomials with
        rational coefficients: the towers then cost a fraction of tree-based
        differentiation (no assumption queries, no re-walking shared subtrees)."""
        if self._poly is False:
            self._poly = _PolynomialTowers.build(self)
        return self._poly  # type: ignore[return-value]

    def cancelled(self, expr: sp.Expr) -> sp.Expr:
        """``expr`` over a common denominator with common factors cancelled, when
        that is cheap (small input) and pays (smaller output); else unchanged.

        Interval enclosures suffer from every repeated occurrence of a variable,
        so certification works on the cancelled form.
        """
        if expr.is_Atom:
            return expr
        if expr.is_Mul and len(expr.args) > 2 and _has_functions(expr):
            # a product (a chain's layered decoupling term) stays a product: compacting
            # factor by factor never multiplies the factors out
            return sp.Mul(*(self.cancelled(a) for a in expr.args))
        if sp.count_ops(expr) > CANCEL_OPS_LIMIT or has_nested_arguments(expr):
            return expr
        cached = self._cancelled.get(expr)
        if cached is None:
            try:
                candidate = cancel_together(expr)
            except (sp.PolynomialError, ValueError, TypeError):
                candidate = expr
            cached = candidate if sp.count_ops(candidate) < sp.count_ops(expr) else expr
            self._cancelled[expr] = cached
        return cached

    def factors(self, expr: sp.Expr) -> list[tuple[sp.Expr, int]]:
        """[(constant, 1), (factor, multiplicity), ...] of a moderate polynomial,
        or [] when it does not factor, has a symbolic denominator or is too large."""
        if (expr.is_Atom or _has_functions(expr) or has_symbolic_denominator(expr)
                or sp.count_ops(expr) > FACTOR_LIST_OPS_LIMIT):
            return []
        try:
            constant, pairs = sp.factor_list(expr)
        except (sp.PolynomialError, ValueError, TypeError):
            return []
        parts = [(base, int(e)) for base, e in pairs if base.free_symbols]
        if len(parts) < 2:
            return []
        return [(constant, 1), *parts]

    # -- sampling --------------------------------------------------------------
    def free_symbols(self) -> tuple[sp.Symbol, ...]:
        return tuple(self.x) + tuple(self.plant.params)

    def samples(self) -> list[dict[sp.Symbol, Fraction]]:
        """Reproducible random rational points inside the envelope (or near the
        origin where no range is declared), avoiding points where the model's
        own expressions are undefined."""
        if self._samples is not None:
            return self._samples
        boxes = {**self.plant.state_box, **self.plant.param_box}
        out = random_samples(self.free_symbols(), boxes, self.seed, guard=self.guard())
        self._samples = out
        return out

    def guard(self) -> Program | None:
        """f, g and h in one ball program: the samples skip points where it is not finite
        (None when the balls cannot hold an expression)."""
        if self._guard is False:
            exprs = [e for e in self.f if e != 0] + [e for col in self.g for e in col if e != 0] + list(self.h)
            try:
                self._guard = Program(exprs, self.free_symbols())
            except UnsupportedExpression:
                self._guard = None
        return self._guard  # type: ignore[return-value]

    # -- zero tests -------------------------------------------------------------
    def is_zero(self, expr: sp.Expr) -> ZeroDecision:
        """Is ``expr`` identically zero (as a function of states and ranged params)?
        Zero, non-zero, or zero unconfirmed (listed in ``uncertain``)."""
        if expr == 0:
            return zd.proven_zero("structural")
        if not expr.free_symbols & set(self.free_symbols()):
            # a constant: decide it exactly / rigorously
            try:
                if zd.of_ball(to_arb(expr)).proven_nonzero:
                    return zd.proven_nonzero("screened")
            except UnsupportedExpression:
                pass
        cached = self._zero.get(expr)
        if cached is not None:
            return cached
        result = self._screen_then_confirm(expr)
        self._zero[expr] = result
        if result.outcome is zd.Outcome.ZERO_UNCONFIRMED:
            self.uncertain.append(expr)
        return result

    def _screen_then_confirm(self, expr: sp.Expr) -> ZeroDecision:
        return screen_then_confirm(expr, self.free_symbols(), self.samples())

    def constant_is_zero(self, value: sp.Expr) -> ZeroDecision:
        """Is an exact constant (sin(1/3), pi/2, ...) exactly zero? Undefined when it is
        undefined there (a division by zero), undecided when it cannot be evaluated."""
        if value == 0:
            return zd.proven_zero("exact")
        if value.is_Rational:
            return zd.proven_nonzero("exact")
        if value.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
            return zd.UNDEFINED
        try:
            return self.value_at(value, {}).decision
        except UnsupportedExpression:
            return zd.UNDECIDED

    def value_at(self, expr: sp.Expr, point: dict[sp.Symbol, sp.Expr]) -> PointValue:
        """The value of ``expr`` at an exact point, rigorously.

        ``point`` gives every state (and ranged parameter; missing ones take
        their nominal value). The decision is zero only when the value is exactly
        zero (decided exactly, not by rounding), or zero unconfirmed when it lies
        within 2^-1024 of zero without a symbolic proof (listed in ``uncertain``).
        """
        full = dict(self.plant.param_nominal)
        full.update(point)
        exact = expr.xreplace({s: v for s, v in full.items()})
        if exact.is_Rational or exact.is_Integer:
            return PointValue(to_arb(exact), zd.exactly(exact == 0))
        if exact.free_symbols:
            raise UnsupportedExpression(f"value needs {sorted(map(str, exact.free_symbols))}")
        # no value there: a pole, or sympy's value of a real function outside its domain
        # (sqrt(-728) is 2*sqrt(182)*I)
        if exact.has(sp.zoo, sp.nan, sp.oo, -sp.oo, sp.I):
            return PointValue(arb("nan"), zd.UNDEFINED)
        finite = False
        for prec in (128, 1024):
            try:
                b = Program([exact], []).run([], prec=prec)[0]
            except UnsupportedExpression:
                break
            if not b.is_finite():
                return PointValue(b, zd.UNDEFINED)
            finite = True
            if zd.of_ball(b).proven_nonzero:
                return PointValue(b, zd.proven_nonzero("ball"))
        # every ball contains 0: decide exactly on the constant
        if not _has_functions(exact):
            c = sp.nsimplify(exact) if exact.has(sp.Float) else sp.cancel(exact)
            return PointValue(to_arb(0) if c == 0 else _safe_ball(c), zd.exactly(c == 0))
        if finite and sp.count_ops(exact) <= EQUALS_OPS_LIMIT and vanishes_identically(exact):
            # zero as a rational function of its transcendental parts (defined: its ball is finite)
            return PointValue(_safe_ball(exact), zd.exactly(True, "cancel"))
        decision = bounded_equals_zero(exact)
        if not decision.certain:  # within 2^-1024 of zero, not proven symbolically: taken as zero, reported
            self.uncertain.append(exact)
            return PointValue(_safe_ball(exact), zd.unconfirmed_zero())
        return PointValue(_safe_ball(exact), decision)


class _PolynomialTowers:
    """L_f^k h_i, L_g L_f^k h_i and ad_f^k g_j in a sparse polynomial ring over QQ."""

    def __init__(self, ring: object, states: list[object], f: list[object], g: list[list[object]],
                 h: list[object]):
        self.ring = ring
        self.states = states
        self.f = f
        self.g = g
        self.h = h
        self._lf: dict[tuple[int, int], object] = {}
        self._ad: dict[tuple[int, int], list[object]] = {}

    @classmethod
    def build(cls, kernel: "Kernel") -> "_PolynomialTowers | None":
        from sympy.polys.domains import QQ
        from sympy.polys.rings import ring

        symbols = list(kernel.free_symbols())
        if not symbols:
            return None
        if any(_degree_bound(e) > POLYNOMIAL_DEGREE_LIMIT for e in (*kernel.f, *(e for col in kernel.g for e in col),
                                                                    *kernel.h)):
            # (a^2 + a)^2 + ... nested twelve times has degree 4096: multiplied out it has
            # millions of terms; the tree route forms only what is asked for
            return None
        R, *gens = ring(symbols, QQ)
        by_symbol = dict(zip(symbols, gens))
        try:
            f = [R(e) for e in kernel.f]
            g = [[R(e) for e in col] for col in kernel.g]
            h = [R(e) for e in kernel.h]
        except Exception:  # not a polynomial with rational coefficients: the general path
            return None
        return cls(R, [by_symbol[x] for x in kernel.x], f, g, h)

    def lie(self, phi: object, field: list[object]) -> object:
        total = self.ring.zero  # type: ignore[attr-defined]
        for x, X in zip(self.states, field):
            if X:
                total += phi.diff(x) * X  # type: ignore[attr-defined]
        return total

    def lf(self, i: int, k: int) -> object:
        key = (i, k)
        if key not in self._lf:
            self._lf[key] = self.h[i] if k == 0 else self.lie(self.lf(i, k - 1), self.f)
        return self._lf[key]

    def ad(self, j: int, k: int) -> list[object]:
        key = (j, k)
        if key not in self._ad:
            if k == 0:
                self._ad[key] = list(self.g[j])
            else:
                Y = self.ad(j, k - 1)
                self._ad[key] = [self.lie(Yi, self.f) - self.lie(Fi, Y) for Yi, Fi in zip(Y, self.f)]
        return self._ad[key]


def screen_then_confirm(
    expr: sp.Expr, symbols: Sequence[sp.Symbol], samples: Sequence[dict[sp.Symbol, Fraction]]
) -> ZeroDecision:
    """The two-stage zero test on given sample points (see the module docstring)."""
    try:
        prog = Program([expr], symbols)
    except UnsupportedExpression:
        prog = None
    if prog is not None:
        for point in samples:
            for prec in (128, 512):
                b = prog.at(point, prec)[0]
                if zd.of_ball(b).proven_nonzero:
                    return zd.proven_nonzero("screened")
                if b.is_finite() and b.rad() < 2.0 ** (-prec // 2):
                    break  # a tight ball around zero: more digits will not help
    return confirm_zero(expr)


#: Bounds of sympy's ``equals(0)`` on a constant whose balls all contain zero (its run
#: time has no limit of its own: a disguised trigonometric identity can take minutes).
EQUALS_OPS_LIMIT = 400
EQUALS_SECONDS = 2.0
#: Wall-clock bound of the simplification that confirms a zero with functions in it
#: (trigsimp on huge rational coefficients can factor for minutes): beyond it the zero
#: stays unconfirmed, and whatever rests on it is not decided.
SIMPLIFY_SECONDS = 3.0


def bounded_equals_zero(exact: sp.Expr) -> ZeroDecision:
    """``exact.equals(0)`` within a size and a time bound (undecided beyond them, or
    when sympy cannot tell)."""
    if sp.count_ops(exact) > EQUALS_OPS_LIMIT:
        return zd.UNDECIDED
    try:
        answer = bounded(EQUALS_SECONDS, lambda: exact.equals(0))
    except (ArithmeticError, ValueError, TypeError, RecursionError):
        # sympy's numeric identification on extreme constants (exp(-8e303)) overflows
        # mpmath: no answer, so no claim rests on it
        return zd.UNDECIDED
    return zd.UNDECIDED if answer is None or answer is LATE else zd.exactly(bool(answer), "equals")


#: Polynomials of higher total degree are not multiplied out into the sparse ring.
POLYNOMIAL_DEGREE_LIMIT = 64


def _degree_bound(e: sp.Expr) -> float:
    """An upper bound of the total degree of a polynomial (inf for anything else), in one
    pass over the distinct sub-expressions (shared ones are not walked twice)."""
    memo: dict[sp.Basic, float] = {}
    stack: list[tuple[sp.Basic, bool]] = [(e, False)]
    while stack:
        node, ready = stack.pop()
        if node in memo:
            continue
        if not ready and node.args:
            stack.append((node, True))
            stack.extend((a, False) for a in node.args if a not in memo)
            continue
        if node.is_Symbol:
            memo[node] = 1.0
        elif node.is_Number:
            memo[node] = 0.0
        elif node.is_Add:
            memo[node] = max(memo[a] for a in node.args)
        elif node.is_Mul:
            memo[node] = sum(memo[a] for a in node.args)
        elif node.is_Pow and node.exp.is_Integer and node.exp >= 0:
            memo[node] = memo[node.base] * int(node.exp)
        else:
            memo[node] = math.inf
    return memo[e]


def has_symbolic_denominator(e: sp.Expr) -> bool:
    return any(p.exp.is_negative and p.base.free_symbols for p in e.atoms(sp.Pow))


def confirm_zero(expr: sp.Expr) -> ZeroDecision:
    """Symbolic confirmation, bounded: exact for rational expressions, budgeted otherwise.

    Without a symbolic denominator, multiplying out decides polynomials at once
    (and proves many trigonometric zeros); bringing a large polynomial over a
    common denominator first would cost far more.
    """
    quick = identically_zero(expr)
    if quick is not None and (quick or not _has_functions(expr)):
        # the same answer as expand / cancel below (kernel/laurent.py), by flint's arithmetic
        how = "cancel" if has_symbolic_denominator(expr) else "expand"
        return zd.proven_zero(how) if quick else zd.proven_nonzero(how)
    if not has_symbolic_denominator(expr):
        if sp.expand(expr) == 0:
            return zd.proven_zero("expand")
        if not _has_functions(expr):
            return zd.proven_nonzero("expand")
    if not _has_functions(expr):
        zero = rational_zero(expr)  # flint's arithmetic in QQ(x); sympy's cancel when it cannot say
        if zero is None:
            zero = cancel_together(expr) == 0
        return zd.proven_zero("cancel") if zero else zd.proven_nonzero("cancel")
    if sp.count_ops(expr) <= SIMPLIFY_OPS_LIMIT:
        def simplified() -> ZeroDecision | None:
            e = sp.expand(sp.together(expr))
            if e == 0:
                return zd.proven_zero("cancel")
            if sp.trigsimp(e) == 0 or sp.simplify(e) == 0:
                return zd.proven_zero("simplify")
            return None

        decision = bounded(SIMPLIFY_SECONDS, simplified)  # sympy's simplification has no limit of its own
        if isinstance(decision, ZeroDecision):
            return decision
    return zd.unconfirmed_zero("unconfirmed")


def random_samples(
    symbols: Sequence[sp.Symbol],
    boxes: dict[sp.Symbol, tuple[sp.Expr, sp.Expr]],
    seed: int,
    count: int = SCREEN_POINTS,
    guard: Program | None = None,
) -> list[dict[sp.Symbol, Fraction]]:
    """Reproducible random rational points inside ``boxes`` (or [-2, 2] where a
    symbol has no box), skipping points where ``guard`` is undefined."""
    out: list[dict[sp.Symbol, Fraction]] = []
    for point in candidate_points(symbols, boxes, seed, count):
        if len(out) == count:
            break
        if guard is not None:
            vals = guard.at(point)
            if not all(v.is_finite() for v in vals):
                continue
        out.append(point)
    return out


def candidate_points(symbols: Sequence[sp.Symbol], boxes: dict[sp.Symbol, tuple[sp.Expr, sp.Expr]], seed: int,
                     count: int = SCREEN_POINTS) -> Iterator[dict[sp.Symbol, Fraction]]:
    """The points :func:`random_samples` draws, in its order (20 * ``count`` of them),
    before its guard skips any."""
    rng = random.Random(seed)
    for _ in range(20 * count):
        point: dict[sp.Symbol, Fraction] = {}
        for s in symbols:
            lo, hi = _float_range(boxes.get(s))
            frac = Fraction(rng.randint(1, 997), 1000)
            value = lo + (hi - lo) * frac
            # keep the denominator small and the value off trivial points
            point[s] = value.limit_denominator(4093) + Fraction(1, 7919)
        yield point


def _safe_ball(e: sp.Expr) -> arb:
    try:
        return to_arb(e)
    except UnsupportedExpression:
        return arb("nan")


def _has_functions(expr: sp.Expr) -> bool:
    return bool(expr.atoms(sp.Function)) or any(
        p.exp.is_Rational and not p.exp.is_Integer for p in expr.atoms(sp.Pow)
    )


def _float_range(bounds: tuple[sp.Expr, sp.Expr] | None) -> tuple[Fraction, Fraction]:
    if bounds is None:
        return Fraction(-2), Fraction(2)
    lo, hi = (
        Fraction(int(b.p), int(b.q)) if b.is_Rational else Fraction(float(b)).limit_denominator(10**6)
        for b in bounds
    )
    return lo, hi


def _seed_for(plant: Plant) -> int:
    digest = hashlib.sha256(repr((plant.name, plant.f, plant.g, plant.h)).encode()).digest()
    return int.from_bytes(digest[:8], "big")


def matrix_at(kernel: Kernel, rows: Sequence[Sequence[sp.Expr]], point: dict[sp.Symbol, sp.Expr]) -> sp.Matrix:
    """Exact matrix of expressions at a point (for rank decisions)."""
    full = dict(kernel.plant.param_nominal)
    full.update(point)
    return sp.Matrix([[e.xreplace(full) for e in row] for row in rows])


def has_nested_arguments(expr: sp.Expr) -> bool:
    """Some function in ``expr`` has an argument of more than NESTED_ARGUMENT nodes."""
    for call in expr.atoms(sp.Function):
        for a in call.args:
            count = 0
            for _ in sp.preorder_traversal(a):
                count += 1
                if count > NESTED_ARGUMENT:
                    return True
    return False
