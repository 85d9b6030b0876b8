"""The one record every check produces, and the report that carries them.

Findings are frozen so that selection, waivers and baselines can only make new
ones (``dataclasses.replace``), never mutate what an analysis said.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from enum import Enum
from typing import Any


class Severity(str, Enum):
    """SARIF's three levels, ordered from most to least serious."""

    ERROR = "error"
    WARNING = "warning"
    NOTE = "note"

    @property
    def rank(self) -> int:
        """Higher is more serious (error 3, warning 2, note 1)."""
        return {"error": 3, "warning": 2, "note": 1}[self.value]

    @classmethod
    def parse(cls, text: str) -> "Severity":
        try:
            return cls(text.strip().lower())
        except ValueError:
            raise ValueError(f"unknown severity {text!r} (use error, warning or note)") from None


@dataclass(frozen=True)
class Span:
    """A region of a source file. Lines and columns are 1-based; ``end_column``
    is the column just after the last character (as SARIF's ``endColumn``)."""

    line: int
    column: int
    end_line: int
    end_column: int

    @classmethod
    def point(cls, line: int, column: int, width: int = 1) -> "Span":
        return cls(line, column, line, column + max(width, 1))


@dataclass(frozen=True)
class Finding:
    """One problem found in one model file.

    ``anchor`` names *what* the finding is about without line numbers (for example
    ``"rate v"`` or ``"expect relative_degree(y)"``); with the rule, the plant and
    the point it makes the fingerprint that survives unrelated edits.
    """

    rule: str
    severity: Severity
    message: str
    span: Span | None = None
    point: str | None = None
    hint: str | None = None
    anchor: str = ""
    waived: bool = False
    reason: str | None = None
    baseline: str | None = None  # "introduced" | "known" | "fixed" under --since
    undecided: bool = False  # a claim the analysis could not decide (never a defect found)

    def fingerprint(self, plant: str | None) -> str:
        """A stable hash of what the finding is about (not where it sits)."""
        basis = "\x1f".join([self.rule, plant or "", self.anchor or self.message, self.point or ""])
        return hashlib.sha256(basis.encode("utf-8")).hexdigest()[:32]

    @property
    def sort_key(self) -> tuple[Any, ...]:
        span = self.span or Span(0, 0, 0, 0)
        return (span.line, span.column, self.rule, self.point or "", self.message)


@dataclass(frozen=True)
class Waiver:
    """`waive RULE [at POINT] "reason"` from a model file."""

    rule: str
    point: str | None
    reason: str
    span: Span


@dataclass(frozen=True)
class Adjustment:
    """A setting that drops or re-grades findings for the whole run, with its reason:
    ``only`` (report these rules, nothing else), ``skip`` (leave a rule out) or
    ``severity`` (report a rule at ``level``). ``source`` says where it was set (the
    configuration file, or the command line). Every report lists the active ones."""

    kind: str  # "only" | "skip" | "severity"
    rules: tuple[str, ...]
    reason: str
    source: str
    level: Severity | None = None  # for "severity"

    def describe(self) -> str:
        """In words, e.g. 'rule unused-name reported as note' (without reason or source)."""
        rules = ", ".join(self.rules)
        if self.kind == "only":
            return f"only rule{'s' if len(self.rules) > 1 else ''} {rules} reported"
        if self.kind == "skip":
            return f"rule {rules} skipped"
        return f"rule {rules} reported as {self.level.value if self.level else '?'}"

    def to_data(self) -> dict[str, Any]:
        return {"kind": self.kind, "rules": list(self.rules), "level": self.level.value if self.level else None,
                "reason": self.reason or None, "source": self.source}


@dataclass
class FileReport:
    """Everything plantlint says about one file."""

    path: str
    plant: str | None = None
    findings: list[Finding] = field(default_factory=list)
    analysis: dict[str, Any] | None = None
    source: str | None = None  # the text, for showing spans; never written back
    structure_changes: list[dict[str, Any]] = field(default_factory=list)
    deleted: bool = False  # under --since: the model existed at the baseline and is gone (not checked)
    #: set when the analysis did not complete (see :class:`Stop`): the model could not be checked
    stop: "Stop | None" = None
    stages: list[str] = field(default_factory=list)  # analysis stages completed

    @property
    def checked(self) -> bool:
        """False when the analysis was cut short or stopped by an internal error."""
        return self.stop is None

    def sorted_findings(self) -> list[Finding]:
        return sorted(self.findings, key=lambda f: f.sort_key)


@dataclass(frozen=True)
class Stop:
    """Why a model's analysis did not complete.

    ``kind`` is ``time`` or ``memory`` (cut short by a budget), ``internal-error``,
    ``values`` (no point of the envelope gave finite values, and none was proven undefined), or
    ``blocked`` (the model's own errors kept the analysis from running, and this run does
    not fail on them: they are left out by --only/--skip, re-graded, or known under --since);
    ``stage`` is the stage that was running, ``completed`` the stages that finished.
    """

    kind: str
    stage: str | None
    completed: tuple[str, ...]
    detail: str  # in words, e.g. "stopped at its 0.01 s budget in stage structure"

    @property
    def cut_short(self) -> bool:
        return self.kind in ("time", "memory")

    def to_data(self) -> dict[str, Any]:
        return {"kind": self.kind, "stage": self.stage, "completed": list(self.completed), "detail": self.detail}

    @classmethod
    def from_data(cls, d: dict[str, Any]) -> "Stop":
        return cls(d["kind"], d.get("stage"), tuple(d.get("completed", ())), d.get("detail", ""))


@dataclass(frozen=True)
class Relaxation:
    """An explicit choice (``[undecided] fail = false`` with a reason) to let
    not-decided models and claims pass. Always shown in every report."""

    reason: str
    source: str = "configuration"  # where it was set, e.g. the configuration file's path


#: The three outcomes of a model (and of a run).
OUTCOMES = ("pass", "defect", "not-decided")


@dataclass
class Report:
    """The outcome of one run over many files."""

    files: list[FileReport]
    tool_version: str
    fail_on: Severity = Severity.ERROR
    since: str | None = None
    relaxation: Relaxation | None = None  # not-decided results pass only when this is set
    budget: str | None = None  # the time budget in words, e.g. "15 s per model (interactive)"
    adjustments: tuple[Adjustment, ...] = ()  # active only/skip/severity settings, with reasons
    shard: dict[str, Any] | None = None  # under --shard: index, count, models, positions, fail_on
    #: the configuration file the run used, as shown to the user (None: none found, the defaults)
    configuration: str | None = None

    def counts(self) -> dict[str, int]:
        """Findings by severity (decided, unwaived), waived ones, claims not decided, and
        models that could not be checked (of them, cut short by a time or memory budget)."""
        out = {"files": sum(not r.deleted for r in self.files), "errors": 0, "warnings": 0, "notes": 0, "waived": 0,
               "not_decided": 0, "not_checked": 0, "cut_short": 0}
        for report in self.files:
            if report.stop is not None:
                out["not_checked"] += 1
                out["cut_short"] += int(report.stop.cut_short)
            for f in report.findings:
                if f.baseline == "fixed":
                    continue
                if f.waived:
                    out["waived"] += 1
                elif f.undecided:
                    out["not_decided"] += 1
                else:
                    out[f.severity.value + "s"] += 1
        return out

    def _counts_against(self, f: Finding) -> bool:
        if f.waived or f.severity.rank < self.fail_on.rank:
            return False
        return self.since is None or f.baseline == "introduced"

    def failing(self) -> list[Finding]:
        """Defects found that make the run fail: decided, unwaived, at or above the
        fail level, and (under ``--since``) introduced by the change."""
        return [f for report in self.files for f in report.findings if not f.undecided and self._counts_against(f)]

    def undecided(self) -> list[Finding]:
        """Claims not decided, unwaived and at or above the fail level (under ``--since``:
        introduced, like any other finding)."""
        return [f for report in self.files for f in report.findings if f.undecided and self._counts_against(f)]

    def not_checked(self) -> list[FileReport]:
        """Models whose analysis did not complete (whatever ``--since`` says: the new
        version was not checked)."""
        return [report for report in self.files if report.stop is not None]

    def outcome_of(self, report: FileReport) -> str:
        """``defect``, ``not-decided`` or ``pass`` for one file of this run."""
        if any(not f.undecided and self._counts_against(f) for f in report.findings):
            return "defect"
        if report.stop is not None or any(f.undecided and self._counts_against(f) for f in report.findings):
            return "not-decided"
        return "pass"

    def outcome(self) -> str:
        """The run's outcome: a defect anywhere wins, then anything not decided."""
        outcomes = {self.outcome_of(r) for r in self.files}
        return next((o for o in ("defect", "not-decided") if o in outcomes), "pass")

    def fails(self) -> bool:
        """Does the run fail? Defects always; not-decided results unless relaxed."""
        if self.failing():
            return True
        return self.relaxation is None and bool(self.undecided() or self.not_checked())


# -- plain-data round trip (cache entries, worker processes) ------------------------

def finding_to_data(f: Finding) -> dict[str, Any]:
    span = f.span
    return {
        "rule": f.rule, "severity": f.severity.value, "message": f.message,
        "span": [span.line, span.column, span.end_line, span.end_column] if span else None,
        "point": f.point, "hint": f.hint, "anchor": f.anchor, "undecided": f.undecided,
    }


def finding_from_data(d: dict[str, Any]) -> Finding:
    span = Span(*d["span"]) if d.get("span") else None
    return Finding(d["rule"], Severity(d["severity"]), d["message"], span, point=d.get("point"),
                   hint=d.get("hint"), anchor=d.get("anchor", ""), undecided=bool(d.get("undecided", False)))


def waiver_to_data(w: Waiver) -> dict[str, Any]:
    s = w.span
    return {"rule": w.rule, "point": w.point, "reason": w.reason, "span": [s.line, s.column, s.end_line, s.end_column]}


def waiver_from_data(d: dict[str, Any]) -> Waiver:
    return Waiver(d["rule"], d.get("point"), d["reason"], Span(*d["span"]))
