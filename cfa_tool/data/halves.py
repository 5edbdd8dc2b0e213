"""Random halves saved in a file (explore --split, replicate --data, with --halves-file) and one of them read back.

The halves file is the one record of which rows went to which half: one line per row split, ``row,half,seed,
data_file,data_sha256,sheet_read`` (the row's number as the data file numbers them, data.moments.row_numbers; the
half's name; the seed that drew the halves; the data file's name and the SHA-256 of its bytes; the sheet of a workbook
that was read, data.readers.sheet_read, empty for another file).  Files written before s15 have ``sheet`` in its
place, the sheet asked for (empty when none was), and are read back as they were.  The halves are drawn by one rule
(:func:`draw_halves`), so the seed and the rows split say which half each row is in, and a file whose halves are not
those is refused (edited by hand, or of another seed).  Halves drawn by cluster within strata (replicate --data
--cluster/--strata, :func:`draw_cluster_halves`) add four columns, ``cluster_column,cluster,strata_column,stratum``
(the columns and each row's labels as read), by which they are drawn again to check them, and which must be those the
run reading a half finds in the data.  A half of it is analysed by choosing it among the row
selections (``--half FILE.csv NAME``, ``keep=[RandomHalf('FILE.csv', 'NAME')]``): the rows are read from the data
file itself, never from a copy, and the halves file is checked against that file first: the same contents (the
checksum) and sheet, and the same rows split (the rows the data file holds after the row filters are those the
halves file lists, no more and no fewer), else a refusal that says which.  Halves drawn from the rows with an
answer to every model variable (replicate --data with --incomplete-rows listwise) leave out the rows with gaps: read
back with the model's items, they are those rows when the run leaves rows with gaps out too, and refused, naming the
handling of rows with gaps, when it keeps them: one rule for every workflow that fits the rows it reads (fit, compare,
invariance, align, bootstrap, cutoffs, scores, replicate: pipeline.inputs.keeps_rows_with_gaps, every handling but
listwise keeps them), whose notes then say the rows with gaps were left out before the split."""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool.data.file_checksum import fingerprint
from cfa_tool.data.csv_convention import PLAIN, CsvConvention
from cfa_tool.data.kept_rows import KEPT_BY, row_naming, rows_listed
from cfa_tool.data.moments import row_numbers
from cfa_tool.numbers import count_text, counted, word_list
from cfa_tool.data.readers import sheet_read
from cfa_tool.errors import DataError, OptionError, printable
from cfa_tool.note_parts import Command, Note, Text
from cfa_tool.options import Interface, Option, interface, shell_word, taken_by

#: the columns of a halves file, in order
HALVES_COLUMNS = ("row", "half", "seed", "data_file", "data_sha256", "sheet_read")
#: those of a halves file written before s15, whose last column is the sheet asked for (empty when none was)
SHEET_ASKED_COLUMNS = HALVES_COLUMNS[:5] + ("sheet",)
#: those of halves drawn by cluster within strata (replicate --data --cluster/--strata, s17): each row's cluster and
#: stratum as the run read them, and the columns they came from, by which the halves are drawn again to check them
DRAWN_BY_COLUMNS = HALVES_COLUMNS + ("cluster_column", "cluster", "strata_column", "stratum")


@dataclass(frozen=True)
class HalfNames:
    """The names one command gives the two halves it draws, the first drawn first, and how its reports say them: the
    one vocabulary of halves (review s25: replicate's reports said 'half A', a half of its file read back 'the A
    half', explore's 'the exploration half', each written where it was said).  ``command``: the command and option
    that draw them; ``before``: the name goes before the word half ('the exploration half'), else after it ('half
    A').  The names are those the halves file's column ``half`` holds and ``--half FILE NAME`` takes."""

    command: str
    names: tuple[str, str]
    before: bool

    def phrase(self, k: int, article: bool = True) -> str:
        """Half ``k`` (0: the first drawn) in a sentence: 'the exploration half' ('exploration half' without the
        ``article``), 'half A'."""
        if not self.before:
            return f"half {self.names[k]}"
        return f"{'the ' if article else ''}{self.names[k]} half"

    def label(self, k: int) -> str:
        """Half ``k`` as a table's row or a sample's label: 'Half A', 'Exploration half'."""
        words = self.phrase(k, article=False)
        return words[:1].upper() + words[1:]


#: explore --split's halves and replicate --data's: the same seed draws the same halves of the same rows
#: (:func:`draw_halves`, :func:`draw_cluster_halves`), the first of one command being the first of the other
EXPLORE_NAMES = HalfNames("explore --split", ("exploration", "confirmation"), True)
REPLICATE_NAMES = HalfNames("replicate --data", ("A", "B"), False)
#: the names of the two halves as the commands write them, the first drawn first (explore --split; replicate --data)
EXPLORE_HALVES = EXPLORE_NAMES.names
REPLICATE_HALVES = REPLICATE_NAMES.names
DRAWN_HALVES = (EXPLORE_HALVES, REPLICATE_HALVES)


def named_half(name: str) -> tuple[HalfNames, int] | None:
    """The command's names a half's ``name`` is one of, and its place among them (0: drawn first); None for a name of
    neither command."""
    for names in (EXPLORE_NAMES, REPLICATE_NAMES):
        if name in names.names:
            return names, names.names.index(name)
    return None


def halves_named_alike(seed: int, explored: bool, cluster: str | None = None, strata: str | None = None) -> Note:
    """Which half of explore --split is which half of replicate --data (new-user s24: the same seed draws the same
    halves of the same rows, data.halves.draw_halves, and the one named them exploration and confirmation, the other
    A and B, so that the researcher matched chi-squares to learn which half had been explored): said by the run
    that drew them (``explored``: explore's, else replicate's), each naming the other's halves by the names of
    :data:`EXPLORE_HALVES` and :data:`REPLICATE_HALVES`; halves drawn by ``cluster`` within ``strata`` are drawn alike
    by the same columns, which the command named gives."""
    (explored_name, confirming), (a, b) = (EXPLORE_NAMES.phrase(0), EXPLORE_NAMES.phrase(1)), (
        REPLICATE_NAMES.phrase(0), REPLICATE_NAMES.phrase(1))
    python = interface() is not Interface.COMMAND_LINE
    design = [(word, name) for word, name in (("cluster", cluster), ("strata", strata)) if name]
    by = "".join(f", {word}={name!r}" for word, name in design) if python else \
        "".join(f" --{word} {shell_word(name)}" for word, name in design)
    if explored:
        other = f"split_half(model, data, seed={seed}{by})" if python else \
            f"replicate MODEL --data FILE --seed {seed}{by}"
        return Note((f"A replication in two halves of the same rows with the same seed draws these two halves and "
                     f"names {explored_name} '{a}' and {confirming} '{b}'", Command(f" ({other})"), "."))
    other = f"explore(data, split={seed}{by})" if python else f"explore --data FILE {Option.SPLIT.flag} {seed}{by}"
    return Note((f"{REPLICATE_NAMES.label(0)} holds the rows that an exploration of the same rows with the same seed "
                 f"explores (its {EXPLORE_NAMES.phrase(0, False)}), and {b} those of its "
                 f"{EXPLORE_NAMES.phrase(1, False)}", Command(f" ({other})"), "."))


def redraw_words(names: "tuple[str, ...] | list[str]", seed: str | int = "SEED", cluster: str = "",
                 strata: str = "", every_row: bool = False) -> str:
    """How to write the halves again: with the command that drew halves of these ``names`` (review s14: a replicate
    file was told to rerun explore, whose halves have other names and are drawn from every row, not the complete
    ones), by the ``cluster`` and ``strata`` columns they were drawn by; ``every_row``: of every row with an answer,
    without leaving out the rows with gaps.  Said as the caller runs things (options.on_command_line): a Python
    caller reads the function that uses the same halves, then the command that writes their file, which only the
    command line writes (the command last: messages go on after it)."""
    if set(names) == set(REPLICATE_HALVES):
        by = "".join(f" {flag} {shell_word(name)}" for flag, name in (("--cluster", cluster), ("--strata", strata))
                     if name)
        command = f"cfa-tool replicate MODEL --data FILE --seed {seed}{by} --halves-file NEW.csv"
        keywords = "".join(f", {word}={name!r}" for word, name in (("cluster", cluster), ("strata", strata)) if name)
        function = f"split_half(model, data, seed={seed}{keywords})"
    else:
        command = f"cfa-tool explore --split {seed} --halves-file NEW.csv"
        function = f"explore(data, split={seed})"
    if every_row:
        command += f", without {Option.INCOMPLETE_ROWS.flag} listwise"
        function += f", without {Option.INCOMPLETE_ROWS.keyword}='listwise',"
    if interface() is Interface.COMMAND_LINE:
        return command
    return f"from Python, {function} uses the same halves without a file; on the command line, {command}"


#: fewer clusters than this in a half make the halves those clusters rather than samples of them (common practice: a
#: random split needs enough units to balance the halves; no published cut-off)
FEW_CLUSTERS_IN_A_HALF = 5


def few_clusters_words(units: "tuple[int, ...] | list[int]", past: bool = False) -> str:
    """What halves drawn cluster by cluster with a handful of clusters in a half are, as a clause that goes on a
    sentence ('; with only 1 cluster in a half, ...'), or '' with enough clusters: a comparison of those clusters,
    closer to a test across groups than to a replication in a new sample (hostile s24: two districts made two
    'random halves' of one district each, without a word).  ``past``: a methods paragraph's tense."""
    least = min(units) if len(units) else FEW_CLUSTERS_IN_A_HALF
    if least >= FEW_CLUSTERS_IN_A_HALF:
        return ""
    are, is_ = ("were", "was") if past else ("are", "is")
    return (f"; with only {least} cluster{'s' if least > 1 else ''} in a half, the halves {are} those clusters rather "
            f"than samples of them, so the comparison {is_} one of those clusters, closer to a test of invariance "
            f"across them as groups than to a check in a new sample")


def few_clusters_caution(units: "tuple[int, ...] | list[int]", cluster: str, explored: bool,
                         strata: str | None = None, analysed: str = "") -> tuple[str, Note] | None:
    """The caution, first in every view, of halves drawn cluster by cluster with a handful of clusters in a half
    (:data:`FEW_CLUSTERS_IN_A_HALF`), as (explanation, advice), or None with enough clusters: the one rule of both
    commands that draw halves (replicate --data and explore --split with --cluster; hostile s24b: two districts made
    two 'random halves' of one district each, and no caution said so), in the words of :func:`few_clusters_words`.
    ``explored``: explore's halves, else replicate's (their names, :func:`half_phrase`); ``strata``: the strata the
    clusters were drawn within; ``analysed``: the half a run analyses alone (--half: 'half A of h.csv'), named
    first."""
    few = few_clusters_words(units)
    if not few:
        return None
    first, second = (half_phrase(explored, k) for k in (0, 1))
    within = f" within each stratum of {strata}" if strata else ""
    lead = f"The rows analysed are {analysed}, and the halves" if analysed else "The halves"
    explanation = (f"{lead} were drawn cluster by cluster{within} from only {counted(sum(units), 'cluster')} of "
                   f"{cluster} ({units[0]} in {first}, {units[1]} in {second}){few}.")
    python = interface() is not Interface.COMMAND_LINE
    invariance = (f"invariance(model, data, group={cluster!r})" if python
                  else f"cfa-tool invariance MODEL --data FILE {Option.GROUP_COLUMN.given(cluster)}")
    by_rows, drop = Option.STRATA.given(cluster), Option.CLUSTER.given(cluster)
    if explored:
        other = ("confirm the draft model in data of other clusters, or draw the halves row by row within each "
                 "cluster")
    else:
        other = "replicate in data of other clusters, or draw the halves row by row within each cluster"
    advice = Note(("to compare these clusters, test invariance across them", Command(f" ({invariance})", runs="invariance"),
                   f"; for a check in a new sample, {other}", Command(f" ({by_rows} in place of {drop})"),
                   ", so that each half holds rows of every cluster (the rows of one cluster in both halves then look "
                   "more alike than independent samples would)."))
    return explanation, advice


def names_in_file(names: tuple[str, ...], path) -> str:
    """How a halves file just written names its halves, after its name in the message that says it was written:
    "half A and half B, named 'A' and 'B' in its column half, as --half h.csv NAME takes them" (the command's words,
    :class:`HalfNames`)."""
    found = named_half(names[0])
    if found is None:
        return ""
    words = found[0]
    return (f"{words.phrase(0)} and {words.phrase(1)}, named '{words.names[0]}' and '{words.names[1]}' in its column "
            f"half, as {_half_given(path, 'NAME')} takes them")


def half_phrase(explored: bool, k: int, article: bool = True) -> str:
    """Half ``k`` (0: the first drawn) as a sentence names it, in its command's names (explore's, ``explored``, else
    replicate's: :class:`HalfNames`): 'the exploration half', 'half A'."""
    return (EXPLORE_NAMES if explored else REPLICATE_NAMES).phrase(k, article)


def draw_halves(count: int, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """The positions (in the rows' order) of the two random halves of ``count`` rows drawn with ``seed``: a random
    permutation (numpy's default generator), its first ceil(count / 2) positions the first half (which so takes the
    odd row), each half in the rows' order.  The one rule of explore --split and replicate --data."""
    order = np.random.default_rng(seed).permutation(count)
    first = (count + 1) // 2
    return np.sort(order[:first]), np.sort(order[first:])


def draw_cluster_halves(units: np.ndarray, strata: np.ndarray | None, seed: int) -> tuple[np.ndarray, np.ndarray]:
    """The positions (in the rows' order) of two random halves drawn unit by unit, every row of a unit in one half:
    ``units`` each row's integer code of its cluster (or the rows' positions, np.arange, for halves of rows within
    strata), ``strata`` each row's integer code of its stratum (None: one stratum).  In the order of the strata's
    codes, each stratum's units are put in a random order (numpy's default generator seeded with ``seed``, one
    permutation per stratum in turn) and the first half of them go to the first half; a stratum of an odd number of
    units gives its extra unit to the first half, the next such stratum to the second, and so on in turn, so that
    neither half collects them.  With one stratum and one row per unit these are :func:`draw_halves`'s halves (the
    same permutation of the same count): the rule of replicate --data with --cluster or --strata."""
    rng = np.random.default_rng(seed)
    strata = np.zeros(len(units), dtype=np.int64) if strata is None else np.asarray(strata)
    first = np.zeros(len(units), dtype=bool)
    extra_first = True
    for stratum in np.unique(strata):
        inside = strata == stratum
        order = rng.permutation(np.unique(units[inside]))
        take = len(order) // 2 + (len(order) % 2 if extra_first else 0)
        extra_first ^= bool(len(order) % 2)
        first |= inside & np.isin(units, order[:take])
    return np.flatnonzero(first), np.flatnonzero(~first)


def drawn_halves(frame: pd.DataFrame, cluster: str | None, strata: str | None, items: tuple[str, ...], source: str,
                 seed: int, by_hand: str) -> tuple[np.ndarray, np.ndarray, tuple[int, ...], DrawnBy | None]:
    """The random halves of the rows of ``frame``, the one rule of every split (replicate --data, explore --split):
    their positions, row by row (:func:`draw_halves`) without ``cluster`` or ``strata``, else whole clusters of the
    column ``cluster`` (or rows) within each stratum of ``strata`` (:func:`draw_cluster_halves`), the clusters and
    strata read as the sampling design reads them (data.sample_design: checked, each distinct cell once); the
    clusters in each half (() without clusters); and the columns and each row's cluster and stratum a halves file
    records (None without them).  ``items``: the variables analysed, which need at least twice their number of rows
    in each half (``by_hand``: what to do instead, when they do not have them)."""
    from cfa_tool.errors import DataError, printable
    from cfa_tool.options import Option

    if cluster is None and strata is None:
        return *draw_halves(len(frame), seed), (), None
    from cfa_tool.data.labels import group_keys
    from cfa_tool.data.sample_design import DesignColumns, check_design, row_design

    design = DesignColumns(None, cluster, strata)
    if cluster is not None and cluster in frame.columns:
        # the clusters as the design reads them (each distinct cell once, by type and text; a blank cell is none)
        if len(pd.unique(group_keys(frame[cluster]).dropna())) < 2:
            raise DataError(f"{source}: column '{printable(cluster)}' names a single cluster among the rows split, "
                            f"and halves drawn cluster by cluster need at least two; remove {Option.CLUSTER} or give "
                            f"the right column")
    checked, _ = check_design(frame, design, tuple(items), None, source)  # names, labels, nesting
    codes = row_design(checked, design, np.ones(len(checked), dtype=bool))
    units = codes.clusters if codes.clusters is not None else np.arange(len(checked))
    first, second = draw_cluster_halves(units, codes.strata, seed)
    counts = (len(np.unique(units[first])), len(np.unique(units[second]))) if codes.clusters is not None else ()
    least = 2 * len(items)
    if min(len(first), len(second)) < least:
        by = f"cluster of {cluster}" if cluster is not None else f"stratum of {strata}"
        raise DataError(f"{source}: halves drawn {by} hold {len(first)} and {len(second)} rows, and each needs at least "
                        f"{least} for {len(items)} variables (large clusters or strata of few rows); {by_hand}")
    named = [np.asarray(names, dtype=object)[codes_of] if codes_of is not None else np.full(len(checked), "", dtype=object)
             for codes_of, names in ((codes.clusters, codes.cluster_names), (codes.strata, codes.strata_names))]
    labels = {int(r): (str(c), str(h)) for r, c, h in zip(row_numbers(checked), *named)}
    return first, second, counts, DrawnBy(cluster, strata, labels)


@dataclass(frozen=True)
class RandomHalf:
    """The choice of one half of a halves file: ``path`` the file, ``name`` the half ('confirmation')."""

    path: str | Path
    name: str


@dataclass(frozen=True)
class HalfRows:
    """One half of a halves file, as chosen and found in the data: it joins the row filters of a data summary
    (``LoadedData.row_filters``, ``DataSummary.row_filters``), whose reports and methods text name it as they name a
    filter (the attributes a row filter has: no column, nothing left out for an empty cell)."""

    halves_file: str
    name: str
    seed: int
    rows: int  # the half's rows
    split: int  # the rows split into the halves
    #: the rows with gaps left out before the split (replicate --incomplete-rows listwise): the halves are those of
    #: the rows with an answer to every model variable (data.halves.half_kept)
    with_gaps: int = 0
    #: the columns the halves were drawn by, whole clusters to each half within strata ('' when not given; both ''
    #: for halves drawn row by row): what the notes and the methods text say of how the rows were split
    cluster_column: str = ""
    strata_column: str = ""
    #: the clusters in each half, the half drawn first first, when drawn by clusters (() else): a handful of them is a
    #: caution first (pipeline.row_filter_cautions.few_clusters_problems)
    units: tuple[int, ...] = ()
    #: the clusters of this half by their labels, in the order of the file, when a half holds fewer than
    #: FEW_CLUSTERS_IN_A_HALF of them (() else): the methods text names them, as the halves are those clusters
    #: (hostile s25b: 'half A of two random halves of the clusters' for 3 of 6 depots, never named)
    cluster_labels: tuple[str, ...] = ()
    column = None  # no column of the data file chose the rows
    operator = "="
    empty = 0
    dropped = 0
    shared = ()
    other_case = ()
    members = ()

    @property
    def value(self) -> str:
        return self.name

    def compares_numbers(self) -> bool:
        return False

    @property
    def text(self) -> str:
        """'confirmation half (seed 17) of halves.csv', 'half A (seed 3) of halves.csv': the selection as the data line
        and the JSON name it, in its command's words (:class:`HalfNames`)."""
        return f"{self.phrase(False)} (seed {self.seed}) of {self.halves_file}"

    def phrase(self, article: bool = True) -> str:
        """The half in a sentence, as the command that drew it names it ('the confirmation half', 'half A')."""
        found = named_half(self.name)
        return found[0].phrase(found[1], article) if found is not None else f"the half '{self.name}'"

    @property
    def explored(self) -> bool:
        """A half of explore's halves (else of replicate's)."""
        found = named_half(self.name)
        return found is not None and found[0] == EXPLORE_NAMES

    def __str__(self) -> str:
        return self.text

    @property
    def drawn(self) -> str:
        """How the rows were split, after 'the N rows': 'split at random into two halves', or by whole clusters
        'whose clusters of school were drawn at random into two halves, every row of a cluster in one half, within
        the strata of region' (data.halves.draw_cluster_halves)."""
        within = f"within the strata of {printable(self.strata_column)}" if self.strata_column else ""
        if self.cluster_column:
            return (f"whose clusters of {printable(self.cluster_column)} were drawn at random into two halves, every "
                    f"row of a cluster in one half" + (f", {within}" if within else ""))
        return "split at random into two halves" + (f" {within}" if within else "")

    def note(self) -> Text:
        """The note of a report: which rows were analysed (the option apart, note_parts.Command)."""
        return (f"Only the rows of {self.phrase()} (seed {self.seed}) of {self.halves_file} are analysed: "
                f"{count_text(self.rows)} of the {count_text(self.split)} rows {self.drawn}" + (
                    Note((f", those with an answer to every model variable ({self.with_gaps} "
                          f"{'row' if self.with_gaps == 1 else 'rows'} with gaps left out before the split",
                          Command(f", as {Option.INCOMPLETE_ROWS.given('listwise')} leaves them out",
                                  takes=taken_by(Option.INCOMPLETE_ROWS)), ")"))
                    if self.with_gaps else ""))

    def in_words(self) -> str:
        """'the row fell in the confirmation half of two random halves, drawn with seed 17 and listed in halves.csv',
        after 'those where' in a methods section, which gives the rows analysed and those in the file; of halves
        drawn by cluster, 'two random halves of the clusters of school, each cluster whole in one half, drawn within
        the strata of region with seed 17 and listed in halves.csv'.  Without parentheses: the methods section says
        it inside its own (reporting.paragraph).  The file by its name: a methods text names no local folder."""
        rows = " of the rows with an answer to every model variable" if self.with_gaps else ""
        clusters = f" of the clusters of {self.cluster_column}{rows}, each cluster whole in one half" \
            if self.cluster_column else rows
        within = f" within the strata of {self.strata_column}" if self.strata_column else ""
        if self.cluster_labels:  # a handful of clusters: the half is those clusters, named
            return (f"the row fell in {self.phrase()}, the cluster{'s' if len(self.cluster_labels) > 1 else ''} "
                    f"{word_list(list(self.cluster_labels))} of "
                    f"{self.cluster_column}{rows} (of {sum(self.units)} clusters drawn into two halves{within} with "
                    f"seed {self.seed} and listed in {Path(self.halves_file).name})")
        return (f"the row fell in {self.phrase()} of two random halves{clusters}, drawn{within} with seed "
                f"{self.seed} and listed in {Path(self.halves_file).name}")


@dataclass(frozen=True)
class DrawnBy:
    """The columns halves were drawn by (:func:`draw_cluster_halves`) and each row's cluster and stratum as read
    (``labels``: row number -> (cluster, stratum), '' for a column not given)."""

    cluster: str | None
    strata: str | None
    labels: dict


def halves_text(halves: list[tuple[str, tuple[int, ...]]], seed: int, data, sheet: str | None = None,
                drawn_by: DrawnBy | None = None, convention: CsvConvention = PLAIN) -> str:
    """The halves file: one line per row split, in the order of the rows (``halves``: each half's name and its rows'
    numbers, data.moments.row_numbers, the first half first), each with the seed, the data file's name and checksum
    and the sheet read (``sheet``: the one asked for; data.readers.sheet_read); halves drawn by cluster within strata
    (``drawn_by``) add the columns and each row's cluster and stratum (:data:`DRAWN_BY_COLUMNS`).  Written in
    ``convention``, the data file's (data.csv_convention: its separator and byte-order mark, the one rule of every CSV
    file the tool writes), which :func:`read_halves` reads back."""
    name = Path(data).name if isinstance(data, (str, Path)) else ""
    sums = fingerprint(data)
    sheet = sheet_read(data, sheet)
    out = io.StringIO()
    writer = csv.writer(out, delimiter=convention.separator, lineterminator="\n")
    writer.writerow(HALVES_COLUMNS if drawn_by is None else DRAWN_BY_COLUMNS)
    for row, half in sorted((row, half) for half, numbers in halves for row in numbers):
        line = (row, half, seed, name, sums, sheet or "")
        if drawn_by is not None:
            cluster, stratum = drawn_by.labels[row]
            line += (drawn_by.cluster or "", cluster, drawn_by.strata or "", stratum)
        writer.writerow(line)
    return convention.file_text(out.getvalue())


@dataclass(frozen=True)
class SavedHalves:
    """A halves file as read: the rows' numbers and their halves (in the file's order), the seed, the data file's
    name and checksum, and the sheet read (``sheet``; in a file written before s15, the sheet asked for:
    ``sheet_asked``)."""

    path: str
    rows: np.ndarray
    halves: tuple[str, ...]
    seed: int
    data_file: str
    data_sha256: str
    sheet: str = ""
    sheet_asked: bool = False
    #: halves drawn by cluster within strata: the columns ('' when not given) and each row's cluster and stratum
    cluster_column: str = ""
    strata_column: str = ""
    clusters: tuple[str, ...] = ()
    strata: tuple[str, ...] = ()

    def sheet_drawn(self, data) -> str:
        """The sheet of ``data`` the halves were drawn from: the one recorded, or in a file written before s15, the
        sheet its run read of the sheet asked for (the workbook opened to learn it, data.readers.sheet_read)."""
        return sheet_read(data, self.sheet) if self.sheet_asked else self.sheet

    def names(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(self.halves))


def read_halves(path) -> SavedHalves:
    """Read a halves file (:func:`halves_text`), every line checked: a one-line error naming the file and line."""
    shown = printable(str(path))
    try:
        text = Path(path).read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise OptionError(f"the halves file '{shown}' does not exist") from None
    except IsADirectoryError:
        raise OptionError(f"the halves file '{shown}' is a folder, not the CSV file --halves-file wrote") from None
    except UnicodeDecodeError:
        raise DataError(f"{shown}: not a halves file (not text: a workbook or another binary file; a halves file is "
                        f"the CSV file --halves-file wrote)") from None
    except OSError as exc:
        raise DataError(f"{shown}: cannot read the halves file ({printable(exc.strerror or 'unreadable')})") from None
    first = text.split("\n", 1)[0]  # its header: separated by semicolons when the data file's fields were
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=";" if first.count(";") > first.count(",") else ",")
    try:
        lines = list(reader)
    except csv.Error:  # a value longer than the csv module's limit: a quote never closed, or not a halves file
        raise DataError(f"{shown}, line {reader.line_num}: not a halves file (a value of more than "
                        f"{csv.field_size_limit():,} characters, or a quote (\") never closed); a halves file is the "
                        f"CSV file --halves-file wrote, and is read as it wrote it") from None
    header = tuple(c.strip() for c in lines[0]) if lines else ()
    if header not in (HALVES_COLUMNS, SHEET_ASKED_COLUMNS, DRAWN_BY_COLUMNS):
        earlier = header in (HALVES_COLUMNS[:2], HALVES_COLUMNS[:5])
        raise DataError(f"{shown}, line 1: " + (
            "a halves file of an earlier version, without the seed, the data file's checksum or the sheet that a half "
            f"is checked by; write the halves again ({redraw_words(EXPLORE_HALVES)} draws the same "
            "halves from as many rows)" if earlier else
            f"not a halves file (its first line must be '{','.join(HALVES_COLUMNS)}', as explore --split and "
            f"replicate --data write it with --halves-file)"))
    rows, halves, seeds, data, lines_of, drawn, units = [], [], set(), set(), {}, set(), []
    for number, cells in enumerate(lines[1:], start=2):
        if not any(c.strip() for c in cells):
            continue
        if len(cells) != len(header):
            raise DataError(f"{shown}, line {number}: {len(cells)} values, and a halves file of these columns has "
                            f"{len(header)} ({', '.join(header)})")
        row, half, seed, name, sums, sheet = (c.strip() for c in cells[:6])
        if header == DRAWN_BY_COLUMNS:  # the labels as the run read them (data.labels.label_text: no spaces at ends)
            drawn.add((cells[6].strip(), cells[8].strip()))
            units.append((cells[7].strip(), cells[9].strip()))
            if len(drawn) > 1:
                raise DataError(f"{shown}, line {number}: other cluster or strata columns than the lines above; a "
                                f"halves file holds the halves of one split")
        if not row.isdigit() or int(row) < 1:
            raise DataError(f"{shown}, line {number}, column row: '{printable(row)}' is not a row number")
        if not half:
            raise DataError(f"{shown}, line {number}, column half: empty (each row names its half)")
        if not seed.lstrip("-").isdigit():
            raise DataError(f"{shown}, line {number}, column seed: '{printable(seed)}' is not a whole number")
        if int(row) in lines_of:
            raise DataError(f"{shown}, line {number}: row {int(row)} is listed twice (line {lines_of[int(row)]} "
                            f"too); each row is in one half")
        lines_of[int(row)] = number
        rows.append(int(row))
        halves.append(half)
        seeds.add(int(seed))
        data.add((name, sums, sheet))
        if len(seeds) > 1 or len(data) > 1:
            raise DataError(f"{shown}, line {number}: another seed or data file than the lines above; a halves file "
                            f"holds the halves of one split of one data file")
    if not rows:
        raise DataError(f"{shown}: the halves file lists no rows")
    name, sums, sheet = data.pop()
    cluster_column, strata_column = drawn.pop() if drawn else ("", "")
    return SavedHalves(str(path), np.asarray(rows, dtype=np.int64), tuple(halves), seeds.pop(), name, sums, sheet,
                       header == SHEET_ASKED_COLUMNS, cluster_column, strata_column,
                       tuple(u[0] for u in units), tuple(u[1] for u in units))


def half_kept(frame: pd.DataFrame, choice: RandomHalf, data, source: str, sheet: str | None = None, read: str = "",
              items: tuple[str, ...] = (), keeps_gaps: bool | None = None,
              value_labels: dict | None = None, listwise_applies: bool = True) -> tuple[pd.DataFrame, HalfRows]:
    """The rows of ``frame`` (the data file's rows after the row filters; ``sheet`` the sheet asked for and ``read``
    the sheet read, data.readers.LoadedData.sheet_read) in the half ``choice`` names, and the half as found; a
    refusal when the halves file is not that of these rows: drawn from a file of other contents (the checksum) or
    another sheet, naming rows the data do not hold, or leaving rows of the data out (another selection of rows), or
    halves that its seed does not draw from its rows (edited by hand).  Rows left out that miss some answers to the
    model's ``items`` while every row split has them all are the rows with gaps that replicate --incomplete-rows
    listwise leaves out before it splits: the half is read when the run leaves them out too (``keeps_gaps`` False)
    or does not fit (None: check describes the rows), and refused, naming the handling of rows with gaps, when it
    keeps them (True).  ``value_labels``: the data file's (SPSS, Stata), by which a cluster or strata column of
    labelled codes is read as the run that drew the halves read and recorded it (its labels)."""
    saved = read_halves(choice.path)
    shown = printable(str(choice.path))
    _check_drawn(saved, shown)
    if choice.name not in saved.names():
        listed = word_list(f"'{printable(n)}'" for n in saved.names())
        raise OptionError(f"{shown} holds the halves {listed}, not '{printable(choice.name)}'"
                          + _named_by_the_other(choice.name, saved.names(), choice.path))
    if not isinstance(data, (str, Path)):
        raise OptionError(f"a half of {shown} is checked against the data file its rows were drawn from "
                          f"({printable(saved.data_file)}): give that file's path as the data, not a data frame")
    if fingerprint(data) != saved.data_sha256:
        raise DataError(f"{shown} holds the halves of a data file with other contents ('{printable(saved.data_file)}' "
                        f"as it was when the halves were drawn), not those of {source}: give the data file the halves "
                        f"were drawn from; if that file was corrected since, write the halves again from it "
                        f"({redraw_words(saved.names(), saved.seed, saved.cluster_column, saved.strata_column)} draws the same halves from as many rows)")
    drawn = saved.sheet_drawn(data)
    if drawn != read:
        sheet_words = f"the sheet '{printable(read)}'" + ("" if sheet else " (the first sheet; no sheet asked for)")
        raise DataError(f"{shown} holds the halves of the sheet '{printable(drawn)}' of "
                        f"'{printable(saved.data_file)}', and this run reads {sheet_words}: give "
                        f"{Option.SHEET.given(drawn)}, as the run that drew them")
    numbers = row_numbers(frame)
    naming = row_naming(frame)
    absent = np.setdiff1d(saved.rows, numbers)
    unlisted = np.setdiff1d(numbers, saved.rows)
    with_gaps = _rows_with_gaps(frame, numbers, unlisted, items) if len(unlisted) and not len(absent) else None
    if with_gaps is not None and len(with_gaps) and keeps_gaps:
        listwise = Option.INCOMPLETE_ROWS.given("listwise")
        # ``listwise_applies`` False: a route that keeps rows with gaps whatever it is given (invariance over
        # occasions) is advised only halves drawn again (hostile s27: it was advised the option it refuses)
        give = f"give {listwise} to analyse the half as it was drawn, or " if listwise_applies else ""
        raise DataError(f"{shown} split the {len(saved.rows)} rows of {source} with an answer to every model "
                        f"variable: it leaves out {rows_listed(with_gaps, naming=naming)}, which miss some answers, "
                        f"as {listwise} leaves them out, and this run keeps the rows with gaps; {give}draw halves of "
                        f"every row with an answer "
                        f"({redraw_words(saved.names(), saved.seed, saved.cluster_column, saved.strata_column, True)})")
    if (len(absent) or len(unlisted)) and with_gaps is None:
        kept = " after the row filters" if frame.attrs.get(KEPT_BY) else ""
        which = (f"it lists {rows_listed(absent, naming=naming)}, not among them" if len(absent) else
                 f"it leaves out {rows_listed(unlisted, naming=naming)}")
        raise DataError(f"{shown} split {len(saved.rows)} rows, and {source} holds {len(numbers)}{kept}; {which}: the "
                        f"halves are of another selection of rows; give the {Option.NAMES_ROW}, "
                        f"{Option.FIRST_DATA_ROW} and {Option.KEEP} of the run that drew them (this run reads their "
                        f"sheet)")
    _check_labels(saved, frame, numbers, shown, source, value_labels or {})
    mask = np.isin(numbers, saved.rows[np.asarray(saved.halves) == choice.name])
    chosen = frame[mask]
    units = _clusters_per_half(saved)
    labels = ()
    if units and min(units) < FEW_CLUSTERS_IN_A_HALF:
        inside = np.asarray(saved.clusters, dtype=object)[np.asarray(saved.halves) == choice.name]
        labels = tuple(printable(str(c)) for c in dict.fromkeys(inside.tolist()))
    half = HalfRows(shown, choice.name, saved.seed, int(mask.sum()), len(saved.rows),
                    len(with_gaps) if with_gaps is not None else 0, saved.cluster_column, saved.strata_column,
                    units, labels)
    chosen.attrs[KEPT_BY] = tuple(frame.attrs.get(KEPT_BY, ())) + (half.text,)
    return chosen, half


def _clusters_per_half(saved: SavedHalves) -> tuple[int, ...]:
    """The clusters in each half of a halves file drawn by clusters, the half drawn first first (its command's
    names, :class:`HalfNames`); () for halves drawn row by row.  A cluster's label names one cluster whatever its
    stratum: the design checks that clusters are nested in strata (data.sample_design.check_design)."""
    found = named_half(saved.names()[0]) if saved.names() else None
    if not saved.cluster_column or found is None:
        return ()
    halves, clusters = np.asarray(saved.halves), np.asarray(saved.clusters, dtype=object)
    return tuple(len(set(clusters[halves == name].tolist())) for name in found[0].names)


def _named_by_the_other(name: str, names: tuple[str, ...], path) -> str:
    """What a half's ``name`` of the other command's halves is in a file of ``names`` (explore's, or replicate's):
    '; 'B' is what replicate --data names the half drawn second, which explore --split names 'confirmation': give
    --half h.csv confirmation'; '' for any other name."""
    asked, here = named_half(name), next((named_half(n) for n in names if named_half(n) is not None), None)
    if asked is None or here is None or asked[0] == here[0]:
        return ""
    other, k = asked
    this = here[0].names[k]
    return (f"; '{printable(name)}' is what {other.command} names the half drawn {('first', 'second')[k]}, which "
            f"{here[0].command} names '{this}': give {_half_given(path, this)}")


def _half_given(path, name: str) -> str:
    """The choice of the half ``name`` of the halves file ``path`` as the caller writes it ('--half h.csv
    confirmation', "keep=[RandomHalf('h.csv', 'confirmation')]")."""
    if interface() is Interface.COMMAND_LINE:
        return f"{Option.HALF.flag} {shell_word(str(path))} {name}"
    return f"{Option.HALF.keyword}=[RandomHalf({str(path)!r}, {name!r})]"


def _check_labels(saved: SavedHalves, frame: pd.DataFrame, numbers: np.ndarray, shown: str, source: str,
                  value_labels: dict) -> None:
    """A refusal when halves drawn by cluster within strata name other clusters or strata for their rows than the
    data's columns hold (the columns renamed or missing in this run, or edited labels): the halves were drawn by those
    labels, and are checked by them (:func:`_check_drawn`).  A column of labelled codes is read through its value
    labels, as the run that drew the halves read it (data.labels.labelled_codes; new-user trial s18: a Stata file's
    school codes, recorded as 'School 01', were compared as '1'); the cells as the design reads them (group_keys)."""
    from cfa_tool.data.labels import cells_as_labels, group_keys, labelled_codes

    labelled = set(labelled_codes(frame, value_labels))

    for column, recorded in ((saved.cluster_column, saved.clusters), (saved.strata_column, saved.strata)):
        if not column:
            continue
        if column not in frame.columns:
            raise DataError(f"{shown} holds halves drawn by the column '{printable(column)}', which {source} does not "
                            f"hold as this run reads it; give the {Option.RENAME} of the run that drew them")
        # as the design read them when the halves were drawn (data.sample_design: each distinct cell once)
        cells = cells_as_labels(frame[column], value_labels[column]) if column in labelled else frame[column]
        labels = dict(zip(numbers.tolist(), group_keys(cells).astype(object).fillna("").tolist()))
        for row, label in zip(saved.rows.tolist(), recorded):
            if row in labels and labels[row] != label:
                raise DataError(f"{shown}: row {row} was drawn in '{printable(label)}' of column "
                                f"'{printable(column)}', and {source} gives '{printable(labels[row])}' there; a half is "
                                f"analysed only as drawn: write the halves again "
                                f"({redraw_words(saved.names(), saved.seed, saved.cluster_column, saved.strata_column)})")


def _rows_with_gaps(frame: pd.DataFrame, numbers: np.ndarray, unlisted: np.ndarray,
                    items: tuple[str, ...]) -> np.ndarray | None:
    """The numbers of the ``unlisted`` rows (those of ``frame`` a halves file leaves out) that miss some answers to
    ``items`` but not all, when the halves are those of the rows with an answer to every item (every row split has
    them all, every row left out misses one; rows without any answer, which no fit analyses, may be left out too):
    none when only rows without any answer are left out (replicate draws halves of the rows with an answer); None
    when the rows left out are not so explained (or an item is not among the columns)."""
    if not items or not all(item in frame.columns for item in items):
        return None
    missing = frame[list(items)].isna().to_numpy()
    some, every = missing.any(axis=1), missing.all(axis=1)
    left = np.isin(numbers, unlisted)
    if every[left].all():
        return np.asarray(numbers)[:0]
    if some[~left].any() or not some[left].all():
        return None
    return np.asarray(numbers)[left & ~every]


def _check_drawn(saved: SavedHalves, shown: str) -> None:
    """A refusal when the halves listed are not those :func:`draw_halves` draws with the file's seed from its rows
    (in their order): a file edited by hand, or one whose seed was changed, would pass rows the model was chosen on
    as rows it was not."""
    order = np.argsort(saved.rows, kind="stable")
    halves = np.asarray(saved.halves)[order]
    if saved.cluster_column or saved.strata_column:  # codes by first appearance in the rows' order, as the run drew
        units = (pd.factorize(np.asarray(saved.clusters, dtype=object)[order])[0] if saved.cluster_column
                 else np.arange(len(order)))
        strata = pd.factorize(np.asarray(saved.strata, dtype=object)[order])[0] if saved.strata_column else None
        first, second = draw_cluster_halves(units, strata, saved.seed)
    else:
        first, second = draw_halves(len(order), saved.seed)
    named = next((pair for pair in DRAWN_HALVES if set(saved.names()) == set(pair)), None)
    if named is not None and np.all(halves[first] == named[0]) and np.all(halves[second] == named[1]):
        return
    raise DataError(f"{shown}: its halves are not those seed {saved.seed} draws from its {len(order)} rows (edited by "
                    f"hand, or written with another seed): a half is analysed only as drawn; write the halves again "
                    f"({redraw_words(saved.names(), cluster=saved.cluster_column, strata=saved.strata_column)})")
