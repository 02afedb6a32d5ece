"""Field sheets (a column of field words, their values and units) and one value with its unit, to SI.

:class:`Fields` locates the rows of a field sheet (the Pump sheet of a datasheet, the Machine sheet of an
application); :func:`convert` turns one value cell and its unit cell into SI (or a text, a choice, a whole
number), with every refusal message of a value and its unit: a true/false value, a date, a text where a
number belongs, a unit of the wrong kind, a share written as a slip of %, a value outside the span
sheetpump reads.

A value cell holds a bare number in the unit of its unit cell (empty unit cell: the kind's default
unit), or a text with its own unit (``"3000 psi"``; a different unit in the unit cell is then an error).
Cells are read by :class:`~sheetpump.workbooks.book.Book` (a formula without its stored value is
evaluated or refused, never read as empty).

Fields are found by the words in the ``field`` column (rows may be moved or sorted), falling back to the
template's defined names (``pump.<field>``, ``machine.<field>``) for a field whose row lost its word. A
defined name never overrules the field column: one pointing at another field's row (left behind by a
script that deleted a row) or broken by a deleted row is ignored, and a field whose row is gone reads as
empty (refused, naming the field, where the field is required).
"""

from __future__ import annotations

import datetime as _dt
import difflib
import math
import re
from collections.abc import Sequence
from typing import Any

from ..codes import cleanliness_text, rotation_word
from ..errors import InputError, Where
from ..units import Kind, check_span, physical_unit, split_number, unit_factor
from .book import Book, header_row
from .refs import column_letter
from .templates import (
    CHOICE,
    COUNT,
    FIELD_HEADER,
    FRACTION,
    INTEGER,
    NAME_PREFIX,
    TEXT,
    Field,
)

__all__ = ["Fields", "cell_text", "convert", "split_value"]

_MAX_ROWS = 20_000  # rows read below the header of a field sheet: one row per field is far smaller


class Fields:
    """The located rows of a field sheet: ``key -> (value cell, unit cell)``."""

    def __init__(self, book: Book, sheet_name: str, fields: Sequence[Field]) -> None:
        self.book = book
        self.sheet = sheet = book.sheet(sheet_name)
        self.fields = {f.key: f for f in fields}
        words = [str(w) for w in FIELD_HEADER[:3]]

        def is_header(row: list[Any]) -> bool:
            cells = [str(c).strip().lower() if c is not None else "" for c in row]
            return all(w in cells for w in words)

        header, cells = header_row(book, sheet, is_header, "'field | value | unit'")
        lower = [str(c).strip().lower() if c is not None else "" for c in cells]
        key_col, value_col, unit_col = (lower.index(w) + 1 for w in words)
        self.cells: dict[str, tuple[str, str]] = {}
        self.notes: dict[str, str] = {}
        seen: dict[str, str] = {}
        if sheet.max_row - header > _MAX_ROWS:  # far more than the fields: refused, never cut unseen
            raise InputError(f"the sheet reaches row {sheet.max_row}: more than {_MAX_ROWS:,} rows below "
                             "its header are not read", Where(book.file, sheet.title),
                             "delete what lies below the fields")
        last = sheet.max_row
        for r, row in enumerate(sheet.iter_rows(min_row=header + 1, max_row=last,
                                                max_col=max(key_col, value_col, unit_col), values_only=True),
                                header + 1):
            key_text = row[key_col - 1]
            if key_text is None or not str(key_text).strip():
                continue
            key = str(key_text).strip().lower().replace(" ", "_")
            key_coord = f"{column_letter(key_col - 1)}{r}"
            value_coord = f"{column_letter(value_col - 1)}{r}"
            unit_coord = f"{column_letter(unit_col - 1)}{r}"
            if key not in self.fields:
                if row[value_col - 1] not in (None, "") and str(row[value_col - 1]).strip():
                    close = difflib.get_close_matches(key, list(self.fields), n=1)
                    raise InputError(f"unknown field {str(key_text).strip()!r}",
                                     book.where(sheet, key_coord),
                                     f"did you mean {close[0]!r}?" if close else "see the template's fields")
                continue  # a section title or a note
            if key in seen:
                raise InputError(f"field {key!r} appears twice (also in {seen[key]})",
                                 book.where(sheet, key_coord, key), "keep one row per field")
            seen[key] = key_coord
            self.cells[key] = (value_coord, unit_coord)
        self.unit_col = unit_col
        # A field whose row lost its word in the field column is found by its defined name, but only
        # where that name still points at such a row: a name left pointing at a row that now holds
        # another field (a row deleted by a script), a section title or a note is ignored, and so is a
        # name a spreadsheet program broke when it deleted the field's row. Column A decides.
        prefix = NAME_PREFIX[sheet_name]
        value_letter = column_letter(value_col - 1)
        taken = {value_coord for value_coord, _ in self.cells.values()}
        for key in self.fields:
            if key in self.cells:
                continue
            target = book.defined(f"{prefix}.{key}")
            if (not target or target[0] != sheet.title or target[1] != value_letter
                    or not header < target[2] <= sheet.max_row):
                continue
            value_coord = f"{value_letter}{target[2]}"
            key_cell = sheet.cell(row=target[2], column=key_col).value
            if value_coord in taken or (key_cell is not None and str(key_cell).strip()):
                continue
            taken.add(value_coord)
            self.cells[key] = (value_coord, f"{column_letter(unit_col - 1)}{target[2]}")

    def where(self, key: str) -> Where:
        if key in self.cells:
            return Where(self.book.file, self.sheet.title, self.cells[key][0], key, self.notes.get(key))
        return Where(self.book.file, self.sheet.title, None, key)

    def raw(self, key: str) -> tuple[Any, Any]:
        if key not in self.cells:
            return None, None
        value_coord, unit_coord = self.cells[key]
        value = self.book.value(self.sheet, value_coord, key)
        unit = self.book.value(self.sheet, unit_coord, key, value_cell=False) if value is not None else None
        return value, unit

    def get(self, key: str) -> Any:
        """The field's value: SI float, text, int, or ``None`` when empty."""
        field = self.fields[key]
        value, unit = self.raw(key)
        where = self.where(key)
        if value is None:
            if field.required:
                what = field.help.rstrip('.').lower()
                raise InputError("required value is missing", where,
                                 f"enter the {what}" if key in self.cells else
                                 f"the sheet has no row {key!r}: add it (field column) with the {what}")
            return None
        unit_where = Where(where.file, where.sheet, self.cells[key][1], key)
        si = convert(field, value, unit, where, unit_where)
        note = _reading_note(field, value, unit)
        if note:
            self.notes[key] = note
        return si

    def sources(self, got: dict[str, Any]) -> dict[str, Where]:
        """Where each field was read; an empty field whose row exists too (the cell to fill)."""
        return {self.fields[k].name: self.where(k) for k, v in got.items() if v is not None or k in self.cells}


def cell_text(value: Any) -> str:
    """A cell's value as a text: a whole float without its ``.0``, other values stripped.

    >>> cell_text(12.0), cell_text(" 18/16/13 ")
    ('12', '18/16/13')
    """
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value).strip()


def _unit_text(unit: Any) -> str:
    return "" if unit is None else cell_text(unit)


def convert(field: Field, value: Any, unit: Any, where: Where, unit_where: Where | None = None) -> Any:
    """One field's cell value (and unit cell) as SI (or text / whole number), checked.

    >>> from sheetpump.workbooks.templates import DATASHEET_FIELDS
    >>> displacement = next(f for f in DATASHEET_FIELDS if f.key == "displacement")
    >>> convert(displacement, 1.2, "in^3/rev", Where())   # 1.2 in³ = 19.66 cm³ (exact inch)
    1.9664...e-05
    """
    unit_where = unit_where or where
    kind = field.kind
    if isinstance(value, bool):
        raise InputError(f"{value!r} is a true/false value, not a {_kind_name(field)}", where)
    if isinstance(value, (_dt.datetime, _dt.date, _dt.time, _dt.timedelta)):
        hint = "format the cell as text and enter the code again" if field.key == "cleanliness" else \
            "format the cell as a number"
        raise InputError(f"the cell holds a date or time, not a {_kind_name(field)}", where, hint)
    if kind == TEXT:
        text = cell_text(value)
        if field.key == "cleanliness":
            text = cleanliness_text(text, where)
        return text
    if kind == CHOICE:
        text = cell_text(value)
        if field.key == "rotation":  # every trade spelling of a direction; a choice's message else
            chosen = rotation_word(text)
        else:
            chosen = next((c for c in field.choices if c.lower() == text.lower()), None)
        if chosen is None:
            raise InputError(f"{text!r} is not one of {', '.join(field.choices)}", where, "use the drop-down")
        return chosen
    number, unit_text = split_value(value, unit, field, where, unit_where)
    if isinstance(value, str) and not _unit_text(unit):
        unit_where = where  # the unit was typed in the value cell: blame that cell, not the empty unit cell
    if kind in (INTEGER, COUNT):
        _unitless(field, unit_text, unit_where)
    if kind == INTEGER:
        if not float(number).is_integer() or number < 1:
            raise InputError(f"{number:g} is not a whole number of at least 1", where)
        si = int(number)
    elif kind == COUNT:
        si = number
    elif kind == FRACTION:
        si = _fraction(field, number, unit_text, where, unit_where)
    else:
        assert isinstance(kind, Kind)
        try:
            factor, offset = unit_factor(unit_text, kind)
        except InputError as exc:
            raise exc.at(**vars(unit_where)) from None
        si = number * factor + offset
    return _checked(field, si, where, f"{number:g} {unit_text}".strip())


# --- value and unit validation (issue: values and units that crash or pass) -------------------------

_NO_UNIT = ("", "-", "1")
_PERCENT = ("%", "percent", "pct")
_CURRENCY = re.compile(r"[A-Za-z]{1,5}|[A-Za-z]{0,3}[$€£¥₹₩₽₺]")  # ISO 4217 code, a sign, or both (US$)


def _unitless(field: Field, unit_text: str, unit_where: Where) -> None:
    """A count takes its fixed label (``1/h``, ``dB(A)``) or nothing; a price a currency, never a unit."""
    text = unit_text.strip()
    if text.lower() in _NO_UNIT or text.lower() in (field.label.lower(), field.key.lower()):
        return
    if field.label == "currency":
        measures = physical_unit(text)
        if measures is None and _CURRENCY.fullmatch(text):
            return  # a currency code or sign: EUR, USD, €, US$
        what = f"is {measures}" if measures else "is not a currency"
        raise InputError(f"unit {text!r} {what}; a price takes a currency", unit_where,
                         "write the currency (e.g. EUR) or leave the unit cell empty")
    if field.label == "dB(A)" and text.replace(" ", "").lower() in ("db", "dba", "db(a)"):
        return
    expected = f"{field.label!r}" if field.label else "no unit"
    raise InputError(f"unit {text!r} where {expected} belongs", unit_where,
                     f"give the value in {field.label}" if field.label else "leave the unit cell empty")


def _fraction(field: Field, number: float, unit_text: str, where: Where, unit_where: Where) -> float:
    """A share in % or as a fraction; a share or efficiency of at most 1 in a % cell is a slip."""
    text = unit_text.strip().lower()
    if text in (*_NO_UNIT, "fraction"):
        return number
    if text not in _PERCENT:
        raise InputError(f"unit {unit_text!r} is not '%' or 'fraction'", unit_where)
    if field.check == "share" and 0 < number <= 1:
        raise InputError(f"{number:g} % is hardly meant: did you mean {number * 100:g} %?", where,
                         f"write {number * 100:g} with unit '%', or {number:g} with unit 'fraction'; "
                         f"for {number:g} % itself write {number / 100:g} with unit 'fraction'")
    return number / 100.0


def _reading_note(field: Field, value: Any, unit: Any) -> str | None:
    """How a number with a unit was read, for the field's source: the default unit, or the unit typed."""
    kind = field.kind
    if not isinstance(kind, Kind) or not kind.default:
        return None
    parts = split_number(value) if isinstance(value, str) else (float(value), "")
    if parts is None:
        return None
    number, unit_text = parts[0], parts[1] or _unit_text(unit)
    if not unit_text:
        return f"read as {kind.default} (the default unit)"
    if unit_factor(unit_text, kind) != unit_factor(kind.default, kind):
        return f"typed as {number:g} {unit_text}"
    return None


def _kind_name(field: Field) -> str:
    return field.kind.name if isinstance(field.kind, Kind) else "number"


def split_value(value: Any, unit: Any, field: Field, where: Where, unit_where: Where) -> tuple[float, str]:
    """A number and its unit from a value cell and a unit cell; a unit in the value text must agree."""
    column_unit = _unit_text(unit)
    if isinstance(value, bool):  # TRUE / FALSE is no quantity (Python would read it as 1 / 0)
        raise InputError(f"{value!r} is a true/false value, not a {_kind_name(field)}", where,
                         "enter a number")
    if isinstance(value, (int, float)):
        number = float(value)
        text_unit = ""
    else:
        text = str(value).strip()
        try:
            parts = split_number(text)
        except InputError as exc:
            raise exc.at(**vars(where)) from None
        if parts is None:
            raise InputError(f"{text!r} is text where a {_kind_name(field)} belongs", where,
                             f"enter a number{' (unit in the unit column)' if field.units else ''}")
        number, text_unit = parts
    if not math.isfinite(number):
        raise InputError(f"{number!r} is not a finite number", where)
    if text_unit:
        if column_unit and not _same_unit(text_unit, column_unit, field):
            raise InputError(f"the value says {text_unit!r} but the unit cell says {column_unit!r}", where,
                             "write the unit in one place only")
        return number, text_unit
    return number, column_unit


def _same_unit(a: str, b: str, field: Field) -> bool:
    if a == b:
        return True
    if isinstance(field.kind, Kind):
        try:
            return unit_factor(a, field.kind) == unit_factor(b, field.kind)
        except InputError:
            return False
    return a.lower() == b.lower()


def _checked(field: Field, si: float, where: Where, shown: str = "") -> float:
    # ``shown``: the value as the user wrote it (the SI value would puzzle: 28 cm³ is 2.8e-05 m³).
    shown = shown or f"{si:g}"
    if not math.isfinite(si):
        raise InputError(f"{shown} is not a finite number", where)
    if field.kind is not None and isinstance(field.kind, Kind) and field.kind.offset and si <= 0:
        raise InputError(f"{shown} is at or below absolute zero", where, "check the temperature and its unit")
    if isinstance(field.kind, Kind):
        try:
            check_span(si, field.kind, shown)
        except InputError as exc:
            raise exc.at(**vars(where)) from None
    elif field.span and not field.span[0] <= si <= field.span[1]:
        lo, hi = field.span
        raise InputError(f"{shown} is outside the range sheetpump reads for {field.key}, {lo:g} to {hi:g}", where,
                         "check the value and its unit")
    if field.check == "positive" and not si > 0:
        raise InputError(f"must be greater than zero, not {shown}", where)
    if field.check == "non_negative" and si < 0:
        raise InputError(f"must not be negative, not {shown}", where)
    if field.kind == FRACTION and si > 1:
        raise InputError(f"{si:.0%} is more than 100 %", where,
                         "write e.g. 10 with unit '%', or 0.1 with unit 'fraction'")
    if field.check == "share" and not 0 < si <= 1:
        raise InputError("must be a share above 0 and at most 100 %", where,
                         "write e.g. 10 with unit '%', or 0.1 with unit 'fraction'")
    return si
