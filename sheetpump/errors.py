"""Errors that reach the user, with the place they concern.

Every error a user can cause carries where it happened (file, sheet, cell, field or argument) and, where
it helps, what to do about it, so the command line can print one clear line and a cell can show a short
text.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace


@dataclass
class Where:
    """The place a value came from: file, sheet, cell and the field it fills.

    ``note`` says how the value was read where that is not plain to see (``"read as bar (the default
    unit)"``, ``"typed as 24 rev/s"``).
    """

    file: str | None = None
    sheet: str | None = None
    cell: str | None = None
    field: str | None = None
    note: str | None = None

    def __str__(self) -> str:
        parts = []
        if self.file:
            parts.append(str(self.file))
        if self.sheet and self.cell:
            parts.append(f"{self.sheet}!{self.cell}")
        elif self.sheet:
            parts.append(f"sheet {self.sheet!r}")
        elif self.cell:
            parts.append(self.cell)
        if self.field and self.note:
            parts.append(f"({self.field}; {self.note})")
        elif self.field or self.note:
            parts.append(f"({self.field or self.note})")
        return " ".join(parts)


class SheetpumpError(Exception):
    """Base of every error sheetpump raises on purpose."""


@dataclass
class InputError(SheetpumpError):
    """Bad input: a value, a file or an argument that sheetpump cannot use.

    ``message`` says what is wrong, ``where`` where, ``hint`` what to do.
    """

    message: str
    where: Where = field(default_factory=Where)
    hint: str = ""

    def __post_init__(self) -> None:
        super().__init__(self.message)

    def __str__(self) -> str:
        place = str(self.where)
        text = f"{place}: {self.message}" if place else self.message
        if self.hint:
            text += f" ({self.hint})"
        return text

    def at(self, **where: str | None) -> InputError:
        """Return this error with the missing parts of its place filled in (its note kept).

        >>> e = InputError("must be positive", Where(cell="C5", note="typed as 12.5 psia"))
        >>> str(e.at(file="pump.xlsx", cell="Z9"))
        'pump.xlsx C5 (typed as 12.5 psia): must be positive'
        """
        merged = Where(
            **{k: getattr(self.where, k) or where.get(k) for k in ("file", "sheet", "cell", "field", "note")}
        )
        return InputError(self.message, merged, self.hint)


class PhysicsError(SheetpumpError, ValueError):
    """A physically meaningless argument (negative displacement, efficiency outside (0, 1], ...).

    Raised by the pure physics (:mod:`sheetpump.physics`); ``argument`` names the offending parameter so
    a cell or a message can say which one, ``reason`` says what is wrong with it. Also a ``ValueError``,
    as a bad argument is.
    """

    def __init__(self, argument: str, reason: str) -> None:
        super().__init__(f"{argument} {reason}")
        self.argument = argument
        self.reason = reason


class ModelError(PhysicsError):
    """The table cannot carry the model (too few points, or terms that cannot be separated)."""


def as_input_error(exc: PhysicsError, where: Where | None = None, context: str = "") -> InputError:
    """The user's :class:`InputError` for a physics or model error: the one conversion at the faces.

    The message is the error's own text, ``"argument reason"``, after ``context`` (``"the oil: ..."``)
    where given; the place is ``where`` with its field, when it has none, the argument.

    >>> str(as_input_error(PhysicsError("speed", "must be greater than zero"), Where(file="a.xlsx")))
    'a.xlsx (speed): speed must be greater than zero'
    >>> as_input_error(PhysicsError("vi", "must be positive"), Where(field="--vg"), "the oil").message
    'the oil: vi must be positive'
    """
    place = where if where is not None else Where()
    if not place.field:
        place = replace(place, field=exc.argument)
    return InputError(f"{context}: {exc}" if context else str(exc), place)


class UnsupportedError(Exception):
    """A workbook uses something outside the columnar subset of :mod:`sheetpump.recalc.columnar`.

    Not an error of the user's: the ``formulas`` engine computes such a workbook instead (and reports
    what it cannot compute).
    """
