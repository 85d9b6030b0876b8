"""The human-readable report: one block per finding, source excerpt underlined.

Layout (plantlint's own): a heading per file, then for each finding a line with
severity and rule id, the message indented beneath it, the source line quoted as
``line N: ...`` with the span underlined by dashes, and the hint. Waived and
fixed findings are shown dimmed. A summary and a one-line verdict close the run.
All file text goes through :func:`one_line` and is held as styled pieces of text
(:class:`Styled`), never markup, so a model can never inject markup or terminal escape
sequences. In colour, rich draws the pieces; without colour (a pipe, a CI log, a
pre-commit hook) they are written as they are and rich is not imported at all (it costs
about 0.05 s of a run's start-up): the same characters either way.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from typing import TYPE_CHECKING, Protocol, TextIO

from plantlint.report.look import SEVERITY_STYLE
from plantlint.core.findings import FileReport, Finding, Report, Span
from plantlint.report.formats.base import (
    adjustment_text,
    baseline_counts,
    baseline_of,
    change_text,
    findings_in_order,
    one_line,
    relaxation_text,
    undecided_phrase,
)

DEFAULT_WIDTH = 100
TAB_WIDTH = 4
INDENT = 11  # where messages, excerpts and hints start
MAX_EXCERPT = 120  # cells of source shown; longer lines are cut around the span
UNDERLINE = "-"
_DIM = "dim"


if TYPE_CHECKING:
    from rich.console import Console
    from rich.text import Text


class Styled:
    """One line of output as pieces of text, each with a rich style name ("bold red",
    "" for none). The first piece's style is the line's own, under every later piece, as
    in a rich ``Text`` built with a style and then appended to."""

    __slots__ = ("pieces",)

    def __init__(self, text: str = "", style: str = ""):
        self.pieces: list[tuple[str, str]] = [(text, style)]

    def append(self, text: str, style: str = "") -> "Styled":
        self.pieces.append((text, style))
        return self

    def __add__(self, other: "Styled") -> "Styled":
        out = Styled()
        out.pieces = [*self.pieces, *other.pieces]
        return out

    @property
    def plain(self) -> str:
        return "".join(text for text, _ in self.pieces)

    @property
    def style(self) -> str:
        return self.pieces[0][1]

    def rich(self) -> "Text":
        """The line as a rich ``Text`` (imports rich)."""
        from rich.text import Text

        (text, style), *rest = self.pieces
        out = Text(text, style=style)
        for piece, piece_style in rest:
            out.append(piece, style=piece_style)
        return out


class Writer(Protocol):
    """Where the report's lines go: ``width`` for wrapping, ``line`` for one line (or an empty one)."""

    width: int

    def line(self, text: Styled | None = None) -> None: ...


class PlainWriter:
    """Lines as plain text: no escape codes at all."""

    def __init__(self, stream: TextIO, width: int):
        self.stream = stream
        self.width = width

    def line(self, text: Styled | None = None) -> None:
        self.stream.write((text.plain if text is not None else "") + "\n")


class ColourWriter:
    """Lines drawn by rich, in colour."""

    def __init__(self, console: "Console"):
        self.console = console
        self.width = console.width

    def line(self, text: Styled | None = None) -> None:
        if text is None:
            self.console.print()
        else:
            self.console.print(text.rich(), soft_wrap=True)


def report_width() -> int:
    """The width to wrap at: ``COLUMNS`` when it says at least 40, else DEFAULT_WIDTH."""
    try:
        width = int(os.environ.get("COLUMNS", ""))
    except ValueError:
        width = DEFAULT_WIDTH
    return width if width >= 40 else DEFAULT_WIDTH


def make_writer(stream: TextIO, color: bool) -> Writer:
    """Plain text (rich is not imported) unless ``color``."""
    return make_console(stream) if color else PlainWriter(stream, report_width())


def make_console(stream: TextIO) -> ColourWriter:
    """A writer that draws in colour with rich."""
    from rich.console import Console

    return ColourWriter(Console(
        file=stream,
        force_terminal=True,
        no_color=False,
        color_system="auto",
        width=report_width(),
        highlight=False,
        markup=False,
        emoji=False,
        soft_wrap=False,
        legacy_windows=False,
    ))


def cell_len(text: str) -> int:
    """Terminal cells of ``text``: its length when it is printable ASCII, else rich's count
    (double-width characters take two cells)."""
    if text.isascii() and text.isprintable():
        return len(text)
    from rich.cells import cell_len as cells

    return cells(text)


@dataclass(frozen=True)
class Excerpt:
    """One source line as displayed, with the underline's start and width in cells."""

    line_number: int
    shown: str
    start: int
    width: int
    continues_to: int | None  # last line of a multi-line span


def _cells(line: str) -> list[str]:
    """Display pieces for each character: tabs expanded, controls made visible."""
    pieces: list[str] = []
    used = 0
    for ch in line:
        piece = " " * (TAB_WIDTH - used % TAB_WIDTH) if ch == "\t" else one_line(ch)
        pieces.append(piece)
        used += cell_len(piece)
    return pieces


def excerpt(source: str | None, span: Span | None) -> Excerpt | None:
    """The line a span starts on, with the underline placed under the exact columns.

    Columns count characters (a tab is one column) and ``end_column`` is exclusive.
    A span running over several lines is underlined to the end of its first line.
    """
    if source is None or span is None or span.line < 1 or span.column < 1:
        return None
    lines = source.split("\n")
    if span.line > len(lines):
        return None
    pieces = _cells(lines[span.line - 1].rstrip("\r"))
    first = min(span.column - 1, len(pieces))
    if span.end_line > span.line:
        last = len(pieces)
    else:
        last = min(max(span.end_column - 1, first + 1), len(pieces))
    start = cell_len("".join(pieces[:first]))
    width = max(cell_len("".join(pieces[first:last])), 1)
    shown = "".join(pieces).rstrip()
    continues_to = span.end_line if span.end_line > span.line else None
    if cell_len(shown) > MAX_EXCERPT:
        shown, start = _cut(pieces, first, start)
        width = min(width, MAX_EXCERPT - start)
    return Excerpt(span.line, shown, start, max(width, 1), continues_to)


def _cut(pieces: list[str], first: int, start: int) -> tuple[str, int]:
    """A window of the line around the span start, marked with ``...`` where cut."""
    skip = 0
    dropped = 0
    while skip < first and start - dropped > MAX_EXCERPT // 3:
        dropped += cell_len(pieces[skip])
        skip += 1
    prefix = "..." if skip else ""
    kept: list[str] = []
    used = len(prefix)
    for piece in pieces[skip:]:
        if used + cell_len(piece) > MAX_EXCERPT - 3:
            kept.append("...")
            break
        kept.append(piece)
        used += cell_len(piece)
    return prefix + "".join(kept), start - dropped + len(prefix)


def _indented(console: Writer, text: Styled) -> None:
    """Print ``text`` wrapped to the console width, every line indented (no
    trailing padding, so plain output stays clean)."""
    _indented_by(console, INDENT, text, margin=0)


#: Stands for the spaces around "=" while a message is wrapped: "th = 0" stays on one line.
_GLUE = "\u00a0"


#: A Lie derivative or bracket operator and its operand stay on one line ("ad_f g3", "L_g L_f^2 y").
_OPERATOR = re.compile(r"\b(ad_f(?:\^\d+)?|L_g(?:\[\w+\])?|L_f(?:\^\d+)?) ")


def _wrap_lines(text: str, width: int) -> list[str]:
    """``text`` cut into lines of at most ``width`` characters at spaces, never inside an
    assignment ``name = value`` (a witness point reads badly as "th" / "= 0") nor between a
    Lie operator and its operand ("ad_f" / "g3")."""
    import textwrap

    glued = _OPERATOR.sub(lambda m: m.group(1) + _GLUE, text.replace(" = ", f"{_GLUE}={_GLUE}"))
    lines = textwrap.wrap(glued, width, break_on_hyphens=False) or [""]
    return [line.replace(_GLUE, " ") for line in lines]


def _counts_phrase(counts: dict[str, int]) -> str:
    parts = [
        f"{counts[key]} {label if counts[key] == 1 else label + 's'}"
        for key, label in (("errors", "error"), ("warnings", "warning"), ("notes", "note"))
    ]
    return ", ".join(parts) + f", {counts['waived']} waived" + (
        f", {counts['not_decided']} not decided" if counts.get("not_decided") else "")


def _file_counts(file_report: FileReport, report: Report) -> dict[str, int]:
    single = Report(files=[file_report], tool_version=report.tool_version, fail_on=report.fail_on, since=report.since,
                    relaxation=report.relaxation, budget=report.budget)
    return single.counts()


class TextFormatter:
    name = "text"
    description = "readable report with source excerpts and a summary (default)"

    def render(self, report: Report, stream: TextIO, *, color: bool = False) -> None:
        console = make_writer(stream, color)
        for file_report, findings in findings_in_order(report):
            self._file(console, file_report, findings, report)
        self._summary(console, report)

    def _file(self, console: Writer, file_report: FileReport, findings: list[Finding], report: Report) -> None:
        heading = Styled(one_line(file_report.path), style="bold underline")
        if file_report.plant:
            heading.append(f"  plant {one_line(file_report.plant)}", style="bold")
        current = [f for f in findings if baseline_of(f, report) != "fixed"]
        fixed = [f for f in findings if baseline_of(f, report) == "fixed"]
        changes = list(file_report.structure_changes)
        if file_report.stop is not None:
            heading.append(f"  could not be checked: the analysis {one_line(file_report.stop.detail)}",
                           style="bold yellow")
        if not current and not fixed and not changes:
            heading.append("  no findings", style="green")
            console.line(heading)
            console.line()
            return
        console.line(heading)
        for finding in current:
            self._finding(console, file_report, finding, report)
            console.line()
        for finding in fixed:
            line = Styled(f"  {'fixed':<{INDENT - 2}}", style="green")
            line.append(f"{finding.rule}: {one_line(finding.message)}", style=_DIM)
            console.line(line)
        for change in changes:
            line = Styled(f"  {'changed':<{INDENT - 2}}", style="yellow")
            line.append(f"{change_text(change)}  (since {report.since})")
            console.line(line)
        console.line(Styled(f"  {_counts_phrase(_file_counts(file_report, report))}", style=_DIM))
        if file_report.analysis is None and file_report.stop is None and any(
                f.severity.value == "error" and not f.waived for f in current):
            console.line(Styled("  the structure was not analysed: fix the errors above first", style=_DIM))
        console.line()

    def _finding(self, console: Writer, file_report: FileReport, finding: Finding, report: Report) -> None:
        dim = _DIM if finding.waived else ""
        head = Styled("  ")
        head.append(f"{finding.severity.value:<{INDENT - 2}}", style=SEVERITY_STYLE[finding.severity] + (" dim" if dim else ""))
        head.append(finding.rule, style="bold " + dim if dim else "bold")
        if finding.point:
            head.append(f"  at point {one_line(finding.point)}", style=dim)
        baseline = baseline_of(finding, report)
        if baseline is not None:
            head.append(f"  ({baseline})", style="italic " + dim if dim else "italic")  # the same word in every format
        if finding.waived:
            head.append("  waived", style="magenta")
        if finding.undecided:
            head.append("  not decided" + (", allowed by the configuration" if report.relaxation else ""),
                        style="yellow")
        console.line(head)
        _indented(console, Styled(one_line(finding.message), style=dim))
        shown = excerpt(file_report.source, finding.span)
        if shown is not None:
            self._excerpt(console, shown, dim)
        elif finding.span is not None:
            console.line(Styled(" " * INDENT + f"line {finding.span.line}, column {finding.span.column}", style=_DIM))
        if finding.hint:
            _indented(console, Styled("hint: " + one_line(finding.hint), style="cyan " + dim if dim else "cyan"))
        if finding.waived:
            reason = one_line(finding.reason) if finding.reason else "no reason given"
            _indented(console, Styled(f"reason: {reason}", style="magenta dim"))

    def _excerpt(self, console: Writer, shown: Excerpt, dim: str) -> None:
        label = f"line {shown.line_number}: "
        pad = " " * INDENT
        console.line(Styled(pad + label, style=_DIM) + Styled(shown.shown, style=dim))
        marks = Styled(pad + " " * (len(label) + shown.start))
        marks.append(UNDERLINE * shown.width, style="bold red " + dim if dim else "bold red")
        if shown.continues_to is not None:
            marks.append(f" ... continues to line {shown.continues_to}", style=_DIM)
        console.line(marks)

    def _summary(self, console: Writer, report: Report) -> None:
        counts = report.counts()
        files = f"{counts['files']} file" + ("" if counts["files"] == 1 else "s")
        gone = sum(f.deleted for f in report.files)
        deleted = f" ({gone} deleted since {one_line(report.since or '')}, not counted)" if gone else ""
        console.line(Styled(f"checked {files}{deleted}: {_counts_phrase(counts)}", style="bold"))
        if report.since is not None:
            moved = baseline_counts(report)
            console.line(
                Styled(
                    f"since {one_line(report.since)}: {moved['introduced']} introduced, "
                    f"{moved['known']} known, {moved['fixed']} fixed"
                )
            )
        # what was not decided is said once, by the closing verdict
        relaxed = relaxation_text(report)
        if relaxed:
            console.line(Styled(relaxed, style="magenta"))
        console.line(Styled(f"configuration: {one_line(report.configuration)}" if report.configuration
                           else "configuration: none found (the defaults)", style=_DIM))
        if report.adjustments:
            console.line(Styled("settings that change what is reported:", style="bold"))
            for adjustment in report.adjustments:
                _indented_by(console, 2, Styled(adjustment_text(adjustment)))
        console.line(verdict(report))


def _indented_by(console: Writer, indent: int, text: Styled, margin: int = 2) -> None:
    """``text`` (one style) wrapped by :func:`_wrap_lines`, every line indented."""
    for line in _wrap_lines(text.plain, max(console.width - indent - margin, 20)):
        console.line(Styled(" " * indent) + Styled(line, style=text.style))


def verdict(report: Report) -> Styled:
    """The closing line: does the run fail at its fail level, and why."""
    failing = len(report.failing())
    level = report.fail_on.value
    scope = f" introduced since {one_line(report.since)}" if report.since is not None else ""
    undecided = undecided_phrase(report)
    if failing:
        noun = "finding" if failing == 1 else "findings"
        text = Styled("FAILED", style="bold red")
        text.append(f": {failing} unwaived {noun} at or above {level}{scope}")
        if undecided:
            text.append(f"; also not decided: {undecided}")
    elif undecided and report.relaxation is None:
        text = Styled("NOT DECIDED", style="bold yellow")
        text.append(f": {undecided}; the run fails (no defect found, but not everything could be checked)")
    elif not any(not f.deleted for f in report.files):  # every path given was excluded (a hook on an archive)
        text = Styled("PASSED", style="bold green")
        text.append(": no model to check (the files given are left out by the configuration)")
    else:
        text = Styled("PASSED", style="bold green")
        text.append(f": no unwaived finding at or above {level}{scope}")
        if undecided:
            text.append(f"; not decided but allowed by the configuration: {undecided}")
    return text


__all__ = ["Excerpt", "PlainWriter", "Styled", "TextFormatter", "excerpt", "make_console", "make_writer", "verdict"]
