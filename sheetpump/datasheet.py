"""What a supplier promises: the datasheet of one fixed-displacement pump, as plain SI data.

A :class:`Datasheet` is filled by the datasheet reader (:mod:`sheetpump.workbooks`) or built in code. Every
field is SI (see the field comments); ``None`` means the datasheet does not state it. ``sources`` maps a
field name to the place it was read from, so a finding can point the user at the cell to fix.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import Where

__all__ = ["Datasheet", "PerformanceTable"]


@dataclass(frozen=True)
class PerformanceTable:
    """A measured or published performance table of one pump.

    Arrays of equal length, one row per point. ``speed`` and ``viscosity`` are per point (a table stated
    "at 1500 rpm and 32 mm²/s" repeats them). Exactly one of ``input_power`` / ``torque`` is usually given.
    """

    pressure: np.ndarray  # [Pa]
    flow: np.ndarray  # effective flow [m^3/s]
    speed: np.ndarray  # [rev/s]
    viscosity: np.ndarray  # kinematic [m^2/s]
    input_power: np.ndarray | None = None  # [W]
    torque: np.ndarray | None = None  # [N*m]
    where: Where = field(default_factory=Where)

    def __len__(self) -> int:
        return len(self.pressure)


@dataclass(frozen=True)
class Datasheet:
    """The ratings and data of one pump, in SI units."""

    supplier: str
    model: str
    displacement: float  # [m^3/rev]
    speed_min: float  # [rev/s]
    speed_max: float  # [rev/s]
    pressure_continuous: float  # [Pa]
    pressure_peak: float  # [Pa]
    source_note: str = ""
    speed_rated: float | None = None  # [rev/s]
    # Some suppliers ask for a higher minimum speed above a stated pressure.
    speed_min_high_pressure: float | None = None  # [rev/s]
    high_pressure_threshold: float | None = None  # [Pa]
    pressure_intermittent: float | None = None  # [Pa]
    intermittent_max_duration: float | None = None  # longest single stretch [s]
    intermittent_max_share: float | None = None  # share of the cycle [-]
    inlet_pressure_min: float | None = None  # absolute [Pa]
    inlet_pressure_max: float | None = None  # absolute [Pa]
    viscosity_min: float | None = None  # continuous range, lower end [m^2/s]
    viscosity_max: float | None = None  # continuous range, upper end [m^2/s]
    viscosity_min_short: float | None = None  # short-term minimum [m^2/s]
    viscosity_max_cold_start: float | None = None  # cold-start maximum [m^2/s]
    temperature_min: float | None = None  # fluid temperature [K]
    temperature_max: float | None = None  # fluid temperature [K]
    rotation: str | None = None  # "clockwise", "counter-clockwise" or "either" (seen from the shaft end)
    cleanliness: str | None = None  # ISO 4406 code the pump needs, e.g. "18/16/13"
    torque_max: float | None = None  # shaft torque limit [N*m]
    volumetric_efficiency: float | None = None  # a single stated value [-]
    total_efficiency: float | None = None  # a single stated value [-]
    teeth: int | None = None  # teeth on one gear (pulsation frequency)
    price: float | None = None  # in the application's currency
    mass: float | None = None  # [kg]
    noise: float | None = None  # sound pressure level [dB(A)]
    starting_torque: float | None = None  # torque to start the pump cold (breakaway) [N*m]
    performance: PerformanceTable | None = None
    file: str = ""
    sources: dict[str, Where] = field(default_factory=dict)

    @property
    def label(self) -> str:
        """``"supplier model"``, as shown in reports."""
        return f"{self.supplier} {self.model}".strip()

    def where(self, name: str) -> Where:
        """Where field ``name`` was read from (file only, if not known)."""
        return self.sources.get(name, Where(file=self.file or None, field=name))
