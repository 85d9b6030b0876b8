"""Anchors are built by one constructor (core/anchors.py) and their texts never change:
the ``--since`` gate and SARIF ``partialFingerprints`` hash them. The fingerprints
pinned here were produced before anchors had a constructor (free f-strings in the
analysis, the model and the runner); the demo models are invented."""

from __future__ import annotations


import pytest

from plantlint.core import anchors
from plantlint.core.findings import Finding, Severity
from plantlint.run.pipeline import analyse_bytes, claims_in_text, locate
from conftest import REPO

MODELS = REPO / "example_repo" / "models"


def test_constructors_write_the_documented_texts() -> None:
    assert anchors.PLANT == "plant" and anchors.ENVELOPE == "envelope" and anchors.STOP == "analysis budget"
    assert anchors.point("rest") == "point rest"
    assert anchors.point("rest", "sets", "x", "twice") == "point rest sets x twice"
    assert anchors.output("y") == "output y"
    assert anchors.rate("v") == "rate v"
    assert anchors.let("e") == "let e"
    assert anchors.range_of("x") == "range x" and anchors.range_of("x", "bound") == "range x bound"
    assert anchors.declaration("param", "k", "unused") == "param k unused"
    assert anchors.claim("relative_degree", "y", "rest") == "expect relative_degree(y) at rest"
    assert anchors.claim("regular") == "expect regular"
    assert anchors.claim_reference("point", "hover") == "expect point hover"
    assert anchors.waiver("non-smooth") == "waiver non-smooth"
    assert anchors.waiver("non-smooth", "rest") == "waiver non-smooth at rest"
    assert anchors.waive_reference("non-smooth") == "waive non-smooth"
    assert anchors.units(anchors.rate("w")) == "units: rate w"
    assert anchors.problem("nesting") == "nesting"


@pytest.mark.parametrize(("text", "parsed"), [
    ("plant", anchors.Parsed("plant")),
    ("envelope", anchors.Parsed("envelope")),
    ("point rest", anchors.Parsed("point", "rest")),
    ("point rest sets x", anchors.Parsed("point", "rest")),
    ("expect minimum_phase at rest", anchors.Parsed("claim", "minimum_phase", "rest")),
    ("expect relative_degree(y)", anchors.Parsed("claim", "relative_degree")),
    ("nesting", anchors.Parsed("nesting")),
])
def test_parse_reads_an_anchor_back(text: str, parsed: anchors.Parsed) -> None:
    assert anchors.parse(text) == parsed


def test_envelope_findings_fall_back_to_the_envelope_claim() -> None:
    assert anchors.is_envelope_claim(anchors.claim("regular"))
    assert not anchors.is_envelope_claim(anchors.claim("regular", point="rest"))
    assert not anchors.is_envelope_claim(anchors.claim("minimum_phase"))
    spans = {anchors.claim("regular", point="rest"): "at a point", anchors.claim("regular"): "whole envelope",
             anchors.PLANT: "header"}
    found = Finding("envelope-singular", Severity.ERROR, "m", anchor=anchors.ENVELOPE)
    assert locate(found, spans).span == "whole envelope"


def test_constructed_fingerprints_are_pinned() -> None:
    waiver = Finding("unused-waiver", Severity.WARNING, "m", point="rest", anchor=anchors.waiver("non-smooth", "rest"))
    claim = Finding("expectation-failed", Severity.ERROR, "m", point="rest",
                    anchor=anchors.claim("relative_degree", "y", "rest"))
    assert waiver.fingerprint("pendulum") == "3676facbf9ae94499fc7dec2473ff170"
    assert claim.fingerprint("pendulum") == "a79941b619e89266e493cbf6ce3b77e6"
    text = b"plant p\nexpect relative_degree(y) = 2 at rest\n"
    (unread,) = claims_in_text(text)
    assert unread.anchor == claim.anchor


@pytest.mark.parametrize(("model", "rule", "anchor", "fingerprint"), [
    ("forming/lid_press.plant", "envelope-singular", "envelope", "bc8be571162b03eb3479a4634fd64d54"),
    ("power/dc_bus_boost.plant", "zero-dynamics-unstable", "point rated", "a1a56602c89ca8a0f2d979808033371d"),
    ("power/dc_bus_boost.plant", "zero-dynamics-unstable", "point reduced", "8807ff86ac89fe441bff3ea19f119265"),
    ("archive/case_lift_2019.plant", "non-smooth", "rate w sat", "b051f5f92b3569382ec285a58882721b"),
    ("archive/case_lift_2019.plant", "unit-mismatch", "units: rate w: term R_d*120*g",
     "ce6a56b5bb72a191cb19353369844c18"),
])
def test_fingerprints_of_the_demo_findings_are_pinned(model: str, rule: str, anchor: str, fingerprint: str) -> None:
    raw = analyse_bytes((MODELS / model).read_bytes())
    found = [f for f in raw.findings if f.rule == rule and f.anchor == anchor]
    assert [f.fingerprint(raw.plant) for f in found] == [fingerprint]
