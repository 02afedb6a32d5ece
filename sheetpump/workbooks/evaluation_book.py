"""The evaluation workbook of a measured performance table.

Sheets:

* **Summary** — the safety caution, the source, nominal and derived displacement (with its standard
  uncertainty and the difference), the loss model's coefficients with units and uncertainties, its
  residuals and measured ranges, the notes (what was assumed, not fitted) and the plausibility flags.
* **Points** — one row per measured point, grouped by speed and viscosity and sorted by pressure, with
  the file row it came from. A table of more than :data:`POINTS_SHEET_LIMIT` points shows an even
  sample of them (every k-th point in that order), said on the sheet and on Summary: a spreadsheet
  holds at most 1,048,576 rows, and a chart of millions of markers shows no more than one of ten
  thousand. Every figure on Summary (flag counts, derived displacement, the model) covers every point,
  and ``sheetpump evaluate --format json`` lists every point. Measured values carry the input fill; the
  columns that are plain arithmetic of others (geometric flow, the three efficiencies, hydraulic power,
  power loss, dynamic viscosity, torque from power or power from torque) are live formulas with their
  values stored. Then each point's flags and the model's efficiencies at the point.
* **Charts** — native charts of η_v, η_hm and η_t against pressure, one series of measured points per
  speed (and viscosity), drawn from the Points sheet (so from its sample on a large table), and the
  model's curve beside it in the same colour.
* **Curves** — the data behind the model curves, at each measured speed and viscosity.

Units are the defaults of :mod:`sheetpump.units` (bar, L/min, rpm, N·m, kW, mm²/s, °C). Written with
:mod:`sheetpump.workbooks.writer`: deterministic, atomic, text from inputs stays text.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
from xlsxwriter.utility import xl_rowcol_to_cell

from .. import SAFETY_CAUTION, __version__
from ..evaluation import TABLE_FLAG_TEXT, Evaluation, all_notes, coefficients
from ..physics.measured import FLAG_TEXT
from ..units import (
    DISPLACEMENT,
    DYN_VISCOSITY,
    FLOW,
    POWER,
    PRESSURE,
    SPEED,
    TEMPERATURE,
    TORQUE,
    VISCOSITY,
    from_si,
)
from .writer import (
    LINE_HEIGHT,
    MARKERS,
    PALETTE,
    PCT,
    SIGNED_PCT,
    STYLES,
    as_stored,
    display_path,
    open_book,
    page_setup,
    text_lines,
    write_formula,
    write_header,
    write_value,
)

__all__ = ["PALETTE", "write_evaluation"]

# PALETTE (one colour per speed and viscosity) is the writer's: Okabe and Ito's colour-blind-safe set.

SUMMARY, POINTS, CHARTS, CURVES = "Summary", "Points", "Charts", "Curves"
#: Most points written to the Points sheet (and drawn in the charts); a larger table is sampled evenly.
POINTS_SHEET_LIMIT = 10_000
#: Most speed and viscosity groups drawn in the charts and listed on the Curves sheet (by rising speed).
CHART_GROUPS_LIMIT = 24
_HEADER_ROW = 3  # 0-based row of the Points header
_CHARTS = (("ev", 1, "Volumetric efficiency η_v"), ("ehm", 2, "Hydro-mechanical efficiency η_hm"),
           ("et", 3, "Total efficiency η_t"))
# a printed page of the Charts sheet: 30 rows; a chart of this size [pixels] fits a landscape page, also where
# LibreOffice draws the cells the chart is anchored to ~1.2 x wider for want of the Calibri font
_BAND_ROWS, _CHART_W, _CHART_H = 30, 794, 540
_TITLE = "Measured performance evaluation"


def _num(x: Any) -> float | None:
    """A finite float, or None (an empty cell) for NaN/None."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


class _Formats:
    def __init__(self, book: Any) -> None:
        def fmt(*names: str, **extra: Any) -> Any:
            spec: dict[str, Any] = {}
            for name in names:
                spec.update(STYLES[name])
            spec.update(extra)
            return book.add_format(spec)

        self.title = fmt("title")
        self.header = fmt("header")
        self.caution = fmt("caution")
        self.note = fmt("note")
        self.note_line = fmt("note", text_wrap=False)
        self.section = fmt("header", text_wrap=False)
        self.label = book.add_format({"text_wrap": True, "valign": "top"})
        self.input = {d: fmt("input", num_format=f"0.{'0' * d}") for d in (1, 2, 3, 4)}
        self.value = {d: book.add_format({"num_format": f"0.{'0' * d}"}) for d in (1, 2, 3, 4)}
        self.sci = book.add_format({"num_format": "0.000E+00"})
        self.pct = book.add_format({"num_format": SIGNED_PCT})
        self.eff = book.add_format({"num_format": PCT})
        self.fail = fmt("fail", text_wrap=True)
        self.ok = fmt("pass")
        self.warn = fmt("warn", text_wrap=True)
        self.info = fmt("info", text_wrap=True)


def _order(e: Evaluation) -> np.ndarray:
    """Points by group (speed, then viscosity) and pressure; the points no group holds at the end."""
    grouped = np.concatenate([g.index for g in e.groups]) if e.groups else np.zeros(0, dtype=int)
    rest = np.ones(e.table.size, dtype=bool)
    rest[grouped] = False
    return np.concatenate([grouped, np.flatnonzero(rest)]).astype(int)


def shown_points(e: Evaluation, limit: int = POINTS_SHEET_LIMIT) -> tuple[np.ndarray, int]:
    """The points on the Points sheet, in its order, and the sampling step (1: every point).

    Up to ``limit`` points all are shown; beyond, every k-th point of the sheet's order (by group, then
    rising pressure), k = ⌈N/limit⌉, so each speed and viscosity keeps its share and its pressure span.

    >>> import numpy as np
    >>> from sheetpump.evaluation import evaluate_table, MeasuredTable
    >>> t = MeasuredTable(speed=np.full(5, 25.0), pressure=np.arange(5) * 50e5, flow=np.full(5, 7e-4),
    ...                   torque=np.arange(5) * 25.0 + 5, viscosity=np.full(5, 32e-6))
    >>> idx, step = shown_points(evaluate_table(t, 28e-6), limit=2)
    >>> idx.tolist(), step
    ([0, 3], 3)
    """
    order = _order(e)
    step = max(1, -(-order.size // limit))
    return order[::step], step


def _group_label(e: Evaluation, k: int) -> str:
    g = e.groups[k]
    label = f"{from_si(g.speed, SPEED):.0f} rpm"
    if len({round(x.viscosity, 12) for x in e.groups}) > 1 or len(e.groups) == 1:
        label += f", {from_si(g.viscosity, VISCOSITY):.3g} mm²/s"
    return label


def write_evaluation(e: Evaluation, target: str | os.PathLike[str], *, source: str | None = None,
                     paper: str = "A4") -> Path:
    """Write the evaluation workbook of ``e`` to ``target`` (atomically) and return its path.

    ``source`` is the input file's name as the user gave it (shown as text); an absolute one, or none,
    is shown relative to ``target``'s folder. ``paper`` is ``"A4"`` or ``"Letter"``.
    """
    target = Path(target)
    if source is None or Path(source).is_absolute():  # never an absolute path of this machine
        given = source or e.table.file
        source = display_path(given, target.resolve().parent) if given else ""
    with open_book(target, title=_TITLE) as book:
        f = _Formats(book)
        summary = book.add_worksheet(SUMMARY)
        points = book.add_worksheet(POINTS)
        charts = book.add_worksheet(CHARTS)
        curves = book.add_worksheet(CURVES)
        v_cell, summary_last = _write_summary(summary, e, f, source)
        rows, columns = _write_points(points, e, f, v_cell)
        curve_cols = _write_curves(curves, e, f)
        _write_charts(book, charts, e, f, rows, columns, curve_cols)
        # print: the header names the table, the footer the version and the caution
        name = f"Measured performance: {source}"
        page_setup(summary, name, paper=paper, landscape=False, area=(0, 0, summary_last, 4))
        page_setup(points, name, paper=paper, title_rows=(_HEADER_ROW, _HEADER_ROW), title_columns=(0, 0),
                   area=(0, 0, _HEADER_ROW + max(len(rows), 1), len(columns) - 1))
        bands = len(_CHARTS)
        page_setup(charts, name, paper=paper, area=(0, 0, bands * _BAND_ROWS - 1, 14),
                   breaks=[b * _BAND_ROWS for b in range(1, bands)])
        page_setup(curves, name, paper=paper, title_rows=(1, 2))
        summary.activate()
    return target


# -- Summary ---------------------------------------------------------------------------------------------
class _SummarySheet:
    """The Summary sheet being written, line by line: its formats and the next free row."""

    def __init__(self, sheet: Any, f: _Formats) -> None:
        self.sheet, self.f, self.r = sheet, f, 3

    def section(self, title: str, *heads: str) -> None:
        """A section's header row, one row below the last line."""
        self.r += 1
        write_value(self.sheet, self.r, 0, title, self.f.section)
        for i, h in enumerate(heads, start=1):
            write_value(self.sheet, self.r, i, h, self.f.section)
        for i in range(len(heads) + 1, 5):
            write_value(self.sheet, self.r, i, None, self.f.section)
        self.r += 1

    def tall(self, row: int, label: str, note: str) -> None:
        """Give a row the height its wrapped label (column A) and note (column E) need."""
        lines = max(text_lines(label, 40), text_lines(note, 60 * 1.1))
        if lines > 1:
            self.sheet.set_row(row, LINE_HEIGHT * lines)

    def line(self, label: str, value: Any, unit: str = "", fmt: Any = None, note: str = "") -> int:
        """A line of label, value, unit and note; returns its row."""
        sheet, r = self.sheet, self.r
        write_value(sheet, r, 0, label, self.f.label)
        write_value(sheet, r, 1, value, fmt)
        write_value(sheet, r, 2, unit)
        if note:
            write_value(sheet, r, 4, note, self.f.note)
        self.tall(r, label, note)
        self.r += 1
        return r


def _summary_source(s: _SummarySheet, e: Evaluation, source: str | None) -> None:
    """The Source section: the file, its sheet, how many points (and how many shown), how many flagged."""
    f, t = s.f, e.table
    s.section("Source", "value", "unit", "", "")
    s.line("table file", source)
    s.line("sheet", t.sheet if t.sheet else "(CSV file)")
    s.line("points", t.size)
    shown, step = shown_points(e)
    if step > 1:
        s.line("points on the Points sheet and in the charts", int(shown.size), "", None,
               f"every {step}th point by speed, viscosity and rising pressure: a sheet holds at most 1,048,576 "
               "rows and a chart of more points shows no more; every figure here covers every point, and "
               "`sheetpump evaluate --format json` lists each one")
    flagged = sum(1 for fl in e.points.flags if fl)
    s.line("points with a plausibility flag", flagged, "", f.fail if flagged else f.ok)
    s.line("written by", f"sheetpump {__version__}")


def _summary_displacement(s: _SummarySheet, e: Evaluation) -> str:
    """The Displacement section: nominal, derived and their difference, and the one used; returns the
    absolute reference of the displacement-used cell."""
    sheet, f = s.sheet, s.f
    s.section("Displacement", "value", "unit", "std. uncertainty", "")
    cm3 = "cm³/rev"
    nominal_row = s.line("nominal displacement", _num(from_si(e.nominal_displacement, DISPLACEMENT))
                         if e.nominal_displacement is not None else "not given", cm3, f.value[3])
    if e.derived is not None:
        derived_row = s.line("derived displacement (ISO 8426 idea)", from_si(e.derived.value, DISPLACEMENT), cm3,
                             f.value[3], f"from {e.derived.points} points up to "
                             f"{from_si(e.derived.max_pressure, PRESSURE):.4g} bar: slope of flow on speed, "
                             "leakage extrapolated to zero pressure")
        write_value(sheet, derived_row, 3, _num(from_si(e.derived.uncertainty, DISPLACEMENT)), f.value[4])
    else:
        derived_row = s.line("derived displacement (ISO 8426 idea)", "not derived", "", None, e.derived_error)
    if e.derived is not None and e.nominal_displacement is not None:
        r = s.r
        write_value(sheet, r, 0, "derived less nominal, relative", f.label)
        nom, der = xl_rowcol_to_cell(nominal_row, 1), xl_rowcol_to_cell(derived_row, 1)
        # the values a spreadsheet computes from the cells as stored: a difference of two nearly equal
        # displacements depends on the last digits kept
        v_nom, v_der = (as_stored(from_si(x, DISPLACEMENT)) for x in (e.nominal_displacement, e.derived.value))
        write_formula(sheet, r, 1, f"=({der}-{nom})/{nom}", (v_der - v_nom) / v_nom, f.pct)
        if e.derived.uncertainty > 0:
            unc = xl_rowcol_to_cell(derived_row, 3)
            write_formula(sheet, r, 3, f"=ABS({der}-{nom})/{unc}",
                          abs(v_der - v_nom) / as_stored(from_si(e.derived.uncertainty, DISPLACEMENT)), f.value[2])
            write_value(sheet, r, 2, "× std. unc.")
        flag = bool(e.table_flags)
        write_value(sheet, r, 4, TABLE_FLAG_TEXT[e.table_flags[0]] if flag else
                    "agree (within three standard uncertainties or 2 %)", f.fail if flag else f.ok)
        s.r += 1
    used_row = s.line("displacement the points are evaluated with", from_si(e.displacement, DISPLACEMENT), cm3,
                      f.value[3], "nominal" if e.nominal_displacement is not None else "derived")
    return f"'{SUMMARY}'!{xl_rowcol_to_cell(used_row, 1, True, True)}"


def _summary_model(s: _SummarySheet, e: Evaluation) -> None:
    """The Loss model section: method, coefficients with uncertainties, residuals, measured ranges."""
    f = s.f
    s.section("Loss model", "value", "unit", "std. uncertainty", "meaning")
    m = e.model
    if m is None:
        s.line("method", "none", note=e.model_error)
        return
    s.line("method", "Wilson's model (least squares)" if m.method == "wilson"
           else "measured efficiencies interpolated in pressure", note=f"{m.points} points")
    for c in coefficients(m):
        row = s.line(str(c["symbol"]), c["value"], str(c["unit"]), f.sci,
                     str(c["meaning"]) + ("" if c["fitted"] else " — assumed, not fitted"))
        write_value(s.sheet, row, 3, _num(c["uncertainty"]), f.sci)
    res = getattr(m, "residuals", None)
    if res is not None:
        s.line("flow residual, RMS", from_si(res.flow_rms, FLOW), "L/min", f.value[4], "measured less model")
        s.line("flow residual, largest", from_si(res.flow_max, FLOW), "L/min", f.value[4])
        s.line("torque residual, RMS", from_si(res.torque_rms, TORQUE), "N·m", f.value[4])
        s.line("torque residual, largest", from_si(res.torque_max, TORQUE), "N·m", f.value[4])
    rg = m.ranges
    for label, (lo, hi), kind, unit in (("pressure", rg.pressure, PRESSURE, "bar"),
                                        ("speed", rg.speed, SPEED, "rpm"),
                                        ("dynamic viscosity", rg.viscosity, DYN_VISCOSITY, "mPa·s")):
        s.line(f"measured {label}, lowest", from_si(lo, kind), unit, f.value[2])
        s.line(f"measured {label}, highest", from_si(hi, kind), unit, f.value[2],
               "the model's predictions outside these ranges are extrapolated" if label == "pressure" else "")


def _summary_flags(s: _SummarySheet, e: Evaluation) -> None:
    """The Plausibility flags section: how many points each flag fired on, and the table's own flags."""
    f = s.f
    s.section("Plausibility flags", "points", "", "", "meaning")
    counts: dict[str, int] = {}
    for fl in e.points.flags:
        for code in fl:
            counts[code] = counts.get(code, 0) + 1
    for code, text in FLAG_TEXT.items():
        row = s.line(code, counts.get(code, 0), "", f.fail if counts.get(code) else f.ok)
        write_value(s.sheet, row, 4, text, f.note)
        s.tall(row, code, text)
    for code, text in TABLE_FLAG_TEXT.items():
        row = s.line(code, 1 if code in e.table_flags else 0, "", f.fail if code in e.table_flags else f.ok)
        write_value(s.sheet, row, 4, text, f.note)
        s.tall(row, code, text)


def _write_summary(sheet: Any, e: Evaluation, f: _Formats, source: str | None) -> tuple[str, int]:
    """Write the Summary sheet; return the absolute reference of the displacement-used cell and the last
    row written."""
    sheet.set_column(0, 0, 40)
    sheet.set_column(1, 1, 16)
    sheet.set_column(2, 2, 12)
    sheet.set_column(3, 3, 16)
    sheet.set_column(4, 4, 60)
    write_value(sheet, 0, 0, _TITLE, f.title)
    sheet.merge_range(1, 0, 1, 4, SAFETY_CAUTION, f.caution)
    sheet.set_row(1, LINE_HEIGHT * text_lines(SAFETY_CAUTION, (40 + 16 + 12 + 16 + 60) * 0.85))
    s = _SummarySheet(sheet, f)
    _summary_source(s, e, source)
    v_cell = _summary_displacement(s, e)
    _summary_model(s, e)
    s.section("Notes", "", "", "", "")
    for note in all_notes(e):
        sheet.merge_range(s.r, 0, s.r, 4, note, f.note)
        sheet.set_row(s.r, LINE_HEIGHT * text_lines(note, (40 + 16 + 12 + 16 + 60) * 0.95))
        s.r += 1
    _summary_flags(s, e)
    r = s.r + 1
    sheet.merge_range(r, 0, r, 4, "Exit code of `sheetpump evaluate`: 0 no flag, 1 a plausibility flag fired, "
                      "2 bad input.", f.note)
    sheet.freeze_panes(2, 0)
    return v_cell, r


# -- Points ----------------------------------------------------------------------------------------------
def _points_columns(t: Any) -> list[tuple[str, str, int]]:
    """The Points sheet's columns for table ``t``: key, header, width [characters]."""
    power_measured = t.torque is None
    cols: list[tuple[str, str, int]] = [  # key, header, width
        ("row", "row in the file", 8),
        ("speed", "speed [rpm]", 10),
        ("pressure", "pressure [bar]", 10),
        ("flow", "flow [L/min]", 10),
        ("torque", "torque [N·m]" + (" (from power)" if power_measured else ""), 12),
        ("power", "input power [kW]" + ("" if power_measured else " (from torque)"), 12),
        ("viscosity", "viscosity [mm²/s]" + (" (from temperature)" if t.viscosity is None and
                                            t.temperature is not None else ""), 12),
    ]
    if t.temperature is not None:
        cols.append(("temperature", "temperature [°C]", 11))
    cols += [
        ("density", "density [kg/m³]", 10),
        ("mu", "dynamic viscosity [mPa·s]", 12),
        ("qth", "geometric flow [L/min]", 11),
        ("ev", "volumetric efficiency η_v [-]", 12),
        ("ehm", "hydro-mechanical efficiency η_hm [-]", 14),
        ("et", "total efficiency η_t [-]", 11),
        ("phyd", "hydraulic power [kW]", 11),
        ("loss", "power loss [kW]", 10),
        ("flags", "plausibility flags", 34),
        ("m_ev", "model η_v [-]", 10),
        ("m_ehm", "model η_hm [-]", 10),
        ("m_et", "model η_t [-]", 10),
        ("extrap", "model outside the measured ranges", 26),
    ]
    return cols


@dataclass(frozen=True)
class _PointsSheet:
    """What every row of the Points sheet is written with: the sheet, its formats, the column of each key,
    the displacement cell, and the table's values in the sheet's units."""

    sheet: Any
    f: _Formats
    col: dict[str, int]
    v_cell: str
    shown: dict[str, np.ndarray]  # speed, pressure, flow, torque, power, viscosity, mu [display units]

    def cell(self, key: str, r: int) -> str:
        return xl_rowcol_to_cell(r, self.col[key])


def _measured_cells(ps: _PointsSheet, e: Evaluation, r: int, i: int, ok: bool) -> None:
    """The measured cells of point ``i`` at row ``r``, and torque from power or power from torque."""
    sheet, f, col, cell = ps.sheet, ps.f, ps.col, ps.cell
    t = e.table
    write_value(sheet, r, col["row"], int(t.rows[i]) if t.rows.size else i + 1)
    write_value(sheet, r, col["speed"], _num(ps.shown["speed"][i]), f.input[1])
    write_value(sheet, r, col["pressure"], _num(ps.shown["pressure"][i]), f.input[2])
    write_value(sheet, r, col["flow"], _num(ps.shown["flow"][i]), f.input[3])
    n_c, t_c, w_c = cell("speed", r), cell("torque", r), cell("power", r)
    if t.torque is not None:
        write_value(sheet, r, col["torque"], _num(from_si(t.torque[i], TORQUE)), f.input[3])
        if ok:  # P [kW] = 2π·n [rpm]·T [N·m]/60000
            write_formula(sheet, r, col["power"], f"=2*PI()*{n_c}*{t_c}/60000", float(ps.shown["power"][i]),
                          f.value[4])
    else:
        write_value(sheet, r, col["power"], _num(from_si(t.input_power[i], POWER)), f.input[4])
        if ok:
            write_formula(sheet, r, col["torque"], f"={w_c}*60000/(2*PI()*{n_c})", float(ps.shown["torque"][i]),
                          f.value[3])
    from_temperature = t.viscosity is None and t.temperature is not None
    write_value(sheet, r, col["viscosity"], _num(ps.shown["viscosity"][i]),
                f.value[3] if from_temperature else f.input[3])
    if t.temperature is not None:
        write_value(sheet, r, col["temperature"], _num(from_si(t.temperature[i], TEMPERATURE)), f.input[1])
    write_value(sheet, r, col["density"], _num(e.density[i]), f.value[1])


def _point_row(ps: _PointsSheet, e: Evaluation, r: int, i: int) -> None:
    """Write point ``i`` at row ``r``: measured cells, the live formulas of the efficiencies and powers
    (with their values), its flags and the model's efficiencies."""
    sheet, f, col, cell, v_cell = ps.sheet, ps.f, ps.col, ps.cell, ps.v_cell
    pe = e.points
    ok = bool(np.isfinite(pe.volumetric[i]))  # evaluated (neither missing nor impossible)
    _measured_cells(ps, e, r, i, ok)
    n_c, p_c, q_c = cell("speed", r), cell("pressure", r), cell("flow", r)
    t_c, w_c = cell("torque", r), cell("power", r)
    mu = ps.shown["mu"]
    if np.isfinite(mu[i]):  # μ [mPa·s] = ν [mm²/s]·ρ [kg/m³]/1000
        write_formula(sheet, r, col["mu"], f"={cell('viscosity', r)}*{cell('density', r)}/1000",
                      float(mu[i]), f.value[3])
    if ok:
        qth = float(from_si(pe.geometric_flow[i], FLOW))
        phyd = float(from_si(pe.hydraulic_power[i], POWER))
        write_formula(sheet, r, col["qth"], f"={v_cell}*{n_c}/1000", qth, f.value[3])  # L/min = cm³·rpm/1000
        write_formula(sheet, r, col["ev"], f"={q_c}/{cell('qth', r)}", float(pe.volumetric[i]), f.eff)
        # η_hm = V·Δp/(2π·T) = V [cm³]·Δp [bar]/(20π·T [N·m])
        write_formula(sheet, r, col["ehm"], f"={v_cell}*{p_c}/(20*PI()*{t_c})", float(pe.hydromechanical[i]),
                      f.eff)
        write_formula(sheet, r, col["phyd"], f"={p_c}*{q_c}/600", phyd, f.value[4])  # kW = bar·L/min/600
        write_formula(sheet, r, col["et"], f"={cell('phyd', r)}/{w_c}", float(pe.total[i]), f.eff)
        write_formula(sheet, r, col["loss"], f"={w_c}-{cell('phyd', r)}", float(from_si(pe.power_loss[i], POWER)),
                      f.value[4])
    flags = pe.flags[i]
    write_value(sheet, r, col["flags"], "; ".join(flags) if flags else "ok", f.fail if flags else f.ok)
    pr = e.prediction
    if pr is not None and ok:
        write_value(sheet, r, col["m_ev"], _num(pr.volumetric[i]), f.eff)
        write_value(sheet, r, col["m_ehm"], _num(pr.hydromechanical[i]), f.eff)
        write_value(sheet, r, col["m_et"], _num(pr.total[i]), f.eff)
        write_value(sheet, r, col["extrap"], str(pr.extrapolation[i]) or "no")


def _write_points(sheet: Any, e: Evaluation, f: _Formats, v_cell: str
                  ) -> tuple[np.ndarray, dict[str, int]]:
    """Write the Points sheet; return the sheet row of each point (-1: not shown) and the column of each key."""
    t, pe = e.table, e.points
    cols = _points_columns(t)
    col = {key: i for i, (key, _, _) in enumerate(cols)}
    write_value(sheet, 0, 0, f"{_TITLE}: points", f.title)
    write_value(sheet, 1, 0, "Shaded: measured. Formulas use the displacement on the Summary sheet "
                "(" + v_cell.replace("'", "") + "). Rows grouped by speed and viscosity, by rising pressure.",
                f.note_line)
    write_header(sheet, _HEADER_ROW, [h for _, h, _ in cols], [w for _, _, w in cols], f.header)
    shown, step = shown_points(e)
    if step > 1:
        write_value(sheet, 2, 0, f"The table has {t.size:,} points; this sheet shows {shown.size:,} of them, every "
                    f"{step}th in this order, and the charts draw these. Summary's figures and flag counts "
                    "cover every point; `sheetpump evaluate --format json` lists each one.", f.note_line)
    values = {"speed": from_si(t.speed, SPEED), "pressure": from_si(t.pressure, PRESSURE),
              "flow": from_si(t.flow, FLOW), "torque": from_si(pe.torque, TORQUE),
              "power": from_si(pe.input_power, POWER), "viscosity": from_si(e.viscosity, VISCOSITY),
              "mu": from_si(e.dynamic_viscosity, DYN_VISCOSITY)}
    ps = _PointsSheet(sheet, f, col, v_cell, values)
    rows = np.full(t.size, -1)
    for k, i in enumerate(shown.tolist()):
        r = _HEADER_ROW + 1 + k
        rows[i] = r
        _point_row(ps, e, r, i)
    sheet.freeze_panes(_HEADER_ROW + 1, 1)
    last = _HEADER_ROW + max(shown.size, 1)
    sheet.autofilter(_HEADER_ROW, 0, last, len(cols) - 1)
    return rows, col


# -- Curves ----------------------------------------------------------------------------------------------
def _write_curves(sheet: Any, e: Evaluation, f: _Formats) -> list[int]:
    """Write the model curves, four columns per group; return each group's first column."""
    write_value(sheet, 0, 0, "Model curves at each measured speed and viscosity (over the measured pressure "
                "range)", f.title)
    first: list[int] = []
    for k, (pressure, pred) in enumerate(e.curves[:CHART_GROUPS_LIMIT]):
        c = 5 * k
        first.append(c)
        write_value(sheet, 1, c, _group_label(e, k), f.section)
        for j, h in enumerate(("pressure [bar]", "η_v [-]", "η_hm [-]", "η_t [-]")):
            write_value(sheet, 2, c + j, h, f.header)
            sheet.set_column(c + j, c + j, 11)
        for i, p in enumerate(pressure):
            write_value(sheet, 3 + i, c, float(from_si(p, PRESSURE)), f.value[2])
            for j, arr in enumerate((pred.volumetric, pred.hydromechanical, pred.total), start=1):
                write_value(sheet, 3 + i, c + j, _num(np.ravel(arr)[i]), f.eff)
    if not e.curves:
        write_value(sheet, 2, 0, "no model: " + e.model_error, f.note_line)
    sheet.freeze_panes(3, 0)
    return first


# -- Charts ----------------------------------------------------------------------------------------------
def _write_charts(book: Any, sheet: Any, e: Evaluation, f: _Formats, rows: np.ndarray, col: dict[str, int],
                  curve_cols: list[int]) -> None:
    write_value(sheet, 0, 0, "Efficiencies against pressure: measured points (markers) and the model (lines)",
                f.title)
    if len(e.groups) > CHART_GROUPS_LIMIT:
        write_value(sheet, 0, 8, f"The first {CHART_GROUPS_LIMIT} of {len(e.groups)} speed and viscosity groups are "
                    "drawn (by rising speed); the Points sheet holds the others.", f.note_line)
    for place, (key, offset, title) in enumerate(_CHARTS):
        chart = book.add_chart({"type": "scatter"})
        chart.set_title({"name": title, "name_font": {"size": 12}})
        chart.set_x_axis({"name": "pressure [bar]", "major_gridlines": {"visible": True,
                                                                         "line": {"color": "#E0E0E0"}}})
        chart.set_y_axis({"name": f"{title.split()[-1]} [-]", "num_format": "0.00",
                          "major_gridlines": {"visible": True, "line": {"color": "#E0E0E0"}}})
        values: list[float] = []
        for k, g in enumerate(e.groups[:CHART_GROUPS_LIMIT]):
            colour, marker = PALETTE[k % len(PALETTE)], MARKERS[k % len(MARKERS)]
            on_sheet = g.index[rows[g.index] >= 0]
            label = _group_label(e, k)
            if on_sheet.size:
                lo, hi = int(rows[on_sheet].min()), int(rows[on_sheet].max())
                chart.add_series({
                    "name": f"{label} measured",
                    "categories": [POINTS, lo, col["pressure"], hi, col["pressure"]],
                    "values": [POINTS, lo, col[key], hi, col[key]],
                    "marker": {"type": marker, "size": 6, "fill": {"color": colour}, "border": {"color": colour}},
                    "line": {"none": True},
                })
            arr = {"ev": e.points.volumetric, "ehm": e.points.hydromechanical, "et": e.points.total}[key]
            values += [float(x) for x in arr[on_sheet] if np.isfinite(x)]
            if k < len(curve_cols):
                c = curve_cols[k]
                pressure, pred = e.curves[k]
                chart.add_series({
                    "name": f"{label} model",
                    "categories": [CURVES, 3, c, 3 + len(pressure) - 1, c],
                    "values": [CURVES, 3, c + offset, 3 + len(pressure) - 1, c + offset],
                    "line": {"color": colour, "width": 1.75},
                    "marker": {"type": "none"},
                })
                arr = (pred.volumetric, pred.hydromechanical, pred.total)[offset - 1]
                values += [float(x) for x in np.ravel(arr) if np.isfinite(x) and x > 0.2]
        if values:
            low = max(0.0, math.floor(min(values) * 20) / 20)
            high = max(1.0, math.ceil(max(values) * 20) / 20)
            chart.set_y_axis({"name": f"{title.split()[-1]} [-]", "num_format": "0.00", "min": low, "max": high,
                              "major_gridlines": {"visible": True, "line": {"color": "#E0E0E0"}}})
        chart.set_legend({"position": "right"})
        chart.set_size({"width": _CHART_W, "height": _CHART_H})
        sheet.insert_chart(1 + place * _BAND_ROWS, 0, chart)  # one chart a printed page
