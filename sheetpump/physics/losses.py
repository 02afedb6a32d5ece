r"""Measured pump performance: per-point efficiencies, derived displacement and a loss model.

A supplier's performance table or a test bench's log gives, at one or several speeds and oil
viscosities, the delivered flow and the input torque (or power) against the pressure rise. This module

* evaluates each measured point (:func:`evaluate_points`): geometric flow, η_v, η_hm, η_t, hydraulic
  power, power loss and plausibility flags;
* derives the displacement from the table (:func:`derived_displacement`), the ISO 8426 idea: the slope
  of flow on speed, extrapolated to zero pressure;
* fits Wilson's loss model (:func:`fit_wilson`) to predict the pump at other pressures, speeds and
  viscosities, and falls back to interpolating the measured efficiencies in pressure where the table
  is too small for the model (:func:`fit_performance`, the entry point).

Pure functions of SI numbers or numpy arrays: speed n [rev/s], pressure rise Δp [Pa], flow Q [m³/s],
torque T [N·m], power P [W], dynamic viscosity μ [Pa·s], displacement V [m³/rev]. The basic relations
are those of :mod:`sheetpump.physics.pump`, which this module calls rather than restates.

Wilson's model (symbols of Merritt [2]_, D = V/2π the displacement per radian, ω = 2π·n):

.. math::

    Q = D\,\omega - C_s\,\frac{D\,\Delta p}{\mu}, \qquad
    T = D\,\Delta p\,(1 + C_f) + C_v\,D\,\mu\,\omega + T_c

C_s (laminar slip), C_f (friction proportional to pressure) and C_v (viscous drag) are dimensionless;
T_c is a constant friction torque [N·m]. Both equations are linear in the coefficients, so they fit by
linear least squares.

References
----------
.. [1] Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, Pitman, 1950 (from memory).
.. [2] Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 5 (from memory).
.. [3] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
.. [4] ISO 8426, Hydraulic fluid power -- Positive displacement pumps and motors -- Determination of
   derived capacity.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike

from . import pump
from .pump import PhysicsError, non_negative, positive

__all__ = [
    "DEFAULT_TOLERANCE",
    "LEVEL_TOLERANCE",
    "UNCERTAINTY_FLOOR",
    "DerivedDisplacement",
    "InterpolatedPerformance",
    "MeasuredRanges",
    "ModelError",
    "PerformanceModel",
    "PointEvaluation",
    "Prediction",
    "Residuals",
    "WilsonModel",
    "derived_displacement",
    "derived_displacement_uncertainty",
    "derived_displacement_value",
    "evaluate_points",
    "fit_performance",
    "fit_wilson",
    "group_points",
    "interpolate_performance",
    "predicted_extrapolated",
    "predicted_flow",
    "predicted_input_power",
    "predicted_torque",
    "predicted_total_efficiency",
    "predicted_volumetric_efficiency",
]

TWO_PI = pump.TWO_PI

#: Noise tolerance of the plausibility flags [-]: an efficiency above 1 + this, or η_v rising with
#: pressure by more than this, is flagged. Half a percentage point is about what a good flow meter
#: and torque transducer allow together (common practice).
DEFAULT_TOLERANCE = 0.005

#: Speeds (and viscosities) that agree within this relative tolerance count as one level [-]. A bench
#: motor's speed droops a little with load, and oil temperature wanders a degree or so.
LEVEL_TOLERANCE = 0.03

#: Points that agree within this relative tolerance in speed, pressure and viscosity are duplicates.
_DUPLICATE_TOLERANCE = 1e-6

#: Floor of the derived displacement's standard uncertainty, relative to its value [-]. A test bench's
#: flow meter and tachometer are good to a few parts in ten thousand at best (common practice; the
#: accuracy classes of ISO 4409 are coarser), so no table knows a displacement to one part in a million:
#: a fit's uncertainty below this is round-off of an (almost) noiseless table, not a measurement, and a
#: ratio over it (difference from nominal in standard uncertainties) would be noise over noise.
#: Still a thousand times below what any bench resolves, so it never hides a real uncertainty.
UNCERTAINTY_FLOOR = 1e-6

#: By default the derived displacement uses the points up to this share of the highest pressure.
_LOW_PRESSURE_SHARE = 1.0 / 3.0

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


class ModelError(PhysicsError):
    """The table cannot carry the model (too few points, or terms that cannot be separated)."""


# -- small helpers ---------------------------------------------------------------------------------
def _column(x: ArrayLike, name: str) -> np.ndarray:
    try:
        return np.asarray(x, dtype=float).ravel()
    except (TypeError, ValueError):
        raise PhysicsError(name, "must be numbers") from None


def _table(**columns: ArrayLike | None) -> dict[str, np.ndarray]:
    """Flatten the table's columns and check that they have one length (a scalar is repeated)."""
    out = {k: _column(v, k) for k, v in columns.items() if v is not None}
    length = max(a.size for a in out.values())
    for name, a in out.items():
        if a.size == 1 and length > 1:
            out[name] = np.full(length, a[0])
        elif a.size != length:
            raise PhysicsError(name, f"has {a.size} values where the table has {length} points")
    return out


def _levels(x: np.ndarray, rel: float = LEVEL_TOLERANCE) -> tuple[np.ndarray, int]:
    """Label values that agree within a relative tolerance as one level; return labels and count."""
    if x.size == 0:
        return np.zeros(0, dtype=int), 0
    order = np.argsort(x, kind="stable")
    xs = x[order]
    new = np.r_[True, np.diff(xs) > rel * np.maximum(np.abs(xs[1:]), 1e-300)]
    labels = np.empty(x.size, dtype=int)
    labels[order] = np.cumsum(new) - 1
    return labels, int(new.sum())


def _count_levels(x: np.ndarray) -> int:
    """How many levels ``x`` takes (:func:`_levels`), at least 2 where its values spread wider than the
    level tolerance: a continuous sweep or a densely logged table chains into one level, yet varies."""
    _, count = _levels(x)
    if count == 1 and float(x.max() - x.min()) > LEVEL_TOLERANCE * float(np.abs(x).max()):
        return 2
    return count


def _lstsq(columns: list[np.ndarray], y: np.ndarray, what: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Linear least squares with column scaling; returns coefficients, their covariance, residuals.

    The covariance is s²·(AᵀA)⁻¹ with s² = RSS/(N − p); it is NaN when no point is redundant.
    """
    a = np.column_stack(columns)
    # LAPACK given a NaN or an infinity prints its own complaint on standard output (it once made
    # --format json invalid): such a table is refused here, before LAPACK sees it.
    if not (np.isfinite(a).all() and np.isfinite(y).all()):
        raise ModelError(what, "cannot be fitted: a term of the model is too large or too small to compute")
    # Columns differ by many orders of magnitude (rev/s against Pa); scale them for a sound rank.
    scale = np.abs(a).max(axis=0)
    scale[scale == 0] = 1.0
    a_s = a / scale
    coef, _, rank, _ = np.linalg.lstsq(a_s, y, rcond=None)
    if rank < a.shape[1]:
        raise ModelError(what, "cannot be fitted: its terms cannot be separated in this table (singular)")
    resid = y - a_s @ coef
    dof = y.size - a.shape[1]
    s2 = float(resid @ resid) / dof if dof > 0 else math.nan
    cov = s2 * np.linalg.inv(a_s.T @ a_s)
    return coef / scale, cov / np.outer(scale, scale), resid


# -- evaluating measured points --------------------------------------------------------------------
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

    @property
    def plausible(self) -> np.ndarray:
        """True for each point without a flag."""
        return np.array([not f for f in self.flags], dtype=bool)


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
    t = _table(speed=speed, pressure=pressure, flow=flow, torque=torque, input_power=input_power,
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
        tg, pin = mg / (TWO_PI * ng), mg  # P_in = 2π·n·T read backwards
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


def _groups(n: np.ndarray, mu: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """One label per (speed level, viscosity level) among the masked points; -1 elsewhere.

    Labels rise with the speed level, then the viscosity level.
    """
    labels = np.full(n.size, -1, dtype=np.int64)
    if mask.any():
        ln, _ = _levels(n[mask])
        lm, count = _levels(mu[mask])
        labels[mask] = ln.astype(np.int64) * max(count, 1) + lm
    return labels


def group_points(speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike,
                 mask: ArrayLike | None = None) -> list[np.ndarray]:
    """Indices of the points measured at one speed and one viscosity, each group by rising pressure.

    Speeds (and viscosities) that agree within :data:`LEVEL_TOLERANCE` (relative, between neighbours
    in sorted order) count as one level. Groups come by rising speed level, then viscosity level;
    points outside ``mask`` belong to none. One sort of the whole table: O(N log N) in time, O(N) in
    memory, however many groups there are.

    Parameters
    ----------
    speed, pressure, viscosity : array
        Shaft speed [rev/s], pressure rise [Pa] and dynamic viscosity [Pa·s] of each point.
    mask : array of bool, optional
        The points to group (default all).

    Examples
    --------
    >>> [g.tolist() for g in group_points([25.0, 25.1, 40.0, 25.0], [2e7, 1e7, 1e7, 5e6], 0.03)]
    [[3, 1, 0], [2]]
    """
    t = _table(speed=speed, pressure=pressure, viscosity=viscosity)
    n, p, mu = t["speed"], t["pressure"], t["viscosity"]
    keep = np.ones(n.size, dtype=bool) if mask is None else np.broadcast_to(np.asarray(mask, dtype=bool), n.shape)
    labels = _groups(n, mu, keep)
    idx = np.flatnonzero(labels >= 0)
    if idx.size == 0:
        return []
    idx = idx[np.lexsort((p[idx], labels[idx]))]
    cuts = np.flatnonzero(np.diff(labels[idx])) + 1
    return np.split(idx, cuts)


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


# -- derived displacement --------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class DerivedDisplacement:
    """Displacement derived from a measured table (the ISO 8426 idea).

    Attributes
    ----------
    value : float
        Derived displacement V_i [m³/rev].
    uncertainty : float
        Its standard uncertainty from the least-squares covariance [m³/rev], at least
        :data:`UNCERTAINTY_FLOOR` × the value (NaN with no redundant point).
    points : int
        Number of points used.
    used : array of int
        Indices (into the finite points given) of the points used.
    leakage : tuple of float
        Leakage coefficient k of each viscosity level [m³/(s·Pa)] (empty if not separable).
    offset : float
        Fitted speed-independent flow offset c [m³/s].
    max_pressure : float
        Highest pressure of the points used [Pa].
    notes : tuple of str
        What was assumed.
    """

    value: float
    uncertainty: float
    points: int
    used: np.ndarray
    leakage: tuple[float, ...]
    offset: float
    max_pressure: float
    notes: tuple[str, ...] = ()


def derived_displacement(
    speed: ArrayLike,
    pressure: ArrayLike,
    flow: ArrayLike,
    max_pressure: float | None = None,
    *,
    viscosity: ArrayLike | None = None,
) -> DerivedDisplacement:
    r"""Displacement derived from flow measured at several speeds and low pressures (ISO 8426 idea).

    Over the points with Δp ≤ ``max_pressure`` the linear model

    .. math:: Q = V_i\,n + c - \sum_j k_j\,\Delta p\,[\mu = \mu_j]

    is fitted by least squares: V_i is the slope of flow on speed, k_j a leakage coefficient per
    viscosity level (leakage proportional to Δp and independent of speed, as in Wilson's model) and c
    a speed-independent offset (a flow meter's zero, for instance). Setting Δp = 0 and taking the slope
    in n is the ISO 8426 extrapolation to zero pressure. Because V_i is a slope, two or more speeds are
    needed. The standard uncertainty of V_i is the square root of its variance from the least-squares
    covariance s²·(AᵀA)⁻¹, but never below :data:`UNCERTAINTY_FLOOR` (1e-6) of V_i: below that it is
    the round-off of a noiseless table, not a measurement (said in ``notes``). If the pressures of the
    points used do not vary, the leakage cannot be separated from c and is left out (V_i is still the
    slope, which does not depend on pressure in this model).

    Parameters
    ----------
    speed : array
        Shaft speed n of each point [rev/s].
    pressure : array
        Pressure rise Δp [Pa].
    flow : array
        Measured effective flow Q [m³/s].
    max_pressure : float, optional
        Highest pressure of the points used [Pa]; default a third of the highest measured pressure.
    viscosity : array, optional
        Dynamic viscosity μ of each point [Pa·s]; one leakage coefficient per viscosity level.

    Returns
    -------
    DerivedDisplacement

    Raises
    ------
    PhysicsError
        Fewer than two speeds (or too few points) at the pressures used.

    Examples
    --------
    An invented 28 cm³/rev pump at 1000, 1500 and 2000 rpm and 10, 30 and 50 bar, leaking
    2e-12 m³/(s·Pa):

    >>> n = np.repeat([1000 / 60, 1500 / 60, 2000 / 60], 3)
    >>> p = np.tile([10e5, 30e5, 50e5], 3)
    >>> d = derived_displacement(n, p, 28e-6 * n - 2e-12 * p, max_pressure=60e5)
    >>> round(d.value * 1e6, 6), d.points
    (28.0, 9)

    References
    ----------
    ISO 8426 (derived capacity; the method from memory); ISO 4409.
    """
    t = _table(speed=speed, pressure=pressure, flow=flow, viscosity=viscosity)
    n, p, q = t["speed"], t["pressure"], t["flow"]
    mu = t.get("viscosity", np.ones_like(n))
    finite = np.isfinite(n) & np.isfinite(p) & np.isfinite(q) & np.isfinite(mu)
    n, p, q, mu = n[finite], p[finite], q[finite], mu[finite]
    if n.size == 0:
        raise PhysicsError("flow", "has no complete point to derive a displacement from")
    positive(n, "speed")
    non_negative(p, "pressure")
    non_negative(q, "flow")
    positive(mu, "viscosity")
    notes: list[str] = []
    if max_pressure is None:
        max_pressure = float(p.max()) * _LOW_PRESSURE_SHARE
        if p.min() > max_pressure:
            max_pressure = float(p.min())
    else:
        non_negative(max_pressure, "max_pressure")
    use = p <= max_pressure * (1 + 1e-9)
    speeds = _count_levels(n[use]) if use.any() else 0
    if speeds < 2:
        raise PhysicsError(
            "speed", f"must take two or more values at low pressure to derive the displacement (found "
            f"{speeds} among the points used); add a speed or give the displacement")
    nu, pu, qu, mu_u = n[use], p[use], q[use], mu[use]
    vis_labels, vis_count = _levels(mu_u)
    leak_cols = [-pu * (vis_labels == j) for j in range(vis_count)]
    columns = [nu, np.ones_like(nu), *leak_cols]
    try:
        coef, cov, _ = _lstsq(columns, qu, "flow")
    except ModelError:
        # Leakage and offset cannot be told apart (one pressure): the slope alone is what we need.
        coef, cov, _ = _lstsq(columns[:2], qu, "flow")
        notes.append("leakage not separable from the offset (one pressure per viscosity); V is the "
                     "slope of flow on speed")
        leak_cols = []
    if nu.size <= len(coef):
        notes.append("no redundant point: the uncertainty is unknown")
    uncertainty = float(math.sqrt(cov[0, 0])) if cov[0, 0] >= 0 else math.nan
    floor = UNCERTAINTY_FLOOR * abs(float(coef[0]))
    if uncertainty < floor:  # False for NaN
        notes.append(f"the fit's standard uncertainty of the derived displacement is below {UNCERTAINTY_FLOOR:g} of "
                     "its value (round-off of an almost noiseless table, not a measurement): that floor is given")
        uncertainty = floor
    return DerivedDisplacement(
        value=float(coef[0]), uncertainty=uncertainty,
        points=int(nu.size), used=np.flatnonzero(use), leakage=tuple(float(k) for k in coef[2:]),
        offset=float(coef[1]), max_pressure=float(pu.max()), notes=tuple(notes))


# -- models and predictions -------------------------------------------------------------------------
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


@dataclass(frozen=True)
class Residuals:
    """Fit residuals (measured less model): RMS and largest magnitude of flow [m³/s] and torque [N·m]."""

    flow_rms: float
    flow_max: float
    torque_rms: float
    torque_max: float


@dataclass(frozen=True, eq=False)
class Prediction:
    """Predicted performance at the asked points (arrays of the broadcast shape).

    Attributes
    ----------
    flow : array
        Effective flow [m³/s].
    torque : array
        Input torque [N·m].
    volumetric, hydromechanical, total : array
        η_v, η_hm, η_t [-].
    input_power : array
        Input power [W].
    extrapolated : array of bool
        True where the point lies outside the measured ranges.
    extrapolation : array of str
        Which range each point leaves ('' inside).
    """

    flow: np.ndarray
    torque: np.ndarray
    volumetric: np.ndarray
    hydromechanical: np.ndarray
    total: np.ndarray
    input_power: np.ndarray
    extrapolated: np.ndarray
    extrapolation: np.ndarray


def _prediction(v: float, n: np.ndarray, p: np.ndarray, flow: np.ndarray, torque: np.ndarray,
                left: np.ndarray) -> Prediction:
    # Efficiencies by the pump relations; a torque that is not positive (only with unphysical
    # coefficients) has no efficiency and gives NaN.
    ok = torque > 0
    safe = np.where(ok, torque, 1.0)
    ev = pump.volumetric_efficiency(flow, v, n)
    ehm = np.where(ok, pump.hydromechanical_efficiency(v, p, safe), np.nan)
    pin = np.where(ok, pump.shaft_power(safe, n), np.nan)
    return Prediction(flow=np.asarray(flow), torque=np.where(ok, torque, np.nan), volumetric=np.asarray(ev),
                      hydromechanical=ehm, total=np.asarray(ev * ehm), input_power=pin,
                      extrapolated=np.asarray(left != ""), extrapolation=left)


def _operating_point(speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike
                     ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    n, p, mu = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (speed, pressure, viscosity)))
    positive(n, "at_speed")
    non_negative(p, "at_pressure")
    positive(mu, "at_viscosity")
    return n, p, mu


@dataclass(frozen=True, eq=False)
class WilsonModel:
    r"""Wilson's loss model of a pump, fitted to a measured table.

    .. math::

        Q = V n - C_s \frac{D \Delta p}{\mu}, \qquad
        T = D \Delta p (1 + C_f) + C_v D \mu \omega + T_c, \qquad D = \frac{V}{2\pi},\ \omega = 2\pi n

    Attributes
    ----------
    displacement : float
        V [m³/rev].
    c_s, c_f, c_v : float
        Slip, pressure-friction and viscous-drag coefficients [-].
    t_c : float
        Constant friction torque [N·m].
    uncertainty : dict of str to float
        Standard uncertainty of each fitted coefficient (same units); a coefficient assumed rather
        than fitted is absent.
    ranges : MeasuredRanges
        The measured ranges; predictions outside them are marked extrapolated.
    residuals : Residuals or None
        Fit residuals.
    points : int
        Points fitted.
    notes : tuple of str
        Which dependences were assumed rather than fitted, and other warnings.
    """

    displacement: float
    c_s: float
    c_f: float
    c_v: float
    t_c: float
    uncertainty: dict[str, float] = field(default_factory=dict)
    ranges: MeasuredRanges = field(default_factory=MeasuredRanges)
    residuals: Residuals | None = None
    points: int = 0
    notes: tuple[str, ...] = ()
    method: str = "wilson"

    def predict(self, speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike) -> Prediction:
        """Predict flow, torque, efficiencies and input power (arrays broadcast together).

        Parameters
        ----------
        speed : array
            Shaft speed n [rev/s], > 0.
        pressure : array
            Pressure rise Δp [Pa], >= 0.
        viscosity : array
            Dynamic viscosity μ [Pa·s], > 0.

        Where the slip would exceed the geometric flow, the flow is 0 (a pump cannot deliver less).

        Examples
        --------
        >>> m = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)
        >>> r = m.predict(25.0, 250e5, 0.03)
        >>> round(float(r.volumetric), 3), round(float(r.hydromechanical), 3)
        (0.931, 0.936)
        """
        n, p, mu = _operating_point(speed, pressure, viscosity)
        d = self.displacement / TWO_PI
        q_th = pump.geometric_flow(self.displacement, n)
        flow = np.maximum(q_th - self.c_s * d * p / mu, 0.0)
        torque = d * p * (1 + self.c_f) + self.c_v * d * mu * TWO_PI * n + self.t_c
        return _prediction(self.displacement, n, p, flow, torque, self.ranges.left(n, p, mu))


def _clean(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike, viscosity: ArrayLike
           ) -> tuple[dict[str, np.ndarray], list[str]]:
    t = _table(speed=speed, pressure=pressure, flow=flow, torque=torque, viscosity=viscosity)
    finite = np.logical_and.reduce([np.isfinite(a) for a in t.values()])
    notes = []
    if not finite.all():
        notes.append(f"{int((~finite).sum())} point(s) with a missing value left out")
    t = {k: a[finite] for k, a in t.items()}
    if t["speed"].size == 0:
        raise ModelError("flow", "has no complete point")
    positive(t["speed"], "speed")
    non_negative(t["pressure"], "pressure")
    non_negative(t["flow"], "flow")
    positive(t["torque"], "torque")
    positive(t["viscosity"], "viscosity")
    return t, notes


def _ranges(t: dict[str, np.ndarray]) -> MeasuredRanges:
    def span(x: np.ndarray) -> tuple[float, float]:
        return float(x.min()), float(x.max())

    return MeasuredRanges(pressure=span(t["pressure"]), speed=span(t["speed"]), viscosity=span(t["viscosity"]))


def _displacement(t: dict[str, np.ndarray], displacement: float | None, notes: list[str]) -> float:
    if displacement is not None and not (isinstance(displacement, float) and math.isnan(displacement)):
        v = float(np.asarray(displacement, dtype=float).reshape(-1)[0])
        positive(v, "displacement")
        return v
    d = derived_displacement(t["speed"], t["pressure"], t["flow"], viscosity=t["viscosity"])
    notes.append(f"displacement derived from the table (ISO 8426 idea) from {d.points} low-pressure points")
    return d.value


def fit_wilson(
    speed: ArrayLike,
    pressure: ArrayLike,
    flow: ArrayLike,
    torque: ArrayLike,
    viscosity: ArrayLike,
    displacement: float | None = None,
) -> WilsonModel:
    r"""Fit Wilson's loss model to a measured table by linear least squares.

    The flow equation gives C_s from V·n − Q = C_s·(D·Δp/μ); the torque equation gives C_f, C_v and
    T_c from T − D·Δp = C_f·(D·Δp) + C_v·(D·μ·ω) + T_c. What the table cannot separate is assumed as
    in Wilson's model and said so in ``notes``:

    * one viscosity: leakage ∝ 1/μ and viscous torque ∝ μ are assumed (the speed dependence of the
      viscous torque is still fitted if the speed varies);
    * one speed: leakage independent of speed and viscous torque ∝ ω are assumed;
    * one speed and one viscosity: μ·ω is constant and the viscous drag cannot be told from the
      constant torque; the whole no-load torque is taken as viscous drag (T_c = 0), which makes the
      predicted torque loss grow with speed and viscosity, the cautious side for sizing a motor.

    Parameters
    ----------
    speed : array
        Shaft speed n of each point [rev/s].
    pressure : array
        Pressure rise Δp [Pa].
    flow : array
        Measured effective flow Q [m³/s].
    torque : array
        Measured input torque T [N·m] (from a power: T = P/(2π·n)).
    viscosity : array
        Dynamic viscosity μ of the oil at each point [Pa·s] (a single value for the whole table).
    displacement : float, optional
        Displacement V [m³/rev]; default the derived displacement (:func:`derived_displacement`).

    Returns
    -------
    WilsonModel

    Raises
    ------
    ModelError
        Fewer points than coefficients + 1, one pressure only, or a singular fit.

    Examples
    --------
    A table made from known coefficients (an invented pump) gives them back:

    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> true = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)
    >>> m = fit_wilson(n, p, true.flow, true.torque, mu, 28e-6)
    >>> round(m.c_s * 1e8, 6), round(m.c_f, 6), round(m.c_v / 1e5, 6), round(m.t_c, 6)
    (1.3, 0.04, 1.0, 1.0)

    References
    ----------
    Wilson (1950); Merritt (1967), ch. 5; ISO 4409 (the measurements).
    """
    t, notes = _clean(speed, pressure, flow, torque, viscosity)
    n, p, q, tq, mu = t["speed"], t["pressure"], t["flow"], t["torque"], t["viscosity"]
    v = _displacement(t, displacement, notes)
    d = v / TWO_PI
    omega = TWO_PI * n
    speeds, viscosities, pressures = _count_levels(n), _count_levels(mu), _count_levels(p)
    if pressures < 2:
        raise ModelError("pressure", "must take two or more values for Wilson's model (one measured)")

    # Flow: one coefficient, no intercept (Wilson's leakage vanishes at zero pressure).
    if q.size < 2:
        raise ModelError("table", "has too few points for Wilson's model")
    (c_s,), cov_s, res_q = _lstsq([d * p / mu], pump.geometric_flow(v, n) - q, "flow")

    # Torque: up to three coefficients.
    columns = [d * p, d * mu * omega, np.ones_like(p)]
    names = ["c_f", "c_v", "t_c"]
    if viscosities == 1:
        notes.append("leakage: viscosity dependence (∝ 1/μ) assumed as in Wilson's model, not fitted: "
                     "one viscosity measured")
    if speeds == 1:
        notes.append("leakage: independence of speed assumed as in Wilson's model, not fitted: one speed "
                     "measured")
    if speeds == 1 and viscosities == 1:
        columns, names = columns[:2], names[:2]
        notes.append("no-load torque taken as viscous drag (T_c = 0): its speed and viscosity dependence "
                     "assumed as in Wilson's model, not fitted: one speed and one viscosity measured")
    elif viscosities == 1:
        notes.append("viscous torque: viscosity dependence (∝ μ) assumed as in Wilson's model, not fitted: "
                     "one viscosity measured (its speed dependence is fitted)")
    elif speeds == 1:
        notes.append("viscous torque: speed dependence (∝ ω) assumed as in Wilson's model, not fitted: "
                     "one speed measured (its viscosity dependence is fitted)")
    if p.size < len(columns) + 1:
        raise ModelError("table", f"has {p.size} points; Wilson's model needs at least {len(columns) + 1}")
    coef, cov, res_t = _lstsq(columns, tq - d * p, "torque")
    fitted = dict(zip(names, (float(c) for c in coef), strict=True))
    uncertainty = {"c_s": float(math.sqrt(cov_s[0, 0]))} if cov_s[0, 0] >= 0 else {}
    uncertainty.update({k: float(math.sqrt(cov[i, i])) for i, k in enumerate(names) if cov[i, i] >= 0})

    symbols = {"c_s": "C_s", "c_f": "C_f", "c_v": "C_v", "t_c": "T_c"}
    negative = [symbols[k] for k, c in (("c_s", c_s), *fitted.items()) if c < 0]
    if negative:
        notes.append(f"{', '.join(negative)} fitted negative: the table does not behave like Wilson's "
                     "model there; check the table")
    return WilsonModel(
        displacement=v, c_s=float(c_s), c_f=fitted["c_f"], c_v=fitted["c_v"], t_c=fitted.get("t_c", 0.0),
        uncertainty=uncertainty, ranges=_ranges(t),
        residuals=Residuals(flow_rms=float(np.sqrt(np.mean(res_q**2))), flow_max=float(np.abs(res_q).max()),
                            torque_rms=float(np.sqrt(np.mean(res_t**2))),
                            torque_max=float(np.abs(res_t).max())),
        points=int(p.size), notes=tuple(notes))


# -- interpolation fallback -------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class _Curve:
    speed: float
    viscosity: float
    pressure: np.ndarray
    volumetric: np.ndarray
    hydromechanical: np.ndarray
    torque: np.ndarray


@dataclass(frozen=True, eq=False)
class InterpolatedPerformance:
    """Measured efficiencies interpolated linearly in pressure, at the measured speed and viscosity.

    The fallback for a table too small for Wilson's model. For a point at another speed or viscosity
    the curve nearest in speed and viscosity is used (efficiencies taken as they are; marked
    extrapolated); outside its pressure range the end values are held (marked extrapolated too).
    """

    displacement: float
    curves: tuple[_Curve, ...]
    ranges: MeasuredRanges
    points: int
    notes: tuple[str, ...] = ()
    method: str = "interpolation"

    def predict(self, speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike) -> Prediction:
        """Predict as :meth:`WilsonModel.predict` does, from the interpolated efficiencies."""
        n, p, mu = _operating_point(speed, pressure, viscosity)
        distance = np.stack([np.abs(np.log(n / c.speed)) + np.abs(np.log(mu / c.viscosity))
                             for c in self.curves])
        nearest = np.argmin(distance, axis=0)
        ev, ehm, tq = (np.empty(n.shape) for _ in range(3))
        left = np.full(n.shape, "", dtype=object)
        for i, c in enumerate(self.curves):
            m = nearest == i
            ev[m] = np.interp(p[m], c.pressure, c.volumetric)
            ehm[m] = np.interp(p[m], c.pressure, c.hydromechanical)
            tq[m] = np.interp(p[m], c.pressure, c.torque)
            # One measured speed and viscosity per curve: allow the level tolerance around them.
            near = MeasuredRanges(pressure=(float(c.pressure[0]), float(c.pressure[-1])),
                                  speed=(c.speed * (1 - LEVEL_TOLERANCE), c.speed * (1 + LEVEL_TOLERANCE)),
                                  viscosity=(c.viscosity * (1 - LEVEL_TOLERANCE),
                                             c.viscosity * (1 + LEVEL_TOLERANCE)))
            left[m] = near.left(n[m], p[m], mu[m])
        flow = pump.geometric_flow(self.displacement, n) * ev
        # Torque as the ideal torque over η_hm; at zero pressure η_hm is 0, so take the measured torque.
        with np.errstate(divide="ignore", invalid="ignore"):
            torque = np.where(ehm > 0, pump.drive_torque(self.displacement, p, 1.0) / np.where(ehm > 0, ehm, 1),
                              tq)
        return _prediction(self.displacement, n, p, flow, torque, left)


def interpolate_performance(
    speed: ArrayLike,
    pressure: ArrayLike,
    flow: ArrayLike,
    torque: ArrayLike,
    viscosity: ArrayLike,
    displacement: float | None = None,
    notes: tuple[str, ...] = (),
) -> InterpolatedPerformance:
    """Build the interpolation model: measured η_v, η_hm (and torque) against pressure per curve.

    Parameters are those of :func:`fit_wilson`; ``notes`` are carried into the model.

    Examples
    --------
    >>> m = interpolate_performance(25.0, [50e5, 250e5], [41e-3 / 60, 38e-3 / 60], [25.0, 115.0], 0.03, 28e-6)
    >>> round(float(m.predict(25.0, 150e5, 0.03).volumetric), 4)
    0.9405
    """
    t, more = _clean(speed, pressure, flow, torque, viscosity)
    notes = (*notes, *more)
    more = []
    v = _displacement(t, displacement, more)
    e = evaluate_points(t["speed"], t["pressure"], t["flow"], torque=t["torque"], displacement=v,
                        viscosity=t["viscosity"])
    curves = []
    for idx in group_points(t["speed"], t["pressure"], t["viscosity"]):
        curves.append(_Curve(speed=float(np.mean(t["speed"][idx])), viscosity=float(np.mean(t["viscosity"][idx])),
                             pressure=t["pressure"][idx], volumetric=e.volumetric[idx],
                             hydromechanical=e.hydromechanical[idx], torque=t["torque"][idx]))
    return InterpolatedPerformance(displacement=v, curves=tuple(curves), ranges=_ranges(t),
                                   points=int(t["speed"].size), notes=(*notes, *more))


#: What :func:`fit_performance` returns: both have ``predict``, ``notes``, ``ranges`` and ``method``.
PerformanceModel = WilsonModel | InterpolatedPerformance


def fit_performance(
    speed: ArrayLike,
    pressure: ArrayLike,
    flow: ArrayLike,
    torque: ArrayLike,
    viscosity: ArrayLike,
    displacement: float | None = None,
) -> PerformanceModel:
    """Model of a measured table: Wilson's model, or interpolation where the table is too small.

    Tries :func:`fit_wilson`; where the table has fewer points than coefficients + 1, a single
    pressure, or terms that cannot be separated, falls back to :func:`interpolate_performance` and
    says so in ``notes``. Bad values (negative flow, ...) still raise :class:`PhysicsError`.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity, displacement
        As for :func:`fit_wilson`: [rev/s], [Pa], [m³/s], [N·m], [Pa·s], [m³/rev].

    Returns
    -------
    WilsonModel or InterpolatedPerformance

    Examples
    --------
    Two points at one speed and viscosity are too few for the two torque coefficients (C_f and C_v)
    plus one:

    >>> m = fit_performance(25.0, [50e5, 250e5], [41e-3 / 60, 38e-3 / 60], [25.0, 115.0], 0.03, 28e-6)
    >>> m.method
    'interpolation'

    References
    ----------
    Wilson (1950); Merritt (1967), ch. 5; ISO 4409.
    """
    try:
        return fit_wilson(speed, pressure, flow, torque, viscosity, displacement)
    except ModelError as exc:
        note = (f"Wilson's model not fitted ({exc.argument} {exc.reason}); measured efficiencies "
                "interpolated linearly in pressure at the measured speed and viscosity")
        return interpolate_performance(speed, pressure, flow, torque, viscosity, displacement, (note,))


# -- thin wrappers in cell-argument order (sheetpump.catalogue.performance) ------------------------
def derived_displacement_value(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike,
                               max_pressure: float = 0.0) -> float:
    """:func:`derived_displacement` value [m³/rev]; ``max_pressure`` 0 means the default.

    >>> derived_displacement_value([20.0, 20.0, 40.0, 40.0], [0.0, 1e6, 0.0, 1e6], [4e-4, 3.9e-4, 8e-4, 7.9e-4])
    2e-05
    """
    d = derived_displacement(speed, pressure, flow, max_pressure if max_pressure > 0 else None)
    return d.value


def derived_displacement_uncertainty(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike,
                                     max_pressure: float = 0.0) -> float:
    """Standard uncertainty of :func:`derived_displacement` [m³/rev]; ``max_pressure`` 0: default.

    Raises :class:`PhysicsError` where no point is redundant (the uncertainty cannot be estimated).
    """
    d = derived_displacement(speed, pressure, flow, max_pressure if max_pressure > 0 else None)
    if not math.isfinite(d.uncertainty):
        raise PhysicsError("flow", f"has only {d.points} points at the pressures used, one per coefficient: "
                           "the uncertainty cannot be estimated; add points or raise max_pressure")
    return d.uncertainty


def _predict(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike, viscosity: ArrayLike,
             displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike, at_viscosity: ArrayLike
             ) -> Prediction:
    model = fit_performance(speed, pressure, flow, torque, viscosity, displacement)
    return model.predict(at_speed, at_pressure, at_viscosity)


def predicted_flow(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                   viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                   at_viscosity: ArrayLike) -> np.ndarray:
    """Flow [m³/s] at (at_speed, at_pressure, at_viscosity) from :func:`fit_performance` of the table.

    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)
    >>> round(float(predicted_flow(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)) * 60000, 3)
    39.683
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).flow


def _predictor(output: str, text: str) -> Callable[..., np.ndarray]:
    """A function like :func:`predicted_flow` that gives another output of the prediction."""

    def predicted(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                  viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                  at_viscosity: ArrayLike) -> np.ndarray:
        result = getattr(_predict(speed, pressure, flow, torque, viscosity, displacement, at_speed,
                                  at_pressure, at_viscosity), output)
        return result.astype(float) if output == "extrapolated" else result

    name = {"volumetric": "volumetric_efficiency", "total": "total_efficiency"}.get(output, output)
    predicted.__name__ = predicted.__qualname__ = f"predicted_{name}"
    predicted.__doc__ = f"{text} at the asked points; arguments as :func:`predicted_flow`."
    return predicted


predicted_torque = _predictor("torque", "Input torque [N·m]")
predicted_input_power = _predictor("input_power", "Input power [W]")
predicted_volumetric_efficiency = _predictor("volumetric", "Volumetric efficiency η_v [-]")
predicted_total_efficiency = _predictor("total", "Total efficiency η_t [-]")
predicted_extrapolated = _predictor("extrapolated",
                                    "1 where the asked point lies outside the measured ranges, else 0")
