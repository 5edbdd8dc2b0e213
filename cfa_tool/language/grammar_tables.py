"""The model grammar's parser, with its LALR tables loaded from a file shipped beside the grammar.

Building the parse tables from ``grammar/model.lark`` takes 35-60 ms of processor time, at every start of the
command; loading the same tables as lark serialises them (``Lark.memo_serialize``, read back by ``Lark.load``)
takes a few milliseconds.  The tables file (``grammar/model-tables.json``) is plain JSON, never pickle: lark's
tuples and dictionaries with number keys are written as tagged objects and read back exactly.  It records the
SHA-256 of the grammar text and the lark version that built it; the tables are used only when both match, so an
edited grammar or another lark version falls back to building them (correct, only slower).
``tests/language/test_grammar_tables.py`` rebuilds the tables and compares them.

lark numbers the table's tokens and states in an order that changes with Python's string hashing (a new order in
every process); the file numbers them by one rule of its own (:func:`_numbered`), so that writing it again from the
same grammar with the same lark gives the same file, byte for byte.

Regenerate after editing the grammar or upgrading lark (from the repository's top folder):

    python grammar/write_tables.py
"""

from __future__ import annotations

import hashlib
import json
from collections import deque
from pathlib import Path

import lark
from lark import Lark
from lark.grammar import Rule
from lark.lexer import TerminalDef

from cfa_tool.resources import resource_dir

GRAMMAR_FILE = "model.lark"
TABLES_FILE = "model-tables.json"
_TUPLE = "\u0000tuple"  # tags no name in lark's serialisation can hold (a NUL character)
_KEYED = "\u0000keyed"


def build_parser(grammar: str) -> Lark:
    """The parser built from the grammar text (the one set of options the tool parses with)."""
    return Lark(grammar, parser="lalr", propagate_positions=True, maybe_placeholders=False)


def _header(grammar: str) -> dict[str, str]:
    return {"grammar_sha256": hashlib.sha256(grammar.encode("utf-8")).hexdigest(), "lark_version": lark.__version__}


def _tagged(value):
    """lark's serialised parser as JSON values: tuples and dictionaries with keys other than text tagged."""
    if isinstance(value, tuple):
        return {_TUPLE: [_tagged(v) for v in value]}
    if isinstance(value, list):
        return [_tagged(v) for v in value]
    if isinstance(value, dict):
        if all(isinstance(k, str) for k in value):
            return {k: _tagged(v) for k, v in value.items()}
        return {_KEYED: [[_tagged(k), _tagged(v)] for k, v in value.items()]}
    return value


def _untagged(obj: dict):
    """The ``object_hook`` that reverses :func:`_tagged` (called for every JSON object, innermost first)."""
    if len(obj) == 1 and _TUPLE in obj:
        return tuple(obj[_TUPLE])
    if len(obj) == 1 and _KEYED in obj:
        return {(tuple(k) if isinstance(k, list) else k): v for k, v in obj[_KEYED]}
    return obj


_SHIFT = 0  # lark's serialised actions: (0, the state shifted to) or (1, the rule reduced by)


def _numbered(table: dict) -> dict:
    """lark's serialised LALR table (``tokens``: number -> name; ``states``: state -> {token number: action}) with
    numbers that do not depend on Python's string hashing: tokens numbered in the order of their names, states in
    the order a breadth-first walk from the start states meets them, each state's actions in token order.  The
    table reads the same text the same way: only the numbers change."""
    names = table["tokens"]
    token = {old: new for new, old in enumerate(sorted(names, key=names.__getitem__))}
    states, number, queue = table["states"], {}, deque()

    def meet(state: int) -> None:
        if state not in number:
            number[state] = len(number)
            queue.append(state)

    for start in sorted(table["start_states"]):
        meet(table["start_states"][start])
    while queue:
        for old in sorted(states[queue[0]], key=token.__getitem__):
            kind, target = states[queue[0]][old]
            if kind == _SHIFT:
                meet(target)
        queue.popleft()
    for state in sorted(states):  # (an LALR table has no state its start states do not reach)
        meet(state)
    return {
        "tokens": {token[old]: names[old] for old in sorted(names, key=token.__getitem__)},
        "states": {number[state]: {token[old]: (kind, number[target] if kind == _SHIFT else target)
                                   for old, (kind, target) in sorted(states[state].items(),
                                                                     key=lambda item: token[item[0]])}
                   for state in sorted(states, key=number.__getitem__)},
        "start_states": {name: number[state] for name, state in sorted(table["start_states"].items())},
        "end_states": {name: number[state] for name, state in sorted(table["end_states"].items())},
    }


def serialised_parser(parser: Lark) -> dict:
    """The parser as lark serialises it (what ``Lark.load`` reads back), its LALR table numbered by
    :func:`_numbered`."""
    data, memo = parser.memo_serialize([TerminalDef, Rule])
    frontend = data["parser"]
    table = frontend["parser"]
    if not {"tokens", "states", "start_states", "end_states"} <= set(table):  # another lark: as it serialises it
        return {"data": data, "memo": memo}
    table = {**table, **_numbered(table)}
    return {"data": {**data, "parser": {**frontend, "parser": table}}, "memo": memo}


def tables_text(grammar: str) -> str:
    """The contents of the tables file for this grammar: the grammar's hash, lark's version, the parser."""
    parser = serialised_parser(build_parser(grammar))
    text = json.dumps({**_header(grammar), "parser": _tagged(parser)}, sort_keys=True)
    if json.loads(text, object_hook=_untagged)["parser"] != parser:  # the tagging must read back exactly
        raise ValueError("lark's serialised parser does not survive the JSON tables file")
    return text


def saved_parser(grammar: str, tables: str) -> Lark | None:
    """The parser loaded from the tables, or None when they were made for another grammar or lark version."""
    try:
        found = json.loads(tables, object_hook=_untagged)
        if not isinstance(found, dict) or {k: found.get(k) for k in ("grammar_sha256", "lark_version")} != _header(grammar):
            return None
        return Lark.load(found["parser"])
    except Exception:  # a damaged or foreign tables file: build the tables instead
        return None


def model_parser() -> Lark:
    """The model grammar's parser: the shipped tables when they match the grammar, else built from it."""
    folder = resource_dir("grammar")
    grammar = (folder / GRAMMAR_FILE).read_text(encoding="utf-8")
    tables = folder / TABLES_FILE
    found = saved_parser(grammar, tables.read_text(encoding="utf-8")) if tables.is_file() else None
    return found if found is not None else build_parser(grammar)


def write_tables(folder: Path) -> Path:
    """Write the tables file of the grammar in ``folder`` (a source checkout's grammar/) and return its path."""
    grammar = (folder / GRAMMAR_FILE).read_text(encoding="utf-8")
    target = folder / TABLES_FILE
    target.write_text(tables_text(grammar) + "\n", encoding="utf-8")
    return target
