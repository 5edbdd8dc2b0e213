"""A data file's checksum: the SHA-256 of its bytes (FIPS 180-4), by which a halves file (data.halves) and a saved
report (reporting.document.DataRead) name the file they were made from; a module of its own so that a plain fit,
which records its file's checksum, does not import the halves' machinery at its start."""

from __future__ import annotations

import hashlib
from pathlib import Path


def fingerprint(path) -> str:
    """The SHA-256 of a data file's bytes ('' when ``path`` is no regular file: a data frame, a special file)."""
    if not isinstance(path, (str, Path)) or not Path(path).is_file():
        return ""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()
