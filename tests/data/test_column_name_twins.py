"""Two columns whose names differ only by what cannot be seen are refused by one rule (data.matching.refuse_name_twins,
the label rule of data.labels.label_text), in files and data frames alike (hostile trial s17, finding 5): before,
'clean' beside U+200B 'clean' was fitted with the exact match and no word, while twins differing by a trailing space
or by Unicode form were refused.  The data are the bundled demo (a fictional transit agency's rider survey); the twin
holds the answers reversed, so taking either column silently would change the result."""

from __future__ import annotations

import unicodedata

import pandas as pd
import pytest

import cfa_tool
from cfa_tool.cli import main
from cfa_tool.errors import OptionError
from cfa_tool.resources import resource_dir

MODEL = resource_dir("models") / "rider_three_factors.cfa"


@pytest.fixture(scope="module")
def rider() -> pd.DataFrame:
    return pd.read_csv(resource_dir("demo") / "rider_survey.csv")


@pytest.mark.parametrize("twin, shown", [("\u200bclean", "U+200B ZERO WIDTH SPACE"), ("clean\u00ad", "U+00AD SOFT HYPHEN"),
                                         ("\ufeffclean", "U+FEFF ZERO WIDTH NO-BREAK SPACE"), ("clean ", "")])
def test_a_data_frame_with_an_invisible_twin_is_refused(rider, twin, shown):
    data = rider.assign(**{twin: 6 - rider["clean"]})
    with pytest.raises(OptionError) as refused:
        cfa_tool.fit(MODEL.read_text(), data)
    assert "look the same" in str(refused.value) and shown in str(refused.value)


def test_a_file_with_a_zero_width_twin_is_refused_in_one_line(rider, tmp_path, capsys):
    rider.assign(**{"\u200bclean": 6 - rider["clean"]}).to_csv(tmp_path / "zw.csv", index=False)
    code = main(["fit", str(MODEL), "--data", str(tmp_path / "zw.csv")])
    err = capsys.readouterr().err
    assert code == 2 and len(err.strip().splitlines()) == 1
    assert "'clean'" in err and "U+200B ZERO WIDTH SPACE" in err


def test_twins_in_another_unicode_form_are_still_refused(tmp_path, capsys):
    composed = unicodedata.normalize("NFC", "température")
    decomposed = unicodedata.normalize("NFD", "température")
    (tmp_path / "t.csv").write_text(f"a,b,{composed},{decomposed}\n1,2,3,4\n2,3,4,5\n", encoding="utf-8")
    (tmp_path / "m.cfa").write_text("factor f: a, b, \"température\"\n", encoding="utf-8")
    assert main(["fit", str(tmp_path / "m.cfa"), "--data", str(tmp_path / "t.csv")]) == 2
    assert "appears more than once" in capsys.readouterr().err
