"""Operating points: is the declared point an equilibrium, and with which inputs?

A ``point`` gives every state and some inputs. The rates F(x0, u0) = f(x0) + g(x0) u0
are affine in the inputs, so the inputs the author left out are found by exact
linear algebra on the numbers at the point. The numbers may be transcendental
(``sin(1/3)``), so every "is this entry zero?" is decided rigorously by the kernel
(ball arithmetic, then exact confirmation), never by a float comparison.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Sequence

import sympy as sp

from plantlint.kernel.balls import UnsupportedExpression
from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding
from plantlint.kernel.exact import ZeroDecider, gauss_jordan, number_decider, has_undefined
from plantlint.kernel.lie import Kernel
from plantlint.language.printer import decimal_text, show_number
from plantlint.kernel.plant import Plant, as_expr

#: Outcomes of :func:`solve_point`.
STATUSES = ("equilibrium", "not_equilibrium", "undetermined", "no_solution", "missing_states", "undefined",
            "refined")

@dataclass(frozen=True)
class Equilibrium:
    """What a declared operating point turned out to be.

    ``values`` holds the states, the given inputs and the inputs solved for (exact).
    ``residual`` is F(x0, u0) per state when every input is known, else empty.
    """

    name: str
    equilibrium: bool
    status: str  # one of STATUSES
    values: dict[sp.Symbol, sp.Expr]
    solved_inputs: tuple[sp.Symbol, ...] = ()
    undetermined_inputs: tuple[sp.Symbol, ...] = ()
    residual: tuple[sp.Expr, ...] = ()
    findings: tuple[Finding, ...] = field(default_factory=tuple)
    #: a point that misses an equilibrium: its relative residual, the equilibrium near it and
    #: (status "refined") the tolerance within which the analysis runs there instead
    refinement: dict[str, object] | None = None

    @property
    def approximate(self) -> bool:
        """Analysed at the equilibrium refined near the point, known to ~40 digits only (an
        exact equilibrium found near it is not approximate)."""
        near = (self.refinement or {}).get("equilibrium_near") if self.status == "refined" else None
        return isinstance(near, dict) and not near.get("exact", False)


# -- exact numbers ---------------------------------------------------------------
# -- the point -------------------------------------------------------------------
def solve_point(plant: Plant, name: str, given: dict[sp.Symbol, sp.Expr], kernel: Kernel | None = None,
                tolerance: float = 0.0, tolerance_source: str = "") -> Equilibrium:
    """Check the declared point ``name`` and solve for the inputs it leaves out.

    A point that misses an equilibrium is one finding, ``point-not-equilibrium``, whether
    its inputs are given or left out, with its residual relative to the size of the
    rates' terms and the equilibrium near it. Within ``tolerance`` (a relative residual)
    the point counts as a rounded equilibrium: the analysis runs at the refined one
    (status ``refined``) and a ``point-refined`` note says so.
    """
    kernel = kernel or Kernel(plant)
    given = {s: as_expr(v) for s, v in given.items()}
    decide = number_decider(kernel)
    anchor = anchors.point(name)
    findings: list[Finding] = []

    def report(rule: str, message: str, hint: str | None = None) -> None:
        findings.append(finding(rule, message, point=name, anchor=anchor, hint=hint))

    values: dict[sp.Symbol, sp.Expr] = {s: given[s] for s in (*plant.states, *plant.inputs) if s in given}
    missing = [s for s in plant.states if s not in given]
    findings.extend(_envelope_findings(plant, name, values, decide, solved=()))
    if missing:
        # reported once, by the model (language.model), at the point that leaves them out
        return Equilibrium(name, False, "missing_states", values, findings=tuple(findings))

    subs = dict(plant.param_nominal)
    subs.update({s: v for s, v in given.items() if s in plant.params})
    subs.update({s: values[s] for s in plant.states})
    f0 = [_at(e, subs) for e in plant.f]
    G0 = [[_at(plant.g[j][i], subs) for j in range(plant.m)] for i in range(plant.n)]
    undefined = [plant.states[i] for i in range(plant.n) if has_undefined([f0[i], *G0[i]])]
    if undefined:
        report(
            "point-not-equilibrium",
            f"at point {name} the rate(s) of {_names(undefined)} are undefined "
            "(division by zero or a function outside its domain)",
        )
        return Equilibrium(name, False, "undefined", values, findings=tuple(findings))

    known = [j for j, u in enumerate(plant.inputs) if u in values]
    unknown = [j for j, u in enumerate(plant.inputs) if u not in values]
    # right-hand side: c = f0 + G_known u_known ; we need G_unknown u_unknown = -c
    c = [f0[i] + sum((G0[i][j] * values[plant.inputs[j]] for j in known), sp.Integer(0)) for i in range(plant.n)]

    if not unknown:
        return _rounded(plant, name, given, _check_residual(plant, name, values, c, decide, findings), kernel,
                        tolerance, tolerance_source)

    n, k = plant.n, len(unknown)
    # augmented rows [G_unknown | -c | e_i]: the identity part records which rates
    # combine into an impossible equation when there is no solution
    rows = [
        [G0[i][j] for j in unknown] + [-c[i]] + [sp.Integer(1 if a == i else 0) for a in range(n)]
        for i in range(n)
    ]
    reduced, pivots, _ = gauss_jordan(rows, k, decide)
    conflicts: list[list[int]] = []
    for row in reduced[len(pivots):]:
        rhs = row[k]
        if decide(rhs).proven_nonzero:
            conflicts.append([a for a in range(n) if row[k + 1 + a] != 0])
    if conflicts:
        return _rounded(plant, name, given, _no_solution(plant, name, values, unknown, G0, c, conflicts, decide,
                                                         findings), kernel, tolerance, tolerance_source)

    free = [col for col in range(k) if col not in pivots]
    solved: dict[sp.Symbol, sp.Expr] = {}
    undetermined = [plant.inputs[unknown[col]] for col in free]
    for row_index, col in enumerate(pivots):
        row = reduced[row_index]
        if any(row[fc] != 0 for fc in free):
            undetermined.append(plant.inputs[unknown[col]])
        else:
            solved[plant.inputs[unknown[col]]] = row[k]
    values.update(solved)
    findings.extend(_envelope_findings(plant, name, solved, decide, solved=tuple(solved)))
    solved_order = tuple(u for u in plant.inputs if u in solved)
    if undetermined:
        order = [u for u in plant.inputs if u in undetermined]
        report(
            "point-incomplete",
            f"at point {name} the equilibrium equations do not determine the input(s) {_names(order)}; "
            "give their values in the point",
        )
        return Equilibrium(
            name, False, "undetermined", values, solved_order, tuple(order), findings=tuple(findings)
        )
    residual = tuple(
        c[i] + sum((G0[i][j] * solved[plant.inputs[j]] for j in unknown), sp.Integer(0)) for i in range(n)
    )
    return Equilibrium(name, True, "equilibrium", values, solved_order, (), residual, tuple(findings))


def _check_residual(
    plant: Plant,
    name: str,
    values: dict[sp.Symbol, sp.Expr],
    residual: list[sp.Expr],
    decide: ZeroDecider,
    findings: list[Finding],
) -> Equilibrium:
    """Every input is given: the point is an equilibrium iff every rate vanishes."""
    bad = [(plant.states[i], r) for i, r in enumerate(residual) if not decide(r).taken_zero]
    if bad:
        shown = ", ".join(f"d{s}/dt = {show_number(r, mark_inexact=True)}" for s, r in bad)
        findings.append(
            finding(
                "point-not-equilibrium",
                f"point {name} is not an equilibrium: {shown}",
                point=name,
                anchor=anchors.point(name),
            )
        )
    return Equilibrium(name, not bad, "not_equilibrium" if bad else "equilibrium", values,
                       residual=tuple(residual), findings=tuple(findings))


def _no_solution(
    plant: Plant,
    name: str,
    values: dict[sp.Symbol, sp.Expr],
    unknown: list[int],
    G0: list[list[sp.Expr]],
    c: list[sp.Expr],
    conflicts: list[list[int]],
    decide: ZeroDecider,
    findings: list[Finding],
) -> Equilibrium:
    """No input makes the point an equilibrium: say which rates stand in the way."""
    alone = [i for i in range(plant.n)
             if all(decide(G0[i][j]).taken_zero for j in unknown) and decide(c[i]).proven_nonzero]
    parts = []
    if alone:
        parts.append(
            "no input acts on "
            + ", ".join(f"d{plant.states[i]}/dt = {show_number(c[i], mark_inexact=True)}" for i in alone)
        )
    joint = [group for group in conflicts if not (len(group) == 1 and group[0] in alone)]
    for group in joint:
        parts.append("the rates of " + _names([plant.states[i] for i in group]) + " cannot vanish together")
    missing = [plant.inputs[j] for j in unknown]
    findings.append(
        finding(
            "point-incomplete",
            f"no value of the input(s) {_names(missing)} makes point {name} an equilibrium: " + "; ".join(parts),
            point=name,
            anchor=anchors.point(name),
        )
    )
    return Equilibrium(name, False, "no_solution", values, undetermined_inputs=tuple(missing), findings=tuple(findings))


def _envelope_findings(
    plant: Plant,
    name: str,
    values: dict[sp.Symbol, sp.Expr],
    decide: ZeroDecider,
    solved: tuple[sp.Symbol, ...],
) -> list[Finding]:
    """Warnings for values outside their declared range (decided exactly)."""
    out = []
    boxes = {**plant.state_box, **plant.input_box}
    for sym, value in values.items():
        bounds = boxes.get(sym)
        if bounds is None:
            continue
        lo, hi = (plant.nominal(b) for b in bounds)
        below = certainly_negative(value - lo, decide)
        above = certainly_negative(hi - value, decide)
        if not (below or above):
            continue
        kind = "state" if sym in plant.states else ("input needed" if sym in solved else "input")
        out.append(
            finding(
                "point-outside-envelope",
                f"at point {name} the {kind} {sym} = {show_number(value, mark_inexact=True)} lies outside its range "
                f"{show_number(lo, mark_inexact=True)} .. {show_number(hi, mark_inexact=True)}",
                point=name,
                anchor=anchors.point(name),
            )
        )
    return out


def certainly_negative(value: sp.Expr, decide: ZeroDecider) -> bool:
    """``value`` < 0, proven (exactly, or by a ball once it is proven non-zero)."""
    if value.is_Rational:
        return bool(value < 0)
    if not decide(value).proven_nonzero:
        return False
    from plantlint.kernel.balls import to_arb

    try:
        b = to_arb(value)
    except UnsupportedExpression:
        return False
    return bool(b < 0)


def _at(expr: sp.Expr, subs: dict[sp.Symbol, sp.Expr]) -> sp.Expr:
    return expr.xreplace(subs) if expr != 0 else expr


def _names(symbols: Sequence[sp.Symbol]) -> str:
    return ", ".join(str(s) for s in symbols)


def _rounded(plant: Plant, name: str, given: dict[sp.Symbol, sp.Expr], eq: Equilibrium, kernel: Kernel,
             tolerance: float, source: str) -> Equilibrium:
    """One rule for a point that misses an equilibrium: the residual relative to the model's
    scale, the value to write instead (exact when a short exact value is an equilibrium,
    else refined), and within ``tolerance`` the analysis at the refined equilibrium."""
    from dataclasses import replace

    from plantlint.analysis.refine import near_miss
    from plantlint.core.deadline import LATE, bounded

    missed = [f for f in eq.findings if f.rule in ("point-not-equilibrium", "point-incomplete")]
    if eq.equilibrium or not missed:
        return eq
    others = tuple(f for f in eq.findings if f not in missed)
    written = {s: v for s, v in given.items() if s in plant.states or s in plant.inputs}
    unknown = [u for u in plant.inputs if u not in given]
    late = False
    try:  # bounded: without it the point stays not an equilibrium
        found = bounded(REFINE_SECONDS, lambda: near_miss(plant, written, unknown))
        miss, late = (None, True) if found is LATE else (found, False)
    except (ArithmeticError, ValueError, TypeError):  # a refinement is advice: the finding stands without it
        miss = None
    values: dict[sp.Symbol, sp.Expr] | None = None
    exact = False
    if miss is not None and miss.candidates:
        trial = dict(given)
        trial.update(dict(miss.candidates))
        again = solve_point(plant, name, trial, kernel)
        if again.equilibrium:
            values, exact = dict(again.values), True
    if values is None and miss is not None and miss.values is not None:
        values = miss.values
    changed = [(z, w) for z, w, _ in miss.changed] if miss is not None else []
    shown = {z: _beside(values[z], exact, _written(w)) for z, w in changed} if values is not None else {}
    moved = ", ".join(f"{z} = {shown[z]} (written {_written(w)})" for z, w in changed)
    to_write = ", ".join(f"{z} = {shown[z]}" for z, _ in changed)
    # a refined value is shown rounded: what the point misses by once it is written so
    rounded = _rounded_miss(plant, written, unknown, shown) if shown and not exact else None
    solved = ", ".join(f"{u} = {_shown(values[u], exact)}" for u in unknown) if values is not None else ""
    refinement: dict[str, object] = {
        "relative_residual": miss.relative if miss is not None else None,
        "tolerance": tolerance,
        "equilibrium_near": None if values is None else {
            "changed": {str(z): {"written": _float(w), "value": _float(values[z])} for z, w in changed},
            "exact": exact,
        },
    }
    if miss is not None and values is not None and tolerance > 0 and miss.relative <= tolerance:
        where = f" ({source})" if source else ""
        note = finding(
            "point-refined",
            f"point {name} is an equilibrium within its tolerance {tolerance:g}{where}: its rates are "
            f"{_ratio(miss.relative)} of the size of their terms; the analysis runs at the "
            f"{'exact' if exact else 'refined'} equilibrium {moved}" + (f", {solved}" if solved and moved else solved),
            point=name, anchor=anchors.point(name),
            # a refined value is irrational or long: writing it rounded would miss again
            hint=f"write {to_write} to make the point exact" if moved and (exact or rounded == 0) else None,
        )
        return Equilibrium(name, True, "refined", values, tuple(unknown), (), eq.residual, (*others, note),
                           refinement={**refinement, "refined": True})
    base = missed[0].message
    size = f" (the largest rate is {_ratio(miss.relative)} of the size of its terms)" if miss is not None else ""
    message = base + size
    hint = None
    if values is not None and moved:
        message += f"; it is {'an exact' if exact else 'an'} equilibrium with {moved}"
        hint = _rounding_hint(to_write, exact, rounded, miss.relative if miss is not None else None)
    elif miss is not None and miss.values is None:
        message += "; no equilibrium was found near it by changing the values written"
    elif late:
        message += f"; the equilibrium near it was not worked out within {REFINE_SECONDS:g} s"
    missed = finding("point-not-equilibrium", message, point=name, anchor=anchors.point(name),
                     hint=hint)
    return replace(eq, findings=(*others, missed), refinement={**refinement, "refined": False})


def _rounded_miss(plant: Plant, written: dict[sp.Symbol, sp.Expr], unknown: list[sp.Symbol],
                  shown: dict[sp.Symbol, str]) -> float | None:
    """The relative residual left once the refined values are written as shown (a refined
    value is irrational or long, so its rounding leaves a miss of its own); None when it
    cannot be measured."""
    from fractions import Fraction

    from plantlint.analysis.refine import relative_at

    trial = dict(written)
    try:
        trial.update({z: sp.Rational(Fraction(text)) for z, text in shown.items()})
        return relative_at(plant, trial, unknown)
    except (ArithmeticError, ValueError, TypeError):
        return None


def _rounding_hint(to_write: str, exact: bool, rounded: float | None, relative: float | None) -> str:
    """What to write for a point that misses its equilibrium. An exact value makes the point
    exact; a refined one is shown rounded, so the hint gives the tolerance each choice needs
    (writing the shown value alone would miss again, by less)."""
    where = " at the end of the point (or point-tolerance in plantlint.toml)"
    keep = f"keep the written value with `tolerance {_above(relative)}`" if relative is not None and relative < 0.1 else ""
    if exact or rounded == 0:
        return f"write {to_write}" + (f", or {keep}{where}" if keep else "")
    if rounded is None:
        return (f"write {to_write} (rounded: it needs a tolerance too)" + (f", or {keep}" if keep else "")) + where
    return (f"the equilibrium is not a short exact number: write {to_write} with `tolerance {_above(rounded)}`"
            + (f", or {keep}" if keep else "") + where)


#: Wall-clock bound of the search for the equilibrium near a point that misses one.
REFINE_SECONDS = 3.0


def _written(value: sp.Expr) -> str:
    """A value as the file wrote it: a decimal in full (0.1272105004, not 0.127211), so the
    refined value beside it is seen to differ where it does."""
    if value.is_Rational and not value.is_Integer:
        text, exact = decimal_text(value, 20)
        if exact:
            return text
    return show_number(value)


def _beside(value: sp.Expr, exact: bool, written: str) -> str:
    """A refined value next to the written one, with the digits it takes to tell them apart."""
    shown = _shown(value, exact)
    if exact or value.is_Integer:
        return shown
    for digits in range(11, 21):
        if shown != written:
            break
        shown = format(float(value), f".{digits}g") if digits <= 17 else decimal_text(sp.Rational(value), digits)[0]
    return shown


def _shown(value: sp.Expr, exact: bool) -> str:
    if exact or value.is_Integer:
        return show_number(value)
    return format(float(value), ".10g")


def _ratio(value: float) -> str:
    """1.2e-4 rather than 0.00012; from 0.01 up a percentage (100%, not "1 of the size")."""
    if value == 0:
        return "0"
    if value >= 0.01:
        percent = value * 100
        return f"{percent:.2g}%" if percent < 99.5 else f"{percent:.0f}%"
    mantissa, exponent = f"{value:.1e}".split("e")
    return f"{mantissa}e{int(exponent)}"


def _float(value: sp.Expr) -> float | None:
    try:
        return float(value)
    except (TypeError, ValueError):
        return None


def _above(relative: float) -> str:
    """A round tolerance just above a relative residual (1.2e-4 -> 2e-4)."""
    import math

    exponent = math.floor(math.log10(relative)) if relative > 0 else -12
    digit = math.floor(relative / 10**exponent) + 1
    if digit >= 10:
        digit, exponent = 1, exponent + 1
    return f"{digit}e{exponent}"
