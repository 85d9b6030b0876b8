"""What every output format shares: the interface and a few pure helpers.

Formatters are plug-ins behind one method so the CLI can pick one by name and
tests can render a hand-built :class:`~plantlint.core.findings.Report` into a string.
"""

from __future__ import annotations

import unicodedata
from collections.abc import Iterator
from typing import Any, Protocol, TextIO

from plantlint.core.findings import Adjustment, FileReport, Finding, Report

BASELINE_STATES: tuple[str, ...] = ("introduced", "known", "fixed")


class Formatter(Protocol):
    """One output format. ``render`` writes the whole report to ``stream``.

    Output must be deterministic: files in report order, findings in
    ``FileReport.sorted_findings()`` order.
    """

    name: str
    description: str

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None: ...


def _surrogate_text(ch: str) -> str:
    """A lone surrogate in words: ``\\xNN`` for a byte that was not UTF-8 in a file name
    (Python's ``surrogateescape`` maps byte NN to U+DCNN), ``\\uNNNN`` for any other."""
    code = ord(ch)
    return f"\\x{code - 0xDC00:02x}" if 0xDC80 <= code <= 0xDCFF else f"\\u{code:04x}"


def readable(text: str) -> str:
    """``text`` without lone surrogates: a file name that is not UTF-8 shows each byte that
    could not be decoded as ``\\xNN`` (as Python's ``backslashreplace`` does:
    ``caf\\xe9.plant``), so the text is valid Unicode and every format can write it."""
    if not any(0xD800 <= ord(ch) <= 0xDFFF for ch in text):
        return text
    return "".join(_surrogate_text(ch) if 0xD800 <= ord(ch) <= 0xDFFF else ch for ch in text)


def readable_data(value: Any) -> Any:
    """JSON-ready data with every string (keys too) made :func:`readable`."""
    if isinstance(value, str):
        return readable(value)
    if isinstance(value, dict):
        return {readable_data(key): readable_data(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [readable_data(item) for item in value]
    return value


def one_line(text: str) -> str:
    """``text`` made safe for a single output line: whitespace controls become
    spaces, a byte of a file name that is not UTF-8 ``\\xNN`` (:func:`readable`) and
    other control characters ``?`` (file text is untrusted and must not smuggle terminal
    escape sequences or break line-oriented tools)."""
    out = []
    for ch in text:
        if ch in "\t\n\r\v\f":
            out.append(" ")
        elif 0xD800 <= ord(ch) <= 0xDFFF:
            out.append(_surrogate_text(ch))
        elif unicodedata.category(ch) == "Cc" or ch in "\u2028\u2029\x85":
            out.append("?")
        else:
            out.append(ch)
    return "".join(out)


def findings_in_order(report: Report) -> Iterator[tuple[FileReport, list[Finding]]]:
    """Each file with its findings sorted, in report order."""
    for file_report in report.files:
        yield file_report, file_report.sorted_findings()


def baseline_of(finding: Finding, report: Report) -> str | None:
    """The finding's baseline state under ``--since`` (``None`` otherwise).

    Under ``--since`` every finding must have been classified; an unclassified one
    is a bug in the caller, reported here rather than guessed.
    """
    if report.since is None:
        return None
    if finding.baseline not in BASELINE_STATES:
        raise ValueError(
            f"finding {finding.rule!r} has baseline {finding.baseline!r} under --since "
            f"(expected one of {', '.join(BASELINE_STATES)})"
        )
    return finding.baseline


def baseline_counts(report: Report) -> dict[str, int]:
    """How many findings are introduced, known and fixed (waived ones included)."""
    counts = {state: 0 for state in BASELINE_STATES}
    for file_report in report.files:
        for finding in file_report.findings:
            state = baseline_of(finding, report)
            if state is not None:
                counts[state] += 1
    return counts


def adjustment_text(adjustment: Adjustment) -> str:
    """One active only/skip/severity setting in words, e.g.
    'rule unused-name skipped by plantlint.toml: spare parameters kept for the next revision'."""
    text = f"{adjustment.describe()} by {one_line(adjustment.source)}"
    return text + (f": {one_line(adjustment.reason)}" if adjustment.reason else "")


def change_text(change: dict[str, object]) -> str:
    """One structural change under --since, e.g. 'point rest: zero dynamics: minimum phase -> critical';
    a waiver added, removed or re-worded since the baseline (``what`` = 'waiver RULE [at POINT]',
    the reasons before and after) reads 'waiver added: RULE at POINT: "REASON"'."""
    what = one_line(str(change.get("what", "")))
    # a point's zero dynamics that were not computed (not an equilibrium, degree not defined)
    missing = "not computed" if what.endswith("zero dynamics") else "none"

    def shown(value: object) -> str:
        return missing if value is None else str(value).lower() if isinstance(value, bool) else str(value)

    before, after = change.get("before"), change.get("after")
    if change.get("added"):
        return f"{what}: {shown(after)} (added since the baseline)"
    if change.get("removed"):
        return f"{what}: was {shown(before)} (removed since the baseline)"
    if what.startswith("waiver ") and (isinstance(before, str) or isinstance(after, str)):
        subject = what.removeprefix("waiver ")
        if before is None:
            return f'waiver added: {subject}: "{one_line(str(after))}"'
        if after is None:
            return f'waiver removed: {subject} (was: "{one_line(str(before))}")'
        return f'waiver reason changed: {subject}: "{one_line(str(before))}" -> "{one_line(str(after))}"'
    return f"{what}: {shown(before)} -> {shown(after)}"


# -- not decided ---------------------------------------------------------------------

def claims_not_decided(report: Report) -> int:
    """Claims (``expect`` lines) not decided, unwaived, not fixed."""
    return sum(1 for fr in report.files for f in fr.findings
               if f.undecided and f.rule == "expectation-failed" and not f.waived and f.baseline != "fixed")


def undecided_phrase(report: Report) -> str | None:
    """What was not decided, in words ('1 model could not be checked (1 cut short by its
    budget), 2 claims not decided'); None when everything was decided."""
    counts = report.counts()
    models, cut, claims = counts["not_checked"], counts["cut_short"], claims_not_decided(report)
    parts = []
    if models:
        parts.append(f"{models} model{'' if models == 1 else 's'} could not be checked"
                     + (f" ({cut} cut short; budget {report.budget})" if cut and report.budget else
                        f" ({cut} cut short by the budget)" if cut else ""))
    if claims:
        parts.append(f"{claims} claim{'' if claims == 1 else 's'} not decided")
    return ", ".join(parts) or None


def relaxation_text(report: Report) -> str | None:
    """The active choice to let not-decided results pass, with its reason and source."""
    r = report.relaxation
    if r is None:
        return None
    return (f"not-decided results do not fail this run ([undecided] fail = false in {one_line(r.source)}): "
            f"{one_line(r.reason)}")
