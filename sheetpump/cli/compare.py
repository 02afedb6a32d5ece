"""``sheetpump compare``: the comparison workbook of several candidate pumps on one application.

    sheetpump compare --app APPLICATION.xlsx DATASHEET.xlsx [...] -o COMPARISON.xlsx

A folder stands for every ``.xlsx`` in it. Exit codes as for ``check``: 0 all pass, 1 a candidate fails
(with ``--strict`` also when one warns), 2 bad input or usage.
"""

from __future__ import annotations

import argparse
import sys

from ..checks import FAIL
from . import check as _check  # the options check, compare and select share
from .exit_codes import EXIT_FAIL, EXIT_OK


def _progress(i: int, total: int, label: str) -> None:
    """A one-line count of the files read on stderr, only when stderr is a terminal and there are many."""
    if total < 5 or not sys.stderr.isatty():
        return
    if label:
        sys.stderr.write(f"\rchecking {i}/{total}: {label[:40]:<40}")
    else:  # all read: clear the line
        sys.stderr.write("\r" + " " * 70 + "\r")
    sys.stderr.flush()


def exit_code(verdicts: list[str]) -> int:
    # a verdict is already "fail" for a warning under --strict (CheckSettings.strict)
    return EXIT_FAIL if FAIL in verdicts else EXIT_OK


def run(args: argparse.Namespace) -> int:
    from ..pipeline import compare_files

    comp = compare_files(args.app, args.datasheets, args.output, _check.settings_from(args), progress=_progress)
    for c in comp.candidates:
        rank = f"rank {c.rank}" if c.rank else "not ranked"
        print(f"{c.result.verdict:4}  {c.datasheet.label}  ({rank})")
    print(f"comparison written to {args.output}")
    return exit_code([c.result.verdict for c in comp.candidates])


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("compare", help="write the comparison workbook of several candidate pumps")
    parser.add_argument("--app", required=True, metavar="APPLICATION.xlsx", help="the application workbook")
    parser.add_argument("datasheets", nargs="+", metavar="DATASHEET",
                        help="datasheet or series workbooks, or folders of them (a series: its proposed size)")
    parser.add_argument("-o", "--output", required=True, metavar="COMPARISON.xlsx", help="the workbook to write")
    parser.add_argument("--units", choices=("metric", "imperial"), default="metric",
                        help="units shown in the comparison (default metric)")
    parser.add_argument("--strict", action="store_true",
                        help="warnings (and rules not checked that matter for the duty) count as failures "
                             "for the exit code")
    _check.add_motor_options(parser)
    parser.set_defaults(run=run)
    return parser
