"""The tool's version (one place: the package, the reports and the command line read it here), and the check of
the version that wrote a saved result."""

from cfa_tool.errors import OptionError, printable

__version__ = "0.1.0"


def _major(version: str) -> int | None:
    head = version.split(".")[0].strip()
    return int(head) if head.isdigit() and len(head) < 6 else None


def check_written_version(payload: dict, source: str) -> None:
    """A saved result (a command's --json file, which names the version that wrote it) that this version cannot
    read: one written by a newer major version (its parts may mean something else), or one that names no version.
    An error naming both versions; older results of this major version or earlier are read."""
    written = payload.get("version")
    if not isinstance(written, str) or _major(written) is None:
        found = "names no version of cfa-tool" if written is None else f"names no version it can read ('{printable(written)}')"
        raise OptionError(f"{source}: the result {found}; this is cfa-tool {__version__}, which reads results written "
                          f"by version {_major(__version__)}.x or earlier; run the command again with --json")
    if _major(written) > _major(__version__):
        raise OptionError(f"{source}: written by cfa-tool {printable(written)}, and this is cfa-tool {__version__}, "
                          f"which reads results written by version {_major(__version__)}.x or earlier; read it with "
                          f"cfa-tool {printable(written)} or later, or run the command again with --json")
