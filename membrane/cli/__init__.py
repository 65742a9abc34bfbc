"""The ``membrane`` command: one small module per command, composed here.

Every error a user can cause ends as one line on stderr and exit code 2, whether
typer/click found it (a malformed option) or the library did (a bad value).
"""

from __future__ import annotations

import errno
import io
import os
import sys
import warnings

# The solvers work on many small matrices, where threaded BLAS only adds contention
# (measured: a radiation-table build 0.75 s on one thread, 6.8 s on two on a busy
# 2-core machine). The command line uses one thread unless the user says otherwise;
# this must happen before numpy is first imported.
for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import typer
from typer.core import TyperGroup

from ..errors import MembraneError
from .common import print_error


class _OneLineErrors(TyperGroup):
    """Click group whose usage errors and library errors print one line, exit 2."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        try:
            with warnings.catch_warnings():
                # numpy's floating-point RuntimeWarnings (overflow, invalid value) are expected
                # inside the solvers' searches, which check their own results; the user sees
                # the result or one error line, never a warning before it.
                warnings.simplefilter("ignore", RuntimeWarning)
                code = super().main(args=args, prog_name=prog_name or "membrane",
                                    complete_var=complete_var, standalone_mode=False, **extra)
            sys.stdout.flush()  # a full disk or closed pipe shows here, not at interpreter exit
        except OSError as exc:
            _drop_stdout()
            if exc.errno != errno.EPIPE:  # a closed pipe (| head) is the reader's choice: quiet
                what = f"{exc.filename}: " if exc.filename else "writing the output failed: "
                print_error(f"{what}{exc.strerror or exc}".replace("\n", " "))
            sys.exit(2)
        except typer.Exit as exc:
            sys.exit(exc.exit_code)
        except (typer.Abort, KeyboardInterrupt):
            print_error("aborted")
            sys.exit(130)
        except MembraneError as exc:
            print_error(str(exc).replace("\n", " "))
            sys.exit(2)
        except Exception as exc:
            # Usage errors and bad parameters from typer's command-line parser carry
            # an exit code and format their own message; anything else is a bug.
            if not (hasattr(exc, "format_message") and hasattr(exc, "exit_code")):
                raise
            print_error(exc.format_message().replace("\n", " "))
            sys.exit(2)
        sys.exit(code if isinstance(code, int) else 0)


def _drop_stdout() -> None:
    """Point stdout at /dev/null, so the interpreter's final flush cannot fail again."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError, AttributeError, io.UnsupportedOperation):
        pass  # not a real file (a test's captured output): nothing is flushed at exit


def _new_app() -> typer.Typer:
    """An empty ``membrane`` group (its commands are added by :func:`build_app`)."""
    app = typer.Typer(
        cls=_OneLineErrors,
        name="membrane",
        help="Modes, partials, tuning and pictures of circular drumheads.",
        no_args_is_help=True,
        add_completion=False,
        pretty_exceptions_enable=False,
        rich_markup_mode=None,  # plain help: starts in half the time of the boxed one
        context_settings={"help_option_names": ["-h", "--help"]},
    )
    app.callback()(_root)
    return app


def _show_version(value: bool) -> None:
    if value:
        from .. import __version__

        print(f"membrane {__version__}")
        raise typer.Exit(0)


def _root(
    version: bool = typer.Option(False, "--version", is_eager=True, callback=_show_version,
                                 help="Print the version and exit."),
) -> None:
    """Modes, partials, tuning and pictures of circular drumheads."""


# name -> (module, function, extra settings of app.command), in the order --help lists them.
# The modules import nothing heavy at load (the library is imported inside each command).
COMMANDS = {
    "modes": ("modes", "modes", {}),
    "tune": ("tune", "tune", {}),
    "listen": ("listen", "listen", {}),
    "lugs": ("lugs", "lugs", {}),
    # the unquoted form `--best-for 1,1 2,1 3,1` needs the extra arguments
    "strike": ("strike", "strike", {"context_settings": {"allow_extra_args": True}}),
    "render": ("render", "render", {}),
    "handout": ("render", "handout", {}),
    "examples": ("examples", "examples", {}),
}


def build_app(only: str | None = None) -> typer.Typer:
    """The command line with every command, or with the one named ``only``.

    A process runs one command, so :func:`main` builds just that one when the first
    argument names it: the other command modules are not imported and typer does not
    turn their signatures into options (measured about 10 ms of every command).
    """
    from importlib import import_module

    app = _new_app()
    for name, (module, function, settings) in COMMANDS.items():
        if only is None or name == only:
            app.command(**settings)(getattr(import_module(f"{__name__}.{module}"), function))
    return app


def __getattr__(name: str):
    if name == "app":  # the whole command line (tests and programs drive it through typer)
        full = build_app()
        globals()["app"] = full
        return full
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def main() -> None:
    """Console-script entry point."""
    from ..heap import keep_freed_memory

    keep_freed_memory()  # the solvers' megabyte arrays reused, not mapped afresh (heap.py)
    first = sys.argv[1] if len(sys.argv) > 1 else None
    build_app(first if first in COMMANDS else None)()
