"""The parser tables shipped beside the grammar (grammar/model-tables.json) are the tables lark builds from
grammar/model.lark: the test rebuilds them with lark and compares rules, terminals, options and the LALR table.

lark numbers its states in an order that changes with Python's string hashing, so the two tables are compared
after renumbering each state by a breadth-first walk from the start state (tokens in sorted order).  The file
itself numbers them by a rule of its own (``grammar_tables._numbered``), so that writing it again gives the same
bytes whatever the hashing: the shipped file is what ``python grammar/write_tables.py`` writes now.
After editing the grammar or upgrading lark: ``python grammar/write_tables.py``.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from collections import deque

import lark
import pytest
from lark import Lark

from cfa_tool.language import grammar_tables
from cfa_tool.language.parser import _parser
from cfa_tool.resources import resource_dir

REGENERATE = "run 'python grammar/write_tables.py' after editing the grammar or upgrading lark"


def _grammar() -> str:
    return (resource_dir("grammar") / grammar_tables.GRAMMAR_FILE).read_text(encoding="utf-8")


def _shipped() -> str:
    return (resource_dir("grammar") / grammar_tables.TABLES_FILE).read_text(encoding="utf-8")


def _shipped_parser() -> tuple[dict, Lark]:
    found = json.loads(_shipped(), object_hook=grammar_tables._untagged)
    return found, Lark.load(found["parser"])


def _rule(rule) -> tuple:
    return (rule.origin.name, tuple(s.name for s in rule.expansion), rule.alias, rule.order,
            (rule.options.keep_all_tokens, rule.options.expand1, rule.options.priority))


def _canonical_table(parser: Lark) -> list:
    """The LALR table with states renumbered in the order a breadth-first walk from the start state meets them."""
    table = parser.parser.parser.parser.parse_table
    (start,) = table.start_states.values()
    number, order, queue = {start: 0}, [], deque([start])
    while queue:
        state = queue.popleft()
        row = []
        for token in sorted(table.states[state]):
            kind, target = table.states[state][token]
            if kind.name == "Shift":
                if target not in number:
                    number[target] = len(number)
                    queue.append(target)
                row.append((token, "shift", number[target]))
            else:
                row.append((token, "reduce", _rule(target)))
        order.append(row)
    assert len(number) == len(table.states), "states the start state does not reach"
    (end,) = table.end_states.values()
    return [order, number[end]]


def _description(parser: Lark) -> dict:
    options = {k: parser.options.options[k] for k in ("parser", "lexer", "propagate_positions", "maybe_placeholders",
                                                       "keep_all_tokens", "start", "priority", "ambiguity")}
    return {
        "options": options,
        "rules": sorted(_rule(r) for r in parser.rules),
        "terminals": sorted((t.name, t.pattern.type, t.pattern.value, tuple(t.pattern.flags), t.priority)
                            for t in parser.terminals),
        "ignore": sorted(parser.lexer_conf.ignore),
        "table": _canonical_table(parser),
    }


def test_shipped_tables_are_the_grammars_tables():
    header, shipped = _shipped_parser()
    assert header["grammar_sha256"] == grammar_tables._header(_grammar())["grammar_sha256"], REGENERATE
    rebuilt = grammar_tables.build_parser(_grammar())
    assert _description(shipped) == _description(rebuilt), REGENERATE


def test_the_comparison_sees_a_changed_grammar():
    """The canonical description is not blind: a grammar with one more statement word differs."""
    changed = _grammar().replace('"factor"', '"factor" | "construct"', 1)
    assert changed != _grammar()
    assert _description(grammar_tables.build_parser(changed)) != _description(grammar_tables.build_parser(_grammar()))


def test_the_tool_uses_the_shipped_tables():
    header, _ = _shipped_parser()
    if header["lark_version"] != lark.__version__:
        pytest.skip(f"tables written with lark {header['lark_version']}, lark {lark.__version__} installed: "
                    f"the tool builds the tables at its start; {REGENERATE}")
    assert grammar_tables.saved_parser(_grammar(), _shipped()) is not None


def test_other_grammar_or_damaged_tables_fall_back_to_building():
    assert grammar_tables.saved_parser(_grammar() + "\n// edited\n", _shipped()) is None
    assert grammar_tables.saved_parser(_grammar(), "not a tables file") is None
    assert grammar_tables.saved_parser(_grammar(), _shipped()[:200]) is None
    assert grammar_tables.saved_parser(_grammar(), "[1, 2]") is None


def test_the_json_tagging_reads_back_exactly():
    """lark's serialisation holds tuples and dictionaries with number keys, which plain JSON would turn into
    lists and text keys; the tagged form gives back equal objects of the same types."""
    serialised = grammar_tables.serialised_parser(grammar_tables.build_parser(_grammar()))
    back = json.loads(json.dumps(grammar_tables._tagged(serialised)), object_hook=grammar_tables._untagged)
    assert back == serialised
    assert json.loads(json.dumps(serialised)) != serialised  # plain JSON would not do
    sample = {"a": (1, (2, "x")), 3: [None, True], (4, 5): {"b": ()}}
    assert json.loads(json.dumps(grammar_tables._tagged(sample)), object_hook=grammar_tables._untagged) == sample


def test_shipped_and_rebuilt_parsers_read_the_example_models_alike():
    _, shipped = _shipped_parser()
    rebuilt = grammar_tables.build_parser(_grammar())
    models = sorted(resource_dir("models").glob("*.cfa"))
    assert models
    for path in models:
        text = path.read_text(encoding="utf-8")
        assert shipped.parse(text) == rebuilt.parse(text) == _parser().parse(text), path.name


# the tables file's text as a fresh process writes it (``grammar_tables.tables_text``), under a given string hashing
WRITE = """
import sys
from cfa_tool.language import grammar_tables
from cfa_tool.resources import resource_dir
grammar = (resource_dir("grammar") / grammar_tables.GRAMMAR_FILE).read_text(encoding="utf-8")
sys.stdout.write(grammar_tables.tables_text(grammar))
"""


def _written_with_hash_seed(seed: int) -> str:
    env = {**os.environ, "PYTHONHASHSEED": str(seed)}
    return subprocess.run([sys.executable, "-c", WRITE], env=env, capture_output=True, text=True, check=True).stdout


def test_writing_the_tables_again_gives_the_same_file_whatever_the_string_hashing():
    """Regenerating the file after a lark upgrade changes only what the new tables change (lark's own numbering of
    states changes with every process's string hashing, which rewrote the whole file each time)."""
    first, second = _written_with_hash_seed(1), _written_with_hash_seed(2)
    assert first == second
    assert json.loads(first, object_hook=grammar_tables._untagged)["parser"] == grammar_tables.serialised_parser(
        grammar_tables.build_parser(_grammar()))


def test_the_shipped_file_is_what_write_tables_writes_now():
    header, _ = _shipped_parser()
    if header["lark_version"] != lark.__version__:
        pytest.skip(f"tables written with lark {header['lark_version']}, lark {lark.__version__} installed")
    assert _shipped() == grammar_tables.tables_text(_grammar()) + "\n", REGENERATE


def test_the_numbered_table_is_lark_s_table_renumbered():
    """The file's numbering changes numbers only: the table lark builds, renumbered, reads as the same table."""
    rebuilt = grammar_tables.build_parser(_grammar())
    data, memo = rebuilt.memo_serialize([grammar_tables.TerminalDef, grammar_tables.Rule])
    own = data["parser"]["parser"]
    numbered = grammar_tables._numbered(own)
    assert sorted(numbered["tokens"].values()) == sorted(own["tokens"].values())
    assert len(numbered["states"]) == len(own["states"]) and sorted(numbered["states"]) == list(range(len(own["states"])))
    reloaded = Lark.load(grammar_tables.serialised_parser(rebuilt))
    assert _description(reloaded) == _description(rebuilt)
