"""The mathematical plant the analyses work on: dx/dt = f(x) + g(x) u, y = h(x).

A :class:`Plant` is built from a parsed :class:`plantlint.language.model.Model` (or directly
in tests). Everything is an exact sympy object; parameters without a range are
already replaced by their nominal values, parameters with a range stay symbolic
(they are extra dimensions of the envelope) and carry their nominal value in
``param_nominal``.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import sympy as sp


@dataclass(frozen=True)
class Plant:
    name: str
    states: tuple[sp.Symbol, ...]
    inputs: tuple[sp.Symbol, ...]
    f: tuple[sp.Expr, ...]  # drift, one entry per state
    g: tuple[tuple[sp.Expr, ...], ...]  # g[j] is the input vector field of input j (n entries)
    outputs: tuple[str, ...]  # output names
    h: tuple[sp.Expr, ...]  # one expression per output, in the states (and ranged params)
    params: tuple[sp.Symbol, ...] = ()  # parameters kept symbolic (they have a range)
    param_nominal: dict[sp.Symbol, sp.Expr] = field(default_factory=dict)
    param_box: dict[sp.Symbol, tuple[sp.Expr, sp.Expr]] = field(default_factory=dict)
    state_box: dict[sp.Symbol, tuple[sp.Expr, sp.Expr]] = field(default_factory=dict)
    input_box: dict[sp.Symbol, tuple[sp.Expr, sp.Expr]] = field(default_factory=dict)
    #: (rate or output anchor, part): singular parts as written that f, g and h no longer show
    #: (x^(-1)*x is 1, exp(log(x)) is x); the domain checks take them as well
    hidden: tuple[tuple[str, sp.Expr], ...] = ()
    #: f, g and h as written, read from the parse tree without sympy
    #: (:class:`plantlint.language.written.WrittenPlant`), and the (f, g, h) above it was read
    #: beside: a plant made from this one with another f (``dataclasses.replace``) no longer
    #: pairs with it (see :meth:`as_written`)
    written: Any = field(default=None, compare=False, repr=False)
    written_for: tuple[Any, ...] = field(default=(), compare=False, repr=False)

    def as_written(self) -> Any:
        """The plant as written when it is this plant's (the same f, g and h objects it was
        read beside); None otherwise."""
        if self.written is None or len(self.written_for) != 3:
            return None
        f, g, h = self.written_for
        return self.written if (f is self.f and g is self.g and h is self.h) else None

    @property
    def n(self) -> int:
        return len(self.states)

    @property
    def m(self) -> int:
        return len(self.inputs)

    @property
    def p(self) -> int:
        return len(self.h)

    def rates(self) -> tuple[sp.Expr, ...]:
        """F(x, u) = f(x) + g(x) u, reassembled."""
        return tuple(
            self.f[i] + sum((self.g[j][i] * self.inputs[j] for j in range(self.m)), sp.Integer(0))
            for i in range(self.n)
        )

    def nominal(self, expr: sp.Expr) -> sp.Expr:
        """``expr`` with ranged parameters at their nominal values."""
        if not self.param_nominal:
            return expr
        return expr.xreplace(self.param_nominal)


    @classmethod
    def from_matrices(
        cls,
        name: str,
        states: list[sp.Symbol],
        inputs: list[sp.Symbol],
        f: list[sp.Expr],
        g_columns: list[list[sp.Expr]],
        h: list[sp.Expr],
        outputs: list[str] | None = None,
        **kwargs: object,
    ) -> "Plant":
        """Convenience constructor for tests and generators."""
        return cls(
            name=name,
            states=tuple(states),
            inputs=tuple(inputs),
            f=tuple(as_expr(e) for e in f),
            g=tuple(tuple(as_expr(e) for e in col) for col in g_columns),
            outputs=tuple(outputs or [f"y{i + 1}" for i in range(len(h))]),
            h=tuple(as_expr(e) for e in h),
            **kwargs,  # type: ignore[arg-type]
        )


def as_expr(value: object) -> sp.Expr:
    """Turn a Python number or a sympy object into a sympy expression.

    Strings are refused on purpose: text never becomes an expression except
    through the parse tree.
    """
    if isinstance(value, sp.Basic):
        return value  # type: ignore[return-value]
    if isinstance(value, bool):
        raise TypeError("booleans are not expressions")
    if isinstance(value, int):
        return sp.Integer(value)
    from fractions import Fraction

    if isinstance(value, Fraction):
        return sp.Rational(value.numerator, value.denominator)
    if isinstance(value, float):
        return sp.Float(value)
    raise TypeError(f"cannot make an expression from {type(value).__name__}")
