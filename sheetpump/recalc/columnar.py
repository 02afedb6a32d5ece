"""Recalculation of the common subset of formulas a column at a time with numpy.

:func:`sheetpump.recalc.recalculate` tries this first and falls back to the ``formulas`` engine (the
correctness reference) whenever the workbook uses anything outside the subset. The subset:

* numbers, text in quotes, TRUE/FALSE, cell references (with ``$``), ranges and references to other
  sheets of the same workbook;
* ``+ - * / ^``, unary ``-`` and ``+``, ``&``, the comparisons ``= <> < > <= >=`` and parentheses;
* SUM, MIN, MAX, AVERAGE (over ranges), ABS, SQRT, ROUND, IF, and every cell function of
  :data:`~sheetpump.catalogue.CATALOGUE` (with single cells or values as arguments).

Anything else (another function, a defined name, an array formula, a percent sign, an error literal,
a range where a single value belongs, a circular reference, a number the engine would treat oddly) gives
:data:`None`, and the whole workbook goes to the engine, which also reports problems as before.

How it is fast: the sheet XML is read once with regular expressions (no DTD, so no entity expansion);
formula cells with the same formula in relative form (a shared-formula group, or a filled-down column)
form one group; groups are put in dependency order, and each group is computed for all its cells at once
-- one vectorised call of the physics function for a column of 20,000 cells. Where a vectorised step
meets anything but finite numbers (text, an empty cell, an error, a division by zero) that step is
redone cell by cell with the engine's own rules, so results and error texts are those of
:meth:`Calculation.cell` and of the engine.

>>> _parse('SP_HYDRAULIC_POWER(A2,$B$2)*0.9+Data!C3', 2, 3)[0]
'bin'
>>> _parse('FROBNICATE(A1)', 1, 1)
Traceback (most recent call last):
...
sheetpump.errors.UnsupportedError: function FROBNICATE
"""

from __future__ import annotations

import math
import os
import re
import zipfile
from collections.abc import Callable, Iterator
from decimal import ROUND_HALF_UP, Decimal
from pathlib import Path
from typing import Any

import numpy as np

from ..catalogue import CATALOGUE
from ..declarations import Calculation
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
from .results import CellError, Recalculation
from .sheets import book_sheets, cached_strings, stored_value

__all__ = ["recalculate_columns"]

_VALUE = CellError("#VALUE!")
_DIV0 = CellError("#DIV/0!")
_NUM = CellError("#NUM!")
_AGGREGATES = {"SUM", "MIN", "MAX", "AVERAGE"}
_SIMPLE = {"ABS", "SQRT", "ROUND", "IF"}


# ------------------------------------------------------------------------------------------ parsing

_TOKEN_RE = re.compile(
    r"""\s*(?:
      (?P<str>"(?:[^"]|"")*")
    | (?P<ref>(?:(?P<sheet>'(?:[^']|'')+'|[A-Za-z_][\w.]*)!)?
          (?P<a>\$?[A-Za-z]{1,3}\$?\d+)(?::(?P<b>\$?[A-Za-z]{1,3}\$?\d+))?)(?![\w.(!:])
    | (?P<num>(?:\d+(?:\.\d+)?|\.\d+)(?:[eE][+-]\d+)?)(?![\w.])
    | (?P<func>[A-Za-z_][\w.]*)\s*\(
    | (?P<name>[A-Za-z_][\w.]*)(?![\w.!(])
    | (?P<op><>|<=|>=|[-+*/^&=<>(),])
    )""",
    re.X,
)
_T_ATTR_RE = re.compile(r"""(?:^|\s)t\s*=\s*["'](\w+)["']""")
_PART_RE = re.compile(r"^(\$?)([A-Za-z]{1,3})(\$?)(\d+)$")
_CMP = {"=", "<>", "<", ">", "<=", ">="}


def _tokens(text: str) -> list[tuple[str, Any]]:
    out: list[tuple[str, Any]] = []
    pos, end = 0, len(text.rstrip())
    while pos < end:
        m = _TOKEN_RE.match(text, pos)
        if not m or m.end() == pos:
            raise UnsupportedError(f"cannot read {text[pos:pos + 20]!r}")
        pos = m.end()
        kind = m.lastgroup
        if kind == "ref" or kind in ("sheet", "a", "b"):
            out.append(("ref", (m.group("sheet"), m.group("a"), m.group("b"))))
        elif kind == "str":
            out.append(("str", m.group("str")[1:-1].replace('""', '"')))
        elif kind == "num":
            out.append(("num", float(m.group("num"))))
        elif kind == "func":
            out.append(("func", m.group("func").upper()))
        elif kind == "name":
            out.append(("name", m.group("name").upper()))
        else:
            out.append(("op", m.group("op")))
    return out


def _part(text: str, row0: int, col0: int) -> tuple[bool, int, bool, int]:
    """``"$C5"`` at anchor (row0, col0) -> (row absolute, row or offset, column absolute, column or offset)."""
    m = _PART_RE.match(text)
    assert m is not None
    col = column_number(m.group(2))
    row = int(m.group(4))
    if row > MAX_ROW or col > MAX_COL:
        raise UnsupportedError("reference outside the sheet")
    rabs, cabs = bool(m.group(3)), bool(m.group(1))
    return rabs, row if rabs else row - row0, cabs, col if cabs else col - col0


class _Parser:
    """Recursive descent over the tokens; precedence as in Excel (unary minus binds before ``^``)."""

    def __init__(self, tokens: list[tuple[str, Any]], row0: int, col0: int) -> None:
        self.t, self.i, self.row0, self.col0 = tokens, 0, row0, col0

    def peek(self) -> tuple[str, Any] | None:
        return self.t[self.i] if self.i < len(self.t) else None

    def take_op(self, ops: set[str] | tuple[str, ...]) -> str | None:
        tok = self.peek()
        if tok and tok[0] == "op" and tok[1] in ops:
            self.i += 1
            return tok[1]
        return None

    def parse(self) -> tuple:
        node = self.comparison()
        if self.i != len(self.t):
            raise UnsupportedError("unexpected text after the formula")
        return node

    def comparison(self) -> tuple:
        node = self.concat()
        while (op := self.take_op(_CMP)) is not None:
            node = ("bin", op, node, self.concat())
        return node

    def concat(self) -> tuple:
        node = self.additive()
        while self.take_op(("&",)):
            node = ("bin", "&", node, self.additive())
        return node

    def additive(self) -> tuple:
        node = self.mult()
        while (op := self.take_op(("+", "-"))) is not None:
            node = ("bin", op, node, self.mult())
        return node

    def mult(self) -> tuple:
        node = self.power()
        while (op := self.take_op(("*", "/"))) is not None:
            node = ("bin", op, node, self.power())
        return node

    def power(self) -> tuple:
        node = self.unary()
        while self.take_op(("^",)):
            node = ("bin", "^", node, self.unary())
        return node

    def unary(self) -> tuple:
        op = self.take_op(("-", "+"))
        if op is not None:
            return ("neg" if op == "-" else "pos", self.unary())
        return self.primary()

    def primary(self) -> tuple:
        tok = self.peek()
        if tok is None:
            raise UnsupportedError("formula ends early")
        self.i += 1
        kind, value = tok
        if kind == "num":
            return ("const", value)
        if kind == "str":
            return ("const", value)
        if kind == "name":
            if value in ("TRUE", "FALSE"):
                return ("const", value == "TRUE")
            raise UnsupportedError(f"name {value}")
        if kind == "ref":
            sheet, a, b = value
            if sheet is not None and sheet.startswith("'"):
                sheet = sheet[1:-1].replace("''", "'")
            first = _part(a, self.row0, self.col0)
            if b is None:
                return ("ref", sheet, first)
            return ("range", sheet, first, _part(b, self.row0, self.col0))
        if kind == "func":
            name = value.removeprefix("_XLUDF.")
            if name not in _AGGREGATES and name not in _SIMPLE and name not in CATALOGUE:
                raise UnsupportedError(f"function {name}")
            args: list[tuple] = []
            if not self.take_op((")",)):
                while True:
                    args.append(self.comparison())
                    if self.take_op((")",)):
                        break
                    if not self.take_op((",",)):
                        raise UnsupportedError("bad argument list")
            return ("call", name, tuple(args))
        if kind == "op" and value == "(":
            node = self.comparison()
            if not self.take_op((")",)):
                raise UnsupportedError("unbalanced parentheses")
            return node
        raise UnsupportedError(f"unexpected {value!r}")


def _parse(text: str, row0: int, col0: int) -> tuple:
    """The formula ``text`` of the cell at (row0, col0) as a tree with relative references as offsets."""
    node = _Parser(_tokens(text), row0, col0).parse()
    _check(node, top=True)
    return node


#: A cell reference as the tokenizer reads one (``$B$2``, ``c15``), not part of a longer word, a sheet
#: name (``Q1!``) or a function name (``LOG10(``).
_REF_IN_TEXT_RE = re.compile(r"(?<![\w.$])(\$?)([A-Za-z]{1,3})(\$?)(\d+)(?![\w.(!])")


def _relative_text(text: str, row0: int, col0: int) -> str | None:
    """The formula with each reference written as its offset from (row0, col0); None if not sure.

    Two formulas with the same relative text have the same tree: outside the references the texts are
    equal, and each reference has the same offsets (or the same absolute row or column). A script that
    writes ``=A2*B2/600``, ``=A3*B3/600`` ... cell by cell thus costs one parse per column. Formulas
    with text in quotes (which may look like a reference) or a reference outside the sheet are parsed
    one by one.

    >>> _relative_text('MAX(C2,$D$2)*0.9', 2, 5) == _relative_text('MAX(C7,$D$2)*0.9', 7, 5)
    True
    """
    if '"' in text:
        return None
    pieces = _REF_IN_TEXT_RE.split(text)  # text, then ($, letters, $, digits, text) per reference
    for k in range(1, len(pieces), 5):
        cabs, letters, rabs, digits = pieces[k:k + 4]
        col = column_number(letters)
        row = int(digits)
        if row > MAX_ROW or col > MAX_COL:
            return None
        pieces[k:k + 4] = "\0", f"{rabs}{row if rabs else row - row0}", f"{cabs}{col if cabs else col - col0}", "\0"
    return ",".join(pieces)


def _parse_cached(text: str, row0: int, col0: int, cache: dict[str, tuple[tuple, str]]) -> tuple[tuple, str]:
    """(tree, its repr) of a formula, parsed once per relative text (:func:`_relative_text`)."""
    key = _relative_text(text, row0, col0)
    if key is not None:
        known = cache.get(key)
        if known is not None:
            return known
    node = _parse(text, row0, col0)
    parsed = (node, repr(node))  # repr: TRUE and 1 are equal as tuples, not as formulas
    if key is not None:
        cache[key] = parsed
    return parsed


def _check(node: tuple, top: bool = False, in_aggregate: bool = False) -> None:
    """Reject the constructs whose engine semantics the fast path does not reproduce."""
    kind = node[0]
    if kind == "range" and not in_aggregate:
        raise UnsupportedError("a range where one value belongs")
    if kind == "call":
        name, args = node[1], node[2]
        if name in _AGGREGATES:
            if not args:
                raise UnsupportedError(f"{name} without arguments")
            for arg in args:
                if arg[0] == "const" and type(arg[1]) is not float:
                    raise UnsupportedError(f"{name} with a literal text or TRUE/FALSE")
                _check(arg, in_aggregate=arg[0] in ("range", "ref"))
            return
        want = {"ABS": (1, 1), "SQRT": (1, 1), "ROUND": (2, 2), "IF": (2, 3)}.get(name)
        if want and not want[0] <= len(args) <= want[1]:
            raise UnsupportedError(f"{name} with {len(args)} arguments")
        for arg in args:
            _check(arg)
    elif kind == "bin":
        _check(node[2])
        _check(node[3])
    elif kind in ("neg", "pos"):
        _check(node[1])


# ------------------------------------------------------------------------------ the engine's rules
# Each mirrors the ``formulas`` function of the same operator, one cell at a time; the vectorised
# paths below give the same numbers and fall back to these wherever a value is not a finite number.


def _first_error(*values: Any) -> CellError | None:
    for v in values:
        if isinstance(v, CellError):
            return v
    return None


def _pow(x: float, y: float) -> float:
    try:
        r = x ** y
    except (ZeroDivisionError, OverflowError):
        raise UnsupportedError("a power the engine does not compute") from None
    if type(r) is not float:  # complex: negative number to a fractional power
        raise UnsupportedError("a power of a negative number")
    return r


def _arith(op: str, x: Any, y: Any) -> Any:
    x = 0.0 if x is None else x
    y = 0.0 if y is None else y
    err = _first_error(x, y)
    if err is not None:
        return err
    try:
        fx, fy = float(x), float(y)
    except (ValueError, TypeError):
        return _VALUE
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


_COMPARE: dict[str, Callable[[Any, Any], bool]] = {
    "=": lambda a, b: a == b, "<>": lambda a, b: a != b, "<": lambda a, b: a < b,
    ">": lambda a, b: a > b, "<=": lambda a, b: a <= b, ">=": lambda a, b: a >= b,
}


def _compare(op: str, x: Any, y: Any) -> Any:
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
    return bool(_COMPARE[op]((tx, x), (ty, y)))


def _text(v: Any) -> str:
    if isinstance(v, bool):
        return str(v).upper()
    if isinstance(v, float) and v.is_integer():
        return str(int(v))  # the engine writes "%d" % v: the same digits
    return str(v)


def _concat(x: Any, y: Any) -> Any:
    x = "" if x is None else x
    y = "" if y is None else y
    err = _first_error(x, y)
    if err is not None:
        return err
    return _text(x) + _text(y)


def _unary(op: str, x: Any) -> Any:
    x = 0.0 if x is None else x
    if isinstance(x, CellError):
        return x
    if op == "pos":
        return x
    try:
        return -float(x)
    except (ValueError, TypeError):
        return _VALUE


def _ufunc(name: str, x: Any) -> Any:
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


def _round(x: Any, d: Any) -> Any:
    x = 0.0 if x is None else x
    d = 0.0 if d is None else d
    err = _first_error(x, d)
    if err is not None:
        return err
    try:
        fx, fd = float(x), float(d)
    except (ValueError, TypeError):
        return _VALUE
    try:  # the engine's ROUND: half away from zero on the exact decimal value
        scale = 10 ** int(fd)
        v = float(Decimal(abs(fx * scale)).quantize(0, rounding=ROUND_HALF_UP)) / scale
    except (OverflowError, ArithmeticError, ValueError):
        raise UnsupportedError("ROUND out of range") from None
    r = -v if fx < 0 else v
    return r if math.isfinite(r) else _NUM


def _if(cond: Any, x: Any, y: Any = False) -> Any:
    cond = 0.0 if cond is None else cond
    x = 0.0 if x is None else x
    y = 0.0 if y is None else y
    if isinstance(cond, CellError):
        return cond
    if isinstance(cond, str):
        return _VALUE
    return x if cond else y


def _aggregate(name: str, parts: list[Any]) -> Any:
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


def _calc_cell(calc: Calculation, args: list[Any]) -> Any:
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


# ------------------------------------------------------------------------------------ the workbook


class _Group:
    """Formula cells of one sheet that share one formula in relative form."""

    __slots__ = ("bbox", "cells", "deps", "node", "sheet")

    def __init__(self, sheet: int, node: tuple) -> None:
        self.sheet, self.node = sheet, node
        self.cells: list[tuple[int, int]] = []
        self.deps: set[int] = set()
        self.bbox = (0, 0, 0, 0)

    def finish(self) -> None:
        rows = [r for r, _ in self.cells]
        cols = [c for _, c in self.cells]
        self.bbox = (min(rows), min(cols), max(rows), max(cols))


class _Book:
    def __init__(self) -> None:
        self.names: list[str] = []
        self.index: dict[str, int] = {}  # sheet name, upper case -> number
        self.values: list[dict[tuple[int, int], Any]] = []  # per sheet: inputs, then results
        self.formula_cells: list[list[tuple[int, int]]] = []  # per sheet


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


def _read(path: Path) -> tuple[Recalculation, _Book, list[_Group]]:
    result = Recalculation(path=path)
    book = _Book()
    with zipfile.ZipFile(path) as archive:
        sheets = book_sheets(archive)
        strings_cache: dict[str, list[str]] = {}

        def strings() -> list[str]:
            return cached_strings(archive, strings_cache)

        groups: dict[tuple[int, int, str], _Group] = {}
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
                        parsed = _parse_cached(formula, row, col, parses)
                        shared[(number, si)] = parsed
                        _add(groups, number, parsed, row, col)
                    else:
                        pending.append((number, si, row, col))
                elif kind == "normal":
                    _add(groups, number, _parse_cached(formula, row, col, parses), row, col)
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


def _add(groups: dict[tuple[int, int, str], _Group], sheet: int, parsed: tuple[tuple, str], row: int,
         col: int) -> None:
    node, shape = parsed
    key = (sheet, col, shape)
    group = groups.get(key)
    if group is None:
        group = groups[key] = _Group(sheet, node)
    group.cells.append((row, col))


# ------------------------------------------------------------------------------- dependency order


def _sheet_of(book: _Book, name: str | None, own: int) -> int:
    if name is None:
        return own
    number = book.index.get(name.upper())
    if number is None:
        raise UnsupportedError(f"sheet {name}")
    return number


def _refs(node: tuple) -> list[tuple]:
    kind = node[0]
    if kind in ("ref", "range"):
        return [node]
    if kind == "bin":
        return _refs(node[2]) + _refs(node[3])
    if kind in ("neg", "pos"):
        return _refs(node[1])
    if kind == "call":
        return [r for a in node[2] for r in _refs(a)]
    return []


def _span(part: tuple[bool, int, bool, int], rows: tuple[int, int], cols: tuple[int, int]) -> tuple[int, ...]:
    rabs, r, cabs, c = part
    r1, r2 = (r, r) if rabs else (rows[0] + r, rows[1] + r)
    c1, c2 = (c, c) if cabs else (cols[0] + c, cols[1] + c)
    if r1 < 1 or c1 < 1 or r2 > MAX_ROW or c2 > MAX_COL:
        raise UnsupportedError("a reference moved outside the sheet")
    return r1, c1, r2, c2


def _boxes(book: _Book, group: _Group) -> list[tuple[int, int, int, int, int]]:
    """Boxes (sheet, row1, col1, row2, col2) holding every cell the group reads."""
    b = group.bbox
    rows, cols = (b[0], b[2]), (b[1], b[3])
    out = []
    for ref in _refs(group.node):
        sheet = _sheet_of(book, ref[1], group.sheet)
        a = _span(ref[2], rows, cols)
        z = _span(ref[3], rows, cols) if ref[0] == "range" else a
        out.append((sheet, min(a[0], z[0]), min(a[1], z[1]), max(a[2], z[2]), max(a[3], z[3])))
    return out


def _order(book: _Book, groups: list[_Group]) -> list[_Group] | None:
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


# --------------------------------------------------------------------------------------- evaluating


class _Column:
    """Evaluates one group's tree for all its cells: a value is a float array (all finite numbers), a
    list of cell values (one per cell), or one plain value shared by every cell."""

    def __init__(self, book: _Book, group: _Group) -> None:
        self.book, self.group = book, group
        self.cells = group.cells
        self.n = len(group.cells)

    def run(self) -> list[Any]:
        v = self.eval(self.group.node)
        if isinstance(v, np.ndarray):
            return v.tolist()
        if isinstance(v, list):
            return v
        return [v] * self.n

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
        raise UnsupportedError(kind)  # pragma: no cover - _check keeps ranges inside aggregates

    def ref(self, node: tuple) -> Any:
        sheet = _sheet_of(self.book, node[1], self.group.sheet)
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
                elif op in _CMP:
                    return np.asarray(_COMPARE[op](a, b)).tolist()
                else:
                    r = None
            if r is not None and np.isfinite(r).all():
                return r
        if op in ("+", "-", "*", "/", "^"):
            rule = _arith
        elif op == "&":
            rule = _concat_op
        else:
            rule = _compare
        if not isinstance(a, (list, np.ndarray)) and not isinstance(b, (list, np.ndarray)):
            return rule(op, a, b)
        return [rule(op, x, y) for x, y in zip(self.as_list(a), self.as_list(b), strict=True)]

    def unary(self, kind: str, a: Any) -> Any:
        if isinstance(a, np.ndarray):
            return a if kind == "pos" else -a
        if isinstance(a, list):
            return [_unary(kind, x) for x in a]
        return _unary(kind, a)

    def call(self, name: str, args: tuple) -> Any:
        if name in _AGGREGATES:
            return self.aggregate(name, args)
        values = [self.eval(a) for a in args]
        if name in ("ABS", "SQRT"):
            (a,) = values
            if isinstance(a, np.ndarray):
                with np.errstate(all="ignore"):
                    r = np.abs(a) if name == "ABS" else np.sqrt(a)
                if np.isfinite(r).all():
                    return r
            return self.each(lambda x: _ufunc(name, x), values)
        if name == "ROUND":
            return self.each(_round, values)
        if name == "IF":
            cond = values[0]
            if len(values) == 3 and isinstance(cond, np.ndarray) and all(self.numeric(v) for v in values[1:]):
                return np.where(cond != 0, values[1], values[2]).astype(float)
            return self.each(_if, values)
        return self.catalogue(CATALOGUE[name], values)

    def each(self, func: Callable[..., Any], values: list[Any]) -> Any:
        if not any(isinstance(v, (list, np.ndarray)) for v in values):
            return func(*values)
        columns = [self.as_list(v) for v in values]
        return [func(*row) for row in zip(*columns, strict=True)]

    def catalogue(self, calc: Calculation, values: list[Any]) -> Any:
        vectors = [v for v in values if isinstance(v, (list, np.ndarray))]
        if not vectors:
            return _calc_cell(calc, values)
        if _elementwise(calc) and not any(isinstance(v, list) for v in values) \
                and not any(isinstance(v, (CellError, bool)) for v in values):
            try:
                out = calc.cell(*values)
            except Exception:  # the cell-by-cell path below decides what to report
                out = None
            if isinstance(out, list) and len(out) == 1 and len(out[0]) == self.n:
                return out[0]
        columns = [self.as_list(v) for v in values]
        return [_calc_cell(calc, list(row)) for row in zip(*columns, strict=True)]

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
                    values = book.values[_sheet_of(book, a[1], group.sheet)]
                    first = a[2]
                    last = a[3] if a[0] == "range" else first
                    r1, c1 = _at(first, row, col)
                    r2, c2 = _at(last, row, col)
                    r1, r2 = min(r1, r2), max(r1, r2)
                    c1, c2 = min(c1, c2), max(c1, c2)
                    parts.append([values.get((r, c)) for r in range(r1, r2 + 1) for c in range(c1, c2 + 1)])
                else:
                    v = _Column(book, _single(group, a, row, col)).eval(a)
                    if isinstance(v, (list, np.ndarray)):  # one cell's column: its one value
                        v = v[0].item() if isinstance(v, np.ndarray) else v[0]
                    if not (type(v) is float or v is None or isinstance(v, CellError)):
                        raise UnsupportedError(f"{name} of a text or TRUE/FALSE value")
                    parts.append([v])
            out.append(_aggregate(name, parts))
        return out[0] if constant else out


    def extreme(self, name: str, args: tuple) -> np.ndarray | None:
        """MIN or MAX of single values (references, expressions) for the whole column, when every
        argument is a finite number in every cell; else None (the cell-by-cell path decides).

        Taken in argument order, a later value replacing the kept one only when strictly smaller
        (larger), as :func:`min` and :func:`max` do in :func:`_aggregate`.
        """
        values = [self.eval(a) for a in args]
        if not all(isinstance(v, np.ndarray) or (type(v) is float and math.isfinite(v)) for v in values):
            return None
        kept = np.broadcast_to(np.asarray(values[0], dtype=float), (self.n,))
        for v in values[1:]:
            kept = np.where(v < kept if name == "MIN" else v > kept, v, kept)
        return np.array(kept, dtype=float)


def _concat_op(op: str, x: Any, y: Any) -> Any:
    return _concat(x, y)


def _at(part: tuple[bool, int, bool, int], row: int, col: int) -> tuple[int, int]:
    rabs, r, cabs, c = part
    return (r if rabs else row + r), (c if cabs else col + c)


def _fixed(node: tuple) -> bool:
    """Whether a tree reads only absolute references (so its value is the same in every cell)."""
    return all(ref[2][0] and ref[2][2] and (ref[0] == "ref" or (ref[3][0] and ref[3][2])) for ref in _refs(node))


def _single(group: _Group, node: tuple, row: int, col: int) -> _Group:
    one = _Group(group.sheet, node)
    one.cells = [(row, col)]
    return one


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


# ------------------------------------------------------------------------------------------ driving


def _plain(value: Any) -> Any:
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
                    one = _Group(g.sheet, g.node)
                    one.cells = [cell]
                    singles.append(one)
            order = _order(book, singles)
            if order is None:
                return None  # a real circular reference: the engine reports it
        for group in order:
            values = book.values[group.sheet]
            out = _Column(book, group).run()
            for cell, value in zip(group.cells, out, strict=True):
                # a formula showing an empty cell holds 0 for the formulas that read it, as in the engine
                values[cell] = 0.0 if value is None else value
        computed = {}
        for number, name in enumerate(book.names):
            values = book.values[number]
            for row, col in sorted(book.formula_cells[number]):
                computed[(name, cell_name(row, col))] = _plain(values[(row, col)])
        result.values = computed
        return result
    except (UnsupportedError, InputError, zipfile.BadZipFile, OSError, KeyError, ValueError, UnicodeDecodeError):
        return None
