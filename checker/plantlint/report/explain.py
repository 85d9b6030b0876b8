"""``plantlint explain FILE``: the derivation behind the findings, for a person.

The report shows what the checker computed, in the order an engineer would
check it by hand: the Lie derivatives that fix each relative degree, the
decoupling matrix, the envelope proof, and per operating point the equilibrium,
the normal-form coordinates, the zero dynamics and the distributions. Long
expressions are shown with their common sub-expressions named (c1, c2, ...).

This module only renders. The data come from the same pipeline as ``check``
(worker, budget, policy, waivers, ``--only``/``--skip``): the worker builds them
with :func:`plantlint.analysis.serialise.explain_json`, and the command line puts
them together with the file's findings (:func:`explain_view`). When the budget
stopped the analysis, the report shows the stages that completed and says that it
was cut short.
"""

from __future__ import annotations

import json
from typing import Any, TextIO

from plantlint.analysis.engine import Analysis
from plantlint.analysis.serialise import name_subexpressions, explain_json, show_repeated
from plantlint.core.findings import Finding, Stop
from plantlint.language.printer import show_number, show_point
from plantlint.report.formats.base import one_line

__all__ = ["name_subexpressions", "explain_data", "explain_view", "render_blocked", "render_json", "render_text",
           "show_repeated"]


def explain_view(data: dict[str, Any], findings: list[Finding], point: str | None = None,
                 stop: Stop | None = None) -> dict[str, Any]:
    """The report: the worker's derivation data (every point, or only ``point``), the
    file's findings after policy, and ``stop`` (None, or why the analysis was cut short)."""
    view = dict(data)
    view["points"] = [p for p in data.get("points", []) if point is None or p["name"] == point]
    view["findings"] = [{"rule": f.rule, "severity": f.severity.value, "message": f.message, "point": f.point,
                         "line": f.span.line if f.span else None, "waived": f.waived, "reason": f.reason}
                        for f in sorted(findings, key=lambda f: f.sort_key)]
    view["stop"] = stop.to_data() if stop is not None else None
    return view


def explain_data(a: Analysis, point: str | None, findings: list[Finding]) -> dict[str, Any]:
    """The report of an analysis made in this process (tests and tools; the command line
    gets the same data from a worker)."""
    return explain_view(json.loads(json.dumps(explain_json(a), default=str)), findings, point)


def render_json(view: dict[str, Any], stream: TextIO) -> None:
    json.dump(view, stream, indent=2, default=str)
    stream.write("\n")


def render_blocked(path: str, findings: list[Finding], stream: TextIO, closing: str) -> None:
    """No derivation to show: the findings, one line each, and ``closing`` (why)."""
    for f in findings:
        where = f"{f.span.line}:{f.span.column}: " if f.span else ""
        print(one_line(f"{path}:{where}{f.severity.value}: {f.message} [{f.rule}]"), file=stream)
    print(one_line(closing), file=stream)


# -- the text report, one function per section --------------------------------------

def _printable(value: Any) -> Any:
    """Every string of the derivation with control characters made visible: titles, waiver
    reasons and messages quote the model file, which is untrusted and must not reach the
    terminal as escape sequences (line breaks inside a string stay line breaks)."""
    if isinstance(value, str):
        return "\n".join(one_line(part) for part in value.split("\n"))
    if isinstance(value, dict):
        return {k: _printable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_printable(v) for v in value]
    return value


def render_text(d: dict[str, Any], stream: TextIO, color: bool) -> None:
    from rich.console import Console

    d = _printable(d)

    console = Console(file=stream, force_terminal=color, no_color=not color, highlight=False, markup=False,
                      width=None if color else 100, soft_wrap=not color)
    _render_header(console, d)
    _render_cut_short(console, d)
    _render_relative_degree(console, d)
    if _reached(console, d, "envelope", "Envelope"):
        _render_envelope(console, d["envelope"])
    if d.get("distributions") is not None:
        _render_distributions(console, d["distributions"])
    if _reached(console, d, "points", "Points"):
        for p in d["points"]:
            _render_point(console, p, d)
    _render_findings(console, d["findings"])
    _render_footer(console)


def _render_header(console: Any, d: dict[str, Any]) -> None:
    from rich.text import Text

    title = f"plant {d['plant']}" + (f"  \u2014  {d['title']}" if d.get("title") else "")
    console.print(Text(title, style="bold"))
    console.print(f"  states   {', '.join(d['states'])}")
    console.print(f"  inputs   {', '.join(d['inputs']) or '(none)'}")
    console.print("  outputs  " + ", ".join(f"{k} = {v}" for k, v in d["outputs"].items()))
    for p, info in d["parameters"].items():
        console.print(f"  param    {p} = {info['nominal']} in {info['range'][0]} .. {info['range'][1]} (kept symbolic)")


def _render_cut_short(console: Any, d: dict[str, Any]) -> None:
    """Say first when the analysis did not complete: what follows is what it reached."""
    stop = d.get("stop")
    if not stop:
        return
    from rich.text import Text

    done = ", ".join(stop.get("completed") or []) or "none"
    todo = ", ".join(d.get("not_completed") or []) or "none"
    console.print()
    console.print(Text(f"CUT SHORT: the analysis {stop['detail']}; shown below is what completed "
                       f"(completed: {done}; not completed: {todo}). Nothing is decided for the rest.",
                       style="bold"))


def _reached(console: Any, d: dict[str, Any], stage: str, title: str) -> bool:
    """True when ``stage`` completed; otherwise the section says it was not reached."""
    if stage in d.get("completed", [stage]):
        return True
    _section(console, title)
    console.print(f"  not computed: the analysis was cut short before the stage '{stage}' completed")
    return False


def _render_relative_degree(console: Any, d: dict[str, Any]) -> None:
    from rich.table import Table

    _section(console, "Relative degree")
    if d.get("derivation_note"):
        console.print(f"  {d['derivation_note']}")
    if d["subexpressions"]:
        console.print("  where " + "; ".join(f"{s['name']} = {s['expr']}" for s in d["subexpressions"]))
    table = Table(box=None, padding=(0, 2), show_edge=False)
    table.add_column("output")
    table.add_column("k", justify="right")
    table.add_column("Lie derivative")
    table.add_column("value")
    for row in d["lie_derivatives"]:
        value = row["expr"]
        if row.get("zero") == "proven":
            value = f"0  (identically; as formed: {value})"
        elif row.get("zero") == "unconfirmed":
            value = f"0 at every sampled point, not proven  (as formed: {value})"
        table.add_row(row["output"], str(row["k"]), row["name"], value)
    if d["lie_derivatives"]:
        console.print(table)
    for out, r in d["relative_degree"].items():
        console.print(f"  {out}: relative degree {r if r is not None else 'undefined (no input reaches it)'}")
    if d["decoupling_matrix"] is not None:
        rows = ["[" + ", ".join(row) + "]" for row in d["decoupling_matrix"]]
        console.print(f"  decoupling matrix A = [{', '.join(rows)}]   (generic rank {d['decoupling_rank']})")
        console.print(f"  b = [{', '.join(d['b'])}]")


def _render_envelope(console: Any, env: dict[str, Any]) -> None:
    _section(console, "Envelope")
    if env["box"]:
        console.print("  box " + ", ".join(f"{k} in [{lo}, {hi}]" for k, (lo, hi) in env["box"].items()))
    verdict = {True: "proven regular", False: "singular", None: "not proven"}[env.get("regular")]
    what = env.get("certified") or ""
    if what == "generic structure":  # no vector relative degree anywhere: not a point of the box
        line = ("  singular everywhere: the decoupling matrix is singular for every state (generic rank below the "
                "number of outputs), or an output never sees the inputs")
    elif env.get("witness"):  # "singular: det A (the decoupling matrix) vanishes at ..."
        line = f"  {verdict}: {what + ' vanishes' if what else 'vanishes'} at {show_point(env['witness'])}"
    else:
        line = f"  {verdict}" + (f" ({what})" if what else "")
    if env.get("margin") is not None:
        line += f"; certified margin {env['margin']:.4g}"
    elif env.get("regular"):
        line += ("; no margin stated (the term is proven non-zero factor by factor; a lower bound of its size "
                 "would also need an upper bound of its denominator, which is not computed)")
    if env.get("boxes"):
        line += f"  [{env['boxes']} box{'es' if env['boxes'] != 1 else ''}, {env['seconds']} s]"
    console.print(line)


def _render_distributions(console: Any, dist: dict[str, Any]) -> None:
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


def _render_point(console: Any, p: dict[str, Any], d: dict[str, Any]) -> None:
    _section(console, f"Point {p['name']}")
    _render_equilibrium(console, p)
    if p.get("normal_form") is not None:
        _render_normal_form(console, p["normal_form"])
    if p.get("zero_dynamics") is not None:
        _render_zero_dynamics(console, p["zero_dynamics"])
    if p.get("linearisation") is not None:
        _render_linearisation(console, p["linearisation"], d["states"], d["inputs"], list(d["outputs"]),
                              refined=p.get("status") == "refined")
    if p.get("distributions") is not None:
        _render_point_distributions(console, p["distributions"])
    if p.get("parameter_box") is not None:
        _render_parameter_box(console, p["parameter_box"])
    later = [s for s in ("zero dynamics", "linearisation", "distributions") if s in d.get("not_completed", [])]
    if d.get("stop") and later:
        console.print(f"  (not computed here, the analysis was cut short: {', '.join(later)})")


def _render_equilibrium(console: Any, p: dict[str, Any]) -> None:
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


def _render_normal_form(console: Any, nf: dict[str, Any]) -> None:
    console.print(f"  normal form: xi = ({', '.join(nf['xi'])}), eta = ({', '.join(nf['eta'])}); "
                  f"Jacobian rank {nf['jacobian_rank']}" + ("; L_g eta = 0" if nf["input_free"] and nf["eta"] else ""))
    for line in nf["zero_dynamics"]:
        console.print(f"    {line}")
    if nf["note"]:
        console.print(f"    ({nf['note']})")


def _render_zero_dynamics(console: Any, zd: dict[str, Any]) -> None:
    verdict = zd["verdict"].replace("_", " ")
    text = f"  zero dynamics: dimension {zd['dimension']}, {verdict}"
    if zd["eigenvalues"]:
        text += f"; eigenvalues {zd['eigenvalues']}"
    if zd["characteristic_polynomial"]:
        text += f"; p(s) = {_polynomial(zd['characteristic_polynomial'])}"
    console.print(text + (" (exact)" if zd["exact"] and zd["dimension"] else ""))
    if zd["reason"]:
        console.print(f"    ({zd['reason']})")


def _render_point_distributions(console: Any, pd: dict[str, Any]) -> None:
    ranks = ("ranks undefined" if pd["ranks"] is None else
             f"ranks {pd['ranks']}; controllability rank {pd['controllability_rank']}")
    console.print(f"  distributions here: {ranks}; "
                  f"{'involutive' if pd['involutive'] else 'not involutive'}; "
                  f"state linearizable: {'yes' if pd['state_linearizable'] else 'no'}")
    if pd["linearizing_output"]:
        console.print(f"    linearizing output (relative degree n, verified): {pd['linearizing_output']}")
    for note in pd["notes"]:
        console.print(f"    ({note})")


def _render_parameter_box(console: Any, box: dict[str, Any]) -> None:
    """What holds over the whole box of ranged parameters, property by property."""
    ranges = ", ".join(f"{k} in {show_number(lo)} .. {show_number(hi)}" for k, (lo, hi) in box["box"].items())
    console.print(f"  over the parameter box ({ranges}):")
    if box["solved_inputs"]:
        console.print("    inputs solved in the parameters: "
                      + ", ".join(f"{k} = {v}" for k, v in box["solved_inputs"].items()))
    for key, label in (("equilibrium", "equilibrium"), ("ranges", "inside the ranges"), ("decoupling", "decoupling matrix"),
                       ("zero_dynamics", "minimum phase"), ("controllability", "controllability rank")):
        v = box.get(key)
        if v is not None:
            console.print(f"    {label}: {v['outcome'].replace('_', ' ')}; {v['detail']}")


def _render_linearisation(console: Any, lin: dict[str, Any], states: list[str], inputs: list[str],
                          outputs: list[str], refined: bool = False) -> None:
    if lin["status"] != "computed":
        console.print(f"  linearisation (nominal parameter values): not computed, {lin['reason']}")
        return
    how = "exact" if lin["exact"] else "irrational entries: rigorous ball arithmetic"
    if refined:
        how += " arithmetic on the refined equilibrium's 40-digit values"
    console.print(f"  linearisation (nominal parameter values, {how}):")
    console.print(f"    order: x = ({', '.join(states)}), u = ({', '.join(inputs)}), y = ({', '.join(outputs)})")
    _render_matrices(console, lin)
    poly = f"; det(sI - A) = {_polynomial(lin['characteristic_polynomial'])}" if lin["characteristic_polynomial"] else ""
    console.print(f"    open-loop poles: {lin['poles'] or 'none'}{poly}")
    _render_ranks(console, lin, len(states))
    _render_zeros(console, lin)
    check = lin["cross_check"]
    if check["status"] == "agrees":
        console.print(f"    cross-check with the zero dynamics: agrees; {check['detail']}")
    elif check["status"] == "disagrees":
        console.print(f"    cross-check with the zero dynamics: DISAGREES; {check['detail']}")
    if lin["reason"]:
        console.print(f"    ({lin['reason']})")


#: Longest exact polynomial explain writes out; a longer one (a refined point's 40-digit
#: values make coefficients of hundreds of digits) is left to the JSON report.
POLYNOMIAL_CHARS = 160


def _polynomial(text: str) -> str:
    if len(text) <= POLYNOMIAL_CHARS:
        return text
    return f"(exact, {len(text):,} characters: in `--format json`)"


def _render_matrices(console: Any, lin: dict[str, Any]) -> None:
    for label in ("A", "B", "C"):
        rows = lin[label]
        if not rows or not rows[0]:
            continue
        width = max(len(e) for row in rows for e in row)
        for k, row in enumerate(rows):
            head = f"{label} = " if k == 0 else "    "
            console.print(f"    {head}[{', '.join(e.rjust(width) for e in row)}]")
    console.print("    D = 0 (outputs do not depend on inputs)")


def _render_ranks(console: Any, lin: dict[str, Any], n: int) -> None:
    # uncontrollable: quantities w.x (left null vectors); unobservable: directions v of
    # state space, x0 + t v (null vectors): the same notation, so the label says which
    inputs = "inputs" if lin["B"] and len(lin["B"][0]) > 1 else "input"
    for kind, rank, groups, what in (
        ("controllability", lin["controllability_rank"], lin["uncontrollable"],
         f"uncontrollable (quantities the {inputs} cannot change)"),
        ("observability", lin["observability_rank"], lin["unobservable"],
         "unobservable (state directions the outputs cannot see)"),
    ):
        if rank is None:
            continue
        console.print(f"    {kind} rank {rank} of {n}")
        for g in groups:
            factor = f"; factor {_polynomial(g['polynomial'])} of det(sI - A)" if g["polynomial"] else ""
            console.print(f"      {what}: {'; '.join(g['directions'])}  (mode{'s' if g['count'] > 1 else ''} "
                          f"at s = {g['modes']}{factor})")


def _render_zeros(console: Any, lin: dict[str, Any]) -> None:
    if lin["transmission_zeros"]:
        zp = f"; zero polynomial {_polynomial(lin['zero_polynomial'])}" if lin["zero_polynomial"] else ""
        console.print(f"    transmission zeros: {lin['transmission_zeros']}{zp}")
    elif lin["transmission_zeros"] is not None:
        console.print("    transmission zeros: none (det [[sI - A, -B], [C, 0]] is a non-zero constant)")
    if lin["zeros_note"]:
        console.print(f"    ({lin['zeros_note']})")


def _render_findings(console: Any, findings: list[dict[str, Any]]) -> None:
    _section(console, "Findings")
    if not findings:
        console.print("  none")
    for f in findings:
        where = f"line {f['line']}" if f["line"] else ""
        at = f" at {f['point']}" if f["point"] else ""
        waived = f"  [waived: {f['reason']}]" if f["waived"] else ""
        console.print(f"  {f['severity']:<8} {f['rule']}{at} ({where}): {f['message']}{waived}")


def _render_footer(console: Any) -> None:
    from rich.text import Text

    console.print()
    console.print(Text("plantlint checks structure, not safety; see the README.", style="dim"))


def _section(console: Any, title: str) -> None:
    from rich.rule import Rule

    console.print()
    console.print(Rule(title, align="left", characters="-"))
