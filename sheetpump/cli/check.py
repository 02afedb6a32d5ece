"""``sheetpump check``: check pump datasheets against an application's duty cycle.

    sheetpump check --app APPLICATION.xlsx DATASHEET.xlsx [DATASHEET.xlsx ...]

Prints a report per pump (or ``--format json``): every rule, then the drive, heat into the oil, motor,
energy, cost and rank (the comparison's numbers); optionally writes JUnit XML (``--junit``) and an
annotated copy of each datasheet (``--annotate``). Exit code 0 when every rule passes, 1 when one fails
(with ``--strict`` also when one warns), 2 for bad input or usage.
"""

from __future__ import annotations

import argparse
import sys

from ..checks import FAIL, CheckSettings
from ..physics import drive
from .exit_codes import EXIT_FAIL, EXIT_OK


def settings_from(args: argparse.Namespace) -> CheckSettings:
    """The check and motor settings of the command line."""
    return CheckSettings(units=args.units, strict=args.strict, overload_factor=args.overload_factor,
                         service_factor=args.service_factor, thermal_window=args.thermal_window * 60.0)


def add_motor_options(parser: argparse.ArgumentParser) -> None:
    """The motor-sizing options ``check``, ``compare`` and ``select`` share."""
    def at_least_one(text: str) -> float:
        try:
            value = float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
        if not value >= 1.0 or value == float("inf"):
            raise argparse.ArgumentTypeError(f"{text!r} must be a number of at least 1")
        return value

    def positive(text: str) -> float:
        try:
            value = float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
        if not 0.0 < value < float("inf"):
            raise argparse.ArgumentTypeError(f"{text!r} must be a number above 0")
        return value

    group = parser.add_argument_group("motor sizing")
    group.add_argument("--overload-factor", type=at_least_one, default=drive.IEC_OVERLOAD_FACTOR, metavar="K",
                       help="peak load at most K x the motor's rating (default 1.6, IEC 60034-1)")
    group.add_argument("--service-factor", type=at_least_one, default=1.0, metavar="SF",
                       help="RMS load at most SF x the rating (default 1: size to the nameplate; NEMA "
                            "motors state 1.15)")
    group.add_argument("--thermal-window", type=positive, default=drive.THERMAL_WINDOW / 60.0, metavar="MIN",
                       help="the motor's thermal time in minutes: a longer cycle is sized on the RMS of its "
                            "worst window this long (default 10)")


def run(args: argparse.Namespace) -> int:
    from ..pipeline import check_files

    done = check_files(args.app, args.datasheets, settings_from(args), report_format=args.format,
                       output=args.output, junit=args.junit, annotate=args.annotate)
    if not args.output:
        sys.stdout.write(done.report)
    return EXIT_FAIL if any(c.result.verdict == FAIL for c in done.comparison.candidates) else EXIT_OK


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser(
        "check", help="check pump datasheets against an application's duty cycle",
        description="Check each pump datasheet against the application's duty cycle and ratings rules. "
                    "Exit code 0: every rule passes; 1: a rule fails (with --strict also a warning); "
                    "2: bad input or usage.")
    parser.add_argument("--app", required=True, metavar="APPLICATION.xlsx",
                        help="the application workbook (settings and duty cycle)")
    parser.add_argument("datasheets", nargs="+", metavar="DATASHEET.xlsx", help="pump datasheet workbook(s)")
    parser.add_argument("--format", choices=("text", "json"), default="text",
                        help="report format (default: text)")
    parser.add_argument("--output", "-o", metavar="FILE",
                        help="write the report to FILE instead of standard output")
    parser.add_argument("--junit", metavar="FILE", help="also write a JUnit XML file (each rule a test case)")
    parser.add_argument("--annotate", metavar="OUT.xlsx",
                        help="write a copy of the datasheet with the offending cells highlighted and a "
                             "findings sheet (several datasheets: OUT-<datasheet>.xlsx)")
    parser.add_argument("--strict", action="store_true",
                        help="warnings fail too, and rules not checked that matter for the duty")
    parser.add_argument("--units", choices=("metric", "imperial"), default="metric",
                        help="units the report shows (default: metric)")
    add_motor_options(parser)
    parser.set_defaults(run=run)
    return parser
