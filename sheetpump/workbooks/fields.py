"""Field sheets (a column of field words, their values and units) and one value with its unit, to SI.

:class:`Fields` locates the rows of a field sheet (the Pump sheet of a datasheet, the Machine sheet of an
application); :func:`convert` turns one value cell and its unit cell into SI (or a text, a choice, a whole
number), with every refusal message of a value and its unit: a true/false value, a date, a text where a
number belongs, a unit of the wrong kind, a share written as a slip of %, a value outside the span
sheetpump reads.

A value cell holds a bare number in the unit of its unit cell (empty unit cell: the kind's default
unit), or a text with its own unit (``"3000 psi"``; a different unit in the unit cell is then an error).
A formula's cached value is read; a formula without one (a file written by a script) is evaluated by
:mod:`sheetpump.recalc` when available, and refused otherwise: it is never read as empty.

Fields are found by the words in the ``field`` column (rows may be moved or sorted), falling back to the
template's defined names (``pump.<field>``, ``machine.<field>``) for a field whose row lost its word. A
defined name never overrules the field column: one pointing at another field's row (left behind by a
script that deleted a row) or broken by a deleted row is ignored, and a field whose row is gone reads as
empty (refused, naming the field, where the field is required).
"""

from __future__ import annotations

import datetime as _dt
import difflib
import functools
import math
import os
import re
import zipfile
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

import numpy as np

from ..codes import cleanliness_parts, rotation_word
from ..datasheet import PerformanceTable
from ..errors import InputError, Where
from ..units import Kind, check_span, physical_unit, split_number, unit_factor
from .refs import CELL_REF, column_letter, split_ref
from .safe import holds_formulas, open_workbook
from .templates import (
    CHOICE,
    COUNT,
    FIELD_HEADER,
    FRACTION,
    INTEGER,
    NAME_PREFIX,
    TEXT,
    Column,
    Field,
)
from .time_series import match_columns, parse_header

__all__ = [
    "MAX_TABLE_ROWS",
    "Book",
    "Fields",
    "cell_text",
    "column_span",
    "convert",
    "header_row",
    "performance_table",
    "read_table",
    "split_value",
    "table_column",
]

_MAX_HEADER_SCAN = 60  # rows searched for a header row
_MAX_ROWS = 20_000  # rows read below the header of a field sheet: one row per field is far smaller
# Rows below the header of a table (segments, performance points). Every row is read, none is dropped;
# the bound is only against hostile sizes. A long measured log belongs in a series file (duty_series).
MAX_TABLE_ROWS = 100_000
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
    limit = min(sheet.max_row, _MAX_HEADER_SCAN)
    width = min(sheet.max_column, 64)
    for r, row in enumerate(sheet.iter_rows(min_row=1, max_row=limit, max_col=width, values_only=True), 1):
        if test(list(row)):
            return r, list(row)
    raise InputError(f"no header row {what} found", Where(book.file, sheet.title),
                     "keep the template's header row")


# --- field sheets -----------------------------------------------------------------------------------


class Fields:
    """The located rows of a field sheet: ``key -> (value cell, unit cell)``."""

    def __init__(self, book: Book, sheet_name: str, fields: Sequence[Field]) -> None:
        self.book = book
        self.sheet = sheet = book.sheet(sheet_name)
        self.fields = {f.key: f for f in fields}
        words = [str(w) for w in FIELD_HEADER[:3]]

        def is_header(row: list[Any]) -> bool:
            cells = [str(c).strip().lower() if c is not None else "" for c in row]
            return all(w in cells for w in words)

        header, cells = header_row(book, sheet, is_header, "'field | value | unit'")
        lower = [str(c).strip().lower() if c is not None else "" for c in cells]
        key_col, value_col, unit_col = (lower.index(w) + 1 for w in words)
        self.cells: dict[str, tuple[str, str]] = {}
        self.notes: dict[str, str] = {}
        seen: dict[str, str] = {}
        if sheet.max_row - header > _MAX_ROWS:  # far more than the fields: refused, never cut unseen
            raise InputError(f"the sheet reaches row {sheet.max_row}: more than {_MAX_ROWS:,} rows below "
                             "its header are not read", Where(book.file, sheet.title),
                             "delete what lies below the fields")
        last = sheet.max_row
        for r, row in enumerate(sheet.iter_rows(min_row=header + 1, max_row=last,
                                                max_col=max(key_col, value_col, unit_col), values_only=True),
                                header + 1):
            key_text = row[key_col - 1]
            if key_text is None or not str(key_text).strip():
                continue
            key = str(key_text).strip().lower().replace(" ", "_")
            key_coord = f"{column_letter(key_col - 1)}{r}"
            value_coord = f"{column_letter(value_col - 1)}{r}"
            unit_coord = f"{column_letter(unit_col - 1)}{r}"
            if key not in self.fields:
                if row[value_col - 1] not in (None, "") and str(row[value_col - 1]).strip():
                    close = difflib.get_close_matches(key, list(self.fields), n=1)
                    raise InputError(f"unknown field {str(key_text).strip()!r}",
                                     book.where(sheet, key_coord),
                                     f"did you mean {close[0]!r}?" if close else "see the template's fields")
                continue  # a section title or a note
            if key in seen:
                raise InputError(f"field {key!r} appears twice (also in {seen[key]})",
                                 book.where(sheet, key_coord, key), "keep one row per field")
            seen[key] = key_coord
            self.cells[key] = (value_coord, unit_coord)
        self.unit_col = unit_col
        # A field whose row lost its word in the field column is found by its defined name, but only
        # where that name still points at such a row: a name left pointing at a row that now holds
        # another field (a row deleted by a script), a section title or a note is ignored, and so is a
        # name a spreadsheet program broke when it deleted the field's row. Column A decides.
        prefix = NAME_PREFIX[sheet_name]
        value_letter = column_letter(value_col - 1)
        taken = {value_coord for value_coord, _ in self.cells.values()}
        for key in self.fields:
            if key in self.cells:
                continue
            target = book.defined(f"{prefix}.{key}")
            if (not target or target[0] != sheet.title or target[1] != value_letter
                    or not header < target[2] <= sheet.max_row):
                continue
            value_coord = f"{value_letter}{target[2]}"
            key_cell = sheet.cell(row=target[2], column=key_col).value
            if value_coord in taken or (key_cell is not None and str(key_cell).strip()):
                continue
            taken.add(value_coord)
            self.cells[key] = (value_coord, f"{column_letter(unit_col - 1)}{target[2]}")

    def where(self, key: str) -> Where:
        if key in self.cells:
            return Where(self.book.file, self.sheet.title, self.cells[key][0], key, self.notes.get(key))
        return Where(self.book.file, self.sheet.title, None, key)

    def raw(self, key: str) -> tuple[Any, Any]:
        if key not in self.cells:
            return None, None
        value_coord, unit_coord = self.cells[key]
        value = self.book.value(self.sheet, value_coord, key)
        unit = self.book.value(self.sheet, unit_coord, key, value_cell=False) if value is not None else None
        return value, unit

    def get(self, key: str) -> Any:
        """The field's value: SI float, text, int, or ``None`` when empty."""
        field = self.fields[key]
        value, unit = self.raw(key)
        where = self.where(key)
        if value is None:
            if field.required:
                what = field.help.rstrip('.').lower()
                raise InputError("required value is missing", where,
                                 f"enter the {what}" if key in self.cells else
                                 f"the sheet has no row {key!r}: add it (field column) with the {what}")
            return None
        unit_where = Where(where.file, where.sheet, self.cells[key][1], key)
        si = convert(field, value, unit, where, unit_where)
        note = _reading_note(field, value, unit)
        if note:
            self.notes[key] = note
        return si

    def sources(self, got: dict[str, Any]) -> dict[str, Where]:
        """Where each field was read; an empty field whose row exists too (the cell to fill)."""
        return {self.fields[k].name: self.where(k) for k, v in got.items() if v is not None or k in self.cells}


def cell_text(value: Any) -> str:
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value).strip()


def _unit_text(unit: Any) -> str:
    return "" if unit is None else cell_text(unit)


def convert(field: Field, value: Any, unit: Any, where: Where, unit_where: Where | None = None) -> Any:
    """One field's cell value (and unit cell) as SI (or text / whole number), checked.

    >>> from sheetpump.workbooks.templates import DATASHEET_FIELDS
    >>> displacement = next(f for f in DATASHEET_FIELDS if f.key == "displacement")
    >>> convert(displacement, 1.2, "in^3/rev", Where())   # 1.2 in³ = 19.66 cm³ (exact inch)
    1.9664...e-05
    """
    unit_where = unit_where or where
    kind = field.kind
    if isinstance(value, bool):
        raise InputError(f"{value!r} is a true/false value, not a {_kind_name(field)}", where)
    if isinstance(value, (_dt.datetime, _dt.date, _dt.time, _dt.timedelta)):
        hint = "format the cell as text and enter the code again" if field.key == "cleanliness" else \
            "format the cell as a number"
        raise InputError(f"the cell holds a date or time, not a {_kind_name(field)}", where, hint)
    if kind == TEXT:
        text = cell_text(value)
        if field.key == "cleanliness":
            parts = cleanliness_parts(text)
            if parts is None:
                raise InputError(f"{text!r} is not an ISO 4406 code", where, "write e.g. '18/16/13'")
            text = "/".join(parts)
        return text
    if kind == CHOICE:
        text = cell_text(value)
        if field.key == "rotation":
            chosen = rotation_word(text)
        else:
            chosen = next((c for c in field.choices if c.lower() == text.lower()), None)
        if chosen is None:
            raise InputError(f"{text!r} is not one of {', '.join(field.choices)}", where, "use the drop-down")
        return chosen
    number, unit_text = split_value(value, unit, field, where, unit_where)
    if isinstance(value, str) and not _unit_text(unit):
        unit_where = where  # the unit was typed in the value cell: blame that cell, not the empty unit cell
    if kind in (INTEGER, COUNT):
        _unitless(field, unit_text, unit_where)
    if kind == INTEGER:
        if not float(number).is_integer() or number < 1:
            raise InputError(f"{number:g} is not a whole number of at least 1", where)
        si = int(number)
    elif kind == COUNT:
        si = number
    elif kind == FRACTION:
        si = _fraction(field, number, unit_text, where, unit_where)
    else:
        assert isinstance(kind, Kind)
        try:
            factor, offset = unit_factor(unit_text, kind)
        except InputError as exc:
            raise exc.at(**vars(unit_where)) from None
        si = number * factor + offset
    return _checked(field, si, where, f"{number:g} {unit_text}".strip())


# --- value and unit validation (issue: values and units that crash or pass) -------------------------

_NO_UNIT = ("", "-", "1")
_PERCENT = ("%", "percent", "pct")
_CURRENCY = re.compile(r"[A-Za-z]{1,5}|[A-Za-z]{0,3}[$€£¥₹₩₽₺]")  # ISO 4217 code, a sign, or both (US$)


def _unitless(field: Field, unit_text: str, unit_where: Where) -> None:
    """A count takes its fixed label (``1/h``, ``dB(A)``) or nothing; a price a currency, never a unit."""
    text = unit_text.strip()
    if text.lower() in _NO_UNIT or text.lower() in (field.label.lower(), field.key.lower()):
        return
    if field.label == "currency":
        measures = physical_unit(text)
        if measures is None and _CURRENCY.fullmatch(text):
            return  # a currency code or sign: EUR, USD, €, US$
        what = f"is {measures}" if measures else "is not a currency"
        raise InputError(f"unit {text!r} {what}; a price takes a currency", unit_where,
                         "write the currency (e.g. EUR) or leave the unit cell empty")
    if field.label == "dB(A)" and text.replace(" ", "").lower() in ("db", "dba", "db(a)"):
        return
    expected = f"{field.label!r}" if field.label else "no unit"
    raise InputError(f"unit {text!r} where {expected} belongs", unit_where,
                     f"give the value in {field.label}" if field.label else "leave the unit cell empty")


def _fraction(field: Field, number: float, unit_text: str, where: Where, unit_where: Where) -> float:
    """A share in % or as a fraction; a share or efficiency of at most 1 in a % cell is a slip."""
    text = unit_text.strip().lower()
    if text in (*_NO_UNIT, "fraction"):
        return number
    if text not in _PERCENT:
        raise InputError(f"unit {unit_text!r} is not '%' or 'fraction'", unit_where)
    if field.check == "share" and 0 < number <= 1:
        raise InputError(f"{number:g} % is hardly meant: did you mean {number * 100:g} %?", where,
                         f"write {number * 100:g} with unit '%', or {number:g} with unit 'fraction'; "
                         f"for {number:g} % itself write {number / 100:g} with unit 'fraction'")
    return number / 100.0


def _reading_note(field: Field, value: Any, unit: Any) -> str | None:
    """How a number with a unit was read, for the field's source: the default unit, or the unit typed."""
    kind = field.kind
    if not isinstance(kind, Kind) or not kind.default:
        return None
    parts = split_number(value) if isinstance(value, str) else (float(value), "")
    if parts is None:
        return None
    number, unit_text = parts[0], parts[1] or _unit_text(unit)
    if not unit_text:
        return f"read as {kind.default} (the default unit)"
    if unit_factor(unit_text, kind) != unit_factor(kind.default, kind):
        return f"typed as {number:g} {unit_text}"
    return None


def _kind_name(field: Field) -> str:
    return field.kind.name if isinstance(field.kind, Kind) else "number"


def split_value(value: Any, unit: Any, field: Field, where: Where, unit_where: Where) -> tuple[float, str]:
    """A number and its unit from a value cell and a unit cell; a unit in the value text must agree."""
    column_unit = _unit_text(unit)
    if isinstance(value, bool):  # TRUE / FALSE is no quantity (Python would read it as 1 / 0)
        raise InputError(f"{value!r} is a true/false value, not a {_kind_name(field)}", where,
                         "enter a number")
    if isinstance(value, (int, float)):
        number = float(value)
        text_unit = ""
    else:
        text = str(value).strip()
        try:
            parts = split_number(text)
        except InputError as exc:
            raise exc.at(**vars(where)) from None
        if parts is None:
            raise InputError(f"{text!r} is text where a {_kind_name(field)} belongs", where,
                             f"enter a number{' (unit in the unit column)' if field.units else ''}")
        number, text_unit = parts
    if not math.isfinite(number):
        raise InputError(f"{number!r} is not a finite number", where)
    if text_unit:
        if column_unit and not _same_unit(text_unit, column_unit, field):
            raise InputError(f"the value says {text_unit!r} but the unit cell says {column_unit!r}", where,
                             "write the unit in one place only")
        return number, text_unit
    return number, column_unit


def _same_unit(a: str, b: str, field: Field) -> bool:
    if a == b:
        return True
    if isinstance(field.kind, Kind):
        try:
            return unit_factor(a, field.kind) == unit_factor(b, field.kind)
        except InputError:
            return False
    return a.lower() == b.lower()


def _checked(field: Field, si: float, where: Where, shown: str = "") -> float:
    # ``shown``: the value as the user wrote it (the SI value would puzzle: 28 cm³ is 2.8e-05 m³).
    shown = shown or f"{si:g}"
    if not math.isfinite(si):
        raise InputError(f"{shown} is not a finite number", where)
    if field.kind is not None and isinstance(field.kind, Kind) and field.kind.offset and si <= 0:
        raise InputError(f"{shown} is at or below absolute zero", where, "check the temperature and its unit")
    if isinstance(field.kind, Kind):
        try:
            check_span(si, field.kind, shown)
        except InputError as exc:
            raise exc.at(**vars(where)) from None
    elif field.span and not field.span[0] <= si <= field.span[1]:
        lo, hi = field.span
        raise InputError(f"{shown} is outside the range sheetpump reads for {field.key}, {lo:g} to {hi:g}", where,
                         "check the value and its unit")
    if field.check == "positive" and not si > 0:
        raise InputError(f"must be greater than zero, not {shown}", where)
    if field.check == "non_negative" and si < 0:
        raise InputError(f"must not be negative, not {shown}", where)
    if field.kind == FRACTION and si > 1:
        raise InputError(f"{si:.0%} is more than 100 %", where,
                         "write e.g. 10 with unit '%', or 0.1 with unit 'fraction'")
    if field.check == "share" and not 0 < si <= 1:
        raise InputError("must be a share above 0 and at most 100 %", where,
                         "write e.g. 10 with unit '%', or 0.1 with unit 'fraction'")
    return si


# --- tables ------------------------------------------------------------------------------------------


def read_table(book: Book, sheet: Any, columns: Sequence[Column]) -> tuple[
        list[tuple[int, dict[str, Any]]], dict[str, str], int]:
    """Rows of a table sheet: ``[(row number, {key: SI value or None})]``, column letters, header row."""
    words = {w for c in columns if c.required for w in c.words}

    def is_header(row: list[Any]) -> bool:
        return any(parse_header(c)[0] in words for c in row if c is not None)

    header, cells = header_row(book, sheet, is_header, "naming the columns")
    while cells and (cells[-1] is None or not str(cells[-1]).strip()):
        cells.pop()
    found = match_columns(cells, columns, file=book.file, sheet=sheet.title, header_row=header, strict=True)
    letters = {key: column_letter(i) for key, (i, _, _) in found.items()}
    _nothing_above(book, sheet, header, len(cells))
    if sheet.max_row - header > MAX_TABLE_ROWS:
        raise InputError(f"the sheet reaches row {sheet.max_row}: more than {MAX_TABLE_ROWS:,} rows below "
                         "its header are not read", Where(book.file, sheet.title),
                         "give a long measured log as a series file (duty_series on the Machine sheet), "
                         "or delete what lies below the table")
    by_key = {c.key: c for c in columns}
    out: list[tuple[int, dict[str, Any]]] = []
    last = sheet.max_row
    for r in range(header + 1, last + 1):
        row: dict[str, Any] = {}
        for key, (_i, factor, offset) in found.items():
            coord = f"{letters[key]}{r}"
            value = book.value(sheet, coord, key)
            if value is None:
                row[key] = None
                continue
            column = by_key[key]
            where = book.where(sheet, coord, key)
            if column.kind is None:
                row[key] = cell_text(value)
                continue
            field = Field(key, column.kind, column.help, check="")
            number, unit_text = split_value(value, None, field, where, where)
            if unit_text:
                try:
                    f2, o2 = unit_factor(unit_text, column.kind)
                except InputError as exc:
                    raise exc.at(**vars(where)) from None
                row[key] = number * f2 + o2
            else:
                row[key] = number * factor + offset
            if not math.isfinite(row[key]):
                raise InputError("not a finite number", where)
            _in_span(row[key], column.kind, number, unit_text or parse_header(cells[found[key][0]])[1] or "",
                     where)
        if any(v is not None for v in row.values()):
            out.append((r, row))
    return out, letters, header


def _in_span(si: float, kind: Kind, number: float, unit_text: str, where: Where) -> None:
    try:
        check_span(si, kind, f"{number:g} {unit_text}".strip())
    except InputError as exc:
        raise exc.at(**vars(where)) from None


def _number_text(text: str) -> bool:
    """Whether a text reads as a number, with or without a unit (an ambiguous comma counts as one)."""
    try:
        return split_number(text) is not None
    except InputError:
        return True


def _nothing_above(book: Book, sheet: Any, header: int, width: int) -> None:
    """Refuse a row of numbers above a table's header row: it would be a row of the table dropped unseen.

    Two numbers make a row (every table needs at least two columns of numbers); a note with one number
    above the header is left alone.
    """
    for r, row in enumerate(sheet.iter_rows(min_row=1, max_row=header - 1, max_col=max(width, 1),
                                            values_only=True), 1):
        numbers = [i for i, value in enumerate(row)
                   if isinstance(value, (int, float, _dt.date, _dt.time, _dt.timedelta))
                   or (isinstance(value, str) and _number_text(value))]
        if len(numbers) >= 2:
            raise InputError(f"row {r} holds values above the header row (row {header})",
                             book.where(sheet, f"{column_letter(numbers[0])}{r}"),
                             "move the header row above the first row of the table")


def column_span(letters: dict[str, str]) -> tuple[str, str]:
    order = sorted(letters.values(), key=lambda s: (len(s), s))
    return order[0], order[-1]


def table_column(rows: list[tuple[int, dict[str, Any]]], key: str, default: float | None, book: Book, sheet: Any,
            letters: dict[str, str], hint: str, rule: str = "non_negative") -> np.ndarray:
    values = np.empty(len(rows))
    for i, (r, row) in enumerate(rows):
        value = row.get(key)
        coord = f"{letters.get(key, 'A')}{r}"
        if value is None:
            if default is None:
                raise InputError("missing value", Where(book.file, sheet.title, coord if key in letters else
                                                        f"row {r}", key), hint)
            value = default
        elif rule == "positive" and not value > 0:  # (value is SI here: not shown, the cell is named)
            raise InputError("must be greater than zero", book.where(sheet, coord, key))
        elif rule == "non_negative" and value < 0:
            raise InputError("must not be negative", book.where(sheet, coord, key))
        values[i] = value
    return values



def performance_table(book: Book, sheet: Any, rows: list[tuple[int, dict[str, Any]]], letters: dict[str, str],
                      header: int, speed: float | None, viscosity: float | None) -> PerformanceTable:
    """A :class:`~sheetpump.datasheet.PerformanceTable` from rows read by :func:`read_table` (speed and
    viscosity [SI]: the values of points that give none)."""
    first, last = column_span(letters)
    where = Where(book.file, sheet.title, f"{first}{header}:{last}{rows[-1][0]}")
    pressure = table_column(rows, "pressure", None, book, sheet, letters, "give the pressure of each point")
    flow = table_column(rows, "flow", None, book, sheet, letters, "give the flow of each point")
    n = table_column(rows, "speed", speed, book, sheet, letters,
                "give a speed column or performance_speed on the Pump sheet", rule="positive")
    nu = table_column(rows, "viscosity", viscosity, book, sheet, letters,
                 "give a viscosity column or performance_viscosity on the Pump sheet", rule="positive")
    power = torque = None
    if "input_power" in letters and any(row.get("input_power") is not None for _, row in rows):
        power = table_column(rows, "input_power", None, book, sheet, letters, "give the power of every point",
                        rule="positive")
    if "torque" in letters and any(row.get("torque") is not None for _, row in rows):
        torque = table_column(rows, "torque", None, book, sheet, letters, "give the torque of every point",
                         rule="positive")
    return PerformanceTable(pressure=pressure, flow=flow, speed=n, viscosity=nu, input_power=power,
                            torque=torque, where=where)
