"""One serialisation of an analysis: plain JSON-ready data that every reader uses.

- :func:`analysis_json` is the ``analysis`` object of a file in the JSON report (its
  keys are documented in docs/report-format.md); SARIF, Markdown and the gate read the
  same data, and a worker sends it to the runner (it is cached with the raw result).
- :func:`structural_facts` is the one place that reads that object's keys for the
  gate's structural comparison (``--since``).
- :func:`explain_json` is the extra data of ``plantlint explain`` over the same records
  (the derivation: Lie-derivative table, decoupling matrix, envelope, per point the
  equilibrium, normal form, zero dynamics, linearisation, distributions, parameter box).
  It is built in the worker only when explain asks for it, so ``check`` never pays for it.

Everything here is plain data (str, numbers, bools, lists, dicts), so it crosses a
process boundary and goes through the same budget and policy as ``check``. The readers
of that data (:func:`structural_facts`, :func:`envelope_witness`) need no sympy, so the
analysis modules are imported only by the functions that build it.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from plantlint.analysis.stages import STAGES

if TYPE_CHECKING:
    from collections.abc import Sequence

    import sympy as sp

    from plantlint.analysis.distributions import PointDistributions
    from plantlint.analysis.engine import Analysis, PointAnalysis
    from plantlint.analysis.equilibria import Equilibrium
    from plantlint.analysis.linearisation import Linearisation, ModeGroup
    from plantlint.analysis.normal_form import NormalForm
    from plantlint.analysis.parametric import BoxVerdict, ParametricPoint
    from plantlint.analysis.structure import Envelope, PointStructure, Structure
    from plantlint.analysis.zero_dynamics import ZeroDynamics


# -- the analysis object of the reports --------------------------------------------

def structure_json(structure: Structure) -> dict[str, Any]:
    """The plant's generic relative degrees."""
    return {"relative_degree": dict(structure.relative_degree)}


def point_json(ps: PointStructure) -> dict[str, Any]:
    """The structure at one point: relative degrees, well defined, decoupling rank."""
    return {
        "relative_degree": dict(ps.relative_degree),
        "well_defined": ps.well_defined,
        "decoupling_rank": ps.decoupling_rank,
    }


def envelope_json(env: Envelope) -> dict[str, Any]:
    """The envelope verdict: regular (or not, or None), margin, witness."""
    return {"regular": env.regular, "margin": env.margin, "witness": env.witness}


def zero_dynamics_json(zd: ZeroDynamics) -> dict[str, object]:
    """The zero dynamics at one point: dimension, eigenvalues (sorted), verdict."""
    return {
        "dimension": zd.dimension,
        "eigenvalues": [[z.real, z.imag] for z in sorted(zd.eigenvalues, key=lambda z: (z.real, z.imag))],
        "verdict": zd.verdict,
    }


#: Why a point's distribution ranks are not given (JSON ``undefined``, explain).
UNDEFINED_FIELDS = ("a derivative of the rates does not exist at the point, so some input fields or their "
                    "brackets have no value there")


def distributions_json(pd: PointDistributions) -> dict[str, object]:
    """The per-point distribution summary of the JSON report."""
    from plantlint.analysis.distributions import distribution_name
    from plantlint.language.printer import show_expr

    out: dict[str, object] = {
        "controllability_rank": pd.controllability_rank,
        "involutive": pd.involutive,
        "constant_rank": pd.constant_rank,
        "rank_drops": [distribution_name(pd.m, k) for k in pd.singular_orders if k <= len(pd.ranks) - 2],
        "state_linearizable": pd.state_linearizable,
    }
    if pd.undefined:  # the ranks at the point are lower bounds only: none is reported as a rank
        out.update(controllability_rank=None, constant_rank=None, undefined=UNDEFINED_FIELDS)
    if not pd.involutive:
        out["involutivity_witness"] = pd.witness
    if pd.output_searched:
        out["linearizing_output"] = None if pd.linearizing_output is None else show_expr(pd.linearizing_output)
    return out


def analysis_json(a: Analysis) -> dict[str, Any]:
    """The ``analysis`` object of the JSON report (docs/report-format.md)."""
    m = a.model
    points: dict[str, Any] = {}
    for pa in a.points:
        entry: dict[str, Any] = dict(equilibrium_json(pa.equilibrium))
        if pa.structure is not None:
            entry.update(point_json(pa.structure))
        else:
            entry.update({"relative_degree": {o: None for o in m.outputs}, "well_defined": False,
                          "decoupling_rank": None})
        zd = pa.zero_dynamics
        entry["zero_dynamics"] = zero_dynamics_json(zd) if zd is not None and zd.verdict != "undefined" else None
        if pa.normal_form is not None:
            entry["normal_form"] = normal_form_json(pa.normal_form)
        entry["linearisation"] = (linearisation_json(pa.linearisation, len(m.outputs), len(m.inputs))
                                  if pa.linearisation is not None else None)
        if pa.distributions is not None:
            entry.update(distributions_json(pa.distributions))
        if pa.parametric is not None:
            entry["parameter_box"] = parametric_json(pa.parametric)
        points[pa.name] = entry
    out: dict[str, Any] = {
        "states": list(m.states),
        "inputs": list(m.inputs),
        "outputs": list(m.outputs),
        "input_affine": m.input_affine,
        "relative_degree": dict(a.structure.relative_degree),
        "decoupling_rank": a.structure.generic_rank,
        "envelope": envelope_json(a.envelope) if a.envelope is not None else
        {"regular": None, "margin": None, "witness": None},
        "points": points,
    }
    if a.distributions is not None:
        ds = a.distributions
        out["distributions"] = {
            "ranks": list(ds.ranks),
            "involutive": ds.involutive,
            "failing_bracket": ds.failure.pair if ds.failure else None,
        }
    if a.kernel.uncertain:
        out["unconfirmed_zero_tests"] = len(a.kernel.uncertain)
    out["stages"] = {"completed": list(a.completed),
                     "not_completed": [s for s in STAGES if s not in a.completed]}
    return out


# -- the records of one point (each stage's result, as the report holds it) ---------

def equilibrium_json(eq: Equilibrium) -> dict[str, object]:
    """The analysis record for one point (floats for display; exact values stay in Python)."""
    out: dict[str, float | str] = {}
    for sym, value in eq.values.items():
        try:
            out[str(sym)] = json_number(value)
        except (TypeError, ValueError):
            continue
    record: dict[str, object] = {"equilibrium": eq.equilibrium, "values": out}
    if eq.refinement is not None:
        record["refinement"] = eq.refinement
    return record


def normal_form_json(nf: NormalForm) -> dict[str, object]:
    """The analysis record of the normal form at one point."""
    return {
        "xi": list(nf.xi),
        "eta": list(nf.eta),
        "jacobian_rank": nf.jacobian_rank,
        "invertible": nf.invertible,
        "input_free": nf.input_free,
        "zero_dynamics": list(nf.zero_dynamics) if nf.zero_dynamics is not None else None,
        "note": nf.note or None,
    }


def _pairs(values: Sequence[complex]) -> list[list[float]]:
    return [[z.real, z.imag] for z in values]


def _floats(rows: Sequence[Sequence[sp.Expr]]) -> list[list[float | str]]:
    return [[json_number(e) for e in row] for row in rows]


def _display_float(e: "sp.Expr") -> float:
    """A constant expression's value for display: the midpoint of a 128-bit ball (sympy's
    evalf chases 20 digits of an exact zero for seconds; a mutant spent 16 s here)."""
    import sympy as sp

    from plantlint.kernel.balls import UnsupportedExpression, ball

    try:
        b = ball(e, prec=128)
        if b.is_finite() and b.rad() < abs(b.mid()) * 2.0**-60 + 2.0**-100:
            return float(b.mid())
    except (UnsupportedExpression, ArithmeticError, ValueError):
        pass
    return float(sp.N(e, 20))


def json_number(e: "sp.Expr") -> float | str:
    """An exact number for the JSON report: a float, or (beyond double range, where a float
    would read inf or 0) the decimal text, as docs/report-format.md promises."""
    from plantlint.language.printer import decimal_text, show_number

    number = float(e) if e.is_Rational else _display_float(e)
    if math.isfinite(number) and (number != 0 or e == 0):
        return number
    return decimal_text(e, 17)[0] if e.is_Rational else show_number(e, 17)


def _groups_json(groups: Sequence[ModeGroup]) -> list[dict[str, object]]:
    return [{"eigenvalues": _pairs(g.eigenvalues), "polynomial": g.polynomial, "directions": list(g.directions)}
            for g in groups]


def linearisation_json(lin: Linearisation, outputs: int, inputs: int) -> dict[str, object]:
    """The analysis record for one point (floats; exact values are in ``plantlint explain``)."""
    computed = lin.status == "computed"
    return {
        "status": lin.status,
        "reason": lin.reason or None,
        "parameters": "nominal",
        "exact": lin.exact,
        "A": _floats(lin.A) if computed else None,
        "B": _floats(lin.B) if computed else None,
        "C": _floats(lin.C) if computed else None,
        "D": [[0.0] * inputs for _ in range(outputs)],
        "poles": _pairs(lin.poles),
        "characteristic_polynomial": lin.characteristic_polynomial,
        "controllability_rank": lin.controllability_rank,
        "uncontrollable": _groups_json(lin.uncontrollable),
        "observability_rank": lin.observability_rank,
        "unobservable": _groups_json(lin.unobservable),
        "transmission_zeros": _pairs(lin.zeros) if lin.zeros is not None else None,
        "zero_polynomial": lin.zero_polynomial,
        "zeros_note": lin.zeros_note or None,
        "tolerance": lin.tolerance,
        "cross_check": {"status": lin.cross_check.status, "detail": lin.cross_check.detail},
    }




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
    from plantlint.language.printer import show_expr

    solved = {str(s): show_expr(v, 200) for s, v in pp.values.items() if s in pp.solved}
    return {
        "box": {k: [json_number(lo), json_number(hi)] for k, (lo, hi) in pp.box.items()},
        "solved_inputs": solved,
        "equilibrium": verdict_json(pp.equilibrium),
        "ranges": verdict_json(pp.ranges),
        "decoupling": verdict_json(pp.decoupling),
        "zero_dynamics": verdict_json(pp.zero_dynamics),
        "controllability": verdict_json(pp.controllability),
        "relative_degree": {o: verdict_json(v) for o, v in pp.rows.items()},
    }


def structural_facts(data: dict[str, Any] | None) -> dict[str, Any]:
    """The structural facts of a serialised analysis that a reviewer compares between two
    versions of a model, flat and keyed in words: ``relative degree of Y``, ``envelope``
    (``regular``, ``singular`` or ``unproven``) and per point ``point P: equilibrium``,
    ``point P: well defined``, ``point P: zero dynamics`` (the verdict identifier) and,
    when the distributions were examined there, ``point P: state linearizable``.

    Values are as serialised (booleans, verdict identifiers, numbers, None); the gate
    puts them in words. These are the documented keys of :func:`analysis_json` that the
    gate reads; nothing else reads the analysis object by key for the comparison."""
    if not data:
        return {}
    out: dict[str, Any] = {}
    for name, r in (data.get("relative_degree") or {}).items():
        out[f"relative degree of {name}"] = r
    env = data.get("envelope") or {}
    out["envelope"] = {True: "regular", False: "singular", None: "unproven"}.get(env.get("regular"))
    for point, entry in (data.get("points") or {}).items():
        out[f"point {point}: equilibrium"] = entry.get("equilibrium")
        out[f"point {point}: well defined"] = entry.get("well_defined")
        zd = entry.get("zero_dynamics")
        out[f"point {point}: zero dynamics"] = zd.get("verdict") if zd else None
        if "state_linearizable" in entry:
            out[f"point {point}: state linearizable"] = entry.get("state_linearizable")
    return out


def envelope_witness(data: dict[str, Any] | None) -> dict[str, float]:
    """Where the relative degree fails in the envelope (state and parameter values), or {}."""
    return ((data or {}).get("envelope") or {}).get("witness") or {}


# -- the derivation shown by explain -----------------------------------------------

#: Expressions longer than this (characters) are shown with sub-expressions named.
LONG = 60


def name_subexpressions(exprs: list[sp.Expr]) -> tuple[list[tuple[str, str]], list[str]]:
    """Name the common sub-expressions of ``exprs`` when that makes them shorter."""
    import sympy as sp

    from plantlint.language.printer import show_expr

    plain = [show_expr(e, limit=10**6) for e in exprs]
    if all(len(p) <= LONG for p in plain):
        return [], plain
    names = sp.numbered_symbols("c", start=1)
    defs, reduced = sp.cse(exprs, symbols=names, optimizations=None)
    short = [show_expr(e, limit=400) for e in reduced]
    if sum(map(len, short)) + sum(len(show_expr(d)) for _, d in defs) >= sum(map(len, plain)):
        return [], [show_expr(e, limit=400) for e in exprs]
    return [(str(s), show_expr(d, limit=400)) for s, d in defs], short


def explain_json(a: Analysis, memo: dict[str, Any] | None = None) -> dict[str, Any]:
    """Everything ``explain`` shows beyond the findings, as plain data, for the stages
    completed so far (``a.completed``). Every point is included (explain picks one).

    ``memo`` keeps the derivation of the structure stage (the Lie-derivative table and
    the decoupling matrix with common sub-expressions named), which later stages do not
    change, so a snapshot per stage does not repeat it."""
    memo = memo if memo is not None else {}
    if "header" not in memo:
        memo["header"] = _header(a)
    if "derivation" not in memo:
        memo["derivation"] = _derivation(a)
    return {
        **memo["header"],
        **memo["derivation"],
        "completed": list(a.completed),
        "not_completed": [s for s in STAGES if s not in a.completed],
        "envelope": _envelope(a),
        "distributions": _distributions(a),
        "points": [_point(pa) for pa in a.points],
    }


def _header(a: Analysis) -> dict[str, Any]:
    from plantlint.language.printer import show_expr, show_number

    m = a.model
    return {
        "plant": m.name,
        "title": m.title,
        "states": list(m.states),
        "inputs": list(m.inputs),
        "outputs": {o: show_expr(m.output_exprs[o]) for o in m.outputs},
        "parameters": {p: {"nominal": show_number(m.quantities[p].value or 0),
                           "range": [show_number(m.quantities[p].low or 0), show_number(m.quantities[p].high or 0)]}
                       for p in m.ranged_params},
        "point_names": [p.name for p in m.points],
    }


#: Seconds for writing out the symbolic derivation (display only): a chain with relative
#: degree 16 has Lie derivatives far too long to print, though its structure is decided.
DERIVATION_SECONDS = 3.0


def _derivation(a: Analysis) -> dict[str, Any]:
    """The Lie-derivative table (with names), the decoupling matrix A and b = L_f^r h;
    within :data:`DERIVATION_SECONDS`, else the relative degrees and the rank with a note."""
    from plantlint.core.deadline import LATE, bounded

    derivation = bounded(DERIVATION_SECONDS, lambda: _symbolic_derivation(a))
    if derivation is not LATE:
        return derivation
    st = a.structure
    return {
        "subexpressions": [], "lie_derivatives": [], "relative_degree": dict(st.relative_degree),
        "decoupling_matrix": None, "b": [], "decoupling_rank": st.generic_rank,
        "derivation_note": (f"the Lie derivatives are not written out: their symbolic forms did not finish within "
                            f"{DERIVATION_SECONDS:g} s (display only; the relative degrees, ranks and verdicts come "
                            "from the analysis and do not depend on them)"),
    }


def _symbolic_derivation(a: Analysis) -> dict[str, Any]:
    from plantlint.analysis.structure import lie_name

    k, st = a.kernel, a.structure
    plant = k.plant
    table = []
    uncertain = set(k.uncertain)
    for i, out in enumerate(st.outputs):
        last = (out.relative_degree or plant.n) - 1
        for order in range(0, last + 1):
            for j in range(plant.m):
                expr = k.lglf(j, i, order)
                # below the relative degree the analysis took every entry as zero: say so where
                # the symbolic form does not show it (sin(x)^2 + cos(x)^2 - 1)
                below = out.relative_degree is None or order < out.relative_degree - 1
                zero = None if not below or expr == 0 else ("unconfirmed" if expr in uncertain else "proven")
                table.append({"output": out.name, "input": str(plant.inputs[j]), "k": order,
                              "name": lie_name(k, j, i, order), "expr": expr, "zero": zero})
    entries = [row["expr"] for row in table]
    A = st.decoupling
    matrix = list(A) if A is not None else []
    b = [k.lf(i, o.relative_degree) for i, o in enumerate(st.outputs) if o.relative_degree is not None]
    defs, shown = name_subexpressions(entries + matrix + b)
    for row, text in zip(table, shown):
        row["expr"] = text
    A_text = shown[len(entries): len(entries) + len(matrix)]
    b_text = shown[len(entries) + len(matrix):]
    return {
        "subexpressions": [{"name": n, "expr": e} for n, e in defs],
        "lie_derivatives": table,
        "relative_degree": dict(st.relative_degree),
        "decoupling_matrix": [A_text[r * A.cols:(r + 1) * A.cols] for r in range(A.rows)] if A is not None else None,
        "b": b_text,
        "decoupling_rank": st.generic_rank,
    }


def _envelope(a: Analysis) -> dict[str, Any]:
    from plantlint.language.printer import show_number

    env = a.envelope
    box = {str(s): [show_number(lo), show_number(hi)]
           for s, (lo, hi) in {**a.kernel.plant.state_box, **a.kernel.plant.param_box}.items()}
    if env is None:
        return {"box": box, "regular": None}
    return {"box": box, "regular": env.regular, "certified": env.certified, "margin": env.margin,
            "witness": env.witness, "boxes": env.boxes_examined, "seconds": round(env.seconds, 3)}


def _distributions(a: Analysis) -> dict[str, Any] | None:
    ds = a.distributions
    if ds is None:
        return None
    return {
        "n": ds.n,
        "spans": [ds.spanners(k) for k in range(len(ds.ranks))],
        "generic_ranks": list(ds.ranks),
        "involutive": list(ds.involutive_by_order),
        "failures": [{"distribution": ds.name(f.order), "bracket": f.pair} for f in ds.failures],
    }


def _point(pa: PointAnalysis) -> dict[str, Any]:
    from plantlint.analysis.zero_dynamics import show_eigenvalues
    from plantlint.language.printer import show_expr, show_number

    eq = pa.equilibrium
    out: dict[str, Any] = {
        "name": pa.name,
        "values": {str(s): show_number(v) for s, v in eq.values.items()},
        "solved_inputs": [str(s) for s in eq.solved_inputs],
        "equilibrium": eq.equilibrium,
        "status": eq.status,
    }
    if pa.structure is not None:
        out["relative_degree"] = dict(pa.structure.relative_degree)
        out["well_defined"] = pa.structure.well_defined
        out["decoupling_rank"] = pa.structure.decoupling_rank
    nf = pa.normal_form
    if nf is not None:
        out["normal_form"] = {"xi": list(nf.xi), "eta": list(nf.eta), "jacobian_rank": nf.jacobian_rank,
                              "input_free": nf.input_free, "zero_dynamics": list(nf.zero_dynamics or []),
                              "note": nf.note}
    zd = pa.zero_dynamics
    if zd is not None:
        out["zero_dynamics"] = {"dimension": zd.dimension, "verdict": zd.verdict,
                                "eigenvalues": show_eigenvalues(zd.eigenvalues) if zd.eigenvalues else "",
                                "exact": zd.exact, "characteristic_polynomial": zd.characteristic_polynomial,
                                "reason": zd.reason}
    if pa.linearisation is not None:
        out["linearisation"] = _linearisation(pa.linearisation)
    pd = pa.distributions
    if pd is not None:
        out["distributions"] = {"ranks": None if pd.undefined else list(pd.ranks),
                                "controllability_rank": None if pd.undefined else pd.controllability_rank,
                                "missing_directions": list(pd.missing_directions), "involutive": pd.involutive,
                                "state_linearizable": pd.state_linearizable,
                                "failing_bracket": pd.failure.pair if pd.failure else None,
                                "linearizing_output": show_expr(pd.linearizing_output)
                                if pd.linearizing_output is not None else None,
                                "notes": list(pd.notes)}
    if pa.parametric is not None:
        out["parameter_box"] = parametric_json(pa.parametric)
    return out


def _linearisation(lin: Linearisation) -> dict[str, Any]:
    """The linearisation for display: exact entries where the data are rational."""
    from plantlint.language.printer import show_number

    def entry(e: sp.Expr) -> str:
        shown = show_number(e, mark_inexact=True)
        if e.is_Rational and shown.startswith("~") and len(str(e)) <= 24:
            return str(e)  # exact data are shown exactly while they stay readable
        return shown

    def matrix(rows: tuple[tuple[sp.Expr, ...], ...]) -> list[list[str]]:
        return [[entry(e) for e in row] for row in rows]

    def groups(gs: tuple[ModeGroup, ...]) -> list[dict[str, Any]]:
        return [{"modes": show_repeated(g.eigenvalues), "count": len(g.eigenvalues), "polynomial": g.polynomial,
                 "directions": list(g.directions)} for g in gs]

    return {
        "status": lin.status, "reason": lin.reason, "exact": lin.exact, "parameters": "nominal",
        "A": matrix(lin.A), "B": matrix(lin.B), "C": matrix(lin.C), "D": "0",
        "poles": show_repeated(lin.poles), "characteristic_polynomial": lin.characteristic_polynomial,
        "controllability_rank": lin.controllability_rank, "uncontrollable": groups(lin.uncontrollable),
        "observability_rank": lin.observability_rank, "unobservable": groups(lin.unobservable),
        "transmission_zeros": show_repeated(lin.zeros) if lin.zeros is not None else None,
        "zero_polynomial": lin.zero_polynomial, "zeros_note": lin.zeros_note, "tolerance": lin.tolerance,
        "cross_check": {"status": lin.cross_check.status, "detail": lin.cross_check.detail},
    }


def show_repeated(values: tuple[complex, ...]) -> str:
    """Eigenvalues with repeated ones counted: ``0 (4 times), -1``."""
    from plantlint.analysis.zero_dynamics import show_eigenvalues

    distinct: list[tuple[complex, int]] = []
    for z in values:
        if distinct and distinct[-1][0] == z:
            distinct[-1] = (z, distinct[-1][1] + 1)
        else:
            distinct.append((z, 1))
    shown = []
    for z, count in distinct:
        text = show_eigenvalues([z])
        shown.append(f"{text} ({count} times)" if count > 1 else text)
    return show_eigenvalues([z for z, _ in distinct]) if all(c == 1 for _, c in distinct) else ", ".join(shown)


__all__ = ["analysis_json", "name_subexpressions", "envelope_witness", "equilibrium_json", "explain_json",
           "linearisation_json", "normal_form_json", "parametric_json", "show_repeated", "structural_facts",
           "verdict_json"]
