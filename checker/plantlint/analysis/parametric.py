"""Verdicts over the parameter box: does a property of an operating point hold for
every value of the ranged parameters, or only at their nominal values?

A ranged parameter (``param gam1 = 0.7 in 0.3 .. 0.9``) is part of every claim. At
each operating point, with p the ranged parameters:

* the point follows p: states and inputs written in terms of parameters keep them
  symbolic, and the inputs the author left out are solved exactly as functions of p
  (F(x0(p), u) is affine in u); the point is an equilibrium over the box when every
  residual vanishes identically in p, otherwise a parameter value where a rate is
  certainly non-zero is the witness;
* the decoupling matrix at x0(p): det A (or the p x p minors) certified non-zero
  over the box by branch and bound, or a witness;
* the zero dynamics: their linearisation at an equilibrium is the zero dynamics of
  the linearisation (Isidori, Nonlinear Control Systems, 3rd ed., sec. 4.3, from
  memory), whose characteristic polynomial is the Rosenbrock determinant
  det [[sI - A(p), -B(p)], [C(p), 0]] (leading coefficient det A_dec). Its
  Lienard-Chipart conditions (:mod:`plantlint.kernel.hurwitz`) are certified
  positive over the box, or a witness is found and re-checked exactly by the
  point analysis of :mod:`plantlint.analysis.zero_dynamics` at that parameter value;
* the controllability rank at the point: n Kalman columns independent at the
  nominal values, their determinant certified non-zero over the box, or a witness
  where the exact rank of the whole Kalman matrix drops.

Every outcome is ``proven``, ``violated`` (with an exact witness), ``undecided``
(the budget ran out) or ``nominal_only`` (the parametric form could not be built;
the reason is said in words). Nothing undecided is rounded to a verdict.
"""

from __future__ import annotations

import itertools
import time
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any, Callable, Sequence

import flint
import sympy as sp
from flint import arb

from plantlint.analysis.equilibria import Equilibrium
from plantlint.analysis.zero_dynamics import ZeroDynamics, show_eigenvalues, zero_dynamics_at
from plantlint.core.deadline import TimeUp, expired, within
from plantlint.core.findings import Finding, Severity
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.exact import laplace_det, number_decider, rank as exact_rank
from plantlint.kernel.hurwitz import certify_hurwitz, lienard_chipart
from plantlint.kernel.intervals import Budget, EnvelopeVerdict, certify_nonzero, certify_sign
from plantlint.kernel.lie import Kernel, confirm_zero, random_samples
from plantlint.language.printer import show_expr, show_number

OUTCOMES = ("proven", "violated", "undecided", "nominal_only")
#: Expressions larger than this (operations) are not brought over a common denominator.
TIDY_OPS = 1500
#: Largest Rosenbrock pencil (n + m) and Kalman matrix (n) formed symbolically.
MAX_PENCIL = 10
MAX_KALMAN = 6
#: Random parameter values tried (after the corners) when looking for a residual witness.
SCREEN_VALUES = 12
#: Boundary factors are looked for only in expressions up to this size.
BOUNDARY_OPS = 600
#: Seconds granted beyond the model's box budget for the symbolic steps of one check.
SYMBOLIC_SLACK = 1.0


@dataclass(frozen=True)
class BoxVerdict:
    """One property of one point over the parameter box."""

    outcome: str  # one of OUTCOMES
    detail: str  # in words, for messages and the JSON report
    witness: dict[str, sp.Expr] | None = None  # exact parameter values
    witness_verdict: str | None = None  # what the property is at the witness
    witness_eigenvalues: tuple[complex, ...] = ()
    boundary: str | None = None  # e.g. "gam1 + gam2 < 1" (where the property fails)
    crossing: dict[str, float] | None = None  # where the segment nominal -> witness crosses it

    @property
    def decided(self) -> bool:
        return self.outcome in ("proven", "violated")


@dataclass
class ParametricPoint:
    """The box verdicts of one operating point."""

    point: str
    box: dict[str, tuple[sp.Expr, sp.Expr]]
    values: dict[sp.Symbol, sp.Expr] = field(default_factory=dict)  # x0(p), u0(p)
    equilibrium: BoxVerdict | None = None
    decoupling: BoxVerdict | None = None
    zero_dynamics: BoxVerdict | None = None
    controllability: BoxVerdict | None = None
    rows: dict[str, BoxVerdict] = field(default_factory=dict)  # per output: its relative degree at the point
    findings: list[Finding] = field(default_factory=list)
    params: "_Params | None" = field(default=None, repr=False, compare=False)
    solved: tuple[sp.Symbol, ...] = ()  # inputs solved as functions of the parameters


class _NominalOnly(Exception):
    """The parametric form could not be built; the message says why."""


@dataclass
class _Clock:
    """One budget for every certification of a model (boxes and seconds)."""

    deadline: float
    boxes_left: int

    def budget(self) -> Budget:
        return Budget(max(self.boxes_left, 1), max(self.deadline - time.perf_counter(), 0.0))

    def spent(self, v: EnvelopeVerdict) -> EnvelopeVerdict:
        self.boxes_left -= v.boxes_examined
        return v


def clock(seconds: float, boxes: int) -> _Clock:
    return _Clock(time.perf_counter() + seconds, boxes)


# -- expressions in the parameters ---------------------------------------------------------
class _Params:
    """The ranged parameters, their box and helpers to keep expressions in p small."""

    def __init__(self, kernel: Kernel, timer: _Clock):
        plant = kernel.plant
        self.kernel = kernel
        self.symbols = tuple(plant.params)
        self.box = {s: plant.param_box[s] for s in self.symbols if s in plant.param_box}
        self.nominal = dict(plant.param_nominal)
        self.clock = timer
        self._signs: dict[sp.Expr, sp.Expr | None] = {}

    def tidy(self, e: sp.Expr) -> sp.Expr:
        """Absolute values resolved by certified signs, then a common denominator when
        the expression is a rational function of p (with numeric radicals)."""
        e = self.resolve_signs(_factor_radicands(sp.sympify(e)))
        if e.is_Number or sp.count_ops(e) > TIDY_OPS or _has_symbolic_functions(e):
            return e
        try:
            out = sp.cancel(sp.together(e))
        except (sp.PolynomialError, ValueError, TypeError):
            return e
        return out if sp.count_ops(out) <= sp.count_ops(e) + 20 else e

    def resolve_signs(self, e: sp.Expr) -> sp.Expr:
        """|a| -> a or -a where the sign of a is certified on the box (sqrt of a square
        in real symbols gives |a|); otherwise the box cannot be covered."""
        while True:
            nodes = sorted(e.atoms(sp.Abs), key=sp.count_ops)
            if not nodes:
                return e
            node = nodes[0]
            arg = node.args[0]
            if arg not in self._signs:
                self._signs[arg] = self._signed(arg)
            rep = self._signs[arg]
            if rep is None:
                raise _NominalOnly(f"the sign of {show_expr(arg, 60)} is not constant (or not certified) on the "
                                   "parameter box")
            e = e.xreplace({node: rep})

    def _signed(self, a: sp.Expr) -> sp.Expr | None:
        if a.free_symbols - set(self.symbols):
            return None
        for candidate in (a, -a):
            try:
                v = self.clock.spent(certify_sign(candidate, self.box, False, self.clock.budget()))
            except UnsupportedExpression:
                return None
            if v.regular:
                return candidate
        return None

    def at(self, e: sp.Expr, values: dict[sp.Symbol, sp.Expr]) -> sp.Expr:
        return e.xreplace(values) if e.free_symbols else e

    def ball(self, e: sp.Expr, values: dict[sp.Symbol, sp.Expr], prec: int = 128) -> arb:
        """A rigorous ball for e at exact parameter values."""
        exact = e.xreplace(values)
        if exact.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
            return arb("nan")
        try:
            return Program([exact], []).run([], prec=prec)[0]
        except (UnsupportedExpression, ZeroDivisionError, ValueError):
            return arb("nan")

    def candidates(self) -> list[dict[sp.Symbol, sp.Expr]]:
        """Corners, the centre, then reproducible random values of the box (exact)."""
        syms = [s for s in self.symbols if s in self.box]
        out: list[dict[sp.Symbol, sp.Expr]] = []
        if len(syms) <= 4:
            for corner in itertools.product(*[self.box[s] for s in syms]):
                out.append(dict(zip(syms, corner)))
        out.append({s: (self.box[s][0] + self.box[s][1]) / 2 for s in syms})
        seed = int(self.kernel.seed) % (2**32)
        for sample in random_samples(syms, self.box, seed, count=SCREEN_VALUES):
            out.append({s: sp.Rational(v.numerator, v.denominator) for s, v in sample.items()})
        return out

    def named(self, values: dict[sp.Symbol, sp.Expr]) -> dict[str, sp.Expr]:
        return {str(s): values[s] for s in self.symbols if s in values}


def _factor_radicands(e: sp.Expr) -> sp.Expr:
    """sqrt(c*a^2) becomes sqrt(c)*|a| (real symbols) only when the radicand is
    factored; a multiplied-out square hides it."""
    swap = {}
    for node in e.atoms(sp.Pow):
        if node.exp.is_Rational and not node.exp.is_Integer and node.base.free_symbols \
                and node.base.is_Add and sp.count_ops(node.base) <= 200:
            try:
                base = sp.factor(node.base)
            except (sp.PolynomialError, ValueError, TypeError):
                continue
            if base != node.base:
                swap[node] = sp.Pow(base, node.exp)
    return e.xreplace(swap) if swap else e


def _has_symbolic_functions(e: sp.Expr) -> bool:
    for node in sp.preorder_traversal(e):
        if isinstance(node, sp.Function) and node.free_symbols:
            return True
        if node.is_Pow and not node.exp.is_Integer and node.base.free_symbols:
            return True
    return False


def _show_boxes(v: EnvelopeVerdict) -> str:
    return "; ".join(", ".join(f"{k} in [{lo:.6g}, {hi:.6g}]" for k, (lo, hi) in b.items()) for b in v.undecided[:2])


def show_values(values: dict[str, sp.Expr]) -> str:
    return ", ".join(f"{k} = {show_number(v)}" for k, v in values.items())


# -- the analysis of one point ------------------------------------------------------------------
def box_point(
    kernel: Kernel,
    degrees: Sequence[int | None],
    decoupling: sp.Matrix | None,
    name: str,
    eq: Equilibrium,
    written: dict[sp.Symbol, sp.Expr],
    decoupling_defined: bool,
    timer: _Clock,
) -> ParametricPoint | None:
    """The point over the box: equilibrium and decoupling matrix (the points stage).
    None when the plant has no ranged parameter or the point is no equilibrium at all.

    ``written`` holds the point's values as written (ranged parameters kept symbolic);
    ``eq`` is the nominal equilibrium, whose solved inputs are solved again in p.
    """
    plant = kernel.plant
    if not plant.params or not eq.equilibrium:
        return None
    params = _Params(kernel, timer)
    out = ParametricPoint(name, {str(s): b for s, b in params.box.items()}, params=params)
    found: list[dict[sp.Symbol, sp.Expr] | None] = [None]

    def equilibrium() -> BoxVerdict:
        verdict, found[0] = _equilibrium(params, eq, written, name)
        return verdict

    out.equilibrium = _bounded(params, equilibrium)
    values = found[0]
    out.values = values or {}
    out.solved = tuple(u for u in eq.solved_inputs if u in out.values)
    _report_equilibrium(out, params, name)
    ints = [int(d) for d in degrees if d is not None]
    if decoupling is not None and decoupling_defined and len(ints) == plant.p:
        # the relative degree at the point needs the states x0(p), not an equilibrium
        if values is None:
            out.decoupling = BoxVerdict(out.equilibrium.outcome, out.equilibrium.detail)
        else:
            out.decoupling = _guarded(params, lambda: _decoupling(params, decoupling, values))
        out.rows = _rows(params, decoupling, values, out.decoupling)
        _report_decoupling(out, params, name)
    return out


def _rows(params: _Params, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr] | None,
          decoupling: BoxVerdict) -> dict[str, BoxVerdict]:
    """The relative degree of each output at the point over the box: its row of A must
    not vanish (implied when det A does not; one output: the same question)."""
    outputs = params.kernel.plant.outputs
    if len(outputs) == 1 or values is None:
        return {o: decoupling for o in outputs}
    if decoupling.outcome == "proven":
        return {o: BoxVerdict("proven", "implied by the nonsingular decoupling matrix") for o in outputs}
    return {o: _guarded(params, lambda i=i: _row(params, A, values, i)) for i, o in enumerate(outputs)}


def _row(params: _Params, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr], i: int) -> BoxVerdict:
    plant = params.kernel.plant
    at = {s: values[s] for s in plant.states}
    exprs = [e for e in (params.tidy(x.xreplace(at)) for x in A.row(i)) if e != 0] or [sp.Integer(0)]
    v = params.clock.spent(certify_nonzero(exprs, params.box, params.clock.budget()))
    if v.regular:
        return BoxVerdict("proven", f"the row of {plant.outputs[i]} in A is non-zero over the whole box")
    if v.regular is None:
        return BoxVerdict("undecided", f"the row of {plant.outputs[i]} in A could not be certified non-zero "
                          f"over the box within the budget (e.g. {_show_boxes(v)})")
    w = _exact_point(params, v.witness or {})
    for candidate in [w, *_snapped(params, v.witness or {})]:
        if all(sp.cancel(e.xreplace(candidate)) == 0 for e in exprs):
            return BoxVerdict("violated", f"the row of {plant.outputs[i]} in A vanishes at "
                              f"{show_values(params.named(candidate))} (exactly)", params.named(candidate), "undefined")
    return BoxVerdict("undecided", f"the row of {plant.outputs[i]} in A comes close to zero near "
                      f"{show_values(params.named(w))} but a common zero is not proven")


def box_zero_dynamics(out: ParametricPoint | None, degrees: Sequence[int], zero_dynamics: ZeroDynamics | None
                      ) -> list[Finding]:
    """Minimum phase over the box (the zero-dynamics stage); returns the new findings."""
    if out is None or zero_dynamics is None or zero_dynamics.verdict in ("undefined", "not_applicable"):
        return []
    params = out.params
    assert params is not None
    before = len(out.findings)
    if zero_dynamics.verdict != "minimum_phase":
        out.zero_dynamics = BoxVerdict("violated", "the nominal parameter values are already a witness",
                                       params.named(params.nominal), zero_dynamics.verdict,
                                       zero_dynamics.eigenvalues)
        return []
    values = out.values or None
    out.zero_dynamics = _guarded(params, lambda: _zero_dynamics(params, list(degrees), values, out, out.point),
                                 out.equilibrium, out.decoupling)
    _report_zero_dynamics(out, params, out.point)
    return out.findings[before:]


def box_controllability(out: ParametricPoint | None, controllability_rank: int | None) -> list[Finding]:
    """Controllability rank at the point over the box (the distributions stage)."""
    if out is None or controllability_rank is None or out.params is None:
        return []
    if controllability_rank != out.params.kernel.plant.n:
        return []
    before = len(out.findings)
    values = out.values or None
    params = out.params
    out.controllability = _guarded(params, lambda: _controllability(params, values), out.equilibrium)
    _report_controllability(out, out.params, out.point)
    return out.findings[before:]


def _nominal(reason: str) -> BoxVerdict:
    return BoxVerdict("nominal_only", f"checked at the nominal parameter values only: {reason}")


def _guarded(params: _Params, compute: Callable[[], BoxVerdict], *needed: BoxVerdict | None) -> BoxVerdict:
    """Run a box check when the verdicts it rests on were proven; else inherit theirs."""
    for v in needed:
        if v is None:
            continue
        if v.outcome == "violated":
            return BoxVerdict("violated", f"not defined over the whole box ({v.detail})", v.witness, "undefined")
        if v.outcome != "proven":
            return BoxVerdict(v.outcome, v.detail)
    return _bounded(params, compute)


def _bounded(params: _Params, compute: Callable[[], BoxVerdict]) -> BoxVerdict:
    """A box check within what is left of the model's budget (the symbolic steps too);
    anything that stops it leaves the property undecided or checked at nominal values only."""
    seconds = max(params.clock.deadline - time.perf_counter(), 0.0) + SYMBOLIC_SLACK
    try:
        with within(seconds) as step:
            return compute()
    except TimeUp as exc:
        if not expired(exc, step):
            raise
        return BoxVerdict("undecided", "the check over the parameter box ran out of its time budget "
                          "(envelope-seconds)")
    except _NominalOnly as why:
        return _nominal(str(why))
    except UnsupportedExpression as why:
        return _nominal(f"an expression cannot be enclosed with ball arithmetic ({why})")
    except (ArithmeticError, ValueError, TypeError, NotImplementedError, sp.PolynomialError) as why:
        return _nominal(f"the parametric form could not be built ({type(why).__name__})")


# -- equilibrium ---------------------------------------------------------------------------------
def _equilibrium(params: _Params, eq: Equilibrium, written: dict[sp.Symbol, sp.Expr],
                 name: str) -> tuple[BoxVerdict, dict[sp.Symbol, sp.Expr] | None]:
    kernel = params.kernel
    plant = kernel.plant
    solved = set(eq.solved_inputs)
    values: dict[sp.Symbol, sp.Expr] = {}
    for s in (*plant.states, *plant.inputs):
        if s in solved or s not in eq.values:
            continue
        values[s] = params.resolve_signs(_factor_radicands(written.get(s, eq.values[s])))
    xs = {s: values[s] for s in plant.states}
    f0 = [params.tidy(e.xreplace(xs)) for e in plant.f]
    G0 = [[params.tidy(plant.g[j][i].xreplace(xs)) for j in range(plant.m)] for i in range(plant.n)]
    known = [j for j, u in enumerate(plant.inputs) if u in values]
    unknown = [j for j, u in enumerate(plant.inputs) if u in solved]
    c = [f0[i] + sum((G0[i][j] * values[plant.inputs[j]] for j in known), sp.Integer(0)) for i in range(plant.n)]
    rows_used: list[int] = []
    if unknown:
        rows_used, verdict = _solve_inputs(params, G0, c, unknown, values, name)
        if verdict is not None:
            return verdict, values  # the states still serve the decoupling check
    residuals = {i: params.tidy(c[i] + sum((G0[i][j] * values[plant.inputs[j]] for j in unknown), sp.Integer(0)))
                 for i in range(plant.n) if i not in rows_used}
    uncertain: list[str] = []
    for i, r in residuals.items():
        if r == 0:
            continue
        witness = _nonzero_at(params, r)
        if witness is not None:
            ball = params.ball(r, witness)
            rate = f"d{plant.states[i]}/dt = {show_number(float(ball.mid()), mark_inexact=True)}"
            return BoxVerdict(
                "violated",
                f"at {show_values(params.named(witness))} (inside the parameter box) {rate}",
                params.named(witness), "not_equilibrium"), values
        test = confirm_zero(r)
        if not (test.zero and test.certain):
            uncertain.append(f"d{plant.states[i]}/dt")
    if uncertain:
        return BoxVerdict("undecided", "the residual(s) " + ", ".join(uncertain) + " vanish at every parameter "
                          "value tried but could not be confirmed zero over the box symbolically"), values
    how = "inputs solved as functions of the parameters" if unknown else "residuals vanish identically"
    return BoxVerdict("proven", f"an equilibrium for every parameter value in the box ({how})"), values


def _solve_inputs(params: _Params, G0: list[list[sp.Expr]], c: list[sp.Expr], unknown: list[int],
                  values: dict[sp.Symbol, sp.Expr], name: str) -> tuple[list[int], BoxVerdict | None]:
    """u_U(p) = -G_RU(p)^(-1) c_R(p) on rows R whose minor is non-zero at the nominal values."""
    plant = params.kernel.plant
    k = len(unknown)
    decide = number_decider(params.kernel)
    chosen: list[int] | None = None
    for rows in itertools.islice(itertools.combinations(range(plant.n), k), 200):
        minor = sp.Matrix([[G0[i][j] for j in unknown] for i in rows])
        if decide(laplace_det(minor).xreplace(params.nominal)) is False:
            chosen = list(rows)
            break
    if chosen is None:
        raise _NominalOnly("the inputs left out could not be solved as functions of the parameters")
    G = sp.Matrix([[G0[i][j] for j in unknown] for i in chosen])
    det = params.tidy(laplace_det(G))
    v = params.clock.spent(certify_nonzero(det, params.box, params.clock.budget()))
    names = ", ".join(str(plant.inputs[j]) for j in unknown)
    if v.regular is False:
        w = _exact_point(params, v.witness or {})
        return chosen, BoxVerdict("violated", f"at {show_values(params.named(w))} the equilibrium equations do not "
                                  f"determine the input(s) {names}", params.named(w), "undetermined")
    if v.regular is None:
        return chosen, BoxVerdict("undecided", f"the input(s) {names} could not be shown to be determined over "
                                  "the whole box within the budget")
    sol = G.LUsolve(sp.Matrix([-c[i] for i in chosen]))
    for a, j in enumerate(unknown):
        values[plant.inputs[j]] = params.tidy(sol[a])
    return chosen, None


def _nonzero_at(params: _Params, e: sp.Expr) -> dict[sp.Symbol, sp.Expr] | None:
    """A parameter value (exact) where ``e`` is certainly non-zero, if one is found."""
    for values in params.candidates():
        b = params.ball(e, values)
        if b.is_finite() and not b.contains(0):
            return values
    return None


def _exact_point(params: _Params, point: dict[str, float]) -> dict[sp.Symbol, sp.Expr]:
    """A float witness as exact rationals (a float is an exact dyadic rational)."""
    by_name = {str(s): s for s in params.symbols}
    return {by_name[k]: sp.Rational(Fraction(v)) for k, v in point.items() if k in by_name}


def _snapped(params: _Params, point: dict[str, float]) -> list[dict[sp.Symbol, sp.Expr]]:
    """The point rounded to 1, 2, 3, 4 and 6 decimals (kept inside the box)."""
    raw = _exact_point(params, point)
    out = []
    for den in (10, 100, 1000, 10**4, 10**6):
        snapped: dict[sp.Symbol, sp.Expr] = {}
        for s, v in raw.items():
            lo, hi = params.box.get(s, (v, v))
            q = sp.Rational(round(float(v) * den), den)
            snapped[s] = min(max(q, lo), hi)
        out.append(snapped)
    return out


def _simple_witness(params: _Params, e: sp.Expr, point: dict[str, float], exact_zero: bool
                    ) -> dict[sp.Symbol, sp.Expr]:
    """A witness with short decimals where e is still certainly negative (or exactly zero)."""
    raw = _exact_point(params, point)
    for snapped in _snapped(params, point):
        if exact_zero:
            if sp.cancel(e.xreplace(snapped)) == 0:
                return snapped
            continue
        b = params.ball(e, snapped)
        if b.is_finite() and b < 0:
            return snapped
    return raw


# -- linearisation at x0(p) -------------------------------------------------------------------------
def _linearisation(params: _Params, values: dict[sp.Symbol, sp.Expr]) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix]:
    """A = dF/dx, B = g, C = dh/dx at (x0(p), u0(p)), every entry in p only."""
    kernel = params.kernel
    plant = kernel.plant
    at = {s: values[s] for s in plant.states}
    u0 = [values.get(u, sp.Integer(0)) for u in plant.inputs]
    J = kernel.jacobian(plant.f)
    for j in range(plant.m):
        if u0[j] != 0:
            J = J + kernel.jacobian(plant.g[j]) * u0[j]
    A = J.xreplace(at).applyfunc(params.tidy)
    B = sp.Matrix([[plant.g[j][i] for j in range(plant.m)] for i in range(plant.n)]).xreplace(at).applyfunc(params.tidy)
    C = kernel.jacobian(plant.h).xreplace(at).applyfunc(params.tidy) if plant.p else sp.zeros(0, plant.n)
    for e in (*A, *B, *C):
        if e.free_symbols - set(params.symbols):
            raise _NominalOnly("the linearisation at the point still depends on the states")
    return A, B, C


class _Holders:
    """Entries replaced by placeholder symbols, so that determinants are polynomial."""

    def __init__(self) -> None:
        self.by_entry: dict[sp.Expr, sp.Symbol] = {}
        self.back: dict[sp.Symbol, sp.Expr] = {}

    def hold(self, e: sp.Expr) -> sp.Expr:
        if e.is_Number:
            return e
        s = self.by_entry.get(e)
        if s is None:
            s = sp.Dummy(f"e{len(self.by_entry)}")
            self.by_entry[e] = s
            self.back[s] = e
        return s

    def matrix(self, M: sp.Matrix) -> sp.Matrix:
        return M.applyfunc(self.hold)

    def restore(self, e: sp.Expr) -> sp.Expr:
        return e.xreplace(self.back)


# -- decoupling matrix -------------------------------------------------------------------------------
def _decoupling(params: _Params, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr] | None) -> BoxVerdict:
    assert values is not None
    plant = params.kernel.plant
    at = {s: values[s] for s in plant.states}
    M = A.xreplace(at).applyfunc(params.tidy)
    p, m = M.rows, M.cols
    if p == m:
        exprs = [params.tidy(laplace_det(M))]
        what = "det A" if p > 1 else "the decoupling entry"
    else:
        exprs = [params.tidy(laplace_det(M.extract(list(range(p)), list(cols))))
                 for cols in itertools.combinations(range(m), p)]
        what = f"every {p} x {p} minor of A"
    v = params.clock.spent(certify_nonzero(exprs, params.box, params.clock.budget()))
    if v.regular:
        return BoxVerdict("proven", f"{what} at the point is non-zero over the whole box (certified margin "
                          f"{show_number(v.margin or 0.0)})")
    if v.regular is None:
        return BoxVerdict("undecided", f"{what} at the point could not be certified non-zero over the box "
                          f"within the budget ({v.undecided_count} sub-boxes open, e.g. {_show_boxes(v)})")
    w = _exact_point(params, v.witness or {})
    how = "exactly" if v.witness_exact else "a zero proven by a sign change next to it"
    if not v.witness_exact:
        for candidate in _snapped(params, v.witness or {}):
            if all(sp.cancel(e.xreplace(candidate)) == 0 for e in exprs):
                w, how = candidate, "exactly"
                break
    return BoxVerdict("violated", f"{what} at the point vanishes at {show_values(params.named(w))} ({how})",
                      params.named(w), "singular")


# -- zero dynamics ------------------------------------------------------------------------------------
def zero_polynomial(A: sp.Matrix, B: sp.Matrix, C: sp.Matrix, degree: int) -> tuple[list[sp.Expr], list[sp.Expr]]:
    """Coefficients (leading first) of det [[sI - A, -B], [C, 0]] up to s^degree, and the
    higher ones (which vanish identically when the relative degree is well defined)."""
    n, m, p = A.rows, B.cols, C.rows
    if n + m > MAX_PENCIL:
        raise _NominalOnly(f"the Rosenbrock pencil of size {n + m} is too large to form symbolically "
                           f"(limit {MAX_PENCIL})")
    holders = _Holders()
    s = sp.Dummy("s")
    P = sp.zeros(n + p, n + m)
    P[:n, :n] = s * sp.eye(n) - holders.matrix(A)
    P[:n, n:] = -holders.matrix(B)
    P[n:, :n] = holders.matrix(C)
    poly = sp.Poly(laplace_det(P), s)
    coeffs = [holders.restore(poly.coeff_monomial(s**k)) for k in range(degree, -1, -1)]
    higher = [holders.restore(poly.coeff_monomial(s**k)) for k in range(degree + 1, poly.degree() + 1)]
    return coeffs, higher


def _zero_dynamics(params: _Params, degrees: list[int], values: dict[sp.Symbol, sp.Expr] | None,
                   out: ParametricPoint, name: str) -> BoxVerdict:
    assert values is not None
    kernel = params.kernel
    plant = kernel.plant
    d = plant.n - sum(degrees)
    A, B, C = _linearisation(params, values)
    coeffs, higher = zero_polynomial(A, B, C, d)
    for e in higher:
        b = params.ball(e, params.nominal)
        if not (b.is_finite() and b.contains(0)):
            raise _NominalOnly("the Rosenbrock determinant has a higher degree than the zero dynamics")
    lead = coeffs[0]
    v = params.clock.spent(certify_sign(lead, params.box, True, params.clock.budget()))
    if not v.regular:
        v = params.clock.spent(certify_sign(-lead, params.box, True, params.clock.budget()))
        if not v.regular:
            return BoxVerdict("undecided", "the sign of the leading coefficient of the zero-dynamics polynomial "
                              "could not be certified over the box")
        coeffs = [-c for c in coeffs]
    conditions = lienard_chipart(coeffs)
    verdict = certify_hurwitz(conditions, params.box, params.clock.budget())
    params.clock.boxes_left -= verdict.boxes
    if verdict.stable:
        return BoxVerdict("proven", "minimum phase over the whole parameter box: the Lienard-Chipart conditions "
                          f"of the degree-{d} zero-dynamics polynomial are certified positive")
    failed, ev = verdict.failed, verdict.verdict
    assert failed is not None and ev is not None
    if verdict.stable is None:
        shown = _show_boxes(ev)
        return BoxVerdict("undecided", f"{failed.label} of the zero-dynamics polynomial could not be certified "
                          f"positive within the budget ({ev.undecided_count} sub-boxes open, e.g. {shown})")
    w = _simple_witness(params, failed.expr, ev.witness or {}, ev.witness_exact)
    at_w = {s: params.at(values[s], w) for s in plant.states}
    at_w.update(w)
    zd = zero_dynamics_at(kernel, degrees, at_w, name)
    if zd.verdict not in ("non_minimum_phase", "critical"):
        return BoxVerdict("undecided", f"{failed.label} of the zero-dynamics polynomial fails at "
                          f"{show_values(params.named(w))}, but the point analysis there gives {zd.verdict}")
    boundary = _boundary(params, failed.expr, w)
    crossing = _crossing(params, failed.expr, w)
    what = "unstable (non-minimum phase)" if zd.verdict == "non_minimum_phase" else "critical"
    at_witness = (f"{show_values(params.named(w))}: zero-dynamics eigenvalues {show_eigenvalues(zd.eigenvalues)} "
                  f"({'exact' if zd.exact else 'high precision'})")
    if boundary and zd.verdict == "non_minimum_phase":
        # a negative Lienard-Chipart condition means a root in the open right half-plane:
        # a polynomial with every root in the closed left half-plane is a limit of Hurwitz
        # ones, so its coefficients and Hurwitz determinants are all >= 0
        detail = (f"non-minimum phase wherever {boundary} ({failed.label} of the zero-dynamics polynomial "
                  f"is negative exactly there); witness {at_witness}")
    else:
        detail = f"{what} at {at_witness}"
    return BoxVerdict("violated", detail, params.named(w), zd.verdict, zd.eigenvalues, boundary, crossing)


def _boundary(params: _Params, e: sp.Expr, witness: dict[sp.Symbol, sp.Expr]) -> str | None:
    """``gam1 + gam2 < 1`` when e factors into one factor whose sign is not constant on
    the box and factors of certified constant sign (so e < 0 exactly where it says)."""
    if sp.count_ops(e) > BOUNDARY_OPS or _has_symbolic_functions(e):
        return None
    try:
        num, den = sp.cancel(sp.together(e)).as_numer_denom()
        factors = sp.factor_list(num)[1] + sp.factor_list(den)[1]
    except (sp.PolynomialError, ValueError, TypeError):
        return None
    open_factors = []
    for f, mult in factors:
        if not f.free_symbols:
            continue
        fixed = False
        for cand in (f, -f):
            v = params.clock.spent(certify_sign(cand, params.box, True, params.clock.budget()))
            fixed = fixed or bool(v.regular)
        if not fixed:
            open_factors.append((f, mult))
    if len(open_factors) != 1 or open_factors[0][1] % 2 == 0:
        return None
    f = open_factors[0][0]
    b = params.ball(f, witness)
    if not b.is_finite() or b.contains(0):
        return None
    op = "<" if b < 0 else ">"
    if f.could_extract_minus_sign():
        f, op = -f, (">" if op == "<" else "<")
    const, rest = f.as_coeff_Add()
    if const != 0 and rest != 0:
        return f"{show_expr(rest, 80)} {op} {show_expr(-const, 40)}"
    return f"{show_expr(f, 80)} {op} 0"


def _crossing(params: _Params, e: sp.Expr, witness: dict[sp.Symbol, sp.Expr]) -> dict[str, float] | None:
    """Where the segment from the nominal values to the witness crosses e = 0 (bisection
    on certain signs): the boundary value itself when there is one parameter."""
    start = {s: params.nominal[s] for s in params.symbols}
    end = {s: witness.get(s, start[s]) for s in params.symbols}
    b0 = params.ball(e, start)
    if not (b0.is_finite() and b0 > 0):
        return None
    lo, hi = sp.Rational(0), sp.Rational(1)
    for _ in range(40):
        mid = (lo + hi) / 2
        point = {s: start[s] + mid * (end[s] - start[s]) for s in params.symbols}
        b = params.ball(e, point)
        if not b.is_finite() or b.contains(0):
            break
        if b > 0:
            lo = mid
        else:
            hi = mid
    t = (lo + hi) / 2
    return {str(s): float(start[s] + t * (end[s] - start[s])) for s in params.symbols}


# -- controllability --------------------------------------------------------------------------------
def _controllability(params: _Params, values: dict[sp.Symbol, sp.Expr] | None) -> BoxVerdict:
    assert values is not None
    kernel = params.kernel
    plant = kernel.plant
    n = plant.n
    if n > MAX_KALMAN:
        raise _NominalOnly(f"the Kalman matrix of {n} states is not formed symbolically (limit {MAX_KALMAN})")
    A, B, _ = _linearisation(params, values)
    holders = _Holders()
    Ah, Bh = holders.matrix(A), holders.matrix(B)
    columns: list[sp.Matrix] = []
    block = Bh
    for _ in range(n):
        columns += [block[:, j] for j in range(block.cols)]
        block = (Ah * block).applyfunc(sp.expand)
    sets = _independent_at_nominal(params, holders, columns, n)
    if not sets:
        raise _NominalOnly("n Kalman columns independent at the nominal values could not be selected")
    minors = [params.tidy(holders.restore(laplace_det(sp.Matrix.hstack(*[columns[k] for k in chosen]))))
              for chosen in sets]
    v = params.clock.spent(certify_nonzero(minors, params.box, params.clock.budget()))
    if v.regular:
        return BoxVerdict("proven", f"controllability rank {n} over the whole parameter box (a Kalman minor is "
                          "certified non-zero)")
    if v.regular is None:
        return BoxVerdict("undecided", "the controllability rank could not be certified over the box within "
                          f"the budget ({v.undecided_count} sub-boxes open, e.g. {_show_boxes(v)})")
    w = _exact_point(params, v.witness or {})
    full = sp.Matrix.hstack(*columns).xreplace(holders.back)
    for candidate in [w, *_snapped(params, v.witness or {})]:
        rank, certain = exact_rank(full.xreplace(candidate).tolist(), number_decider(kernel))
        if rank < n and certain:
            return BoxVerdict("violated", f"controllability rank {rank} < {n} at "
                              f"{show_values(params.named(candidate))} (exact)", params.named(candidate), f"rank {rank}")
    return BoxVerdict("undecided", f"a Kalman minor vanishes at {show_values(params.named(w))} but the rank there "
                      "is not shown to drop")


def _independent_at_nominal(params: _Params, holders: _Holders, columns: list[sp.Matrix], n: int,
                            most: int = 8) -> list[tuple[int, ...]]:
    """Up to ``most`` sets of n Kalman columns (from the first 2n) whose determinant is
    certainly non-zero at the nominal values; over the box at least one of them must
    stay non-zero at every parameter value."""
    old = flint.ctx.prec
    flint.ctx.prec = 256
    try:
        pool = columns[: 2 * n]
        nominal = [[params.ball(holders.restore(e), params.nominal, 256) for e in col] for col in pool]
        out: list[tuple[int, ...]] = []
        for chosen in itertools.combinations(range(len(pool)), n):
            det = _ball_det([[nominal[k][i] for k in chosen] for i in range(n)])
            if det.is_finite() and not det.contains(0):
                out.append(chosen)
                if len(out) == most:
                    break
        return out
    finally:
        flint.ctx.prec = old


def _ball_det(rows: list[list[arb]]) -> arb:
    """Determinant of a small ball matrix by cofactor expansion (rigorous, no pivoting)."""
    if len(rows) == 1:
        return rows[0][0]
    total = arb(0)
    for j, a in enumerate(rows[0]):
        if a == 0:
            continue
        minor = [r[:j] + r[j + 1:] for r in rows[1:]]
        term = a * _ball_det(minor)
        total = total + term if j % 2 == 0 else total - term
    return total


# -- findings --------------------------------------------------------------------------------------------
def _finding(out: ParametricPoint, rule: str, severity: Severity, message: str, hint: str | None = None) -> None:
    out.findings.append(Finding(rule, severity, message, point=out.point, anchor=f"point {out.point}", hint=hint))


def _not_covered(out: ParametricPoint, params: _Params, what: str, v: BoxVerdict) -> None:
    if v.outcome == "nominal_only":
        _finding(out, "analysis-budget", Severity.WARNING,
                 f"at point {out.point} {what} was checked at the nominal parameter values "
                 f"({show_values(params.named(params.nominal))}) only, not over the parameter box: "
                 + v.detail.split(": ", 1)[-1],
                 hint="the claims that rest on it are not decided over the box")
    elif v.outcome == "undecided":
        _finding(out, "analysis-budget", Severity.WARNING,
                 f"at point {out.point} {what} over the parameter box is not decided: {v.detail}",
                 hint="raise the envelope budget, or narrow the parameter ranges")


def _report_equilibrium(out: ParametricPoint, params: _Params, name: str) -> None:
    v = out.equilibrium
    if v is None:
        return
    if v.outcome == "violated":
        _finding(out, "point-not-equilibrium", Severity.ERROR,
                 f"point {name} is an equilibrium at the nominal parameter values but not over the whole "
                 f"parameter box: {v.detail}",
                 hint="write the point's states (or leave its inputs out) in terms of the parameters, "
                      "so that it follows them")
    else:
        _not_covered(out, params, "the equilibrium", v)


def _report_decoupling(out: ParametricPoint, params: _Params, name: str) -> None:
    v = out.decoupling
    if v is None or v.outcome == "proven":
        return
    if v.outcome == "violated":
        rule = "decoupling-singular" if params.kernel.plant.p > 1 else "relative-degree-ill-defined"
        _finding(out, rule, Severity.ERROR,
                 f"at point {name} the relative degree is well defined at the nominal parameter values but not "
                 f"over the whole parameter box: {v.detail}",
                 hint="narrow the parameter range, or move the point off the singular set")
    elif out.equilibrium is None or out.equilibrium.outcome in ("proven", "violated"):
        _not_covered(out, params, "the decoupling matrix", v)  # else the equilibrium finding says why
    lost = [o for o, r in out.rows.items() if r.outcome == "violated" and r is not v]
    if lost:
        _finding(out, "relative-degree-ill-defined", Severity.ERROR,
                 f"at point {name} the relative degree of {', '.join(lost)} is defined at the nominal parameter "
                 "values but not over the whole parameter box: " + "; ".join(out.rows[o].detail for o in lost),
                 hint="narrow the parameter range, or move the point off the singular set")


def _report_zero_dynamics(out: ParametricPoint, params: _Params, name: str) -> None:
    v = out.zero_dynamics
    if v is None or v.outcome == "proven":
        return
    if v.outcome == "violated":
        if v.witness_verdict == "undefined":
            return  # the equilibrium or decoupling finding says why
        rule = "zero-dynamics-unstable" if v.witness_verdict == "non_minimum_phase" else "zero-dynamics-critical"
        _finding(out, rule, Severity.ERROR if rule == "zero-dynamics-unstable" else Severity.WARNING,
                 f"the zero dynamics at point {name} are stable at the nominal parameter values but not over the "
                 f"whole parameter box: {v.detail}",
                 hint="narrow the parameter range to the minimum-phase side, or design for the non-minimum-phase case")
    elif out.equilibrium is not None and out.equilibrium.outcome == "proven" and (
            out.decoupling is None or out.decoupling.outcome == "proven"):
        _not_covered(out, params, "minimum phase", v)


def _report_controllability(out: ParametricPoint, params: _Params, name: str) -> None:
    v = out.controllability
    if v is None or v.outcome == "proven" or out.equilibrium is None or out.equilibrium.outcome != "proven":
        return
    if v.outcome == "violated":
        _finding(out, "not-controllable", Severity.NOTE,
                 f"at point {name} the controllability rank is full at the nominal parameter values but not over "
                 f"the whole parameter box: {v.detail}")
    else:
        _not_covered(out, params, "the controllability rank", v)


# -- claims and JSON -----------------------------------------------------------------------------------
def claim_failure(pp: ParametricPoint | None, prop: str, key: str | None = None) -> tuple[str, bool] | None:
    """(message, decided) when the box verdict of ``prop`` (``rows``: of output ``key``)
    makes a claim at this point fail."""
    if pp is None:
        return None
    v = getattr(pp, prop)
    if key is not None:
        v = v.get(key)
    if v is None or v.outcome == "proven":
        return None
    box = ", ".join(f"{k} in {show_number(lo)} .. {show_number(hi)}" for k, (lo, hi) in pp.box.items())
    if v.outcome == "violated":
        return f"at point '{pp.point}' it holds at the nominal parameter values but not over the parameter box " \
               f"({box}): {v.detail}", True
    return f"at point '{pp.point}' it holds at the nominal parameter values, but over the parameter box ({box}) " \
           f"it is not decided: {v.detail}", False


def verdict_json(v: BoxVerdict | None) -> dict[str, Any] | None:
    if v is None:
        return None
    out: dict[str, Any] = {"outcome": v.outcome, "detail": v.detail}
    if v.witness is not None:
        out["witness"] = {k: float(x) for k, x in v.witness.items()}
        out["witness_verdict"] = v.witness_verdict
    if v.witness_eigenvalues:
        out["witness_eigenvalues"] = [[z.real, z.imag] for z in v.witness_eigenvalues]
    if v.boundary is not None:
        out["boundary"] = v.boundary
    if v.crossing is not None:
        out["crossing"] = v.crossing
    return out


def parametric_json(pp: ParametricPoint) -> dict[str, Any]:
    """The ``parameter_box`` record of a point in the JSON analysis."""
    solved = {str(s): show_expr(v, 200) for s, v in pp.values.items() if s in pp.solved}
    return {
        "box": {k: [float(lo), float(hi)] for k, (lo, hi) in pp.box.items()},
        "solved_inputs": solved,
        "equilibrium": verdict_json(pp.equilibrium),
        "decoupling": verdict_json(pp.decoupling),
        "zero_dynamics": verdict_json(pp.zero_dynamics),
        "controllability": verdict_json(pp.controllability),
        "relative_degree": {o: verdict_json(v) for o, v in pp.rows.items()},
    }


__all__ = ["BoxVerdict", "OUTCOMES", "ParametricPoint", "box_controllability", "box_point", "box_zero_dynamics",
           "claim_failure", "clock", "parametric_json", "verdict_json", "zero_polynomial"]
