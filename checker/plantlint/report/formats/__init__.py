"""Output formats, picked by name (``--format``) from one registry."""

from __future__ import annotations

from plantlint.report.formats.base import Formatter
from plantlint.report.formats.lines import LinesFormatter
from plantlint.report.formats.markdown import MarkdownFormatter
from plantlint.report.formats.json_report import JsonFormatter
from plantlint.report.formats.sarif import SarifFormatter
from plantlint.report.formats.text import TextFormatter

FORMATS: dict[str, Formatter] = {
    formatter.name: formatter
    for formatter in (TextFormatter(), LinesFormatter(), JsonFormatter(), SarifFormatter(), MarkdownFormatter())
}


def get_formatter(name: str) -> Formatter:
    """The formatter called ``name``; ``ValueError`` names the known ones."""
    try:
        return FORMATS[name]
    except KeyError:
        raise ValueError(f"unknown format {name!r} (use {', '.join(FORMATS)})") from None


__all__ = ["FORMATS", "Formatter", "get_formatter"]
