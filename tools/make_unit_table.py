"""Write checker/plantlint/language/unit_table.json: the unit names that plant models
commonly declare, each with the meaning pint's default registry gives it.

    python tools/make_unit_table.py           # rewrite the table
    python tools/make_unit_table.py --check   # exit 1 when the shipped table differs

The unit check (plantlint.language.units) looks a name up in this table first and
loads pint only for a name that is not in it, so a model written in the usual units
is checked without importing pint. Every meaning here is computed by the same
function the checker uses for a name that is not tabled (``units.pint_unit``), so a
tabled name gives byte-identical results; tests/language/test_unit_table.py holds the
table to pint and to this script's output.

Names covered: the SI base units and the coherent derived units with special names
(SI Brochure, 9th edition 2019, tables 2 and 4), by symbol and by name, with every SI
prefix of its table 7 (micro also as the ASCII ``u``); the non-SI units accepted for use
with the SI (table 8) that multiply (minute, hour, day, degree, hectare, litre, tonne,
electronvolt, dalton); and some units common in engineering models (rpm, bar, psi,
percent, degC, kWh, ...). Logarithmic units (neper, bel, decibel) are left to pint.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
TARGET = REPO / "checker" / "plantlint" / "language" / "unit_table.json"

#: SI prefixes, SI Brochure 9th ed. table 7: (symbol, name); micro also as ASCII u.
PREFIXES = [
    ("Y", "yotta"), ("Z", "zetta"), ("E", "exa"), ("P", "peta"), ("T", "tera"), ("G", "giga"),
    ("M", "mega"), ("k", "kilo"), ("h", "hecto"), ("da", "deca"), ("d", "deci"), ("c", "centi"),
    ("m", "milli"), ("u", "micro"), ("n", "nano"), ("p", "pico"), ("f", "femto"), ("a", "atto"),
    ("z", "zepto"), ("y", "yocto"),
]

#: Units that take prefixes: SI base units (table 2; the kilogram as prefixed gram),
#: coherent derived units with special names (table 4), and the litre (table 8).
#: (symbols, names)
PREFIXED = [
    (["m"], ["meter", "metre"]),
    (["g"], ["gram"]),
    (["s"], ["second"]),
    (["A"], ["ampere"]),
    (["K"], ["kelvin"]),
    (["mol"], ["mole"]),
    (["cd"], ["candela"]),
    (["rad"], ["radian"]),
    (["sr"], ["steradian"]),
    (["Hz"], ["hertz"]),
    (["N"], ["newton"]),
    (["Pa"], ["pascal"]),
    (["J"], ["joule"]),
    (["W"], ["watt"]),
    (["C"], ["coulomb"]),
    (["V"], ["volt"]),
    (["F"], ["farad"]),
    (["ohm"], ["ohm"]),
    (["S"], ["siemens"]),
    (["Wb"], ["weber"]),
    (["T"], ["tesla"]),
    (["H"], ["henry"]),
    (["lm"], ["lumen"]),
    (["lx"], ["lux"]),
    (["Bq"], ["becquerel"]),
    (["Gy"], ["gray"]),
    (["Sv"], ["sievert"]),
    (["kat"], ["katal"]),
    (["L", "l"], ["liter", "litre"]),
]

#: Units written without prefixes: SI Brochure 9th ed. table 8 (those that multiply),
#: the degree Celsius (table 4), and units common in engineering models.
PLAIN = [
    "min", "minute", "h", "hour", "hr", "d", "day", "week",
    "deg", "degree", "arcmin", "arcminute", "arcsec", "arcsecond",
    "ha", "hectare", "t", "tonne", "metric_ton", "eV", "Da", "dalton",
    "degC", "celsius", "degree_Celsius",
    "rpm", "revolution", "turn", "cycle",
    "bar", "mbar", "kbar", "atm", "psi", "torr", "mmHg",
    "percent", "ppm",
    "Wh", "kWh", "MWh", "GWh", "Ah", "mAh",
    "kph", "knot", "inch", "ft", "foot", "yd", "mi", "lb", "lbf", "gal", "cal", "kcal", "hp",
]


def names() -> list[tuple[str, str | None]]:
    """(name, expected) for every candidate name; ``expected`` is, for a prefixed symbol,
    the prefix's name and the unit's symbol joined by a space (``milli cd``), else None."""
    out: list[tuple[str, str | None]] = []
    for symbols, full in PREFIXED:
        out += [(n, None) for n in symbols + full]
        for sym, name in PREFIXES:
            out += [(sym + s, f"{name} {s}") for s in symbols] + [(name + f, None) for f in full]
    out += [(n, None) for n in PLAIN]
    seen: set[str] = set()
    return [(n, e) for n, e in out if not (n in seen or seen.add(n))]  # type: ignore[func-returns-value]


def table() -> dict[str, tuple[float, tuple[tuple[str, int | str], ...], str]]:
    """name -> (factor, ((dimension, exponent), ...), pint's canonical name), for every
    candidate name that pint knows with a finite positive factor. A prefixed symbol that
    pint reads as another unit (``mcd`` is pint's microday, ``fm`` its fermi) is left out:
    it stays pint's, looked up when a model uses it."""
    from plantlint.language import units

    ureg = units._registry()
    out = {}
    for name, expected in names():
        unit = units.pint_unit(name)
        if unit is None:
            continue
        canonical = ureg.get_name(name)
        if expected is not None:
            prefix, symbol = expected.split(" ")
            if canonical != prefix + ureg.get_name(symbol):
                continue
        dims = tuple((d, e.numerator if e.denominator == 1 else str(e)) for d, e in unit.dims)
        out[name] = (unit.factor, dims, canonical)
    return out


def render() -> str:
    """The table as JSON text, one name a line: ``"name": [factor, [[dimension, exponent],
    ...], pint's unit]``; the factor is the float pint's registry gives (written so that it
    reads back to the same bits), an exponent an int or a fraction's text."""
    import json

    import pint

    head = {
        "about": "Unit names and their meaning as pint's default registry gives them. Generated by "
                 "tools/make_unit_table.py: do not edit. units[name] = [factor to coherent SI units "
                 "(radian = 1), [[pint base dimension, exponent], ...], pint's name of the unit].",
        "pint_version": pint.__version__,
    }
    lines = ["{"] + [f"  {json.dumps(k)}: {json.dumps(v)}," for k, v in head.items()] + ['  "units": {']
    rows = [f"    {json.dumps(name)}: {json.dumps([factor, [list(d) for d in dims], canonical])}"
            for name, (factor, dims, canonical) in table().items()]
    lines += [",\n".join(rows), "  }", "}", ""]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--check", action="store_true", help="compare with the shipped table instead of writing it")
    args = parser.parse_args(argv)
    sys.path.insert(0, str(REPO / "checker"))
    text = render()
    if args.check:
        same = TARGET.exists() and TARGET.read_text(encoding="utf-8") == text
        print("unit table is current" if same else f"{TARGET.relative_to(REPO)} differs: run tools/make_unit_table.py")
        return 0 if same else 1
    TARGET.write_text(text, encoding="utf-8")
    print(f"wrote {TARGET.relative_to(REPO)}: {text.count(chr(10)) - 6} names")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
