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
from typing import Any, Callable, Sequence

import sympy as sp

from plantlint.analysis.equilibria import Equilibrium, certainly_negative
from plantlint.analysis.refine import REFINED_RESIDUAL
from plantlint.analysis.zero_dynamics import ZeroDynamics, show_eigenvalues, zero_dynamics_at
from plantlint.core import anchors
from plantlint.core.deadline import LATE, bounded
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.kernel import decision as zd
from plantlint.kernel.balls import UnsupportedExpression
from plantlint.kernel.exact import laplace_det, number_decider, rank as exact_rank
from plantlint.kernel.hurwitz import certify_hurwitz, lienard_chipart
from plantlint.kernel.intervals import EnvelopeVerdict, certify_nonzero, certify_sign
from plantlint.kernel.lie import Kernel, confirm_zero
from plantlint.kernel.parameter_box import (
    Clock, Holders, NotCovered, ParameterBox, boundary_factor, clock, crossing, exact_point, factor_radicands,
    independent_sets, snapped, zero_polynomial,
)
from plantlint.language.printer import show_expr, show_number

OUTCOMES = ("proven", "violated", "undecided", "nominal_only")
#: Largest Kalman matrix (n) formed symbolically.
MAX_KALMAN = 6
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
    ranges: BoxVerdict | None = None  # the point's values inside their ranges over the box
    findings: list[Finding] = field(default_factory=list)
    params: "ParameterBox | None" = field(default=None, repr=False, compare=False)
    solved: tuple[sp.Symbol, ...] = ()  # inputs solved as functions of the parameters


# -- expressions in the parameters ---------------------------------------------------------
def _show_boxes(v: EnvelopeVerdict) -> str:
    return "; ".join(", ".join(f"{k} in [{lo:.6g}, {hi:.6g}]" for k, (lo, hi) in b.items()) for b in v.undecided[:2])


def _open(count: int) -> str:
    return f"{count} sub-box{'' if count == 1 else 'es'} left open"


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
    timer: Clock,
) -> ParametricPoint | None:
    """The point over the box: equilibrium and decoupling matrix (the points stage).
    None when the plant has no ranged parameter or the point is no equilibrium at all.

    ``written`` holds the point's values as written (ranged parameters kept symbolic);
    ``eq`` is the nominal equilibrium, whose solved inputs are solved again in p.
    """
    plant = kernel.plant
    if not plant.params or not eq.equilibrium:
        return None
    params = ParameterBox(kernel, timer)
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
    if out.equilibrium.outcome == "proven" and values:
        out.ranges = _bounded(params, lambda: _ranges(params, values, out.solved, eq.values))
        _report_ranges(out, params, name)
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


def _rows(params: ParameterBox, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr] | None,
          decoupling: BoxVerdict) -> dict[str, BoxVerdict]:
    """The relative degree of each output at the point over the box: its row of A must
    not vanish (implied when det A does not; one output: the same question)."""
    outputs = params.kernel.plant.outputs
    if len(outputs) == 1 or values is None:
        return {o: decoupling for o in outputs}
    if decoupling.outcome == "proven":
        return {o: BoxVerdict("proven", "implied by the nonsingular decoupling matrix") for o in outputs}
    return {o: _guarded(params, lambda i=i: _row(params, A, values, i)) for i, o in enumerate(outputs)}


def _row(params: ParameterBox, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr], i: int) -> BoxVerdict:
    plant = params.kernel.plant
    at = {s: values[s] for s in plant.states}
    exprs = [e for e in (params.tidy(x.xreplace(at)) for x in A.row(i)) if e != 0] or [sp.Integer(0)]
    v = params.clock.spent(certify_nonzero(exprs, params.box, params.clock.budget()))
    if v.regular:
        return BoxVerdict("proven", f"the row of {plant.outputs[i]} in A is non-zero over the whole box")
    if v.regular is None:
        return BoxVerdict("undecided", f"the row of {plant.outputs[i]} in A could not be certified non-zero "
                          f"over the box within the budget (e.g. {_show_boxes(v)})")
    w = exact_point(params, v.witness or {})
    mentioned = {str(s) for e in exprs for s in e.free_symbols}  # a = 1 for a row (0, b - 1) says nothing
    for candidate in [w, *snapped(params, v.witness or {})]:
        if all(sp.cancel(e.xreplace(candidate)) == 0 for e in exprs):
            return BoxVerdict("violated", f"the row of {plant.outputs[i]} in A vanishes at "
                              f"{show_values(_only(params.named(candidate), mentioned))} (exactly)",
                              params.named(candidate), "undefined")
    return BoxVerdict("undecided", f"the row of {plant.outputs[i]} in A comes close to zero near "
                      f"{show_values(_only(params.named(w), mentioned))} but a common zero is not proven")


def _only(values: dict[str, sp.Expr], names: set[str]) -> dict[str, sp.Expr]:
    """The values of the parameters an expression depends on (all of them if it names none)."""
    return {k: v for k, v in values.items() if k in names} or values


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


def _guarded(params: ParameterBox, compute: Callable[[], BoxVerdict], *needed: BoxVerdict | None) -> BoxVerdict:
    """Run a box check when the verdicts it rests on were proven; else inherit theirs."""
    for v in needed:
        if v is None:
            continue
        if v.outcome == "violated":
            return BoxVerdict("violated", f"not defined over the whole box ({v.detail})", v.witness, "undefined")
        if v.outcome != "proven":
            return BoxVerdict(v.outcome, v.detail)
    return _bounded(params, compute)


def _bounded(params: ParameterBox, compute: Callable[[], BoxVerdict]) -> BoxVerdict:
    """A box check within what is left of the model's budget (the symbolic steps too);
    anything that stops it leaves the property undecided or checked at nominal values only."""
    seconds = max(params.clock.deadline - time.perf_counter(), 0.0) + SYMBOLIC_SLACK
    try:
        verdict = bounded(seconds, compute)
        return verdict if verdict is not LATE else BoxVerdict(
            "undecided", "the check over the parameter box ran out of its time budget (envelope-seconds)")
    except NotCovered as why:
        return _nominal(str(why))
    except UnsupportedExpression as why:
        return _nominal(f"an expression cannot be enclosed with ball arithmetic ({why})")
    except (ArithmeticError, ValueError, TypeError, NotImplementedError, sp.PolynomialError) as why:
        return _nominal(f"the parametric form could not be built ({type(why).__name__})")


# -- equilibrium ---------------------------------------------------------------------------------
def _equilibrium(params: ParameterBox, eq: Equilibrium, written: dict[sp.Symbol, sp.Expr],
                 name: str) -> tuple[BoxVerdict, dict[sp.Symbol, sp.Expr] | None]:
    kernel = params.kernel
    plant = kernel.plant
    solved = set(eq.solved_inputs)
    values: dict[sp.Symbol, sp.Expr] = {}
    for s in (*plant.states, *plant.inputs):
        if s in solved or s not in eq.values:
            continue
        values[s] = params.resolve_signs(factor_radicands(written.get(s, eq.values[s])))
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
        if not test.proven_zero:
            if eq.approximate and _within_refinement(params, r, f0[i]):  # tiny, not exactly zero
                continue
            uncertain.append(f"d{plant.states[i]}/dt")
    if uncertain:
        return BoxVerdict("undecided", "the residual(s) " + ", ".join(uncertain) + " vanish at every parameter "
                          "value tried but could not be confirmed zero over the box symbolically"), values
    how = "inputs solved as functions of the parameters" if unknown else "residuals vanish identically"
    return BoxVerdict("proven", f"an equilibrium for every parameter value in the box ({how})"), values


def _ranges(params: ParameterBox, values: dict[sp.Symbol, sp.Expr], solved: tuple[sp.Symbol, ...],
            nominal: dict[sp.Symbol, sp.Expr]) -> BoxVerdict:
    """The point's states and inputs inside their declared ranges for every parameter value
    in the box (at the nominal values the points stage has checked them): lo <= v(p) <= hi
    certified over the box (kernel.intervals.certify_sign), or a parameter value where a
    value is certainly outside. Only values that depend on the parameters and ranges with
    constant bounds are looked at."""
    plant = params.kernel.plant
    boxes = {**plant.state_box, **plant.input_box}
    ranged = set(params.symbols)
    decide = number_decider(params.kernel)
    undecided: list[str] = []
    for sym, value in values.items():
        bounds = boxes.get(sym)
        if bounds is None or not (value.free_symbols & ranged):
            continue
        if any(b.free_symbols for b in bounds):
            continue
        lo, hi = bounds
        at_nominal = nominal.get(sym)
        if at_nominal is not None and (certainly_negative(at_nominal - lo, decide)
                                       or certainly_negative(hi - at_nominal, decide)):
            continue  # outside at the nominal values: the points stage reports it (its own test)
        kind = "state" if sym in plant.states else ("input needed" if sym in solved else "input")
        for side, gap in (("below", value - lo), ("above", hi - value)):
            v = params.clock.spent(certify_sign(params.tidy(gap), params.box, False, params.clock.budget()))
            if v.regular:
                continue
            far = (_farthest(params, value, lo if side == "below" else hi, side, exact_point(params, v.witness))
                   if v.regular is False and v.witness is not None else None)
            if far is not None:
                w, shown = far
                return BoxVerdict(
                    "violated",
                    f"the {kind} {sym} reaches {show_number(float(shown.mid()), mark_inexact=True)} at "
                    f"{show_values(params.named(w))}, {side} its range {show_number(lo)} .. {show_number(hi)}",
                    params.named(w), "outside")
            undecided.append(f"{sym} >= {show_number(lo)}" if side == "below" else f"{sym} <= {show_number(hi)}")
    if undecided:
        return BoxVerdict("undecided", ", ".join(undecided) + " could not be certified over the box within the budget")
    return BoxVerdict("proven", "every value of the point inside its range over the whole parameter box")


def _farthest(params: ParameterBox, value: sp.Expr, bound: sp.Expr, side: str, witness: dict[sp.Symbol, sp.Expr]
              ) -> tuple[dict[sp.Symbol, sp.Expr], Any] | None:
    """Of the search's witness and the box's corners, centre and sample values, the
    parameter value where ``value`` is farthest past ``bound`` (certainly past it: its
    ball beyond the bound, at exact parameter values), with the value's ball there: the
    heaviest payload, not the first box the search happened to split down to. None when
    none is certainly past it (the search's floating-point witness, made exact, may not
    be): the range is then not decided."""
    limit = params.ball(bound, {})
    best: dict[sp.Symbol, sp.Expr] | None = None
    best_ball, best_gap = None, None
    for candidate in [witness, *params.candidates()]:
        try:
            b = params.ball(value, candidate)
        except (ArithmeticError, ValueError, TypeError):
            continue
        if not b.is_finite() or not (b < limit if side == "below" else b > limit):
            continue
        gap = float((limit - b).mid()) if side == "below" else float((b - limit).mid())
        if best_gap is None or gap > best_gap:
            best, best_ball, best_gap = candidate, b, gap
    return None if best is None else (best, best_ball)


def _within_refinement(params: ParameterBox, r: sp.Expr, rate: sp.Expr) -> bool:
    """A residual that does not depend on the parameters and is proven (256-bit balls) below
    1e-25 (1 + |rate at nominal|): the refined point stays an equilibrium, to its own
    accuracy, for every parameter value. (A residual that depends on them is either found
    non-zero at some parameter value or left not decided.)"""
    if r.free_symbols:
        return False
    size, value = params.ball(sp.Abs(rate), params.nominal, prec=256), params.ball(r, {}, prec=256)
    if not (size.is_finite() and value.is_finite()):
        return False
    return bool(abs(value) <= (1 + size) * REFINED_RESIDUAL)


#: Choices of equations tried for the inputs at a point, each proven over the box or not.
MAX_ROW_CHOICES = 8


def _solve_inputs(params: ParameterBox, G0: list[list[sp.Expr]], c: list[sp.Expr], unknown: list[int],
                  values: dict[sp.Symbol, sp.Expr], name: str) -> tuple[list[int], BoxVerdict | None]:
    """u_U(p) = -G_RU(p)^(-1) c_R(p) on the first rows R whose minor is proven non-zero over the box."""
    plant = params.kernel.plant
    k = len(unknown)
    decide = number_decider(params.kernel)
    names = ", ".join(str(plant.inputs[j]) for j in unknown)
    # Rows whose minor is non-zero at the nominal values, in order; the first whose minor is
    # proven non-zero over the whole box serves. A minor that vanishes somewhere in the box
    # proves nothing by itself: other rows may still determine the inputs there.
    every: list[tuple[list[int], sp.Matrix, sp.Expr]] = []
    for rows in itertools.islice(itertools.combinations(range(plant.n), k), 200):
        minor = sp.Matrix([[G0[i][j] for j in unknown] for i in rows])
        every.append((list(rows), minor, laplace_det(minor)))
    minors = [m for m in every if decide(m[2].xreplace(params.nominal)).proven_nonzero]
    if not minors:
        raise NotCovered("the inputs left out could not be solved as functions of the parameters")
    chosen: tuple[list[int], sp.Matrix, sp.Expr] | None = None
    for rows, G, det in minors[:MAX_ROW_CHOICES]:
        v = params.clock.spent(certify_nonzero(params.tidy(det), params.box, params.clock.budget()))
        if v.regular:
            chosen = rows, G, det
            break
    if chosen is None:
        # no single choice of rows serves the whole box: the inputs are undetermined only
        # where every k x k minor of the input columns vanishes at once
        dets = [params.tidy(det) for _, _, det in every]
        v = params.clock.spent(certify_nonzero([e for e in dets if e != 0] or [sp.Integer(0)], params.box,
                                               params.clock.budget()))
        if v.regular is False:
            w = exact_point(params, v.witness or {})
            return [], BoxVerdict("violated", f"at {show_values(params.named(w))} the equilibrium equations do not "
                                  f"determine the input(s) {names}", params.named(w), "undetermined")
        why = ("no one choice of the equations determines them over the whole box" if v.regular
               else "they could not be shown to be determined over the whole box within the budget")
        return [], BoxVerdict("undecided", f"the input(s) {names} at the point are not solved as functions of the "
                              f"parameters: {why}")
    rows, G, det = chosen
    rhs = [-c[i] for i in rows]
    for a, j in enumerate(unknown):
        values[plant.inputs[j]] = params.tidy(_cramer(G, rhs, a, det))
    return rows, None


def _cramer(G: sp.Matrix, rhs: list[sp.Expr], a: int, det: sp.Expr) -> sp.Expr:
    """The a-th unknown of G u = rhs by Cramer's rule, det = det G proven non-zero over the
    box (sympy's LU solve would ask its assumptions system of every symbolic pivot again)."""
    column = G.copy()
    column[:, a] = sp.Matrix(rhs)
    # the quotient unevaluated: sympy's own division asks its assumptions system whether
    # the sum det is zero or infinite (40% of the palletizer's check over its payload
    # range), and params.tidy puts it over one denominator anyway
    return sp.Mul(laplace_det(column), sp.Pow(det, -1, evaluate=False), evaluate=False)


def _nonzero_at(params: ParameterBox, e: sp.Expr) -> dict[sp.Symbol, sp.Expr] | None:
    """A parameter value (exact) where ``e`` is certainly non-zero, if one is found."""
    for values in params.candidates():
        if zd.of_ball(params.ball(e, values)).proven_nonzero:
            return values
    return None


def _simple_witness(params: ParameterBox, e: sp.Expr, point: dict[str, float], exact_zero: bool
                    ) -> dict[sp.Symbol, sp.Expr]:
    """A witness with short decimals where e is still certainly negative (or exactly zero)."""
    raw = exact_point(params, point)
    for candidate in snapped(params, point):
        if exact_zero:
            if sp.cancel(e.xreplace(candidate)) == 0:
                return candidate
            continue
        b = params.ball(e, candidate)
        if b.is_finite() and b < 0:
            return candidate
    return raw


# -- linearisation at x0(p) -------------------------------------------------------------------------
def _linearisation(params: ParameterBox, values: dict[sp.Symbol, sp.Expr]) -> tuple[sp.Matrix, sp.Matrix, sp.Matrix]:
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
            raise NotCovered("the linearisation at the point still depends on the states")
    return A, B, C


# -- decoupling matrix -------------------------------------------------------------------------------
def _decoupling(params: ParameterBox, A: sp.Matrix, values: dict[sp.Symbol, sp.Expr] | None) -> BoxVerdict:
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
                          f"within the budget ({_open(v.undecided_count)}, e.g. {_show_boxes(v)})")
    w = exact_point(params, v.witness or {})
    how = "exactly" if v.witness_exact else "a zero proven by a sign change next to it"
    if not v.witness_exact:
        for candidate in snapped(params, v.witness or {}):
            if all(sp.cancel(e.xreplace(candidate)) == 0 for e in exprs):
                w, how = candidate, "exactly"
                break
    return BoxVerdict("violated", f"{what} at the point vanishes at {show_values(params.named(w))} ({how})",
                      params.named(w), "singular")


# -- zero dynamics ------------------------------------------------------------------------------------
def _zero_dynamics(params: ParameterBox, degrees: list[int], values: dict[sp.Symbol, sp.Expr] | None,
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
            raise NotCovered("the Rosenbrock determinant has a higher degree than the zero dynamics")
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
                          f"positive within the budget ({_open(ev.undecided_count)}, e.g. {shown})")
    w = _simple_witness(params, failed.expr, ev.witness or {}, ev.witness_exact)
    at_w = {s: params.at(values[s], w) for s in plant.states}
    at_w.update(w)
    zd = zero_dynamics_at(kernel, degrees, at_w, name)
    if zd.verdict not in ("non_minimum_phase", "critical"):
        return BoxVerdict("undecided", f"{failed.label} of the zero-dynamics polynomial fails at "
                          f"{show_values(params.named(w))}, but the point analysis there gives {zd.verdict}")
    boundary = _boundary(params, failed.expr, w)
    crosses = crossing(params, failed.expr, w)
    what = "unstable (non-minimum phase)" if zd.verdict == "non_minimum_phase" else "critical"
    at_witness = (f"{show_values(params.named(w))}: zero-dynamics eigenvalues {show_eigenvalues(zd.eigenvalues)} "
                  f"({'exact' if zd.exact else 'high precision'})")
    if boundary and zd.verdict == "non_minimum_phase":
        # a negative Lienard-Chipart condition means a root in the open right half-plane:
        # a polynomial with every root in the closed left half-plane is a limit of Hurwitz
        # ones, so its coefficients and Hurwitz determinants are all >= 0
        where, edge = boundary
        # where the condition is zero the polynomial is not Hurwitz either (a root on the
        # imaginary axis, or a pair s, -s): not minimum phase on the boundary itself
        also = f", and not minimum phase on {edge} either, where it is zero" if edge else ""
        detail = (f"non-minimum phase wherever {where} ({failed.label} of the zero-dynamics polynomial "
                  f"is negative exactly there){also}; witness {at_witness}")
    else:
        detail = f"{what} at {at_witness}"
    return BoxVerdict("violated", detail, params.named(w), zd.verdict, zd.eigenvalues, boundary[0] if boundary else None, crosses)


def _boundary(params: ParameterBox, e: sp.Expr, witness: dict[sp.Symbol, sp.Expr]) -> tuple[str, str] | None:
    """(``gam1 + gam2 < 1``, ``gam1 + gam2 = 1``): where e < 0 and where e = 0, when one factor
    decides its sign on the box; the second is empty when e has a pole there instead."""
    found = boundary_factor(params, e, witness)
    if found is None:
        return None
    f, op, in_numerator = found
    (symbol, *more) = sorted(f.free_symbols, key=str)
    a = f.diff(symbol)
    if not more and a.is_number and a != 0 and (f - a * symbol).is_number:
        # one parameter, linear: the threshold itself (k > 3/2, not 2*k > 3)
        lhs, rhs = show_expr(symbol, 40), show_expr(-(f - a * symbol) / a, 40)
        op = op if a > 0 else (">" if op == "<" else "<")
    else:
        const, rest = f.as_coeff_Add()
        lhs, rhs = (show_expr(rest, 80), show_expr(-const, 40)) if const != 0 and rest != 0 else (show_expr(f, 80), "0")
    return f"{lhs} {op} {rhs}", (f"{lhs} = {rhs}" if in_numerator else "")


# -- controllability --------------------------------------------------------------------------------
def _controllability(params: ParameterBox, values: dict[sp.Symbol, sp.Expr] | None) -> BoxVerdict:
    assert values is not None
    kernel = params.kernel
    plant = kernel.plant
    n = plant.n
    if n > MAX_KALMAN:
        raise NotCovered(f"the Kalman matrix of {n} states is not formed symbolically (limit {MAX_KALMAN})")
    A, B, _ = _linearisation(params, values)
    holders = Holders()
    Ah, Bh = holders.matrix(A), holders.matrix(B)
    columns: list[sp.Matrix] = []
    block = Bh
    for _ in range(n):
        columns += [block[:, j] for j in range(block.cols)]
        block = (Ah * block).applyfunc(sp.expand)
    sets = independent_sets(params, holders, columns, n)
    if not sets:
        raise NotCovered("n Kalman columns independent at the nominal values could not be selected")
    minors = [params.tidy(holders.restore(laplace_det(sp.Matrix.hstack(*[columns[k] for k in chosen]))))
              for chosen in sets]
    v = params.clock.spent(certify_nonzero(minors, params.box, params.clock.budget()))
    if v.regular:
        return BoxVerdict("proven", f"controllability rank {n} over the whole parameter box (a Kalman minor is "
                          "certified non-zero)")
    if v.regular is None:
        return BoxVerdict("undecided", "the controllability rank could not be certified over the box within "
                          f"the budget ({_open(v.undecided_count)}, e.g. {_show_boxes(v)})")
    w = exact_point(params, v.witness or {})
    full = sp.Matrix.hstack(*columns).xreplace(holders.back)
    for candidate in [w, *snapped(params, v.witness or {})]:
        rank, certain = exact_rank(full.xreplace(candidate).tolist(), number_decider(kernel))
        if rank < n and certain:
            return BoxVerdict("violated", f"controllability rank {rank} < {n} at "
                              f"{show_values(params.named(candidate))} (exact)", params.named(candidate), f"rank {rank}")
    return BoxVerdict("undecided", f"a Kalman minor vanishes at {show_values(params.named(w))} but the rank there "
                      "is not shown to drop")


# -- findings --------------------------------------------------------------------------------------------
def _finding(out: ParametricPoint, rule: str, message: str, hint: str | None = None) -> None:
    out.findings.append(finding(rule, message, point=out.point, anchor=anchors.point(out.point), hint=hint))


def _not_covered(out: ParametricPoint, params: ParameterBox, what: str, v: BoxVerdict) -> None:
    if v.outcome == "nominal_only":
        _finding(out, "analysis-budget",
                 f"at point {out.point} {what} was checked at the nominal parameter values "
                 f"({show_values(params.named(params.nominal))}) only, not over the parameter box: "
                 + v.detail.split(": ", 1)[-1],
                 hint="the claims that rest on it are not decided over the box")
    elif v.outcome == "undecided":
        _finding(out, "analysis-budget",
                 f"at point {out.point} {what} over the parameter box is not decided: {v.detail}",
                 hint="raise the envelope budget, or narrow the parameter ranges")


def _report(out: ParametricPoint, params: ParameterBox, v: BoxVerdict | None, rule: str, violated: str,
            hint: str, what: str) -> None:
    """A box verdict as findings: ``rule`` when violated (``violated`` then its detail), else
    what was not decided over the box (nothing when proven)."""
    if v is None:
        return
    if v.outcome == "violated":
        _finding(out, rule, f"{violated}: {v.detail}", hint=hint)
    else:
        _not_covered(out, params, what, v)


def _report_equilibrium(out: ParametricPoint, params: ParameterBox, name: str) -> None:
    _report(out, params, out.equilibrium, "point-not-equilibrium",
            f"point {name} is an equilibrium at the nominal parameter values but not over the whole parameter box",
            "write the point's states (or leave its inputs out) in terms of the parameters, so that it follows them",
            "the equilibrium")


def _report_ranges(out: ParametricPoint, params: ParameterBox, name: str) -> None:
    _report(out, params, out.ranges, "point-outside-envelope",
            f"point {name} lies inside the ranges at the nominal parameter values but not over the whole parameter box",
            "widen the range (an actuator sized for the whole parameter range), narrow the parameter range, or move "
            "the point", "every value inside its range")


def _report_decoupling(out: ParametricPoint, params: ParameterBox, name: str) -> None:
    v = out.decoupling
    if v is None or v.outcome == "proven":
        return
    if v.outcome == "violated":
        rule = "decoupling-singular" if params.kernel.plant.p > 1 else "relative-degree-ill-defined"
        _finding(out, rule,
                 f"at point {name} the relative degree is well defined at the nominal parameter values but not "
                 f"over the whole parameter box: {v.detail}",
                 hint="narrow the parameter range, or move the point off the singular set")
    elif out.equilibrium is None or out.equilibrium.outcome in ("proven", "violated"):
        _not_covered(out, params, "the decoupling matrix", v)  # else the equilibrium finding says why
    lost = [o for o, r in out.rows.items() if r.outcome == "violated" and r is not v]
    if lost:
        _finding(out, "relative-degree-ill-defined",
                 f"at point {name} the relative degree of {', '.join(lost)} is defined at the nominal parameter "
                 "values but not over the whole parameter box: " + "; ".join(out.rows[o].detail for o in lost),
                 hint="narrow the parameter range, or move the point off the singular set")


def _report_zero_dynamics(out: ParametricPoint, params: ParameterBox, name: str) -> None:
    v = out.zero_dynamics
    if v is None or v.outcome == "proven":
        return
    if v.outcome == "violated":
        if v.witness_verdict == "undefined":
            return  # the equilibrium or decoupling finding says why
        rule = "zero-dynamics-unstable" if v.witness_verdict == "non_minimum_phase" else "zero-dynamics-critical"
        _finding(out, rule,
                 f"the zero dynamics at point {name} are stable at the nominal parameter values but not over the "
                 f"whole parameter box: {v.detail}",
                 hint="narrow the parameter range to the minimum-phase side, or design for the non-minimum-phase case")
    elif out.equilibrium is not None and out.equilibrium.outcome == "proven" and (
            out.decoupling is None or out.decoupling.outcome == "proven"):
        _not_covered(out, params, "minimum phase", v)


def _report_controllability(out: ParametricPoint, params: ParameterBox, name: str) -> None:
    v = out.controllability
    if v is None or v.outcome == "proven" or out.equilibrium is None or out.equilibrium.outcome != "proven":
        return
    if v.outcome == "violated":
        _finding(out, "not-controllable",
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


__all__ = ["BoxVerdict", "OUTCOMES", "ParametricPoint", "box_controllability", "box_point", "box_zero_dynamics",
           "claim_failure", "clock", "zero_polynomial"]
