"""One file through the whole checker: bytes -> model -> analysis -> raw findings.

The result (:class:`RawResult`) is plain data so it can cross a process boundary
and be cached; the policy (selection, severities, waivers) is applied afterwards
by :func:`finish`, which needs neither sympy nor the model.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable

from plantlint.core.findings import (
    FileReport,
    Finding,
    Severity,
    Span,
    Waiver,
    finding_from_data,
    finding_to_data,
    waiver_from_data,
    waiver_to_data,
)

#: Model findings after which the plant cannot be analysed meaningfully.
BLOCKING = frozenset({"syntax", "unknown-name", "duplicate-name", "missing-rate", "orphan-rate",
                      "not-input-affine", "non-smooth"})


@dataclass
class RawResult:
    """What one file yields before policy: findings with spans, waivers, analysis."""

    plant: str | None = None
    findings: list[Finding] = field(default_factory=list)
    waivers: list[Waiver] = field(default_factory=list)
    analysis: dict[str, Any] | None = None
    stages: list[str] = field(default_factory=list)  # analysis stages completed

    def to_data(self) -> dict[str, Any]:
        return {
            "plant": self.plant,
            "findings": [finding_to_data(f) for f in self.findings],
            "waivers": [waiver_to_data(w) for w in self.waivers],
            "analysis": self.analysis,
            "stages": self.stages,
        }

    @classmethod
    def from_data(cls, d: dict[str, Any]) -> "RawResult":
        return cls(
            plant=d.get("plant"),
            findings=[finding_from_data(x) for x in d.get("findings", [])],
            waivers=[waiver_from_data(x) for x in d.get("waivers", [])],
            analysis=d.get("analysis"),
            stages=list(d.get("stages", [])),
        )


def read_model(data: bytes, path: str = "") -> tuple[Any, list[Finding]]:
    """Bytes to (Model or None, model findings). Never raises on bad input."""
    from plantlint.language.model import build_model
    from plantlint.language.syntax import decode, parse_text

    text, problem = decode(data)
    if problem is not None or text is None:
        return None, [problem] if problem else []
    parsed = parse_text(text)
    model, findings = build_model(parsed, path)
    if model is not None and not parsed.findings:
        from plantlint.language.units import check_units  # pint only when units are declared

        findings = [*findings, *check_units(parsed.statements)]
    return model, findings


def analyse_bytes(data: bytes, config: Any, progress: Callable[[str], None] | None = None) -> RawResult:
    """Parse, build and analyse one model held in ``data``. Never raises on bad input."""
    model, findings = read_model(data)
    result = RawResult(findings=list(findings))
    if model is None:
        return result
    result.plant = model.name
    result.waivers = list(model.waivers)
    if not any(f.rule in BLOCKING for f in findings):
        from plantlint.analysis.engine import analyse

        def stage(name: str) -> None:
            result.stages.append(name)
            if progress is not None:
                progress(name)

        analysis, more = analyse(model, config, stage)
        result.analysis = analysis
        result.findings.extend(more)
    result.findings = [locate(f, model.spans) for f in result.findings]
    return result


def locate(f: Finding, spans: Any) -> Finding:
    """Give analysis findings the span of what their anchor names."""
    if f.span is not None:
        return f
    from dataclasses import replace

    span = spans.get(f.anchor)
    if span is None and f.anchor == "envelope":
        span = next((s for a, s in spans.items() if a.startswith("expect regular") and " at " not in a), None)
    if span is None and f.point is not None:
        span = spans.get(f"point {f.point}")
    if span is None:
        span = spans.get("plant")
    return replace(f, span=span)


def _judged(raw: RawResult) -> Callable[[str], bool]:
    """Which rules' absence this result can vouch for: every rule of the catalogue when
    the file was read and its analysis completed, none otherwise (a model with errors
    that stop the analysis, or an analysis cut short, cannot say what would have fired)."""
    from plantlint.core.catalogue import load_catalogue

    catalogue = load_catalogue()
    rules = {f.rule for f in raw.findings}
    complete = (raw.analysis is not None and getattr(raw, "stop", None) is None
                and not rules & (BLOCKING | {"analysis-budget", "analysis-incomplete"}))
    return lambda rule: complete and rule in catalogue


def finish(path: str, raw: RawResult, source: str | None, config: Any, defaults: dict[str, Severity]) -> FileReport:
    """Apply the policy to a raw result and make the file's report."""
    from plantlint.run.policy import apply_policy, unused_waivers

    findings = raw.findings + unused_waivers(raw.findings, raw.waivers, _judged(raw))
    findings = apply_policy(findings, raw.waivers, defaults, config.severity, config.only, config.skip)
    return FileReport(path=path, plant=raw.plant, findings=findings, analysis=raw.analysis, source=source)


def budget_finding(completed: list[str], pending: list[str], seconds: float, reason: str = "time",
                   line: int = 1) -> Finding:
    done = ", ".join(completed) if completed else "none"
    todo = ", ".join(pending) if pending else "the rest"
    what = f"exceeded its time budget of {seconds:g} s" if reason == "time" else reason
    return Finding("analysis-budget", Severity.WARNING,
                   f"analysis {what}; completed: {done}; not completed: {todo}",
                   Span(line, 1, line, 6), anchor="analysis budget",
                   hint="raise --timeout (or `timeout` in the configuration) or simplify the model")
