"""A formula's text as a tree, with each reference written as its offset from the formula's own cell.

The subset the columnar path computes (:mod:`.columnar`): numbers, text in quotes, TRUE/FALSE, cell
references (with ``$``), ranges and references to other sheets of the same workbook; ``+ - * / ^``, unary
``-`` and ``+``, ``&``, the comparisons ``= <> < > <= >=`` and parentheses; SUM, MIN, MAX, AVERAGE (over
ranges), ABS, SQRT, ROUND, IF, and every cell function of :data:`~sheetpump.catalogue.CATALOGUE` (with
single cells or values as arguments). Anything else raises :class:`~sheetpump.errors.UnsupportedError`.

The tree is made of tuples:

* ``("const", value)``: a number (float), a text (str) or TRUE/FALSE (bool);
* ``("ref", sheet, part)`` and ``("range", sheet, first, last)``: ``sheet`` is None for the formula's own
  sheet; a ``part`` is ``(row absolute, row or row offset, column absolute, column or column offset)``;
* ``("bin", operator, left, right)``, ``("neg", operand)``, ``("pos", operand)``;
* ``("call", NAME, arguments)``.

Offsets make one tree serve a whole filled-down column: ``=A2*B2/600`` in C2 and ``=A3*B3/600`` in C3
read the same. :func:`relative_text` finds this from the text alone, so :func:`parse_cached` parses a
column's formula once.

>>> parse('SP_HYDRAULIC_POWER(A2,$B$2)*0.9+Data!C3', 2, 3)[0]
'bin'
>>> parse('A2*2', 2, 3)
('bin', '*', ('ref', None, (False, 0, False, -2)), ('const', 2.0))
>>> parse('1-2-3^-4', 1, 1)  # equal levels group from the left; a unary minus binds before ^
('bin', '-', ('bin', '-', ('const', 1.0), ('const', 2.0)), ('bin', '^', ('const', 3.0), ('neg', ('const', 4.0))))
>>> parse('FROBNICATE(A1)', 1, 1)
Traceback (most recent call last):
...
sheetpump.errors.UnsupportedError: function FROBNICATE
"""

from __future__ import annotations

import re
from typing import Any

from ..catalogue import CATALOGUE
from ..errors import UnsupportedError
from ..workbooks.refs import MAX_COL, MAX_ROW, column_number

__all__ = ["AGGREGATES", "parse", "parse_cached", "references", "relative_text"]

#: The functions that reduce over ranges.
AGGREGATES = {"SUM", "MIN", "MAX", "AVERAGE"}
_SIMPLE = {"ABS", "SQRT", "ROUND", "IF"}
#: How tightly each binary operator binds (its level), as in Excel: comparisons loosest, then ``&``,
#: ``+ -``, ``* /``, ``^``; a unary minus binds tighter still (``-2^2`` is 4).
_BINDING = {"=": 0, "<>": 0, "<": 0, ">": 0, "<=": 0, ">=": 0, "&": 1, "+": 2, "-": 2, "*": 3, "/": 3, "^": 4}

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
_PART_RE = re.compile(r"^(\$?)([A-Za-z]{1,3})(\$?)(\d+)$")


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
        node = self.binary()
        if self.i != len(self.t):
            raise UnsupportedError("unexpected text after the formula")
        return node

    def binary(self, floor: int = 0) -> tuple:
        """Operands joined by the binary operators that bind at least as tightly as level ``floor``.

        Precedence climbing: an operator of level ``n`` takes as its right operand everything that binds
        more tightly (level ``n + 1`` up), so equal levels group from the left (``1-2-3`` is
        ``(1-2)-3``) and ``1+2*3`` is ``1+(2*3)``.
        """
        node = self.unary()
        while (tok := self.peek()) is not None and tok[0] == "op":
            level = _BINDING.get(tok[1])
            if level is None or level < floor:
                break
            self.i += 1
            node = ("bin", tok[1], node, self.binary(level + 1))
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
            if name not in AGGREGATES and name not in _SIMPLE and name not in CATALOGUE:
                raise UnsupportedError(f"function {name}")
            args: list[tuple] = []
            if not self.take_op((")",)):
                while True:
                    args.append(self.binary())
                    if self.take_op((")",)):
                        break
                    if not self.take_op((",",)):
                        raise UnsupportedError("bad argument list")
            return ("call", name, tuple(args))
        if kind == "op" and value == "(":
            node = self.binary()
            if not self.take_op((")",)):
                raise UnsupportedError("unbalanced parentheses")
            return node
        raise UnsupportedError(f"unexpected {value!r}")


def parse(text: str, row0: int, col0: int) -> tuple:
    """The formula ``text`` of the cell at (row0, col0) as a tree with relative references as offsets.

    Raises :class:`~sheetpump.errors.UnsupportedError` for anything outside the subset, and for the
    constructs whose engine semantics the columnar path does not reproduce (a range where one value
    belongs, an aggregate without arguments or of a literal text, a wrong number of arguments).
    """
    node = _Parser(_tokens(text), row0, col0).parse()
    _check(node, top=True)
    return node


#: A cell reference as the tokenizer reads one (``$B$2``, ``c15``), not part of a longer word, a sheet
#: name (``Q1!``) or a function name (``LOG10(``).
_REF_IN_TEXT_RE = re.compile(r"(?<![\w.$])(\$?)([A-Za-z]{1,3})(\$?)(\d+)(?![\w.(!])")


def relative_text(text: str, row0: int, col0: int) -> str | None:
    """The formula with each reference written as its offset from (row0, col0); None if not sure.

    Two formulas with the same relative text have the same tree: outside the references the texts are
    equal, and each reference has the same offsets (or the same absolute row or column). A script that
    writes ``=A2*B2/600``, ``=A3*B3/600`` ... cell by cell thus costs one parse per column. Formulas
    with text in quotes (which may look like a reference) or a reference outside the sheet are parsed
    one by one.

    >>> relative_text('MAX(C2,$D$2)*0.9', 2, 5) == relative_text('MAX(C7,$D$2)*0.9', 7, 5)
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


def parse_cached(text: str, row0: int, col0: int, cache: dict[str, tuple[tuple, str]]) -> tuple[tuple, str]:
    """(tree, its repr) of a formula, parsed once per relative text (:func:`relative_text`)."""
    key = relative_text(text, row0, col0)
    if key is not None:
        known = cache.get(key)
        if known is not None:
            return known
    node = parse(text, row0, col0)
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
        if name in AGGREGATES:
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


def references(node: tuple) -> list[tuple]:
    """The ``ref`` and ``range`` nodes of a tree, left to right.

    >>> references(parse('A1+SUM(B1:B3)', 1, 3))
    [('ref', None, (False, 0, False, -2)), ('range', None, (False, 0, False, -1), (False, 2, False, -1))]
    """
    kind = node[0]
    if kind in ("ref", "range"):
        return [node]
    if kind == "bin":
        return references(node[2]) + references(node[3])
    if kind in ("neg", "pos"):
        return references(node[1])
    if kind == "call":
        return [r for a in node[2] for r in references(a)]
    return []
