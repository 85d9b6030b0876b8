"""Every limit on what a model file may hold, defined once.

A file beyond one of these is refused with a ``syntax`` (or ``unit-unknown``) finding at the
offending place before it can cost time or memory; real models are far below all of them.
This module imports nothing, so the runner (which refuses an oversized file before reading
it whole) and the language layer share one value without the runner loading sympy.
docs/language.md lists them; tests/language/test_messages.py holds that table to these values.
"""

#: Bytes of a model file (1 MiB).
MAX_BYTES = 1 << 20
#: Tokens per file, counted before parsing: parsing and exact arithmetic cost about
#: 0.1-1 ms per token, and the largest realistic models have ~1,000-2,000 tokens.
MAX_TOKENS = 20_000
#: Statements per file.
MAX_STATEMENTS = 5000
#: Parentheses nested, or signs in a row (``- - - x`` nests like parentheses).
MAX_DEPTH = 200
#: Characters in a name.
MAX_NAME = 128
#: Digits in a number literal, and the size of its decimal exponent (``1e400``).
MAX_LITERAL_DIGITS = 400
MAX_LITERAL_EXP10 = 400
#: |p| and |q| of an exponent p/q (``x^p``).
MAX_EXPONENT = 1000
#: Bits of an exact power of a number (``2^1000`` has 1,001): about 30,000 decimal digits.
MAX_POWER_BITS = 100_000
#: Characters of a unit text (between the brackets) and of one unit name in it, parentheses
#: nested in it, and the size of its exponents (numerator and denominator).
MAX_UNIT_TEXT = 200
MAX_UNIT_NAME = 64
MAX_UNIT_DEPTH = 10
MAX_UNIT_EXPONENT = 12
