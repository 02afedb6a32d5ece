"""What the LibreOffice extension's component calls: Calc's arguments in, a cell result out.

Calc hands each argument of an add-in function over as a UNO ``any``: a number, a text, nothing (an
argument left out), or a whole range as a tuple of rows. This module turns those into what every
sheetpump cell takes (a range as a 2-D list, a one-cell range as its value, like the xlwings face),
calls the declaration, and gives back a number, an error text starting with ``#SP!``, or a range result
as a tuple of rows (which the component hands to Calc as an array).

>>> call("SP_GEOMETRIC_FLOW", (16.0, 1450.0, None))
23.2
>>> call("SP_GEOMETRIC_FLOW", (((16.0,), (28.0,)), 1450.0, None))
((23.2,), (40.6,))
>>> call("SP_GEOMETRIC_FLOW", (((16.0, 28.0),), "1450 rpm", None))
((23.2, 40.6),)
>>> call("SP_GEOMETRIC_FLOW", ("16 rpm", 1450.0, None))
"#SP! displacement: 'rpm' is a speed, not a displacement (write e.g. '28 cm^3/rev')"
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..catalogue import CATALOGUE
from ..declarations import ERROR_PREFIX

__all__ = ["call"]


def _value(value: Any) -> Any:
    if type(value) is tuple:  # a range: a tuple of rows
        if len(value) == 1 and len(value[0]) == 1:
            return value[0][0]
        if all(type(v) is float for row in value for v in row):
            return np.array(value, dtype=float)  # numbers only (the usual range): converted at once
        return [list(row) for row in value]  # texts or empty cells: each element is looked at
    return value


def call(name: str, values: tuple[Any, ...]) -> float | str | tuple[tuple[Any, ...], ...]:
    """Evaluate the declared function ``name`` on Calc's argument values (never raises)."""
    calc = CATALOGUE.get(name)
    if calc is None:
        return f"{ERROR_PREFIX}{name} is not a function of this sheetpump: build and install the extension again"
    if tuple in map(type, values):
        values = tuple(_value(v) for v in values)
    out = calc.cell_values(values)
    if type(out) is np.ndarray:  # a range converted at once gives its array back: Calc takes rows of floats
        if out.size == 0 or out.ndim > 2:
            return f"{ERROR_PREFIX}{name}: a range must be a non-empty row, column or block of cells"
        out = (out.reshape(1, -1) if out.ndim == 1 else out).tolist()
    if type(out) is list:
        return tuple(map(tuple, out))
    return out
