"""The Curves and Charts sheets of the comparison workbook: native charts and the data behind them.

Curves holds three blocks: each candidate's efficiency and flow curves at the duty's mean speed and
viscosity; the required flow at the duty's points (and with the margin asked); each candidate's
speed-pressure envelope. Charts shows them as native scatter charts, with the duty's points read from
the Duty sheets: total and volumetric efficiency and delivered flow against pressure, and one envelope
chart per candidate on shared axes; one colour and marker per candidate in every chart.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ... import performance
from ...checks import display_unit
from ...comparison import Candidate, Comparison
from ...datasheet import Datasheet
from ...physics import fluid
from ...units import FLOW, PRESSURE, SPEED, TEMPERATURE, from_si
from ..writer import (
    LINE_HEIGHT,
    MARKERS,
    PALETTE,
    PCT,
    book_styles,
    cell_format,
    page_setup,
    text_lines,
    write_header,
    write_value,
)
from .duty import DUTY_COL, DutySheet, resample

__all__ = ["write_curves_and_charts"]


_CURVE_POINTS = 25  # points of each efficiency and flow curve
_BAND_ROWS = 30  # rows of one printed page of the Charts sheet (30 x 20 px = 450 pt)
# pixels: two charts side by side fit a landscape page, also where LibreOffice draws cells (and so the charts
# anchored to them) up to ~1.2 x wider for want of the Calibri font
_CHART_W, _CHART_H, _CHART_GAP = 390, 540, 14
_LINE_STYLE = {"total": "solid", "volumetric": "dash", "flow": "solid"}  # one line style per quantity


def _nice_ceiling(x: float) -> float:
    """``x`` rounded up to a multiple of half its leading power of ten: 3675 -> 4000, 325.5 -> 350.

    >>> _nice_ceiling(3675.0), _nice_ceiling(325.5), _nice_ceiling(0.0)
    (4000.0, 350.0, 1.0)
    """
    if x <= 0:
        return 1.0
    step = 5 * 10 ** (math.floor(math.log10(x)) - 1)
    return float(math.ceil(x / step) * step)


def _series_style(k: int, quantity: str) -> dict[str, Any]:
    colour = PALETTE[k % len(PALETTE)]
    return {"line": {"color": colour, "width": 2.25, "dash_type": _LINE_STYLE[quantity]}, "marker": {"type": "none"}}


def _points_style(k: int, size: int = 6) -> dict[str, Any]:
    colour = PALETTE[k % len(PALETTE)]
    return {"marker": {"type": MARKERS[k % len(MARKERS)], "size": size, "fill": {"color": colour},
                       "border": {"color": colour}}, "line": {"none": True}}


@dataclass
class _CurvesSheet:
    """The Curves sheet being written: its display units, formats, and the next free row for a chart name
    that must be taken from a cell."""

    sheet: Any
    pu: str
    qu: str
    head_fmt: Any
    group_fmt: Any
    fmts: list[Any]  # pressure, volumetric efficiency, total efficiency, flow
    next_label: int = 0

    def name_of(self, text: str) -> Any:
        """A chart or series name: the text, or a reference to a cell holding it."""
        # a "!" in a literal series name reads as a sheet reference: such a name is taken from a cell
        if "!" not in text and not text.startswith("="):
            return text
        r = self.next_label
        self.next_label += 1
        self.sheet.write_string(r, 0, text)
        return ["Curves", r, 0]


_CURVE_WIDTHS = (10, 11, 11, 10)  # columns of one candidate's curves block [characters]


def _efficiency_curves(book: Any, cs: _CurvesSheet, cands: Sequence[Candidate], duties: list[DutySheet],
                       n_mean: float, nu_mean: float) -> tuple[Any, Any, Any, dict[str, float]]:
    """Block 1 of Curves: each candidate's efficiency and flow curves at the duty's mean speed and
    viscosity, four columns each; the three charts of them with the duty's points; the lowest efficiency
    each chart shows."""
    curves, pu, qu, fmts = cs.sheet, cs.pu, cs.qu, cs.fmts
    heads = (f"pressure [{pu}]", "volumetric efficiency", "total efficiency", f"delivered flow [{qu}]")
    widths = list(_CURVE_WIDTHS) * max(len(cands), 1)
    write_header(curves, 2, list(heads) * len(cands), widths[:4 * len(cands)], cs.head_fmt)
    eff = book.add_chart({"type": "scatter", "subtype": "straight"})
    vol = book.add_chart({"type": "scatter", "subtype": "straight"})
    flow = book.add_chart({"type": "scatter", "subtype": "straight"})
    lowest = {"total": 1.0, "volumetric": 1.0}
    for k, cand in enumerate(cands):
        ds = cand.datasheet
        p = np.linspace(0.0, ds.pressure_peak, _CURVE_POINTS)
        est = performance.estimate(ds, p, np.full_like(p, n_mean), np.full_like(p, nu_mean))
        c0 = 4 * k
        # the efficiency axes start where the curves do above a fifth of the peak pressure (below it the
        # total efficiency falls to zero and would flatten every difference between the candidates)
        upper = p >= 0.2 * ds.pressure_peak
        lowest["total"] = min(lowest["total"], float(np.nanmin(est.total_efficiency[upper])),
                              float(np.nanmin(cand.result.drive.total_efficiency)))
        lowest["volumetric"] = min(lowest["volumetric"], float(np.nanmin(est.volumetric_efficiency)),
                                   float(np.nanmin(cand.result.drive.volumetric_efficiency)))
        curves.merge_range(1, c0, 1, c0 + 3, ds.label, cs.group_fmt)
        for j, values in enumerate((from_si(p, PRESSURE, pu), est.volumetric_efficiency, est.total_efficiency,
                                    from_si(est.flow, FLOW, qu))):
            for i, v in enumerate(np.asarray(values, float)):
                write_value(curves, 3 + i, c0 + j, float(v), fmts[j])
        ref = lambda c: ["Curves", 3, c, 2 + _CURVE_POINTS, c]  # noqa: E731
        first, last, sheet = duties[k].first, duties[k].last, duties[k].name
        at = lambda key, s=sheet, a=first, b=last: [s, a, DUTY_COL[key], b, DUTY_COL[key]]  # noqa: E731
        eff.add_series({"name": cs.name_of(f"{ds.label}"), "categories": ref(c0), "values": ref(c0 + 2),
                        **_series_style(k, "total")})
        eff.add_series({"name": cs.name_of(f"{ds.label} at the duty"), "categories": at("pressure"),
                        "values": at("total_eff"), **_points_style(k)})
        vol.add_series({"name": cs.name_of(f"{ds.label}"), "categories": ref(c0), "values": ref(c0 + 1),
                        **_series_style(k, "volumetric")})
        vol.add_series({"name": cs.name_of(f"{ds.label} at the duty"), "categories": at("pressure"),
                        "values": at("vol_eff"), **_points_style(k)})
        flow.add_series({"name": cs.name_of(f"{ds.label} delivered"), "categories": ref(c0),
                         "values": ref(c0 + 3), **_series_style(k, "flow")})
    return eff, vol, flow, lowest


def _required_flow(cs: _CurvesSheet, app: Any, req_cols: dict[str, np.ndarray], row_req: int, flow: Any) -> None:
    """Block 2 of Curves: the required flow at the duty's pressures, and with the margin asked; both as
    points on the flow chart."""
    curves, pu, qu, fmts = cs.sheet, cs.pu, cs.qu, cs.fmts
    m = len(req_cols["pressure"])
    curves.write_string(row_req, 0, "required flow at the duty's points", cs.group_fmt)
    req_heads = [f"pressure [{pu}]", f"required flow [{qu}]",
                 f"required + {app.flow_margin:.0%} margin [{qu}]"]
    order = np.argsort(req_cols["pressure"], kind="stable")
    p_req = np.asarray(from_si(req_cols["pressure"][order], PRESSURE, pu), float)
    q_req = np.asarray(from_si(req_cols["required"][order], FLOW, qu), float)
    for i in range(m):
        write_value(curves, row_req + 2 + i, 0, float(p_req[i]), fmts[0])
        write_value(curves, row_req + 2 + i, 1, float(q_req[i]), fmts[3])
        write_value(curves, row_req + 2 + i, 2, float(q_req[i] * (1 + app.flow_margin)), fmts[3])
    for c, text in enumerate(req_heads):
        curves.write_string(row_req + 1, c, text, cs.head_fmt)
    curves.set_row(row_req + 1, LINE_HEIGHT * max(text_lines(t, w * 0.9) for t, w in zip(req_heads, _CURVE_WIDTHS,
                                                                                         strict=False)))
    rng = lambda c: ["Curves", row_req + 2, c, row_req + 1 + m, c]  # noqa: E731
    flow.add_series({"name": "required (duty)", "categories": rng(0), "values": rng(1),
                     "marker": {"type": "diamond", "size": 8, "fill": {"color": "#000000"},
                                "border": {"color": "#000000"}}, "line": {"none": True}})
    if app.flow_margin > 0:
        flow.add_series({"name": f"required + {app.flow_margin:.0%} margin", "categories": rng(0),
                         "values": rng(2),
                         "marker": {"type": "triangle", "size": 8, "fill": {"none": True},
                                    "border": {"color": "#000000", "width": 1.25}}, "line": {"none": True}})


def _set_efficiency_charts(eff: Any, vol: Any, flow: Any, lowest: dict[str, float], pu: str, qu: str) -> None:
    """Titles, axes, legends and sizes of the efficiency and flow charts."""
    for chart, title, quantity in ((eff, "Total efficiency against pressure", "total"),
                                   (vol, "Volumetric efficiency against pressure", "volumetric")):
        chart.set_title({"name": title, "name_font": {"size": 12}})
        chart.set_x_axis({"name": f"pressure [{pu}]", "min": 0})
        bottom = max(0.0, math.floor(lowest[quantity] * 20 - 1e-9) / 20)  # a multiple of 5 %
        chart.set_y_axis({"name": f"{quantity} efficiency", "min": bottom, "max": 1, "num_format": "0%"})
    flow.set_title({"name": "Delivered flow against pressure, with the required flow", "name_font": {"size": 12}})
    flow.set_x_axis({"name": f"pressure [{pu}]", "min": 0})
    flow.set_y_axis({"name": f"flow [{qu}]", "min": 0})
    for chart in (eff, vol, flow):
        chart.set_legend({"position": "bottom"})
        chart.set_size({"width": _CHART_W, "height": _CHART_H})
    flow.set_size({"width": 2 * _CHART_W + _CHART_GAP, "height": _CHART_H})


def _envelope_outlines(ds: Datasheet, pu: str, su: str) -> list[tuple[str, list[float], list[float], str]]:
    """The outlines of a datasheet's speed-pressure envelope: label, speeds, pressures, dash type."""
    lo, hi = float(from_si(ds.speed_min, SPEED, su)), float(from_si(ds.speed_max, SPEED, su))
    bands = [("continuous", ds.pressure_continuous, 0.0, "solid")]
    if ds.pressure_intermittent:
        bands.append(("intermittent", ds.pressure_intermittent, ds.pressure_continuous, "dash"))
    bands.append(("peak", ds.pressure_peak, ds.pressure_intermittent or ds.pressure_continuous, "round_dot"))
    outlines: list[tuple[str, list[float], list[float], str]] = []
    for label, top, bottom, dash in bands:
        top_d, bot_d = float(from_si(top, PRESSURE, pu)), float(from_si(bottom, PRESSURE, pu))
        outlines.append((f"{label} band", [lo, hi, hi, lo, lo], [bot_d, bot_d, top_d, top_d, bot_d], dash))
    if ds.speed_min_high_pressure and ds.high_pressure_threshold is not None:
        raised = float(from_si(ds.speed_min_high_pressure, SPEED, su))
        thr = float(from_si(ds.high_pressure_threshold, PRESSURE, pu))
        top = float(from_si(ds.pressure_peak, PRESSURE, pu))
        outlines.append((f"min. {raised:.0f} {su}", [lo, raised, raised],
                         [thr, thr, top], "dash_dot"))
    return outlines


def _envelope_chart(book: Any, cs: _CurvesSheet, ds: Datasheet, duty: DutySheet, r0: int,
                    axes: tuple[float, float]) -> Any:
    """Block 3 of Curves for one candidate, from row ``r0``: its speed-pressure envelope, and the chart of
    it with the duty's points, on the shared ``axes`` (most speed, most pressure)."""
    curves, pu, su = cs.sheet, cs.pu, "rpm"
    seg_fmt = cell_format(book, num_format="#,##0")
    env = book.add_chart({"type": "scatter", "subtype": "straight"})
    curves.merge_range(r0, 0, r0, 7, f"{ds.label}: speed-pressure envelope [{su}, {pu}]", cs.group_fmt)
    lines = 1
    for j, (label, xs, ys, dash) in enumerate(_envelope_outlines(ds, pu, su)):
        cx = 2 * j
        curves.write_string(r0 + 1, cx, f"{label}: speed", cs.head_fmt)
        curves.write_string(r0 + 1, cx + 1, "pressure", cs.head_fmt)
        lines = max(lines, text_lines(f"{label}: speed", 9))
        curves.set_row(r0 + 1, LINE_HEIGHT * lines)
        for i, (x, y) in enumerate(zip(xs, ys, strict=True)):
            write_value(curves, r0 + 2 + i, cx, x, seg_fmt)
            write_value(curves, r0 + 2 + i, cx + 1, y, seg_fmt)
        env.add_series({"name": label, "categories": ["Curves", r0 + 2, cx, r0 + 1 + len(xs), cx],
                        "values": ["Curves", r0 + 2, cx + 1, r0 + 1 + len(xs), cx + 1],
                        "line": {"color": "#000000" if label.startswith("min.") else "#555555",
                                 "width": 2, "dash_type": dash}, "marker": {"type": "none"}})
    first, last, sheet = duty.first, duty.last, duty.name
    n_rows = last - first + 1
    if n_rows <= len(PALETTE) and not duty.binned:
        # the duty's points coloured and shaped by segment, alike in every envelope chart (the bands are grey)
        for i in range(n_rows):
            env.add_series({"name": [sheet, first + i, 0], "categories": [sheet, first + i, 3, first + i, 3],
                            "values": [sheet, first + i, 2, first + i, 2], **_points_style(i, 7)})
    else:
        env.add_series({"name": "duty points", "categories": [sheet, first, 3, last, 3],
                        "values": [sheet, first, 2, last, 2], "marker": {"type": "circle", "size": 5},
                        "line": {"none": True}})
    env.set_title({"name": cs.name_of(f"Speed-pressure envelope: {ds.label}"), "name_font": {"size": 12}})
    env.set_x_axis({"name": f"speed [{su}]", "min": 0, "max": axes[0]})
    env.set_y_axis({"name": f"pressure [{pu}]", "min": 0, "max": axes[1]})
    # one plot area for every envelope chart, so the shared axes also have the same length on paper
    env.set_legend({"position": "bottom", "layout": {"x": 0.05, "y": 0.75, "width": 0.9, "height": 0.24}})
    env.set_plotarea({"layout": {"x": 0.14, "y": 0.14, "width": 0.8, "height": 0.5}})
    env.set_size({"width": _CHART_W, "height": _CHART_H})
    return env


def write_curves_and_charts(book: Any, comp: Comparison, units: str, duties: list[DutySheet], paper: str) -> None:
    """Write the Curves sheet (the data of the charts) and the Charts sheet (native charts of it)."""
    curves = book.add_worksheet("Curves")
    charts = book.add_worksheet("Charts")
    app = comp.application
    duty = app.duty
    oil = app.oil
    cands = comp.candidates
    weights = duty.duration / duty.duration.sum()
    n_mean = float(np.sum(duty.speed * weights))
    t_mean = float(np.sum(duty.temperature * weights))
    nu_mean = float(fluid.viscosity_at(t_mean, oil.nu1, oil.t1, oil.nu2, oil.t2))
    pu, qu, su = display_unit(units, PRESSURE), display_unit(units, FLOW), "rpm"
    group_fmt = cell_format(book, "header", text_wrap=False)
    curves.write_string(0, 0, f"Curves at the duty's mean speed {from_si(n_mean, SPEED, 'rpm'):.0f} rpm and "
                        f"mean oil temperature {from_si(t_mean, TEMPERATURE, display_unit(units, TEMPERATURE)):.0f} "
                        f"{display_unit(units, TEMPERATURE)}; below them the required flow and each candidate's "
                        "speed-pressure envelope", cell_format(book, "note", text_wrap=False))
    # rows of the three blocks: curves, required flow, envelopes; then chart labels that hold input text
    req_cols, req_labels, _ = resample(cands[0]) if cands else ({}, [], "")
    row_req = 3 + _CURVE_POINTS + 1
    row_env = row_req + 2 + len(req_labels) + 1
    env_block = 10
    fmts = [cell_format(book, num_format=x) for x in ("#,##0", PCT, PCT, "#,##0.0")]
    cs = _CurvesSheet(curves, pu, qu, book_styles(book)["header"], group_fmt, fmts,
                      row_env + env_block * len(cands) + 1)
    eff, vol, flow, lowest = _efficiency_curves(book, cs, cands, duties, n_mean, nu_mean)
    if cands:
        _required_flow(cs, app, req_cols, row_req, flow)
    _set_efficiency_charts(eff, vol, flow, lowest, pu, qu)
    charts.write_string(0, 0, "Charts: native spreadsheet charts, data on the sheet Curves and the duty sheets; "
                        "one colour and marker per candidate in every chart",
                        cell_format(book, "note", text_wrap=False))
    second = {"x_offset": _CHART_W + _CHART_GAP}
    charts.insert_chart(1, 0, eff)
    charts.insert_chart(1, 0, vol, second)
    charts.insert_chart(_BAND_ROWS + 1, 0, flow)
    # block 3: speed-pressure envelopes, one block of rows per candidate, on shared axes
    x_max = _nice_ceiling(1.05 * max([float(from_si(c.datasheet.speed_max, SPEED, su)) for c in cands]
                                     + [float(from_si(np.max(duty.speed), SPEED, su))]))
    y_max = _nice_ceiling(1.05 * max([float(from_si(c.datasheet.pressure_peak, PRESSURE, pu)) for c in cands]
                                     + [float(from_si(np.max(duty.pressure), PRESSURE, pu))]))
    for k, cand in enumerate(cands):
        env = _envelope_chart(book, cs, cand.datasheet, duties[k], row_env + env_block * k, (x_max, y_max))
        band = 2 + k // 2
        charts.insert_chart(band * _BAND_ROWS + 1, 0, env, second if k % 2 else {})
    bands_used = 2 + (len(cands) + 1) // 2
    page_setup(charts, app.name, paper=paper, area=(0, 0, bands_used * _BAND_ROWS - 1, 14),
               breaks=[b * _BAND_ROWS for b in range(1, bands_used)])
    curves.freeze_panes(3, 0)
    page_setup(curves, app.name, paper=paper, title_rows=(1, 2),
               area=(0, 0, max(cs.next_label, row_env + env_block * len(cands)) - 1, max(4 * len(cands), 8) - 1))
