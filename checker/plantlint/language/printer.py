"""Showing exact expressions and numbers to people, compactly and in the model's own syntax."""

from __future__ import annotations

import math
from decimal import Context, Decimal
from fractions import Fraction
from typing import Sequence

import sympy as sp
from sympy.printing.str import StrPrinter


class _PlantPrinter(StrPrinter):
    """sympy's string printer, with `^` for powers as in .plant files."""

    def _print_Pow(self, expr: sp.Pow, rational: bool = False) -> str:
        text = super()._print_Pow(expr, rational)
        return text.replace("**", "^")

    def _print_Abs(self, expr: sp.Abs) -> str:
        return f"abs({self._print(expr.args[0])})"

    def _print_Rational(self, expr: sp.Rational) -> str:
        text = super()._print_Rational(expr)
        return text if len(text) <= LONG_NUMBER else _short_number(expr)

    def _print_Integer(self, expr: sp.Integer) -> str:
        text = super()._print_Integer(expr)
        return text if len(text) <= LONG_NUMBER else _short_number(expr)


_PRINTER = _PlantPrinter({"order": "none"})


def show_expr(expr: sp.Expr, limit: int = 120) -> str:
    """An expression as a person would write it in a .plant file, cut at ``limit`` chars."""
    if expr.is_Rational and not expr.is_Integer:
        decimal = _decimal(expr)
        if decimal is not None:
            return decimal
    if expr.is_Rational and len(str(expr)) > LONG_NUMBER:
        return show_number(expr)
    text = _PRINTER.doprint(_sign_inside(expr)).replace("**", "^")
    if len(text) > limit:
        ops = sp.count_ops(expr)
        text = text[: limit - 20].rstrip() + f" ... ({ops} operations)"
    return text


def _sign_inside(expr: sp.Expr) -> sp.Expr:
    """A negative multiple of a sum with the sign taken into the sum when that writes no more
    minus signs: -(-176 + 225*cos(q)^2)/100 reads (176 - 225*cos(q)^2)/100, -2*(x - 1) reads
    2*(1 - x); -(3 + x) stays. The value is the same (printed unevaluated)."""
    if not expr.is_Mul:
        return expr
    c, rest = expr.as_coeff_Mul()
    if not (c.is_negative and rest.is_Add):
        return expr
    terms = rest.args
    flipped = [-t for t in terms]
    if sum(t.could_extract_minus_sign() for t in flipped) > sum(t.could_extract_minus_sign() for t in terms):
        return expr
    return sp.Mul(-c, sp.Add(*flipped), evaluate=False) if c != -1 else sp.Add(*flipped)


def show_number(value: sp.Expr | float, digits: int = 6, mark_inexact: bool = False) -> str:
    """Exact when short (rationals, 1/3), else a decimal with ``digits`` significant digits.

    With ``mark_inexact`` a value that is shown rounded (an irrational number, or a
    rational too long to write out) is prefixed with ``~``, so a reader can tell a
    rounded residual from an exact one.
    """
    if isinstance(value, float) and not math.isfinite(value):
        return "undefined" if math.isnan(value) else ("> 1.8e308" if value > 0 else "< -1.8e308")
    if isinstance(value, sp.Basic):
        if value.is_Integer and len(str(value)) > LONG_NUMBER:
            return _long(value)
        if value.is_Integer:
            return str(value)
        if value.is_Rational:
            dec = _decimal(value)
            if dec is not None:
                return dec
            if len(str(value)) <= 12:
                return str(value)
        if value.is_Rational and _beyond_double(value):
            # 1e-400 and 1e600/3 are exact numbers: written in decimal, never as 0 or inf
            text, exact = decimal_text(value, digits)
            return ("~" if mark_inexact and not exact else "") + text
        try:
            ball = value.evalf(digits + 14) if not value.is_Float else value
            number = float(ball)
        except (TypeError, ValueError):
            return show_expr(value)
        if (not math.isfinite(number) or number == 0) and ball.is_Float and ball != 0:
            return ("~" if mark_inexact else "") + _mpmath_text(ball, digits)
        return ("~" if mark_inexact else "") + f"{number:.{digits}g}"
    return f"{value:.{digits}g}"


def _beyond_double(value: sp.Rational) -> bool:
    """Is a non-zero exact number too large or too small for a binary double?"""
    if value == 0:
        return False
    magnitude = abs(int(value.p)).bit_length() - int(value.q).bit_length()
    return magnitude > 1020 or magnitude < -1020


def _mpmath_text(value: sp.Float, digits: int) -> str:
    """A decimal beyond double range (exp(2000) is ~3.88118e+868), from the arbitrary-exponent float."""
    import mpmath

    return mpmath.nstr(value._to_mpmath(max(value._prec, 64)), digits)


#: Exact numbers longer than this many characters are shown rounded, with their length.
LONG_NUMBER = 24


def decimal_text(value: sp.Rational, digits: int) -> tuple[str, bool]:
    """An exact rational rounded to ``digits`` significant digits in decimal (``1e-300``,
    ``3.33333e+599``: Python's decimal has no exponent range to fall out of), and whether
    that text is the exact value."""
    p, q = int(value.p), int(value.q)
    rounded = Context(prec=digits).divide(Decimal(p), Decimal(q)).normalize()
    return format(rounded, "g").replace("E", "e"), Fraction(rounded) == Fraction(p, q)


def _short_number(value: sp.Rational) -> str:
    """A number too long to write out, inside an expression: ``1e-300`` when that decimal is
    the exact value (a .plant literal means exactly that), else ``~3.5e-96``, rounded."""
    text, exact = decimal_text(value, 6)
    return text if exact else "~" + text


def _long(value: sp.Rational) -> str:
    """A huge exact number in a readable form: ``~1.07151e+301 (an integer of 302 digits)``."""
    text = str(abs(int(value.p)))
    if not value.is_Integer:
        return show_number(sp.Float(value, 15))
    sign = "-" if value < 0 else ""
    exponent = len(text) - 1
    mantissa = int(text) / 10**exponent  # exact integer division to the nearest float in [1, 10]
    if round(mantissa, 5) >= 10:
        mantissa, exponent = mantissa / 10, exponent + 1
    return f"~{sign}{mantissa:.5f}e{exponent} (an integer of {len(text)} digits)"


def show_point(values: dict[str, float] | dict[str, sp.Expr], digits: int = 6) -> str:
    """``th = 0.5, w = -1`` for a point given by name."""
    return ", ".join(f"{k} = {show_number(v, digits)}" for k, v in values.items())


def listed(items: Sequence[str], conjunction: str = "and") -> str:
    """``a``, ``a and b``, ``a, b and c`` (or with ``or``)."""
    return items[0] if len(items) == 1 else f"{', '.join(items[:-1])} {conjunction} {items[-1]}"


def decimal_places(r: sp.Rational) -> int | None:
    """How many places after the point the decimal expansion of ``r`` has (1/4: 2, 3: 0);
    None when it does not end (1/3): a denominator 2^a 5^b has max(a, b) places."""
    q = int(r.q)
    twos = fives = 0
    while q % 2 == 0:
        q //= 2
        twos += 1
    while q % 5 == 0:
        q //= 5
        fives += 1
    return max(twos, fives) if q == 1 else None


def _decimal(r: sp.Rational) -> str | None:
    """1/4 -> 0.25 when the decimal expansion is finite and short."""
    places = decimal_places(r)
    if places is None or places > 9:
        return None
    scaled = abs(int(r.p)) * 10**places // int(r.q)
    text = str(scaled).rjust(places + 1, "0")
    whole, frac = text[:-places] or "0", text[-places:]
    sign = "-" if r < 0 else ""
    return f"{sign}{whole}.{frac}".rstrip("0").rstrip(".") if places else f"{sign}{whole}"
