"""Output formats, picked by name (``--format``) from one registry.

A format's module is imported when the format is first asked for, so a run that writes
JSON or SARIF never loads the terminal library."""

from __future__ import annotations

import importlib
from collections.abc import Iterator, Mapping

from plantlint.report.formats.base import Formatter

#: name -> (module, class), in the order of ``--format``'s choices
_WHERE: dict[str, tuple[str, str]] = {
    "text": ("plantlint.report.formats.text", "TextFormatter"),
    "lines": ("plantlint.report.formats.lines", "LinesFormatter"),
    "json": ("plantlint.report.formats.json_report", "JsonFormatter"),
    "sarif": ("plantlint.report.formats.sarif", "SarifFormatter"),
    "markdown": ("plantlint.report.formats.markdown", "MarkdownFormatter"),
}


class _Formats(Mapping[str, Formatter]):
    """The registry: one formatter per name, made on first use."""

    def __init__(self) -> None:
        self._made: dict[str, Formatter] = {}

    def __getitem__(self, name: str) -> Formatter:
        if name not in self._made:
            module, cls = _WHERE[name]
            self._made[name] = getattr(importlib.import_module(module), cls)()
        return self._made[name]

    def __iter__(self) -> Iterator[str]:
        return iter(_WHERE)

    def __len__(self) -> int:
        return len(_WHERE)


FORMATS: Mapping[str, Formatter] = _Formats()


def get_formatter(name: str) -> Formatter:
    """The formatter called ``name``; ``ValueError`` names the known ones."""
    try:
        return FORMATS[name]
    except KeyError:
        raise ValueError(f"unknown format {name!r} (use {', '.join(FORMATS)})") from None


__all__ = ["FORMATS", "Formatter", "get_formatter"]
