"""The one workbook writer: XlsxWriter, deterministic, atomic, and safe with text from inputs.

Why XlsxWriter: it stores a formula *together with* its computed value, so a reader that does not
recalculate (pandas, openpyxl with ``data_only=True``, a file previewer) still sees the numbers, while a
spreadsheet recomputes the live formula. openpyxl can store only one of the two.

Rules every output follows:

* **Deterministic**: the document's creation time is ``SOURCE_DATE_EPOCH`` when set, else a fixed
  date, so the same inputs give the same bytes.
* **Atomic**: the file is written to a temporary path and renamed (:func:`sheetpump.files.atomic_path`).
* **Text stays text**: a string that came from an input is always written as a string, never parsed as
  a formula, number or link, even when it starts with ``=``, ``+``, ``-`` or ``@``.
"""

from __future__ import annotations

import datetime as _dt
import math
import os
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import xlsxwriter
from xlsxwriter.worksheet import Worksheet

from ..files import atomic_path

__all__ = ["STYLES", "creation_time", "open_book", "write_formula", "write_value"]

#: Our own colours: input cells, headers, and the verdicts (with info and not checked).
STYLES: dict[str, dict[str, Any]] = {
    "title": {"bold": True, "font_size": 14},
    "header": {"bold": True, "bg_color": "#DCE3EA", "bottom": 1, "text_wrap": True, "valign": "top"},
    "input": {"bg_color": "#FFF6D5", "border": 1, "border_color": "#C9B458"},
    "pass": {"bg_color": "#D7EFD9", "font_color": "#1E5B28"},
    "warn": {"bg_color": "#FBE7B5", "font_color": "#6B4A00"},
    "fail": {"bg_color": "#F6CFCB", "font_color": "#7A1B12", "bold": True},
    "info": {"bg_color": "#E4ECF7", "font_color": "#22406B"},
    "not checked": {"bg_color": "#E6DDF3", "font_color": "#4A2C7A", "italic": True},
    "note": {"italic": True, "font_color": "#555555", "text_wrap": True, "valign": "top"},
    "caution": {"bold": True, "font_color": "#7A1B12", "text_wrap": True, "valign": "top"},
    "wrap": {"text_wrap": True, "valign": "top"},
    # number formats
    "n0": {"num_format": "#,##0"},
    "n1": {"num_format": "#,##0.0"},
    "n2": {"num_format": "#,##0.00"},
    "n3": {"num_format": "0.000"},
    "pct": {"num_format": "0.0%"},
}


def creation_time() -> _dt.datetime:
    """The timestamp written into outputs: ``SOURCE_DATE_EPOCH`` if set, else 2000-01-01 UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.strip().isdigit():
        return _dt.datetime.fromtimestamp(int(epoch), tz=_dt.UTC).replace(tzinfo=None)
    return _dt.datetime(2000, 1, 1)


@contextmanager
def open_book(target: str | os.PathLike[str], title: str = "") -> Iterator[xlsxwriter.Workbook]:
    """Open an XlsxWriter workbook that lands at ``target`` atomically when the block ends.

    The workbook has a ``styles`` attribute: a dict of :data:`STYLES` names to XlsxWriter formats.
    """
    with atomic_path(Path(target)) as tmp:
        book = xlsxwriter.Workbook(
            str(tmp),
            {"strings_to_formulas": False, "strings_to_urls": False, "strings_to_numbers": False,
             "nan_inf_to_errors": True},
        )
        book.set_properties({"title": title, "author": "sheetpump", "created": creation_time()})
        book.styles = {name: book.add_format(spec) for name, spec in STYLES.items()}  # type: ignore[attr-defined]
        try:
            yield book
        finally:
            book.close()


def write_value(sheet: Worksheet, row: int, col: int, value: Any, fmt: Any = None) -> None:
    """Write a plain value: numbers as numbers, everything else as text (never a formula or link)."""
    if value is None:
        sheet.write_blank(row, col, None, fmt)
    elif isinstance(value, bool):
        sheet.write_boolean(row, col, value, fmt)
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        if math.isfinite(value):
            sheet.write_number(row, col, value, fmt)
        else:
            sheet.write_string(row, col, str(value), fmt)
    else:
        sheet.write_string(row, col, str(value), fmt)


def write_formula(sheet: Worksheet, row: int, col: int, formula: str, value: Any, fmt: Any = None) -> None:
    """Write a live formula with its computed value stored beside it.

    ``formula`` is built by sheetpump's code (never from input text); ``value`` is what sheetpump
    computed, stored so readers that do not recalculate see it.
    """
    if not formula.startswith("="):
        raise ValueError("a formula starts with '='")
    if isinstance(value, float) and not math.isfinite(value):
        value = "#NUM!"
    sheet.write_formula(row, col, formula, fmt, value)
