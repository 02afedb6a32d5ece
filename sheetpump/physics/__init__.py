"""Pure physics: SI numbers or numpy arrays in, SI numbers out. No units, files or spreadsheets.

The modules, each one topic: :mod:`~.validate` (the argument validators), :mod:`~.pump` (flow, power,
torque, efficiencies), :mod:`~.fluid` (viscosity and density of the oil), :mod:`~.drive` (duty-cycle
power and the electric motor), :mod:`~.start` (starting an induction motor), :mod:`~.suction` (the
suction line), and for a measured performance table :mod:`~.table` (its columns and levels),
:mod:`~.measured` (per-point evaluation), :mod:`~.displacement` (derived displacement, the ISO 8426
idea), :mod:`~.wilson` (Wilson's loss model and its fit) and :mod:`~.prediction` (the model of a
table and the ``SP_PREDICT_*`` formulas). Their public names are re-exported here, each module
imported on first use (so ``import sheetpump.physics.pump`` does not pay for the model fit's modules).
"""

from __future__ import annotations

from importlib import import_module
from typing import Any

#: The modules whose public names (their ``__all__``) this package re-exports, in dependency order.
MODULES = ("validate", "pump", "fluid", "drive", "start", "suction", "table", "measured", "displacement",
           "wilson", "prediction")


def __getattr__(name: str) -> Any:
    if name in MODULES:  # ``from sheetpump.physics import pump`` asks for the submodule first
        return import_module(f"{__name__}.{name}")
    for module in MODULES:
        found = import_module(f"{__name__}.{module}")
        if name in found.__all__:
            return getattr(found, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted({n for m in MODULES for n in import_module(f"{__name__}.{m}").__all__} | set(MODULES))
