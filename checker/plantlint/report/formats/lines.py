"""One line per finding in the GNU ``file:line:col: severity: message`` form.

Meant for editors, grep and CI logs: no heading and no summary (the exit code
carries the verdict). Besides findings, only ``note:`` lines are written: structure
changes under ``--since`` and the active settings that drop or re-grade findings
(``skip``, ``only``, ``[severity]``), each with its reason; a ``path: error: could not be
checked`` line for a model whose own errors stopped its analysis when this run leaves
them out (selection, re-grading, or known under ``--since``); and, when something was
not decided, one ``plantlint: error: not decided: ...`` line (``note`` when the
configuration lets not-decided results pass, which is then always stated). Findings fixed since a
baseline are left out because they no longer exist in the file.
"""

from __future__ import annotations

from typing import TextIO

from plantlint.core.findings import Finding, Report
from plantlint.report.formats.base import (
    adjustment_text,
    baseline_of,
    change_text,
    findings_in_order,
    one_line,
    relaxation_text,
    undecided_phrase,
)

#: The word in the severity position for a waived finding.
WAIVED = "waived"
#: ... and for a not-decided one that the configuration lets pass ([undecided] fail = false).
UNDECIDED = "undecided"


def finding_line(path: str, finding: Finding, baseline: str | None = None, relaxed: bool = False) -> str:
    """``path:line:col: severity: message [rule-id]`` plus optional suffixes:
    `` (point NAME)``, `` (SEVERITY waived: reason)`` and, under ``--since``,
    `` (introduced)`` or `` (known)``.

    A waived finding says ``waived`` where the severity goes, so that counting
    ``error:`` in a log counts only what is not waived."""
    where = one_line(path)
    if finding.span is not None:
        where += f":{finding.span.line}:{finding.span.column}"
    allowed = relaxed and finding.undecided and not finding.waived  # not decided, let pass by [undecided]
    word = WAIVED if finding.waived else UNDECIDED if allowed else finding.severity.value
    line = f"{where}: {word}: {one_line(finding.message).strip()} [{finding.rule}]"
    if finding.point:
        line += f" (point {one_line(finding.point)})"
    if finding.waived:
        line += f" ({finding.severity.value} waived: {one_line(finding.reason or 'no reason given')})"
    if allowed:
        line += f" ({finding.severity.value} not decided, allowed by [undecided] fail = false)"
    if baseline is not None:
        line += f" ({baseline})"
    return line


class LinesFormatter:
    name = "lines"
    description = "one line per finding: path:line:col: severity: message [rule-id]"

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None:
        for file_report, findings in findings_in_order(report):
            for finding in findings:
                baseline = baseline_of(finding, report)
                if baseline == "fixed":
                    continue
                stream.write(finding_line(file_report.path, finding, baseline, report.relaxation is not None) + "\n")
            stop = file_report.stop
            if stop is not None and stop.kind == "blocked":  # no finding of its own says so
                word = "note" if report.relaxation is not None else "error"
                stream.write(f"{one_line(file_report.path)}: {word}: could not be checked: the analysis "
                             f"{one_line(stop.detail)}\n")
            for change in file_report.structure_changes:
                shown = change_text(change)
                kind = "" if shown.startswith("waiver ") else "structure "
                stream.write(f"{one_line(file_report.path)}: note: {kind}changed since {report.since}: {shown}\n")
        undecided, relaxed = undecided_phrase(report), relaxation_text(report)
        if relaxed:  # the choice to let not-decided results pass, always shown when set
            stream.write(f"plantlint: note: {relaxed}\n")
        if undecided:  # the run's not-decided outcome in one line
            stream.write(f"plantlint: {'note' if relaxed else 'error'}: not decided: {undecided}\n")
        for adjustment in report.adjustments:  # settings that drop or re-grade findings
            if adjustment.source.startswith("-"):  # an option on the command line
                stream.write(f"plantlint: note: {adjustment_text(adjustment)}\n")
            else:
                reason = f": {one_line(adjustment.reason)}" if adjustment.reason else ""
                stream.write(f"{one_line(adjustment.source)}: note: {adjustment.describe()}{reason}\n")
