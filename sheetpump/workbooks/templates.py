"""The workbooks a user fills in: the pump datasheet and the application, declared once.

The declarations here (:data:`DATASHEET_FIELDS`, :data:`APPLICATION_FIELDS`, :data:`PERFORMANCE_COLUMNS`,
:data:`DUTY_COLUMNS`) drive both the blank templates (:func:`write_template`) and the readers
(:mod:`sheetpump.workbooks.readers`), so the two cannot drift apart.

Layout of a field sheet ("Pump", "Machine"): a title, the safety caution, a line of instructions, then a
header row ``field | value | unit | help`` and one row per field. The reader finds the header by its
words and each field by the text in its ``field`` column, so rows may be moved, inserted or sorted; every
value cell also carries a defined name (``pump.displacement``, ``machine.relief_setting``) for formulas
of the user's own. Input cells have the input fill of sheetpump's writer, a drop-down list of units (or
of choices) and the help text as a cell comment.

Layout of a table sheet ("Performance", "Duty"): the same three top rows, then a header row naming each
column by its trade word and its unit in brackets (``pressure [bar]``), columns in any order, one row per
point or segment. The header cells carry drop-downs of common units; any unit of the right kind is read.
"""

from __future__ import annotations

import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .. import SAFETY_CAUTION
from .. import units as u
from ..codes import ROTATIONS
from ..errors import InputError
from ..physics.fluid import MINERAL_OIL_DENSITY_15
from ..units import Kind
from .writer import PAPER_SIZES, STYLES, book_styles, open_book, write_value

__all__ = [
    "APPLICATION_FIELDS",
    "DATASHEET_FIELDS",
    "DUTY_COLUMNS",
    "DUTY_SHEET",
    "FIELD_HEADER",
    "MACHINE_SHEET",
    "PERFORMANCE_COLUMNS",
    "PERFORMANCE_SHEET",
    "PUMP_SHEET",
    "SERIES_COLUMNS",
    "Column",
    "Field",
    "write_template",
    "write_top",
]

PUMP_SHEET = "Pump"
PERFORMANCE_SHEET = "Performance"
MACHINE_SHEET = "Machine"
DUTY_SHEET = "Duty"
#: Header words of a field sheet, in template order.
FIELD_HEADER = ("field", "value", "unit", "help")
HEADER_ROW = 4  # 0-based row of the header in a template (row 5 in the sheet)
PERFORMANCE_ROWS = 40
DUTY_ROWS = 60

# Value "kinds" beyond the unit kinds: plain text, one of a list, a fraction (% or plain), a whole number,
# and a number with a fixed unit label (cycles per hour, dB(A) ...).
TEXT, CHOICE, FRACTION, INTEGER, COUNT = "text", "choice", "fraction", "integer", "count"

#: Units offered in the drop-downs, first one the default. Any unit of the kind is accepted.
UNITS: dict[Kind, tuple[str, ...]] = {
    u.DISPLACEMENT: ("cm^3/rev", "in^3/rev", "cc"),
    u.SPEED: ("rpm", "rev/s"),
    u.PRESSURE: ("bar", "psi", "MPa", "kPa"),
    u.ABS_PRESSURE: ("bara", "psia", "kPaa", "barg", "psig"),
    u.FLOW: ("L/min", "gpm", "m^3/h"),
    u.POWER: ("kW", "hp", "W"),
    u.TORQUE: ("N*m", "lbf*ft", "lbf*in"),
    u.TEMPERATURE: ("degC", "degF", "K"),
    u.VISCOSITY: ("mm^2/s", "cSt"),
    u.DENSITY: ("kg/m^3", "g/cm^3", "lb/ft^3"),
    u.DURATION: ("s", "min", "h", "ms"),
    u.MASS: ("kg", "lb"),
    u.LENGTH: ("m", "mm", "ft", "in"),
    u.DIAMETER: ("mm", "in", "m"),
}
FRACTION_UNITS = ("%", "fraction")
MOTOR_STANDARDS = ("IEC", "NEMA")
YES_NO = ("yes", "no")
PAPER_CHOICES = tuple(PAPER_SIZES)  # the paper sizes the writers know
STRAINER_LAWS = ("laminar", "turbulent")
VG_GRADES = ("10", "15", "22", "32", "46", "68", "100", "150")


@dataclass(frozen=True)
class Field:
    """One row of a field sheet.

    ``key`` is the text in the ``field`` column and the defined-name suffix; ``attr`` the dataclass
    attribute it fills (and the key of ``sources``); ``kind`` a :class:`~sheetpump.units.Kind` or one of
    the strings text/choice/fraction/integer/count; ``label`` the fixed unit label of a count;
    ``check`` one of "positive", "non_negative", "share" (0 < x ≤ 1), "" (any finite value);
    ``span`` the range read for a count or whole number (a unit kind declares its own, see
    :attr:`sheetpump.units.Kind.span`).
    """

    key: str
    kind: Kind | str
    help: str
    required: bool = False
    check: str = "positive"
    choices: tuple[str, ...] = ()
    label: str = ""
    section: str = ""
    attr: str = ""
    span: tuple[float, float] | None = None

    @property
    def name(self) -> str:
        return self.attr or self.key

    @property
    def units(self) -> tuple[str, ...]:
        if isinstance(self.kind, Kind):
            return UNITS.get(self.kind, (self.kind.default,))
        if self.kind == FRACTION:
            return FRACTION_UNITS
        return ()


@dataclass(frozen=True)
class Column:
    """One column of a table: its trade word (and synonyms), kind and whether it must be there."""

    key: str
    words: tuple[str, ...]
    kind: Kind | None
    help: str
    required: bool = False

    @property
    def header(self) -> str:
        """The template's header text: ``"pressure [bar]"``."""
        if self.kind is None:
            return self.words[0]
        return f"{self.words[0]} [{UNITS.get(self.kind, (self.kind.default,))[0]}]"

    def headers(self) -> list[str]:
        if self.kind is None:
            return [self.words[0]]
        return [f"{self.words[0]} [{unit}]" for unit in UNITS.get(self.kind, (self.kind.default,))]


def _f(section: str, key: str, kind: Kind | str, help: str, **kw: Any) -> Field:
    return Field(key, kind, help, section=section, **kw)


#: The "Pump" sheet of a datasheet workbook; keys are the :class:`~sheetpump.datasheet.Datasheet` fields.
DATASHEET_FIELDS: tuple[Field, ...] = (
    _f("Identity", "supplier", TEXT, "Supplier's name.", required=True),
    _f("Identity", "model", TEXT, "Model or type code as the supplier writes it.", required=True),
    _f("Identity", "source_note", TEXT, "Where the figures come from: document, issue, date, page."),
    _f("Size", "displacement", u.DISPLACEMENT, "Geometric displacement per revolution.", required=True),
    _f("Speed", "speed_min", u.SPEED, "Lowest permitted shaft speed.", required=True),
    _f("Speed", "speed_max", u.SPEED, "Highest permitted shaft speed.", required=True),
    _f("Speed", "speed_rated", u.SPEED, "Rated speed (the speed the ratings are stated at)."),
    _f("Speed", "speed_min_high_pressure", u.SPEED,
       "Higher minimum speed some suppliers ask for above a stated pressure (give the pressure below)."),
    _f("Speed", "high_pressure_threshold", u.PRESSURE,
       "Pressure above which the higher minimum speed applies."),
    _f("Pressure", "pressure_continuous", u.PRESSURE, "Continuous pressure (may be held indefinitely).",
       required=True),
    _f("Pressure", "pressure_intermittent", u.PRESSURE,
       "Intermittent pressure (allowed for a limited time per occurrence and share of the cycle)."),
    _f("Pressure", "intermittent_max_duration", u.DURATION,
       "Longest single stretch at intermittent pressure the supplier allows."),
    _f("Pressure", "intermittent_max_share", FRACTION,
       "Largest share of the cycle at intermittent pressure the supplier allows.", check="share"),
    _f("Pressure", "pressure_peak", u.PRESSURE, "Peak pressure (never to be exceeded, even momentarily).",
       required=True),
    _f("Inlet", "inlet_pressure_min", u.ABS_PRESSURE, "Lowest inlet pressure, absolute."),
    _f("Inlet", "inlet_pressure_max", u.ABS_PRESSURE, "Highest inlet pressure, absolute."),
    _f("Fluid", "viscosity_min", u.VISCOSITY, "Continuous viscosity range: lower end."),
    _f("Fluid", "viscosity_max", u.VISCOSITY, "Continuous viscosity range: upper end."),
    _f("Fluid", "viscosity_min_short", u.VISCOSITY, "Short-term minimum viscosity."),
    _f("Fluid", "viscosity_max_cold_start", u.VISCOSITY, "Highest viscosity for a cold start."),
    _f("Fluid", "temperature_min", u.TEMPERATURE, "Lowest fluid temperature.", check=""),
    _f("Fluid", "temperature_max", u.TEMPERATURE, "Highest fluid temperature.", check=""),
    _f("Fluid", "cleanliness", TEXT, "Cleanliness the pump needs, ISO 4406 code such as 18/16/13."),
    _f("Shaft", "rotation", CHOICE, "Direction of rotation seen from the shaft end.", choices=ROTATIONS),
    _f("Shaft", "torque_max", u.TORQUE, "Shaft torque limit."),
    _f("Other", "volumetric_efficiency", FRACTION, "A single stated volumetric efficiency.", check="share"),
    _f("Other", "total_efficiency", FRACTION, "A single stated total (overall) efficiency.", check="share"),
    _f("Other", "teeth", INTEGER, "Number of teeth on one gear (for the pulsation frequency).",
       span=(3, 100)),
    _f("Other", "price", COUNT, "Price, in the application's currency.", check="non_negative",
       label="currency", span=(0, 1e9)),
    _f("Other", "mass", u.MASS, "Mass of the pump."),
    _f("Other", "noise", COUNT, "Sound pressure level as stated.", label="dB(A)", span=(0, 200)),
    _f("Performance table", "performance_speed", u.SPEED,
       "Speed the Performance sheet was measured at (unless it has a speed column)."),
    _f("Performance table", "performance_viscosity", u.VISCOSITY,
       "Viscosity the Performance sheet was measured at (unless it has a viscosity column)."),
    _f("Starting", "starting_torque", u.TORQUE, "Torque to start the pump cold (breakaway), where stated. "
       "Empty: from the performance table's viscous loss at the cold-start viscosity."),
)

#: The "Machine" sheet of an application workbook. Keys differ from attributes where a plain word reads
#: better: the attribute (of :class:`~sheetpump.duty.Application`) is the key of ``sources``.
APPLICATION_FIELDS: tuple[Field, ...] = (
    _f("Machine", "name", TEXT, "Name of the machine or project.", required=True),
    _f("Drive", "drive_speed", u.SPEED, "Fixed drive speed; also the speed of duty segments that give none."),
    _f("Drive", "drive_speed_min", u.SPEED, "Variable-speed drive: lowest speed.", attr="speed_min"),
    _f("Drive", "drive_speed_max", u.SPEED, "Variable-speed drive: highest speed.", attr="speed_max"),
    _f("Drive", "rotation", CHOICE, "Rotation the drive imposes, seen from the pump's shaft end.",
       choices=ROTATIONS),
    _f("Drive", "motor_standard", CHOICE, "Motor size series: IEC (kW) or NEMA (hp). Empty: IEC.",
       choices=MOTOR_STANDARDS),
    _f("Relief valve", "relief_setting", u.PRESSURE, "Relief-valve setting.", required=True),
    _f("Relief valve", "overshoot", FRACTION, "Pressure overshoot of the relief valve to allow. Empty: 10 %.",
       check="non_negative"),
    _f("Oil", "oil_name", TEXT, "Name of the oil."),
    _f("Oil", "oil_grade", CHOICE, "ISO 3448 viscosity grade (VG); give the viscosity index too.",
       choices=VG_GRADES),
    _f("Oil", "oil_viscosity_index", COUNT, "Viscosity index (ASTM D2270), with the grade.", label="-",
       span=(-100, 500)),
    _f("Oil", "oil_viscosity_1", u.VISCOSITY, "Or two points: viscosity at the first temperature."),
    _f("Oil", "oil_temperature_1", u.TEMPERATURE, "First temperature (e.g. 40 degC).", check=""),
    _f("Oil", "oil_viscosity_2", u.VISCOSITY, "Viscosity at the second temperature."),
    _f("Oil", "oil_temperature_2", u.TEMPERATURE, "Second temperature (e.g. 100 degC).", check=""),
    _f("Oil", "oil_density", u.DENSITY, f"Density at 15 degC. Empty: {MINERAL_OIL_DENSITY_15:g} kg/m^3."),
    _f("Oil", "oil_temperature", u.TEMPERATURE,
       "Oil temperature of duty segments that give none.", check=""),
    _f("Oil", "cold_start_temperature", u.TEMPERATURE, "Lowest oil temperature at a start (cold start).",
       check=""),
    _f("Oil", "cleanliness", TEXT, "Cleanliness the system achieves, ISO 4406 code such as 17/15/12."),
    _f("Duty", "inlet_pressure", u.ABS_PRESSURE, "Inlet pressure (absolute) of duty segments that give none."),
    _f("Duty", "duty_series", TEXT,
       "Measured time series instead of the Duty sheet: a .csv or .xlsx file, path relative to this workbook."),
    _f("Duty", "duty_series_sheet", TEXT, "Sheet of the time series workbook. Empty: the first sheet."),
    _f("Duty", "duty_series_max_step", u.DURATION,
       "Longest step between samples accepted. Empty: 10 times the median step."),
    _f("Duty", "duty_repeats", CHOICE, "Does the duty cycle repeat (its end runs into its start)? Empty: yes.",
       choices=YES_NO),
    _f("Use", "cycles_per_hour", COUNT, "Duty cycles per hour. Empty: 1.", label="1/h",
       span=(0, 36000)),
    _f("Use", "hours_per_year", COUNT, "Operating hours per year. Empty: 2000.", label="h",
       span=(0, 8784)),  # 366 days x 24 h
    _f("Use", "evaluation_years", COUNT, "Period for the cost over life. Empty: 10.", label="years",
       span=(0, 100)),
    _f("Use", "energy_price", COUNT, "Price of electrical energy per kWh. Empty: 0.", check="non_negative",
       label="per kWh", span=(0, 1000)),
    _f("Use", "currency", TEXT, "Currency of the prices. Empty: EUR."),
    _f("Use", "paper_size", CHOICE, "Paper the reports print on. Empty: A4.", choices=PAPER_CHOICES),
    _f("Margins", "flow_margin", FRACTION, "Required surplus of delivered over required flow. Empty: 0.",
       check="non_negative"),
    _f("Margins", "pressure_margin", FRACTION, "Required headroom below each pressure rating. Empty: 0.",
       check="non_negative"),
    _f("Margins", "speed_margin", FRACTION, "Required headroom inside the speed range. Empty: 0.",
       check="non_negative"),
    # The suction line: with it the inlet pressure is computed for each segment and the cold start.
    _f("Suction line", "suction_lift", u.LENGTH, "Height of the pump's inlet above the oil level; negative "
       "when the pump sits below it (flooded). With the line's diameter and length: the inlet pressure is "
       "computed. Empty line: the stated inlet pressure is used.", check=""),
    _f("Suction line", "reservoir_pressure", u.ABS_PRESSURE, "Absolute pressure on the oil in the reservoir. "
       "Empty: 1.013 bara (atmospheric)."),
    _f("Suction line", "suction_length", u.LENGTH, "Length of the suction line."),
    _f("Suction line", "suction_diameter", u.DIAMETER, "Inner diameter of the suction line."),
    _f("Suction line", "suction_fittings", TEXT, "Fittings by trade name, separated by commas (entrance, "
       "elbow 90, elbow 90 long, elbow 45, bend 180, tee run, tee branch, ball valve, gate valve, check valve; "
       "'2 x elbow 90' for two), or the sum of their loss coefficients K as a number."),
    _f("Suction line", "strainer_dp", u.PRESSURE, "Pressure drop of the suction strainer at the flow and "
       "viscosity below (scaled with flow and viscosity as a laminar element)."),
    _f("Suction line", "strainer_flow", u.FLOW, "Flow the strainer's pressure drop is stated at."),
    _f("Suction line", "strainer_viscosity", u.VISCOSITY, "Viscosity the strainer's pressure drop is stated at."),
    _f("Suction line", "strainer_law", CHOICE, "How the strainer's drop scales: laminar (with flow and "
       "viscosity) or turbulent (with flow squared). Empty: laminar.", choices=STRAINER_LAWS),
    _f("Suction line", "motor_starting_torque", COUNT, "Motor's starting torque as a multiple of its rated "
       "torque (e.g. 0.6 for a star-delta start). Empty: the locked-rotor torque of the motor standard's "
       "design (IEC design N, NEMA design B).", label="x rated", span=(0.05, 20)),
)

#: Columns of the "Performance" sheet.
PERFORMANCE_COLUMNS: tuple[Column, ...] = (
    Column("pressure", ("pressure",), u.PRESSURE, "Pump pressure (outlet above inlet).", required=True),
    Column("flow", ("flow", "effective flow"), u.FLOW, "Delivered flow.", required=True),
    Column("input_power", ("input power", "power"), u.POWER, "Shaft input power."),
    Column("torque", ("torque", "input torque"), u.TORQUE, "Shaft input torque."),
    Column("speed", ("speed",), u.SPEED, "Speed of the point. Empty: performance_speed on the Pump sheet."),
    Column("viscosity", ("viscosity",), u.VISCOSITY,
           "Viscosity of the point. Empty: performance_viscosity on the Pump sheet."),
)

#: Columns of the "Duty" sheet (a table of segments).
DUTY_COLUMNS: tuple[Column, ...] = (
    Column("name", ("name", "segment"), None, "Name of the segment."),
    Column("duration", ("duration",), u.DURATION, "How long the segment lasts.", required=True),
    Column("pressure", ("pressure",), u.PRESSURE, "Pump pressure (outlet above inlet).", required=True),
    Column("flow", ("flow", "required flow"), u.FLOW, "Flow the machine needs.", required=True),
    Column("speed", ("speed", "shaft speed"), u.SPEED, "Shaft speed. Empty: drive_speed."),
    Column("temperature", ("temperature", "oil temperature"), u.TEMPERATURE,
           "Oil temperature. Empty: oil_temperature."),
    Column("inlet_pressure", ("inlet pressure",), u.ABS_PRESSURE,
           "Inlet pressure, absolute. Empty: inlet_pressure."),
)

#: Columns of a measured time series (CSV or xlsx): time and the duty signals.
SERIES_COLUMNS: tuple[Column, ...] = (
    Column("time", ("time",), u.DURATION, "Time of the sample.", required=True),
    *DUTY_COLUMNS[2:],
)

_INSTRUCTIONS = {
    PUMP_SHEET: "One pump per workbook. Fill the shaded cells in the supplier's own units: pick the unit "
                "in the unit column (any unit of the right kind is read). Leave unstated values empty.",
    PERFORMANCE_SHEET: "Performance table where the supplier gives one: one row per point. Change the unit "
                       "in brackets in a header to the supplier's unit; delete columns you do not need.",
    MACHINE_SHEET: "The machine. Give the oil either as a grade with its viscosity index or as two "
                   "viscosity points. The duty is the Duty sheet, or a measured series named in duty_series.",
    DUTY_SHEET: "The duty cycle, one row per segment, in order. Change the unit in brackets in a header to "
                "your unit; empty speed / temperature / inlet pressure cells take the Machine sheet's values.",
}

NAME_PREFIX = {PUMP_SHEET: "pump", MACHINE_SHEET: "machine"}


def _top(sheet: Any, book: Any, name: str, width: int) -> None:
    write_top(sheet, book, f"sheetpump {name.lower()} sheet", _INSTRUCTIONS[name], width)


def write_top(sheet: Any, book: Any, title: str, instructions: str, width: int) -> None:
    """The three top rows of a sheet to fill in: title, the safety caution, the instructions."""
    sheet.write_string(0, 0, title, book_styles(book)["title"])
    sheet.merge_range(1, 0, 1, width - 1, SAFETY_CAUTION, book_styles(book)["caution"])
    sheet.set_row(1, 62)
    sheet.merge_range(2, 0, 2, width - 1, instructions, book_styles(book)["note"])
    sheet.set_row(2, 32)


def _field_sheet(book: Any, name: str, fields: Sequence[Field],
                 values: Mapping[str, tuple[Any, ...]] | None = None) -> None:
    from xlsxwriter.utility import xl_rowcol_to_cell  # here: reading a template needs no XlsxWriter

    sheet = book.add_worksheet(name)
    _top(sheet, book, name, 4)
    sheet.set_column(0, 0, 28)
    sheet.set_column(1, 1, 22)
    sheet.set_column(2, 2, 12)
    sheet.set_column(3, 3, 80)
    for col, word in enumerate(FIELD_HEADER):
        sheet.write_string(HEADER_ROW, col, word, book_styles(book)["header"])
    section_fmt = book.add_format({"bold": True, "italic": True, "top": 1})
    text_input = book.add_format({**STYLES["input"], "num_format": "@"})
    row = HEADER_ROW + 1
    section = None
    for field in fields:
        if field.section != section:
            section = field.section
            sheet.write_string(row, 0, section, section_fmt)  # not a field name: the reader skips it
            row += 1
        sheet.write_string(row, 0, field.key)
        # Text fields are formatted as text so that "18/16/13" never becomes a date.
        fmt = text_input if field.kind in (TEXT, CHOICE) else book_styles(book)["input"]
        value, *unit = (values or {}).get(field.key, (None,))
        write_value(sheet, row, 1, value, fmt)
        book.define_name(f"{NAME_PREFIX[name]}.{field.key}", f"='{name}'!{xl_rowcol_to_cell(row, 1, True, True)}")
        need = "Required. " if field.required else ""
        sheet.write_comment(row, 1, need + field.help, {"author": "sheetpump", "x_scale": 2})
        if field.choices:
            sheet.data_validation(row, 1, row, 1, {
                "validate": "list", "source": list(field.choices), "error_type": "stop",
                "error_title": field.key, "error_message": "Choose one of: " + ", ".join(field.choices)})
        units = field.units
        if units:
            sheet.write_string(row, 2, unit[0] if unit else units[0], book_styles(book)["input"])
            sheet.data_validation(row, 2, row, 2, {
                "validate": "list", "source": list(units), "error_type": "warning",
                "error_title": "unit", "error_message": "Not in the list: any unit of this kind that "
                "sheetpump knows is read (e.g. " + ", ".join(units) + ")."})
        elif field.label:
            sheet.write_string(row, 2, field.label)
        sheet.write_string(row, 3, need + field.help, book_styles(book)["note"])
        row += 1
    sheet.freeze_panes(HEADER_ROW + 1, 0)


def _table_sheet(book: Any, name: str, columns: Sequence[Column], rows: int,
                 table: Sequence[Sequence[Any]] = (), headers: Sequence[str] | None = None) -> None:
    sheet = book.add_worksheet(name)
    width = len(columns)
    _top(sheet, book, name, max(width, 4))
    sheet.set_column(0, width - 1, 20)
    rows = max(rows, len(table))
    for col, column in enumerate(columns):
        header = headers[col] if headers and col < len(headers) else column.header
        sheet.write_string(HEADER_ROW, col, header, book_styles(book)["header"])
        need = "Required. " if column.required else ""
        sheet.write_comment(HEADER_ROW, col, need + column.help, {"author": "sheetpump", "x_scale": 2})
        if column.kind is not None:
            sheet.data_validation(HEADER_ROW, col, HEADER_ROW, col, {
                "validate": "list", "source": column.headers(), "error_type": "warning",
                "error_title": "column", "error_message": "Not in the list: write the trade word and any unit "
                f"of its kind in brackets, e.g. {column.header!r}."})
        for row in range(HEADER_ROW + 1, HEADER_ROW + 1 + rows):
            i = row - HEADER_ROW - 1
            value = table[i][col] if i < len(table) and col < len(table[i]) else None
            write_value(sheet, row, col, value, book_styles(book)["input"])
    sheet.freeze_panes(HEADER_ROW + 1, 0)



def write_template(kind: str, target: str | os.PathLike[str], values: Mapping[str, tuple[Any, ...]] | None = None,
                   table: Sequence[Sequence[Any]] = (), headers: Sequence[str] | None = None) -> Path:
    """Write the blank ``"datasheet"`` or ``"application"`` template to ``target`` (atomically).

    With ``values`` (field key -> ``(value,)`` or ``(value, unit)``), ``table`` (rows of the
    Performance or Duty sheet, in the template's column order) and ``headers`` (that sheet's header
    texts, e.g. with other units), the same code writes a filled-in workbook, as the demo does.

    The output is byte-for-byte the same for the same sheetpump version (XlsxWriter with a fixed
    creation time, see :mod:`sheetpump.workbooks.writer`).

    >>> import tempfile, openpyxl
    >>> path = write_template("datasheet", tempfile.mkdtemp() + "/pump.xlsx")
    >>> openpyxl.load_workbook(path).sheetnames
    ['Pump', 'Performance']
    """
    if kind == "datasheet":
        with open_book(target, title="sheetpump pump datasheet") as book:
            _field_sheet(book, PUMP_SHEET, DATASHEET_FIELDS, values)
            _table_sheet(book, PERFORMANCE_SHEET, PERFORMANCE_COLUMNS, PERFORMANCE_ROWS, table, headers)
    elif kind == "application":
        with open_book(target, title="sheetpump application") as book:
            _field_sheet(book, MACHINE_SHEET, APPLICATION_FIELDS, values)
            _table_sheet(book, DUTY_SHEET, DUTY_COLUMNS, DUTY_ROWS, table, headers)
    else:
        raise InputError(f"unknown template {kind!r}", hint="choose 'datasheet' or 'application'")
    return Path(target)

