"""The model language: grammar loading, parsing and checks of meaning."""

from cfa_tool.language.parser import parse_model, read_model_file
from cfa_tool.language.spec import Spec

__all__ = ["Spec", "parse_model", "read_model_file"]
