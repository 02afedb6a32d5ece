"""Reading a workbook package for recalculation: its worksheets, formula cells and stored values.

The sheet XML is read with the regular expressions of :mod:`sheetpump.workbooks.refs` (no DTD, so no
entity expansion); both evaluators (:mod:`.engine`, :mod:`.columnar`) and the :mod:`.writer` find the
worksheets through :func:`book_sheets` and read a stored value through :func:`stored_value`.
"""

from __future__ import annotations

import functools
import html
import zipfile
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import InputError, Where
from ..workbooks.refs import (
    CELL_ELEMENT,
    FORMULA_ELEMENT,
    INLINE_STRING_ELEMENT,
    TEXT_ELEMENT,
    VALUE_ELEMENT,
    attributes,
    range_cells,
    shared_strings,
    sheet_parts,
)
from .results import CellError

__all__ = ["Sheet", "book_sheets", "cached_strings", "scan", "stored_value"]


@dataclass
class Sheet:
    """One worksheet of a package: its name, its part, and (after :func:`scan`) its formula cells."""

    name: str
    part: str
    formulas: dict[str, str] = field(default_factory=dict)  # cell -> formula text ("" for shared children)
    arrays: dict[str, str] = field(default_factory=dict)  # anchor cell -> ref of an array formula
    stored: dict[str, Any] = field(default_factory=dict)  # cell -> stored value of formula/array cells
    occupied: set[str] = field(default_factory=set)  # cells holding a value or a formula (spill blockers)
    shared: set[str] = field(default_factory=set)  # cells of a shared (filled-down) formula


def book_sheets(archive: zipfile.ZipFile) -> list[Sheet]:
    """The worksheets of a workbook package in tab order, with the package part holding each."""
    try:
        parts = sheet_parts(archive)
    except KeyError as exc:
        raise InputError("not an Excel workbook (no xl/workbook.xml inside)", hint="save it as .xlsx") from exc
    names = set(archive.namelist())
    # chart sheets hold no cells
    return [Sheet(name, part) for name, part in parts if part in names and "worksheets/" in part]


def stored_value(attrs: dict[str, str], inner: str, strings: Callable[[], list[str]]) -> Any:
    """The value a cell stores: float, bool, text, :class:`CellError` or None.

    ``attrs`` are the cell's attributes (its type ``t``), ``inner`` its body, ``strings`` gives the
    shared-string table when a cell needs it.
    """
    kind = attrs.get("t", "n")
    if kind == "inlineStr":
        found = INLINE_STRING_ELEMENT.search(inner)
        return "".join(html.unescape(t or "") for _, t in TEXT_ELEMENT.findall(found.group(0))) if found else None
    v = VALUE_ELEMENT.search(inner)
    if not v or v.group(2) is None:
        return None
    text = html.unescape(v.group(2))
    if kind == "str":
        return text
    if kind == "b":
        return text.strip() in ("1", "true")
    if kind == "e":
        return CellError(text.strip())
    if kind == "s":
        try:
            return strings()[int(text)]
        except (ValueError, IndexError):
            return None
    try:
        return float(text)
    except ValueError:
        return text


def cached_strings(archive: zipfile.ZipFile, cache: dict[str, list[str]]) -> list[str]:
    """The shared strings of ``archive``, read once into ``cache``."""
    if "s" not in cache:
        cache["s"] = shared_strings(archive)
    return cache["s"]


def scan(path: Path) -> list[Sheet]:
    """Formula cells, array formulas and stored values of every worksheet, read from the sheet XML."""
    try:
        archive = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as exc:
        raise InputError(f"cannot open as a workbook: {exc}", Where(file=str(path)),
                         "give an .xlsx or .xlsm file") from None
    with archive:
        sheets = book_sheets(archive)
        strings = functools.partial(cached_strings, archive, {})
        for sheet in sheets:
            _scan_sheet(path, sheet, archive.read(sheet.part).decode("utf-8"), strings)
        return sheets


def _scan_sheet(path: Path, sheet: Sheet, text: str, strings: Callable[[], list[str]]) -> None:
    covered: set[str] = set()
    cells: list[tuple[str, dict[str, str], str]] = []
    for m in CELL_ELEMENT.finditer(text):
        attrs = attributes(m.group(2))
        ref = attrs.get("r")
        inner = m.group(3) or ""
        if ref is None:
            if "<" in inner and FORMULA_ELEMENT.search(inner):
                raise InputError("a formula cell without its reference (r attribute)",
                                 Where(file=str(path), sheet=sheet.name))
            continue
        cells.append((ref, attrs, inner))
        f = FORMULA_ELEMENT.search(inner)
        if f:
            f_attrs = attributes(f.group(2))
            sheet.formulas[ref] = html.unescape(f.group(3) or "")
            sheet.occupied.add(ref)
            if f_attrs.get("t") == "shared":
                sheet.shared.add(ref)
            if f_attrs.get("t") == "array":
                sheet.arrays[ref] = f_attrs.get("ref", ref)
                covered.update(c for row in range_cells(sheet.arrays[ref]) for c in row)
    wanted = covered | set(sheet.formulas)
    for ref, attrs, inner in cells:
        if ref in wanted:
            sheet.stored[ref] = stored_value(attrs, inner, strings)
        elif inner and stored_value(attrs, inner, strings) not in (None, ""):
            sheet.occupied.add(ref)
    sheet.occupied |= covered
    for ref in covered:
        sheet.stored.setdefault(ref, None)
