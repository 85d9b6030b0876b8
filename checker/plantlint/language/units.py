"""Dimension checks on the units declared in ``[ ]``.

Where a model declares units, every rate, output, definition, constant or
parameter value and range bound is given a unit built from the parse tree, and
the places where units must agree are checked:

- a rate is in the unit of its state per unit of time, and all rates of a model use
  the same unit of time (the second, or another one used by every rate);
- the terms of a sum (and the arguments of ``atan2``, ``min``, ``max``, ``sat``) agree;
- the arguments of ``sin cos tan asin acos atan sinh cosh tanh exp log`` are
  dimensionless with scale 1 (radians count as dimensionless: the SI treats the
  radian as the derived unit 1, SI Brochure, 9th edition, table 4);
- an output's expression is in its declared unit, a constant's or parameter's
  value in its declared unit, a range bound in the unit of its declaration.

"Agree" means the same dimension *and* the same scale: the numbers of a model are
plain numbers, so ``x [m] + y [mm]`` adds metres to millimetres. A name without
a unit has an unknown dimension and every check that involves it is skipped
(never guessed). A number written in the model is a coefficient in products
and takes the unit of the other terms in a sum (``1 - (w/w_max)^2``, ``h - 0.5``).
A model whose declared units are all dimensionless is taken as non-dimensionalised
(time included): its rates are not held to a unit of time. Operating-point values
are not checked (they are commonly written with the operating values inline).

Unit text is first read by the small grammar below (names, ``*``, ``/``, ``^``
with exponents such as ``2``, ``-1``, ``2.5``, ``(1/2)``, parentheses, ``1``); only single names that
passed it are handed to pint, whose registry resolves prefixes, plurals and
aliases. The algebra is exact and done here. pint is imported only when a
model declares a unit other than ``[1]``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, replace
from fractions import Fraction
from functools import lru_cache
from typing import TYPE_CHECKING, Any, Union

from plantlint.core import anchors
from plantlint.core.catalogue import finding
from plantlint.core.findings import Finding, Span
from plantlint.core.limits import (MAX_LITERAL_DIGITS, MAX_LITERAL_EXP10, MAX_UNIT_DEPTH, MAX_UNIT_EXPONENT,
                                   MAX_UNIT_NAME, MAX_UNIT_TEXT)

if TYPE_CHECKING:
    from plantlint.language.syntax import Statement


TEXT_WIDTH = 60

TIME = "[time]"
#: SI base units by pint's dimension names, in the order they are shown.
BASE_SYMBOLS = {"[mass]": "kg", "[length]": "m", "[time]": "s", "[current]": "A", "[temperature]": "K",
                "[substance]": "mol", "[luminosity]": "cd"}
#: Functions whose arguments must be plain numbers (angles in radians).
DIMENSIONLESS_ARGUMENT = frozenset("sin cos tan asin acos atan sinh cosh tanh exp log".split())
#: Functions whose arguments must agree with each other; the result has their unit.
AGREEING_ARGUMENTS = frozenset({"min", "max", "sat"})

RULE_MISMATCH = "unit-mismatch"
RULE_UNKNOWN = "unit-unknown"


# -- units -------------------------------------------------------------------------

@dataclass(frozen=True)
class Unit:
    """A unit: its size in SI base units (radian = 1) and exact dimension exponents."""

    factor: float
    dims: tuple[tuple[str, Fraction], ...] = ()
    text: str | None = None  # as declared, for messages

    def __mul__(self, other: "Unit") -> "Unit":
        return Unit(_checked(self.factor * other.factor), _merge(self.dims, other.dims, 1))

    def __truediv__(self, other: "Unit") -> "Unit":
        return Unit(_checked(self.factor / other.factor), _merge(self.dims, other.dims, -1))

    def power(self, p: Fraction) -> "Unit":
        factor = self.factor ** float(p)
        if not math.isfinite(factor) or factor == 0.0:
            raise OverflowError("unit scale out of range")
        return Unit(factor, tuple((d, e * p) for d, e in self.dims if e * p != 0))

    @property
    def dimensionless(self) -> bool:
        return not self.dims

    def same_dimension(self, other: "Unit") -> bool:
        return self.dims == other.dims

    def same_scale(self, other: "Unit") -> bool:
        return math.isclose(self.factor, other.factor, rel_tol=1e-9)

    def agrees(self, other: "Unit") -> bool:
        return self.same_dimension(other) and self.same_scale(other)

    def base_text(self) -> str:
        """In SI base units, with the scale in front when it is not 1: ``kg*m/s^2``,
        ``0.001 m^3``; a rate whose scale is another unit of time is shown per that unit
        (``K/min``, not ``0.0166667 K/s``). Only for time to the power +-1: a scale of 1e6
        on m/s^2 came from elsewhere (mm in a denominator, say), and ``m/ms^2`` would
        name a millisecond nobody wrote."""
        time = dict(self.dims).get(TIME)
        symbols = dict(BASE_SYMBOLS)
        factor = self.factor
        if time in (1, -1) and not self.same_scale(ONE):
            for symbol, seconds in (("min", 60.0), ("h", 3600.0), ("d", 86400.0), ("ms", 1e-3)):
                if math.isclose(factor, seconds ** float(time), rel_tol=1e-9):
                    symbols[TIME], factor = symbol, 1.0
                    break
        pos = [_power_text(symbols.get(d, _symbol(d)), e) for d, e in self.dims if e > 0]
        neg = [_power_text(symbols.get(d, _symbol(d)), -e) for d, e in self.dims if e < 0]
        text = "*".join(pos) or "1"
        if neg:
            text += "/" + (neg[0] if len(neg) == 1 else "(" + "*".join(neg) + ")")
        if not math.isclose(factor, 1.0, rel_tol=1e-9):
            return f"{factor:.6g} {text}" if pos or neg else f"{factor:.6g}"
        return text

    def show(self) -> str:
        """As declared when it was, followed by its SI base form where that differs."""
        base = self.base_text()
        if self.text is None or self.text.replace(" ", "") == base:
            return base
        return f"{self.text} (= {base})"


ONE = Unit(1.0)
SECOND = Unit(1.0, ((TIME, Fraction(1)),), "s")


def _checked(factor: float) -> float:
    """A unit's scale stays a finite positive float (hostile units such as ym^12 cubed
    would underflow): beyond that the unit counts as unknown."""
    if not math.isfinite(factor) or factor <= 0.0:
        raise OverflowError("unit scale out of range")
    return factor


def _merge(a: tuple[tuple[str, Fraction], ...], b: tuple[tuple[str, Fraction], ...], sign: int
           ) -> tuple[tuple[str, Fraction], ...]:
    out = dict(a)
    for d, e in b:
        out[d] = out.get(d, Fraction(0)) + sign * e
    return _sorted_dims(out)


def _sorted_dims(d: dict[str, Fraction]) -> tuple[tuple[str, Fraction], ...]:
    order = list(BASE_SYMBOLS)
    return tuple(sorted(((k, v) for k, v in d.items() if v != 0),
                        key=lambda kv: (order.index(kv[0]) if kv[0] in order else len(order), kv[0])))


def _symbol(dim: str) -> str:
    return BASE_SYMBOLS.get(dim, dim.strip("[]"))


def _power_text(symbol: str, e: Fraction) -> str:
    if e == 1:
        return symbol
    return f"{symbol}^{e}" if e.denominator == 1 else f"{symbol}^({e})"


# -- unit text ----------------------------------------------------------------------

class UnitTextError(Exception):
    """Unit text that the unit grammar does not accept; ``offset`` is where (0-based)."""

    def __init__(self, message: str, offset: int, width: int = 1, hint: str | None = None):
        super().__init__(message)
        self.message = message
        self.offset = offset
        self.width = width
        self.hint = hint


@dataclass(frozen=True)
class UnitName:
    name: str
    offset: int


# A parsed unit text: UnitName | ("one",) | ("mul"|"div", a, b) | ("pow", a, Fraction)
UnitNode = Union[UnitName, tuple]

_UNIT_TOKEN = re.compile(r"\s*(?:(?P<name>[A-Za-z_][A-Za-z0-9_]*)|(?P<int>\d+(?:\.\d+)?)|(?P<op>[*/^()\-]))")


def _tokens(text: str) -> list[tuple[str, str, int]]:
    out = []
    pos = 0
    while pos < len(text):
        if text[pos:].strip() == "":
            break
        m = _UNIT_TOKEN.match(text, pos)
        if m is None:
            at = pos + len(text[pos:]) - len(text[pos:].lstrip())
            ch = text[at]
            hint = None
            if ch == "%":
                hint = "write [percent]"
            elif ch in ".,":
                hint = "numbers other than 1 do not belong in a unit; scale the value instead"
            elif not ch.isascii():
                hint = "unit names are ASCII: write ohm for \u03a9, um for \u00b5m, deg for \u00b0"
            raise UnitTextError(f"unexpected character {ch!r} in a unit", at, 1, hint)
        kind = m.lastgroup or "op"
        out.append((kind, m.group(kind), m.start(kind)))
        pos = m.end()
    return out


class _UnitParser:
    """unit := term (('*' | '/') term)* ; term := atom ('^' exponent)? ;
    atom := NAME | '1' | '(' unit ')' ;
    exponent := ['-'] NUMBER | '(' ['-'] NUMBER ['/' NUMBER] ')'   (NUMBER: 2, 0.5, 2.5)"""

    def __init__(self, text: str):
        self.text = text
        self.toks = _tokens(text)
        self.i = 0

    def parse(self) -> UnitNode:
        if not self.toks:
            raise UnitTextError("empty unit; write [1] for a dimensionless quantity", 0, 1)
        node = self._unit(0)
        if self.i < len(self.toks):
            kind, value, at = self.toks[self.i]
            hint = "join units with * (for example N*m)" if kind in ("name", "int") else None
            raise UnitTextError(f"unexpected {value!r} in a unit", at, len(value), hint)
        return node

    def _peek(self) -> tuple[str, str, int] | None:
        return self.toks[self.i] if self.i < len(self.toks) else None

    def _expect_end(self) -> UnitTextError:
        return UnitTextError("the unit ends too early", len(self.text.rstrip()), 1)

    def _unit(self, depth: int) -> UnitNode:
        node = self._term(depth)
        while (tok := self._peek()) is not None and tok[1] in ("*", "/"):
            self.i += 1
            node = ("mul" if tok[1] == "*" else "div", node, self._term(depth))
        return node

    def _term(self, depth: int) -> UnitNode:
        node = self._atom(depth)
        tok = self._peek()
        if tok is not None and tok[1] == "^":
            self.i += 1
            node = ("pow", node, self._exponent())
        return node

    def _atom(self, depth: int) -> UnitNode:
        tok = self._peek()
        if tok is None:
            raise self._expect_end()
        kind, value, at = tok
        self.i += 1
        if kind == "name":
            if len(value) > MAX_UNIT_NAME:
                raise UnitTextError("unit name too long", at, len(value))
            return UnitName(value, at)
        if kind == "int":
            if value == "1":
                return ("one",)
            raise UnitTextError(f"number {value} in a unit; only 1 may appear (as in 1/s)", at, len(value),
                                "scale the value instead of the unit")
        if value == "(":
            if depth >= MAX_UNIT_DEPTH:
                raise UnitTextError("parentheses nested too deep in a unit", at, 1)
            node = self._unit(depth + 1)
            close = self._peek()
            if close is None or close[1] != ")":
                raise UnitTextError("a closing ')' is missing in the unit", close[2] if close else len(self.text), 1)
            self.i += 1
            return node
        raise UnitTextError(f"unexpected {value!r} in a unit", at, len(value))

    def _exponent(self) -> Fraction:
        tok = self._peek()
        if tok is None:
            raise self._expect_end()
        start = tok[2]
        paren = tok[1] == "("
        if paren:
            self.i += 1
        sign = 1
        tok = self._peek()
        if tok is not None and tok[1] == "-":
            sign = -1
            self.i += 1
        num = self._int()
        den = 1
        if paren:
            tok = self._peek()
            if tok is not None and tok[1] == "/":
                self.i += 1
                den = self._int()
            tok = self._peek()
            if tok is None or tok[1] != ")":
                raise UnitTextError("a closing ')' is missing in the exponent", tok[2] if tok else len(self.text), 1)
            self.i += 1
        value = sign * num / den if den != 0 else None
        if value is None or abs(value) > MAX_UNIT_EXPONENT or value.denominator > MAX_UNIT_EXPONENT:
            raise UnitTextError(f"unit exponents are at most {MAX_UNIT_EXPONENT} in size, with denominators up to {MAX_UNIT_EXPONENT}",
                                start, 1)
        return value

    def _int(self) -> Fraction:
        tok = self._peek()
        if tok is None:
            raise self._expect_end()
        if tok[0] != "int":
            raise UnitTextError(f"an exponent must be a number, not {tok[1]!r}", tok[2], len(tok[1]),
                                "write m^2, s^-1, m^2.5 or Hz^(1/2)")
        self.i += 1
        return Fraction(tok[1][:12])


def parse_unit_text(text: str) -> UnitNode:
    """Check unit text against the unit grammar; raises :class:`UnitTextError`."""
    if len(text) > MAX_UNIT_TEXT:
        raise UnitTextError(f"unit text of {len(text)} characters; units are limited to {MAX_UNIT_TEXT}", 0, 1)
    return _UnitParser(text).parse()


def unit_names(node: UnitNode) -> list[UnitName]:
    out: list[UnitName] = []
    stack = [node]
    while stack:
        n = stack.pop()
        if isinstance(n, UnitName):
            out.append(n)
        elif n[0] in ("mul", "div"):
            stack.extend((n[2], n[1]))
        elif n[0] == "pow":
            stack.append(n[1])
    return out


def _unit_value(node: UnitNode, names: dict[str, Unit]) -> Unit:
    if isinstance(node, UnitName):
        return replace(names[node.name], text=None)
    if node[0] == "one":
        return ONE
    if node[0] == "mul":
        return _unit_value(node[1], names) * _unit_value(node[2], names)
    if node[0] == "div":
        return _unit_value(node[1], names) / _unit_value(node[2], names)
    return _unit_value(node[1], names).power(node[2])


# -- names: the shipped table, else pint ---------------------------------------------------

@lru_cache(maxsize=1)
def _table() -> dict[str, list[Any]]:
    """The shipped unit table, ``unit_table.json`` beside this module (generated by
    ``tools/make_unit_table.py`` from pint's default registry): name -> [factor,
    [[dimension, exponent], ...], pint's name of the unit]."""
    import importlib.resources
    import json

    text = importlib.resources.files("plantlint.language").joinpath("unit_table.json").read_text(encoding="utf-8")
    return json.loads(text)["units"]


@lru_cache(maxsize=1)
def _registry() -> Any:
    import pint

    return pint.UnitRegistry()


def preload() -> None:
    """Build pint's registry now (before worker processes are forked)."""
    _registry()


_DECLARES_UNIT = re.compile(rb'^[^#"\n]*\[\s*[^\s\]]', re.MULTILINE)
_UNIT_BRACKET = re.compile(rb'\[([^\]\n]*)\]')
_UNIT_WORD = re.compile(rb'[A-Za-z_][A-Za-z0-9_]*')


def declares_units(data: bytes) -> bool:
    """Whether a model text seems to declare a unit (a ``[`` before any comment or
    text on a line). Cheap and may say yes wrongly."""
    return _DECLARES_UNIT.search(data[:1 << 20]) is not None


def needs_pint(data: bytes) -> bool:
    """Whether a model text seems to declare a unit name that the shipped table does
    not hold (so that checking it loads pint). Cheap and may say yes wrongly; used only
    to build pint's registry before worker processes are forked."""
    if not declares_units(data):
        return False
    table = _table()
    for line in data[:1 << 20].splitlines():
        code = re.sub(rb'"[^"\n]*"?', b"", line.split(b"#", 1)[0])
        for inside in _UNIT_BRACKET.findall(code):
            if any(word.decode("ascii") not in table for word in _UNIT_WORD.findall(inside)):
                return True
    return False


@lru_cache(maxsize=4096)
def resolve_name(name: str) -> Unit | None:
    """The meaning of one unit name, or None when pint does not know it. A name in the
    shipped table (pint's meaning of it, tabled) is read from there without pint; any
    other name is given to pint."""
    entry = _table().get(name)
    if entry is not None:
        factor, dims, _pint_name = entry
        return Unit(float(factor), _sorted_dims({d: Fraction(e) for d, e in dims}), name)
    return pint_unit(name)


def pint_unit(name: str) -> Unit | None:
    """pint's meaning of one unit name, or None when pint does not know it."""
    ureg = _registry()
    try:
        from pint.util import UnitsContainer

        canonical = ureg.get_name(name)
        container = UnitsContainer({canonical: 1})
        factor, _base = ureg.get_base_units(container)
        dims = ureg.get_dimensionality(container)
        exps = {str(d): Fraction(e).limit_denominator(1000) for d, e in dims.items()}
        factor = float(factor)
    except Exception:  # pint's errors for names it does not know (or cannot reduce)
        return None
    if not math.isfinite(factor) or factor <= 0:
        return None
    return Unit(factor, _sorted_dims(exps), name)


@lru_cache(maxsize=1024)
def suggest_name(name: str) -> str | None:
    """A unit pint knows under another capitalisation or as a power (``Ohm`` -> ``ohm``)."""
    m = re.fullmatch(r"([A-Za-z_]+?)(\d+)", name)
    if m and resolve_name(m.group(1)) is not None:
        return f"{m.group(1)}^{m.group(2)}"
    try:
        candidates = _registry().parse_unit_name(name, case_sensitive=False)
    except Exception:
        return None
    for prefix, unit, suffix in candidates:
        guess = prefix + unit
        if resolve_name(guess) is not None:
            return guess
    return None


# -- the check ------------------------------------------------------------------------

@dataclass(frozen=True)
class _Num:
    """A number written in the model (no names): a coefficient, or a quantity in the
    unit of the sum it stands in. ``value`` is exact where it is rational."""

    value: Fraction | None = None


_Result = Union[Unit, _Num, None]  # None: unknown dimension


class _Sum(list):  # type: ignore[type-arg]
    """Terms (node, result, negated) of a sum whose check is still open."""


def check_units(statements: list["Statement"]) -> list[Finding]:
    """Unit findings for one parsed file (its statements in file order)."""
    return _Checker().run(statements)


class _Checker:
    def __init__(self) -> None:
        self.findings: list[Finding] = []
        self.env: dict[str, _Result] = {}
        self.kind: dict[str, str] = {}
        self.rate_times: list[tuple[str, Span, Unit, Unit, float]] = []
        self.nondimensional = False
        self.expected: dict[int, Unit] = {}  # node id -> the unit it should have
        self.closed: dict[int, _Result] = {}  # node id -> its unit, as last evaluated

    # statements ---------------------------------------------------------------------
    def run(self, statements: list["Statement"]) -> list[Finding]:
        if not any(st.unit is not None for st in statements):
            return []  # no unit declared: nothing to check, pint stays unloaded
        first: dict[str, "Statement"] = {}
        for st in statements:
            if st.kind in ("const", "param", "state", "input", "let", "output") and st.name:
                first.setdefault(st.name, st)
        decls = [st for st in statements if st.name and first.get(st.name) is st]
        # declared units first (ranges may use constants declared anywhere), then
        # values, ranges, and the definitions, rates and outputs in file order
        units: dict[str, Unit | None] = {}
        for st in decls:
            if st.kind in ("const", "param", "state", "input", "output"):
                units[st.name or ""] = self._declared_unit(st)
            if st.kind != "output":
                self.kind[st.name or ""] = st.kind
        self.env.update({n: u for n, u in units.items() if self.kind.get(n) != "output" and n in self.kind})
        # a model whose units are all dimensionless ([1], [rad]) is nondimensionalised,
        # time included: its rates are not held to a unit of time
        self.nondimensional = all(u is None or u.dimensionless for u in units.values())
        for st in decls:
            if st.kind in ("const", "param") and st.expr is not None:
                self._value(st, units[st.name or ""])
        for st in decls:
            if st.kind in ("param", "state", "input"):
                self._range(st, units[st.name or ""])
        rated: set[str] = set()
        for st in statements:
            if st.kind == "let" and first.get(st.name or "") is st:
                self.env[st.name or ""] = self.evaluate(st.expr, anchors.let(st.name)) if st.expr is not None else None
            elif st.kind == "rate" and st.name and st.expr is not None and self.kind.get(st.name) == "state":
                if st.name not in rated:
                    rated.add(st.name)
                    self._rate(st)
            elif st.kind == "output" and first.get(st.name or "") is st and st.expr is not None:
                self._output(st, units[st.name or ""])
        self._time_units()
        return self.findings

    def _declared_unit(self, st: "Statement") -> Unit | None:
        if st.unit is None:
            return None
        span = st.unit_span or st.span
        try:
            node = parse_unit_text(st.unit)
        except UnitTextError as exc:
            self._add(RULE_UNKNOWN, f"cannot read the unit of '{st.name}': {exc.message}",
                      _sub_span(span, exc.offset, exc.width) if st.unit else span, f"unit of {st.kind} {st.name}",
                      exc.hint or "a unit is names joined by *, / and ^, as in kg*m^2/s^2 or 1/min")
            return None
        names: dict[str, Unit] = {}
        ok = True
        for ref in unit_names(node):
            if ref.name in names:
                continue
            unit = resolve_name(ref.name)
            if unit is None:
                guess = suggest_name(ref.name)
                hint = f"did you mean {guess}?" if guess else "use a unit name or symbol known to pint (SI names and symbols, with prefixes)"
                self._add(RULE_UNKNOWN, f"unknown unit '{ref.name}' in the unit of '{st.name}'",
                          _sub_span(span, ref.offset, len(ref.name)), f"unit of {st.kind} {st.name}: {ref.name}", hint)
                ok = False
                continue
            names[ref.name] = unit
        if not ok:
            return None
        try:
            value = _unit_value(node, names)
        except (OverflowError, ZeroDivisionError):
            self._add(RULE_UNKNOWN, f"the unit of '{st.name}' is out of range", span, f"unit of {st.kind} {st.name}")
            return None
        return replace(value, text=st.unit)

    def _value(self, st: "Statement", unit: Unit | None) -> None:
        value = self.evaluate(st.expr, anchors.declaration(st.kind, st.name), unit)
        if unit is not None and isinstance(value, Unit) and not value.agrees(unit):
            self._mismatch(f"the value of '{st.name}'", st.name, value, unit, st.expr.span if st.expr else st.span,
                           f"value of {st.kind} {st.name}")

    def _output(self, st: "Statement", unit: Unit | None) -> None:
        value = self.evaluate(st.expr, anchors.output(st.name), unit)
        if unit is not None and isinstance(value, Unit) and not value.agrees(unit):
            self._mismatch(f"the expression of output '{st.name}'", st.name, value, unit, st.expr.span if st.expr else st.span,
                           anchors.output(st.name))

    def _range(self, st: "Statement", unit: Unit | None) -> None:
        for which, bound in (("lower", st.low), ("upper", st.high)):
            if bound is None:
                continue
            value = self.evaluate(bound, f"range of {st.name}", unit)
            if unit is not None and isinstance(value, Unit) and not value.agrees(unit):
                self._mismatch(f"the {which} bound of '{st.name}'", st.name, value, unit, bound.span,
                               f"{which} bound of {st.name}", "a range is in the unit of its declaration")

    def _rate(self, st: "Statement") -> None:
        assert st.expr is not None
        name = st.name or ""
        state = self.env.get(name)
        expected = state / SECOND if isinstance(state, Unit) and not self.nondimensional else None
        value = self.evaluate(st.expr, anchors.rate(name), expected)
        if not isinstance(value, Unit) or not isinstance(state, Unit) or self.nondimensional:
            return
        try:
            per = value / state
        except OverflowError:
            return
        if per.dims != ((TIME, Fraction(-1)),):
            expected = replace(state / SECOND, text=None)
            self._add(RULE_MISMATCH,
                      f"rate of '{name}' is in {value.show()}; '{name}' is in {state.show()}, so its rate must be "
                      f"in {expected.base_text()} (its unit per unit of time)",
                      st.expr.span, anchors.rate(name),
                      "check each term against the state's unit divided by time")
            return
        self.rate_times.append((name, st.expr.span, value, state, 1.0 / per.factor))

    def _time_units(self) -> None:
        """All rates per one unit of time: the second, or, when no rate is per second,
        the time unit of the first rate whose units are all declared."""
        if not self.rate_times:
            return
        seconds = [t for *_, t in self.rate_times]
        ref = 1.0 if any(math.isclose(t, 1.0, rel_tol=1e-9) for t in seconds) else seconds[0]
        for name, span, value, state, t in self.rate_times:
            if math.isclose(t, ref, rel_tol=1e-9):
                continue
            per = _time_text(ref)
            expected = (state.text or state.base_text()) + "/" + _TIME_SYMBOL.get(per, f"({ref:.6g} s)")
            message = (f"rate of '{name}' is in {value.show()}, but '{name}' is in {state.show()}, so its rate per "
                       f"{per} is in {expected}: the numbers differ by a factor {ref / t:.6g}")
            if any(math.isclose(t, v, rel_tol=1e-9) for v in (60.0, 3600.0, 86400.0)):
                message += f" (this rate is per {_time_text(t)}"
                message += f", the model's other rates per {per})" if len(self.rate_times) > 1 else ")"
            self._add(RULE_MISMATCH, message, span, f"time unit of rate {name}",
                      "all rates of a model are per one unit of time, in the unit of their state")

    # findings ------------------------------------------------------------------------
    def _add(self, rule: str, message: str, span: Span | None, anchor: str, hint: str | None = None) -> None:
        self.findings.append(finding(rule, message, span, hint=hint, anchor=anchors.units(anchor)))

    def _mismatch(self, what: str, name: str | None, got: Unit, want: Unit, span: Span, anchor: str,
                  hint: str | None = None) -> None:
        message = f"{what} is in {got.show()}, but '{name}' is declared in {want.show()}"
        if got.same_dimension(want):
            message += f": the same dimension on another scale (factor {got.factor / want.factor:.6g})"
        self._add(RULE_MISMATCH, message, span, anchor, hint)

    # expressions ---------------------------------------------------------------------
    def evaluate(self, expr: Any, where: str, expected: Unit | None = None) -> _Result:
        """The unit of an expression (from its parse tree), reporting what disagrees inside.

        With the unit the whole expression should have, a first silent pass finds the
        units of all parts, and what each sum should be in is passed down through
        products and quotients; a sum then reports the terms that differ from that
        (not merely from most of its terms)."""
        root = getattr(expr, "tree", None)
        if root is None:
            return None
        if expected is None:
            return self._walk(root, where)
        reported, self.findings = self.findings, []
        self.closed = {}
        self._walk(root, where)
        self.findings = reported
        self.expected = _expectations(root, expected, self.closed)
        try:
            return self._walk(root, where)
        finally:
            self.expected = {}

    def _walk(self, root: Any, where: str) -> _Result:
        results: dict[int, Any] = {}
        stack: list[tuple[Any, bool]] = [(root, False)]
        while stack:
            node, ready = stack.pop()
            if not hasattr(node, "data"):
                results[id(node)] = _number(str(node)) if getattr(node, "type", "") == "NUMBER" else None
                continue
            if not ready:
                stack.append((node, True))
                if node.data not in ("number", "name"):
                    for child in node.children:
                        if child is not None and not (node.data == "call" and child is node.children[0]):
                            stack.append((child, False))
                continue
            results[id(node)] = self._node(node, results, where)
        return self._close(results[id(root)], where, root)

    def _node(self, node: Any, results: dict[int, Any], where: str) -> Any:
        kind = node.data
        kids = node.children
        if kind == "number":
            return _number(str(kids[0]))
        if kind == "name":
            name = str(kids[0])
            if name == "pi":
                return _Num(None)
            return self.env.get(name)
        if kind in ("add", "sub"):
            left = results[id(kids[0])]
            terms = left if isinstance(left, _Sum) else _Sum([(kids[0], left, False)])
            terms.append((kids[1], self._close(results[id(kids[1])], where, kids[1]), kind == "sub"))
            return terms
        if kind in ("neg", "pos"):
            value = self._close(results[id(kids[0])], where, kids[0])
            if kind == "neg" and isinstance(value, _Num) and value.value is not None:
                return _Num(-value.value)
            return value
        if kind in ("mul", "div"):
            a = self._close(results[id(kids[0])], where, kids[0])
            b = self._close(results[id(kids[1])], where, kids[1])
            return _product(a, b, kind == "div")
        if kind == "pow":
            return self._power(node, self._close(results[id(kids[0])], where, kids[0]),
                               self._close(results[id(kids[1])], where, kids[1]), where)
        if kind == "call":
            fname = str(kids[0])
            args = [(a, self._close(results[id(a)], where, a)) for a in kids[1:] if a is not None]
            return self._call(fname, args, where)
        return None

    def _close(self, value: Any, where: str, node: Any) -> _Result:
        if isinstance(value, _Sum):
            value = self._agree(list(value), where, "term", self.expected.get(id(node)))
        self.closed[id(node)] = value
        return value

    def _agree(self, items: list[tuple[Any, _Result, bool]], where: str, what: str,
               expected: Unit | None = None) -> _Result:
        """Terms of a sum (or arguments that must agree): report those that differ from
        the unit most of them share; the result is that unit."""
        known = [(node, u) for node, u, _ in items if isinstance(u, Unit)]
        if not known:
            if any(u is None for _, u, _ in items):
                return None
            nums = [u.value for _, u, _ in items if isinstance(u, _Num)]
            if all(v is not None for v in nums):
                total = sum((-v if neg else v) for (_, _, neg), v in zip(items, nums))  # type: ignore[operator]
                return _Num(Fraction(total))
            return _Num(None)
        groups: list[list[tuple[Any, Unit]]] = []
        for node, u in known:
            for g in groups:
                if g[0][1].agrees(u):
                    g.append((node, u))
                    break
            else:
                groups.append([(node, u)])
        main = next((g for g in groups if expected is not None and g[0][1].agrees(expected)), None)
        main = main or max(groups, key=len)
        ref_node, ref = main[0]
        for g in groups:
            if g is main:
                continue
            for node, u in g:
                text = _text(node)
                message = f"{what} '{text}' is in {u.show()}, but '{_text(ref_node)}' is in {ref.show()}"
                if u.same_dimension(ref):
                    message += (f": the same dimension on different scales (factor {u.factor / ref.factor:.6g}), "
                                f"so the numbers do not add up" if what == "term" else
                                f": the same dimension on different scales (factor {u.factor / ref.factor:.6g})")
                if u.same_dimension(ref):
                    hint = "check the units declared for the names in it (a prefix such as mm for m, cm^2 for m^2)"
                else:
                    hint = "the terms of a sum must have the same unit" if what == "term" else \
                        "these arguments must have the same unit"
                self._add(RULE_MISMATCH, message, _node_span(node), f"{where}: {what} {text}", hint)
        return replace(ref, text=ref.text if all(u.text == ref.text for _, u in main) else None)

    def _power(self, node: Any, base: _Result, exponent: _Result, where: str) -> _Result:
        exp_node = node.children[1]
        if isinstance(exponent, Unit) and not exponent.dimensionless:
            self._add(RULE_MISMATCH, f"the exponent '{_text(exp_node)}' is in {exponent.show()}; an exponent must be dimensionless",
                      _node_span(exp_node), f"{where}: exponent {_text(exp_node)}")
            return None
        if isinstance(exponent, _Num) and exponent.value is not None:
            if isinstance(base, Unit):
                try:
                    return base.power(exponent.value)
                except OverflowError:
                    return None
            if isinstance(base, _Num):
                p = exponent.value
                if base.value is not None and p.denominator == 1 and abs(p) <= 64 and (base.value != 0 or p > 0):
                    return _Num(base.value ** int(p))
                return _Num(None)
            return None
        # the exponent is not a fixed rational number
        if isinstance(base, Unit) and not base.dimensionless:
            if exponent is None:
                return None  # its dimension is unknown: skipped
            self._add(RULE_MISMATCH,
                      f"'{_text(node.children[0])}' is in {base.show()} and raised to the power '{_text(exp_node)}', "
                      f"which is not a fixed rational number: the unit of the result is not defined",
                      _node_span(node), f"{where}: power {_text(node)}",
                      "only dimensionless quantities may be raised to a variable power")
            return None
        if base is None:
            return None
        return _Num(None) if isinstance(base, _Num) and isinstance(exponent, _Num) else ONE

    def _call(self, fname: str, args: list[tuple[Any, _Result]], where: str) -> _Result:
        values = [u for _, u in args]
        if fname in DIMENSIONLESS_ARGUMENT:
            for arg, u in args:
                self._plain_argument(fname, arg, u, where)
            return _Num(None) if all(isinstance(u, _Num) for u in values) else ONE
        if fname == "atan2":
            self._agree([(a, u, False) for a, u in args], where, "argument of atan2")
            return _Num(None) if all(isinstance(u, _Num) for u in values) else ONE
        if fname == "sqrt" and len(values) == 1:
            u = values[0]
            if isinstance(u, Unit):
                return u.power(Fraction(1, 2))
            return u if u is None else _Num(None)
        if fname == "abs" and len(values) == 1:
            return values[0]
        if fname == "sign":
            return _Num(None) if all(isinstance(u, _Num) for u in values) else ONE
        if fname in AGREEING_ARGUMENTS:
            return self._agree([(a, u, False) for a, u in args], where, f"argument of {fname}")
        return None

    def _plain_argument(self, fname: str, arg: Any, u: _Result, where: str) -> None:
        if not isinstance(u, Unit):
            return
        text = _text(arg)
        if not u.dimensionless:
            self._add(RULE_MISMATCH,
                      f"the argument of {fname} must be dimensionless (radians count as dimensionless); "
                      f"'{text}' is in {u.show()}",
                      _node_span(arg), f"{where}: argument of {fname} {text}",
                      "divide by a quantity of the same unit, or check the terms inside")
        elif not u.same_scale(ONE):
            self._add(RULE_MISMATCH,
                      f"the argument of {fname} is in {u.show()}, a dimensionless unit of scale {u.factor:.6g}: "
                      f"{fname} takes plain numbers (angles in radians)",
                      _node_span(arg), f"{where}: argument of {fname} {text}",
                      "declare the quantity in rad (or [1]), converting its numbers")


def _expectations(root: Any, unit: Unit, closed: dict[int, _Result]) -> dict[int, Unit]:
    """What each part of an expression should be in when the whole should be in ``unit``:
    passed down into sums, signs, and through products and quotients whose other side
    has a known unit."""
    def known(node: Any) -> Unit | None:
        r = closed.get(id(node))
        return r if isinstance(r, Unit) else ONE if isinstance(r, _Num) else None

    out = {id(root): unit}
    stack = [root]
    while stack:
        node = stack.pop()
        if not hasattr(node, "data"):
            continue
        want = out[id(node)]
        kids = node.children
        targets: list[tuple[Any, Unit]] = []
        if node.data in ("add", "sub"):
            targets = [(kids[0], want), (kids[1], want)]
        elif node.data in ("neg", "pos"):
            targets = [(kids[0], want)]
        elif node.data in ("mul", "div"):
            a, b = known(kids[0]), known(kids[1])
            try:
                if node.data == "mul":
                    targets = ([(kids[0], want / b)] if b else []) + ([(kids[1], want / a)] if a else [])
                else:
                    targets = ([(kids[0], want * b)] if b else []) + ([(kids[1], a / want)] if a else [])
            except OverflowError:
                targets = []
        for child, u in targets:
            out[id(child)] = u
            stack.append(child)
    return out


def _product(a: _Result, b: _Result, divide: bool) -> _Result:
    if a is None or b is None:
        return None
    if isinstance(a, _Num) and isinstance(b, _Num):
        if a.value is None or b.value is None or (divide and b.value == 0):
            return _Num(None)
        return _Num(a.value / b.value if divide else a.value * b.value)
    ua = a if isinstance(a, Unit) else ONE
    ub = b if isinstance(b, Unit) else ONE
    try:
        out = ua / ub if divide else ua * ub
    except OverflowError:
        return None
    if isinstance(b, _Num):  # a coefficient keeps the unit (and its declared text)
        return replace(out, text=ua.text)
    if isinstance(a, _Num) and not divide:
        return replace(out, text=ub.text)
    return out


def _number(text: str) -> _Num:
    mantissa, _, exponent = text.lower().partition("e")
    try:
        exp10 = int(exponent) if exponent else 0
        if abs(exp10) > MAX_LITERAL_EXP10 or len(mantissa) > MAX_LITERAL_DIGITS:
            return _Num(None)
        return _Num(Fraction(mantissa) * Fraction(10) ** exp10)
    except (ValueError, ZeroDivisionError):
        return _Num(None)


_NICE_TIMES = {"second": 1.0, "minute": 60.0, "hour": 3600.0, "day": 86400.0, "millisecond": 0.001}
_TIME_SYMBOL = {"second": "s", "minute": "min", "hour": "h", "day": "d", "millisecond": "ms"}


def _time_text(seconds: float) -> str:
    for name, value in _NICE_TIMES.items():
        if math.isclose(seconds, value, rel_tol=1e-9):
            return name
    return f"{seconds:.6g} s"


def _node_span(node: Any) -> Span:
    meta = getattr(node, "meta", None)
    if meta is None or getattr(meta, "empty", True):
        line = getattr(node, "line", None) or 1
        column = getattr(node, "column", None) or 1
        return Span(line, column, getattr(node, "end_line", None) or line,
                    getattr(node, "end_column", None) or column + 1)
    return Span(meta.line, meta.column, meta.end_line, meta.end_column)


def _sub_span(span: Span, offset: int, width: int) -> Span:
    start = span.column + offset
    return Span(span.line, start, span.line, start + max(width, 1))


_PRECEDENCE = {"add": 1, "sub": 1, "mul": 2, "div": 2, "neg": 3, "pos": 3, "pow": 4}


def _text(node: Any, depth: int = 0) -> str:
    """A short canonical text of an expression node (for messages and anchors)."""
    out = _show(node, depth)
    return out if len(out) <= TEXT_WIDTH else out[:TEXT_WIDTH - 3] + "..."


def _show(node: Any, depth: int) -> str:
    if not hasattr(node, "data"):
        return str(node)
    if depth > 12:
        return "..."
    kind = node.data
    kids = node.children
    if kind in ("number", "name"):
        return str(kids[0])
    if kind == "call":
        return f"{kids[0]}({', '.join(_show(a, depth + 1) for a in kids[1:] if a is not None)})"
    p = _PRECEDENCE.get(kind, 5)

    def part(child: Any, right: bool = False) -> str:
        text = _show(child, depth + 1)
        q = _PRECEDENCE.get(getattr(child, "data", ""), 5)
        if q < p or (right and q == p and kind in ("sub", "div")) or (kind == "pow" and q <= p and not right):
            return f"({text})"
        return text

    if kind in ("neg", "pos"):
        return ("-" if kind == "neg" else "+") + part(kids[0])
    op = {"add": " + ", "sub": " - ", "mul": "*", "div": "/", "pow": "^"}.get(kind, " ? ")
    return part(kids[0]) + op + part(kids[1], right=True)


def unit_of(text: str) -> Unit:
    """The unit that a unit text declares (raises :class:`UnitTextError` when it
    cannot be read or names a unit pint does not know)."""
    node = parse_unit_text(text)
    names = {}
    for ref in unit_names(node):
        unit = resolve_name(ref.name)
        if unit is None:
            raise UnitTextError(f"unknown unit {ref.name!r}", ref.offset, len(ref.name))
        names[ref.name] = unit
    return replace(_unit_value(node, names), text=text)
