"""Data input: file readers and sample moments."""

from cfa_tool.data.moments import SampleMoments, sample_moments
from cfa_tool.data.readers import read_table

__all__ = ["SampleMoments", "read_table", "sample_moments"]
