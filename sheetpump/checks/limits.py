"""Limit arithmetic: the margin of a value against a limit, one limit over every segment of a duty, and
the stretches a duty spends above a level.

Application margins tighten the limits: an upper rating R with a margin m becomes R·(1 − m), a lower one
R·(1 + m); the limit a finding reports is the tightened one, and :func:`note` says so in its message.
A margin is a fraction of the limit, positive inside:

>>> margin(270e5, 250e5, upper=True), margin(20.0, 25.0, upper=False), note(0.1, "peak rating")
(-0.08, -0.2, ' (peak rating less a 10% margin)')
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import Where
from ..units import Kind
from .context import Context
from .findings import FAIL, INFO, PASS, Finding

__all__ = ["bound", "margin", "note", "stretches"]


def margin(measured: float, limit: float, upper: bool) -> float:
    """The margin of ``measured`` against ``limit`` as a fraction of the limit, positive inside.

    (R − x)/|R| for an upper limit, (x − R)/|R| for a lower one; a limit of zero or an infinite one gives
    ±inf (inside or outside).

    >>> margin(200.0, 250.0, upper=True), margin(1.0, 0.0, upper=True)
    (0.2, -inf)
    """
    if limit == 0 or not math.isfinite(limit):
        return math.inf if (measured <= limit if upper else measured >= limit) else -math.inf
    return (limit - measured) / abs(limit) if upper else (measured - limit) / abs(limit)


def bound(ctx: Context, rule: str, values: np.ndarray, limit: float | np.ndarray, upper: bool,
          kind: Kind, where: Where, *, active: np.ndarray | None = None, what: str = "",
          rating_note: str = "", severity: str = FAIL,
          extra: tuple[tuple[float, str, Where], ...] = (), check_nan: bool = False) -> Finding:
    """One limit over every segment: worst segment, count and share outside, margin of the worst.

    ``extra`` adds points that are not segments (e.g. the drive's speed range) as (value, label, cell).
    """
    values = np.asarray(values, float)
    scalar = np.ndim(limit) == 0
    if scalar and not extra and values.size and (active is None or active.any()):
        # The common case in one read pass: the worst element first, the mask of what is outside only
        # if that one is outside. (argmax/argmin return a NaN first: that case takes the full way.)
        lim = float(limit)
        v = values if active is None else np.where(active, values, -np.inf if upper else np.inf)
        i = int(v.argmax() if upper else v.argmin())
        if not math.isnan(v[i]):
            outside = v[i] > lim if upper else v[i] < lim
            bad = (v > lim if upper else v < lim) if outside else np.zeros(0, bool)
            return _bound_finding(ctx, rule, kind, where, what, rating_note, severity, upper, bad,
                                 int(np.count_nonzero(bad)), float(v[i]), lim, ctx.label(i), ctx.row(i))
    if scalar:
        lim = float(limit)
        bad = values > lim if upper else values < lim
        score = values if upper else -values  # larger = worse, no margin array needed
    else:
        lim_arr = np.asarray(limit, float)
        bad = values > lim_arr if upper else values < lim_arr
        with np.errstate(divide="ignore", invalid="ignore"):
            score = (values - lim_arr) / np.abs(lim_arr) if upper else (lim_arr - values) / np.abs(lim_arr)
        score = np.where(lim_arr == 0, np.where(bad, np.inf, -np.inf), score)
    if active is not None:
        bad &= active
        score = np.where(active, score, -np.inf)
    # NaN (no data) never counts as inside; the duty's own signals are validated finite already
    nan = np.isnan(values) if check_nan else None
    if nan is not None and nan.any():
        bad |= nan & (active if active is not None else True)
        score = np.where(nan & (active if active is not None else True), np.inf, score)
    count = int(np.count_nonzero(bad))
    has = values.size > 0 and (active is None or bool(active.any()))
    candidates: list[tuple[float, float, float, str, Where | None]] = []  # score, value, limit, label, at
    if has:
        i = int(np.argmax(score))
        li = lim if scalar else float(lim_arr[i])
        candidates.append((float(score[i]), float(values[i]), li, ctx.label(i), ctx.row(i)))
    for value, label, at in extra:
        li = lim if scalar else float(np.max(lim_arr) if upper else np.min(lim_arr))
        s = margin(value, li, upper)
        ok = value <= li if upper else value >= li
        count += 0 if ok else 1
        candidates.append((-s if not scalar else (value if upper else -value), value, li, label, at))
    if not candidates:
        return Finding(rule=rule, severity=INFO, message=f"not applicable: {what or 'no segment to judge'}",
                       kind=kind, unit=ctx.unit(kind), where=where)
    _, worst, li, label, at = max(candidates, key=lambda c: c[0])
    return _bound_finding(ctx, rule, kind, where, what, rating_note, severity, upper, bad, count, worst, li,
                          label, at)


def _bound_finding(ctx: Context, rule: str, kind: Kind, where: Where, what: str, rating_note: str,
                   severity: str, upper: bool, bad: np.ndarray, count: int, worst: float, li: float,
                   label: str, at: Where | None) -> Finding:
    """The finding of :func:`bound` from its worst value and the mask of what is outside."""
    fraction = margin(worst, li, upper) if math.isfinite(worst) else None
    share = float(np.sum(ctx.duty.duration, where=bad) / ctx.cycle) if count and ctx.cycle > 0 else 0.0
    word = "above" if upper else "below"
    sev = severity if count else PASS
    if math.isnan(worst):
        text = f"not known at {label}: {what or 'no value'}"
    elif count:
        text = (f"{ctx.show(kind, worst)} at {label} is {word} the limit {ctx.show(kind, li)}"
                f"{rating_note}; {count} outside")
    else:
        text = f"worst {ctx.show(kind, worst)} at {label}, limit {ctx.show(kind, li)}{rating_note}"
    return Finding(rule=rule, severity=sev, message=text,
                   measured=worst if math.isfinite(worst) or math.isinf(worst) else None, limit=li,
                   margin=fraction, kind=kind, unit=ctx.unit(kind), segment=label, count=count, share=share,
                   segments=ctx.listed(bad) if count else (), where=where, app_where=at)


def note(margin: float, what: str) -> str:
    """The words a message adds when an application margin tightened the limit ("" without a margin)."""
    return f" ({what} less a {margin:.0%} margin)" if margin else ""


def stretches(mask: np.ndarray, duration: np.ndarray, wraps: bool) -> tuple[np.ndarray, np.ndarray,
                                                                            np.ndarray]:
    """Runs of consecutive ``True`` in ``mask``: ``(first, stop, length)``.

    ``first`` is the index of a run's first element, ``stop`` one past its last (for a run that wraps
    round the end of a repeating cycle, ``stop <= first``); ``length`` is its duration [s], summed from
    a cumulative sum of ``duration``. A mask that is all ``True`` in a repeating cycle is one run that
    never ends (length ``inf``).

    >>> first, stop, length = stretches(np.array([1, 1, 0, 1, 1, 0, 1], bool),
    ...                                 np.array([1.0, 2, 3, 4, 5, 6, 7]), wraps=True)
    >>> first.tolist(), stop.tolist(), length.tolist()
    ([6, 3], [2, 5], [10.0, 9.0])
    """
    n = mask.size
    edges = np.diff(np.concatenate(([0], mask.view(np.int8) if mask.dtype == bool else mask.astype(np.int8),
                                    [0])))
    first = np.flatnonzero(edges == 1)
    stop = np.flatnonzero(edges == -1)
    cum = np.concatenate(([0.0], np.cumsum(duration, dtype=float)))
    length = cum[stop] - cum[first]
    if wraps and first.size and first[0] == 0 and stop[-1] == n:
        if first.size == 1:
            return first, stop, np.array([math.inf])
        # the last run continues into the first: one stretch, starting where the last one starts
        length = np.concatenate(([length[0] + length[-1]], length[1:-1]))
        first = np.concatenate(([first[-1]], first[1:-1]))
        stop = stop[:-1]
    return first, stop, length
