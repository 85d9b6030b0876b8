"""``plantlint rules [ID]``: the rule catalogue for a terminal (rich), and the order of a
rule's page, which the SARIF help text follows too."""

from __future__ import annotations

import textwrap
from typing import Any

from rich.console import Console, Group
from rich.table import Table
from rich.text import Text

from plantlint.core.catalogue import Catalogue, Rule
from plantlint.core.findings import Severity
from plantlint.report.look import PAGE_SECTIONS, SEVERITY_STYLE


def render_rules(catalogue: Catalogue, rule_id: str | None, console: Console) -> None:
    """``plantlint rules [ID]``: a table of all rules, or one rule in full.

    Raises :class:`UnknownRuleError` for an unknown ``rule_id`` (the CLI exits 2).
    """
    if rule_id is None:
        console.print(_rules_table(catalogue))
    else:
        console.print(_rule_page(catalogue.get(rule_id)))


def _severity_text(severity: Severity) -> Text:
    return Text(severity.value, style=SEVERITY_STYLE[severity])


def _rules_table(catalogue: Catalogue) -> Table:
    table = Table(title=f"plantlint rules ({len(catalogue)})", title_justify="left", expand=False)
    table.add_column("id", no_wrap=True)
    table.add_column("severity", no_wrap=True)
    table.add_column("family", no_wrap=True)
    table.add_column("title")
    for rule in catalogue:
        table.add_row(Text(rule.id, style="bold"), _severity_text(rule.severity), Text(rule.family), Text(rule.title))
    table.caption = Text("plantlint rules ID shows one rule in full")
    return table


#: Section headings of one rule's page, in the order they are shown.


def _rule_page(rule: Rule) -> Group:
    """One rule for a control engineer: what the check protects in a design first, then
    the condition it reports, then two model excerpts (one failing, one passing), then
    where the theory comes from."""
    protects, fires, fails, passes, sources = PAGE_SECTIONS

    def heading(text: str) -> Text:
        return Text(text, style="bold underline")

    def model(text: str) -> Text:
        lines = text.rstrip("\n").split("\n")
        width = len(str(len(lines)))
        return Text("\n".join(f"    {n:>{width}} | {line}" for n, line in enumerate(lines, start=1)))

    def prose(text: str) -> Text:
        return Text("\n".join(textwrap.wrap(text, 84, initial_indent="    ", subsequent_indent="    ")))

    parts: list[Any] = [
        Text.assemble((rule.id, "bold"), f"  {rule.family} check, reported as ", _severity_text(rule.severity),
                      " by default" + ("" if rule.waivable else "; cannot be waived")),
        Text(""),
        heading(protects),
        prose(rule.rationale),
        Text(""),
        heading(fires),
        prose(rule.title + "."),
        Text(""),
        heading(fails),
        model(rule.bad),
        Text(""),
        heading(passes),
        model(rule.good),
        Text(""),
        heading(sources),
    ]
    parts.extend(prose(f"[{n}] {ref}") for n, ref in enumerate(rule.references, start=1))
    return Group(*parts)
