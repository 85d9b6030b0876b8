"""How findings and rule pages look, shared by the terminal views and the other formats
without loading rich: the style of each severity, and the sections of a rule's page (the
SARIF help text follows the same order)."""

from __future__ import annotations

from plantlint.core.findings import Severity

SEVERITY_STYLE: dict[Severity, str] = {
    Severity.ERROR: "bold red",
    Severity.WARNING: "bold yellow",
    Severity.NOTE: "bold cyan",
}

PAGE_SECTIONS: tuple[str, ...] = ("What it protects", "When it fires", "A model that fails it",
                                  "A model that passes it", "Sources")
