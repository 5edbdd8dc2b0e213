"""scores --from-fit takes the model file the fit was made with, compared as a parsed model (hostile trial 11: a file
that added 'ordinal on_time, short_wait', or 'bound variance(clean) >= 0.9' where the fit's estimate was 0.373, was
scored with the fit's continuous, unbounded estimates without a word); and a fit of an exploratory block is refused
for the reason scores without a saved fit give (it was called 'of another model').

Check values: the Holzinger & Swineford (1939) three-factor model (tests/datasets); what each edited statement
changes is the model language's own definition (DEVELOPERS.md): 'ordinal' makes items ordinal, 'bound' bounds an
estimate, the first item of a factor is its marker; comments, the order of statements and the title change nothing.
"""

from __future__ import annotations

import pytest

from cfa_tool.cli import main
from tests.conftest import DATASETS, THREE_FACTORS, run_cli

HS_FILE = DATASETS / "holzinger_swineford_1939.csv"  # Holzinger & Swineford (1939)


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fitted")
    model = folder / "hs.cfa"
    model.write_text(THREE_FACTORS)
    result = folder / "fit.json"
    assert main(["fit", str(model), "--data", str(HS_FILE), "--json", str(result)]) == 0
    return result


CHANGED = [
    # (the model text scored with the fit, the words of the refusal)
    (THREE_FACTORS + "ordinal x1, x2\n", "its line 6 ('ordinal x1, x2') is not in the fitted model"),
    (THREE_FACTORS + "bound variance(x3) >= 0.9\n", "its line 6 ('bound variance(x3) >= 0.9') is not in the fitted model"),
    (THREE_FACTORS + "covary x1, x4\n", "its line 6 ('covary x1, x4') is not in the fitted model"),
    (THREE_FACTORS.replace("factor speed: x7, x8, x9\n", "factor speed: x8, x7, x9\n"),  # another marker
     "its line 5 ('factor speed: x8, x7, x9') is not in the fitted model"),
    (THREE_FACTORS.replace("factor speed: x7, x8, x9\n", "factor speed: x7, x8, x9\n\n\nfix loading(speed, x9) = 1\n"),
     "its line 8 ('fix loading(speed, x9) = 1') is not in the fitted model"),
]


@pytest.mark.parametrize("text, words", CHANGED)
def test_a_model_file_that_changes_the_fitted_model_is_refused_naming_the_line(tmp_path, capsys, fitted, text, words):
    model = tmp_path / "changed.cfa"
    model.write_text(text)
    out = tmp_path / "scores.csv"
    code, _, err = run_cli(["scores", model, "--data", HS_FILE, "--from-fit", fitted, "--output", out], capsys)
    assert code == 2 and err.count("\n") == 1 and not out.exists(), err
    assert f"the model file {model} is not the model '{fitted}' was fitted with ({words})" in err


def test_a_statement_the_model_file_drops_is_named_by_the_fitted_model_s_line(tmp_path, capsys):
    model = tmp_path / "hs.cfa"
    model.write_text(THREE_FACTORS + "covary x7, x9\n")
    fitted = tmp_path / "fit.json"
    assert run_cli(["fit", model, "--data", HS_FILE, "--json", fitted], capsys)[0] == 0
    plain = tmp_path / "plain.cfa"
    plain.write_text(THREE_FACTORS)
    code, _, err = run_cli(["scores", plain, "--data", HS_FILE, "--from-fit", fitted, "--output", tmp_path / "s.csv"], capsys)
    assert code == 2 and "it lacks the fitted model's line 6 ('covary x7, x9')" in err, err


def test_comments_order_title_and_start_values_do_not_count(tmp_path, capsys, fitted):
    model = tmp_path / "same.cfa"
    model.write_text('# the same model, written otherwise\nname "another title"\nfactor speed: x7, x8, x9\n'
                     "factor textual: x4, x5, x6  # reading\nfactor visual: x1, x2, x3\nstart loading(visual, x2) = 0.5\n")
    out = tmp_path / "scores.csv"
    code, _, err = run_cli(["scores", model, "--data", HS_FILE, "--from-fit", fitted, "--output", out], capsys)
    assert code == 0 and out.exists(), err


def test_a_fit_of_an_exploratory_block_is_refused_for_that_reason(tmp_path, capsys):
    model = tmp_path / "es.cfa"
    model.write_text("exploratory factors f1, f2, f3 from x1, x2, x3, x4, x5, x6, x7, x8, x9 rotated by geomin\n")
    fitted = tmp_path / "es.json"
    assert run_cli(["fit", model, "--data", HS_FILE, "--json", fitted], capsys)[0] == 0
    out = tmp_path / "scores.csv"
    code, _, err = run_cli(["scores", model, "--data", HS_FILE, "--from-fit", fitted, "--output", out], capsys)
    assert code == 2 and not out.exists()
    assert "'scores' is not available for a model with an exploratory block" in err, err
    assert "another model" not in err
