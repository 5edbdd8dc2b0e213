"""Output files: one guard and one writer for every command.

Rules (the contributor guide's "never lose a file"):

* No output may replace an input (model, data, summary-statistics file): inputs and
  outputs are compared by file identity (device and inode, so links and other
  spellings of a path are caught), not by their text.
* Two outputs of one run may not name the same file.
* An output path that is a folder, lies in a folder that does not exist or cannot be
  written, or lies on a pseudo-filesystem (/proc, /sys, ...) is an error before any
  work is done.  A table folder may be new, but its parent must exist (no folders
  are made on the way).
* Regular files are written to a temporary file beside the target and renamed into
  place (an interrupted run leaves the old file whole), with the permissions the
  user's umask gives (or the replaced file's own).  A symbolic link is followed and
  its target replaced, so the link stays a link, only when the target is a file this
  tool wrote or no file yet (see below); errors about it name the link and its target.  Character devices and named pipes
  (``/dev/null``, a FIFO) and ``-`` (standard output) are written directly, never
  renamed over.
* An existing file is replaced only when this tool wrote it there and it is unchanged
  since: every folder the tool writes into holds a record of the files it wrote and
  their checksums (``.cfa-tool-files.json``).  Any other existing file - someone's
  data, a model, a report edited by hand - is an error naming it, before any work.
  A table folder receives files with fixed names under the same rule.
"""

from __future__ import annotations

import errno
import hashlib
import json
import os
import secrets
import stat
import sys
from dataclasses import dataclass
from pathlib import Path

from cfa_tool.errors import OptionError, shown_path

STDOUT = "-"
#: in every folder the tool writes into: the files it wrote there and their checksums
RECORD = ".cfa-tool-files.json"
OLD_RECORD = ".cfa-tool-tables.json"  # the record of earlier versions (table folders only), read and replaced
TABLE_SUFFIXES = (".csv", ".tex")  # what a table folder receives
TABLE_CONTENTS = "contents.txt"  # the list of a table folder's tables, written beside them
_RECORD_MARK = "cfa-tool table folder"  # the record's mark (its first versions recorded table folders only)

#: Filesystems whose files are the kernel's, not the user's.
PSEUDO_FILESYSTEMS = frozenset({
    "proc", "sysfs", "cgroup", "cgroup2", "debugfs", "tracefs", "securityfs", "pstore", "bpf", "configfs",
    "fusectl", "devpts", "mqueue", "binfmt_misc", "efivarfs", "autofs", "devtmpfs", "hugetlbfs", "rpc_pipefs",
    "nsfs", "selinuxfs",
})


@dataclass(frozen=True)
class Target:
    """One output file as the user named it, and where writing it goes."""

    option: str  # e.g. '--json'
    given: str
    direct: bool  # '-' or a special file: written in place, never renamed over
    pipe: int | None = None  # a named pipe's descriptor, opened (and its reader found) before the work
    new_only: bool = False  # may not replace any existing file (see check_new_file)

    @property
    def is_stdout(self) -> bool:
        return self.given == STDOUT


def _identity(path: Path) -> tuple[int, int] | None:
    try:
        st = path.stat()
    except (OSError, ValueError):
        return None
    return (st.st_dev, st.st_ino)


def _mount_types() -> list[tuple[str, str]]:
    """(mount point, filesystem type), longest mount point first; empty where /proc is not there."""
    try:
        text = Path("/proc/self/mounts").read_text(encoding="utf-8", errors="replace")
    except OSError:
        return []
    mounts = []
    for line in text.splitlines():
        parts = line.split()
        if len(parts) >= 3:
            mounts.append((parts[1].replace("\\040", " "), parts[2]))
    return sorted(mounts, key=lambda m: len(m[0]), reverse=True)


def filesystem_type(path: Path) -> str | None:
    """The type of the filesystem holding ``path`` (Linux), or None when unknown."""
    text = str(path)
    for point, kind in _mount_types():
        if text == point or text.startswith(point.rstrip("/") + "/"):
            return kind
    return None


def _is_standard_output(path: Path) -> bool:
    """Whether ``path`` is the very file standard output writes to (/dev/stdout, /proc/self/fd/1, or a
    file the shell redirected standard output to)."""
    try:
        here = os.fstat(sys.stdout.fileno())
        there = path.stat()
    except (OSError, ValueError, AttributeError):
        return False
    return (here.st_dev, here.st_ino) == (there.st_dev, there.st_ino)


def check_target(option: str, given: str) -> Target:
    """Check one output path before any work is done (see the module's rules)."""
    if given == STDOUT:
        return Target(option, given, True)
    if given and _is_standard_output(Path(given)):
        return Target(option, STDOUT, True)
    if not given or "\x00" in given:
        raise OptionError(f"{option}: the file name is empty or holds a NUL character")
    path = Path(given)
    try:
        st = path.stat()  # follows a symbolic link
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise OptionError(f"{option}: cannot use '{shown_path(given)}' as an output file ({exc.strerror or exc})") from None
    if st is not None:
        if stat.S_ISDIR(st.st_mode):
            raise OptionError(f"{option}: '{shown_path(given)}' is a folder; give a file name")
        if _special(st.st_mode):
            if not os.access(path, os.W_OK):
                raise OptionError(f"{option}: '{shown_path(given)}' cannot be written (permission denied)")
            if stat.S_ISFIFO(st.st_mode):
                return Target(option, given, True, _open_pipe(option, given))
            return Target(option, given, True)
        if not stat.S_ISREG(st.st_mode):
            raise OptionError(f"{option}: '{shown_path(given)}' is not a regular file; give a file name")
    real = Path(os.path.realpath(path))
    if real.name in (RECORD, OLD_RECORD):
        raise OptionError(f"{option}: '{shown_path(given)}' is the tool's record of the files it wrote; give another name")
    folder = real.parent
    if not folder.is_dir():
        if os.path.islink(path):  # a link to a file in a folder that does not exist: the link's target is named
            raise OptionError(f"{option}: cannot write '{shown_path(given)}': it is a symbolic link to "
                              f"'{shown_path(os.readlink(path))}', whose folder '{shown_path(folder)}' does not exist; give the "
                              f"file's own name or remove the link")
        raise OptionError(f"{option}: cannot write '{shown_path(given)}': the folder '{shown_path(path.parent)}' does not exist")
    kind = filesystem_type(folder)
    if kind in PSEUDO_FILESYSTEMS:
        raise OptionError(f"{option}: '{shown_path(given)}' is on the system's {kind} filesystem, not a place for files; "
                          f"choose another folder")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise OptionError(f"{option}: cannot write '{shown_path(given)}': the folder '{shown_path(folder)}' is not writable")
    if st is not None and not os.access(real, os.W_OK):
        raise OptionError(f"{option}: cannot write '{shown_path(given)}': the file is read-only")
    if len(real.name.encode("utf-8", "surrogateescape")) > 255:
        raise OptionError(f"{option}: the file name '{shown_path(real.name)}' is longer than 255 bytes")
    return Target(option, given, False)


def _open_pipe(option: str, given: str) -> int:
    """A named pipe nobody reads would block the run forever: it is opened at once without waiting
    (an error when no reader is there) and kept open for the writing, so the reader sees no end early."""
    import fcntl

    try:
        fd = os.open(given, os.O_WRONLY | os.O_NONBLOCK)
    except OSError as exc:
        if exc.errno == errno.ENXIO:
            raise OptionError(f"{option}: no program is reading from the named pipe '{shown_path(given)}'; start the reader "
                              f"first") from None
        raise OptionError(f"{option}: cannot open the named pipe '{shown_path(given)}' ({exc.strerror or exc})") from None
    fcntl.fcntl(fd, fcntl.F_SETFL, fcntl.fcntl(fd, fcntl.F_GETFL) & ~os.O_NONBLOCK)
    return fd


def check_outputs(outputs: list[tuple[str, str | None]], inputs: list[str | Path | None],
                  folders: list[tuple[str, str | None]] = (), new_only: tuple[str, ...] = ()) -> dict[str, Target]:
    """Check every output of a run at once, before any work: each path on its own, none the
    same file as an input, no two the same file.  ``outputs`` are (option, path) pairs
    (None: not asked for); ``folders`` are (option, folder) pairs for table folders; ``new_only``: options
    whose files never replace an existing file (:func:`check_new_file`)."""
    targets: dict[str, Target] = {}
    input_ids = {}
    for source in inputs:
        if source is None:
            continue
        ident = _identity(Path(source))
        if ident is not None:
            input_ids[ident] = str(source)
    seen: dict[object, str] = {}
    for option, given in outputs:
        if given is None:
            continue
        target = check_target(option, given)
        targets[option] = target
        if target.is_stdout:
            key: object = STDOUT
        else:
            ident = _identity(Path(given))
            if ident is not None and ident in input_ids and not target.direct:
                raise OptionError(f"{option}: refusing to write to '{shown_path(given)}': it is the input file "
                                  f"'{shown_path(input_ids[ident])}'")
            if option in new_only:
                target = targets[option] = check_new_file(target)
            else:
                check_replaceable(target)
            key = ident if ident is not None else os.path.realpath(given)
        if key in seen and not (key == STDOUT or target.direct):
            raise OptionError(f"{option} and {seen[key]} name the same file ('{shown_path(given)}'); give each output its own file")
        if key == STDOUT and key in seen:
            raise OptionError(f"{option} and {seen[key]} both write to standard output; only one can")
        seen[key] = option
    for option, folder in folders:
        if folder is None:
            continue
        if folder == "-":
            raise OptionError(f"{option}: '-' stands for standard output, but the tables are several files that go "
                              f"into a folder; give a folder's name")
        check_folder(option, folder)
        inside = os.path.realpath(folder)
        for other, target in targets.items():
            if target.is_stdout or target.direct:
                continue
            real = Path(os.path.realpath(target.given))
            if str(real) == inside:
                raise OptionError(f"{option} and {other} name the same path ('{shown_path(folder)}'): one would make it a "
                                  f"folder of tables, the other a file; give each its own name")
            if str(real.parent) == inside and (real.suffix.lower() in TABLE_SUFFIXES or real.name in (RECORD, TABLE_CONTENTS)):
                raise OptionError(f"{other} writes '{shown_path(target.given)}' into the {option} folder, where the tables "
                                  f"go; give it another name or place")
    return targets


def _special(mode: int) -> bool:
    return stat.S_ISCHR(mode) or stat.S_ISFIFO(mode)


def special_file(path: str) -> bool:
    """A device or a named pipe: written in place, whatever its name, never renamed over."""
    try:
        return _special(os.stat(path).st_mode)
    except OSError:
        return False


def check_new_file(target: Target) -> Target:
    """The target of an output that never replaces an existing file, even one that is not an input (a file a
    researcher edits after the run, such as a draft model): an error now when the file exists, and written
    later without replacing a file that appeared in between.  Standard output and special files (written in
    place, never replaced) pass."""
    from dataclasses import replace

    if target.is_stdout or target.direct:
        return target
    if os.path.lexists(target.given):
        raise OptionError(f"{target.option}: '{shown_path(target.given)}' exists, and this output never replaces a file; "
                          f"choose a new name or move that file")
    return replace(target, new_only=True)


def check_folder(option: str, folder: str) -> None:
    if not folder or "\x00" in folder:
        raise OptionError(f"{option}: the folder name is empty or holds a NUL character")
    path = Path(folder)
    if path.exists() and not path.is_dir():
        raise OptionError(f"{option}: '{shown_path(folder)}' is a file; give a folder for the tables")
    if not path.exists() and path.is_symlink():
        raise OptionError(f"{option}: '{shown_path(folder)}' is a symbolic link to '{shown_path(os.readlink(path))}', which does "
                          f"not exist; give an existing folder or a new folder's name")
    # a new folder is made in an existing one, never with its parents (as a file is written into an existing folder)
    existing = path if path.is_dir() else path.absolute().parent
    if not existing.exists():
        raise OptionError(f"{option}: cannot create the folder '{shown_path(folder)}': the folder "
                          f"'{shown_path(path.parent)}' does not exist")
    if not existing.is_dir():
        raise OptionError(f"{option}: cannot create the folder '{shown_path(folder)}': '{shown_path(path.parent)}' is a file")
    kind = filesystem_type(Path(os.path.realpath(existing)))
    if kind in PSEUDO_FILESYSTEMS:
        raise OptionError(f"{option}: '{shown_path(folder)}' is on the system's {kind} filesystem, not a place for files")
    if not os.access(existing, os.W_OK | os.X_OK):
        raise OptionError(f"{option}: cannot write into '{shown_path(existing)}': the folder is not writable")


def write_file(target: Target | str | Path, content: str | bytes) -> None:
    """Write one output (see the module's rules for how)."""
    if not isinstance(target, Target):
        target = check_target("output", str(target))
        check_replaceable(target)
    data = content.encode("utf-8") if isinstance(content, str) else content
    if target.is_stdout:
        sys.stdout.flush()
        sys.stdout.buffer.write(data) if hasattr(sys.stdout, "buffer") else sys.stdout.write(data.decode("utf-8"))
        sys.stdout.flush()
        return
    if target.direct:
        try:
            with (os.fdopen(target.pipe, "wb") if target.pipe is not None else open(target.given, "wb")) as handle:
                handle.write(data)
        except OSError as exc:
            raise OptionError(f"{target.option}: cannot write '{shown_path(target.given)}' ({exc.strerror or exc})") from None
        return
    real = Path(os.path.realpath(target.given))
    _replace_atomically(real, data, target.option, target.new_only)
    if not target.new_only:  # rows of data are never replaced, so they need no record
        _record(real.parent, {real.name: _checksum(data)}, target.option)


def check_replaceable(target: Target) -> None:
    """An existing regular file is replaced only when this tool wrote it and nobody changed it since."""
    if target.is_stdout or target.direct:
        return
    real = Path(os.path.realpath(target.given))
    if real.is_file() and not _written_here(real, target.option):
        if os.path.islink(target.given):
            raise OptionError(f"{target.option}: '{shown_path(target.given)}' is a symbolic link to '{shown_path(real)}', which "
                              f"was not written by cfa-tool (or was changed since), so it is not replaced; choose "
                              f"another name, or remove the link")
        raise OptionError(f"{target.option}: '{shown_path(target.given)}' exists and was not written by cfa-tool (or was "
                          f"changed since), so it is not replaced; choose another name, or move or delete that file")


def _written_here(path: Path, option: str) -> bool:
    """Whether the existing file ``path`` is one this tool wrote and nobody changed since (by its folder's record)."""
    recorded = _read_record(path.parent, option).get(path.name)
    return recorded is not None and recorded == _checksum(path.read_bytes())


def _record(folder: Path, written: dict[str, str], option: str) -> dict[str, str]:
    """Add the files just written (name -> checksum) to ``folder``'s record, and return the record (empty when a
    foreign file holds its name).  A record that cannot be written costs only the right to replace those files
    later, so it never fails the run."""
    try:
        files = _read_record(folder, option)
    except OptionError:
        return {}  # a foreign file under the record's name: left alone
    files.update(written)
    try:
        _replace_atomically(folder / RECORD, json.dumps({"written by": _RECORD_MARK, "files": files}, indent=1,
                                                        sort_keys=True).encode("utf-8"), option)
        if (folder / OLD_RECORD).is_file():
            os.unlink(folder / OLD_RECORD)  # its files are in the new record now
    except (OptionError, OSError):
        pass
    return files


def _replace_atomically(real: Path, data: bytes, option: str, new_only: bool = False) -> None:
    folder = real.parent
    try:
        mode = stat.S_IMODE(real.stat().st_mode)
    except FileNotFoundError:
        mode = None
    tmp = folder / f".cfa-tool-{secrets.token_hex(6)}.tmp"  # short: the target's name may use all 255 bytes
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666 if mode is None else 0o600)
    except OSError as exc:
        raise OptionError(f"{option}: cannot write into '{shown_path(folder)}' ({exc.strerror or exc})") from None
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
        if mode is not None:
            os.chmod(tmp, mode)  # a replaced file keeps its permissions
        if new_only:  # a hard link never replaces a file: it fails when the name exists
            try:
                os.link(tmp, real)
            except FileExistsError:
                raise OptionError(f"{option}: '{shown_path(real)}' was created by another program during the run, and "
                                  f"this output never replaces a file; nothing was written there") from None
            os.unlink(tmp)
        else:
            os.replace(tmp, real)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise OptionError(f"{option}: cannot write '{shown_path(real)}' ({exc.strerror or exc})") from None
        raise


def check_table_folder(option: str, folder: str | Path, files: dict[str, str],
                       inputs: list[str | Path | None]) -> None:
    """Check that every file of ``files`` may be written into ``folder`` (see the module's rules)."""
    path = Path(folder)
    check_folder(option, str(folder))
    input_ids = {_identity(Path(s)) for s in inputs if s is not None} - {None}
    for name in files:
        existing = path / name
        if existing.is_symlink() or (existing.exists() and not existing.is_file()):
            raise OptionError(f"{option}: '{shown_path(existing)}' exists and is not a plain file; choose another folder")
        if not existing.exists():
            continue
        if _identity(existing) in input_ids:
            raise OptionError(f"{option}: refusing to write '{shown_path(existing)}': it is an input file")
        if not _written_here(existing, option):
            raise OptionError(f"{option}: '{shown_path(existing)}' exists and was not written by cfa-tool (or was changed since); "
                              f"choose an empty folder, or move that file")


def write_table_folder(option: str, folder: str | Path, files: dict[str, str],
                       inputs: list[str | Path | None]) -> tuple[str, ...]:
    """Write ``files`` (name -> text) into ``folder``; nothing is written unless every file can be.  Returns the
    names of the tables (CSV and LaTeX files) an earlier run of this tool wrote there (changed since or not) that this
    run did not write: they are left in place (never removed: this run did not create them), and the caller says so.
    Other files the tool wrote there (a fit's JSON, HTML or Word report: a folder of tables may be a project's
    folder) are not tables of another report (hostile tester s15)."""
    path = Path(folder)
    check_table_folder(option, folder, files, inputs)
    try:
        path.mkdir(exist_ok=True)
    except OSError as exc:
        raise OptionError(f"{option}: cannot create the folder '{shown_path(folder)}' ({exc.strerror or exc})") from None
    written = {}
    for name, text in files.items():
        data = text.encode("utf-8")
        _replace_atomically(path / name, data, option)
        written[name] = _checksum(data)
    earlier = _record(path, written, option)  # the record as written, read once
    return tuple(sorted(name for name in earlier if name not in files and Path(name).suffix.lower() in TABLE_SUFFIXES
                        and (path / name).is_file()))


def _checksum(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def _read_record(folder: Path, option: str) -> dict[str, str]:
    """The folder's record of the files this tool wrote there (name -> checksum); empty when there is none."""
    record = folder / RECORD if (folder / RECORD).exists() or not (folder / OLD_RECORD).exists() else folder / OLD_RECORD
    if not record.exists():
        return {}
    try:
        content = json.loads(record.read_text(encoding="utf-8"))
        if content.get("written by") != _RECORD_MARK:
            raise ValueError
        return {str(k): str(v) for k, v in content["files"].items()}
    except (OSError, ValueError, AttributeError, KeyError, TypeError):
        raise OptionError(f"{option}: '{shown_path(record)}' exists but is not this tool's record of the files it wrote; "
                          f"choose another folder") from None
