"""The ``torrid`` command line: one module per subcommand group, this module dispatches.

Errors the user can fix (bad options, bad files, existing outputs) are reported as one line,
``torrid: error: ...``, with exit status 2 and no traceback (``--debug`` shows it). A run that
fails (blow-up) is reported as ``torrid: run failed: ...`` with exit status 3; its run file is
still written, with ``run_status = "failed"``.
"""

from __future__ import annotations

import argparse
import contextlib
import signal
import sys
import warnings

from torrid.interface.cli import collect as collect_cmd
from torrid.interface.cli import demo as demo_cmd
from torrid.interface.cli import fit as fit_cmd
from torrid.interface.cli import phase as phase_cmd
from torrid.interface.cli import plot as plot_cmd
from torrid.interface.cli import run as run_cmd
from torrid.interface.cli import settings as settings_cmd
from torrid.interface.cli import sweep as sweep_cmd
from torrid.io.storage import StorageError, cause
from torrid.meta import TorridWarning, __version__
from torrid.workflow.driver import RunFailedError

SUBCOMMANDS = {"run": run_cmd, "plot": plot_cmd, "phase": phase_cmd, "sweep": sweep_cmd,
               "collect": collect_cmd, "fit": fit_cmd, "demo": demo_cmd,
               "settings": settings_cmd}
USER_ERRORS = (ValueError, FileExistsError, FileNotFoundError, KeyError, StorageError)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="torrid",
        description="A toy shallow-water circulation model for tidally locked hot gas giants, "
                    "and the tools that turn its runs into predictions.",
        epilog="Run 'torrid COMMAND --help' for the options of a command.",
    )
    parser.add_argument("--version", action="version", version=f"torrid {__version__}")
    parser.add_argument("--debug", action="store_true", help="show full tracebacks on errors")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)
    for name, module in SUBCOMMANDS.items():
        module.add_parser(sub)
        sub.choices[name].add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                                       help="show full tracebacks on errors")
    return parser


def _show_warning(message, category, filename, lineno, file=None, line=None,
                  _default=warnings.showwarning):
    """torrid's own warnings as one line, ``torrid: warning: ...``; others as Python shows them."""
    if issubclass(category, TorridWarning):
        print(f"torrid: warning: {message}", file=sys.stderr if file is None else file)
    else:
        _default(message, category, filename, lineno, file, line)


class Stopped(KeyboardInterrupt):
    """SIGTERM or SIGHUP: unwinds like Ctrl-C (workers stopped, temporary files removed)."""

    def __init__(self, signum: int):
        super().__init__(signal.Signals(signum).name)
        self.signum = signum


#: Signals that stop a command cleanly, with one line and exit status 128 + the signal.
STOP_SIGNALS = tuple(getattr(signal, name) for name in ("SIGTERM", "SIGHUP")
                     if hasattr(signal, name))


def _stop(signum, frame):
    for sig in STOP_SIGNALS:  # a second signal must not interrupt the cleanup
        signal.signal(sig, signal.SIG_IGN)
    raise Stopped(signum)


@contextlib.contextmanager
def _stop_on_signals():
    """SIGTERM and SIGHUP raise :class:`Stopped` in the main thread while a command runs."""
    try:
        saved = {sig: signal.signal(sig, _stop) for sig in STOP_SIGNALS}
    except ValueError:  # not the main thread (an embedding program): leave signals alone
        yield
        return
    try:
        yield
    finally:
        for sig, handler in saved.items():
            signal.signal(sig, handler)


def main(argv: list[str] | None = None) -> int:
    """Entry point of the ``torrid`` console script; returns the exit status."""
    parser = build_parser()
    args = parser.parse_args(argv)
    with warnings.catch_warnings(), _stop_on_signals():
        warnings.showwarning = _show_warning
        return _dispatch(args)


def _dispatch(args: argparse.Namespace) -> int:
    """Run the subcommand; user errors and failed runs become one line and an exit status."""
    try:
        return int(args.handler(args) or 0)
    except USER_ERRORS as err:
        if args.debug:
            raise
        message = str(err).strip().splitlines()[0] if str(err).strip() else type(err).__name__
        print(f"torrid: error: {message}", file=sys.stderr)
        return 2
    except RunFailedError as err:
        if args.debug:
            raise
        print(f"torrid: {err}", file=sys.stderr)
        return 3
    except (OSError, RuntimeError) as err:  # any other failure to read or write a file
        if args.debug or not (isinstance(err, OSError) or "NetCDF" in str(err)):
            raise
        where = getattr(err, "filename", None) or "a file"
        print(f"torrid: error: {where}: {cause(err, where if where != 'a file' else '.')}; "
              "nothing after it was written", file=sys.stderr)
        return 2
    except KeyboardInterrupt as err:
        hint = {"sweep": "; rerun the same command to resume (finished points are kept)",
                "run": "; rerun with --resume to continue from the latest restart",
                "demo": "; rerun to resume (finished runs are kept)"}.get(args.command, "")
        if isinstance(err, Stopped):
            print(f"torrid: stopped by {err}{hint}", file=sys.stderr)
            return 128 + err.signum
        print(f"torrid: interrupted{hint}", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
