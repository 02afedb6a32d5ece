"""The comparison: every candidate pump checked on the same application, with motor, energy and cost.

:func:`compare` runs the checker for each datasheet, then sizes the electric motor for each candidate
(next standard size of the application's motor standard, on RMS power, with the peak inside the motor's
short-time overload capacity; :func:`sheetpump.physics.drive.select_motor`), estimates the electrical
energy per cycle and per year with the motor's full-load efficiency, the energy cost, the heat put into
the oil, and the cost over the application's evaluation period, and ranks the candidates that pass.

Ranking: candidates whose verdict is ``pass`` or ``warn`` are ranked by cost over the evaluation period
(price + energy cost per year × years), ties broken by the worst margin (larger first); a candidate that
fails a rule is not ranked. Where a price is missing, only the energy cost counts and the candidate says so.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

from .checks import FAIL, CheckResult, CheckSettings, check
from .datasheet import Datasheet
from .duty import Application
from .physics import drive
from .physics.pump import PhysicsError

__all__ = ["Candidate", "Comparison", "compare"]

_J_PER_KWH = 3.6e6


@dataclass(frozen=True)
class Candidate:
    """One pump on the application: its check result and the figures of the comparison (SI)."""

    result: CheckResult
    motor: drive.MotorChoice | None
    motor_note: str
    electrical_energy_per_cycle: float  # [J]
    electrical_energy_per_year: float  # [J]
    energy_cost_per_year: float  # currency per year
    heat_to_oil: float  # mean power loss of the pump [W]
    cost_over_period: float | None  # price + energy cost over the evaluation period
    rank: int | None = None
    notes: tuple[str, ...] = ()

    @property
    def datasheet(self) -> Datasheet:
        return self.result.datasheet

    @property
    def flow_margin(self) -> float | None:
        """Margin of the delivered-flow rule (fraction of the required flow)."""
        for f in self.result.findings:
            if f.rule == "flow.delivered":
                return f.margin
        return None


@dataclass(frozen=True)
class Comparison:
    """All candidates on one application, in the order given."""

    application: Application
    candidates: list[Candidate]
    settings: CheckSettings = field(default_factory=CheckSettings)

    @property
    def ranked(self) -> list[Candidate]:
        """The ranked candidates, best first."""
        return sorted((c for c in self.candidates if c.rank is not None), key=lambda c: c.rank or 0)

    @property
    def verdict(self) -> str:
        """``fail`` if any candidate fails, else the worst of the others."""
        verdicts = {c.result.verdict for c in self.candidates}
        for v in (FAIL, "warn"):
            if v in verdicts:
                return v
        return "pass"


def _candidate(result: CheckResult, app: Application) -> Candidate:
    fig = result.drive
    notes: list[str] = []
    try:
        motor = drive.select_motor(fig.rms_power, max(fig.peak_power, fig.rms_power), app.motor_standard)
        motor_note = (f"RMS {motor.rms_load:.0%}, peak {motor.peak_load:.0%} "
                      f"(≤ {motor.overload_factor:.0%} allowed)")
        efficiency = motor.efficiency
    except PhysicsError as exc:
        motor, efficiency = None, math.nan
        motor_note = f"no standard motor: {exc}"
    if motor is not None:
        per_cycle = float(drive.electrical_energy(fig.input_power, fig.duration, efficiency))
    else:
        per_cycle = math.nan
    cycles_per_year = app.cycles_per_hour * app.hours_per_year
    per_year = per_cycle * cycles_per_year
    cost_per_year = per_year / _J_PER_KWH * app.energy_price
    price = result.datasheet.price
    if price is None:
        notes.append("no price on the datasheet: cost over the period is energy only")
    cost = (price or 0.0) + cost_per_year * app.evaluation_years
    return Candidate(result, motor, motor_note, per_cycle, per_year, cost_per_year, fig.mean_power_loss,
                     cost if math.isfinite(cost) else None, notes=tuple(notes))


def compare(datasheets: Sequence[Datasheet], application: Application,
            settings: CheckSettings | None = None) -> Comparison:
    """Check and compare candidate pumps on one application.

    Parameters
    ----------
    datasheets : sequence of Datasheet
        The candidates, in the order they should appear.
    application : Application
        The machine: settings and duty cycle.
    settings : CheckSettings, optional
        Display units and strictness, passed to the checker.

    Returns
    -------
    Comparison
        One :class:`Candidate` per datasheet; ``rank`` set for those that pass (1 = best).

    Examples
    --------
    >>> import numpy as np
    >>> from sheetpump.duty import Duty, Oil
    >>> duty = Duty(duration=np.array([20.0, 10.0]), pressure=np.array([120e5, 200e5]),
    ...             flow=np.array([35 / 60000, 20 / 60000]), speed=np.array([25.0, 25.0]),
    ...             temperature=np.array([323.15, 323.15]), inlet_pressure=np.array([1e5, 1e5]))
    >>> app = Application("invented press", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=220e5,
    ...                   energy_price=0.2, cycles_per_hour=120, hours_per_year=2000)
    >>> a = Datasheet("Invented", "A-28", 28e-6, 8.0, 50.0, 250e5, 280e5, volumetric_efficiency=0.93,
    ...               total_efficiency=0.85, price=400.0)
    >>> result = compare([a], app)
    >>> result.candidates[0].motor.label, result.candidates[0].rank
    ('15 kW', 1)
    """
    settings = settings or CheckSettings()
    results = [check(ds, application, settings) for ds in datasheets]
    candidates = [_candidate(r, application) for r in results]
    passing = [i for i, c in enumerate(candidates)
               if c.result.verdict != FAIL and c.cost_over_period is not None]
    order = sorted(passing, key=lambda i: (candidates[i].cost_over_period,
                                           -(candidates[i].result.worst_margin or 0.0), i))
    ranks = {i: n + 1 for n, i in enumerate(order)}
    ranked = [Candidate(**{**c.__dict__, "rank": ranks.get(i)}) for i, c in enumerate(candidates)]
    return Comparison(application, ranked, settings)
