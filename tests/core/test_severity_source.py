"""Severity comes from the rule catalogue (rules/*.toml) and the configured overrides only.

Emission sites build findings with ``core.findings.finding(rule, message, ...)``, which
takes the rule's severity from the catalogue; the policy applies a configured override.
"""

from __future__ import annotations

import ast
from pathlib import Path
from types import MappingProxyType

from plantlint.core.catalogue import load_catalogue
from plantlint.core.findings import Severity, Span, Waiver
from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes, stopped
from plantlint.run.policy import unused_waivers
from plantlint.run.runner import Target, check_targets
from conftest import FIXTURES as FIXTURE_ROOT, REPO

PACKAGE = REPO / "checker" / "plantlint"
FIXTURES = FIXTURE_ROOT / "rules"
#: the layers that hold records and presentation may build a Finding with its severity
#: (the record itself; a report read back from JSON); every other layer emits
GRADING_LAYERS = ("core", "report")
#: the one module that re-grades (configured overrides), and the one that reads them
GRADING_MODULES = ("run/policy.py", "run/config.py")


def _emitting_modules() -> list[Path]:
    return [p for p in sorted(PACKAGE.rglob("*.py"))
            if p.relative_to(PACKAGE).parts[0] not in GRADING_LAYERS]


def _is_severity_member(node: ast.AST) -> bool:
    return (isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name) and node.value.id == "Severity"
            and node.attr.isupper())


def test_no_module_below_the_records_passes_a_severity_when_it_emits() -> None:
    modules = _emitting_modules()
    assert len(modules) > 20  # the scan sees the package
    offences = []
    for path in modules:
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if not isinstance(node, ast.Call):
                continue
            name = node.func.id if isinstance(node.func, ast.Name) else getattr(node.func, "attr", "")
            where = f"{path.relative_to(PACKAGE)}:{node.lineno}"
            if name == "Finding":
                offences.append(f"{where}: Finding(...) built directly (use finding(rule, message, ...))")
            args = [*node.args, *(k.value for k in node.keywords)]
            if any(_is_severity_member(a) or (isinstance(a, ast.IfExp) and _is_severity_member(a.body))
                   for a in args):
                offences.append(f"{where}: a Severity passed to {name}()")
            if any(k.arg == "severity" for k in node.keywords) and where.split(":")[0] not in GRADING_MODULES:
                offences.append(f"{where}: severity= passed to {name}()")
    assert offences == []


def test_every_emitted_finding_has_its_catalogue_severity() -> None:
    catalogue = load_catalogue()
    seen: set[str] = set()
    wrong = []
    for path in sorted(FIXTURES.glob("*.plant")):
        text = path.read_bytes()
        if b"timeout:" in text:  # a fixture that needs the runner's budget
            continue
        raw = analyse_bytes(text)
        extra = stopped(raw, "time", [], ("structure",), 1.0)
        waste = unused_waivers([], [Waiver("non-smooth", None, "why", Span.point(1, 1))], lambda rule: True)
        for f in [*raw.findings, *raw.pending, *extra.findings, *waste]:
            seen.add(f.rule)
            if f.severity != catalogue.get(f.rule).severity:
                wrong.append((path.name, f.rule, f.severity.value))
    assert wrong == []
    # every rule but the one no honest model triggers (see test_rule_fixtures.EXEMPT)
    assert set(catalogue.ids()) - seen == {"internal-inconsistency"}


def test_reports_and_cache_read_back_carry_catalogue_or_override(tmp_path: Path) -> None:
    catalogue = load_catalogue()
    defaults = {r.id: r.severity for r in catalogue}
    targets = [Target(FIXTURES / name, name) for name in
               ("non-smooth.plant", "zero-dynamics-critical.plant", "point-refined.plant")]
    overrides = {"zero-dynamics-critical": Severity.ERROR, "point-refined": Severity.WARNING}
    plain = Config(root=FIXTURES)
    regraded = Config(root=FIXTURES, severity=MappingProxyType(overrides),
                      severity_reasons=MappingProxyType({r: "test" for r in overrides}))
    cache = tmp_path / "cache"
    for config in (plain, regraded, plain):  # the second and third runs read the cache back
        reports = check_targets(targets, config, defaults, jobs=1, use_cache=True, cache_dir=cache,
                                show_progress=False)
        findings = [f for r in reports for f in r.findings]
        assert {f.rule for f in findings} >= {"non-smooth", "zero-dynamics-critical", "point-refined"}
        for f in findings:
            assert f.severity == config.severity.get(f.rule, catalogue.get(f.rule).severity), f.rule
