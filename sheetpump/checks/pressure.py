"""Pressure: the continuous, intermittent and peak ratings, and the relief valve.

The pressure margin m lowers every rating R to R·(1 − m). Every stretch above the continuous rating is
measured as one stretch, however many consecutive segments or samples it spans (:func:`stretches`); when
the cycle repeats (``Duty.wraps``) a stretch that runs off the end continues at the start. Such stretches
are judged by the intermittent rules: their pressure, the longest, and their share of the cycle.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from ..units import DURATION, EFFICIENCY, PRESSURE
from .context import Context, not_applicable
from .findings import FAIL, INFO, NOT_CHECKED, PASS, WARN, Finding
from .limits import bound, margin, note, stretches
from .registry import rule

__all__ = [
    "duty_relief", "intermittent", "intermittent_duration", "intermittent_share", "peak",
    "pressure_continuous", "relief", "relief_stall",
]

_NO_INTERMITTENT = ("the datasheet states no intermittent rating, so every pressure is held to the continuous "
                    "rating (pressure.continuous)")


def _continuous(ctx: Context) -> float:
    """The continuous rating less the pressure margin [Pa]."""
    return ctx.ds.pressure_continuous * (1 - ctx.app.pressure_margin)


def _above(ctx: Context) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The segments above the continuous rating, and their stretches ``(first, stop, length)``; computed
    once per check for the four rules that judge them."""
    if "pressure.above" not in ctx.memo:
        above = ctx.duty.pressure > _continuous(ctx)
        ctx.memo["pressure.above"] = (above, *stretches(above, ctx.duty.duration, ctx.duty.wraps))
    return ctx.memo["pressure.above"]  # type: ignore[return-value]


@rule("pressure.continuous", "pressure at or below the continuous rating (except intermittent stretches)")
def pressure_continuous(ctx: Context) -> Finding:
    ds, m = ctx.ds, ctx.app.pressure_margin
    cont = _continuous(ctx)
    if ds.pressure_intermittent is None:
        return bound(ctx, "pressure.continuous", ctx.duty.pressure, cont, True, PRESSURE,
                     ds.where("pressure_continuous"),
                     rating_note=note(m, "continuous rating") + "; no intermittent rating stated")
    f = bound(ctx, "pressure.continuous", ctx.duty.pressure, cont, True, PRESSURE, ds.where("pressure_continuous"),
              rating_note=note(m, "continuous rating"))
    first = _above(ctx)[1]
    if not first.size:
        return f
    return dataclasses.replace(f, severity=INFO, message=(
        f"{first.size} stretch(es) above the continuous rating {ctx.show(PRESSURE, cont)}"
        f"{note(m, 'rating')}, judged by the intermittent rules; highest "
        f"{ctx.show(PRESSURE, float(f.measured))} at {f.segment}"))


@rule("pressure.intermittent", "pressure in stretches above continuous at or below the intermittent rating")
def intermittent(ctx: Context) -> Finding:
    ds, m = ctx.ds, ctx.app.pressure_margin
    if ds.pressure_intermittent is None:
        return not_applicable("pressure.intermittent", _NO_INTERMITTENT, ds.where("pressure_intermittent"))
    return bound(ctx, "pressure.intermittent", ctx.duty.pressure, ds.pressure_intermittent * (1 - m), True,
                 PRESSURE, ds.where("pressure_intermittent"), active=_above(ctx)[0],
                 what="no stretch above the continuous rating", rating_note=note(m, "intermittent rating"))


@rule("pressure.intermittent-duration", "longest stretch above continuous within the allowed time",
      not_checked="no longest time stated and the duty goes above continuous")
def intermittent_duration(ctx: Context) -> Finding:
    return _stretch_rule(ctx, "pressure.intermittent-duration", "intermittent_max_duration", share=False)


@rule("pressure.intermittent-share", "total time above continuous within the allowed share of the cycle",
      not_checked="no share of the cycle stated and the duty goes above continuous")
def intermittent_share(ctx: Context) -> Finding:
    return _stretch_rule(ctx, "pressure.intermittent-share", "intermittent_max_share", share=True)


def _stretch_label(ctx: Context, first: int, stop: int) -> str:
    duty = ctx.duty
    last = (stop - 1) % len(duty)
    if duty.names:
        a, b = duty.names[first], duty.names[last]
        return a if first == last else f"{a} … {b}"
    a = ctx.label(first).split("–")[0]
    b = ctx.label(last).split("–")[-1]
    return f"{a}–{b}" + (" (across the cycle's end)" if last < first else "")


def _stretch_rule(ctx: Context, rule_id: str, name: str, share: bool) -> Finding:
    """The longest stretch above the continuous rating (or all of them as a share of the cycle) against
    the datasheet's allowed time (or share), the field ``name``."""
    if ctx.ds.pressure_intermittent is None:
        return not_applicable(rule_id, _NO_INTERMITTENT, ctx.ds.where("pressure_intermittent"))
    limit = getattr(ctx.ds, name)
    _, first, stop, length = _above(ctx)
    where = ctx.ds.where(name)
    kind = EFFICIENCY if share else DURATION
    if not first.size:
        return Finding(rule=rule_id, severity=PASS, message="no stretch above the continuous rating",
                       measured=0.0, limit=limit, margin=1.0 if limit else None, kind=kind, unit=ctx.unit(kind),
                       share=0.0, where=where)
    if share:
        total = float(np.sum(length)) if np.all(np.isfinite(length)) else ctx.cycle
        value = total / ctx.cycle if ctx.cycle > 0 else math.inf
        label = f"{first.size} stretch(es)"
        bad_count = first.size
    else:
        i = int(np.argmax(length))
        value = float(length[i])
        label = _stretch_label(ctx, int(first[i]), int(stop[i]))
        bad_count = int(np.count_nonzero(length > limit)) if limit is not None else 0
    shown = (f"{value:.1%} of the cycle" if share else
             ("the whole cycle, without a break" if math.isinf(value) else ctx.show(DURATION, value)))
    if limit is None:
        return Finding(rule=rule_id, severity=NOT_CHECKED,
                       message=f"not checked: {shown} above the continuous rating, but the datasheet states no "
                       f"{'share of the cycle' if share else 'longest time'} for intermittent pressure: ask "
                       "the supplier", measured=value, kind=kind, unit=ctx.unit(kind), segment=label,
                       count=bad_count, where=where, app_where=ctx.row(int(first[0])))
    ok = value <= limit
    lim_text = f"{limit:.1%}" if share else ctx.show(DURATION, limit)
    text = f"{shown} ({label}) {'within' if ok else 'beyond'} the allowed {lim_text}"
    if not share:
        text += f"; {first.size} stretch(es) in all"
    bad_labels: tuple[str, ...] = ()
    if not ok and not share:
        idx = np.flatnonzero(length > limit)[: ctx.settings.listed]
        bad_labels = tuple(_stretch_label(ctx, int(first[j]), int(stop[j])) for j in idx)
    return Finding(rule=rule_id, severity=PASS if ok else FAIL, message=text, measured=value, limit=limit,
                   margin=margin(value, limit, True), kind=kind, unit=ctx.unit(kind), segment=label,
                   count=0 if ok else (bad_count if not share else 1), segments=bad_labels, where=where,
                   app_where=ctx.row(int(first[0] if share else first[int(np.argmax(length))])))


@rule("pressure.peak", "pressure never above the peak rating")
def peak(ctx: Context) -> Finding:
    ds, m = ctx.ds, ctx.app.pressure_margin
    return bound(ctx, "pressure.peak", ctx.duty.pressure, ds.pressure_peak * (1 - m), True, PRESSURE,
                 ds.where("pressure_peak"), rating_note=note(m, "peak rating"))


@rule("pressure.relief", "relief-valve setting plus overshoot at or below the peak rating")
def relief(ctx: Context) -> Finding:
    ds, app = ctx.ds, ctx.app
    m = app.pressure_margin
    rated = ds.pressure_peak * (1 - m)
    highest = app.relief_setting * (1 + app.overshoot)
    ok = highest <= rated
    return Finding(
        rule="pressure.relief", severity=PASS if ok else FAIL,
        message=f"relief setting {ctx.show(PRESSURE, app.relief_setting)} + {app.overshoot:.0%} overshoot = "
        f"{ctx.show(PRESSURE, highest)} {'within' if ok else 'above'} the peak rating "
        f"{ctx.show(PRESSURE, rated)}{note(m, 'rating')}",
        measured=highest, limit=rated, margin=margin(highest, rated, True), kind=PRESSURE,
        unit=ctx.unit(PRESSURE), segment="relief valve", count=0 if ok else 1, where=ds.where("pressure_peak"),
        app_where=app.where("relief_setting"))


@rule("pressure.relief-stall", "relief-valve setting, which a stalled machine holds on the pump, at or below "
                               "the continuous rating (above it: warning; above the intermittent: failure)")
def relief_stall(ctx: Context) -> Finding:
    """A stalled machine holds the pump at the relief setting for as long as the stall lasts, which no
    intermittent time or share covers: above the continuous rating a warning, above the intermittent
    rating (when stated) a failure; both cells named."""
    ds, app = ctx.ds, ctx.app
    m = app.pressure_margin
    cont = _continuous(ctx)
    setting = app.relief_setting
    inter = ds.pressure_intermittent * (1 - m) if ds.pressure_intermittent is not None else None
    if inter is not None and setting > inter:
        sev, limit, where = FAIL, inter, ds.where("pressure_intermittent")
    elif setting > cont:
        sev, limit, where = WARN, cont, ds.where("pressure_continuous")
    else:
        sev, limit, where = PASS, cont, ds.where("pressure_continuous")
    text = (f"relief setting {ctx.show(PRESSURE, setting)} {'above' if setting > cont else 'within'} the "
            f"continuous rating {ctx.show(PRESSURE, cont)}")
    if inter is not None:
        text += f", {'above' if setting > inter else 'within'} the intermittent {ctx.show(PRESSURE, inter)}"
    text += note(m, "ratings")
    if sev != PASS:
        text += ": a stalled machine holds the pump there for as long as the stall lasts"
    return Finding(rule="pressure.relief-stall", severity=sev, message=text, measured=setting, limit=limit,
                   margin=margin(setting, limit, True), kind=PRESSURE, unit=ctx.unit(PRESSURE),
                   segment="relief valve", count=0 if sev == PASS else 1, where=where,
                   app_where=app.where("relief_setting"))


@rule("pressure.duty-relief", "duty pressures at or below the relief-valve setting (the duty is consistent)")
def duty_relief(ctx: Context) -> Finding:
    app = ctx.app
    f = bound(ctx, "pressure.duty-relief", ctx.duty.pressure, app.relief_setting, True, PRESSURE,
              app.where("relief_setting"), severity=WARN)
    if f.severity != WARN:
        return f
    # a duty above its own relief setting: the duty or the setting is wrong
    return dataclasses.replace(f, message=f.message + ": the relief valve would open, so the duty table or the "
                               "relief setting is wrong")
