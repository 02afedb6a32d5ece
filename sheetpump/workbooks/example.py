"""The worked-example workbook: every cell function in use on an invented pump.

Each declared calculation's ``example`` call is written as a live formula (``=SP_...(D5,E5)``) that
refers to input cells holding the example's values, with the value sheetpump computes stored in the
formula cell and again, as a plain number, in the "expected" column beside it. Range arguments go to
the sheet "Ranges" as columns. Opened in Excel with the add-in, the formulas recompute and should
match the expected column; opened anywhere else, the stored values show.

The same generator writes the committed ``workbooks/worked-example.xlsx`` (a test keeps it in sync) and,
with ``store_values=False``, a copy without stored values for the headless recalculation to fill.
"""

from __future__ import annotations

import os
from typing import Any

from xlsxwriter.utility import xl_rowcol_to_cell

from .. import SAFETY_CAUTION
from ..catalogue import CATALOGUE
from ..declarations import Calculation
from .writer import book_styles, open_book, write_formula, write_value

__all__ = ["EXAMPLE_SHEET", "RANGES_SHEET", "write_worked_example"]

EXAMPLE_SHEET = "Example"
RANGES_SHEET = "Ranges"
_FIRST_INPUT_COL = 5  # column F


def _excel_literal(value: Any) -> str:
    if isinstance(value, str):
        return '"' + value.replace('"', '""') + '"'
    return repr(value)


def _formula_and_inputs(calc: Calculation, row: int, ranges: list[tuple[str, list[Any]]]) -> tuple[str, list[Any]]:
    """The formula text for ``calc.example`` in ``row`` and the scalar inputs to put beside it."""
    n = len(calc.args)
    args, unit = list(calc.example[:n]), calc.example[n:]
    refs, inputs = [], []
    for i, value in enumerate(args):
        if isinstance(value, (list, tuple)):
            col = len(ranges)
            ranges.append((f"{calc.name} {calc.args[i].name}", list(value)))
            first = xl_rowcol_to_cell(1, col, row_abs=True, col_abs=True)
            last = xl_rowcol_to_cell(len(value), col, row_abs=True, col_abs=True)
            refs.append(f"{RANGES_SHEET}!{first}:{last}")
        else:
            refs.append(xl_rowcol_to_cell(row, _FIRST_INPUT_COL + len(inputs)))
            inputs.append(value)
    refs.extend(_excel_literal(u) for u in unit)
    return f"={calc.name}({','.join(refs)})", inputs


def write_worked_example(target: str | os.PathLike[str], store_values: bool = True) -> None:
    """Write the worked-example workbook to ``target`` (atomically).

    Parameters
    ----------
    target : path
        Output ``.xlsx`` file.
    store_values : bool
        Store the computed value with each formula (default). ``False`` leaves formula cells without
        values, as a script-written workbook would be, for headless recalculation to fill.
    """
    with open_book(target, title="sheetpump worked example") as book:
        f = book_styles(book)
        sheet = book.add_worksheet(EXAMPLE_SHEET)
        sheet.write_string(0, 0, "sheetpump cell functions: a worked example on an invented pump", f["title"])
        sheet.write_string(1, 0, SAFETY_CAUTION, f["caution"])
        sheet.set_row(1, 45)
        sheet.write_string(2, 0, "Each result is a live formula on the inputs to its right; 'expected' is what "
                           "sheetpump computed when this file was generated. Inputs are invented.", f["note"])
        headers = ["function", "result", "expected", "result unit", "formula", "inputs (in the argument order)"]
        for col, text in enumerate(headers):
            sheet.write_string(3, col, text, f["header"])
        ranges: list[tuple[str, list[Any]]] = []
        row = 4
        for calc in CATALOGUE.values():
            if not calc.example:
                continue
            formula, inputs = _formula_and_inputs(calc, row, ranges)
            expected = calc.cell(*calc.example)
            if isinstance(expected, list):  # a spilled range: show its first value
                expected = expected[0][0]
            unit = calc.example[len(calc.args)] if len(calc.example) > len(calc.args) else calc.result.default
            write_value(sheet, row, 0, calc.name)
            if store_values:
                write_formula(sheet, row, 1, formula, expected)
            else:
                sheet.write_formula(row, 1, formula, None, "")
            write_value(sheet, row, 2, expected)
            write_value(sheet, row, 3, unit or "-")
            write_value(sheet, row, 4, formula[1:])
            for i, value in enumerate(inputs):
                write_value(sheet, row, _FIRST_INPUT_COL + i, value, f["input"])
            row += 1
        sheet.set_column(0, 0, 28)
        sheet.set_column(1, 3, 13)
        sheet.set_column(4, 4, 48)
        sheet.set_column(5, 12, 14)
        sheet.freeze_panes(4, 1)
        data = book.add_worksheet(RANGES_SHEET)
        for col, (label, values) in enumerate(ranges):
            data.write_string(0, col, label, f["header"])
            for i, value in enumerate(values):
                write_value(data, 1 + i, col, value, f["input"])
            data.set_column(col, col, 22)
