"""What reading a file and building its expressions share: the functions of the language,
the records of what an expression mentions and of its value, the limits on numbers and
powers, and the helpers that locate and word problems.

No sympy and no lark parser here: :mod:`plantlint.language.syntax` (text to statements)
and :mod:`plantlint.language.expressions` (an expression's exact value) both build on it.
"""

from __future__ import annotations

from dataclasses import dataclass
from difflib import get_close_matches
from fractions import Fraction
from typing import TYPE_CHECKING, Iterator, Sequence

from lark import Token, Tree

from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.limits import MAX_EXPONENT, MAX_LITERAL_DIGITS, MAX_LITERAL_EXP10, MAX_POWER_BITS
from plantlint.core.findings import Finding, Span

if TYPE_CHECKING:
    import sympy as sp

#: Functions of the language: name -> number of arguments (their exact values are built in
#: :mod:`plantlint.language.expressions`).
SMOOTH_FUNCTIONS: dict[str, int] = {
    "sin": 1, "cos": 1, "tan": 1, "asin": 1, "acos": 1, "atan": 1, "atan2": 2,
    "sinh": 1, "cosh": 1, "tanh": 1, "exp": 1, "log": 1, "sqrt": 1,
}
NON_SMOOTH_FUNCTIONS: dict[str, int] = {"abs": 1, "sign": 1, "min": 2, "max": 2, "sat": 3}
FUNCTIONS = {**SMOOTH_FUNCTIONS, **NON_SMOOTH_FUNCTIONS}

class ParseProblem(Exception):
    """A problem that stops reading a statement; carries the findings to report (one, or
    several of one kind found in the same expression, such as two unknown functions)."""

    def __init__(self, finding: Finding, *more: Finding):
        super().__init__(finding.message)
        self.findings = (finding, *more)


@dataclass(frozen=True)
class NameRef:
    name: str
    span: Span


@dataclass(frozen=True)
class CallRef:
    function: str
    span: Span


@dataclass(frozen=True)
class Built:
    """An expression's exact value and its parts as written (see :class:`Expression`)."""

    value: sp.Expr
    hidden: tuple[sp.Expr, ...] = ()
    kinks: tuple[tuple[Span, sp.Expr, sp.Expr], ...] = ()
    undefined_calls: tuple[tuple[Span, sp.Expr], ...] = ()


def syntax_problem(message: str, span: Span | None, hint: str | None = None, anchor: str = "") -> Finding:
    return finding("syntax", message, span, hint=hint, anchor=anchor or message)


def span_of(node: Tree | Token) -> Span:
    if isinstance(node, Token):
        end_line = node.end_line or node.line or 1
        end_col = node.end_column or ((node.column or 1) + len(node))
        return Span(node.line or 1, node.column or 1, end_line, end_col)
    meta = node.meta
    if getattr(meta, "empty", True):
        return Span(1, 1, 1, 2)
    return Span(meta.line, meta.column, meta.end_line, meta.end_column)


def shorten(text: str, limit: int = 40) -> str:
    """A quoted literal cut to a readable length (``2^1000^1000`` has 3,001 digits)."""
    if len(text) <= limit:
        return text
    what = "digits" if text.lstrip("-").isdigit() else "characters"
    return f"{text[: limit - 16]}... ({len(text)} {what})"


def near_miss(name: str, candidates: Sequence[str] | set[str] | frozenset[str]) -> str | None:
    """The candidate a misspelt ``name`` most likely means (same letters in another case
    first, then the closest spelling), or None."""
    pool = sorted(set(candidates) - {name})
    same = [c for c in pool if c.lower() == name.lower()]
    if same:
        return same[0]
    close = get_close_matches(name, pool, n=1, cutoff=0.75 if len(name) <= 3 else 0.6)
    return close[0] if close else None


def operands_first(root: Tree | Token) -> Iterator[Tree | Token]:
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


def number(tok: Token) -> Fraction:
    """A decimal literal as an exact rational (never a binary float), or the problem with it."""
    text = str(tok)
    mantissa, _, exponent = text.lower().partition("e")
    exp10 = int(exponent) if exponent else 0
    digits = mantissa.replace(".", "")
    if abs(exp10) > MAX_LITERAL_EXP10 or len(digits) > MAX_LITERAL_DIGITS:
        raise ParseProblem(syntax_problem(f"number {text[:20]}{'...' if len(text) > 20 else ''} is out of range",
                                          span_of(tok), anchor=anchors.problem("number range")))
    return Fraction(mantissa) * (Fraction(10) ** exp10)


def check_power(base: Fraction | None, exponent: Fraction, span: Span) -> None:
    """Refuse a rational exponent beyond the supported range, and a power of a rational
    number too large to compute exactly (the value builder applies the same limits to
    what it meets as numbers)."""
    big = max(abs(exponent.numerator), exponent.denominator)
    if big > MAX_EXPONENT:
        raise ParseProblem(syntax_problem(f"exponent {shorten(str(exponent))} is beyond the supported range "
                                          f"(|p|, |q| <= {MAX_EXPONENT})", span, anchor=anchors.problem("exponent range")))
    if base is not None:
        bits = max(abs(base.numerator), base.denominator, 1).bit_length()
        if bits * abs(exponent.numerator) > MAX_POWER_BITS:
            raise ParseProblem(syntax_problem("this power of a number is too large to compute exactly", span,
                                              anchor=anchors.problem("power size")))
