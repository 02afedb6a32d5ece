"""The drive: the shaft's torque (running, at a stall on the relief valve, at a cold start against the
motor's starting torque), the direction of rotation, and what the pump's efficiencies rest on.

The shaft torque is T = V·Δp / (2π·η_hm). With only a volumetric efficiency stated, η_hm = 1 is assumed:
the torque is then too low, so a pass is not proven.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import performance
from ..codes import rotation as rotation_of
from ..errors import Where
from ..physics.start import locked_rotor_ratio, rated_torque
from ..units import PRESSURE, SPEED, TEMPERATURE, TORQUE, VISCOSITY
from .context import Context, not_checked
from .findings import FAIL, PASS, WARN, Finding
from .limits import bound, margin
from .registry import rule

__all__ = ["cold_start_torque", "rotation", "torque_max", "torque_relief"]


def _no_torque(ctx: Context, rule_id: str) -> Finding | None:
    """The torque rules' finding when the torque cannot be judged (no limit, or no efficiency to compute
    the torque from); None when it can."""
    ds = ctx.ds
    if ds.torque_max is None:
        return not_checked(ctx, rule_id, "the datasheet states no shaft torque limit", ds.where("torque_max"),
                           kind=TORQUE)
    if np.isnan(ctx.estimate.torque).all():
        return not_checked(ctx, rule_id, "the datasheet states no efficiency to compute the shaft torque from",
                           ds.where("total_efficiency"), kind=TORQUE)
    return None


def _unproven(f: Finding, est: performance.Estimate) -> Finding:
    if not est.total_known and f.severity == PASS:
        # only η_v stated: η_hm = 1 was assumed, so the torque is too low and a pass is not proven
        return dataclasses.replace(f, severity=WARN, message=f.message + "; not proven: no total efficiency "
                                   "stated (η_hm = 1 assumed)")
    return f


@rule("torque.max", "shaft torque at or below the shaft's limit",
      not_checked="no shaft torque limit, or no efficiency to compute the torque from")
def torque_max(ctx: Context) -> Finding:
    unknown = _no_torque(ctx, "torque.max")
    if unknown is not None:
        return unknown
    ds = ctx.ds
    f = bound(ctx, "torque.max", ctx.estimate.torque, ds.torque_max, True, TORQUE, ds.where("torque_max"),
              check_nan=True)
    return _unproven(f, ctx.estimate)


@rule("torque.relief", "shaft torque at the relief setting plus overshoot (a stall) at or below the shaft's limit",
      not_checked="no shaft torque limit, or no efficiency to compute the torque from")
def torque_relief(ctx: Context) -> Finding:
    """Shaft torque when a stalled actuator puts the relief setting plus overshoot on the pump:
    T = V·Δp / (2π·η_hm), η_hm at that pressure, at the duty's extreme speeds and viscosities (the
    loss models rise with both, so the corners bound every running segment); common practice is to
    check shaft and coupling there."""
    unknown = _no_torque(ctx, "torque.relief")
    if unknown is not None:
        return unknown
    ds, app, duty, nu = ctx.ds, ctx.app, ctx.duty, ctx.viscosity
    p_stall = app.relief_setting * (1 + app.overshoot)
    running = ctx.running
    n = duty.speed[running] if running.any() else duty.speed
    v = nu[running] if running.any() else nu
    speeds = np.array([n.min(), n.max(), n.min(), n.max()])
    visc = np.array([v.min(), v.min(), v.max(), v.max()])
    rho = app.oil.density_15
    est = performance.estimate(ds, np.full(4, p_stall), speeds, visc, rho, rho)
    torque = est.torque
    if np.isnan(torque).all():
        return not_checked(ctx, "torque.relief", "the datasheet states no efficiency to compute the shaft "
                           "torque from", ds.where("total_efficiency"), kind=TORQUE)
    i = int(np.nanargmax(torque))
    worst = float(torque[i])
    limit = float(ds.torque_max)
    ok = worst <= limit
    text = (f"{ctx.show(TORQUE, worst)} at the relief setting {ctx.show(PRESSURE, app.relief_setting)} + "
            f"{app.overshoot:.0%} overshoot = {ctx.show(PRESSURE, p_stall)} (η_hm "
            f"{float(est.hydromechanical_efficiency[i]):.4g} at {ctx.show(SPEED, float(speeds[i]))}, "
            f"{ctx.show(VISCOSITY, float(visc[i]))}), {'within' if ok else 'above'} the shaft's limit "
            f"{ctx.show(TORQUE, limit)}")
    f = Finding(rule="torque.relief", severity=PASS if ok else FAIL, message=text, measured=worst, limit=limit,
                margin=margin(worst, limit, True), kind=TORQUE, unit=ctx.unit(TORQUE),
                segment="stall at the relief setting", count=0 if ok else 1, where=ds.where("torque_max"),
                app_where=app.where("relief_setting"))
    return _unproven(f, est)


def _starting_need(ctx: Context) -> tuple[float, str, Where] | str:
    """The pump's torque at the cold start [N·m], how it is known and the cell it rests on; or why it is
    not known. The stated breakaway torque, or the performance table's loss model (Wilson's viscous term
    C_v·D·μ·ω at the cold viscosity) at the first running segment's pressure and speed."""
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    cold = ctx.cold_start
    assert cold is not None
    if ds.starting_torque is not None:
        return ds.starting_torque, "stated breakaway torque", ds.where("starting_torque")
    i, rho = cold.index, app.oil.density_15
    est = performance.estimate(ds, duty.pressure[i:i + 1], np.array([cold.speed]), np.array([cold.viscosity]),
                               rho, rho)
    if est.basis != "table":
        return ("the datasheet states no breakaway torque and no performance table whose viscous loss gives "
                "the torque at the cold viscosity")
    how = (f"loss model of the performance table at {ctx.show(VISCOSITY, cold.viscosity)} and "
           f"{ctx.show(PRESSURE, float(duty.pressure[i]))} ({ctx.label(i)})"
           + (", extrapolated beyond the table" if bool(est.extrapolated[0]) else ""))
    return float(est.torque[0]), how, ds.where("performance")


@rule("torque.cold-start", "the pump's torque at the cold start at or below the motor's starting torque",
      not_checked="no cold-start temperature, no breakaway torque nor performance table, or no motor")
def cold_start_torque(ctx: Context) -> Finding:
    """The pump's torque at the cold start against the motor's starting torque.

    The pump's torque: the stated breakaway torque, or the performance table's loss model (Wilson's
    viscous term C_v·D·μ·ω at the cold viscosity) at the first running segment's pressure and speed. The
    motor: the smallest standard motor for the duty's RMS and peak power; its starting torque the
    application's multiple of rated torque, or the locked-rotor torque of the standard's design class.
    Assumed with the loss model (a stated breakaway torque is a standstill torque, met by the
    locked-rotor torque itself): the motor's locked-rotor torque is compared with the pump's torque at
    the cold viscosity at full speed, a conservative stand-in for comparing the motor's pull-up torque
    with the pump's torque over the run-up (conservative on the pump's side: its viscous torque grows
    with speed, so full speed is its largest; a motor's pull-up torque can lie below its locked-rotor
    torque).
    """
    ds, app = ctx.ds, ctx.app
    rule_id = "torque.cold-start"
    cold = ctx.cold_start
    if cold is None:
        return not_checked(ctx, rule_id, "no cold-start temperature given", ds.where("starting_torque"),
                           app.where("cold_start_temperature"), kind=TORQUE)
    known = _starting_need(ctx)
    if isinstance(known, str):
        return not_checked(ctx, rule_id, known, ds.where("starting_torque"), app.where("cold_start_temperature"),
                           kind=TORQUE)
    need, how, where = known
    if isinstance(ctx.motor, str):
        return not_checked(ctx, rule_id, ctx.motor, where, kind=TORQUE, measured=need)
    motor = ctx.motor[0]  # the motor the comparison shows
    stated = app.motor_starting_torque is not None
    ratio = app.motor_starting_torque if stated else locked_rotor_ratio(motor.rated_power, motor.standard)
    assert ratio is not None
    rated = rated_torque(motor.rated_power, cold.speed)
    have = ratio * rated
    ok = need <= have
    source = ("as stated" if stated else
              "locked-rotor torque of " + ("IEC 60034-12 design N" if motor.standard == "IEC" else
                                           "NEMA MG 1 design B") + ", from memory")
    text = (f"the pump needs {ctx.show(TORQUE, need)} to start at {ctx.show(TEMPERATURE, cold.temperature)} "
            f"({how}); the {motor.label} motor gives {ratio:.2g} × {ctx.show(TORQUE, rated)} = "
            f"{ctx.show(TORQUE, have)} ({source}" + ("" if ds.starting_torque is not None else
                                                   "; the pump's torque at the cold viscosity at full speed set "
                                                   "against the locked-rotor torque, a conservative stand-in for "
                                                   "the pull-up torque over the run-up") + ")")
    if not ok:
        text += ": it may not bring the pump up to speed cold"
    return Finding(rule=rule_id, severity=PASS if ok else FAIL, message=text, measured=need, limit=have,
                   margin=margin(need, have, True), kind=TORQUE, unit=ctx.unit(TORQUE), segment="cold start",
                   count=0 if ok else 1, where=where,
                   app_where=app.where("motor_starting_torque" if stated else "cold_start_temperature"))


@rule("rotation", "direction of rotation matches the drive",
      not_checked="no rotation on the datasheet or in the application")
def rotation(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    where, app_where = ds.where("rotation"), app.where("rotation")
    if ds.rotation is None:
        return not_checked(ctx, "rotation", "the datasheet states no direction of rotation", where, app_where)
    if app.rotation is None:
        return not_checked(ctx, "rotation", "the application states no direction of rotation", where, app_where)
    pump = rotation_of(ds.rotation, where)
    drive_dir = rotation_of(app.rotation, app_where)
    # a one-way pump on a drive that turns both ways does not match
    ok = pump == "either" or pump == drive_dir
    return Finding(rule="rotation", severity=PASS if ok else FAIL,
                   message=f"pump {ds.rotation}, drive {app.rotation}: {'matches' if ok else 'does not match'}",
                   measured=app.rotation, limit=ds.rotation, segment="shaft", count=0 if ok else 1, where=where,
                   app_where=app_where)
