"""The one rule of how the tool writes a CSV file: in the convention of the data file it read.

Every CSV file a command writes from a data file (the scores file, the report tables of ``--tables``, a halves file)
is written so that the spreadsheet that saved the data opens it as it opened the data: the data file's decimal mark,
its separator (a comma or a semicolon; decimal commas always beside semicolons, as spreadsheets of decimal-comma
locales write CSV), and a byte-order mark where the data file's text told its reader the encoding some other way
than plain UTF-8 would (new-user trial s23b; fixscore's notes, s23: a German spreadsheet's CSV with a byte-order mark
got a scores file without one, whose accented headers the same spreadsheet opened garbled).

The text is always UTF-8.  A data file in UTF-8 with a byte-order mark gets one; so does a file in UTF-16 or in a
Windows or Latin-1 code page (a spreadsheet opens a CSV file without a mark in its own code page, which is how it
read those data, and UTF-8 text in it would show accented letters garbled; the mark makes it read UTF-8); a data file
in UTF-8 without a mark gets none, as it came.  A workbook, an SPSS or Stata file or a data frame, which have no text
convention, get commas, decimal points and no mark.
"""

from __future__ import annotations

from dataclasses import dataclass

#: the bytes of Unicode's byte-order mark in UTF-8 (U+FEFF), which tells a spreadsheet that a CSV file is UTF-8
UTF8_MARK = "\ufeff".encode("utf-8")

#: the name of the encoding data.readers.TextEncoding gives UTF-8 (the encoding of every file the tool writes)
UTF8 = "UTF-8"

_FIELDS = {",": "commas", ";": "semicolons", "\t": "tabs", "|": "vertical bars ('|')"}


def separator_words(separator: str, decimal: str) -> str:
    """'fields separated by semicolons, decimals written with commas': how delimited text is written, the words of the
    reading's note and of the written files' convention alike."""
    return f"fields separated by {_FIELDS[separator]}, decimals written with {'commas' if decimal == ',' else 'points'}"


@dataclass(frozen=True)
class CsvConvention:
    """How a CSV file is written: the separator between its fields, its decimal mark, and whether its UTF-8 text
    begins with a byte-order mark (:data:`UTF8_MARK`)."""

    separator: str = ","
    decimal: str = "."
    byte_order_mark: bool = False

    def plain(self) -> bool:
        """Commas between fields, decimal points and no byte-order mark, which the reports do not repeat."""
        return self == PLAIN

    def said(self) -> str:
        """How the file is written, as a command's closing line says it beside the file's name ('' when plain):
        'fields separated by semicolons, decimals written with commas, as in the data file; UTF-8 with a byte-order
        mark, by which a spreadsheet reads its accented letters as written'."""
        parts = []
        if (self.separator, self.decimal) != (",", "."):
            parts.append(f"{separator_words(self.separator, self.decimal)}, as in the data file")
        if self.byte_order_mark:
            parts.append("UTF-8 with a byte-order mark, by which a spreadsheet reads its accented letters as written")
        return "; ".join(parts)

    def file_text(self, text: str) -> str:
        """The file's whole text: ``text`` after the byte-order mark (U+FEFF) when the convention has one; written in
        UTF-8, as the tool writes every file, it begins with :data:`UTF8_MARK`."""
        return ("\ufeff" if self.byte_order_mark else "") + text

    def number(self, text: str) -> str:
        """A number written with a decimal point (``repr`` of a float, '%.10g') in this convention's decimal mark."""
        return text.replace(".", ",") if self.decimal == "," else text

    def to_dict(self) -> dict:
        return {"separator": self.separator, "decimal_mark": self.decimal, "byte_order_mark": self.byte_order_mark}

    @classmethod
    def from_dict(cls, saved: object) -> "CsvConvention":
        """The convention a saved result records (:meth:`to_dict`, or a data file's reading, which has the same keys);
        :data:`PLAIN` for anything else (a result saved before it was recorded, a part changed by hand)."""
        if not isinstance(saved, dict):
            return PLAIN
        separator, decimal = saved.get("separator"), saved.get("decimal_mark")
        if separator not in (",", ";") or decimal not in (".", ","):
            return PLAIN
        return cls(separator, decimal, saved.get("byte_order_mark") is True)


PLAIN = CsvConvention()


def convention_of(reading) -> CsvConvention:
    """The convention of a file written from data read as ``reading`` (data.readers.TextReading; None for a
    workbook, an SPSS or Stata file or a data frame: :data:`PLAIN`)."""
    if reading is None:
        return PLAIN
    return _convention(reading.separator, reading.decimal,
                       reading.byte_order_mark or reading.encoding.value != UTF8)


def _convention(separator: str, decimal: str, mark: bool) -> CsvConvention:
    """The data's decimal mark is kept; decimal commas are separated by semicolons, as spreadsheets of decimal-comma
    locales write CSV, whatever separated the data's fields (a tab file of decimal commas too: the file is a .csv file,
    which a spreadsheet splits at its locale's list separator); decimal points keep a semicolon of the data, and are
    separated by commas otherwise (tabs and vertical bars too, for the same reason).  ``mark``: the data file had a
    byte-order mark, or its text was not UTF-8 (UTF-16, a Windows or Latin-1 code page), which a spreadsheet reads in
    its own code page unless the mark tells it the text is UTF-8."""
    if decimal == ",":
        return CsvConvention(";", ",", mark)
    return CsvConvention(";" if separator == ";" else ",", ".", mark)


def convention_in(payload: object) -> CsvConvention:
    """The convention of the data file a saved or live result read, from its JSON-ready dict (``to_dict()``): a scores
    result's ``scores_file`` (the convention of the data scored, which may not be the fit's), else the first data file's
    ``reading`` found (a fit's data block, those of the fits a workflow holds), :data:`PLAIN` when none is (a
    workbook, a simulation)."""
    if isinstance(payload, dict) and isinstance(payload.get("scores_file"), dict):
        return CsvConvention.from_dict(payload["scores_file"])
    found = _first_reading(payload, 0)
    if found is None:
        return PLAIN
    return _convention(str(found.get("separator")), str(found.get("decimal_mark")),
                       found.get("byte_order_mark") is True or found.get("encoding") != UTF8)


def _first_reading(part: object, depth: int) -> dict | None:
    if depth > 12:
        return None
    if isinstance(part, dict):
        reading = part.get("reading")
        if isinstance(reading, dict) and "separator" in reading and "decimal_mark" in reading:
            return reading
        children = part.values()
    elif isinstance(part, (list, tuple)):
        children = part
    else:
        return None
    for child in children:
        if isinstance(child, (dict, list, tuple)):
            found = _first_reading(child, depth + 1)
            if found is not None:
                return found
    return None


def convention_of_result(result: object) -> CsvConvention:
    """The convention of the data file a result read: the convention it records (a scores result's, of the data
    scored), else the reading of the first data file found in it (a fit's data, the fits a workflow holds: searched
    breadth first through its fields), :data:`PLAIN` when it read none (a workbook, summary statistics, a
    simulation)."""
    from dataclasses import fields, is_dataclass

    level, seen, visited = [result], set(), 0
    while level and visited < _MOST_VISITED:
        following = []
        for part in level:
            if isinstance(part, CsvConvention):
                return part
            if _is_reading(part):
                return convention_of(part)
            if id(part) in seen:
                continue
            seen.add(id(part))
            visited += 1
            if is_dataclass(part) and not isinstance(part, type):
                following += [getattr(part, f.name, None) for f in fields(part)]
            elif isinstance(part, (tuple, list)):
                following += [x for x in part[:_MOST_LISTED] if is_dataclass(x) or isinstance(x, (tuple, list))]
        level = [x for x in following if x is not None and (is_dataclass(x) or isinstance(x, (tuple, list)))]
    return PLAIN


_MOST_VISITED = 5_000  # parts of a result searched for its data file's reading
_MOST_LISTED = 50  # of a tuple's parts (the fits of a workflow come first; estimates and rows are many)


def _is_reading(part: object) -> bool:
    """Whether ``part`` is how a delimited text file was read (data.readers.TextReading, known by its fields: this
    module comes before the readers)."""
    return all(hasattr(part, name) for name in ("encoding", "separator", "decimal", "names_row"))
