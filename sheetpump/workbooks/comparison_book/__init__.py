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

One module a sheet: :mod:`.summary`, :mod:`.duty`, :mod:`.curves` (Curves and Charts), :mod:`.findings`,
:mod:`.assumptions`; :mod:`.display` the display units they share. This module puts them in order
(:func:`write_comparison`) and checks the print options.

Written with :mod:`sheetpump.workbooks.writer`: deterministic, atomic, text from inputs stays text.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from ...checks import DISPLAY_UNITS
from ...comparison import Comparison
from ..writer import PAPER_SIZES, open_book
from .assumptions import write_assumptions
from .curves import write_curves_and_charts
from .duty import MAX_DUTY_ROWS, write_duty_sheet
from .findings import write_findings
from .summary import write_summary

__all__ = ["MAX_DUTY_ROWS", "write_comparison"]


def print_options(units: str, paper: str | None, app: Any) -> str:
    """The paper a workbook for ``app`` prints on (``paper``, else the application's ``paper_size``, else
    A4), with ``units`` checked; ValueError for an unknown display system or paper."""
    if units not in DISPLAY_UNITS:
        raise ValueError(f"units must be one of {sorted(DISPLAY_UNITS)}")
    paper = paper or getattr(app, "paper_size", None) or "A4"
    if paper not in PAPER_SIZES:
        raise ValueError(f"paper must be one of {sorted(PAPER_SIZES)}")
    return paper


def write_comparison(target: str | os.PathLike[str], comp: Comparison,
                     inputs: Sequence[str | os.PathLike[str]] = (), units: str = "metric",
                     paper: str | None = None) -> Path:
    """Write the comparison workbook for ``comp`` to ``target`` (atomically).

    Parameters
    ----------
    target : path
        The ``.xlsx`` to write.
    comp : Comparison
        From :func:`sheetpump.comparison.compare`.
    inputs : sequence of paths
        The input files, listed (relative to ``target``'s folder) with their SHA-256 on the Assumptions
        sheet.
    units : str
        ``"metric"`` or ``"imperial"`` display units.
    paper : str, optional
        ``"A4"`` or ``"Letter"``; default the application's ``paper_size``, else A4.
    """
    paper = print_options(units, paper, comp.application)
    base = str(Path(target).resolve().parent)
    with open_book(target, title=f"Pump comparison: {comp.application.name}") as book:
        summary_placeholder = book.add_worksheet("Summary")
        names = [f"Duty {i + 1}" for i in range(len(comp.candidates))]
        duties = [write_duty_sheet(book, n, c, units, paper) for n, c in zip(names, comp.candidates, strict=True)]
        # XlsxWriter keeps sheet order of creation: fill the placeholder in place
        book.worksheets_objs.remove(summary_placeholder)
        del book.sheetnames["Summary"]
        write_summary(book, comp, units, [d.totals for d in duties], paper, base)
        summary = book.worksheets_objs.pop()
        book.worksheets_objs.insert(0, summary)
        write_curves_and_charts(book, comp, units, duties, paper)
        write_findings(book, comp, units, paper, base)
        write_assumptions(book, comp, inputs, paper, base)
        for i, ws in enumerate(book.worksheets_objs):
            ws.index = i
        summary.activate()
    return Path(target)
