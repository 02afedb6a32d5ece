"""What a recalculation finds, and comparing it with the stored values.

:class:`Recalculation` holds the computed and stored values of every formula cell, the spills and the
problems; :func:`compare` lists the cells whose stored value differs from the recomputed one by
:func:`values_differ`: two numbers agree when ``|a - b| <= max(rel_tol * max(|a|, |b|), abs_tol)``, with
``rel_tol = 1e-9`` and ``abs_tol = 1e-12`` by default (the floor keeps round-off around zero, e.g.
``1e-17`` against ``0``, from counting). Text, true/false values and error codes must be equal.

>>> values_differ(1.0, 1.0 + 1e-12), values_differ(1.0, 1.001), values_differ(0.0, 1e-17)
(False, True, False)
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import InputError, Where

__all__ = [
    "DEFAULT_ABS_TOL",
    "DEFAULT_REL_TOL",
    "SPILL_PREFIX",
    "Cell",
    "CellError",
    "Difference",
    "Problem",
    "Recalculation",
    "compare",
    "place",
    "values_differ",
]

#: The value of a formula whose result has no room to spill starts with this (then says which cell is
#: in the way); a text, as the project's ``#SP!`` texts are, so every spreadsheet program reads it.
SPILL_PREFIX = "#SPILL! "
#: Default relative tolerance of ``--verify``.
DEFAULT_REL_TOL = 1e-9
#: Default absolute floor of ``--verify`` (differences below it never count).
DEFAULT_ABS_TOL = 1e-12

Cell = tuple[str, str]
class CellError(str):
    """A spreadsheet error value such as ``#DIV/0!`` (kept apart from a text that looks like one)."""

    def __repr__(self) -> str:
        return f"CellError({str(self)!r})"


@dataclass(frozen=True)
class Problem:
    """A formula that could not be computed: where, and why."""

    sheet: str
    cell: str
    message: str

    def __str__(self) -> str:
        return f"{place(self.sheet, self.cell)}: {self.message}"


@dataclass(frozen=True)
class Difference:
    """A formula cell whose stored value differs from the recomputed one."""

    sheet: str
    cell: str
    stored: Any
    computed: Any

    def __str__(self) -> str:
        stored = "(no stored value)" if self.stored is None else _show(self.stored)
        return f"{place(self.sheet, self.cell)}: stored {stored}, recomputed {_show(self.computed)}"


@dataclass
class Recalculation:
    """What :func:`~sheetpump.recalc.recalculate` found.

    ``values`` holds the computed value of every formula cell (and of every cell an array formula
    covers), ``stored`` the value the file held for the same cells (None where it held none),
    ``formulas`` the formula text of each formula cell and ``problems`` what could not be computed.
    """

    path: Path
    values: dict[Cell, Any] = field(default_factory=dict)
    stored: dict[Cell, Any] = field(default_factory=dict)
    formulas: dict[Cell, str] = field(default_factory=dict)
    problems: list[Problem] = field(default_factory=list)
    #: Formulas in ordinary cells whose result is a range, by (sheet, cell): the range they spill over.
    spills: dict[Cell, str] = field(default_factory=dict)
    #: Formulas whose result would spill over cells that are not empty: their cell holds a text starting
    #: with :data:`SPILL_PREFIX` that names the blocking cell, and formulas using it show ``#N/A``.
    blocked: list[Problem] = field(default_factory=list)

    def raise_problems(self, limit: int = 5, *, blocked: bool = False) -> None:
        """Raise one :class:`InputError` that lists the problems (the first ``limit`` of them).

        With ``blocked``, spills without room count as problems too.
        """
        problems = self.problems + (self.blocked if blocked else [])
        if not problems:
            return
        first, rest = problems[0], problems[1:]
        text = first.message
        if rest:
            text += "; also " + "; ".join(str(p) for p in rest[: limit - 1])
            if len(rest) > limit - 1:
                text += f"; and {len(rest) - limit + 1} more"
        raise InputError(text, Where(file=str(self.path), sheet=first.sheet, cell=first.cell))


def place(sheet: str, cell: str) -> str:
    """A cell as ``Sheet!B2``, the way problems and differences name it."""
    return f"{sheet}!{cell}"


def _show(value: Any) -> str:
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return repr(value)
    return repr(str(value)) if not isinstance(value, CellError) else str(value)


# ---------------------------------------------------------------------------------------- comparing


def values_differ(stored: Any, computed: Any, rel_tol: float = DEFAULT_REL_TOL,
                  abs_tol: float = DEFAULT_ABS_TOL) -> bool:
    """Whether a stored value and a recomputed one differ beyond the tolerance.

    Numbers agree when ``|a - b| <= max(rel_tol * max(|a|, |b|), abs_tol)``; true/false values, texts
    and error codes must be equal; a missing stored value always differs.

    >>> values_differ(100.0, 100.000001), values_differ(True, True), values_differ("a", "b")
    (True, False, True)
    """
    if stored is None:
        return True
    num = (int, float)
    if type(stored) in num and type(computed) in num:
        a, b = float(stored), float(computed)
        return not abs(a - b) <= max(rel_tol * max(abs(a), abs(b)), abs_tol)
    if isinstance(stored, bool) or isinstance(computed, bool):
        return not (isinstance(stored, bool) and isinstance(computed, bool) and stored == computed)
    if isinstance(stored, CellError) != isinstance(computed, CellError):
        return True
    return str(stored) != str(computed)


def compare(result: Recalculation, rel_tol: float = DEFAULT_REL_TOL,
            abs_tol: float = DEFAULT_ABS_TOL) -> list[Difference]:
    """Every cell whose stored value differs from the recomputed one, in sheet and cell order."""
    return [
        Difference(sheet, cell, result.stored.get((sheet, cell)), computed)
        for (sheet, cell), computed in result.values.items()
        if values_differ(result.stored.get((sheet, cell)), computed, rel_tol, abs_tol)
    ]

