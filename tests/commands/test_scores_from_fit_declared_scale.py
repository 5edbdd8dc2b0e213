"""Scores of other data with an earlier fit read the model's declared scale before the fitted rows' answers
(new-user trial s25, finding 6).

Wave 2 of an engagement-style survey scored with the wave-1 fit: an answer 0 ('Never') of an item the model declares on
0 to 6 ('reversed ... on 0 to 6' over its factor, or 'answers "Never" = 0, ..., "Always" = 6') was called 'outside
1 to 6', the fitted rows' range, with the advice to check the files' coding.  Invented data (a fictional transit
agency's riders), simulated with a fixed seed; the answers planted are counted below.
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd

from cfa_tool.cli import main

WORDS = ("Never", "Almost never", "Rarely", "Sometimes", "Often", "Very often", "Always")
ANSWERS = ("answers " + ", ".join(f'"{w}" = {k}' for k, w in enumerate(WORDS)) + " for info, punctual, driver\n")


def _waves(seed: int = 11) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Two waves of 0-6 answers; the first has no 0 for 'clean' nor 'info', the second one 0 of each (planted)."""
    rng = np.random.default_rng(seed)

    def wave(n):
        traits = rng.multivariate_normal([0, 0], [[1, .4], [.4, 1]], size=n)
        raw = .8 * traits[:, [0, 0, 0, 1, 1, 1]] + rng.normal(0, .6, (n, 6))
        coded = np.clip(np.round(raw * 1.2 + 3.5), 1, 6)  # answers 1 to 6 only
        return pd.DataFrame(coded, columns=["seat", "clean", "quiet", "driver", "info", "punctual"]).astype(int)

    first, second = wave(300), wave(200)
    second.loc[0, "clean"] = 0
    second.loc[1, "info"] = 0
    return first, second


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out, out.err


def _said(tmp_path, capsys, model, first, second) -> str:
    model_file, fitted, js = tmp_path / "m.cfa", tmp_path / "fit.json", tmp_path / "s.json"
    model_file.write_text(model)
    first.to_csv(tmp_path / "w1.csv", index=False)
    second.to_csv(tmp_path / "w2.csv", index=False)
    assert _run(["fit", model_file, "--data", tmp_path / "w1.csv", "--json", fitted], capsys)[0] == 0
    code, _, err = _run(["scores", model_file, "--data", tmp_path / "w2.csv", "--from-fit", fitted, "--output",
                         tmp_path / "s.csv", "--json", js], capsys)
    assert code == 0, err
    said = " ".join(p["explanation"] for p in json.loads(js.read_text())["problems"]
                    if p["kind"] == "answers beyond the fitted rows")
    for path in (fitted, js, tmp_path / "s.csv"):
        path.unlink()
    return said


def test_an_answer_on_the_declared_scale_is_not_outside(tmp_path, capsys):
    first, second = _waves()
    assert first["clean"].min() == 1 and first["info"].min() == 1  # the fitted rows gave no 0
    plain = "factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n"
    # no scale declared: the fitted rows' range is all there is, and 0 lies outside it (as before)
    said = _said(tmp_path, capsys, plain, first, second)
    assert "'clean', 1 answer outside 1 to 6" in said and "'info', 1 answer outside 1 to 6" in said
    # 'reversed quiet on 0 to 6' declares the scale of comfort's items (its partners, data.matching.declared_scales)
    keyed = plain + "reversed quiet on 0 to 6\n"
    keyed_first, keyed_second = first.assign(quiet=6 - first["quiet"]), second.assign(quiet=6 - second["quiet"])
    said = _said(tmp_path, capsys, keyed, keyed_first, keyed_second)
    assert "'clean'" not in said and "'info', 1 answer outside 1 to 6" in said
    # service's items recorded as words with an 'answers' statement of codes 0 to 6: 'Never' is on the scale
    worded = [c.map(dict(enumerate(WORDS))) if c.name in ("driver", "info", "punctual") else c
              for _, c in keyed_second.items()]
    said = _said(tmp_path, capsys, keyed + ANSWERS, keyed_first.assign(
        **{c: keyed_first[c].map(dict(enumerate(WORDS))) for c in ("driver", "info", "punctual")}),
        pd.concat(worded, axis=1))
    assert said == ""


def test_an_answer_on_the_scale_the_fits_labels_declare_is_not_outside(tmp_path, capsys):
    """The fit's data an SPSS file whose value labels declare 0 'Never' to 6 'Always' (and 9 'No answer', which says
    no answer and is no part of the scale): the saved fit records each item's labelled scale and scoring a plain CSV
    of the next wave reads it back, so its 0 answers are on the scale (new-user trial s25, finding 4: the saved fit did
    not record the labels' scale, and 0 was called outside 1 to 6); an answer 7, beyond every label, still is."""
    import pyreadstat

    first, second = _waves()
    second.loc[2, "seat"] = 7
    labels = {**{float(k): w for k, w in enumerate(WORDS)}, 9.0: "No answer"}
    pyreadstat.write_sav(first.astype(float), str(tmp_path / "w1.sav"),
                         variable_value_labels={c: labels for c in ("clean", "info", "seat")})
    model_file, fitted, js = tmp_path / "m.cfa", tmp_path / "fit.json", tmp_path / "s.json"
    model_file.write_text("factor comfort: seat, clean, quiet\nfactor service: driver, info, punctual\n")
    second.to_csv(tmp_path / "w2.csv", index=False)
    assert _run(["fit", model_file, "--data", tmp_path / "w1.sav", "--json", fitted], capsys)[0] == 0
    saved = json.loads(fitted.read_text())["data"]["answer_scales_labelled_by_the_file"]
    assert saved == {"seat": [0.0, 6.0], "clean": [0.0, 6.0], "info": [0.0, 6.0]}  # the labels written above
    code, _, err = _run(["scores", model_file, "--data", tmp_path / "w2.csv", "--from-fit", fitted, "--output",
                         tmp_path / "s.csv", "--json", js], capsys)
    assert code == 0, err
    said = " ".join(p["explanation"] for p in json.loads(js.read_text())["problems"]
                    if p["kind"] == "answers beyond the fitted rows")
    assert "'clean'" not in said and "'info'" not in said  # the planted 0s, on the labelled scale
    assert "'seat', 1 answer outside 0 to 6" in said  # the planted 7, beyond it
