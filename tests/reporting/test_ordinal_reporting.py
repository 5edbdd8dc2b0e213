"""What an ordinal fit's report says: the printed correction reproduces the printed statistic, the SRMR is over
the off-diagonal correlations, the first step's thresholds are shown, the robust indices name their definition.
Check values come from scipy's normal distribution and from the formulas written out here."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

import cfa_tool
from cfa_tool.reporting import tables as T
from cfa_tool.workflows.simulation import simulate

MODEL = "factor a: y1, y2, y3, y4\nfactor b: y5, y6, y7, y8\n"


@pytest.fixture(scope="module")
def ordinal_fit():
    data = simulate(MODEL, 800, seed=3, categories=4).frame
    return cfa_tool.fit(MODEL, data, ordinal="all"), data


def test_scale_and_shift_reproduce_the_statistic(ordinal_fit):
    result, _ = ordinal_fit
    r = result.robust
    assert result.fit.chi_square * r.scale + r.shift == pytest.approx(r.chi_square_scaled, rel=1e-12)
    out = result.to_dict()["robust"]
    assert out["scale"] == pytest.approx(r.scale) and out["shift"] == pytest.approx(r.shift)
    row = next(row for row in T.fit_table(result).rows if row[0].strip() == "scale and shift")
    assert row[1] == f"{r.scale:.3f} and {r.shift:.3f}"
    assert "adjusted statistics of the model and of the baseline" in T.fit_table(result).note


def test_ordinal_srmr_is_over_the_off_diagonal_correlations(ordinal_fit):
    result, _ = ordinal_fit
    resid = result.groups[0].residual_correlations
    below = resid[np.tril_indices(len(resid), -1)]
    assert result.fit.srmr == pytest.approx(np.sqrt(np.mean(below ** 2)), rel=1e-12)


def test_first_step_thresholds_are_reported(ordinal_fit):
    result, data = ordinal_fit
    rows = {r.variables: r for r in result.estimates if r.kind == "threshold"}
    n = len(data)
    for item in ("y1", "y8"):
        shares = np.cumsum(data[item].value_counts(normalize=True).sort_index().to_numpy())[:-1]
        for step, share in enumerate(shares, start=1):
            row = rows[(item, str(step))]
            t = stats.norm.ppf(share)
            assert row.estimate == pytest.approx(t, abs=1e-10)
            # delta method: var(t) = P(1 - P) / (N phi(t)^2)
            assert row.se == pytest.approx(np.sqrt(share * (1 - share) / n) / stats.norm.pdf(t), rel=1e-6)
    titles = [t.title for t in T.estimate_tables(result)]
    assert any(title.startswith("Thresholds of ordinal items") for title in titles)


def test_continuous_robust_indices_name_their_definition(hs_data):
    result = cfa_tool.fit("factor visual: x1, x2, x3\nfactor textual: x4, x5, x6\nfactor speed: x7, x8, x9\n", hs_data,
                          test="satorra-bentler")
    note = T.fit_table(result).note
    assert "Brosseau-Liard, Savalei & Li (2012)" in note
    row = next(row for row in T.fit_table(result).rows if row[0].strip() == "scaling factor")
    assert float(row[1]) == pytest.approx(result.fit.chi_square / result.robust.chi_square_scaled, abs=5e-4)


def test_category_frequencies_of_ordinal_items(ordinal_fit):
    result, data = ordinal_fit
    table = T.category_table(result)
    counts = data["y3"].value_counts().sort_index()
    row = next(r for r in table.rows if r[0] == "y3")
    # the columns are the answer codes themselves (new-user trial U3: positions put one item's 0 under another's 1)
    codes = [f"{v:g}" for v in counts.index]
    assert list(table.columns[1:]) == codes
    assert list(row[1:]) == [f"{c} ({100 * c / len(data):.0f}%)" for c in counts]
    out = result.to_dict()["data"]["category_counts"]["y3"]
    assert [(c["value"], c["rows"]) for c in out] == [(float(v), int(c)) for v, c in counts.items()]


def test_weighted_descriptives_say_what_is_weighted():
    """With sampling weights the items' means and SDs are weighted (checked with numpy's weighted average), the
    answer counts are rows counted once; the tables' notes say which is which."""
    import pandas as pd

    rng = np.random.default_rng(1)
    f = rng.normal(size=400)
    answers = np.clip(np.round(3 + f[:, None] * 0.8 + rng.normal(size=(400, 4))), 1, 5)
    data = pd.DataFrame(answers, columns=list("abcd")).assign(w=np.where(answers[:, 0] > 3, 5.0, 1.0))
    result = cfa_tool.fit("factor f: a, b, c, d\n", data, weights="w", ordinal="all")
    items = T.item_table(result)
    assert result.groups[0].data.means[0] == pytest.approx(np.average(answers[:, 0], weights=data["w"]), rel=1e-12)
    assert "Mean and SD weighted by w" in items.note
    counts = T.category_table(result)
    assert counts.values[0][1] == int((answers[:, 0] == 1).sum())  # item a, answer 1: rows, unweighted
    assert "counted once each, unweighted" in counts.note
    plain = cfa_tool.fit("factor f: a, b, c, d\n", data.drop(columns="w"), ordinal="all")
    assert "weighted" not in T.item_table(plain).note and "weighted" not in T.category_table(plain).note


def test_the_json_names_the_pieces_of_the_scale_shifted_statistic_and_older_files_still_report(ordinal_fit, tmp_path,
                                                                                              capsys):
    import json
    import shutil
    from pathlib import Path

    from cfa_tool.cli import main

    result, _ = ordinal_fit
    out = result.to_dict()["robust"]
    # statistic = scale x chi-square + shift (Asparouhov & Muthén 2010): the pieces, and the mean-adjusted scaling
    # tr(U Gamma) / df under its own name, not as a scaling factor of this statistic
    assert result.fit.chi_square * out["scale"] + out["shift"] == pytest.approx(out["chi_square_scaled"], rel=1e-12)
    assert "scaling_factor" not in out and "baseline_scaling_factor" not in out
    assert out["mean_adjusted_scaling"] == pytest.approx(result.robust.scaling_factor)
    # a result saved with the previous layout (scaling_factor and baseline_scaling_factor keys) still reports
    old = Path(__file__).parents[1] / "commands" / "bad_inputs" / "data" / "ordinal_fit.json"
    saved = json.loads(old.read_text())
    assert "scaling_factor" in saved["robust"] and "baseline_scaling_factor" in saved["robust"]
    copy = tmp_path / "old.json"
    shutil.copy(old, copy)
    code = main(["report", str(copy), "--markdown", str(tmp_path / "old.md")])
    capsys.readouterr()
    shown = (tmp_path / "old.md").read_text()
    assert code == 0 and all(f"**{t['title']}**" in shown for t in saved["report"]["tables"] if "_" not in t["title"])
    assert "Scaled chi-square" in shown
    assert copy.read_bytes() == old.read_bytes()  # the saved file left as it was


def test_answer_columns_are_codes_and_a_category_of_one_answer_is_named():
    """One item answered 0 once (outside the others' 1 to 5): its count stands under the column '0', not under
    another item's 1, and the note says its threshold rests on one answer (counts by hand below)."""
    import pandas as pd

    rng = np.random.default_rng(7)
    f = rng.normal(size=300)
    answers = np.clip(np.round(3 + f[:, None] * 0.8 + rng.normal(size=(300, 4)) * 0.8), 1, 5)
    answers[12, 1] = 0
    data = pd.DataFrame(answers, columns=list("abcd"))
    table = T.category_table(cfa_tool.fit("factor f: a, b, c, d\n", data, ordinal="all"))
    assert list(table.columns[1:]) == ["0", "1", "2", "3", "4", "5"]
    row_a, row_b = table.values[0], table.values[1]
    assert row_a[1] is None and row_b[1] == 1  # a never answered 0; b once
    assert list(row_b[2:]) == [int((answers[:, 1] == v).sum()) or None for v in (1, 2, 3, 4, 5)]
    # a category of one answer: marked 'few' (fewer than 5 rows, the project's rule of thumb) and named in the note
    assert table.rows[1][1] == "1 (0%) few" and "unstable (b 0 (1 row))" in table.note
    # and it comes first, among the fit's warnings, naming the table where it is marked (in every view by its name)
    from cfa_tool.reporting.fit_document import fit_report

    fitted = cfa_tool.fit("factor f: a, b, c, d\n", data, ordinal="all")
    (few,) = [w for w in fit_report(fitted).warnings if "given by few rows" in str(w)]
    assert "b 0 (1 row)" in str(few) and any(getattr(p, "key", None) == "categories" for p in few.parts)
    assert not any("given by few rows" in str(w) for w in fit_report(
        cfa_tool.fit("factor f: a, b, c, d\n", data.replace(0.0, 1.0), ordinal="all")).warnings)
    assert 1 in table.flagged
