"""check says the model's degrees of freedom, and that a model of none is just-identified, whose fit cannot be tested
(hostile trial s18, minor: check of a one-factor model of three items said nothing of it, while fit, cutoffs and power
do).  Check values: Holzinger & Swineford's three-factor model of nine tests has 24 degrees of freedom (45
variances and covariances less 21 free parameters; Jöreskog 1969, recalled from memory), twice that in two groups
with their means (2 x 54 moments less 2 x 30 parameters)."""

from __future__ import annotations

import cfa_tool

from tests.conftest import THREE_FACTORS


def test_check_gives_the_degrees_of_freedom(hs_data):
    checked = cfa_tool.check(THREE_FACTORS, hs_data)
    assert checked.degrees_of_freedom == 24 and checked.to_dict()["degrees_of_freedom"] == 24
    assert checked.summary().splitlines()[0].endswith("; 24 degrees of freedom.")
    assert cfa_tool.check(THREE_FACTORS, hs_data, group="school").degrees_of_freedom == 48


def test_a_just_identified_model_is_said_to_be_one(hs_data):
    checked = cfa_tool.check("factor visual: x1, x2, x3\n", hs_data)
    assert checked.degrees_of_freedom == 0
    assert ("; 0 degrees of freedom: the model is just-identified: it reproduces the data exactly, so its fit cannot "
            "be tested.") in checked.summary()
