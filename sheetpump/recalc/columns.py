"""Evaluating a formula's tree over a column of cells at once with numpy.

A :class:`Group` holds the formula cells of one sheet that share one tree (:mod:`.formula`: references
as offsets from each cell); a :class:`Column` computes that tree for all of them: a value is a float
array while every cell holds a finite number, a list of cell values (one per cell) as soon as one does
not, or one plain value shared by every cell. Where a vectorised step meets anything but finite numbers
(text, an empty cell, an error, a division by zero) that step is redone cell by cell with the
spreadsheet's rules of :mod:`.cell_rules`, so results and error texts are those of
:meth:`~sheetpump.declarations.Calculation.cell` and of the engine. A cell function of the catalogue
that works value by value takes a whole column in one vectorised call.

>>> book = Book()
>>> book.names, book.index, book.values = ["Duty"], {"DUTY": 0}, [{(2, 1): 100.0, (3, 1): 250.0}]
>>> column = Group(0, ("bin", "*", ("ref", None, (False, 0, False, -1)), ("const", 2.0)))
>>> column.cells = [(2, 2), (3, 2)]
>>> Column(book, column).run()
[200.0, 500.0]
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import numpy as np

from ..catalogue import CATALOGUE
from ..declarations import Calculation
from ..errors import UnsupportedError
from .cell_rules import (
    COMPARATORS,
    abs_or_sqrt,
    aggregate,
    arithmetic,
    catalogue_cell,
    comparison,
    concatenation,
    if_value,
    round_value,
    unary,
)
from .formula import AGGREGATES, references
from .results import CellError

__all__ = ["Book", "Column", "Group"]


class Group:
    """Formula cells of one sheet that share one formula in relative form."""

    __slots__ = ("bbox", "cells", "deps", "node", "sheet")

    def __init__(self, sheet: int, node: tuple) -> None:
        self.sheet, self.node = sheet, node
        self.cells: list[tuple[int, int]] = []
        self.deps: set[int] = set()
        self.bbox = (0, 0, 0, 0)

    @classmethod
    def single(cls, sheet: int, node: tuple, cell: tuple[int, int]) -> Group:
        """A group of the one ``cell`` (row, column)."""
        one = cls(sheet, node)
        one.cells = [cell]
        return one

    def finish(self) -> None:
        rows = [r for r, _ in self.cells]
        cols = [c for _, c in self.cells]
        self.bbox = (min(rows), min(cols), max(rows), max(cols))


class Book:
    """A workbook's sheets and cell values, as the columnar path reads and computes them."""

    def __init__(self) -> None:
        self.names: list[str] = []
        self.index: dict[str, int] = {}  # sheet name, upper case -> number
        self.values: list[dict[tuple[int, int], Any]] = []  # per sheet: inputs, then results
        self.formula_cells: list[list[tuple[int, int]]] = []  # per sheet

    def sheet_number(self, name: str | None, own: int) -> int:
        """The number of the sheet a reference names (None: the formula's ``own`` sheet)."""
        if name is None:
            return own
        number = self.index.get(name.upper())
        if number is None:
            raise UnsupportedError(f"sheet {name}")
        return number


class Column:
    """Evaluates one group's tree for all its cells: a value is a float array (all finite numbers), a
    list of cell values (one per cell), or one plain value shared by every cell."""

    def __init__(self, book: Book, group: Group) -> None:
        self.book, self.group = book, group
        self.cells = group.cells
        self.n = len(group.cells)

    def run(self) -> list[Any]:
        """The value of every cell of the group, in the order of its cells."""
        return self.as_list(self.eval(self.group.node))

    def as_list(self, v: Any) -> list[Any]:
        if isinstance(v, np.ndarray):
            return v.tolist()
        if isinstance(v, list):
            return v
        return [v] * self.n

    def eval(self, node: tuple) -> Any:
        kind = node[0]
        if kind == "const":
            return node[1]
        if kind == "ref":
            return self.ref(node)
        if kind == "bin":
            return self.binary(node[1], self.eval(node[2]), self.eval(node[3]))
        if kind in ("neg", "pos"):
            return self.unary(kind, self.eval(node[1]))
        if kind == "call":
            return self.call(node[1], node[2])
        raise UnsupportedError(kind)  # pragma: no cover - parse keeps ranges inside aggregates

    def ref(self, node: tuple) -> Any:
        sheet = self.book.sheet_number(node[1], self.group.sheet)
        values = self.book.values[sheet]
        rabs, r, cabs, c = node[2]
        if rabs and cabs:
            return values.get((r, c))
        if rabs:
            got = [values.get((r, col + c)) for _, col in self.cells]
        elif cabs:
            got = [values.get((row + r, c)) for row, _ in self.cells]
        else:
            got = [values.get((row + r, col + c)) for row, col in self.cells]
        if all(type(x) is float for x in got):
            arr = np.array(got, dtype=float)
            if np.isfinite(arr).all():
                return arr
        return got

    @staticmethod
    def numeric(v: Any) -> bool:
        return isinstance(v, np.ndarray) or (type(v) is float and math.isfinite(v))

    def binary(self, op: str, a: Any, b: Any) -> Any:
        if self.numeric(a) and self.numeric(b) and (isinstance(a, np.ndarray) or isinstance(b, np.ndarray)):
            with np.errstate(all="ignore"):
                if op == "+":
                    r = np.add(a, b)
                elif op == "-":
                    r = np.subtract(a, b)
                elif op == "*":
                    r = np.multiply(a, b)
                elif op == "/":
                    r = np.divide(a, b) if np.all(b != 0) else None
                elif op == "^":
                    r = np.power(a, b)
                elif op in COMPARATORS:
                    return np.asarray(COMPARATORS[op](a, b)).tolist()
                else:
                    r = None
            if r is not None and np.isfinite(r).all():
                return r
        if op in ("+", "-", "*", "/", "^"):
            rule = arithmetic
        elif op == "&":
            rule = _concat_op
        else:
            rule = comparison
        if not isinstance(a, (list, np.ndarray)) and not isinstance(b, (list, np.ndarray)):
            return rule(op, a, b)
        return [rule(op, x, y) for x, y in zip(self.as_list(a), self.as_list(b), strict=True)]

    def unary(self, kind: str, a: Any) -> Any:
        if isinstance(a, np.ndarray):
            return a if kind == "pos" else -a
        if isinstance(a, list):
            return [unary(kind, x) for x in a]
        return unary(kind, a)

    def call(self, name: str, args: tuple) -> Any:
        if name in AGGREGATES:
            return self.aggregate(name, args)
        values = [self.eval(a) for a in args]
        if name in ("ABS", "SQRT"):
            (a,) = values
            if isinstance(a, np.ndarray):
                with np.errstate(all="ignore"):
                    r = np.abs(a) if name == "ABS" else np.sqrt(a)
                if np.isfinite(r).all():
                    return r
            return self.each(lambda x: abs_or_sqrt(name, x), values)
        if name == "ROUND":
            return self.each(round_value, values)
        if name == "IF":
            cond = values[0]
            if len(values) == 3 and isinstance(cond, np.ndarray) and all(self.numeric(v) for v in values[1:]):
                return np.where(cond != 0, values[1], values[2]).astype(float)
            return self.each(if_value, values)
        return self.catalogue(CATALOGUE[name], values)

    def each(self, func: Callable[..., Any], values: list[Any]) -> Any:
        if not any(isinstance(v, (list, np.ndarray)) for v in values):
            return func(*values)
        columns = [self.as_list(v) for v in values]
        return [func(*row) for row in zip(*columns, strict=True)]

    def catalogue(self, calc: Calculation, values: list[Any]) -> Any:
        vectors = [v for v in values if isinstance(v, (list, np.ndarray))]
        if not vectors:
            return catalogue_cell(calc, values)
        if _elementwise(calc) and not any(isinstance(v, list) for v in values) \
                and not any(isinstance(v, (CellError, bool)) for v in values):
            try:
                out = calc.cell(*values)
            except Exception:  # the cell-by-cell path below decides what to report
                out = None
            if isinstance(out, list) and len(out) == 1 and len(out[0]) == self.n:
                return out[0]
        columns = [self.as_list(v) for v in values]
        return [catalogue_cell(calc, list(row)) for row in zip(*columns, strict=True)]

    def aggregate(self, name: str, args: tuple) -> Any:
        book, group = self.book, self.group
        constant = all(_fixed(a) for a in args)
        if not constant and name in ("MIN", "MAX") and all(a[0] != "range" for a in args):
            fast = self.extreme(name, args)
            if fast is not None:
                return fast
        cells = self.cells[:1] if constant else self.cells
        out = []
        for row, col in cells:
            parts = []
            for a in args:
                if a[0] in ("ref", "range"):
                    values = book.values[book.sheet_number(a[1], group.sheet)]
                    first = a[2]
                    last = a[3] if a[0] == "range" else first
                    r1, c1 = _at(first, row, col)
                    r2, c2 = _at(last, row, col)
                    r1, r2 = min(r1, r2), max(r1, r2)
                    c1, c2 = min(c1, c2), max(c1, c2)
                    parts.append([values.get((r, c)) for r in range(r1, r2 + 1) for c in range(c1, c2 + 1)])
                else:
                    v = Column(book, Group.single(group.sheet, a, (row, col))).eval(a)
                    if isinstance(v, (list, np.ndarray)):  # one cell's column: its one value
                        v = v[0].item() if isinstance(v, np.ndarray) else v[0]
                    if not (type(v) is float or v is None or isinstance(v, CellError)):
                        raise UnsupportedError(f"{name} of a text or TRUE/FALSE value")
                    parts.append([v])
            out.append(aggregate(name, parts))
        return out[0] if constant else out

    def extreme(self, name: str, args: tuple) -> np.ndarray | None:
        """MIN or MAX of single values (references, expressions) for the whole column, when every
        argument is a finite number in every cell; else None (the cell-by-cell path decides).

        Taken in argument order, a later value replacing the kept one only when strictly smaller
        (larger), as :func:`min` and :func:`max` do in :func:`aggregate`.
        """
        values = [self.eval(a) for a in args]
        if not all(isinstance(v, np.ndarray) or (type(v) is float and math.isfinite(v)) for v in values):
            return None
        kept = np.broadcast_to(np.asarray(values[0], dtype=float), (self.n,))
        for v in values[1:]:
            kept = np.where(v < kept if name == "MIN" else v > kept, v, kept)
        return np.array(kept, dtype=float)


def _concat_op(op: str, x: Any, y: Any) -> Any:
    return concatenation(x, y)


def _at(part: tuple[bool, int, bool, int], row: int, col: int) -> tuple[int, int]:
    rabs, r, cabs, c = part
    return (r if rabs else row + r), (c if cabs else col + c)


def _fixed(node: tuple) -> bool:
    """Whether a tree reads only absolute references (so its value is the same in every cell)."""
    return all(ref[2][0] and ref[2][2] and (ref[0] == "ref" or (ref[3][0] and ref[3][2])) for ref in references(node))


_ELEMENTWISE: dict[str, bool] = {}


def _elementwise(calc: Calculation) -> bool:
    """Whether a cell function works value by value, so a column can go in one call.

    A calculation whose example call passes a range (a table of points, a duty cycle) reduces over it
    and is called cell by cell instead.
    """
    known = _ELEMENTWISE.get(calc.name)
    if known is None:
        known = _ELEMENTWISE[calc.name] = not any(isinstance(a, (list, tuple)) for a in calc.example)
    return known
