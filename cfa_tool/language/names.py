"""Names and parameter references as the model language writes them, and such references read back.

A name that is not a plain word (letters, digits and underscores, not starting with a digit) is written in
double quotes, as a model file writes it: ``"At work, I feel full of energy."``.  A parameter reference is
``kind(name, name)`` with each name so written, and a parameter of one group adds `` [group]``.  The parameter
table's labels, the problems' parameter keys, messages that quote a reference and the drafted model all write
names this way (:func:`written_name`, :func:`reference_text`), so that a label can be read back into its kind,
its names and its group exactly (:func:`read_reference`), whatever commas, brackets or spaces the names hold.
"""

from __future__ import annotations

import re

_PLAIN = re.compile(r"[A-Za-z_][A-Za-z0-9_]*\Z")  # the grammar's NAME (grammar/model.lark)


def plain(name: str) -> bool:
    """Whether ``name`` can be written without quotes."""
    return bool(_PLAIN.match(name))


def writable(name: str) -> bool:
    """Whether the model language can write ``name`` at all (a quoted name holds no double quote or line break)."""
    return not any(c in name for c in '"\n\r')


def written_name(name: str) -> str:
    """``name`` as the model language writes it: plain, or in double quotes.  A name the language cannot write
    (see :func:`writable`) is left as it is."""
    return name if plain(name) or not writable(name) else f'"{name}"'


def names_text(names) -> str:
    """Several names as a list of the model language writes them: ``a, "b c"``."""
    return ", ".join(written_name(n) for n in names)


def reference_text(kind: str, names, group: str | None = None) -> str:
    """A parameter reference as labels and messages write it: ``loading(energy, "At work, I feel full.")``,
    ``residual_variance(x9) [north]``."""
    text = f"{kind}({names_text(names)})"
    return f"{text} [{group}]" if group is not None else text


_NAME = re.compile(r'\s*(?:"([^"\n]*)"|([^,]*))\s*(,|\Z)')


def read_reference(label: str) -> tuple[str, tuple[str, ...], str | None]:
    """A reference written by :func:`reference_text` read back into its kind, its names and its group (None
    without one): quoted names keep their commas and brackets.  A label without quotes whose names hold commas
    (as saved results of earlier versions write them) cannot be told apart and is split at each comma."""
    group = None
    kind, paren, rest = label.partition("(")
    if not paren:
        return label.strip(), (), None
    close = _closing(rest)
    inside, tail = rest[:close], rest[close + 1:]
    if tail.endswith("]") and tail.lstrip().startswith("["):
        group = tail.strip()[1:-1]
    names: list[str] = []
    position = 0 if inside.strip() else len(inside) + 1
    while position <= len(inside):
        match = _NAME.match(inside, position)
        if match is None:  # a quote that does not close: the rest as one name
            names.append(inside[position:].strip())
            break
        names.append(match.group(1) if match.group(1) is not None else match.group(2).strip())
        if not match.group(3):
            break
        position = match.end()
    return kind.strip(), tuple(names), group


def _closing(rest: str) -> int:
    """The position of the bracket that closes a reference's list of names in ``rest`` (the text after its
    opening bracket): the first ')' outside quotes after which only a group suffix follows, else the last one."""
    quoted = False
    for k, c in enumerate(rest):
        if c == '"':
            quoted = not quoted
        elif c == ")" and not quoted:
            tail = rest[k + 1:].strip()
            if not tail or (tail.startswith("[") and tail.endswith("]")):
                return k
    last = rest.rfind(")")
    return last if last >= 0 else len(rest)
