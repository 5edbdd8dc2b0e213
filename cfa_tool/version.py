"""The tool's version (one place: the package, the reports and the command line read it here)."""

__version__ = "0.1.0"
