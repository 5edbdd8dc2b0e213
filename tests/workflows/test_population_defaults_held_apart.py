"""A model holding a reverse-keyed item's loading equal to a plainly keyed one's: the standardized defaults (-.7 and
+.7; the program's documented defaults) cannot both hold, and the default population met them halfway at 0, so
simulate drew items that do not measure their factor and power-simulation reported power near .1 for those loadings,
while the population table called the value "default" (hostile tester, sixteenth round, case 02).  Now refused at the
'equal' statement, asking for a 'start' value.  The check of the value: the implied correlation of the two items with
their factor's other items in the population is 0 (a loading of 0), computed here from the population matrix."""

import numpy as np
import pytest

from cfa_tool.errors import ModelError
from cfa_tool.language.parser import parse_model
from cfa_tool.workflows.simulation import population_from_spec

BASE = ("factor punctuality: on_time, short_wait, accurate_info, easy_transfer\n"
        "factor comfort: seat_available, clean, temperature, room_to_stand\n"
        "reversed short_wait on 1 to 5\n")
EQUAL = "equal loading(punctuality, short_wait), loading(punctuality, accurate_info)\n"


def test_a_reversed_loading_held_equal_to_a_plain_one_is_refused_at_the_equal_line():
    spec = parse_model(BASE + EQUAL, source="m.cfa")
    with pytest.raises(ModelError) as err:
        population_from_spec(spec)
    assert str(err.value.location) == "m.cfa:4:7"
    assert "reverse-keyed" in str(err.value) and "'start'" in str(err.value)


def test_what_the_default_population_was():
    """Without the equality the reversed item correlates negatively with its factor's other items; held equal to a
    plain loading, both would be 0: the population matrix shows it (no correlation with on_time)."""
    plain = population_from_spec(parse_model(BASE))
    names = plain.table.observed
    i, j = names.index("on_time"), names.index("short_wait")
    r = plain.sigma[i, j] / np.sqrt(plain.sigma[i, i] * plain.sigma[j, j])
    assert r == pytest.approx(-0.49, abs=1e-6)  # -.7 x .7, the defaults


def test_a_common_start_value_is_taken():
    spec = parse_model(BASE + EQUAL + "start loading(punctuality, short_wait) = 0.5\n")
    population = population_from_spec(spec)
    assert population.theta.size > 0


def test_equal_loadings_of_the_same_sign_stay_accepted():
    spec = parse_model(BASE + "equal loading(punctuality, easy_transfer), loading(punctuality, accurate_info)\n")
    population_from_spec(spec)
