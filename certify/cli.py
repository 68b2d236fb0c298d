"""The ``certify`` command line: a thin layer over the Python API.

Each command lives in its own module exposing ``register(subparsers)``, which
adds a sub-parser whose ``func`` default takes the parsed arguments and returns
an exit code.  ``main(argv)`` returns the exit code instead of exiting, so that
tests can call it directly.

Every error certify raises on purpose (:class:`certify.errors.CertifyError`)
becomes a one-line message on stderr and a non-zero exit; no traceback.
"""

from __future__ import annotations

import argparse
import importlib
import sys
import warnings

from .errors import BadInput, CertifyError

# Command modules, in the order shown by --help.  A module missing from an
# installation (an optional part not yet built) is skipped.
COMMAND_MODULES = [
    "certify.commands.races",
    "certify.commands.orders",
    "certify.commands.documents",
    "certify.commands.batch",
    "certify.commands.lirace",
    "certify.ffield.commands",
    "certify.curves.commands",
    "certify.commands.ecrace",
]


class _Parser(argparse.ArgumentParser):
    """An argument parser whose errors are one line and raise BadInput."""

    def error(self, message):
        raise BadInput(f"{self.prog}: {message}")


def build_parser() -> argparse.ArgumentParser:
    from . import __version__

    parser = _Parser(
        prog="certify",
        description=(
            "Certified enclosures of densities in prime races, conditional on "
            "the hypotheses each result lists (GRH, LI); certify proves neither."
        ),
    )
    parser.add_argument("--version", action="version", version=f"certify {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in COMMAND_MODULES:
        try:
            module = importlib.import_module(name)
        except ModuleNotFoundError as exc:
            if exc.name and name.startswith(exc.name):
                continue
            raise
        module.register(sub)
    return parser


def _one_line_warning(message, category, filename, lineno, line=None):
    """Warnings on the command line: one line, no source location."""
    return f"certify: warning: {_message(message)}\n"


MAX_MESSAGE = 300  # an echoed input (a 100 000-digit number) is shortened, not printed whole


def _short(line: str) -> str:
    return line if len(line) <= MAX_MESSAGE else line[:MAX_MESSAGE - 30] + f"... ({len(line)} characters)"


def _message(exc: BaseException) -> str:
    return _short(" ".join(str(exc).split()) or type(exc).__name__)


def main(argv: list[str] | None = None) -> int:
    import sqlite3

    argv = sys.argv[1:] if argv is None else list(argv)
    shown = warnings.formatwarning
    warnings.formatwarning = _one_line_warning
    try:
        parser = build_parser()
        args = parser.parse_args(argv)
        if not getattr(args, "func", None):
            parser.print_help()
            return 2
        return int(args.func(args) or 0)
    except CertifyError as exc:
        for line in str(exc).splitlines()[:50] or [type(exc).__name__]:
            print(f"certify: error: {_short(line)}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("certify: interrupted", file=sys.stderr)
        return 130
    except MemoryError:
        print("certify: error: out of memory; try a smaller input", file=sys.stderr)
        return 1
    except OSError as exc:
        where = f" {exc.filename}" if getattr(exc, "filename", None) else ""
        print(f"certify: error:{where} {exc.strerror or _message(exc)}", file=sys.stderr)
        return 1
    except sqlite3.Error as exc:
        print(f"certify: error: the spectra cache failed: {_message(exc)}", file=sys.stderr)
        return 1
    except (OverflowError, RecursionError) as exc:
        print(f"certify: error: a number or a nesting in the input is too large ({_message(exc)})",
              file=sys.stderr)
        return 2
    finally:
        warnings.formatwarning = shown


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
