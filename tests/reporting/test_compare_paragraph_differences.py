"""compare's methods paragraph says a model after the first by what differs from the earlier model nearest it (the
one it shares most of its description with): what it adds in full, what it leaves out named, and that nothing else
differs, so that two longitudinal models of many items take a paragraph of a manuscript's size (new-user trial s25:
about 1,000 words for two models of 18 items, each model's lists of items and statements said again).  Nothing is
lost: every part of each model's description is said once, of the model itself or of the model it is said against.
The data: an invented population of three factors measured on two occasions (loadings .7), simulated with a seed."""

from __future__ import annotations

import numpy as np
import pytest

from cfa_tool.reporting.paragraph import _model_pieces, comparison_paragraph
from cfa_tool.workflows.compare import compare
from tests.conftest import simulate_cfa

TRAITS = ("vigour", "dedication", "absorption")
ITEMS = {(t, w): [f"{t[:3]}{i}_t{w}" for i in (1, 2, 3)] for t in TRAITS for w in (1, 2)}
BASE = "".join(f"factor {t}{w}: {', '.join(ITEMS[t, w])}\n" for t in TRAITS for w in (1, 2)) + "".join(
    f"covary {a}, {b}\n" for t in TRAITS for a, b in zip(ITEMS[t, 1], ITEMS[t, 2]))
EQUAL = BASE + "".join(f"equal loading({t}1, {a}), loading({t}2, {b})\n" for t in TRAITS
                       for a, b in list(zip(ITEMS[t, 1], ITEMS[t, 2]))[1:])
# the first model without two of its residual covariances, with one of its own and a factor's variance fixed
OTHER = (BASE.replace("covary abs2_t1, abs2_t2\n", "").replace("covary abs3_t1, abs3_t2\n", "")
         + "covary vig1_t1, ded1_t1\nfix variance(vigour1) = 1\n")


@pytest.fixture(scope="module")
def data():
    names = [x for t in TRAITS for w in (1, 2) for x in ITEMS[t, w]]
    L = np.zeros((18, 6))
    for k in range(6):
        L[3 * k:3 * k + 3, k] = .7
    phi = np.full((6, 6), .4) + np.eye(6) * .6
    frame = simulate_cfa(L, phi, np.diag(np.full(18, .51)), 600, 11)
    frame.columns = names
    return frame


def _named(name: str, model: str) -> str:
    return f'name "{name}"\n' + model


def _words(text: str) -> int:
    return len(text.split())


def test_a_model_is_said_by_what_differs_from_the_first(data):
    comparison = compare([_named("free", BASE), _named("equal", EQUAL), _named("other", OTHER)], data)
    text = comparison_paragraph(comparison)
    # Model 1 in full, once: its nine residual covariances are listed once in the whole paragraph
    assert text.count("vig2_t1 with vig2_t2") == 1 and "Model 1 (free) also included nine residual covariances" in text
    assert text.count("had 18 indicators of six correlated factors") == 1
    # Model 2: the equal loadings, its one difference from Model 1
    assert ("Model 2 (equal) was specified as Model 1 except as follows. In Model 2, the loadings were constrained to "
            "be equal within each of six pairs (vig2_t1 on vigour1 and vig2_t2 on vigour2;") in text
    # Model 3: what it adds and what it leaves out of Model 1, its nearest earlier model
    assert "Model 3 (other) was specified as Model 1 except as follows." in text
    assert "Model 3 also included one residual covariance (vig1_t1 with ded1_t1)." in text
    assert ("Model 3 did not include Model 1's two residual covariances (abs2_t1 with abs2_t2 and abs3_t1 with "
            "abs3_t2).") in text
    assert "the variance of factor vigour1 was fixed at 1" in text
    # nothing lost: every piece of every model is said, of itself or of the model it is said against
    for result in comparison.results:
        for kind, words in _model_pieces(result):
            if kind not in ("cross-loading", "residual covariance", "disturbance covariance"):
                core = words.split(", ", 1)[-1] if words.startswith("In ") else words.split(" ", 1)[1]
                assert core.rstrip(".")[-60:] in text, words


def test_the_paragraph_of_two_longitudinal_models_is_of_manuscript_size(data):
    text = comparison_paragraph(compare([_named("free", BASE), _named("equal", EQUAL)], data))
    described = text[text.index("Model 1 (free)"):text.index("Fit:")]
    # the models' description: Model 1 in full (88 words here) and Model 2 by its one difference (about 60 words), 151
    # words; with each model said in full (as before) it was 230 words, and it grows with the items each model lists
    assert _words(described) < 180 and described.count("vig2_t1 with vig2_t2") == 1


def test_what_a_model_leaves_out_is_named(data):
    """Model 2 without Model 1's 'reversed' statement: its scale sentence differs too, and the declaration it leaves
    out is said, not taken to hold for it as well."""
    keyed = BASE + "reversed vig3_t1, vig3_t2 on -10 to 10\n"  # the simulated values lie well within
    flipped = data.assign(vig3_t1=-data["vig3_t1"], vig3_t2=-data["vig3_t2"])
    text = comparison_paragraph(compare([_named("keyed", keyed), _named("plain", BASE)], flipped))
    later = text[text.index("Model 2 (plain)"):text.index("Fit:")]
    assert later.startswith("Model 2 (plain) was specified as Model 1 except as follows. Model 2 left out these parts "
                            "of Model 1: the items vig3_t1 and vig3_t2 were declared reverse-keyed")
    assert "; no answer of the items it covers reached" in later
