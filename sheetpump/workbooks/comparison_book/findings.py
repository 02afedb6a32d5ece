"""The Findings sheet of the comparison workbook: every finding of every candidate, one a row.

Each row names the rule, its severity, the measured value and the limit in the finding's unit, the
margin, the segments concerned, and the datasheet and application cells it points at (files relative to
the workbook's folder); filtered and frozen below its header.
"""

from __future__ import annotations

import dataclasses
from typing import Any

from ...comparison import Comparison
from ...errors import Where
from ...units import EFFICIENCY, Kind, from_si
from ..writer import (
    PCT,
    SIGNED_PCT,
    cell_format,
    column_width,
    display_path,
    number_format,
    page_setup,
    text_lines,
    write_header,
    write_value,
)

__all__ = ["write_findings"]


#: Columns of the Findings sheet: header, width [characters] (None: from content), wrapped.
_FINDING_COLUMNS = (("candidate", 18, True), ("rule", None, False), ("severity", None, False),
                    ("measured", None, False), ("limit", None, False), ("unit", None, False),
                    ("margin", None, False), ("segment", 14, True), ("segments outside", 9, False),
                    ("datasheet cell", 26, True), ("application cell", 20, True), ("message", 56, True))


def write_findings(book: Any, comp: Comparison, units: str, paper: str, base: str) -> None:
    sheet = book.add_worksheet("Findings")
    small = {"font_size": 9}
    rows: list[list[Any]] = []
    severities: list[str] = []
    kinds: list[Kind | None] = []
    for cand in comp.candidates:
        for fi in cand.result.findings:
            kinds.append(fi.kind)
            measured, limit = fi.measured, fi.limit
            if fi.kind is not None and isinstance(measured, float):
                measured = float(from_si(measured, fi.kind, fi.unit or None))
            if fi.kind is not None and isinstance(limit, float):
                limit = float(from_si(limit, fi.kind, fi.unit or None))
            where = _where_text(fi.where, base)
            app_where = _where_text(fi.app_where, base) if fi.app_where is not None else ""
            rows.append([cand.datasheet.label, fi.rule, fi.severity, measured, limit, fi.unit, fi.margin,
                         fi.segment, fi.count, where, app_where, fi.message])
            severities.append(fi.severity)
    widths = []
    for c, (head, width, _wrap) in enumerate(_FINDING_COLUMNS):
        values = [r[c] for r in rows]
        widths.append(width or column_width(head, values, SIGNED_PCT if head == "margin" else "#,##0.00", most=24))
    write_header(sheet, 0, [h for h, _w, _x in _FINDING_COLUMNS], widths, cell_format(book, "header", **small))
    text = cell_format(book, "wrap", indent=1, **small)  # indented: never runs into a number on its left
    for i, (values, severity) in enumerate(zip(rows, severities, strict=True), start=1):
        lines = 1
        # measured and limit share a format: three significant digits of the larger
        num = number_format([v for v in values[3:5] if isinstance(v, float)])
        for c, v in enumerate(values):
            head, width, wrap = _FINDING_COLUMNS[c]
            if head == "severity":
                fmt = cell_format(book, severity, **small)
            elif head == "margin":
                fmt = cell_format(book, num_format=SIGNED_PCT, **small)
            elif head == "segments outside":  # centred: never runs into the text of the next column
                fmt = cell_format(book, num_format="0", align="center", **small)
            elif isinstance(v, (int, float)) and not isinstance(v, bool):
                # a share (of the cycle) as a percentage, like the margins
                fmt = cell_format(book, num_format=PCT if kinds[i - 1] is EFFICIENCY else num, **small)
            else:
                fmt = text
                if wrap:
                    lines = max(lines, text_lines(v, widths[c] * 1.15))
            write_value(sheet, i, c, v, fmt)
        if lines > 1:
            sheet.set_row(i, 12.0 * lines)
    last = max(len(rows), 1)
    sheet.autofilter(0, 0, last, len(_FINDING_COLUMNS) - 1)
    sheet.freeze_panes(1, 0)
    page_setup(sheet, comp.application.name, paper=paper, title_rows=(0, 0),
               area=(0, 0, last, len(_FINDING_COLUMNS) - 1))


def _where_text(where: Where, base: str) -> str:
    """A place as text, its file relative to the output's folder (never an absolute path)."""
    if where.file:
        where = dataclasses.replace(where, file=display_path(where.file, base))
    return str(where)
