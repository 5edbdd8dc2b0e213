"""Options that name columns read in Unicode's composed form (NFC), as the data's column names and the model's names
are read (language.names.composed): a name typed or pasted with decomposed accents ('e' + U+0301, as some systems
write file names and clipboard text) names the column whose header is written composed, for every option of every
command that names a column (s23: refused with a 'did you mean' that showed the same-looking name).

The data are Holzinger & Swineford (1939) (tests/datasets, 301 pupils) with columns and a school's label renamed to
hold accents, written composed to CSV; the reference for each run is the same run with the names typed composed.
"""

from __future__ import annotations

import json
import unicodedata

import pytest

from cfa_tool.cli import build_parser
from cfa_tool.commands import options
from tests.conftest import holzinger_swineford, run_cli

#: the file's names, composed (as a file written on most systems holds them)
SCHOOL, IDS, GRADE, CLASS, WEIGHT, AGE, ITEM, LABEL = ("école", "identité", "année", "classe_é", "pondéré", "âge",
                                                      "x3_é", "Lycée")
MODEL = f'factor visual: x1, x2, "{ITEM}"\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n'
#: the model with factor means, which the reference group sets
GROUPS_MODEL = MODEL + "invariance scalar\n"


def typed(name: str) -> str:
    """``name`` as a system that decomposes accents writes it: 'é' as 'e' + U+0301."""
    out = unicodedata.normalize("NFD", name)
    assert out != name  # every name of the test holds an accent
    return out


@pytest.fixture()
def files(tmp_path):
    hs = holzinger_swineford()
    hs["school"] = hs["school"].replace({"Pasteur": LABEL})
    hs["grade"] = hs["grade"].fillna(7)  # every row with a stratum
    hs["classe"] = hs["grade"] * 100 + hs["id"] % 10  # classes nested in grades
    hs["weight"] = 1 + (hs["id"] % 3) / 2
    hs.loc[hs["id"] % 40 == 0, "x1"] = None  # a few gaps, which missing-data helpers apply to
    hs = hs.rename(columns={"school": SCHOOL, "id": IDS, "grade": GRADE, "classe": CLASS, "weight": WEIGHT,
                            "ageyr": AGE, "x3": ITEM})
    data = tmp_path / "pupils.csv"
    hs.to_csv(data, encoding="utf-8")
    model = tmp_path / "m.cfa"
    model.write_text(MODEL, encoding="utf-8")
    groups = tmp_path / "groups.cfa"
    groups.write_text(GROUPS_MODEL, encoding="utf-8")
    return model, data, tmp_path, groups


def test_every_option_that_names_a_column_is_composed():
    """Every option of every command whose value names columns (its metavar says so) is one composed_names reads:
    an option added later without it would be refused with a 'did you mean' showing the same name."""
    naming = {"COLUMN", "COLUMNS", "NAMES", "ITEMS", "FILTER", "OLD=NEW", "LABEL"}
    parser = build_parser()
    commands = next(a for a in parser._actions if a.dest == "command").choices
    found = {}
    for name, sub in commands.items():
        for action in sub._actions:
            if action.option_strings and action.metavar in naming:
                found.setdefault(action.dest, set()).add(f"{name} {action.option_strings[0]}")
    missing = {dest: where for dest, where in found.items() if dest not in options.NAMING_OPTIONS}
    assert not missing, missing
    assert {"group", "id", "keep", "weights", "cluster", "strata", "items", "ordinal"} <= set(found)


def test_parsed_names_composed_for_every_command():
    """The parsed arguments of a command (fit's, explore's) read back composed: strings and lists of them."""
    parser = build_parser()
    args = parser.parse_args(["fit", "m.cfa", "--data", "d.csv", "--group-column", typed(SCHOOL), "--id", typed(IDS),
                              "--keep", f"{typed(GRADE)} = 7", "--ordinal", typed(ITEM), "--reference-group",
                              typed(LABEL), "--missing-helpers", typed(AGE), "--rename", f"{typed(AGE)}=age"])
    args = options.composed_names(args)
    assert (args.group, args.id, args.keep, args.ordinal, args.reference_group, args.missing_helpers,
            args.rename) == (SCHOOL, IDS, [f"{GRADE} = 7"], ITEM, LABEL, AGE, [f"{AGE}=age"])
    args = options.composed_names(parser.parse_args(["explore", "--data", "d.csv", "--items", f"x1,x2,{typed(ITEM)}",
                                             "--cluster", typed(CLASS), "--strata", typed(GRADE)]))
    assert (args.items, args.cluster, args.strata) == (f"x1,x2,{ITEM}", CLASS, GRADE)


def _fit(argv, tmp_path, capsys, name: str) -> dict:
    out = tmp_path / f"{name}.json"
    code, _, err = run_cli([*argv, "--json", out], capsys)
    assert code == 0, err
    return json.loads(out.read_text(encoding="utf-8"))


def test_fit_reads_decomposed_names_as_composed(files, capsys):
    """--group-column, --reference-group, --id and --keep typed decomposed: the run of the names typed composed."""
    _, data, tmp_path, model = files

    def options(name):
        return ["--group-column", name(SCHOOL), "--reference-group", name(LABEL), "--id", name(IDS),
                "--keep", f"{name(GRADE)} in 7, 8"]

    given = _fit(["fit", model, "--data", data, *options(typed)], tmp_path, capsys, "typed")
    reference = _fit(["fit", model, "--data", data, *options(str)], tmp_path, capsys, "composed")
    assert given["fit"]["chi_square"] == pytest.approx(reference["fit"]["chi_square"], rel=1e-12)
    assert given["group_column"] == SCHOOL


def test_design_and_helpers_read_decomposed_names(files, capsys):
    """--weights, --cluster, --strata and --missing-helpers typed decomposed: the run of the names typed composed."""
    model, data, tmp_path, _ = files

    def options(name):
        return ["--weights", name(WEIGHT), "--cluster", name(CLASS), "--strata", name(GRADE)]

    given = _fit(["fit", model, "--data", data, *options(typed)], tmp_path, capsys, "typed")
    reference = _fit(["fit", model, "--data", data, *options(str)], tmp_path, capsys, "composed")
    assert given["fit"]["chi_square"] == pytest.approx(reference["fit"]["chi_square"], rel=1e-12)
    helped = _fit(["fit", model, "--data", data, "--missing-helpers", typed(AGE)], tmp_path, capsys, "helped")
    assert helped["fit"]["chi_square"] > 0


def test_explore_items_read_decomposed_names(files, capsys):
    """explore --items typed decomposed explores the column written composed."""
    _, data, tmp_path, _ = files
    out = tmp_path / "explore.json"
    items = ",".join(["x1", "x2", typed(ITEM), "x4", "x5", "x6", "x7", "x8", "x9"])
    code, _, err = run_cli(["explore", "--data", data, "--items", items, "--factors", "3", "--json", out], capsys)
    assert code == 0, err
    assert ITEM in json.dumps(json.loads(out.read_text(encoding="utf-8")), ensure_ascii=False)


def test_missing_code_words_read_decomposed(files, capsys):
    """A word of no answer given with --missing-codes typed decomposed ('Refuse' + U+0301) reads the cells written
    composed as no answer, as the word typed composed does (before: the cells were refused as text among numbers, with
    advice to give the same-looking word)."""
    model, data, tmp_path, _ = files
    frame = holzinger_swineford()
    frame["x3"] = frame["x3"].astype(object)
    frame.loc[[1, 2, 3], "x3"] = "Refusé"
    frame = frame.rename(columns={"x3": ITEM})
    worded = tmp_path / "worded.csv"
    frame.to_csv(worded, encoding="utf-8")
    given = _fit(["fit", model, "--data", worded, "--missing-codes", f"-99,{typed('Refusé')}"], tmp_path, capsys, "w1")
    reference = _fit(["fit", model, "--data", worded, "--missing-codes", "-99,Refusé"], tmp_path, capsys, "w2")
    assert given["fit"]["chi_square"] == pytest.approx(reference["fit"]["chi_square"], rel=1e-12)
    args = options.composed_names(build_parser().parse_args(["fit", "m.cfa", "--data", "d.csv",
                                                             f"--missing-codes=-99,{typed('Refusé')}"]))
    assert args.missing_codes == (-99.0, "Refusé")
