"""Workbooks: the templates a user fills in, their readers, and the workbooks sheetpump writes.

* :mod:`.refs` — cell references, column letters and the sheet-XML pieces, in one place;
* :mod:`.safe` — the one guarded way every reader opens a file;
* :mod:`.templates` — the datasheet and application formats, declared once, and the blank templates;
* :mod:`.book` — the opened workbook and its cells (cached values, formulas evaluated where a value is
  missing, defined names, merged cells, header rows);
* :mod:`.fields` — field sheets, and a value with its unit to SI, with every refusal message;
* :mod:`.tables` — tables under a header row (segments, performance points);
* :mod:`.readers` — ``read_datasheet`` and ``read_application`` (SI dataclasses that remember each
  value's file, sheet and cell);
* :mod:`.time_series` — ``read_series``: a measured time series (CSV or xlsx) as a duty;
* :mod:`.size_series` — a supplier's series of sizes: its blank template and its reader;
* :mod:`.measured_table` — a measured performance table (CSV or a sheet);
* :mod:`.writer` and the ``*_book`` modules built on it — the workbooks sheetpump writes (XlsxWriter);
  :mod:`.example` — the worked example.

The readers are imported on first use, so ``import sheetpump.workbooks`` stays cheap.
"""

from __future__ import annotations

from typing import Any

__all__ = ["read_application", "read_datasheet", "read_series", "write_template"]

_LAZY = {
    "read_datasheet": "readers",
    "read_application": "readers",
    "read_series": "time_series",
    "write_template": "templates",
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        from importlib import import_module

        return getattr(import_module(f"{__name__}.{_LAZY[name]}"), name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
