"""Exact values of parsed expressions: sympy trees built from the parse tree.

:mod:`plantlint.language.syntax` reads text into statements without sympy; each
expression's value is built here, node by node from its parse tree (never from the
text), with the names and calls it mentions and its parts as written (``hidden``,
``kinks``, ``undefined_calls``) for the domain and smoothness checks. A file that
does not parse never gets here, so it is reported without importing sympy.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Callable, Iterator, TypeVar, Union

import sympy as sp
from lark import Token, Tree

from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.limits import MAX_EXPONENT, MAX_LITERAL_DIGITS, MAX_LITERAL_EXP10, MAX_NAME, MAX_POWER_BITS
from plantlint.core.findings import Finding, Span
from plantlint.language.source import (FUNCTIONS, SMOOTH_FUNCTIONS, CallRef, Expression, NameRef, ParseProblem,
                                       near_miss, shorten, span_of, syntax_problem)


def build_expression(root: Tree | Token) -> Expression:
    """The exact value of an expression subtree, with what it mentions."""
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

    Nodes are visited after their operands, which come off a stack: the last operand
    first. That order is part of the behaviour. Unknown functions are collected (every
    one is named, in source order); of two other problems in one expression the last is
    reported, and ``names`` and ``calls`` list the last mention first, which decides the mention a model finding points at (the first
    offending name in ``names``).

    lark's ``Transformer_NonRecursive`` was tried in its place: no recursion either, the
    same spans (node spans through ``v_args(meta=True)``) and the same time within the
    noise of measurement (the largest benchmark models, a 9,000-term sum), but it visits
    left to right. The lists can be put back in this order afterwards; which of two
    other problems is reported cannot, and every problem would come wrapped in a
    ``VisitError``. So the walk stays here, small and explicit.
    """

    def __init__(self) -> None:
        self.names: list[NameRef] = []
        self.calls: list[CallRef] = []
        self.values: dict[int, _Value] = {}  # by id(): tokens compare equal by their text
        self.unknown: list[Finding] = []  # unknown functions: every one is reported, in order
        self.singular: list[sp.Expr] = []  # singular parts as built (see Expression.hidden)
        self.kinks: list[tuple[Span, sp.Expr, sp.Expr]] = []
        self.undefined_calls: list[tuple[Span, sp.Expr]] = []

    def build(self, root: Tree | Token) -> Expression:
        for node in _operands_first(root):
            self.values[id(node)] = self._token(node) if isinstance(node, Token) else self._node(node)
        if self.unknown:
            first, *rest = sorted(self.unknown, key=lambda f: (f.span.line, f.span.column) if f.span else (0, 0))
            raise ParseProblem(first, *rest)
        value = _done(self.values[id(root)])
        hidden: tuple[sp.Expr, ...] = ()
        if self.singular:
            shown = set(sp.preorder_traversal(value))
            hidden = tuple(p for p in dict.fromkeys(self.singular) if p not in shown)
        return Expression(value, span_of(root), tuple(self.names), tuple(self.calls), root, hidden, tuple(self.kinks),
                          tuple(self.undefined_calls))

    def _singular(self, part: sp.Expr) -> None:
        """Remember a part that is undefined somewhere as written (it may be simplified away)."""
        if part.free_symbols:
            self.singular.append(part)

    def _smooth_or_kink(self, written: Callable[[], sp.Expr], args: list[sp.Expr], value: sp.Expr, span: Span) -> None:
        """A smooth function whose exact value has a kink its arguments do not have."""
        if value.has(*_KINKED) and not any(a.has(*_KINKED) for a in args):
            self.kinks.append((span, written(), value))

    def _token(self, tok: Token) -> sp.Expr:
        if tok.type == "NUMBER":
            return _number(tok)
        raise ParseProblem(syntax_problem(f"unexpected '{shorten(str(tok))}'", span_of(tok)))

    def _node(self, node: Tree) -> _Value:
        rule = self._RULES.get(node.data)
        if rule is None:
            raise ParseProblem(syntax_problem(f"cannot read {node.data}", span_of(node)))
        return rule(self, node)

    def _built(self, node: Tree | Token) -> sp.Expr:
        """The value of an operand (visited already), a collected sum or product built."""
        return _done(self.values[id(node)])

    # one method per kind of node in the grammar ------------------------------------
    def _number_node(self, node: Tree) -> _Value:
        return self.values[id(node.children[0])]

    def _name(self, node: Tree) -> sp.Expr:
        tok = node.children[0]
        name = str(tok)
        if len(name) > MAX_NAME:
            raise ParseProblem(syntax_problem(f"name of {len(name)} characters; names are limited to {MAX_NAME}",
                                       span_of(tok), anchor=anchors.problem("long name")))
        if name == "pi":
            return sp.pi
        self.names.append(NameRef(name, span_of(tok)))
        return symbol(name)

    def _call(self, node: Tree) -> sp.Expr:
        fname_tok, *arg_nodes = node.children
        fname = str(fname_tok)
        args = [self._built(a) for a in arg_nodes if a is not None]
        span = span_of(node)
        self.calls.append(CallRef(fname, span))
        entry = FUNCTIONS.get(fname)
        if entry is None:
            # recorded, and the walk goes on (with a stand-in value) so that every unknown
            # function of the expression is named, not only one
            close = near_miss(fname, FUNCTIONS)
            self.unknown.append(finding(
                "unknown-name", f"unknown function '{fname}'", span_of(fname_tok),
                hint=f"did you mean `{close}`?" if close else "functions: " + ", ".join(sorted(FUNCTIONS)),
                anchor=anchors.problem(f"function {fname}")))
            return sp.Integer(0)
        arity, fn = entry, VALUES[fname]
        if len(args) != arity:
            raise ParseProblem(syntax_problem(f"{fname} takes {arity} argument{'s' if arity > 1 else ''}, got {len(args)}", span))
        value = fn(*args)
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


def _operands_first(root: Tree | Token) -> Iterator[Tree | Token]:
    """Every node under ``root``, each after its operands, without recursion; operands
    come off a stack, the last first. The name token of a ``name`` or ``call`` node is
    part of that node, not an operand."""
    stack: list[tuple[Tree | Token, bool]] = [(root, False)]
    while stack:
        node, expanded = stack.pop()
        if expanded or isinstance(node, Token):
            yield node
            continue
        stack.append((node, True))
        named = node.data in ("call", "name")
        for child in node.children:
            if child is not None and not (named and isinstance(child, Token)):
                stack.append((child, False))


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
    text = str(tok)
    mantissa, _, exponent = text.lower().partition("e")
    exp10 = int(exponent) if exponent else 0
    digits = mantissa.replace(".", "")
    if abs(exp10) > MAX_LITERAL_EXP10 or len(digits) > MAX_LITERAL_DIGITS:
        raise ParseProblem(syntax_problem(f"number {text[:20]}{'...' if len(text) > 20 else ''} is out of range", span_of(tok), anchor=anchors.problem("number range")))
    value = Fraction(mantissa) * (Fraction(10) ** exp10)
    return sp.Rational(value.numerator, value.denominator)


def _power(base: sp.Expr, exponent: sp.Expr, span: Span) -> sp.Expr:
    if exponent.is_Number:
        if exponent.is_Rational:
            big = max(abs(int(exponent.p)), abs(int(exponent.q)))
            if big > MAX_EXPONENT:
                raise ParseProblem(syntax_problem(f"exponent {shorten(str(exponent))} is beyond the supported range "
                                           f"(|p|, |q| <= {MAX_EXPONENT})", span, anchor=anchors.problem("exponent range")))
        if base.is_Number and base.is_Rational:
            bits = max(abs(int(base.p)), abs(int(base.q)), 1).bit_length()
            if bits * abs(int(exponent.p)) > MAX_POWER_BITS:
                raise ParseProblem(syntax_problem("this power of a number is too large to compute exactly", span, anchor=anchors.problem("power size")))
    return base ** exponent
