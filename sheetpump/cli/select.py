"""``sheetpump select``: which size of each supplier's series the machine needs.

    sheetpump select --app APPLICATION.xlsx SERIES.xlsx [...] [-o SELECTION.xlsx] [--format text|json]
                     [--junit FILE] [--mains-frequency HZ]
                     [--overload-factor K] [--service-factor SF] [--thermal-window MIN]

Every size of every series is checked with the rules of ``check``; per series the smallest displacement
that fails no rule is proposed. Exit code 0: every series has a passing size; 1: a series has none;
2: bad input or usage.
"""

from __future__ import annotations

import argparse
import sys

from . import check as _check  # the options check, compare and select share
from .exit_codes import EXIT_FAIL, EXIT_OK


def run(args: argparse.Namespace) -> int:
    from ..pipeline import select_files

    done = select_files(args.app, list(args.series), _check.settings_from(args), args.mains_frequency,
                        output=args.output, report_format=args.format, report=args.report, junit=args.junit)
    if not args.report:
        sys.stdout.write(done.report)
    if args.output and args.format == "text" and not args.report:
        print(f"selection written to {args.output}")
    return EXIT_OK if all(ch.proposed is not None for ch in done.selection.choices) else EXIT_FAIL


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser(
        "select", help="propose the size of each supplier's series for the machine",
        description="Check every size of each series workbook against the application and propose, per "
                    "series, the smallest displacement that fails no rule. Exit code 0: every series has "
                    "a passing size; 1: a series has none; 2: bad input or usage.")
    parser.add_argument("--app", required=True, metavar="APPLICATION.xlsx", help="the application workbook")
    parser.add_argument("series", nargs="+", metavar="SERIES.xlsx",
                        help="series workbooks (`sheetpump template series`)")
    parser.add_argument("-o", "--output", metavar="SELECTION.xlsx", help="write the selection workbook")
    parser.add_argument("--format", choices=("text", "json"), default="text", help="report format (default: text)")
    parser.add_argument("--report", metavar="FILE", help="write the report to FILE instead of standard output")
    parser.add_argument("--junit", metavar="FILE", help="also write JUnit XML (a series without a passing size "
                        "fails)")
    parser.add_argument("--mains-frequency", type=float, metavar="HZ",
                        help="mains frequency for the standard motor speeds tried where the application gives a "
                             "speed range (default: 50 Hz for IEC motors, 60 Hz for NEMA)")
    parser.add_argument("--strict", action="store_true", help="a warning makes a size fail")
    parser.add_argument("--units", choices=("metric", "imperial"), default="metric",
                        help="units of the selection workbook (default: metric)")
    _check.add_motor_options(parser)
    parser.set_defaults(run=run)
    return parser
