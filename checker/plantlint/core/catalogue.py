"""The rule catalogue: every rule id with its default severity and documentation.

Rules are data (``rules/<family>.toml``), so that waivers, ``--only``, the SARIF
rule table and ``plantlint rules`` all read one source, and a test can insist
that every rule is documented. Loading is strict: a typo in a key or a severity
is a packaging bug and must fail loudly, not silently drop a rule.
"""

from __future__ import annotations

import difflib
import sys
from collections.abc import Iterator
from dataclasses import dataclass
from functools import cache
from pathlib import Path
from typing import Any

from plantlint.core.findings import Finding, Severity, Span
from plantlint.core.resources import data_path

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised only on Python 3.10
    import tomli as tomllib

#: Families in presentation order; each lives in ``rules/<family with _>.toml``.
FAMILIES: tuple[str, ...] = ("model", "units", "structure", "zero-dynamics", "linearization", "run")

_REQUIRED_KEYS = ("id", "family", "severity", "title", "rationale", "bad", "good", "references")
_STRING_KEYS = ("id", "family", "title", "rationale", "bad", "good")
#: Optional keys: ``waivable = false`` for findings a ``waive`` line may not silence
#: (the file could not be read as a model, so nothing about it was checked).
_OPTIONAL_KEYS = ("waivable",)


class CatalogueError(ValueError):
    """The rule files are malformed (a packaging bug, never a user error)."""


class UnknownRuleError(KeyError):
    """A rule id that the catalogue does not know; ``str()`` is a readable message."""

    def __init__(self, rule_id: str, suggestions: list[str]) -> None:
        super().__init__(rule_id)
        self.rule_id = rule_id
        self.suggestions = suggestions

    def __str__(self) -> str:
        hint = f" (did you mean {', '.join(self.suggestions)}?)" if self.suggestions else ""
        return f"unknown rule id {self.rule_id!r}{hint}"


@dataclass(frozen=True)
class Rule:
    """One documented rule. ``bad`` and ``good`` are complete little ``.plant`` files."""

    id: str
    family: str
    severity: Severity
    title: str
    rationale: str
    bad: str
    good: str
    references: tuple[str, ...]
    waivable: bool = True

    def to_data(self) -> dict[str, Any]:
        """The rule as plain JSON data (``plantlint rules --format json``)."""
        return {
            "id": self.id,
            "family": self.family,
            "severity": self.severity.value,
            "title": self.title,
            "rationale": self.rationale,
            "bad": self.bad,
            "good": self.good,
            "references": list(self.references),
            "waivable": self.waivable,
        }


class Catalogue:
    """All rules, in family order then file order; looked up by id."""

    def __init__(self, rules: list[Rule]) -> None:
        self._rules = tuple(rules)
        self._by_id: dict[str, Rule] = {}
        self._position: dict[str, int] = {}
        for position, rule in enumerate(self._rules):
            if rule.id in self._by_id:
                raise CatalogueError(f"rule id {rule.id!r} is defined twice")
            self._by_id[rule.id] = rule
            self._position[rule.id] = position

    def get(self, rule_id: str) -> Rule:
        """The rule ``rule_id``; raises :class:`UnknownRuleError` (a ``KeyError``)."""
        try:
            return self._by_id[rule_id]
        except KeyError:
            close = difflib.get_close_matches(rule_id, list(self._by_id), n=3, cutoff=0.6)
            raise UnknownRuleError(rule_id, close) from None

    def ids(self) -> tuple[str, ...]:
        return tuple(rule.id for rule in self._rules)

    def index(self, rule_id: str) -> int:
        """Position of ``rule_id`` in the stable order (SARIF's ``ruleIndex``)."""
        return self._position[self.get(rule_id).id]

    def __contains__(self, rule_id: object) -> bool:
        return rule_id in self._by_id

    def __iter__(self) -> Iterator[Rule]:
        return iter(self._rules)

    def __len__(self) -> int:
        return len(self._rules)


def family_file(family: str) -> str:
    """File name holding ``family`` (``zero-dynamics`` -> ``zero_dynamics.toml``)."""
    return family.replace("-", "_") + ".toml"


def _rule_from_table(table: dict[str, Any], where: str, family: str) -> Rule:
    label = f"{where}: rule {table.get('id', '?')!r}"
    unknown = sorted(set(table) - set(_REQUIRED_KEYS) - set(_OPTIONAL_KEYS))
    if unknown:
        raise CatalogueError(f"{label}: unknown key(s) {', '.join(unknown)}")
    missing = [key for key in _REQUIRED_KEYS if key not in table]
    if missing:
        raise CatalogueError(f"{label}: missing key(s) {', '.join(missing)}")
    for key in _STRING_KEYS:
        if not isinstance(table[key], str) or not table[key].strip():
            raise CatalogueError(f"{label}: {key} must be a non-empty string")
    if "\n" in table["title"].strip():
        raise CatalogueError(f"{label}: title must be one line")
    if table["family"] != family:
        raise CatalogueError(f"{label}: family {table['family']!r} does not match the file ({family!r})")
    if table["severity"] not in {level.value for level in Severity}:
        raise CatalogueError(f"{label}: severity must be error, warning or note")
    severity = Severity(table["severity"])
    refs = table["references"]
    if not isinstance(refs, list) or not refs or not all(isinstance(r, str) and r.strip() for r in refs):
        raise CatalogueError(f"{label}: references must be a non-empty list of strings")
    waivable = table.get("waivable", True)
    if not isinstance(waivable, bool):
        raise CatalogueError(f"{label}: waivable must be true or false")
    return Rule(
        id=table["id"],
        family=family,
        severity=severity,
        title=table["title"].strip(),
        rationale=" ".join(table["rationale"].split()),
        bad=table["bad"].strip("\n") + "\n",
        good=table["good"].strip("\n") + "\n",
        references=tuple(r.strip() for r in refs),
        waivable=waivable,
    )


def read_catalogue(folder: Path) -> Catalogue:
    """Read and validate every family file in ``folder`` (uncached; tests use this)."""
    expected = {family_file(family): family for family in FAMILIES}
    strays = sorted(p.name for p in folder.glob("*.toml") if p.name not in expected)
    if strays:
        raise CatalogueError(f"{folder}: unexpected rule file(s) {', '.join(strays)}")
    rules: list[Rule] = []
    for name, family in expected.items():
        path = folder / name
        if not path.is_file():
            raise CatalogueError(f"{path}: rule file is missing")
        try:
            data = tomllib.loads(path.read_text(encoding="utf-8"))
        except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
            raise CatalogueError(f"{path}: {exc}") from None
        extra = sorted(set(data) - {"rule"})
        if extra:
            raise CatalogueError(f"{path}: unknown top-level key(s) {', '.join(extra)}")
        tables = data.get("rule", [])
        if not isinstance(tables, list):
            raise CatalogueError(f"{path}: rules must be written as [[rule]] tables")
        rules.extend(_rule_from_table(table, str(path), family) for table in tables)
    return Catalogue(rules)


@cache
def _load(folder: Path) -> Catalogue:
    return read_catalogue(folder)


#: Rules of the problems found before any value is built (syntax and names): a model with
#: one of them is not read as a model (:mod:`plantlint.language.names` reports them alone).
STOPPING_RULES = frozenset({"syntax", "unknown-name", "duplicate-name", "missing-rate", "orphan-rate"})


def load_catalogue(folder: Path | None = None) -> Catalogue:
    """The catalogue shipped with plantlint (cached), or one read from ``folder``."""
    return _load(folder) if folder is not None else _shipped()


@cache
def _shipped() -> Catalogue:
    """The shipped catalogue, found once (every finding asks for it)."""
    return _load(data_path("rules"))


def finding(rule: str, message: str, span: Span | None = None, *, point: str | None = None,
            hint: str | None = None, anchor: str = "", undecided: bool = False) -> Finding:
    """A finding of catalogue rule ``rule``, at the severity ``rules/*.toml`` gives it.

    Every emission site uses this (a static test forbids ``Finding(`` below ``run/``
    with a severity): how serious a rule is comes from the catalogue, and a configured
    override is applied later by the policy (``run/policy.py``). An id the catalogue
    does not know raises ``UnknownRuleError``: a packaging bug, never a user error.
    """
    return Finding(rule, load_catalogue().get(rule).severity, message, span, point=point, hint=hint,
                   anchor=anchor, undecided=undecided)
