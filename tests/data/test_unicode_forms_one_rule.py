"""One rule of Unicode forms (language.names.composed, NFC of Unicode Standard Annex #15) for every text a model
matches against the data: answer words, the model's names against the columns of a data frame, and the names
--ordinal gives (hostile s22, finding 6: an export in NFD, 'Neutre' + U+0300, was refused against the model's NFC
'Neutrè' though names, group labels and filter values matched; diagram-s22: a data frame's column 'a' + U+0308 ...
could not be named by the model: "unknown variable 'äb̈c̈' ... did you mean 'äb̈c̈'").

The reference for every fit is the same model fitted to the same answers stored as numbers under plain names: the
text in either Unicode form must give that fit exactly.  The data are the invented demo survey.
"""

from __future__ import annotations

import unicodedata

import pytest

import cfa_tool
from cfa_tool.language.spec import answer_key

NFC_WORD, NFD_WORD = unicodedata.normalize("NFC", "Neutrè"), unicodedata.normalize("NFD", "Neutrè")
ITEMS = ["on_time", "short_wait", "accurate_info", "easy_transfer"]
PLAIN = "factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
NAME = "äb\u0308c\u0308"  # 'a' + U+0308 composes to U+00E4; 'b' and 'c' + U+0308 have no composed letter


def test_answer_words_in_either_form_are_one_word():
    assert NFC_WORD != NFD_WORD
    assert answer_key(NFD_WORD) == answer_key(NFC_WORD) == answer_key(f"  {NFC_WORD.upper()} ")


@pytest.mark.parametrize("model_form, data_form", [("NFC", "NFD"), ("NFD", "NFC")])
def test_a_file_of_words_in_the_other_form_fits_as_its_numbers(rider_demo, model_form, data_form):
    words = {1: "Strongly disagree", 2: "Disagree", 3: "Neutrè", 4: "Agree", 5: "Strongly agree"}
    in_data = {k: unicodedata.normalize(data_form, w) for k, w in words.items()}
    frame = rider_demo.copy()
    for x in ITEMS:
        frame[x] = frame[x].map(lambda v: in_data.get(v) if v == v else None).astype(object)
    statement = "answers " + ", ".join(f'"{unicodedata.normalize(model_form, w)}" = {k}' for k, w in words.items())
    worded = cfa_tool.fit(PLAIN + statement + " for " + ", ".join(ITEMS) + "\n", frame)
    numbers = cfa_tool.fit(PLAIN, rider_demo)
    assert worded.n_obs == numbers.n_obs
    assert worded.fit.chi_square == pytest.approx(numbers.fit.chi_square, rel=1e-10)


@pytest.mark.parametrize("column_form, model_form", [("NFD", "NFC"), ("NFC", "NFD"), ("NFD", "NFD")])
def test_a_data_frame_column_in_either_form_is_the_models_name(rider_demo, column_form, model_form):
    column = unicodedata.normalize(column_form, NAME)
    frame = rider_demo.rename(columns={"on_time": column})
    model = PLAIN.replace("on_time", f'"{unicodedata.normalize(model_form, NAME)}"')
    named = cfa_tool.fit(model, frame, ordinal=[unicodedata.normalize(column_form, NAME), *ITEMS[1:]])
    plain = cfa_tool.fit(PLAIN, rider_demo, ordinal=ITEMS)
    assert named.fit.chi_square == pytest.approx(plain.fit.chi_square, rel=1e-10)
    assert NAME in named.data.variables
