"""The spreadsheet face: one xlwings cell function per declared calculation.

Point the xlwings add-in at this module (``UDF Modules: sheetpump.cells``) and press *Import Functions*:
every calculation in :data:`sheetpump.catalogue.CATALOGUE` becomes a function of the same name in Excel,
with its help text in the function wizard. The functions here are generated from the declarations, so
they cannot disagree with the function list, the README or the headless recalculation.

Each function takes its arguments positionally (numbers, strings with units such as ``"3000 psi"``, or
ranges, which come in as 2-D lists and give a 2-D result that spills), and an optional last argument
naming the result unit. It never raises into the spreadsheet: bad input gives a text starting with
``#SP!`` that names the argument.

>>> SP_HYDRAULIC_POWER(200, 60)
20.0...
>>> SP_HYDRAULIC_POWER([[200], [100]], 60, "hp")
[[26.8...], [13.4...]]
"""

from __future__ import annotations

import inspect
from collections.abc import Callable
from typing import Any

import xlwings as xw

from .catalogue import CATALOGUE
from .declarations import Calculation

__all__ = sorted(CATALOGUE)

CATEGORY = "sheetpump"


def _unwrap(value: Any) -> Any:
    # xlwings with ndim=2 hands even a single cell over as [[x]]; a 1x1 range is a plain value.
    if isinstance(value, list) and len(value) == 1 and isinstance(value[0], list) and len(value[0]) == 1:
        return value[0][0]
    return value


def cell_function(calc: Calculation) -> Callable[..., Any]:
    """Build the plain Python function for ``calc`` that xlwings registers as a cell function.

    Its signature lists the declared arguments (optional ones default to ``None``, which means "use the
    declared default") followed by ``unit=None``; its docstring is the one-line help.
    """

    cell = calc.cell_values

    def function(*values: Any) -> Any:
        if list in map(type, values):  # checked in C: single numbers pass straight through
            values = tuple(_unwrap(v) for v in values)
        return cell(values)

    params = [
        inspect.Parameter(a.name, inspect.Parameter.POSITIONAL_OR_KEYWORD,
                          default=None if a.default is not None else inspect.Parameter.empty)
        for a in calc.args
    ]
    params.append(inspect.Parameter("unit", inspect.Parameter.POSITIONAL_OR_KEYWORD, default=None))
    function.__signature__ = inspect.Signature(params)  # type: ignore[attr-defined]
    function.__name__ = function.__qualname__ = calc.name
    function.__module__ = __name__
    function.__doc__ = calc.help
    return function


def decorate(function: Callable[..., Any], calc: Calculation,
             func: Callable[..., Any] = xw.func, arg: Callable[..., Any] = xw.arg) -> Callable[..., Any]:
    """Apply xlwings' decorators: category, argument help, 2-D ranges in (so a column stays a column).

    ``func`` and ``arg`` default to xlwings' own; on Linux those are no-ops, and the tests pass in
    xlwings' Windows implementations to check the metadata Excel would get.
    """
    *texts, (unit, unit_doc) = calc.argument_help()
    for name, doc in reversed(texts):
        function = arg(name, ndim=2, doc=doc)(function)
    function = arg(unit, doc=unit_doc)(function)
    return func(category=CATEGORY)(function)


def _build() -> dict[str, Callable[..., Any]]:
    return {name: decorate(cell_function(calc), calc) for name, calc in CATALOGUE.items()}


globals().update(_build())
