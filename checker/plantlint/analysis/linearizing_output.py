"""Searching for a linearizing output: a simple function of the states with relative degree n.

For a single-input plant that passes the state-linearization conditions such an
output exists (it solves L_(ad_f^k g) phi = 0, k <= n-2). Candidates are the
states, then small combinations; each is screened in floating point against
D_(n-2) and only then verified rigorously with Lie-derivative chains, so a
suggestion is never a guess.
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence

import sympy as sp
from flint import arb

from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.lie import Kernel, Vector


#: Relative tolerance of the floating-point prefilter for output candidates
#: (only a prefilter: every candidate kept is then verified rigorously).
CANDIDATE_TOLERANCE = 1e-9
#: Sample points used by the output-candidate prefilter.
CANDIDATE_SAMPLES = 3


class OutputSearch:
    """Simple outputs of relative degree n, screened in floating point against
    D_(n-2) and then verified rigorously with Lie derivative chains."""

    def __init__(self, kernel: Kernel, n: int, low_fields: Sequence[Vector]):
        """``low_fields``: the spanning fields of D_(n-2) (orders 0 .. n-2)."""
        self.kernel = kernel
        self.n = n
        self.low_fields = list(low_fields)
        self._lf: dict[tuple[sp.Expr, int], sp.Expr] = {}
        self._verified: dict[sp.Expr, bool] = {}
        self._screened: list[sp.Expr] | None = None

    def lie_f(self, phi: sp.Expr, k: int) -> sp.Expr:
        """L_f^k phi, memoised per candidate."""
        key = (phi, k)
        if key not in self._lf:
            self._lf[key] = phi if k == 0 else self.kernel.lie(self.lie_f(phi, k - 1), self.kernel.f)
        return self._lf[key]

    def lg_lf(self, phi: sp.Expr, k: int) -> sp.Expr:
        return self.kernel.lie(self.lie_f(phi, k), self.kernel.g[0])

    def first_at(self, values: dict[sp.Symbol, sp.Expr]) -> sp.Expr | None:
        n = self.n
        for phi in self.screened():
            if not self.verified(phi):
                continue
            v = self.kernel.value_at(self.lg_lf(phi, n - 1), values)
            if v.decision.proven_nonzero:
                return phi
        return None

    def verified(self, phi: sp.Expr) -> bool:
        """L_g L_f^k phi identically zero for k < n-1 (proved, not only screened)."""
        if phi not in self._verified:
            ok = True
            for k in range(self.n - 1):
                t = self.kernel.is_zero(self.lg_lf(phi, k))
                if not t.proven_zero:
                    ok = False
                    break
            self._verified[phi] = ok
        return self._verified[phi]

    def screened(self) -> list[sp.Expr]:
        if self._screened is None:
            self._screened = list(self._screen())
        return self._screened

    def _screen(self) -> Iterator[sp.Expr]:
        n = self.n
        fields = self.low_fields
        symbols = self.kernel.free_symbols()
        try:
            program = Program([e for v in fields for e in v], symbols)
        except UnsupportedExpression:
            return  # nothing to screen with: no suggestion
        points: list[tuple[dict[sp.Symbol, sp.Expr], list[list[float]]]] = []
        for sample in self.kernel.samples()[:CANDIDATE_SAMPLES]:
            balls = program.run([arb(sample[s].numerator) / sample[s].denominator for s in symbols], 64)
            if all(b.is_finite() for b in balls):
                floats = [float(b.mid()) for b in balls]
                exact = {s: sp.Rational(sample[s].numerator, sample[s].denominator) for s in symbols}
                points.append((exact, [floats[i * n : (i + 1) * n] for i in range(len(fields))]))
        for phi, gradient in _candidates(self.kernel.plant.states):
            if all(_annihilates(gradient, exact, columns) for exact, columns in points):
                yield phi


def _annihilates(gradient: Vector, point: dict[sp.Symbol, sp.Expr], columns: list[list[float]]) -> bool:
    """Floating-point test of <dphi, X> = 0 at a sample (a prefilter only)."""
    dphi = [float(d.xreplace(point)) for d in gradient]
    for column in columns:
        terms = [a * b for a, b in zip(dphi, column)]
        if abs(sum(terms)) > CANDIDATE_TOLERANCE * max(1.0, sum(abs(t) for t in terms)):
            return False
    return True


def _candidates(states: Sequence[sp.Symbol]) -> Iterator[tuple[sp.Expr, tuple[sp.Expr, ...]]]:
    """States, then x_a +- c x_b and c x_a +- x_b (c = 1, 2, 3), then squares and products,
    then x_a + c x_b^2 (c = +-1, +-1/2), each with its gradient (written down: these
    candidates need no differentiation)."""
    n = len(states)
    zero = sp.Integer(0)

    def gradient(entries: dict[int, sp.Expr]) -> tuple[sp.Expr, ...]:
        return tuple(entries.get(i, zero) for i in range(n))

    for a, s in enumerate(states):
        yield s, gradient({a: sp.Integer(1)})
    weights = [(1, s * c) for c in (1, 2, 3) for s in (1, -1)] + [(c, s) for c in (2, 3) for s in (1, -1)]
    for a in range(n):
        for b in range(a + 1, n):
            for ca, cb in weights:
                yield ca * states[a] + cb * states[b], gradient({a: sp.Integer(ca), b: sp.Integer(cb)})
    for a in range(n):
        for b in range(a, n):
            both = {a: 2 * states[a]} if a == b else {a: states[b], b: states[a]}
            yield states[a] * states[b], gradient(both)
    # a state bent by another's square (x1 - x2^2: a quadratic coordinate change)
    for a in range(n):
        for b in range(n):
            if a != b:
                for c in (sp.Integer(1), sp.Integer(-1), sp.Rational(1, 2), sp.Rational(-1, 2)):
                    yield states[a] + c * states[b] ** 2, gradient({a: sp.Integer(1), b: 2 * c * states[b]})
