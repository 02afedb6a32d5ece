"""The spreadsheet's rules for one cell's values, as the ``formulas`` engine applies them.

Each function mirrors the engine's function of the same operator, one cell at a time: an empty cell
(None) reads as 0 (as "" beside a text in a comparison), the first error among the arguments passes
through, a text where a number belongs gives ``#VALUE!``, a division by zero ``#DIV/0!``, a result that
is not finite ``#NUM!``. The column evaluator (:mod:`.columns`) computes finite numbers with numpy and
falls back to these wherever a value is anything else, so results and error texts are the engine's.
Where the engine itself would behave in a way these do not reproduce (a power it does not compute, MIN
over a number written as text, a cell function that raises) they raise
:class:`~sheetpump.errors.UnsupportedError`, and the engine computes the workbook.

>>> arithmetic("/", 1.0, None), comparison("<", "a", "B"), concatenation(2.0, True)
(CellError('#DIV/0!'), True, '2TRUE')
>>> round_value(2.5, 0.0), round_value(-0.125, 2.0), aggregate("MAX", [[None, "x"]])
(3.0, -0.13, 0.0)
"""

from __future__ import annotations

import math
from collections.abc import Callable
from decimal import ROUND_HALF_UP, Decimal
from typing import Any

import numpy as np

from ..declarations import Calculation
from ..errors import UnsupportedError
from .results import CellError

__all__ = [
    "COMPARATORS",
    "DIGITS_LIMIT",
    "MOST_DIGITS",
    "abs_or_sqrt",
    "aggregate",
    "arithmetic",
    "catalogue_cell",
    "comparison",
    "concatenation",
    "if_value",
    "round_beyond",
    "round_value",
    "shown_value",
    "unary",
]

_VALUE = CellError("#VALUE!")
_DIV0 = CellError("#DIV/0!")
_NUM = CellError("#NUM!")


def _first_error(*values: Any) -> CellError | None:
    for v in values:
        if isinstance(v, CellError):
            return v
    return None


def _two_numbers(x: Any, y: Any) -> tuple[float, float] | CellError:
    """Two arguments as numbers (an empty cell as 0); else the first error among them, or ``#VALUE!``."""
    x = 0.0 if x is None else x
    y = 0.0 if y is None else y
    err = _first_error(x, y)
    if err is not None:
        return err
    try:
        return float(x), float(y)
    except (ValueError, TypeError):
        return _VALUE


def _pow(x: float, y: float) -> float:
    try:
        r = x ** y
    except (ZeroDivisionError, OverflowError):
        raise UnsupportedError("a power the engine does not compute") from None
    if type(r) is not float:  # complex: negative number to a fractional power
        raise UnsupportedError("a power of a negative number")
    return r


def arithmetic(op: str, x: Any, y: Any) -> Any:
    """``x op y`` for ``op`` in ``+ - * / ^``: numbers (or texts of numbers, TRUE as 1) to a finite number."""
    numbers = _two_numbers(x, y)
    if isinstance(numbers, CellError):
        return numbers
    fx, fy = numbers
    if op == "+":
        r = fx + fy
    elif op == "-":
        r = fx - fy
    elif op == "*":
        r = fx * fy
    elif op == "/":
        if not fy:
            return _DIV0
        r = fx / fy
    else:
        r = _pow(fx, fy)
    return r if math.isfinite(r) else _NUM


def _type_id(v: Any) -> int:
    if isinstance(v, bool):
        return 2
    if isinstance(v, str):
        return 1
    return 0


#: The comparison of each comparison operator, on plain values or numpy arrays alike.
COMPARATORS: dict[str, Callable[[Any, Any], bool]] = {
    "=": lambda a, b: a == b, "<>": lambda a, b: a != b, "<": lambda a, b: a < b,
    ">": lambda a, b: a > b, "<=": lambda a, b: a <= b, ">=": lambda a, b: a >= b,
}


def comparison(op: str, x: Any, y: Any) -> Any:
    """``x op y`` for a comparison: numbers < texts < TRUE/FALSE, texts without regard to case."""
    err = _first_error(x, y)
    if err is not None:
        return err
    if x is None:
        x = "" if isinstance(y, str) else 0.0
    if y is None:
        y = "" if isinstance(x, str) else 0.0
    tx, ty = _type_id(x), _type_id(y)
    if tx == ty == 1:
        x, y = x.upper(), y.upper()
    return bool(COMPARATORS[op]((tx, x), (ty, y)))


def _text(v: Any) -> str:
    if isinstance(v, bool):
        return str(v).upper()
    if isinstance(v, float) and v.is_integer():
        return str(int(v))  # the engine writes "%d" % v: the same digits
    return str(v)


def concatenation(x: Any, y: Any) -> Any:
    """``x & y``: both as text (a whole number without its ``.0``, TRUE/FALSE in capitals)."""
    x = "" if x is None else x
    y = "" if y is None else y
    err = _first_error(x, y)
    if err is not None:
        return err
    return _text(x) + _text(y)


def unary(op: str, x: Any) -> Any:
    """``-x`` (``op`` "neg") or ``+x`` (``op`` "pos", the value itself)."""
    x = 0.0 if x is None else x
    if isinstance(x, CellError):
        return x
    if op == "pos":
        return x
    try:
        return -float(x)
    except (ValueError, TypeError):
        return _VALUE


def abs_or_sqrt(name: str, x: Any) -> Any:
    """ABS(x) or SQRT(x) (``name``); the square root of a negative number gives ``#NUM!``."""
    x = 0.0 if x is None else x
    if isinstance(x, CellError):
        return x
    try:
        fx = float(x)
    except (ValueError, TypeError):
        return _VALUE
    with np.errstate(all="ignore"):
        r = float(np.abs(fx) if name == "ABS" else np.sqrt(fx))
    return r if math.isfinite(r) else _NUM


#: ROUND's digits past which a double has nothing left to round: LibreOffice 7.4 headless gives x itself
#: at 400 digits and 0 at -400 (checked).
MOST_DIGITS = 308
#: Digits ROUND takes at all: LibreOffice 7.4 refuses 1E20 digits (Err:502, an invalid argument; checked).
DIGITS_LIMIT = 2.0**31


def round_beyond(x: float, d: float) -> float | CellError | None:
    """ROUND(x, d) where the digits leave nothing to compute (None where they do): never ``10**d`` for a
    huge ``d`` (a hostile ``=ROUND(A1, 1E20)`` must not hang the recalculation).

    >>> round_beyond(1.5, 400), round_beyond(1.5, -400), round_beyond(1.5, 1e20), round_beyond(1.5, 2)
    (1.5, 0.0, CellError('#NUM!'), None)
    """
    if not abs(d) < DIGITS_LIMIT:
        return _NUM
    if d > MOST_DIGITS:
        return x
    if d < -MOST_DIGITS:
        return 0.0
    return None


def round_value(x: Any, d: Any) -> Any:
    """ROUND(x, d): to ``d`` decimals, a half away from zero, on the exact decimal value of ``x * 10**d``."""
    numbers = _two_numbers(x, d)
    if isinstance(numbers, CellError):
        return numbers
    fx, fd = numbers
    beyond = round_beyond(fx, fd)
    if beyond is not None:
        return beyond
    try:  # the engine's ROUND: half away from zero on the exact decimal value
        scale = 10 ** int(fd)
        v = float(Decimal(abs(fx * scale)).quantize(0, rounding=ROUND_HALF_UP)) / scale
    except (OverflowError, ArithmeticError, ValueError):
        raise UnsupportedError("ROUND out of range") from None
    r = -v if fx < 0 else v
    return r if math.isfinite(r) else _NUM


def if_value(cond: Any, x: Any, y: Any = False) -> Any:
    """IF(cond, x, y): ``x`` when ``cond`` is true or a non-zero number; a text condition gives ``#VALUE!``."""
    cond = 0.0 if cond is None else cond
    x = 0.0 if x is None else x
    y = 0.0 if y is None else y
    if isinstance(cond, CellError):
        return cond
    if isinstance(cond, str):
        return _VALUE
    return x if cond else y


def aggregate(name: str, parts: list[Any]) -> Any:
    """SUM/MIN/MAX/AVERAGE of range contents (``parts`` holds lists of cell values, in order)."""
    flat = [v for part in parts for v in part]
    err = _first_error(*flat)
    if err is not None:
        return err
    numbers: list[float] = []
    for v in flat:
        tv = type(v)
        if tv is float:
            numbers.append(v)
        elif v is None:
            continue
        elif name == "SUM":  # the engine's SUM turns text into numbers where it can, TRUE is skipped
            if tv is bool:
                if not v:
                    numbers.append(0.0)
            else:
                try:
                    f = float(v)
                except (ValueError, TypeError):
                    continue
                if not math.isnan(f):
                    numbers.append(f)
        elif tv is bool:
            continue
        else:
            try:
                float(v)
            except (ValueError, TypeError):
                continue
            raise UnsupportedError(f"{name} over a number written as text")
    if name == "SUM":
        r = float(np.sum(np.asarray(numbers, dtype=float)))
    elif name == "AVERAGE":
        if not numbers:
            return _DIV0
        r = float(np.mean(numbers))
    else:
        r = (max if name == "MAX" else min)(numbers or [0.0])
    if not math.isfinite(r):
        raise UnsupportedError(f"{name} is not finite")
    return r


def catalogue_cell(calc: Calculation, args: list[Any]) -> Any:
    """One cell of a catalogue function, as the engine calls it (an error argument passes through)."""
    err = _first_error(*args)
    if err is not None:
        return err
    try:
        result = calc.cell(*args)
    except Exception as exc:  # the engine reports the cell: let it
        raise UnsupportedError(f"{calc.name} raised") from exc
    if isinstance(result, (list, np.ndarray)):
        raise UnsupportedError(f"{calc.name} gave a range")
    return result


def shown_value(value: Any) -> Any:
    """What a formula cell shows for a computed value: an empty cell 0, a number that is not finite
    ``#NUM!``, anything but a number, text, TRUE/FALSE or error ``#VALUE!``.

    >>> shown_value(None), shown_value(float("inf")), shown_value("text")
    (0.0, CellError('#NUM!'), 'text')
    """
    if value is None:
        return 0.0  # a formula that points at an empty cell shows 0, as in a spreadsheet
    if type(value) is float:
        return value if math.isfinite(value) else _NUM
    if isinstance(value, (bool, str)):
        return value
    if isinstance(value, (int, float, np.integer, np.floating)):
        f = float(value)
        return f if math.isfinite(f) else _NUM
    return _VALUE
