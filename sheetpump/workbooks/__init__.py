"""Workbooks: the templates a user fills in, their readers, and the workbooks sheetpump writes.

* :mod:`.templates` — the datasheet and application formats, declared once, and the blank templates;
* :mod:`.readers` — ``read_datasheet`` and ``read_application`` (SI dataclasses that remember each
  value's file, sheet and cell);
* :mod:`.time_series` — ``read_series``: a measured time series (CSV or xlsx) as a duty;
* :mod:`.safe` — the one guarded way every reader opens a file;
* :mod:`.writer` and the modules built on it — the workbooks sheetpump writes (XlsxWriter).

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
