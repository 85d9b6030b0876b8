"""The analyses of one model, in order, and the claims checked against them.

Stages: structure (relative degrees, decoupling matrix), envelope (certified
regularity and model singularities over the box), points (equilibria and the
structure at each), zero dynamics (and the normal form), linearisation (A, B, C,
poles, ranks, zeros), distributions
(controllability and involutivity), claims (`expect` lines). Each stage reports
its completion, so a stopped run can say what was and was not checked.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any, Callable

import sympy as sp

from plantlint.analysis.distributions import (
    DistributionStructure,
    PointDistributions,
    analyse_distributions,
    distributions_at,
    involutivity_reason,
    rank_drop_reason,
)
from plantlint.analysis.equilibria import Equilibrium, solve_point
from plantlint.analysis.linearisation import Linearisation, linearise_at
from plantlint.analysis.parametric import (
    ParametricPoint, box_controllability, box_point, box_zero_dynamics, claim_failure, clock,
)
from plantlint.analysis.stages import STAGES
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.core.settings import AnalysisSettings
from plantlint.kernel.balls import Program, UnsupportedExpression
from plantlint.kernel.exact import has_undefined
from plantlint.kernel.intervals import Budget, certify_nonzero
from plantlint.kernel.lie import SCREEN_POINTS, Kernel, candidate_points, random_samples
from plantlint.language.model import ClaimDecl, Model
from plantlint.language.printer import listed, show_expr, show_number, show_point
from plantlint.analysis.normal_form import NormalForm, normal_form_at, xi_name
from plantlint.analysis.structure import (
    Envelope,
    PointStructure,
    Structure,
    analyse_structure,
    certify_envelope,
    lie_name,
    rates_and_outputs,
    row_terms,
    structure_at_point,
)
from plantlint.analysis.zero_dynamics import ZeroDynamics, show_eigenvalues, zero_dynamics_at

Stage = Callable[[str, "Analysis"], None]


@dataclass
class PointAnalysis:
    name: str
    equilibrium: Equilibrium
    structure: PointStructure | None = None
    zero_dynamics: ZeroDynamics | None = None
    normal_form: NormalForm | None = None
    distributions: PointDistributions | None = None
    linearisation: Linearisation | None = None
    parametric: ParametricPoint | None = None  # verdicts over the parameter box (ranged parameters)


@dataclass
class Analysis:
    """Everything computed for one model (Python objects; :mod:`plantlint.analysis.serialise` for reports)."""

    model: Model
    kernel: Kernel
    structure: Structure
    envelope: Envelope | None = None
    points: list[PointAnalysis] = field(default_factory=list)
    distributions: DistributionStructure | None = None
    findings: list[Finding] = field(default_factory=list)
    completed: list[str] = field(default_factory=list)  # stages finished, in order
    #: claim checks already made, by what they depend on: the claims are checked again after
    #: every stage (progress snapshots), and a proof over a parameter box costs time
    claim_memo: dict[tuple[Any, ...], Any] = field(default_factory=dict, repr=False, compare=False)

    def done(self, name: str, stage: Stage | None) -> None:
        self.completed.append(name)
        if stage is not None:
            stage(name, self)


@dataclass(frozen=True)
class Unevaluable:
    """No point drawn from the envelope gave every rate and output a finite value, and the
    balls could not prove a value undefined at every one of them: the values may be defined
    but too large for the balls (cosh(1e300*x)), or lie at the edge of a domain. Nothing
    can be analysed, and nothing is known to be wrong: the model is not decided."""

    detail: str  # in words, continues "the analysis could not start: ..."


def nowhere_defined(kernel: Kernel) -> list[Finding] | Unevaluable:
    """``singular-model`` findings when no point drawn from the envelope has every rate and
    output defined. The zero tests screen at such points; without one, "zero at every sampled
    point" would hold of every expression vacuously, so there is nothing to analyse. A value
    that is not finite at a point is called undefined there only when the balls prove it
    (a division by an exact zero, the log of a negative number); when they cannot at some
    point, the answer is :class:`Unevaluable`, not an error the model may not have."""
    if kernel.samples():
        return []
    plant = kernel.plant
    symbols = kernel.free_symbols()
    boxes = {**plant.state_box, **plant.param_box}
    drawn = 20 * SCREEN_POINTS
    first = {str(k): float(v) for k, v in random_samples(symbols, boxes, kernel.seed, count=1)[0].items()} if symbols else {}

    def unsettled(guard: Program) -> dict[str, float] | None:
        """The first point drawn where ``guard``'s values are not finite but not proven undefined."""
        for point in candidate_points(symbols, boxes, kernel.seed):
            if guard.proven_undefined(point) is False:
                return {str(k): float(v) for k, v in point.items()}
        return None

    out = []
    unknown: list[tuple[str, dict[str, float]]] = []
    for anchor, label, exprs in rates_and_outputs(plant):
        exprs = [e for e in exprs if e != 0]
        try:
            guard = Program(exprs, symbols) if exprs else None
        except UnsupportedExpression:
            continue
        if guard is None or random_samples(symbols, boxes, kernel.seed, guard=guard):
            continue
        at = unsettled(guard)
        if at is not None:
            unknown.append((label, at))
            continue
        out.append(finding(
            "singular-model",
            f"{label} is undefined throughout the envelope: at each of the {drawn} points drawn from the "
            f"ranges (-2 .. 2 where none is given) it divides by zero or leaves a function's domain (the first: {show_point(first)}); "
            "nothing can be analysed on it", anchor=anchor, hint=_ENVELOPE_DOMAIN_HINT))
    if out:
        return out
    if unknown:
        label, at = unknown[0]
        return Unevaluable(
            f"{listed([lb for lb, _ in unknown])} {'has' if len(unknown) == 1 else 'have'} no finite value at any of the "
            f"{drawn} points drawn from the ranges, and at {show_point(at)} the balls cannot tell whether it is "
            "undefined there, too large for them (exp, cosh or sinh of a huge argument) or on the edge of a domain")
    together = kernel.guard()  # what the samples are screened by
    at = unsettled(together) if together is not None else None
    if at is not None:
        return Unevaluable(
            f"the rates and outputs never have finite values all at once at the {drawn} points drawn from the ranges, "
            f"and at {show_point(at)} the balls cannot tell whether that is because one is undefined there")
    return [finding(
        "singular-model",
        f"the rates and outputs are never all defined at once at the {drawn} points drawn from the ranges "
        f"(the first: {show_point(first)}): each is defined somewhere, but not together; nothing can be "
        "analysed", anchor=anchors.PLANT, hint=_ENVELOPE_DOMAIN_HINT)]


#: What to check when a rate is undefined all over the envelope.
_ENVELOPE_DOMAIN_HINT = ("check the ranges against the functions' domains (asin and acos need -1 .. 1, sqrt, log "
                         "and fractional powers a positive argument, a denominator must not vanish)")


def run_analysis(model: Model, settings: AnalysisSettings = AnalysisSettings(),
                 stage: Stage | None = None, write_out: bool = True, kernel: Kernel | None = None) -> Analysis:
    """All stages for one model whose model-family checks passed.

    ``stage(name, analysis)`` is called as each stage completes (the runner sends a
    snapshot then, so that a stop keeps the completed work). ``write_out`` also solves
    for the zero dynamics symbolically, for display (``explain``); no verdict uses it."""
    if kernel is None:
        plant = model.plant()
        assert plant is not None, "analysis needs an input-affine model"
        kernel = Kernel(plant)
    plant = kernel.plant
    structure = analyse_structure(kernel)
    result = Analysis(model, kernel, structure)
    result.findings.extend(structure.findings)
    result.done("structure", stage)

    result.envelope = certify_envelope(kernel, structure, settings.envelope_seconds, settings.envelope_boxes,
                                       model.spans)
    result.findings.extend(result.envelope.findings)
    result.done("envelope", stage)

    timer = clock(settings.envelope_seconds, settings.envelope_boxes)
    for op in model.points:
        given = {model.symbol(k): v for k, v in op.values.items()}
        tolerance, source = ((float(op.tolerance), "written on the point") if op.tolerance is not None else
                             (float(settings.point_tolerance), "point-tolerance in the configuration"))
        eq = solve_point(plant, op.name, given, kernel, tolerance, source)
        pa = PointAnalysis(op.name, eq)
        result.findings.extend(eq.findings)
        if all(s in eq.values for s in plant.states):
            pa.structure = structure_at_point(kernel, structure, op.name, eq.values)
            result.findings.extend(pa.structure.findings)
            written = {model.symbol(k): v for k, v in op.parametric.items()}
            pa.parametric = box_point(kernel, structure.vector_relative_degree, structure.decoupling, op.name, eq,
                                      written, pa.structure.well_defined, timer)
            result.findings.extend(pa.parametric.findings if pa.parametric is not None else [])
        result.points.append(pa)
    result.done("points", stage)

    degrees = structure.vector_relative_degree
    for pa in result.points:
        if pa.structure is None or not pa.equilibrium.equilibrium or not pa.structure.well_defined:
            continue
        if any(d is None for d in degrees):
            continue
        ints = [int(d) for d in degrees if d is not None]
        pa.zero_dynamics = zero_dynamics_at(kernel, ints, pa.equilibrium.values, pa.name,
                                            approximate=pa.equilibrium.approximate)
        result.findings.extend(pa.zero_dynamics.findings)
        result.findings.extend(box_zero_dynamics(pa.parametric, ints, pa.zero_dynamics))
        if pa.zero_dynamics.verdict == "not_applicable" and sum(ints) == plant.n:
            pa.normal_form = _full_normal_form(kernel, ints)
        elif pa.zero_dynamics.verdict != "undefined" and sum(ints) < plant.n:
            pa.normal_form = normal_form_at(kernel, ints, pa.equilibrium.values, write_out)
    result.done("zero dynamics", stage)

    for pa in result.points:  # A, B, C at each equilibrium, cross-checked with the zero dynamics
        if pa.equilibrium.equilibrium and all(s in pa.equilibrium.values for s in plant.states):
            pa.linearisation = linearise_at(kernel, pa.equilibrium, pa.zero_dynamics)
            result.findings.extend(pa.linearisation.findings)
    result.done("linearisation", stage)

    if plant.m >= 1:
        by_outputs = outputs_linearize(structure, plant.n, plant.m)
        generic: list[DistributionStructure] = []  # the bracket analysis, built at most once
        shifted: dict[tuple[sp.Expr, ...], tuple[Kernel, DistributionStructure]] = {}

        def brackets() -> DistributionStructure:
            if not generic:
                generic.append(analyse_distributions(kernel))
                result.findings.extend(generic[0].findings)
            return generic[0]

        for pa in result.points:
            if not all(s in pa.equilibrium.values for s in plant.states):
                continue
            if pa.equilibrium.status == "undefined":  # the rates do not exist there: no fields either
                continue
            if by_outputs is not None and pa.structure is not None and pa.structure.well_defined:
                pa.distributions = _linearizable_at(pa.name, by_outputs, structure, a_output=kernel.h)
                continue
            at_kernel, at_structure = _feedback_shifted(kernel, brackets(), pa.equilibrium, shifted)
            pa.distributions = distributions_at(at_kernel, at_structure, pa.name, pa.equilibrium.values)
            result.findings.extend(pa.distributions.findings)
            if any(c.kind == "state_linearizable" and c.point in (None, pa.name) for c in model.claims):
                result.findings.extend(box_controllability(pa.parametric, pa.distributions.controllability_rank))
        result.distributions = by_outputs if by_outputs is not None else brackets()
    result.done("distributions", stage)

    result.findings.extend(_unconfirmed_values(kernel))
    result.findings.extend(check_claims(result))
    result.done("claims", stage)
    return result


def _unconfirmed_values(kernel: Kernel) -> list[Finding]:
    """Constants (values at points) taken as zero without proof: every ball up to 1024 bits
    contains 0 and sympy's bounded ``equals`` gave no answer. No stage reports them on its
    own, and the claims they touch are not decided, so they are named here."""
    values = [e for e in kernel.uncertain if not e.free_symbols]
    if not values:
        return []
    k = len(values)
    return [finding(
        "analysis-budget",
        f"{'a value' if k == 1 else f'{k} values'} at the operating points {'was' if k == 1 else 'were'} taken as "
        f"zero without proof: {show_expr(values[0], limit=100)}{' (and others)' if k > 1 else ''} lies within "
        "2^-1024 of zero, but the symbolic test did not decide it within its bound; claims that rest on it are "
        "not decided",
        anchor=anchors.PLANT, hint="write the point's values as exact numbers, or check the constants in them",
    )]


def _full_normal_form(kernel: Kernel, degrees: list[int]) -> NormalForm:
    """r = n at a point where the relative degree is well defined: the n functions
    L_f^k h_i are coordinates there, because their differentials are independent
    (the rank lemma: Isidori, Nonlinear Control Systems, 3rd ed., Lemmas 4.1.1 and
    5.1.1), so no Jacobian has to be formed."""
    plant = kernel.plant
    xi: list[str] = []
    for i in range(plant.p):
        shown = True  # L_f^k h is formed only while the previous one was short enough to show
        for k in range(degrees[i]):
            generic = plant.outputs[i] if k == 0 else (f"L_f {plant.outputs[i]}" if k == 1 else
                                                       f"L_f^{k} {plant.outputs[i]}")
            name = xi_name(kernel.lf(i, k), plant.outputs[i], k) if shown else generic
            shown = shown and name != generic
            xi.append(name)
    return NormalForm(tuple(xi), (), plant.n, True, True, None,
                      note="total relative degree n: no internal coordinates, no zero dynamics")


BY_OUTPUTS_NOTE = (
    "state linearizable here by the outputs: their vector relative degree sums to n and the "
    "decoupling matrix is nonsingular at this point, so the outputs and their Lie derivatives are "
    "linearizing coordinates (Isidori, Nonlinear Control Systems, 3rd ed., sec. 5.2)"
)


def outputs_linearize(structure: Structure, n: int, m: int) -> DistributionStructure | None:
    """The distributions, known without brackets, when the declared outputs linearize the state.

    With as many outputs as inputs, a vector relative degree (r_1..r_m) summing
    to n and a decoupling matrix of full rank, the plant is feedback equivalent
    (near every point where A is nonsingular) to m chains of integrators of
    lengths r_i. There G_k has rank sum_i min(k+1, r_i), every G_k is
    involutive and G_(n-1) has rank n. The expensive brackets are then skipped.
    """
    degrees = structure.vector_relative_degree
    if len(degrees) != m or any(r is None for r in degrees) or structure.generic_rank != m:
        return None
    rs = [int(r) for r in degrees if r is not None]
    if sum(rs) != n:
        return None
    ranks = tuple(sum(min(k + 1, r) for r in rs) for k in range(n))
    return DistributionStructure(n=n, m=m, fields=(), ranks=ranks, bases=tuple(() for _ in ranks),
                                 involutive_by_order=tuple(True for _ in range(max(n - 1, 0))), failures=(),
                                 uncertain=(), findings=())


def _linearizable_at(name: str, ds: DistributionStructure, structure: Structure,
                     a_output: tuple[sp.Expr, ...]) -> PointDistributions:
    single = ds.m == 1
    return PointDistributions(
        point=name, ranks=ds.ranks, generic_ranks=ds.ranks, singular_orders=(), controllability_rank=ds.n,
        missing_directions=(), missing_vectors=(), involutive=True, state_linearizable=True, failure=None,
        output_searched=single, linearizing_output=a_output[0] if single else None, notes=(BY_OUTPUTS_NOTE,),
        findings=(),
    )


def _feedback_shifted(kernel: Kernel, structure: DistributionStructure, eq: Equilibrium,
                      memo: dict[tuple[sp.Expr, ...], tuple[Kernel, DistributionStructure]]
                      ) -> tuple[Kernel, DistributionStructure]:
    """Kernel and structure for the ranks at an equilibrium held by inputs u0 != 0.

    The conditions for state linearization are invariant under the feedback
    u = u0 + v, but the ranks of [g, ad_f g, ...] *at a point* are those of the
    drift that vanishes there: with f~ = f + g u0 they are the ranks of the
    Kalman matrix of the linearisation, as a control engineer reads them. With
    the bare drift a hover or a gravity-holding point would look like a false
    singular point.
    """
    plant = kernel.plant
    u0 = [eq.values.get(u, sp.Integer(0)) for u in plant.inputs]
    if not eq.equilibrium or all(v == 0 for v in u0):
        return kernel, structure
    key = tuple(u0)
    if key in memo:  # points held by the same inputs share the shifted drift
        return memo[key]
    shifted_f = tuple(
        plant.f[i] + sum((plant.g[j][i] * u0[j] for j in range(plant.m)), sp.Integer(0)) for i in range(plant.n)
    )
    shifted = Kernel(replace(plant, f=shifted_f), seed=kernel.seed)
    shifted.share_derivatives(kernel)  # the input fields, and brackets among them, are the same
    # generic ranks of the shifted drift too, so that "rank drops at the point"
    # compares like with like (only the conditions as a whole are feedback invariant)
    memo[key] = (shifted, analyse_distributions(shifted))
    return memo[key]


# -- claims -------------------------------------------------------------------------

class Undecided(str):
    """A claim checker's message for "could not be decided" (as opposed to "fails"), with
    the finding's hint when there is more to say than what a larger budget would do."""

    hint: str | None

    def __new__(cls, text: str, hint: str | None = None) -> "Undecided":
        self = super().__new__(cls, text)
        self.hint = hint
        return self


def claim_stage(claim: ClaimDecl, ranged: bool = False) -> str:
    """The stage after which ``claim`` can be decided (``ranged``: the model has parameters
    with a range, over which a relative degree claim without a point is held too, with the
    envelope stage's verdict)."""
    if claim.kind == "relative_degree":
        return ("envelope" if ranged else "structure") if claim.point is None else "points"
    return {"regular": "points", "minimum_phase": "zero dynamics", "state_linearizable": "distributions"}[claim.kind]


def check_claims(a: Analysis) -> list[Finding]:
    """Every claim, decided or not (all stages before ``claims`` have completed)."""
    decided, pending = claims_so_far(a)
    return decided + pending


def claims_so_far(a: Analysis) -> tuple[list[Finding], list[Finding]]:
    """The claims the completed stages settle, and the rest (not decided yet).

    A pending claim's message ends in ``not decided``; whoever stops the analysis
    appends why (``: the analysis stopped at ...``).
    """
    out: list[Finding] = []
    pending: list[Finding] = []
    ranged = bool(a.kernel.plant.params)
    for claim in a.model.claims:
        text = claim_text(claim)
        read_without = _read_without_inputs(a, claim)
        if read_without:
            failures: list[tuple[str | None, str | Undecided]] = [(claim.point, Undecided(
                f"output{'s' if len(read_without) > 1 else ''} {listed([repr(o) for o in read_without])} "
                f"{'use' if len(read_without) > 1 else 'uses'} an input (feedthrough, relative degree 0), which the "
                "analyses do not cover: they read the output with its input terms dropped, so what they found is "
                "about another output",
                hint="a claim about an output with feedthrough is not checked; measure a quantity the input "
                     "drives through the states, or model the sensor's own dynamics"))]
        elif claim.kind in ("regular", "minimum_phase") and not a.model.outputs:
            failures = [
                (claim.point, "the model declares no output, so there is no relative degree or zero dynamics to check")]
        elif claim_stage(claim, ranged) in a.completed:
            failures = _CLAIM_CHECKS[claim.kind](a, claim)
        elif claim.kind == "regular" and claim.point is None and a.envelope is not None and a.envelope.regular is False:
            failures = [f for f in _regular_claim(a, claim) if f[0] is None]  # the envelope alone refutes it
        else:
            pending.append(finding("expectation-failed", f"`{text}` not decided",
                                   point=claim.point, anchor=claim.anchor, undecided=True,
                                   hint=f"needs the stage '{claim_stage(claim, ranged)}' to complete"))
            continue
        if not failures and a.kernel.uncertain:
            failures = [(claim.point, _unproven_zeros(a))]
        elif a.kernel.uncertain:  # a failure found on that structure is not proven either
            failures = [(point, message if isinstance(message, Undecided) else _resting(message, a))
                        for point, message in failures]
        for point, message in failures:
            if isinstance(message, Undecided):
                out.append(finding("expectation-failed", f"`{text}` not decided: {message}",
                                   point=point, anchor=claim.anchor, undecided=True, hint=message.hint))
            else:
                out.append(finding("expectation-failed", f"`{text}` does not hold: {message}",
                                   point=point, anchor=claim.anchor))
    return out, pending


def _read_without_inputs(a: Analysis, claim: ClaimDecl) -> list[str]:
    """The outputs with feedthrough a claim is about: its own output for a relative degree,
    every output for regularity and zero dynamics; none for state linearizability, which
    is a property of f and g alone."""
    through = a.model.feedthrough
    if not through or claim.kind == "state_linearizable":
        return []
    if claim.kind == "relative_degree":
        return [claim.output] if claim.output in through else []
    return list(through)


def _unproven_zeros(a: Analysis) -> Undecided:
    """Why a claim that holds on the computed structure is still not decided: the
    structure rests on expressions taken as zero without proof (every numeric test says
    zero, the symbolic proof did not finish within its bound)."""
    return Undecided(f"it holds only if {_taken_as_zero(a)}, and the symbolic proof did not finish within its "
                     f"bound{_see_budget(a, ' (', ')')}")


def _resting(message: str, a: Analysis) -> Undecided:
    """A claim's failure found on a structure that rests on unproven zeros: not decided."""
    return Undecided(f"{message}, if {_taken_as_zero(a)} (the symbolic proof did not finish within its bound"
                     f"{_see_budget(a, '; ', '')})")


def _see_budget(a: Analysis, before: str, after: str) -> str:
    """A pointer to the analysis-budget finding that names the unproven zeros, when there is one."""
    return f"{before}see the analysis-budget finding{after}" if any(
        f.rule == "analysis-budget" for f in a.findings) else ""


def _taken_as_zero(a: Analysis) -> str:
    functions = sum(1 for e in a.kernel.uncertain if e.free_symbols)
    values = len(a.kernel.uncertain) - functions
    parts = []
    if functions:
        which = "an expression that is" if functions == 1 else f"{functions} expressions that are"
        parts.append(f"{which} zero at every sampled point {'is' if functions == 1 else 'are'} zero identically")
    if values:
        which = "a value at a point that lies" if values == 1 else f"{values} values at points that lie"
        parts.append(f"{which} within 2^-1024 of zero {'is' if values == 1 else 'are'} exactly zero")
    return " and ".join(parts)


def claim_text(c: ClaimDecl) -> str:
    text = f"expect relative_degree({c.output}) = {c.value}" if c.kind == "relative_degree" else f"expect {c.kind}"
    return text + (f" at {c.point}" if c.point else "")


def _points_for(a: Analysis, claim: ClaimDecl) -> list[PointAnalysis]:
    return [p for p in a.points if claim.point is None or p.name == claim.point]


def _relative_degree_claim(a: Analysis, c: ClaimDecl) -> list[tuple[str | None, str]]:
    generic = a.structure.relative_degree.get(c.output or "")
    if c.point is None:
        if generic != c.value:
            # a value written from a linearisation at a point where the relative degree is
            # not defined (the ball and beam): say where that number comes from
            linear = [pa.name for pa in a.points if _linear_degree(a, pa, c.output) == c.value
                      and (pa.structure is None or pa.structure.relative_degree.get(c.output or "") is None)]
            origin = (f"; {c.value} is the relative degree of the linearisation at point '{linear[0]}', where the "
                      "nonlinear relative degree is not defined" if linear else "")
            return [(None, f"the relative degree of '{c.output}' is {_degree(generic)}{_entered(a, c.output or '')}"
                           f"{origin}")]
        # it reads the envelope only for its shortcut (regular over the whole box)
        key = ("degree over parameters", c.output, generic, a.envelope is not None and a.envelope.regular is True)
        return list(_once(a, key, lambda: _degree_over_parameters(a, c.output or "", generic)))
    out = []
    for pa in _points_for(a, c):
        at = pa.structure.relative_degree.get(c.output or "") if pa.structure else None
        if at != c.value:
            linear = _linear_degree(a, pa, c.output) if at is None else None
            why = f"it is {_degree(at)}" if at is not None else (
                f"it is not well defined (generic relative degree {_degree(generic)})"
                + (f"; its linearisation there has relative degree {linear}" if linear is not None else ""))
            out.append((pa.name, f"at point '{pa.name}' {why}"))
        else:
            out.extend(_box_failure(pa, "rows", c.output))
    return out


#: How many states the search for a parameter-free witness of "the input reaches the output"
#: tries, and its budget for each (a box of the ranged parameters only).
_DEGREE_SAMPLES = 6
_DEGREE_BUDGET = Budget(max_boxes=2000, max_seconds=0.5)


def _degree_over_parameters(a: Analysis, output: str, r: int | None) -> list[tuple[str | None, str]]:
    """The relative degree r holds for every value of the ranged parameters when, for each
    value, the row L_g L_f^(r-1) y is not identically zero in the states (the rows below it
    are zero identically in states and parameters). A proof: one state x0, or a few states
    together, at which the row is never all zero over the parameter box. A refutation: a
    parameter value at which the row vanishes identically (the input no longer reaches the
    output there in r steps). Otherwise the claim is not decided over the box."""
    plant = a.kernel.plant
    if r is None or not plant.params or output not in plant.outputs:
        return []
    i = plant.outputs.index(output)
    row = [a.kernel.lglf(j, i, r - 1) for j in range(plant.m)]
    ranged = set(plant.params)
    if not any(e.free_symbols & ranged for e in row):
        return []
    if a.envelope is not None and a.envelope.regular is True and plant.p == 1:
        return []  # never zero on the box of states and parameters
    box = {s: plant.param_box[s] for s in plant.params}
    found: list[dict[sp.Symbol, sp.Expr]] = []
    rows_at: list[sp.Expr] = []
    for x0 in _state_samples(plant):
        at = [e.xreplace(x0) for e in row]
        if has_undefined(at):  # a state where the row has no value (d sqrt(w)/dw at w = 0) proves nothing
            continue
        rows_at.extend(at)
        verdict = _certified(at, box)
        if verdict is None:
            continue
        if verdict.regular is True:
            return []
        if verdict.regular is False and verdict.witness is not None and verdict.witness_exact:
            found.append({s: sp.Rational(verdict.witness[str(s)]) for s in plant.params})
    # no single state will do (x1^2 + a - 1 vanishes at some a for every x1): the states
    # together, "never all zero at once" over the box, prove it for every parameter value
    together = _certified(rows_at, box) if rows_at else None
    if together is not None and together.regular is True:
        return []
    for p_star in found:
        if all(a.kernel.is_zero(e.xreplace(p_star)).proven_zero for e in row):
            named = {s for e in row for s in e.free_symbols}
            where = ", ".join(f"{s} = {show_number(v)}" for s, v in p_star.items() if s in named)
            return [(None, f"at {where} (within its range) {lie_name(a.kernel, None, i, r - 1)} vanishes for every "
                           f"state: the relative degree of '{output}' there is not {r}")]
    return [(None, Undecided(f"over the parameter box it is not decided whether the relative degree of '{output}' "
                             f"stays {r}: no state was found where {lie_name(a.kernel, None, i, r - 1)} is proven "
                             "non-zero for every parameter value"))]


def _certified(exprs: list[sp.Expr], box: dict[sp.Symbol, Any]) -> Any:
    """certify_nonzero within the claim's small budget; None when the expressions cannot
    be enclosed (a function outside what balls hold): that proves nothing either way."""
    try:
        return certify_nonzero(exprs, box, _DEGREE_BUDGET)
    except UnsupportedExpression:
        return None


def _state_samples(plant: Any) -> list[dict[sp.Symbol, sp.Expr]]:
    """Rational states in the envelope: its centre, then points spread through it."""
    from fractions import Fraction

    out = []
    for t in range(_DEGREE_SAMPLES):
        x0: dict[sp.Symbol, sp.Expr] = {}
        for k, s in enumerate(plant.states):
            lo, hi = plant.state_box.get(s, (sp.Integer(-1), sp.Integer(1)))
            frac = Fraction(1, 2) if t == 0 else Fraction(((t * 7 + k * 3) % 11) + 1, 13)
            x0[s] = lo + (hi - lo) * sp.Rational(frac.numerator, frac.denominator)
        out.append(x0)
    return out


def _linear_degree(a: Analysis, pa: PointAnalysis, output: str | None) -> int | None:
    """The relative degree of the exact linearisation at the point for one output: the first
    k with C_i A^(k-1) B non-zero (the pole excess of its transfer functions); None when the
    linearisation is not exact (rational) or the output never sees the inputs."""
    lin = pa.linearisation
    plant = a.kernel.plant
    if lin is None or lin.status != "computed" or not lin.exact or output not in plant.outputs:
        return None
    A, B = sp.Matrix(lin.A), sp.Matrix(lin.B)
    row = sp.Matrix([lin.C[plant.outputs.index(output)]])
    for k in range(1, plant.n + 1):
        if any(e != 0 for e in row * B):
            return k
        row = row * A
    return None


def _degree(r: int | None) -> str:
    return str(r) if r is not None else "undefined (the inputs never reach it)"


def _once(a: Analysis, key: tuple[Any, ...], compute: Callable[[], Any]) -> Any:
    """``compute()`` once per analysis for ``key`` (the claims are checked after every stage)."""
    if key not in a.claim_memo:
        a.claim_memo[key] = compute()
    return a.claim_memo[key]


def _entered(a: Analysis, output: str) -> str:
    """Where the inputs first reach an output of relative degree r (", through L_g L_f^2 y
    = 75/(8*m)"): what a changed relative degree comes from."""
    def text() -> str:
        found = next((o for o in a.structure.outputs if o.name == output), None)
        if found is None or found.relative_degree is None or not found.row:
            return ""
        plant = a.kernel.plant
        shown, _ = row_terms(a.kernel, found.row, plant.outputs.index(output), found.relative_degree)
        who = f"the input '{plant.inputs[0]}' first enters" if plant.m == 1 else "the inputs first enter"
        return f": {who} its {_ordinal(found.relative_degree)} derivative, through {shown}"

    return _once(a, ("entered", output), text)


def _ordinal(n: int) -> str:
    """1st, 2nd, 3rd, 4th, ..., 11th, 12th, 13th, 21st."""
    suffix = "th" if 10 <= n % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")
    return f"{n}{suffix}"


def _regular_claim(a: Analysis, c: ClaimDecl) -> list[tuple[str | None, str]]:
    out: list[tuple[str | None, str]] = []
    if c.point is None and (unreached := _never_reached(a)):
        return [(None, _unreached_text(unreached))]  # so at every point: said once
    if c.point is None:
        env = a.envelope
        if env is not None and env.regular is None and env.undecidable:
            out.append((None, Undecided(f"regularity over the envelope cannot be certified: {env.undecidable} "
                                        "(see the envelope-unproven finding)")))
        elif env is None or env.regular is None:
            out.append((None, Undecided("regularity over the envelope could not be proven within its budget "
                                        "(see the envelope-unproven finding)")))
        elif env.regular is False and _singular_everywhere(a):
            out.append((None, f"the decoupling matrix is singular everywhere ({_rank_for(a)}; see the "
                              "decoupling-singular finding)"))
            return out  # every point fails for that one reason: said once, not once more per point
        elif env.regular is False and env.certified == "model domain":
            where = show_point(env.witness or {})
            out.append((None, "the model itself is undefined somewhere in the envelope ("
                              + (f"at {where}; " if where else "") + "see the singular-model finding)"))
        elif env.regular is False:
            where = env.where or show_point(env.witness or {})
            vector = "vector " if a.kernel.plant.p > 1 else ""
            out.append((None, f"the {vector}relative degree is not well defined everywhere in the envelope"
                              + (f" (singular at {where})" if where else "")))
    for pa in _points_for(a, c):
        if pa.structure is None or not pa.structure.well_defined:
            out.append((pa.name, f"at point '{pa.name}' {_why_not_regular(a, pa)}"))
        else:
            out.extend(_box_failure(pa, "decoupling"))
    return out


def _never_reached(a: Analysis) -> list[str]:
    """Outputs proven never to see the inputs (L_g L_f^k h = 0 identically for every k):
    they have no relative degree at any state."""
    st = a.structure
    return [o.name for o in st.outputs if o.relative_degree is None and not o.unconfirmed] if st is not None else []


def _unreached_text(names: list[str]) -> str:
    which = ", ".join(names)
    return (f"{which} never {'sees' if len(names) == 1 else 'see'} the inputs, so {'its' if len(names) == 1 else 'their'} "
            "relative degree is defined at no state (see the relative-degree-undefined finding)")


def _singular_everywhere(a: Analysis) -> bool:
    """Is the decoupling matrix proven singular for every state (generic rank below the
    number of outputs)?"""
    st = a.structure
    return bool(st is not None and st.rank_certain and st.generic_rank is not None and st.generic_rank < a.kernel.plant.p)


def _rank_for(a: Analysis) -> str:
    """'generic rank 1 for 2 outputs': why a decoupling matrix is singular everywhere."""
    return f"generic rank {a.structure.generic_rank} for {a.kernel.plant.p} outputs"


def _why_not_regular(a: Analysis, pa: PointAnalysis) -> str:
    """Which of the two a point fails: an output's relative degree, or the decoupling matrix."""
    st = pa.structure
    if st is None and pa.equilibrium.status == "missing_states":
        return "not every state is given (see the point-incomplete finding)"
    if st is None:
        return "the structure could not be computed"
    undefined = [o for o, r in st.relative_degree.items() if r is None]
    if undefined:
        return f"the relative degree of {', '.join(undefined)} is not well defined"
    p = a.kernel.plant.p
    return (f"the decoupling matrix is singular (rank {st.decoupling_rank} for {p} output{'s' if p != 1 else ''}"
            + (f", {a.kernel.plant.m} input{'s' if a.kernel.plant.m != 1 else ''}" if a.kernel.plant.m != p else "")
            + ")")


def _box_failure(pa: PointAnalysis, prop: str, key: str | None = None) -> list[tuple[str | None, str]]:
    """A claim that holds at the nominal parameter values must hold over the parameter box."""
    found = claim_failure(pa.parametric, prop, key)
    if found is None:
        return []
    message, decided = found
    return [(pa.name, message if decided else Undecided(message))]


def _minimum_phase_claim(a: Analysis, c: ClaimDecl) -> list[tuple[str | None, str]]:
    points = _points_for(a, c)
    if not points:
        return [(None, "the model declares no operating point to check it at")]
    if c.point is None and (unreached := _never_reached(a)):
        return [(None, _unreached_text(unreached) + ", and the zero dynamics are not defined at any point")]
    if c.point is None and _singular_everywhere(a):
        return [(None, f"the decoupling matrix is singular everywhere ({_rank_for(a)}), so the zero dynamics are "
                       "not defined at any point (see the decoupling-singular finding)")]
    out: list[tuple[str | None, str]] = []
    for pa in points:
        zd = pa.zero_dynamics
        if pa.structure is None or not pa.equilibrium.equilibrium:
            if c.point is not None and pa.equilibrium.status == "missing_states":
                out.append((pa.name, f"'{pa.name}' does not give every state, so the zero dynamics are not defined "
                                     "there (see the point-incomplete finding)"))
            elif c.point is not None:
                out.append((pa.name, f"'{pa.name}' is not an equilibrium, so the zero dynamics are not defined there"))
            continue
        if zd is not None and zd.beyond_scope:
            out.append((pa.name, Undecided(
                f"at point '{pa.name}' the zero dynamics were not computed: {zd.reason}",
                hint="no budget decides this: the zero dynamics of this plant's shape are beyond what plantlint "
                     "computes; check the claim by other means and waive it with the reason, or declare the "
                     "outputs the controller holds, one per input")))
        elif zd is None or zd.verdict == "undefined":
            reason = zd.reason if zd is not None and zd.reason else f"{_why_not_regular(a, pa)} there"
            out.append((pa.name, f"at point '{pa.name}' the zero dynamics are not defined: {reason}"))
        elif zd.verdict == "non_minimum_phase":
            out.append((pa.name, f"at point '{pa.name}' the zero dynamics are unstable: eigenvalues "
                                 f"{show_eigenvalues(zd.eigenvalues)}"))
        elif zd.verdict == "critical" and (zd.exact or zd.tolerance is None):
            # an exact verdict stores the real part of an eigenvalue on the axis as exactly 0
            on_axis = [z for z in zd.eigenvalues if z.real == 0] or list(zd.eigenvalues)
            out.append((pa.name, f"at point '{pa.name}' the linearised zero dynamics have eigenvalues on the "
                                 f"imaginary axis ({show_eigenvalues(on_axis)}); linearisation cannot show "
                                 "asymptotic stability"))
        elif zd.verdict == "critical" and zd.not_hurwitz:
            out.append((pa.name, f"at point '{pa.name}' the linearised zero dynamics have eigenvalues within "
                                 f"{zd.tolerance:.3g} of the imaginary axis ({show_eigenvalues(zd.eigenvalues)}) and "
                                 f"{zd.not_hurwitz}: linearisation cannot show asymptotic stability"))
        elif zd.verdict == "critical":
            # within the numeric route's tolerance of the axis, not proven on it: the claim may
            # hold (an eigenvalue at -1e-12 is stable) and is not shown to: not decided
            out.append((pa.name, Undecided(
                f"at point '{pa.name}' the linearised zero dynamics have eigenvalues within {zd.tolerance:.3g} of "
                f"the imaginary axis ({show_eigenvalues(zd.eigenvalues)}), not proven to be on it or off it "
                "(irrational values at the point: the eigenvalues are computed to 40 digits or more, not exactly)")))
        elif zd.verdict == "minimum_phase":
            out.extend(_box_failure(pa, "zero_dynamics"))
    if c.point is None and not any(p.equilibrium.equilibrium for p in points):
        out.append((None, "no declared point is an equilibrium, and the zero dynamics are taken at one "
                          "(see the findings at the points)"))
    return out


def _state_linearizable_claim(a: Analysis, c: ClaimDecl) -> list[tuple[str | None, str]]:
    ds = a.distributions
    if ds is None:
        return [(None, "the plant has no input")]
    points = _points_for(a, c)
    out: list[tuple[str | None, str]] = []
    if not points:
        n = a.kernel.plant.n
        if not ds.involutive and ds.failure is not None:
            # the distributions above the failing one were not formed (ds.ranks stops there),
            # so nothing is said of the controllability distribution's rank
            out.append((None, f"{ds.name(ds.failure.order)} is not involutive ({ds.failure.pair} leaves it)"))
        elif not ds.ranks or ds.ranks[-1] < n:
            out.append((None, f"the controllability distribution has generic rank {ds.ranks[-1] if ds.ranks else 0} < {n}"))
        return out
    for pa in points:
        pd = pa.distributions
        if pd is None and pa.equilibrium.status == "undefined":
            out.append((pa.name, f"at point '{pa.name}' the rates are undefined (division by zero or a "
                                 "function outside its domain)"))
        elif pd is None:
            out.append((pa.name, f"point '{pa.name}' is incomplete"))
        elif pd.undefined:
            out.append((pa.name, Undecided(f"at point '{pa.name}' some fields of the distributions are undefined "
                                           "(a derivative does not exist there), so their ranks are only lower bounds")))
        elif not pd.state_linearizable:
            why = []
            n = len(pd.ranks)
            if pd.controllability_rank < n:
                why.append(f"controllability rank {pd.controllability_rank} < {n}")
            if not pd.involutive and pd.failure is not None:
                why.append(involutivity_reason(pd, pa.name))
            if not pd.constant_rank:
                why.append(rank_drop_reason(pd, pa.name))
            elif pd.singular_orders:
                why.append("rank of " + ", ".join(ds.name(k) for k in pd.singular_orders) + " drops at the point")
            out.append((pa.name, f"at point '{pa.name}': " + ("; ".join(why) or "conditions fail")))
        else:
            box = pa.parametric.controllability if pa.parametric is not None else None
            out.extend(_box_failure(pa, "controllability" if box is not None else "decoupling"))
    return out


_CLAIM_CHECKS: dict[str, Callable[[Analysis, ClaimDecl], list[tuple[str | None, str]]]] = {
    "relative_degree": _relative_degree_claim,
    "regular": _regular_claim,
    "minimum_phase": _minimum_phase_claim,
    "state_linearizable": _state_linearizable_claim,
}

__all__ = ["STAGES", "Analysis", "PointAnalysis", "check_claims", "claim_stage", "claim_text", "claims_so_far",
           "run_analysis"]
