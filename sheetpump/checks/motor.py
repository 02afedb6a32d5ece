"""The drive's figures over the duty (torque, power, RMS and mean power, heat into the oil) and the
motor sized on them: the smallest standard size carrying the RMS load and the peak (IEC 60034-1 duty
types, RMS power; from memory).
"""

from __future__ import annotations

import math

import numpy as np

from ..duty import Application
from ..physics.drive import mean_power, rms_power, select_motor, worst_window_rms
from ..units import PRESSURE
from .context import Context
from .findings import CheckSettings, DriveFigures, MotorSizing

__all__ = ["drive_figures", "size_motor", "sized_motor"]


def drive_figures(ctx: Context) -> DriveFigures:
    """The pump's drive figures per segment and over the cycle, from the efficiencies of the check."""
    duty, est = ctx.duty, ctx.estimate
    hyd = duty.pressure * est.flow
    loss = est.input_power - hyd
    power = est.input_power
    if np.isnan(power).any():
        rms = mean = mean_loss = math.nan
    else:
        use = duty.duration > 0  # drive's RMS wants durations > 0; zero-length segments weigh nothing
        p, t, lo = (power, duty.duration, loss) if use.all() else (power[use], duty.duration[use], loss[use])
        if p.min() < 0:  # a fitted model may dip below zero at a standstill-like point
            p = np.maximum(p, 0.0)
        rms = float(rms_power(p, t))
        mean = float(mean_power(p, t))
        mean_loss = float(np.dot(lo, t) / np.sum(t))
    # The flow a fixed pump delivers beyond what the machine takes goes to tank, and all of it becomes heat
    # in the oil. It leaves the pump at the pump's outlet pressure, which is the duty's pressure: the ratings
    # and the input power are taken there too, so the heat can never exceed the power drawn (first law).
    # Where the surplus goes over the relief valve or a throttle, the pump runs at that pressure, and the
    # duty must say so (then the ratings see it too); where it runs lower, the surplus returns through an
    # unloading or open-centre path at that pressure.
    path = (f"to tank at each segment's pump pressure; over the relief valve where the duty runs at its "
            f"setting of {ctx.show(PRESSURE, ctx.app.relief_setting)}")
    surplus = np.clip(np.nan_to_num(est.flow) - duty.flow, 0.0, None) * duty.pressure
    mean_surplus = float(np.dot(surplus, duty.duration) / ctx.cycle) if ctx.cycle > 0 else math.nan
    return DriveFigures(
        duration=duty.duration, viscosity=ctx.viscosity, volumetric_efficiency=est.volumetric_efficiency,
        total_efficiency=est.total_efficiency, flow=est.flow, torque=est.torque, input_power=power,
        hydraulic_power=hyd, power_loss=loss, peak_torque=float(np.max(est.torque)) if len(duty) else math.nan,
        peak_power=float(np.max(power)) if len(duty) else math.nan, rms_power=rms, mean_power=mean,
        mean_power_loss=mean_loss, energy_per_cycle=float(np.dot(power, duty.duration)), basis=est.basis,
        surplus_heat=surplus, mean_surplus_heat=mean_surplus, surplus_path=path)


def size_motor(fig: DriveFigures, app: Application, settings: CheckSettings) -> MotorSizing:
    """The motor: the smallest standard size carrying the RMS load (over the cycle, or over the worst
    thermal window of a long one) and the peak; with the text of its loads, the RMS it was sized on
    and over what."""
    use = fig.duration > 0
    power = np.maximum(fig.input_power[use], 0.0)  # a fitted model may dip below zero near standstill
    window = settings.thermal_window
    rms = float(worst_window_rms(power, fig.duration[use], window, app.duty.wraps))
    basis = f"over the worst {window / 60:g} min" if app.duty.cycle_time > window else "over the cycle"
    peak = max(fig.peak_power, rms)
    motor = select_motor(rms, peak, app.motor_standard, settings.overload_factor, settings.service_factor)
    sf = f" × service factor {motor.service_factor:g}" if motor.service_factor != 1 else ""
    binds = ("below the smallest size" if motor.binding == "smallest size" else
             f"{motor.binding} bind{'s' if motor.binding != 'RMS and peak' else ''}")
    note = (f"RMS {motor.rms_load:.0%} of the rating{sf} ({basis}), peak {motor.peak_load:.0%} "
            f"(≤ {motor.overload_factor:.0%}); {binds}")
    return motor, note, rms, basis


def sized_motor(fig: DriveFigures, app: Application, settings: CheckSettings) -> MotorSizing | str:
    """:func:`size_motor`, or the reason no motor can be sized."""
    if not (math.isfinite(fig.rms_power) and math.isfinite(fig.peak_power)):
        return "no motor can be sized without the pump's drive power"
    try:
        return size_motor(fig, app, settings)
    except ValueError as exc:
        return f"no standard motor ({exc})"
