"""What reading a file and building its expressions share: the functions of the language,
the records of a parsed expression and the helpers that locate and word problems.

No sympy and no lark parser here: :mod:`plantlint.language.syntax` (text to statements)
and :mod:`plantlint.language.expressions` (an expression's exact value) both build on it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from difflib import get_close_matches
from typing import TYPE_CHECKING, Sequence

from lark import Token, Tree

from plantlint.core.catalogue import finding
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
class Expression:
    """A parsed expression: its exact value (names as real symbols) and what it mentions."""

    value: sp.Expr
    span: Span
    names: tuple[NameRef, ...]
    calls: tuple[CallRef, ...]
    #: the parse tree it was built from (read by the unit checker; not part of equality)
    tree: Tree | Token | None = field(default=None, compare=False, repr=False)
    #: singular parts as written (x^(-1), log(x), asin(x), ...) that the exact value no longer
    #: shows: ``x^(-1)*x`` is 1 and ``exp(log(x))`` is x, but as written they are undefined at
    #: x = 0; the domain checks take these parts too
    hidden: tuple[sp.Expr, ...] = ()
    #: calls and powers whose exact value is not smooth although the function is: sqrt(x^2)
    #: is abs(x) for real x (span, what was written, unevaluated; its value)
    kinks: tuple[tuple[Span, sp.Expr, sp.Expr], ...] = ()
    #: calls of numbers outside the function's domain, as written: (span, log(0)) or
    #: (span, sqrt(-1)); the model finding points at them rather than at the whole expression
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
