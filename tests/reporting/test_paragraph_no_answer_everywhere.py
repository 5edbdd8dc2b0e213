"""A value read as no answer in every one of the model's items is said so in the methods paragraph ("'don't know' in
all 9 items"), not as a list cut short that reads as if some items lacked it (new-user trial s15, finding 12: "8
'don't know' in joy1, joy2, joy3 and 17 more items" for all 20 items).  Data: Holzinger & Swineford (1939) with one
cell of each test written "don't know"."""

from __future__ import annotations

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph
from tests.conftest import THREE_FACTORS, holzinger_swineford


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_every_item_said_as_all_items():
    data = holzinger_swineford().astype({f"x{i}": object for i in range(1, 10)})
    for i in range(1, 10):
        data.loc[data.index[i * 7], f"x{i}"] = "don't know"
    text = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS, data)))
    assert "'don't know' in all 9 items)" in text
    assert "more items" not in text
    data.loc[data.index[7], "x1"] = 4.5  # x1 answered again: the other eight are listed briefly
    text = _flat(methods_paragraph(cfa_tool.fit(THREE_FACTORS, data)))
    assert "'don't know' in x2, x3, x4 and 5 more items)" in text
