"""The saved LALR tables (checker/plantlint/language/plant.lalr) are the grammar's own:
made from the current grammar/plant.lark, parsing every model exactly as a parser built
from the grammar does, and ignored when they do not match (the parser is then built)."""

from __future__ import annotations

from pathlib import Path

import lark
import pytest
from lark.exceptions import UnexpectedInput

from plantlint.core.catalogue import load_catalogue
from plantlint.core.resources import data_path
from plantlint.language import syntax
from conftest import FIXTURES, REPO

GRAMMAR = (data_path("grammar") / "plant.lark").read_text(encoding="utf-8")
MODELS = sorted([*FIXTURES.rglob("*.plant"), *(REPO / "example_repo").rglob("*.plant")])


def test_the_saved_tables_were_made_from_this_grammar() -> None:
    """Fails when the grammar was edited and `python tools/make_parser_tables.py` not run."""
    first = syntax.TABLES.read_bytes().split(b"\n", 1)[0].decode("ascii")
    assert first.endswith(syntax.tables_header(GRAMMAR).decode("ascii").strip().rsplit(";", 1)[1]), \
        "grammar/plant.lark changed: run python tools/make_parser_tables.py"


def test_the_parser_in_use_is_the_saved_one_when_lark_matches() -> None:
    recorded = syntax.TABLES.read_bytes().split(b"\n", 1)[0].decode("ascii")
    loaded = syntax.saved_parser(GRAMMAR)
    if f"lark {lark.__version__};" in recorded:
        assert loaded is not None
    else:  # another lark: the tables are not trusted, the parser is built from the grammar
        assert loaded is None
    assert syntax.parser() is not None


def _outcome(parser: lark.Lark, text: str) -> object:
    try:
        return parser.parse(text)
    except UnexpectedInput as exc:
        return (type(exc).__name__, exc.line, exc.column, sorted(getattr(exc, "expected", None) or ()))


def test_saved_and_built_parsers_agree_on_every_model() -> None:
    """Trees, and for broken files the error, its place and the tokens expected there."""
    saved = syntax.saved_parser(GRAMMAR) or syntax.parser()
    built = syntax.build_parser(GRAMMAR)
    texts = {str(p): p.read_text(encoding="utf-8", errors="replace") for p in MODELS}
    for rule in load_catalogue():  # the catalogue's failing and passing examples
        texts[f"{rule.id} bad"], texts[f"{rule.id} good"] = rule.bad, rule.good
    # and some broken ones: cut every fixture in the middle of its last statement
    texts.update({f"{p} cut": t[: t.rstrip().rfind(" ")] for p, t in list(texts.items())[:40]})
    assert len(texts) > 150
    for name, text in texts.items():
        assert _outcome(saved, text) == _outcome(built, text), name
    assert sorted(t.name for t in saved.terminals) == sorted(t.name for t in built.terminals)


@pytest.mark.parametrize("damage", ["header", "payload", "missing"])
def test_tables_that_do_not_match_are_not_used(tmp_path: Path, damage: str) -> None:
    good = syntax.TABLES.read_bytes()
    header, payload = good.split(b"\n", 1)
    copy = tmp_path / "plant.lalr"
    if damage == "header":
        copy.write_bytes(header.replace(b"sha256 ", b"sha256 0") + b"\n" + payload)
    elif damage == "payload":
        copy.write_bytes(header + b"\n" + payload[: len(payload) // 2])
    assert syntax.saved_parser(GRAMMAR, copy) is None
