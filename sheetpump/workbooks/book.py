"""The opened workbook and its cells, with the cell rules every reader follows.

:class:`Book` opens a workbook (cached values; its formulas only where a cell lacks its value) and reads a
cell: a formula's cached value is read; a formula without one (a file written by a script) is evaluated
by :mod:`sheetpump.recalc` when available, and refused otherwise: it is never read as empty. An error
value (``#DIV/0!``, a ``#SP!`` text) and a value cell inside merged cells are refused, naming the cell.
:meth:`Book.defined` resolves a workbook-level defined name to its one cell; :func:`header_row` finds a
sheet's header row.
"""

from __future__ import annotations

import functools
import os
import zipfile
from collections.abc import Callable
from pathlib import Path
from typing import Any

from ..errors import InputError, Where
from .refs import CELL_REF, split_ref
from .safe import holds_formulas, open_workbook

__all__ = ["Book", "header_row"]

_MAX_HEADER_SCAN = 60  # rows searched for a header row
_EXCEL_ERRORS = ("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A", "#GETTING_DATA",
                 "#SPILL!", "#CALC!")
# What the evaluator may raise on a package it cannot parse besides its InputError: a damaged zip
# member (zipfile.BadZipFile, OSError), text that is not UTF-8 (ValueError), XML that does not parse
# (SyntaxError: ElementTree.ParseError), a missing part (KeyError).
_EVALUATION_ERRORS = (OSError, ValueError, KeyError, SyntaxError, zipfile.BadZipFile)


def _is_error_text(value: Any) -> bool:
    # Excel's error values, and the "#SP! ..." text a sheetpump cell function shows for bad input.
    return isinstance(value, str) and (value.strip() in _EXCEL_ERRORS or value.startswith("#SP!"))


class Book:
    """A workbook opened twice (cached values and formulas), with the cell rules of every reader.

    The formulas are opened only when a cell has no cached value and some worksheet holds a formula
    (:func:`~sheetpump.workbooks.safe.holds_formulas`): a filled-in template usually holds none.
    """

    def __init__(self, path: str | os.PathLike[str]) -> None:
        self.path = Path(path)
        self.file = str(path)
        self.values = open_workbook(self.path, data_only=True, max_uncompressed=64 * 1024**2)
        self._evaluated: dict[tuple[str, str], Any] | None = None
        self._merged: dict[str, list[Any]] = {}

    @functools.cached_property
    def formulas(self) -> Any:
        return open_workbook(self.path, data_only=False, max_uncompressed=64 * 1024**2)

    @functools.cached_property
    def holds_formulas(self) -> bool:
        return holds_formulas(self.path)

    def sheet(self, name: str, *, required: bool = True) -> Any:
        names = self.values.sheetnames
        match = [n for n in names if n == name] or [n for n in names if n.strip().lower() == name.lower()]
        if not match:
            if required:
                raise InputError(f"no sheet {name!r}", Where(self.file),
                                 f"sheets found: {', '.join(names)}; start from `sheetpump template`")
            return None
        return self.values[match[0]]

    def where(self, sheet: Any, coord: str, field: str | None = None) -> Where:
        return Where(self.file, sheet.title, coord, field)

    def merged(self, sheet: Any, coord: str) -> bool:
        ranges = self._merged.get(sheet.title)
        if ranges is None:  # (first row, last row, first column, last column): compared as numbers
            ranges = self._merged[sheet.title] = [(r.min_row, r.max_row, r.min_col, r.max_col)
                                                  for r in sheet.merged_cells.ranges]
        if not ranges:
            return False
        row, col = split_ref(coord)
        return any(r0 <= row <= r1 and c0 <= col <= c1 for r0, r1, c0, c1 in ranges)

    def value(self, sheet: Any, coord: str, field: str | None = None, *, value_cell: bool = True) -> Any:
        """The value of a cell: cached value of a formula, evaluated where missing, never a silent blank."""
        if value_cell and self.merged(sheet, coord):
            raise InputError("the value cell is part of merged cells", self.where(sheet, coord, field),
                             "unmerge the cells (Home > Merge > Unmerge) and enter the value in one cell")
        cell = sheet[coord]
        value = cell.value
        if cell.data_type == "e" or _is_error_text(value):
            raise InputError(f"the cell shows the error {value}", self.where(sheet, coord, field),
                             "fix the formula or enter the value")
        if value is None and self.holds_formulas:
            raw = self.formulas[sheet.title][coord]
            if raw.data_type == "f" or (isinstance(raw.value, str) and raw.value.startswith("=")):
                value = self._evaluate(sheet, coord, field, raw.value)
        if isinstance(value, str):
            value = value.strip()
            if not value:
                return None
        return value

    def _evaluate(self, sheet: Any, coord: str, field: str | None, formula: Any) -> Any:
        if self._evaluated is None:
            try:  # imported here: only a workbook with formulas lacking their values needs the engine
                from ..recalc import evaluate_workbook
            except ImportError:  # no evaluator importable: the formula is refused below, never read as empty
                self._evaluated = {}
            else:
                try:
                    self._evaluated = dict(evaluate_workbook(self.path))
                except InputError as exc:
                    if exc.where.sheet == sheet.title and exc.where.cell == coord:
                        raise exc.at(field=field) from None  # this very cell: name its field too
                    raise
                except _EVALUATION_ERRORS as exc:  # a part the evaluator cannot parse: the formula's problem
                    raise InputError(f"the formula {formula} has no stored value and could not be "
                                     f"evaluated ({exc})", self.where(sheet, coord, field),
                                     "open and save the workbook in a spreadsheet program") from None
        for key in ((sheet.title, coord), (sheet.title, coord.replace("$", ""))):
            if key in self._evaluated:
                value = self._evaluated[key]
                if type(value).__name__ == "CellError" or _is_error_text(value):
                    raise InputError(f"the formula gives {value}", self.where(sheet, coord, field),
                                     "fix the formula or enter the value")
                if value is None:
                    break
                return value
        raise InputError(f"the formula {formula} has no stored value (the file was written without "
                         "calculating it)", self.where(sheet, coord, field),
                         "open and save the workbook in a spreadsheet program, or enter the value")

    def defined(self, name: str) -> tuple[str, str, int] | None:
        """``(sheet, column letters, row)`` of the one cell a workbook-level defined name points to.

        ``None`` for anything else: no such name, a range, or a name a spreadsheet program broke when
        it deleted the row it pointed to (``#REF!``, ``'Pump'!#REF!``), which is no error of the user's.
        """
        names = self.values.defined_names
        entry = names.get(name) if hasattr(names, "get") else None
        if entry is None:
            return None
        try:
            destinations = list(entry.destinations)
        except Exception:  # openpyxl's tokenizer fails on some broken references: a broken name
            return None
        if len(destinations) != 1:
            return None
        title, coord = destinations[0]
        match = CELL_REF.match(str(coord))
        if not match:
            return None
        return title, match.group(1).upper(), int(match.group(2))


def header_row(book: Book, sheet: Any, test: Callable[[list[Any]], bool], what: str) -> tuple[int, list[Any]]:
    """The first row (of the top 60) that ``test`` takes for a header: ``(row number, its cells)``; refused
    naming the sheet and ``what`` the header holds when there is none."""
    limit = min(sheet.max_row, _MAX_HEADER_SCAN)
    width = min(sheet.max_column, 64)
    for r, row in enumerate(sheet.iter_rows(min_row=1, max_row=limit, max_col=width, values_only=True), 1):
        if test(list(row)):
            return r, list(row)
    raise InputError(f"no header row {what} found", Where(book.file, sheet.title),
                     "keep the template's header row")
