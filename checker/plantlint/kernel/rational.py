"""Rational functions with rational coefficients, in the field QQ(p) instead of as
expression trees.

``cancel_rational(e)`` is ``sp.cancel(sp.together(e))`` computed by field arithmetic
(no gcd_terms / factor_terms rewriting of expressions), with the same resulting
expression; function values of the symbols (cos(q2), exp(-x)) are generators, as in
sympy's polys. ``vanishes_identically(c)`` proves an exact constant zero when it is zero
as a rational function of its transcendental parts (exp(-160/7), sqrt(2), pi taken as
independent unknowns); it never proves a non-zero.
"""

from __future__ import annotations

from typing import Any, Sequence

import sympy as sp
from flint import fmpq, fmpq_mat, fmpq_mpoly_ctx
from sympy.polys.domains import QQ
from sympy.polys.rings import ring as sp_ring
from sympy.core.exprtools import decompose_power
from sympy.polys.polyutils import _sort_gens


class _NotRational(Exception):
    pass


#: Fractions are reduced (a gcd) on the way only when a numerator or denominator grows
#: beyond this total degree; the final reduction makes the result the same either way.
REDUCE_DEGREE = 12


class _SympyField:
    """QQ(p) in sympy's sparse polynomials: the pair sympy's own cancel reduces, so that
    :func:`cancel_rational` ends in the very expression sympy writes."""

    def __init__(self, symbols: set[sp.Symbol]):
        gens = tuple(_sort_gens(list(symbols)))
        self.ring = sp_ring(gens, QQ)[0]
        self.one = self.ring.one
        self.gens = dict(zip(gens, self.ring.gens))

    def const(self, p: int, q: int) -> Any:
        return self.ring(QQ(p, q))

    def reduced(self, n: Any, d: Any) -> tuple[Any, Any]:
        if _degree(n) > REDUCE_DEGREE or _degree(d) > REDUCE_DEGREE:
            return n.cancel(d)
        return n, d


class _FlintField:
    """QQ(p) in python-flint's ``fmpq_mpoly``: for zero tests, where only whether the
    numerator vanishes matters (its gcds are far faster than sympy's heuristic ones)."""

    def __init__(self, symbols: set[sp.Symbol]):
        order = sorted(symbols, key=str)
        ctx = fmpq_mpoly_ctx.get(("x", len(order)))
        self.ctx = ctx
        self.one = ctx.constant(1)
        self.gens = dict(zip(order, ctx.gens()))

    def const(self, p: int, q: int) -> Any:
        return self.ctx.constant(fmpq(p, q))

    def reduced(self, n: Any, d: Any) -> tuple[Any, Any]:
        if len(n) > MAX_TERMS or len(d) > MAX_TERMS:
            raise _NotRational  # too large to decide here
        if n.total_degree() > REDUCE_DEGREE or d.total_degree() > REDUCE_DEGREE:
            g = n.gcd(d)
            if not g.is_constant():
                return n / g, d / g
        return n, d


#: Bound on the terms of a numerator or denominator in a flint zero test.
MAX_TERMS = 200_000


def _in_field(e: sp.Expr, field: type = _SympyField, atoms: bool = False) -> tuple[Any, Any] | None:
    """e as a fraction (numerator, denominator) of polynomials over QQ in its symbols, not
    necessarily reduced, in the ring of ``field`` (sympy's, generators sorted as sympy's
    polys sort them, or flint's); None when e is not built from symbols and rational
    numbers by +, * and integer powers, or a denominator vanishes identically.

    With ``atoms``, function values of the symbols (cos(q2), exp(x)) are generators too,
    as sympy's polys take them (:func:`_generators`)."""
    generators = _generators(e) if atoms else {s: (s, 1) for s in e.free_symbols}
    if generators is None:
        return None
    F = field({g for g, _ in generators.values()})
    one = F.one
    by_symbol = {node: (F.gens[g] ** k, one) if k > 0 else (one, F.gens[g] ** -k)
                 for node, (g, k) in generators.items()}
    memo: dict[sp.Expr, tuple[Any, Any]] = {}

    def build(node: sp.Expr) -> tuple[Any, Any]:
        done = memo.get(node)
        if done is not None:
            return done
        if node in by_symbol:
            out = by_symbol[node]
        elif node.is_Rational:
            out = (F.const(int(node.p), int(node.q)), one)
        elif node.is_Add:
            n, d = build(node.args[0])
            for a in node.args[1:]:
                an, ad = build(a)
                n, d = (n + an, d) if ad == d else (n * ad + an * d, d * ad)
            out = F.reduced(n, d)
        elif node.is_Mul:
            n, d = build(node.args[0])
            for a in node.args[1:]:
                an, ad = build(a)
                n, d = n * an, d * ad
            out = F.reduced(n, d)
        elif node.is_Pow and node.exp.is_Integer:
            n, d = build(node.base)
            k = int(node.exp)
            if k < 0:
                if not n:
                    raise ZeroDivisionError
                n, d, k = d, n, -k
            out = (n**k, d**k)
        else:
            raise _NotRational
        memo[node] = out
        return out

    try:
        n, d = build(e)
    except (_NotRational, ZeroDivisionError):
        return None
    return (n, d) if d else None


def _generators(e: sp.Expr) -> dict[sp.Expr, tuple[sp.Expr, int]] | None:
    """Each symbol and each function value of the symbols in e, as a generator and its
    degree the way sympy's polys read them (``decompose_power``: exp(2*x) is exp(x)^2);
    None when e holds something else that is not a rational number (sqrt(x), sin(1), pi),
    or a function whose arguments sympy's ``cancel`` would rewrite first (its
    ``factor_terms`` takes cos(2*a + 2*b) to cos(2*(a + b))): then sympy's route decides."""
    out: dict[sp.Expr, tuple[sp.Expr, int]] = {}
    stack = [e]
    seen: set[sp.Expr] = set()
    while stack:
        node = stack.pop()
        if node in seen:
            continue
        seen.add(node)
        if node.is_Symbol:
            out[node] = (node, 1)
        elif node.is_Rational:
            continue
        elif node.is_Add or node.is_Mul:
            stack.extend(node.args)
        elif node.is_Pow and node.exp.is_Integer:
            stack.append(node.base)
        elif node.is_Function and node.free_symbols and not node.is_Piecewise:
            if sp.factor_terms(node, radical=True) != node:
                return None
            base, degree = decompose_power(node)
            out[node] = (base, int(degree))
        else:
            return None
    return out


def rational_zero(e: sp.Expr) -> bool | None:
    """True / False: e, a rational function of its symbols with rational coefficients,
    is / is not identically zero (proved: its numerator over a non-zero denominator is
    or is not the zero polynomial, by flint's exact arithmetic). None: e is not such a
    function, has no symbols, a denominator vanishes identically, or it is too large."""
    if not e.free_symbols:
        return None
    f = _in_field(e, _FlintField)
    return None if f is None else not f[0]


def _degree(p: Any) -> int:
    return max((sum(m) for m in p.itermonoms()), default=0)


def cancel_rational(e: sp.Expr) -> sp.Expr | None:
    """``sp.cancel(sp.together(e))`` for a rational function e of its symbols and of
    function values of them (cos(q2)), with rational coefficients; None otherwise (the
    caller takes sympy's route).

    The result is the same expression: sympy's cancel ends in ``P/Q`` with (P, Q) the
    coprime pair from ``PolyElement.cancel`` over ZZ or QQ (integer coefficients,
    contents coprime, positive leading coefficient of Q in lex order of the sorted
    generators), which depends only on the rational function, not on how it is written;
    generators that cancel out do not change the lex leading term. Function values are
    generators as sympy's polys read them (:func:`_generators`), ordered by sympy's own
    ``_sort_gens``; a function whose arguments sympy would rewrite first is left to sympy.
    Held equal (srepr) against sympy on random expressions in tests/kernel/test_rational.py
    and, when added, on every expression the project's models and 150 mutants cancel.
    """
    if not e.free_symbols:
        return None
    f = _in_field(e, atoms=True)
    if f is None:
        return None
    P, Q = f[0].cancel(f[1])
    return P.as_expr() / Q.as_expr()


def sympy_rational(q: Any) -> sp.Rational:
    """A flint ``fmpq`` (or ``fmpz``/int, through ``fmpq``) as a sympy Rational."""
    q = fmpq(q)
    return sp.Rational(int(q.p), int(q.q))


def flint_rational(e: sp.Rational) -> fmpq:
    """A sympy Rational as a flint ``fmpq``."""
    return fmpq(int(e.p), int(e.q))


def matrix_entries(M: sp.Matrix) -> list[sp.Expr]:
    """The entries of a sympy Matrix row by row. (Iterating the Matrix indexes it entry by
    entry, about ten times slower: a third of the quadrotor's zero dynamics went there.)"""
    return [e for row in M.tolist() for e in row]


def flint_matrix(M: sp.Matrix) -> fmpq_mat:
    """A sympy Matrix of rationals as a flint ``fmpq_mat``."""
    return fmpq_mat(M.rows, M.cols, [flint_rational(e) for e in matrix_entries(M)])


def polynomial_text(poly: Any, variable: str = "s") -> str:
    """A flint ``fmpq_poly`` written as sympy writes it, powers with ``^``
    (``s^2 + 3*s/4 - 1``); the zero polynomial is ``0``."""
    coeffs = [sympy_rational(c) for c in reversed(poly.coeffs())]
    return coefficients_text(coeffs, variable) if coeffs else "0"


def coefficients_text(coeffs: Sequence[sp.Expr], variable: str = "s") -> str:
    """The polynomial with these exact coefficients (highest power first) as sympy writes
    it, powers with ``^`` (``s^2 + sqrt(3)/2``)."""
    return str(sp.Poly(list(coeffs), sp.Symbol(variable)).as_expr()).replace("**", "^")


def cancel_together(e: sp.Expr) -> sp.Expr:
    """``sp.cancel(sp.together(e))``: by field arithmetic where e is a rational function
    (:func:`cancel_rational`, the same expression), by sympy otherwise (whose errors,
    such as ``PolynomialError``, reach the caller as before)."""
    out = cancel_rational(e)
    return out if out is not None else sp.cancel(sp.together(e))


def vanishes_identically(c: sp.Expr) -> bool:
    """True when the constant c is zero as a rational function of its non-rational
    parts (each distinct function value, radical or named constant replaced by an
    unknown). Then c = 0 wherever it is defined; False proves nothing."""
    unknowns: dict[sp.Expr, sp.Symbol] = {}

    def generalise(node: sp.Expr) -> sp.Expr:
        if node.is_Rational:
            return node
        if node.is_Add or node.is_Mul or (node.is_Pow and node.exp.is_Integer):
            return node.func(*[generalise(a) for a in node.args])
        s = unknowns.get(node)
        if s is None:
            s = unknowns[node] = sp.Dummy(f"t{len(unknowns)}")
        return s

    if c.free_symbols:
        return False
    e = generalise(c)
    if not unknowns:
        return False
    f = _in_field(e, _FlintField)
    return f is not None and not f[0]


def rational_value(e: sp.Expr, values: dict[sp.Symbol, sp.Expr]) -> sp.Rational | None:
    """``e.xreplace(values)`` when e is built from symbols and rational numbers by +, *
    and integer powers and every symbol has a rational value: the tree evaluated node
    by node in exact rationals (python-flint fmpq), which is what sympy's automatic
    evaluation of the substituted tree computes, without building it. None otherwise,
    and when a node divides by zero (sympy's zoo rules then decide)."""
    memo: dict[sp.Expr, fmpq] = {}

    def value(node: sp.Expr) -> fmpq:
        done = memo.get(node)
        if done is not None:
            return done
        if node.is_Rational:
            out = fmpq(int(node.p), int(node.q))
        elif node.is_Symbol:
            v = values.get(node)
            if v is None or not getattr(v, "is_Rational", False):
                raise _NotRational
            out = fmpq(int(v.p), int(v.q))
        elif node.is_Add:
            out = fmpq(0)
            for a in node.args:
                out += value(a)
        elif node.is_Mul:
            out = fmpq(1)
            for a in node.args:
                out *= value(a)
        elif node.is_Pow and node.exp.is_Integer:
            out = value(node.base) ** int(node.exp)
        else:
            raise _NotRational
        memo[node] = out
        return out

    try:
        q = value(e)
    except (_NotRational, ZeroDivisionError):
        return None
    return sympy_rational(q)


__all__ = ["cancel_rational", "cancel_together", "rational_value", "rational_zero", "sympy_rational",
           "vanishes_identically"]
