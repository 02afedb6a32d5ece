"""The Summary sheet of the comparison workbook: the candidates side by side.

One line per figure (:class:`_Row`), in parts: what each datasheet states; every rule's verdict with its
margin and the suction side; the drive figures (live links to each Duty sheet's totals); the motor
chosen, energy, heat, cost and the ranking. Above them the safety caution and a colour legend.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from ... import SAFETY_CAUTION
from ...checks import RULES, Finding, display_unit
from ...comparison import Candidate, Comparison
from ...physics import pump
from ...physics.drive import J_PER_KWH
from ...units import ABS_PRESSURE, DISPLACEMENT, MASS, POWER, PRESSURE, SPEED, TORQUE, Kind, from_si
from ..writer import (
    LINE_HEIGHT,
    PCT,
    SIGNED_PCT,
    book_styles,
    cell_format,
    display_path,
    number_format,
    page_setup,
    text_lines,
    text_width,
    write_formula,
    write_value,
)
from .display import show

__all__ = ["write_summary"]


def _fmt_margin(margin: float | None) -> str:  # as SIGNED_PCT shows a number
    return "" if margin is None else f"{margin:+.1%}"


def _finding_text(f: Finding) -> str:
    if f.severity == "pass":
        return f"pass {_fmt_margin(f.margin)}".strip()
    return f"{f.severity} {_fmt_margin(f.margin)}".strip()


@dataclass
class _Row:
    """One line of the Summary: a label and one value per candidate.

    ``style`` is a number format key for every cell (``"num"``: three significant digits of the row's
    largest value; ``"int"``; ``"pct"`` a share; ``"spct"`` a signed share), ``"text"``/``"wrap"``, or a
    list of per-cell :data:`~sheetpump.workbooks.writer.STYLES` names (verdict colours). ``formulas``
    (optional) are live formulas whose values are ``values``. A row of None is a gap.
    """

    label: str
    values: list[Any]
    style: str | list[str | None] | None = None
    formulas: list[str | None] | None = None


_NUMERIC = {"num", "int", "pct", "spct", "n0", "n1", "n2", "n3"}


def _datasheet_rows(comp: Comparison, units: str, base: str) -> list[_Row]:
    """Summary lines of what each datasheet states, and the pulsation frequency over the duty's speeds."""
    app = comp.application
    ds = [c.datasheet for c in comp.candidates]
    u = lambda kind: display_unit(units, kind)  # noqa: E731
    disp_unit = "cm^3/rev" if units == "metric" else "in^3/rev"
    mass_unit = "kg" if units == "metric" else "lb"
    speeds = app.duty.speed
    lo, hi = float(np.min(speeds)), float(np.max(speeds))
    pulsation: list[Any] = []
    for d in ds:
        if not d.teeth:
            pulsation.append("teeth not stated")
        elif np.isclose(lo, hi):
            pulsation.append(float(pump.pulsation_frequency(d.teeth, lo)))
        else:
            pulsation.append(f"{float(pump.pulsation_frequency(d.teeth, lo)):.0f} – "
                             f"{float(pump.pulsation_frequency(d.teeth, hi)):.0f}")
    return [
        _Row("supplier", [d.supplier for d in ds], "wrap"),
        _Row("model", [d.model for d in ds], "wrap"),
        _Row("datasheet file", [display_path(d.file, base) if d.file else "" for d in ds], "wrap"),
        _Row(f"displacement [{disp_unit}]", [float(from_si(d.displacement, DISPLACEMENT, disp_unit)) for d in ds],
             "num"),
        _Row(f"speed range [{u(SPEED)}]",
             [f"{show(d.speed_min, SPEED, units):.4g} – {show(d.speed_max, SPEED, units):.4g}" for d in ds]),
        _Row(f"continuous pressure [{u(PRESSURE)}]", [show(d.pressure_continuous, PRESSURE, units) for d in ds],
             "int"),
        _Row(f"intermittent pressure [{u(PRESSURE)}]",
             [show(d.pressure_intermittent, PRESSURE, units) for d in ds], "int"),
        _Row(f"peak pressure [{u(PRESSURE)}]", [show(d.pressure_peak, PRESSURE, units) for d in ds], "int"),
        _Row(f"price [{app.currency}]", [d.price for d in ds], "int"),
        _Row(f"mass [{mass_unit}]",
             [None if d.mass is None else float(from_si(d.mass, MASS, mass_unit)) for d in ds], "num"),
        _Row("noise [dB(A)]", [d.noise for d in ds], "int"),
        _Row("pulsation frequency, teeth x speed / 60 [Hz]", pulsation, "int"),
    ]


def _verdict_rows(cands: Sequence[Candidate], units: str) -> list[_Row]:
    """Summary lines of the verdicts: overall, the margins, the suction side, and every rule that spoke."""
    rows = [_Row("verdict", [c.result.verdict for c in cands], [c.result.verdict for c in cands]),
            _Row("worst margin", [c.result.worst_margin for c in cands], "spct"),
            _Row("delivered-flow margin", [c.flow_margin for c in cands], "spct")]
    rows += [_Row(label, values, style) for label, values, style in _suction_rows(cands, units)]
    for rule in [r for r in RULES if any(f.rule == r for c in cands for f in c.result.findings)]:
        texts, styles = [], []
        for c in cands:
            found = [f for f in c.result.findings if f.rule == rule]
            texts.append(_finding_text(found[0]) if found else "not stated")
            styles.append(found[0].severity if found else None)
        rows.append(_Row(f"{rule}: {RULES[rule]}", texts, styles))
    return rows


def _drive_rows(cands: Sequence[Candidate], units: str, duty_refs: list[dict[str, str]]) -> list[_Row]:
    """Summary lines of the drive figures: live links to each duty sheet's totals, the checker's values
    stored."""
    u = lambda kind: display_unit(units, kind)  # noqa: E731
    rows = []
    for key, label, kind, attr in (
        ("peak_power", f"peak input power [{u(POWER)}]", POWER, "peak_power"),
        ("rms_power", f"RMS input power [{u(POWER)}]", POWER, "rms_power"),
        ("peak_torque", f"peak torque [{u(TORQUE)}]", TORQUE, "peak_torque"),
        ("mean_loss", f"pump power loss, mean [{u(POWER)}]", POWER, "mean_power_loss"),
        ("mean_surplus", f"surplus flow heat, mean [{u(POWER)}]", POWER,
         "mean_surplus_heat"),
        ("mean_heat", f"heat into the oil, mean [{u(POWER)}] (pump loss + surplus)", POWER, "mean_heat"),
    ):
        values = [show(getattr(c.result.drive, attr), kind, units) for c in cands]
        # a resampled series has no link: the duty sheet's bins are not the whole truth
        formulas: list[str | None] = [f"={refs[key]}" if key in refs else None for refs in duty_refs]
        rows.append(_Row(label, values, "num", formulas))
    rows.append(_Row("surplus flow crosses", [c.result.drive.surplus_path for c in cands], "wrap"))
    return rows


def _motor_and_cost_rows(comp: Comparison, units: str) -> list[_Row]:
    """Summary lines of the motor chosen, the energy and its cost, the ranking and the notes."""
    app, cands = comp.application, comp.candidates
    u = lambda kind: display_unit(units, kind)  # noqa: E731
    defaults = f"defaults used for: {', '.join(app.defaulted)}" if app.defaulted else ""
    return [
        _Row("motor chosen", [c.motor.label if c.motor else "none" for c in cands],
             [None if c.motor else "fail" for c in cands]),
        _Row(f"motor sized on: RMS load [{u(POWER)}]", [show(c.motor_rms, POWER, units) for c in cands], "num"),
        _Row("RMS load taken", [c.motor_rms_basis for c in cands], "wrap"),
        _Row(f"motor sized on: peak load [{u(POWER)}]",
             [show(max(c.result.drive.peak_power, c.motor_rms), POWER, units) for c in cands], "num"),
        _Row("criterion that binds the motor size", [c.motor.binding if c.motor else "" for c in cands], "wrap"),
        _Row("motor load (of its rating)", [c.motor_note for c in cands], "wrap"),
        _Row("motor full-load efficiency", [c.motor.efficiency if c.motor else None for c in cands], "pct"),
        _Row("electrical energy per cycle [Wh] (at the motor's part-load efficiency)",
             [c.electrical_energy_per_cycle / 3600.0 for c in cands], "num"),
        _Row("electrical energy per year [kWh]", [c.electrical_energy_per_year / J_PER_KWH for c in cands], "int"),
        _Row(f"energy cost per year [{app.currency}]", [c.energy_cost_per_year for c in cands], "int"),
        _Row(f"cost over {app.evaluation_years:g} years [{app.currency}]", [c.cost_over_period for c in cands],
             "int"),
        _Row("rank (passing candidates, by cost over the period)",
             [c.rank if c.rank else "not ranked" for c in cands], "int"),
        _Row("notes", ["; ".join([*c.notes, defaults] if defaults else c.notes) for c in cands], "wrap"),
    ]


def _summary_rows(comp: Comparison, units: str, duty_refs: list[dict[str, str]], base: str
                  ) -> list[_Row | None]:
    """Every line of the Summary, in order (None: a gap). Add a line in one of its parts and it is laid
    out and printed like the others."""
    return [*_datasheet_rows(comp, units, base), None, *_verdict_rows(comp.candidates, units), None,
            *_drive_rows(comp.candidates, units, duty_refs), *_motor_and_cost_rows(comp, units)]


def _summary_line(book: Any, sheet: Any, row: int, r: _Row, label_fmt: Any, widths: tuple[int, int]) -> None:
    """Write one line of the Summary at ``row``: its label, then one cell per candidate."""
    label_w, cand_w = widths
    sheet.write_string(row, 0, r.label, label_fmt)
    lines = text_lines(r.label, label_w)
    numeric = r.style if isinstance(r.style, str) and r.style in _NUMERIC else None
    num = None
    if numeric in ("pct", "spct"):
        num = PCT if numeric == "pct" else SIGNED_PCT
    elif numeric == "int" or numeric == "n0":
        num = "#,##0"
    elif numeric:
        num = number_format(r.values)
    for c, value in enumerate(r.values, start=1):
        style = r.style[c - 1] if isinstance(r.style, list) else None
        # a thin line between candidates; numbers right, texts left and indented: they never run together
        edge = {"left": 1, "left_color": "#BFBFBF"}
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            fmt = cell_format(book, style, num_format=num or number_format([value]), align="right", **edge)
        elif numeric:
            # a text in a row of numbers ("not ranked" beside a rank) stands right like them
            fmt = cell_format(book, style, "wrap", align="right", **edge)
            lines = max(lines, text_lines(value, cand_w - 2))
        else:
            fmt = cell_format(book, style, "wrap", indent=1, **edge)
            lines = max(lines, text_lines(value, cand_w - 2))
        formula = r.formulas[c - 1] if r.formulas else None
        if formula:
            write_formula(sheet, row, c, formula, value, fmt)
        else:
            write_value(sheet, row, c, value, fmt)
    if lines > 1:
        sheet.set_row(row, LINE_HEIGHT * lines)


def write_summary(book: Any, comp: Comparison, units: str, duty_refs: list[dict[str, str]], paper: str,
             base: str) -> None:
    f = book_styles(book)
    sheet = book.add_worksheet("Summary")
    app = comp.application
    cands = comp.candidates
    rows = _summary_rows(comp, units, duty_refs, base)
    n = max(len(cands), 1)
    # widths from content: labels wrap at 52 characters, candidate columns fit their values (14-30)
    label_w = min(52, max(len(r.label) for r in rows if r) + 1)
    cand_w = 14
    for r in rows:
        if r is None:
            continue
        num = number_format(r.values) if r.style in ("num", "n1", "n2", "n3") else None
        for v in r.values:
            cand_w = max(cand_w, min(30, text_width(v, num) + 2))
    cand_w = max(cand_w, *(min(30, max((len(w) for w in c.datasheet.label.split()), default=0) + 2) for c in cands))
    sheet.set_column(0, 0, label_w)
    sheet.set_column(1, n, cand_w)
    sheet.write_string(0, 0, f"Pump comparison: {app.name}", f["title"])
    caution = cell_format(book, "caution")
    sheet.merge_range(1, 0, 1, n, SAFETY_CAUTION, caution)
    sheet.set_row(1, LINE_HEIGHT * text_lines(SAFETY_CAUTION, (label_w + n * cand_w) * 0.85))
    # the legend on one line: the verdict's word is in every coloured cell, so colour is never alone
    sheet.write_string(2, 0, "legend (the word says the verdict; colour helps)", cell_format(book, "note"))
    legend = (("pass", "pass: inside the rating, with the margin asked"),
              ("warn", "warn: allowed, but look (short-term limit, extrapolation)"),
              ("fail", "fail: outside a rating"),
              ("info", "info: a figure without a verdict"),
              ("not checked", "not checked: the datasheet or application does not state what the rule needs; "
               "fill the cell named on Findings"))
    # the entries across the candidates' columns, on as many lines as they need
    legend_rows = -(-len(legend) // n)
    for r in range(legend_rows):
        entries = legend[r * n:(r + 1) * n]
        for c, (style, text) in enumerate(entries, start=1):
            sheet.write_string(2 + r, c, text, cell_format(book, style, "wrap"))
        sheet.set_row(2 + r, LINE_HEIGHT * max(text_lines(text, cand_w) for _, text in entries))
    head = 2 + legend_rows + 1
    sheet.write_string(head, 0, "candidate", f["header"])
    lines = 1
    for c, cand in enumerate(cands, start=1):
        sheet.write_string(head, c, cand.datasheet.label, f["header"])
        lines = max(lines, text_lines(cand.datasheet.label, cand_w * 0.9))
    sheet.set_row(head, LINE_HEIGHT * lines)
    row = head + 1
    label_fmt = cell_format(book, "wrap")
    for r in rows:
        if r is None:
            row += 1
            continue
        _summary_line(book, sheet, row, r, label_fmt, (label_w, cand_w))
        row += 1
    sheet.freeze_panes(head + 1, 1)
    # at most two pages: one wide, two tall; the candidates' names and the labels repeat on each
    page_setup(sheet, app.name, paper=paper, title_rows=(head, head), title_columns=(0, 0),
               area=(0, 0, row - 1, n))
    sheet.fit_to_pages(1, 2)


def _suction_rows(cands: Sequence[Candidate], units: str) -> list[tuple[str, list[Any], str]]:
    """Summary rows of the suction side: the computed inlet pressures and the cold start (issue 18)."""
    pu, tu = display_unit(units, ABS_PRESSURE), display_unit(units, TORQUE)

    def measured(c: Candidate, rule: str, kind: Kind, limit: bool = False) -> float | None:
        f = next((f for f in c.result.findings if f.rule == rule), None)
        value = None if f is None else (f.limit if limit else f.measured)
        return show(value, kind, units) if isinstance(value, float) else None

    rows: list[tuple[str, list[Any], str]] = []
    if any(c.result.suction is not None for c in cands):
        rows.append((f"inlet pressure computed from the suction line, lowest of the duty [{pu}]",
                     [show(float(np.min(c.result.suction.inlet)), ABS_PRESSURE, units)
                      if c.result.suction is not None else None for c in cands], "num"))
        rows.append((f"inlet pressure at the cold start [{pu}]",
                     [measured(c, "inlet.cold-start", ABS_PRESSURE) for c in cands], "num"))
    if any(measured(c, "torque.cold-start", TORQUE) is not None for c in cands):
        rows.append((f"torque to start cold / motor's starting torque [{tu}]",
                     [f"{need:.1f} / {have:.1f}" if need is not None and have is not None else None
                      for c in cands
                      for need, have in [(measured(c, "torque.cold-start", TORQUE),
                                          measured(c, "torque.cold-start", TORQUE, limit=True))]], "text"))
    return rows
