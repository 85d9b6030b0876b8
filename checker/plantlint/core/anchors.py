"""Anchors: what a finding is about, written one way.

An anchor names the thing a finding concerns without a line number (``"point rest"``,
``"output y"``, ``"rate v"``, ``"envelope"``, ``"plant"``, ``"expect minimum_phase at
rest"``). The model records the span of each declared thing under its anchor
(``Model.spans``); :func:`plantlint.run.pipeline.locate` gives a finding without a span
the span its anchor names. The fingerprint (``Finding.fingerprint``: the ``--since``
gate, SARIF ``partialFingerprints``) hashes the anchor, so these texts must never
change: ``tests/core/test_anchors.py`` pins them.
"""

from __future__ import annotations

from dataclasses import dataclass

#: the plant as a whole (its header)
PLANT = "plant"
#: the operating envelope (the state ranges)
ENVELOPE = "envelope"
#: the runner's own stop (``analysis-incomplete``)
STOP = "analysis budget"

_CLAIM = "expect"


def about(*words: object) -> str:
    """Words joined by single spaces: a thing and what about it (``"range x bound"``,
    ``"name q in rate v"``). The named constructors below are built on it."""
    return " ".join(str(w) for w in words)


def declaration(kind: str, name: str | None, *detail: object) -> str:
    """A declared thing, ``"KIND NAME"`` (``state x``, ``param k``, ``let e``), with an
    optional detail after it (``"param k unused"``, ``"point rest sets x"``)."""
    return about(kind, name, *detail)


def point(name: str | None, *detail: object) -> str:
    """An operating point: ``"point NAME"``."""
    return declaration("point", name, *detail)


def output(name: str | None, *detail: object) -> str:
    """An output: ``"output NAME"``."""
    return declaration("output", name, *detail)


def rate(state: str | None, *detail: object) -> str:
    """The rate of a state: ``"rate STATE"``."""
    return declaration("rate", state, *detail)


def range_of(name: str | None, *detail: object) -> str:
    """The range (``in LO .. HI``) of a state, input or parameter: ``"range NAME"``."""
    return about("range", name, *detail)


def let(name: str | None, *detail: object) -> str:
    """A definition: ``"let NAME"``."""
    return declaration("let", name, *detail)


def claim(kind: str, output: str | None = None, point: str | None = None) -> str:
    """An ``expect`` line: ``"expect KIND(OUTPUT) at POINT"`` (output and point optional)."""
    text = f"{_CLAIM} {kind}" + (f"({output})" if output else "")
    return text + (f" at {point}" if point else "")


def claim_reference(what: str, name: str) -> str:
    """A name an ``expect`` line refers to: ``"expect point NAME"``, ``"expect output NAME"``."""
    return f"{_CLAIM} {what} {name}"


def waiver(rule: str, point: str | None = None) -> str:
    """A ``waive`` line: ``"waiver RULE"`` or ``"waiver RULE at POINT"``."""
    return f"waiver {rule}" + (f" at {point}" if point else "")


def waive_reference(rule: str) -> str:
    """The rule id a ``waive`` line names: ``"waive RULE"``."""
    return f"waive {rule}"


def units(where: str) -> str:
    """A units finding about ``where`` (itself an anchor or an expression): ``"units: WHERE"``."""
    return f"units: {where}"


def problem(what: str) -> str:
    """A reading problem that has no declared thing to name (``"nesting"``,
    ``"file too large"``): the anchor is the short description itself."""
    return what


@dataclass(frozen=True)
class Parsed:
    """An anchor read back: ``kind`` (``plant``, ``envelope``, ``point``, ``claim`` ...),
    ``name`` (the claim kind for a claim), ``at`` (a claim's point)."""

    kind: str
    name: str | None = None
    at: str | None = None


def parse(anchor: str) -> Parsed:
    """Read an anchor back (what :func:`plantlint.run.pipeline.locate` needs)."""
    if anchor in (PLANT, ENVELOPE):
        return Parsed(anchor)
    head, _, rest = anchor.partition(" ")
    if head == _CLAIM and rest:
        body, _, at = rest.partition(" at ")
        return Parsed("claim", body.split("(")[0], at or None)
    if rest:
        return Parsed(head, rest.split(" ")[0])
    return Parsed(anchor)


def is_envelope_claim(anchor: str) -> bool:
    """``expect regular`` over the whole envelope (no point): where envelope findings go
    when the model gives the envelope no span of its own."""
    parsed = parse(anchor)
    return parsed.kind == "claim" and parsed.name == "regular" and parsed.at is None
