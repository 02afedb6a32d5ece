"""An annotated copy of a datasheet: the offending cells filled and commented, and a findings sheet.

It takes the :class:`~sheetpump.checks.CheckResult` of one pump. Each cell a finding points at gets the
fill of its worst verdict (:data:`~sheetpump.workbooks.writer.VERDICT_FILLS`, the colours of every
workbook sheetpump writes) and a comment with its findings; a sheet lists every finding. The copy is
written atomically (:mod:`sheetpump.files`) and the datasheet itself is only ever read.
"""

from __future__ import annotations

import dataclasses
import os
from pathlib import Path
from typing import Any

from .. import SAFETY_CAUTION
from ..checks import FAIL, INFO, NOT_CHECKED, WARN, CheckResult
from ..errors import InputError, Where
from ..files import atomic_path, check_outputs, same_file
from ..units import pretty_unit
from ..workbooks.safe import open_workbook
from ..workbooks.writer import (
    LINE_HEIGHT,
    PAPER_SIZES,
    SIGNED_PCT,
    VERDICT_FILLS,
    display_path,
    header_footer_parts,
    number_format,
    text_lines,
)
from .formatting import finite, in_display_unit, worst_first

__all__ = ["FINDINGS_SHEET", "MARKED", "annotate"]

#: Name of the sheet the annotated copy lists the findings on.
FINDINGS_SHEET = "Check findings"

#: The verdicts that mark a cell (a passing rule leaves its cell as it is).
MARKED = (FAIL, WARN, NOT_CHECKED, INFO)

_FORMULA_STARTS = ("=", "+", "-", "@")

_HEADER = ("Rule", "Result", "Measured", "Limit", "Unit", "Margin", "Segment", "Outside", "Cell",
           "Application cell", "Message")
_WIDTHS = (24, 8, 10, 10, 9, 9, 16, 8, 30, 30, 60)


def _put(cell: Any, value: Any) -> None:
    """Write ``value`` as data: a text that looks like a formula stays text."""
    cell.value = value
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        cell.data_type = "s"
        cell.quotePrefix = True


def _fill(severity: str) -> Any:
    """The solid fill of a verdict's colour."""
    from openpyxl.styles import PatternFill

    colour = VERDICT_FILLS[severity]
    return PatternFill(fill_type="solid", start_color=colour, end_color=colour)


def _print_setup(ws: Any, name: str, paper: str, landscape: bool) -> None:
    """Page setup of one sheet of the annotated copy: paper, orientation, one page wide, margins, and the
    header and footer every sheetpump output prints (:func:`~sheetpump.workbooks.writer.header_footer_parts`)."""
    ws.page_setup.paperSize = PAPER_SIZES.get(paper, PAPER_SIZES["A4"])
    ws.page_setup.orientation = "landscape" if landscape else "portrait"
    ws.sheet_properties.pageSetUpPr.fitToPage = True
    ws.page_setup.fitToWidth = 1
    ws.page_setup.fitToHeight = 0
    ws.page_margins.left = ws.page_margins.right = 0.45
    ws.page_margins.top = ws.page_margins.bottom = 0.7
    ws.page_margins.header = ws.page_margins.footer = 0.3
    head, foot = header_footer_parts(name)
    for part, texts, size in ((ws.oddHeader, head, 9), (ws.oddFooter, foot, 8)):
        for position, text in texts.items():
            item = getattr(part, position)
            item.text, item.size = text, size


def _mark_cells(wb: Any, result: CheckResult, source: str) -> None:
    """Fill each cell of ``source`` a finding points at in its worst verdict's colour, and give it a comment
    with its findings (worst first), in place of the template's help."""
    from openpyxl.comments import Comment

    marked: dict[tuple[str, str], tuple[str, Any, list[str]]] = {}
    for f in worst_first(result.findings):
        w = f.where
        if f.severity not in MARKED or not w.sheet or not w.cell or w.sheet not in wb.sheetnames:
            continue
        if w.file and not same_file(w.file, source):
            continue
        ws = wb[w.sheet]
        try:
            block = ws[w.cell]
        except (ValueError, KeyError):
            continue
        cells = [c for row in block for c in row] if isinstance(block, tuple) and block and \
            isinstance(block[0], tuple) else (list(block) if isinstance(block, tuple) else [block])
        for c in cells:
            key = (w.sheet, c.coordinate)
            if key not in marked:  # the worse severity (sorted first) keeps its colour
                marked[key] = (f.severity, c, [])
                c.fill = _fill(f.severity)
            note = f"\n(this cell: {w.note})" if w.note else ""  # "typed as 46.7 rev/s": the unit in the cell
            marked[key][2].append(f"sheetpump {f.severity}: {f.rule}\n{f.message}{note}")
    for _severity, c, texts in marked.values():
        c.comment = Comment("\n\n".join(texts)[:2000], "sheetpump", width=360, height=160)


def _findings_sheet(wb: Any, result: CheckResult, target: str | os.PathLike[str]) -> Any:
    """Add the sheet that lists every finding (worst first; file paths relative to ``target``'s folder)."""
    from openpyxl.styles import Alignment, Font

    name = FINDINGS_SHEET
    k = 2
    while name in wb.sheetnames:
        name = f"{FINDINGS_SHEET} {k}"
        k += 1
    ws = wb.create_sheet(name)
    top = Alignment(vertical="top", wrap_text=True)
    for j, h in enumerate(_HEADER, start=1):
        _put(ws.cell(row=1, column=j), h)
        ws.cell(row=1, column=j).font = Font(bold=True)
        ws.cell(row=1, column=j).alignment = top
    base = Path(target).resolve().parent
    for i, f in enumerate(worst_first(result.findings), start=2):
        measured = in_display_unit(f.measured, f.kind, f.unit)
        limit = in_display_unit(f.limit, f.kind, f.unit)
        place = lambda w: str(dataclasses.replace(w, file=display_path(w.file, base)) if w.file else w)  # noqa: E731
        row = (f.rule, f.severity, measured, limit, pretty_unit(f.unit), finite(f.margin), f.segment, f.count,
               place(f.where), place(f.app_where) if f.app_where is not None else "", f.message)
        numbers = number_format([v for v in (measured, limit) if isinstance(v, float)])
        lines = 1
        for j, v in enumerate(row, start=1):
            cell = ws.cell(row=i, column=j)
            _put(cell, v)
            cell.alignment = top
            if isinstance(v, float) and j in (3, 4):
                cell.number_format = numbers
            if isinstance(v, str):
                lines = max(lines, text_lines(v, _WIDTHS[j - 1]))
        ws.row_dimensions[i].height = LINE_HEIGHT * lines
        if f.severity in MARKED:
            ws.cell(row=i, column=2).fill = _fill(f.severity)
        if f.margin is not None:
            ws.cell(row=i, column=6).number_format = SIGNED_PCT
    _put(ws.cell(row=len(result.findings) + 3, column=1), SAFETY_CAUTION)
    for col, width in zip("ABCDEFGHIJK", _WIDTHS, strict=True):
        ws.column_dimensions[col].width = width
    ws.print_title_rows = "1:1"
    ws.freeze_panes = "A2"
    return ws


def annotate(result: CheckResult, target: str | os.PathLike[str], source: str | None = None) -> Path:
    """Write a copy of the datasheet workbook with the offending cells filled and a findings sheet.

    Parameters
    ----------
    result : CheckResult
        The check of the datasheet.
    target : path
        The copy to write (atomically); must not be the datasheet itself.
    source : path, optional
        The datasheet workbook (default ``result.datasheet.file``). It is only read.

    Returns
    -------
    Path
        ``target``.
    """
    from openpyxl.utils.exceptions import InvalidFileException

    source = source or result.datasheet.file
    if not source:
        raise InputError("the datasheet was not read from a workbook, so there is nothing to annotate",
                         Where(field="--annotate"))
    inputs = [("the datasheet", source), ("the application workbook", result.application.file)]
    check_outputs([("--annotate", target)], [(what, path) for what, path in inputs if path])
    try:
        # formulas kept (data_only=False): the copy is the user's datasheet, with marks added
        wb = open_workbook(source, data_only=False)
    except (OSError, InvalidFileException, KeyError, ValueError) as exc:
        raise InputError(f"cannot open the datasheet to annotate it ({exc})", Where(file=str(source))) \
            from None
    _mark_cells(wb, result, source)
    ws = _findings_sheet(wb, result, target)
    paper = getattr(result.application, "paper_size", None) or "A4"
    for sheet in wb.worksheets:
        _print_setup(sheet, result.datasheet.label, paper, landscape=sheet is ws)
    with atomic_path(target) as tmp:
        wb.save(tmp)
    return Path(target)
