"""Reading a measured performance table (CSV or a sheet of a workbook) into a :class:`MeasuredTable`.

A header row names each column by its trade word and its unit in brackets, in any order, any unit of
the right kind:

=====================  ============================  =========================================
column                 e.g.                          needed
=====================  ============================  =========================================
``speed``              ``speed [rpm]``               yes (or ``--speed`` for the whole table)
``pressure``           ``pressure [psi]``            yes
``flow``               ``flow [gpm]``                yes
``torque``             ``torque [lbf*in]``           one of torque and input power
``input power``        ``input power [kW]``
``viscosity``          ``viscosity [cSt]``           one of viscosity and temperature (or
``temperature``        ``temperature [degC]``        ``--viscosity``); temperature needs the oil
``note``               ``note``                      no (text, ignored)
=====================  ============================  =========================================

Where both torque and input power are given, the torque is used. Where both viscosity and
temperature are given, the viscosity is used and the temperature corrects the oil's density.

In a workbook the header row is the first row, among the first :data:`HEADER_SEARCH_ROWS`, that names
two or more known columns (so a title, a caution or instructions may sit above the table, as on the
Performance sheet of sheetpump's datasheet template). Without ``--sheet`` the first sheet holding such a
row is read. An empty row is skipped; an empty cell in a row with values is a missing value (the point is
flagged and left out); text in a number column is refused, naming the cell.

The header parsing (:func:`sheetpump.workbooks.time_series.match_columns`) and the guarded opening of the file
(:mod:`sheetpump.workbooks.safe`) are those of the time-series reader.
"""

from __future__ import annotations

import datetime as _dt
import os
import re
from pathlib import Path
from typing import Any

import numpy as np

from .. import units as u
from ..errors import InputError, Where
from ..evaluation import MeasuredTable
from .refs import column_letter
from .safe import check_file, sheet_members
from .templates import Column
from .time_series import match_columns, parse_header, read_csv_table, read_xlsx_table

__all__ = ["HEADER_SEARCH_ROWS", "MEASURED_COLUMNS", "read_measured"]

#: Columns of a measured performance table.
MEASURED_COLUMNS: tuple[Column, ...] = (
    Column("speed", ("speed", "shaft speed"), u.SPEED, "Shaft speed of the point."),
    Column("pressure", ("pressure", "pressure rise"), u.PRESSURE, "Pump pressure (outlet above inlet).",
           required=True),
    Column("flow", ("flow", "effective flow"), u.FLOW, "Delivered flow.", required=True),
    Column("torque", ("torque", "input torque"), u.TORQUE, "Shaft input torque."),
    Column("input_power", ("input power", "power"), u.POWER, "Shaft input power."),
    Column("viscosity", ("viscosity", "kinematic viscosity"), u.VISCOSITY, "Oil viscosity at the point."),
    Column("temperature", ("temperature", "oil temperature"), u.TEMPERATURE, "Oil temperature at the point."),
    Column("note", ("note", "remark"), None, "Free text, not read."),
)

#: Rows of a sheet searched for the header row.
HEADER_SEARCH_ROWS = 30

_NUMBER_KEYS = ("speed", "pressure", "flow", "torque", "input_power", "viscosity", "temperature")
_PANDAS_DUPLICATE = re.compile(r"(\])\.\d+$")  # pandas renames a repeated header "x [u]" to "x [u].1"


def _known(text: Any) -> bool:
    word, unit = parse_header(text)
    return unit is not None and any(word in c.words for c in MEASURED_COLUMNS)


def _header_index(rows: list[list[Any]]) -> int | None:
    for i, row in enumerate(rows[:HEADER_SEARCH_ROWS]):
        if sum(_known(v) for v in row) >= 2:
            return i
    return None


def _empty(v: Any) -> bool:
    return v is None or (isinstance(v, float) and v != v) or (isinstance(v, str) and not v.strip())


def _numbers(values: Any, key: str, file: str, sheet: str | None, letter: str, rows: np.ndarray) -> np.ndarray:
    """A column as floats: empty cells NaN; text, true/false and dates refused, naming the cell."""
    values = np.asarray(values)
    if values.dtype.kind in "fiu":  # parsed as numbers already (a CSV column): no cell to look at one by one
        out = values.astype(float)
        bad = np.isinf(out)
        if bad.any():
            i = int(np.flatnonzero(bad)[0])
            raise InputError(f"{float(values[i])!r} is not a finite number",
                             Where(file, sheet, f"{letter}{rows[i]}", key))
        return out
    values = values.astype(object)
    if set(map(type, values)) <= {float, int, type(None)}:  # a workbook's numbers and empty cells
        out = np.array([np.nan if v is None else v for v in values], dtype=float)
        bad = np.isinf(out)
        if not bad.any():
            return out
    out = np.full(values.size, np.nan)
    for i, v in enumerate(values):
        if _empty(v):
            continue
        where = Where(file, sheet, f"{letter}{rows[i]}", key)
        if isinstance(v, (bool, np.bool_)):
            raise InputError(f"{v!r} is a true/false value where a number belongs", where)
        if isinstance(v, (_dt.date, _dt.time, _dt.timedelta)):
            raise InputError("a date or time where a number belongs", where)
        if isinstance(v, (int, float, np.integer, np.floating)):
            x = float(v)
        else:
            try:
                x = float(str(v).strip())
            except ValueError:
                raise InputError(f"{str(v).strip()!r} is text where a number belongs", where,
                                 "write the number alone; the unit belongs in the header, e.g. 'pressure [bar]'"
                                 ) from None
        if not np.isfinite(x):
            raise InputError(f"{v!r} is not a finite number", where)
        out[i] = x
    return out


def _check_span(si: np.ndarray, key: str, file: str, sheet: str | None, letter: str, rows: np.ndarray) -> None:
    """Refuse the first value outside its kind's span (empty cells, NaN here, are allowed), naming its cell."""
    kind = next(c.kind for c in MEASURED_COLUMNS if c.key == key)
    if kind is None:
        return
    filled = np.flatnonzero(~np.isnan(si))
    i = u.outside_span(si[filled], kind)
    if i is not None:
        j = int(filled[i])
        raise InputError(f"{u.from_si(float(si[j]), kind):g} {kind.default} is outside the range sheetpump reads "
                         f"for a {kind.name}, {u.span_text(kind)}", Where(file, sheet, f"{letter}{rows[j]}", key),
                         "check the value and the unit in the header")


def _grid_xlsx(path: Path, sheet: str | None) -> tuple[str, list[list[Any]], int, int]:
    """(sheet name, rows of cells, 1-based row of the first row, 0-based first column)."""
    name, headers, table, first_row, first_col = read_xlsx_table(path, sheet)
    rows = [list(headers), *(list(r) for r in table)]
    return name, rows, first_row, first_col


def _choose_sheet(path: Path) -> str | None:
    """The first sheet that holds a header row of a measured table (None: none does)."""
    refused: InputError | None = None
    for name in sheet_members(path):
        try:
            _, rows, _, _ = _grid_xlsx(path, name)
        except InputError as exc:
            refused = refused or exc
            continue
        if _header_index(rows) is not None:
            return name
    if refused is not None:  # a sheet that could not be read may be the table: say why, not "no table"
        raise refused
    return None


def read_measured(path: str | os.PathLike[str], *, sheet: str | None = None,
                  speed: float | None = None) -> MeasuredTable:
    """Read a measured performance table from a ``.csv`` file or a sheet of an ``.xlsx``/``.xlsm`` workbook.

    Parameters
    ----------
    path : path
        The CSV or workbook file (opened through :func:`sheetpump.workbooks.safe.check_file`).
    sheet : str, optional
        Sheet of a workbook; default the first sheet holding a table's header row.
    speed : float, optional
        Speed of every point [rev/s] for a table without a speed column.

    Returns
    -------
    MeasuredTable
        SI arrays, the file rows of the points, the column letters and the units as written.

    Raises
    ------
    InputError
        Naming the file, sheet and cell: an unreadable file, an unknown column word, a unit of the
        wrong kind, a column twice, a missing column, text in a number column, no points.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "bench.csv"
    >>> _ = p.write_text("pressure [psi],speed [rpm],flow [gpm],torque [lbf*in],viscosity [cSt]\\n"
    ...                  "1000,1500,10,200,32\\n3000,1500,9.8,560,32\\n")
    >>> t = read_measured(p)
    >>> round(float(t.pressure[1]) / 1e5, 3), t.rows.tolist(), t.columns["torque"]
    (206.843, [2, 3], 'D')
    """
    path = Path(path)
    kind = check_file(path, allow_csv=True)
    file = str(path)
    if kind == "csv":
        sheet_name = None
        headers, data = read_csv_table(path)
        headers = [_PANDAS_DUPLICATE.sub(r"\1", h) for h in headers]
        count = len(next(iter(data.values()))) if data else 0
        columns = [np.asarray(data[i]) for i in range(len(headers))]
        header_row, first_col = 1, 0
    else:
        if sheet is None:
            sheet = _choose_sheet(path)
        sheet_name, rows, first_row, first_col = _grid_xlsx(path, sheet)
        at = _header_index(rows)
        at = 0 if at is None else at
        header_row = first_row + at
        headers = list(rows[at])
        body = rows[at + 1:]
        width = len(headers)
        columns = [np.array([r[i] if i < len(r) else None for r in body], dtype=object) for i in range(width)]
        count = len(body)
    found = match_columns(headers, MEASURED_COLUMNS, file=file, sheet=sheet_name, header_row=header_row,
                          first_col=first_col, strict=True)
    row_numbers = np.arange(header_row + 1, header_row + 1 + count)
    # Rows with no value in any known column are skipped (blank separators, formatting-only rows).
    keep = np.zeros(count, dtype=bool)
    for key, (index, _, _) in found.items():
        if key in _NUMBER_KEYS:
            column = columns[index]
            keep |= (~np.isnan(column) if column.dtype.kind == "f" else
                     np.ones(count, dtype=bool) if column.dtype.kind in "iu" else
                     np.array([not _empty(v) for v in column], dtype=bool))
    row_numbers = row_numbers[keep]
    if row_numbers.size == 0:
        raise InputError("the table has no points (no row below the header holds a value)",
                         Where(file, sheet_name, f"row {header_row + 1}" if sheet_name is None else None),
                         "add one row per measured point below the header")
    values: dict[str, np.ndarray] = {}
    letters: dict[str, str] = {}
    units: dict[str, str] = {}
    for key, (index, factor, offset) in found.items():
        if key not in _NUMBER_KEYS:
            continue
        letter = column_letter(first_col + index)
        raw = _numbers(columns[index][keep], key, file, sheet_name, letter, row_numbers)
        values[key] = raw * factor + offset
        _check_span(values[key], key, file, sheet_name, letter, row_numbers)
        letters[key] = letter
        units[key] = parse_header(headers[index])[1] or ""
    # A column with a header but no value in any row (the template's spare torque or power column) is
    # as good as absent: otherwise it would hide the other one.
    for key in ("torque", "input_power"):
        if key in values and np.isnan(values[key]).all():
            values.pop(key)
    where = Where(file, sheet_name)
    notes = []
    if "speed" not in values:
        if speed is None:
            raise InputError("missing column 'speed [rpm]'", where,
                             "add the speed of each point, or give --speed for the whole table")
        values["speed"] = np.full(row_numbers.size, float(speed))
        notes.append(f"speed {speed * 60:g} rpm at every point (given; no speed column)")
    if "torque" not in values and "input_power" not in values:
        raise InputError("missing column 'torque [N*m]' or 'input power [kW]'", where,
                         "add the input torque or the input power of each point")
    if "torque" in values and "input_power" in values:
        values.pop("input_power")
        notes.append("both torque and input power given: the torque is used")
    return MeasuredTable(
        speed=values["speed"], pressure=values["pressure"], flow=values["flow"], torque=values.get("torque"),
        input_power=values.get("input_power"), viscosity=values.get("viscosity"),
        temperature=values.get("temperature"), rows=row_numbers, columns=letters, units=units, file=file,
        sheet=sheet_name, notes=tuple(notes))
