"""Output formats, rendered from hand-built reports.

SARIF is validated against the published OASIS schema (a copy in tests/standards), the
JSON report against the schema plantlint ships; column placement in the text
view is held against Python's own ``str.expandtabs``.
"""

from __future__ import annotations

import io
import json
import subprocess
import sys
from dataclasses import replace
from typing import Any

import jsonschema
import pytest

from plantlint.core.catalogue import load_catalogue
from plantlint.core.findings import Adjustment, FileReport, Finding, Report, Severity, Span
from plantlint.report.formats import FORMATS, get_formatter
from plantlint.report.formats.base import change_text
from plantlint.report.formats.json_report import build_report, report_schema
from plantlint.report.formats.sarif import artifact_location, build_sarif
from plantlint.report.formats.text import excerpt
from conftest import REPO

REPO_ROOT = REPO
SARIF_SCHEMA = REPO_ROOT / "tests" / "standards" / "sarif-schema-2.1.0.json"  # OASIS SARIF 2.1.0

# Invented demo model; the tab on line 3 and the two-line rate exercise column handling.
SOURCE = (
    "plant demo\n"
    "param k = 2 in 1 .. 3\n"
    "\tstate x [m] in 4 .. -4\n"
    "input u\n"
    "rate x = -k*x +\n"
    "   abs(u)\n"
    "output y = x\n"
)


def _findings() -> list[Finding]:
    return [
        Finding("non-smooth", Severity.ERROR, "abs is not smooth", Span(5, 10, 6, 10),
                hint="use sqrt(u^2 + eps^2)", anchor="rate x"),
        Finding("bad-range", Severity.ERROR, "range of x is empty (4 >= -4)", Span(3, 17, 3, 24), anchor="state x"),
        Finding("zero-dynamics-critical", Severity.WARNING, "eigenvalue 0 at rest", None, point="rest",
                anchor="output y", waived=True, reason="free integrator, reviewed"),
        Finding("unused-name", Severity.WARNING, "param k is unused", Span(2, 7, 2, 8), anchor="param k"),
    ]


def _report(**kwargs: Any) -> Report:
    files = [
        FileReport("models/demo.plant", "demo", _findings(), analysis={"relative_degree": {"y": 1}}, source=SOURCE),
        FileReport("clean.plant", "clean", [], source="plant clean\n"),
    ]
    return Report(files=files, tool_version="0.1.0", **kwargs)


def _since_report() -> Report:
    report = _report(since="main")
    states = ["introduced", "known", "known", "introduced"]
    demo = report.files[0]
    demo.findings = [replace(f, baseline=s) for f, s in zip(demo.findings, states)]
    demo.findings.append(Finding("missing-rate", Severity.ERROR, "state z has no rate", Span(9, 1, 9, 8),
                                 anchor="state z", baseline="fixed"))
    demo.structure_changes = [{"what": "relative degree of y", "before": 2, "after": 1}]
    return report


def _render(name: str, report: Report, color: bool = False) -> str:
    out = io.StringIO()
    get_formatter(name).render(report, out, color=color)
    return out.getvalue()


# -- registry -------------------------------------------------------------------


def test_registry_names_and_lookup() -> None:
    assert list(FORMATS) == ["text", "lines", "json", "sarif", "markdown"]
    assert get_formatter("sarif") is FORMATS["sarif"]
    with pytest.raises(ValueError, match="unknown format 'xml'"):
        get_formatter("xml")


@pytest.mark.parametrize("name", list(FORMATS))
def test_output_is_deterministic(name: str) -> None:
    assert _render(name, _report()) == _render(name, _report())
    assert _render(name, _since_report()) == _render(name, _since_report())


# -- lines --------------------------------------------------------------------------


def test_lines_format_lines_exactly() -> None:
    assert _render("lines", _report()).splitlines() == [
        (
            "models/demo.plant: waived: eigenvalue 0 at rest [zero-dynamics-critical] (point rest)"
            " (warning waived: free integrator, reviewed)"
        ),
        "models/demo.plant:2:7: warning: param k is unused [unused-name]",
        "models/demo.plant:3:17: error: range of x is empty (4 >= -4) [bad-range]",
        "models/demo.plant:5:10: error: abs is not smooth [non-smooth]",
    ]


def test_lines_format_under_since_marks_baseline_and_drops_fixed() -> None:
    lines = _render("lines", _since_report()).splitlines()
    assert len(lines) == 5
    assert lines[1] == "models/demo.plant:2:7: warning: param k is unused [unused-name] (introduced)"
    assert lines[3].endswith("[non-smooth] (introduced)")
    assert lines[4] == "models/demo.plant: note: structure changed since main: relative degree of y: 2 -> 1"
    assert not any("missing-rate" in line for line in lines)


def test_lines_format_keeps_one_finding_per_line_and_no_escapes() -> None:
    nasty = Finding("syntax", Severity.ERROR, "bad\nbyte \x1b[31m here\r", Span(1, 1, 1, 2))
    report = Report([FileReport("x.plant", None, [nasty])], "0.1.0")
    assert _render("lines", report) == "x.plant:1:1: error: bad byte ?[31m here [syntax]\n"


def test_lines_format_gives_waived_findings_their_own_word() -> None:
    """Counting `error:` in a CI log counts exactly the unwaived errors."""
    report = _report()
    demo = report.files[0]
    demo.findings = [replace(f, waived=True, reason="accepted in review 12") if f.rule == "bad-range" else f
                     for f in demo.findings]
    out = _render("lines", report)
    assert out.count(": error:") == 1 == report.counts()["errors"]
    assert "models/demo.plant:3:17: waived: range of x is empty (4 >= -4) [bad-range]" \
           " (error waived: accepted in review 12)" in out.splitlines()


def test_baseline_missing_under_since_is_a_caller_bug() -> None:
    report = _report(since="main")
    with pytest.raises(ValueError, match="baseline"):
        _render("lines", report)


# -- json -----------------------------------------------------------------------------


@pytest.fixture(scope="module")
def report_validator() -> jsonschema.protocols.Validator:
    schema = report_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


@pytest.mark.parametrize("make", [_report, _since_report])
def test_json_validates_and_round_trips(make: Any, report_validator: Any) -> None:
    report = make()
    data = json.loads(_render("json", report))
    report_validator.validate(data)
    assert data == json.loads(json.dumps(build_report(report)))
    assert data["format"] == "plantlint-report" and data["version"] == 2


def test_json_content() -> None:
    data = json.loads(_render("json", _report()))
    demo = data["files"][0]
    assert demo["analysis"] == {"relative_degree": {"y": 1}}
    assert [f["rule"] for f in demo["findings"]] == ["zero-dynamics-critical", "unused-name", "bad-range", "non-smooth"]
    waived = demo["findings"][0]
    assert waived["line"] is None and waived["end_column"] is None
    assert waived["point"] == "rest" and waived["waived"] is True and waived["reason"] == "free integrator, reviewed"
    multi = demo["findings"][3]
    assert (multi["line"], multi["column"], multi["end_line"], multi["end_column"]) == (5, 10, 6, 10)
    assert multi["fingerprint"] == _findings()[0].fingerprint("demo")
    assert data["summary"] == {"files": 2, "errors": 2, "warnings": 1, "notes": 0, "waived": 1, "not_decided": 0,
                               "not_checked": 0, "cut_short": 0, "outcome": "defect"}
    assert "since" not in data and "structure_changes" not in demo and "baseline" not in multi


def test_json_under_since() -> None:
    data = json.loads(_render("json", _since_report()))
    demo = data["files"][0]
    assert data["since"] == "main"
    assert [f["baseline"] for f in demo["findings"]] == ["known", "introduced", "known", "introduced", "fixed"]
    assert demo["structure_changes"] == [{"what": "relative degree of y", "before": 2, "after": 1}]
    assert data["files"][1]["structure_changes"] == []
    assert data["summary"]["introduced"] == 2 and data["summary"]["fixed"] == 1


def test_json_schema_rejects_what_it_should(report_validator: Any) -> None:
    good = json.loads(_render("json", _since_report()))
    broken = [
        lambda d: d["files"][0]["findings"][0].pop("baseline"),  # since without baseline
        lambda d: d["summary"].pop("fixed"),
        lambda d: d["files"][0]["findings"][0].update(severity="fatal"),
        lambda d: d["files"][0]["findings"][0].update(extra=1),
        lambda d: d.update(version=1),
        lambda d: d.pop("adjustments"),
        lambda d: d["adjustments"].append({"kind": "hide", "rules": ["syntax"], "level": None, "reason": None,
                                           "source": "x"}),
        lambda d: d.pop("since"),  # baseline keys without since
    ]
    for breaks in broken:
        data = json.loads(json.dumps(good))
        breaks(data)
        assert not report_validator.is_valid(data)


def test_parameter_box_records_follow_their_schema(report_validator: Any) -> None:
    """A model with ranged parameters (the quadruple-tank fixture) reports each point's
    verdicts over the parameter box; the schema describes them and rejects a record with
    an unknown outcome or a missing verdict."""
    path = REPO / "tests" / "fixtures" / "models" / "quadruple_tank.plant"
    run = subprocess.run([sys.executable, "-m", "plantlint", "check", "--no-cache", "--format", "json", str(path)],
                         capture_output=True, text=True, cwd=path.parent)
    data = json.loads(run.stdout)
    report_validator.validate(data)
    boxes = [p["parameter_box"] for p in data["files"][0]["analysis"]["points"].values() if "parameter_box" in p]
    assert boxes and all(b["zero_dynamics"]["outcome"] in ("proven", "violated", "undecided", "nominal_only")
                         for b in boxes)
    for breaks in (lambda b: b["zero_dynamics"].update(outcome="probably"), lambda b: b.pop("decoupling"),
                   lambda b: b.update(extra=1)):
        broken = json.loads(json.dumps(data))
        point = next(p for p in broken["files"][0]["analysis"]["points"].values() if "parameter_box" in p)
        breaks(point["parameter_box"])
        assert not report_validator.is_valid(broken)


def test_json_analysis_values_become_plain_data() -> None:
    report = _report()
    report.files[0].analysis = {"zeros": {3, 1}, "ratio": (1, 2.5), "bad": float("nan"), 7: object.__name__}
    data = json.loads(_render("json", report))
    assert data["files"][0]["analysis"] == {"zeros": [1, 3], "ratio": [1, 2.5], "bad": "nan", "7": "object"}


# -- sarif ------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def sarif_validator() -> Any:
    schema = json.loads(SARIF_SCHEMA.read_text(encoding="utf-8"))
    assert schema["$schema"] == "http://json-schema.org/draft-04/schema#"
    return jsonschema.Draft4Validator(schema)


@pytest.mark.parametrize("make", [_report, _since_report])
def test_sarif_validates_against_published_schema(make: Any, sarif_validator: Any) -> None:
    data = json.loads(_render("sarif", make()))
    errors = sorted(sarif_validator.iter_errors(data), key=lambda e: list(e.path))
    assert errors == [], errors[0].message if errors else ""


def test_sarif_rules_and_results() -> None:
    data = json.loads(_render("sarif", _report()))
    (run,) = data["runs"]
    rules = run["tool"]["driver"]["rules"]
    catalogue = load_catalogue()
    assert [r["id"] for r in rules] == list(catalogue.ids())
    nmp = rules[catalogue.index("zero-dynamics-unstable")]
    assert nmp["defaultConfiguration"]["level"] == "error"
    assert nmp["shortDescription"]["text"] == catalogue.get("zero-dynamics-unstable").title
    assert nmp["properties"]["tags"] == ["zero-dynamics"]
    results = run["results"]
    assert [r["ruleId"] for r in results] == ["zero-dynamics-critical", "unused-name", "bad-range", "non-smooth"]
    for result in results:
        assert rules[result["ruleIndex"]]["id"] == result["ruleId"]
    waived, _, bad_range, multi = results
    assert waived["suppressions"][0]["justification"] == "free integrator, reviewed"
    assert waived["properties"]["point"] == "rest"
    assert "region" not in waived["locations"][0]["physicalLocation"]
    assert "suppressions" not in bad_range
    assert multi["locations"][0]["physicalLocation"]["region"] == {
        "startLine": 5, "startColumn": 10, "endLine": 6, "endColumn": 10}
    assert multi["locations"][0]["physicalLocation"]["artifactLocation"]["uri"] == "models/demo.plant"


def test_sarif_baseline_states() -> None:
    results = json.loads(_render("sarif", _since_report()))["runs"][0]["results"]
    assert [r["baselineState"] for r in results] == ["unchanged", "new", "unchanged", "new", "absent"]


def test_sarif_fingerprints_survive_moved_spans() -> None:
    def fingerprints(report: Report) -> list[str]:
        results = build_sarif(report)["runs"][0]["results"]
        return sorted(r["partialFingerprints"]["plantlint/v1"] for r in results)

    before = _report()
    after = _report()
    after.files[0].findings = [
        replace(f, span=Span(f.span.line + 7, f.span.column + 2, f.span.end_line + 7, f.span.end_column + 2))
        if f.span else f
        for f in after.files[0].findings
    ]
    assert fingerprints(before) == fingerprints(after)
    renamed = _report()
    renamed.files[0].findings[1] = replace(renamed.files[0].findings[1], anchor="state w")
    assert fingerprints(before) != fingerprints(renamed)
    assert len(set(fingerprints(before))) == 4


def test_sarif_keeps_rule_index_valid_for_rules_outside_the_catalogue(sarif_validator: Any) -> None:
    report = Report([FileReport("a.plant", "a", [Finding("internal-error", Severity.ERROR, "boom")])], "0.1.0")
    data = build_sarif(report)
    sarif_validator.validate(data)
    run = data["runs"][0]
    assert run["tool"]["driver"]["rules"][run["results"][0]["ruleIndex"]]["id"] == "internal-error"


@pytest.mark.parametrize(
    ("path", "expected"),
    [
        ("models/crane.plant", {"uri": "models/crane.plant", "uriBaseId": "%SRCROOT%"}),
        ("./models/crane.plant", {"uri": "models/crane.plant", "uriBaseId": "%SRCROOT%"}),
        ("models\\win\\crane.plant", {"uri": "models/win/crane.plant", "uriBaseId": "%SRCROOT%"}),
        ("my models/a#1.plant", {"uri": "my%20models/a%231.plant", "uriBaseId": "%SRCROOT%"}),
        ("/abs/path/a.plant", {"uri": "file:///abs/path/a.plant"}),
        ("C:\\work\\a.plant", {"uri": "file:///C:/work/a.plant"}),
        ("m/caf\u00e9.plant", {"uri": "m/caf%C3%A9.plant", "uriBaseId": "%SRCROOT%"}),  # UTF-8 name
        ("m/caf\udce9.plant", {"uri": "m/caf%E9.plant", "uriBaseId": "%SRCROOT%"}),  # Latin-1 byte 0xe9
        ("/m/caf\udce9.plant", {"uri": "file:///m/caf%E9.plant"}),
    ],
)
def test_sarif_artifact_locations(path: str, expected: dict[str, str]) -> None:
    assert artifact_location(path) == expected


# -- text ---------------------------------------------------------------------------------


def test_text_has_no_escapes_without_color_and_some_with() -> None:
    plain = _render("text", _report())
    assert "\x1b" not in plain
    assert "\x1b[" in _render("text", _report(), color=True)


def _underline_under(output: str, line_number: int) -> str:
    """The source characters above the dashes of the excerpt for ``line_number``."""
    lines = output.splitlines()
    label = f"line {line_number}: "
    index = next(i for i, text in enumerate(lines) if text.lstrip().startswith(label))
    quoted, marks = lines[index], lines[index + 1]
    start = marks.index("-")
    end = len(marks.split(" ...")[0].rstrip())
    return quoted[start:end]


def test_text_underlines_the_exact_columns_with_tabs() -> None:
    out = _render("text", _report())
    # columns 17..23 of line 3 are "4 .. -4"; the tab is expanded exactly like str.expandtabs(4)
    assert SOURCE.splitlines()[2][16:23] == "4 .. -4"
    assert _underline_under(out, 3) == "4 .. -4"
    assert "\tstate x [m] in 4 .. -4".expandtabs(4) in out
    assert _underline_under(out, 2) == "k"


def test_text_multi_line_span_marks_continuation() -> None:
    out = _render("text", _report())
    assert _underline_under(out, 5) == "-k*x +"
    assert "continues to line 6" in out


def test_text_finding_without_span_has_no_excerpt_but_keeps_reason() -> None:
    out = _render("text", _report())
    block = out.split("zero-dynamics-critical")[1].split("unused-name")[0]
    assert "line " not in block
    assert "eigenvalue 0 at rest" in block and "waived" in block and "free integrator, reviewed" in block
    assert "hint: use sqrt(u^2 + eps^2)" in out


def test_text_summary_and_verdict() -> None:
    out = _render("text", _report())
    assert "checked 2 files: 2 errors, 1 warning, 0 notes, 1 waived" in out
    assert out.rstrip().splitlines()[-1] == "FAILED: 2 unwaived findings at or above error"
    report = _report()
    report.files[0].findings = [f for f in report.files[0].findings if f.severity is not Severity.ERROR]
    assert _render("text", report).rstrip().splitlines()[-1] == "PASSED: no unwaived finding at or above error"
    report.fail_on = Severity.WARNING
    assert _render("text", report).rstrip().splitlines()[-1] == "FAILED: 1 unwaived finding at or above warning"
    report.files = []  # every path given left out by the configuration (a hook on an archived model)
    assert (_render("text", report).rstrip().splitlines()[-1]
            == "PASSED: no model to check (the files given are left out by the configuration)")


def test_text_under_since() -> None:
    out = _render("text", _since_report())
    assert "since main: 2 introduced, 2 known, 1 fixed" in out
    assert "fixed    missing-rate: state z has no rate" in out
    assert out.rstrip().splitlines()[-1] == "FAILED: 1 unwaived finding at or above error introduced since main"


def test_text_and_lines_use_one_word_for_new_findings() -> None:
    text = _render("text", _since_report())
    lines = _render("lines", _since_report())
    assert "(introduced)" in text and "(introduced)" in lines
    assert "new since" not in text and "new since" not in lines


def test_a_deleted_model_is_not_counted_as_checked() -> None:
    report = _since_report()
    gone = FileReport("models/gone.plant", "gone", [Finding("unused-name", Severity.WARNING, "param q is unused",
                                                            None, anchor="param q", baseline="fixed")],
                      structure_changes=[{"what": "model", "before": "present", "after": "deleted"}], deleted=True)
    report.files.append(gone)
    assert report.counts()["files"] == 2
    assert "checked 2 files (1 deleted since main, not counted): " in _render("text", report)
    assert json.loads(_render("json", report))["summary"]["files"] == 2


def test_text_never_interprets_file_text() -> None:
    source = "plant x\nrate x = [bold]y[/bold] \x1b[2J :smile:\n"
    finding = Finding("syntax", Severity.ERROR, "[red]oops[/red] \x1b[31m", Span(2, 10, 2, 25))
    out = _render("text", Report([FileReport("x.plant", "x", [finding], source=source)], "0.1.0"), color=True)
    assert "[red]oops[/red]" in out and "[bold]y[/bold]" in out and ":smile:" in out
    assert "oops[/red] ?[31m" in out  # the message's own escape sequence is neutralised
    assert "\x1b[2J" not in out and "?[2J" in out


def test_excerpt_edge_cases() -> None:
    assert excerpt(None, Span(1, 1, 1, 2)) is None
    assert excerpt("a\n", None) is None
    assert excerpt("a\n", Span(9, 1, 9, 2)) is None  # stale span past the end
    at_end = excerpt("rate x =\n", Span(1, 9, 1, 10))  # unexpected end of statement
    assert at_end is not None and (at_end.start, at_end.width) == (8, 1)
    wide = excerpt("let \u5f62 = x\n", Span(1, 5, 1, 6))  # a double-width character
    assert wide is not None and (wide.start, wide.width) == (4, 2)


def test_long_lines_are_cut_around_the_span() -> None:
    line = "rate x = " + " + ".join(f"a{i}" for i in range(120))
    column = line.index("a100") + 1
    report = Report([FileReport("long.plant", "long", [Finding("unknown-name", Severity.ERROR, "a100 is unknown",
                                                                Span(1, column, 1, column + 4))], source=line)], "0.1.0")
    out = _render("text", report)
    assert _underline_under(out, 1) == "a100"
    quoted = next(text for text in out.splitlines() if "line 1: " in text)
    assert quoted.split("line 1: ")[1].startswith("...") and len(quoted) < 160


def test_text_says_when_the_structure_was_not_analysed() -> None:
    import io

    from plantlint.core.findings import FileReport, Finding, Report, Severity, Span
    from plantlint.report.formats import get_formatter

    blocked = FileReport("m.plant", "m", [Finding("unknown-name", Severity.ERROR, "unknown name 'J'",
                                                   Span(3, 5, 3, 6), anchor="name J")], None, "a\nb\nc   J\n")
    analysed = FileReport("n.plant", "n", [Finding("zero-dynamics-unstable", Severity.ERROR, "unstable",
                                                    Span(1, 1, 1, 2), anchor="point p")], {"states": []}, "x\n")
    out = io.StringIO()
    get_formatter("text").render(Report([blocked, analysed], "0"), out, color=False)
    text = out.getvalue()
    assert text.count("was not analysed") == 1
    assert text.index("was not analysed") < text.index("n.plant")


# -- settings that drop or re-grade findings (skip, only, severity) -------------------

def _adjusted(report: Report) -> Report:
    report.adjustments = (
        Adjustment("skip", ("not-involutive",), "full-state linearization is not used on this line",
                   "plantlint.toml"),
        Adjustment("severity", ("unused-name",), "spare parameters are kept for the next revision",
                   "plantlint.toml", Severity.NOTE),
        Adjustment("only", ("bad-range", "non-smooth", "unused-name", "zero-dynamics-critical"), "",
                   "--only on the command line"),
    )
    return report


@pytest.mark.parametrize("make", [_report, _since_report])
def test_every_format_lists_the_active_settings_with_reasons(make: Any, report_validator: Any,
                                                               sarif_validator: Any) -> None:
    report = _adjusted(make())
    text = " ".join(_render("text", report).split())
    assert ("rule not-involutive skipped by plantlint.toml: full-state linearization is not used on this line"
            in text)
    assert "rule unused-name reported as note by plantlint.toml: spare parameters are kept for the next revision" in text
    assert "only rules bad-range, non-smooth, unused-name, zero-dynamics-critical reported by --only on the command line" in text
    lines = _render("lines", report).splitlines()
    assert "plantlint.toml: note: rule not-involutive skipped: full-state linearization is not used on this line" in lines
    assert ("plantlint.toml: note: rule unused-name reported as note: spare parameters are kept for the next revision"
            in lines)
    assert ("plantlint: note: only rules bad-range, non-smooth, unused-name, zero-dynamics-critical reported by --only"
            " on the command line") in lines
    data = json.loads(_render("json", report))
    report_validator.validate(data)
    assert data["adjustments"][:2] == [
        {"kind": "skip", "rules": ["not-involutive"], "level": None,
         "reason": "full-state linearization is not used on this line", "source": "plantlint.toml"},
        {"kind": "severity", "rules": ["unused-name"], "level": "note",
         "reason": "spare parameters are kept for the next revision", "source": "plantlint.toml"},
    ]
    assert data["adjustments"][2]["reason"] is None
    sarif = json.loads(_render("sarif", report))
    sarif_validator.validate(sarif)
    (invocation,) = sarif["runs"][0]["invocations"]
    overrides = {o["descriptor"]["id"]: o["configuration"] for o in invocation["ruleConfigurationOverrides"]
                 if o["configuration"]["properties"]["setting"] != "only"}
    assert overrides["not-involutive"]["enabled"] is False
    assert overrides["not-involutive"]["properties"]["reason"] == "full-state linearization is not used on this line"
    assert overrides["unused-name"]["level"] == "note"
    rules = sarif["runs"][0]["tool"]["driver"]["rules"]
    for o in invocation["ruleConfigurationOverrides"]:
        assert rules[o["descriptor"]["index"]]["id"] == o["descriptor"]["id"]
    left_out = {o["descriptor"]["id"] for o in invocation["ruleConfigurationOverrides"]
                if o["configuration"]["properties"]["setting"] == "only"}
    assert left_out == set(load_catalogue().ids()) - set(report.adjustments[2].rules)


def test_no_settings_means_no_settings_section() -> None:
    assert "settings that change" not in _render("text", _report())
    assert json.loads(_render("json", _report()))["adjustments"] == []
    # the invocation is there on every run (a consumer reads executionSuccessful), with no
    # overrides and no notifications when nothing was changed and everything was decided
    (invocation,) = json.loads(_render("sarif", _report()))["runs"][0]["invocations"]
    assert set(invocation) == {"executionSuccessful", "properties"}
    assert invocation["executionSuccessful"] is True


def test_waiver_changes_under_since_are_worded_as_waivers() -> None:
    assert change_text({"what": "waiver zero-dynamics-critical at rest", "before": None, "after": "outer loop"}) == \
        'waiver added: zero-dynamics-critical at rest: "outer loop"'
    assert change_text({"what": "waiver unused-name", "before": "spare", "after": None}) == \
        'waiver removed: unused-name (was: "spare")'
    assert change_text({"what": "waiver unused-name", "before": "spare", "after": "kept"}) == \
        'waiver reason changed: unused-name: "spare" -> "kept"'
    report = _since_report()
    report.files[0].structure_changes = [{"what": "waiver unused-name", "before": None, "after": "spare"}]
    assert 'models/demo.plant: note: changed since main: waiver added: unused-name: "spare"' in \
        _render("lines", report).splitlines()


def test_formats_are_loaded_when_asked_for() -> None:
    """JSON, SARIF, the one-line format and the text format without colour never load the
    terminal library (rich); the text format in colour does. Only a character beyond
    ASCII in a quoted source line has plain text ask rich for its width in terminal cells
    (rich.cells alone). A fresh interpreter, so that nothing else has imported rich."""
    code = ("import io, sys\n"
            "from plantlint.core.findings import FileReport, Finding, Report, Severity, Span\n"
            "from plantlint.report.formats import get_formatter\n"
            "color, source = sys.argv[1] == 'color', sys.argv[2].replace('_', '\\u5f62')\n"
            "f = Finding('unknown-name', Severity.ERROR, 'unknown name', Span(2, 5, 2, 6), anchor='x')\n"
            "report = Report([FileReport('w.plant', 'w', [f], source=source)], '0')\n"
            "for name in sys.argv[3:]:\n"
            "    get_formatter(name).render(report, io.StringIO(), color=color)\n"
            "print(' '.join(sorted(m for m in sys.modules if m.startswith('rich') and m.count('.') < 2)))\n")
    ascii_source, wide_source = "plant w\nlet v = x\n", "plant w\nlet _ = x\n"
    for args, check in (
            (["plain", ascii_source, "json", "sarif", "lines", "text"], lambda loaded: loaded == []),
            (["plain", wide_source, "text"], lambda loaded: "rich.cells" in loaded and "rich.console" not in loaded),
            (["color", ascii_source, "text"], lambda loaded: "rich.console" in loaded)):
        out = subprocess.run([sys.executable, "-c", code, *args], capture_output=True, text=True, check=True)
        assert check(out.stdout.split()), (args, out.stdout)


def _reports_to_draw() -> list[Report]:
    """Reports with every part of the text layout: findings with excerpts, hints, waivers,
    baselines and fixed findings, structure changes, adjustments, a double-width source
    character, tabs, a long message that wraps and a file that could not be checked."""
    from plantlint.core.findings import Stop

    wide = Finding("unknown-name", Severity.ERROR, "unknown name '\u5f62\u72b6' " + "and a long explanation " * 12,
                   Span(2, 5, 2, 7), hint="did you mean `x`? " * 8, anchor="let w")
    reports = [_report(), _since_report(), Report([FileReport("w.plant", "w", [wide],
                                                              source="plant w\nlet \u5f62\u72b6 = \tx\n")], "0.1.0")]
    report = _report(adjustments=(Adjustment("skip", ("unused-name",), "demo", "plantlint.toml", None),))
    report.files[1].stop = Stop("time", "envelope", ("structure",), "stopped at its 1 s budget in stage envelope")
    reports.append(report)
    return reports


def test_plain_text_is_what_rich_draws_without_colour(monkeypatch: pytest.MonkeyPatch) -> None:
    """Without colour the text format writes its lines itself; rich without colour (the
    console the format used before) draws the very same characters. The reference is
    rich's own rendering of the same styled lines."""
    from rich.console import Console

    from plantlint.report.formats import text as text_format

    def rich_plain(stream, color):  # type: ignore[no-untyped-def]
        return text_format.ColourWriter(Console(
            file=stream, force_terminal=False, no_color=True, color_system=None, width=text_format.report_width(),
            highlight=False, markup=False, emoji=False, soft_wrap=False, legacy_windows=False))

    for width in ("100", "60"):
        monkeypatch.setenv("COLUMNS", width)
        for report in _reports_to_draw():
            plain = _render("text", report)
            with monkeypatch.context() as m:
                m.setattr(text_format, "make_writer", rich_plain)
                drawn = _render("text", report)
            assert plain == drawn
            assert "\x1b[" not in plain


def test_text_wrapping_keeps_assignments_whole_and_loses_no_word() -> None:
    """Messages wrap at spaces, never inside ``name = value`` (common practice for
    readable terminal output); wrapping neither drops nor adds a word, held against
    Python's own ``str.split``."""
    from plantlint.report.formats.text import _wrap_lines

    message = ("the relative degree is not well defined on the whole envelope: L_g L_f ram vanishes at "
               "th = 0, w = 0 (exactly)")
    for width in range(20, 100):
        lines = _wrap_lines(message, width)
        assert all(len(line) <= width for line in lines), width
        assert " ".join(lines).split() == message.split(), width
        assert not any(line.endswith(("th", "=")) or line.startswith("=") for line in lines), (width, lines)

    bracket = "the bracket [g1, ad_f g2] leaves it (basis {g1, ad_f g1, ad_f^2 g3}), and L_g L_f^2 y vanishes"
    for width in range(20, 100):
        lines = _wrap_lines(bracket, width)
        assert " ".join(lines).split() == bracket.split(), width
        assert not any(line.endswith(("ad_f", "ad_f^2", "L_g", "L_f^2")) for line in lines), (width, lines)
