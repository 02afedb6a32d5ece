"""The rating checker: one datasheet against one application's duty cycle.

Each rule is a small function over the whole duty at once (numpy arrays, one element per segment or per
sample of a measured series), so a series of a million samples costs a handful of array passes, not a
Python loop. Every rule gives one :class:`Finding` for every pump, always: its stable rule id, severity
(``fail`` / ``warn`` / ``info`` / ``pass``, or ``not checked`` when a value it needs is not stated, with
the reason and the cell to fill), what was measured, the limit, the margin as a fraction of the limit
(of the pump's temperature range for a temperature; positive = inside), the worst segment and how many
segments are outside, and the cell to fix. A rule that matters for the duty (pressure, speed, flow,
inlet, viscosity, temperature, torque) and is not checked makes the pump's verdict at best ``warn``: a
``pass`` means every rating was proven.

The rooms: each rule is a function declared with :func:`~sheetpump.checks.registry.rule` (its id and
text, hence :data:`RULES`) in the module of its subject: :mod:`~sheetpump.checks.speed`,
:mod:`~sheetpump.checks.pressure`, :mod:`~sheetpump.checks.flow`, :mod:`~sheetpump.checks.inlet`,
:mod:`~sheetpump.checks.fluid` (viscosity, temperature, cleanliness), :mod:`~sheetpump.checks.drive`
(torque, cold start, rotation) and :mod:`~sheetpump.checks.efficiency` (what the efficiencies rest on:
``performance.basis``). :mod:`~sheetpump.checks.findings` holds the result
types and the verdict, :mod:`~sheetpump.checks.limits` the limit arithmetic,
:mod:`~sheetpump.checks.context` what every rule reads, :mod:`~sheetpump.checks.motor` the drive figures
and the motor sizing.

Application margins tighten the limits: an upper rating R with a pressure margin m becomes R·(1 − m), a
required flow Q becomes Q·(1 + m), a speed range [a, b] becomes [a·(1 + m), b·(1 − m)]. The limit a
finding reports is the tightened one.

Intermittent pressure: every stretch above the continuous rating is measured as one stretch, however many
consecutive segments or samples it spans; when the cycle repeats (``Duty.wraps``) a stretch that runs off
the end continues at the start. Durations are summed with a cumulative sum, never per sample.

>>> from sheetpump.datasheet import Datasheet
>>> from sheetpump.duty import Application, Duty, Oil
>>> duty = Duty(duration=np.array([10.0, 5.0]), pressure=np.array([150e5, 270e5]),
...             flow=np.array([30 / 60000, 30 / 60000]), speed=np.array([25.0, 25.0]),
...             temperature=np.array([323.15, 323.15]), inlet_pressure=np.array([1e5, 1e5]),
...             names=("press", "hold"))
>>> app = Application("invented press", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=280e5)
>>> ds = Datasheet("Invented", "G28", 28e-6, 8.0, 50.0, 250e5, 300e5, volumetric_efficiency=0.93,
...                total_efficiency=0.85)
>>> result = check(ds, app)
>>> result.verdict, [f.segment for f in result.findings if f.rule == "pressure.continuous"]
('fail', ['hold'])
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import performance, suction
from ..datasheet import Datasheet
from ..duty import Application
from ..errors import InputError, Where
from ..physics.fluid import viscosity_at
from . import drive, efficiency, flow, fluid, inlet, pressure, speed
from .context import DISPLAY_UNITS, Context, display_unit, display_units
from .findings import (
    DUTY_SUBJECTS,
    FAIL,
    INFO,
    NOT_CHECKED,
    PASS,
    WARN,
    CheckResult,
    CheckSettings,
    DriveFigures,
    Finding,
)
from .limits import stretches
from .motor import drive_figures, size_motor, sized_motor
from .registry import NOT_CHECKED_WHEN, RULES

__all__ = [
    "DISPLAY_UNITS",
    "DUTY_SUBJECTS",
    "FAIL",
    "INFO",
    "NOT_CHECKED",
    "NOT_CHECKED_WHEN",
    "PASS",
    "RULES",
    "WARN",
    "CheckResult",
    "CheckSettings",
    "DriveFigures",
    "Finding",
    "check",
    "display_unit",
    "display_units",
    "prepare",
    "size_motor",
    "stretches",
]

#: The rules in the order a check lists their findings (every rule of :data:`RULES` once).
CHECK_ORDER = (
    speed.speed_min, speed.speed_max, speed.speed_min_high_pressure,
    pressure.duty_relief, pressure.pressure_continuous, pressure.intermittent, pressure.intermittent_duration,
    pressure.intermittent_share, pressure.peak, pressure.relief, pressure.relief_stall,
    flow.delivered,
    inlet.inlet_min, inlet.inlet_max, inlet.velocity, inlet.cold_start,
    fluid.viscosity_min, fluid.viscosity_max, fluid.viscosity_cold_start, fluid.temperature_min,
    fluid.temperature_max, fluid.cleanliness,
    drive.torque_max, drive.torque_relief, drive.rotation, efficiency.basis, drive.cold_start_torque,
)


def _validate(app: Application) -> None:
    duty = app.duty
    n = len(duty)
    where = duty.where if (duty.where.file or duty.where.sheet) else Where(file=app.file or None,
                                                                             field="duty")
    if n == 0:
        raise InputError("the duty cycle has no segments", where)
    for name in ("pressure", "flow", "speed", "temperature", "inlet_pressure"):
        arr = getattr(duty, name)
        if np.shape(arr) != (n,):
            raise InputError(f"duty {name} has {np.size(arr)} values for {n} durations", where)
        if not np.isfinite(arr).all():
            i = int(np.flatnonzero(~np.isfinite(arr))[0])
            raise InputError(f"duty {name} is not a number", duty.rows[i] if duty.rows else where)
    bad = ~np.isfinite(duty.duration) | (duty.duration < 0)
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise InputError("a duration must be a finite number >= 0", duty.rows[i] if duty.rows else where)
    if duty.cycle_time <= 0:
        raise InputError("the duty cycle lasts no time", where)
    for name in ("speed", "flow", "pressure"):
        arr = getattr(duty, name)
        if (arr < 0).any():
            i = int(np.flatnonzero(arr < 0)[0])
            raise InputError(f"duty {name} must not be negative", duty.rows[i] if duty.rows else where)


def prepare(application: Application) -> np.ndarray:
    """Validate the application's duty and return the oil's kinematic viscosity at each segment [m²/s].

    What :func:`check` does first for every pump; a caller checking many pumps on one application (a
    series of sizes) does it once and passes the result as ``check(..., viscosity=...)``.
    """
    _validate(application)
    oil = application.oil
    return np.asarray(viscosity_at(application.duty.temperature, oil.nu1, oil.t1, oil.nu2, oil.t2), float)


def check(datasheet: Datasheet, application: Application,
          settings: CheckSettings | None = None, *, viscosity: np.ndarray | None = None,
          estimate: performance.Estimate | None = None) -> CheckResult:
    """Check one pump's datasheet against an application's duty cycle (rules of DESIGN §6).

    Parameters
    ----------
    datasheet : Datasheet
        The pump's ratings, SI.
    application : Application
        The machine's settings and duty cycle, SI.
    settings : CheckSettings, optional
        Display units, strictness, how many segments a finding names.
    viscosity : array, optional
        :func:`prepare`'s result for this application (the duty is then taken as validated).
    estimate : Estimate, optional
        :func:`sheetpump.performance.estimate` of this pump at the duty's points, when already known.

    Returns
    -------
    CheckResult
        One finding per rule that applies, the drive figures and the verdict.

    Raises
    ------
    InputError
        For a duty that cannot be checked (lengths differ, negative duration, no time at all) or a
        code that cannot be read (cleanliness, rotation), naming the cell.

    References
    ----------
    ISO 4391 and ISO 4409 (pump symbols and performance); ISO 4406 (cleanliness codes); ASTM D341
    (viscosity against temperature); IEC 60034-1 (duty types, RMS power; from memory).
    """
    settings = settings or CheckSettings()
    nu = prepare(application) if viscosity is None else viscosity
    duty = application.duty
    oil_density = application.oil.density_15
    # The supplier's test oil is rarely stated: its kinematic viscosities and the duty's are turned into
    # dynamic ones with one density, so the loss model sees the ratio of kinematic viscosities.
    est = estimate if estimate is not None else \
        performance.estimate(datasheet, duty.pressure, duty.speed, nu, oil_density, oil_density)
    line = None
    if application.suction is not None:
        # the pump draws its displacement every turn; the internal leakage returns inside the pump
        line = suction.inlet(application.suction, datasheet.displacement * duty.speed, nu, oil_density)
    ctx = Context(datasheet, application, duty, settings, duty.cycle_time, nu, est, line)
    figures = drive_figures(ctx)
    ctx = dataclasses.replace(ctx, motor=sized_motor(figures, application, settings))
    findings = [rule_function(ctx) for rule_function in CHECK_ORDER]
    return CheckResult(datasheet, application, findings, figures, settings, line, ctx.motor)
