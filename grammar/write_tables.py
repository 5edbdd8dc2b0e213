"""Write model-tables.json beside model.lark: the parser tables the tool loads at its start instead of building
them (see cfa_tool/language/grammar_tables.py).  Run after editing the grammar or upgrading lark:

    python grammar/write_tables.py
"""

from pathlib import Path

import lark

from cfa_tool.language.grammar_tables import write_tables

if __name__ == "__main__":
    print(f"wrote {write_tables(Path(__file__).resolve().parent)} with lark {lark.__version__}")
