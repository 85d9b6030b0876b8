"""Reading ``.plant`` text into statements, without sympy.

The grammar lives in ``grammar/plant.lark``. Each expression is read from the parse
tree (never from the text) for the names and function calls it mentions, each with its
source span so findings can point at it; its exact value is built from the same tree on
first use (:mod:`plantlint.language.expressions`). So a file that does not parse, or
whose names do not resolve (:mod:`plantlint.language.names`), is reported without
sympy. Hostile input (huge files, deep nesting, huge exponents, bad bytes) is turned
into a ``syntax`` finding before it can cost time or memory.
"""

from __future__ import annotations

import hashlib
import io
import re
from dataclasses import dataclass, field
from fractions import Fraction
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING, Callable, Optional

import lark
from lark import Lark, Token, Tree
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from plantlint.core import anchors
from plantlint.core.findings import Finding, Span
from plantlint.core.catalogue import finding
from plantlint.core.limits import MAX_BYTES, MAX_DEPTH, MAX_NAME, MAX_STATEMENTS, MAX_TOKENS
from plantlint.core.resources import data_path
from plantlint.language.source import (FUNCTIONS, Built, CallRef, NameRef, ParseProblem, check_power, near_miss,
                                       number, operands_first, shorten, span_of, syntax_problem)


if TYPE_CHECKING:
    import sympy as sp


KEYWORDS = frozenset(
    "plant const param state input let rate output point expect waive at in".split()
)
RESERVED = KEYWORDS | frozenset(FUNCTIONS) | {"pi"}


class Expression:
    """A parsed expression: what it mentions, read from its parse tree without sympy, and its
    exact value (names as real symbols), built from the same tree on first use.

    ``names`` and ``calls`` come from :func:`plantlint.language.syntax.mentions`; the value
    and the parts as written (``hidden``, ``kinks``, ``undefined_calls``) from
    :mod:`plantlint.language.expressions`, which imports sympy. So a model whose names do
    not resolve is answered without sympy: nothing asks for a value.

    Building the value can still find a problem the walk could not (a power of numbers
    reached only through a function, ``sqrt(4)^(10^6)``): it raises :class:`ParseProblem`,
    and the model build asks for every value first, in statement order, to report it.
    """

    __slots__ = ("span", "names", "calls", "tree", "_built")

    def __init__(self, span: Span, names: tuple[NameRef, ...], calls: tuple[CallRef, ...],
                 tree: Tree | Token | None = None, built: Built | None = None):
        self.span = span
        self.names = names
        self.calls = calls
        #: the parse tree (read by the value builder and the unit checker)
        self.tree = tree
        self._built = built

    def _value_parts(self) -> Built:
        if self._built is None:
            from plantlint.language.expressions import build_value  # sympy: only once a value is asked for

            assert self.tree is not None, "an expression without a tree carries its value"
            self._built = build_value(self.tree)
        return self._built

    @property
    def value(self) -> sp.Expr:
        return self._value_parts().value

    @property
    def hidden(self) -> tuple[sp.Expr, ...]:
        """Singular parts as written (x^(-1), log(x), asin(x), ...) that the exact value no
        longer shows: ``x^(-1)*x`` is 1 and ``exp(log(x))`` is x, but as written they are
        undefined at x = 0; the domain checks take these parts too."""
        return self._value_parts().hidden

    @property
    def kinks(self) -> tuple[tuple[Span, sp.Expr, sp.Expr], ...]:
        """Calls and powers whose exact value is not smooth although the function is:
        sqrt(x^2) is abs(x) for real x (span, what was written, unevaluated; its value)."""
        return self._value_parts().kinks

    @property
    def undefined_calls(self) -> tuple[tuple[Span, sp.Expr], ...]:
        """Calls of numbers outside the function's domain, as written: (span, log(0)) or
        (span, sqrt(-1)); the model finding points at them rather than at the whole expression."""
        return self._value_parts().undefined_calls

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Expression):
            return NotImplemented
        return (self.span, self.names, self.calls) == (other.span, other.names, other.calls) and self.value == other.value

    def __hash__(self) -> int:
        return hash((self.span, self.names, self.calls))

    def __repr__(self) -> str:
        return f"Expression(span={self.span!r}, names={self.names!r}, calls={self.calls!r})"


@dataclass(frozen=True)
class Claim:
    kind: str  # relative_degree | regular | minimum_phase | state_linearizable | other text
    span: Span
    output: NameRef | None = None
    value: Expression | None = None


@dataclass(frozen=True)
class Statement:
    kind: str  # plant const param state input let rate output point expect waive
    span: Span
    name: str | None = None
    name_span: Span | None = None
    expr: Expression | None = None
    unit: str | None = None
    unit_span: Span | None = None  # the unit text inside the brackets
    doc: str | None = None
    low: Expression | None = None
    high: Expression | None = None
    range_span: Span | None = None
    assignments: tuple[tuple[NameRef, Expression], ...] = ()
    claim: Claim | None = None
    at_point: NameRef | None = None
    rule_id: NameRef | None = None
    tolerance: Expression | None = None  # point: `tolerance EXPR` at its end


@dataclass
class Parsed:
    statements: list[Statement] = field(default_factory=list)
    findings: list[Finding] = field(default_factory=list)


#: The LALR tables of grammar/plant.lark, saved by tools/make_parser_tables.py (lark's own
#: ``Lark.save``) next to this module: loading them takes a few milliseconds where building
#: them takes about 70. They belong to the package like its code and are read only when
#: their header names this lark version and this grammar; otherwise the tables are built.
TABLES = Path(__file__).with_name("plant.lalr")


def build_parser(grammar: str) -> Lark:
    """The parser, built from the grammar's text."""
    return Lark(grammar, parser="lalr", lexer="contextual", propagate_positions=True, maybe_placeholders=True)


def tables_header(grammar: str) -> bytes:
    """The first line of the saved tables: what they were built from."""
    digest = hashlib.sha256(grammar.encode("utf-8")).hexdigest()
    return f"plantlint LALR tables; lark {lark.__version__}; grammar sha256 {digest}\n".encode("ascii")


def saved_parser(grammar: str, path: Path = TABLES) -> Lark | None:
    """The parser from the saved tables, or None when they are missing or were made from
    another grammar or lark version."""
    header = tables_header(grammar)
    try:
        data = path.read_bytes()
    except OSError:
        return None
    if not data.startswith(header):
        return None
    try:
        return Lark.load(io.BytesIO(data[len(header):]))
    except Exception:  # noqa: BLE001 - unreadable tables are rebuilt, never trusted
        return None


@lru_cache(maxsize=1)
def parser() -> Lark:
    grammar = (data_path("grammar") / "plant.lark").read_text(encoding="utf-8")
    return saved_parser(grammar) or build_parser(grammar)


# -- decoding and pre-checks ------------------------------------------------------

def decode(data: bytes) -> tuple[str | None, Finding | None]:
    """Bytes to text: UTF-8 (a leading BOM is dropped), CRLF accepted."""
    if len(data) > MAX_BYTES:
        return None, syntax_problem(
            f"file is {len(data) / 1e6:.1f} MB; plant models are limited to {MAX_BYTES // 1024} KiB",
            Span(1, 1, 1, 2),
            anchor=anchors.problem("file too large"),
        )
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
            return None, syntax_problem("file is UTF-16 (it starts with a UTF-16 byte-order mark); plant models are UTF-8",
                                 Span(1, 1, 1, 2), hint="save the file as UTF-8",
                                 anchor=anchors.problem("utf-16"))
        line = data.count(b"\n", 0, exc.start) + 1
        col = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        return None, syntax_problem(
            f"file is not valid UTF-8 (byte 0x{data[exc.start]:02x} at offset {exc.start})",
            Span.point(line, col),
            anchor=anchors.problem("invalid utf-8"),
        )
    if text.startswith("\ufeff"):
        text = text[1:]
    nul = text.find("\x00")
    if nul >= 0:
        return None, syntax_problem("file contains a NUL byte; is it a binary file?", _point_at(text, nul),
                             anchor=anchors.problem("nul byte"))
    lone = _LONE_CR.search(text)
    if lone is not None:
        # other tools (SARIF viewers, editors) count a lone CR as a line end and plantlint
        # would not: the lines and columns of every finding would disagree with them
        return None, syntax_problem("a lone carriage return (CR) ends a line here; plantlint reads LF or CRLF line ends",
                             _point_at(text, lone.start()), hint="save the file with LF (or CRLF) line ends",
                             anchor=anchors.problem("lone carriage return"))
    return text, None


def _point_at(text: str, offset: int) -> Span:
    """The line and column of a character offset (lines end at LF)."""
    return Span.point(text.count("\n", 0, offset) + 1, offset - (text.rfind("\n", 0, offset) + 1) + 1)


_LONE_CR = re.compile(r"\r(?!\n)")


_TOKEN = re.compile(r'#[^\n]*|"[^"\n]*"?|\[[^\[\]\n]*\]?|[A-Za-z0-9_.]+|\S')


def _size_problem(text: str) -> Finding | None:
    """Reject files with more than MAX_TOKENS tokens before parsing (comments do not count)."""
    count = 0
    for match in _TOKEN.finditer(text):
        if match.group().startswith("#"):
            continue
        count += 1
        if count > MAX_TOKENS:
            start = match.start()
            line = text.count("\n", 0, start) + 1
            col = start - (text.rfind("\n", 0, start) + 1) + 1
            return syntax_problem(f"more than {MAX_TOKENS} tokens; plant models are limited to {MAX_TOKENS}",
                           Span.point(line, col), anchor=anchors.problem("too many tokens"))
    return None


def _nesting_problem(text: str) -> Finding | None:
    """Reject parentheses nested deeper than MAX_DEPTH, or more than MAX_DEPTH
    signs in a row (``- - - x`` nests like parentheses), before parsing (cheap scan)."""
    depth = 0
    signs = 0
    line, col = 1, 0
    in_comment = in_string = False
    for ch in text:
        col += 1
        if ch == "\n":
            line, col = line + 1, 0
            in_comment = in_string = False
            continue
        if in_comment:
            continue
        if in_string:
            in_string = ch != '"'
            continue
        if ch in "+-":
            signs += 1
            if signs > MAX_DEPTH:
                return syntax_problem(f"more than {MAX_DEPTH} signs in a row", Span.point(line, col), anchor=anchors.problem("nesting"))
        elif not ch.isspace():
            signs = 0
        if ch == "#":
            in_comment = True
        elif ch == '"':
            in_string = True
        elif ch == "(":
            depth += 1
            if depth > MAX_DEPTH:
                return syntax_problem(
                    f"parentheses nested more than {MAX_DEPTH} deep",
                    Span.point(line, col),
                    anchor=anchors.problem("nesting"),
                )
        elif ch == ")":
            depth = max(depth - 1, 0)
    return None


# -- parsing --------------------------------------------------------------------

#: The last texts parsed and their trees, oldest first: a worker forked after the runner's
#: look at a file (does it get past its names?) does not parse it again; two, so that the
#: runner's warm-up model read after the look does not push the file out.
_recent: dict[str, Tree] = {}


def _tree(text: str) -> tuple[Tree | None, Finding | None]:
    """The parse tree of a whole file, or the finding that says why there is none."""
    if text in _recent:
        return _recent[text], None
    problem = _nesting_problem(text) or _size_problem(text)
    if problem is not None:
        return None, problem
    try:
        tree = parser().parse(text)
    except UnexpectedInput as exc:
        return None, _explain_error(exc, text)
    except RecursionError:
        return None, syntax_problem("expression too deeply nested", Span(1, 1, 1, 2), anchor=anchors.problem("nesting"))
    _recent[text] = tree
    while len(_recent) > 2:
        del _recent[next(iter(_recent))]
    return tree, None


def parse_text(text: str) -> Parsed:
    """Parse a whole file. Never raises for bad input: problems come back as findings."""
    out = Parsed()
    tree, problem = _tree(text)
    if tree is None:
        assert problem is not None
        out.findings.append(problem)
        return out
    if len(tree.children) > MAX_STATEMENTS:
        out.findings.append(
            syntax_problem(
                f"{len(tree.children)} statements; plant models are limited to {MAX_STATEMENTS}",
                span_of(tree.children[MAX_STATEMENTS]),
                anchor=anchors.problem("too many statements"),
            )
        )
        return out
    builder = _Builder()
    for node in tree.children:
        try:
            out.statements.append(builder.statement(node))
        except ParseProblem as problem_:
            out.findings.extend(problem_.findings)
        except RecursionError:
            out.findings.append(syntax_problem("expression too deeply nested", span_of(node), anchor=anchors.problem("nesting")))
    return out


_EXPECTED_WORDS = {
    "NAME": "a name",
    "NUMBER": "a number",
    "STRING": 'a "quoted" text',
    "UNIT": "a [unit]",
    "RULE_ID": "a rule id",
    "$END": "the end of the file",
}
#: Statements start with these keywords (the order is the usual order in a file).
STATEMENT_KEYWORDS = ("plant", "const", "param", "state", "input", "let", "rate", "output", "point",
                      "expect", "waive")


def _explain_error(exc: UnexpectedInput, text: str) -> Finding:
    """The finding for a file the parser rejects. Its anchor (what it is about, for the
    --since fingerprint) includes the offending line's text, so a new error with the same
    wording on another statement is not taken for the one at the baseline."""
    from dataclasses import replace

    problem = _explain(exc, text)
    if problem.span is None:
        return problem
    lines = text.splitlines()
    line = lines[problem.span.line - 1].strip() if 0 < problem.span.line <= len(lines) else ""
    return replace(problem, anchor=f"{problem.anchor} in `{line[:200]}`")


def _explain(exc: UnexpectedInput, text: str) -> Finding:
    line = getattr(exc, "line", None) or 1
    column = getattr(exc, "column", None) or 1
    if isinstance(exc, UnexpectedCharacters):
        ch = text[exc.pos_in_stream] if 0 <= exc.pos_in_stream < len(text) else ""
        if ch == '"':
            return syntax_problem("unterminated text: a closing '\"' is missing on this line", Span.point(line, column), anchor=anchors.problem("unterminated string"))
        if ch == "[":
            return syntax_problem("unterminated unit: a closing ']' is missing on this line", Span.point(line, column), anchor=anchors.problem("unterminated unit"))
        shown = repr(ch) if ch.isprintable() else f"U+{ord(ch):04X}" if ch else "end of file"
        return syntax_problem(f"unexpected character {shown}", Span.point(line, column), anchor=anchors.problem(f"unexpected character {shown}"))
    if isinstance(exc, (UnexpectedEOF, UnexpectedToken)):
        tok = getattr(exc, "token", None)
        consumed = _consumed_backwards(exc)
        unreasoned = _waiver_without_reason(consumed, exc.expected)
        if unreasoned is not None:
            last, waive = unreasoned
            written = " ".join(text[waive.start_pos:last.end_pos].split())  # as written, on one line
            return syntax_problem('a waiver needs a reason, in double quotes after the rule id', _after(last),
                                  hint=f'{written} "why it is accepted"', anchor=anchors.problem("waiver without reason"))
        if tok is None or tok.type == "$END":
            last = consumed[0] if consumed else None
            where = _after(last) if last is not None else Span.point(1, 1)
            after = f" after '{shorten(str(last))}'" if last is not None else ""
            return syntax_problem(f"file ends in the middle of a statement{after}", where,
                           hint="expected " + _expected(_accepted_after(text, last, exc.expected)),
                           anchor=anchors.problem("unexpected end"))
        broken = _incomplete_before_keyword(tok, consumed, text)
        if broken is not None:
            keyword, last = broken
            message = f"incomplete statement: it stops after '{shorten(str(last))}'"
            return syntax_problem(message + f" (the next line starts a new `{keyword}` statement)", _after(last),
                           hint="expected " + _expected(_accepted_after(text, last, exc.expected)),
                           anchor=anchors.problem(f"incomplete statement before {keyword}"))
        span = span_of(tok)
        value = str(tok)
        misordered = _misordered_range_and_unit(tok, consumed)
        if misordered is not None:
            return syntax_problem(misordered, span, anchor=anchors.problem("range and unit order"))
        expected_keywords = [k for k in STATEMENT_KEYWORDS if k.upper() in exc.expected]
        if tok.type in ("NAME", "RULE_ID") and value not in RESERVED and expected_keywords \
                and (_starts_line(tok, text) or not _expects_operand(exc.expected)):
            message = f"unknown statement '{shorten(value)}'; a statement starts with a keyword"
            close = near_miss(value, STATEMENT_KEYWORDS)
            hint = f"did you mean `{close}`?" if close else "keywords: " + ", ".join(STATEMENT_KEYWORDS)
            return syntax_problem(message, span, hint=hint, anchor=anchors.problem(f"unknown statement {value}"))
        if tok.type == "NAME" and value in RESERVED:
            message = f"'{value}' is reserved and cannot be used here"
        elif value in KEYWORDS:
            message = f"unexpected keyword '{value}' (the previous statement is incomplete)"
        else:
            message = f"unexpected '{shorten(value)}'"
        return syntax_problem(message, span, hint="expected " + _expected(exc.expected), anchor=anchors.problem(message))
    return syntax_problem("cannot read this statement", Span.point(line, column), anchor=anchors.problem("syntax"))


def _waiver_without_reason(consumed: list[Token], expected: "set[str] | frozenset[str]") -> tuple[Token, Token] | None:
    """(last token, `waive` token) of a `waive RULE [at POINT]` that stops where its reason
    belongs; None for anything else."""
    if "STRING" not in expected or not consumed:
        return None
    for tok in consumed:  # newest first: the point name, `at`, the rule id, then `waive`
        if str(tok) == "waive" and tok is not consumed[0]:
            return consumed[0], tok
        if tok.type not in ("RULE_ID", "NAME") and str(tok) != "at":
            return None
    return None


def _after(tok: Token) -> Span:
    """A zero-width place just after a token (where something is missing)."""
    line = tok.end_line or tok.line or 1
    column = tok.end_column or ((tok.column or 1) + len(tok))
    return Span.point(line, column)


def _consumed_backwards(exc: UnexpectedInput, limit: int = 64) -> list[Token]:
    """The tokens the parser had accepted before the error, newest first (at most ``limit``)."""
    parser_ = getattr(exc, "interactive_parser", None)
    stack = list(getattr(getattr(parser_, "parser_state", None), "value_stack", None) or [])
    out: list[Token] = []
    while stack and len(out) < limit:
        item = stack.pop()
        if isinstance(item, Token):
            out.append(item)
        elif isinstance(item, Tree):
            stack.extend(c for c in item.children if c is not None)
    return out


def _starts_line(tok: Token, text: str) -> bool:
    start = tok.start_pos if tok.start_pos is not None else 0
    return text[text.rfind("\n", 0, start) + 1:start].strip() == ""


def _incomplete_before_keyword(tok: Token, consumed: list[Token], text: str) -> tuple[str, Token] | None:
    """(keyword, last token of the broken statement) when the error comes from a statement
    keyword at the start of a line, read as part of an unfinished expression on the lines
    before it (``rate x = v +`` followed by ``rate v = ...``)."""
    for i, candidate in enumerate([tok, *consumed]):
        value = str(candidate)
        keyword_typed = candidate.type == value.upper() and value in STATEMENT_KEYWORDS
        if value in STATEMENT_KEYWORDS and _starts_line(candidate, text) and (i == 0 or not keyword_typed):
            before = consumed[i] if i < len(consumed) else None
            return (value, before) if before is not None else None
        if keyword_typed:
            return None  # reached the start of the statement the parser was reading
    return None


#: Where the unit goes, by statement (docs/language.md): a parameter's value and range come
#: before its unit; a state's or input's unit comes before its range.
_UNIT_ORDER = {
    "param": "the range of a parameter comes before its unit: `param NAME = VALUE in LO .. HI [UNIT]`",
    "state": "the unit of a state comes before its range: `state NAME [UNIT] in LO .. HI`",
    "input": "the unit of an input comes before its range: `input NAME [UNIT] in LO .. HI`",
}


def _misordered_range_and_unit(tok: Token, consumed: list[Token]) -> str | None:
    """The message for a range and a unit written in the other order (``param k = 80 [N/m]
    in 60 .. 100``, ``state x in 0 .. 1 [m]``), or None."""
    keyword = next((str(t) for t in consumed if t.type == str(t).upper() and str(t) in STATEMENT_KEYWORDS), None)
    if keyword == "param" and tok.type == "IN" and consumed and consumed[0].type == "UNIT":
        return _UNIT_ORDER["param"]
    if keyword in ("state", "input") and tok.type == "UNIT" and any(t.type == "DOTDOT" for t in consumed):
        return _UNIT_ORDER[keyword]
    return None


def _expects_operand(expected: "set[str] | frozenset[str]") -> bool:
    return bool({"PLUS", "STAR", "EQUAL", "COMMA", "RPAR", "DOTDOT"} & set(expected))


def _accepted_after(text: str, last: Token | None, fallback: "set[str] | frozenset[str]") -> "set[str] | frozenset[str]":
    """What the grammar accepts right after ``last`` (the parser is run again on the text up
    to there; cheap, and only after an error)."""
    if last is None or last.end_pos is None:
        return fallback
    try:
        interactive = parser().parse_interactive(text[: last.end_pos])
        interactive.exhaust_lexer()
        return interactive.accepts() or fallback
    except Exception:  # noqa: BLE001 - only a hint is at stake; the finding stands without it
        return fallback


def _expected(names: "set[str] | frozenset[str]") -> str:
    words = sorted({_word(n) for n in names} - {""})
    if len(words) > 6:
        words = words[:6] + ["..."]
    return ", ".join(words) if words else "something else"


@lru_cache(maxsize=1)
def _literal_terminals() -> dict[str, str]:
    """Terminal name -> the text it stands for, for the grammar's fixed tokens ('+', 'state')."""
    from lark.lexer import PatternStr

    out = {}
    for terminal in parser().terminals:
        if isinstance(terminal.pattern, PatternStr):
            out[terminal.name] = terminal.pattern.value
        elif terminal.name == "DOTDOT":
            out[terminal.name] = ".."
    return out


def _word(terminal: str) -> str:
    """A grammar terminal in words a model author reads (never an internal name)."""
    if terminal in _EXPECTED_WORDS:
        return _EXPECTED_WORDS[terminal]
    literal = _literal_terminals().get(terminal)
    if literal is not None:
        return f"'{literal}'"
    return ""  # an internal terminal: left out rather than shown


class _Builder:
    """Turns statement subtrees into :class:`Statement` records."""

    def statement(self, node: Tree) -> Statement:
        kind = node.data.removesuffix("_stmt") if isinstance(node.data, str) else str(node.data)
        if kind == "header":
            kind = "plant"
        method = getattr(self, "_" + kind)  # by name: _plant, _const, ... _waive below
        return method(node, span_of(node))

    # each statement kind ------------------------------------------------------
    def _plant(self, node: Tree, span: Span) -> Statement:
        name, doc = node.children
        return Statement("plant", span, *self._name(name), doc=_doc(doc))

    def _const(self, node: Tree, span: Span) -> Statement:
        name, expr, unit, doc = node.children
        return Statement("const", span, *self._name(name), expr=self.expression(expr), unit=_unit(unit),
                         unit_span=_unit_span(unit), doc=_doc(doc))

    def _param(self, node: Tree, span: Span) -> Statement:
        name, expr, rng, unit, doc = node.children
        low, high, rspan = self._range(rng)
        return Statement(
            "param", span, *self._name(name), expr=self.expression(expr), unit=_unit(unit),
            unit_span=_unit_span(unit), doc=_doc(doc),
            low=low, high=high, range_span=rspan,
        )

    def _state(self, node: Tree, span: Span) -> Statement:
        name, unit, rng, doc = node.children
        low, high, rspan = self._range(rng)
        return Statement(node.data.removesuffix("_stmt"), span, *self._name(name), unit=_unit(unit),
                         unit_span=_unit_span(unit), doc=_doc(doc), low=low, high=high, range_span=rspan)

    _input = _state

    def _let(self, node: Tree, span: Span) -> Statement:
        name, expr = node.children
        return Statement("let", span, *self._name(name), expr=self.expression(expr))

    def _rate(self, node: Tree, span: Span) -> Statement:
        name, expr = node.children
        return Statement("rate", span, *self._name(name), expr=self.expression(expr))

    def _output(self, node: Tree, span: Span) -> Statement:
        name, unit, expr, doc = node.children
        return Statement("output", span, *self._name(name), expr=self.expression(expr), unit=_unit(unit),
                         unit_span=_unit_span(unit), doc=_doc(doc))

    def _point(self, node: Tree, span: Span) -> Statement:
        name, *assignments = node.children
        tolerance = None
        if assignments and (assignments[-1] is None or assignments[-1].data == "tolerance"):
            clause = assignments.pop()
            tolerance = self.expression(clause.children[0]) if clause is not None else None
        pairs = []
        for a in assignments:
            target, expr = a.children
            pairs.append((NameRef(str(target), span_of(target)), self.expression(expr)))
        return Statement("point", span, *self._name(name), assignments=tuple(pairs), tolerance=tolerance)

    def _expect(self, node: Tree, span: Span) -> Statement:
        claim_node, at = node.children
        if claim_node.data == "claim_of_output":
            kind_tok, out_tok, value = claim_node.children
            claim = Claim(str(kind_tok), span_of(claim_node), NameRef(str(out_tok), span_of(out_tok)), self.expression(value))
        else:
            (kind_tok,) = claim_node.children
            claim = Claim(str(kind_tok), span_of(claim_node))
        return Statement("expect", span, claim=claim, at_point=_at(at))

    def _waive(self, node: Tree, span: Span) -> Statement:
        rule, at, doc = node.children
        return Statement("waive", span, rule_id=NameRef(str(rule), span_of(rule)), at_point=_at(at), doc=_doc(doc))

    # pieces -------------------------------------------------------------------
    def _name(self, tok: Token) -> tuple[str, Span]:
        name = str(tok)
        span = span_of(tok)
        if len(name) > MAX_NAME:
            raise ParseProblem(syntax_problem(f"name of {len(name)} characters; names are limited to {MAX_NAME}", span, anchor=anchors.problem("long name")))
        if name in RESERVED:
            raise ParseProblem(syntax_problem(f"'{name}' is reserved and cannot name a quantity", span, anchor=anchors.problem(f"reserved {name}")))
        return name, span

    def _range(self, rng: Tree | None) -> tuple[Expression | None, Expression | None, Span | None]:
        if rng is None:
            return None, None, None
        lo, _dots, hi = rng.children
        return self.expression(lo), self.expression(hi), span_of(rng)

    def expression(self, root: Tree | Token) -> Expression:
        """An expression subtree: what it mentions now, its exact value on first use."""
        return mentions(root)


def _doc(tree: Tree | None) -> str | None:
    if tree is None:
        return None
    return str(tree.children[0])[1:-1]


def _unit(tree: Tree | None) -> str | None:
    if tree is None:
        return None
    return str(tree.children[0])[1:-1].strip()


def _unit_span(tree: Tree | None) -> Span | None:
    """Span of the unit text between the brackets, without surrounding blanks
    (a unit token never spans lines); an empty unit gets the span of its brackets."""
    if tree is None:
        return None
    tok = tree.children[0]
    raw = str(tok)[1:-1]
    text = raw.strip()
    if not text:
        return span_of(tok)
    start = (tok.column or 1) + 1 + len(raw) - len(raw.lstrip())
    return Span(tok.line or 1, start, tok.line or 1, start + len(text))


def _at(tree: Tree | None) -> NameRef | None:
    if tree is None:
        return None
    tok = tree.children[0]
    return NameRef(str(tok), span_of(tok))


# -- what an expression mentions --------------------------------------------------

def mentions(root: Tree | Token) -> Expression:
    """An expression read from its parse tree without sympy: the names and calls it
    mentions, and every problem that needs no value (unknown function, number of
    arguments, long name, number out of range, and a power of numbers too large to
    compute, where its operands are rational numbers written with + - * / ^). Its exact
    value is built on first use (:class:`Expression`)."""
    return _Reader().read(root)


#: A node's value as far as the reader follows it: a rational number, or None for anything
#: else (a name, a function's value, pi, a quotient by zero, a root).
_Rational = Optional[Fraction]


class _Reader:
    """The walk behind :func:`mentions`. It visits the nodes in the order the value builder
    (:mod:`plantlint.language.expressions`) does, after their operands, which come off a
    stack: the last operand first. That order is part of the behaviour: unknown functions
    are collected (every one is named, in source order); of two other problems in one
    expression the last is reported; ``names`` and ``calls`` list the last mention first,
    which decides the mention a model finding points at (the first offending name in
    ``names``).

    lark's ``Transformer_NonRecursive`` was tried in the builder's place: no recursion
    either, the same spans and the same time within the noise of measurement (the largest
    benchmark models, a 9,000-term sum), but it visits left to right. The lists can be
    put back in this order afterwards; which of two other problems is reported cannot,
    and every problem would come wrapped in a ``VisitError``. So the walk stays explicit.
    """

    def __init__(self) -> None:
        self.names: list[NameRef] = []
        self.calls: list[CallRef] = []
        self.unknown: list[Finding] = []
        self.numbers: dict[int, _Rational] = {}  # by id(): tokens compare equal by their text

    def read(self, root: Tree | Token) -> Expression:
        for node in operands_first(root):
            self.numbers[id(node)] = self._token(node) if isinstance(node, Token) else self._node(node)
        if self.unknown:
            first, *rest = sorted(self.unknown, key=lambda f: (f.span.line, f.span.column) if f.span else (0, 0))
            raise ParseProblem(first, *rest)
        return Expression(span_of(root), tuple(self.names), tuple(self.calls), root)

    def _token(self, tok: Token) -> _Rational:
        if tok.type == "NUMBER":
            return number(tok)
        raise ParseProblem(syntax_problem(f"unexpected '{shorten(str(tok))}'", span_of(tok)))

    def _node(self, node: Tree) -> _Rational:
        rule = self._RULES.get(node.data)
        if rule is None:
            raise ParseProblem(syntax_problem(f"cannot read {node.data}", span_of(node)))
        return rule(self, node)

    def _of(self, node: Tree | Token) -> _Rational:
        return self.numbers[id(node)]

    def _number(self, node: Tree) -> _Rational:
        return self._of(node.children[0])

    def _name(self, node: Tree) -> _Rational:
        tok = node.children[0]
        name = str(tok)
        if len(name) > MAX_NAME:
            raise ParseProblem(syntax_problem(f"name of {len(name)} characters; names are limited to {MAX_NAME}",
                                              span_of(tok), anchor=anchors.problem("long name")))
        if name != "pi":
            self.names.append(NameRef(name, span_of(tok)))
        return None

    def _call(self, node: Tree) -> _Rational:
        fname_tok, *arg_nodes = node.children
        fname = str(fname_tok)
        arity = sum(1 for a in arg_nodes if a is not None)
        span = span_of(node)
        self.calls.append(CallRef(fname, span))
        expected = FUNCTIONS.get(fname)
        if expected is None:
            # recorded, and the walk goes on (the value builder's stand-in for an unknown
            # function is 0) so that every unknown function of the expression is named
            close = near_miss(fname, FUNCTIONS)
            self.unknown.append(finding(
                "unknown-name", f"unknown function '{fname}'", span_of(fname_tok),
                hint=f"did you mean `{close}`?" if close else "functions: " + ", ".join(sorted(FUNCTIONS)),
                anchor=anchors.problem(f"function {fname}")))
            return Fraction(0)
        if arity != expected:
            raise ParseProblem(syntax_problem(f"{fname} takes {expected} argument{'s' if expected > 1 else ''}, got {arity}",
                                              span))
        return None

    def _neg(self, node: Tree) -> _Rational:
        a = self._of(node.children[0])
        return None if a is None else -a

    def _pos(self, node: Tree) -> _Rational:
        return self._of(node.children[0])

    def _binary(self, node: Tree, op: Callable[[Fraction, Fraction], _Rational]) -> _Rational:
        a, b = (self._of(c) for c in node.children)
        return None if a is None or b is None else op(a, b)

    def _add(self, node: Tree) -> _Rational:
        return self._binary(node, lambda a, b: a + b)

    def _sub(self, node: Tree) -> _Rational:
        return self._binary(node, lambda a, b: a - b)

    def _mul(self, node: Tree) -> _Rational:
        return self._binary(node, lambda a, b: a * b)

    def _div(self, node: Tree) -> _Rational:
        return self._binary(node, lambda a, b: a / b if b != 0 else None)

    def _pow(self, node: Tree) -> _Rational:
        base, exponent = (self._of(c) for c in node.children)
        if exponent is None:
            return None
        check_power(base, exponent, span_of(node))
        if base is None or exponent.denominator != 1 or (base == 0 and exponent < 0):
            return None
        return base ** exponent.numerator

    _RULES: dict[str, Callable[["_Reader", Tree], _Rational]] = {
        "number": _number, "name": _name, "call": _call, "neg": _neg, "pos": _pos,
        "add": _add, "sub": _sub, "mul": _mul, "div": _div, "pow": _pow,
    }
