"""The comparison workbook: the deliverable a design review sees.

Sheets:

* **Summary** — candidates side by side: key datasheet values, every rule's verdict with its margin,
  drive figures, the motor chosen, energy, heat, cost and the ranking; a colour legend.
* **Duty n** — one per candidate, segment by segment (a resampled summary for a long time series).
  Columns that follow from others by arithmetic are live native formulas with their values stored.
* **Charts** — native charts: efficiencies and delivered flow against pressure, and each candidate's
  speed–pressure envelope with the duty points.
* **Curves** — the data behind the charts' curves.
* **Findings** — every finding, with the datasheet cell it concerns.
* **Assumptions** — settings, oil, motor standard and its table, version, input files and their
  SHA-256, and the safety caution.

Written with :mod:`sheetpump.workbooks.writer`: deterministic, atomic, text from inputs stays text.
"""

from __future__ import annotations

import itertools
import os
import re
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np
from xlsxwriter.utility import xl_rowcol_to_cell

from .. import SAFETY_CAUTION, __version__, performance
from ..checks import DISPLAY_UNITS, RULES, Finding
from ..comparison import Candidate, Comparison
from ..files import sha256
from ..physics import drive, fluid
from ..units import (
    ABS_PRESSURE,
    DISPLACEMENT,
    ENERGY,
    FLOW,
    MASS,
    POWER,
    PRESSURE,
    SPEED,
    TEMPERATURE,
    TORQUE,
    VISCOSITY,
    Kind,
    from_si,
)
from .writer import open_book, write_formula, write_value

__all__ = ["MAX_DUTY_ROWS", "write_comparison"]

#: A duty longer than this (a measured series) is shown as this many time-weighted bins.
MAX_DUTY_ROWS = 1000

# number format of each duty-sheet column (1: duration ... 11: input power)
_DUTY_FORMATS = {1: "n1", 2: "n1", 3: "n0", 4: "n1", 5: "n1", 6: "n2", 7: "n2", 8: "pct", 9: "pct", 10: "n1",
                 11: "n2"}
_CURVE_POINTS = 25  # points of each efficiency and flow curve
_LABEL_COL = 60  # column of the Curves sheet that holds chart labels
_SHEET_KEEP = re.compile(r"[^\w .&-]")


def _unit(units: str, kind: Kind) -> str:
    return DISPLAY_UNITS[units].get(kind, kind.default)


def _show(value: float | None, kind: Kind, units: str) -> float | None:
    if value is None:
        return None
    return float(from_si(value, kind, _unit(units, kind)))


def _sheet_name(i: int, label: str) -> str:
    # Sheet names stand inside formulas ('Duty 1 ...'!B5): a label from an input goes into the name only
    # when it holds nothing but plain characters, so '=HYPERLINK(...)' or "+cmd|'..." never reaches a
    # formula (the label is in the sheet's title cell anyway, as text).
    clean = " ".join(label.split())
    if _SHEET_KEEP.search(clean):
        return f"Duty {i + 1}"
    return f"Duty {i + 1} {clean}"[:31].rstrip()


def _resample(candidate: Candidate) -> tuple[dict[str, np.ndarray], list[str], str]:
    """Per-row arrays for a duty sheet (SI), the row labels, and a note if resampled."""
    res = candidate.result
    duty, fig = res.application.duty, res.drive
    cols = {
        "duration": duty.duration, "pressure": duty.pressure, "speed": duty.speed,
        "temperature": duty.temperature, "required": duty.flow, "delivered": fig.flow,
        "vol_eff": fig.volumetric_efficiency, "total_eff": fig.total_efficiency, "torque": fig.torque,
        "input_power": fig.input_power, "viscosity": fig.viscosity,
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


def _duty_sheet(book: Any, name: str, candidate: Candidate, units: str) -> dict[str, str]:
    """Write one candidate's duty sheet; returns cell references of its totals (for the summary)."""
    f = book.styles
    sheet = book.add_worksheet(name)
    cols, labels, note = _resample(candidate)
    u = {k: _unit(units, k) for k in (PRESSURE, SPEED, FLOW, POWER, TORQUE, TEMPERATURE, VISCOSITY)}
    sheet.write_string(0, 0, f"Duty of {candidate.datasheet.label} on {candidate.result.application.name}",
                       f["title"])
    sheet.write_string(1, 0, note or "One row per duty segment. Grey-headed columns are live formulas.",
                       f["note"])
    headers = [
        ("segment", None), ("duration [s]", None), (f"pressure [{u[PRESSURE]}]", None),
        (f"speed [{u[SPEED]}]", None), (f"oil temperature [{u[TEMPERATURE]}]", None),
        (f"viscosity [{u[VISCOSITY]}]", None), (f"required flow [{u[FLOW]}]", None),
        (f"delivered flow [{u[FLOW]}]", None), ("volumetric efficiency", None), ("total efficiency", None),
        (f"torque [{u[TORQUE]}]", None), (f"input power [{u[POWER]}]", None),
        (f"hydraulic power [{u[POWER]}]", "formula"), (f"power loss [{u[POWER]}]", "formula"),
        ("flow margin", "formula"), (f"energy [{_unit(units, ENERGY) or 'kWh'}]", "formula"),
    ]
    if "pressure_max" in cols:
        headers.append((f"max pressure [{u[PRESSURE]}]", None))
    for c, (text, kind) in enumerate(headers):
        sheet.write_string(3, c, text, f["header"] if kind is None else f["info"])
    first = 4
    # the factor that turns pressure x flow in the display units into the display power unit
    hyd = float(from_si(from_si(1.0, PRESSURE, u[PRESSURE]) ** -1 * from_si(1.0, FLOW, u[FLOW]) ** -1,
                        POWER, u[POWER]))
    kwh_per_j = float(from_si(1.0, ENERGY, "kWh"))
    power_si_per_display = 1.0 / float(from_si(1.0, POWER, u[POWER]))
    show = {
        "pressure": (PRESSURE,), "speed": (SPEED,), "temperature": (TEMPERATURE,), "viscosity": (VISCOSITY,),
        "required": (FLOW,), "delivered": (FLOW,), "torque": (TORQUE,), "input_power": (POWER,),
    }
    shown = {k: np.asarray(from_si(v, show[k][0], u[show[k][0]]), float) if k in show else np.asarray(v, float)
             for k, v in cols.items() if k != "pressure_max"}
    for i, label in enumerate(labels):
        r = first + i
        write_value(sheet, r, 0, label)
        for c, key in enumerate(("duration", "pressure", "speed", "temperature", "viscosity", "required",
                                 "delivered", "vol_eff", "total_eff", "torque", "input_power"), start=1):
            write_value(sheet, r, c, float(shown[key][i]), f[_DUTY_FORMATS[c]])
        p, q, qr, pin, t = (xl_rowcol_to_cell(r, c) for c in (2, 7, 6, 11, 1))
        hyd_v = float(shown["pressure"][i] * shown["delivered"][i] * hyd)
        write_formula(sheet, r, 12, f"={p}*{q}*{hyd!r}", hyd_v, f["n2"])
        h = xl_rowcol_to_cell(r, 12)
        write_formula(sheet, r, 13, f"={pin}-{h}", float(shown["input_power"][i]) - hyd_v, f["n2"])
        req = float(shown["required"][i])
        if req > 0:
            write_formula(sheet, r, 14, f"={q}/{qr}-1", float(shown["delivered"][i]) / req - 1.0, f["pct"])
        else:
            write_value(sheet, r, 14, "no flow required")
        energy = float(shown["input_power"][i]) * power_si_per_display * float(shown["duration"][i]) * kwh_per_j
        write_formula(sheet, r, 15, f"={pin}*{t}*{power_si_per_display * kwh_per_j!r}", energy, f["n3"])
        if "pressure_max" in cols:
            write_value(sheet, r, 16, float(from_si(cols["pressure_max"][i], PRESSURE, u[PRESSURE])))
    last = first + len(labels) - 1
    total_row = last + 2
    col = lambda c: f"{xl_rowcol_to_cell(first, c)}:{xl_rowcol_to_cell(last, c)}"  # noqa: E731
    d, pin = np.asarray(shown["duration"]), np.asarray(shown["input_power"])
    loss = pin - np.asarray(shown["pressure"]) * np.asarray(shown["delivered"]) * hyd
    # key, label, column, formula, value (what the formula gives, computed here)
    totals = [
        ("cycle", "cycle time [s]", 1, f"=SUM({col(1)})", float(d.sum())),
        ("peak_power", f"peak input power [{u[POWER]}]", 11, f"=MAX({col(11)})", float(pin.max())),
        ("rms_power", f"RMS input power [{u[POWER]}]", 11,
         f"=SQRT(SUMPRODUCT({col(11)},{col(11)},{col(1)})/SUM({col(1)}))",
         float(np.sqrt(np.sum(pin**2 * d) / d.sum()))),
        ("peak_torque", f"peak torque [{u[TORQUE]}]", 10, f"=MAX({col(10)})", float(np.max(shown["torque"]))),
        ("mean_loss", f"mean power loss [{u[POWER]}]", 13, f"=SUMPRODUCT({col(13)},{col(1)})/SUM({col(1)})",
         float(np.sum(loss * d) / d.sum())),
        ("energy", "shaft energy per cycle [kWh]", 15, f"=SUM({col(15)})",
         float(np.sum(pin * power_si_per_display * d) * kwh_per_j)),
    ]
    refs: dict[str, str] = {}
    if note:
        # Binned means understate peaks and RMS: give the checker's figures over every sample instead.
        fig = candidate.result.drive
        exact = {"cycle": float(np.sum(fig.duration)), "peak_power": _show(fig.peak_power, POWER, units),
                 "rms_power": _show(fig.rms_power, POWER, units),
                 "peak_torque": _show(fig.peak_torque, TORQUE, units),
                 "mean_loss": _show(fig.mean_power_loss, POWER, units),
                 "energy": fig.energy_per_cycle * kwh_per_j}
        sheet.write_string(total_row - 1, 0, "over every sample (not the bins above):", f["note"])
    for k, (key, text, c, formula, value) in enumerate(totals):
        r = total_row + k
        sheet.write_string(r, 0, text, f["header"])
        if note:
            write_value(sheet, r, c, exact[key], f["n2"])
        else:
            write_formula(sheet, r, c, formula, value, f["n2"])
            refs[key] = f"'{name}'!{xl_rowcol_to_cell(r, c, row_abs=True, col_abs=True)}"
    sheet.set_column(0, 0, 24)
    sheet.set_column(1, len(headers), 13)
    sheet.freeze_panes(4, 1)
    sheet._sheetpump_rows = (first, last)  # for the charts
    return refs


def _fmt_margin(margin: float | None) -> str:
    return "" if margin is None else f"{margin:+.1%}"


def _finding_text(f: Finding) -> str:
    if f.severity == "pass":
        return f"pass {_fmt_margin(f.margin)}".strip()
    return f"{f.severity} {_fmt_margin(f.margin)}".strip()


def _summary(book: Any, comp: Comparison, units: str, duty_refs: list[dict[str, str]]) -> None:
    f = book.styles
    sheet = book.add_worksheet("Summary")
    app = comp.application
    sheet.write_string(0, 0, f"Pump comparison: {app.name}", f["title"])
    width = max(2, len(comp.candidates))
    sheet.merge_range(1, 0, 1, width, SAFETY_CAUTION, f["caution"])
    sheet.set_row(1, 48)
    for r, (style, text) in enumerate((("pass", "pass: inside the rating, with the margin asked"),
                                       ("warn", "warn: allowed, but look (short-term limit, extrapolation)"),
                                       ("fail", "fail: outside a rating"),
                                       ("info", "info: a figure without a verdict")), start=2):
        sheet.write_string(r, 0, "legend" if r == 2 else "")
        sheet.write_string(r, 1, text, f[style])
    cands = comp.candidates
    row = 7
    sheet.write_string(row, 0, "candidate", f["header"])
    for c, cand in enumerate(cands, start=1):
        sheet.write_string(row, c, cand.datasheet.label, f["header"])
    sheet.set_row(row, 32)
    row += 1

    def line(label: str, values: Sequence[Any], styles: Sequence[str | None] | str | None = None) -> None:
        nonlocal row
        sheet.write_string(row, 0, label)
        for c, value in enumerate(values, start=1):
            style = styles if isinstance(styles, str) else (styles[c - 1] if styles else None)
            write_value(sheet, row, c, value, f[style] if style else None)
        row += 1

    u = lambda kind: _unit(units, kind)  # noqa: E731
    ds = [c.datasheet for c in cands]
    line("supplier", [d.supplier for d in ds])
    line("model", [d.model for d in ds])
    line("datasheet file", [Path(d.file).name if d.file else "" for d in ds])
    line(f"displacement [{_unit(units, DISPLACEMENT) if units == 'metric' else 'in^3/rev'}]",
         [float(from_si(d.displacement, DISPLACEMENT, "cm^3/rev" if units == "metric" else "in^3/rev"))
          for d in ds], "n2")
    line(f"speed range [{u(SPEED)}]", [f"{_show(d.speed_min, SPEED, units):g} – {_show(d.speed_max, SPEED, units):g}"
                                         for d in ds])
    line(f"continuous pressure [{u(PRESSURE)}]", [_show(d.pressure_continuous, PRESSURE, units) for d in ds], "n0")
    line(f"intermittent pressure [{u(PRESSURE)}]", [_show(d.pressure_intermittent, PRESSURE, units) for d in ds], "n0")
    line(f"peak pressure [{u(PRESSURE)}]", [_show(d.pressure_peak, PRESSURE, units) for d in ds], "n0")
    line(f"price [{app.currency}]", [d.price for d in ds], "n0")
    mass_unit = "kg" if units == "metric" else "lb"
    line(f"mass [{mass_unit}]", [None if d.mass is None else float(from_si(d.mass, MASS, mass_unit)) for d in ds],
         "n1")
    line("noise [dB(A)]", [d.noise for d in ds], "n0")
    row += 1
    line("verdict", [c.result.verdict for c in cands], [c.result.verdict for c in cands])
    line("worst margin", [_fmt_margin(c.result.worst_margin) for c in cands])
    line("delivered-flow margin", [_fmt_margin(c.flow_margin) for c in cands])
    for label, values, style in _suction_rows(cands, units):
        line(label, values, style)
    rules = [r for r in RULES if any(f.rule == r for c in cands for f in c.result.findings)]
    for rule in rules:
        texts, styles = [], []
        for c in cands:
            found = [f for f in c.result.findings if f.rule == rule]
            texts.append(_finding_text(found[0]) if found else "not stated")
            styles.append(found[0].severity if found else None)
        line(f"{rule}: {RULES[rule]}", texts, styles)
    row += 1
    # drive figures: live links to each duty sheet's totals, with the checker's values stored
    for key, label, kind, attr in (
        ("peak_power", f"peak input power [{u(POWER)}]", POWER, "peak_power"),
        ("rms_power", f"RMS input power [{u(POWER)}]", POWER, "rms_power"),
        ("peak_torque", f"peak torque [{u(TORQUE)}]", TORQUE, "peak_torque"),
        ("mean_loss", f"pump power loss, mean [{u(POWER)}]", POWER, "mean_power_loss"),
    ):
        sheet.write_string(row, 0, label)
        for c, (cand, refs) in enumerate(zip(cands, duty_refs, strict=True), start=1):
            value = _show(getattr(cand.result.drive, attr), kind, units)
            if key in refs:
                write_formula(sheet, row, c, f"={refs[key]}", value, f["n2"])
            else:  # a resampled series: the duty sheet's bins are not the whole truth
                write_value(sheet, row, c, value, f["n2"])
        row += 1
    line(f"surplus flow over the relief valve or a throttle, mean [{u(POWER)}]",
         [_show(c.throttling_heat, POWER, units) for c in cands], "n2")
    line(f"heat into the oil, mean [{u(POWER)}]",
         [_show(c.heat_to_oil + c.throttling_heat, POWER, units) for c in cands], "n2")
    line("motor chosen", [c.motor.label if c.motor else "none" for c in cands],
         [None if c.motor else "fail" for c in cands])
    sheet.set_row(row, 30)
    line("motor load (of its rating)", [c.motor_note for c in cands], "wrap")
    line("motor full-load efficiency", [c.motor.efficiency if c.motor else None for c in cands], "pct")
    line("electrical energy per cycle [kWh]", [c.electrical_energy_per_cycle / 3.6e6 for c in cands], "n3")
    line("electrical energy per year [kWh]", [c.electrical_energy_per_year / 3.6e6 for c in cands], "n0")
    line(f"energy cost per year [{app.currency}]", [c.energy_cost_per_year for c in cands], "n0")
    line(f"cost over {app.evaluation_years:g} years [{app.currency}]", [c.cost_over_period for c in cands], "n0")
    line("rank (passing candidates, by cost over the period)", [c.rank if c.rank else "not ranked" for c in cands])
    defaults = f"defaults used for: {', '.join(app.defaulted)}" if app.defaulted else ""
    line("notes", ["; ".join([*c.notes, defaults] if defaults else c.notes) for c in cands], "wrap")
    sheet.set_column(0, 0, 75)
    sheet.set_column(1, max(len(cands), 2), 36)
    sheet.freeze_panes(8, 1)


def _suction_rows(cands: Sequence[Candidate], units: str) -> list[tuple[str, list[Any], str]]:
    """Summary rows of the suction side: the computed inlet pressures and the cold start (issue 18)."""
    pu, tu = _unit(units, ABS_PRESSURE), _unit(units, TORQUE)

    def measured(c: Candidate, rule: str, kind: Kind, limit: bool = False) -> float | None:
        f = next((f for f in c.result.findings if f.rule == rule), None)
        value = None if f is None else (f.limit if limit else f.measured)
        return _show(value, kind, units) if isinstance(value, float) else None

    rows: list[tuple[str, list[Any], str]] = []
    if any(c.result.suction is not None for c in cands):
        rows.append((f"inlet pressure computed from the suction line, lowest of the duty [{pu}]",
                     [_show(float(np.min(c.result.suction.inlet)), ABS_PRESSURE, units)
                      if c.result.suction is not None else None for c in cands], "n3"))
        rows.append((f"inlet pressure at the cold start [{pu}]",
                     [measured(c, "inlet.cold-start", ABS_PRESSURE) for c in cands], "n3"))
    if any(measured(c, "torque.cold-start", TORQUE) is not None for c in cands):
        rows.append((f"torque to start cold / motor's starting torque [{tu}]",
                     [f"{need:.1f} / {have:.1f}" if need is not None and have is not None else None
                      for c in cands
                      for need, have in [(measured(c, "torque.cold-start", TORQUE),
                                          measured(c, "torque.cold-start", TORQUE, limit=True))]], ""))
    return rows


def _suction_assumptions(app: Any) -> list[tuple[str, Any]]:
    """Assumptions rows of the suction line, when one is given."""
    line = app.suction
    if line is None:
        return [("inlet pressure", "as stated in the application (no suction line given)")]
    strainer = "none"
    if line.strainer is not None:
        dp, q, nu = line.strainer
        strainer = (f"{dp / 1e5:g} bar at {q * 60000:g} L/min and {nu * 1e6:g} mm^2/s, scaled as a "
                    f"{line.strainer_law} element")
    return [
        ("suction line", f"inner diameter {line.diameter * 1e3:g} mm, length {line.length:g} m, lift "
                         f"{line.lift:g} m, reservoir {line.reservoir_pressure / 1e5:.4g} bara"),
        ("suction fittings", f"{line.fittings or 'none'} (K = {line.k_re:g}/Re + {line.k_inf:.3g})"),
        ("suction strainer", strainer),
        ("inlet pressure", "reservoir - rho g lift - Darcy-Weisbach friction (64/Re laminar, Colebrook by "
                           "Clamond's method turbulent, linear between Re 2000 and 4000) - fittings (3-K method, "
                           "fluids.fittings) - strainer - velocity head, at the pump's geometric flow"),
    ]


def _curves_and_charts(book: Any, comp: Comparison, units: str, duty_sheets: list[Any]) -> None:
    curves = book.add_worksheet("Curves")
    charts = book.add_worksheet("Charts")
    f = book.styles
    app = comp.application
    duty = app.duty
    oil = app.oil
    weights = duty.duration / duty.duration.sum()
    n_mean = float(np.sum(duty.speed * weights))
    t_mean = float(np.sum(duty.temperature * weights))
    nu_mean = float(fluid.viscosity_at(t_mean, oil.nu1, oil.t1, oil.nu2, oil.t2))
    pu, qu = _unit(units, PRESSURE), _unit(units, FLOW)
    curves.write_string(0, 0, f"Curves at the duty's mean speed {from_si(n_mean, SPEED, 'rpm'):.0f} rpm and "
                        f"mean oil temperature {from_si(t_mean, TEMPERATURE, _unit(units, TEMPERATURE)):.0f} "
                        f"{_unit(units, TEMPERATURE)}", f["note"])
    # Chart texts that contain input text are taken from cells: XlsxWriter would read a "!" in a
    # literal series name as a sheet reference.
    label_row = [0]

    def text_ref(text: str) -> list[Any]:
        r = label_row[0]
        label_row[0] += 1
        curves.write_string(r, _LABEL_COL, text)
        return ["Curves", r, _LABEL_COL]

    curves.write_string(0, _LABEL_COL - 1, "chart labels:", f["note"])
    eff = book.add_chart({"type": "scatter", "subtype": "straight"})
    flow = book.add_chart({"type": "scatter", "subtype": "straight"})
    for k, cand in enumerate(comp.candidates):
        ds = cand.datasheet
        p = np.linspace(0.0, ds.pressure_peak, _CURVE_POINTS)
        est = performance.estimate(ds, p, np.full_like(p, n_mean), np.full_like(p, nu_mean))
        c0 = 4 * k
        for j, (head, values) in enumerate((
            (f"pressure [{pu}]", from_si(p, PRESSURE, pu)), ("volumetric efficiency", est.volumetric_efficiency),
            ("total efficiency", est.total_efficiency), (f"delivered flow [{qu}]", from_si(est.flow, FLOW, qu)),
        )):
            curves.write_string(1, c0 + j, f"{ds.label}: {head}", f["header"])
            for i, v in enumerate(np.asarray(values, float)):
                write_value(curves, 2 + i, c0 + j, float(v))
        ref = lambda c: ["Curves", 2, c, 1 + _CURVE_POINTS, c]  # noqa: E731
        eff.add_series({"name": text_ref(f"{ds.label} total"), "categories": ref(c0), "values": ref(c0 + 2)})
        eff.add_series({"name": text_ref(f"{ds.label} volumetric"), "categories": ref(c0), "values": ref(c0 + 1),
                        "line": {"dash_type": "dash"}})
        flow.add_series({"name": text_ref(f"{ds.label} delivered"), "categories": ref(c0), "values": ref(c0 + 3)})
        first, last = duty_sheets[k]._sheetpump_rows
        sheet = duty_sheets[k].name
        eff.add_series({"name": text_ref(f"{ds.label} at the duty"), "categories": [sheet, first, 2, last, 2],
                        "values": [sheet, first, 9, last, 9], "marker": {"type": "circle", "size": 5},
                        "line": {"none": True}})
        if k == 0:
            flow.add_series({"name": "required (duty)", "categories": [sheet, first, 2, last, 2],
                             "values": [sheet, first, 6, last, 6], "marker": {"type": "diamond", "size": 7},
                             "line": {"none": True}})
    eff.set_title({"name": "Efficiency against pressure"})
    eff.set_x_axis({"name": f"pressure [{pu}]"})
    eff.set_y_axis({"name": "efficiency", "min": 0, "max": 1})
    flow.set_title({"name": "Delivered flow against pressure (required points marked)"})
    flow.set_x_axis({"name": f"pressure [{pu}]"})
    flow.set_y_axis({"name": f"flow [{qu}]"})
    for chart in (eff, flow):
        chart.set_size({"width": 760, "height": 420})
        chart.set_legend({"position": "bottom"})
    charts.write_string(0, 0, "Charts (native spreadsheet charts; data on the sheet Curves and the duty sheets)",
                        f["title"])
    charts.insert_chart(2, 0, eff)
    charts.insert_chart(2, 12, flow)
    # speed-pressure envelopes: bands as closed outlines, duty points on top
    su = "rpm"
    base = 4 * len(comp.candidates) + 1
    for k, cand in enumerate(comp.candidates):
        ds = cand.datasheet
        env = book.add_chart({"type": "scatter", "subtype": "straight"})
        lo, hi = float(from_si(ds.speed_min, SPEED, su)), float(from_si(ds.speed_max, SPEED, su))
        bands = [("continuous", ds.pressure_continuous, 0.0)]
        if ds.pressure_intermittent:
            bands.append(("intermittent", ds.pressure_intermittent, ds.pressure_continuous))
        bands.append(("peak", ds.pressure_peak, ds.pressure_intermittent or ds.pressure_continuous))
        c0 = base + 2 * (len(bands) + 1) * k
        for j, (label, top, bottom) in enumerate(bands):
            top_d, bot_d = float(from_si(top, PRESSURE, pu)), float(from_si(bottom, PRESSURE, pu))
            xs = [lo, hi, hi, lo, lo]
            ys = [bot_d, bot_d, top_d, top_d, bot_d]
            cx = c0 + 2 * j
            curves.write_string(1, cx, f"{ds.label} {label}: speed [{su}]", f["header"])
            curves.write_string(1, cx + 1, f"pressure [{pu}]", f["header"])
            for i, (x, y) in enumerate(zip(xs, ys, strict=True)):
                write_value(curves, 2 + i, cx, x)
                write_value(curves, 2 + i, cx + 1, y)
            colour = {"continuous": "#2E7D32", "intermittent": "#C77C02", "peak": "#B3261E"}[label]
            env.add_series({"name": f"{label} band", "categories": ["Curves", 2, cx, 6, cx],
                            "values": ["Curves", 2, cx + 1, 6, cx + 1],
                            "line": {"color": colour, "width": 2}})
        first, last = duty_sheets[k]._sheetpump_rows
        sheet = duty_sheets[k].name
        env.add_series({"name": "duty points", "categories": [sheet, first, 3, last, 3],
                        "values": [sheet, first, 2, last, 2], "marker": {"type": "circle", "size": 6},
                        "line": {"none": True}})
        env.set_title({"name": text_ref(f"Operating envelope: {ds.label}")})
        env.set_x_axis({"name": f"speed [{su}]", "min": 0})
        env.set_y_axis({"name": f"pressure [{pu}]", "min": 0})
        env.set_legend({"position": "bottom"})
        env.set_size({"width": 500, "height": 360})
        charts.insert_chart(24 + 20 * (k // 2), 8 * (k % 2), env)


def _findings(book: Any, comp: Comparison, units: str) -> None:
    f = book.styles
    sheet = book.add_worksheet("Findings")
    heads = ["candidate", "rule", "what the rule checks", "severity", "measured", "limit", "unit", "margin",
             "segment", "segments outside", "datasheet cell", "application cell", "message"]
    for c, h in enumerate(heads):
        sheet.write_string(0, c, h, f["header"])
    row = 1
    for cand in comp.candidates:
        for fi in cand.result.findings:
            measured, limit = fi.measured, fi.limit
            if fi.kind is not None and isinstance(measured, float):
                measured = float(from_si(measured, fi.kind, fi.unit or None))
            if fi.kind is not None and isinstance(limit, float):
                limit = float(from_si(limit, fi.kind, fi.unit or None))
            values = [cand.datasheet.label, fi.rule, fi.title, fi.severity, measured, limit, fi.unit,
                      fi.margin, fi.segment, fi.count, str(fi.where), str(fi.app_where or ""), fi.message]
            for c, v in enumerate(values):
                write_value(sheet, row, c, v, f[fi.severity] if c == 3 else None)
            row += 1
    sheet.autofilter(0, 0, max(row - 1, 1), len(heads) - 1)
    sheet.set_column(0, 2, 26)
    sheet.set_column(3, 9, 12)
    sheet.set_column(10, 12, 40)
    sheet.freeze_panes(1, 0)


def _assumptions(book: Any, comp: Comparison, inputs: Sequence[str | os.PathLike[str]]) -> None:
    f = book.styles
    sheet = book.add_worksheet("Assumptions")
    app, oil = comp.application, comp.application.oil
    overload = drive.IEC_OVERLOAD_FACTOR if app.motor_standard == "IEC" else drive.NEMA_OVERLOAD_FACTOR
    rows: list[tuple[str, Any]] = [
        ("application", app.name),
        ("relief-valve setting [bar]", float(from_si(app.relief_setting, PRESSURE, "bar"))),
        ("overshoot allowed", app.overshoot),
        ("cycles per hour", app.cycles_per_hour),
        ("hours per year", app.hours_per_year),
        (f"energy price [{app.currency}/kWh]", app.energy_price),
        ("evaluation period [years]", app.evaluation_years),
        ("flow margin required", app.flow_margin),
        ("pressure margin required", app.pressure_margin),
        ("speed margin required", app.speed_margin),
        ("oil", oil.name or (f"ISO VG {oil.grade}" if oil.grade else "two viscosity points")),
        ("oil viscosity point 1 [mm^2/s at degC]",
         f"{from_si(oil.nu1, VISCOSITY):.4g} at {from_si(oil.t1, TEMPERATURE):.4g}"),
        ("oil viscosity point 2 [mm^2/s at degC]",
         f"{from_si(oil.nu2, VISCOSITY):.4g} at {from_si(oil.t2, TEMPERATURE):.4g}"),
        ("oil viscosity index", oil.viscosity_index),
        ("oil density at 15 degC [kg/m^3]", oil.density_15),
        ("viscosity against temperature", "Walther relation, ASTM D341"),
        *_suction_assumptions(app),
        ("motor standard", app.motor_standard),
        ("motor sizing rule", "smallest standard rating >= RMS input power and rating x overload factor >= peak"),
        ("overload factor", f"{overload:g} x rating for short peaks: IEC 60034-1 occasional excess torque "
         "(60 % for 15 s), from memory"),
        ("motor series", "IEC 60072-1 rated outputs (kW)" if app.motor_standard == "IEC"
         else "NEMA MG 1 horsepower ratings"),
        ("motor efficiency table", "IEC 60034-30-1 IE3, 4-pole 50 Hz (full load)" if app.motor_standard == "IEC"
         else "NEMA MG 1 Table 12-12, NEMA Premium, 4-pole enclosed (full load)"),
        ("electrical energy", "shaft energy / full-load motor efficiency (part-load efficiency not modelled)"),
        ("settings not given (defaults used)", ", ".join(app.defaulted) or "none"),
        ("sheetpump version", __version__),
    ]
    sheet.write_string(0, 0, "Assumptions and inputs", f["title"])
    sheet.write_string(1, 0, SAFETY_CAUTION, f["caution"])
    sheet.set_row(1, 48)
    r = 3
    for label, value in rows:
        sheet.write_string(r, 0, label, f["header"])
        write_value(sheet, r, 1, value)
        r += 1
    r += 1
    sheet.write_string(r, 0, "input file", f["header"])
    sheet.write_string(r, 1, "SHA-256", f["header"])
    for path in inputs:
        r += 1
        write_value(sheet, r, 0, Path(path).name)
        write_value(sheet, r, 1, sha256(path))
    r += 2
    series = drive.IEC_RATINGS_KW if app.motor_standard == "IEC" else drive.NEMA_RATINGS_HP
    unit = "kW" if app.motor_standard == "IEC" else "hp"
    sheet.write_string(r, 0, f"standard motor ratings [{unit}]", f["header"])
    sheet.write_string(r, 1, "full-load efficiency", f["header"])
    for rating in series:
        r += 1
        write_value(sheet, r, 0, rating)
        watts = rating * (1000.0 if unit == "kW" else drive.HP)
        write_value(sheet, r, 1, float(drive.motor_efficiency(watts, app.motor_standard)))
    sheet.set_column(0, 0, 44)
    sheet.set_column(1, 1, 90)


def write_comparison(target: str | os.PathLike[str], comp: Comparison,
                     inputs: Sequence[str | os.PathLike[str]] = (), units: str = "metric") -> Path:
    """Write the comparison workbook for ``comp`` to ``target`` (atomically).

    Parameters
    ----------
    target : path
        The ``.xlsx`` to write.
    comp : Comparison
        From :func:`sheetpump.comparison.compare`.
    inputs : sequence of paths
        The input files, listed with their SHA-256 on the Assumptions sheet.
    units : str
        ``"metric"`` or ``"imperial"`` display units.
    """
    if units not in DISPLAY_UNITS:
        raise ValueError(f"units must be one of {sorted(DISPLAY_UNITS)}")
    with open_book(target, title=f"Pump comparison: {comp.application.name}") as book:
        summary_placeholder = book.add_worksheet("Summary")
        names = [_sheet_name(i, c.datasheet.label) for i, c in enumerate(comp.candidates)]
        refs = [_duty_sheet(book, n, c, units) for n, c in zip(names, comp.candidates, strict=True)]
        duty_sheets = [book.get_worksheet_by_name(n) for n in names]
        # XlsxWriter keeps sheet order of creation: fill the placeholder in place
        book.worksheets_objs.remove(summary_placeholder)
        del book.sheetnames["Summary"]
        _summary(book, comp, units, refs)
        summary = book.worksheets_objs.pop()
        book.worksheets_objs.insert(0, summary)
        _curves_and_charts(book, comp, units, duty_sheets)
        _findings(book, comp, units)
        _assumptions(book, comp, inputs)
        for i, ws in enumerate(book.worksheets_objs):
            ws.index = i
        summary.activate()
    return Path(target)
