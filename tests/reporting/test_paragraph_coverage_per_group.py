"""With groups, the methods text's "each item was answered in at least X% of the rows" was pooled over the groups:
an item half unanswered in one group read as answered by 75% of the rows (groups-s16's report, sixteenth round).  It
is now the lowest share of any group's rows, computed independently here with pandas (floored to a tenth of a
percent, as the text never rounds up)."""

import math
from pathlib import Path

import numpy as np
import pandas as pd

from cfa_tool import fit
from cfa_tool.language.parser import read_model_file
from cfa_tool.reporting.paragraph import methods_paragraph

ROOT = Path(__file__).resolve().parents[2]
MODEL = ROOT / "models" / "rider_three_factors.cfa"


def test_the_share_is_the_lowest_of_any_groups_rows():
    data = pd.read_csv(ROOT / "demo" / "rider_survey.csv")
    group = data["district"].dropna().unique()[0]
    rows = np.flatnonzero((data["district"] == group).to_numpy())
    data.loc[data.index[rows[: len(rows) // 2]], "clean"] = np.nan  # half of one group leaves 'clean' unanswered
    items = list(read_model_file(MODEL).observed_names)
    lowest = min(part[items].notna().mean().min() for _, part in data.dropna(subset=["district"]).groupby("district"))
    pooled = data.dropna(subset=["district"])[items].notna().mean().min()
    assert pooled - lowest > 0.1  # the two readings differ
    text = " ".join(methods_paragraph(fit(MODEL, data, group="district")).split())
    assert f"answered in at least {math.floor(1000 * lowest) / 10:g}% of each group's rows" in text, text
