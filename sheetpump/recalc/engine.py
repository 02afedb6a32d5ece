"""Recalculation by the ``formulas`` package (an Excel formula engine): the correctness reference.

sheetpump adds every :class:`~sheetpump.declarations.Calculation` of :data:`~sheetpump.catalogue.CATALOGUE`
to the engine under its cell-function name, so ``=SP_HYDRAULIC_POWER(A2, B2)`` or
``=SP_HYDRAULIC_POWER("3000 psi", B2, "hp")`` compute exactly as :meth:`Calculation.cell` does. A new
declaration in the catalogue needs nothing here.

Three things the engine does quietly are made loud:

* a function it does not know would give ``#NAME?``: the workbook is scanned first and such a formula is
  reported with its sheet, cell and function name;
* a function that fails while it runs is logged by the engine and its cell left out of the solution:
  every formula cell is checked for a result and a missing one is reported with the reason;
* a circular reference is cut by the engine (never looped on) and reported with its cells;
* a formula in an ordinary cell whose result is a range would keep only its first element: it spills
  instead, as a dynamic array does in Excel 365 (see :func:`recalculate_with_engine`), or, when its
  range is not empty, shows a ``#SPILL!`` text naming the cell in the way
  (:attr:`~sheetpump.recalc.results.Recalculation.blocked`).
"""

from __future__ import annotations

import contextlib
import functools
import logging
import math
import re
import tempfile
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path
from types import SimpleNamespace
from typing import Any

import numpy as np

from ..catalogue import CATALOGUE
from ..declarations import Calculation
from ..errors import InputError, Where
from ..workbooks.refs import MAX_COL, MAX_ROW, cell_name, range_cells, split_ref
from .cell_rules import round_beyond
from .results import SPILL_PREFIX, Cell, CellError, Problem, Recalculation, place
from .sheets import Sheet, scan
from .writer import Rewrite, copy_package

__all__ = ["recalculate_with_engine", "register_functions"]

# Functions handled by the engine's parser itself rather than its function table.
_SYNTAX_FUNCTIONS = {"LAMBDA", "LET", "_XLFN.LAMBDA", "_XLFN.LET"}

_STRING_RE = re.compile(r'"(?:[^"]|"")*"')
_QUOTED_SHEET_RE = re.compile(r"'(?:[^']|'')*'")
_FUNCTION_RE = re.compile(r"(?<![\w.])([A-Za-z_][\w.]*)\s*\(")


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
    table.update(_bounded_rounding())
    return table


def _bounded_rounding() -> dict[str, Any]:
    """The engine's ROUND, ROUNDDOWN and ROUNDUP, answering huge digits as :func:`.cell_rules.round_beyond`
    does instead of computing ``10**d`` (which hangs for ``=ROUND(A1, 1E20)``)."""
    from formulas.functions import math as engine_math
    from formulas.functions import wrap_ufunc
    from formulas.tokens.operand import Error

    def bounded(rounder: Any) -> Any:
        def rounded(x: float, d: float) -> Any:
            beyond = round_beyond(x, d)
            if beyond is None:
                return rounder(x, d)
            return Error.errors[str(beyond)] if isinstance(beyond, CellError) else beyond
        return wrap_ufunc(rounded)

    return {"ROUND": bounded(engine_math.xround),
            "ROUNDDOWN": bounded(functools.partial(engine_math.xround, func=math.floor)),
            "ROUNDUP": bounded(functools.partial(engine_math.xround, func=math.ceil))}


def _functions_used(formula: str) -> list[str]:
    """Names of the functions a formula calls, upper case (string literals and sheet names skipped).

    >>> _functions_used('=IF(A1>0, SP_HYDRAULIC_POWER("3 (psi)", B2), \\'My (2)\\'!C3)')
    ['IF', 'SP_HYDRAULIC_POWER']
    """
    text = _QUOTED_SHEET_RE.sub("''", _STRING_RE.sub('""', formula))
    return [m.group(1).upper() for m in _FUNCTION_RE.finditer(text)]


def _unsupported(sheets: Iterable[Sheet]) -> list[Problem]:
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


def recalculate_with_engine(path: Path) -> Recalculation:
    """Compute every formula of a workbook with the ``formulas`` engine; never modifies it.

    A formula in an ordinary cell whose result is a range spills into the cells below and to the
    right, which must be empty; formulas reading those cells see the spilled values (passes of the
    engine until no spill changes). A spill whose range is not empty is listed in ``blocked``.
    The workbook's existence is checked by :func:`sheetpump.recalc.recalculate`, which calls this.

    Returns
    -------
    Recalculation
        Computed and stored values of the formula cells (and of the cells spilled into), the spills
        and the spills blocked, and the problems found (unsupported functions, failed cells, circular
        references). Problems do not raise here; see :meth:`Recalculation.raise_problems`.

    Raises
    ------
    InputError
        When the file cannot be read as a workbook.
    """
    sheets = scan(path)
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
    _collect(result, sheets, model, solution, index)
    return result


def _collect(result: Recalculation, sheets: list[Sheet], model: Any, solution: Any,
             index: dict[tuple[str, str], Any]) -> None:
    """Put the engine's solution into ``result``: values in sheet and cell order, and the problems."""
    from formulas.excel import ERR_CIRCULAR

    errors = dict(getattr(solution, "_errors", {}) or {})
    circular_nodes = {k for k, v in model.dsp.default_values.items() if v.get("value") is ERR_CIRCULAR}
    circular_cells = []
    pred = model.dsp.dmap.pred
    for sheet in sheets:
        upper = sheet.name.upper()
        covered = {c for a in sheet.arrays.values() for row in range_cells(a) for c in row}
        targets = dict(sheet.arrays)
        targets.update((ref, result.spills.get((sheet.name, ref), ref))
                       for ref in sheet.formulas if ref not in covered)
        for anchor, ref in targets.items():
            key = index.get((upper, ref))
            if key is not None and key in circular_nodes:
                circular_cells.append((sheet.name, anchor))
            elif key is None or key not in solution:
                result.problems.append(Problem(sheet.name, anchor, _failure(key, pred, errors)))
            else:
                _put_range(result, sheet.name, ref, solution[key])
    if circular_cells:
        shown = ", ".join(place(s, c) for s, c in circular_cells[:8])
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
                                key=lambda kv: (order[kv[0][0]], *split_ref(kv[0][1]))))


def _put_range(result: Recalculation, sheet: str, ref: str, value: Any) -> None:
    """The engine's value of the cell or range ``ref`` into ``result.values``, cell by cell."""
    value = value.value if hasattr(value, "value") else value
    grid = np.asarray(value, dtype=object)
    if grid.ndim != 2:
        grid = grid.reshape(1, 1) if grid.size == 1 else grid.reshape(1, -1)
    for i, row in enumerate(range_cells(ref)):
        for j, cell in enumerate(row):
            item = grid[i, j] if i < grid.shape[0] and j < grid.shape[1] else CellError("#N/A")
            result.values[(sheet, cell)] = _plain_value(item)


_SPILL_PASSES = 20  # a chain of spills each fed by the one before settles in one pass per link


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
            rewritten: dict[Cell, Rewrite] = {k: (ref, None) for k, ref in spills.items()}
            rewritten.update((k, (None, "NA()")) for k in blocked)
            copy_package(path, source, dict.fromkeys(rewritten), rewritten)
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


def _settle_spills(sheets: list[Sheet], index: dict[tuple[str, str], Any], shapes: dict[str, tuple[int, ...]],
                   spills: dict[Cell, str], blocked: dict[Cell, Problem]) -> bool:
    """Update ``spills`` and ``blocked`` from the shapes of one pass; whether anything changed.

    Formulas are taken in row order; each spill claims its range, and a spill whose range holds a value,
    a formula, an array formula or an earlier spill is blocked, naming the first such cell.
    """
    changed = False
    for sheet in sheets:
        upper = sheet.name.upper()
        covered = {c for a in sheet.arrays.values() for row in range_cells(a) for c in row}
        claimed: dict[str, str] = {}
        for anchor in sorted(sheet.formulas, key=split_ref):
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
            row0, col0 = split_ref(anchor)
            wanted = f"{anchor}:{cell_name(row0 + rows - 1, col0 + cols - 1)}"
            reason = None
            if row0 + rows - 1 > MAX_ROW or col0 + cols - 1 > MAX_COL:
                reason = "it runs past the edge of the sheet"
            elif anchor in sheet.shared:
                reason = "it is a filled-down (shared) formula: enter the formula in a cell of its own"
            else:
                for cell in (c for row in range_cells(wanted) for c in row if c != anchor):
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
            claimed.update((c, anchor) for row in range_cells(wanted) for c in row)
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
