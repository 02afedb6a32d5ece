"""The catalogue: every calculation sheetpump offers as a cell function, declared once.

Each submodule declares the calculations of one noun of the trade into :data:`CATALOGUE`; each
declaration points at the physics function that holds the formula.
"""

from __future__ import annotations

from ..declarations import Catalogue

#: Every declared calculation, by cell-function name, in declaration order.
CATALOGUE = Catalogue()


def _load() -> None:
    # Every submodule declares into CATALOGUE when imported: pump first, then by name.
    import importlib
    import pkgutil

    names = sorted((m.name for m in pkgutil.iter_modules(__path__)), key=lambda n: (n != "pump", n))
    for name in names:
        importlib.import_module(f"{__name__}.{name}")


_load()

__all__ = ["CATALOGUE"]
