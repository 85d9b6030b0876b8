"""``plantlint explain FILE``: the derivation behind the findings, for a person.

The report shows what the checker computed, in the order an engineer would
check it by hand: the Lie derivatives that fix each relative degree, the
decoupling matrix, the envelope proof, and per operating point the equilibrium,
the normal-form coordinates, the zero dynamics and the distributions. Long
expressions are shown with their common sub-expressions named (c1, c2, ...).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import Any, TextIO

import sympy as sp

from plantlint.analysis.engine import Analysis, PointAnalysis, run_analysis
from plantlint.core.catalogue import load_catalogue
from plantlint.run.config import Config, ConfigError, load_config
from plantlint.core.findings import Finding
from plantlint.run.pipeline import BLOCKING, locate, read_model
from plantlint.run.policy import apply_policy
from plantlint.language.printer import show_expr, show_number, show_point
from plantlint.analysis.structure import lie_name
from plantlint.analysis.zero_dynamics import show_eigenvalues
from plantlint.analysis.linearisation import Linearisation, ModeGroup
from plantlint.analysis.parametric import parametric_json

#: Expressions longer than this (characters) are shown with sub-expressions named.
LONG = 60


def compact_many(exprs: list[sp.Expr]) -> tuple[list[tuple[str, str]], list[str]]:
    """Name the common sub-expressions of ``exprs`` when that makes them shorter."""
    plain = [show_expr(e, limit=10**6) for e in exprs]
    if all(len(p) <= LONG for p in plain):
        return [], plain
    names = sp.numbered_symbols("c", start=1)
    defs, reduced = sp.cse(exprs, symbols=names, optimizations=None)
    short = [show_expr(e, limit=400) for e in reduced]
    if sum(map(len, short)) + sum(len(show_expr(d)) for _, d in defs) >= sum(map(len, plain)):
        return [], [show_expr(e, limit=400) for e in exprs]
    return [(str(s), show_expr(d, limit=400)) for s, d in defs], short


def explain_data(a: Analysis, point: str | None, findings: list[Finding]) -> dict[str, Any]:
    """Everything the text report shows, as plain data (also the --format json output)."""
    m, k, st = a.model, a.kernel, a.structure
    plant = k.plant
    table = []
    for i, out in enumerate(st.outputs):
        last = (out.relative_degree or plant.n) - 1
        for order in range(0, last + 1):
            for j in range(plant.m):
                table.append({"output": out.name, "input": str(plant.inputs[j]), "k": order,
                              "name": lie_name(k, j, i, order), "expr": k.lglf(j, i, order)})
    entries = [row["expr"] for row in table]
    A = st.decoupling
    matrix = list(A) if A is not None else []
    b = [k.lf(i, o.relative_degree) for i, o in enumerate(st.outputs) if o.relative_degree is not None]
    defs, shown = compact_many(entries + matrix + b)
    for row, text in zip(table, shown):
        row["expr"] = text
    A_text = shown[len(entries): len(entries) + len(matrix)]
    b_text = shown[len(entries) + len(matrix):]
    data: dict[str, Any] = {
        "plant": m.name,
        "title": m.title,
        "states": list(m.states),
        "inputs": list(m.inputs),
        "outputs": {o: show_expr(m.output_exprs[o]) for o in m.outputs},
        "parameters": {p: {"nominal": show_number(m.quantities[p].value or 0),
                           "range": [show_number(m.quantities[p].low or 0), show_number(m.quantities[p].high or 0)]}
                       for p in m.ranged_params},
        "subexpressions": [{"name": n, "expr": e} for n, e in defs],
        "lie_derivatives": table,
        "relative_degree": dict(st.relative_degree),
        "decoupling_matrix": [A_text[r * A.cols:(r + 1) * A.cols] for r in range(A.rows)] if A is not None else None,
        "b": b_text,
        "decoupling_rank": st.generic_rank,
        "envelope": _envelope(a),
        "distributions": _distributions(a),
        "points": [_point(a, pa) for pa in a.points if point is None or pa.name == point],
        "findings": [{"rule": f.rule, "severity": f.severity.value, "message": f.message, "point": f.point,
                      "line": f.span.line if f.span else None, "waived": f.waived, "reason": f.reason}
                     for f in sorted(findings, key=lambda f: f.sort_key)],
    }
    return data


def _envelope(a: Analysis) -> dict[str, Any]:
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


def _point(a: Analysis, pa: PointAnalysis) -> dict[str, Any]:
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
    lin = pa.linearisation
    if lin is not None:
        out["linearisation"] = _linearisation(lin)
    pd = pa.distributions
    if pd is not None:
        out["distributions"] = {"ranks": list(pd.ranks), "controllability_rank": pd.controllability_rank,
                                "missing_directions": list(pd.missing_directions), "involutive": pd.involutive,
                                "state_linearizable": pd.state_linearizable,
                                "failing_bracket": pd.failure.pair if pd.failure else None,
                                "linearizing_output": show_expr(pd.linearizing_output)
                                if pd.linearizing_output is not None else None,
                                "notes": list(pd.notes)}
    if pa.parametric is not None:
        out["parameter_box"] = parametric_json(pa.parametric)
    return out


def _render_parameter_box(console: Any, box: dict[str, Any]) -> None:
    """What holds over the whole box of ranged parameters, property by property."""
    ranges = ", ".join(f"{k} in {show_number(lo)} .. {show_number(hi)}" for k, (lo, hi) in box["box"].items())
    console.print(f"  over the parameter box ({ranges}):")
    if box["solved_inputs"]:
        console.print("    inputs solved in the parameters: "
                      + ", ".join(f"{k} = {v}" for k, v in box["solved_inputs"].items()))
    for key, label in (("equilibrium", "equilibrium"), ("decoupling", "decoupling matrix"),
                       ("zero_dynamics", "minimum phase"), ("controllability", "controllability rank")):
        v = box.get(key)
        if v is not None:
            console.print(f"    {label}: {v['outcome'].replace('_', ' ')}; {v['detail']}")


def _linearisation(lin: Linearisation) -> dict[str, Any]:
    """The linearisation for display: exact entries where the data are rational."""

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


# -- rendering ----------------------------------------------------------------------

def explain_file(path: Path, point: str | None, fmt: str, stream: TextIO, color: bool, *,
                 only: frozenset[str] | None = None, skip: frozenset[str] | None = None,
                 errors: TextIO | None = None) -> int:
    """Explain one model to ``stream``; usage errors go to ``errors`` (standard error) and
    return 2. ``only``/``skip`` replace the configuration's selection, as in ``check``."""
    errors = errors if errors is not None else sys.stderr
    try:
        config = load_config(path.parent)
    except ConfigError as exc:
        print(f"plantlint: error: {exc}", file=errors)
        return 2
    model, findings = read_model(path.read_bytes(), str(path))
    blocking = [f for f in findings if f.rule in BLOCKING]
    if model is None or blocking:
        for f in blocking or findings:
            where = f"{f.span.line}:{f.span.column}: " if f.span else ""
            print(f"{path}:{where}{f.severity.value}: {f.message} [{f.rule}]", file=stream)
        print("plantlint: the model cannot be analysed until these are fixed", file=stream)
        return 1
    if point is not None and model.point(point) is None:
        names = ", ".join(p.name for p in model.points) or "none"
        print(f"plantlint: error: {path} has no point '{point}' (its points: {names})", file=errors)
        return 2
    analysis = run_analysis(model, config if isinstance(config, Config) else Config())
    catalogue = load_catalogue()
    located = [locate(f, model.spans) for f in findings + analysis.findings]
    shown = apply_policy(located, model.waivers, {r.id: r.severity for r in catalogue}, config.severity,
                         only if only is not None else config.only, skip if skip is not None else config.skip)
    report = explain_data(analysis, point, shown)
    if fmt == "json":
        json.dump(report, stream, indent=2, default=str)
        stream.write("\n")
        return 0
    render_text(report, stream, color)
    return 0


def render_text(d: dict[str, Any], stream: TextIO, color: bool) -> None:
    from rich.console import Console
    from rich.table import Table
    from rich.text import Text

    console = Console(file=stream, force_terminal=color, no_color=not color, highlight=False, markup=False,
                      width=None if color else 100, soft_wrap=not color)
    title = f"plant {d['plant']}" + (f"  \u2014  {d['title']}" if d.get("title") else "")
    console.print(Text(title, style="bold"))
    console.print(f"  states   {', '.join(d['states'])}")
    console.print(f"  inputs   {', '.join(d['inputs']) or '(none)'}")
    console.print("  outputs  " + ", ".join(f"{k} = {v}" for k, v in d["outputs"].items()))
    for p, info in d["parameters"].items():
        console.print(f"  param    {p} = {info['nominal']} in {info['range'][0]} .. {info['range'][1]} (kept symbolic)")

    _section(console, "Relative degree")
    if d["subexpressions"]:
        console.print("  where " + "; ".join(f"{s['name']} = {s['expr']}" for s in d["subexpressions"]))
    table = Table(box=None, padding=(0, 2), show_edge=False)
    table.add_column("output")
    table.add_column("k", justify="right")
    table.add_column("Lie derivative")
    table.add_column("value")
    for row in d["lie_derivatives"]:
        table.add_row(row["output"], str(row["k"]), row["name"], row["expr"])
    console.print(table)
    for out, r in d["relative_degree"].items():
        console.print(f"  {out}: relative degree {r if r is not None else 'undefined (no input reaches it)'}")
    if d["decoupling_matrix"] is not None:
        rows = ["[" + ", ".join(row) + "]" for row in d["decoupling_matrix"]]
        console.print(f"  decoupling matrix A = [{', '.join(rows)}]   (generic rank {d['decoupling_rank']})")
        console.print(f"  b = [{', '.join(d['b'])}]")

    env = d["envelope"]
    _section(console, "Envelope")
    if env["box"]:
        console.print("  box " + ", ".join(f"{k} in [{lo}, {hi}]" for k, (lo, hi) in env["box"].items()))
    verdict = {True: "proven regular", False: "singular", None: "not proven"}[env.get("regular")]
    what = f" ({env['certified']})" if env.get("certified") else ""
    line = f"  {verdict}{what}"
    if env.get("margin") is not None:
        line += f"; certified margin {env['margin']:.4g}"
    if env.get("witness"):
        line += "; vanishes at " + show_point(env["witness"])
    if env.get("boxes"):
        line += f"  [{env['boxes']} boxes, {env['seconds']} s]"
    console.print(line)

    dist = d.get("distributions")
    if dist is not None:
        _section(console, "Distributions (full-state linearization)")
        for k, span in enumerate(dist["spans"]):
            inv = ""
            if k < len(dist["involutive"]):
                inv = "involutive" if dist["involutive"][k] else "NOT involutive"
            console.print(f"  {span}: generic rank {dist['generic_ranks'][k]}  {inv}")
        for f in dist["failures"]:
            console.print(f"  {f['distribution']}: the bracket {f['bracket']} leaves it")
        if len(dist["generic_ranks"]) < dist["n"]:
            console.print("  (higher distributions not examined: a lower one already fails; the "
                          "controllability rank at equilibria comes from the linearisation)")

    for p in d["points"]:
        _section(console, f"Point {p['name']}")
        values = ", ".join(f"{k} = {v}" for k, v in p["values"].items())
        solved = f" (solved for {', '.join(p['solved_inputs'])})" if p["solved_inputs"] else ""
        console.print(f"  {values}{solved}")
        if p["status"] == "refined":
            console.print("  equilibrium: yes, refined from the written values within the point's tolerance "
                          "(see the point-refined note)")
        else:
            console.print(f"  equilibrium: {'yes' if p['equilibrium'] else 'no (' + p['status'].replace('_', ' ') + ')'}")
        if "relative_degree" in p:
            rd = ", ".join(f"{k} = {v if v is not None else 'not defined'}" for k, v in p["relative_degree"].items())
            console.print(f"  relative degree here: {rd}; decoupling rank {p['decoupling_rank']}"
                          f"{'' if p['well_defined'] else '  (NOT well defined)'}")
        nf = p.get("normal_form")
        if nf is not None:
            console.print(f"  normal form: xi = ({', '.join(nf['xi'])}), eta = ({', '.join(nf['eta'])}); "
                          f"Jacobian rank {nf['jacobian_rank']}" + ("; L_g eta = 0" if nf["input_free"] and nf["eta"] else ""))
            for line in nf["zero_dynamics"]:
                console.print(f"    {line}")
            if nf["note"]:
                console.print(f"    ({nf['note']})")
        zd = p.get("zero_dynamics")
        if zd is not None:
            verdict = zd["verdict"].replace("_", " ")
            text = f"  zero dynamics: dimension {zd['dimension']}, {verdict}"
            if zd["eigenvalues"]:
                text += f"; eigenvalues {zd['eigenvalues']}"
            if zd["characteristic_polynomial"]:
                text += f"; p(s) = {zd['characteristic_polynomial'].replace('**', '^')}"
            console.print(text + (" (exact)" if zd["exact"] and zd["dimension"] else ""))
            if zd["reason"]:
                console.print(f"    ({zd['reason']})")
        lin = p.get("linearisation")
        if lin is not None:
            _render_linearisation(console, lin, d["states"], d["inputs"], list(d["outputs"]))
        pd = p.get("distributions")
        if pd is not None:
            text = (f"  distributions here: ranks {pd['ranks']}; controllability rank {pd['controllability_rank']}; "
                    f"{'involutive' if pd['involutive'] else 'not involutive'}; "
                    f"state linearizable: {'yes' if pd['state_linearizable'] else 'no'}")
            console.print(text)
            if pd["linearizing_output"]:
                console.print(f"    linearizing output (relative degree n, verified): {pd['linearizing_output']}")
            for note in pd["notes"]:
                console.print(f"    ({note})")
        box = p.get("parameter_box")
        if box is not None:
            _render_parameter_box(console, box)

    _section(console, "Findings")
    if not d["findings"]:
        console.print("  none")
    for f in d["findings"]:
        where = f"line {f['line']}" if f["line"] else ""
        at = f" at {f['point']}" if f["point"] else ""
        waived = f"  [waived: {f['reason']}]" if f["waived"] else ""
        console.print(f"  {f['severity']:<8} {f['rule']}{at} ({where}): {f['message']}{waived}")
    console.print()
    console.print(Text("plantlint checks structure, not safety; see the README.", style="dim"))


def _render_linearisation(console: Any, lin: dict[str, Any], states: list[str], inputs: list[str],
                          outputs: list[str]) -> None:
    n = len(states)
    if lin["status"] != "computed":
        console.print(f"  linearisation (nominal parameter values): not computed, {lin['reason']}")
        return
    how = "exact" if lin["exact"] else "irrational entries: rigorous ball arithmetic"
    console.print(f"  linearisation (nominal parameter values, {how}):")
    console.print(f"    order: x = ({', '.join(states)}), u = ({', '.join(inputs)}), y = ({', '.join(outputs)})")
    for label in ("A", "B", "C"):
        rows = lin[label]
        if not rows or not rows[0]:
            continue
        width = max(len(e) for row in rows for e in row)
        for k, row in enumerate(rows):
            head = f"{label} = " if k == 0 else "    "
            console.print(f"    {head}[{', '.join(e.rjust(width) for e in row)}]")
    console.print("    D = 0 (outputs do not depend on inputs)")
    poly = f"; det(sI - A) = {lin['characteristic_polynomial']}" if lin["characteristic_polynomial"] else ""
    console.print(f"    open-loop poles: {lin['poles'] or 'none'}{poly}")
    for kind, rank, groups, what in (
        ("controllability", lin["controllability_rank"], lin["uncontrollable"], "uncontrollable (the input cannot change)"),
        ("observability", lin["observability_rank"], lin["unobservable"], "unobservable (the outputs cannot see)"),
    ):
        if rank is None:
            continue
        console.print(f"    {kind} rank {rank} of {n}")
        for g in groups:
            factor = f"; factor {g['polynomial']} of det(sI - A)" if g["polynomial"] else ""
            console.print(f"      {what}: {'; '.join(g['directions'])}  (mode{'s' if g['count'] > 1 else ''} "
                          f"at s = {g['modes']}{factor})")
    if lin["transmission_zeros"]:
        zp = f"; zero polynomial {lin['zero_polynomial']}" if lin["zero_polynomial"] else ""
        console.print(f"    transmission zeros: {lin['transmission_zeros']}{zp}")
    elif lin["transmission_zeros"] is not None:
        console.print("    transmission zeros: none (det [[sI - A, -B], [C, 0]] is a non-zero constant)")
    if lin["zeros_note"]:
        console.print(f"    ({lin['zeros_note']})")
    check = lin["cross_check"]
    if check["status"] == "agrees":
        console.print(f"    cross-check with the zero dynamics: agrees; {check['detail']}")
    elif check["status"] == "disagrees":
        console.print(f"    cross-check with the zero dynamics: DISAGREES; {check['detail']}")
    if lin["reason"]:
        console.print(f"    ({lin['reason']})")


def _section(console: Any, title: str) -> None:
    from rich.rule import Rule

    console.print()
    console.print(Rule(title, align="left", characters="-"))
