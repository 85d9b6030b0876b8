"""The rule catalogue: complete, strictly validated, and its examples are right.

The worked examples in the catalogue make mathematical claims (this output has a
right-half-plane zero, that plant is not controllable). They are checked here
against computations done independently of plantlint's kernel: plain sympy
differentiation, numpy ranks and scipy.signal's transmission zeros.
"""

from __future__ import annotations

import io
import shutil
from pathlib import Path

import numpy as np
import pytest
import sympy as sp
from rich.console import Console
from scipy import signal

from plantlint.core.catalogue import (
    FAMILIES,
    Catalogue,
    CatalogueError,
    Rule,
    family_file,
    load_catalogue,
    read_catalogue,
)
from plantlint.core.findings import Severity
from plantlint.core.resources import data_path
from plantlint.report.rules_view import render_rules
from plantlint.language.expressions import symbol
from plantlint.language.syntax import parse_text
from conftest import REPO

# The ids and default severities the foundation issue requires, family by family.
EXPECTED: dict[str, list[tuple[str, str]]] = {
    "model": [
        ("syntax", "error"),
        ("unknown-name", "error"),
        ("duplicate-name", "error"),
        ("missing-rate", "error"),
        ("orphan-rate", "error"),
        ("unused-name", "warning"),
        ("duplicate-claim", "error"),
        ("non-smooth", "error"),
        ("not-input-affine", "error"),
        ("output-uses-input", "error"),
        ("point-incomplete", "error"),
        ("point-not-equilibrium", "error"),
        ("point-refined", "note"),
        ("point-outside-envelope", "warning"),
        ("bad-range", "error"),
        ("unknown-reference", "error"),
        ("waiver-refused", "error"),
    ],
    "units": [("unit-mismatch", "error"), ("unit-unknown", "error")],
    "structure": [
        ("singular-model", "error"),
        ("relative-degree-undefined", "error"),
        ("relative-degree-ill-defined", "error"),
        ("decoupling-singular", "error"),
        ("envelope-singular", "error"),
        ("envelope-unproven", "warning"),
    ],
    "zero-dynamics": [("zero-dynamics-unstable", "error"), ("zero-dynamics-critical", "warning")],
    "linearization": [("not-involutive", "note"), ("distribution-rank-drop", "note"), ("not-controllable", "note")],
    "run": [("expectation-failed", "error"), ("analysis-budget", "warning"), ("analysis-incomplete", "error"),
            ("internal-inconsistency", "error"),
            ("unused-waiver", "warning")],
}
ALL_IDS = [rule_id for family in FAMILIES for rule_id, _ in EXPECTED[family]]


@pytest.fixture(scope="module")
def catalogue() -> Catalogue:
    return load_catalogue()


def test_exactly_the_required_rules_in_family_order(catalogue: Catalogue) -> None:
    assert list(catalogue.ids()) == ALL_IDS
    assert len(ALL_IDS) == 35
    for family, entries in EXPECTED.items():
        for rule_id, severity in entries:
            rule = catalogue.get(rule_id)
            assert rule.family == family
            assert rule.severity is Severity(severity)


def test_every_rule_is_documented(catalogue: Catalogue) -> None:
    """Fails when any rule lacks a usable title, rationale, examples or references."""
    for rule in catalogue:
        assert rule.title and "\n" not in rule.title and len(rule.title) <= 80, rule.id
        assert len(rule.rationale) >= 200, f"{rule.id}: rationale is too thin"
        assert rule.bad.strip() and rule.good.strip(), rule.id
        assert rule.bad != rule.good, rule.id
        assert rule.references and all(ref.strip() for ref in rule.references), rule.id


def test_examples_are_complete_plant_files(catalogue: Catalogue) -> None:
    """Every example parses, except the bad one of `syntax`, which must not."""
    for rule in catalogue:
        for kind in ("bad", "good"):
            text = getattr(rule, kind)
            assert text.lstrip().startswith("plant "), f"{rule.id} {kind}"
            problems = parse_text(text).findings
            if rule.id == "syntax" and kind == "bad":
                assert [f.rule for f in problems] == ["syntax"]
            else:
                assert problems == [], f"{rule.id} {kind}: {problems}"


def test_lookup_and_membership(catalogue: Catalogue) -> None:
    assert "missing-rate" in catalogue
    assert "no-such-rule" not in catalogue
    assert isinstance(catalogue.get("missing-rate"), Rule)
    assert catalogue.index("syntax") == 0
    with pytest.raises(KeyError) as caught:
        catalogue.get("missing-rates")
    assert "did you mean missing-rate" in str(caught.value)
    assert [rule.id for rule in catalogue] == list(catalogue.ids())


def test_load_is_cached_and_found_through_data_path() -> None:
    assert load_catalogue() is load_catalogue()
    assert (data_path("rules") / "model.toml").is_file()


def test_to_data_round_trips_the_fields(catalogue: Catalogue) -> None:
    data = catalogue.get("non-smooth").to_data()
    assert data["severity"] == "error" and data["family"] == "model"
    assert data["references"] == list(catalogue.get("non-smooth").references)


# -- strict loading --------------------------------------------------------------


@pytest.fixture()
def rules_copy(tmp_path: Path) -> Path:
    folder = tmp_path / "rules"
    shutil.copytree(data_path("rules"), folder)
    return folder


def _append(folder: Path, family: str, text: str) -> None:
    path = folder / family_file(family)
    path.write_text(path.read_text(encoding="utf-8") + text, encoding="utf-8")


NEW_RULE = """
[[rule]]
id = "extra-rule"
family = "run"
severity = "note"
title = "An extra rule"
rationale = "Why it matters."
bad = "plant a"
good = "plant b"
references = ["somewhere"]
"""


def test_a_valid_extra_rule_loads(rules_copy: Path) -> None:
    _append(rules_copy, "run", NEW_RULE)
    assert read_catalogue(rules_copy).ids()[-1] == "extra-rule"


@pytest.mark.parametrize(
    ("change", "message"),
    [
        (NEW_RULE.replace('references = ["somewhere"]', 'references = ["somewhere"]\nsee_also = "x"'), "unknown key"),
        (NEW_RULE.replace('severity = "note"', 'severity = "fatal"'), "severity"),
        (NEW_RULE.replace('severity = "note"', 'severity = "Note"'), "severity"),
        (NEW_RULE.replace('good = "plant b"\n', ""), "missing key"),
        (NEW_RULE.replace('references = ["somewhere"]', "references = []"), "references"),
        (NEW_RULE.replace('bad = "plant a"', 'bad = ""'), "bad must be"),
        (NEW_RULE.replace('family = "run"', 'family = "model"'), "does not match"),
        (NEW_RULE.replace('title = "An extra rule"', 'title = """two\nlines"""'), "one line"),
        (NEW_RULE.replace('id = "extra-rule"', 'id = "syntax"'), "defined twice"),
        ("\n[[rule]\n", "run.toml"),
    ],
)
def test_malformed_rule_files_are_rejected(rules_copy: Path, change: str, message: str) -> None:
    _append(rules_copy, "run", change)
    with pytest.raises(CatalogueError, match=message):
        read_catalogue(rules_copy)


def test_unknown_top_level_keys_are_rejected(rules_copy: Path) -> None:
    path = rules_copy / "run.toml"
    path.write_text("version = 2\n" + path.read_text(encoding="utf-8"), encoding="utf-8")
    with pytest.raises(CatalogueError, match="top-level"):
        read_catalogue(rules_copy)


def test_stray_and_missing_files_are_rejected(rules_copy: Path) -> None:
    (rules_copy / "extras.toml").write_text("", encoding="utf-8")
    with pytest.raises(CatalogueError, match="unexpected rule file"):
        read_catalogue(rules_copy)
    (rules_copy / "extras.toml").unlink()
    (rules_copy / "run.toml").unlink()
    with pytest.raises(CatalogueError, match="missing"):
        read_catalogue(rules_copy)


# -- the rules view ---------------------------------------------------------------


def _render(catalogue: Catalogue, rule_id: str | None) -> str:
    out = io.StringIO()
    console = Console(file=out, width=160, force_terminal=False, no_color=True)
    render_rules(catalogue, rule_id, console)
    return out.getvalue()


def test_rules_table_lists_every_rule(catalogue: Catalogue) -> None:
    text = _render(catalogue, None)
    for rule in catalogue:
        assert rule.id in text
    assert "\x1b" not in text


def test_one_rule_in_full(catalogue: Catalogue) -> None:
    rule = catalogue.get("zero-dynamics-unstable")
    text = _render(catalogue, rule.id)
    squashed = " ".join(text.split())
    assert rule.title in squashed
    assert "non-minimum phase" in squashed
    assert "output y [1] = x2 - x1" in text  # the bad example, verbatim
    assert "output y [1] = x2 + 3*x1" in text  # the good example
    for ref in rule.references:
        assert ref in squashed


def test_rule_page_reads_in_the_projects_own_order(catalogue: Catalogue) -> None:
    """Protection first, then when the check fires, a failing and a passing model, sources."""
    rule = catalogue.get("expectation-failed")
    lines = _render(catalogue, rule.id).splitlines()
    headings = ["What it protects", "When it fires", "A model that fails it", "A model that passes it", "Sources"]
    positions = [lines.index(h) for h in headings]
    assert positions == sorted(positions)
    text = "\n".join(lines)
    assert "expect relative_degree(pos) = 1" in text.split(headings[3])[0].split(headings[2])[1]
    assert "expect relative_degree(pos) = 2" in text.split(headings[4])[0].split(headings[3])[1]
    for old_word in ("triggers it", "fixed", "References"):
        assert old_word not in text


def test_rules_view_rejects_unknown_ids(catalogue: Catalogue) -> None:
    with pytest.raises(KeyError):
        _render(catalogue, "zero-dynamic-unstable")


# -- the examples' mathematics, checked outside plantlint ------------------------------


def _plant(text: str) -> tuple[list[sp.Symbol], list[sp.Symbol], list[sp.Expr], list[sp.Expr]]:
    """States, inputs, rates and outputs of an example (constants substituted)."""
    statements = parse_text(text).statements
    subs = {symbol(s.name): s.expr.value for s in statements if s.kind in ("const", "param") and s.expr and s.name}
    states = [symbol(s.name) for s in statements if s.kind == "state" and s.name]
    inputs = [symbol(s.name) for s in statements if s.kind == "input" and s.name]
    rate_of = {s.name: s.expr.value.xreplace(subs) for s in statements if s.kind == "rate" and s.expr}
    rates = [rate_of[str(x)] for x in states]
    outputs = [s.expr.value.xreplace(subs) for s in statements if s.kind == "output" and s.expr]
    return states, inputs, rates, outputs


def _linear(text: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    states, inputs, rates, outputs = _plant(text)
    F, H = sp.Matrix(rates), sp.Matrix(outputs)
    A = np.array(F.jacobian(states), dtype=float)
    B = np.array(F.jacobian(inputs), dtype=float)
    C = np.array(H.jacobian(states), dtype=float)
    return A, B, C


def _transmission_zeros(text: str) -> np.ndarray:
    A, B, C = _linear(text)
    zeros, _, _ = signal.ss2zpk(A, B, C, np.zeros((C.shape[0], B.shape[1])))
    return np.sort(np.real_if_close(zeros))


def _relative_degree(text: str) -> tuple[int | None, sp.Expr]:
    """First k with d/du of the k-th output derivative non-zero, by plain sympy."""
    states, inputs, rates, outputs = _plant(text)
    (u,) = inputs
    y = outputs[0]
    for k in range(1, len(states) + 1):
        y = sum((sp.diff(y, x) * rate for x, rate in zip(states, rates)), sp.Integer(0))
        gain = sp.diff(y, u)
        if sp.expand(gain) != 0:
            return k, gain
    return None, sp.Integer(0)


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_nmp_example_has_a_right_half_plane_zero(catalogue: Catalogue) -> None:
    # Linear plant, so the zero-dynamics eigenvalues are the transmission zeros
    # (Khalil 3rd ed. sec. 13.2, from memory); zeros computed by scipy.signal.
    rule = catalogue.get("zero-dynamics-unstable")
    assert np.allclose(_transmission_zeros(rule.bad), [1.0])
    # the good example is really good: its zero (-3) is in the left half-plane and cancels
    # no pole (-1, -2), so the realisation stays minimal (observable: numpy's rank of
    # [C; CA]); a good example with y = x1 + x2 would cancel the pole at -1
    assert np.allclose(_transmission_zeros(rule.good), [-3.0])
    A, _, C = _linear(rule.good)
    poles = np.linalg.eigvals(A)
    assert np.linalg.matrix_rank(np.vstack([C, C @ A])) == 2
    assert min(abs(p - z) for p in poles for z in _transmission_zeros(rule.good)) > 0.5


@pytest.mark.filterwarnings("ignore::scipy.signal.BadCoefficients")
def test_critical_example_has_a_zero_at_the_origin(catalogue: Catalogue) -> None:
    rule = catalogue.get("zero-dynamics-critical")
    assert np.allclose(_transmission_zeros(rule.bad), [0.0])
    assert np.allclose(_transmission_zeros(rule.good), [-2.0])  # the zero sits at -lam


def test_uncontrollable_example_by_kalman_rank(catalogue: Catalogue) -> None:
    rule = catalogue.get("not-controllable")
    for text, rank in ((rule.bad, 1), (rule.good, 2)):
        A, B, _ = _linear(text)
        kalman = np.hstack([B, A @ B])
        assert np.linalg.matrix_rank(kalman) == rank


def test_decoupling_example_by_determinant(catalogue: Catalogue) -> None:
    # Both outputs have relative degree one, so the decoupling matrix is C B.
    rule = catalogue.get("decoupling-singular")
    _, bad_B, bad_C = _linear(rule.bad)
    _, good_B, good_C = _linear(rule.good)
    assert np.linalg.det(bad_C @ bad_B) == pytest.approx(0.0)
    assert abs(np.linalg.det(good_C @ good_B)) == pytest.approx(2.0)


def test_relative_degree_examples(catalogue: Catalogue) -> None:
    assert _relative_degree(catalogue.get("relative-degree-undefined").bad)[0] is None
    assert _relative_degree(catalogue.get("relative-degree-undefined").good)[0] == 2
    assert _relative_degree(catalogue.get("expectation-failed").bad)[0] == 2  # it claims 1
    a = sp.Symbol("a", real=True)
    degree, gain = _relative_degree(catalogue.get("relative-degree-ill-defined").bad)
    assert degree == 1 and gain.subs(a, 0) == 0  # vanishes at the point a = 0
    degree, gain = _relative_degree(catalogue.get("relative-degree-ill-defined").good)
    assert degree == 1 and gain.subs(a, 0) != 0


def test_envelope_singular_example_crosses_zero_only_in_the_wide_box(catalogue: Catalogue) -> None:
    # The gain L_g L_f h is cos(th); sampled densely with numpy over each declared range.
    rule = catalogue.get("envelope-singular")
    for text, lo, hi, crosses in ((rule.bad, -2.0, 2.0, True), (rule.good, -1.2, 1.2, False)):
        degree, gain = _relative_degree(text)
        assert degree == 2
        assert f"state th [rad] in {lo:g} .. {hi:g}" in text
        values = sp.lambdify(list(gain.free_symbols), gain, "numpy")(np.linspace(lo, hi, 2001))
        assert bool(values.min() < 0 < values.max()) is crosses


def _bracket(p: sp.Matrix, q: sp.Matrix, x: sp.Matrix) -> sp.Matrix:
    """Lie bracket [p, q] = Dq p - Dp q (Isidori's sign convention)."""
    return q.jacobian(x) * p - p.jacobian(x) * q


def test_involutivity_examples_by_brackets(catalogue: Catalogue) -> None:
    # SISO, n = 3: span{g, ad_f g} is involutive iff [g, ad_f g] lies in it, i.e.
    # det[g, ad_f g, [g, ad_f g]] vanishes (Isidori sec. 4.2 / Frobenius, from memory).
    rule = catalogue.get("not-involutive")
    for text, involutive in ((rule.bad, False), (rule.good, True)):
        states, inputs, rates, _ = _plant(text)
        (u,) = inputs
        X = sp.Matrix(states)
        F = sp.Matrix(rates)
        g = F.diff(u)
        f = F.subs(u, 0)

        ad = _bracket(f, g, X)
        det = sp.Matrix.hstack(g, ad, _bracket(g, ad, X)).det()
        assert (sp.expand(det) == 0) is involutive
        # controllable everywhere in the box either way (rank of [g, ad_f g, ad_f^2 g])
        ctrl = sp.Matrix.hstack(g, ad, _bracket(f, ad, X)).det()
        grid = np.linspace(-1, 1, 9)
        fn = sp.lambdify(states, ctrl, "numpy")
        assert all(abs(fn(a, b, c)) > 0 for a in grid for b in grid for c in grid)


def test_the_readme_rule_table_is_the_catalogue(catalogue: Catalogue) -> None:
    """README's table of rules lists every rule, in catalogue order, with its family,
    default severity and title."""
    import re

    readme = (REPO / "README.md").read_text(encoding="utf-8")
    rows = re.findall(r"^\| `([a-z-]+)` \| ([\w-]+) \| (\w+) \| (.+?) \|$", readme, re.M)
    assert rows == [(r.id, r.family, r.severity.value, r.title) for r in catalogue]
