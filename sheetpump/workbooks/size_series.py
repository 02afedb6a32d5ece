"""The series workbook: one supplier's series of sizes — its blank template and its reader.

(Not to be confused with :mod:`sheetpump.workbooks.time_series`, the reader of measured *time* series.)

Sheet **Series**: a header row ``field | unit | size 1 | size 2 …``; column A the field names of the
datasheet's Pump sheet (plus ``series`` and ``frame``), column B their unit, columns C onward one size
each, the ``model`` row naming the size. A field with a value only in column C holds for every size; a
field with values in several size columns needs one in every size column. Optional sheet **Performance**:
the datasheet's performance columns plus ``model``, the size a point belongs to. A size without a table of
its own takes the table of a size of the same frame, scaled by displacement (an assumption, said wherever
it is used).

Every value goes through the datasheet reader's conversion (:func:`sheetpump.workbooks.fields.convert`)
and cross-field checks (:func:`~sheetpump.workbooks.readers.check_datasheet_fields`), and remembers its
file, sheet and cell.
"""

from __future__ import annotations

import difflib
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

import numpy as np

from ..datasheet import Datasheet, PerformanceTable
from ..errors import InputError, Where
from ..selection import SizeSeries
from .book import Book
from .fields import convert
from .readers import check_datasheet_fields, datasheet_from_fields
from .refs import column_letter
from .tables import performance_table, read_table
from .templates import (
    CHOICE,
    DATASHEET_FIELDS,
    HEADER_ROW,
    PERFORMANCE_COLUMNS,
    PERFORMANCE_SHEET,
    TEXT,
    Column,
    Field,
    write_top,
)
from .writer import STYLES, book_styles, open_book, write_value

__all__ = ["SERIES_FIELDS", "SERIES_SHEET", "is_series_workbook", "read_size_series", "write_series_template"]

SERIES_SHEET = "Series"
#: The rows of the Series sheet: the datasheet's fields, with the series' name and each size's frame.
SERIES_FIELDS: tuple[Field, ...] = (
    *DATASHEET_FIELDS[:1],
    Field("series", TEXT, "Name of the series as the supplier writes it.", section="Identity"),
    DATASHEET_FIELDS[1],
    Field("frame", TEXT, "Frame (housing) of the size: sizes of one frame may share one performance table, "
          "scaled by displacement.", section="Identity"),
    *DATASHEET_FIELDS[2:],
)
#: The Performance sheet's columns: the datasheet's, and the size each point belongs to.
MODEL_COLUMN = Column("model", ("model", "size"), None, "The size (its model) the point belongs to.", required=True)
SERIES_PERFORMANCE_COLUMNS: tuple[Column, ...] = (MODEL_COLUMN, *PERFORMANCE_COLUMNS)
_SIZES = 4  # size columns in the blank template
_MAX_COLUMNS = 200
_MAX_ROWS = 400
_INSTRUCTIONS = {
    SERIES_SHEET: "One series per workbook, one size per column from column C; the model row names the size. "
                  "A value only in column C holds for every size; a value in several size columns needs one "
                  "in every size column. Pick the unit in column B (or write it with the value).",
    PERFORMANCE_SHEET: "Performance tables, one row per point, the model column naming the size. A size without "
                       "its own table takes that of a size of the same frame, scaled by displacement.",
}


# --- template ----------------------------------------------------------------------------------------


def _top(sheet: Any, book: Any, name: str, width: int) -> None:
    write_top(sheet, book, f"sheetpump {name.lower()} sheet (a series of sizes)", _INSTRUCTIONS[name], width)


def write_series_template(target: str | os.PathLike[str],
                          values: Mapping[str, tuple[str | None, Sequence[Any]]] | None = None,
                          table: Sequence[Sequence[Any]] = (), headers: Sequence[str] | None = None) -> Path:
    """Write the blank series workbook to ``target`` (atomically), or a filled-in one.

    ``values``: field key -> ``(unit, [value of size 1, size 2, …])`` (one value: for every size);
    ``table``: rows of the Performance sheet in :data:`SERIES_PERFORMANCE_COLUMNS` order; ``headers``
    its header texts (e.g. with other units).

    >>> import tempfile, openpyxl
    >>> path = write_series_template(tempfile.mkdtemp() + "/series.xlsx")
    >>> openpyxl.load_workbook(path).sheetnames
    ['Series', 'Performance']
    """
    values = values or {}
    sizes = max([_SIZES, *(len(v[1]) for v in values.values())])
    with open_book(target, title="sheetpump series of sizes") as book:
        sheet = book.add_worksheet(SERIES_SHEET)
        _top(sheet, book, SERIES_SHEET, 2 + sizes)
        sheet.set_column(0, 0, 28)
        sheet.set_column(1, 1, 11)
        sheet.set_column(2, 1 + sizes, 14)
        head = book_styles(book)["header"]
        sheet.write_string(HEADER_ROW, 0, "field", head)
        sheet.write_string(HEADER_ROW, 1, "unit", head)
        for s in range(sizes):
            sheet.write_string(HEADER_ROW, 2 + s, f"size {s + 1}", head)
        section_fmt = book.add_format({"bold": True, "italic": True, "top": 1})
        text_input = book.add_format({**STYLES["input"], "num_format": "@"})  # as the templates' text inputs
        row, section = HEADER_ROW + 1, None
        for f in SERIES_FIELDS:
            if f.section != section:
                section = f.section
                sheet.write_string(row, 0, section, section_fmt)
                row += 1
            sheet.write_string(row, 0, f.key)
            need = "Required. " if f.required else ""
            sheet.write_comment(row, 0, need + f.help, {"author": "sheetpump", "x_scale": 2})
            unit, given = values.get(f.key, (None, ()))
            if f.units:
                sheet.write_string(row, 1, unit or f.units[0], book_styles(book)["input"])
                sheet.data_validation(row, 1, row, 1, {
                    "validate": "list", "source": list(f.units), "error_type": "warning", "error_title": "unit",
                    "error_message": "Not in the list: any unit of this kind that sheetpump knows is read."})
            elif f.label:
                sheet.write_string(row, 1, f.label)
            fmt = text_input if f.kind in (TEXT, CHOICE) else book_styles(book)["input"]
            for s in range(sizes):
                write_value(sheet, row, 2 + s, given[s] if s < len(given) else None, fmt)
            if f.choices:
                sheet.data_validation(row, 2, row, 1 + sizes, {
                    "validate": "list", "source": list(f.choices), "error_type": "stop", "error_title": f.key,
                    "error_message": "Choose one of: " + ", ".join(f.choices)})
            row += 1
        sheet.freeze_panes(HEADER_ROW + 1, 2)
        perf = book.add_worksheet(PERFORMANCE_SHEET)
        columns = SERIES_PERFORMANCE_COLUMNS
        _top(perf, book, PERFORMANCE_SHEET, len(columns))
        perf.set_column(0, len(columns) - 1, 18)
        for c, column in enumerate(columns):
            perf.write_string(HEADER_ROW, c, headers[c] if headers and c < len(headers) else column.header, head)
            perf.write_comment(HEADER_ROW, c, ("Required. " if column.required else "") + column.help,
                               {"author": "sheetpump", "x_scale": 2})
        for i in range(max(len(table), 40)):
            for c in range(len(columns)):
                value = table[i][c] if i < len(table) and c < len(table[i]) else None
                write_value(perf, HEADER_ROW + 1 + i, c, value, book_styles(book)["input"])
        perf.freeze_panes(HEADER_ROW + 1, 0)
    return Path(target)


# --- reader ------------------------------------------------------------------------------------------


def _header(book: Book, sheet: Any) -> tuple[int, int, int]:
    """The header row and the columns of ``field`` and ``unit`` (1-based)."""
    rows = sheet.iter_rows(min_row=1, max_row=min(sheet.max_row, 60), max_col=min(sheet.max_column, 64),
                           values_only=True)
    for r, row in enumerate(rows, 1):
        cells = [str(c).strip().lower() if c is not None else "" for c in row]
        if "field" in cells and "unit" in cells:
            return r, cells.index("field") + 1, cells.index("unit") + 1
    raise InputError("no header row 'field | unit | size …' found", Where(book.file, sheet.title),
                     "keep the template's header row (start from `sheetpump template series`)")


@dataclass(frozen=True)
class _Layout:
    """Where a Series sheet keeps its values: the row of each field, the unit column, the size columns
    (1-based)."""

    sheet: Any
    rows: dict[str, int]
    unit_col: int
    first_size: int
    last_col: int

    def cell(self, key: str, c: int) -> str:
        return f"{column_letter(c - 1)}{self.rows[key]}"


def _field_rows(book: Book, sheet: Any, header: int, key_col: int, first_size: int, last_col: int,
                fields: dict[str, Any]) -> dict[str, int]:
    """The row of each field named below the header; an unknown field with values, a repeated field or
    no model row is refused."""
    rows: dict[str, int] = {}
    for r, line in enumerate(sheet.iter_rows(min_row=header + 1, max_row=min(sheet.max_row, header + _MAX_ROWS),
                                             max_col=max(last_col, first_size), values_only=True), header + 1):
        text = line[key_col - 1]
        if text is None or not str(text).strip():
            continue
        key = str(text).strip().lower().replace(" ", "_")
        filled = any(v is not None and str(v).strip() for v in line[first_size - 1:])
        if key not in fields:
            if filled:
                close = difflib.get_close_matches(key, list(fields), n=1)
                raise InputError(f"unknown field {str(text).strip()!r}",
                                 book.where(sheet, f"{column_letter(key_col - 1)}{r}"),
                                 f"did you mean {close[0]!r}?" if close else "see the template's fields")
            continue
        if key in rows:
            raise InputError(f"field {key!r} appears twice (also in row {rows[key]})",
                             book.where(sheet, f"{column_letter(key_col - 1)}{r}", key), "keep one row per field")
        rows[key] = r
    if "model" not in rows:
        raise InputError("no 'model' row: each size column needs its model", Where(book.file, sheet.title),
                         "keep the template's model row")
    return rows


def _raw_values(book: Book, lay: _Layout) -> tuple[dict[str, dict[int, Any]], list[int]]:
    """Each field's cell values by size column, and the size columns that hold any value."""
    raw: dict[str, dict[int, Any]] = {}
    for key, r in lay.rows.items():
        raw[key] = {}
        for c in range(lay.first_size, lay.last_col + 1):
            value = book.value(lay.sheet, f"{column_letter(c - 1)}{r}", key)
            if value is not None:
                raw[key][c] = value
    columns = sorted({c for cells in raw.values() for c in cells})
    if not columns:
        raise InputError("no size columns: the series has no values",
                         book.where(lay.sheet, f"{column_letter(lay.first_size - 1)}{lay.rows['model']}", "model"),
                         "give one size per column from column C, the model row naming it")
    return raw, columns


def _converted(book: Book, lay: _Layout, fields: dict[str, Any], raw: dict[str, dict[int, Any]], columns: list[int]
               ) -> tuple[dict[int, dict[str, Any]], dict[int, dict[str, Where]]]:
    """Every size's values in SI, and where each came from; a value given in the first size column only
    holds for the whole series."""
    sheet, rows, cell = lay.sheet, lay.rows, lay.cell
    got: dict[int, dict[str, Any]] = {c: {} for c in columns}
    origin: dict[int, dict[str, Where]] = {c: {} for c in columns}
    for key, f in fields.items():
        cells = raw.get(key, {})
        shared = len(columns) > 1 and list(cells) == [columns[0]] and key != "model"
        if cells and not shared:
            missing = [c for c in columns if c not in cells]
            if missing:
                raise InputError("a value in some size columns but not in this one",
                                 book.where(sheet, cell(key, missing[0]), key),
                                 "give it in every size column, or only in the first for the whole series")
        for c in columns:
            at = cells and (columns[0] if shared else c)
            if not cells:
                if f.required:
                    where = book.where(sheet, cell(key, c), key) if key in rows else \
                        Where(book.file, sheet.title, None, key)
                    raise InputError("required value is missing", where, f"enter the {f.help.rstrip('.').lower()}")
                got[c][key] = None
                origin[c][key] = book.where(sheet, cell(key, c), key) if key in rows else \
                    Where(book.file, sheet.title, None, key)
                continue
            where = book.where(sheet, cell(key, at), key)
            unit = book.value(sheet, f"{column_letter(lay.unit_col - 1)}{rows[key]}", key, value_cell=False)
            unit_where = book.where(sheet, f"{column_letter(lay.unit_col - 1)}{rows[key]}", key)
            if c == at or not shared:
                got[c][key] = convert(f, cells[at], unit, where, unit_where)
            else:
                got[c][key] = got[columns[0]][key]
            origin[c][key] = where
    return got, origin


def _datasheets(book: Book, fields: dict[str, Any], got: dict[int, dict[str, Any]],
                origin: dict[int, dict[str, Where]], columns: list[int]
                ) -> tuple[list[Datasheet], dict[str, tuple[str, float]], list[str]]:
    """One datasheet per size column, with its performance table (or its frame's, scaled); the sizes whose
    table was scaled, and the notes saying so."""
    tables = _tables(book, {got[c]["model"]: got[c] for c in columns})
    scaled: dict[str, tuple[str, float]] = {}
    notes: list[str] = []
    sizes: list[Datasheet] = []
    by_model = {got[c]["model"]: got[c] for c in columns}
    for c in columns:
        values = got[c]
        model = values["model"]
        table = tables.get(model)
        if table is None and values.get("frame"):
            table, ref = _frame_table(model, values, by_model, tables)
            if table is not None:
                k = values["displacement"] / by_model[ref]["displacement"]
                scaled[model] = (ref, k)
                notes.append(f"{model}: the performance table of {ref} (same frame {values['frame']!r}) scaled by "
                             f"displacement (× {k:.4g}): flow, torque and power taken proportional to "
                             "displacement, efficiencies the same (an assumption)")
        sources = {fields[k].name: w for k, w in origin[c].items() if values.get(k) is not None}
        kept = {k: v for k, v in values.items() if k not in ("series", "frame")}
        sizes.append(datasheet_from_fields(kept, sources, table, book.file))
    return sizes, scaled, notes


def read_size_series(path: str | os.PathLike[str]) -> SizeSeries:
    """Read a series workbook: one :class:`~sheetpump.datasheet.Datasheet` per size (SI units).

    Raises
    ------
    InputError
        Naming the file, sheet, cell and field: an unknown or repeated field, no size column, a value
        missing in one size column, a repeated model name, and every bad value a datasheet refuses.
    """
    book = Book(path)
    sheet = book.sheet(SERIES_SHEET)
    header, key_col, unit_col = _header(book, sheet)
    fields = {f.key: f for f in SERIES_FIELDS}
    first_size = max(key_col, unit_col) + 1
    last_col = min(sheet.max_column, _MAX_COLUMNS)
    rows = _field_rows(book, sheet, header, key_col, first_size, last_col, fields)
    lay = _Layout(sheet, rows, unit_col, first_size, last_col)
    raw, columns = _raw_values(book, lay)
    got, origin = _converted(book, lay, fields, raw, columns)
    seen: dict[str, int] = {}
    for c in columns:
        model = got[c]["model"]
        if model in seen:
            raise InputError(f"model {model!r} names two sizes (also column {column_letter(seen[model] - 1)})",
                             book.where(sheet, lay.cell("model", c), "model"), "give each size its own model name")
        seen[model] = c
    for c in columns:
        check_datasheet_fields(got[c], lambda key, c=c: origin[c][key])
    sizes, scaled, notes = _datasheets(book, fields, got, origin, columns)
    first = got[columns[0]]
    name = " ".join(x for x in (first["supplier"], first.get("series") or "") if x) or Path(book.file).stem
    return SizeSeries(name, tuple(sizes), book.file, scaled, tuple(notes))


def _tables(book: Book, sizes: dict[str, dict[str, Any]]) -> dict[str, PerformanceTable]:
    """The Performance sheet's tables by model."""
    sheet = book.sheet(PERFORMANCE_SHEET, required=False)
    if sheet is None:
        return {}
    rows, letters, header = read_table(book, sheet, SERIES_PERFORMANCE_COLUMNS)
    groups: dict[str, list[tuple[int, dict[str, Any]]]] = {}
    for r, row in rows:
        model = row.get("model")
        where = book.where(sheet, f"{letters['model']}{r}", "model")
        if model is None:
            raise InputError("the point names no size", where, "write the size's model in the model column")
        if model not in sizes:
            close = difflib.get_close_matches(model, list(sizes), n=1)
            raise InputError(f"no size {model!r} on the Series sheet", where,
                             f"did you mean {close[0]!r}?" if close else "use a model of the Series sheet")
        groups.setdefault(model, []).append((r, row))
    out = {}
    for model, group in groups.items():
        values = sizes[model]
        table = performance_table(book, sheet, group, letters, header, values.get("performance_speed"),
                                  values.get("performance_viscosity"))
        out[model] = replace(table, where=Where(book.file, sheet.title,
                                                f"{letters['model']}{group[0][0]}:{letters['model']}{group[-1][0]}",
                                                f"performance of {model}"))
    return out


def _frame_table(model: str, values: dict[str, Any], sizes: dict[str, dict[str, Any]],
                 tables: dict[str, PerformanceTable]) -> tuple[PerformanceTable | None, str]:
    """The table of the size of the same frame nearest in displacement, scaled to this size's."""
    same = [m for m in tables if m != model and sizes[m].get("frame") == values["frame"]]
    if not same:
        return None, ""
    ref = min(same, key=lambda m: abs(np.log(sizes[m]["displacement"] / values["displacement"])))
    t = tables[ref]
    k = values["displacement"] / sizes[ref]["displacement"]
    scaled = PerformanceTable(t.pressure, t.flow * k, t.speed, t.viscosity,
                              None if t.input_power is None else t.input_power * k,
                              None if t.torque is None else t.torque * k, t.where)
    return scaled, ref


def is_series_workbook(path: str | os.PathLike[str]) -> bool:
    """Whether ``path`` is a series workbook (it has a sheet named Series); ``False`` for anything else,
    which the datasheet reader then judges with its own messages."""
    import re
    import zipfile

    try:
        with zipfile.ZipFile(path) as z, z.open("xl/workbook.xml") as part:
            text = part.read(200_000).decode("utf-8", "replace")  # bounded: never a whole (bomb) part
    except Exception:  # not a zip, no workbook part ...: not a series workbook
        return False
    return re.search(r'<(?:\w+:)?sheet\b[^>]*\bname="Series"', text, re.I) is not None
