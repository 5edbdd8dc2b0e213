"""Command line: the parser, error messages and exit codes; each command is a module of cfa_tool.commands.

Exit codes: 0 success, 2 a problem with the user's input, 3 the model could
not be estimated (no convergence, not identified), 1 an internal error.
"""

from __future__ import annotations

import argparse
import atexit
import contextlib
import errno
import gc
import os
import signal
import sys
import warnings

from cfa_tool.errors import CfaError, ModelError, clipped, printable
from cfa_tool.options import Option, on_command_line

PROG = "cfa-tool"


class _Parser(argparse.ArgumentParser):
    """One line for every mistake, starting with the program's name (control characters escaped),
    and an error for an option given twice that takes one value (argparse would keep the last)."""

    def error(self, message: str):  # one line, not the usage block
        command = self.prog[len(PROG):].strip()
        where = f"{command}: " if command else ""
        self.exit(2, f"{PROG}: {where}{printable(message)} (see '{self.prog} --help')\n")

    def __init__(self, *args, **kwargs):
        kwargs.setdefault("allow_abbrev", False)  # '--group' must never quietly mean '--group-column'
        super().__init__(*args, **kwargs)

    def add_argument(self, *args, **kwargs):
        if kwargs.get("action") is None and args and str(args[0]).startswith("--"):
            kwargs["action"] = _Once
        return super().add_argument(*args, **kwargs)

    def _print_message(self, message: str, file=None, what: str = "the help") -> None:
        """argparse's one writer of the help, the version and the one-line errors, which swallows a write the
        system refuses: the help sent to a full disk ('--help > /dev/full') was lost with exit 0 and no word
        (re-check s17, finding 06).  Written and flushed here; standard output that refuses ``what`` ends the run
        as a report it refuses does (:func:`_unwritten`: one line, exit 2), and an error line that standard error
        refuses ends it with the error's exit code, 2, with nothing more to say."""
        if not message:
            return
        file = file or sys.stderr  # argparse's rule: with no standard output at all, the help on standard error
        if file is None:  # neither stream: nowhere to write, nowhere to say so
            return
        try:
            file.write(message)
            file.flush()
        except OSError as exc:
            raise SystemExit(_unwritten(exc, what) if file is sys.stdout else 2) from None


class _Version(argparse.Action):
    """``--version``: the version on standard output, written as the help is (:meth:`_Parser._print_message`)."""

    def __init__(self, option_strings, dest=argparse.SUPPRESS, default=argparse.SUPPRESS,
                 help="show program's version number and exit"):
        super().__init__(option_strings, dest=dest, default=default, nargs=0, help=help)

    def __call__(self, parser, namespace, values, option_string=None):
        parser._print_message(_version() + "\n", sys.stdout, "the version")
        parser.exit()


class _Once(argparse.Action):
    """Store one value; the same option a second time is an error, never silently the last one."""

    def __call__(self, parser, namespace, values, option_string=None):
        seen = namespace.__dict__.setdefault("_given_options", set())
        if self.dest in seen:
            parser.error(f"{option_string} is given twice; give it once" + _second_time_hint(namespace, self.dest))
        seen.add(self.dest)
        setattr(namespace, self.dest, values)


def _second_time_hint(namespace: argparse.Namespace, dest: str) -> str:
    """What to do instead of giving an option twice: several missing codes go in one list; samples in two data
    files go in one file with a column naming each row's sample (the commands that take groups: their parser set the
    group column's value, given or not, on ``namespace`` before reading the command line), or are compared by
    'replicate'."""
    if dest == "missing_codes":
        return " (several values go in one comma-separated list)"
    if dest != "data":
        return ""
    grouped = Option.GROUP_COLUMN.keyword in vars(namespace)
    together = (f"to analyse samples from two files together, put their rows in one file with a column naming each "
                f"row's sample and give that column with {Option.GROUP_COLUMN.flag}; " if grouped else "")
    return f" ({together}to test a model fitted on one file in another, use '{PROG} replicate')"


def build_parser(command: str | None = None) -> argparse.ArgumentParser:
    """The parser of every command; given the ``command`` a run names, only that command's (the others'
    modules and options would only add to the start)."""
    parser = _Parser(prog=PROG, description="Confirmatory factor analysis: fit a model file to a data set.",
                     allow_abbrev=False)
    parser.add_argument("--version", action=_Version)
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    from cfa_tool import commands

    commands.add_parsers(sub, command)  # one module per command (cfa_tool/commands/)
    return parser


def _version() -> str:
    from cfa_tool.version import __version__

    return f"{PROG} {__version__}"


#: container objects made (less those freed) between two passes of the cyclic garbage collector over the
#: youngest objects, in a run of the program (Python's default is 700): see :func:`main`
COLLECT_EVERY = 200_000


def main(argv: list[str] | None = None) -> int:
    """Run one command; ``argv`` None: the program's own arguments.  A run of the program (``argv`` None) has the
    cyclic garbage collector pass over new objects after every :data:`COLLECT_EVERY` made instead of 700: its
    start makes objects that live as long as the process (modules, the model grammar, caches), and the 220-odd
    passes over them (three over every object) found almost nothing to free while they took a tenth of a
    ``fit``'s processor time.  Cycles are still collected, later.  A caller that passes ``argv`` (tests, Python)
    keeps its own setting (restoring it after a run would pass over every object the run made at once)."""
    if argv is None:
        gc.set_threshold(COLLECT_EVERY, *gc.get_threshold()[1:])
    return _main(argv)


class Terminated(KeyboardInterrupt):
    """The process was sent a termination signal (SIGTERM: what 'timeout', a batch scheduler's time limit and 'kill'
    send): stopped as Ctrl-C stops it, through every clean-up a KeyboardInterrupt runs (worker processes ended,
    unfinished outputs removed), exit 143 (128 + 15, the shell's code for it)."""


def _terminated(signum, frame) -> None:
    raise Terminated()


def program() -> int:
    """The program (``cfa-tool``, ``python -m cfa_tool``): :func:`main` on its own arguments, then the end of the
    process without the interpreter's teardown.  Freeing every module and object one by one (numpy, pandas, scipy,
    the tool: about 950 modules) took 6 % of a ``fit``'s instructions (174 of 2,813 million), memory the system
    takes back at once anyway.  What an exit must do is still done first: cyclic garbage collected (a file object
    in a cycle is flushed and closed; 55 million of the 174), the functions registered with :mod:`atexit` run,
    standard output and error flushed (what a full disk refuses ends the run with exit 2, not 0).  With another
    thread still running, or output that cannot be flushed for another reason, the process ends as usual (returns
    the exit code)."""
    signal.signal(signal.SIGTERM, _terminated)  # a stop that cleans up, as Ctrl-C's does
    try:
        code = main()
    except KeyboardInterrupt as exc:  # a stop while the arguments were read, before the run's own handling
        return _stopped(exc)
    except SystemExit as exc:  # the parser's end: the help, the version or a mistake said, flushed as a run's output
        code = exc.code if isinstance(exc.code, int) else 0 if exc.code is None else 1
    try:
        threading = sys.modules.get("threading")
        if threading is not None and threading.active_count() > 1:
            return code
        gc.collect()
        atexit._run_exitfuncs()  # noqa: SLF001 - the interpreter's own exit step, run here before leaving without it
        for stream in (sys.stdout, sys.stderr):
            try:
                stream.flush()
            except OSError as exc:
                if exc.errno not in UNWRITABLE_OUTPUT:  # a closed pipe: the usual exit, as before
                    return code
                # a report still buffered that a full disk refuses: said, exit 2 (not 0); lines standard error
                # refuses (and the saying of the report's): lost, and the exit code says so alone
                code = _output_failed(exc) if stream is sys.stdout else code or 2
            except (ValueError, AttributeError):  # a closed stream, or none: the usual exit, as before
                return code
    except KeyboardInterrupt:  # a stop once the run's work is done and said: its own exit code, no traceback
        return code
    os._exit(code)


def _stopped(exc: KeyboardInterrupt) -> int:
    """Ctrl-C or a termination signal said in one line; the shell's exit code for it (130, or 143 for SIGTERM)."""
    _say_error(f"{PROG}: {'stopped by a termination signal' if isinstance(exc, Terminated) else 'interrupted'}")
    return 143 if isinstance(exc, Terminated) else 130


def _main(argv: list[str] | None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    parser = build_parser(argv[0] if argv else None)
    for k, arg in enumerate(argv[:-1]):  # '--missing-codes -99,999': a value that starts with '-'
        if arg == "--missing-codes" and argv[k + 1].startswith("-"):
            argv[k : k + 2] = [f"{arg}={argv[k + 1]}"]
            break
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 2
    try:
        with warnings.catch_warnings(), np_quiet(), on_command_line():  # refusals name the flags, not keywords
            # the report says what went wrong in its own words; library warnings would only print before it
            warnings.simplefilter("ignore")
            return _run(args)
    except CfaError as exc:
        _report_error(exc)
        return exc.exit_code
    except KeyboardInterrupt as exc:
        return _stopped(exc)
    except OSError as exc:
        return _unwritten(exc)
    except Exception as exc:  # a bug in the tool, not the user's fault
        return _internal_error(exc)


def _unwritten(exc: OSError, what: str = "the report") -> int:
    """The exit code of a run stopped by ``exc``, the refusal of a write to standard output (of ``what``): 141 for a
    reader that stopped early ('| head': nothing more to say); one line and exit 2 for a full disk
    (:func:`_output_failed`); any other error of the system is the tool's (exit 1)."""
    if isinstance(exc, BrokenPipeError):
        try:
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        except (OSError, ValueError, AttributeError):  # pragma: no cover - no real standard output (tests)
            pass
        return 141
    if exc.errno not in UNWRITABLE_OUTPUT:
        return _internal_error(exc)
    return _output_failed(exc, what)


def _internal_error(exc: Exception) -> int:
    """A bug in the tool, not the user's fault: one line, exit 1 (``CFA_TOOL_DEBUG=1`` shows the traceback)."""
    if os.environ.get("CFA_TOOL_DEBUG"):
        raise exc
    _say_error(f"{PROG}: internal error: {type(exc).__name__}: {clipped(str(exc), 300)} (please report this; set "
               f"CFA_TOOL_DEBUG=1 for details)")
    return 1


#: what a write to standard output that the system refuses sets errno to: a full disk or quota, a file grown past
#: its limit, a device error (output redirected to a full disk, or to /dev/full)
UNWRITABLE_OUTPUT = frozenset(getattr(errno, name) for name in ("ENOSPC", "EDQUOT", "EFBIG", "EIO")
                              if hasattr(errno, name))


def _output_failed(exc: OSError, what: str = "the report") -> int:
    """Standard output that could not be written (a full disk: ``> /dev/full``): one line, exit 2, as an output file
    that cannot be written gets (output_files: '--json: cannot write ...'), never an 'internal error' (hostile trial
    s17, finding 9).  The files asked for were written before the report, and stay.  The line is said when standard
    error can take it (exit 2 either way: a full standard error is where it failed, or the line is lost too)."""
    try:
        sys.stdout = open(os.devnull, "w")  # the rest of the report, and the exit's flush, go nowhere
    except OSError:  # pragma: no cover - no null device
        pass
    _say_error(f"{PROG}: cannot write {what} to standard output ({exc.strerror or exc})")
    return 2


def _say_error(line: str) -> None:
    """``line`` on standard error, when it can take it: a full disk there (``2> /dev/full``) loses the line but
    changes no exit code, which then says alone that the run failed."""
    if sys.stderr is None:  # no standard error at all (print would write to standard output)
        return
    try:
        print(line, file=sys.stderr, flush=True)
    except (OSError, ValueError):  # full or closed
        pass


def np_quiet():
    """numpy's floating-point warnings off for the run (numpy is imported only when needed)."""
    try:
        import numpy
    except ImportError:  # pragma: no cover - a declared dependency
        return contextlib.nullcontext()
    return numpy.errstate(all="ignore")


def _report_error(exc: CfaError) -> None:
    """One line (control characters from names and values shown escaped, so nothing in a user's
    file can split the line or reach the terminal), plus the model line with a caret."""
    if isinstance(exc, ModelError):
        excerpt = exc.excerpt()
        _say_error(f"{PROG}: {printable(exc.one_line())}" + (f"\n{excerpt}" if excerpt else ""))
    else:
        _say_error(f"{PROG}: {printable(exc)}")


def _run(args: argparse.Namespace) -> int:
    from cfa_tool import commands

    return commands.run(args)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(program())
