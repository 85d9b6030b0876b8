"""Exact values of parsed expressions: sympy trees built from the parse tree.

:mod:`plantlint.language.syntax` reads text into statements, and what each expression
mentions, without sympy. An expression's value is built here on first use, node by node
from its parse tree (never from the text), with its parts as written (``hidden``,
``kinks``, ``undefined_calls``) for the domain and smoothness checks. A file that does
not parse, or whose names do not resolve, never gets here, so it is reported without
importing sympy.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Callable, TypeVar, Union

import sympy as sp
from lark import Token, Tree

from plantlint.core.findings import Span
from plantlint.language.source import SMOOTH_FUNCTIONS, Built, check_power, number, operands_first, span_of


def build_value(root: Tree | Token) -> Built:
    """The exact value of an expression subtree and its parts as written."""
    return _ExpressionBuilder().build(root)


def symbol(name: str) -> sp.Symbol:
    """The sympy symbol for a model name (all model quantities are real)."""
    return sp.Symbol(name, real=True)




#: The exact value of each function of the language (its arity is in ``source.FUNCTIONS``).
VALUES: dict[str, Callable[..., sp.Expr]] = {
    "sin": sp.sin, "cos": sp.cos, "tan": sp.tan, "asin": sp.asin, "acos": sp.acos, "atan": sp.atan,
    "atan2": sp.atan2, "sinh": sp.sinh, "cosh": sp.cosh, "tanh": sp.tanh, "exp": sp.exp, "log": sp.log,
    "sqrt": sp.sqrt, "abs": sp.Abs, "sign": sp.sign, "min": sp.Min, "max": sp.Max,
    "sat": lambda x, lo, hi: sp.Min(sp.Max(x, lo), hi),
}
#: Functions undefined (or not smooth) somewhere on the reals, whose domain the analysis checks.
_SINGULAR_FUNCTIONS = frozenset({"sqrt", "log", "asin", "acos", "tan", "atan2"})
#: What a kink looks like in an exact value.
_KINKED = (sp.Abs, sp.sign, sp.Min, sp.Max, sp.Heaviside, sp.Piecewise)


#: What an expression node stands for while its parent is being built: an exact value,
#: or the terms of a sum / factors of a product still being collected.
_Value = Union[sp.Expr, "_Terms", "_Factors"]
_Chain = TypeVar("_Chain", "_Terms", "_Factors")


class _ExpressionBuilder:
    """Builds one expression's exact value from its parse tree, node by node, without
    recursion (deep input cannot overflow the stack here; parentheses and runs of signs
    are limited to MAX_DEPTH on the text, before parsing).

    It builds only trees that the walk which read the expression's names
    (:func:`plantlint.language.syntax.mentions`) accepted, in that walk's order: every
    function is known and has its arguments, every name and number is within its
    limits. What only a value shows (a power of numbers reached through a function) is
    refused here, as a :class:`ParseProblem` the model build reports.
    """

    def __init__(self) -> None:
        self.values: dict[int, _Value] = {}  # by id(): tokens compare equal by their text
        self.singular: list[sp.Expr] = []  # singular parts as built (see Built.hidden)
        self.kinks: list[tuple[Span, sp.Expr, sp.Expr]] = []
        self.undefined_calls: list[tuple[Span, sp.Expr]] = []

    def build(self, root: Tree | Token) -> Built:
        for node in operands_first(root):
            self.values[id(node)] = _number(node) if isinstance(node, Token) else self._RULES[node.data](self, node)
        value = _done(self.values[id(root)])
        hidden: tuple[sp.Expr, ...] = ()
        if self.singular:
            shown = set(sp.preorder_traversal(value))
            hidden = tuple(p for p in dict.fromkeys(self.singular) if p not in shown)
        return Built(value, hidden, tuple(self.kinks), tuple(self.undefined_calls))

    def _singular(self, part: sp.Expr) -> None:
        """Remember a part that is undefined somewhere as written (it may be simplified away)."""
        if part.free_symbols:
            self.singular.append(part)

    def _smooth_or_kink(self, written: Callable[[], sp.Expr], args: list[sp.Expr], value: sp.Expr, span: Span) -> None:
        """A smooth function whose exact value has a kink its arguments do not have."""
        if value.has(*_KINKED) and not any(a.has(*_KINKED) for a in args):
            self.kinks.append((span, written(), value))

    def _built(self, node: Tree | Token) -> sp.Expr:
        """The value of an operand (visited already), a collected sum or product built."""
        return _done(self.values[id(node)])

    # one method per kind of node in the grammar ------------------------------------
    def _number_node(self, node: Tree) -> _Value:
        return self.values[id(node.children[0])]

    def _name(self, node: Tree) -> sp.Expr:
        name = str(node.children[0])
        if name == "pi":
            return sp.pi
        return symbol(name)

    def _call(self, node: Tree) -> sp.Expr:
        fname_tok, *arg_nodes = node.children
        fname = str(fname_tok)
        args = [self._built(a) for a in arg_nodes if a is not None]
        span = span_of(node)
        value = VALUES[fname](*args)
        as_written = ((lambda: sp.Pow(args[0], sp.Rational(1, 2), evaluate=False)) if fname == "sqrt"
                      else (lambda: getattr(sp, fname)(*args, evaluate=False)))
        if fname in _SINGULAR_FUNCTIONS:
            self._singular(as_written() if fname == "sqrt" else value)
            if not value.free_symbols and (value.has(sp.zoo, sp.nan) or value.is_extended_real is False):
                self.undefined_calls.append((span, as_written()))
        if fname in SMOOTH_FUNCTIONS:
            self._smooth_or_kink(as_written, args, value, span)
        return value

    def _neg(self, node: Tree) -> sp.Expr:
        return -self._built(node.children[0])

    def _pos(self, node: Tree) -> sp.Expr:
        return self._built(node.children[0])

    # chains of + - (and of * /) are collected and built in one step: building them
    # pairwise costs time quadratic in their length
    def _add(self, node: Tree) -> _Terms:
        terms, b = self._collected(node, _Terms)
        terms.append(b)
        return terms

    def _sub(self, node: Tree) -> _Terms:
        terms, b = self._collected(node, _Terms)
        terms.append(-b)
        return terms

    def _mul(self, node: Tree) -> _Factors:
        factors, b = self._collected(node, _Factors)
        factors.append(b)
        return factors

    def _div(self, node: Tree) -> _Factors:
        factors, b = self._collected(node, _Factors)
        factors.append(sp.Pow(b, -1))
        self._singular(sp.Pow(b, -1, evaluate=False))
        return factors

    def _collected(self, node: Tree, chain: type[_Chain]) -> tuple[_Chain, sp.Expr]:
        """The left operand as a chain of terms or factors (extended in place when it is
        one already) and the right operand's value."""
        left, right = node.children
        a, b = self.values[id(left)], self._built(right)
        return (a if isinstance(a, chain) else chain([_done(a)])), b

    def _pow(self, node: Tree) -> sp.Expr:
        base, exponent = node.children
        b, e = self._built(base), self._built(exponent)
        value = _power(b, e, span_of(node))
        if e.is_Rational and (e.is_negative or not e.is_Integer):
            self._singular(sp.Pow(b, e, evaluate=False))
            self._smooth_or_kink(lambda: sp.Pow(b, e, evaluate=False), [b], value, span_of(node))
        return value

    _RULES: dict[str, Callable[["_ExpressionBuilder", Tree], _Value]] = {
        "number": _number_node, "name": _name, "call": _call, "neg": _neg, "pos": _pos,
        "add": _add, "sub": _sub, "mul": _mul, "div": _div, "pow": _pow,
    }


class _Terms(list):  # type: ignore[type-arg]
    """Terms of a sum not yet built (each tree node has one parent, so it is extended in place)."""


class _Factors(list):  # type: ignore[type-arg]
    """Factors of a product not yet built."""


def _done(value: sp.Expr | _Terms | _Factors) -> sp.Expr:
    """The sympy value of a node, building a collected sum or product."""
    if isinstance(value, _Terms):
        return sp.Add(*value)
    if isinstance(value, _Factors):
        return sp.Mul(*value)
    return value


def _number(tok: Token) -> sp.Rational:
    """A decimal literal as an exact rational (never a binary float)."""
    value = number(tok)
    return sp.Rational(value.numerator, value.denominator)


def _power(base: sp.Expr, exponent: sp.Expr, span: Span) -> sp.Expr:
    if exponent.is_Number and exponent.is_Rational:
        check_power(Fraction(int(base.p), int(base.q)) if base.is_Number and base.is_Rational else None,
                    Fraction(int(exponent.p), int(exponent.q)), span)
    return base ** exponent
