"""Headless recalculation: compute every formula of a workbook, sheetpump's cell functions included.

The standard spreadsheet functions are evaluated by the ``formulas`` package (an Excel formula engine);
sheetpump adds every :class:`~sheetpump.declarations.Calculation` of :data:`~sheetpump.catalogue.CATALOGUE` to
it under its cell-function name, so ``=SP_HYDRAULIC_POWER(A2, B2)`` or
``=SP_HYDRAULIC_POWER("3000 psi", B2, "hp")`` compute exactly as :meth:`Calculation.cell` does. A new
declaration in the catalogue needs nothing here.

Three things the engine does quietly are made loud:

* a function it does not know would give ``#NAME?``: the workbook is scanned first and such a formula is
  reported with its sheet, cell and function name;
* a function that fails while it runs is logged by the engine and its cell left out of the solution:
  every formula cell is checked for a result and a missing one is reported with the reason;
* a circular reference is cut by the engine (never looped on) and reported with its cells;
* a formula in an ordinary cell whose result is a range would keep only its first element: it spills
  instead, as a dynamic array does in Excel 365 (see :func:`recalculate`), or, when its range is not
  empty, shows a ``#SPILL!`` text naming the cell in the way (:attr:`Recalculation.blocked`).

Writing keeps the workbook as it is: the computed values are put into the ``<v>`` element beside each
``<f>`` of the sheet XML (and into the cells an array formula spills over), every other part of the file
is copied byte for byte. openpyxl reads the result back with ``data_only=True`` as numbers and, without
it, as the same formulas.

Comparing (``--verify``) uses :func:`values_differ`: two numbers agree when
``|a - b| <= max(rel_tol * max(|a|, |b|), abs_tol)``, with ``rel_tol = 1e-9`` and ``abs_tol = 1e-12``
by default (the floor keeps round-off around zero, e.g. ``1e-17`` against ``0``, from counting). Text,
true/false values and error codes must be equal.

>>> values_differ(1.0, 1.0 + 1e-12), values_differ(1.0, 1.001), values_differ(0.0, 1e-17)
(False, True, False)
"""

from __future__ import annotations

import contextlib
import functools
import html
import logging
import math
import os
import re
import tempfile
import zipfile
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath
from types import SimpleNamespace
from typing import Any
from xml.sax.saxutils import escape

import numpy as np
from defusedxml import ElementTree

from .catalogue import CATALOGUE
from .declarations import Calculation
from .errors import InputError, Where
from .files import atomic_path, check_outputs

__all__ = [
    "DEFAULT_ABS_TOL",
    "DEFAULT_REL_TOL",
    "SPILL_PREFIX",
    "CellError",
    "Difference",
    "Problem",
    "Recalculation",
    "compare",
    "evaluate_workbook",
    "recalculate",
    "register_functions",
    "values_differ",
    "write_values",
]

#: The value of a formula whose result has no room to spill starts with this (then says which cell is
#: in the way); a text, as the project's ``#SP!`` texts are, so every spreadsheet program reads it.
SPILL_PREFIX = "#SPILL! "
#: Default relative tolerance of ``--verify``.
DEFAULT_REL_TOL = 1e-9
#: Default absolute floor of ``--verify`` (differences below it never count).
DEFAULT_ABS_TOL = 1e-12

Cell = tuple[str, str]

_MAIN_NS = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
_REL_NS = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
_PKG_REL_NS = "http://schemas.openxmlformats.org/package/2006/relationships"
# Functions handled by the engine's parser itself rather than its function table.
_SYNTAX_FUNCTIONS = {"LAMBDA", "LET", "_XLFN.LAMBDA", "_XLFN.LET"}


class CellError(str):
    """A spreadsheet error value such as ``#DIV/0!`` (kept apart from a text that looks like one)."""

    def __repr__(self) -> str:
        return f"CellError({str(self)!r})"


@dataclass(frozen=True)
class Problem:
    """A formula that could not be computed: where, and why."""

    sheet: str
    cell: str
    message: str

    def __str__(self) -> str:
        return f"{_place(self.sheet, self.cell)}: {self.message}"


@dataclass(frozen=True)
class Difference:
    """A formula cell whose stored value differs from the recomputed one."""

    sheet: str
    cell: str
    stored: Any
    computed: Any

    def __str__(self) -> str:
        stored = "(no stored value)" if self.stored is None else _show(self.stored)
        return f"{_place(self.sheet, self.cell)}: stored {stored}, recomputed {_show(self.computed)}"


@dataclass
class Recalculation:
    """What :func:`recalculate` found.

    ``values`` holds the computed value of every formula cell (and of every cell an array formula
    covers), ``stored`` the value the file held for the same cells (None where it held none),
    ``formulas`` the formula text of each formula cell and ``problems`` what could not be computed.
    """

    path: Path
    values: dict[Cell, Any] = field(default_factory=dict)
    stored: dict[Cell, Any] = field(default_factory=dict)
    formulas: dict[Cell, str] = field(default_factory=dict)
    problems: list[Problem] = field(default_factory=list)
    #: Formulas in ordinary cells whose result is a range, by (sheet, cell): the range they spill over.
    spills: dict[Cell, str] = field(default_factory=dict)
    #: Formulas whose result would spill over cells that are not empty: their cell holds a text starting
    #: with :data:`SPILL_PREFIX` that names the blocking cell, and formulas using it show ``#N/A``.
    blocked: list[Problem] = field(default_factory=list)

    def raise_problems(self, limit: int = 5, *, blocked: bool = False) -> None:
        """Raise one :class:`InputError` that lists the problems (the first ``limit`` of them).

        With ``blocked``, spills without room count as problems too.
        """
        problems = self.problems + (self.blocked if blocked else [])
        if not problems:
            return
        first, rest = problems[0], problems[1:]
        text = first.message
        if rest:
            text += "; also " + "; ".join(str(p) for p in rest[: limit - 1])
            if len(rest) > limit - 1:
                text += f"; and {len(rest) - limit + 1} more"
        raise InputError(text, Where(file=str(self.path), sheet=first.sheet, cell=first.cell))


# ------------------------------------------------------------------------------------ cell functions


def _argument(value: Any) -> Any:
    """One engine argument as :meth:`Calculation.cell` takes it; an engine error value is returned as is."""
    from formulas.tokens.operand import XlError
    from schedula import EMPTY

    if isinstance(value, np.ndarray):
        if value.size == 1:
            return _argument(value.reshape(-1)[0])
        items = value.ravel()
        for item in items:
            if isinstance(item, XlError):
                return item
        if all(type(x) in (int, float) or isinstance(x, (np.integer, np.floating)) for x in items):
            return np.asarray(value, dtype=float).reshape(value.shape if value.ndim == 2 else (1, -1))
        out = np.empty(value.shape, dtype=object)
        for index, item in np.ndenumerate(value):
            out[index] = _argument(item)
        return out
    if value is EMPTY:
        return None
    if isinstance(value, np.generic):
        return value.item()
    return value


def _cell_function(calc: Calculation) -> Any:
    """The engine function for one calculation: engine values in, :meth:`Calculation.cell` out."""
    from formulas.functions import Array, wrap_ranges_func
    from formulas.tokens.operand import XlError

    def evaluate(*args: Any) -> Any:
        values = [_argument(a) for a in args]
        for value in values:
            if isinstance(value, XlError):  # an error in an argument passes through, as in a spreadsheet
                return value
        try:
            result = calc.cell(*values)
        except Exception as exc:  # cell() should never raise; if it does, say so in the cell's report
            return _failed(f"{calc.name} failed with {type(exc).__name__}: {exc}")
        if isinstance(result, (list, np.ndarray)):
            return np.asarray(result, dtype=object).view(Array)
        return result

    evaluate.__name__ = calc.name
    # wrap_ranges_func hands over cell values instead of the engine's range objects.
    return wrap_ranges_func(evaluate)


@functools.cache
def _failure_class() -> type:
    from formulas.tokens.operand import XlError

    class CellFailureError(XlError):
        """A ``#VALUE!`` that remembers why: a cell function raised instead of returning an error text.

        It flows through the engine like any error value, so the cell (and those depending on it) can
        be reported with the reason rather than silently showing ``#VALUE!``.
        """

        def __new__(cls, reason: str) -> CellFailureError:
            self = super().__new__(cls, "#VALUE!")
            self.reason = reason
            return self

    return CellFailureError


def _failed(reason: str) -> Any:
    return _failure_class()(reason)


def register_functions() -> dict[str, Any]:
    """Add every calculation of the catalogue to the formula engine's function table; return the table.

    Each is registered under its name and under ``_XLUDF.<name>`` (the prefix a spreadsheet program
    writes for a user-defined function it did not know). Calling it again re-registers, so a
    calculation declared later is picked up too.

    >>> "SP_HYDRAULIC_POWER" in register_functions()
    True
    """
    import formulas

    table = formulas.get_functions()
    for name, calc in CATALOGUE.items():
        func = _cell_function(calc)
        table[name] = func
        table[f"_XLUDF.{name}"] = func
    return table


# --------------------------------------------------------------------------------- the package parts

_CELL_RE = re.compile(r"<((?:[\w.-]+:)?)c\b([^>]*?)(?:/>|>(.*?)</\1c>)", re.S)
_ROW_RE = re.compile(r"<((?:[\w.-]+:)?)row\b([^>]*?)(?:/>|>(.*?)</\1row>)", re.S)
_SHEETDATA_RE = re.compile(r"<((?:[\w.-]+:)?)sheetData\b([^>]*?)(?:/>|>(.*?)</\1sheetData>)", re.S)
_ATTR_RE = re.compile(r"""([\w:.-]+)\s*=\s*(?:"([^"]*)"|'([^']*)')""")
_F_RE = re.compile(r"<((?:[\w.-]+:)?)f\b([^>]*?)(?:/>|>(.*?)</\1f>)", re.S)
_V_RE = re.compile(r"<((?:[\w.-]+:)?)v\b[^>]*?(?:/>|>(.*?)</\1v>)", re.S)
_IS_RE = re.compile(r"<((?:[\w.-]+:)?)is\b[^>]*?(?:/>|>.*?</\1is>)", re.S)
_T_RE = re.compile(r"<((?:[\w.-]+:)?)t\b[^>]*?(?:/>|>(.*?)</\1t>)", re.S)
_REF_RE = re.compile(r"^\$?([A-Za-z]{1,3})\$?(\d+)$")
_STRING_RE = re.compile(r'"(?:[^"]|"")*"')
_QUOTED_SHEET_RE = re.compile(r"'(?:[^']|'')*'")
_FUNCTION_RE = re.compile(r"(?<![\w.])([A-Za-z_][\w.]*)\s*\(")


def _attrs(text: str) -> dict[str, str]:
    return {m.group(1): html.unescape(m.group(2) if m.group(2) is not None else m.group(3))
            for m in _ATTR_RE.finditer(text)}


def _split_ref(ref: str) -> tuple[int, int]:
    """``"C12"`` -> (12, 3): row and column numbers, 1-based."""
    m = _REF_RE.match(ref)
    if not m:
        raise ValueError(ref)
    letters = m.group(1)
    col = _COLUMNS.get(letters)
    if col is None:
        col = 0
        for ch in letters.upper():
            col = col * 26 + ord(ch) - 64
        _COLUMNS[letters] = col
    return int(m.group(2)), col


_COLUMNS: dict[str, int] = {}  # column letters -> number, filled as met
_R_ATTR_RE = re.compile(r"""(?:^|\s)r\s*=\s*(?:"([^"]*)"|'([^']*)')""")


def _cell_ref(attrs: str) -> str | None:
    """The ``r`` attribute of a cell's attribute text (what ``_attrs(attrs).get("r")`` gives, faster)."""
    m = _R_ATTR_RE.search(attrs)
    if m is None:
        return None
    ref = m.group(1) if m.group(1) is not None else m.group(2)
    return html.unescape(ref) if "&" in ref else ref


def _column_letters(col: int) -> str:
    letters = ""
    while col:
        col, rest = divmod(col - 1, 26)
        letters = chr(65 + rest) + letters
    return letters


def _range_cells(ref: str) -> list[list[str]]:
    """``"C1:D2"`` -> [["C1", "D1"], ["C2", "D2"]]."""
    first, _, last = ref.partition(":")
    r1, c1 = _split_ref(first)
    r2, c2 = _split_ref(last or first)
    return [[f"{_column_letters(c)}{r}" for c in range(c1, c2 + 1)] for r in range(r1, r2 + 1)]


@dataclass
class _Sheet:
    name: str
    part: str
    formulas: dict[str, str] = field(default_factory=dict)  # cell -> formula text ("" for shared children)
    arrays: dict[str, str] = field(default_factory=dict)  # anchor cell -> ref of an array formula
    stored: dict[str, Any] = field(default_factory=dict)  # cell -> stored value of formula/array cells
    occupied: set[str] = field(default_factory=set)  # cells holding a value or a formula (spill blockers)
    shared: set[str] = field(default_factory=set)  # cells of a shared (filled-down) formula


def _book_sheets(archive: zipfile.ZipFile) -> list[_Sheet]:
    """The worksheets of a workbook package in tab order, with the package part holding each."""
    try:
        book = ElementTree.fromstring(archive.read("xl/workbook.xml"))
        rels = ElementTree.fromstring(archive.read("xl/_rels/workbook.xml.rels"))
    except KeyError as exc:
        raise InputError("not an Excel workbook (no xl/workbook.xml inside)", hint="save it as .xlsx") from exc
    targets = {r.get("Id"): r.get("Target", "") for r in rels.iter(f"{{{_PKG_REL_NS}}}Relationship")}
    sheets = []
    for node in book.iter(f"{{{_MAIN_NS}}}sheet"):
        target = targets.get(node.get(f"{{{_REL_NS}}}id"), "")
        part = target.lstrip("/") if target.startswith("/") else str(PurePosixPath("xl") / target)
        if part in archive.namelist() and "worksheets/" in part:  # chart sheets hold no cells
            sheets.append(_Sheet(node.get("name", ""), _normalise_part(part)))
    return sheets


def _normalise_part(part: str) -> str:
    parts: list[str] = []
    for piece in part.split("/"):
        if piece == "..":
            if parts:
                parts.pop()
        elif piece and piece != ".":
            parts.append(piece)
    return "/".join(parts)


def _shared_strings(archive: zipfile.ZipFile) -> list[str]:
    try:
        text = archive.read("xl/sharedStrings.xml").decode("utf-8")
    except KeyError:
        return []
    items = re.findall(r"<(?:[\w.-]+:)?si\b[^>]*?(?:/>|>(.*?)</(?:[\w.-]+:)?si>)", text, re.S)
    return ["".join(html.unescape(t or "") for _, t in _T_RE.findall(item or "")) for item in items]


def _stored_value(attrs: dict[str, str], inner: str, strings: functools.partial[list[str]]) -> Any:
    kind = attrs.get("t", "n")
    if kind == "inlineStr":
        found = _IS_RE.search(inner)
        return "".join(html.unescape(t or "") for _, t in _T_RE.findall(found.group(0))) if found else None
    v = _V_RE.search(inner)
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


def _scan(path: Path) -> list[_Sheet]:
    """Formula cells, array formulas and stored values of every worksheet, read from the sheet XML."""
    try:
        archive = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as exc:
        raise InputError(f"cannot open as a workbook: {exc}", Where(file=str(path)),
                         "give an .xlsx or .xlsm file") from None
    with archive:
        sheets = _book_sheets(archive)
        strings = functools.partial(_cached_strings, archive, {})
        for sheet in sheets:
            text = archive.read(sheet.part).decode("utf-8")
            covered: set[str] = set()
            cells: list[tuple[str, dict[str, str], str]] = []
            for m in _CELL_RE.finditer(text):
                attrs = _attrs(m.group(2))
                ref = attrs.get("r")
                inner = m.group(3) or ""
                if ref is None:
                    if "<" in inner and _F_RE.search(inner):
                        raise InputError("a formula cell without its reference (r attribute)",
                                         Where(file=str(path), sheet=sheet.name))
                    continue
                cells.append((ref, attrs, inner))
                f = _F_RE.search(inner)
                if f:
                    f_attrs = _attrs(f.group(2))
                    sheet.formulas[ref] = html.unescape(f.group(3) or "")
                    sheet.occupied.add(ref)
                    if f_attrs.get("t") == "shared":
                        sheet.shared.add(ref)
                    if f_attrs.get("t") == "array":
                        sheet.arrays[ref] = f_attrs.get("ref", ref)
                        covered.update(c for row in _range_cells(sheet.arrays[ref]) for c in row)
            wanted = covered | set(sheet.formulas)
            for ref, attrs, inner in cells:
                if ref in wanted:
                    sheet.stored[ref] = _stored_value(attrs, inner, strings)
                elif inner and _stored_value(attrs, inner, strings) not in (None, ""):
                    sheet.occupied.add(ref)
            sheet.occupied |= covered
            for ref in covered:
                sheet.stored.setdefault(ref, None)
        return sheets


def _cached_strings(archive: zipfile.ZipFile, cache: dict[str, list[str]]) -> list[str]:
    if "s" not in cache:
        cache["s"] = _shared_strings(archive)
    return cache["s"]


def _functions_used(formula: str) -> list[str]:
    """Names of the functions a formula calls, upper case (string literals and sheet names skipped).

    >>> _functions_used('=IF(A1>0, SP_HYDRAULIC_POWER("3 (psi)", B2), \\'My (2)\\'!C3)')
    ['IF', 'SP_HYDRAULIC_POWER']
    """
    text = _QUOTED_SHEET_RE.sub("''", _STRING_RE.sub('""', formula))
    return [m.group(1).upper() for m in _FUNCTION_RE.finditer(text)]


def _unsupported(sheets: Iterable[_Sheet]) -> list[Problem]:
    from formulas.functions import not_implemented

    table = register_functions()
    problems = []
    for sheet in sheets:
        for ref, formula in sheet.formulas.items():
            for name in _functions_used(formula):
                if name in _SYNTAX_FUNCTIONS:
                    continue
                func = table.get(name)
                if func is None or func is not_implemented:
                    shown = name.removeprefix("_XLFN.").removeprefix("_XLUDF.")
                    problems.append(Problem(sheet.name, ref, f"function {shown} is not supported by the "
                                            "recalculation engine (compute it in a spreadsheet program, "
                                            "or replace it)"))
                    break
    return problems


# -------------------------------------------------------------------------------------- evaluating


@contextlib.contextmanager
def _quiet_engine() -> Iterator[None]:
    """Silence the engine's progress bar and its error log (failures are collected and reported)."""
    import formulas.excel as engine
    import tqdm

    loggers = [logging.getLogger(name) for name in ("schedula", "formulas")]
    levels = [lg.level for lg in loggers]
    saved = engine.tqdm
    engine.tqdm = SimpleNamespace(tqdm=functools.partial(tqdm.tqdm, disable=True))
    for lg in loggers:
        lg.setLevel(logging.CRITICAL)
    try:
        yield
    finally:
        engine.tqdm = saved
        for lg, level in zip(loggers, levels, strict=True):
            lg.setLevel(level)


def _plain_value(value: Any) -> Any:
    """An engine result as a plain Python value: float, bool, str, :class:`CellError` or None."""
    from formulas.excel import XlCircular
    from formulas.tokens.operand import XlError
    from schedula import EMPTY

    if isinstance(value, np.ndarray):
        value = value.reshape(-1)[0] if value.size else None
    if value is EMPTY or value is None:
        return 0.0  # a formula that points at an empty cell shows 0, as in a spreadsheet
    if isinstance(value, _failure_class()):
        return _Reported(f"could not be computed: {value.reason}")
    if isinstance(value, XlCircular):
        return _Reported("depends on a circular reference")
    if isinstance(value, XlError):
        return CellError(str(value))
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        number = float(value)
        return number if math.isfinite(number) else CellError("#NUM!")
    if isinstance(value, str):
        return value
    return CellError("#VALUE!")


@dataclass(frozen=True)
class _Reported:
    """A cell result that is a problem to report, not a value to store."""

    message: str


def _engine_key_index(keys: Iterable[Any], filename: str) -> dict[tuple[str, str], Any]:
    """Map (SHEET upper case, ref) to the engine's node ids of this workbook."""
    from formulas.ranges import Ranges

    index = {}
    for key in keys:
        if not isinstance(key, str) or "!" not in key:
            continue
        try:
            rng = Ranges.get_range(key)
        except Exception:  # names and odd nodes are not cells
            continue
        if rng.get("filename", "").upper() != filename.upper() or "sheet" not in rng or "ref" not in rng:
            continue
        index[(rng["sheet"].upper(), rng["ref"])] = key
    return index


def recalculate(path: str | os.PathLike[str], *, engine: str = "auto") -> Recalculation:
    """Compute every formula of a workbook; never modifies it.

    Parameters
    ----------
    path : str or path-like
        An .xlsx (or .xlsm) workbook.
    engine : {"auto", "formulas"}
        ``"auto"`` computes with the fast column-at-a-time path of :mod:`sheetpump.recalc_fast` when
        every formula is in its subset and with the ``formulas`` engine otherwise; ``"formulas"``
        always uses the engine (the reference the fast path is tested against).

    A formula in an ordinary cell whose result is a range spills into the cells below and to the
    right, which must be empty; formulas reading those cells see the spilled values (passes of the
    engine until no spill changes). A spill whose range is not empty is listed in ``blocked``.

    Returns
    -------
    Recalculation
        Computed and stored values of the formula cells (and of the cells spilled into), the spills
        and the spills blocked, and the problems found (unsupported
        functions, failed cells, circular references). Problems do not raise here; see
        :meth:`Recalculation.raise_problems`.

    Raises
    ------
    InputError
        When the file cannot be read as a workbook.
    """
    path = Path(path)
    if not path.is_file():
        raise InputError("no such workbook", Where(file=str(path)))
    if engine not in ("auto", "formulas"):
        raise ValueError(f"engine must be 'auto' or 'formulas', not {engine!r}")
    if engine == "auto":
        from .recalc_fast import recalculate_fast

        fast = recalculate_fast(path)
        if fast is not None:
            return fast

    from formulas.excel import ERR_CIRCULAR

    sheets = _scan(path)
    result = Recalculation(path=path)
    for sheet in sheets:
        for ref, formula in sheet.formulas.items():
            result.formulas[(sheet.name, ref)] = formula
        for ref, stored in sheet.stored.items():
            result.stored[(sheet.name, ref)] = stored
    if not result.formulas:
        return result
    result.problems.extend(_unsupported(sheets))
    if result.problems:
        return result

    # Dynamic arrays: a formula in an ordinary cell whose result is a range spills into the cells
    # below and to the right, as in Excel 365. The engine keeps only the top-left element of such a
    # result, so each pass records the full shapes, turns the formulas that spill into array formulas
    # over their ranges (in a temporary copy) and computes again, until no spill changes: formulas
    # that read a spilled range then see all of it, and spills fed by spills settle in turn.
    spills: dict[Cell, str] = {}
    blocked: dict[Cell, Problem] = {}
    for _ in range(_SPILL_PASSES):
        model, solution, shapes = _engine_pass(path, spills, blocked)
        index = _engine_key_index(model.dsp.data_nodes, path.name)
        if not _settle_spills(sheets, index, shapes, spills, blocked):
            break
    else:
        first = next(iter({**spills, **blocked}), (sheets[0].name, "A1"))
        result.problems.append(Problem(*first, f"the spilled ranges did not settle after {_SPILL_PASSES} "
                                       "passes (spills that feed each other)"))
        return result
    result.spills = dict(spills)
    result.blocked = list(blocked.values())
    errors = dict(getattr(solution, "_errors", {}) or {})

    circular_nodes = {k for k, v in model.dsp.default_values.items() if v.get("value") is ERR_CIRCULAR}
    circular_cells = []
    pred = model.dsp.dmap.pred
    for sheet in sheets:
        upper = sheet.name.upper()
        covered = {c for a in sheet.arrays.values() for row in _range_cells(a) for c in row}
        targets = dict(sheet.arrays)
        targets.update((ref, spills.get((sheet.name, ref), ref)) for ref in sheet.formulas if ref not in covered)
        for anchor, ref in targets.items():
            key = index.get((upper, ref))
            if key is not None and key in circular_nodes:
                circular_cells.append((sheet.name, anchor))
                continue
            if key is None or key not in solution:
                reason = _failure(key, pred, errors)
                result.problems.append(Problem(sheet.name, anchor, reason))
                continue
            value = solution[key]
            value = value.value if hasattr(value, "value") else value
            grid = np.asarray(value, dtype=object)
            cells = _range_cells(ref)
            if grid.ndim != 2:
                grid = grid.reshape(1, 1) if grid.size == 1 else grid.reshape(1, -1)
            for i, row in enumerate(cells):
                for j, cell in enumerate(row):
                    item = grid[i, j] if i < grid.shape[0] and j < grid.shape[1] else CellError("#N/A")
                    result.values[(sheet.name, cell)] = _plain_value(item)
    if circular_cells:
        shown = ", ".join(_place(s, c) for s, c in circular_cells[:8])
        more = ", ..." if len(circular_cells) > 8 else ""
        result.problems.append(Problem(*circular_cells[0], f"circular reference: the formulas of {shown}{more} "
                                       "depend on each other in a loop"))
    for problem in result.blocked:  # the anchor of a spill with no room says why, as #SPILL! does
        result.values[(problem.sheet, problem.cell)] = f"{SPILL_PREFIX}{problem.message}"
    for key, value in list(result.values.items()):
        if isinstance(value, _Reported):
            result.problems.append(Problem(*key, value.message))
            del result.values[key]
    order = {s.name: i for i, s in enumerate(sheets)}
    result.values = dict(sorted(result.values.items(),
                                key=lambda kv: (order[kv[0][0]], *_split_ref(kv[0][1]))))
    return result


_SPILL_PASSES = 20  # a chain of spills each fed by the one before settles in one pass per link
_MAX_ROWS, _MAX_COLS = 1_048_576, 16_384  # the sheet's edge (Excel's grid)


def _engine_pass(path: Path, spills: dict[Cell, str], blocked: dict[Cell, Problem]) -> tuple[Any, Any, dict]:
    """One computation by the engine: (model, solution, shape of every node's full result).

    The spilling formulas of ``spills`` are computed as array formulas over their ranges, and those
    whose spill is blocked as ``NA()`` (so formulas that use them show an error, not a stale value),
    in a temporary copy of the workbook with the same file name (the engine's node ids contain it).
    """
    import formulas

    shapes: dict[str, tuple[int, ...]] = {}
    with tempfile.TemporaryDirectory(prefix="sheetpump-spill-") as tmp:
        source = path
        if spills or blocked:
            source = Path(tmp) / path.name
            rewritten: dict[Cell, tuple[str | None, str | None]] = {k: (ref, None) for k, ref in spills.items()}
            rewritten.update((k, (None, "NA()")) for k in blocked)
            _copy_package(path, source, dict.fromkeys(rewritten), rewritten)
        with _quiet_engine(), _recording_shapes(shapes):
            try:
                model = formulas.ExcelModel().loads(str(source.resolve())).finish(circular=True)
            except Exception as exc:  # the engine raises many kinds on a bad formula
                raise InputError(f"the formula engine cannot read this workbook: {_engine_error(exc)}",
                                 Where(file=str(path))) from exc
            model.dsp.raises = False  # a failing function is logged, its cell left out: reported later
            solution = model.calculate()
    return model, solution, shapes


@contextlib.contextmanager
def _recording_shapes(shapes: dict[str, tuple[int, ...]]) -> Iterator[None]:
    """Record the shape of each result before the engine cuts it to its cell (by engine node id)."""
    import formulas.cell as cell_module
    from formulas.ranges import Ranges

    original = cell_module.format_output

    def format_output(rng: dict[str, Any], value: Any) -> Any:
        shapes[rng["name"]] = np.shape(value.value if isinstance(value, Ranges) else value)
        return original(rng, value)

    cell_module.format_output = format_output  # looked up when the model is built
    try:
        yield
    finally:
        cell_module.format_output = original


def _settle_spills(sheets: list[_Sheet], index: dict[tuple[str, str], Any], shapes: dict[str, tuple[int, ...]],
                   spills: dict[Cell, str], blocked: dict[Cell, Problem]) -> bool:
    """Update ``spills`` and ``blocked`` from the shapes of one pass; whether anything changed.

    Formulas are taken in row order; each spill claims its range, and a spill whose range holds a value,
    a formula, an array formula or an earlier spill is blocked, naming the first such cell.
    """
    changed = False
    for sheet in sheets:
        upper = sheet.name.upper()
        covered = {c for a in sheet.arrays.values() for row in _range_cells(a) for c in row}
        claimed: dict[str, str] = {}
        for anchor in sorted(sheet.formulas, key=_split_ref):
            key = (sheet.name, anchor)
            if anchor in covered or key in blocked:
                continue
            current = spills.get(key)
            shape = shapes.get(index.get((upper, current or anchor)), ())
            rows, cols = (shape if len(shape) == 2 else (1, int(np.prod(shape))))
            if rows * cols <= 1:
                if current is not None:
                    del spills[key]
                    changed = True
                continue
            row0, col0 = _split_ref(anchor)
            wanted = f"{anchor}:{_ref(col0 + cols - 1, row0 + rows - 1)}"
            reason = None
            if row0 + rows - 1 > _MAX_ROWS or col0 + cols - 1 > _MAX_COLS:
                reason = "it runs past the edge of the sheet"
            elif anchor in sheet.shared:
                reason = "it is a filled-down (shared) formula: enter the formula in a cell of its own"
            else:
                for cell in (c for row in _range_cells(wanted) for c in row if c != anchor):
                    if cell in sheet.occupied:
                        reason = f"{cell} is not empty (clear {cell} or move the formula)"
                        break
                    if cell in claimed:
                        reason = f"{cell} is in the spilled range of {claimed[cell]} (move one of the formulas)"
                        break
            if reason is not None:
                blocked[key] = Problem(sheet.name, anchor, f"the formula's {rows} x {cols} results need "
                                       f"{wanted}, but {reason}")
                spills.pop(key, None)
                changed = True
                continue
            claimed.update((c, anchor) for row in _range_cells(wanted) for c in row)
            if current != wanted:
                spills[key] = wanted
                changed = True
    return changed


def _failure(key: Any, pred: Any, errors: dict[Any, str]) -> str:
    """Why the engine left a cell out of its solution."""
    if key is not None:
        for func_node in pred.get(key, ()):
            if func_node in errors:
                return f"could not be computed: {_short_error(errors[func_node])}"
    return "could not be computed (it depends on a cell that could not be computed)"


def _short_error(message: str) -> str:
    """The engine's failure text, which nests the dispatcher's, shortened to "FUNCTION failed with ..."."""
    text = message.replace("\\'", "'").replace('\\"', '"')
    found = re.findall(r"""'([A-Za-z_][\w.]*)',\s*(\w+)\((['"])(.*?)\3\)""", text)
    if found:
        name, kind, _, reason = found[-1]
        return f"{name} failed with {kind}: {reason}"
    return (text.strip().splitlines() or ["the engine failed"])[-1].strip()[:200]


def _engine_error(exc: Exception) -> str:
    args = exc.args
    if len(args) == 3 and isinstance(args[2], BaseException):  # schedula: (template, node, exception)
        return f"{args[1]} failed with {type(args[2]).__name__}: {args[2]}"
    return (str(exc).splitlines() or [type(exc).__name__])[0][:200]


def _place(sheet: str, cell: str) -> str:
    return f"{sheet}!{cell}"


def _show(value: Any) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return repr(value)
    return repr(str(value)) if not isinstance(value, CellError) else str(value)


def evaluate_workbook(path: str | os.PathLike[str]) -> dict[Cell, Any]:
    """The computed value of every formula cell of a workbook, by (sheet, cell).

    For readers that meet formula cells without a stored value (a file written by a program that does
    not compute). Values are floats, bools, text (a cell function's ``#SP! ...`` message included) or
    :class:`CellError`; the cells an array formula covers are included.

    Raises
    ------
    InputError
        Naming the file, sheet and cell of the first formula that cannot be computed (unsupported
        function, circular reference, failed function).
    """
    result = recalculate(path)
    result.raise_problems(blocked=True)
    return result.values


# ---------------------------------------------------------------------------------------- comparing


def values_differ(stored: Any, computed: Any, rel_tol: float = DEFAULT_REL_TOL,
                  abs_tol: float = DEFAULT_ABS_TOL) -> bool:
    """Whether a stored value and a recomputed one differ beyond the tolerance.

    Numbers agree when ``|a - b| <= max(rel_tol * max(|a|, |b|), abs_tol)``; true/false values, texts
    and error codes must be equal; a missing stored value always differs.

    >>> values_differ(100.0, 100.000001), values_differ(True, True), values_differ("a", "b")
    (True, False, True)
    """
    if stored is None:
        return True
    num = (int, float)
    if type(stored) in num and type(computed) in num:
        a, b = float(stored), float(computed)
        return not abs(a - b) <= max(rel_tol * max(abs(a), abs(b)), abs_tol)
    if isinstance(stored, bool) or isinstance(computed, bool):
        return not (isinstance(stored, bool) and isinstance(computed, bool) and stored == computed)
    if isinstance(stored, CellError) != isinstance(computed, CellError):
        return True
    return str(stored) != str(computed)


def compare(result: Recalculation, rel_tol: float = DEFAULT_REL_TOL,
            abs_tol: float = DEFAULT_ABS_TOL) -> list[Difference]:
    """Every cell whose stored value differs from the recomputed one, in sheet and cell order."""
    return [
        Difference(sheet, cell, result.stored.get((sheet, cell)), computed)
        for (sheet, cell), computed in result.values.items()
        if values_differ(result.stored.get((sheet, cell)), computed, rel_tol, abs_tol)
    ]


# ------------------------------------------------------------------------------------------ writing


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


#: A formula to rewrite: (the range it becomes an array formula over, or None; its new text, or None).
_Rewrite = tuple[str | None, str | None]


def _cell_xml(prefix: str, attrs: str, inner: str, value: Any, rewrite: _Rewrite | None = None) -> str:
    kind, v = _value_xml(prefix, value)
    attrs = _set_attr(attrs.rstrip(), "t", kind)
    f = _F_RE.search(inner) if inner else None
    ext = (re.search(rf"<{re.escape(prefix)}extLst\b.*?</{re.escape(prefix)}extLst>", inner, re.S)
           if "extLst" in inner else None)
    formula = f.group(0) if f else ""
    if f and rewrite is not None:
        ref, text = rewrite
        array = f' t="array" ref="{ref}"' if ref else ""
        formula = f"<{f.group(1)}f{array}>{escape(text) if text is not None else f.group(3) or ''}</{f.group(1)}f>"
    body = formula + v + (ext.group(0) if ext else "")
    return f"<{prefix}c{attrs}>{body}</{prefix}c>"


def _patch_rows(text: str, prefix: str, values: dict[str, Any], rewrites: dict[str, _Rewrite]) -> str:
    """Rewrite the rows of a sheetData body: set values of existing cells, insert missing ones."""
    by_row: dict[int, dict[int, str]] = {}
    for ref in values:
        r, c = _split_ref(ref)
        by_row.setdefault(r, {})[c] = ref
    out: list[str] = []
    pos = 0
    pending = sorted(by_row)  # row numbers still to place, ascending (one pass: linear in the rows)
    next_pending = 0
    for m in _ROW_RE.finditer(text):
        out.append(text[pos:m.start()])
        pos = m.end()
        try:
            number = int(_attrs(m.group(2))["r"])
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
                 rewrites: dict[str, _Rewrite]) -> str:
    prefix, row_attrs, body = m.group(1), m.group(2), m.group(3) or ""
    pieces: list[str] = []
    pos = 0
    inserted = False
    order = sorted(wanted)  # columns still to place, ascending (one pass over the row)
    k = 0
    for cm in _CELL_RE.finditer(body):
        ref = _cell_ref(cm.group(2))
        col = _split_ref(ref)[1] if ref else None
        if col is not None:
            while k < len(order) and order[k] < col:
                c = order[k]
                k += 1
                if c not in wanted:
                    continue
                pieces.append(body[pos:cm.start()])
                pos = cm.start()
                pieces.append(_cell_xml(prefix, f' r="{wanted.pop(c)}"', "", values[_ref(c, number)]))
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
        pieces.append(_cell_xml(prefix, f' r="{_ref(c, number)}"', "", values[_ref(c, number)]))
        inserted = True
    pieces.append(after)
    if inserted:  # the spans hint may no longer cover the row's cells; it is optional
        row_attrs = _set_attr(row_attrs, "spans", None)
    return f"<{prefix}row{row_attrs}>{''.join(pieces)}</{prefix}row>"


def _ref(col: int, row: int) -> str:
    return f"{_column_letters(col)}{row}"


def _patch_cells(text: str, values: dict[str, Any], rewrites: dict[str, _Rewrite]) -> str | None:
    """Set the values of existing cells in one pass; None when some cell of ``values`` is not in the file."""
    seen: set[str] = set()

    def patch(cm: re.Match[str]) -> str:
        ref = _cell_ref(cm.group(2))
        if ref is None or ref not in values:
            return cm.group(0)
        seen.add(ref)
        return _cell_xml(cm.group(1), cm.group(2), cm.group(3) or "", values[ref], rewrites.get(ref))

    patched = _CELL_RE.sub(patch, text)
    return patched if len(seen) == len(values) else None


def _patch_sheet(text: str, values: dict[str, Any], rewrites: dict[str, _Rewrite]) -> str:
    m = _SHEETDATA_RE.search(text)
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
    :attr:`Recalculation.spills`) is written as an array formula over its range, so that every
    spreadsheet program, and a later ``recalc``, sees the same spilled range; the cells it spills into
    get their values and no formula.
    """
    source, target = Path(source), Path(target)
    check_outputs([(None, target)], [("the workbook", source)])
    _copy_package(source, target, values, {k: (ref, None) for k, ref in (spills or {}).items()})
    return target


def _copy_package(source: Path, target: Path, values: dict[Cell, Any], rewrites: dict[Cell, _Rewrite]) -> None:
    """:func:`write_values`, with the formulas of ``rewrites`` changed (each of those cells in ``values``)."""
    with zipfile.ZipFile(source) as archive:
        sheets = {s.name: s.part for s in _book_sheets(archive)}
        per_part: dict[str, dict[str, Any]] = {}
        for (sheet, cell), value in values.items():
            per_part.setdefault(sheets[sheet], {})[cell] = value
        part_rewrites: dict[str, dict[str, _Rewrite]] = {}
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
