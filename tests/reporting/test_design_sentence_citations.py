"""The methods paragraph cites its sources in one style, (Author, Year) as in the rest of it (Little & Rubin, 2002;
McDonald, 1999): the sampling design's sentence wrote 'Muthén & Satorra 1995', 'Asparouhov 2005' and 'Binder 1983'
without the comma (re-check s18, r14)."""

from __future__ import annotations

import re

import numpy as np

import cfa_tool
from cfa_tool.reporting.paragraph import methods_paragraph

from tests.conftest import THREE_FACTORS


def test_the_design_sentence_cites_as_the_paragraph_does(hs_data):
    data = hs_data.assign(w=np.linspace(0.5, 1.5, len(hs_data)), unit=np.arange(len(hs_data)) % 40)
    text = methods_paragraph(cfa_tool.fit(THREE_FACTORS, data, weights="w", cluster="unit"))
    assert "(Muthén & Satorra, 1995)" in text and "Binder, 1983" in text
    assert not re.search(r"(Satorra|Asparouhov|Binder) (19|20)\d\d", text)
