"""Dimension checks on declared units (plantlint.language.units).

Unit relations are held against the SI Brochure (BIPM, The International System of
Units, 9th edition 2019): table 4 (coherent derived units with special names, each
with its expression in other SI units) and table 8 (non-SI units accepted for use
with the SI, with their values in SI units). Model numbers here are invented.
"""

from __future__ import annotations

import json
import math
import re
import subprocess
import sys
from pathlib import Path

import pytest

from plantlint.language import units
from plantlint.language.units import UnitTextError, parse_unit_text, unit_of
from plantlint.run.pipeline import read_model
from conftest import PINT_PROBE, REPO

ROOT = REPO
EXAMPLE_MODELS = ROOT / "example_repo" / "models"


def unit_findings(text: str) -> list[tuple[str, int, int, int, str]]:
    _model, findings = read_model(text.encode("utf-8"), "test.plant")
    return sorted((f.rule, f.span.line, f.span.column, f.span.end_column, f.message)
                  for f in findings if f.rule.startswith("unit-") and f.span is not None)


# -- unit relations -------------------------------------------------------------------

# SI Brochure 9th ed. (2019), table 4: the derived unit and its expression in other SI units.
SI_TABLE_4 = [
    ("N", "kg*m/s^2"),    # newton
    ("J", "N*m"),         # joule
    ("W", "J/s"),         # watt
    ("V*A", "W"),         # volt = W/A
    ("Pa", "N/m^2"),      # pascal
    ("C", "A*s"),         # coulomb
    ("ohm", "V/A"),       # ohm
    ("F", "C/V"),         # farad
    ("H", "Wb/A"),        # henry
    ("Wb", "V*s"),        # weber
    ("Hz", "1/s"),        # hertz = s^-1
    ("rad", "m/m"),       # radian = m/m = 1
    ("rad", "1"),
]


@pytest.mark.parametrize(("left", "right"), SI_TABLE_4)
def test_coherent_derived_units_agree(left: str, right: str) -> None:
    assert unit_of(left).agrees(unit_of(right))


# SI Brochure 9th ed. (2019), table 8, and the SI prefixes (table 7).
SI_TABLE_8 = [
    ("min", 60.0, "s"),
    ("h", 3600.0, "s"),
    ("L", 1e-3, "m^3"),         # 1 L = 1 dm^3 = 10^-3 m^3
    ("t", 1e3, "kg"),           # tonne
    ("deg", math.pi / 180, "rad"),
    ("kN", 1e3, "N"),           # kilo = 10^3
    ("mm", 1e-3, "m"),          # milli = 10^-3
]


@pytest.mark.parametrize(("unit", "factor", "base"), SI_TABLE_8)
def test_accepted_units_have_their_value_in_si_units(unit: str, factor: float, base: str) -> None:
    u, b = unit_of(unit), unit_of(base)
    assert u.same_dimension(b)
    assert math.isclose(u.factor / b.factor, factor, rel_tol=1e-12)
    assert not u.agrees(b)  # a different scale is not the same unit


def test_units_of_different_dimension_do_not_agree() -> None:
    # momentum (kg*m/s) is not force (kg*m/s^2): SI Brochure table 5 lists them apart
    assert not unit_of("N").same_dimension(unit_of("kg*m/s"))
    assert unit_of("N*s").agrees(unit_of("kg*m/s"))


# -- the unit grammar -------------------------------------------------------------------

@pytest.mark.parametrize("text", ["kg*m^2/s^2", "1/min", "Hz^(1/2)", "m^2.5/s", "N*m*s/rad", "(kg*m)/(s^2)",
                                  "m^3/s/V", "1", "s^-1", "W*K^(-1)", " m / s "])
def test_accepted_unit_texts(text: str) -> None:
    parse_unit_text(text)


def test_division_is_left_associative() -> None:
    # m^3/s/V is (m^3/s)/V, the flow per volt of a pump (common practice)
    assert unit_of("m^3/s/V").agrees(unit_of("m^3/(s*V)"))
    assert unit_of("Hz^(1/2)").agrees(unit_of("s^(-1/2)"))


@pytest.mark.parametrize(("text", "offset"), [
    ("kg m", 3),          # no implicit product
    ("m**2", 2),          # Python's power operator is not unit grammar
    ("m^x", 2),
    ("2*m", 0),           # numbers other than 1
    ("m/", 2),
    ("%", 0),
    ("m^99", 2),
    ("\u00b5m", 0),       # non-ASCII
    ("m)", 1),
    ("__import__('os')", 11),
])
def test_rejected_unit_texts_say_where(text: str, offset: int) -> None:
    with pytest.raises(UnitTextError) as err:
        parse_unit_text(text)
    assert err.value.offset == offset


def test_deep_parentheses_are_refused() -> None:
    with pytest.raises(UnitTextError, match="too deep"):
        parse_unit_text("(" * 30 + "m" + ")" * 30)


def test_pint_only_ever_sees_single_names(monkeypatch: pytest.MonkeyPatch) -> None:
    seen: list[str] = []
    real = units.resolve_name

    def recording(name: str) -> units.Unit | None:
        seen.append(name)
        return real(name)

    monkeypatch.setattr(units, "resolve_name", recording)
    unit_findings(PENDULUM.replace("[N*m]", "[kg*m^2/s^2]").replace("[m]", "[xyz/(s^2)]", 1))
    assert seen and all(re.fullmatch(r"[A-Za-z_][A-Za-z0-9_]*", n) for n in seen)


# -- models -------------------------------------------------------------------------------

PENDULUM = """\
plant pendulum "Damped pendulum driven at the pivot"
const g   = 9.81  [m/s^2]
param L   = 0.8   [m]
param m   = 1.5   [kg]
param b   = 0.05  [N*m*s/rad]
state th  [rad]   in -1.2 .. 1.2
state w   [rad/s] in -4 .. 4
input tau [N*m]   in -20 .. 20
rate th = w
rate w  = -g/L*sin(th) - b*w/(m*L^2) + tau/(m*L^2)
output tip [m] = L*sin(th)
"""


def test_consistent_pendulum_passes() -> None:
    # rate w: g/L [1/s^2]; b*w/(m L^2) = N*m*s/rad * rad/s / (kg*m^2) = 1/s^2 (N*m = kg*m^2/s^2,
    # SI Brochure table 4); tau/(m L^2) likewise; radians count as 1
    assert unit_findings(PENDULUM) == []


def test_consistent_crane_fixture_passes() -> None:
    text = (ROOT / "tests" / "fixtures" / "rules" / "unit-mismatch.ok.plant").read_text(encoding="utf-8")
    assert unit_findings(text) == []


def test_slip_in_a_term_is_found_at_the_term() -> None:
    # g*sin(th) is an acceleration (m/s^2), the other terms are angular (1/s^2): the
    # rate of w must be in rad/s^2, so the finding is on the term that differs from it
    text = PENDULUM.replace("-g/L*sin(th)", "-g*sin(th)")
    (finding,) = unit_findings(text)
    assert finding[:4] == ("unit-mismatch", 10, 11, 21)
    assert "'-g*sin(th)' is in m/s^2" in finding[4]


def test_rate_in_the_wrong_unit_is_found_at_the_rate() -> None:
    text = PENDULUM.replace("rate th = w\n", "rate th = w*L\n")
    (finding,) = unit_findings(text)
    assert finding[:4] == ("unit-mismatch", 9, 11, 14)
    assert "rate of 'th'" in finding[4] and "1/s" in finding[4]


def test_function_arguments_must_be_plain_numbers() -> None:
    text = PENDULUM.replace("L*sin(th)\n", "L*sin(th*L)\n")
    (finding,) = unit_findings(text)
    assert finding[:4] == ("unit-mismatch", 11, 24, 28)
    assert "argument of sin must be dimensionless" in finding[4]


def test_degrees_are_not_radians() -> None:
    # 1 deg = pi/180 rad (SI Brochure table 8): sin of a number of degrees is a slip
    # (a number is a coefficient, not a conversion: the conversion is a constant with its unit)
    text = (PENDULUM.replace("state th  [rad]", "state th  [deg]")
            .replace("rate th = w", "rate th = w*per_rad").replace('const g', 'const per_rad = 180/pi [deg/rad]\nconst g'))
    findings = unit_findings(text)
    assert [f[:4] for f in findings] == [("unit-mismatch", 11, 20, 22), ("unit-mismatch", 12, 24, 26)]
    assert all("deg" in f[4] and "radians" in f[4] for f in findings)


def test_output_range_and_value_against_their_declarations() -> None:
    text = (PENDULUM.replace("output tip [m]", "output tip [mm]")
            .replace("param m   = 1.5   [kg]", "param m   = 1.5*L [kg]")
            .replace("in -20 .. 20", "in -m .. 20"))
    findings = unit_findings(text)
    assert [f[:4] for f in findings] == [
        ("unit-mismatch", 4, 13, 18),   # the value 1.5*L is in m
        ("unit-mismatch", 8, 22, 24),   # the lower bound -m is in kg, tau in N*m
        ("unit-mismatch", 11, 19, 28),  # tip is in m, declared mm
    ]
    assert "factor 1000" in findings[2][4] or "factor 0.001" in findings[2][4]


def test_scale_slip_in_a_sum() -> None:
    # mm and m have one dimension; adding their numbers is still wrong (factor 10^-3)
    text = PENDULUM.replace("param L   = 0.8   [m]", "param L   = 0.8   [m]\nparam d = 5 [mm]").replace(
        "L*sin(th)\n", "L*sin(th) + d\n")
    (finding,) = unit_findings(text)
    assert finding[:4] == ("unit-mismatch", 12, 30, 31)
    assert "same dimension on different scales" in finding[4]


def test_names_without_units_are_not_guessed() -> None:
    text = PENDULUM.replace("param b   = 0.05  [N*m*s/rad]", "param b   = 0.05").replace(
        "output tip [m] = L*sin(th)", "output tip [m] = L*sin(th) + b")
    assert unit_findings(text) == []


def test_model_without_units_is_untouched() -> None:
    text = re.sub(r"\[[^\]]*\]", "", PENDULUM)
    _model, findings = read_model(text.encode(), "x.plant")
    _model2, findings2 = read_model(PENDULUM.encode(), "x.plant")
    assert not any(f.rule.startswith("unit-") for f in findings)
    assert [f.rule for f in findings] == [f.rule for f in findings2]


def test_unknown_unit_is_reported_at_its_text() -> None:
    text = PENDULUM.replace("param L   = 0.8   [m]", "param L   = 0.8   [xyz]").replace(
        "[N*m*s/rad]", "[N*m*s/Rad]")
    findings = unit_findings(text)
    assert [f[:4] for f in findings] == [("unit-unknown", 3, 20, 23), ("unit-unknown", 5, 26, 29)]
    assert "unknown unit 'xyz'" in findings[0][4]


def test_unknown_unit_suggests_the_known_spelling() -> None:
    # a whole model: one whose names do not resolve (no state) is not read for units
    _model, findings = read_model(b'plant r\nparam R = 2 [Ohm]\nparam A = 1 [m2]\nstate x\nrate x = -R*A*x\n', "r.plant")
    hints = [f.hint for f in findings if f.rule == "unit-unknown"]
    assert hints == ["did you mean ohm?", "did you mean m^2?"]


def test_a_model_whose_names_do_not_resolve_is_not_read_for_units() -> None:
    """Like a file that does not parse: its units are checked once its names resolve."""
    _model, findings = read_model(b'plant r\nparam R = 2 [Ohm]\nstate x\nrate x = -R*y\n', "r.plant")
    assert [f.rule for f in findings] == ["unknown-name"]


def test_one_unit_of_time_for_all_rates() -> None:
    # a process model written per minute throughout is consistent (1 min = 60 s, SI table 8)
    reactor = """\
plant tank "Stirred tank, per minute"
param q = 10 [L/min]
param V = 200 [L]
param k = 0.3 [1/min]
state c [mol/L] in 0 .. 2
state T [K] in 280 .. 400
input c_in [mol/L] in 0 .. 2
input T_j [K] in 280 .. 400
rate c = q/V*(c_in - c)
rate T = k*(T_j - T)
"""
    assert unit_findings(reactor) == []
    mixed = reactor.replace("param k = 0.3 [1/min]", "param k = 0.005 [1/s]")
    (finding,) = unit_findings(mixed)
    assert finding[:3] == ("unit-mismatch", 9, 10)  # per minute, while rate T is per second
    assert "per minute" in finding[4]


def test_nondimensional_model_keeps_rates_in_state_units() -> None:
    text = 'plant n\nstate x [1] in -1 .. 1\ninput u [1]\nrate x = -x + u\noutput y [1] = x\n'
    assert unit_findings(text) == []


def test_hostile_unit_texts_become_findings() -> None:
    long_unit = "m*" * 150 + "m"
    text = f"plant h\nparam a = 1 [{long_unit}]\nparam b = 1 [m^(1/0)]\nparam c = 1 [s^-1e9]\nstate x [m]\nrate x = 0\n"
    rules = [f[0] for f in unit_findings(text)]
    assert rules == ["unit-unknown"] * 3


# -- example repository -----------------------------------------------------------------------

def test_example_repository_units() -> None:
    """The demo models are consistent, apart from the one slip the example README describes."""
    found = []
    for path in sorted(EXAMPLE_MODELS.glob("*/*.plant")):
        if path.parent.name == "archive":
            continue
        _model, findings = read_model(path.read_bytes(), str(path))
        found += [(path.name, f.rule, f.span.line, f.span.column) for f in findings if f.rule.startswith("unit-")]
    assert found == [("rinse_tanks.plant", "unit-mismatch", 22, 18)]


# -- pint stays out of runs without units or with tabled units --------------------------------


# no units; units all in the shipped table (unit_table.json); one name only pint knows (a plural)
@pytest.mark.parametrize(("variant", "loaded"), [("none", False), ("tabled", False), ("untabled", True)])
def test_pint_is_imported_only_when_units_are_declared(tmp_path: Path, variant: str, loaded: bool) -> None:
    text = {"none": re.sub(r"\[[^\]]*\]", "", PENDULUM), "tabled": PENDULUM,
            "untabled": PENDULUM.replace("output tip [m]", "output tip [meters]")}[variant]
    model = tmp_path / "pendulum.plant"
    model.write_text(text, encoding="utf-8")
    other = tmp_path / "pendulum_2.plant"  # two models: the parent imports what the workers share
    other.write_text(text, encoding="utf-8")
    out = subprocess.run([sys.executable, "-c", PINT_PROBE, str(model), str(tmp_path / "report.json"), str(other)],
                         cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    result = json.loads(out.stdout.strip().splitlines()[-1])
    assert result["parent"] is loaded and result["worker"] is loaded


def test_cache_key_follows_the_units_checker(monkeypatch: pytest.MonkeyPatch) -> None:
    from plantlint.run import runner

    cache = runner.Cache(None, "settings")
    before = cache.key(PENDULUM.encode())
    monkeypatch.setattr(runner, "UNITS_VERSION", runner.UNITS_VERSION + 1)
    assert cache.key(PENDULUM.encode()) != before


# -- hostile input ------------------------------------------------------------------------------

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="kgmsNA1234567890*/^()-. _%\u00b5xyzOhm", max_size=40))
def test_any_unit_text_is_read_or_refused_cleanly(text: str) -> None:
    try:
        parse_unit_text(text)
    except UnitTextError as exc:
        assert 0 <= exc.offset <= len(text)
    model = f"plant u\nparam p = 1 [{text}]\nstate x [m] in 0 .. 1\nrate x = p*x\n"
    if "]" not in text and "[" not in text:
        unit_findings(model)  # never raises


def test_long_sums_and_deep_nesting_are_fine() -> None:
    terms = " + ".join(f"a*{i}" for i in range(3000))
    deep = "(" * 150 + "x" + ")" * 150
    text = f"plant l\nparam a = 1 [m/s]\nstate x [m] in 0 .. 1\nrate x = {terms} + {deep}\n"
    (finding,) = unit_findings(text)
    assert finding[0] == "unit-mismatch" and "'x'" in finding[4]  # the one term in m, not m/s


def test_extreme_unit_scales_do_not_crash() -> None:
    # yoctometre^12 is 1e-288 m^12 (SI prefixes, SI Brochure table 7); its cube underflows a float
    text = ("plant e\nparam a = 1 [ym^12]\nparam b = 1 [Ym^12]\nstate x [m] in 0 .. 1\n"
            "let c = a*a*a\nlet d = b*b*b\nrate x = x/c + x*d + x/(c*d)\n")
    for rule, *_ in unit_findings(text):
        assert rule == "unit-mismatch"


def test_scale_of_a_squared_time_is_not_shown_as_another_time_unit() -> None:
    # (m^3/s^2)/mm^2 = 1e6 m/s^2 (SI Brochure, 9th ed., table 7: milli = 1e-3). It is
    # also m/ms^2, but nobody wrote a millisecond: the message shows the factor instead.
    scaled = unit_of("m^3/s^2") / unit_of("mm^2")
    assert math.isclose(scaled.factor, 1e6) and scaled.base_text() == "1e+06 m/s^2"
    # a rate per minute is still shown per minute (1 K/min = 1/60 K/s)
    assert (unit_of("K") / unit_of("min")).base_text() == "K/min"
