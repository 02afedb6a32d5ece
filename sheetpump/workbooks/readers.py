"""Readers of the workbooks a user fills in: a pump datasheet and an application.

:func:`read_datasheet` turns a datasheet workbook (sheets "Pump" and, optionally, "Performance") into a
:class:`~sheetpump.datasheet.Datasheet`; :func:`read_application` turns an application workbook (sheets
"Machine" and "Duty", or a measured series named on the Machine sheet) into an
:class:`~sheetpump.duty.Application`. Both are SI throughout, and both remember for every value the file,
sheet and cell it came from (``sources``; ``Duty.rows`` for segments).
"""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path
from typing import Any

from ..datasheet import Datasheet, PerformanceTable
from ..duty import Application, Duty, Oil
from ..errors import InputError, PhysicsError, Where, as_input_error
from ..physics.fluid import MINERAL_OIL_DENSITY_15
from ..suction import line_from_fields
from .book import Book
from .fields import Fields
from .tables import column_span, performance_table, read_table, table_column
from .templates import (
    APPLICATION_FIELDS,
    DATASHEET_FIELDS,
    DUTY_COLUMNS,
    DUTY_SHEET,
    MACHINE_SHEET,
    PERFORMANCE_COLUMNS,
    PERFORMANCE_SHEET,
    PUMP_SHEET,
)
from .time_series import read_series

__all__ = [
    "check_datasheet_fields",
    "datasheet_from_fields",
    "read_application",
    "read_datasheet",
]


#: What to write when a supplier states an intermittent pressure without its time limits.
_NO_INTERMITTENT_LIMITS = ("if the supplier states none, ask for them; until then leave pressure_intermittent "
                           "empty, so the continuous rating applies everywhere (the safe reading)")


def read_datasheet(path: str | os.PathLike[str]) -> Datasheet:
    """Read a datasheet workbook into a :class:`~sheetpump.datasheet.Datasheet` (SI units).

    Checks beyond each value: an intermittent pressure needs its longest stretch and its share of the
    cycle (and those need the pressure); continuous ≤ peak; continuous < intermittent ≤ peak; minimum
    speed < maximum speed, the rated speed between them; the higher minimum speed needs its pressure and
    lies between minimum and maximum speed; each lower limit below its upper limit.

    Raises
    ------
    InputError
        Naming the file, sheet, cell and field.
    """
    book = Book(path)
    fields = Fields(book, PUMP_SHEET, DATASHEET_FIELDS)
    got = {key: fields.get(key) for key in fields.fields}
    check_datasheet_fields(got, fields.where)
    sources = fields.sources(got)
    performance = _performance(book, got["performance_speed"], got["performance_viscosity"], fields)
    return datasheet_from_fields(got, sources, performance, book.file)


def check_datasheet_fields(got: dict[str, Any], w: Callable[[str], Where]) -> None:
    """The checks of a datasheet beyond each value (see :func:`read_datasheet`), on the converted
    values ``got`` (field key -> SI value or ``None``); ``w(key)`` is where a field was read."""

    def need(a: str, b: str, text: str, hint: str = "") -> None:
        if got[a] is not None and got[b] is None:
            raise InputError(text, w(b), hint)

    def order(low: str, high: str, text: str, strict: bool = True) -> None:
        lo, hi = got[low], got[high]
        if lo is not None and hi is not None and (lo >= hi if strict else lo > hi):
            raise InputError(text, w(high))

    need("pressure_intermittent", "intermittent_max_duration",
         "an intermittent pressure needs the longest single stretch allowed at it", _NO_INTERMITTENT_LIMITS)
    need("pressure_intermittent", "intermittent_max_share",
         "an intermittent pressure needs the largest share of the cycle allowed at it", _NO_INTERMITTENT_LIMITS)
    for limit in ("intermittent_max_duration", "intermittent_max_share"):
        need(limit, "pressure_intermittent", f"{limit} is given without an intermittent pressure")
    order("pressure_continuous", "pressure_peak", "the peak pressure is below the continuous pressure",
          strict=False)
    pi = got["pressure_intermittent"]
    if pi is not None and not got["pressure_continuous"] < pi <= got["pressure_peak"]:
        raise InputError("the intermittent pressure must lie above the continuous and at most at the peak "
                         "pressure", w("pressure_intermittent"))
    order("speed_min", "speed_max", "the minimum speed is not below the maximum speed")
    rated = got["speed_rated"]
    if rated is not None and not got["speed_min"] <= rated <= got["speed_max"]:
        raise InputError("the rated speed lies outside the minimum and maximum speed", w("speed_rated"))
    need("speed_min_high_pressure", "high_pressure_threshold",
         "a higher minimum speed needs the pressure above which it applies")
    need("high_pressure_threshold", "speed_min_high_pressure",
         "the pressure threshold needs the higher minimum speed that applies above it")
    high = got["speed_min_high_pressure"]
    if high is not None and not got["speed_min"] <= high < got["speed_max"]:
        raise InputError("the higher minimum speed must lie between the minimum and the maximum speed",
                         w("speed_min_high_pressure"))
    order("inlet_pressure_min", "inlet_pressure_max", "the lowest inlet pressure is not below the highest")
    order("viscosity_min", "viscosity_max", "the continuous viscosity range is upside down")
    order("viscosity_min_short", "viscosity_min", "the short-term minimum viscosity is above the continuous "
          "minimum", strict=False)
    order("viscosity_max", "viscosity_max_cold_start", "the cold-start maximum viscosity is below the "
          "continuous maximum", strict=False)
    order("temperature_min", "temperature_max", "the lowest fluid temperature is not below the highest")
    ve, te = got["volumetric_efficiency"], got["total_efficiency"]
    if ve is not None and te is not None and te > ve:
        raise InputError("the total efficiency exceeds the volumetric efficiency (it cannot: "
                         "total = volumetric × hydro-mechanical)", w("total_efficiency"))


def datasheet_from_fields(got: dict[str, Any], sources: dict[str, Where], performance: PerformanceTable | None,
                          file: str) -> Datasheet:
    """The :class:`~sheetpump.datasheet.Datasheet` of checked field values (key -> SI value or ``None``)."""
    if performance is not None:
        sources["performance"] = performance.where
    keep = {f.name for f in DATASHEET_FIELDS} - {"performance_speed", "performance_viscosity"}
    return Datasheet(**{k: v for k, v in got.items() if k in keep and v is not None},
                     performance=performance, file=file, sources=sources)


def _performance(book: Book, speed: float | None, viscosity: float | None,
                 fields: Fields) -> PerformanceTable | None:
    sheet = book.sheet(PERFORMANCE_SHEET, required=False)
    if sheet is None:
        return None
    rows, letters, header = read_table(book, sheet, PERFORMANCE_COLUMNS)
    if not rows:
        return None
    return performance_table(book, sheet, rows, letters, header, speed, viscosity)



# --- application -------------------------------------------------------------------------------------


def read_application(path: str | os.PathLike[str]) -> Application:
    """Read an application workbook into an :class:`~sheetpump.duty.Application` (SI units).

    The oil is either an ISO VG grade with its viscosity index (ν40 at the grade's mid-point, ν100 from
    ASTM D2270) or two viscosity–temperature points. The duty is the "Duty" sheet (one row per segment;
    empty speed / temperature / inlet pressure cells take ``drive_speed`` / ``oil_temperature`` /
    ``inlet_pressure``) or the measured series named by ``duty_series`` (path relative to the
    workbook), read by :func:`~sheetpump.workbooks.time_series.read_series`; not both.

    Raises
    ------
    InputError
        Naming the file, sheet, cell and field.
    """
    book = Book(path)
    fields = Fields(book, MACHINE_SHEET, APPLICATION_FIELDS)
    got = {key: fields.get(key) for key in fields.fields}
    w = fields.where
    drive = got["drive_speed"]
    low, high = got["drive_speed_min"], got["drive_speed_max"]
    if (low is None) != (high is None):
        raise InputError("a variable-speed drive needs both its lowest and highest speed",
                         w("drive_speed_max" if high is None else "drive_speed_min"))
    if low is not None and low >= high:
        raise InputError("the drive's lowest speed is not below its highest", w("drive_speed_max"))
    if drive is not None and low is not None:
        raise InputError("give a fixed drive speed or a speed range, not both", w("drive_speed"))
    if drive is not None:
        low = high = drive
    oil = _oil(got, w)
    suction = line_from_fields(got, w)
    inlet_default = got["inlet_pressure"]
    if suction is not None and inlet_default is None:
        inlet_default = suction.reservoir_pressure  # a placeholder: the checker computes the inlet pressure
    defaults = {"speed": drive, "temperature": got["oil_temperature"], "inlet_pressure": inlet_default}
    wraps = got["duty_repeats"] != "no"
    duty_sheet = book.sheet(DUTY_SHEET, required=got["duty_series"] is None)
    if got["duty_series"] is not None:
        if duty_sheet is not None and read_table(book, duty_sheet, DUTY_COLUMNS)[0]:
            raise InputError("both a Duty sheet with segments and a duty_series are given",
                             w("duty_series"), "empty the Duty sheet or the duty_series cell")
        series_path = Path(got["duty_series"])
        if not series_path.is_absolute():
            series_path = book.path.parent / series_path
        try:
            duty = read_series(series_path, sheet=got["duty_series_sheet"], defaults=defaults,
                               max_step=got["duty_series_max_step"], wraps=wraps)
        except InputError as exc:
            if "file not found" in exc.message:
                raise InputError(f"the duty series file {str(series_path)!r} is not found", w("duty_series"),
                                 "give the path relative to this workbook") from None
            raise
    else:
        # A segment that takes a machine value says so, with how that value was typed ("speed: drive_speed,
        # typed as 24.5 rev/s"), so a finding on the segment echoes the unit the user wrote.
        taken = {column: f"{column.replace('_', ' ')}: {key}, {fields.notes[key]}"
                 for column, key in (("speed", "drive_speed"), ("temperature", "oil_temperature"),
                                     ("inlet_pressure", "inlet_pressure"))
                 if defaults[column] is not None and fields.notes.get(key)}
        duty = _segments(book, duty_sheet, defaults, wraps, taken)
    kw = {fields.fields[k].name: v for k, v in got.items() if v is not None and fields.fields[k].name in _APP_ATTRS}
    kw.update(speed_min=low, speed_max=high, suction=suction, motor_starting_torque=got["motor_starting_torque"])
    sources = fields.sources(got)
    if drive is not None:
        sources["speed_min"] = sources["speed_max"] = w("drive_speed")
    sources["duty"] = duty.where
    sources["oil"] = w("oil_grade") if got["oil_grade"] is not None else w("oil_viscosity_1")
    defaulted = tuple(k for k in _DEFAULTED if got.get(k) is None)
    if got.get("oil_density") is None:
        defaulted += ("oil_density",)
    return Application(duty=duty, oil=oil, file=book.file, sources=sources, defaulted=defaulted, **kw)


#: Settings with a default: when one is not given, reports say that the default was used.
_DEFAULTED = ("overshoot", "cycles_per_hour", "hours_per_year", "evaluation_years", "energy_price")


_APP_ATTRS = {
    "name", "relief_setting", "overshoot", "rotation", "cleanliness", "cycles_per_hour",
    "hours_per_year", "energy_price", "currency", "motor_standard", "flow_margin", "pressure_margin", "speed_margin",
    "evaluation_years", "cold_start_temperature", "paper_size",
}


def _oil(got: dict[str, Any], w: Callable[[str], Where]) -> Oil:
    grade, vi = got["oil_grade"], got["oil_viscosity_index"]
    points = [got[k] for k in ("oil_viscosity_1", "oil_temperature_1", "oil_viscosity_2", "oil_temperature_2")]
    density = got["oil_density"] if got["oil_density"] is not None else MINERAL_OIL_DENSITY_15
    name = got["oil_name"] or ""
    if grade is not None:
        if any(p is not None for p in points):
            raise InputError("give the oil as a grade or as two viscosity points, not both", w("oil_grade"))
        if vi is None:
            raise InputError("an ISO VG grade needs its viscosity index", w("oil_viscosity_index"))
        from ..physics.fluid import oil_points_from_grade

        try:
            nu1, t1, nu2, t2 = oil_points_from_grade(int(grade), vi)
        except PhysicsError as exc:
            raise as_input_error(exc, w("oil_viscosity_index")) from None
        return Oil(float(nu1), float(t1), float(nu2), float(t2), density, int(grade), vi, name)
    if vi is not None:
        raise InputError("a viscosity index is given without its grade", w("oil_grade"))
    keys = ("oil_viscosity_1", "oil_temperature_1", "oil_viscosity_2", "oil_temperature_2")
    if all(p is None for p in points):
        raise InputError("the oil is missing", w("oil_grade"),
                         "give an ISO VG grade with its viscosity index, or two viscosity points")
    for key, p in zip(keys, points, strict=True):
        if p is None:
            raise InputError("the second viscosity point is incomplete" if "2" in key else
                             "the first viscosity point is incomplete", w(key))
    nu1, t1, nu2, t2 = points
    if t1 == t2:
        raise InputError("the two viscosity points are at the same temperature", w("oil_temperature_2"))
    if (nu2 - nu1) * (t2 - t1) >= 0:
        raise InputError("the viscosity must fall as the temperature rises", w("oil_viscosity_2"))
    return Oil(nu1, t1, nu2, t2, density, None, None, name)


def _segments(book: Book, sheet: Any, defaults: dict[str, float | None], wraps: bool,
              taken: dict[str, str] | None = None) -> Duty:
    """The Duty sheet's segments; ``taken``: per column, the note for a row whose empty cell takes the
    machine's value (the note goes into that row's place, shown with every finding on the segment)."""
    rows, letters, header = read_table(book, sheet, DUTY_COLUMNS)
    if not rows:
        raise InputError("the duty is empty: no segments", Where(book.file, sheet.title, f"A{header + 1}"),
                         "enter one row per segment, or name a measured series in duty_series")
    hints = {"speed": "give the speed, or drive_speed on the Machine sheet",
             "temperature": "give the oil temperature, or oil_temperature on the Machine sheet",
             "inlet_pressure": "give the inlet pressure, or inlet_pressure on the Machine sheet"}
    duration = table_column(rows, "duration", None, book, sheet, letters, "give the segment's duration", "positive")
    pressure = table_column(rows, "pressure", None, book, sheet, letters, "give the segment's pressure")
    flow = table_column(rows, "flow", None, book, sheet, letters, "give the segment's required flow")
    speed = table_column(rows, "speed", defaults["speed"], book, sheet, letters, hints["speed"])
    temperature = table_column(rows, "temperature", defaults["temperature"], book, sheet, letters,
                          hints["temperature"], "positive")
    inlet = table_column(rows, "inlet_pressure", defaults["inlet_pressure"], book, sheet, letters,
                    hints["inlet_pressure"], "positive")
    first, last = column_span(letters)
    names = tuple(row.get("name") or f"row {r}" for r, row in rows)
    taken = taken or {}
    where_rows = tuple(Where(book.file, sheet.title, f"{first}{r}:{last}{r}", name,
                             "; ".join(note for column, note in taken.items() if row.get(column) is None) or None)
                       for (r, row), name in zip(rows, names, strict=True))
    return Duty(duration=duration, pressure=pressure, flow=flow, speed=speed, temperature=temperature,
                inlet_pressure=inlet, names=names, wraps=wraps, source="segments", rows=where_rows,
                columns=letters, where=Where(book.file, sheet.title))
