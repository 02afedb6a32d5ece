"""``sheetpump recalc``: compute every formula of a workbook headlessly, or check the values it stores.

``sheetpump recalc BOOK.xlsx -o OUT.xlsx`` writes a copy of BOOK with the computed value stored beside
each formula (BOOK itself is never modified). ``sheetpump recalc BOOK.xlsx --verify`` recomputes and lists
each formula cell whose stored value differs from the recomputed one beyond the tolerance: exit 1 if any
does, 0 if none. Numbers agree when ``|a - b| <= max(REL * max(|a|, |b|), ABS)``; the defaults are
``--rel-tol 1e-9`` and ``--abs-tol 1e-12``. A formula that cannot be computed (unsupported function,
circular reference, failing function) is bad input: one line naming the cell, exit 2.

A formula in an ordinary cell whose result is a range (``=SP_GEOMETRIC_FLOW(8, A1:A3)``) spills into
the cells below and to the right, as a dynamic array does in Excel 365: formulas that read those cells
see the spilled values, and the copy stores the formula as an array formula over its range with the
values in every cell of it. When a cell of that range is not empty, the formula's cell gets the text
``#SPILL! ...`` naming the cell in the way, formulas that use it show ``#N/A``, the copy is still
written, and one line per such formula on standard error says so: exit 1, as for a value that differs.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..errors import InputError
from ..files import check_outputs
from ..recalc import DEFAULT_ABS_TOL, DEFAULT_REL_TOL, compare, recalculate, write_values
from ..workbooks.safe import check_file


def _tolerance(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not value >= 0:
        raise argparse.ArgumentTypeError("a tolerance cannot be negative")
    return value


def run(args: argparse.Namespace) -> int:
    if args.output is None and not args.verify:
        raise InputError("nothing to do", hint="give -o OUT.xlsx to write a recalculated copy, or --verify")
    book = Path(args.book)
    if args.output is not None:
        check_outputs([("--output", args.output)], [("the workbook", args.book)])
    # The guarded opening every reader uses: not a workbook, encrypted, damaged, a zip bomb or XML
    # entities are refused here with a clear line, before the engine parses anything.
    check_file(book)
    result = recalculate(book)
    result.raise_problems()
    if args.output is not None:
        write_values(book, args.output, result.values, result.spills)
        print(f"{args.output}: {len(result.values)} formula cells computed")
    for problem in result.blocked:
        print(f"{book}: {problem} (shown as #SPILL!)", file=sys.stderr)
    if not args.verify:
        return 1 if result.blocked else 0
    differences = compare(result, args.rel_tol, args.abs_tol)
    for difference in differences:
        print(difference)
    if differences:
        print(f"{book}: {len(differences)} of {len(result.values)} formula cells differ", file=sys.stderr)
        return 1
    if result.blocked:
        return 1
    print(f"{book}: all {len(result.values)} formula cells agree")
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser(
        "recalc",
        help="compute every formula of a workbook (write a copy, or --verify the stored values)",
        description=__doc__.split("\n\n", 1)[1] if __doc__ else None,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("book", help="the workbook (.xlsx or .xlsm); it is only read")
    parser.add_argument("-o", "--output", help="write a copy with the computed values stored here")
    parser.add_argument("--verify", action="store_true",
                        help="compare the values the file stores with recomputed ones; exit 1 if any differ")
    parser.add_argument("--rel-tol", type=_tolerance, default=DEFAULT_REL_TOL, metavar="REL",
                        help=f"relative tolerance of --verify (default {DEFAULT_REL_TOL:g})")
    parser.add_argument("--abs-tol", type=_tolerance, default=DEFAULT_ABS_TOL, metavar="ABS",
                        help=f"absolute floor of --verify: smaller differences never count "
                             f"(default {DEFAULT_ABS_TOL:g})")
    parser.set_defaults(run=run)
    return parser
