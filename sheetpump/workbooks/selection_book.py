"""The selection workbook: every size of every series on the machine, the proposed sizes marked.

Sheets:

* **Sizes** — one row per size and series: verdict, worst rule and margin, flow margin, the pressure
  margins (continuous, intermittent, peak, relief), motor, RMS power, energy, cost, and why the size
  fails or what its margin is. The proposed size of each series says ``proposed`` in its own column (and
  is bold), so the mark survives printing in black and white.
* **Series** — per series the proposal in one sentence, the drive speed where one was chosen, and the
  assumptions (frame tables scaled by displacement).
* **Assumptions** — the application's settings, the standard motor speeds, the input files and their
  SHA-256, and the safety caution.

Printed landscape, fit to the page width, the header row repeated on every page. Written with
:mod:`sheetpump.workbooks.writer`: deterministic, atomic, text from inputs stays text.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from .. import SAFETY_CAUTION, __version__
from ..checks import INFO, NOT_CHECKED, display_units
from ..comparison import Candidate
from ..files import sha256
from ..physics.drive import J_PER_KWH
from ..selection import SLIP, STANDARD_POLES, Selection, worst
from ..units import DISPLACEMENT, POWER, from_si
from .comparison_book import print_options
from .writer import (
    LINE_HEIGHT,
    PCT,
    SIGNED_PCT,
    book_styles,
    cell_format,
    display_path,
    open_book,
    page_setup,
    text_lines,
    write_header,
    write_value,
)

__all__ = ["PROPOSED_FILL", "write_selection"]

_PRESSURE_RULES = (("pressure.continuous", "continuous"), ("pressure.intermittent", "intermittent"),
                   ("pressure.peak", "peak"), ("pressure.relief", "relief"))

#: Fill of a proposed size (its row on Sizes, its name on Series): a light blue of our own.
PROPOSED_FILL = "#E8EEF5"


def _margin(c: Candidate, rule: str) -> float | str | None:
    for f in c.result.findings:
        if f.rule == rule:
            if f.severity == NOT_CHECKED:
                return "not checked"
            if f.severity == INFO:  # above the continuous rating only in intermittent stretches: left empty
                return None
            return f.margin if f.margin is not None and math.isfinite(f.margin) else None
    return None


def _sizes_formats(book: Any, units: str) -> tuple[dict[str, Any], dict[str, Any]]:
    """The Sizes sheet's cell formats by column kind: plain, and for the proposed size's row."""
    # every cell of a row stands on the first line of its wrapped "why" (cell_format: valign top)
    # numbers right-aligned, texts left and indented, short marks centred: they never run together in print
    # "_)" pads a number on the right by the width of ")", a gap before the text of the next column
    numbers = {k: ";".join(part + "_)" for part in nf.split(";")) if nf else None for k, nf in {
        "pct": SIGNED_PCT, "disp": "0.00" if units == "metric" else "0.000", "kw": "0.0", "n0": "#,##0",
        "text": None, "note": None, "mark": None}.items()}
    align: dict[str, dict[str, Any]] = {"text": {"indent": 1}, "note": {"align": "right"},
                                        "mark": {"align": "center"}}

    def styled(kind: str, **extra: Any) -> Any:
        return cell_format(book, None if numbers[kind] else "wrap", num_format=numbers[kind],
                           **align.get(kind, {"align": "right"}), **extra)

    formats = {k: styled(k) for k in numbers}
    proposed_fmt = {k: styled(k, bold=True, bg_color=PROPOSED_FILL) for k in numbers}
    return formats, proposed_fmt


def _sizes_columns(app: Any, disp_unit: str, power_unit: str) -> list[tuple[str, int, str | None]]:
    """The Sizes sheet's columns: header, width [characters], kind of format (None: text)."""
    return [
        ("series", 25, None), ("size", 10, None), ("proposed", 9, "mark"),
        (f"displacement [{disp_unit}]", 13, "disp"), ("verdict", 7, "mark"), ("worst rule", 24, None),
        ("worst margin", 9, "pct"), ("flow margin", 9, "pct"),
        *((f"{label} pressure margin" if rule != "pressure.relief" else "relief + overshoot vs peak",
           11, "pct") for rule, label in _PRESSURE_RULES),
        ("motor", 9, None), (f"RMS input power [{power_unit}]", 10, "kw"),
        ("electrical energy per year [kWh]", 11, "n0"), (f"energy cost per year [{app.currency}]", 10, "n0"),
        (f"price [{app.currency}]", 9, "n0"),
        (f"cost over {app.evaluation_years:g} years [{app.currency}]", 11, "n0"),
        ("why", 50, None),
    ]


def _size_values(series: str, cand: Candidate, why: str, mine: bool, disp_unit: str, power_unit: str) -> list[Any]:
    """One row of the Sizes sheet, in the order of :func:`_sizes_columns`."""
    ds, w = cand.datasheet, worst(cand)
    return [
        series, ds.model, "proposed" if mine else "",
        float(from_si(ds.displacement, DISPLACEMENT, disp_unit)), cand.result.verdict,
        w.rule if w else "", w.margin if w and w.margin is not None and math.isfinite(w.margin) else None,
        cand.flow_margin if cand.flow_margin is not None and math.isfinite(cand.flow_margin) else None,
        *(_margin(cand, rule) for rule, _ in _PRESSURE_RULES),
        cand.motor.label if cand.motor else "none",
        float(from_si(cand.result.drive.rms_power, POWER, power_unit))
        if math.isfinite(cand.result.drive.rms_power) else None,
        cand.electrical_energy_per_year / J_PER_KWH, cand.energy_cost_per_year, ds.price,
        cand.cost_over_period, why,
    ]


def _sizes_sheet(book: Any, sel: Selection, units: str, paper: str) -> Any:
    """Write the Sizes sheet: one row per size and series, the proposed sizes marked; returns the sheet."""
    app, f = sel.application, book_styles(book)
    disp_unit = "cm^3/rev" if units == "metric" else "in^3/rev"
    power_unit = display_units(units)[POWER]
    formats, proposed_fmt = _sizes_formats(book, units)
    sheet = book.add_worksheet("Sizes")
    sheet.write_string(0, 0, f"Size selection: {app.name}", f["title"])
    sheet.merge_range(1, 0, 1, 12, SAFETY_CAUTION, f["caution"])
    sheet.set_row(1, 40)
    note = ("One row per size; per series the proposed size is the smallest displacement that fails no rule "
            "(ties: lower price, then lower drive power). Margins are fractions of the limit, positive inside. "
            "An empty continuous pressure margin: the pressure exceeds the continuous rating only in "
            "intermittent stretches, judged in the intermittent pressure margin.")
    sheet.merge_range(2, 0, 2, 12, note, f["note"])
    heads = _sizes_columns(app, disp_unit, power_unit)
    header_row = 4
    write_header(sheet, header_row, [h[0] for h in heads], [h[1] for h in heads], f["header"])
    sheet.set_row(2, LINE_HEIGHT * text_lines(note, sum(h[1] for h in heads[:13])))
    row = header_row + 1
    for ch in sel.choices:
        for i, (cand, why) in enumerate(zip(ch.candidates, ch.reasons, strict=True)):
            mine = i == ch.proposed
            values = _size_values(ch.series.name, cand, why, mine, disp_unit, power_unit)
            for c, (value, (_, _, kind)) in enumerate(zip(values, heads, strict=True)):
                if c == 4:
                    fmt = cell_format(book, cand.result.verdict if cand.result.verdict in f else None,
                                      align="center")
                elif kind is None or kind == "mark":
                    fmt = (proposed_fmt if mine else formats)[kind or "text"]
                elif isinstance(value, str):  # "not checked" in a number column stands where the figure would
                    fmt = (proposed_fmt if mine else formats)["note"]
                else:
                    fmt = (proposed_fmt if mine else formats)[kind]
                if isinstance(value, float) and not math.isfinite(value):
                    value = None
                write_value(sheet, row, c, value, fmt)
            sheet.set_row(row, LINE_HEIGHT * text_lines(why, heads[-1][1]))
            row += 1
        row += 1  # a blank row between series
    sheet.freeze_panes(header_row + 1, 2)
    sheet.autofilter(header_row, 0, max(row - 2, header_row + 1), len(heads) - 1)
    page_setup(sheet, app.name, paper=paper, title_rows=(header_row, header_row), title_columns=(0, 1))
    return sheet


def _series_sheet(book: Any, sel: Selection, paper: str, base: str, bold: Any) -> None:
    """Write the Series sheet: per series the proposal, the drive speed and the assumptions."""
    f = book_styles(book)
    series = book.add_worksheet("Series")
    series.write_string(0, 0, "The proposal of each series", f["title"])
    indented = cell_format(book, "wrap", indent=1)  # never runs into the column on its left
    for c, (text, width) in enumerate((("series", 24), ("file", 24), ("proposed size", 14),
                                       ("drive speed [rpm]", 10), ("why", 90), ("assumptions", 60))):
        series.write_string(2, c, text, f["header"])
        series.set_row(2, 2 * LINE_HEIGHT)
        series.set_column(c, c, width, f["wrap"])
    for r, ch in enumerate(sel.choices, start=3):
        write_value(series, r, 0, ch.series.name)
        write_value(series, r, 1, display_path(ch.series.file, base) if ch.series.file else "")
        write_value(series, r, 2, ch.choice.datasheet.model if ch.choice else "none passes",
                    bold if ch.choice else f["fail"])
        write_value(series, r, 3, round(ch.speed * 60) if ch.speed is not None else "as the duty",
                    cell_format(book, "wrap", align="center"))
        why = ch.summary if ch.speed is not None or not ch.speed_note else f"{ch.summary}; {ch.speed_note}"
        write_value(series, r, 4, why, indented)
        assumptions = "; ".join(ch.series.assumptions) or "none"
        write_value(series, r, 5, assumptions, indented)
        series.set_row(r, LINE_HEIGHT * max(text_lines(why, 88), text_lines(assumptions, 58)))
    page_setup(series, sel.application.name, paper=paper, title_rows=(2, 2))


def _assumptions_sheet(book: Any, sel: Selection, inputs: Sequence[str | os.PathLike[str]], paper: str,
                       base: str) -> None:
    """Write the Assumptions sheet: the caution, the settings, the standard motor speeds, the input files."""
    app, f = sel.application, book_styles(book)
    notes = book.add_worksheet("Assumptions")
    notes.write_string(0, 0, "Assumptions and inputs", f["title"])
    notes.merge_range(1, 0, 1, 1, SAFETY_CAUTION, f["caution"])
    notes.set_row(1, 48)
    rows: list[tuple[str, Any]] = [
        ("application", app.name), ("motor standard", app.motor_standard),
        ("mains frequency [Hz]", sel.mains_frequency),
        ("standard motor speeds tried for a speed range",
         f"{'/'.join(f'{p}-pole' for p in STANDARD_POLES)}, synchronous speed 120·f/p less {SLIP:.0%} slip "
         "(common practice, an assumption)"),
        ("flow margin required", app.flow_margin), ("pressure margin required", app.pressure_margin),
        ("rules", "those of sheetpump check, on every size"),
        ("motor, energy and cost", "as in the comparison workbook (sheetpump compare)"),
        ("settings not given (defaults used)", ", ".join(app.defaulted) or "none"),
        ("sheetpump version", __version__),
    ]
    r = 3
    shares = {"flow margin required", "pressure margin required"}  # fractions, shown as percentages: 5.0%
    for label, value in rows:
        notes.write_string(r, 0, label, f["header"])
        write_value(notes, r, 1, value, cell_format(book, num_format=PCT if label in shares else None,
                                                    align="left"))
        r += 1
    r += 1
    notes.write_string(r, 0, "input file (relative to this workbook)", f["header"])
    notes.write_string(r, 1, "SHA-256", f["header"])
    for path in inputs:
        r += 1
        write_value(notes, r, 0, display_path(path, base))
        write_value(notes, r, 1, sha256(path))
    notes.set_column(0, 0, 44)
    notes.set_column(1, 1, 90)
    page_setup(notes, app.name, paper=paper, landscape=False)


def write_selection(target: str | os.PathLike[str], sel: Selection, inputs: Sequence[str | os.PathLike[str]] = (),
                    units: str = "metric", paper: str | None = None) -> Path:
    """Write the selection workbook for ``sel`` to ``target`` (atomically).

    Parameters
    ----------
    target : path
        The ``.xlsx`` to write.
    sel : Selection
        From :func:`sheetpump.selection.select`.
    inputs : sequence of paths
        The input files, listed (relative to ``target``'s folder) with their SHA-256 on the Assumptions
        sheet.
    units : str
        ``"metric"`` or ``"imperial"`` display units.
    paper : str, optional
        ``"A4"`` or ``"Letter"``; default the application's ``paper_size``, else A4.
    """
    app = sel.application
    paper = print_options(units, paper, app)
    base = str(Path(target).resolve().parent)
    with open_book(target, title=f"Size selection: {app.name}") as book:
        bold = book.add_format({"bold": True, "bg_color": PROPOSED_FILL, "valign": "top"})
        sheet = _sizes_sheet(book, sel, units, paper)
        _series_sheet(book, sel, paper, base, bold)
        _assumptions_sheet(book, sel, inputs, paper, base)
        sheet.activate()
    return Path(target)
