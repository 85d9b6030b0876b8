"""A Markdown summary for code review (``--format markdown``), to paste as a merge-request comment.

Layout: a heading with the verdict, one line of counts, a compact table with one
row per model that has something to say, then a short section per such model.
Under ``--since`` a model's section says first what changed in its structure
(relative degrees, envelope, zero dynamics, equilibria, waivers) and then lists
the findings the change introduced and fixed; findings already known at the
baseline go in a collapsed ``<details>`` block, as does any list longer than
``LONG`` items. Models with nothing to report are only counted.

Everything taken from a model file (messages, reasons, names) is escaped, so a
model cannot inject Markdown or HTML into the comment.
"""

from __future__ import annotations

from typing import Any, TextIO

from plantlint.analysis.serialise import envelope_witness
from plantlint.core.findings import FileReport, Finding, Report
from plantlint.report.formats.base import adjustment_text, baseline_of, findings_in_order, one_line, undecided_phrase

LONG = 6  # longer lists are collapsed
_SPECIAL = set("\\`*[]|")  # always escaped; parentheses are harmless once brackets are
_VERDICTS = {  # the zero-dynamics verdicts in the words the other reports use
    "minimum_phase": "minimum phase",
    "non_minimum_phase": "non-minimum phase",
    "critical": "critical",
    "not_applicable": "not applicable",
    "undefined": "not defined",
}


def text(value: object) -> str:
    """Untrusted text made inert in Markdown: one line, HTML as entities, emphasis, code,
    link and table characters backslash-escaped (``_`` only where it could start or end
    emphasis, ``~`` only where two could strike text through), nothing else, so the raw
    comment stays readable."""
    s = one_line(str(value))
    tildes = s.count("~") >= 2
    out = []
    for i, ch in enumerate(s):
        if ch in "&<>":
            out.append({"&": "&amp;", "<": "&lt;", ">": "&gt;"}[ch])
        elif ch in _SPECIAL or (ch == "~" and tildes):
            out.append("\\" + ch)
        elif ch == "_" and not (0 < i < len(s) - 1 and s[i - 1].isalnum() and s[i + 1].isalnum()):
            out.append("\\_")
        else:
            out.append(ch)
    return "".join(out)


def code(value: object) -> str:
    """An inline code span that holds any text (a fence longer than any backtick run inside)."""
    s = one_line(str(value))
    run = longest = 0
    for ch in s:
        run = run + 1 if ch == "`" else 0
        longest = max(longest, run)
    fence = "`" * (longest + 1)
    pad = " " if s.startswith("`") or s.endswith("`") or not s.strip() else ""
    return f"{fence}{pad}{s}{pad}{fence}"


def cell(value: object) -> str:
    """A code span inside a table cell (a pipe would end the cell even there)."""
    return code(value).replace("|", "\\|")


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def _fails(report: Report) -> bool:
    fails = getattr(report, "fails", None)
    return bool(fails()) if callable(fails) else bool(report.failing())


# -- structure changes in words ----------------------------------------------------------

def _value(key: str, value: object, analysis: dict[str, Any] | None, after: bool) -> str:
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if key.endswith("zero dynamics") and isinstance(value, str):
        return _VERDICTS.get(value, value)
    if key == "envelope" and value == "singular" and after and analysis:
        witness = envelope_witness(analysis)
        if witness:
            where = ", ".join(f"{k} = {format(v, '.6g') if isinstance(v, float) else v}" for k, v in witness.items())
            return f"singular at ({where})"
    return str(value)


def change_words(change: dict[str, Any], analysis: dict[str, Any] | None = None) -> str:
    """One structural change as a Markdown line, e.g. 'relative degree of y: 2 → **3**'."""
    what = str(change.get("what", ""))
    before, after = change.get("before"), change.get("after")
    if what.startswith("waiver "):
        subject = text(what[len("waiver "):])
        if before is None:
            return f"new waiver of {subject}: “{text(after)}”"
        if after is None:
            return f"waiver of {subject} removed (was: “{text(before)}”)"
        return f"waiver of {subject}: reason changed to “{text(after)}”"
    if what == "model" and after == "deleted":
        return "model deleted"
    old = _value(what, before, None, False)
    new = _value(what, after, analysis, True)
    return f"{text(what)}: {text(old)} → **{text(new)}**"


# -- findings ---------------------------------------------------------------------------------

def finding_item(f: Finding) -> str:
    where = f" (line {f.span.line})" if f.span is not None and f.span.line > 0 else ""
    point = f" at {code(f.point)}" if f.point else ""
    waived = f" — waived: “{text(f.reason or 'no reason given')}”" if f.waived else ""
    return f"- **{f.severity.value}** {code(f.rule)}{point}{where}: {text(f.message.strip())}{waived}"


def _block(lines: list[str], title: str, out: list[str], collapse: bool = False) -> None:
    if not lines:
        return
    if collapse or len(lines) > LONG:
        out += ["<details>", f"<summary>{title} ({len(lines)})</summary>", "", *lines, "", "</details>", ""]
    else:
        out += [f"{title}:", "", *lines, ""]


def _file_heading(fr: FileReport) -> str:
    plant = f" — plant {code(fr.plant)}" if fr.plant else ""
    return f"#### {code(fr.path)}{plant}"


def render_markdown(report: Report) -> str:
    counts = report.counts()
    failed = _fails(report)
    since = report.since
    out: list[str] = []
    per_file = list(findings_in_order(report))
    if since is not None:
        state = {fr.path: {"introduced": [], "known": [], "fixed": []} for fr, _ in per_file}
        for fr, findings in per_file:
            for f in findings:
                state[fr.path][baseline_of(f, report) or "known"].append(f)
        new_failing = len([f for f in report.failing()])
        introduced = sum(len(s["introduced"]) for s in state.values())
        fixed = sum(len(s["fixed"]) for s in state.values())
        known = sum(len(s["known"]) for s in state.values())
        changed = [fr for fr, _ in per_file if fr.structure_changes or state[fr.path]["introduced"]
                   or state[fr.path]["fixed"]]
        verdict = "FAILED" if failed else "passed"
        out.append(f"### plantlint review — {verdict}")
        out.append("")
        line = (f"Compared with {code(since)}: {_plural(len(report.files), 'model')} checked, "
                f"{len(changed)} changed; findings introduced {introduced}, fixed {fixed}, known {known}.")
        if failed and new_failing:
            line += f" **{_plural(new_failing, 'introduced finding')} at or above {report.fail_on.value} fail the check.**"
        out += [line + _undecided_note(report), ""]
        out += _settings(report)
        if not changed:
            out += ["No model changed its structure or its findings.", ""]
            return "\n".join(out)
        out += ["| model | structure | introduced | fixed |", "|---|---|---:|---:|"]
        for fr in changed:
            first = change_words(fr.structure_changes[0], fr.analysis) if fr.structure_changes else "unchanged"
            more = f" (+{len(fr.structure_changes) - 1} more)" if len(fr.structure_changes) > 1 else ""
            out.append(f"| {cell(fr.path)} | {first}{more} | {len(state[fr.path]['introduced'])} | "
                       f"{len(state[fr.path]['fixed'])} |")
        out.append("")
        for fr in changed:
            out += [_file_heading(fr), ""]
            if fr.structure_changes:
                _block([f"- {change_words(c, fr.analysis)}" for c in fr.structure_changes], "Structure", out)
            _block([finding_item(f) for f in state[fr.path]["introduced"]], "Introduced", out)
            _block([finding_item(f) for f in state[fr.path]["fixed"]], "Fixed", out)
            _block([finding_item(f) for f in state[fr.path]["known"]], "Known before", out, collapse=True)
        return "\n".join(out).rstrip("\n") + "\n"

    with_findings = [(fr, fs) for fr, fs in per_file if fs]
    verdict = "FAILED" if failed else "passed"
    out.append(f"### plantlint — {verdict}")
    out.append("")
    tally = ", ".join(_plural(counts.get(k, 0), w) for k, w in
                      (("errors", "error"), ("warnings", "warning"), ("notes", "note")))
    out += [f"{_plural(len(report.files), 'model')} checked: {tally}, {counts.get('waived', 0)} waived "
            f"(fail level: {report.fail_on.value}).{_undecided_note(report)}", ""]
    out += _settings(report)
    if not with_findings:
        out += ["No findings.", ""]
        return "\n".join(out).rstrip("\n") + "\n"
    out += ["| model | errors | warnings | notes | waived |", "|---|---:|---:|---:|---:|"]
    for fr, fs in with_findings:
        live = [f for f in fs if not f.waived]
        n = {s: sum(1 for f in live if f.severity.value == s) for s in ("error", "warning", "note")}
        out.append(f"| {cell(fr.path)} | {n['error']} | {n['warning']} | {n['note']} | "
                   f"{sum(1 for f in fs if f.waived)} |")
    clean = len(per_file) - len(with_findings)
    out += ["", f"{_plural(clean, 'model')} without findings." if clean else "", ""]
    for fr, fs in with_findings:
        out += [_file_heading(fr), ""]
        _block([finding_item(f) for f in fs if not f.waived], "Findings", out)
        _block([finding_item(f) for f in fs if f.waived], "Waived", out, collapse=True)
    return "\n".join(out).rstrip("\n") + "\n"


def _settings(report: Report) -> list[str]:
    """The active settings that change what is reported or what fails, with their reasons."""
    lines = [f"- {text(adjustment_text(a))}" for a in report.adjustments]
    if lines and report.configuration:
        lines.insert(0, f"- configuration file: {text(report.configuration)}")
    relaxed = getattr(report, "relaxation", None)
    if relaxed is not None:
        lines.append(f"- not-decided results do not fail this run (set in {text(relaxed.source)}): "
                     f"{text(relaxed.reason)}")
    return ["Settings in force:", "", *lines, ""] if lines else []


def _undecided_note(report: Report) -> str:
    """The models that could not be checked and the claims not decided (they fail the run
    unless [undecided] fail = false lets them pass)."""
    phrase = undecided_phrase(report)
    return f" **Not decided: {text(phrase)}.**" if phrase else ""


class MarkdownFormatter:
    name = "markdown"
    description = "Markdown summary for a merge-request comment (structure changes under --since)"

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None:
        stream.write(render_markdown(report))
