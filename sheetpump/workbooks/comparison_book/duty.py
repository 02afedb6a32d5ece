"""The Duty sheets of the comparison workbook: one per candidate, segment by segment.

A long time series is resampled to :data:`MAX_DUTY_ROWS` time-weighted bins (:func:`resample`). Columns
that follow from others by arithmetic are live native formulas with their values stored; the totals below
them are formulas too (for a binned series, the checker's figures over every sample). The Summary links to
the totals and the charts plot the rows: :class:`DutySheet` says where they are, :data:`DUTY_COL` which
column holds what.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from xlsxwriter.utility import xl_rowcol_to_cell

from ...checks import display_unit
from ...comparison import Candidate
from ...units import ENERGY, FLOW, POWER, PRESSURE, SPEED, TEMPERATURE, TORQUE, VISCOSITY, Kind, from_si
from ..writer import (
    PCT,
    SIGNED_PCT,
    book_styles,
    cell_format,
    column_width,
    number_format,
    page_setup,
    write_formula,
    write_header,
    write_value,
)
from .display import show

__all__ = ["DUTY_COL", "MAX_DUTY_ROWS", "DutySheet", "resample", "write_duty_sheet"]


#: A duty longer than this (a measured series) is shown as this many time-weighted bins.
MAX_DUTY_ROWS = 1000


def resample(candidate: Candidate) -> tuple[dict[str, np.ndarray], list[str], str]:
    """Per-row arrays for a duty sheet (SI), the row labels, and a note if resampled."""
    res = candidate.result
    duty, fig = res.application.duty, res.drive
    cols = {
        "duration": duty.duration, "pressure": duty.pressure, "speed": duty.speed,
        "temperature": duty.temperature, "required": duty.flow, "delivered": fig.flow,
        "vol_eff": fig.volumetric_efficiency, "total_eff": fig.total_efficiency, "torque": fig.torque,
        "input_power": fig.input_power, "viscosity": fig.viscosity,
        "surplus": fig.surplus_heat if fig.surplus_heat is not None else np.zeros(len(duty)),
    }
    n = len(duty)
    if n <= MAX_DUTY_ROWS:
        return cols, [duty.label(i) for i in range(n)], ""
    edges = np.linspace(0, n, MAX_DUTY_ROWS + 1).astype(int)
    starts = edges[:-1]
    t = duty.duration
    total = np.add.reduceat(t, starts)
    out = {"duration": total}
    for key, values in cols.items():
        if key == "duration":
            continue
        out[key] = np.add.reduceat(values * t, starts) / total  # time-weighted mean per bin
    out["pressure_max"] = np.maximum.reduceat(duty.pressure, starts)
    begin = np.concatenate([[0.0], np.cumsum(t)])
    labels = [f"t = {begin[a]:g}–{begin[b]:g} s" for a, b in itertools.pairwise(edges)]
    note = (f"{n} samples shown as {MAX_DUTY_ROWS} bins of equal sample count: time-weighted means "
            "(pressure also as the bin's maximum); the checker used every sample.")
    return out, labels, note


#: Columns of a duty sheet: key, header (with {unit} of its kind), kind for the unit (None: none), number
#: format ("pct" an efficiency, "spct" a signed margin, None: digits from the column's values), formula.
#: The charts and the summary find columns by key, so a column added here reaches them by its key.
_DUTY_COLUMNS: tuple[tuple[str, str, Kind | None, str | None, bool], ...] = (
    ("segment", "segment", None, None, False),
    ("duration", "duration [s]", None, None, False),
    ("pressure", "pressure [{}]", PRESSURE, None, False),
    ("speed", "speed [{}]", SPEED, None, False),
    ("temperature", "oil temperature [{}]", TEMPERATURE, None, False),
    ("viscosity", "viscosity [{}]", VISCOSITY, None, False),
    ("required", "required flow [{}]", FLOW, None, False),
    ("delivered", "delivered flow [{}]", FLOW, None, False),
    ("vol_eff", "volumetric efficiency", None, "pct", False),
    ("total_eff", "total efficiency", None, "pct", False),
    ("torque", "torque [{}]", TORQUE, None, False),
    ("input_power", "input power [{}]", POWER, None, False),
    ("hydraulic", "hydraulic power [{}]", POWER, None, True),
    ("loss", "power loss [{}]", POWER, None, True),
    ("flow_margin", "flow margin", None, "spct", True),
    ("energy", "energy [Wh]", None, None, True),
    # heat into the oil: the pump's loss plus the surplus flow at the pressure it crosses
    ("surplus", "surplus flow heat [{}]", POWER, None, True),
    ("heat", "heat into the oil [{}]", POWER, None, True),
)
DUTY_COL = {key: i for i, (key, *_rest) in enumerate(_DUTY_COLUMNS)}
_DUTY_HEADER_ROW = 3
_NO_FLOW = "none required"


@dataclass(frozen=True)
class DutySheet:
    """Where a candidate's duty sheet put its rows: what the Summary links to and the charts plot.

    ``first``/``last`` are the 0-based rows of the first and last duty row; ``totals`` the absolute cell
    references of its totals by key (none for a binned series, whose bins are not the whole truth).
    """

    name: str
    first: int
    last: int
    binned: bool
    totals: dict[str, str]


@dataclass(frozen=True)
class _Factors:
    """Display-unit factors of a duty sheet's formulas: pressure x flow -> power, and power x s -> Wh."""

    hydraulic: float
    energy: float


def _duty_values(cols: dict[str, np.ndarray], u: dict[Kind, str]) -> tuple[dict[str, np.ndarray], _Factors]:
    """Every column of a duty sheet in display units, the formula columns computed as the sheet does."""
    # the factor that turns pressure x flow in the display units into the display power unit
    hyd = float(from_si(from_si(1.0, PRESSURE, u[PRESSURE]) ** -1 * from_si(1.0, FLOW, u[FLOW]) ** -1,
                        POWER, u[POWER]))
    wh_per_j = float(from_si(1.0, ENERGY, "Wh"))
    power_si_per_display = 1.0 / float(from_si(1.0, POWER, u[POWER]))
    shown = {key: (np.asarray(from_si(cols[key], kind, u[kind]), float) if kind is not None
                   else np.asarray(cols[key], float))
             for key, _h, kind, _f, formula in _DUTY_COLUMNS if key in cols}
    shown["hydraulic"] = shown["pressure"] * shown["delivered"] * hyd
    shown["loss"] = shown["input_power"] - shown["hydraulic"]
    with np.errstate(divide="ignore", invalid="ignore"):
        shown["flow_margin"] = np.where(shown["required"] > 0, shown["delivered"] / shown["required"] - 1.0, np.nan)
    shown["energy"] = shown["input_power"] * power_si_per_display * shown["duration"] * wh_per_j
    shown["heat"] = shown["loss"] + shown["surplus"]
    return shown, _Factors(hyd, power_si_per_display * wh_per_j)


def _duty_header(book: Any, sheet: Any, cols: dict[str, np.ndarray], shown: dict[str, np.ndarray],
                 labels: list[str], u: dict[Kind, str]) -> tuple[list[str], list[Any]]:
    """Write the header row of a duty sheet and size its columns; returns the headers and cell formats."""
    headers, widths, formats = [], [], []
    for key, head, kind, num, _formula in _DUTY_COLUMNS:
        text = head.format(u[kind]) if kind is not None else head
        values = labels if key == "segment" else shown[key]
        if key == "flow_margin" and not np.all(shown["required"] > 0):
            values = [*values, _NO_FLOW]
        fmt_text = {"pct": PCT, "spct": SIGNED_PCT}.get(num or "", number_format(values)) if key != "segment" \
            else None
        headers.append(text)
        widths.append(column_width(text, values, fmt_text, most=28))
        formats.append(cell_format(book, num_format=fmt_text) if fmt_text else cell_format(book, "wrap"))
    if "pressure_max" in cols:
        shown["pressure_max"] = np.asarray(from_si(cols["pressure_max"], PRESSURE, u[PRESSURE]), float)
        headers.append(f"max pressure [{u[PRESSURE]}]")
        widths.append(column_width(headers[-1], shown["pressure_max"], number_format(shown["pressure_max"])))
        formats.append(cell_format(book, num_format=number_format(shown["pressure_max"])))
    write_header(sheet, _DUTY_HEADER_ROW, headers, widths, book_styles(book)["header"])
    for c, (_key, _h, _k, _n, formula) in enumerate(_DUTY_COLUMNS):
        if formula:
            sheet.write_string(_DUTY_HEADER_ROW, c, headers[c], cell_format(book, "header", "info"))
    return headers, formats


def _duty_cell(r: int, key: str) -> str:
    return xl_rowcol_to_cell(r, DUTY_COL[key])


def _duty_row(book: Any, sheet: Any, r: int, label: str, values: dict[str, float], formats: list[Any],
              factors: _Factors, binned: bool) -> None:
    """Write one row of a duty sheet: the plain values, then the live formulas with their values."""
    write_value(sheet, r, 0, label, formats[0])
    for key, _h, _k, _n, formula in _DUTY_COLUMNS[1:]:
        if not formula:
            c = DUTY_COL[key]
            write_value(sheet, r, c, values[key], formats[c])
    cell = _duty_cell
    p, q, qr, pin, t = (cell(r, k) for k in ("pressure", "delivered", "required", "input_power", "duration"))
    h = cell(r, "hydraulic")
    hyd = factors.hydraulic

    def formula(key: str, text: str) -> None:
        write_formula(sheet, r, DUTY_COL[key], text, values[key], formats[DUTY_COL[key]])

    formula("hydraulic", f"={p}*{q}*{hyd!r}")
    formula("loss", f"={pin}-{h}")
    if values["required"] > 0:
        formula("flow_margin", f"={q}/{qr}-1")
    else:
        write_value(sheet, r, DUTY_COL["flow_margin"], _NO_FLOW, cell_format(book, align="right"))
    formula("energy", f"={pin}*{t}*{factors.energy!r}")
    # the surplus flow leaves at the pump's pressure (the duty's): heat never above the power drawn
    surplus = values["surplus"]
    if binned or not math.isfinite(surplus):  # a bin's mean surplus is not its mean flows' surplus
        write_value(sheet, r, DUTY_COL["surplus"], surplus, formats[DUTY_COL["surplus"]])
    else:
        formula("surplus", f"=MAX({q}-{qr},0)*{p}*{hyd!r}")
    formula("heat", f"={cell(r, 'loss')}+{cell(r, 'surplus')}")
    if "pressure_max" in values:
        write_value(sheet, r, len(_DUTY_COLUMNS), values["pressure_max"], formats[-1])


def _duty_totals(shown: dict[str, np.ndarray], first: int, last: int, u: dict[Kind, str]
                 ) -> list[tuple[str, str, str, str, float]]:
    """The totals below a duty sheet: key, label, column key, formula, and the value the formula gives."""
    cell = _duty_cell
    col = lambda key: f"{cell(first, key)}:{cell(last, key)}"  # noqa: E731
    d, pin = shown["duration"], shown["input_power"]
    return [
        ("cycle", "cycle time [s]", "duration", f"=SUM({col('duration')})", float(d.sum())),
        ("peak_power", f"peak input power [{u[POWER]}]", "input_power", f"=MAX({col('input_power')})",
         float(pin.max())),
        ("rms_power", f"RMS input power [{u[POWER]}]", "input_power",
         f"=SQRT(SUMPRODUCT({col('input_power')},{col('input_power')},{col('duration')})/SUM({col('duration')}))",
         float(np.sqrt(np.sum(pin**2 * d) / d.sum()))),
        ("peak_torque", f"peak torque [{u[TORQUE]}]", "torque", f"=MAX({col('torque')})",
         float(np.max(shown["torque"]))),
        ("mean_loss", f"mean power loss [{u[POWER]}]", "loss",
         f"=SUMPRODUCT({col('loss')},{col('duration')})/SUM({col('duration')})",
         float(np.sum(shown["loss"] * d) / d.sum())),
        ("energy", "shaft energy per cycle [Wh]", "energy", f"=SUM({col('energy')})",
         float(np.sum(shown["energy"]))),
        ("mean_surplus", f"mean surplus flow heat [{u[POWER]}]", "surplus",
         f"=SUMPRODUCT({col('surplus')},{col('duration')})/SUM({col('duration')})",
         float(np.sum(shown["surplus"] * d) / d.sum())),
        ("mean_heat", f"mean heat into the oil [{u[POWER]}]", "heat",
         f"=SUMPRODUCT({col('heat')},{col('duration')})/SUM({col('duration')})",
         float(np.sum(shown["heat"] * d) / d.sum())),
    ]


def _write_duty_totals(book: Any, sheet: Any, name: str, totals: list[tuple[str, str, str, str, float]],
                       total_row: int, exact: dict[str, float | None] | None) -> dict[str, str]:
    """Write the totals from ``total_row`` on: live formulas, or for a binned series the checker's figures
    over every sample (``exact``); returns the cell references of the live ones."""
    refs: dict[str, str] = {}
    for k, (key, text, c_key, formula, value) in enumerate(totals):
        r = total_row + k
        c = DUTY_COL[c_key]
        # the label stands right-aligned just left of its figure's column, so it never hides the figure
        label = cell_format(book, bold=True, align="right")
        if c > 1:
            sheet.merge_range(r, 0, r, c - 1, text, label)
        else:
            sheet.write_string(r, 0, text, label)
        num = cell_format(book, bold=True, top=1, bottom=1,
                          num_format=number_format([exact[key] if exact else value]))
        if exact:
            write_value(sheet, r, c, exact[key], num)
        else:
            write_formula(sheet, r, c, formula, value, num)
            refs[key] = f"'{name}'!{xl_rowcol_to_cell(r, c, row_abs=True, col_abs=True)}"
    return refs


def _exact_totals(candidate: Candidate, units: str) -> dict[str, float | None]:
    """The checker's drive figures over every sample, as the totals of a binned duty sheet show them."""
    fig = candidate.result.drive
    return {"cycle": float(np.sum(fig.duration)), "peak_power": show(fig.peak_power, POWER, units),
            "rms_power": show(fig.rms_power, POWER, units),
            "peak_torque": show(fig.peak_torque, TORQUE, units),
            "mean_loss": show(fig.mean_power_loss, POWER, units),
            "energy": fig.energy_per_cycle * float(from_si(1.0, ENERGY, "Wh")),
            "mean_surplus": show(fig.mean_surplus_heat, POWER, units),
            "mean_heat": show(fig.mean_heat, POWER, units)}


def write_duty_sheet(book: Any, name: str, candidate: Candidate, units: str, paper: str) -> DutySheet:
    """Write one candidate's duty sheet; returns where its rows and totals are (for the summary, the charts)."""
    f = book_styles(book)
    sheet = book.add_worksheet(name)
    cols, labels, note = resample(candidate)
    app = candidate.result.application
    sheet.write_string(0, 0, f"{name}: duty of {candidate.datasheet.label} on {app.name}", f["title"])
    sheet.write_string(1, 0, note or "One row per duty segment. Columns with a blue header are live formulas.",
                       cell_format(book, "note", text_wrap=False))
    u = {k: display_unit(units, k) for k in (PRESSURE, SPEED, FLOW, POWER, TORQUE, TEMPERATURE, VISCOSITY)}
    shown, factors = _duty_values(cols, u)
    headers, formats = _duty_header(book, sheet, cols, shown, labels, u)
    first = _DUTY_HEADER_ROW + 1
    keys = [key for key in shown if key != "segment"]
    for i, label in enumerate(labels):
        _duty_row(book, sheet, first + i, label, {key: float(shown[key][i]) for key in keys}, formats, factors,
                  bool(note))
    last = first + len(labels) - 1
    total_row = last + 2
    totals = _duty_totals(shown, first, last, u)
    exact = None
    if note:
        # Binned means understate peaks and RMS: give the checker's figures over every sample instead.
        exact = _exact_totals(candidate, units)
        sheet.write_string(total_row - 1, 0, "over every sample (not the bins above):", f["note"])
    refs = _write_duty_totals(book, sheet, name, totals, total_row, exact)
    sheet.freeze_panes(_DUTY_HEADER_ROW + 1, 1)
    page_setup(sheet, app.name, paper=paper, title_rows=(_DUTY_HEADER_ROW, _DUTY_HEADER_ROW), title_columns=(0, 0),
               area=(0, 0, total_row + len(totals) - 1, len(headers) - 1))
    return DutySheet(name, first, last, bool(note), refs)
