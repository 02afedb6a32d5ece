"""What every rule reads: the pump, the application, the settings and what the check computed once for
all rules (oil viscosity, efficiencies, the suction line's inlet pressure, the motor), with the display
of values in messages and the findings of a rule that cannot judge.

>>> _digits(87000.0), _digits(1.5e-9), _digits(2.5e8)
('87000', '1.5e-09', '2.5e+08')
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from .. import performance
from .. import units as u
from ..datasheet import Datasheet
from ..duty import Application, Duty
from ..errors import Where
from ..physics import fluid
from ..physics.suction import SuctionTerms
from ..units import Kind, from_si, pretty_unit
from .findings import INFO, NOT_CHECKED, CheckSettings, Finding, MotorSizing

__all__ = ["DISPLAY_UNITS", "ColdStart", "Context", "display_unit", "display_units", "not_applicable", "not_checked"]

#: Units a report shows each kind in ("metric" or "imperial"); findings keep SI numbers.
DISPLAY_UNITS: dict[str, dict[Kind, str]] = {
    "metric": {u.PRESSURE: "bar", u.ABS_PRESSURE: "bara", u.SPEED: "rpm", u.FLOW: "L/min", u.POWER: "kW",
               u.TORQUE: "N*m", u.TEMPERATURE: "degC", u.VISCOSITY: "mm^2/s", u.DURATION: "s",
               u.EFFICIENCY: ""},
    "imperial": {u.PRESSURE: "psi", u.ABS_PRESSURE: "psia", u.SPEED: "rpm", u.FLOW: "gpm", u.POWER: "hp",
                 u.TORQUE: "lbf*ft", u.TEMPERATURE: "degF", u.VISCOSITY: "mm^2/s", u.DURATION: "s",
                 u.EFFICIENCY: ""},
}


def display_units(system: str) -> dict[Kind, str]:
    """The unit each kind of quantity is shown in under ``system`` ("metric" or "imperial"; metric else).

    The one lookup of :data:`DISPLAY_UNITS`: messages, reports and workbooks show values through it.
    """
    return DISPLAY_UNITS.get(system, DISPLAY_UNITS["metric"])


def display_unit(system: str, kind: Kind) -> str:
    """The unit ``kind`` is shown in under ``system``: the system's unit for it, else the kind's default.

    >>> from sheetpump.units import PRESSURE, VISCOSITY
    >>> display_unit("metric", PRESSURE), display_unit("imperial", PRESSURE), display_unit("imperial", VISCOSITY)
    ('bar', 'psi', 'mm^2/s')
    """
    return display_units(system).get(kind, kind.default)


@dataclass(frozen=True)
class ColdStart:
    """The cold start: oil temperature [K], its kinematic viscosity [m²/s], and the speed [rev/s] and
    index of the first running segment."""

    temperature: float
    viscosity: float
    speed: float
    index: int


@dataclass(frozen=True)
class Context:
    """One pump against one application: what the rules read.

    ``viscosity`` is the oil's kinematic viscosity per segment [m²/s], ``estimate`` the pump's
    efficiencies at the duty's points, ``line`` the inlet pressure computed from the suction line (None
    without one) and ``motor`` the motor sizing (or why there is none). ``memo`` keeps what several
    rules of one subject share, computed once per check (e.g. the stretches above the continuous rating).
    """

    ds: Datasheet
    app: Application
    duty: Duty
    settings: CheckSettings
    cycle: float  # the duty's cycle time [s]
    viscosity: np.ndarray
    estimate: performance.Estimate
    line: SuctionTerms | None = None
    motor: MotorSizing | str = ""
    memo: dict[str, object] = field(default_factory=dict, compare=False, repr=False)

    def unit(self, kind: Kind | None) -> str:
        """The unit a report shows ``kind`` in ("" for none)."""
        if kind is None:
            return ""
        return display_unit(self.settings.units, kind)

    def show(self, kind: Kind | None, value: float) -> str:
        """A value in the display unit, for messages."""
        if kind is None:
            return f"{value:.4g}"
        if not math.isfinite(value):
            return "unlimited" if value > 0 else str(value)
        unit = self.unit(kind)
        shown = from_si(value, kind, unit) if unit else value
        return f"{_digits(shown)} {pretty_unit(unit)}".strip()

    def label(self, i: int) -> str:
        """The name of segment ``i`` (or its time range)."""
        return self.duty.label(int(i))

    def row(self, i: int) -> Where:
        """The application cell of segment ``i`` (its duty row, or the duty as a whole)."""
        rows = self.duty.rows
        if rows and 0 <= i < len(rows):
            return rows[int(i)]
        return self.duty.where if (self.duty.where.file or self.duty.where.sheet) else \
            Where(file=self.app.file or None, field=f"duty {self.label(i)}")

    def listed(self, bad: np.ndarray) -> tuple[str, ...]:
        """The labels of the first segments marked in ``bad`` (as many as the settings list)."""
        idx = np.flatnonzero(bad)[: self.settings.listed]
        return tuple(self.label(i) for i in idx)

    @cached_property
    def running(self) -> np.ndarray:
        """Which segments turn the pump: a pump standing still is not running below its minimum speed."""
        return self.duty.speed > 0

    @cached_property
    def cold_start(self) -> ColdStart | None:
        """The cold start at the first running segment; None without a cold-start temperature or a
        running segment."""
        app, duty = self.app, self.duty
        running = np.flatnonzero(self.running)
        if app.cold_start_temperature is None or not running.size:
            return None
        i = int(running[0])
        oil = app.oil
        t = app.cold_start_temperature
        nu = float(fluid.viscosity_at(t, oil.nu1, oil.t1, oil.nu2, oil.t2))
        return ColdStart(t, nu, float(duty.speed[i]), i)


def _digits(x: float) -> str:
    """Four significant digits, without an exponent where plain digits read well (87000, not 8.7e+04)."""
    text = f"{x:.4g}"
    if "e" not in text or not 1e-3 <= abs(x) < 1e7:
        return text
    return f"{float(text):f}".rstrip("0").rstrip(".")


def not_checked(ctx: Context, rule: str, reason: str, where: Where, app_where: Where | None = None,
                kind: Kind | None = None, measured: float | str | None = None) -> Finding:
    """A rule that cannot be evaluated: the reason, and the cell to fill."""
    return Finding(rule=rule, severity=NOT_CHECKED, message=f"not checked: {reason}", measured=measured,
                   kind=kind, unit=ctx.unit(kind), where=where, app_where=app_where)


def not_applicable(rule: str, reason: str, where: Where) -> Finding:
    """A rule with nothing to judge for this pump (e.g. no intermittent rating: the continuous rule judges)."""
    return Finding(rule=rule, severity=INFO, message=f"not applicable: {reason}", where=where)
