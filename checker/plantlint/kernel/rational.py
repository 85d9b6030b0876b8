"""Rational functions with rational coefficients, in the field QQ(p) instead of as
expression trees.

``cancel_rational(e)`` is ``sp.cancel(sp.together(e))`` computed by field arithmetic
(no gcd_terms / factor_terms rewriting of expressions), with the same resulting
expression. ``vanishes_identically(c)`` proves an exact constant zero when it is zero
as a rational function of its transcendental parts (exp(-160/7), sqrt(2), pi taken as
independent unknowns); it never proves a non-zero.
"""

from __future__ import annotations

from typing import Any

import sympy as sp
from flint import fmpq
from sympy.polys.domains import QQ
from sympy.polys.fields import field as sp_field
from sympy.polys.polyutils import _sort_gens


class _NotRational(Exception):
    pass


def _in_field(e: sp.Expr) -> Any | None:
    """e as an element of QQ(gens) (gens: its symbols, sorted as sympy's polys sort
    generators), or None when e is not built from symbols and rational numbers by +, *
    and integer powers, or a denominator vanishes identically."""
    gens = tuple(_sort_gens(list(e.free_symbols)))
    K = sp_field(gens, QQ)[0]
    by_symbol = dict(zip(gens, K.gens))
    memo: dict[sp.Expr, Any] = {}

    def build(node: sp.Expr) -> Any:
        done = memo.get(node)
        if done is not None:
            return done
        if node.is_Symbol:
            out = by_symbol[node]
        elif node.is_Rational:
            out = K(QQ(int(node.p), int(node.q)))
        elif node.is_Add:
            out = build(node.args[0])
            for a in node.args[1:]:
                out = out + build(a)
        elif node.is_Mul:
            out = build(node.args[0])
            for a in node.args[1:]:
                out = out * build(a)
        elif node.is_Pow and node.exp.is_Integer:
            out = build(node.base) ** int(node.exp)
        else:
            raise _NotRational
        memo[node] = out
        return out

    try:
        return build(e)
    except (_NotRational, ZeroDivisionError):
        return None


def cancel_rational(e: sp.Expr) -> sp.Expr | None:
    """``sp.cancel(sp.together(e))`` for a rational function e of its symbols with
    rational coefficients; None otherwise (the caller takes sympy's route).

    The result is the same expression: sympy's cancel ends in ``P/Q`` with (P, Q) the
    coprime pair from ``PolyElement.cancel`` over ZZ or QQ (integer coefficients,
    contents coprime, positive leading coefficient of Q in lex order of the sorted
    generators), which depends only on the rational function, not on how it is written;
    generators that cancel out do not change the lex leading term.
    """
    if not e.free_symbols:
        return None
    f = _in_field(e)
    if f is None:
        return None
    P, Q = f.numer.cancel(f.denom)
    if not Q:
        return None
    return P.as_expr() / Q.as_expr()


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
    f = _in_field(e)
    return f is not None and not f.numer


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
    return sp.Rational(int(q.p), int(q.q))


__all__ = ["cancel_rational", "rational_value", "vanishes_identically"]
