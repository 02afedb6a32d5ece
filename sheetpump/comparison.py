"""The comparison: every candidate pump checked on the same application, with motor, energy and cost.

:func:`compare` runs the checker for each datasheet, then sizes the electric motor for each candidate
(next standard size of the application's motor standard, on RMS power, with the peak inside the motor's
short-time overload capacity; :func:`sheetpump.physics.drive.select_motor`), estimates the electrical
energy per cycle and per year with the motor's full-load efficiency, the energy cost, the heat put into
the oil, and the cost over the application's evaluation period, and ranks the candidates that pass.

Ranking: candidates whose verdict is ``pass`` or ``warn`` are ranked by cost over the evaluation period
(price + energy cost per year × years), ties broken by the worst margin (larger first); a candidate that
fails a rule is not ranked. A candidate without a price is ranked after those with one, and says so.

Heat into the oil is the pump's own power loss plus the surplus flow (delivered beyond what the machine
takes) throttled over the relief valve or a valve at the segment's pressure: a fixed pump at fixed speed
has nowhere else to put it.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from .checks import FAIL, CheckResult, CheckSettings, DriveFigures, check, stretches
from .datasheet import Datasheet
from .duty import Application
from .errors import InputError
from .physics import drive
from .physics.pump import PhysicsError

__all__ = ["Candidate", "Comparison", "compare", "compare_results"]

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
    throttling_heat: float = 0.0  # mean power of the surplus flow over the relief valve or a throttle [W]
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


#: How long a peak above the motor's rating may last and still count on its short-time overload
#: capacity: IEC 60034-1 allows 60 % excess torque for 15 s (from memory). A longer one sizes on the peak.
PEAK_SECONDS = 15.0


def _select(fig: DriveFigures, app: Application) -> tuple[drive.MotorChoice, str]:
    """The motor: sized on RMS power with the peak inside the short-time overload, unless a stretch above
    the rating lasts longer than :data:`PEAK_SECONDS`, in which case on the peak itself."""
    peak = max(fig.peak_power, fig.rms_power)
    motor = drive.select_motor(fig.rms_power, peak, app.motor_standard)
    power = np.nan_to_num(fig.input_power)
    _, _, length = stretches(power > motor.rated_power, fig.duration, app.duty.wraps)
    longest = float(length.max()) if length.size else 0.0
    if longest > PEAK_SECONDS:
        motor = drive.select_motor(fig.rms_power, peak, app.motor_standard, overload_factor=1.0)
        return motor, (f"RMS {motor.rms_load:.0%}, peak {motor.peak_load:.0%}: sized on the peak, which "
                       f"lasts {longest:g} s (> {PEAK_SECONDS:g} s)")
    return motor, (f"RMS {motor.rms_load:.0%}, peak {motor.peak_load:.0%} "
                   f"(≤ {motor.overload_factor:.0%} allowed for ≤ {PEAK_SECONDS:g} s)")


def _candidate(result: CheckResult, app: Application) -> Candidate:
    fig = result.drive
    notes: list[str] = []
    if result.drive.basis == "stated" and result.datasheet.total_efficiency is None:
        notes.append("no total efficiency stated: torque and power assume no mechanical loss (too low)")
    try:
        motor, motor_note = _select(fig, app)
        efficiency = motor.efficiency
    except PhysicsError as exc:
        motor, efficiency = None, math.nan
        motor_note = f"no standard motor: {exc}"
    running = fig.duration > 0  # a segment of no length takes no energy
    if motor is not None and np.all(np.isfinite(fig.input_power[running])):
        per_cycle = float(drive.electrical_energy(fig.input_power[running], fig.duration[running], efficiency))
    else:
        per_cycle = math.nan
    cycles_per_year = app.cycles_per_hour * app.hours_per_year
    per_year = per_cycle * cycles_per_year
    cost_per_year = per_year / _J_PER_KWH * app.energy_price
    price = result.datasheet.price
    if price is None:
        notes.append("no price on the datasheet: ranked after the priced candidates")
    cost = (price or 0.0) + cost_per_year * app.evaluation_years
    # Heat into the oil: the pump's own loss, and the flow it delivers beyond what the machine takes,
    # which a fixed pump pushes over the relief valve or a throttle at the segment's pressure.
    d = app.duty
    surplus = np.clip(np.nan_to_num(fig.flow) - d.flow, 0.0, None) * d.pressure
    throttled = float(np.sum(surplus * d.duration) / d.cycle_time) if d.cycle_time > 0 else math.nan
    return Candidate(result, motor, motor_note, per_cycle, per_year, cost_per_year, fig.mean_power_loss,
                     cost if math.isfinite(cost) else None, throttling_heat=throttled, notes=tuple(notes))


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
    busy = application.cycles_per_hour * application.duty.cycle_time
    if busy > 3600.0 * (1 + 1e-9):
        raise InputError(f"{application.cycles_per_hour:g} cycles per hour of {application.duty.cycle_time:g} s "
                         f"take {busy / 3600:.2f} hours each hour", application.where("cycles_per_hour"),
                         "check the cycles per hour against the duty's cycle time")
    return compare_results([check(ds, application, settings) for ds in datasheets], application, settings)


def compare_results(results: Sequence[CheckResult], application: Application,
                    settings: CheckSettings | None = None) -> Comparison:
    """:func:`compare` of pumps already checked on ``application`` (one :class:`CheckResult` each)."""
    settings = settings or CheckSettings()
    candidates = [_candidate(r, application) for r in results]
    passing = [i for i, c in enumerate(candidates)
               if c.result.verdict != FAIL and c.cost_over_period is not None]
    # priced candidates first: a missing price must not make a pump look cheap
    order = sorted(passing, key=lambda i: (candidates[i].datasheet.price is None,
                                           candidates[i].cost_over_period,
                                           -(candidates[i].result.worst_margin or 0.0), i))
    ranks = {i: n + 1 for n, i in enumerate(order)}
    ranked = [Candidate(**{**c.__dict__, "rank": ranks.get(i)}) for i, c in enumerate(candidates)]
    return Comparison(application, ranked, settings)
