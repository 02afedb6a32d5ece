"""The oil: its viscosity and temperature against the pump's limits, and its cleanliness (ISO 4406).

The oil's kinematic viscosity at each segment's temperature comes from the application's two points by
ASTM D341. A viscosity outside the continuous range but within a short-term minimum or a cold-start
maximum is a warning: allowed only briefly, or only while starting cold.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..codes import cleanliness_code
from ..physics.fluid import viscosity_at
from ..units import TEMPERATURE, VISCOSITY
from .context import Context, not_checked
from .findings import FAIL, NOT_CHECKED, PASS, WARN, Finding
from .limits import bound, margin
from .registry import rule

__all__ = [
    "cleanliness", "temperature_max", "temperature_min", "viscosity_cold_start",
    "viscosity_max", "viscosity_min",
]


def _viscosity_limit(ctx: Context, rule_id: str, upper: bool, name: str, relaxed_name: str,
                     words: tuple[str, str, str]) -> Finding:
    """A viscosity limit over the running segments; outside it but within the relaxed limit (short-term
    minimum, cold-start maximum) a warning. ``words``: the relaxed limit, and what it allows."""
    ds, nu = ctx.ds, ctx.viscosity
    limit, relaxed = getattr(ds, name), getattr(ds, relaxed_name)
    what, inside, allowed = words
    if limit is None:
        return not_checked(ctx, rule_id, f"the datasheet states no {'maximum' if upper else 'minimum'} viscosity",
                           ds.where(name), kind=VISCOSITY)
    f = bound(ctx, rule_id, nu, limit, upper, VISCOSITY, ds.where(name), active=ctx.running,
              what="the pump never runs", check_nan=True)
    if not f.count:
        return f
    hard = f.count if relaxed is None else \
        int(np.count_nonzero(ctx.running & ((nu > relaxed) if upper else (nu < relaxed))))
    if hard == 0:
        return dataclasses.replace(f, severity=WARN, message=f.message + f"; {inside} the {what} "
                                   f"{ctx.show(VISCOSITY, relaxed)}: {allowed}", where=ds.where(relaxed_name))
    if relaxed is not None:
        return dataclasses.replace(f, message=f.message + f"; {hard} {'above' if upper else 'below'} the "
                                   f"{what} {ctx.show(VISCOSITY, relaxed)}")
    return f


@rule("viscosity.min", "oil viscosity at or above the minimum (short-term minimum: warning)",
      not_checked="no minimum viscosity stated")
def viscosity_min(ctx: Context) -> Finding:
    return _viscosity_limit(ctx, "viscosity.min", False, "viscosity_min", "viscosity_min_short",
                            ("short-term minimum", "above", "allowed only briefly"))


@rule("viscosity.max", "oil viscosity at or below the maximum (up to the cold-start maximum: warning)",
      not_checked="no maximum viscosity stated")
def viscosity_max(ctx: Context) -> Finding:
    return _viscosity_limit(ctx, "viscosity.max", True, "viscosity_max", "viscosity_max_cold_start",
                            ("cold-start maximum", "within", "allowed only while starting cold"))


@rule("viscosity.cold-start", "oil viscosity at the cold-start temperature at or below the cold-start maximum",
      not_checked="no cold-start temperature (application) or no maximum viscosity")
def viscosity_cold_start(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    rule_id = "viscosity.cold-start"
    t_cold = app.cold_start_temperature
    stated = ds.viscosity_max_cold_start is not None
    # Without a stated cold-start maximum the continuous maximum is the only limit known.
    lim = ds.viscosity_max_cold_start if stated else ds.viscosity_max
    if t_cold is None:
        return not_checked(ctx, rule_id, "the application states no cold-start temperature",
                           ds.where("viscosity_max_cold_start"), app.where("cold_start_temperature"), VISCOSITY)
    if lim is None:
        return not_checked(ctx, rule_id, "the datasheet states no cold-start maximum viscosity (nor a maximum)",
                           ds.where("viscosity_max_cold_start"), app.where("cold_start_temperature"), VISCOSITY)
    oil = app.oil
    nu_cold = float(viscosity_at(t_cold, oil.nu1, oil.t1, oil.nu2, oil.t2))
    ok = nu_cold <= lim
    label = "cold-start maximum" if stated else "maximum (no cold-start maximum stated)"
    return Finding(rule=rule_id, severity=PASS if ok else FAIL,
                   message=f"{ctx.show(VISCOSITY, nu_cold)} at the cold start ({ctx.show(TEMPERATURE, t_cold)}), "
                   f"{label} {ctx.show(VISCOSITY, lim)}",
                   measured=nu_cold, limit=lim, margin=margin(nu_cold, lim, True), kind=VISCOSITY,
                   unit=ctx.unit(VISCOSITY), segment="cold start", count=0 if ok else 1,
                   where=ds.where("viscosity_max_cold_start" if stated else "viscosity_max"),
                   app_where=app.where("cold_start_temperature"))


def _in_span(ctx: Context, f: Finding) -> Finding:
    """A margin as a share of a temperature in kelvin says little: take it as a share of the pump's
    temperature range where both ends are given (e.g. 55 °C against -20…80 °C: 25 K of 100 K = 25 %)."""
    ds = ctx.ds
    if ds.temperature_min is None or ds.temperature_max is None:
        return f
    span = ds.temperature_max - ds.temperature_min
    if not (isinstance(f.measured, float) and isinstance(f.limit, float) and span > 0):
        return f
    inside = (f.limit - f.measured) if f.rule == "temperature.max" else (f.measured - f.limit)
    return dataclasses.replace(f, margin=inside / span)


@rule("temperature.min", "oil temperature at or above the pump's minimum",
      not_checked="no minimum fluid temperature stated")
def temperature_min(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    if ds.temperature_min is None:
        return not_checked(ctx, "temperature.min", "the datasheet states no minimum fluid temperature",
                           ds.where("temperature_min"), kind=TEMPERATURE)
    t_cold = app.cold_start_temperature  # the oil is coldest at a start
    extra = ((t_cold, "cold start", app.where("cold_start_temperature")),) if t_cold is not None else ()
    return _in_span(ctx, bound(ctx, "temperature.min", ctx.duty.temperature, ds.temperature_min, False,
                               TEMPERATURE, ds.where("temperature_min"), extra=extra))


@rule("temperature.max", "oil temperature at or below the pump's maximum",
      not_checked="no maximum fluid temperature stated")
def temperature_max(ctx: Context) -> Finding:
    ds = ctx.ds
    if ds.temperature_max is None:
        return not_checked(ctx, "temperature.max", "the datasheet states no maximum fluid temperature",
                           ds.where("temperature_max"), kind=TEMPERATURE)
    return _in_span(ctx, bound(ctx, "temperature.max", ctx.duty.temperature, ds.temperature_max, True,
                               TEMPERATURE, ds.where("temperature_max")))


@rule("cleanliness", "system cleanliness (ISO 4406) no worse than the pump needs",
      not_checked="no cleanliness code on the datasheet or in the application")
def cleanliness(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    where, app_where = ds.where("cleanliness"), app.where("cleanliness")
    if ds.cleanliness is None:
        return not_checked(ctx, "cleanliness", "the datasheet states no cleanliness code (ISO 4406)", where,
                           app_where)
    need = cleanliness_code(ds.cleanliness, where)
    if app.cleanliness is None:
        return Finding(rule="cleanliness", severity=NOT_CHECKED, message=f"not checked: the pump needs "
                       f"{ds.cleanliness} (ISO 4406) but the application states no cleanliness code",
                       limit=ds.cleanliness, segment="system", where=where, app_where=app_where)
    have = cleanliness_code(app.cleanliness, app_where)
    pairs = [(h, r) for h, r in zip(have, need, strict=True) if r is not None and h is not None]
    missing = any(r is not None and h is None for h, r in zip(have, need, strict=True))
    worse = [h > r for h, r in pairs]
    fraction = min(((r - h) / max(r, 1) for h, r in pairs), default=None)
    if any(worse):
        sev, word = FAIL, "worse than"
    elif missing or not pairs:
        sev, word = WARN, "cannot be fully compared with"
    else:
        sev, word = PASS, "no worse than"
    return Finding(rule="cleanliness", severity=sev, message=f"system {app.cleanliness} is {word} the required "
                   f"{ds.cleanliness} (ISO 4406, number by number)", measured=app.cleanliness,
                   limit=ds.cleanliness, margin=fraction, segment="system", count=int(sum(worse)), where=where,
                   app_where=app_where)
