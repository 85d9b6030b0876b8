"""Hostile and broken files: a clear finding (or a clean parse), never an exception.

Every case goes through ``plantlint.run.pipeline.analyse_bytes`` in-process and, all
together in one run, through the command line (exit code 0 or 1, never 2 for a
file's content, and no traceback). Models are invented; the limits are the
parser's (``plantlint.language.syntax``), common practice for tools that read untrusted files.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path
from typing import Callable

import pytest
import sympy as sp

from plantlint.run.config import Config
from plantlint.core.findings import Finding
from plantlint.run.pipeline import RawResult, analyse_bytes
from plantlint.core.limits import MAX_BYTES


# A tiny valid model (invented numbers) with two findings whose positions matter:
# an unused parameter (line 3) and a violated expectation (line 9).
VALID = (
    "# demo model, invented numbers\n"
    "plant lag\n"
    "param k = 2 in 1 .. 3\n"
    "param spare = 1\n"
    "state x [m] in -1 .. 1 \"position\"\n"
    "input u in -1 .. 1\n"
    "rate x = -k*x + u\n"
    "output y = x\n"
    "expect relative_degree(y) = 2\n"
    "point rest: x = 0\n"
)


def _wrap(rate: str) -> bytes:
    """A one-state model whose rate is ``rate``."""
    return f"plant p\nstate x in -1 .. 1\ninput u in -1 .. 1\nrate x = {rate}\noutput y = x\n".encode()


# name -> (bytes maker, expected rule or None for a clean parse, expected line or None)
CASES: dict[str, tuple[Callable[[], bytes], str | None, int | None]] = {
    "huge_exponent": (lambda: _wrap("x^1000000000 + u"), "syntax", 4),
    "nested_parentheses": (lambda: _wrap("(" * 10_000 + "x" + ")" * 10_000 + " + u"), "syntax", 4),
    "many_statements": (lambda: (b"plant p\n" + b"const c=1\n" * 100_000), "syntax", None),
    "ten_megabytes": (lambda: b"plant p\n" + b"# padding padding\n" * (10 * 1024 * 1024 // 18), "syntax", 1),
    "nul_byte": (lambda: b"plant p\nstate x\x00 in -1 .. 1\n", "syntax", 2),
    "invalid_utf8": (lambda: b"plant p\nstate \xff\xfe x\n", "syntax", 2),
    "utf16": (lambda: "plant p\nstate x\n".encode("utf-16"), "syntax", 1),
    "long_name": (lambda: ("plant p\nstate " + "a" * 100_000 + " in -1 .. 1\n").encode(), "syntax", 2),
    "unterminated_string": (lambda: b'plant p "a title\nstate x\n', "syntax", 1),
    "empty_file": (lambda: b"", "syntax", 1),
    "binary_junk": (lambda: bytes((i * 73 + 11) % 256 for i in range(20_000)), "syntax", None),
    "huge_literal": (lambda: _wrap("1e999999999*x + u"), "syntax", 4),
    "tower_of_powers": (lambda: _wrap("10^10^10*x + u"), "syntax", 4),
    "many_signs": (lambda: _wrap("-" * 100_000 + "x + u"), "syntax", 4),
    "long_sum": (lambda: _wrap(" + ".join(["x"] * 50_000) + " + u"), "syntax", 4),
    "only_comments": (lambda: b"# nothing but a comment\n", "syntax", 1),
    # powers of numbers that become too large only once names are replaced by their values
    # (sympy would compute them exactly and never finish)
    "tower_through_a_constant": (lambda: b"plant p\nconst k = 300\nstate x in -1 .. 1\ninput u in -1 .. 1\n"
                                         b"rate x = -x + 2^2^k*u\noutput y = x\n", "syntax", 5),
    "tower_in_a_parameter": (lambda: b"plant p\nconst k = 400\nparam c = 3^(2^k)\nstate x in -1 .. 1\n"
                                     b"input u in -1 .. 1\nrate x = -c*x + u\noutput y = x\n", "syntax", 3),
    "tower_in_a_range": (lambda: b"plant p\nconst k = 300\nstate x in -1 .. 2^2^k\ninput u in -1 .. 1\n"
                                 b"rate x = -x + u\noutput y = x\n", "syntax", 3),
    "tower_in_a_point": (lambda: b"plant p\nparam a = 12 in 6 .. 48\nparam b = 24\nstate x in -1 .. 1\n"
                                 b"input u in -1 .. 1\nrate x = -x + u\noutput y = x\n"
                                 b"point rest: x = 48^2^(a*b)\n", "syntax", 8),
    # thousands of misspelt names among thousands of declared ones: hints within a budget
    "many_misspelt_names": (lambda: ("plant p\n" + "".join(f"const kq{i:04d}x = {i}\n" for i in range(2000))
                                     + "state x in -1 .. 1\ninput u in -1 .. 1\nrate x = u + "
                                     + " + ".join(f"kq{i:04d}y" for i in range(2000)) + "\noutput y = x\n").encode(),
                            "unknown-name", 2004),
    # thousands of waivers naming points that are not declared, among thousands that are
    "many_unknown_points": (lambda: ("plant p\nstate x in -1 .. 1\ninput u in -1 .. 1\nrate x = -x + u\noutput y = x\n"
                                     + "".join(f"point p{i:04d}: x = 0\n" for i in range(1000))
                                     + "".join(f'waive zero-dynamics-critical at q{i:04d} "r"\n' for i in range(1000))
                                     ).encode(), "unknown-reference", 1006),
    "tower_below_limit": (lambda: b"plant p\nconst k = 10\nstate x in -1 .. 1\ninput u in -1 .. 1\n"
                                  b"rate x = -x + u/2^2^k\noutput y = x\n", None, None),
    "signs_below_limit": (lambda: _wrap("-" * 150 + "x + u"), None, None),
    "moderate_sum": (lambda: _wrap(" + ".join(f"{i}*x" for i in range(1, 300)) + " + u"), None, None),
}


def _check_findings(raw: RawResult, rule: str | None, line: int | None, size: int) -> None:
    rules = [f.rule for f in raw.findings]
    if rule is None:
        assert not any(r in ("syntax", "unknown-name") for r in rules), raw.findings
        return
    assert rule in rules, raw.findings
    first = next(f for f in raw.findings if f.rule == rule)
    _sensible_span(first, size)
    if line is not None:
        assert first.span is not None and first.span.line == line, first


def _sensible_span(f: Finding, size: int) -> None:
    assert f.span is not None
    assert 1 <= f.span.line <= f.span.end_line
    assert f.span.column >= 1 and f.span.end_column >= 1
    assert f.span.line <= size + 1 and f.span.column <= size + 1
    if f.span.line == f.span.end_line:
        assert f.span.end_column > f.span.column


@pytest.mark.parametrize("name", sorted(CASES))
def test_in_process(name: str) -> None:
    make, rule, line = CASES[name]
    data = make()
    raw = analyse_bytes(data, Config())
    _check_findings(raw, rule, line, len(data))
    assert raw.to_data()  # plain data (crosses process boundaries and the cache)


def test_limits_are_real_limits() -> None:
    """The oversize case is really over the byte limit, the statement case under it."""
    assert len(CASES["ten_megabytes"][0]()) > MAX_BYTES
    assert len(CASES["many_statements"][0]()) <= MAX_BYTES


def test_messages_say_what_is_wrong() -> None:
    """Each hostile file names its problem (the words a user searches for)."""
    words = {
        "huge_exponent": "exponent", "nested_parentheses": "nested", "ten_megabytes": "MB",
        "nul_byte": "NUL", "invalid_utf8": "UTF-8", "utf16": "UTF-16", "long_name": "name", "unterminated_string": "closing",
        "empty_file": "empty", "huge_literal": "out of range", "tower_of_powers": "exponent",
        "many_signs": "signs", "long_sum": "tokens", "many_statements": "tokens",
        "tower_through_a_constant": "too large", "tower_in_a_parameter": "too large",
        "tower_in_a_range": "too large", "tower_in_a_point": "too large",
    }
    for name, word in words.items():
        raw = analyse_bytes(CASES[name][0](), Config())
        assert any(word in f.message for f in raw.findings), (name, raw.findings)


def _comparable(raw: RawResult) -> list[tuple[str, object, str]]:
    return sorted((f.rule, f.span, f.message) for f in raw.findings)


def test_crlf_and_bom_read_like_lf() -> None:
    lf = analyse_bytes(VALID.encode(), Config())
    assert {"unused-name", "expectation-failed"} <= {f.rule for f in lf.findings}
    crlf = analyse_bytes(VALID.replace("\n", "\r\n").encode(), Config())
    bom = analyse_bytes(b"\xef\xbb\xbf" + VALID.encode(), Config())
    both = analyse_bytes(b"\xef\xbb\xbf" + VALID.replace("\n", "\r\n").encode(), Config())
    assert _comparable(crlf) == _comparable(lf)
    assert _comparable(bom) == _comparable(lf)
    assert _comparable(both) == _comparable(lf)
    assert crlf.analysis == lf.analysis


def test_lone_carriage_returns_are_refused_where_the_first_one_is() -> None:
    """SARIF 2.1.0 text regions count CR, LF and CRLF each as a line end (the OASIS
    specification, from memory); a file with lone CRs would get lines and columns that
    disagree with every viewer's."""
    raw = analyse_bytes(VALID.replace("\n", "\r").encode(), Config())
    (f,) = raw.findings
    assert f.rule == "syntax" and f.message.startswith("a lone carriage return (CR) ends a line here")
    first_line = VALID.split("\n")[0]
    assert (f.span.line, f.span.column) == (1, len(first_line) + 1)
    lines = VALID.split("\n")
    stray_text = "\r\n".join(lines[:2]) + "\r\n" + lines[2] + "\r" + "\n".join(lines[3:])
    stray = analyse_bytes(stray_text.encode(), Config())
    assert [g.rule for g in stray.findings] == ["syntax"] and stray.findings[0].span.line == 3


def test_command_line_on_every_case(tmp_path: Path) -> None:
    """One run over all the files: exit 0/1, no traceback, one report per file."""
    paths = []
    for name, (make, _rule, _line) in sorted(CASES.items()):
        path = tmp_path / f"{name}.plant"
        path.write_bytes(make())
        paths.append(path)
    (tmp_path / "crlf.plant").write_bytes(VALID.replace("\n", "\r\n").encode())
    (tmp_path / "lf.plant").write_bytes(VALID.encode())
    paths += [tmp_path / "crlf.plant", tmp_path / "lf.plant"]
    proc = subprocess.run(
        [sys.executable, "-m", "plantlint", "check", "--no-cache", "--jobs", "2", "--timeout", "60",
         "--format", "json", *map(str, paths)],
        cwd=tmp_path, capture_output=True, text=True, timeout=600,
    )
    assert proc.returncode == 1, proc.stderr
    assert "Traceback" not in proc.stderr
    report = json.loads(proc.stdout)
    by_name = {Path(f["path"]).stem: f for f in report["files"]}
    assert set(by_name) == {p.stem for p in paths}
    for name, (_make, rule, line) in CASES.items():
        rules = [f["rule"] for f in by_name[name]["findings"]]
        assert "analysis-budget" not in rules, (name, by_name[name]["findings"])
        if rule is None:
            assert "syntax" not in rules
            continue
        first = next(f for f in by_name[name]["findings"] if f["rule"] == rule)
        assert first["line"] >= 1 and first["column"] >= 1
        if line is not None:
            assert first["line"] == line, (name, first)
    assert by_name["crlf"]["findings"] == by_name["lf"]["findings"]


ZERO_MASS = """plant cart "a mass of zero (mutant reproducer)"
const mass = {mass}
state p in -1 .. 1
state v in -1 .. 1
input F in -1 .. 1
let spare = 1/(mass - {mass})
rate p = v
rate v = F/mass
output y = p
point rest: p = 0, v = 0
expect relative_degree(y) = 2
"""


def test_a_rate_that_divides_by_zero_everywhere_stops_the_analysis() -> None:
    """With mass = 0 the rate F/mass is defined nowhere: the file states no plant, so it
    is reported at the rate (with what to check) and nothing is analysed; analysing the
    model left after striking the division out would report on another plant (and, on a
    12-state quadrotor, ran past its budget). A definition that divides by zero but that
    no rate uses is reported and does not stop the analysis."""
    raw = analyse_bytes(ZERO_MASS.format(mass=0).encode())
    singular = [f for f in raw.findings if f.rule == "singular-model"]
    assert [f.span.line for f in singular] == [6, 8]  # the unused definition and the rate
    assert all(f.hint and "check their values" in f.hint for f in singular)
    assert raw.analysis is None and "expectation-failed" not in [f.rule for f in raw.findings]
    fine = analyse_bytes(ZERO_MASS.format(mass=2).encode())
    assert [f.span.line for f in fine.findings if f.rule == "singular-model"] == [6]
    assert fine.analysis is not None and fine.analysis["relative_degree"] == {"y": 2}


@pytest.mark.parametrize("term, python", [
    ("acos(c)", lambda c: math.acos(c)),
    ("asin(c/10)", lambda c: math.asin(c / 10)),
    ("sqrt(c)", lambda c: math.sqrt(c)),
    ("log(c)", lambda c: math.log(c)),
    ("c^(1/3)", lambda c: _real_or_raise(c ** (1 / 3))),
    ("acos(c/4)", lambda c: math.acos(c / 4)),
    ("log(-c)", lambda c: math.log(-c)),
])
def test_constants_outside_a_functions_domain_are_reported_where_written(term: str, python) -> None:  # type: ignore[no-untyped-def]
    """With c = -2 (and c/10 = -0.2 inside asin's domain), a term is defined exactly when
    Python's own math library can evaluate it (a ValueError, or a complex result of **,
    means it is not a real number: the reference). An undefined term in a definition is
    reported once, at the definition; the rate that uses it is then defined for no state
    and the analysis does not run."""
    text = (f"plant p\nconst c = -2\nstate x in -1 .. 1\ninput u in -1 .. 1\nlet k = {term}\n"
            "rate x = -k*x + u\noutput y = x\nexpect relative_degree(y) = 1\n")
    try:
        python(-2)
        defined = True
    except ValueError:
        defined = False
    raw = analyse_bytes(text.encode())
    singular = [f for f in raw.findings if f.rule == "singular-model"]
    if defined:
        assert not singular and raw.analysis is not None
    else:
        assert [f.span.line for f in singular] == [5] and "is not a real number" in singular[0].message
        assert raw.analysis is None


def _real_or_raise(value: complex | float) -> float:
    if isinstance(value, complex):
        raise ValueError("not real")
    return value


def test_point_values_and_range_bounds_outside_the_reals_are_named() -> None:
    text = (b"plant p\nconst c = -2\nstate x in -1 .. 1\ninput u in -1 .. 1\nrate x = -x + u\noutput y = x\n"
            b"point a: x = acos(c)/10\nparam k = 1 in sqrt(c) .. 2\n")
    found = {(f.rule, f.span.line): f.message for f in analyse_bytes(text).findings}
    assert "not a real number (acos(-2))" in found[("singular-model", 7)]
    assert "range bound of 'k' is not a real number" in found[("bad-range", 8)]


def test_shared_definitions_are_read_once_per_distinct_part() -> None:
    """Definitions that use the previous one twice (a_k = a_(k-1)^2 + a_(k-1)) double as
    trees at each level but stay one node per level as expressions (sympy shares them).
    The model layer's own walks (input degree, non-real constants) visit distinct nodes,
    so 60 levels are read in linear time; the degree bound is held against sympy's
    ``Poly`` degree on a small case."""
    from plantlint.language.model import _distinct_nodes, _input_degree, _not_real

    x, u = sp.symbols("x u")
    a = sp.sin(x) + 2 + u
    for _ in range(60):
        a = a * a + a
    assert len(_distinct_nodes(a)) <= 3 * 60 + 10
    assert _input_degree(a, frozenset({u})) == 2**60  # the bound multiplies, and it is exact here
    assert _not_real(a) is None
    small = (x + u) ** 2 * u + x
    assert _input_degree(small, frozenset({u})) == sp.Poly(small.expand(), u).degree() == 3


def test_hints_stop_at_their_budget() -> None:
    """Each "did you mean" compares a misspelt name with every declared name; a file of
    2,000 misspelt names among 2,000 constants gets hints until the file's budget of
    comparisons is spent, and the rest of its problems without one (each still reported)."""
    from plantlint.language.names import HINT_COMPARISONS

    raw = analyse_bytes(CASES["many_misspelt_names"][0](), Config())
    unknown = [f for f in raw.findings if f.rule == "unknown-name"]
    assert len(unknown) == 2000
    hinted = [f for f in unknown if f.hint]
    assert 0 < len(hinted) <= HINT_COMPARISONS // 2000
    assert all(f.hint is not None and f.hint.startswith("did you mean `kq") for f in hinted)
