r"""Per-point evaluation of a measured performance table: efficiencies, powers, flags and ranges.

A supplier's performance table or a test bench's log gives, at one or several speeds and oil
viscosities, the delivered flow and the input torque (or power) against the pressure rise.
:func:`evaluate_points` gives each point its geometric flow, η_v, η_hm, η_t, hydraulic power, power
loss and plausibility flags (:data:`FLAG_TEXT`); :class:`MeasuredRanges` holds the measured ranges a
model's prediction is marked extrapolated outside of.

Pure functions of SI numbers or numpy arrays: speed n [rev/s], pressure rise Δp [Pa], flow Q [m³/s],
torque T [N·m], power P [W], dynamic viscosity μ [Pa·s], displacement V [m³/rev]. The basic relations
are those of :mod:`sheetpump.physics.pump`, which this module calls rather than restates.

References
----------
.. [1] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
.. [2] ISO 4391, Hydraulic fluid power -- Pumps, motors and integral transmissions -- Parameter
   definitions and letter symbols.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ..errors import PhysicsError
from . import pump
from .displacement import DerivedDisplacement, derived_displacement
from .table import group_points, table_columns
from .validate import positive

__all__ = [
    "DEFAULT_TOLERANCE",
    "FLAG_TEXT",
    "MeasuredRanges",
    "PointEvaluation",
    "evaluate_points",
    "ranges_of",
]

#: Noise tolerance of the plausibility flags [-]: an efficiency above 1 + this, or η_v rising with
#: pressure by more than this, is flagged. Half a percentage point is about what a good flow meter
#: and torque transducer allow together (common practice).
DEFAULT_TOLERANCE = 0.005

#: Points that agree within this relative tolerance in speed, pressure and viscosity are duplicates.
_DUPLICATE_TOLERANCE = 1e-6

FLAG_MISSING = "missing_value"
FLAG_INVALID = "invalid_value"
FLAG_ABOVE_1 = "eff_above_1"
FLAG_TOTAL_ABOVE_PARTIAL = "total_above_partial"
FLAG_VOL_RISES = "vol_eff_rises_with_pressure"
FLAG_DUPLICATE = "duplicate_point"

#: What each flag means, for reports.
FLAG_TEXT = {
    FLAG_MISSING: "a value of this point is missing",
    FLAG_INVALID: "a value is impossible (speed or torque not positive, pressure or flow negative)",
    FLAG_ABOVE_1: "an efficiency is above 1: the flow, torque, power or displacement is wrong",
    FLAG_TOTAL_ABOVE_PARTIAL: "total efficiency exceeds a partial one (η_t ≤ η_v and η_t ≤ η_hm always)",
    FLAG_VOL_RISES: "volumetric efficiency rises with pressure at the same speed and viscosity",
    FLAG_DUPLICATE: "the same speed, pressure and viscosity appear more than once",
}


@dataclass(frozen=True, eq=False)
class PointEvaluation:
    """Per-point evaluation of a measured performance table (arrays, one value per point).

    Efficiencies, powers and flows of points flagged ``missing_value`` or ``invalid_value`` are NaN.

    Attributes
    ----------
    displacement : float
        Displacement V used [m³/rev] (given, or derived from the table).
    derived : DerivedDisplacement or None
        The derivation, when the displacement was not given.
    geometric_flow : array
        V·n [m³/s].
    volumetric, hydromechanical, total : array
        η_v, η_hm, η_t [-].
    hydraulic_power, input_power, power_loss : array
        Δp·Q, the input power and their difference [W].
    torque : array
        Input torque [N·m] (measured, or from the input power and speed).
    flags : tuple of tuple of str
        Plausibility flags of each point; see :data:`FLAG_TEXT`.
    tolerance : float
        The noise tolerance the flags used [-].
    """

    displacement: float
    derived: DerivedDisplacement | None
    geometric_flow: np.ndarray
    volumetric: np.ndarray
    hydromechanical: np.ndarray
    total: np.ndarray
    hydraulic_power: np.ndarray
    input_power: np.ndarray
    power_loss: np.ndarray
    torque: np.ndarray
    flags: tuple[tuple[str, ...], ...]
    tolerance: float


def evaluate_points(
    speed: ArrayLike,
    pressure: ArrayLike,
    flow: ArrayLike,
    torque: ArrayLike | None = None,
    input_power: ArrayLike | None = None,
    displacement: float | None = None,
    *,
    viscosity: ArrayLike | None = None,
    tolerance: float = DEFAULT_TOLERANCE,
) -> PointEvaluation:
    r"""Efficiencies, powers and plausibility flags of each point of a measured performance table.

    .. math::

        \eta_v = \frac{Q}{V n}, \quad \eta_{hm} = \frac{V \Delta p}{2\pi T}, \quad
        \eta_t = \frac{\Delta p\, Q}{P_{in}} = \eta_v\,\eta_{hm}, \quad P_{in} = 2\pi n T

    Flags per point (codes of :data:`FLAG_TEXT`): ``missing_value`` (a NaN), ``invalid_value``,
    ``eff_above_1`` (an efficiency above 1 + ``tolerance``), ``total_above_partial`` (η_t above η_v or
    η_hm by more than ``tolerance``; with consistent inputs this is the mark of a partial efficiency
    above 1), ``vol_eff_rises_with_pressure`` (η_v above that of a point at lower pressure, the same
    speed and the same viscosity, by more than ``tolerance``) and ``duplicate_point``.

    Parameters
    ----------
    speed : array
        Shaft speed n of each point [rev/s].
    pressure : array
        Pressure rise Δp [Pa].
    flow : array
        Measured effective flow Q [m³/s].
    torque : array, optional
        Measured input torque T [N·m]. Give exactly one of ``torque`` and ``input_power``.
    input_power : array, optional
        Measured input power P_in [W].
    displacement : float, optional
        Displacement V [m³/rev]; without it the derived displacement of the table is used
        (:func:`derived_displacement`, needs two or more speeds).
    viscosity : array, optional
        Dynamic viscosity μ of each point [Pa·s]; it groups the points for the η_v-against-pressure
        check and for duplicates. Without it all points count as one viscosity.
    tolerance : float, optional
        Noise tolerance of the flags [-], default :data:`DEFAULT_TOLERANCE`.

    Returns
    -------
    PointEvaluation

    Examples
    --------
    An invented 28 cm³/rev pump at 1500 rpm and 200 bar delivering 39.9 L/min with 99.03 N·m:

    >>> e = evaluate_points(25.0, 200e5, 39.9 / 60000, torque=99.03, displacement=28e-6)
    >>> round(float(e.volumetric[0]), 4), round(float(e.hydromechanical[0]), 4), round(float(e.total[0]), 4)
    (0.95, 0.9, 0.855)
    >>> e.flags
    ((),)

    References
    ----------
    ISO 4409 (test method and presentation); ISO 4391 (symbols).
    """
    if (torque is None) == (input_power is None):
        raise PhysicsError("torque", "or input_power: give exactly one of the two")
    t = table_columns(speed=speed, pressure=pressure, flow=flow, torque=torque, input_power=input_power,
               viscosity=viscosity)
    n, p, q = t["speed"], t["pressure"], t["flow"]
    measured = t["torque"] if torque is not None else t["input_power"]
    mu = t.get("viscosity", np.ones_like(n))
    missing = ~(np.isfinite(n) & np.isfinite(p) & np.isfinite(q) & np.isfinite(measured) & np.isfinite(mu))
    with np.errstate(invalid="ignore"):
        invalid = ~missing & ((n <= 0) | (p < 0) | (q < 0) | (measured <= 0) | (mu <= 0))
    good = ~(missing | invalid)
    positive(tolerance, "tolerance")

    derived = None
    if displacement is None:
        derived = derived_displacement(n[good], p[good], q[good],
                                       viscosity=mu[good] if viscosity is not None else None)
        v = derived.value
    else:
        v = float(np.asarray(displacement, dtype=float).reshape(-1)[0])
        positive(v, "displacement")

    nan = np.full(n.shape, np.nan)
    out = {k: nan.copy() for k in ("qth", "ev", "ehm", "et", "phyd", "pin", "loss", "torque")}
    ng, pg, qg, mg = n[good], p[good], q[good], measured[good]
    if torque is not None:
        tg, pin = mg, pump.shaft_power(mg, ng)
    else:
        tg, pin = mg / (pump.TWO_PI * ng), mg  # P_in = 2π·n·T read backwards
    out["qth"][good] = pump.geometric_flow(v, ng)
    out["ev"][good] = pump.volumetric_efficiency(qg, v, ng)
    out["ehm"][good] = pump.hydromechanical_efficiency(v, pg, tg)
    out["et"][good] = pump.total_efficiency(pg, qg, pin)
    out["phyd"][good] = pump.hydraulic_power(pg, qg)
    out["pin"][good] = pin
    out["loss"][good] = pump.power_loss(pin, pg, qg)
    out["torque"][good] = tg

    ev, ehm, et = out["ev"], out["ehm"], out["et"]
    with np.errstate(invalid="ignore"):
        above = good & ((ev > 1 + tolerance) | (ehm > 1 + tolerance) | (et > 1 + tolerance))
        over_partial = good & (et > np.fmin(ev, ehm) + tolerance)
    raised = ((FLAG_MISSING, missing), (FLAG_INVALID, invalid), (FLAG_ABOVE_1, above),
              (FLAG_TOTAL_ABOVE_PARTIAL, over_partial),
              (FLAG_VOL_RISES, _rises_with_pressure(n, p, mu, ev, good, tolerance)),
              (FLAG_DUPLICATE, _duplicates(n, p, mu, ~missing)))
    # Tuples only for the flagged points; the others share the one empty tuple (a big table stays small).
    flags: list[tuple[str, ...]] = [()] * n.size
    for i in np.flatnonzero(np.logical_or.reduce([mask for _, mask in raised])):
        flags[i] = tuple(code for code, mask in raised if mask[i])

    return PointEvaluation(
        displacement=v, derived=derived, geometric_flow=out["qth"], volumetric=ev, hydromechanical=ehm,
        total=et, hydraulic_power=out["phyd"], input_power=out["pin"], power_loss=out["loss"],
        torque=out["torque"], flags=tuple(flags), tolerance=float(tolerance))


def _rises_with_pressure(n: np.ndarray, p: np.ndarray, mu: np.ndarray, ev: np.ndarray, good: np.ndarray,
                         tolerance: float) -> np.ndarray:
    """η_v above that of any lower-pressure point of its group by more than ``tolerance``.

    Compared with every lower-pressure point of the group, not just the neighbour, so that a slow rise
    in small steps is caught too: with the group sorted by pressure, the lowest η_v among the points
    below each point's pressure is a running minimum, found by a binary search (O(N log N)).
    """
    rises = np.zeros(n.size, dtype=bool)
    for idx in group_points(n, p, mu, good):
        if idx.size < 2:
            continue
        pg, eg = p[idx], ev[idx]  # by rising pressure
        gap = _DUPLICATE_TOLERANCE * max(float(pg[-1]), 1.0)
        below = np.searchsorted(pg, pg - gap, side="left")  # points at a pressure lower than p - gap
        lowest = np.minimum.accumulate(eg)
        has = below > 0
        rises[idx[has]] = eg[has] - lowest[below[has] - 1] > tolerance
    return rises


def _grid_keys(x: np.ndarray, shift: float) -> np.ndarray:
    """Integer cell of each value on a relative grid of width :data:`_DUPLICATE_TOLERANCE` (log scale).

    Zero has its own cell; negative values mirror the positive ones.
    """
    h = math.log1p(_DUPLICATE_TOLERANCE)
    with np.errstate(divide="ignore", invalid="ignore"):
        k = np.floor(np.log(np.abs(x)) / h + shift)
    k = np.where(np.isfinite(k), k, 0.0).astype(np.int64) + (1 << 31)  # |log x|/h < 8e8 for any double
    return np.where(x > 0, k, np.where(x < 0, -k, 0))


def _duplicates(n: np.ndarray, p: np.ndarray, mu: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """Points whose speed, pressure and viscosity all agree with another point's within the tolerance.

    Each value is put on a relative grid of cell width :data:`_DUPLICATE_TOLERANCE` in each of the
    2³ grids shifted by half a cell per coordinate; points sharing a cell in any grid are duplicates.
    So every pair within half the tolerance in all three is found and no pair beyond the tolerance is
    flagged; one sort per grid, O(N log N), instead of comparing every pair.
    """
    idx = np.flatnonzero(mask)
    dup = np.zeros(n.size, dtype=bool)
    if idx.size < 2:
        return dup
    found = np.zeros(idx.size, dtype=bool)
    cols = (n[idx], p[idx], mu[idx])
    # Dense ranks of each coordinate's cells, so that one grid's three cells pack into one integer.
    ranks = {}
    for c, x in enumerate(cols):
        for s in (0.0, 0.5):
            _, inverse = np.unique(_grid_keys(x, s), return_inverse=True)
            ranks[(c, s)] = inverse.astype(np.int64).ravel()
    for shifts in np.ndindex(2, 2, 2):
        r = [ranks[(c, 0.5 * s)] for c, s in enumerate(shifts)]
        sizes = [int(x.max()) + 1 for x in r]
        if sizes[0] * sizes[1] * sizes[2] < 2**62:
            _, inverse, counts = np.unique((r[0] * sizes[1] + r[1]) * sizes[2] + r[2], return_inverse=True,
                                           return_counts=True)
            found |= counts[inverse.ravel()] > 1
        else:  # over 2**20 cells in every coordinate: sort the three together
            order = np.lexsort(r[::-1])
            same = np.logical_and.reduce([x[order][1:] == x[order][:-1] for x in r])
            found[order[1:][same]] = True
            found[order[:-1][same]] = True
    dup[idx[found]] = True
    return dup


@dataclass(frozen=True)
class MeasuredRanges:
    """Measured ranges (min, max) of pressure [Pa], speed [rev/s] and dynamic viscosity [Pa·s]."""

    pressure: tuple[float, float] = (0.0, math.inf)
    speed: tuple[float, float] = (0.0, math.inf)
    viscosity: tuple[float, float] = (0.0, math.inf)

    def left(self, speed: np.ndarray, pressure: np.ndarray, viscosity: np.ndarray) -> np.ndarray:
        """Per point, which measured range the point leaves ('' when inside all three)."""
        text = np.full(np.shape(speed), "", dtype=object)
        for name, x, (lo, hi) in (("pressure", pressure, self.pressure), ("speed", speed, self.speed),
                                  ("viscosity", viscosity, self.viscosity)):
            slack = 1e-9 * max(abs(lo), abs(hi) if math.isfinite(hi) else 0.0, 1e-300)
            for word, mask in (("below", x < lo - slack), ("above", x > hi + slack)):
                part = f"{name} {word} the measured range"
                text[mask] = [f"{s}; {part}" if s else part for s in text[mask]]
        return text


def ranges_of(t: dict[str, np.ndarray]) -> MeasuredRanges:
    """The measured ranges of a table of columns (:func:`~sheetpump.physics.table.complete_points`)."""

    def span(x: np.ndarray) -> tuple[float, float]:
        return float(x.min()), float(x.max())

    return MeasuredRanges(pressure=span(t["pressure"]), speed=span(t["speed"]), viscosity=span(t["viscosity"]))
