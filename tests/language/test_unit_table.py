"""The shipped unit table (plantlint/language/unit_table.json, written by
tools/make_unit_table.py): the names a model commonly declares, read without pint.

The outside reference for every entry is pint itself (its default registry, reached
through ``Quantity.to_base_units``, a route the table's generator does not use), and for
the prefixes the SI Brochure (BIPM, The International System of Units, 9th edition 2019,
table 7). Model numbers here are invented.
"""

from __future__ import annotations

import importlib.util
import json
import math
import subprocess
import sys
from dataclasses import replace
from fractions import Fraction
from pathlib import Path

import pytest

from plantlint.language import units
from plantlint.language.syntax import parse_text
from plantlint.language.units import UnitTextError, parse_unit_text, unit_names
from plantlint.run.pipeline import read_model
from conftest import FIXTURES, PINT_PROBE, REPO

TOOL = REPO / "tools" / "make_unit_table.py"
TABLE = REPO / "checker" / "plantlint" / "language" / "unit_table.json"
UNITS = {name: (factor, tuple((d, e) for d, e in dims)) for name, (factor, dims, _) in
         json.loads(TABLE.read_text(encoding="utf-8"))["units"].items()}
#: Relative agreement with a pint release other than the one that made the table: pint
#: follows the CODATA adjustments (the dalton moved by 1.4e-9 from CODATA 2018 to 2022)
#: and computes prefixed factors in floating point (1e-9 or 1.0000000000000003e-9).
OTHER_RELEASE = 1e-8


def _same_release() -> bool:
    import pint

    return json.loads(TABLE.read_text(encoding="utf-8"))["pint_version"] == pint.__version__


def _tool():
    spec = importlib.util.spec_from_file_location("make_unit_table", TOOL)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


# -- (a) every entry is pint's meaning of the name ---------------------------------------------

def test_every_entry_agrees_with_pints_default_registry() -> None:
    # outside reference: pint's default registry, asked for each name's quantity in base units
    # (for an offset unit such as degC, the difference of two temperatures)
    ureg = units._registry()
    for name, (factor, dims) in UNITS.items():
        one = ureg.Quantity(1, name)
        base = (ureg.Quantity(2, name) - one).to_base_units() if not one._is_multiplicative else one.to_base_units()
        assert math.isclose(base.magnitude, factor, rel_tol=1e-12 if _same_release() else OTHER_RELEASE), name
        assert {d: Fraction(e) for d, e in base.dimensionality.items()} == {d: Fraction(e) for d, e in dims}, name


def test_a_tabled_name_means_exactly_what_pint_gave_before() -> None:
    # the same Unit (float factor to the last bit, dimension, text) as the pint route, so
    # every message that shows a factor stays byte-identical
    # (under another pint release: the same dimension and text, the factor within
    # OTHER_RELEASE; the table, not the installed pint, is what plantlint reads)
    for name in UNITS:
        tabled, through_pint = units.resolve_name(name), units.pint_unit(name)
        if _same_release():
            assert tabled == through_pint, name
        else:
            assert math.isclose(tabled.factor, through_pint.factor, rel_tol=OTHER_RELEASE), name
            assert tabled == replace(through_pint, factor=tabled.factor), name


# SI Brochure 9th ed. (2019), table 7: the SI prefixes and their factors (micro written u).
SI_PREFIXES = {"Y": 24, "Z": 21, "E": 18, "P": 15, "T": 12, "G": 9, "M": 6, "k": 3, "h": 2, "da": 1,
               "d": -1, "c": -2, "m": -3, "u": -6, "n": -9, "p": -12, "f": -15, "a": -18, "z": -21, "y": -24}


@pytest.mark.parametrize("unit", ["m", "s", "N", "Pa", "V", "ohm", "mol", "L"])
def test_prefixed_entries_have_the_si_prefix_factors(unit: str) -> None:
    plain, plain_dims = UNITS[unit]
    for prefix, exp10 in SI_PREFIXES.items():
        if prefix + unit not in UNITS:
            assert (prefix, unit) == ("f", "m")  # fm is pint's fermi, left to pint (the same size)
            continue
        factor, dims = UNITS[prefix + unit]
        assert dims == plain_dims
        assert math.isclose(factor, plain * 10.0 ** exp10, rel_tol=1e-12), prefix + unit


def test_the_kilogram_is_the_prefixed_gram() -> None:
    # SI Brochure 9th ed. section 3: prefixes for the unit of mass attach to the gram
    assert UNITS["kg"] == (1.0, (("[mass]", 1),))
    assert all(isinstance(factor, float) for factor, _ in UNITS.values())
    assert math.isclose(UNITS["mg"][0], 1e-6, rel_tol=1e-12)


def test_a_prefixed_symbol_pint_reads_otherwise_is_left_to_pint() -> None:
    # 'mcd' is not millicandela to pint (its 'mc' is a micro prefix: microday): not tabled,
    # so it means what pint says, as before the table
    assert "mcd" not in UNITS and "cd" in UNITS
    assert units.resolve_name("mcd") == units.pint_unit("mcd")


# -- (b) the table is reproducible ----------------------------------------------------------------

def test_the_generator_gives_the_shipped_table() -> None:
    """The same names and meanings (the pint release it was made with may differ from the
    installed one: the test above holds every entry against the installed pint)."""
    shipped = json.loads(TABLE.read_text(encoding="utf-8"))
    made = json.loads(_tool().render())
    shipped.pop("pint_version"), made.pop("pint_version")
    if not _same_release():  # the same names, dimensions and pint names; factors within OTHER_RELEASE
        assert shipped["units"].keys() == made["units"].keys()
        for name, (factor, dims, pint_name) in shipped["units"].items():
            other = made["units"][name]
            assert (dims, pint_name) == (other[1], other[2]) and math.isclose(factor, other[0], rel_tol=OTHER_RELEASE)
        return
    assert made == shipped, "run: python tools/make_unit_table.py"


def _declared_names(path: Path) -> set[str]:
    out: set[str] = set()
    for st in parse_text(path.read_text(encoding="utf-8")).statements:
        if st.unit is None:
            continue
        try:
            out |= {ref.name for ref in unit_names(parse_unit_text(st.unit))}
        except UnitTextError:
            continue
    return out


def test_the_units_of_the_shipped_models_are_tabled() -> None:
    # every unit name in the demo repository and the rule fixtures that pint knows is in the
    # table (the others are the fixtures' deliberate slips)
    paths = sorted((REPO / "example_repo").rglob("*.plant")) + sorted(FIXTURES.rglob("*.plant"))
    declared = set().union(*(_declared_names(p) for p in paths))
    assert {"m", "s", "rad", "N", "kg", "K", "cm", "V", "L", "min", "mol", "ohm", "J", "H", "F"} <= declared
    untabled = {n for n in declared if n not in UNITS}
    assert all(units.pint_unit(n) is None for n in untabled), untabled


# -- (c) a model in tabled units is checked without pint --------------------------------------------


def test_check_of_a_model_in_tabled_units_does_not_import_pint(tmp_path: Path) -> None:
    # the demo repository's rinse tanks (per minute, litres, mol/L) carry one unit slip that
    # the example README describes: it is still found, with pint never imported
    model = REPO / "example_repo" / "models" / "process" / "rinse_tanks.plant"
    assert not units.needs_pint(model.read_bytes())
    report = tmp_path / "report.json"
    out = subprocess.run([sys.executable, "-c", PINT_PROBE, str(model), str(report)],
                         cwd=tmp_path, capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    result = json.loads(out.stdout.strip().splitlines()[-1])
    assert result == {"parent": False, "worker": False, "code": 1}
    findings = json.loads(report.read_text(encoding="utf-8"))["files"][0]["findings"]
    assert [(f["line"], f["column"]) for f in findings if f["rule"] == "unit-mismatch"] == [(22, 18)]


def test_needs_pint_reads_only_unit_text() -> None:
    text = b'plant p "a [furlong] in the title"\n# [furlong] in a comment\nstate x [m] in 0 .. 1\nrate x = -x\n'
    assert not units.needs_pint(text)
    assert units.needs_pint(text.replace(b"[m]", b"[m/furlong]"))
    assert not units.needs_pint(b"plant p\nstate x in 0 .. 1\nrate x = -x\n")


# -- (d) a name not in the table still goes to pint -------------------------------------------------

def test_an_untabled_unit_is_read_by_pint() -> None:
    # 1 furlong = 660 ft = 201.168 m (NIST SP 811, appendix B, from memory; pint's furlong is
    # the US survey one, 201.16840 m, the same to the 6 digits shown)
    assert "furlong" not in UNITS
    text = ('plant p\nparam L = 0.8 [furlong]\nstate th [rad] in -1 .. 1\ninput u [rad/s]\n'
            'rate th = u\noutput tip [m] = L*sin(th)\n')
    _model, findings = read_model(text.encode(), "p.plant")
    (mismatch,) = [f for f in findings if f.rule == "unit-mismatch"]
    assert "is in 201.168 m" in mismatch.message and "factor 201.168" in mismatch.message
    assert not [f for f in findings if f.rule == "unit-unknown"]
    assert units.resolve_name("xyz") is None  # a name pint does not know stays unknown
