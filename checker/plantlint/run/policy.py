"""The decision engine: which findings are reported, at what severity, and which are waived.

Pure functions over frozen records, so the rules of selection can be tested from
tables. Severity always comes from the catalogue (or a configured override), so
one place decides how serious a rule is.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable, Iterable, Mapping

from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding, Severity, Waiver


def apply_policy(
    findings: Iterable[Finding],
    waivers: Iterable[Waiver],
    defaults: Mapping[str, Severity],
    overrides: Mapping[str, Severity],
    only: frozenset[str] = frozenset(),
    skip: frozenset[str] = frozenset(),
) -> list[Finding]:
    """Select, re-grade and waive findings, in that order."""
    waivers = list(waivers)
    out = []
    for f in findings:
        if only and f.rule not in only:
            continue
        if f.rule in skip:
            continue
        severity = overrides.get(f.rule) or defaults.get(f.rule) or f.severity
        # not decided is not a defect to accept: only `[undecided]` in the configuration relaxes it
        waiver = None if f.undecided else matching_waiver(f, waivers)
        out.append(replace(f, severity=severity, waived=waiver is not None,
                           reason=waiver.reason if waiver is not None else None))
    return out


def unused_waivers(findings: Iterable[Finding], waivers: Iterable[Waiver], judged: Callable[[str], bool]) -> list[Finding]:
    """An ``unused-waiver`` finding for each waiver that matches none of ``findings``
    (the findings before selection, so a waiver of a skipped rule still counts as used).

    ``judged(rule)`` says whether the run can tell that the rule did not fire: not when
    the analysis was cut short, for rules that need the analysis."""
    findings = list(findings)
    out = []
    for w in waivers:
        if not judged(w.rule) or any(matching_waiver(f, [w]) is not None for f in findings):
            continue
        where = f" at point {w.point}" if w.point else ""
        out.append(finding(
            "unused-waiver",
            f"the waiver of '{w.rule}'{where} silences nothing: the rule does not fire "
            + (f"at point {w.point}" if w.point else "in this model"),
            w.span, point=w.point, anchor=anchors.waiver(w.rule, w.point),
            hint="remove the waiver, or correct its rule id or point"))
    return out


def matching_waiver(finding: Finding, waivers: Iterable[Waiver]) -> Waiver | None:
    """A waiver matches its rule everywhere in the file, or only at its point."""
    for w in waivers:
        if w.rule != finding.rule:
            continue
        if w.point is None or w.point == finding.point:
            return w
    return None
