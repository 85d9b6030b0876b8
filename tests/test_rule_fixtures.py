"""Every rule has a file that triggers it and a clean counterpart.

Fixtures mark what they expect beside the offending line (mypy's habit):

    rate w = u w        #= syntax:24          a finding of `syntax` at this line, column 24
    #=L2 syntax:7                             ...at line 2 (for lines that cannot carry a comment)
    #= ignore: not-involutive                 other rules this fixture does not care about
    #= timeout: 0.001                         per-model time budget for this file

Each triggering file must produce exactly its marked findings (rule, line,
column), each as often as it is marked (a mark written twice expects two
findings: one cause, one finding), nothing else apart from ignored rules; each
``*.ok.plant`` counterpart must produce none of the rules its triggering sibling
is about.
"""

from __future__ import annotations

import re
from dataclasses import replace
from pathlib import Path

import pytest

from plantlint.core.catalogue import load_catalogue
from plantlint.run.config import Config
from plantlint.run.runner import Target, check_targets
from conftest import FIXTURES as FIXTURE_ROOT

FIXTURES = FIXTURE_ROOT / "rules"
MARK = re.compile(r"#=(?:L(\d+))?\s+(.*)$")


Mark = tuple[str, int, int]


def _marks(path: Path) -> tuple[list[Mark], set[str], float | None]:
    expected: list[Mark] = []
    ignored: set[str] = set()
    timeout = None
    for number, line in enumerate(path.read_text(encoding="utf-8").splitlines(), start=1):
        m = MARK.search(line)
        if not m:
            continue
        at = int(m.group(1)) if m.group(1) else number
        body = m.group(2).strip()
        if body.startswith("ignore:"):
            ignored.update(body.removeprefix("ignore:").split())
        elif body.startswith("timeout:"):
            timeout = float(body.removeprefix("timeout:"))
        else:
            for item in body.split():
                rule, col = item.split(":")
                expected.append((rule, at, int(col)))
    return sorted(expected), ignored, timeout


def _findings(path: Path, timeout: float | None = None) -> list[Mark]:
    """Every finding as (rule, line, column), sorted, duplicates kept."""
    config = Config(root=FIXTURES, envelope_seconds=3.0)
    if timeout is not None:
        config = replace(config, timeout=timeout)
    defaults = {r.id: r.severity for r in load_catalogue()}
    (report,) = check_targets([Target(path, path.name)], config, defaults, jobs=1, use_cache=False,
                              cache_dir=None, show_progress=False)
    return sorted((f.rule, f.span.line if f.span else 0, f.span.column if f.span else 0) for f in report.findings)


TRIGGERS = sorted(p for p in FIXTURES.glob("*.plant") if not p.name.endswith(".ok.plant"))
CLEAN = sorted(FIXTURES.glob("*.ok.plant"))


@pytest.mark.parametrize("path", TRIGGERS, ids=lambda p: p.stem)
def test_trigger_gives_exactly_its_marked_findings(path: Path) -> None:
    expected, ignored, timeout = _marks(path)
    assert expected, f"{path.name} marks no expected finding"
    got = [f for f in _findings(path, timeout) if f[0] not in ignored]
    assert got == expected


@pytest.mark.parametrize("path", CLEAN, ids=lambda p: p.stem)
def test_clean_counterpart_is_clean_of_its_rule(path: Path) -> None:
    rule = path.name.removesuffix(".ok.plant")
    trigger = FIXTURES / f"{rule}.plant"
    assert trigger.exists(), f"{path.name} has no triggering sibling"
    about = {r for r, _, _ in _marks(trigger)[0]}
    expected, ignored, _ = _marks(path)
    got = [f for f in _findings(path) if f[0] not in ignored]
    assert not [f for f in got if f[0] in about], f"{path.name} still triggers {about}"
    assert got == expected


#: Rules no honest fixture can trigger, with why, and the test that covers them instead.
EXEMPT: dict[str, str] = {
    "internal-inconsistency": "fires only when two independent computations in the checker disagree, which a "
                              "correct checker never lets a model cause; tests/analysis/test_linearisation.py triggers it by "
                              "replacing one computation (monkeypatch)",
}


def test_every_catalogue_rule_is_triggered_by_a_fixture() -> None:
    triggered = set(EXEMPT)
    for path in TRIGGERS:
        triggered |= {rule for rule, _, _ in _marks(path)[0]}
    missing = sorted(set(load_catalogue().ids()) - triggered)
    assert not missing, f"rules without a triggering fixture: {missing}"


def test_every_triggered_rule_is_in_the_catalogue() -> None:
    ids = set(load_catalogue().ids())
    for path in TRIGGERS + CLEAN:
        for rule, _, _ in _marks(path)[0]:
            assert rule in ids, f"{path.name} expects unknown rule {rule}"


def test_every_rule_has_a_clean_counterpart() -> None:
    for rule in load_catalogue().ids():
        if rule == "analysis-budget" or rule in EXEMPT:
            continue  # a budget is a property of the run, not of a file; EXEMPT says why
        assert (FIXTURES / f"{rule}.ok.plant").exists(), f"no clean counterpart for {rule}"
