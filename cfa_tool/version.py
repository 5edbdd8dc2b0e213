"""The tool's version (one place: the package, the reports and the command line read it here), and the check of
the version that wrote a saved result."""

from cfa_tool.errors import OptionError, printable

__version__ = "0.1.0"


def _number(part: str) -> int | None:
    part = part.strip()
    return int(part) if part.isdigit() and len(part) < 6 else None


def _series(version: str) -> tuple[int, ...] | None:
    """The versions whose results read alike: the major version from 1.0 on, the major and minor versions before it
    (semantic versioning 2.0.0, item 4: while the major version is zero anything may change, so a new minor version
    may change what a saved result holds); None when ``version`` names none."""
    parts = version.split(".")
    major = _number(parts[0])
    if major is None or major > 0:
        return None if major is None else (major,)
    minor = _number(parts[1]) if len(parts) > 1 else None
    return None if minor is None else (0, minor)


def _read_series(series: tuple[int, ...]) -> str:
    """The versions this one reads, in words: '0.1.x' (before 1.0), '2.x'."""
    return ".".join(str(n) for n in series) + ".x"


def check_written_version(payload: dict, source: str) -> None:
    """A saved result (a command's --json file, which names the version that wrote it) that this version cannot
    read: one written by a newer version series (a newer major version, or while the major version is zero a newer
    minor version: its parts may mean something else), or one that names no version.  An error naming both
    versions; older results of this series or earlier are read."""
    written = payload.get("version")
    ours = _series(__version__)
    reads = f"which reads results written by version {_read_series(ours)} or earlier"
    series = _series(written) if isinstance(written, str) else None
    if series is None:
        found = "names no version of cfa-tool" if written is None else f"names no version it can read ('{printable(written)}')"
        raise OptionError(f"{source}: the result {found}; this is cfa-tool {__version__}, {reads}; run the command "
                          f"again with --json")
    if series > ours:
        raise OptionError(f"{source}: written by cfa-tool {printable(written)}, and this is cfa-tool {__version__}, "
                          f"{reads}; read it with cfa-tool {printable(written)} or later, or run the command again "
                          f"with --json")
