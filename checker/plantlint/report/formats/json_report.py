"""plantlint's own JSON report (``"format": "plantlint-report"``).

The shape is documented in ``docs/report-format.md`` and fixed by
``checker/plantlint/report/report.schema.json``; any change a consumer could trip over bumps
``REPORT_VERSION``.
"""

from __future__ import annotations

import importlib.resources
import json
import math
from typing import Any, TextIO

from dataclasses import dataclass

from plantlint.core.findings import Adjustment, FileReport, Finding, Relaxation, Report, Severity, Span, Stop
from plantlint.report.formats.base import baseline_counts, baseline_of, findings_in_order, readable_data

REPORT_FORMAT = "plantlint-report"
REPORT_VERSION = 2  # 2: top-level "adjustments" (active only/skip/severity settings with reasons);
# outcomes: "undecided" and "budget" at the top, each file's "outcome" and "stop", each finding's
# "decided", and the summary's "not_decided", "not_checked", "cut_short" and "outcome"


def report_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of this report, shipped in the package."""
    text = (importlib.resources.files("plantlint.report") / "report.schema.json").read_text(encoding="utf-8")
    schema: dict[str, Any] = json.loads(text)
    return schema


def plain(value: Any) -> Any:
    """``value`` as plain JSON data, deterministically.

    Analysis results may hold exact numbers, tuples or sets; they are written as
    strings, lists and sorted lists, and non-finite floats as strings, so the
    output is always strict JSON.
    """
    if value is None or isinstance(value, (bool, int, str)):
        return value
    if isinstance(value, float):
        return value if math.isfinite(value) else str(value)
    if isinstance(value, dict):
        return {str(key): plain(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(item) for item in value]
    if isinstance(value, (set, frozenset)):
        return sorted((plain(item) for item in value), key=lambda item: json.dumps(item, sort_keys=True))
    return str(value)


def finding_record(finding: Finding, plant: str | None, baseline: str | None) -> dict[str, Any]:
    span = finding.span
    record: dict[str, Any] = {
        "rule": finding.rule,
        "severity": finding.severity.value,
        "message": finding.message,
        "line": span.line if span else None,
        "column": span.column if span else None,
        "end_line": span.end_line if span else None,
        "end_column": span.end_column if span else None,
        "point": finding.point,
        "waived": finding.waived,
        "reason": finding.reason if finding.waived else None,
        "hint": finding.hint,
        "fingerprint": finding.fingerprint(plant),
        "decided": not finding.undecided,
    }
    if baseline is not None:
        record["baseline"] = baseline
    return record


def file_record(file_report: FileReport, findings: list[Finding], report: Report) -> dict[str, Any]:
    record: dict[str, Any] = {
        "path": file_report.path,
        "plant": file_report.plant,
        "findings": [finding_record(f, file_report.plant, baseline_of(f, report)) for f in findings],
        "analysis": plain(file_report.analysis) if file_report.analysis is not None else None,
        "outcome": report.outcome_of(file_report),
        "stop": file_report.stop.to_data() if file_report.stop is not None else None,
    }
    if report.since is not None:
        record["structure_changes"] = plain(list(file_report.structure_changes))
    return record


def build_report(report: Report) -> dict[str, Any]:
    """The whole report as JSON-ready data (what ``render`` writes)."""
    out: dict[str, Any] = {
        "format": REPORT_FORMAT,
        "version": REPORT_VERSION,
        "tool": {"name": "plantlint", "version": report.tool_version},
    }
    out["configuration"] = report.configuration
    if report.since is not None:
        out["since"] = report.since
    out["adjustments"] = [adjustment.to_data() for adjustment in report.adjustments]
    relaxed = report.relaxation
    out["undecided"] = {"fail": relaxed is None, "reason": relaxed.reason if relaxed else None,
                        "source": relaxed.source if relaxed else None}
    out["budget"] = report.budget
    if report.shard is not None:
        out["shard"] = plain(report.shard)
    out["files"] = [file_record(fr, findings, report) for fr, findings in findings_in_order(report)]
    summary: dict[str, Any] = dict(report.counts())
    summary["outcome"] = report.outcome()
    if report.since is not None:
        summary.update(baseline_counts(report))
    out["summary"] = summary
    # a file name that is not UTF-8 shows its undecodable bytes as \\xNN: valid UTF-8 JSON
    return readable_data(out)


class ReportReadError(ValueError):
    """A JSON document that is not a plantlint report of this version."""


@dataclass(frozen=True)
class RecordedFinding(Finding):
    """A finding read back from a JSON report. The anchor it was made from is not in
    the report, so its fingerprint is the recorded one."""

    recorded: str = ""

    def fingerprint(self, plant: str | None) -> str:
        return self.recorded


def read_report(data: Any) -> Report:
    """The :class:`Report` a JSON report was written from (``plantlint merge``).

    ``build_report(read_report(build_report(r)))`` equals ``build_report(r)``
    (tests/run/test_shard.py holds it), so a key added to the report needs its reader here.
    Source text is not in the report; the caller may attach it.
    """
    if not isinstance(data, dict) or data.get("format") != REPORT_FORMAT:
        raise ReportReadError("not a plantlint JSON report")
    if data.get("version") != REPORT_VERSION:
        raise ReportReadError(f"report version {data.get('version')!r}; this plantlint reads version {REPORT_VERSION}")
    try:
        since = data.get("since")
        files = []
        for rec in data["files"]:
            findings: list[Finding] = []
            for f in rec["findings"]:
                span = Span(f["line"], f["column"], f["end_line"], f["end_column"]) if f["line"] is not None else None
                findings.append(RecordedFinding(
                    f["rule"], Severity(f["severity"]), f["message"], span, point=f["point"], hint=f["hint"],
                    waived=bool(f["waived"]), reason=f["reason"], baseline=f.get("baseline"),
                    undecided=not f["decided"], recorded=f["fingerprint"]))
            changes = list(rec.get("structure_changes", []))
            deleted = any(c.get("what") == "model" and c.get("after") == "deleted" for c in changes)
            stop = Stop.from_data(rec["stop"]) if rec["stop"] is not None else None
            files.append(FileReport(path=rec["path"], plant=rec["plant"], findings=findings, analysis=rec["analysis"],
                                    structure_changes=changes, deleted=deleted, stop=stop,
                                    stages=list(stop.completed) if stop else []))
        adjustments = tuple(
            Adjustment(a["kind"], tuple(a["rules"]), a["reason"] or "", a["source"],
                       Severity(a["level"]) if a["level"] else None)
            for a in data.get("adjustments", []))
        shard = data.get("shard")
        fail_on = Severity(shard["fail_on"]) if shard else Severity.ERROR
        undecided = data["undecided"]
        relaxation = None if undecided["fail"] else Relaxation(undecided["reason"], undecided["source"])
        return Report(files=files, tool_version=data["tool"]["version"], fail_on=fail_on, since=since,
                      adjustments=adjustments, shard=shard, relaxation=relaxation, budget=data["budget"],
                      configuration=data.get("configuration"))
    except (KeyError, TypeError, ValueError) as exc:
        raise ReportReadError(f"malformed report ({type(exc).__name__}: {exc})") from None


class JsonFormatter:
    name = "json"
    description = "plantlint's versioned JSON report (docs/report-format.md)"

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None:
        json.dump(build_report(report), stream, indent=2, ensure_ascii=True, allow_nan=False)
        stream.write("\n")
