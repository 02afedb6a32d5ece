"""What the machine asks: the application settings and its duty cycle, as plain SI data.

A duty is a sequence of stretches, each held for a duration: either the segments of a table or the
samples of a measured time series (each sample held until the next one). Both become the same
:class:`Duty` of numpy arrays, so every check is one vectorised pass, whatever the source.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .errors import Where
from .physics.fluid import MINERAL_OIL_DENSITY_15
from .suction import SuctionLine

__all__ = ["Application", "Duty", "Oil"]


@dataclass(frozen=True)
class Duty:
    """A duty cycle: arrays of equal length, one element per segment (or sample).

    ``wraps`` says the cycle repeats (its end runs into its start), which matters for stretches of
    intermittent pressure that span the end of one cycle and the start of the next.
    """

    duration: np.ndarray  # [s]
    pressure: np.ndarray  # pump outlet pressure above inlet [Pa]
    flow: np.ndarray  # required effective flow [m^3/s]
    speed: np.ndarray  # shaft speed [rev/s]
    temperature: np.ndarray  # oil temperature [K]
    inlet_pressure: np.ndarray  # absolute [Pa]
    names: tuple[str, ...] = ()  # segment names; empty for a time series
    start: np.ndarray | None = None  # start time of each element [s] (time series)
    wraps: bool = True
    source: str = "segments"  # "segments" or "series"
    rows: tuple[Where, ...] = ()  # where each segment was read (one per element, segments only)
    columns: dict[str, str] = field(default_factory=dict)  # signal -> column letter it was read from
    where: Where = field(default_factory=Where)

    def __len__(self) -> int:
        return len(self.duration)

    @property
    def cycle_time(self) -> float:
        """Length of one cycle [s]."""
        return float(np.sum(self.duration))

    def label(self, i: int) -> str:
        """A name for element ``i``: its segment name, or its time range for a series."""
        if self.names:
            return self.names[i]
        t0 = float(self.start[i]) if self.start is not None else float(np.sum(self.duration[:i]))
        return f"t = {t0:g}–{t0 + float(self.duration[i]):g} s"


@dataclass(frozen=True)
class Oil:
    """The hydraulic oil: two kinematic-viscosity points of the Walther relation, and density."""

    nu1: float  # [m^2/s] at t1
    t1: float  # [K]
    nu2: float  # [m^2/s] at t2
    t2: float  # [K]
    density_15: float = MINERAL_OIL_DENSITY_15  # [kg/m^3] at 15 degC
    grade: int | None = None  # ISO 3448 VG, when given that way
    viscosity_index: float | None = None
    name: str = ""


@dataclass(frozen=True)
class Application:
    """The machine: settings that apply to every candidate pump, and the duty cycle."""

    name: str
    duty: Duty
    oil: Oil
    relief_setting: float  # [Pa]
    overshoot: float = 0.1  # relief-valve pressure overshoot to allow [-], e.g. 0.1 for 10 %
    speed_min: float | None = None  # drive speed range [rev/s]; None: the duty's speeds
    speed_max: float | None = None
    rotation: str | None = None  # rotation the drive imposes
    cleanliness: str | None = None  # ISO 4406 code the system achieves
    cycles_per_hour: float = 1.0
    hours_per_year: float = 2000.0
    energy_price: float = 0.0  # per kWh of electrical energy
    currency: str = "EUR"
    motor_standard: str = "IEC"  # "IEC" (kW series) or "NEMA" (hp series)
    flow_margin: float = 0.0  # required surplus of delivered over required flow [-]
    pressure_margin: float = 0.0  # required headroom below each pressure rating [-]
    speed_margin: float = 0.0  # required headroom inside the speed range [-]
    cold_start_temperature: float | None = None  # lowest oil temperature at a start [K]
    evaluation_years: float = 10.0  # period for the cost over life
    paper_size: str = "A4"  # paper the reports print on: "A4" or "Letter"
    suction: SuctionLine | None = None  # the suction line; None: the duty's stated inlet pressures
    motor_starting_torque: float | None = None  # motor's starting torque / rated torque [-]; None: standard's
    defaulted: tuple[str, ...] = ()  # settings not given in the workbook, taken at their defaults
    file: str = ""
    sources: dict[str, Where] = field(default_factory=dict)

    def where(self, name: str) -> Where:
        """Where setting ``name`` was read from."""
        return self.sources.get(name, Where(file=self.file or None, field=name))
