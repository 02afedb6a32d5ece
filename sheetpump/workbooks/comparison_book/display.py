"""The display units of the comparison workbook: the unit a kind of quantity is shown in, and a value in it.

Every sheet of the workbook shows its figures in the units the user asked for (``"metric"`` or
``"imperial"``, :data:`sheetpump.checks.DISPLAY_UNITS`); these two helpers are the one way they do.
"""

from __future__ import annotations

from ...checks import DISPLAY_UNITS
from ...units import Kind, from_si

__all__ = ["display_unit", "show"]


def display_unit(units: str, kind: Kind) -> str:
    """The unit ``kind`` is shown in under the display system ``units`` (``"metric"`` or ``"imperial"``):
    the system's unit for it, else the kind's default unit.

    >>> from sheetpump.units import PRESSURE, VISCOSITY
    >>> display_unit("metric", PRESSURE), display_unit("imperial", PRESSURE), display_unit("imperial", VISCOSITY)
    ('bar', 'psi', 'mm^2/s')
    """
    return DISPLAY_UNITS[units].get(kind, kind.default)


def show(value: float | None, kind: Kind, units: str) -> float | None:
    """``value`` [SI] of ``kind`` in its display unit under ``units`` (:func:`display_unit`); None stays None.

    >>> from sheetpump.units import PRESSURE
    >>> show(210e5, PRESSURE, "metric"), round(show(210e5, PRESSURE, "imperial"), 1), show(None, PRESSURE, "metric")
    (210.0, 3045.8, None)
    """
    if value is None:
        return None
    return float(from_si(value, kind, display_unit(units, kind)))
