"""Recalculation of the common subset of formulas a column at a time with numpy.

:func:`sheetpump.recalc.recalculate` tries this first and falls back to the ``formulas`` engine (the
correctness reference) whenever the workbook uses anything outside the subset (:mod:`.formula` says
which). Anything else (another function, a defined name, an array formula, a percent sign, an error
literal, a range where a single value belongs, a circular reference, a number the engine would treat
oddly) gives :data:`None`, and the whole workbook goes to the engine, which also reports problems as
before.

How it is fast: the sheet XML is read once with regular expressions (no DTD, so no entity expansion);
formula cells with the same formula in relative form (a shared-formula group, or a filled-down column)
form one group; groups are put in dependency order, and each group is computed for all its cells at once
(:mod:`.columns`) -- one vectorised call of the physics function for a column of 20,000 cells. Where a
vectorised step meets anything but finite numbers (text, an empty cell, an error, a division by zero)
that step is redone cell by cell with the engine's own rules (:mod:`.cell_rules`), so results and error
texts are those of :meth:`Calculation.cell` and of the engine.

This module is the driver: it reads the cells, groups the formulas, orders the groups and decides what
falls back to the engine.
"""

from __future__ import annotations

import os
import re
import zipfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from ..errors import InputError, UnsupportedError
from ..workbooks.refs import (
    CELL_ELEMENT,
    FORMULA_ELEMENT,
    MAX_COL,
    MAX_ROW,
    attributes,
    cell_name,
    cell_ref_attribute,
    column_number,
    split_ref,
)
from .cell_rules import shown_value
from .columns import Book, Column, Group
from .formula import parse_cached, references
from .results import Recalculation
from .sheets import book_sheets, cached_strings, stored_value

__all__ = ["recalculate_columns"]

_T_ATTR_RE = re.compile(r"""(?:^|\s)t\s*=\s*["'](\w+)["']""")


# ------------------------------------------------------------------------------------------ reading


_FAST_CELL_RE = re.compile(r'<c r="([A-Z]{1,3})([1-9]\d{0,6})"([^>]*?)(?:/>|>(.*?)</c>)', re.S)


def _cells(text: str) -> Iterator[tuple[int, int, str, str, str]]:
    """(row, column, ref, attribute text, inner XML) of every cell with content in a sheet's XML."""
    if "<sheetData" in text:  # no namespace prefix: try the quick pattern, which wants r= first
        found = []
        matched = 0
        for m in _FAST_CELL_RE.finditer(text):
            matched += 1
            letters, digits, head, inner = m.groups()
            if not inner:
                continue
            col = column_number(letters)
            found.append((int(digits), col, letters + digits, head, inner))
        if matched == text.count("<c ") + text.count("<c>") + text.count("<c/>"):  # every cell matched
            yield from found
            return
    for m in CELL_ELEMENT.finditer(text):
        head, inner = m.group(2), m.group(3)
        if not inner:
            continue  # an empty cell (style only)
        ref = cell_ref_attribute(head)
        if ref is None:
            raise UnsupportedError("a cell without its reference")
        row, col = split_ref(ref)
        yield row, col, ref, head, inner


def _read(path: Path) -> tuple[Recalculation, Book, list[Group]]:
    result = Recalculation(path=path)
    book = Book()
    with zipfile.ZipFile(path) as archive:
        sheets = book_sheets(archive)
        strings_cache: dict[str, list[str]] = {}

        def strings() -> list[str]:
            return cached_strings(archive, strings_cache)

        groups: dict[tuple[int, int, str], Group] = {}
        f_cache: dict[str, dict[str, str]] = {}
        shared: dict[tuple[int, str], tuple[tuple, str]] = {}  # (sheet, si) -> tree, its repr
        parses: dict[str, tuple[tuple, str]] = {}  # relative text -> tree, its repr
        pending: list[tuple[int, str, int, int]] = []  # shared children met before their anchor
        for number, sheet in enumerate(sheets):
            book.names.append(sheet.name)
            book.index[sheet.name.upper()] = number
            values: dict[tuple[int, int], Any] = {}
            book.values.append(values)
            text = archive.read(sheet.part).decode("utf-8")
            positions: list[tuple[int, int]] = []
            book.formula_cells.append(positions)
            for row, col, ref, head, inner in _cells(text):
                t = _T_ATTR_RE.search(head) if "t" in head else None
                attrs = {"t": t.group(1)} if t else {}
                f = FORMULA_ELEMENT.search(inner) if "f" in inner else None
                if f is None:
                    if t is None and inner.startswith("<v>") and inner.endswith("</v>"):
                        try:
                            values[(row, col)] = float(inner[3:-4])
                            continue
                        except ValueError:
                            pass
                    value = stored_value(attrs, inner, strings)
                    if value is not None:
                        values[(row, col)] = value
                    continue
                f_head = f.group(2)
                f_attrs = f_cache.get(f_head)
                if f_attrs is None:
                    f_attrs = f_cache[f_head] = attributes(f_head) if f_head else {}
                positions.append((row, col))
                formula = _unescape(f.group(3) or "")
                kind = f_attrs.get("t", "normal")
                result.formulas[(sheet.name, ref)] = formula
                result.stored[(sheet.name, ref)] = stored_value(attrs, inner, strings)
                if kind == "shared":
                    si = f_attrs.get("si", "")
                    if formula.strip():
                        parsed = parse_cached(formula, row, col, parses)
                        shared[(number, si)] = parsed
                        _add(groups, number, parsed, row, col)
                    else:
                        pending.append((number, si, row, col))
                elif kind == "normal":
                    _add(groups, number, parse_cached(formula, row, col, parses), row, col)
                else:
                    raise UnsupportedError(f"{kind} formula")
        for number, si, row, col in pending:
            if (number, si) not in shared:
                raise UnsupportedError("a shared formula without its first cell")
            _add(groups, number, shared[(number, si)], row, col)
    return result, book, list(groups.values())


def _unescape(text: str) -> str:
    if "&" not in text:
        return text
    import html

    return html.unescape(text)


def _add(groups: dict[tuple[int, int, str], Group], sheet: int, parsed: tuple[tuple, str], row: int,
         col: int) -> None:
    node, shape = parsed
    key = (sheet, col, shape)
    group = groups.get(key)
    if group is None:
        group = groups[key] = Group(sheet, node)
    group.cells.append((row, col))



# ------------------------------------------------------------------------------- dependency order


def _span(part: tuple[bool, int, bool, int], rows: tuple[int, int], cols: tuple[int, int]) -> tuple[int, ...]:
    rabs, r, cabs, c = part
    r1, r2 = (r, r) if rabs else (rows[0] + r, rows[1] + r)
    c1, c2 = (c, c) if cabs else (cols[0] + c, cols[1] + c)
    if r1 < 1 or c1 < 1 or r2 > MAX_ROW or c2 > MAX_COL:
        raise UnsupportedError("a reference moved outside the sheet")
    return r1, c1, r2, c2


def _boxes(book: Book, group: Group) -> list[tuple[int, int, int, int, int]]:
    """Boxes (sheet, row1, col1, row2, col2) holding every cell the group reads."""
    b = group.bbox
    rows, cols = (b[0], b[2]), (b[1], b[3])
    out = []
    for ref in references(group.node):
        sheet = book.sheet_number(ref[1], group.sheet)
        a = _span(ref[2], rows, cols)
        z = _span(ref[3], rows, cols) if ref[0] == "range" else a
        out.append((sheet, min(a[0], z[0]), min(a[1], z[1]), max(a[2], z[2]), max(a[3], z[3])))
    return out


def _order(book: Book, groups: list[Group]) -> list[Group] | None:
    """The groups in dependency order; None when some group (transitively) reads itself."""
    by_sheet: dict[int, list[int]] = {}
    owner: list[dict[tuple[int, int], int]] = [{} for _ in book.names]
    for i, g in enumerate(groups):
        g.finish()
        by_sheet.setdefault(g.sheet, []).append(i)
        for cell in g.cells:
            owner[g.sheet][cell] = i
    for g in groups:
        for sheet, r1, c1, r2, c2 in _boxes(book, g):
            if (r2 - r1 + 1) * (c2 - c1 + 1) <= 64:
                cells = owner[sheet]
                for r in range(r1, r2 + 1):
                    for c in range(c1, c2 + 1):
                        j = cells.get((r, c))
                        if j is not None:
                            g.deps.add(j)
            else:
                for j in by_sheet.get(sheet, ()):
                    o = groups[j].bbox
                    if o[0] <= r2 and r1 <= o[2] and o[1] <= c2 and c1 <= o[3]:
                        g.deps.add(j)
    # Kahn's algorithm
    users: list[list[int]] = [[] for _ in groups]
    waiting = [len(g.deps) for g in groups]
    for i, g in enumerate(groups):
        for j in g.deps:
            users[j].append(i)
    ready = [i for i, n in enumerate(waiting) if n == 0]
    out = []
    while ready:
        i = ready.pop()
        out.append(groups[i])
        for k in users[i]:
            waiting[k] -= 1
            if waiting[k] == 0:
                ready.append(k)
    return out if len(out) == len(groups) else None


# ------------------------------------------------------------------------------------------ driving


def recalculate_columns(path: str | os.PathLike[str]) -> Recalculation | None:
    """Compute every formula of a workbook with the fast subset; None when it needs the full engine.

    The result is the same :class:`~sheetpump.recalc.Recalculation` as the engine gives (values in
    sheet and cell order, stored values, formula texts); a workbook with a problem to report (an
    unsupported function, a circular reference, a failing function) gives None, so that the engine
    computes and reports it.
    """
    path = Path(path)
    try:
        result, book, groups = _read(path)
        if not result.formulas:
            return None
        order = _order(book, groups)
        if order is None:  # a group reads itself: try again one cell at a time
            singles = []
            for g in groups:
                for cell in g.cells:
                    singles.append(Group.single(g.sheet, g.node, cell))
            order = _order(book, singles)
            if order is None:
                return None  # a real circular reference: the engine reports it
        for group in order:
            values = book.values[group.sheet]
            out = Column(book, group).run()
            for cell, value in zip(group.cells, out, strict=True):
                # a formula showing an empty cell holds 0 for the formulas that read it, as in the engine
                values[cell] = 0.0 if value is None else value
        computed = {}
        for number, name in enumerate(book.names):
            values = book.values[number]
            for row, col in sorted(book.formula_cells[number]):
                computed[(name, cell_name(row, col))] = shown_value(values[(row, col)])
        result.values = computed
        return result
    except (UnsupportedError, InputError, zipfile.BadZipFile, OSError, KeyError, ValueError, UnicodeDecodeError):
        return None
