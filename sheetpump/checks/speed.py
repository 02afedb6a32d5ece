"""Shaft speed: the pump's speed range, and the higher minimum speed some pumps ask for at high pressure.

The speed margin m narrows the range [a, b] to [a·(1 + m), b·(1 − m)]; a segment with the pump standing
still is not running below its minimum speed. The drive's speed range (application) counts as a point
of its own.
"""

from __future__ import annotations

from ..units import PRESSURE, SPEED
from .context import Context, not_applicable, not_checked
from .findings import Finding
from .limits import bound, note
from .registry import rule

__all__ = ["speed_max", "speed_min", "speed_min_high_pressure"]


@rule("speed.min", "shaft speed at or above the minimum speed")
def speed_min(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    m = app.speed_margin
    extra = ((app.speed_min, "drive speed range", app.where("speed_min")),) \
        if app.speed_min is not None and app.speed_min > 0 else ()
    return bound(ctx, "speed.min", ctx.duty.speed, ds.speed_min * (1 + m), False, SPEED, ds.where("speed_min"),
                 active=ctx.running, what="the pump never runs",
                 rating_note=note(m, "minimum speed raised by"), extra=extra)


@rule("speed.max", "shaft speed at or below the maximum speed")
def speed_max(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    m = app.speed_margin
    extra = ((app.speed_max, "drive speed range", app.where("speed_max")),) if app.speed_max is not None else ()
    return bound(ctx, "speed.max", ctx.duty.speed, ds.speed_max * (1 - m), True, SPEED, ds.where("speed_max"),
                 rating_note=note(m, "maximum speed"), extra=extra)


@rule("speed.min-high-pressure", "shaft speed at or above the minimum speed asked for at high pressure",
      not_checked="a raised minimum speed without its pressure, or the other way round")
def speed_min_high_pressure(ctx: Context) -> Finding:
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    rule_id = "speed.min-high-pressure"
    if ds.speed_min_high_pressure is not None and ds.high_pressure_threshold is not None:
        # the pressure margin lowers the threshold: the raised minimum speed applies sooner
        m, pm = app.speed_margin, app.pressure_margin
        threshold = ds.high_pressure_threshold * (1 - pm)
        high = ctx.running & (duty.pressure > threshold)
        return bound(ctx, rule_id, duty.speed, ds.speed_min_high_pressure * (1 + m),
                     False, SPEED, ds.where("speed_min_high_pressure"), active=high,
                     what=f"no running segment above {ctx.show(PRESSURE, threshold)}",
                     rating_note=f" above {ctx.show(PRESSURE, threshold)}" + note(pm, "threshold")
                     + note(m, "raised by"))
    if ds.speed_min_high_pressure is None and ds.high_pressure_threshold is None:
        return not_applicable(rule_id, "the datasheet asks no higher minimum speed at high pressure",
                              ds.where("speed_min_high_pressure"))
    if ds.high_pressure_threshold is None:
        return not_checked(ctx, rule_id, "the datasheet states a raised minimum speed but not the pressure "
                           "above which it applies", ds.where("high_pressure_threshold"))
    return not_checked(ctx, rule_id, "the datasheet states a pressure for a raised minimum speed but "
                       "not that speed", ds.where("speed_min_high_pressure"))
