"""A measured time series (CSV or xlsx) as a duty: each sample held until the next.

The first row names the columns by trade word and unit in brackets, in any order:
``time [s]``, ``pressure [bar]``, ``flow [L/min]``, ``speed [rpm]``, ``temperature [degC]``,
``inlet pressure [bara]`` (any unit of the right kind: ``pressure [psi]``, ``flow [gpm]``,
``temperature [degF]`` ...). Other columns (further channels of a logger) are ignored. ``time``,
``pressure`` and ``flow`` must be there; ``speed``, ``temperature`` and ``inlet pressure`` may instead
come from the application (fixed drive speed, oil temperature, inlet pressure).

Sampling may be irregular. Sample *i* is held from its time until the next sample's, so its duration is
``t[i+1] − t[i]``; the **last sample is held for the median step**. Time must strictly increase (a
repeated or backward timestamp is refused, naming the row). A step longer than ``max_step`` (by default
ten times the median step) is refused as a **gap** in the record: holding one sample across it would
invent a long stretch of constant duty. Split the log there, or accept long steps with ``max_step``
(``duty_series_max_step`` on the Machine sheet).

Reading is columnar: python-calamine for xlsx (about ten times faster than pandas with openpyxl),
``pandas.read_csv`` for CSV, then each column converted with one unit factor in numpy.
"""

from __future__ import annotations

import csv
import datetime as _dt
import math
import os
import re
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

import numpy as np

from ..duty import Duty
from ..errors import InputError, Where
from ..units import DURATION, Kind, decimal_comma, from_si, outside_span, span_text, unit_factor
from .refs import column_letter
from .safe import check_file, check_sheet_extent, sheet_members
from .templates import SERIES_COLUMNS, Column

__all__ = ["DEFAULT_GAP_FACTOR", "match_columns", "parse_header", "read_csv_table", "read_series",
           "read_xlsx_table"]

#: A step longer than this many median steps is a gap (unless ``max_step`` says otherwise).
DEFAULT_GAP_FACTOR = 10.0

_HEADER = re.compile(r"^\s*(.*?)\s*\[\s*(.*?)\s*\]\s*$")


def parse_header(text: Any) -> tuple[str, str | None]:
    """Split a header cell into its trade word (lower case) and unit: ``"Pressure [psi]"`` → ``("pressure", "psi")``.

    >>> parse_header("inlet pressure [bara]")
    ('inlet pressure', 'bara')
    >>> parse_header(" Name ")
    ('name', None)
    """
    text = "" if text is None else str(text)
    match = _HEADER.match(text)
    if match:
        return " ".join(match.group(1).lower().split()), match.group(2)
    return " ".join(text.lower().split()), None


def match_columns(headers: Sequence[Any], columns: Sequence[Column], *, file: str, sheet: str | None,
                  header_row: int, first_col: int = 0, strict: bool = False
                  ) -> dict[str, tuple[int, float, float]]:
    """Find each known column in a header row: ``key -> (index, factor, offset)`` (SI = x·factor + offset).

    ``strict`` refuses unknown non-empty headers (our own tables) instead of ignoring them (loggers).
    Raises :class:`InputError` for a duplicated column, a missing or wrong unit, or a missing required
    column, naming the header cell.
    """
    words = {w: c for c in columns for w in c.words}
    found: dict[str, tuple[int, float, float]] = {}
    cells: dict[str, str] = {}
    for i, text in enumerate(headers):
        word, unit = parse_header(text)
        cell = f"{column_letter(first_col + i)}{header_row}"
        where = Where(file, sheet, cell)
        column = words.get(word)
        if column is None:
            if strict and word:
                raise InputError(f"unknown column {str(text).strip()!r}", where,
                                 "known columns: " + ", ".join(c.header for c in columns))
            continue
        if column.key in found:
            raise InputError(f"column {column.words[0]!r} appears twice (also {cells[column.key]})", where,
                             "keep one of them")
        if column.kind is None:
            found[column.key] = (i, 1.0, 0.0)
        else:
            if not unit:
                raise InputError(f"column {word!r} has no unit", Where(file, sheet, cell, column.key),
                                 f"write the unit in brackets, e.g. {column.header!r}")
            try:
                factor, offset = unit_factor(unit, column.kind)
            except InputError as exc:
                raise exc.at(file=file, sheet=sheet, cell=cell, field=column.key) from None
            found[column.key] = (i, factor, offset)
        cells[column.key] = cell
    missing = [c.header for c in columns if c.required and c.key not in found]
    if missing:
        raise InputError("missing column " + ", ".join(repr(m) for m in missing),
                         Where(file, sheet, f"row {header_row}" if sheet is None else None),
                         "name the columns in the header row by trade word and unit, e.g. "
                         + ", ".join(c.header for c in columns[:3]))
    return found


def _numeric(values: np.ndarray, key: str, *, file: str, sheet: str | None, col: str,
             row0: int) -> np.ndarray:
    """An object/float column as floats; refuse text, empty cells and non-finite numbers by cell."""
    if values.dtype.kind in "fiu":
        arr = values.astype(float, copy=False)
    else:
        try:
            arr = values.astype(float)
        except (TypeError, ValueError):
            arr = None
        if arr is None or (values.dtype == object and _has_bool(values)):
            for i, v in enumerate(values):  # error path only: find the first bad cell
                if isinstance(v, bool) or not (isinstance(v, (int, float, np.integer, np.floating))
                                               or _is_number_text(v)):
                    what = "an empty cell" if v is None or (isinstance(v, str) and not v.strip()) else repr(v)
                    raise InputError(f"{what} where a number belongs", Where(file, sheet, f"{col}{row0 + i}", key),
                                     "write the number alone; the unit belongs in the header, e.g. "
                                     "'pressure [bar]'")
    bad = ~np.isfinite(arr)
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise InputError("an empty cell or a non-finite number where a number belongs",
                         Where(file, sheet, f"{col}{row0 + i}", key), "give every sample a finite number")
    return arr


def _is_number_text(v: Any) -> bool:
    if not isinstance(v, str):
        return False
    try:
        float(v)
    except ValueError:
        return False
    return True


def _has_bool(values: np.ndarray) -> bool:
    return any(type(v) is bool for v in values[:1000])


def _time_column(values: np.ndarray) -> np.ndarray:
    # Logs from a spreadsheet may hold date-times: seconds since the first sample.
    if values.dtype == object and len(values) and isinstance(values[0], _dt.datetime):
        import pandas as pd

        try:
            stamps = pd.to_datetime(values)
        except (TypeError, ValueError):
            return values
        return np.asarray((stamps - stamps[0]).total_seconds(), dtype=float)
    return values


def read_csv_table(path: Path) -> tuple[list[str], dict[int, np.ndarray]]:
    """A CSV file's header texts and its columns by position (comma or semicolon; decimal commas with
    semicolons), for every reader of tables with a ``word [unit]`` header row.

    Commas in numbers follow :func:`sheetpump.units.decimal_comma`: in a semicolon-separated file a
    comma is a decimal comma, and a number that could group thousands (``1,250``) is refused naming its
    row and column; in a comma-separated file a row with more values than the header (a decimal comma
    splitting a number) is refused naming its row and column.
    """
    import pandas as pd

    with open(path, "rb") as handle:
        head = handle.read(1 << 16)
    encoding = "utf-8-sig"
    try:
        sample = head.decode(encoding)
    except UnicodeDecodeError:
        encoding = "cp1252"
        sample = head.decode(encoding)
    first = sample.splitlines()[0] if sample.splitlines() else ""
    try:
        sep = csv.Sniffer().sniff(first, delimiters=",;\t").delimiter
    except csv.Error:
        sep = ","
    # A semicolon-separated file from a European locale writes decimal commas.
    decimal = "," if sep == ";" and re.search(r"\d,\d", sample) else "."
    try:
        # pandas' C parser skips a UTF-8 BOM itself and decodes UTF-8 natively ("utf-8-sig" would go
        # through Python's codec), and its number parser skips leading spaces: both options cost time.
        frame = pd.read_csv(path, sep=sep, decimal=decimal, encoding="utf-8" if encoding == "utf-8-sig" else encoding,
                            keep_default_na=False, na_values=[""])
    except pd.errors.ParserError as exc:
        _refuse_ragged(path, sep, encoding, exc)
        raise InputError(f"the CSV file cannot be read ({str(exc).strip().splitlines()[-1]})",
                         Where(file=str(path))) from None
    except (ValueError, UnicodeDecodeError) as exc:
        raise InputError(f"the CSV file cannot be read ({str(exc).strip().splitlines()[-1]})",
                         Where(file=str(path))) from None
    if not frame.index.equals(pd.RangeIndex(len(frame))):  # more values than headers in every row: pandas
        _refuse_ragged(path, sep, encoding, None)     # would quietly take the first as an index
    if decimal == ",":
        _refuse_thousands(path, encoding)
    headers = [str(c) for c in frame.columns]
    data = {i: frame.iloc[:, i].to_numpy() for i in range(len(headers))}
    return headers, data


def _refuse_ragged(path: Path, sep: str, encoding: str, exc: Exception | None) -> None:
    """Name the first row whose number of values differs from the header's (error path only)."""
    with open(path, newline="", encoding=encoding, errors="replace") as handle:
        rows = csv.reader(handle, delimiter=sep)
        header = next(rows, [])
        good: list[list[str]] = []
        for number, row in enumerate(rows, 2):
            if len(row) == len(header) or not any(c.strip() for c in row):
                if len(good) < 1000:
                    good.append(row)
                continue
            split = _decimal_split(row, good)
            col = split if split is not None else min(len(row), len(header)) - 1
            name = header[col].strip() if col < len(header) else ""
            decimal = (f": is {row[split].strip()},{row[split + 1].strip()} a number with a decimal comma?"
                       if split is not None and sep == "," else "")
            raise InputError(f"row {number} has {len(row)} values where the header names {len(header)} "
                             f"columns{decimal}", Where(str(path), None, f"{column_letter(col)}{number}",
                                                        name or None),
                             "write decimal points in a comma-separated file, or separate the columns by "
                             "semicolons" if sep == "," else "give every row one value per column")
    if exc is not None:
        return
    raise InputError("the rows have more values than the header names columns", Where(file=str(path)),
                     "give every column a header")


def _decimal_split(row: list[str], good: list[list[str]]) -> int | None:
    """Where a decimal comma most likely split a number: of the places where two whole numbers meet, the
    one whose mended row lies nearest (in ratio, column by column) the well-formed rows read so far."""
    places = [i for i in range(len(row) - 1)
              if re.fullmatch(r"\s*[+-]?\d+", row[i]) and re.fullmatch(r"\d+\s*", row[i + 1])]
    if len(places) <= 1 or not good:
        return places[0] if places else None
    typical = []
    for col in range(len(good[0])):
        numbers = [abs(float(r[col])) for r in good if col < len(r) and _is_number_text(r[col]) and float(r[col])]
        typical.append(float(np.median(numbers)) if numbers else None)

    def cost(i: int) -> float:
        mended = [*row[:i], f"{row[i].strip()}.{row[i + 1].strip()}", *row[i + 2:]]
        total = 0.0
        for value, ref in zip(mended, typical, strict=False):
            if ref and _is_number_text(value) and float(value):
                total += abs(math.log(abs(float(value)) / ref))
        return total

    return min(places, key=cost)


_THOUSANDS_FIELD = re.compile(r'(?m)(?:^|;)[ \t]*"?([+-]?[1-9]\d{0,2},\d{3})"?[ \t]*(?=;|\r?$)')


def _refuse_thousands(path: Path, encoding: str) -> None:
    """In a file with decimal commas, refuse a number that could group thousands (1,250), by row and column."""
    text = path.read_text(encoding=encoding, errors="replace")
    match = _THOUSANDS_FIELD.search(text)
    if match is None:
        return
    start = text.rfind("\n", 0, match.start(1)) + 1
    row = text.count("\n", 0, match.start(1)) + 1
    col = text.count(";", start, match.start(1))
    header = text.split("\n", 1)[0].split(";")
    name = header[col].strip().lstrip("\ufeff") if col < len(header) else None
    try:
        decimal_comma(match.group(1))
    except InputError as exc:
        raise exc.at(file=str(path), cell=f"{column_letter(col)}{row}", field=name or None) from None


def read_xlsx_table(path: Path, sheet: str | None) -> tuple[str, list[Any], np.ndarray, int, int]:
    """A sheet's table through calamine: ``(sheet name, header row, body, header row number, first column)``;
    the first sheet when ``sheet`` is None. The file must have passed :func:`~.safe.check_file`."""
    from python_calamine import CalamineWorkbook

    members = sheet_members(path)
    if not members:
        raise InputError("the workbook has no sheets", Where(file=str(path)))
    if sheet is None:
        name = next(iter(members))
    else:
        matches = [n for n in members if n == sheet] or [n for n in members if n.lower() == sheet.lower()]
        if not matches:
            raise InputError(f"no sheet {sheet!r}", Where(file=str(path)),
                             "sheets: " + ", ".join(members))
        name = matches[0]
    check_sheet_extent(path, members[name], sheet=name)
    try:
        book = CalamineWorkbook.from_path(str(path))
        grid = book.get_sheet_by_name(name)
        rows = grid.to_python()
        start = grid.start or (0, 0)
    except Exception as exc:  # calamine raises its own error kinds on damaged parts
        raise InputError(f"the sheet cannot be read ({type(exc).__name__}: {exc})",
                         Where(file=str(path), sheet=name)) from None
    if not rows:
        raise InputError("the sheet is empty", Where(file=str(path), sheet=name))
    table = np.array(rows, dtype=object)
    if table.ndim != 2:
        table = np.array([list(r) + [""] * (max(map(len, rows)) - len(r)) for r in rows], dtype=object)
    return name, list(table[0]), table[1:], int(start[0]) + 1, int(start[1])


def read_series(path: str | os.PathLike[str], *, sheet: str | None = None,
                defaults: Mapping[str, float | None] | None = None, max_step: float | None = None,
                wraps: bool = True) -> Duty:
    """Read a measured time series (``.csv`` or ``.xlsx``/``.xlsm``) as a :class:`~sheetpump.duty.Duty`.

    Sample *i* lasts ``t[i+1] − t[i]`` [s]; the last sample lasts the median step. ``start`` holds the
    samples' times [s] as logged.

    Parameters
    ----------
    path : path
        The CSV or workbook file.
    sheet : str, optional
        Sheet of a workbook (default: the first).
    defaults : mapping, optional
        SI values for signals without a column: ``speed`` [rev/s], ``temperature`` [K],
        ``inlet_pressure`` [Pa absolute].
    max_step : float, optional
        Longest step between samples accepted [s] (default: ten times the median step).
    wraps : bool
        Whether the record is one cycle that repeats.

    Raises
    ------
    InputError
        Naming the file, sheet and cell: unreadable file, missing column, text or empty cells, time not
        strictly increasing, a gap, fewer than two samples, negative pressure/flow/speed.

    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "log.csv"
    >>> _ = p.write_text("time [s],pressure [bar],flow [L/min],speed [rpm],temperature [degC],"
    ...                  "inlet pressure [bara]\\n0,100,40,1500,50,0.9\\n2,200,40,1500,50,0.9\\n"
    ...                  "3,150,40,1500,50,0.9\\n")
    >>> duty = read_series(p)
    >>> duty.duration.tolist(), duty.pressure.tolist()
    ([2.0, 1.0, 1.5], [10000000.0, 20000000.0, 15000000.0])
    """
    path = Path(path)
    kind = check_file(path, allow_csv=True)
    file = str(path)
    if kind == "csv":
        sheet_name = None
        headers, data = read_csv_table(path)
        row0, col0 = 2, 0
        nrows = len(next(iter(data.values()))) if data else 0
    else:
        sheet_name, headers, table, header_row, col0 = read_xlsx_table(path, sheet)
        row0 = header_row + 1
        data = {i: table[:, i] for i in range(table.shape[1])}
        nrows = table.shape[0]
    found = match_columns(headers, SERIES_COLUMNS, file=file, sheet=sheet_name, header_row=row0 - 1,
                          first_col=col0)
    if nrows < 2:
        raise InputError("the time series needs at least two samples", Where(file, sheet_name))
    defaults = dict(defaults or {})
    signals: dict[str, np.ndarray] = {}
    letters: dict[str, str] = {}
    for column in SERIES_COLUMNS:
        if column.key not in found:
            value = defaults.get(column.key)
            if value is None:
                raise InputError(f"missing column {column.header!r}", Where(file, sheet_name, field=column.key),
                                 f"add the column, or give {_DEFAULT_FIELD[column.key]} on the Machine sheet")
            signals[column.key] = np.full(nrows, float(value))
            continue
        index, factor, offset = found[column.key]
        letter = column_letter(col0 + index)
        letters[column.key] = letter
        raw = data[index]
        if column.key == "time":
            raw = _time_column(raw)
        values = _numeric(raw, column.key, file=file, sheet=sheet_name, col=letter, row0=row0)
        if factor != 1.0 or offset:
            values = values * factor  # a new array: the in-place offset below touches only ours
            if offset:
                values += offset
        _check_signal(column, values, file, sheet_name, letter, row0)
        signals[column.key] = values
    t = signals["time"]
    # durations in one array: step i = t[i+1] - t[i], the last one filled with the median step below
    duration = np.empty_like(t)
    with np.errstate(over="ignore", invalid="ignore"):  # 1e308 - (-1e308): refused below as a step too long
        step = np.subtract(t[1:], t[:-1], out=duration[:-1])
    bad = np.flatnonzero(step <= 0)
    if bad.size:
        i = int(bad[0])
        what = "repeats" if step[i] == 0 else "goes backwards"
        raise InputError(f"time {what} from row {row0 + i} to row {row0 + i + 1}",
                         Where(file, sheet_name, f"{letters['time']}{row0 + i + 1}", "time"),
                         "sort the log by time and remove repeated samples")
    long = outside_span(step, DURATION)
    if long is not None:
        raise InputError(f"a step of {step[long]:g} s from row {row0 + long} to row {row0 + long + 1} is outside the "
                         f"range sheetpump reads for a duration, {span_text(DURATION)}",
                         Where(file, sheet_name, f"{letters['time']}{row0 + long + 1}", "time"),
                         "check the time column and its unit")
    median = float(np.median(step))
    limit = DEFAULT_GAP_FACTOR * median if max_step is None else float(max_step)
    gaps = np.flatnonzero(step > limit)
    if gaps.size:
        i = int(gaps[0])
        raise InputError(f"gap in the time series: {step[i]:g} s from row {row0 + i} to row {row0 + i + 1} "
                         f"({gaps.size} step(s) longer than {limit:g} s; median step {median:g} s)",
                         Where(file, sheet_name, f"{letters['time']}{row0 + i + 1}", "time"),
                         "split the log at the gap, or set duty_series_max_step on the Machine sheet")
    duration[-1] = median
    where = Where(file, sheet_name)
    return Duty(duration=duration, pressure=signals["pressure"], flow=signals["flow"],
                speed=signals["speed"], temperature=signals["temperature"],
                inlet_pressure=signals["inlet_pressure"], start=t, wraps=wraps, source="series",
                columns=letters, where=where)


def _check_span(values: np.ndarray, column: Column, file: str, sheet: str | None, letter: str, row0: int) -> None:
    """Refuse the first value outside its kind's span (:func:`sheetpump.units.outside_span`), by cell."""
    kind = column.kind
    if kind is None:
        return
    i = outside_span(values, kind)
    if i is not None:
        shown = f"{from_si(float(values[i]), kind):g} {kind.default}"
        raise InputError(f"{column.words[0]} {shown} is outside the range sheetpump reads for a "
                         f"{kind.name}, {span_text(kind)}", Where(file, sheet, f"{letter}{row0 + i}", column.key),
                         "check the value and the unit in the header")


_DEFAULT_FIELD = {"speed": "drive_speed", "temperature": "oil_temperature", "inlet_pressure": "inlet_pressure",
                  "pressure": "-", "flow": "-", "time": "-"}


def _check_signal(column: Column, values: np.ndarray, file: str, sheet: str | None, letter: str,
                  row0: int) -> None:
    """Refuse values that mean nothing: negative pressure/flow/speed, temperature at or below 0 K."""
    kind: Kind | None = column.kind
    if column.key == "time":
        return
    _check_span(values, column, file, sheet, letter, row0)
    if column.key in ("temperature", "inlet_pressure"):
        bad = values <= 0.0
        rule = "at or below absolute zero" if column.key == "temperature" else "not above zero (absolute)"
    else:
        bad = values < 0.0
        rule = "negative"
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise InputError(f"{column.words[0]} is {rule}", Where(file, sheet, f"{letter}{row0 + i}", column.key),
                         f"give a {kind.name if kind else column.key} that is physically possible")
