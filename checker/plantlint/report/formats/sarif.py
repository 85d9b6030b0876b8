"""SARIF 2.1.0 output for code-scanning services and SARIF viewers.

Rule metadata comes from the catalogue; ``partialFingerprints`` carries the
finding's own fingerprint (rule, plant, anchor, point: no line numbers), so a
result keeps its identity when unrelated edits move it.
"""

from __future__ import annotations

import json
import os
import re
from typing import Any, Iterable, TextIO
from urllib.parse import quote

from plantlint.core.catalogue import Catalogue, Rule, load_catalogue
from plantlint.report.look import PAGE_SECTIONS
from plantlint.core.findings import Adjustment, Finding, Report, Span
from plantlint.report.formats.base import baseline_of, findings_in_order, readable, readable_data

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA_URI = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
FINGERPRINT_KEY = "plantlint/v1"
SOURCE_ROOT = "%SRCROOT%"

#: plantlint's baseline states mapped to SARIF's ``result.baselineState``.
BASELINE_STATE = {"introduced": "new", "known": "unchanged", "fixed": "absent"}

_DRIVE = re.compile(r"^[A-Za-z]:/")


def _raw_bytes(path: str) -> bytes:
    """The file name's bytes as the file system holds them (a name that is not UTF-8 was
    read with ``surrogateescape``; ``os.fsencode`` gives its bytes back)."""
    try:
        return os.fsencode(path)
    except UnicodeEncodeError:  # a surrogate no file system gave (a hand-edited report)
        return readable(path).encode("utf-8")


def artifact_location(path: str) -> dict[str, str]:
    """A SARIF artifactLocation: relative paths against ``%SRCROOT%`` with forward
    slashes, absolute paths as ``file:`` URIs; the name's raw bytes percent-encoded
    (RFC 3986), so a file name that is not UTF-8 keeps its identity (``caf%E9.plant``)."""
    forward = path.replace("\\", "/")
    while forward.startswith("./"):
        forward = forward[2:]
    if forward.startswith("/"):
        return {"uri": "file://" + quote(_raw_bytes(forward), safe="/")}
    if _DRIVE.match(forward):
        return {"uri": "file:///" + quote(_raw_bytes(forward), safe="/:")}
    return {"uri": quote(_raw_bytes(forward), safe="/"), "uriBaseId": SOURCE_ROOT}


def _pascal(rule_id: str) -> str:
    return "".join(part.capitalize() for part in rule_id.split("-"))


def rule_descriptor(rule: Rule) -> dict[str, Any]:
    """A reportingDescriptor built from one catalogue entry."""
    protects, fires, fails, passes, sources = PAGE_SECTIONS
    refs = "\n".join(f"[{n}] {ref}" for n, ref in enumerate(rule.references, start=1))
    return {
        "id": rule.id,
        "name": _pascal(rule.id),
        "shortDescription": {"text": rule.title},
        "fullDescription": {"text": rule.rationale},
        "help": {
            "text": f"{protects}: {rule.rationale}\n\n{fires}: {rule.title}.\n\n{passes}:\n{rule.good}\n"
                    f"{sources}:\n{refs}",
            "markdown": (
                f"**{protects}.** {rule.rationale}\n\n**{fires}.** {rule.title}.\n\n"
                f"**{fails}:**\n\n```\n{rule.bad}```\n\n**{passes}:**\n\n```\n{rule.good}```\n\n"
                f"**{sources}:**\n\n{refs}"
            ),
        },
        "defaultConfiguration": {"level": rule.severity.value},
        "properties": {"tags": [rule.family]},
    }


def _region(span: Span) -> dict[str, int] | None:
    if span.line < 1 or span.column < 1:
        return None
    end_line = max(span.end_line, span.line)
    end_column = span.end_column if end_line > span.line else max(span.end_column, span.column)
    return {"startLine": span.line, "startColumn": span.column, "endLine": end_line, "endColumn": max(end_column, 1)}


def sarif_result(
    finding: Finding, path: str, plant: str | None, rule_index: int, baseline: str | None
) -> dict[str, Any]:
    """One SARIF result; waived findings carry an in-source suppression."""
    physical: dict[str, Any] = {"artifactLocation": artifact_location(path)}
    region = _region(finding.span) if finding.span is not None else None
    if region is not None:
        physical["region"] = region
    result: dict[str, Any] = {
        "ruleId": finding.rule,
        "ruleIndex": rule_index,
        "level": finding.severity.value,
        "message": {"text": finding.message},
        "locations": [{"physicalLocation": physical}],
        "partialFingerprints": {FINGERPRINT_KEY: finding.fingerprint(plant)},
    }
    if finding.undecided:
        # SARIF 2.1.0, 3.27.9: kind "open" = the tool could not determine whether the rule
        # holds; a kind other than "fail" requires level "none" (the run's invocation
        # carries an error-level notification for each, see not_decided_notifications)
        result["kind"] = "open"
        result["level"] = "none"
    if finding.waived:
        suppression: dict[str, Any] = {"kind": "inSource", "status": "accepted"}
        if finding.reason:
            suppression["justification"] = finding.reason
        result["suppressions"] = [suppression]
    if baseline is not None:
        result["baselineState"] = BASELINE_STATE[baseline]
    properties: dict[str, Any] = {}
    if finding.point is not None:
        properties["point"] = finding.point
    if finding.hint:
        properties["hint"] = finding.hint
    if finding.undecided:
        properties["decided"] = False
        properties["severity"] = finding.severity.value
    if plant is not None:
        properties["plant"] = plant
    if properties:
        result["properties"] = properties
    return result


def rule_overrides(adjustments: Iterable[Adjustment], index: dict[str, int]) -> list[dict[str, Any]]:
    """The active only/skip/severity settings as SARIF ``ruleConfigurationOverrides``
    (SARIF 2.1.0, 3.20.5): a skipped rule, or one left out by ``only``, is
    ``enabled: false``; a re-graded rule carries its ``level``. The reason and where it
    was set go into the override's property bag."""
    out: list[dict[str, Any]] = []
    for adjustment in adjustments:
        if adjustment.kind == "only":
            affected = [rule for rule in index if rule not in adjustment.rules]
            configuration: dict[str, Any] = {"enabled": False}
        elif adjustment.kind == "skip":
            affected, configuration = list(adjustment.rules), {"enabled": False}
        else:
            affected = list(adjustment.rules)
            configuration = {"level": adjustment.level.value if adjustment.level else "warning"}
        bag = {"setting": adjustment.kind, "source": adjustment.source}
        if adjustment.reason:
            bag["reason"] = adjustment.reason
        for rule in affected:
            if rule in index:
                out.append({"descriptor": {"id": rule, "index": index[rule]},
                            "configuration": {**configuration, "properties": dict(bag)}})
    return out


def not_decided_notifications(report: Report, index: dict[str, int]) -> list[dict[str, Any]]:
    """One ``toolExecutionNotification`` per model that could not be checked and per claim
    not decided (SARIF 2.1.0, 3.20.21): level ``error`` when it fails the run, ``warning``
    when ``[undecided] fail = false`` lets it pass."""
    level = "warning" if report.relaxation is not None else "error"
    out: list[dict[str, Any]] = []
    for fr, findings in findings_in_order(report):
        for f in findings:
            if not f.undecided or f.waived or baseline_of(f, report) == "fixed":
                continue
            physical: dict[str, Any] = {"artifactLocation": artifact_location(fr.path)}
            region = _region(f.span) if f.span is not None else None
            if region is not None:
                physical["region"] = region
            note: dict[str, Any] = {"level": level, "message": {"text": f.message},
                                    "locations": [{"physicalLocation": physical}],
                                    "associatedRule": {"id": f.rule, "index": index[f.rule]}}
            out.append(note)
    return out


def build_sarif(report: Report, catalogue: Catalogue | None = None) -> dict[str, Any]:
    """The SARIF log as JSON-ready data (what ``render`` writes)."""
    catalogue = catalogue if catalogue is not None else load_catalogue()
    rules = [rule_descriptor(rule) for rule in catalogue]
    index = {rule.id: i for i, rule in enumerate(catalogue)}
    # A rule id missing from the catalogue still gets a descriptor so ruleIndex stays valid.
    strays = sorted({f.rule for fr in report.files for f in fr.findings if f.rule not in index})
    for rule_id in strays:
        index[rule_id] = len(rules)
        rules.append({"id": rule_id})
    results = [
        sarif_result(f, fr.path, fr.plant, index[f.rule], baseline_of(f, report))
        for fr, findings in findings_in_order(report)
        for f in findings
    ]
    driver = {"name": "plantlint", "version": report.tool_version, "rules": rules}
    run: dict[str, Any] = {"tool": {"driver": driver}, "results": results, "columnKind": "unicodeCodePoints"}
    overrides = rule_overrides(report.adjustments, index)
    notifications = not_decided_notifications(report, index)
    # always present, so that a consumer can read invocations[0].executionSuccessful on every
    # run: false when the analysis of some model did not complete
    invocation: dict[str, Any] = {"executionSuccessful": not report.not_checked()}
    if overrides:
        invocation["ruleConfigurationOverrides"] = overrides
    if notifications:
        invocation["toolExecutionNotifications"] = notifications
    counts = report.counts()
    bag: dict[str, Any] = {"outcome": report.outcome(), "notDecided": counts["not_decided"],
                           "notChecked": counts["not_checked"], "cutShort": counts["cut_short"]}
    if report.budget:
        bag["budget"] = report.budget
    bag["configuration"] = report.configuration
    if report.relaxation is not None:
        bag["undecided"] = {"fail": False, "reason": report.relaxation.reason,
                            "source": report.relaxation.source}
    invocation["properties"] = bag
    run["invocations"] = [invocation]
    if report.since is not None:
        run["properties"] = {"since": report.since}
        changes = {f.path: [dict(c) for c in f.structure_changes] for f in report.files if f.structure_changes}
        if changes:
            run["properties"]["structureChanges"] = changes
    # messages and names may hold a file name that is not UTF-8: no lone surrogates in the log
    return readable_data({"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]})


class SarifFormatter:
    name = "sarif"
    description = "SARIF 2.1.0 log for code-scanning services"

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None:
        json.dump(build_sarif(report), stream, indent=2, ensure_ascii=True)
        stream.write("\n")
