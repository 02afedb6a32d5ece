"""The rating checker: one datasheet against one application's duty cycle.

Each rule is a small function over the whole duty at once (numpy arrays, one element per segment or per
sample of a measured series), so a series of a million samples costs a handful of array passes, not a
Python loop. Every rule gives one :class:`Finding` for every pump, always: its stable rule id, severity
(``fail`` / ``warn`` / ``info`` / ``pass``, or ``not checked`` when a value it needs is not stated, with
the reason and the cell to fill), what was measured, the limit, the margin as a fraction of the limit
(positive = inside), the worst segment and how many segments are outside, and the cell to fix. A rule
that matters for the duty (pressure, speed, flow, inlet, viscosity, temperature, torque) and is not
checked makes the pump's verdict at best ``warn``: a ``pass`` means every rating was proven.

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
import math
import re
from dataclasses import dataclass, field

import numpy as np

from . import performance, suction
from .datasheet import Datasheet
from .duty import Application, Duty
from .errors import InputError, Where
from .physics import drive, fluid, start
from .physics.suction import LAMINAR_RE, SuctionTerms
from .units import (
    ABS_PRESSURE,
    DURATION,
    EFFICIENCY,
    FLOW,
    POWER,
    PRESSURE,
    SPEED,
    TEMPERATURE,
    TORQUE,
    VELOCITY,
    VISCOSITY,
    Kind,
    from_si,
)

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
    "parse_cleanliness",
    "prepare",
    "stretches",
]

FAIL, WARN, INFO, PASS = "fail", "warn", "info", "pass"
NOT_CHECKED = "not checked"
_ORDER = {PASS: 0, INFO: 1, NOT_CHECKED: 1, WARN: 2, FAIL: 3}

#: Subjects (the rule id before the dot) whose rules matter for the duty: one of them not checked makes
#: the verdict at best ``warn`` (``fail`` under ``strict``).
DUTY_SUBJECTS = ("pressure", "speed", "flow", "inlet", "viscosity", "temperature", "torque")

#: Units a report shows each kind in ("metric" or "imperial"); findings keep SI numbers.
DISPLAY_UNITS: dict[str, dict[Kind, str]] = {
    "metric": {PRESSURE: "bar", ABS_PRESSURE: "bara", SPEED: "rpm", FLOW: "L/min", POWER: "kW",
               TORQUE: "N*m", TEMPERATURE: "degC", VISCOSITY: "mm^2/s", DURATION: "s", EFFICIENCY: ""},
    "imperial": {PRESSURE: "psi", ABS_PRESSURE: "psia", SPEED: "rpm", FLOW: "gpm", POWER: "hp",
                 TORQUE: "lbf*ft", TEMPERATURE: "degF", VISCOSITY: "mm^2/s", DURATION: "s",
                 EFFICIENCY: ""},
}

#: Every rule id with a short description (stable: reports, CI and spreadsheets refer to them).
RULES: dict[str, str] = {
    "speed.min": "shaft speed at or above the minimum speed",
    "speed.max": "shaft speed at or below the maximum speed",
    "speed.min-high-pressure": "shaft speed at or above the minimum speed asked for at high pressure",
    "pressure.continuous": "pressure at or below the continuous rating (except intermittent stretches)",
    "pressure.intermittent": "pressure in stretches above continuous at or below the intermittent rating",
    "pressure.intermittent-duration": "longest stretch above continuous within the allowed time",
    "pressure.intermittent-share": "total time above continuous within the allowed share of the cycle",
    "pressure.peak": "pressure never above the peak rating",
    "pressure.relief": "relief-valve setting plus overshoot at or below the peak rating",
    "pressure.relief-stall": "relief-valve setting, which a stalled machine holds on the pump, at or below "
                             "the continuous rating (above it: warning; above the intermittent: failure)",
    "pressure.duty-relief": "duty pressures at or below the relief-valve setting (the duty is consistent)",
    "flow.delivered": "delivered flow after volumetric losses at least the required flow",
    "inlet.min": "inlet pressure (absolute) at or above the minimum",
    "inlet.max": "inlet pressure (absolute) at or below the maximum",
    "inlet.velocity": "suction line velocity within common practice (0.5 to 1.2 m/s)",
    "inlet.cold-start": "inlet pressure at the cold start, computed from the suction line, at or above the minimum",
    "viscosity.min": "oil viscosity at or above the minimum (short-term minimum: warning)",
    "viscosity.max": "oil viscosity at or below the maximum (up to the cold-start maximum: warning)",
    "viscosity.cold-start": "oil viscosity at the cold-start temperature at or below the cold-start maximum",
    "temperature.min": "oil temperature at or above the pump's minimum",
    "temperature.max": "oil temperature at or below the pump's maximum",
    "cleanliness": "system cleanliness (ISO 4406) no worse than the pump needs",
    "torque.max": "shaft torque at or below the shaft's limit",
    "torque.relief": "shaft torque at the relief setting plus overshoot (a stall) at or below the shaft's limit",
    "torque.cold-start": "the pump's torque at the cold start at or below the motor's starting torque",
    "rotation": "direction of rotation matches the drive",
    "performance.basis": "what the efficiencies rest on",
}

#: When each rule can give ``not checked`` (the README's table says it; empty: never).
NOT_CHECKED_WHEN: dict[str, str] = {
    "speed.min-high-pressure": "a raised minimum speed without its pressure, or the other way round",
    "pressure.intermittent-duration": "no longest time stated and the duty goes above continuous",
    "pressure.intermittent-share": "no share of the cycle stated and the duty goes above continuous",
    "inlet.min": "no minimum inlet pressure stated",
    "inlet.max": "no maximum inlet pressure stated",
    "viscosity.min": "no minimum viscosity stated",
    "viscosity.max": "no maximum viscosity stated",
    "viscosity.cold-start": "no cold-start temperature (application) or no maximum viscosity",
    "temperature.min": "no minimum fluid temperature stated",
    "temperature.max": "no maximum fluid temperature stated",
    "cleanliness": "no cleanliness code on the datasheet or in the application",
    "torque.max": "no shaft torque limit, or no efficiency to compute the torque from",
    "torque.relief": "no shaft torque limit, or no efficiency to compute the torque from",
    "rotation": "no rotation on the datasheet or in the application",
    "inlet.cold-start": "a suction line without a cold-start temperature or a minimum inlet pressure",
    "torque.cold-start": "no cold-start temperature, no breakaway torque nor performance table, or no motor",
}


@dataclass(frozen=True)
class CheckSettings:
    """How to check and report.

    ``units`` picks the display units (``"metric"`` or ``"imperial"``); ``strict`` makes warnings (and
    rules not checked that matter for the duty) fail; ``listed`` caps the number of offending segments a
    finding names. The motor settings of the comparison: ``overload_factor`` k (peak ≤ k × rating,
    default 1.6), ``service_factor`` (RMS ≤ SF × rating, default 1: size to the nameplate) and
    ``thermal_window`` [s] (the motor's thermal time over which a long series' RMS is taken, default
    10 min); see :mod:`sheetpump.physics.drive`.
    ``suction_velocity`` is the range of suction line velocities [m/s] the ``inlet.velocity`` rule
    accepts (common practice 0.5–1.2 m/s).
    """

    units: str = "metric"
    strict: bool = False
    listed: int = 5
    overload_factor: float = drive.IEC_OVERLOAD_FACTOR
    service_factor: float = 1.0
    thermal_window: float = drive.THERMAL_WINDOW
    suction_velocity: tuple[float, float] = (0.5, 1.2)  # common practice for suction lines [m/s]


@dataclass(frozen=True)
class Finding:
    """The outcome of one rule for one pump.

    ``measured`` and ``limit`` are SI numbers of ``kind`` (or text, for a cleanliness code or a
    rotation); ``unit`` is the unit a report shows them in. ``margin`` is a fraction of the limit,
    positive inside. ``segment`` names the worst segment (or time range or stretch), ``count`` how many
    segments or samples are outside and ``share`` their share of the cycle time. ``where`` is the
    datasheet cell the rule rests on, ``app_where`` the application cell (duty row or setting).
    """

    rule: str
    severity: str
    message: str
    measured: float | str | None = None
    limit: float | str | None = None
    margin: float | None = None
    kind: Kind | None = None
    unit: str = ""
    segment: str = ""
    count: int = 0
    share: float | None = None
    segments: tuple[str, ...] = ()
    where: Where = field(default_factory=Where)
    app_where: Where | None = None

    @property
    def title(self) -> str:
        """The rule's plain description."""
        return RULES.get(self.rule, self.rule)

    @property
    def matters(self) -> bool:
        """Whether the rule judges the duty (its subject is one of :data:`DUTY_SUBJECTS`)."""
        return self.rule.split(".")[0] in DUTY_SUBJECTS

    @property
    def effect(self) -> str:
        """The severity this finding gives the verdict: a rule not checked that matters counts as a warning."""
        if self.severity == NOT_CHECKED:
            return WARN if self.matters else INFO
        return self.severity


@dataclass(frozen=True)
class DriveFigures:
    """Drive figures of one pump over the duty: per-segment arrays and whole-cycle numbers (SI)."""

    duration: np.ndarray  # [s]
    viscosity: np.ndarray  # kinematic, at the segment's oil temperature [m^2/s]
    volumetric_efficiency: np.ndarray  # [-]
    total_efficiency: np.ndarray  # [-]
    flow: np.ndarray  # delivered [m^3/s]
    torque: np.ndarray  # shaft [N*m]
    input_power: np.ndarray  # shaft power [W]
    hydraulic_power: np.ndarray  # [W]
    power_loss: np.ndarray  # the pump's own power loss [W]
    peak_torque: float  # [N*m]
    peak_power: float  # [W]
    rms_power: float  # [W]
    mean_power: float  # [W]
    mean_power_loss: float  # the pump's own loss, time mean [W]
    energy_per_cycle: float  # shaft energy [J]
    basis: str = ""  # performance basis: "table", "stated" or "none"
    surplus_heat: np.ndarray | None = None  # surplus flow x the pressure it crosses, per segment [W]
    mean_surplus_heat: float = 0.0  # its time mean [W]
    surplus_path: str = ""  # which pressure the surplus crosses, in words

    @property
    def mean_heat(self) -> float:
        """Heat into the oil, time mean [W]: the pump's own loss plus the surplus flow at the pressure it crosses."""
        return self.mean_power_loss + self.mean_surplus_heat


@dataclass(frozen=True)
class CheckResult:
    """All findings for one pump, its drive figures and the overall verdict."""

    datasheet: Datasheet
    application: Application
    findings: list[Finding]
    drive: DriveFigures
    settings: CheckSettings = field(default_factory=CheckSettings)
    suction: SuctionTerms | None = None  # the inlet pressure computed from the suction line, per segment
    # the motor sizing (size_motor) made once for the check and the comparison, or why there is none
    motor: tuple[drive.MotorChoice, str, float, str] | str = ""

    @property
    def worst_margin(self) -> float | None:
        """The smallest numeric margin among the rules that were judged (None if there is none)."""
        margins = [f.margin for f in self.findings
                   if f.severity != INFO and f.margin is not None and math.isfinite(f.margin)]
        return min(margins) if margins else None

    @property
    def verdict(self) -> str:
        """``fail``, ``warn`` or ``pass`` (``strict`` settings turn ``warn`` into ``fail``).

        A rule not checked that matters for the duty counts as a warning (:attr:`Finding.effect`).
        """
        worst = max((_ORDER[f.effect] for f in self.findings), default=0)
        if worst == _ORDER[FAIL] or (worst == _ORDER[WARN] and self.settings.strict):
            return FAIL
        return WARN if worst == _ORDER[WARN] else PASS

    def counts(self) -> dict[str, int]:
        """How many findings of each severity."""
        out = {FAIL: 0, WARN: 0, INFO: 0, NOT_CHECKED: 0, PASS: 0}
        for f in self.findings:
            out[f.severity] += 1
        return out


# --------------------------------------------------------------------------------------------------
# Stretches above a level


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


# --------------------------------------------------------------------------------------------------
# Helpers


@dataclass(frozen=True)
class _Context:
    ds: Datasheet
    app: Application
    duty: Duty
    settings: CheckSettings
    cycle: float

    def unit(self, kind: Kind | None) -> str:
        if kind is None:
            return ""
        return DISPLAY_UNITS.get(self.settings.units, DISPLAY_UNITS["metric"]).get(kind, kind.default)

    def label(self, i: int) -> str:
        return self.duty.label(int(i))

    def row(self, i: int) -> Where:
        rows = self.duty.rows
        if rows and 0 <= i < len(rows):
            return rows[int(i)]
        return self.duty.where if (self.duty.where.file or self.duty.where.sheet) else \
            Where(file=self.app.file or None, field=f"duty {self.label(i)}")

    def listed(self, bad: np.ndarray) -> tuple[str, ...]:
        idx = np.flatnonzero(bad)[: self.settings.listed]
        return tuple(self.label(i) for i in idx)


def _fmt(ctx: _Context, kind: Kind | None, value: float) -> str:
    """A value in the display unit, for messages."""
    if kind is None:
        return f"{value:.4g}"
    if not math.isfinite(value):
        return "unlimited" if value > 0 else str(value)
    unit = ctx.unit(kind)
    shown = from_si(value, kind, unit) if unit else value
    pretty = unit.replace("degC", "°C").replace("degF", "°F").replace("^2", "²").replace("*", "·")
    return f"{_digits(shown)} {pretty}".strip()


def _digits(x: float) -> str:
    """Four significant digits, without an exponent where plain digits read well (87000, not 8.7e+04)."""
    text = f"{x:.4g}"
    if "e" not in text or not 1e-3 <= abs(x) < 1e7:
        return text
    return f"{float(text):f}".rstrip("0").rstrip(".")


def _margin(measured: float, limit: float, upper: bool) -> float:
    if limit == 0 or not math.isfinite(limit):
        return math.inf if (measured <= limit if upper else measured >= limit) else -math.inf
    return (limit - measured) / abs(limit) if upper else (measured - limit) / abs(limit)


def _bound(ctx: _Context, rule: str, values: np.ndarray, limit: float | np.ndarray, upper: bool,
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
        s = _margin(value, li, upper)
        ok = value <= li if upper else value >= li
        count += 0 if ok else 1
        candidates.append((-s if not scalar else (value if upper else -value), value, li, label, at))
    if not candidates:
        return Finding(rule, INFO, f"not applicable: {what or 'no segment to judge'}", kind=kind,
                       unit=ctx.unit(kind), where=where)
    _, worst, li, label, at = max(candidates, key=lambda c: c[0])
    return _bound_finding(ctx, rule, kind, where, what, rating_note, severity, upper, bad, count, worst, li,
                          label, at)


def _bound_finding(ctx: _Context, rule: str, kind: Kind, where: Where, what: str, rating_note: str,
                   severity: str, upper: bool, bad: np.ndarray, count: int, worst: float, li: float,
                   label: str, at: Where | None) -> Finding:
    """The finding of :func:`_bound` from its worst value and the mask of what is outside."""
    margin = _margin(worst, li, upper) if math.isfinite(worst) else None
    share = float(np.sum(ctx.duty.duration, where=bad) / ctx.cycle) if count and ctx.cycle > 0 else 0.0
    word = "above" if upper else "below"
    sev = severity if count else PASS
    if math.isnan(worst):
        text = f"not known at {label}: {what or 'no value'}"
    elif count:
        text = (f"{_fmt(ctx, kind, worst)} at {label} is {word} the limit {_fmt(ctx, kind, li)}"
                f"{rating_note}; {count} outside")
    else:
        text = f"worst {_fmt(ctx, kind, worst)} at {label}, limit {_fmt(ctx, kind, li)}{rating_note}"
    return Finding(rule, sev, text, worst if math.isfinite(worst) or math.isinf(worst) else None, li,
                   margin, kind, ctx.unit(kind), label, count, share,
                   ctx.listed(bad) if count else (), where, at)


def _note(margin: float, what: str) -> str:
    return f" ({what} less a {margin:.0%} margin)" if margin else ""


def _not_checked(ctx: _Context, rule: str, reason: str, where: Where, app_where: Where | None = None,
                 kind: Kind | None = None, measured: float | str | None = None) -> Finding:
    """A rule that cannot be evaluated: the reason, and the cell to fill."""
    return Finding(rule, NOT_CHECKED, f"not checked: {reason}", measured, None, None, kind, ctx.unit(kind),
                   where=where, app_where=app_where)


def _not_applicable(rule: str, reason: str, where: Where) -> Finding:
    """A rule with nothing to judge for this pump (e.g. no intermittent rating: the continuous rule judges)."""
    return Finding(rule, INFO, f"not applicable: {reason}", where=where)


def _stretch_label(ctx: _Context, first: int, stop: int) -> str:
    duty = ctx.duty
    last = (stop - 1) % len(duty)
    if duty.names:
        a, b = duty.names[first], duty.names[last]
        return a if first == last else f"{a} … {b}"
    a = ctx.label(first).split("–")[0]
    b = ctx.label(last).split("–")[-1]
    return f"{a}–{b}" + (" (across the cycle's end)" if last < first else "")


# --------------------------------------------------------------------------------------------------
# Rule groups


def _speed(ctx: _Context) -> list[Finding]:
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    m = app.speed_margin
    running = duty.speed > 0  # a pump standing still is not running below its minimum speed
    out = []
    extra_min = ((app.speed_min, "drive speed range", app.where("speed_min")),) \
        if app.speed_min is not None and app.speed_min > 0 else ()
    extra_max = ((app.speed_max, "drive speed range", app.where("speed_max")),) \
        if app.speed_max is not None else ()
    out.append(_bound(ctx, "speed.min", duty.speed, ds.speed_min * (1 + m), False, SPEED,
                      ds.where("speed_min"), active=running, what="the pump never runs",
                      rating_note=_note(m, "minimum speed raised by"), extra=extra_min))
    out.append(_bound(ctx, "speed.max", duty.speed, ds.speed_max * (1 - m), True, SPEED,
                      ds.where("speed_max"), rating_note=_note(m, "maximum speed"), extra=extra_max))
    rule = "speed.min-high-pressure"
    if ds.speed_min_high_pressure is not None and ds.high_pressure_threshold is not None:
        # the pressure margin lowers the threshold: the raised minimum speed applies sooner
        pm = app.pressure_margin
        threshold = ds.high_pressure_threshold * (1 - pm)
        high = running & (duty.pressure > threshold)
        out.append(_bound(ctx, rule, duty.speed, ds.speed_min_high_pressure * (1 + m),
                          False, SPEED, ds.where("speed_min_high_pressure"), active=high,
                          what=f"no running segment above {_fmt(ctx, PRESSURE, threshold)}",
                          rating_note=f" above {_fmt(ctx, PRESSURE, threshold)}" + _note(pm, "threshold")
                          + _note(m, "raised by")))
    elif ds.speed_min_high_pressure is None and ds.high_pressure_threshold is None:
        out.append(_not_applicable(rule, "the datasheet asks no higher minimum speed at high pressure",
                                   ds.where("speed_min_high_pressure")))
    elif ds.high_pressure_threshold is None:
        out.append(_not_checked(ctx, rule, "the datasheet states a raised minimum speed but not the pressure "
                                "above which it applies", ds.where("high_pressure_threshold")))
    else:
        out.append(_not_checked(ctx, rule, "the datasheet states a pressure for a raised minimum speed but "
                                "not that speed", ds.where("speed_min_high_pressure")))
    return out


def _pressure(ctx: _Context) -> list[Finding]:
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    m = app.pressure_margin
    p = duty.pressure
    cont = ds.pressure_continuous * (1 - m)
    peak = ds.pressure_peak * (1 - m)
    out: list[Finding] = []
    peak_finding = _bound(ctx, "pressure.peak", p, peak, True, PRESSURE, ds.where("pressure_peak"),
                          rating_note=_note(m, "peak rating"))
    relief = _bound(ctx, "pressure.duty-relief", p, app.relief_setting, True, PRESSURE,
                    app.where("relief_setting"), severity=WARN)
    if relief.severity == WARN:  # a duty above its own relief setting: the duty or the setting is wrong
        relief = _replace(relief, message=relief.message + ": the relief valve would open, so the duty "
                          "table or the relief setting is wrong")
    out.append(relief)
    if ds.pressure_intermittent is None:
        out.append(_bound(ctx, "pressure.continuous", p, cont, True, PRESSURE,
                          ds.where("pressure_continuous"),
                          rating_note=_note(m, "continuous rating") + "; no intermittent rating stated"))
        out += [_not_applicable(rule, "the datasheet states no intermittent rating, so every pressure is "
                                "held to the continuous rating (pressure.continuous)",
                                ds.where("pressure_intermittent"))
                for rule in ("pressure.intermittent", "pressure.intermittent-duration",
                             "pressure.intermittent-share")]
    else:
        above = p > cont
        first, stop, length = stretches(above, duty.duration, duty.wraps)
        cont_f = _bound(ctx, "pressure.continuous", p, cont, True, PRESSURE, ds.where("pressure_continuous"),
                        rating_note=_note(m, "continuous rating"))
        if first.size:
            cont_f = _replace(cont_f, severity=INFO, message=(
                f"{first.size} stretch(es) above the continuous rating {_fmt(ctx, PRESSURE, cont)}"
                f"{_note(m, 'rating')}, judged by the intermittent rules; highest "
                f"{_fmt(ctx, PRESSURE, float(cont_f.measured))} at {cont_f.segment}"))
        out.append(cont_f)
        inter = ds.pressure_intermittent * (1 - m)
        out.append(_bound(ctx, "pressure.intermittent", p, inter, True, PRESSURE,
                          ds.where("pressure_intermittent"), active=above,
                          what="no stretch above the continuous rating",
                          rating_note=_note(m, "intermittent rating")))
        out.append(_stretch_rule(ctx, "pressure.intermittent-duration", first, stop, length,
                                 ds.intermittent_max_duration, "intermittent_max_duration", share=False))
        out.append(_stretch_rule(ctx, "pressure.intermittent-share", first, stop, length,
                                 ds.intermittent_max_share, "intermittent_max_share", share=True))
    out.append(peak_finding)
    relief = app.relief_setting * (1 + app.overshoot)
    ok = relief <= peak
    out.append(Finding(
        "pressure.relief", PASS if ok else FAIL,
        f"relief setting {_fmt(ctx, PRESSURE, app.relief_setting)} + {app.overshoot:.0%} overshoot = "
        f"{_fmt(ctx, PRESSURE, relief)} {'within' if ok else 'above'} the peak rating "
        f"{_fmt(ctx, PRESSURE, peak)}{_note(m, 'rating')}",
        relief, peak, _margin(relief, peak, True), PRESSURE, ctx.unit(PRESSURE), "relief valve",
        0 if ok else 1, None, (), ds.where("pressure_peak"), app.where("relief_setting")))
    out.append(_stall(ctx, cont))
    return out


def _stall(ctx: _Context, cont: float) -> Finding:
    """A stalled machine holds the pump at the relief setting for as long as the stall lasts, which no
    intermittent time or share covers: above the continuous rating a warning, above the intermittent
    rating (when stated) a failure; both cells named."""
    ds, app = ctx.ds, ctx.app
    m = app.pressure_margin
    setting = app.relief_setting
    inter = ds.pressure_intermittent * (1 - m) if ds.pressure_intermittent is not None else None
    if inter is not None and setting > inter:
        sev, limit, where = FAIL, inter, ds.where("pressure_intermittent")
    elif setting > cont:
        sev, limit, where = WARN, cont, ds.where("pressure_continuous")
    else:
        sev, limit, where = PASS, cont, ds.where("pressure_continuous")
    text = (f"relief setting {_fmt(ctx, PRESSURE, setting)} {'above' if setting > cont else 'within'} the "
            f"continuous rating {_fmt(ctx, PRESSURE, cont)}")
    if inter is not None:
        text += f", {'above' if setting > inter else 'within'} the intermittent {_fmt(ctx, PRESSURE, inter)}"
    text += _note(m, "ratings")
    if sev != PASS:
        text += ": a stalled machine holds the pump there for as long as the stall lasts"
    return Finding("pressure.relief-stall", sev, text, setting, limit, _margin(setting, limit, True), PRESSURE,
                   ctx.unit(PRESSURE), "relief valve", 0 if sev == PASS else 1, None, (), where,
                   app.where("relief_setting"))


def _replace(f: Finding, **changes: object) -> Finding:
    return dataclasses.replace(f, **changes)


def _stretch_rule(ctx: _Context, rule: str, first: np.ndarray, stop: np.ndarray, length: np.ndarray,
                  limit: float | None, name: str, share: bool) -> Finding:
    where = ctx.ds.where(name)
    kind = EFFICIENCY if share else DURATION
    if not first.size:
        return Finding(rule, PASS, "no stretch above the continuous rating", 0.0, limit,
                       1.0 if limit else None, kind, ctx.unit(kind), "", 0, 0.0, (), where)
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
             ("the whole cycle, without a break" if math.isinf(value) else _fmt(ctx, DURATION, value)))
    if limit is None:
        return Finding(rule, NOT_CHECKED, f"not checked: {shown} above the continuous rating, but the "
                       f"datasheet states no {'share of the cycle' if share else 'longest time'} for "
                       "intermittent pressure: ask the supplier", value, None, None, kind, ctx.unit(kind), label,
                       bad_count, None, (), where, ctx.row(int(first[0])))
    ok = value <= limit
    lim_text = f"{limit:.1%}" if share else _fmt(ctx, DURATION, limit)
    text = f"{shown} ({label}) {'within' if ok else 'beyond'} the allowed {lim_text}"
    if not share:
        text += f"; {first.size} stretch(es) in all"
    bad_labels = ()
    if not ok and not share:
        idx = np.flatnonzero(length > limit)[: ctx.settings.listed]
        bad_labels = tuple(_stretch_label(ctx, int(first[j]), int(stop[j])) for j in idx)
    return Finding(rule, PASS if ok else FAIL, text, value, limit, _margin(value, limit, True), kind,
                   ctx.unit(kind), label, 0 if ok else (bad_count if not share else 1), None,
                   bad_labels, where, ctx.row(int(first[0] if share else first[int(np.argmax(length))])))


def _flow(ctx: _Context, est: performance.Estimate) -> Finding:
    duty, app = ctx.duty, ctx.app
    need = duty.flow * (1 + app.flow_margin)
    note = _note(0, "") if not app.flow_margin else f" (required flow plus a {app.flow_margin:.0%} margin)"
    f = _bound(ctx, "flow.delivered", est.flow, need, False, FLOW, ctx.ds.where("displacement"),
               active=need > 0, what="no flow required", rating_note=note, check_nan=True)
    if est.volumetric_known or f.severity != PASS:
        return f
    # No η_v: the geometric flow is an upper bound, so a pass is not proven.
    return _replace(f, severity=WARN, message=f.message + "; not proven: the datasheet states no "
                    "volumetric efficiency, so the flow is the geometric flow V·n (an upper bound)",
                    where=ctx.ds.where("volumetric_efficiency"))


def _inlet(ctx: _Context, line: SuctionTerms | None = None) -> list[Finding]:
    ds, duty = ctx.ds, ctx.duty
    out = []
    inlet = duty.inlet_pressure if line is None else np.asarray(line.inlet, float)
    if ds.inlet_pressure_min is not None:
        out.append(_computed(ctx, _bound(ctx, "inlet.min", inlet, ds.inlet_pressure_min, False, ABS_PRESSURE,
                                         ds.where("inlet_pressure_min")), line, int(np.argmin(inlet))))
    else:
        out.append(_not_checked(ctx, "inlet.min", "the datasheet states no minimum inlet pressure",
                                ds.where("inlet_pressure_min"), kind=ABS_PRESSURE))
    if ds.inlet_pressure_max is not None:
        out.append(_computed(ctx, _bound(ctx, "inlet.max", inlet, ds.inlet_pressure_max, True, ABS_PRESSURE,
                                         ds.where("inlet_pressure_max")), line, int(np.argmax(inlet))))
    else:
        out.append(_not_checked(ctx, "inlet.max", "the datasheet states no maximum inlet pressure",
                                ds.where("inlet_pressure_max"), kind=ABS_PRESSURE))
    return out + _suction_velocity(ctx, line)


def _breakdown(ctx: _Context, terms: SuctionTerms, i: int | None = None) -> tuple[str, Where]:
    """The inlet pressure's terms in words (at element ``i``), the dominant one, and the line cell to fix;
    an absolute inlet pressure at or below zero is said to be below vacuum (the line cannot feed the pump)."""
    def at(x: object) -> float:
        return suction.value_at(x, i)

    parts = [f"reservoir {_fmt(ctx, ABS_PRESSURE, at(terms.reservoir))}"]
    parts += [f"{'+' if at(getattr(terms, n)) < 0 else '−'} {suction.TERM_WORDS[n][0].removeprefix('the ')} "
              f"{_fmt(ctx, PRESSURE, abs(at(getattr(terms, n))))}"
              for n in SuctionTerms.TERMS if at(getattr(terms, n)) != 0]
    top = suction.dominant(terms, i)
    word, key = suction.TERM_WORDS[top]
    re_ = at(terms.reynolds)
    regime = "laminar" if re_ <= LAMINAR_RE else "transitional" if re_ < 4000 else "turbulent"
    text = (f"computed from the suction line ({_fmt(ctx, VELOCITY, at(terms.velocity))}, Re {re_:.0f}, "
            f"{regime}): {' '.join(parts)}; {word} dominates"
            + ("; below vacuum: the line cannot feed the pump" if at(terms.inlet) <= 0 else ""))
    return text, ctx.app.where(key)


def _computed(ctx: _Context, f: Finding, line: SuctionTerms | None, i: int) -> Finding:
    """An inlet finding on the computed pressure: says how it was computed and names the line cell to fix."""
    if line is None or f.severity == INFO:
        return f
    text, where = _breakdown(ctx, line, i)
    return _replace(f, message=f"{f.message}; {text}", app_where=where)


def _suction_velocity(ctx: _Context, line: SuctionTerms | None) -> list[Finding]:
    """Suction line velocity against common practice: a warning above the range, a note below it."""
    app = ctx.app
    if line is None:
        return [Finding("inlet.velocity", INFO, "not applicable: no suction line given (the stated inlet "
                        "pressure is used)", kind=VELOCITY, unit=ctx.unit(VELOCITY),
                        where=app.where("suction_diameter"))]
    low, high = ctx.settings.suction_velocity
    v = np.broadcast_to(np.asarray(line.velocity, float), ctx.duty.duration.shape)
    running = ctx.duty.speed > 0
    f = _bound(ctx, "inlet.velocity", v, high, True, VELOCITY, app.where("suction_diameter"), active=running,
               what="the pump never runs", severity=WARN,
               rating_note=f" (common practice {low:g}–{high:g} m/s for suction lines)")
    f = _replace(f, app_where=app.where("suction_diameter"))
    if f.severity == PASS and isinstance(f.measured, float) and f.measured < low:
        f = _replace(f, severity=INFO, message=f.message + ": below the usual range, the line is larger "
                     "than it needs to be")
    return [f]


def size_motor(fig: DriveFigures, app: Application,
            settings: CheckSettings) -> tuple[drive.MotorChoice, str, float, str]:
    """The motor: the smallest standard size carrying the RMS load (over the cycle, or over the worst
    thermal window of a long one) and the peak; with the text of its loads, the RMS it was sized on
    and over what."""
    use = fig.duration > 0
    power = np.maximum(fig.input_power[use], 0.0)  # a fitted model may dip below zero near standstill
    window = settings.thermal_window
    rms = float(drive.worst_window_rms(power, fig.duration[use], window, app.duty.wraps))
    basis = f"over the worst {window / 60:g} min" if app.duty.cycle_time > window else "over the cycle"
    peak = max(fig.peak_power, rms)
    motor = drive.select_motor(rms, peak, app.motor_standard, settings.overload_factor, settings.service_factor)
    sf = f" × service factor {motor.service_factor:g}" if motor.service_factor != 1 else ""
    binds = ("below the smallest size" if motor.binding == "smallest size" else
             f"{motor.binding} bind{'s' if motor.binding != 'RMS and peak' else ''}")
    note = (f"RMS {motor.rms_load:.0%} of the rating{sf} ({basis}), peak {motor.peak_load:.0%} "
            f"(≤ {motor.overload_factor:.0%}); {binds}")
    return motor, note, rms, basis


def _sized_motor(fig: DriveFigures, app: Application,
                 settings: CheckSettings) -> tuple[drive.MotorChoice, str, float, str] | str:
    """:func:`size_motor`, or the reason no motor can be sized."""
    if not (math.isfinite(fig.rms_power) and math.isfinite(fig.peak_power)):
        return "no motor can be sized without the pump's drive power"
    try:
        return size_motor(fig, app, settings)
    except ValueError as exc:
        return f"no standard motor ({exc})"


def _cold_inputs(ctx: _Context) -> tuple[float, float, float, int] | None:
    """At the cold start: temperature [K], viscosity [m²/s], speed [rev/s] and index of the first running
    segment; None without a cold-start temperature or a running segment."""
    app, duty = ctx.app, ctx.duty
    running = np.flatnonzero(duty.speed > 0)
    if app.cold_start_temperature is None or not running.size:
        return None
    i = int(running[0])
    oil = app.oil
    t = app.cold_start_temperature
    nu = float(fluid.viscosity_at(t, oil.nu1, oil.t1, oil.nu2, oil.t2))
    return t, nu, float(duty.speed[i]), i


def _cold_inlet(ctx: _Context) -> Finding:
    """The inlet pressure at the cold start: the pump's flow at the first running segment's speed, drawn
    through the suction line at the cold oil's viscosity."""
    ds, app = ctx.ds, ctx.app
    rule = "inlet.cold-start"
    cold = _cold_inputs(ctx)
    if app.suction is None:  # the stated inlet pressure holds as the user gave it: nothing to compute
        return _not_applicable(rule, "no suction line given (the inlet rules judge the stated inlet pressure)",
                               app.where("suction_diameter"))
    missing = ("no cold-start temperature given" if cold is None else
               "the datasheet states no minimum inlet pressure" if ds.inlet_pressure_min is None else "")
    if missing:
        where = (ds.where("inlet_pressure_min") if app.suction is not None and cold is not None else
                 app.where("suction_diameter" if app.suction is None else "cold_start_temperature"))
        return _not_checked(ctx, rule, missing, where, app.where("cold_start_temperature"), kind=ABS_PRESSURE)
    assert cold is not None and app.suction is not None and ds.inlet_pressure_min is not None
    t, nu, n, _ = cold
    flow = ds.displacement * n  # the pump draws its displacement every turn, whatever it delivers
    terms = suction.inlet(app.suction, flow, nu, app.oil.density_15)
    p = float(terms.inlet)
    lim = ds.inlet_pressure_min
    ok = p >= lim
    text, where = _breakdown(ctx, terms)
    return Finding(rule, PASS if ok else FAIL,
                   f"{_fmt(ctx, ABS_PRESSURE, p)} at the cold start ({_fmt(ctx, TEMPERATURE, t)}, "
                   f"{_fmt(ctx, VISCOSITY, nu)}, {_fmt(ctx, FLOW, flow)} drawn at {_fmt(ctx, SPEED, n)}) "
                   f"{'at or above' if ok else 'below'} the minimum {_fmt(ctx, ABS_PRESSURE, lim)}; {text}",
                   p, lim, _margin(p, lim, False), ABS_PRESSURE, ctx.unit(ABS_PRESSURE), "cold start",
                   0 if ok else 1, None, (), ds.where("inlet_pressure_min"), where)


def _cold_torque(ctx: _Context, sized: tuple[drive.MotorChoice, str, float, str] | str) -> Finding:
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
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    rule = "torque.cold-start"
    cold = _cold_inputs(ctx)
    if cold is None:
        return _not_checked(ctx, rule, "no cold-start temperature given", ds.where("starting_torque"),
                            app.where("cold_start_temperature"), kind=TORQUE)
    t, nu, n, i = cold
    if ds.starting_torque is not None:
        need, how, where = ds.starting_torque, "stated breakaway torque", ds.where("starting_torque")
    else:
        rho = app.oil.density_15
        est = performance.estimate(ds, duty.pressure[i:i + 1], np.array([n]), np.array([nu]), rho, rho)
        if est.basis != "table":
            return _not_checked(ctx, rule, "the datasheet states no breakaway torque and no performance table "
                                "whose viscous loss gives the torque at the cold viscosity",
                                ds.where("starting_torque"), app.where("cold_start_temperature"), kind=TORQUE)
        need = float(est.torque[0])
        how = (f"loss model of the performance table at {_fmt(ctx, VISCOSITY, nu)} and "
               f"{_fmt(ctx, PRESSURE, float(duty.pressure[i]))} ({ctx.label(i)})"
               + (", extrapolated beyond the table" if bool(est.extrapolated[0]) else ""))
        where = ds.where("performance")
    if isinstance(sized, str):
        return _not_checked(ctx, rule, sized, where, kind=TORQUE, measured=need)
    motor = sized[0]  # the motor the comparison shows
    stated = app.motor_starting_torque is not None
    ratio = app.motor_starting_torque if stated else start.locked_rotor_ratio(motor.rated_power, motor.standard)
    assert ratio is not None
    rated = start.rated_torque(motor.rated_power, n)
    have = ratio * rated
    ok = need <= have
    source = ("as stated" if stated else
              "locked-rotor torque of " + ("IEC 60034-12 design N" if motor.standard == "IEC" else
                                           "NEMA MG 1 design B") + ", from memory")
    text = (f"the pump needs {_fmt(ctx, TORQUE, need)} to start at {_fmt(ctx, TEMPERATURE, t)} ({how}); the "
            f"{motor.label} motor gives {ratio:.2g} × {_fmt(ctx, TORQUE, rated)} = {_fmt(ctx, TORQUE, have)} "
            f"({source}" + ("" if ds.starting_torque is not None else
                            "; the pump's torque at the cold viscosity at full speed set against the "
                            "locked-rotor torque, a conservative stand-in for the pull-up torque over the run-up")
            + ")")
    if not ok:
        text += ": it may not bring the pump up to speed cold"
    return Finding(rule, PASS if ok else FAIL, text, need, have, _margin(need, have, True), TORQUE,
                   ctx.unit(TORQUE), "cold start", 0 if ok else 1, None, (), where,
                   app.where("motor_starting_torque" if stated else "cold_start_temperature"))


def _viscosity(ctx: _Context, nu: np.ndarray) -> list[Finding]:
    ds, app = ctx.ds, ctx.app
    out = []
    running = ctx.duty.speed > 0
    if ds.viscosity_min is not None:
        f = _bound(ctx, "viscosity.min", nu, ds.viscosity_min, False, VISCOSITY, ds.where("viscosity_min"),
                   active=running, what="the pump never runs", check_nan=True)
        if f.count:
            short = ds.viscosity_min_short
            hard = int(np.count_nonzero(running & (nu < short))) if short is not None else f.count
            if hard == 0:
                f = _replace(f, severity=WARN, message=f.message + f"; above the short-term minimum "
                             f"{_fmt(ctx, VISCOSITY, short)}: allowed only briefly",
                             where=ds.where("viscosity_min_short"))
            elif short is not None:
                f = _replace(f, message=f.message + f"; {hard} below the short-term minimum "
                             f"{_fmt(ctx, VISCOSITY, short)}")
        out.append(f)
    else:
        out.append(_not_checked(ctx, "viscosity.min", "the datasheet states no minimum viscosity",
                                ds.where("viscosity_min"), kind=VISCOSITY))
    if ds.viscosity_max is not None:
        f = _bound(ctx, "viscosity.max", nu, ds.viscosity_max, True, VISCOSITY, ds.where("viscosity_max"),
                   active=running, what="the pump never runs", check_nan=True)
        if f.count:
            cold = ds.viscosity_max_cold_start
            hard = int(np.count_nonzero(running & (nu > cold))) if cold is not None else f.count
            if hard == 0:
                f = _replace(f, severity=WARN, message=f.message + f"; within the cold-start maximum "
                             f"{_fmt(ctx, VISCOSITY, cold)}: allowed only while starting cold",
                             where=ds.where("viscosity_max_cold_start"))
            elif cold is not None:
                f = _replace(f, message=f.message + f"; {hard} above the cold-start maximum "
                             f"{_fmt(ctx, VISCOSITY, cold)}")
        out.append(f)
    else:
        out.append(_not_checked(ctx, "viscosity.max", "the datasheet states no maximum viscosity",
                                ds.where("viscosity_max"), kind=VISCOSITY))
    t_cold = app.cold_start_temperature
    cold_limit = ds.viscosity_max_cold_start if ds.viscosity_max_cold_start is not None else ds.viscosity_max
    if t_cold is not None and cold_limit is not None:
        oil = app.oil
        nu_cold = float(fluid.viscosity_at(t_cold, oil.nu1, oil.t1, oil.nu2, oil.t2))
        stated = ds.viscosity_max_cold_start is not None
        lim = cold_limit
        ok = nu_cold <= lim
        # Without a stated cold-start maximum the continuous maximum is the only limit known.
        label = "cold-start maximum" if stated else "maximum (no cold-start maximum stated)"
        out.append(Finding("viscosity.cold-start", PASS if ok else FAIL,
                           f"{_fmt(ctx, VISCOSITY, nu_cold)} at the cold start "
                           f"({_fmt(ctx, TEMPERATURE, t_cold)}), {label} {_fmt(ctx, VISCOSITY, lim)}",
                           nu_cold, lim, _margin(nu_cold, lim, True), VISCOSITY, ctx.unit(VISCOSITY),
                           "cold start", 0 if ok else 1, None, (),
                           ds.where("viscosity_max_cold_start" if stated else "viscosity_max"),
                           app.where("cold_start_temperature")))
    elif t_cold is None:
        out.append(_not_checked(ctx, "viscosity.cold-start", "the application states no cold-start "
                                "temperature", ds.where("viscosity_max_cold_start"),
                                app.where("cold_start_temperature"), VISCOSITY))
    else:
        out.append(_not_checked(ctx, "viscosity.cold-start", "the datasheet states no cold-start maximum "
                                "viscosity (nor a maximum)", ds.where("viscosity_max_cold_start"),
                                app.where("cold_start_temperature"), VISCOSITY))
    return out


def _temperature(ctx: _Context) -> list[Finding]:
    ds, duty = ctx.ds, ctx.duty
    out = []
    if ds.temperature_min is not None:
        t_cold = ctx.app.cold_start_temperature  # the oil is coldest at a start
        extra = (((t_cold, "cold start", ctx.app.where("cold_start_temperature")),) if t_cold is not None
                 else ())
        out.append(_bound(ctx, "temperature.min", duty.temperature, ds.temperature_min, False, TEMPERATURE,
                          ds.where("temperature_min"), extra=extra))
    else:
        out.append(_not_checked(ctx, "temperature.min", "the datasheet states no minimum fluid temperature",
                                ds.where("temperature_min"), kind=TEMPERATURE))
    if ds.temperature_max is not None:
        out.append(_bound(ctx, "temperature.max", duty.temperature, ds.temperature_max, True, TEMPERATURE,
                          ds.where("temperature_max")))
    else:
        out.append(_not_checked(ctx, "temperature.max", "the datasheet states no maximum fluid temperature",
                                ds.where("temperature_max"), kind=TEMPERATURE))
    # A margin as a share of a temperature in kelvin says little: take it as a share of the pump's
    # temperature range where both ends are given (e.g. 55 °C against -20…80 °C: 25 K of 100 K = 25 %).
    if ds.temperature_min is not None and ds.temperature_max is not None:
        span = ds.temperature_max - ds.temperature_min
        out = [_replace(f, margin=((f.limit - f.measured) if f.rule == "temperature.max" else
                                   (f.measured - f.limit)) / span)
               if isinstance(f.measured, float) and isinstance(f.limit, float) and span > 0 else f
               for f in out]
    return out


_CODE = re.compile(r"^\s*(\d+|-|\*)\s*/\s*(\d+|-|\*)\s*(?:/\s*(\d+|-|\*)\s*)?$")


def parse_cleanliness(code: str, where: Where | None = None) -> tuple[int | None, int | None, int | None]:
    """ISO 4406 code as three scale numbers (≥4, ≥6, ≥14 µm(c)); ``None`` for a ``-`` or ``*``.

    A two-number code (``"16/13"``) gives the ≥6 and ≥14 µm(c) numbers (ISO 4406: the first number
    may be left out when counting with a microscope).

    >>> parse_cleanliness("18/16/13"), parse_cleanliness("-/15/12"), parse_cleanliness("16/13")
    ((18, 16, 13), (None, 15, 12), (None, 16, 13))
    """
    match = _CODE.match(str(code))
    if not match:
        raise InputError(f"{code!r} is not an ISO 4406 cleanliness code", where or Where(),
                         "write three scale numbers such as '18/16/13'")
    nums = [None if g in (None, "-", "*") else int(g) for g in match.groups()]
    if match.group(3) is None:
        nums = [None, nums[0], nums[1]]
    return nums[0], nums[1], nums[2]


def _cleanliness(ctx: _Context) -> list[Finding]:
    ds, app = ctx.ds, ctx.app
    where = ds.where("cleanliness")
    if ds.cleanliness is None:
        return [_not_checked(ctx, "cleanliness", "the datasheet states no cleanliness code (ISO 4406)", where,
                             app.where("cleanliness"))]
    need = parse_cleanliness(ds.cleanliness, where)
    if app.cleanliness is None:
        return [Finding("cleanliness", NOT_CHECKED, f"not checked: the pump needs {ds.cleanliness} (ISO 4406) "
                        "but the application states no cleanliness code", None, ds.cleanliness, None, None, "",
                        "system", 0, None, (), where, app.where("cleanliness"))]
    have = parse_cleanliness(app.cleanliness, app.where("cleanliness"))
    pairs = [(h, r) for h, r in zip(have, need, strict=True) if r is not None and h is not None]
    missing = any(r is not None and h is None for h, r in zip(have, need, strict=True))
    worse = [h > r for h, r in pairs]
    margin = min(((r - h) / max(r, 1) for h, r in pairs), default=None)
    if any(worse):
        sev, word = FAIL, "worse than"
    elif missing or not pairs:
        sev, word = WARN, "cannot be fully compared with"
    else:
        sev, word = PASS, "no worse than"
    return [Finding("cleanliness", sev, f"system {app.cleanliness} is {word} the required {ds.cleanliness} "
                    "(ISO 4406, number by number)", app.cleanliness, ds.cleanliness, margin, None, "",
                    "system", int(sum(worse)), None, (), where, app.where("cleanliness"))]


_ROTATION = {
    "cw": "cw", "clockwise": "cw", "right": "cw", "right-hand": "cw", "r": "cw",
    "ccw": "ccw", "counter-clockwise": "ccw", "counterclockwise": "ccw", "anticlockwise": "ccw",
    "anti-clockwise": "ccw", "left": "ccw", "left-hand": "ccw", "l": "ccw",
    "either": "either", "both": "either", "reversible": "either", "bidirectional": "either",
    "bi-directional": "either",
}


def _rotation_of(text: str, where: Where) -> str:
    key = str(text).strip().lower().replace("_", "-").replace(" ", "-")
    if key not in _ROTATION:
        raise InputError(f"{text!r} is not a direction of rotation", where,
                         "write 'clockwise', 'counter-clockwise' or 'either' (seen from the shaft end)")
    return _ROTATION[key]


def _rotation(ctx: _Context) -> list[Finding]:
    ds, app = ctx.ds, ctx.app
    if ds.rotation is None:
        return [_not_checked(ctx, "rotation", "the datasheet states no direction of rotation",
                             ds.where("rotation"), app.where("rotation"))]
    if app.rotation is None:
        return [_not_checked(ctx, "rotation", "the application states no direction of rotation",
                             ds.where("rotation"), app.where("rotation"))]
    pump = _rotation_of(ds.rotation, ds.where("rotation"))
    drive_dir = _rotation_of(app.rotation, app.where("rotation"))
    # a one-way pump on a drive that turns both ways does not match
    ok = pump == "either" or pump == drive_dir
    return [Finding("rotation", PASS if ok else FAIL,
                    f"pump {ds.rotation}, drive {app.rotation}: {'matches' if ok else 'does not match'}",
                    app.rotation, ds.rotation, None, None, "", "shaft", 0 if ok else 1, None, (),
                    ds.where("rotation"), app.where("rotation"))]


def _torque(ctx: _Context, est: performance.Estimate, nu: np.ndarray) -> list[Finding]:
    ds = ctx.ds
    if ds.torque_max is None:
        return [_not_checked(ctx, rule, "the datasheet states no shaft torque limit", ds.where("torque_max"),
                             kind=TORQUE) for rule in ("torque.max", "torque.relief")]
    if np.isnan(est.torque).all():
        return [_not_checked(ctx, rule, "the datasheet states no efficiency to compute the shaft torque from",
                             ds.where("total_efficiency"), kind=TORQUE) for rule in ("torque.max", "torque.relief")]
    f = _bound(ctx, "torque.max", est.torque, ds.torque_max, True, TORQUE, ds.where("torque_max"),
               check_nan=True)
    return [_unproven(f, est), _stall_torque(ctx, nu)]


def _unproven(f: Finding, est: performance.Estimate) -> Finding:
    if not est.total_known and f.severity == PASS:
        # only η_v stated: η_hm = 1 was assumed, so the torque is too low and a pass is not proven
        return _replace(f, severity=WARN, message=f.message + "; not proven: no total efficiency stated "
                        "(η_hm = 1 assumed)")
    return f


def _stall_torque(ctx: _Context, nu: np.ndarray) -> Finding:
    """Shaft torque when a stalled actuator puts the relief setting plus overshoot on the pump:
    T = V·Δp / (2π·η_hm), η_hm at that pressure, at the duty's extreme speeds and viscosities (the
    loss models rise with both, so the corners bound every running segment); common practice is to
    check shaft and coupling there."""
    ds, app, duty = ctx.ds, ctx.app, ctx.duty
    p_stall = app.relief_setting * (1 + app.overshoot)
    running = duty.speed > 0
    n = duty.speed[running] if running.any() else duty.speed
    v = nu[running] if running.any() else nu
    speeds = np.array([n.min(), n.max(), n.min(), n.max()])
    visc = np.array([v.min(), v.min(), v.max(), v.max()])
    rho = app.oil.density_15
    est = performance.estimate(ds, np.full(4, p_stall), speeds, visc, rho, rho)
    torque = est.torque
    if np.isnan(torque).all():
        return _not_checked(ctx, "torque.relief", "the datasheet states no efficiency to compute the shaft "
                            "torque from", ds.where("total_efficiency"), kind=TORQUE)
    i = int(np.nanargmax(torque))
    worst = float(torque[i])
    limit = float(ds.torque_max)
    ok = worst <= limit
    text = (f"{_fmt(ctx, TORQUE, worst)} at the relief setting {_fmt(ctx, PRESSURE, app.relief_setting)} + "
            f"{app.overshoot:.0%} overshoot = {_fmt(ctx, PRESSURE, p_stall)} (η_hm "
            f"{float(est.hydromechanical_efficiency[i]):.4g} at {_fmt(ctx, SPEED, float(speeds[i]))}, "
            f"{_fmt(ctx, VISCOSITY, float(visc[i]))}), {'within' if ok else 'above'} the shaft's limit "
            f"{_fmt(ctx, TORQUE, limit)}")
    f = Finding("torque.relief", PASS if ok else FAIL, text, worst, limit, _margin(worst, limit, True), TORQUE,
                ctx.unit(TORQUE), "stall at the relief setting", 0 if ok else 1, None, (),
                ds.where("torque_max"), app.where("relief_setting"))
    return _unproven(f, est)


def _basis(ctx: _Context, est: performance.Estimate) -> Finding:
    ds = ctx.ds
    notes = "; ".join(est.notes)
    if est.basis == "table":
        n_extra = int(np.count_nonzero(est.extrapolated))
        share = float(np.sum(ctx.duty.duration, where=est.extrapolated) / ctx.cycle) if ctx.cycle else 0.0
        where = ds.performance.where if ds.performance is not None else ds.where("performance")
        if n_extra:
            return Finding("performance.basis", WARN, f"{notes}; {n_extra} segment(s) outside the table's "
                           "range (extrapolated)", None, None, None, None, "", "", n_extra, share,
                           ctx.listed(est.extrapolated), where)
        return Finding("performance.basis", INFO, notes, where=where)
    field_name = "volumetric_efficiency" if ds.volumetric_efficiency is not None else "total_efficiency"
    return Finding("performance.basis", WARN, notes, None, None, None, None, "", "all segments",
                   0, None, (), ds.where(field_name))


def _drive(ctx: _Context, est: performance.Estimate, nu: np.ndarray) -> DriveFigures:
    duty = ctx.duty
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
        rms = float(drive.rms_power(p, t))
        mean = float(drive.mean_power(p, t))
        mean_loss = float(np.dot(lo, t) / np.sum(t))
    # The flow a fixed pump delivers beyond what the machine takes goes to tank, and all of it becomes heat
    # in the oil. It leaves the pump at the pump's outlet pressure, which is the duty's pressure: the ratings
    # and the input power are taken there too, so the heat can never exceed the power drawn (first law).
    # Where the surplus goes over the relief valve or a throttle, the pump runs at that pressure, and the
    # duty must say so (then the ratings see it too); where it runs lower, the surplus returns through an
    # unloading or open-centre path at that pressure.
    app = ctx.app
    path = (f"to tank at each segment's pump pressure; over the relief valve where the duty runs at its "
            f"setting of {_fmt(ctx, PRESSURE, app.relief_setting)}")
    surplus = np.clip(np.nan_to_num(est.flow) - duty.flow, 0.0, None) * duty.pressure
    mean_surplus = float(np.dot(surplus, duty.duration) / ctx.cycle) if ctx.cycle > 0 else math.nan
    return DriveFigures(
        duty.duration, nu, est.volumetric_efficiency, est.total_efficiency, est.flow, est.torque, power,
        hyd, loss, float(np.max(est.torque)) if len(duty) else math.nan,
        float(np.max(power)) if len(duty) else math.nan, rms, mean, mean_loss,
        float(np.dot(power, duty.duration)), est.basis, surplus, mean_surplus, path)


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
    return np.asarray(fluid.viscosity_at(application.duty.temperature, oil.nu1, oil.t1, oil.nu2, oil.t2), float)


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
    ctx = _Context(datasheet, application, duty, settings, duty.cycle_time)
    oil = application.oil
    # The supplier's test oil is rarely stated: its kinematic viscosities and the duty's are turned into
    # dynamic ones with one density, so the loss model sees the ratio of kinematic viscosities.
    est = estimate if estimate is not None else \
        performance.estimate(datasheet, duty.pressure, duty.speed, nu, oil.density_15, oil.density_15)
    findings: list[Finding] = []
    findings += _speed(ctx)
    findings += _pressure(ctx)
    findings.append(_flow(ctx, est))
    line = None
    if application.suction is not None:
        # the pump draws its displacement every turn; the internal leakage returns inside the pump
        line = suction.inlet(application.suction, datasheet.displacement * duty.speed, nu, oil.density_15)
    findings += _inlet(ctx, line)
    findings.append(_cold_inlet(ctx))
    findings += _viscosity(ctx, nu)
    findings += _temperature(ctx)
    findings += _cleanliness(ctx)
    findings += _torque(ctx, est, nu)
    findings += _rotation(ctx)
    findings.append(_basis(ctx, est))
    figures = _drive(ctx, est, nu)
    sized = _sized_motor(figures, application, settings)
    findings.append(_cold_torque(ctx, sized))
    return CheckResult(datasheet, application, findings, figures, settings, line, sized)
