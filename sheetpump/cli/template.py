"""``sheetpump template datasheet|application|series -o FILE``: write a blank workbook to fill in."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..errors import InputError, Where
from ..files import check_outputs


def run(args: argparse.Namespace) -> int:
    from ..workbooks.size_series import write_series_template
    from ..workbooks.templates import write_template

    target = Path(args.output)
    check_outputs([("--output", target)])
    if target.suffix.lower() not in (".xlsx", ".xlsm"):
        raise InputError("the template is an Excel workbook: give a name ending in .xlsx",
                         Where(file=str(target)))
    if target.exists() and not args.force:
        raise InputError("the file exists (a filled-in workbook is never overwritten by accident)",
                         Where(file=str(target)), "choose another name, or add --force")
    if args.kind == "series":
        write_series_template(target)
    else:
        write_template(args.kind, target)
    print(f"wrote the blank {args.kind} template to {target}")
    return 0


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("template", help="write a blank datasheet, application or series workbook to fill in")
    parser.add_argument("kind", choices=("datasheet", "application", "series"), help="which workbook")
    parser.add_argument("-o", "--output", required=True, metavar="FILE", help="the .xlsx file to write")
    parser.add_argument("--force", action="store_true", help="overwrite FILE if it exists")
    parser.set_defaults(run=run)
    return parser
