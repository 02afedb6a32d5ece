"""Which size of each supplier's series does the machine need? The domain decision of ``sheetpump select``.

A :class:`SizeSeries` is one supplier's series: one :class:`~sheetpump.datasheet.Datasheet` per size (read
by :mod:`sheetpump.workbooks.size_series`). :func:`select` checks every size of every series with the rules of
:func:`sheetpump.checks.check`, sizes the motor and prices the energy as :mod:`sheetpump.comparison`
does, and proposes per series **the smallest displacement that fails no rule** (ties: the lower
price, then the lower drive power). It says why each smaller size fails (its failing rules and margins)
and the margin of the next size up; a series with no passing size says why its largest size fails.

Where the application gives a drive speed range, the speed is a choice too, but only where the duty leaves
it to the drive: running segments whose speed is the range's lowest or highest value
(:func:`takes_drive_speed`) take, in turn, the motor's standard speeds (4-pole and 6-pole at the mains
frequency, less a typical slip) that lie inside the range, and the speed at which the smallest size passes
is proposed (ties: the lower speed, kinder to the pump). A speed typed inside the range is the user's and
is kept, so a size is judged at the speed ``check`` uses.

Shared work: the duty is validated and the oil viscosity computed once per speed for every size
(:func:`sheetpump.checks.prepare`); sizes of one frame whose performance table is the frame's table
scaled by displacement share one fit of the loss model: with flow, torque and displacement scaled by the
same factor k, Wilson's coefficients are unchanged and the efficiencies at every duty point are the same,
so flow, torque and power are the reference size's times k.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from . import performance
from .checks import FAIL, INFO, NOT_CHECKED, PASS, WARN, CheckSettings, Finding, check, prepare
from .comparison import Candidate, compare_results
from .datasheet import Datasheet
from .duty import Application
from .errors import InputError

__all__ = ["SLIP", "STANDARD_POLES", "Selection", "SeriesChoice", "SizeSeries", "motor_speeds", "select",
           "takes_drive_speed"]

#: Pole numbers of the standard motor speeds tried for a variable drive speed.
STANDARD_POLES = (4, 6)
#: Slip of a standard induction motor at its rating: a few percent (common practice); 3 % is assumed.
SLIP = 0.03


@dataclass(frozen=True)
class SizeSeries:
    """One supplier's series: a datasheet per size, and what was assumed to fill them.

    ``scaled`` maps a size's model to ``(reference model, k)`` where its performance table is the
    reference size's (same frame) scaled by the displacement ratio k; ``assumptions`` says so in words.
    """

    name: str
    sizes: tuple[Datasheet, ...]
    file: str = ""
    scaled: dict[str, tuple[str, float]] = field(default_factory=dict)
    assumptions: tuple[str, ...] = ()


@dataclass(frozen=True)
class SeriesChoice:
    """The sizes of one series on the application, smallest displacement first, and the proposal."""

    series: SizeSeries
    candidates: list[Candidate]  # one per size, by displacement
    proposed: int | None  # index into candidates; None: no size passes
    reasons: list[str]  # one short text per size: why it fails, or its margin
    summary: str  # the proposal (or why none), in one sentence
    speed: float | None = None  # proposed drive speed [rev/s] where the application gives a range
    speed_note: str = ""

    @property
    def choice(self) -> Candidate | None:
        """The proposed size's candidate."""
        return None if self.proposed is None else self.candidates[self.proposed]


@dataclass(frozen=True)
class Selection:
    """Every series on one application."""

    application: Application
    choices: list[SeriesChoice]
    settings: CheckSettings = field(default_factory=CheckSettings)
    mains_frequency: float = 50.0  # [Hz]

    @property
    def verdict(self) -> str:
        """``fail`` when a series has no size that fails no rule, ``warn`` when a proposed size passes with
        warnings, else ``pass``."""
        if any(c.proposed is None for c in self.choices):
            return FAIL
        return WARN if any(c.choice is not None and c.choice.result.verdict == WARN for c in self.choices) else PASS


def motor_speeds(frequency: float, poles: Sequence[int] = STANDARD_POLES, slip: float = SLIP) -> np.ndarray:
    """Rated speeds of standard induction motors [rev/s]: n = 2·f/p·(1 − s).

    Parameters
    ----------
    frequency : float
        Mains frequency f [Hz].
    poles : sequence of int
        Pole numbers p (4-pole: 1500 rpm synchronous at 50 Hz).
    slip : float
        Slip s at the rating [-].

    >>> [round(float(n) * 60) for n in motor_speeds(50.0)], [round(float(n) * 60) for n in motor_speeds(60.0)]
    ([1455, 970], [1746, 1164])

    References
    ----------
    Synchronous speed 120·f/p in rpm (any electrical machines textbook); the slip is common practice.
    """
    return np.array([2.0 * frequency / p * (1.0 - slip) for p in poles])


def _margin_text(f: Finding) -> str:
    return f"{f.rule} {f.margin:+.1%}" if f.margin is not None and math.isfinite(f.margin) else f.rule


def failing(c: Candidate) -> list[Finding]:
    """The findings that make a size fail (warnings too with strict settings), worst margin first."""
    bad = {FAIL} | ({WARN} if c.result.settings.strict else set())
    found = [f for f in c.result.findings if f.severity in bad]
    return sorted(found, key=lambda f: f.margin if f.margin is not None and math.isfinite(f.margin) else -math.inf)


#: Rules that judge the application alone (the same for every size): left out of a size's worst margin.
APPLICATION_RULES = frozenset({"pressure.duty-relief"})


def worst(c: Candidate) -> Finding | None:
    """The judged finding of the pump with the smallest margin (a failing one first)."""
    bad = failing(c)
    if bad:
        return bad[0]
    judged = [f for f in c.result.findings if f.severity not in (INFO, NOT_CHECKED) and f.margin is not None
              and math.isfinite(f.margin) and f.rule not in APPLICATION_RULES]
    return min(judged, key=lambda f: f.margin, default=None)  # type: ignore[arg-type, return-value]


def _estimates(series: SizeSeries, sizes: Sequence[Datasheet], app: Application,
               nu: np.ndarray) -> list[performance.Estimate | None]:
    """Estimates of the sizes whose table is a frame table scaled by displacement: one fit per frame."""
    by_model = {d.model: d for d in sizes}
    out: list[performance.Estimate | None] = []
    cache: dict[str, performance.Estimate] = {}
    duty, rho = app.duty, app.oil.density_15
    references = {m for m, _ in series.scaled.values()}
    for ds in sizes:
        ref = series.scaled.get(ds.model) or ((ds.model, 1.0) if ds.model in references else None)
        if ref is None or ref[0] not in by_model:
            out.append(None)
            continue
        model, k = ref
        if model not in cache:
            cache[model] = performance.estimate(by_model[model], duty.pressure, duty.speed, nu, rho, rho)
        e = cache[model]
        out.append(e if k == 1.0 else
                   dataclasses.replace(e, flow=e.flow * k, torque=e.torque * k, input_power=e.input_power * k))
    return out


def _drive_power(c: Candidate) -> tuple[float, float]:
    """RMS, then peak shaft power [W] (unknown: last)."""
    d = c.result.drive
    return tuple(x if math.isfinite(x) else math.inf for x in (d.rms_power, d.peak_power))  # type: ignore[return-value]


def _evaluate(series: SizeSeries, app: Application, settings: CheckSettings,
              nu: np.ndarray) -> tuple[list[Candidate], int | None]:
    sizes = sorted(series.sizes, key=lambda d: d.displacement)
    estimates = _estimates(series, sizes, app, nu)
    results = [check(ds, app, settings, viscosity=nu, estimate=est) for ds, est in zip(sizes, estimates, strict=True)]
    candidates = compare_results(results, app, settings).candidates
    passing = [i for i, c in enumerate(candidates) if c.result.verdict != FAIL]
    if not passing:
        return candidates, None
    smallest = candidates[passing[0]].datasheet.displacement
    tied = [i for i in passing if math.isclose(candidates[i].datasheet.displacement, smallest, rel_tol=1e-9)]
    best = min(tied, key=lambda i: (candidates[i].datasheet.price is None, candidates[i].datasheet.price or 0.0,
                                    _drive_power(candidates[i]), i))
    return candidates, best


def _reasons(candidates: list[Candidate], proposed: int | None) -> tuple[list[str], str]:
    reasons = []
    for i, c in enumerate(candidates):
        bad = failing(c)
        w = worst(c)
        if bad:
            text = "fails: " + ", ".join(_margin_text(f) for f in bad[:4]) + (" …" if len(bad) > 4 else "")
        else:
            text = "passes" if c.result.verdict == PASS else "passes with warnings"
            if w is not None:
                text += f"; worst margin {_margin_text(w)}"
        if i == proposed:
            text = "proposed; " + text
        elif proposed is not None and i == proposed + 1:
            text = "next size up; " + text
        reasons.append(text)
    if proposed is None:
        last = candidates[-1]
        summary = (f"no size passes: the largest, {last.datasheet.model}, "
                   + reasons[-1].replace("proposed; ", ""))
        return reasons, summary
    c = candidates[proposed]
    parts = [f"{c.datasheet.model} ({c.datasheet.displacement * 1e6:.3g} cm³/rev), the smallest size that "
             "fails no rule" + (" (passes with warnings)" if c.result.verdict == WARN else "")]
    w = worst(c)
    if w is not None:
        parts.append(f"worst margin {_margin_text(w)}")
    smaller = [f"{candidates[i].datasheet.model} {reasons[i]}" for i in range(proposed)]
    if smaller:
        parts.append("smaller: " + "; ".join(smaller))
    if proposed + 1 < len(candidates):
        up = candidates[proposed + 1]
        wu = worst(up)
        parts.append(f"next size up {up.datasheet.model}: "
                     + (f"worst margin {_margin_text(wu)}" if wu is not None else up.result.verdict))
    return reasons, "; ".join(parts)


def takes_drive_speed(app: Application) -> np.ndarray:
    """Which duty segments take the drive's speed, to be chosen: running segments whose speed is the
    limit of the application's speed range (its lowest or highest). Other typed speeds are the user's.

    >>> from sheetpump.duty import Duty, Oil
    >>> duty = Duty(duration=np.ones(3), pressure=np.full(3, 100e5), flow=np.full(3, 1e-4),
    ...             speed=np.array([1600, 1200, 0]) / 60, temperature=np.full(3, 323.15),
    ...             inlet_pressure=np.full(3, 1e5))
    >>> app = Application("invented", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=200e5,
    ...                   speed_min=15.0, speed_max=1600 / 60)
    >>> takes_drive_speed(app).tolist()
    [True, False, False]
    """
    speed = app.duty.speed
    if app.speed_min is None or app.speed_max is None:
        return np.zeros(speed.shape, dtype=bool)
    limit = np.isclose(speed, app.speed_min, rtol=1e-9, atol=0.0) | np.isclose(speed, app.speed_max, rtol=1e-9,
                                                                                  atol=0.0)
    return (speed > 0) & limit


def _at_speed(app: Application, speed: float) -> Application:
    """The application with the segments that take the drive's speed (:func:`takes_drive_speed`) at
    ``speed`` [rev/s]; typed speeds kept. Where every running segment takes it, the drive is fixed at it."""
    duty, taking = app.duty, takes_drive_speed(app)
    new = dataclasses.replace(duty, speed=np.where(taking, speed, duty.speed))
    fixed = bool(np.all(taking | (duty.speed <= 0)))
    return dataclasses.replace(app, duty=new, speed_min=speed if fixed else app.speed_min,
                               speed_max=speed if fixed else app.speed_max)


def select(series: Sequence[SizeSeries], application: Application, settings: CheckSettings | None = None,
           mains_frequency: float | None = None) -> Selection:
    """Check every size of every series and propose the size (and, for a speed range, the speed).

    Parameters
    ----------
    series : sequence of SizeSeries
        The suppliers' series.
    application : Application
        The machine: settings and duty cycle.
    settings : CheckSettings, optional
        Display units and strictness, as for :func:`sheetpump.checks.check`.
    mains_frequency : float, optional
        Mains frequency [Hz] for the standard motor speeds; default 50 Hz for IEC motors, 60 Hz for NEMA.

    Returns
    -------
    Selection
        One :class:`SeriesChoice` per series, in the order given.

    Examples
    --------
    An invented series of three sizes with a stated η_v = 0.90 on a duty of 35 L/min at 1500 rpm: the
    geometric flow of 25 cm³/rev is 37.5 L/min, 33.75 L/min after leakage (too little); 28 cm³/rev gives
    37.8 L/min:

    >>> from sheetpump.duty import Duty, Oil
    >>> duty = Duty(duration=np.array([10.0]), pressure=np.array([150e5]), flow=np.array([35 / 60000]),
    ...             speed=np.array([25.0]), temperature=np.array([323.15]), inlet_pressure=np.array([1e5]))
    >>> app = Application("invented press", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=200e5)
    >>> sizes = tuple(Datasheet("Invented", f"S-{v}", v * 1e-6, 8.0, 50.0, 210e5, 250e5,
    ...                         volumetric_efficiency=0.90, total_efficiency=0.80) for v in (25, 28, 32))
    >>> choice = select([SizeSeries("S", sizes)], app).choices[0]
    >>> choice.choice.datasheet.model, choice.reasons[0]
    ('S-28', 'fails: flow.delivered -3.6%')
    """
    settings = settings or CheckSettings()
    std = application.motor_standard
    frequency = mains_frequency if mains_frequency is not None else (60.0 if std == "NEMA" else 50.0)
    if not (math.isfinite(frequency) and frequency > 0):
        raise InputError(f"mains frequency {frequency!r} is not a positive number", hint="give e.g. 50 or 60 Hz")
    low, high = application.speed_min, application.speed_max
    speeds: list[float | None] = [None]
    ranged = low is not None and high is not None and high > low
    taking = takes_drive_speed(application) if ranged else np.zeros(0, dtype=bool)
    typed = int(np.count_nonzero((application.duty.speed > 0) & ~taking)) if ranged else 0
    if ranged and taking.any():
        inside = [float(n) for n in sorted(motor_speeds(frequency)) if low <= n <= high]  # type: ignore[operator]
        speeds = inside or [None]
    apps = {s: application if s is None else _at_speed(application, s) for s in speeds}
    nus = {s: prepare(a) for s, a in apps.items()}
    choices = []
    for one in series:
        if not one.sizes:
            raise InputError("the series has no sizes", hint="give one size per column from column C")
        best: tuple[tuple[float, float], list[Candidate], int | None, float | None] | None = None
        for s in speeds:
            candidates, proposed = _evaluate(one, apps[s], settings, nus[s])
            key = (candidates[proposed].datasheet.displacement if proposed is not None else math.inf,
                   s if s is not None else 0.0)
            if best is None or key < best[0]:
                best = (key, candidates, proposed, s)
        assert best is not None
        _, candidates, proposed, speed = best
        reasons, summary = _reasons(candidates, proposed)
        note = ""
        kept = (f"; the {typed} running segment{'s' if typed != 1 else ''} with a typed speed inside the range "
                "keep it") if typed else ""
        if speed is not None:
            tried = ", ".join(f"{n * 60:.0f}" for n in speeds if n is not None)
            note = (f"drive speed {speed * 60:.0f} rpm proposed for the segments at the range's limit: standard "
                    f"motor speeds inside the range ({tried} rpm; {'/'.join(f'{p}-pole' for p in STANDARD_POLES)} "
                    f"at {frequency:g} Hz less {SLIP:.0%} slip, an assumption) tried, this one gives the smallest "
                    f"passing size{kept}")
            summary = f"{summary}; {note}"
        elif ranged and not taking.any():
            note = ("checked at the duty's typed speeds: no running segment is at the drive range's lowest or "
                    "highest speed, so no standard motor speed is tried (type a segment's speed as the range's "
                    "limit to have select choose it)")
        elif ranged:
            note = (f"no standard motor speed ({', '.join(f'{n * 60:.0f}' for n in motor_speeds(frequency))} rpm "
                    f"at {frequency:g} Hz) lies in the drive's speed range: checked at the duty's speeds")
        choices.append(SeriesChoice(one, candidates, proposed, reasons, summary, speed, note))
    return Selection(application, choices, settings, frequency)
