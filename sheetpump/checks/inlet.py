"""The pump's inlet: the inlet pressure (absolute) against the pump's limits, stated or computed from the
suction line, the line's velocity, and the inlet pressure at a cold start.

With a suction line the inlet pressure of each segment is computed from it (reservoir pressure, lift,
line friction, fittings, strainer; :mod:`sheetpump.suction`), and a finding names the term that dominates
and the line cell to fix.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from .. import suction
from ..errors import Where
from ..physics.suction import LAMINAR_RE, SuctionTerms
from ..units import ABS_PRESSURE, FLOW, PRESSURE, SPEED, TEMPERATURE, VELOCITY, VISCOSITY
from .context import Context, not_applicable, not_checked
from .findings import FAIL, INFO, PASS, WARN, Finding
from .limits import bound, margin
from .registry import rule

__all__ = ["cold_start", "inlet_max", "inlet_min", "velocity"]


def _inlet_pressure(ctx: Context) -> np.ndarray:
    """The inlet pressure of each segment [Pa absolute]: computed from the suction line, or as stated."""
    return ctx.duty.inlet_pressure if ctx.line is None else np.asarray(ctx.line.inlet, float)


def _inlet_limit(ctx: Context, rule_id: str, upper: bool) -> Finding:
    """The inlet pressure of every segment against the datasheet's minimum (or maximum)."""
    ds = ctx.ds
    word, name = ("maximum", "inlet_pressure_max") if upper else ("minimum", "inlet_pressure_min")
    limit = getattr(ds, name)
    if limit is None:
        return not_checked(ctx, rule_id, f"the datasheet states no {word} inlet pressure", ds.where(name),
                           kind=ABS_PRESSURE)
    inlet = _inlet_pressure(ctx)
    worst = int(np.argmax(inlet) if upper else np.argmin(inlet))
    return _computed(ctx, bound(ctx, rule_id, inlet, limit, upper, ABS_PRESSURE, ds.where(name)), worst)


@rule("inlet.min", "inlet pressure (absolute) at or above the minimum", not_checked="no minimum inlet pressure stated")
def inlet_min(ctx: Context) -> Finding:
    return _inlet_limit(ctx, "inlet.min", upper=False)


@rule("inlet.max", "inlet pressure (absolute) at or below the maximum", not_checked="no maximum inlet pressure stated")
def inlet_max(ctx: Context) -> Finding:
    return _inlet_limit(ctx, "inlet.max", upper=True)


def _breakdown(ctx: Context, terms: SuctionTerms, i: int | None = None) -> tuple[str, Where]:
    """The inlet pressure's terms in words (at element ``i``), the dominant one, and the line cell to fix;
    an absolute inlet pressure at or below zero is said to be below vacuum (the line cannot feed the pump)."""
    def at(x: object) -> float:
        return suction.value_at(x, i)

    parts = [f"reservoir {ctx.show(ABS_PRESSURE, at(terms.reservoir))}"]
    parts += [f"{'+' if at(getattr(terms, n)) < 0 else '−'} {suction.TERM_WORDS[n][0].removeprefix('the ')} "
              f"{ctx.show(PRESSURE, abs(at(getattr(terms, n))))}"
              for n in SuctionTerms.TERMS if at(getattr(terms, n)) != 0]
    top = suction.dominant(terms, i)
    word, key = suction.TERM_WORDS[top]
    re_ = at(terms.reynolds)
    regime = "laminar" if re_ <= LAMINAR_RE else "transitional" if re_ < 4000 else "turbulent"
    text = (f"computed from the suction line ({ctx.show(VELOCITY, at(terms.velocity))}, Re {re_:.0f}, "
            f"{regime}): {' '.join(parts)}; {word} dominates"
            + ("; below vacuum: the line cannot feed the pump" if at(terms.inlet) <= 0 else ""))
    return text, ctx.app.where(key)


def _computed(ctx: Context, f: Finding, i: int) -> Finding:
    """An inlet finding on the computed pressure: says how it was computed and names the line cell to fix."""
    if ctx.line is None or f.severity == INFO:
        return f
    text, where = _breakdown(ctx, ctx.line, i)
    return dataclasses.replace(f, message=f"{f.message}; {text}", app_where=where)


@rule("inlet.velocity", "suction line velocity within common practice (0.5 to 1.2 m/s)")
def velocity(ctx: Context) -> Finding:
    """Suction line velocity against common practice: a warning above the range, a note below it."""
    app, line = ctx.app, ctx.line
    if line is None:
        return Finding(rule="inlet.velocity", severity=INFO, message="not applicable: no suction line given (the "
                       "stated inlet pressure is used)", kind=VELOCITY, unit=ctx.unit(VELOCITY),
                       where=app.where("suction_diameter"))
    low, high = ctx.settings.suction_velocity
    v = np.broadcast_to(np.asarray(line.velocity, float), ctx.duty.duration.shape)
    f = bound(ctx, "inlet.velocity", v, high, True, VELOCITY, app.where("suction_diameter"), active=ctx.running,
              what="the pump never runs", severity=WARN,
              rating_note=f" (common practice {low:g}–{high:g} m/s for suction lines)")
    f = dataclasses.replace(f, app_where=app.where("suction_diameter"))
    if f.severity == PASS and isinstance(f.measured, float) and f.measured < low:
        f = dataclasses.replace(f, severity=INFO, message=f.message + ": below the usual range, the line is "
                                "larger than it needs to be")
    return f


@rule("inlet.cold-start", "inlet pressure at the cold start, computed from the suction line, at or above the minimum",
      not_checked="a suction line without a cold-start temperature or a minimum inlet pressure")
def cold_start(ctx: Context) -> Finding:
    """The inlet pressure at the cold start: the pump's flow at the first running segment's speed, drawn
    through the suction line at the cold oil's viscosity."""
    ds, app = ctx.ds, ctx.app
    rule_id = "inlet.cold-start"
    cold = ctx.cold_start
    if app.suction is None:  # the stated inlet pressure holds as the user gave it: nothing to compute
        return not_applicable(rule_id, "no suction line given (the inlet rules judge the stated inlet pressure)",
                              app.where("suction_diameter"))
    missing = ("no cold-start temperature given" if cold is None else
               "the datasheet states no minimum inlet pressure" if ds.inlet_pressure_min is None else "")
    if missing:
        where = ds.where("inlet_pressure_min") if cold is not None else app.where("cold_start_temperature")
        return not_checked(ctx, rule_id, missing, where, app.where("cold_start_temperature"), kind=ABS_PRESSURE)
    assert cold is not None and ds.inlet_pressure_min is not None
    flow = ds.displacement * cold.speed  # the pump draws its displacement every turn, whatever it delivers
    terms = suction.inlet(app.suction, flow, cold.viscosity, app.oil.density_15)
    p = float(terms.inlet)
    lim = ds.inlet_pressure_min
    ok = p >= lim
    text, where = _breakdown(ctx, terms)
    return Finding(rule=rule_id, severity=PASS if ok else FAIL,
                   message=f"{ctx.show(ABS_PRESSURE, p)} at the cold start ({ctx.show(TEMPERATURE, cold.temperature)}, "
                   f"{ctx.show(VISCOSITY, cold.viscosity)}, {ctx.show(FLOW, flow)} drawn at "
                   f"{ctx.show(SPEED, cold.speed)}) {'at or above' if ok else 'below'} the minimum "
                   f"{ctx.show(ABS_PRESSURE, lim)}; {text}",
                   measured=p, limit=lim, margin=margin(p, lim, False), kind=ABS_PRESSURE,
                   unit=ctx.unit(ABS_PRESSURE), segment="cold start", count=0 if ok else 1,
                   where=ds.where("inlet_pressure_min"), app_where=where)
