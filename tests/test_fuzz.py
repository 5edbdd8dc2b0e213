"""Property-based fuzzing: generated and mutated model texts, and random data, must only
ever produce results or the tool's own errors, never another exception.

Each run of the suite parses 1000 generated and 1000 mutated model texts (drawing them is most of
the time: 97% of it, measured on 500 texts, the parse 3%), drawn from a seed that changes every day (the UTC
date, YYYYMMDD), so that three days cover as many texts as the 3000 of one fixed corpus did, and new
ones after that; a failure prints the text that fails, and CFA_FUZZ_SEED=YYYYMMDD repeats that day's
draws.  The long run in DEVELOPERS.md sets CFA_FUZZ_EXAMPLES=100000: that many texts of each kind,
derandomized (the same corpus every time), as before.
"""

from __future__ import annotations

import os
import string
from datetime import datetime, timezone

import numpy as np
import pandas as pd
from hypothesis import HealthCheck, given, seed, settings
from hypothesis import strategies as st

import cfa_tool
from cfa_tool.errors import CfaError
from cfa_tool.language import parse_model

EXAMPLES = int(os.environ.get("CFA_FUZZ_EXAMPLES", "3000"))
FIT_EXAMPLES = max(50, EXAMPLES // 20)
SETTINGS = dict(deadline=None, derandomize=True, suppress_health_check=list(HealthCheck))
#: the model texts of a run: the long run's count, derandomized; else 1000 of each kind from the day's seed
LONG_RUN = "CFA_FUZZ_EXAMPLES" in os.environ
TEXT_EXAMPLES = EXAMPLES if LONG_RUN else 1000
DAY_SEED = int(os.environ.get("CFA_FUZZ_SEED", datetime.now(timezone.utc).strftime("%Y%m%d")))
TEXT_SETTINGS = SETTINGS if LONG_RUN else dict(SETTINGS, derandomize=False, database=None)


def _texts_seed(test):
    """The day's seed on a text test of an ordinary run (none on the long run's derandomized draws)."""
    return test if LONG_RUN else seed(DAY_SEED)(test)

NAMES = ["f", "g", "h", "q1", "q2", "q3", "q4", "q5", "q6", "x", "item1", "_a", "loading", "factor"]
KINDS = ["loading", "variance", "covariance", "intercept", "mean", "threshold", "loadng"]
names = st.sampled_from(NAMES) | st.text(alphabet=string.ascii_letters + string.digits + "_", min_size=1, max_size=6)
quoted = st.text(alphabet=st.characters(blacklist_characters='"\n\r'), max_size=8).map(lambda s: f'"{s}"')
name_item = names | quoted | st.tuples(names, st.integers(0, 12), st.integers(0, 12)).map(lambda t: f"{t[0]}{t[1]}..{t[0]}{t[2]}")
name_list = st.lists(name_item, min_size=0, max_size=5).map(", ".join)
number = st.one_of(st.integers(-5, 5).map(str), st.floats(allow_nan=False, allow_infinity=False, width=32).map(repr),
                   st.sampled_from(["1e308", "-0", "1e-320", "nan", ".5"]))
ref = st.tuples(st.sampled_from(KINDS), st.lists(names, min_size=0, max_size=3)).map(lambda t: f"{t[0]}({', '.join(t[1])})")
refs = st.lists(ref, min_size=1, max_size=3).map(", ".join)
statement = st.one_of(
    st.tuples(names, name_list).map(lambda t: f"factor {t[0]}: {t[1]}"),
    name_list.map(lambda s: f"covary {s}"),
    name_list.map(lambda s: f"uncorrelated {s}"),
    st.tuples(refs, number).map(lambda t: f"fix {t[0]} = {t[1]}"),
    refs.map(lambda s: f"free {s}"),
    refs.map(lambda s: f"equal {s}"),
    st.tuples(refs, number).map(lambda t: f"start {t[0]} = {t[1]}"),
    st.tuples(refs, st.sampled_from([">=", "<=", "=>", "<"]), number).map(lambda t: f"bound {t[0]} {t[1]} {t[2]}"),
    st.tuples(st.sampled_from(["latent", "f", "f, g"]), st.sampled_from(["marker", "variance", "effects", "magic"])).map(
        lambda t: f"scale {t[0]} by {t[1]}"),
    st.tuples(names, refs, number).map(lambda t: f"in group {t[0]}: fix {t[1]} = {t[2]}"),
    name_list.map(lambda s: f"invariant {s}"),  # the form of earlier versions: an error showing the new one
    st.sampled_from(["configural", "thresholds", "metric", "scalar", "strict", "scalr", "f"]).map(
        lambda s: f"invariance {s}"),
    st.lists(st.sampled_from(["loadings", "error variances", "factor means", "factor covariances", "means", "error"]),
             min_size=1, max_size=3).map(lambda s: f"equal across groups: {', '.join(s)}"),
    refs.map(lambda s: f"noninvariant {s}"),
    quoted.map(lambda s: f"name {s}"),
    name_list.map(lambda s: f"ordinal {s}"),
    st.tuples(name_list, number, number).map(lambda t: f"reversed {t[0]} on {t[1]} to {t[2]}"),
    st.text(max_size=20),
)
model_text = st.lists(statement, min_size=0, max_size=8).map("\n".join)


@st.composite
def mutated(draw):
    text = draw(model_text)
    for _ in range(draw(st.integers(0, 3))):
        if not text:
            break
        position = draw(st.integers(0, len(text)))
        action = draw(st.sampled_from(["insert", "delete", "duplicate"]))
        if action == "insert":
            text = text[:position] + draw(st.text(max_size=4)) + text[position:]
        elif action == "delete":
            text = text[:position] + text[position + draw(st.integers(1, 5)):]
        else:
            text = text[:position] + text[position:] + text[position:]
    return text


def _parse(text: str) -> None:
    try:
        parse_model(text, "fuzz.cfa")
    except CfaError:
        pass


@_texts_seed
@settings(max_examples=TEXT_EXAMPLES, **TEXT_SETTINGS)
@given(model_text)
def test_generated_model_texts(text):
    _parse(text)


@_texts_seed
@settings(max_examples=TEXT_EXAMPLES, **TEXT_SETTINGS)
@given(mutated())
def test_mutated_model_texts(text):
    _parse(text)


cells = st.one_of(st.floats(allow_nan=True, allow_infinity=True, width=32), st.integers(-3, 3), st.sampled_from(["", "x", "1,5"]))


@st.composite
def data_frames(draw):
    n = draw(st.integers(0, 40))
    columns = draw(st.lists(st.sampled_from(["q1", "q2", "q3", "q4", "q5", "q6", "site"]), min_size=1, max_size=7, unique=True))
    rng = np.random.default_rng(draw(st.integers(0, 2**16)))
    frame = pd.DataFrame(rng.normal(size=(n, len(columns))) + rng.normal(size=(n, 1)), columns=columns).astype(object)
    for _ in range(draw(st.integers(0, 4))):
        if n:
            frame.iat[draw(st.integers(0, n - 1)), draw(st.integers(0, len(columns) - 1))] = draw(cells)
    return frame


valid_models = st.sampled_from([
    "factor f: q1, q2, q3\n",
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\n",
    "factor f: q1..q6\nscale latent by variance\n",
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nfactor h: f, g\nequal loading(h, f), loading(h, g)\n",
    "factor f: q1, q2, q3\nfactor g: q3, q4, q5, q6\ncovary q1, q2\nbound variance(q1) >= 0\n",
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nreversed q1, q5 on -4 to 4\n",
])


@settings(max_examples=FIT_EXAMPLES, **SETTINGS)
@given(valid_models, data_frames(), st.sampled_from([{}, {"missing": "full-information"}, {"test": "satorra-bentler"},
                                                     {"group": "site"}, {"information": "observed"}, {"ordinal": "all"}]))
def test_fits_of_random_data(model, frame, options):
    try:
        cfa_tool.fit(model, frame, **options)
    except CfaError:
        pass


@st.composite
def ordinal_frames(draw):
    """Small-integer answers (2 to 5 categories), a group column of one to three labels, and a few odd cells."""
    n = draw(st.integers(0, 80))
    rng = np.random.default_rng(draw(st.integers(0, 2**16)))
    k = draw(st.integers(2, 5))
    latent = rng.normal(size=(n, 1))
    answers = np.clip(np.round(latent + rng.normal(size=(n, 6)) + (k + 1) / 2), 1, k).astype(int)
    frame = pd.DataFrame(answers, columns=["q1", "q2", "q3", "q4", "q5", "q6"]).astype(object)
    frame["site"] = rng.choice(["a", "b", "c"][: draw(st.integers(1, 3))], size=n) if n else []
    for _ in range(draw(st.integers(0, 3))):
        if n:
            frame.iat[draw(st.integers(0, n - 1)), draw(st.integers(0, 5))] = draw(st.sampled_from([np.nan, "x", 7, 1]))
    return frame


ordinal_models = st.sampled_from([
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nordinal q1..q6\n",
    "factor f: q1..q6\nordinal q1..q6\ninvariance metric\n",
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nordinal q1..q6\ninvariance scalar\n"
    "noninvariant threshold(q2)\nscale latent by variance\n",
    "factor f: q1, q2, q3\nfactor g: q4, q5, q6\nordinal q1..q6\nreversed q1, q4 on 1 to 5\n",
])


@settings(max_examples=FIT_EXAMPLES, **SETTINGS)
@given(ordinal_models, ordinal_frames(), st.sampled_from(["fit", "fit by group", "ladder"]))
def test_ordinal_fits_of_random_data(model, frame, how):
    from cfa_tool.workflows.invariance import invariance

    try:
        if how == "fit":
            cfa_tool.fit(model, frame)
        elif how == "fit by group":
            cfa_tool.fit(model, frame, group="site")
        else:
            invariance(model.replace("invariant", "# invariant").replace("noninvariant", "# noninvariant"), frame, "site",
                       partial="auto")
    except CfaError:
        pass


# ---------------------------------------------------------------- through the Python API and the file readers

long_line = st.one_of(
    st.lists(statement, min_size=1, max_size=30).map(" ".join),
    st.text(min_size=200, max_size=3000).map(lambda s: s.replace("\n", " ")),
    st.tuples(names, st.integers(200, 3000)).map(lambda t: f"factor f: {t[0] * t[1]}"),
    st.integers(250, 5000).map(lambda n: "x" * n + ".cfa"),
)
SMALL = pd.DataFrame(np.random.default_rng(1).normal(size=(30, 6)), columns=["q1", "q2", "q3", "q4", "q5", "q6"])


@settings(max_examples=max(200, EXAMPLES // 5), **SETTINGS)
@given(long_line)
def test_long_one_line_model_texts(text):
    """A string is a model file only when it is one line ending in .cfa; anything else is model text,
    and neither may end in an exception other than the tool's own (never 'File name too long')."""
    try:
        cfa_tool.check(text, SMALL)
    except CfaError:
        pass


header_bytes = st.one_of(
    st.binary(min_size=0, max_size=200),
    st.lists(st.sampled_from([b"q1", b"q2", b"q3", b"q4", b"q5", b"q6", b"", b'"', b"\x85", b"\xe2\x80\xa8", b"\x0c",
                              b"\r", b"\n", b";", b"\t", b"|", b",", b"\x00", b"\xff\xfe", b"\x1b[2J", b'"a\nb"']),
             max_size=30).map(b"".join),
)
body_bytes = st.sampled_from([
    SMALL.round(3).to_csv(index=False, header=False).encode(),
    SMALL.round(3).to_csv(index=False, header=False, sep=";").encode(),
    SMALL.round(3).to_csv(index=False, header=False).replace("\n", ",\n").encode(),
    b"",
    b"1,2,3\n4,5\n",
])


@settings(max_examples=max(200, EXAMPLES // 5), **SETTINGS)
@given(header_bytes, body_bytes, st.binary(max_size=40))
def test_random_header_bytes_and_csv_files(header, body, tail):
    import tempfile

    with tempfile.TemporaryDirectory() as folder:
        path = os.path.join(folder, "fuzz.csv")
        with open(path, "wb") as handle:
            handle.write(header + b"\n" + body + tail)
        try:
            cfa_tool.fit("factor f: q1, q2, q3\nfactor g: q4, q5, q6\n", __import__("pathlib").Path(path),
                         diagnostics=False, modification_indices=False)
        except CfaError:
            pass
