"""A value of the comparison workbook in its display unit.

Every sheet of the workbook shows its figures in the units the user asked for (``"metric"`` or
``"imperial"``): the unit is :func:`sheetpump.checks.display_unit`'s, the value :func:`show`'s.
"""

from __future__ import annotations

from ...checks import display_unit
from ...units import Kind, from_si

__all__ = ["show"]


def show(value: float | None, kind: Kind, units: str) -> float | None:
    """``value`` [SI] of ``kind`` in its display unit under ``units`` (:func:`display_unit`); None stays None.

    >>> from sheetpump.units import PRESSURE
    >>> show(210e5, PRESSURE, "metric"), round(show(210e5, PRESSURE, "imperial"), 1), show(None, PRESSURE, "metric")
    (210.0, 3045.8, None)
    """
    if value is None:
        return None
    return float(from_si(value, kind, display_unit(units, kind)))
