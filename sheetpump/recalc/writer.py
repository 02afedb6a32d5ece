"""Writing computed values into a copy of a workbook: the ``<v>`` beside each ``<f>`` of the sheet XML.

Writing keeps the workbook as it is: the computed values are put into the ``<v>`` element beside each
``<f>`` of the sheet XML (and into the cells an array formula spills over), every other part of the file
is copied byte for byte (a macro project is dropped: a recalculated ``.xlsm`` is a plain workbook).
openpyxl reads the result back with ``data_only=True`` as numbers and, without it, as the same formulas.
"""

from __future__ import annotations

import functools
import os
import re
import zipfile
from pathlib import Path
from typing import Any
from xml.sax.saxutils import escape

from ..files import atomic_path, check_outputs
from ..workbooks.refs import (
    CELL_ELEMENT,
    FORMULA_ELEMENT,
    ROW_ELEMENT,
    SHEETDATA_ELEMENT,
    attributes,
    cell_name,
    cell_ref_attribute,
    split_ref,
)
from .results import Cell, CellError
from .sheets import book_sheets

__all__ = ["Rewrite", "copy_package", "write_values"]

#: A formula to rewrite: (the range it becomes an array formula over, or None; its new text, or None).
Rewrite = tuple[str | None, str | None]
def _number_text(value: float) -> str:
    text = repr(float(value))
    return text[:-2] if text.endswith(".0") else text


def _value_xml(prefix: str, value: Any) -> tuple[str | None, str]:
    """The cell type attribute and ``<v>`` element for a value."""
    if value is None:
        return None, ""
    if isinstance(value, CellError):
        return "e", f"<{prefix}v>{escape(str(value))}</{prefix}v>"
    if isinstance(value, bool):
        return "b", f"<{prefix}v>{int(value)}</{prefix}v>"
    if isinstance(value, (int, float)):
        return None, f"<{prefix}v>{_number_text(value)}</{prefix}v>"
    return "str", f"<{prefix}v>{escape(str(value))}</{prefix}v>"


@functools.cache
def _attr_pattern(name: str) -> re.Pattern[str]:
    return re.compile(rf"""\s{re.escape(name)}\s*=\s*(?:"[^"]*"|'[^']*')""")


def _set_attr(attrs: str, name: str, value: str | None) -> str:
    if name in attrs:
        attrs = _attr_pattern(name).sub("", attrs)
    if value is not None:
        attrs = f'{attrs} {name}="{value}"'
    return attrs


def _cell_xml(prefix: str, attrs: str, inner: str, value: Any, rewrite: Rewrite | None = None) -> str:
    kind, v = _value_xml(prefix, value)
    attrs = _set_attr(attrs.rstrip(), "t", kind)
    f = FORMULA_ELEMENT.search(inner) if inner else None
    ext = (re.search(rf"<{re.escape(prefix)}extLst\b.*?</{re.escape(prefix)}extLst>", inner, re.S)
           if "extLst" in inner else None)
    formula = f.group(0) if f else ""
    if f and rewrite is not None:
        ref, text = rewrite
        array = f' t="array" ref="{ref}"' if ref else ""
        formula = f"<{f.group(1)}f{array}>{escape(text) if text is not None else f.group(3) or ''}</{f.group(1)}f>"
    body = formula + v + (ext.group(0) if ext else "")
    return f"<{prefix}c{attrs}>{body}</{prefix}c>"


def _patch_rows(text: str, prefix: str, values: dict[str, Any], rewrites: dict[str, Rewrite]) -> str:
    """Rewrite the rows of a sheetData body: set values of existing cells, insert missing ones."""
    by_row: dict[int, dict[int, str]] = {}
    for ref in values:
        r, c = split_ref(ref)
        by_row.setdefault(r, {})[c] = ref
    out: list[str] = []
    pos = 0
    pending = sorted(by_row)  # row numbers still to place, ascending (one pass: linear in the rows)
    next_pending = 0
    for m in ROW_ELEMENT.finditer(text):
        out.append(text[pos:m.start()])
        pos = m.end()
        try:
            number = int(attributes(m.group(2))["r"])
        except (KeyError, ValueError):
            out.append(m.group(0))
            continue
        # rows the file lacks but an array formula covers go before this one, in order
        while next_pending < len(pending) and pending[next_pending] < number:
            missing = pending[next_pending]
            next_pending += 1
            if missing in by_row:
                out.append(_new_row(prefix, missing, by_row.pop(missing), values))
        wanted = by_row.pop(number, None)
        out.append(_patched_row(m, number, wanted, values, rewrites) if wanted else m.group(0))
    out.append(text[pos:])
    for missing in sorted(by_row):
        out.append(_new_row(prefix, missing, by_row[missing], values))
    return "".join(out)


def _new_row(prefix: str, number: int, cols: dict[int, str], values: dict[str, Any]) -> str:
    cells = "".join(_cell_xml(prefix, f' r="{cols[c]}"', "", values[cols[c]]) for c in sorted(cols))
    return f'<{prefix}row r="{number}">{cells}</{prefix}row>'


def _patched_row(m: re.Match[str], number: int, wanted: dict[int, str], values: dict[str, Any],
                 rewrites: dict[str, Rewrite]) -> str:
    prefix, row_attrs, body = m.group(1), m.group(2), m.group(3) or ""
    pieces: list[str] = []
    pos = 0
    inserted = False
    order = sorted(wanted)  # columns still to place, ascending (one pass over the row)
    k = 0
    for cm in CELL_ELEMENT.finditer(body):
        ref = cell_ref_attribute(cm.group(2))
        col = split_ref(ref)[1] if ref else None
        if col is not None:
            while k < len(order) and order[k] < col:
                c = order[k]
                k += 1
                if c not in wanted:
                    continue
                pieces.append(body[pos:cm.start()])
                pos = cm.start()
                pieces.append(_cell_xml(prefix, f' r="{wanted.pop(c)}"', "", values[cell_name(number, c)]))
                inserted = True
        pieces.append(body[pos:cm.start()])
        pos = cm.end()
        if col is not None and col in wanted:
            wanted.pop(col)
            pieces.append(_cell_xml(cm.group(1), cm.group(2), cm.group(3) or "", values[ref], rewrites.get(ref)))
        else:
            pieces.append(cm.group(0))
    tail = body[pos:]
    ext = tail.find(f"<{prefix}extLst")
    before, after = (tail, "") if ext < 0 else (tail[:ext], tail[ext:])
    pieces.append(before)
    for c in sorted(wanted):
        pieces.append(_cell_xml(prefix, f' r="{cell_name(number, c)}"', "", values[cell_name(number, c)]))
        inserted = True
    pieces.append(after)
    if inserted:  # the spans hint may no longer cover the row's cells; it is optional
        row_attrs = _set_attr(row_attrs, "spans", None)
    return f"<{prefix}row{row_attrs}>{''.join(pieces)}</{prefix}row>"


def _patch_cells(text: str, values: dict[str, Any], rewrites: dict[str, Rewrite]) -> str | None:
    """Set the values of existing cells in one pass; None when some cell of ``values`` is not in the file."""
    seen: set[str] = set()

    def patch(cm: re.Match[str]) -> str:
        ref = cell_ref_attribute(cm.group(2))
        if ref is None or ref not in values:
            return cm.group(0)
        seen.add(ref)
        return _cell_xml(cm.group(1), cm.group(2), cm.group(3) or "", values[ref], rewrites.get(ref))

    patched = CELL_ELEMENT.sub(patch, text)
    return patched if len(seen) == len(values) else None


def _patch_sheet(text: str, values: dict[str, Any], rewrites: dict[str, Rewrite]) -> str:
    m = SHEETDATA_ELEMENT.search(text)
    if not m or not values:
        return text
    prefix, attrs, body = m.group(1), m.group(2), m.group(3) or ""
    patched = _patch_cells(body, values, rewrites)
    if patched is None:  # some cells must be added: row by row
        patched = _patch_rows(body, prefix, values, rewrites)
    return f"{text[:m.start()]}<{prefix}sheetData{attrs}>{patched}</{prefix}sheetData>{text[m.end():]}"


def write_values(source: str | os.PathLike[str], target: str | os.PathLike[str],
                 values: dict[Cell, Any], spills: dict[Cell, str] | None = None) -> Path:
    """Copy a workbook with ``values`` stored beside its formulas; written atomically, source untouched.

    Every package part other than the worksheets that get values is copied unchanged; in those, each
    listed cell gets its ``<v>`` (and type) set, its formula kept; cells an array formula covers that
    the file lacks are added. A formula of ``spills`` (``(sheet, cell) -> range``, as
    :attr:`~sheetpump.recalc.results.Recalculation.spills`) is written as an array formula over its
    range, so that every spreadsheet program, and a later ``recalc``, sees the same spilled range; the
    cells it spills into get their values and no formula.
    """
    source, target = Path(source), Path(target)
    check_outputs([(None, target)], [("the workbook", source)])
    copy_package(source, target, values, {k: (ref, None) for k, ref in (spills or {}).items()})
    return target


def copy_package(source: Path, target: Path, values: dict[Cell, Any], rewrites: dict[Cell, Rewrite]) -> None:
    """:func:`write_values`, with the formulas of ``rewrites`` changed (each of those cells in ``values``)."""
    with zipfile.ZipFile(source) as archive:
        sheets = {s.name: s.part for s in book_sheets(archive)}
        per_part: dict[str, dict[str, Any]] = {}
        for (sheet, cell), value in values.items():
            per_part.setdefault(sheets[sheet], {})[cell] = value
        part_rewrites: dict[str, dict[str, Rewrite]] = {}
        for (sheet, cell), rewrite in rewrites.items():
            part_rewrites.setdefault(sheets[sheet], {})[cell] = rewrite
        with atomic_path(target) as tmp, zipfile.ZipFile(tmp, "w", zipfile.ZIP_DEFLATED) as out:
            for info in archive.infolist():
                if _is_macro_part(info.filename):
                    continue  # macros are never written back (a recalculated .xlsm is a plain workbook)
                data = archive.read(info)
                if info.filename in per_part:
                    data = _patch_sheet(data.decode("utf-8"), per_part[info.filename],
                                        part_rewrites.get(info.filename, {})).encode("utf-8")
                elif info.filename in ("[Content_Types].xml", "xl/_rels/workbook.xml.rels"):
                    data = _without_macros(info.filename, data.decode("utf-8")).encode("utf-8")
                out.writestr(info, data, compress_type=zipfile.ZIP_DEFLATED)


_MACRO_PARTS = re.compile(r"^xl/(vbaProject\.bin|vbaProjectSignature\.bin|vbaData\.xml|_rels/vbaProject\.bin\.rels)$")


def _is_macro_part(name: str) -> bool:
    return bool(_MACRO_PARTS.match(name))


def _without_macros(name: str, xml: str) -> str:
    """Drop the macro project from the content types and the workbook's relationships."""
    if name == "[Content_Types].xml":
        xml = xml.replace("application/vnd.ms-excel.sheet.macroEnabled.main+xml",
                          "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml")
        return re.sub(r'<(Override|Default)[^>]*(vbaProject|vbaData)[^>]*/>', "", xml)
    return re.sub(r'<Relationship [^>]*vbaProject[^>]*/>', "", xml)
