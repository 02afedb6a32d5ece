"""The comparison: every candidate pump checked on the same application, with motor, energy and cost.

:func:`compare` runs the checker for each datasheet, then sizes the electric motor for each candidate
as practice does: the smallest standard rating of the application's motor standard whose rating (times
the service factor, 1 by default) carries the RMS load, and whose k × rating (k = 1.6 by default)
carries the peak, trying each size in turn and saying which criterion binds
(:func:`sheetpump.physics.drive.select_motor`). The RMS is taken over the cycle, or, for a cycle longer
than the motor's thermal time (a long measured series; 10 min by default), over the worst window of that
time (:func:`sheetpump.physics.drive.worst_window_rms`). How long a peak lasts does not enter: heating
follows the RMS (IEC 60034-1 S6), and the 160 % for 15 s of IEC 60034-1 is a stall test. It then
estimates the electrical energy per cycle and per year at the motor's part-load efficiency
(:func:`sheetpump.physics.drive.motor_input_power`: an oversized motor costs energy), the energy cost,
and the cost over the application's evaluation period, and ranks the candidates that pass.

Ranking: candidates whose verdict is ``pass`` or ``warn`` are ranked by cost over the evaluation period
(price + energy cost per year × years), ties broken by the worst margin (larger first); a candidate that
fails a rule is not ranked. A candidate without a price is ranked after those with one, and says so.

Heat into the oil has one meaning everywhere: the pump's own power loss plus the surplus flow (delivered
beyond what the machine takes) at the pressure it leaves the pump at — each segment's pump pressure (the
duty's pressure; the relief setting, or a throttle's pressure, where the surplus goes over it and the duty
runs there) (:class:`sheetpump.checks.DriveFigures`, ``mean_heat``); a fixed pump at fixed speed has
nowhere else to put it, and the heat never exceeds the power drawn.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from .checks import FAIL, CheckResult, CheckSettings, check, size_motor
from .datasheet import Datasheet
from .duty import Application
from .errors import InputError, PhysicsError, Where, as_input_error
from .physics import drive

__all__ = ["Candidate", "Comparison", "compare", "compare_results"]



@dataclass(frozen=True)
class Candidate:
    """One pump on the application: its check result and the figures of the comparison (SI)."""

    result: CheckResult
    motor: drive.MotorChoice | None
    motor_note: str
    electrical_energy_per_cycle: float  # [J]
    electrical_energy_per_year: float  # [J]
    energy_cost_per_year: float  # currency per year
    cost_over_period: float | None  # price + energy cost over the evaluation period
    motor_rms: float = math.nan  # the RMS load the motor is sized on [W]
    motor_rms_basis: str = "over the cycle"  # or "over the worst 10 min"
    rank: int | None = None
    notes: tuple[str, ...] = ()

    @property
    def datasheet(self) -> Datasheet:
        return self.result.datasheet

    @property
    def pump_heat(self) -> float:
        """The pump's own power loss, time mean [W]."""
        return self.result.drive.mean_power_loss

    @property
    def surplus_heat(self) -> float:
        """The surplus flow to tank at the pressure it crosses (``drive.surplus_path``), time mean [W]."""
        return self.result.drive.mean_surplus_heat

    @property
    def heat_to_oil(self) -> float:
        """Heat into the oil, time mean [W]: pump loss + surplus."""
        return self.result.drive.mean_heat

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


def _candidate(result: CheckResult, app: Application, settings: CheckSettings) -> Candidate:
    fig = result.drive
    notes: list[str] = []
    if result.drive.basis == "stated" and result.datasheet.total_efficiency is None:
        notes.append("no total efficiency stated: torque and power assume no mechanical loss (too low)")
    motor_rms, rms_basis = math.nan, "over the cycle"
    try:
        same = result.application is app and result.settings == settings  # sized for this very case
        sized = result.motor if same and isinstance(result.motor, tuple) else None
        motor, motor_note, motor_rms, rms_basis = sized or size_motor(fig, app, settings)
    except PhysicsError as exc:
        motor = None
        motor_note = f"no standard motor: {exc}"
    running = fig.duration > 0  # a segment of no length takes no energy
    if motor is not None and np.all(np.isfinite(fig.input_power[running])):
        # at the part-load efficiency of the chosen motor: an oversized one draws its constant losses
        shaft = np.maximum(fig.input_power[running], 0.0)
        electrical = drive.motor_input_power(shaft, motor.rated_power, motor.efficiency)
        per_cycle = float(np.dot(electrical, fig.duration[running]))
    else:
        per_cycle = math.nan
    cycles_per_year = app.cycles_per_hour * app.hours_per_year
    per_year = per_cycle * cycles_per_year
    cost_per_year = per_year / drive.J_PER_KWH * app.energy_price
    price = result.datasheet.price
    if price is None:
        notes.append("no price on the datasheet: ranked after the priced candidates")
    cost = (price or 0.0) + cost_per_year * app.evaluation_years
    return Candidate(result, motor, motor_note, per_cycle, per_year, cost_per_year,
                     cost if math.isfinite(cost) else None, motor_rms, rms_basis, notes=tuple(notes))


def _checked(ds: Datasheet, app: Application, settings: CheckSettings) -> CheckResult:
    """The check of one datasheet; an error in it names the datasheet's file."""
    try:
        return check(ds, app, settings)
    except InputError as exc:
        raise exc.at(file=ds.file or None) from None
    except PhysicsError as exc:
        raise as_input_error(exc, Where(file=ds.file or None)) from None


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
        Display units and strictness, passed to the checker; the motor's overload factor, service
        factor and thermal time.

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
    return compare_results([_checked(ds, application, settings) for ds in datasheets], application, settings)


def compare_results(results: Sequence[CheckResult], application: Application,
                    settings: CheckSettings | None = None) -> Comparison:
    """:func:`compare` of pumps already checked on ``application`` (one :class:`CheckResult` each)."""
    settings = settings or CheckSettings()
    candidates = [_candidate(r, application, settings) for r in results]
    passing = [i for i, c in enumerate(candidates)
               if c.result.verdict != FAIL and c.cost_over_period is not None]
    # priced candidates first: a missing price must not make a pump look cheap
    order = sorted(passing, key=lambda i: (candidates[i].datasheet.price is None,
                                           candidates[i].cost_over_period,
                                           -(candidates[i].result.worst_margin or 0.0), i))
    ranks = {i: n + 1 for n, i in enumerate(order)}
    ranked = [Candidate(**{**c.__dict__, "rank": ranks.get(i)}) for i, c in enumerate(candidates)]
    return Comparison(application, ranked, settings)
