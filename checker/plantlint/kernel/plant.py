"""The mathematical plant the analyses work on: dx/dt = f(x) + g(x) u, y = h(x).

A :class:`Plant` is built from a parsed :class:`plantlint.language.model.Model` (or directly
in tests). Everything is an exact sympy object; parameters without a range are
already replaced by their nominal values, parameters with a range stay symbolic
(they are extra dimensions of the envelope) and carry their nominal value in
``param_nominal``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

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
