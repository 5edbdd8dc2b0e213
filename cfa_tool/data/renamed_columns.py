"""Columns read under another name (--rename OLD=NEW; ``rename={'OLD': 'NEW'}`` from Python): a file that names an
item differently from the model (SL3r in one sample's file, SL3_r in the other's) is read without editing it.  The
names are changed as the file is read, before anything looks at them (the model's names, groups, weights, ids, row
filters, ordinal items), and every report says which column of which file was read under which name."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import pandas as pd

from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.language.names import composed
from cfa_tool.note_parts import Command, Note
from cfa_tool.numbers import word_list
from cfa_tool.options import Option
from cfa_tool.suggest import close_names, did_you_mean


#: What a rename option takes (:func:`column_renames`): a mapping {'OLD': 'NEW'}, text 'OLD=NEW' (several separated by
#: commas), a list of such texts, or None (no column renamed)
ColumnRenames = Mapping[str, str] | str | Sequence[str] | None


@dataclass(frozen=True)
class ColumnRename:
    """A column of the data read under another name: ``old`` as the file names it, ``new`` as it is read."""

    old: str
    new: str

    def words(self) -> str:
        """"'SL3r' as 'SL3_r'", for a note or a methods paragraph."""
        return f"'{printable(self.old)}' as '{printable(self.new)}'"

    def to_dict(self) -> dict:
        return {"in_file": self.old, "read_as": self.new}


def _composed(name: str) -> str:
    """A name in Unicode's composed form, as column names are read (data.readers)."""
    return composed(name)


def column_renames(value: ColumnRenames, option: Option = Option.RENAME) -> tuple[ColumnRename, ...]:
    """The renames an option asks for: a mapping {'OLD': 'NEW'} (Python), or text 'OLD=NEW', several separated by
    commas, or a list of such texts (the command line, where the option is repeatable); a name holding a comma or
    '=' in double quotes.  An :class:`OptionError` naming ``option`` for anything else, for a pair without '=' and
    for an empty name; the checks against the file's columns are :func:`renamed_frame`'s."""
    if value is None:
        return ()
    if isinstance(value, Mapping):
        pairs = list(value.items())
        if not all(isinstance(k, str) and isinstance(v, str) for k, v in pairs):
            raise OptionError(f"{option} must map column names (text) to new names (text), e.g. "
                              f"{option.given({'SL3r': 'SL3_r'})}")
    elif isinstance(value, str) or (isinstance(value, (list, tuple)) and all(isinstance(v, str) for v in value)):
        pairs = [_pair(piece, option) for text in ([value] if isinstance(value, str) else value)
                 for piece in _outside_quotes(text, ",", str(option))]
    else:
        raise OptionError(f"{option} must map column names to new names, e.g. {option.given({'SL3r': 'SL3_r'})}, "
                          f"not {type(value).__name__}")
    found = []
    for old, new in pairs:
        old, new = _composed(old), _composed(new)
        if not old.strip() or not new.strip():
            raise OptionError(f"{option} '{printable(old)}={printable(new)}' leaves a name empty; give the column's "
                              f"name in the file, '=', and the name to read it as, e.g. "
                              f"{option.given({'SL3r': 'SL3_r'})}")
        found.append(ColumnRename(old, new))
    return tuple(found)


def _pair(piece: str, option: Option) -> tuple[str, str]:
    sides = _outside_quotes(piece, "=", str(option))
    if len(sides) != 2:
        raise OptionError(f"{option} takes OLD=NEW (the column's name in the file, '=', the name to read it as; "
                          f"several separated by commas), not '{printable(piece.strip())}'")
    return tuple(_unquoted(side) for side in sides)  # type: ignore[return-value]


def _unquoted(side: str) -> str:
    bare = side.strip()
    return bare[1:-1] if len(bare) >= 2 and bare[0] == bare[-1] == '"' else bare


def _outside_quotes(text: str, separator: str, option: str) -> list[str]:
    from cfa_tool.language.names import _outside_quotes as split  # the one reader of quoted names in option lists

    return split(text, separator, option)


def renamed_frame(frame: pd.DataFrame, renames: tuple[ColumnRename, ...], source: str,
                  option: Option = Option.RENAME, keyed_attrs: tuple[str, ...] = ()) -> pd.DataFrame:
    """``frame`` with its columns renamed (``keyed_attrs``: keys of ``frame.attrs`` whose dictionaries are keyed by
    column name, renamed alike), after the checks against its columns, each a one-line error naming ``source``:
    the old name a column (near names suggested), the new name not a column already (unless that column is renamed
    too), no name renamed twice or given as the new name of two columns, no rename that changes nothing."""
    if not renames:
        return frame
    columns = [str(c) for c in frame.columns]
    olds = [r.old for r in renames]
    for r in renames:
        given = option.given({r.old: r.new})
        if r.old == r.new:
            raise OptionError(f"{source}: {given} changes nothing (the two names are the same); leave it out")
        if olds.count(r.old) > 1:
            raise OptionError(f"{source}: {option} renames the column '{printable(r.old)}' twice; give each column "
                              f"one new name")
        if sum(other.new == r.new for other in renames) > 1:
            raise OptionError(f"{source}: {option} gives two columns the name '{printable(r.new)}'; each column "
                              f"needs its own name")
        if r.old not in columns and r.new in columns:
            raise DataError(f"{source}: {given}: there is no column '{printable(r.old)}' in the file, which names the "
                            f"column '{printable(r.new)}' already; leave the rename out for this file")
        if r.old not in columns:
            near = close_names(r.old, columns)
            raise DataError(f"{source}: {given}: there is no column '{printable(r.old)}' in the file"
                            + (did_you_mean(r.old, near[0]) if near else ""))
        if r.new in columns and r.new not in olds:
            raise DataError(f"{source}: {given}: the file already has a column '{printable(r.new)}'; two columns "
                            f"cannot share a name (rename that one too, or give another name)")
    names = {r.old: r.new for r in renames}
    out = frame.set_axis([names.get(str(c), c) for c in frame.columns], axis=1)
    out.attrs[RENAMED] = {**frame.attrs.get(RENAMED, {}), **{r.old: (r.new, option.given({r.old: r.new}))
                                                             for r in renames}}
    for key in keyed_attrs:
        held = frame.attrs.get(key)
        if isinstance(held, dict):
            out.attrs[key] = {names.get(k, k) if isinstance(k, str) else k: v for k, v in held.items()}
    return out


#: the key of DataFrame.attrs that keeps the renames of the frame's columns ({old: (new, the option as given)}): a
#: message about a column that is not there says when the name given is one a rename took away
RENAMED = "renamed_columns"


def renamed_hint(frame: pd.DataFrame, name) -> str:
    """Words for a message about a column ``name`` that ``frame`` lacks: that a rename took that name away ("; the
    column 'district' was renamed to 'area' by --rename district=area: name it 'area'"), as the model's
    unknown-variable error says it (readers.LoadedData.column_hint); '' otherwise."""
    held = frame.attrs.get(RENAMED, {}).get(str(name)) if isinstance(frame.attrs.get(RENAMED), dict) else None
    if held is None:
        return ""
    new, given = held
    return f"; the column '{printable(str(name))}' was renamed to '{printable(new)}' by {given}: name it '{printable(new)}'"


def names_in_file(renames: tuple[ColumnRename, ...], names) -> tuple[str, ...] | None:
    """``names`` (new names: the model's items, an id column) as the file names those columns, for the readers that
    look at columns before the renames (None stays None; without renames, ``names`` as given)."""
    if names is None or not renames:
        return names
    old = {r.new: r.old for r in renames}
    return tuple(old.get(str(n), n) for n in names)


def rename_note(renames: tuple[ColumnRename, ...], source: str, option: Option = Option.RENAME) -> Note:
    """The note every report gives: "data.csv: column 'SL3r' read as 'SL3_r' (--rename SL3r=SL3_r)", the option
    apart (note_parts.Command: a manuscript's reader runs nothing)."""
    several = len(renames) > 1
    return Note((f"{source}: column{'s' if several else ''} "
                 + word_list(f"'{printable(r.old)}' read as '{printable(r.new)}'" for r in renames),
                 Command(f" ({option.given({r.old: r.new for r in renames})})")))


def rename_sentence(renames: tuple[ColumnRename, ...], source: str) -> str:
    """The methods paragraph's sentence: 'In data.csv, the column named SL3r was analysed as SL3_r.'"""
    def joined(names: list[str]) -> str:
        return word_list(names)

    several = len(renames) > 1
    return (f"In {printable(source)}, the column{'s' if several else ''} named "
            f"{joined([printable(r.old) for r in renames])} {'were' if several else 'was'} analysed as "
            f"{joined([printable(r.new) for r in renames])}.")
