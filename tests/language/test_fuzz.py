"""Fuzzing the reader: random token streams, mutated models, random text and bytes.

Hypothesis runs derandomized (a fixed seed) with a bounded number of examples, so
CI sees the same inputs every time. Every input goes through decoding, parsing and
model building in-process; a smaller batch of mutated models goes through the
whole analysis in worker processes with a short time budget. Whatever comes out
must use catalogued rule ids, carry a sensible span, and render as JSON valid
against ``checker/plantlint/report/report.schema.json`` and as SARIF valid against the published
OASIS schema (common practice: validate what you emit against its schema).
"""

from __future__ import annotations

import io
import json
import random
from typing import Any

import jsonschema
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from plantlint.core.catalogue import load_catalogue
from plantlint.run.config import Config
from plantlint.core.findings import Finding, Report, Severity
from plantlint.report.formats import get_formatter
from plantlint.report.formats.json_report import report_schema
from plantlint.run.pipeline import RawResult, finish
from plantlint.run.runner import analyse_all
from plantlint.language.syntax import parser
from conftest import REPO

SARIF_SCHEMA = REPO / "tests" / "standards" / "sarif-schema-2.1.0.json"  # OASIS SARIF 2.1.0
SEEDS = sorted((REPO / "tests" / "fixtures" / "rules").glob("*.plant")) + sorted(
    (REPO / "example_repo").rglob("*.plant"))
SEED_TEXTS = [p.read_text(encoding="utf-8") for p in SEEDS]
CATALOGUE = load_catalogue()
RULE_IDS = frozenset(CATALOGUE.ids())
DEFAULTS = {r.id: r.severity for r in CATALOGUE}

TOKENS = (
    "plant const param state input let rate output point expect waive at in".split()
    + "sin cos tan asin acos atan atan2 sinh cosh tanh exp log sqrt abs sign min max sat pi".split()
    + "x y th w u F k m_p L2 _a relative_degree regular minimum_phase state_linearizable".split()
    + ["0", "1", "2.5", ".5", "1e-3", "6.02e23", "1e400", "10", "999999999999"]
    + ["+", "-", "*", "/", "^", "(", ")", ",", "=", ":", "..", "[m/s]", "[1]", "[", "]", '"doc"', '"', "#c", "\n"]
    + ["syntax", "zero-dynamics-critical", "a-b", "\t", "\r\n", "\ufeff", "\x00", "é", "∂"]
)

SETTINGS = dict(derandomize=True, deadline=None, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@pytest.fixture(scope="module", autouse=True)
def _warm_parser() -> None:
    parser()  # built once here, shared by the forked workers


def _validators() -> tuple[Any, Any]:
    json_validator = jsonschema.Draft202012Validator(report_schema())
    sarif_validator = jsonschema.Draft4Validator(json.loads(SARIF_SCHEMA.read_text(encoding="utf-8")))
    return json_validator, sarif_validator


JSON_VALIDATOR, SARIF_VALIDATOR = _validators()


def read_model(data: bytes) -> RawResult:
    """Decode, parse and build the model (the analysis is left out: see the batch test)."""
    from plantlint.run.pipeline import locate, read_model as read

    model, findings = read(data)
    raw = RawResult(plant=model.name if model else None, findings=list(findings))
    if model is not None:
        raw.waivers = list(model.waivers)
        raw.findings = [locate(f, model.spans) for f in raw.findings]
    return raw


def check_output(data: bytes, raw: RawResult) -> None:
    """Rule ids, spans, and valid JSON / SARIF renderings of one result."""
    text = data.decode("utf-8", errors="replace")
    lines = max(text.count("\n") + 1, 1)
    for f in raw.findings:
        assert f.rule in RULE_IDS, f
        assert isinstance(f.severity, Severity)
        _check_span(f, lines, len(text))
    report = Report(files=[finish("fuzz/model.plant", raw, text, Config(), DEFAULTS)], tool_version="0")
    for name in ("json", "sarif"):
        out = io.StringIO()
        get_formatter(name).render(report, out, color=False)
        document = json.loads(out.getvalue())
        if name == "json":
            JSON_VALIDATOR.validate(document)
        else:
            SARIF_VALIDATOR.validate(document)


def _check_span(f: Finding, lines: int, size: int) -> None:
    if f.rule == "analysis-budget" and f.span is None:
        return
    assert f.span is not None, f
    s = f.span
    assert 1 <= s.line <= s.end_line <= lines + 1, f
    assert 1 <= s.column <= size + 2 and 1 <= s.end_column <= size + 2, f
    if s.line == s.end_line:
        assert s.end_column >= s.column, f


# -- strategies ------------------------------------------------------------------------

token_streams = st.lists(st.sampled_from(TOKENS), max_size=60).map(
    lambda toks: " ".join(toks).encode("utf-8"))


@st.composite
def mutated_models(draw: st.DrawFn) -> bytes:
    """A seed model with a few character, token or line edits."""
    text = draw(st.sampled_from(SEED_TEXTS))
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["del_chars", "dup_chars", "swap_chars", "del_line", "dup_line", "swap_lines",
                                   "del_token", "dup_token", "swap_tokens", "insert_token"]))
        text = _mutate(text, op, draw)
    return text.encode("utf-8")


def _mutate(text: str, op: str, draw: st.DrawFn) -> str:
    if op.endswith("line") or op.endswith("lines"):
        units, sep = text.split("\n"), "\n"
    elif op.endswith("chars"):
        units, sep = list(text), ""
    else:
        units, sep = text.split(" "), " "
    if not units:
        return text
    i = draw(st.integers(0, len(units) - 1))
    j = draw(st.integers(0, len(units) - 1))
    lo, hi = min(i, j), max(i, j)
    if op.startswith("del"):
        units = units[:lo] + units[hi + 1:] if op == "del_chars" else units[:i] + units[i + 1:]
    elif op.startswith("dup"):
        units = units[:hi + 1] + units[lo:hi + 1] + units[hi + 1:] if op == "dup_chars" else (
            units[:i + 1] + [units[i]] + units[i + 1:])
    elif op.startswith("swap"):
        units[i], units[j] = units[j], units[i]
    else:
        units.insert(i, draw(st.sampled_from(TOKENS)))
    return sep.join(units)


# -- in-process: decode, parse, build ----------------------------------------------------

@settings(max_examples=150, **SETTINGS)
@given(token_streams)
def test_random_token_streams(data: bytes) -> None:
    check_output(data, read_model(data))


@settings(max_examples=250, **SETTINGS)
@given(mutated_models())
def test_mutated_models(data: bytes) -> None:
    check_output(data, read_model(data))


@settings(max_examples=100, **SETTINGS)
@given(st.text(max_size=300).map(lambda s: s.encode("utf-8", errors="surrogatepass")))
def test_random_unicode(data: bytes) -> None:
    check_output(data, read_model(data))


@settings(max_examples=60, **SETTINGS)
@given(st.binary(max_size=400))
def test_random_bytes(data: bytes) -> None:
    check_output(data, read_model(data))


@settings(max_examples=60, **SETTINGS)
@given(st.sampled_from(SEED_TEXTS), st.text(alphabet=st.characters(), min_size=1, max_size=8), st.data())
def test_unicode_inserted_into_models(seed: str, extra: str, data: st.DataObject) -> None:
    at = data.draw(st.integers(0, len(seed)))
    blob = (seed[:at] + extra + seed[at:]).encode("utf-8", errors="surrogatepass")
    check_output(blob, read_model(blob))


# -- the whole pipeline, in workers with a short budget ----------------------------------

def test_mutated_models_through_the_runner() -> None:
    """A fixed batch of mutants analysed end to end: results or a budget finding, never a crash."""
    rng = random.Random(20240607)
    batch: list[bytes] = []
    for _ in range(10):
        text = rng.choice(SEED_TEXTS)
        lines = text.split("\n")
        for _edit in range(rng.randint(1, 3)):
            i = rng.randrange(len(lines))
            choice = rng.random()
            if choice < 0.4:
                del lines[i]
            elif choice < 0.7:
                lines.insert(i, lines[rng.randrange(len(lines))])
            else:
                j = rng.randrange(len(lines))
                lines[i], lines[j] = lines[j], lines[i]
        batch.append("\n".join(lines).encode("utf-8"))
    raws = analyse_all(batch, Config(), jobs=2, timeout=2.0)
    assert len(raws) == len(batch)
    for data, raw in zip(batch, raws):
        crashes = [f for f in raw.findings if f.rule == "analysis-incomplete" and "internal error" in f.message]
        assert not crashes, crashes
        check_output(data, raw)
