"""The ``sheetpump`` command line: one module per command, each a thin face over the library.

Exit codes: 0 all good, 1 a rule failed (or, with ``--strict``, warned), 2 bad input or usage. Bad input
prints one line naming the file, sheet, cell and field and what to do, never a traceback.
"""

from __future__ import annotations

import argparse
import importlib
import pkgutil
import sys
from collections.abc import Sequence

from .. import __version__
from ..errors import SheetpumpError
from .exit_codes import EXIT_INPUT

#: Modules of this package that are not commands.
_NOT_COMMANDS = ("exit_codes",)


def _commands() -> list[str]:
    # Each submodule is one command: it defines register(subparsers), which sets ``run``.
    return sorted(m.name for m in pkgutil.iter_modules(__path__)
                  if not m.name.startswith("_") and m.name not in _NOT_COMMANDS)



def build_parser(argv: Sequence[str] | None = None) -> argparse.ArgumentParser:
    """The parser of every command, or, when ``argv`` starts with a command's name, of that one only.

    Each command's module imports what that command needs (the recalc engine, the workbook writer ...),
    so naming the command imports one module instead of all of them: this is most of the start-up of a
    command. Help, a typo or no command builds them all, so usage lists every command.
    """
    names = _commands()
    if argv and argv[0] in names:
        names = [argv[0]]
    parser = argparse.ArgumentParser(
        prog="sheetpump",
        description="Evaluate hydraulic pump datasheets against a machine's duty cycle.",
    )
    parser.add_argument("--version", action="version", version=f"sheetpump {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in names:
        importlib.import_module(f"{__name__}.{name}").register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = build_parser(argv)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: usage errors are exit code 2 already
        return int(exc.code or 0)
    if not getattr(args, "run", None):
        parser.print_help(sys.stderr)
        return EXIT_INPUT
    try:
        return int(args.run(args))
    except SheetpumpError as exc:
        print(f"sheetpump: error: {exc}", file=sys.stderr)
        return EXIT_INPUT
    except KeyboardInterrupt:
        print("sheetpump: interrupted", file=sys.stderr)
        return 130


def entry() -> None:
    """Console-script entry point."""
    try:
        code = main()
        sys.stdout.flush()
    except BrokenPipeError:  # e.g. piped into `head`: not an error of ours
        code = 0
        sys.stdout = None  # type: ignore[assignment]
    sys.exit(code)
