"""The electric drive: duty-cycle loads, standard motor sizes, motor efficiency and energy.

Pure functions of SI numbers or numpy arrays: powers in W, durations in s, energy in J, efficiencies
as fractions. No units, files or spreadsheets here.

A duty cycle is a sequence of segments, each a shaft power held for a duration. The motor is sized
on two numbers of that cycle: the RMS power (its thermal load, compared with the continuous rating,
times a service factor where one is used) and the peak power (compared with k times the rating, the
torque the motor carries without stalling). For a cycle longer than the motor's thermal time (a long
measured series) the RMS is taken over the worst window of that time (:func:`worst_window_rms`).
Energy is drawn at the part-load efficiency (:func:`motor_input_power`), so an oversized motor costs
energy.

Standard tables in this module, each with its source:

* :data:`IEC_RATINGS_KW` -- rated outputs of IEC 60072-1 (the output series also used by the rows of
  IEC 60034-30-1), 0.12 kW to 1000 kW (from memory).
* :data:`NEMA_RATINGS_HP` -- horsepower ratings of NEMA MG 1 for polyphase induction motors, fractional
  1/4 to 3/4 hp and integral 1 to 500 hp (from memory).
* :data:`IE3_4POLE_50HZ` -- IE3 (premium) minimum efficiencies of IEC 60034-30-1:2014, 4-pole 50 Hz
  (from memory; the 0.75 kW to 7.5 kW rows checked against the IE3 column of IEC 60034-30:2008 as
  reproduced in motor makers' catalogues).
* :data:`NEMA_PREMIUM_4POLE_ENCLOSED` -- NEMA Premium nominal full-load efficiencies, NEMA MG 1
  Table 12-12, 4-pole enclosed motors (from memory; 1 hp to 200 hp agree with the same values in
  10 CFR 431.25 and the Canadian regulation used by the ``fluids`` library).

Horsepower here is the mechanical horsepower, 550 ft·lbf/s = 745.699 872 W, the one ``pint`` and
``fluids`` use; NEMA MG 1 rounds it to 746 W, a difference of 0.00004 %.

References
----------
.. [1] IEC 60034-1, Rotating electrical machines -- Part 1: Rating and performance (duty types S1 to
   S10; momentary excess torque, clause 9.4; occasional excess current, clause 9.3; from memory).
.. [2] IEC 60034-30-1:2014, Rotating electrical machines -- Part 30-1: Efficiency classes of line
   operated AC motors (IE code) (from memory).
.. [3] IEC 60072-1, Dimensions and output series for rotating electrical machines -- Part 1: Frame
   numbers 56 to 400 and flange numbers 55 to 1080 (from memory).
.. [4] NEMA MG 1, Motors and Generators (horsepower ratings; Table 12-12, NEMA Premium efficiency;
   breakdown torque of Design B motors, 12.39; from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ..errors import PhysicsError
from .validate import non_negative, plain, positive, require_efficiency

__all__ = [
    "HP",
    "IE3_4POLE_50HZ",
    "IEC_OVERLOAD_FACTOR",
    "IEC_RATINGS_KW",
    "J_PER_KWH",
    "NEMA_OVERLOAD_FACTOR",
    "NEMA_PREMIUM_4POLE_ENCLOSED",
    "NEMA_RATINGS_HP",
    "PART_LOAD_CONSTANT_SHARE",
    "STANDARDS",
    "THERMAL_WINDOW",
    "MotorChoice",
    "electrical_energy",
    "mean_power",
    "motor_efficiency",
    "motor_input_power",
    "motor_rating",
    "rms_power",
    "select_motor",
    "standard_ratings",
    "worst_window_rms",
]

Number = float | np.ndarray

#: One mechanical horsepower, 550 ft·lbf/s [W] (0.3048 m/ft × 4.4482216152605 N/lbf × 550 =
#: 745.699 871 582 270 22 W), as the float pint and fluids compute it, so that "15 hp" converted by
#: :mod:`sheetpump.units` is exactly 15 × HP.
HP = 745.6998715822701

#: Joules in a kilowatt-hour (exact): energy in J to the kWh a bill counts.
J_PER_KWH = 3.6e6

#: IEC rated outputs [kW], IEC 60072-1 output series (from memory). Up to 200 kW these are the rows of
#: the IEC 60034-30-1 efficiency tables (which also list 0.20 kW and 0.40 kW, left out here as they are
#: not in the output series); 560 kW to 1000 kW continue the same series to the upper end of
#: IEC 60034-30-1's scope.
IEC_RATINGS_KW: tuple[float, ...] = (
    0.12, 0.18, 0.25, 0.37, 0.55, 0.75, 1.1, 1.5, 2.2, 3.0, 4.0, 5.5, 7.5, 11.0, 15.0, 18.5, 22.0,
    30.0, 37.0, 45.0, 55.0, 75.0, 90.0, 110.0, 132.0, 160.0, 200.0, 250.0, 315.0, 355.0, 400.0,
    450.0, 500.0, 560.0, 630.0, 710.0, 800.0, 900.0, 1000.0,
)

#: NEMA MG 1 horsepower ratings of polyphase induction motors [hp] (from memory): fractional
#: 1/4, 1/3, 1/2, 3/4 hp and integral 1 to 500 hp.
NEMA_RATINGS_HP: tuple[float, ...] = (
    0.25, 1.0 / 3.0, 0.5, 0.75, 1.0, 1.5, 2.0, 3.0, 5.0, 7.5, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0,
    60.0, 75.0, 100.0, 125.0, 150.0, 200.0, 250.0, 300.0, 350.0, 400.0, 450.0, 500.0,
)

#: IE3 minimum efficiencies, 4-pole 50 Hz, IEC 60034-30-1:2014 [(kW, %)] (from memory). The standard
#: gives 96.0 % for every rating from 200 kW to 1000 kW.
IE3_4POLE_50HZ: tuple[tuple[float, float], ...] = (
    (0.12, 64.8), (0.18, 69.9), (0.25, 73.5), (0.37, 77.3), (0.55, 80.8), (0.75, 82.5), (1.1, 84.1),
    (1.5, 85.3), (2.2, 86.7), (3.0, 87.7), (4.0, 88.6), (5.5, 89.6), (7.5, 90.4), (11.0, 91.4),
    (15.0, 92.1), (18.5, 92.6), (22.0, 93.0), (30.0, 93.6), (37.0, 93.9), (45.0, 94.2), (55.0, 94.6),
    (75.0, 95.0), (90.0, 95.2), (110.0, 95.4), (132.0, 95.6), (160.0, 95.8), (200.0, 96.0),
    (1000.0, 96.0),
)

#: NEMA Premium nominal full-load efficiencies, NEMA MG 1 Table 12-12, 4-pole enclosed [(hp, %)]
#: (from memory). The table starts at 1 hp.
NEMA_PREMIUM_4POLE_ENCLOSED: tuple[tuple[float, float], ...] = (
    (1.0, 85.5), (1.5, 86.5), (2.0, 86.5), (3.0, 89.5), (5.0, 89.5), (7.5, 91.7), (10.0, 91.7),
    (15.0, 92.4), (20.0, 93.0), (25.0, 93.6), (30.0, 93.6), (40.0, 94.1), (50.0, 94.5), (60.0, 95.0),
    (75.0, 95.4), (100.0, 95.4), (125.0, 95.4), (150.0, 95.8), (200.0, 96.2), (250.0, 96.2),
    (300.0, 96.2), (350.0, 96.2), (400.0, 96.2), (450.0, 96.2), (500.0, 96.2),
)

#: Default peak allowance of an IEC motor: IEC 60034-1 clause 9.4 (momentary excess torque, from
#: memory) asks a polyphase induction motor to carry 60 % excess torque for 15 s without stalling.
IEC_OVERLOAD_FACTOR = 1.6

#: Default peak allowance of a NEMA motor; see :func:`motor_rating` for why it is not the service factor.
NEMA_OVERLOAD_FACTOR = 1.6

#: Default thermal time of a motor [s] over which the RMS load of a long series is taken: 10 min, the
#: order of the thermal time constant of small and medium totally enclosed motors (common practice).
THERMAL_WINDOW = 600.0

#: Share of a motor's full-load losses that does not change with load (iron, friction, fan), fitted so
#: that the efficiency at half load equals the full-load efficiency: with losses L0 + Lc·x² (x the load
#: fraction), η(½) = η(1) gives L0 + Lc/4 = (L0 + Lc)/2, so L0 = Lc/2 = 1/3 of the full-load losses and
#: the efficiency peaks at x = 1/√2 ≈ 71 % load. Typical of IE3 4-pole induction motors, whose
#: efficiency is nearly flat between half and full load and peaks near three-quarter load (from memory;
#: the part-load columns of motor makers' catalogues, and the part-load curves of the US DOE fact sheet
#: "Determining electric motor load and efficiency").
PART_LOAD_CONSTANT_SHARE = 1.0 / 3.0

#: The motor standards sheetpump knows, as written in a cell.
STANDARDS = ("IEC", "NEMA")

# A load within one part in 10⁹ of a rating counts as covered: unit conversions of "15 hp" or
# "11 kW" round in the last digit, and a rating must not be skipped for that.
_REL_TOL = 1e-9

_SERIES_W = {
    "IEC": np.array(IEC_RATINGS_KW) * 1000.0,
    "NEMA": np.array(NEMA_RATINGS_HP) * HP,
}
_EFF_TABLES = {
    "IEC": (np.log(np.array([p for p, _ in IE3_4POLE_50HZ]) * 1000.0),
            np.array([e for _, e in IE3_4POLE_50HZ]) / 100.0),
    "NEMA": (np.log(np.array([p for p, _ in NEMA_PREMIUM_4POLE_ENCLOSED]) * HP),
             np.array([e for _, e in NEMA_PREMIUM_4POLE_ENCLOSED]) / 100.0),
}
_OVERLOAD = {"IEC": IEC_OVERLOAD_FACTOR, "NEMA": NEMA_OVERLOAD_FACTOR}
_FRACTIONS = {0.25: "1/4", 1.0 / 3.0: "1/3", 0.5: "1/2", 0.75: "3/4"}


def _standard(standard: str) -> str:
    text = standard.strip().upper() if isinstance(standard, str) else None
    if text not in STANDARDS:
        raise PhysicsError("standard", f"must be 'IEC' or 'NEMA', not {standard!r}")
    return text


def _segments(power: ArrayLike, duration: ArrayLike, axis: int | None,
              power_name: str = "power") -> tuple[np.ndarray, np.ndarray, int]:
    """Validated, broadcast power and duration arrays and the axis that runs over the segments."""
    p = np.asarray(power, dtype=float)
    t = np.asarray(duration, dtype=float)
    non_negative(p, power_name)
    positive(t, "duration")
    if axis is None:
        # One cycle: a range of powers against a range of durations, in reading order. A row and a
        # column of the same length are the same cycle; a single duration applies to every segment.
        if p.size != t.size and p.size != 1 and t.size != 1:
            raise PhysicsError("duration", f"has {t.size} segments where {power_name} has {p.size}")
        p, t = np.broadcast_arrays(p.ravel(), t.ravel())
        axis = 0
    else:
        try:
            p, t = np.broadcast_arrays(p, t)
        except ValueError:
            raise PhysicsError("duration", f"of shape {t.shape} does not match {power_name} of shape "
                               f"{p.shape}") from None
    if p.ndim == 0 or p.shape[axis] == 0:
        raise PhysicsError("duration", "needs at least one segment")
    return p, t, axis



def rms_power(power: ArrayLike, duration: ArrayLike, axis: int | None = None) -> Number:
    r"""RMS (equivalent thermal) power of a duty cycle.

    .. math:: P_{rms} = \sqrt{\frac{\sum_i P_i^2 \, t_i}{\sum_i t_i}}

    A motor's losses are close to a fixed part (iron, friction, fan) plus a part that grows with the
    square of the load (copper). Over a cycle short against the motor's thermal time constant, a
    motor that keeps running therefore warms as it would under the constant load P_rms, which is
    what its continuous (S1) rating is compared with. This equivalent-load method is common practice
    for periodic duty of IEC 60034-1 type S6 (continuous operation, periodic load) and the idea behind
    the "rating for equivalent loading" of IEC 60034-1 (from memory).

    Limits of the method: segments at standstill cool a self-ventilated motor less than running ones
    (not modelled: a pump drive normally runs through the whole cycle, idle segments count at their
    low power); the cycle should be much shorter than the thermal time constant (common practice: a
    few minutes at most for small motors).

    Parameters
    ----------
    power : float or array
        Shaft power P_i of each segment [W], >= 0.
    duration : float or array
        Duration t_i of each segment [s], > 0.
    axis : int, optional
        Axis running over the segments, for a stack of cycles (e.g. one row per candidate pump, the
        durations shared). ``None`` (the default) takes every element as one cycle, in reading
        order; then power and duration must have the same number of elements (or one of them one).

    Returns
    -------
    float or array
        RMS power P_rms [W]; an array over the other axes when ``axis`` is given.

    Examples
    --------
    18 kW for 10 s, 6 kW for 30 s and 12 kW for 20 s: √((18²·10 + 6²·30 + 12²·20)/60) = √120 kW:

    >>> round(rms_power([18e3, 6e3, 12e3], [10.0, 30.0, 20.0]), 3)
    10954.451

    References
    ----------
    IEC 60034-1 (duty types S1 to S10; from memory).
    """
    p, t, ax = _segments(power, duration, axis)
    # Scaled by the peak so that squaring neither underflows nor overflows.
    scale = np.max(p, axis=ax, keepdims=True)
    scale = np.where(scale > 0, scale, 1.0)
    x = p / scale
    return plain(np.squeeze(scale, axis=ax) * np.sqrt(np.sum(x * x * t, axis=ax) / np.sum(t, axis=ax)))


def worst_window_rms(power: ArrayLike, duration: ArrayLike, window: float = THERMAL_WINDOW,
                     wraps: bool = True) -> float:
    r"""RMS power over the worst window of a motor's thermal time, for a cycle longer than that time.

    .. math:: P_{rms,W} = \max_s \sqrt{\frac{1}{W} \int_s^{s+W} P(t)^2 \, dt}

    A motor's temperature follows the RMS load over about its thermal time constant; over a long
    measured series (an hour of a machine's log) the average over the whole series hides a heavy
    stretch, so the worst stretch of length W counts (common practice). A cycle no longer than W is
    taken whole (:func:`rms_power`): heating follows the RMS of a periodic duty (IEC 60034-1 S6).

    The load is held constant over each segment, so the integral is piecewise linear in the window's
    start s and its maximum lies where the start or the end of the window meets a segment boundary;
    every such window is evaluated from one cumulative sum.

    Parameters
    ----------
    power : array
        Shaft power P_i of each segment or sample [W], >= 0, in time order.
    duration : array
        Duration t_i of each segment [s], >= 0 (a sample is held until the next one).
    window : float, optional
        Thermal time W [s], > 0; default :data:`THERMAL_WINDOW` (10 min).
    wraps : bool, optional
        The cycle repeats (a window may run from its end into its start); default True.

    Returns
    -------
    float
        RMS power over the worst window [W]; the RMS over the cycle when the cycle lasts at most W.

    Examples
    --------
    An hour at 5 kW with 15 min at 20 kW in it: over the hour the RMS is 10.9 kW, but the worst
    10 minutes are all at 20 kW.

    >>> round(rms_power([5e3, 20e3, 5e3], [1800.0, 900.0, 900.0]))
    10897
    >>> worst_window_rms([5e3, 20e3, 5e3], [1800.0, 900.0, 900.0], 600.0)
    20000.0
    >>> round(worst_window_rms([5e3, 20e3], [1800.0, 300.0], 600.0))
    14577

    References
    ----------
    IEC 60034-1 (duty type S6, equivalent loading; from memory); common practice for the window.
    """
    p = np.asarray(power, dtype=float).ravel()
    t = np.asarray(duration, dtype=float).ravel()
    non_negative(p, "power")
    non_negative(t, "duration")
    positive(np.asarray(window, dtype=float), "window")
    if p.size != t.size or p.size == 0:
        raise PhysicsError("duration", f"has {t.size} segments where power has {p.size}")
    total = float(np.sum(t))
    if total <= 0:
        raise PhysicsError("duration", "adds up to no time")
    if total <= window:
        use = t > 0
        return float(rms_power(p[use], t[use]))
    scale = float(np.max(p)) or 1.0
    x2t = (p / scale) ** 2 * t
    bounds = np.concatenate(([0.0], np.cumsum(t)))
    energy = np.concatenate(([0.0], np.cumsum(x2t)))
    if wraps:  # the next cycle, for windows that run past the end
        bounds = np.concatenate((bounds, bounds[1:] + total))
        energy = np.concatenate((energy, energy[1:] + energy[-1]))
        last = total
    else:
        last = total - window
    starts = np.concatenate((bounds, bounds - window))
    starts = starts[(starts >= 0.0) & (starts <= last)]
    inside = np.interp(starts + window, bounds, energy) - np.interp(starts, bounds, energy)
    return scale * math.sqrt(max(float(np.max(inside)), 0.0) / window)


def mean_power(power: ArrayLike, duration: ArrayLike, axis: int | None = None) -> Number:
    r"""Time-weighted mean power of a duty cycle.

    .. math:: \bar P = \frac{\sum_i P_i \, t_i}{\sum_i t_i}

    Parameters
    ----------
    power : float or array
        Power P_i of each segment [W], >= 0.
    duration : float or array
        Duration t_i of each segment [s], > 0.
    axis : int, optional
        Axis running over the segments; ``None`` takes every element as one cycle (see
        :func:`rms_power`).

    Returns
    -------
    float or array
        Mean power [W].

    Examples
    --------
    >>> mean_power([18e3, 6e3, 12e3], [10.0, 30.0, 20.0])
    10000.0

    References
    ----------
    Definition of a time average (common practice).
    """
    p, t, ax = _segments(power, duration, axis)
    return plain(np.sum(p * t, axis=ax) / np.sum(t, axis=ax))


def electrical_energy(shaft_power: ArrayLike, duration: ArrayLike, motor_efficiency: ArrayLike,
                      axis: int | None = None) -> Number:
    r"""Electrical energy a motor draws over a duty cycle.

    .. math:: E = \sum_i \frac{P_i \, t_i}{\eta_i}

    The efficiency is the one given: one number for the whole cycle (the full-load efficiency, which
    underestimates the energy of a part-loaded motor, above all of a light-running oversized one) or
    one per segment. The comparison does not use this function: it draws each segment's energy at the
    motor's part-load efficiency, from :func:`motor_input_power` (losses fitted to the full-load
    efficiency); pass per-segment efficiencies worked out that way to get the same energy here.

    Parameters
    ----------
    shaft_power : float or array
        Shaft power P_i the motor delivers in each segment [W], >= 0.
    duration : float or array
        Duration t_i of each segment [s], > 0.
    motor_efficiency : float or array
        Motor efficiency η [-], in (0, 1]; one number or one per segment.
    axis : int, optional
        Axis running over the segments; ``None`` takes every element as one cycle (see
        :func:`rms_power`).

    Returns
    -------
    float or array
        Electrical energy E [J] per cycle.

    Examples
    --------
    The cycle of :func:`rms_power` (600 kJ at the shaft) with a 92 % motor:

    >>> round(electrical_energy([18e3, 6e3, 12e3], [10.0, 30.0, 20.0], 0.92), 3)
    652173.913

    References
    ----------
    Definition of efficiency, IEC 60034-2-1 (from memory).
    """
    eta = np.asarray(motor_efficiency, dtype=float)
    require_efficiency(eta if eta.ndim else float(eta), "motor_efficiency")
    p, t, ax = _segments(shaft_power, duration, axis, "shaft_power")
    if axis is None:
        if eta.size not in (1, p.size):
            raise PhysicsError("motor_efficiency", f"has {eta.size} values for {p.size} segments")
        eta = eta.ravel()
    return plain(np.sum(p * t / eta, axis=ax))


def motor_input_power(shaft_power: ArrayLike, rated_power: ArrayLike,
                      full_load_efficiency: ArrayLike) -> Number:
    r"""Electrical power a motor draws at a part load: shaft power plus losses.

    .. math:: P_{el} = P + L_0 + L_c \left(\frac{P}{P_N}\right)^2, \qquad
              L_0 + L_c = P_N \left(\frac{1}{\eta_N} - 1\right), \qquad L_0 = s\,(L_0 + L_c)

    The losses of an induction motor are a constant part L_0 (iron, friction, fan) and a part growing
    with the square of the load L_c (copper), fitted to the full-load efficiency η_N (so the full-load
    point is reproduced exactly) and to a typical part-load point through the constant share
    s = :data:`PART_LOAD_CONSTANT_SHARE` (η at half load equal to η_N; from memory). A motor running
    light still draws L_0, which is why an oversized motor costs energy.

    Parameters
    ----------
    shaft_power : float or array
        Shaft power P the motor delivers [W], >= 0.
    rated_power : float or array
        Rated output P_N [W], > 0.
    full_load_efficiency : float or array
        Efficiency at rated output η_N [-], in (0, 1].

    Returns
    -------
    float or array
        Electrical input power [W].

    Examples
    --------
    An 11 kW motor of 91.4 % full-load efficiency: 12.035 kW at full load, 1.035 kW of losses; at
    half load the same efficiency; idling, the constant third of the losses.

    >>> round(motor_input_power(11e3, 11e3, 0.914), 3)
    12035.011
    >>> round(5.5e3 / motor_input_power(5.5e3, 11e3, 0.914), 6)
    0.914
    >>> round(motor_input_power(0.0, 11e3, 0.914), 3)
    345.004

    References
    ----------
    IEC 60034-2-1 (losses of induction motors: constant and load losses; from memory); the part-load
    point from memory (see :data:`PART_LOAD_CONSTANT_SHARE`).
    """
    p = np.asarray(shaft_power, dtype=float)
    rated = np.asarray(rated_power, dtype=float)
    eta = np.asarray(full_load_efficiency, dtype=float)
    non_negative(p, "shaft_power")
    positive(rated, "rated_power")
    require_efficiency(eta if eta.ndim else float(eta), "full_load_efficiency")
    losses = rated * (1.0 / eta - 1.0)
    constant = PART_LOAD_CONSTANT_SHARE * losses
    x = p / rated
    return plain(p + constant + (losses - constant) * x * x)


def standard_ratings(standard: str) -> np.ndarray:
    """Rated powers of a motor standard's series [W], smallest first.

    Parameters
    ----------
    standard : str
        ``"IEC"`` or ``"NEMA"`` (any case).

    Returns
    -------
    numpy.ndarray
        Rated powers [W] (a copy).

    Examples
    --------
    >>> standard_ratings("IEC")[:3]
    array([120., 180., 250.])

    References
    ----------
    IEC 60072-1; NEMA MG 1 (from memory).
    """
    return _SERIES_W[_standard(standard)].copy()


def motor_efficiency(rated_power: Number, standard: str = "IEC") -> Number:
    r"""Full-load efficiency of a standard motor by its rated power.

    For ``"IEC"`` the IE3 minimum efficiency of IEC 60034-30-1 (4-pole, 50 Hz); for ``"NEMA"`` the
    NEMA Premium nominal full-load efficiency of NEMA MG 1 Table 12-12 (4-pole, enclosed). Between
    tabulated sizes the efficiency is interpolated linearly in the logarithm of power (the tables
    are laid out on a log scale, and IEC 60034-30-1 gives its own formula for intermediate powers in
    log10 P):

    .. math:: \eta(P) = \eta_k + (\eta_{k+1} - \eta_k)\,\frac{\ln P - \ln P_k}{\ln P_{k+1} - \ln P_k}

    Outside the table the nearest end value is used (IEC: 0.12 kW to 1000 kW; NEMA: 1 hp to 500 hp),
    which is optimistic for NEMA motors below 1 hp.

    Parameters
    ----------
    rated_power : float or array
        Rated output power of the motor [W], > 0.
    standard : str, optional
        ``"IEC"`` (default) or ``"NEMA"``.

    Returns
    -------
    float or array
        Full-load efficiency [-].

    Examples
    --------
    >>> round(motor_efficiency(11e3, "IEC"), 4)
    0.914
    >>> round(motor_efficiency(15 * HP, "NEMA"), 4)
    0.924

    References
    ----------
    IEC 60034-30-1:2014 (IE3); NEMA MG 1 Table 12-12 (both from memory).
    """
    logs, etas = _EFF_TABLES[_standard(standard)]
    p = np.asarray(rated_power, dtype=float)
    positive(p, "rated_power")
    return plain(np.interp(np.log(p), logs, etas))


def _overload(standard: str, overload_factor: float | None) -> float:
    factor = _OVERLOAD[standard] if overload_factor is None else float(overload_factor)
    if not (math.isfinite(factor) and factor >= 1.0):
        raise PhysicsError("overload_factor", "must be at least 1 (1 = no short-time overload)")
    return factor


def motor_rating(rms_power: Number, peak_power: Number, standard: str = "IEC",
                 overload_factor: float | None = None, service_factor: float = 1.0) -> Number:
    r"""Smallest standard motor rating that carries a duty cycle.

    The rating P_N is the smallest of the standard's series with

    .. math:: SF \cdot P_N \ge P_{rms} \quad\text{and}\quad k \cdot P_N \ge P_{peak}

    where k is the overload factor (the peak torque the motor carries without stalling, as a multiple
    of its rated torque) and SF the service factor. Torque and power are taken as proportional (an
    induction motor's speed changes little). How long the peak lasts does not enter: heating follows
    the RMS load (periodic duty, IEC 60034-1 S6), and the 15 s of IEC 60034-1 clause 9.4 is the length
    of a test that the motor does not stall, not a time limit on a cyclic overload.

    Default overload factors:

    * IEC: 1.6, from IEC 60034-1 clause 9.4 (from memory): a polyphase induction motor withstands
      60 % excess torque for 15 s without stalling. (Clause 9.3 allows 1.5 times rated current for
      2 min to motors up to 315 kW.)
    * NEMA: also 1.6. The service factor (1.15) is a continuous allowance with a hotter winding and a
      shorter life, not a peak allowance, so it is not used for the peak. NEMA MG 1 instead sets the breakdown
      torque of Design B motors at no less than 200 % of full-load torque for most 4-pole sizes
      (from memory; more for small ones); at 90 % voltage, which MG 1 permits, breakdown torque falls
      with the voltage squared to about 162 %. Loading to 160 % therefore stays just below breakdown
      in the worst permitted supply, and matches the IEC figure (common practice: keep peaks under
      about 80 % of breakdown torque at rated voltage).

    Parameters
    ----------
    rms_power : float or array
        RMS power of the cycle [W], >= 0 (see :func:`rms_power`).
    peak_power : float or array
        Highest power of the cycle [W], >= ``rms_power``.
    standard : str, optional
        ``"IEC"`` (default) or ``"NEMA"``.
    overload_factor : float, optional
        Peak allowance k [-], >= 1; default 1.6 for both standards (see above).
    service_factor : float, optional
        Continuous allowance SF [-], >= 1; default 1 for both standards: sheetpump sizes to the
        nameplate rating and leaves NEMA's 1.15 as a reserve for low voltage, a hot room and wear
        (common practice). IEC 60034-1 gives no service factor.

    Returns
    -------
    float or array
        Rated power P_N [W].

    Raises
    ------
    PhysicsError
        If the load needs more than the largest rating of the series (1000 kW IEC, 500 hp NEMA).

    Examples
    --------
    The cycle of :func:`rms_power` (RMS 10.95 kW, peak 18 kW): 11 kW would carry the RMS, but
    1.6 × 11 kW = 17.6 kW is short of the peak, so 15 kW. In NEMA sizes the RMS is 14.7 hp and the
    peak 24.1 hp, just over 1.6 × 15 hp = 24 hp, so 20 hp.

    >>> motor_rating(10954.451, 18e3, "IEC")
    15000.0
    >>> round(motor_rating(10954.451, 18e3, "NEMA") / HP, 6)
    20.0

    References
    ----------
    IEC 60034-1 clause 9.4; IEC 60072-1; NEMA MG 1 (all from memory).
    """
    std = _standard(standard)
    need_rms, need_peak = _needs(std, rms_power, peak_power, _overload(std, overload_factor),
                                 _service(service_factor))
    return plain(_SERIES_W[std][np.maximum(need_rms, need_peak)])


def _service(service_factor: float) -> float:
    sf = float(service_factor)
    if not (math.isfinite(sf) and sf >= 1.0):
        raise PhysicsError("service_factor", "must be at least 1 (1 = size to the nameplate rating)")
    return sf


def _needs(std: str, rms_power: Number, peak_power: Number, factor: float,
           sf: float) -> tuple[np.ndarray, np.ndarray]:
    """Index in the series of the smallest rating the RMS load needs, and the one the peak needs."""
    rms = np.asarray(rms_power, dtype=float)
    peak = np.asarray(peak_power, dtype=float)
    non_negative(rms, "rms_power")
    non_negative(peak, "peak_power")
    _require_peak(rms, peak)
    series = _SERIES_W[std]
    covers = series * (1.0 + _REL_TOL)
    need_rms = np.searchsorted(covers * sf, rms, side="left")
    need_peak = np.searchsorted(covers * factor, peak, side="left")
    for need, load, name in ((need_rms, rms, "rms_power"), (need_peak, peak, "peak_power")):
        if np.any(need >= series.size):
            largest = _label(std, series[-1])
            what = "continuous rating" if name == "rms_power" else f"peak capacity ({factor:g} × rating)"
            raise PhysicsError(name, f"is {np.max(load) / 1e3:.4g} kW, beyond the {what} of the "
                               f"largest {std} motor ({largest}); split the drive or use a special motor")
    return need_rms, need_peak


def _require_peak(rms: np.ndarray, peak: np.ndarray) -> None:
    # The peak of a cycle is never below its RMS; a smaller peak means the two were swapped or the
    # peak was left empty.
    if np.any(peak < rms * (1.0 - _REL_TOL)):
        raise PhysicsError("peak_power", "must not be below the RMS power (the peak of a cycle is at "
                           "least its RMS)")


def _label(standard: str, rated_power: float) -> str:
    if standard == "IEC":
        return f"{rated_power / 1e3:g} kW"
    hp = rated_power / HP
    for value, text in _FRACTIONS.items():
        if abs(hp - value) < 1e-9:
            return f"{text} hp"
    return f"{hp:.6g} hp"


@dataclass(frozen=True)
class MotorChoice:
    """A standard motor chosen for a duty cycle.

    Fields: ``standard`` ("IEC" or "NEMA"), ``rated_power`` [W], ``label`` (e.g. "11 kW", "15 hp"),
    ``efficiency`` (full-load, [-]), ``overload_factor`` [-] used for the peak, ``rms_load`` and
    ``peak_load`` (RMS and peak power as fractions of the rated power, [-]), ``service_factor`` [-]
    and ``binding``: which criterion chose the size (``"RMS"``, ``"peak"`` or ``"RMS and peak"``;
    ``"smallest size"`` when the load is below the smallest rating).
    """

    standard: str
    rated_power: float
    label: str
    efficiency: float
    overload_factor: float
    rms_load: float
    peak_load: float
    service_factor: float = 1.0
    binding: str = "RMS"


def select_motor(rms_power: float, peak_power: float, standard: str = "IEC",
                 overload_factor: float | None = None, service_factor: float = 1.0) -> MotorChoice:
    """Choose the smallest standard motor for a duty cycle, say which criterion binds, and describe it.

    Each standard size is tried in turn, smallest first; the first one that carries the RMS load and
    the peak (the rule and defaults of :func:`motor_rating`) is chosen, and ``binding`` names the
    criterion that ruled out the size below it. The efficiency is :func:`motor_efficiency` at the
    chosen rating.

    Parameters
    ----------
    rms_power : float
        RMS power of the cycle [W], >= 0.
    peak_power : float
        Highest power of the cycle [W], >= ``rms_power``.
    standard : str, optional
        ``"IEC"`` (default) or ``"NEMA"``.
    overload_factor : float, optional
        Peak allowance [-], >= 1; default 1.6.
    service_factor : float, optional
        Continuous allowance [-], >= 1; default 1 (see :func:`motor_rating`).

    Returns
    -------
    MotorChoice

    Raises
    ------
    PhysicsError
        If the load needs more than the largest standard rating.

    Examples
    --------
    >>> choice = select_motor(11.1e3, 20e3, "IEC")
    >>> choice.label, round(choice.efficiency, 3), round(choice.rms_load, 2), round(choice.peak_load, 3)
    ('15 kW', 0.921, 0.74, 1.333)
    >>> choice.binding
    'RMS and peak'
    >>> select_motor(11.1e3, 16e3, "IEC").binding, select_motor(9e3, 20e3, "IEC").binding
    ('RMS', 'peak')
    >>> select_motor(0.2 * HP, 0.3 * HP, "NEMA").label
    '1/4 hp'

    References
    ----------
    IEC 60034-1; IEC 60034-30-1; IEC 60072-1; NEMA MG 1 (all from memory).
    """
    std = _standard(standard)
    factor = _overload(std, overload_factor)
    sf = _service(service_factor)
    need_rms, need_peak = (int(k) for k in _needs(std, float(rms_power), float(peak_power), factor, sf))
    k = max(need_rms, need_peak)
    rated = float(_SERIES_W[std][k])
    if k == 0:
        binding = "smallest size"
    else:
        binding = "RMS and peak" if need_rms == need_peak else ("RMS" if need_rms > need_peak else "peak")
    return MotorChoice(
        standard=std,
        rated_power=rated,
        label=_label(std, rated),
        efficiency=float(motor_efficiency(rated, std)),
        overload_factor=factor,
        rms_load=float(rms_power) / rated,
        peak_load=float(peak_power) / rated,
        service_factor=sf,
        binding=binding,
    )
