"""Tables under a header row: the segments of a Duty sheet, the points of a Performance sheet.

:func:`read_table` finds the header row by its columns' words (a unit may stand in the header,
``pressure [bar]``) and reads every row below it as SI (a unit written in a value cell wins over the
header's); it refuses a row of values above the header and a sheet reaching beyond
:data:`MAX_TABLE_ROWS`. :func:`table_column` takes one column as an array (an empty cell takes a default
or is refused, naming the cell); :func:`performance_table` builds a
:class:`~sheetpump.datasheet.PerformanceTable` from the rows.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Sequence
from typing import Any

import numpy as np

from ..datasheet import PerformanceTable
from ..errors import InputError, Where
from ..units import Kind, check_span, split_number, unit_factor
from .book import Book, header_row
from .fields import cell_text, split_value
from .refs import column_letter
from .templates import Column, Field
from .time_series import match_columns, parse_header

__all__ = ["MAX_TABLE_ROWS", "column_span", "performance_table", "read_table", "table_column"]

# Rows below the header of a table (segments, performance points). Every row is read, none is dropped;
# the bound is only against hostile sizes. A long measured log belongs in a series file (duty_series).
MAX_TABLE_ROWS = 100_000


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
    """The first and the last of a table's column letters (``AA`` comes after ``Z``).

    >>> column_span({"pressure": "B", "flow": "AA", "name": "A"})
    ('A', 'AA')
    """
    order = sorted(letters.values(), key=lambda s: (len(s), s))
    return order[0], order[-1]


def table_column(rows: list[tuple[int, dict[str, Any]]], key: str, default: float | None, book: Book, sheet: Any,
            letters: dict[str, str], hint: str, rule: str = "non_negative") -> np.ndarray:
    """One column of rows read by :func:`read_table` as an array [SI]: an empty cell takes ``default``
    or is refused as missing (``hint`` says what to give); ``rule`` (``positive``, ``non_negative``) is
    checked on every value given, naming its cell."""
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
