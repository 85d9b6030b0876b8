"""One file through the whole checker: bytes -> model -> analysis -> raw findings.

The result (:class:`RawResult`) is plain data so it can cross a process boundary
and be cached; the policy (selection, severities, waivers) is applied afterwards
by :func:`finish`, which needs neither sympy nor the model. ``check`` and ``explain``
both go through here; explain asks for its derivation data as well (``explain=True``).
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass, field
from typing import Any, Callable

from plantlint.core import anchors, deadline
from plantlint.core.catalogue import STOPPING_RULES, finding
from plantlint.core.findings import (
    FileReport,
    Finding,
    Severity,
    Span,
    Stop,
    Waiver,
    finding_from_data,
    finding_to_data,
    waiver_from_data,
    waiver_to_data,
)
from plantlint.core.limits import MAX_BYTES
from plantlint.core.settings import AnalysisSettings
from plantlint.run.config import Config

#: Model findings after which the plant cannot be analysed meaningfully: those that stop it
#: before its values, and two that its values show.
BLOCKING = STOPPING_RULES | {"not-input-affine", "non-smooth"}


@dataclass
class RawResult:
    """What one file yields before policy: findings with spans, waivers, analysis."""

    plant: str | None = None
    findings: list[Finding] = field(default_factory=list)
    waivers: list[Waiver] = field(default_factory=list)
    analysis: dict[str, Any] | None = None
    stages: list[str] = field(default_factory=list)  # analysis stages completed
    #: claims the completed stages cannot settle yet (only in a snapshot of an unfinished run)
    pending: list[Finding] = field(default_factory=list)
    stop: Stop | None = None  # set when the analysis did not complete
    #: the derivation for ``explain`` (analysis.serialise.explain_json), only when asked for
    explain: dict[str, Any] | None = None
    #: a step of the analysis stopped at its own wall-clock bound (an envelope proof's
    #: seconds, a ``bounded`` step): the result depends on the machine, so it is not cached
    timed_out_step: bool = False
    #: ``full``: the analysis ran (``analysis`` holds it when the model reached it);
    #: ``light``: the light route proved the model clean without it (no ``analysis`` to show)
    route: str = "full"

    def to_data(self) -> dict[str, Any]:
        return {
            "plant": self.plant,
            "findings": [finding_to_data(f) for f in self.findings],
            "waivers": [waiver_to_data(w) for w in self.waivers],
            "analysis": self.analysis,
            "stages": self.stages,
            "pending": [finding_to_data(f) for f in self.pending],
            "stop": self.stop.to_data() if self.stop is not None else None,
            "explain": self.explain,
            "timed_out_step": self.timed_out_step,
            "route": self.route,
        }

    @classmethod
    def from_data(cls, d: dict[str, Any]) -> "RawResult":
        return cls(
            plant=d.get("plant"),
            findings=[finding_from_data(x) for x in d.get("findings", [])],
            waivers=[waiver_from_data(x) for x in d.get("waivers", [])],
            analysis=d.get("analysis"),
            stages=list(d.get("stages", [])),
            pending=[finding_from_data(x) for x in d.get("pending", [])],
            stop=Stop.from_data(d["stop"]) if d.get("stop") else None,
            explain=d.get("explain"),
            timed_out_step=bool(d.get("timed_out_step", False)),
            route=str(d.get("route", "full")),
        )


def read_model(data: bytes, path: str = "") -> tuple[Any, list[Finding]]:
    """Bytes to (Model or None, model findings). Never raises on bad input.

    A file that does not parse, or whose names do not resolve, is reported without
    importing the model layer (and sympy): nothing of it needs a value."""
    model, findings, _ = _read(data, path)
    return model, findings


def read_names(data: bytes) -> tuple[Any, list[Finding], str | None]:
    """Bytes to statements whose names resolve, without sympy: (the parsed file, [], None),
    or (None, the problems that stop it, the plant's name when its header was read). Like
    a file that does not parse, one whose names do not resolve is not read as a model: its
    units and values are looked at once its names resolve (a waiver of a unit rule needs
    the model)."""
    from plantlint.language.syntax import decode, parse_text

    text, problem = decode(data)
    if problem is not None or text is None:
        return None, [problem] if problem else [], None
    parsed = parse_text(text)
    if parsed.findings:
        return None, list(parsed.findings), None  # what build_model says of it, without sympy
    from plantlint.language.names import name_problems

    stopping = name_problems(parsed)
    if stopping:
        header = parsed.statements[0] if parsed.statements and parsed.statements[0].kind == "plant" else None
        return None, stopping, header.name if header is not None else None
    return parsed, [], None


def _read(data: bytes, path: str = "") -> tuple[Any, list[Finding], str | None]:
    """:func:`read_model`, with the plant's name (also of a model stopped by its names)."""
    parsed, stopping, plant = read_names(data)
    if parsed is None:
        return None, stopping, plant
    from plantlint.language.model import build_model

    model, findings = build_model(parsed, path)
    if model is not None:
        from plantlint.language.units import check_units  # pint only when units are declared

        findings = [*findings, *check_units(parsed.statements)]
    return model, findings, model.name if model is not None else None


Progress = Callable[[str, RawResult], None]


def analyse_bytes(data: bytes, settings: AnalysisSettings | Config = AnalysisSettings(),
                  progress: Progress | None = None, *, explain: bool = False) -> RawResult:
    """Parse, build and analyse one model held in ``data``. Never raises on bad input.

    ``settings`` are the analysis settings (a :class:`Config` is read for its
    ``analysis`` settings: all that the analysis sees of it). ``progress(stage,
    snapshot)`` gets a snapshot after the model is read (stage ``model``) and after
    every analysis stage: what a stop at that moment keeps. With ``explain`` the result
    (and every snapshot) also carries the derivation that ``plantlint explain`` shows.
    """
    if isinstance(settings, Config):
        settings = settings.analysis
    runs_out = deadline.times_run_out()
    result = _analyse(data, settings, progress, explain)
    result.timed_out_step = deadline.times_run_out() > runs_out
    return result


def _analyse(data: bytes, settings: AnalysisSettings, progress: Progress | None, explain: bool) -> RawResult:
    """:func:`analyse_bytes` without the record of time bounds."""
    model, findings, plant = _read(data)
    result = RawResult(plant=plant, findings=list(findings))
    if model is None:
        return result
    result.waivers = list(model.waivers)
    if any(f.rule in BLOCKING for f in findings) or not model.defined:
        result.findings = [locate(f, model.spans) for f in result.findings]
        return result
    from plantlint.analysis.engine import Analysis, Unevaluable, claims_so_far, nowhere_defined, run_analysis
    from plantlint.kernel.lie import Kernel
    from plantlint.analysis.serialise import analysis_json, explain_json

    memo: dict[str, Any] = {}  # the explain derivation, built once

    def derivation(analysis: Analysis) -> dict[str, Any] | None:
        return _plain(explain_json(analysis, memo)) if explain else None

    def read_only() -> RawResult:
        """The model read, no stage completed: every claim still to be decided."""
        return RawResult(plant=model.name, findings=[locate(f, model.spans) for f in findings],
                         waivers=list(model.waivers),
                         pending=[locate(f, model.spans) for f in _claims_before_analysis(model)])

    if progress is not None:
        progress("model", read_only())

    def stage(name: str, analysis: Analysis) -> None:
        if progress is None:
            return
        decided, pending = claims_so_far(analysis) if name != "claims" else ([], [])
        progress(name, RawResult(
            plant=model.name, waivers=list(model.waivers), analysis=analysis_json(analysis),
            stages=list(analysis.completed),
            findings=[locate(f, model.spans) for f in [*findings, *analysis.findings, *decided]],
            pending=[locate(f, model.spans) for f in pending], explain=derivation(analysis)))

    plant = model.plant()
    assert plant is not None, "analysis needs an input-affine model"
    kernel = Kernel(plant)
    undefined = nowhere_defined(kernel)
    if isinstance(undefined, Unevaluable):  # no finite value anywhere, and nothing proven wrong
        from plantlint.analysis.stages import STAGES

        return stopped(read_only(), "values", [], STAGES, 0.0, undefined.detail)
    if undefined:  # like a rate that divides by zero for every state: nothing to analyse
        result.findings = [locate(f, model.spans) for f in [*findings, *undefined]]
        return result
    analysis = run_analysis(model, settings, stage, write_out=explain, kernel=kernel)  # the symbolic zero dynamics: explain only
    result.analysis = analysis_json(analysis)
    result.explain = derivation(analysis)
    result.stages = list(analysis.completed)
    result.findings = [locate(f, model.spans) for f in [*findings, *analysis.findings]]
    return result


def light_result(data: bytes, settings: AnalysisSettings | Config = AnalysisSettings(),
                 seconds: float | None = None, stop: Callable[[], bool] | None = None) -> RawResult | None:
    """The result of a model that the light route proves clean (no findings, every claim
    holding, every stage's question settled), or None: then :func:`analyse_bytes` must
    answer. It imports no sympy (:mod:`plantlint.analysis.light`); ``seconds`` bounds its
    envelope proof, and ``stop`` ends that proof early (True: no longer needed)."""
    if isinstance(settings, Config):
        settings = settings.analysis
    from plantlint.analysis.light import light_check
    from plantlint.analysis.stages import STAGES

    passed = light_check(data, settings, seconds, stop)
    if passed is None:
        return None
    return RawResult(plant=passed.plant, stages=list(STAGES), route="light")


def _plain(data: dict[str, Any]) -> dict[str, Any]:
    """JSON-ready data (anything else shown as text), as the cache and the reports hold it."""
    return json.loads(json.dumps(data, default=str))


def _claims_before_analysis(model: Any) -> list[Finding]:
    """Every claim, not decided yet (what a stop before the first stage leaves)."""
    from plantlint.analysis.engine import claim_stage, claim_text

    return [finding("expectation-failed", f"`{claim_text(c)}` not decided", point=c.point,
                    anchor=c.anchor, undecided=True, hint=f"needs the stage '{claim_stage(c, bool(model.ranged_params))}' to complete")
            for c in model.claims]


def locate(f: Finding, spans: Any) -> Finding:
    """Give analysis findings the span of what their anchor names."""
    if f.span is not None:
        return f
    from dataclasses import replace

    span = spans.get(f.anchor)
    if span is None and f.anchor == anchors.ENVELOPE:
        span = next((s for a, s in spans.items() if anchors.is_envelope_claim(a)), None)
    if span is None and f.point is not None:
        span = spans.get(anchors.point(f.point))
    if span is None:
        span = spans.get(anchors.PLANT)
    return replace(f, span=span)


def _judged(raw: RawResult) -> Callable[[str], bool]:
    """Which rules' absence this result can vouch for: every rule of the catalogue when
    the file was read and its analysis completed, none otherwise (a model with errors
    that stop the analysis, or an analysis cut short, cannot say what would have fired)."""
    from plantlint.core.catalogue import load_catalogue

    catalogue = load_catalogue()
    rules = {f.rule for f in raw.findings}
    complete = ((raw.analysis is not None or raw.route == "light") and getattr(raw, "stop", None) is None
                and not rules & (BLOCKING | {"analysis-budget", "analysis-incomplete"}))
    return lambda rule: complete and rule in catalogue


def finish(path: str, raw: RawResult, source: str | None, config: Config, defaults: dict[str, Severity]) -> FileReport:
    """Apply the policy to a raw result and make the file's report."""
    from plantlint.run.policy import apply_policy, unused_waivers

    findings = raw.findings + unused_waivers(raw.findings, raw.waivers, _judged(raw))
    findings = apply_policy(findings, raw.waivers, defaults, config.severity, config.only, config.skip)
    stop = raw.stop
    if stop is None and not_analysed(raw) and not any(fails_the_run(f, config.fail_on) for f in findings):
        stop = blocked(raw.findings, "which this run's rule selection (only/skip) or severity settings leave out")
    return FileReport(path=path, plant=raw.plant, findings=findings, analysis=raw.analysis, source=source,
                      stop=stop, stages=list(raw.stages))


def not_analysed(raw: RawResult) -> bool:
    """The model's errors kept the analysis from running (not a budget or crash stop)."""
    return raw.analysis is None and raw.stop is None and raw.route != "light"


def fails_the_run(f: Finding, fail_on: Severity) -> bool:
    """A decided, unwaived finding at or above the run's fail level."""
    return f.severity.rank >= fail_on.rank and not f.waived and not f.undecided


def blocked(errors: list[Finding], why_not_shown: str) -> Stop:
    """The stop of a model whose errors kept its analysis from running when those errors
    do not fail the run themselves (hidden by --only/--skip or re-graded, or known under
    --since): nothing of the model was checked, so it is not decided, never a pass."""
    first = next((f for f in errors if f.severity is Severity.ERROR), errors[0] if errors else None)
    what = (f"{first.rule} at line {first.span.line}" if first is not None and first.span is not None
            else first.rule if first is not None else "errors")
    return Stop("blocked", None, (), f"did not run: the model has errors that stop it ({what}), {why_not_shown}")


#: Anchor of the finding that says a model could not be checked (the runner's own stops).
STOP_ANCHOR = anchors.STOP

_STOP_HINTS = {
    "time": "raise the budget (--timeout, `timeout` in the configuration, or the longer CI budget: "
            "--profile ci) or simplify the model",
    "memory": "simplify the model (shorter definitions, fewer nested functions) or split it",
    "internal-error": "please report it with the model; meanwhile simplify the model around the stage named",
    "values": "check the model's scale (a constant like 1e300 inside exp, cosh or sinh) and its ranges against "
              "the functions' domains (asin and acos need -1 .. 1, sqrt, log and fractional powers a positive "
              "argument)",
}


_CLAIM = re.compile(r"[ \t]*expect[ \t]+([a-z_]+)(?:[ \t]*\([ \t]*([A-Za-z_][A-Za-z0-9_]*)[ \t]*\))?"
                    r"(?:[ \t]*=[ \t]*([0-9]+))?(?:[ \t]+at[ \t]+([A-Za-z_][A-Za-z0-9_]*))?[ \t]*(?:#.*)?$")


def claims_in_text(data: bytes) -> list[Finding]:
    """The `expect` lines of a model that was not read (the analysis stopped before it was
    parsed), found line by line without parsing: each is a claim not decided."""
    out = []
    for number, raw in enumerate(data[:MAX_BYTES].decode("utf-8", errors="replace").splitlines(), start=1):
        m = _CLAIM.fullmatch(raw)
        if m is None:
            continue
        kind, output, value, point = m.groups()
        anchor = anchors.claim(kind, output, point)
        text = f"expect {kind}" + (f"({output}) = {value}" if output else "") + (f" at {point}" if point else "")
        start = len(raw) - len(raw.lstrip()) + 1
        out.append(finding("expectation-failed", f"`{text}` not decided",
                           Span(number, start, number, len(raw.split("#")[0].rstrip()) + 1), point=point,
                           anchor=anchor, undecided=True))
    return out


def stopped(snapshot: RawResult | None, kind: str, stages: list[str], all_stages: tuple[str, ...],
            seconds: float, detail: str = "", header: tuple[int, str | None] = (1, None),
            text: bytes = b"") -> RawResult:
    """The result of an analysis that did not complete: the last snapshot (plant, completed
    stages, their findings and the claims they settle), every other claim not decided, and
    an ``analysis-incomplete`` finding at the plant header saying why.

    ``kind`` is ``time``, ``memory``, ``internal-error`` (``detail`` the error text) or
    ``values`` (no point of the envelope gave finite values, and none was proven undefined:
    ``detail`` says so in words).
    """
    base = snapshot or RawResult(plant=header[1], pending=claims_in_text(text))
    done = [s for s in all_stages if s in stages]
    running = next((s for s in all_stages if s not in stages), None)
    if snapshot is None:
        running = "reading the model"
    # every stage done: the stop came while the results were put together and sent
    where = f" in stage {running}" if running else " after its last stage, while its results were put together"
    if kind == "time":
        what = f"stopped at its {seconds:g} s budget{where}"
    elif kind == "values":
        what = f"could not start: {detail}"
    elif kind == "memory":
        what = f"ran out of its memory budget{where}"
    else:
        what = f"stopped by an internal error{where} ({detail})"
    stop = Stop(kind, running, tuple(done), what)
    todo = [s for s in all_stages if s not in done]
    line = header[0]
    incomplete = finding("analysis-incomplete",
                         f"could not be checked: the analysis {what}; completed: {', '.join(done) or 'none'}; "
                         f"not completed: {', '.join(todo) or 'none'}",
                         Span(line, 1, line, 6), anchor=STOP_ANCHOR, hint=_STOP_HINTS[kind], undecided=True)
    from dataclasses import replace

    claims = [replace(p, message=f"{p.message}: the analysis {what}", hint=None) for p in base.pending]
    return RawResult(plant=base.plant, findings=[*base.findings, *claims, incomplete], waivers=list(base.waivers),
                     analysis=base.analysis, stages=done, stop=stop, explain=base.explain)
