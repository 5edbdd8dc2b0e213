"""Model text -> :class:`Spec`.

The grammar (``grammar/model.lark``) fixes the shape of each statement; this
module turns Lark's tree into the frozen specification, expands ranges such as
``item1..item9`` and translates every syntax error into one plain sentence with
file, line and column.  Checks of meaning (unknown names, contradictions,
identification) live in :mod:`cfa_tool.language.checks`.
"""

from __future__ import annotations

import unicodedata

import re
from functools import lru_cache
from pathlib import Path

from lark import Lark, Token, Tree
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedInput, UnexpectedToken

from cfa_tool.numbers import user_number, word_list
from cfa_tool.suggest import close_names, dotted_span
from cfa_tool.errors import Location, ModelError, character_names, clipped, printable
from cfa_tool.input_files import hidden_line_break, input_bytes, normalise_line_ends, text_lines, utf16_text
from cfa_tool.language.spec import (
    GROUP_EQUALITY_WORDS,
    INVARIANCE_LEVELS,
    with_ordinal_levels,
    REFERENCE_KINDS,
    SCALING_METHODS,
    BLOCK_ROTATIONS,
    DEFAULT_BLOCK_ROTATION,
    BoundSetting,
    AnswerCoding,
    AnswerWord,
    ExploratoryBlock,
    Factor,
    JoinedAnswers,
    Name,
    NamePair,
    ParameterRef,
    ReverseKeying,
    ScaleSetting,
    Spec,
    ValueSetting,
)
from cfa_tool.language.grammar_tables import model_parser
from cfa_tool.language.names import composed, range_names

STATEMENT_WORDS = ("name", "factor", "covary", "uncorrelated", "fix", "free", "equal", "start", "bound", "scale", "in",
                   "invariance", "noninvariant", "ordinal", "reversed", "method", "exploratory", "near", "answers", "join")

# Plain words for the grammar's terminals, used in "expected ..." messages.
_TERMINAL_WORDS = {
    "NAME": "a name",
    "STRING": 'quoted text ("...")',
    "SIGNED_NUMBER": "a number",
    "_NL": "the end of the line",
    "COMPARISON": "'>=' or '<='",
    "$END": "the end of the file",
}

MAX_MODEL_BYTES = 1_000_000
MODEL_SUFFIX = ".cfa"  # the extension of model files
MAX_NAMES = 20_000  # names written by all ranges of one model
MAX_PAIRS = 20_000  # pairs named by 'covary' and 'uncorrelated' in one model
#: the largest size of an end of a declared answer scale ('reversed ... on LOW to HIGH'): scales of answers run from a
#: few to some hundreds of points (0 to 100 for a slider), so ends beyond a million are typing errors, and their sums
#: lose the answers' digits
LARGEST_SCALE_END = 1e6


@lru_cache(maxsize=1)
def _parser() -> Lark:
    return model_parser()


def read_model_file(path: str | Path) -> Spec:
    """Read and parse a model file, with errors that name the file."""
    raw = input_bytes(path, "model file", ModelError, MAX_MODEL_BYTES)
    return parse_model(decode_model_bytes(raw, str(path)), source=str(path))


def decode_model_bytes(raw: bytes, source: str) -> str:
    """UTF-8 (with or without a byte-order mark) or UTF-16 text."""
    wide = utf16_text(raw)
    if wide is not None:
        return wide
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        before = raw[: exc.start]
        line = before.count(b"\n") + 1
        column = exc.start - (before.rfind(b"\n") + 1) + 1
        raise ModelError(
            f"the file is not UTF-8 text (byte 0x{raw[exc.start]:02x} cannot be read); save it as UTF-8",
            Location(source, line, column),
        ) from None


def parse_model(text: str, source: str = "<model>") -> Spec:
    """Parse model text into a checked :class:`Spec`.

    Specs are immutable, so the last few parses are remembered: loops that fit the same
    model text many times (resampling, simulations) parse it once."""
    if not isinstance(text, str):
        raise ModelError(f"model text must be text (str), not {type(text).__name__}"
                         + ("; decode the bytes first" if isinstance(text, (bytes, bytearray)) else ""))
    return _parse_model(text, str(source))


@lru_cache(maxsize=32)
def _parse_model(text: str, source: str) -> Spec:
    from cfa_tool.language.checks import check_spec

    tree, builder = _tree(text, source)
    spec = builder.build(tree)
    check_spec(spec)
    return spec


def _tree(text: str, source: str, what: str = "the model text") -> tuple[Tree, _Builder]:
    """The grammar's tree of a text in the model language, and the builder that reads its statements: a NUL
    character refused (``what`` names the text in that message), line ends made plain, a last line end added,
    and a syntax error given as one sentence with the line and column."""
    if "\x00" in text:
        raise ModelError(f"{what} contains a NUL character; is this a binary file?", Location(source, 1, 1))
    text = normalise_line_ends(text)
    lines = tuple(text_lines(text))
    _refuse_hidden_line_breaks(lines, source)
    if not text.endswith("\n"):
        text += "\n"
    try:
        tree = _parser().parse(text)
    except UnexpectedInput as exc:
        raise _syntax_error(exc, source, lines) from None
    return tree, _Builder(source, text, lines)


def read_answers_file(path: str | Path) -> tuple[AnswerCoding, ...]:
    """The 'answers' statements of a file that holds nothing else (comments and blank lines aside): how ``explore``
    reads answers recorded as words before there is a model.  Each statement is read by the model's own grammar and
    builder; any other statement is an error naming its line, since explore would not use it."""
    source = str(path)
    text = decode_model_bytes(input_bytes(path, "answers file", ModelError, MAX_MODEL_BYTES), source)
    tree, builder = _tree(text, source, "the answers file")
    lines = builder.lines
    codings = []
    for stmt in tree.children:
        if stmt.data != "answers_stmt":
            where = builder.loc(stmt)
            word = lines[where.line - 1].split()[0] if lines[where.line - 1].split() else stmt.data
            raise ModelError(f"an answers file holds 'answers' statements only (explore finds the factors itself); "
                             f"this line is a '{printable(word)}' statement: remove it, or keep the model in a file "
                             f"of its own for 'fit'", where, lines[where.line - 1])
        codings.append(builder.answers(stmt))
    if not codings:
        raise ModelError("the answers file holds no 'answers' statement; write one such as 'answers \"Disagree\" = 1, "
                         "\"Agree\" = 2'", Location(source, max(1, len(lines)), 1))
    return tuple(codings)


# ---------------------------------------------------------------- syntax errors


def _word_at(lines: tuple[str, ...], line: int, column: int) -> str:
    """The run of letters, digits and underscores around a 1-based position."""
    text = lines[line - 1] if 1 <= line <= len(lines) else ""
    start = end = min(max(column - 1, 0), len(text))
    while start > 0 and (text[start - 1].isalnum() or text[start - 1] == "_"):
        start -= 1
    while end < len(text) and (text[end].isalnum() or text[end] == "_"):
        end += 1
    return text[start:end]


def _refuse_hidden_line_breaks(lines: tuple[str, ...], source: str) -> None:
    """A character that looks like a line break but is not one refused at its line and column
    (:func:`cfa_tool.input_files.hidden_line_break`)."""
    found = hidden_line_break(lines)
    if found is not None:
        raise ModelError(found.message(), Location(source, found.line, found.column))


def _syntax_error(exc: UnexpectedInput, source: str, lines: tuple[str, ...]) -> ModelError:
    line = max(1, getattr(exc, "line", 1) or 1)
    column = max(1, getattr(exc, "column", 1) or 1)
    if isinstance(exc, UnexpectedEOF) or (isinstance(exc, UnexpectedToken) and exc.token.type == "$END"):
        line = max(1, len(lines))
        column = len(lines[-1]) + 1 if lines else 1
        message = "the model text ends in the middle of a statement"
    elif isinstance(exc, UnexpectedCharacters):
        char = exc.char if exc.char not in "\r\n" else "line break"
        char = printable(char)
        latin = exc.char.isalpha() and unicodedata.name(exc.char, "").startswith("LATIN")
        message = f"unexpected character '{char}'" + ("" if latin else character_names(exc.char))  # é is seen
        if char == "'":
            message += ' (use double quotes for quoted names and titles)'
        if char.isalpha():  # a letter beyond A-Z: plain names are ASCII
            word = _word_at(lines, line, column)
            message += f'; a name with letters beyond A-Z is written in double quotes: "{clipped(word, 80)}"'
        span = _dashed_span_at(lines, line, column)
        if exc.char == "\\" and 1 <= line <= len(lines) and not lines[line - 1][column:].strip():
            message = f"a backslash does not continue a line in a model file; {CONTINUES}"
        elif span is not None:
            message += f"; a range of names is written with two dots: '{span}'"
        elif char in _PUNCTUATION:
            message += f"; {QUOTE_HINT}"
    elif isinstance(exc, UnexpectedToken):
        message = _continuation_message(exc, lines, line, column) or _unexpected_token_message(exc)
        if exc.token.type == "_NL" and {"NAME", "STRING"} & set(exc.accepts or exc.expected):
            message += f"; {CONTINUES}"
        if _name_goes_on(exc, lines, line, column):
            message += f"; {QUOTE_HINT}, and names in a list are separated by commas"
        written = lines[line - 1].split("#", 1)[0].strip() if 1 <= line <= len(lines) else ""
        if re.match(r"scale\s+latent\s*,", written) and exc.token.type == "COMMA":  # hostile s24: a factor named latent
            message += ("; 'scale latent' scales every factor, so a factor named latent is written in double quotes "
                        "in a list: 'scale \"latent\", comfort by variance'")
        if written.split(" ", 1)[0] == "join" and "FOR" in set(exc.accepts or exc.expected):
            message += ("; a 'join answers' statement names its items after 'for', as in 'join answers 1, 2 as 2 for "
                        "item3, item4'")
        if re.match(r"in\s+group\b.*:\s*join\b", written) and str(exc.token) == "join":
            message += ("; the same join applies in every group (thresholds are compared across groups on the same "
                        "categories), so 'join answers' is written on a line of its own, outside 'in group'")
        if written.split(" ", 1)[0] == "reversed" and "ON" in set(exc.accepts or exc.expected):
            message += (f"; a 'reversed' statement ends with the scale's lowest and highest possible answers, as in "
                        f"'{clipped(written, 60)} on 1 to 5' for answers from 1 to 5")
    else:  # pragma: no cover - Lark has no other public kinds
        message = "the model text cannot be read here"
    source_line = lines[line - 1] if 1 <= line <= len(lines) else None
    return ModelError(message, Location(source, line, column), source_line)


#: how a statement is written over several lines (grammar/model.lark: a line end is allowed after a list's comma)
CONTINUES = "a list continues on the next line only after a comma at the end of the line"
_LIST_LINE = re.compile(r'\s*(?:\w+|"[^"\n]*")(?:\s*,\s*(?:\w+|"[^"\n]*"))*\s*,?\s*(?:#.*)?\Z')


def _continuation_message(exc: UnexpectedToken, lines: tuple[str, ...], line: int, column: int) -> str | None:
    """The message for a list broken over lines without the comma that continues it: a line that starts with the
    comma, or a line of names read as a new statement (the comma missing at the end of the line before); None for
    other errors."""
    if not 1 <= line <= len(lines) or "FACTOR" not in set(exc.accepts or exc.expected):  # not a statement's start
        return None
    before = next((k for k in range(line - 1, 0, -1) if lines[k - 1].split("#", 1)[0].strip()), None)
    if before is None:
        return None
    text = lines[line - 1]
    if exc.token.type == "COMMA" and not text[:column - 1].strip():
        return f"line {line} starts with a comma; {CONTINUES}: move it to the end of line {before}"
    if (exc.token.type in ("NAME", "STRING") and not close_names(str(exc.token), STATEMENT_WORDS)
            and _LIST_LINE.match(text) and not lines[before - 1].split("#", 1)[0].rstrip().endswith(",")):
        return (f"unknown statement '{clipped(exc.token, 40)}'; if line {line} goes on with the list of line {before}, end "
                f"line {before} with a comma ({CONTINUES})")
    return None


#: what a syntax error adds where a name seems to go on with spaces or punctuation (item texts as column names)
QUOTE_HINT = 'a name with spaces or punctuation is written in double quotes ("The bus was on time, mostly.")'
_PUNCTUATION = frozenset(".!?/&%;@#$*+~^|\\`")


def _name_goes_on(exc: UnexpectedToken, lines: tuple[str, ...], line: int, column: int) -> bool:
    """Whether the unexpected token continues a name: a word or a bracket right after a name (and spaces), where
    a list of names wanted a comma, as in 'factor f: At work, ...' or 'Respondent ID'."""
    if exc.token.type not in ("NAME", "SIGNED_NUMBER", "LPAR") or "COMMA" not in (exc.accepts or exc.expected):
        return False
    before = lines[line - 1][:column - 1] if 1 <= line <= len(lines) else ""
    return bool(re.search(r"\w\s*$" if exc.token.type == "LPAR" else r"\w\s+$", before))


def _dashed_span_at(lines: tuple[str, ...], line: int, column: int) -> str | None:
    """The range 'a..b' meant where a dash at ``line``:``column`` stands between two names ('eng1-eng5')."""
    if not 1 <= line <= len(lines) or not 1 <= column <= len(lines[line - 1]):
        return None
    text = lines[line - 1]
    near = 80  # a name is not longer than this here; a bound keeps the search short on overlong lines
    before = re.search(r"(\w+)\s*$", text[max(0, column - 1 - near):column - 1])
    after = re.match(r"\s*(\w+)", text[column:column + near])
    if before is None or after is None:
        return None
    return dotted_span(f"{before.group(1)}{text[column - 1]}{after.group(1)}")


def _unexpected_token_message(exc: UnexpectedToken) -> str:
    token = exc.token
    shown = "the end of the line" if token.type == "_NL" else f"'{clipped(token, 40)}'"
    expected = sorted(exc.accepts or exc.expected)
    words = [_terminal_word(name) for name in expected]
    if "'factor'" in words:  # the parser wanted a new statement
        word = str(token)
        guess = close_names(word, STATEMENT_WORDS)
        hint = f"; did you mean '{guess[0]}'?" if guess else f"; a statement starts with one of: {', '.join(STATEMENT_WORDS)}"
        return f"unknown statement {shown}{hint}"
    if token.type == "_NL":
        return f"the line ends too early; expected {_or_list(sorted(set(words)))}"
    return f"unexpected {shown}; expected {_or_list(sorted(set(words)))}"


def _terminal_word(name: str) -> str:
    word = _TERMINAL_WORDS.get(name)
    if word is not None:
        return word
    try:
        pattern = _parser().get_terminal(name).pattern
    except KeyError:
        return name.lower()
    return f"'{pattern.value}'" if pattern.type == "str" else name.lower()


def _or_list(words: list[str]) -> str:
    return word_list(words, "or")


# ---------------------------------------------------------------- tree -> Spec


class _Builder:
    def __init__(self, source: str, text: str, lines: tuple[str, ...]):
        self.group: str | None = None  # the group of the statement being built
        self.expanded = 0  # names written by ranges so far (bounded: a short file must not expand without end)
        self.source = source
        self.text = text
        self.lines = lines

    def loc(self, item: Token | Tree) -> Location:
        if isinstance(item, Token):
            return Location(self.source, item.line or 1, item.column or 1)
        return Location(self.source, item.meta.line, item.meta.column)

    def error(self, message: str, item: Token | Tree | Location) -> ModelError:
        location = item if isinstance(item, Location) else self.loc(item)
        source_line = self.lines[location.line - 1] if 1 <= location.line <= len(self.lines) else None
        return ModelError(message, location, source_line)

    def build(self, tree: Tree) -> Spec:
        title = None
        factors: list[Factor] = []
        covary: list[NamePair] = []
        uncorrelated: list[NamePair] = []
        fixed: list[ValueSetting] = []
        freed: list[ParameterRef] = []
        equal: list[tuple[ParameterRef, ...]] = []
        starts: list[ValueSetting] = []
        bounds: list[BoundSetting] = []
        scaling: list[ScaleSetting] = []
        invariant: list[str] = []
        noninvariant: list[ParameterRef] = []
        equal_across_groups: list[Name] = []
        ordinal: list[Name] = []
        reversed_items: list[ReverseKeying] = []
        method_factors: list[Name] = []
        level: str | None = None
        equalities_at: Location | None = None  # the first 'invariance' or 'equal across groups' statement
        blocks: list[ExploratoryBlock] = []
        near_zero: list[tuple[Name, tuple[Name, ...], Tree]] = []
        answers: list[AnswerCoding] = []
        joins: list[JoinedAnswers] = []
        for stmt in tree.children:
            kind = stmt.data
            self.group = None
            if kind == "group_stmt":
                group_name, stmt = stmt.children
                self.group = self.name(group_name).text
                kind = stmt.data
            if kind == "title_stmt":
                if title is not None:
                    raise self.error("the model already has a name; give it once", stmt)
                title = str(stmt.children[0])[1:-1]
                if not any(c.isprintable() and not c.isspace() for c in title):  # spaces or hidden characters
                    # only: every report's title was blank (hostile trial s26, 03)
                    raise self.error("the model's name is blank; write the name between the quotes, or leave out "
                                     "the 'name' line to use the file's name", stmt.children[0])
            elif kind == "factor_stmt":
                name = self.name(stmt.children[0])
                factors.append(Factor(name, self.name_list(stmt.children[1])))
            elif kind in ("covary_stmt", "uncorrelated_stmt"):
                names = self.name_list(stmt.children[0])
                if len(names) < 2:
                    word = kind.split("_")[0]
                    raise self.error(f"'{word}' needs at least two names", stmt)
                n_pairs = len(names) * (len(names) - 1) // 2
                if n_pairs + len(covary) + len(uncorrelated) > MAX_PAIRS:
                    raise self.error(f"'{kind.split('_')[0]}' with {len(names):,} names makes {n_pairs:,} pairs; a model "
                                     f"names at most {MAX_PAIRS:,} pairs in all", stmt)
                pairs = [NamePair(a, b) for i, a in enumerate(names) for b in names[i + 1 :]]
                (covary if kind == "covary_stmt" else uncorrelated).extend(pairs)
            elif kind == "fix_stmt":
                fixed.append(ValueSetting(self.refs(stmt.children[0]), self.number(stmt.children[1])))
            elif kind == "free_stmt":
                freed.extend(self.refs(stmt.children[0]))
            elif kind == "equal_stmt":
                refs = self.refs(stmt.children[0])
                if len(refs) < 2:
                    raise self.error("'equal' needs at least two parameters", stmt)
                equal.append(refs)
            elif kind == "start_stmt":
                starts.append(ValueSetting(self.refs(stmt.children[0]), self.number(stmt.children[1])))
            elif kind == "bound_stmt":
                refs = self.refs(stmt.children[0])
                value = self.number(stmt.children[2])
                lower, upper = (value, None) if str(stmt.children[1]) == ">=" else (None, value)
                bounds.append(BoundSetting(refs, lower, upper))
            elif kind == "scale_stmt":
                scaling.append(self.scale(stmt))
            elif kind == "invariant_stmt":  # the form of earlier versions: say how it is written now
                raise self.error("'invariant' is written by level now: 'invariance metric' (loadings), 'invariance "
                                 "scalar' (loadings and intercepts), 'invariance strict' (also error variances), "
                                 "'invariance thresholds' (ordinal items); other parameters with 'equal across groups: "
                                 "factor variances, factor covariances, factor means, error variances'", stmt)
            elif kind == "invariance_stmt":
                equalities_at = equalities_at or self.loc(stmt)
                word = self.name(stmt.children[0])
                if word.text not in INVARIANCE_LEVELS:
                    guess = close_names(word.text, INVARIANCE_LEVELS)
                    hint = f"did you mean '{guess[0]}'?" if guess else "use " + _or_list(list(INVARIANCE_LEVELS))
                    raise self.error(f"'{word}' is not an invariance level; {hint}", word.location)
                if level is not None:
                    raise self.error(f"the invariance level is given twice ('{level}' and '{word}'); state the "
                                     f"highest level that should hold", word.location)
                level = word.text
                invariant.extend(c for c in INVARIANCE_LEVELS[level] if c not in invariant)
            elif kind == "equal_groups_stmt":
                equalities_at = equalities_at or self.loc(stmt)
                for words in stmt.children[0].children:
                    tokens = [t for t in words.children if isinstance(t, Token)]
                    text = " ".join(str(t) for t in tokens)
                    where = self.loc(words)
                    if text not in GROUP_EQUALITY_WORDS:
                        guess = close_names(text, GROUP_EQUALITY_WORDS)
                        hint = f"did you mean '{guess[0]}'?" if guess else "use " + _or_list(list(GROUP_EQUALITY_WORDS))
                        raise self.error(f"'{text}' is not something that can be held equal across groups; {hint}", where)
                    if GROUP_EQUALITY_WORDS[text] not in invariant:
                        invariant.append(GROUP_EQUALITY_WORDS[text])
                    equal_across_groups.append(Name(text, where))
            elif kind == "noninvariant_stmt":
                noninvariant.extend(self.refs(stmt.children[0]))
            elif kind == "ordinal_stmt":
                ordinal.extend(self.name_list(stmt.children[0]))
            elif kind == "method_stmt":
                method_factors.extend(self.name_list(stmt.children[0]))
            elif kind == "exploratory_stmt":
                blocks.append(self.block(stmt))
            elif kind == "near_zero_stmt":
                near_zero.append((self.name(stmt.children[0]), self.name_list(stmt.children[1]), stmt))
            elif kind == "answers_stmt":
                answers.append(self.answers(stmt))
            elif kind == "join_stmt":
                joins.append(self.join(stmt))
            elif kind == "reversed_stmt":
                low, high = self.number(stmt.children[1]), self.number(stmt.children[2])
                for value, child in ((low, stmt.children[1]), (high, stmt.children[2])):
                    if not abs(value) <= LARGEST_SCALE_END:  # also refuses a value too large to be a number
                        raise self.error(f"the answer scale's end {user_number(value)} is not a rating scale's answer; give the "
                                         f"lowest and highest answers the items allow (such as 1 to 5), each between "
                                         f"-{LARGEST_SCALE_END:,.0f} and {LARGEST_SCALE_END:,.0f}", child.children[0])
                if low >= high:
                    raise self.error(f"the answer scale must run from a smaller to a larger number; got {user_number(low)} to {user_number(high)}",
                                     stmt.children[1].children[0])
                reversed_items.append(ReverseKeying(self.name_list(stmt.children[0]), low, high, self.loc(stmt)))
            else:  # pragma: no cover - grammar and builder out of step
                raise self.error(f"statement '{kind}' is not handled", stmt)
        if blocks or near_zero:
            blocks = self.attach_targets(blocks, near_zero)
            self.check_block_use(blocks, covary, uncorrelated, fixed, freed, equal, starts, bounds, scaling,
                                 noninvariant, method_factors, factors, reversed_items)
            for block in blocks:  # the unrotated block's identification, written as the model's own statements
                factors.extend(Factor(f, block.items) for f in block.factors)
                scaling.append(ScaleSetting(block.factors, "variance", block.location))
                uncorrelated.extend(NamePair(a, b) for i, a in enumerate(block.factors) for b in block.factors[i + 1:])
                zeros = tuple(ParameterRef("loading", pair, block.location) for pair in block.echelon_zeros())
                if zeros:
                    fixed.append(ValueSetting(zeros, 0.0))
        if not factors:
            raise ModelError(
                "the model declares no factors; write at least one line such as 'factor trait: item1, item2, item3'",
                Location(self.source, max(1, len(self.lines)), 1),
            )
        return with_ordinal_levels(Spec(
            source=self.source,
            text=self.text,
            title=title,
            factors=tuple(factors),
            covary=tuple(covary),
            uncorrelated=tuple(uncorrelated),
            fixed=tuple(fixed),
            freed=tuple(freed),
            equal=tuple(equal),
            starts=tuple(starts),
            bounds=tuple(bounds),
            scaling=tuple(scaling),
            invariant=tuple(invariant),
            noninvariant=tuple(noninvariant),
            equal_across_groups=tuple(equal_across_groups),
            ordinal=tuple(ordinal),
            reversed=tuple(reversed_items),
            method=tuple(method_factors),
            invariance_level=level,
            equalities_location=equalities_at,
            answers=tuple(answers),
            joins=tuple(joins),
            exploratory=tuple(blocks),
            lines=self.lines,
        ), ordinal)

    def answers(self, stmt: Tree) -> AnswerCoding:
        """An 'answers "Disagree" = 1, ... [for ITEMS]' statement, each word and code as written."""
        out = []
        for answer in stmt.children[0].children:
            key, code_node = answer.children
            code = self.number(code_node)
            if not abs(code) <= LARGEST_SCALE_END:
                raise self.error(f"the code {user_number(code)} is not a rating scale's answer; give each answer a code between "
                                 f"-{LARGEST_SCALE_END:,.0f} and {LARGEST_SCALE_END:,.0f}", code_node.children[0])
            if isinstance(key, Token) and key.type == "STRING":
                word = str(key)[1:-1]
                if not word.strip():
                    raise self.error("an answer word is empty; an empty cell is already no answer, so list only the "
                                     "words the cells hold", key)
                out.append(AnswerWord(word, None, code, self.loc(key)))
            else:
                out.append(AnswerWord(None, self.number(key), code, self.loc(key.children[0])))
        items = self.name_list(stmt.children[1]) if len(stmt.children) > 1 else ()
        return AnswerCoding(tuple(out), tuple(items), self.loc(stmt))

    def join(self, stmt: Tree) -> JoinedAnswers:
        """A 'join answers 0, 1 as 1 for ITEMS' statement: at least two answer codes, whole numbers each written once,
        joined into one of them (so that the joined category keeps its place on the scale); whether they neighbour
        each other on an item's scale, and whether the item is ordinal, is checked against the data and the run
        (data.joined_answers, pipeline.inputs.ordinal_items_of)."""
        values_node, into_node, items_node = stmt.children
        values, places = [], []
        for node in values_node.children:
            value = self.number(node)
            token = node.children[0]
            if not abs(value) <= LARGEST_SCALE_END or value != round(value):
                raise self.error(f"{user_number(value)} is not an answer code of an ordinal item; the answers of an "
                                 f"ordinal item are whole numbers (codes such as 1 to 5)", token)
            if value in values:
                raise self.error(f"the answer code {user_number(value)} is listed twice; list each code once", token)
            values.append(value)
            places.append(self.loc(token))
        into = self.number(into_node)
        if len(values) < 2:
            raise self.error(f"'join answers' needs at least two answer codes to analyse as one, as in 'join answers "
                             f"{user_number(values[0])}, {user_number(values[0] + 1)} as {user_number(values[0] + 1)} "
                             f"for ...'", values_node.children[0].children[0])
        if into not in values:
            raise self.error(f"the joined category is coded {user_number(into)}, which is not one of the codes joined "
                             f"({', '.join(user_number(v) for v in values)}); write one of them after 'as', so that the "
                             f"category keeps its place among the item's answers", into_node.children[0])
        items = self.name_list(items_node)
        seen: set[str] = set()
        for item in items:
            if item.text in seen:
                raise self.error(f"'{printable(item.text)}' is named twice in this 'join answers' statement", item.location)
            seen.add(item.text)
        return JoinedAnswers(tuple(values), into, items, self.loc(stmt), tuple(places))

    def block(self, stmt: Tree) -> ExploratoryBlock:
        """An 'exploratory factors ... from ... [rotated by ...]' statement, its counts checked: the block's items
        must identify an exploratory analysis of their own, (p - m)^2 >= p + m (Ledermann 1937)."""
        factors = self.name_list(stmt.children[0])
        items = self.name_list(stmt.children[1])
        rotation = self.name(stmt.children[2]) if len(stmt.children) > 2 else Name(DEFAULT_BLOCK_ROTATION, self.loc(stmt))
        if rotation.text not in BLOCK_ROTATIONS:
            guess = close_names(rotation.text, BLOCK_ROTATIONS)
            hint = f"did you mean '{guess[0]}'?" if guess else "use " + _or_list(list(BLOCK_ROTATIONS))
            raise self.error(f"unknown rotation '{rotation.text}' for an exploratory block; {hint}", rotation.location)
        for names, what in ((factors, "factor"), (items, "item")):
            seen: set[str] = set()
            for name in names:
                if name.text in seen:
                    raise self.error(f"'{name}' is listed twice as an {what} of the exploratory block", name.location)
                seen.add(name.text)
        both = [n for n in items if n.text in {f.text for f in factors}]
        if both:
            raise self.error(f"'{both[0]}' is named as a factor and as an item of the same exploratory block", both[0].location)
        p, m = len(items), len(factors)
        if (p - m) ** 2 < p + m:
            need = next(q for q in range(m + 1, 10 * m + 10) if (q - m) ** 2 >= q + m)
            raise self.error(f"an exploratory block of {m} factor{'s' if m > 1 else ''} needs at least {need} items to be "
                             f"identified ((items - factors)^2 >= items + factors; Ledermann 1937), and this one has {p}",
                             stmt.children[1].children[0] if stmt.children[1].children else stmt)
        return ExploratoryBlock(factors, items, rotation, self.loc(stmt))

    def attach_targets(self, blocks: list[ExploratoryBlock], near_zero) -> list[ExploratoryBlock]:
        """The 'near zero' lines given to the target-rotated block each names; every such block needs some."""
        from dataclasses import replace

        owner = {f: b for b, block in enumerate(blocks) for f in block.factor_names}
        targets: dict[int, list] = {}
        seen_items: set[str] = set()
        for block in blocks:
            for item in block.items:
                if item.text in seen_items:
                    raise self.error(f"'{item}' is an item of two exploratory blocks; an item belongs to one block at most",
                                     item.location)
            seen_items.update(block.item_names)
        for factor, items, stmt in near_zero:
            b = owner.get(factor.text)
            if b is None:
                raise self.error(f"'near zero {factor}' names no factor of an exploratory block", factor.location)
            block = blocks[b]
            if block.rotation.text != "target":
                raise self.error(f"'near zero' gives targets to a target rotation, and the block of '{factor}' is rotated "
                                 f"by {block.rotation.text}; write 'rotated by target' on its line", factor.location)
            for item in items:
                if item.text not in block.item_names:
                    raise self.error(f"'{item}' is not an item of the exploratory block of '{factor}'", item.location)
            targets.setdefault(b, []).append((factor, items))
        out = []
        for b, block in enumerate(blocks):
            if block.rotation.text == "target" and len(block.factors) == 1:
                raise self.error(f"a block of one factor ('{block.factors[0]}') has nothing to rotate; leave out "
                                 f"'rotated by target' and its 'near zero' lines", block.rotation.location)
            if block.rotation.text == "target" and b not in targets:
                raise self.error("a block rotated by target needs its targets: lines such as 'near zero "
                                 f"{block.factors[0]}: {block.items[-1]}' naming the loadings to aim at 0",
                                 block.rotation.location)
            if block.rotation.text == "target":
                self.check_targets(block, targets[b])
            out.append(replace(block, targets=tuple(targets.get(b, ()))))
        return out

    def check_targets(self, block: ExploratoryBlock, targets: list) -> None:
        """Browne's (2001) condition for the identification of a target rotation of k factors: at least k - 1
        targets on each factor; and a factor aimed at 0 on every item of the block has nothing left to load on."""
        k = len(block.factors)
        aimed: dict[str, set[str]] = {}
        lines: dict[str, Name] = {}
        for factor, items in targets:
            aimed.setdefault(factor.text, set()).update(i.text for i in items)
            lines.setdefault(factor.text, factor)
        for factor in block.factors:
            count = len(aimed.get(factor.text, ()))
            where = lines.get(factor.text, block.rotation).location
            if count == len(block.items):
                raise self.error(f"'near zero {factor}' names every item of its block, so '{factor}' would load on "
                                 f"none; leave at least one of its loadings free", where)
            if count < k - 1:
                raise self.error(f"the target rotation of {k} factors is identified only with at least {k - 1} "
                                 f"target{'' if k == 2 else 's'} on each factor (Browne 2001), and '{factor}' has {count}; name more "
                                 f"items on 'near zero {factor}: ...'", where)

    def check_block_use(self, blocks, covary, uncorrelated, fixed, freed, equal, starts, bounds, scaling, noninvariant,
                        method_factors, factors, reversed_items=()) -> None:
        """The model's other statements may not change a block's parameters: the block sets them; and 'reversed'
        keys items for sum scores, which a block's factors do not have."""
        block_factors = {f for block in blocks for f in block.factor_names}
        for pair in list(covary) + list(uncorrelated):
            for name in (pair.first, pair.second):
                if name.text in block_factors:
                    raise self.error(f"'{name}' is a factor of an exploratory block: its covariances are estimated and "
                                     f"rotated with the block, and cannot be set by 'covary' or 'uncorrelated'", name.location)
        refs = [r for s in list(fixed) + list(starts) for r in s.refs] + list(freed) + [r for g in equal for r in g] \
            + [r for b in bounds for r in b.refs] + list(noninvariant)
        for ref in refs:
            if any(n in block_factors for n in ref.names):
                raise self.error(f"{ref} is a parameter of an exploratory block: the block estimates and rotates it, and "
                                 f"other statements cannot set it", ref.location)
        for setting in scaling:
            named = [f for f in setting.factors if f.text in block_factors]
            if named:
                raise self.error(f"'{named[0]}' is a factor of an exploratory block, whose factors have variance 1 "
                                 f"before rotation; it cannot be scaled another way", named[0].location)
        for name in method_factors:
            if name.text in block_factors:
                raise self.error(f"'{name}' is a factor of an exploratory block and cannot also be a method factor",
                                 name.location)
        for factor in factors:
            for ind in factor.indicators:
                if ind.text in block_factors:
                    raise self.error(f"'{ind}' is a factor of an exploratory block and cannot be an indicator of another "
                                     f"factor", ind.location)
            if factor.name.text in block_factors:
                raise self.error(f"factor '{factor.name}' is declared twice: by 'factor' and by 'exploratory factors'",
                                 factor.name.location)
        block_items = {x for block in blocks for x in block.item_names}
        scored = {ind.text for factor in factors for ind in factor.indicators}
        for keying in reversed_items:
            for item in keying.items:
                if item.text in block_items and item.text not in scored:
                    raise self.error(f"'{item}' is an item of an exploratory block only, and 'reversed' keys items for "
                                     f"the sum scores of confirmatory factors; a block has none (its rotation signs "
                                     f"its factors), so leave '{item}' out of 'reversed'", item.location)

    def name(self, node: Tree) -> Name:
        token = node.children[0]
        text = str(token)
        if node.data == "quoted_name":
            # no spaces at the ends (headers are trimmed, so a name copied from a header with its trailing space
            # names the same column)
            text = text[1:-1].strip()
            if not text.strip():
                raise self.error("a quoted name cannot be empty", token)
        return Name(composed(text), self.loc(token))  # as data column names are read (names.composed), quoted or not

    def name_list(self, node: Tree) -> tuple[Name, ...]:
        names: list[Name] = []
        for child in node.children:
            if child.data == "name_range":
                names.extend(self.expand_range(child))
            else:
                names.append(self.name(child))
        return tuple(names)

    def expand_range(self, node: Tree) -> list[Name]:
        """The names of a range 'item1..item9' (either end may be quoted: '"Énergie_1".."Énergie_4"')."""
        ends = node.children
        first, last = (self.name(end).text for end in ends)
        at = ends[0].children[0]
        names = range_names(first, last, lambda message: self.error(message, at))
        location = self.loc(at)
        self.expanded += len(names)
        if self.expanded > MAX_NAMES:
            raise self.error(f"the ranges of this model name more than {MAX_NAMES:,} variables in all", at)
        return [Name(name, location) for name in names]

    def refs(self, node: Tree) -> tuple[ParameterRef, ...]:
        refs = []
        for ref in node.children:
            kind_token, *name_nodes = ref.children
            kind = str(kind_token)
            if kind not in REFERENCE_KINDS:
                guess = close_names(kind, REFERENCE_KINDS)
                hint = f"did you mean '{guess[0]}'?" if guess else "use " + _or_list([f"{k}(...)" for k in REFERENCE_KINDS])
                raise self.error(f"unknown kind of parameter '{kind}'; {hint}", kind_token)
            names = tuple(self.name(n).text for n in name_nodes)
            wanted = REFERENCE_KINDS[kind]
            if len(names) != wanted:
                example = {"loading": "loading(factor, item)", "variance": "variance(name)", "covariance": "covariance(a, b)",
                           "intercept": "intercept(item)", "mean": "mean(factor)",
                           "threshold": "threshold(item)"}[kind]
                raise self.error(f"'{kind}' takes {wanted} name{'s' if wanted > 1 else ''}, as in {example}", kind_token)
            refs.append(ParameterRef(kind, names, self.loc(kind_token), self.group))
        return tuple(refs)

    def number(self, token: Token) -> float:
        value = float(token.children[0] if isinstance(token, Tree) else token)
        if value != value or value in (float("inf"), float("-inf")):
            raise self.error("the number must be finite", token)
        return value + 0.0  # '-0' is 0 (the methods paragraph said 'fixed at -0'; hostile trial s18)

    def scale(self, stmt: Tree) -> ScaleSetting:
        target, method_node = stmt.children
        method = self.name(method_node)
        if method.text not in SCALING_METHODS:
            guess = close_names(method.text, SCALING_METHODS)
            hint = f"did you mean '{guess[0]}'?" if guess else f"use one of: {', '.join(SCALING_METHODS)}"
            raise self.error(f"unknown way to scale a factor '{method.text}'; {hint}", method.location)
        factors = () if target.data == "all_factors" else self.name_list(target.children[0])
        return ScaleSetting(factors, method.text, self.loc(stmt))
