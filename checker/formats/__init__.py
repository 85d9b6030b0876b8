"""Output formats, picked by name (``--format``) from one registry."""

from __future__ import annotations

from .base import Formatter
from .concise import ConciseFormatter
from .json_report import JsonFormatter
from .sarif import SarifFormatter
from .text import TextFormatter

FORMATS: dict[str, Formatter] = {
    formatter.name: formatter
    for formatter in (TextFormatter(), ConciseFormatter(), JsonFormatter(), SarifFormatter())
}


def get_formatter(name: str) -> Formatter:
    """The formatter called ``name``; ``ValueError`` names the known ones."""
    try:
        return FORMATS[name]
    except KeyError:
        raise ValueError(f"unknown format {name!r} (use {', '.join(FORMATS)})") from None


__all__ = ["FORMATS", "Formatter", "get_formatter"]
