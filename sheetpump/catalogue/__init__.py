"""The catalogue: every calculation sheetpump offers as a cell function, declared once.

Each submodule declares the calculations of one noun of the trade into :data:`CATALOGUE`; each
declaration points at the physics function that holds the formula.
"""

from __future__ import annotations

from ..calc import Registry

#: Every declared calculation, by cell-function name, in declaration order.
CATALOGUE = Registry()

# Each module declares into CATALOGUE when imported; add new modules here.
from . import pump  # noqa: E402,F401

__all__ = ["CATALOGUE"]
