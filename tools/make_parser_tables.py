"""Write the saved LALR tables of grammar/plant.lark (checker/plantlint/language/plant.lalr).

Run after editing the grammar or upgrading lark:

    python tools/make_parser_tables.py

The file starts with a header line naming the lark version and the grammar's sha256;
plantlint reads the tables only when both match, and builds them from the grammar
otherwise (about 70 ms instead of a few). tests/language/test_parser_tables.py fails when
the grammar changed and the tables were not made again.
"""

from __future__ import annotations

import io

from plantlint.core.resources import data_path
from plantlint.language.syntax import TABLES, build_parser, tables_header


def main() -> None:
    grammar = (data_path("grammar") / "plant.lark").read_text(encoding="utf-8")
    out = io.BytesIO()
    build_parser(grammar).save(out)
    TABLES.write_bytes(tables_header(grammar) + out.getvalue())
    print(f"wrote {TABLES} ({TABLES.stat().st_size} bytes)")


if __name__ == "__main__":
    main()
