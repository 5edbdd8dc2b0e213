"""Reading the user's input files (model, data, summary statistics) safely.

Every reader goes through :func:`input_bytes` or :func:`check_input_path`, so that a
missing file, a folder, an overlong name, a file without read permission, a device
that never ends (``/dev/zero``) or a file far larger than any questionnaire data set
each get one plain sentence naming the file, never a traceback or a hang.  Input files
are only ever opened for reading.
"""

from __future__ import annotations

import errno
import os
import re
import stat
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from cfa_tool.errors import UserInputError, shown_path


#: how messages and results name data given as a data frame from Python (LoadedData.source), not a file
DATA_FRAME = "<data frame>"


def base_name(source: str | Path) -> str:
    """The file's own name without its folders, as messages name a data source: the part after the last '/' or
    '\\' (a Windows path read on any system: 'C:\\survey\\riders.csv' -> 'riders.csv'); a name without folders, or a
    source that is no file (a data frame's '<data frame>'), as it is."""
    return str(source).replace("\\", "/").rsplit("/", 1)[-1]


def check_input_path(path: str | Path, what: str, error: type[UserInputError],
                     regular_only: bool = False) -> os.stat_result:
    """The file's status, or ``error`` with a plain sentence: it does not exist, is a folder,
    has a name too long for the system, or (with ``regular_only``) is a device or pipe."""
    path = Path(path)
    try:
        st = path.stat()
    except FileNotFoundError:
        raise error(f"{what} '{shown_path(path)}' does not exist") from None
    except NotADirectoryError:
        raise error(f"{what} '{shown_path(path)}' does not exist (a part of the path is a file, not a folder)") from None
    except PermissionError:
        raise error(f"{what} '{shown_path(path)}' cannot be read (permission denied)") from None
    except OSError as exc:
        if exc.errno == errno.ENAMETOOLONG:
            raise error(f"{what} '{shown_path(path)}': the name is too long for the file system "
                        f"(at most 255 characters per folder or file name)") from None
        raise error(f"{what} '{shown_path(path)}' cannot be opened ({exc.strerror or exc})") from None
    except ValueError:  # a NUL character in the path
        raise error(f"{what} '{shown_path(path)}': the name holds a NUL character") from None
    if stat.S_ISDIR(st.st_mode):
        raise error(f"'{shown_path(path)}' is a folder, not a {what}")
    if regular_only and not stat.S_ISREG(st.st_mode):
        raise error(f"'{shown_path(path)}' is not a regular file (a device or a pipe); save the {what} as a file")
    return st


def input_bytes(path: str | Path, what: str, error: type[UserInputError], limit: int) -> bytes:
    """The content of an input file, read with a size limit (devices and pipes report no size,
    so the limit is applied while reading)."""
    path = Path(path)
    st = check_input_path(path, what, error)
    if stat.S_ISREG(st.st_mode) and st.st_size > limit:
        raise error(f"{what} '{shown_path(path)}' is {st.st_size:,} bytes; a {what} is at most {limit:,} bytes")
    try:
        if stat.S_ISFIFO(st.st_mode):
            data = _read_pipe(path, limit)
            if not data:
                raise error(f"no program wrote to the named pipe '{shown_path(path)}' (given as {what}); start the writer "
                            f"first")
        else:
            with open(path, "rb") as handle:
                data = handle.read(limit + 1)
    except PermissionError:
        raise error(f"{what} '{shown_path(path)}' cannot be read (permission denied)") from None
    except OSError as exc:
        raise error(f"{what} '{shown_path(path)}' cannot be read ({exc.strerror or exc})") from None
    if len(data) > limit:
        raise error(f"{what} '{shown_path(path)}' holds more than {limit:,} bytes; a {what} is at most {limit:,} bytes")
    kind = document_kind(data)
    if kind is not None:  # read as text, its markup gave a parse error about a '{' or a byte 0x85 (hostile s24)
        if what == "data file" and ("workbook" in kind or "spreadsheet" in kind):
            advice = "give it a name with the workbook's own ending (.xlsx, .ods), which is read as a workbook"
        elif what == "data file":
            advice = "save the table as a CSV file and give that file"
        elif what == "result file":  # (hostile s24b: a Word report told to be saved as text)
            advice = "give the JSON file a run wrote with --json"
        else:
            advice = "write it as plain text in a text editor, save it as UTF-8 (.txt), and give that file"
        raise error(f"{what} '{shown_path(path)}' is {kind}, not plain text: {advice}")
    return data


#: the first bytes of documents that are not plain text, a word processor's or a spreadsheet's, with their names
_DOCUMENTS = ((b"{\\rtf", "a word processor's document in rich text format (RTF)"),
              (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1", "an Office document of the old binary format (.doc or .xls)"),
              (b"%PDF-", "a PDF document"))
#: what a zip-based document holds that names its kind
_ZIPPED = ((b"word/document.xml", "a Word document (.docx)"), (b"opendocument.text", "an OpenDocument text (.odt)"),
           (b"xl/workbook.xml", "an Excel workbook (.xlsx)"), (b"opendocument.spreadsheet", "an OpenDocument spreadsheet"))


def document_kind(data: bytes) -> str | None:
    """What a file given as text is when it is a document of another kind (a Word or RTF document, a PDF, a
    workbook), read from its first bytes (the formats' signatures: RTF's '{\\rtf', the compound-file and PDF headers,
    a zip file and the part names it lists); None for anything else."""
    for head, kind in _DOCUMENTS:
        if data.startswith(head):
            return kind
    if data.startswith(b"PK\x03\x04"):
        for part, kind in _ZIPPED:
            if part in data:
                return kind
        return "a zip archive"
    return None


def _read_pipe(path: Path, limit: int) -> bytes:
    """A named pipe is opened without waiting for a writer (a pipe nobody writes to reads as empty,
    instead of blocking the run forever), then read to its end."""
    import fcntl

    fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK)
    fcntl.fcntl(fd, fcntl.F_SETFL, fcntl.fcntl(fd, fcntl.F_GETFL) & ~os.O_NONBLOCK)
    with os.fdopen(fd, "rb") as handle:
        return handle.read(limit + 1)


def input_text(path: str | Path, what: str, error: type[UserInputError], limit: int) -> str:
    """The text of an input file (UTF-8 with or without a byte-order mark, or UTF-16), read with a size limit;
    ``error`` for other bytes and for NUL characters."""
    raw = input_bytes(path, what, error, limit)
    text = utf16_text(raw)
    if text is None:
        try:
            text = raw.decode("utf-8-sig")
        except UnicodeDecodeError:
            raise error(f"{what} '{shown_path(Path(path))}' is not UTF-8 text") from None
    if "\x00" in text:
        raise error(f"{what} '{shown_path(Path(path))}' is not a text file (it contains NUL bytes)")
    return text


#: the largest saved result (a command's --json file) any command reads
MAX_RESULT_BYTES = 200_000_000


def input_json(path: str | Path, what: str, error: type[UserInputError], limit: int = MAX_RESULT_BYTES) -> object:
    """The content of a saved JSON result (a command's --json file), read as :func:`input_text` reads text (UTF-8
    with or without a byte-order mark, or UTF-16, as editors re-save it): the one reader of saved results, so
    that report, scores --from-fit and --population-from accept and refuse the same files in the same words."""
    import json

    text = input_text(path, what, error, limit)
    try:
        return json.loads(text)
    except json.JSONDecodeError as exc:
        raise error(f"{what} '{shown_path(Path(path))}' is not JSON (line {exc.lineno}, column {exc.colno}: "
                    f"{exc.msg})") from None
    except (ValueError, RecursionError):  # numbers too long to read, nesting too deep
        raise error(f"{what} '{shown_path(Path(path))}' is not JSON that can be read (numbers too long or nesting too "
                    f"deep)") from None


def utf16_text(raw: bytes) -> str | None:
    """Text of a UTF-16 file (as some Windows programs save 'Unicode text'), recognised by its
    byte-order mark, or by NUL bytes in every other position of ASCII text; None otherwise."""
    if raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        try:
            return raw.decode("utf-16")
        except UnicodeDecodeError:
            return None
    sample = raw[:2000]
    if len(sample) >= 4 and len(sample) % 2 == 0:
        for encoding, zeros in (("utf-16-le", sample[1::2]), ("utf-16-be", sample[0::2])):
            if zeros.count(0) == len(zeros):
                try:
                    return raw.decode(encoding)
                except UnicodeDecodeError:
                    return None
    return None


def normalise_line_ends(text: str) -> str:
    """Windows (CR LF) and old Macintosh (CR) line ends as LF."""
    return text.replace("\r\n", "\n").replace("\r", "\n") if "\r" in text else text


def line_count(text: str) -> int:
    """How many lines ``text`` has, as :func:`text_lines` of :func:`normalise_line_ends` counts them (a line ends at
    LF, CR LF or CR; a last line without its end counts), without copying or splitting the text."""
    ends = text.count("\n") + text.count("\r") - text.count("\r\n")
    return ends + (1 if text and not text.endswith(("\n", "\r")) else 0)


#: characters that word processors, PDF and web pages leave in pasted text and that editors and Python's
#: ``str.splitlines`` show or take as a line break, while the program's text files end their lines at LF (CR LF, CR)
#: only; a form feed is plain space between words, but ends the line of a comment in an editor that breaks pages
_HIDDEN_LINE_BREAKS = re.compile("[\v\x1c-\x1e\x85\u2028\u2029]")
_COMMENT_FORM_FEED = re.compile("#[^\f]*(\f)")
_BREAK_NAMES = {"\v": "a vertical tab", "\f": "a form feed", "\x1c": "a file separator (U+001C)",
                "\x1d": "a group separator (U+001D)", "\x1e": "a record separator (U+001E)",
                "\x85": "a next-line character (U+0085)", "\u2028": "a line separator (U+2028)",
                "\u2029": "a paragraph separator (U+2029)"}


@dataclass(frozen=True)
class HiddenLineBreak:
    """A character that looks like a line break but is not one, at ``line`` and ``column`` (1-based)."""

    line: int
    column: int
    char: str
    in_comment: bool

    def message(self) -> str:
        """What is wrong and what to do, in one sentence (the caller adds the place)."""
        return (f"{_BREAK_NAMES[self.char]} looks like a line break but is not one: whatever follows it on this line "
                f"would be read as part of the same {'comment' if self.in_comment else 'line'}; replace it with a "
                f"plain line break (Enter)")


def hidden_line_break(lines: Sequence[str]) -> HiddenLineBreak | None:
    """The first character of ``lines`` (split at LF, :func:`text_lines`) that editors show as a line break but the
    file's reader does not (U+2028 LINE SEPARATOR and the others of :data:`_HIDDEN_LINE_BREAKS`; a form feed inside a
    '#' comment), or None.  Inside a comment such a character hides the statement or row after it in the comment:
    the file would be read without it, with no word."""
    for number, line in enumerate(lines, 1):
        found = _HIDDEN_LINE_BREAKS.search(line) or _COMMENT_FORM_FEED.search(line)
        if found is not None:
            start = found.start(found.lastindex or 0)
            return HiddenLineBreak(number, start + 1, line[start], "#" in line[:start])
    return None


def text_lines(text: str) -> list[str]:
    """Lines split at LF only, as parsers and editors count them (``str.splitlines`` also splits at
    form feeds, U+0085, U+2028 and other separators, which would put messages on the wrong line)."""
    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    return lines
