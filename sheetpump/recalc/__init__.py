"""Headless recalculation: compute every formula of a workbook, sheetpump's cell functions included.

The public face of the package; its rooms:

* :mod:`.columnar` computes the common subset of formulas a column at a time with numpy (a
  filled-down column of 20,000 cells in one vectorised call): it reads the cells, groups and orders the
  formulas and decides what falls back to the engine; :mod:`.formula` reads a formula into a tree
  (references as offsets from its cell), :mod:`.columns` evaluates a tree over a column with numpy,
  :mod:`.cell_rules` holds the spreadsheet's rules for one cell's values (the engine's arithmetic,
  comparisons, ROUND, IF, SUM/MIN/MAX/AVERAGE, error passing);
* :mod:`.engine` computes everything else with the ``formulas`` package, the correctness reference the
  columnar path is tested against, and reports what cannot be computed (unsupported functions, failing
  functions, circular references, spills without room);
* :mod:`.writer` writes the computed values into a copy of the workbook, beside the formulas;
* :mod:`.results` holds what a recalculation finds and compares it with the stored values
  (:func:`values_differ`); :mod:`.sheets` reads the package for both evaluators.

Cell references and the sheet-XML pieces come from :mod:`sheetpump.workbooks.refs`.

>>> values_differ(1.0, 1.0 + 1e-12), values_differ(1.0, 1.001), values_differ(0.0, 1e-17)
(False, True, False)
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from ..errors import InputError, Where
from .columnar import recalculate_columns
from .engine import recalculate_with_engine, register_functions
from .results import (
    DEFAULT_ABS_TOL,
    DEFAULT_REL_TOL,
    SPILL_PREFIX,
    Cell,
    CellError,
    Difference,
    Problem,
    Recalculation,
    compare,
    values_differ,
)
from .writer import write_values

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


def recalculate(path: str | os.PathLike[str], *, engine: str = "auto") -> Recalculation:
    """Compute every formula of a workbook; never modifies it.

    Parameters
    ----------
    path : str or path-like
        An .xlsx (or .xlsm) workbook.
    engine : {"auto", "formulas"}
        ``"auto"`` computes with the column-at-a-time path of :mod:`sheetpump.recalc.columnar` when
        every formula is in its subset and with the ``formulas`` engine otherwise; ``"formulas"``
        always uses the engine (the reference the columnar path is tested against).

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
        columns = recalculate_columns(path)
        if columns is not None:
            return columns
    return recalculate_with_engine(path)


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
