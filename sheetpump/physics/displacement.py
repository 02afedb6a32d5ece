r"""Derived displacement of a pump from a measured table and its uncertainty (the ISO 8426 idea).

The displacement a table shows is the slope of flow on speed, extrapolated to zero pressure: over the
points at low pressure, Q = V_i·n + c − Σ k_j·Δp (one leakage coefficient per viscosity level) is
fitted by least squares (:func:`derived_displacement`). :func:`derived_displacement_value` and
:func:`derived_displacement_uncertainty` are its cell functions (``SP_DERIVED_DISPLACEMENT`` and
``SP_DERIVED_DISPLACEMENT_U``).

Pure functions of SI numbers or numpy arrays: speed n [rev/s], pressure rise Δp [Pa], flow Q [m³/s],
dynamic viscosity μ [Pa·s], displacement V [m³/rev].

References
----------
.. [1] ISO 8426, Hydraulic fluid power -- Positive displacement pumps and motors -- Determination of
   derived capacity.
.. [2] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ModelError, PhysicsError
from .table import count_levels, least_squares, levels, table_columns
from .validate import non_negative, positive

__all__ = [
    "UNCERTAINTY_FLOOR",
    "DerivedDisplacement",
    "derived_displacement",
    "derived_displacement_uncertainty",
    "derived_displacement_value",
    "displacement_or_derived",
]

#: Floor of the derived displacement's standard uncertainty, relative to its value [-]. A test bench's
#: flow meter and tachometer are good to a few parts in ten thousand at best (common practice; the
#: accuracy classes of ISO 4409 are coarser), so no table knows a displacement to one part in a million:
#: a fit's uncertainty below this is round-off of an (almost) noiseless table, not a measurement, and a
#: ratio over it (difference from nominal in standard uncertainties) would be noise over noise.
#: Still a thousand times below what any bench resolves, so it never hides a real uncertainty.
UNCERTAINTY_FLOOR = 1e-6

#: By default the derived displacement uses the points up to this share of the highest pressure.
_LOW_PRESSURE_SHARE = 1.0 / 3.0

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
    t = table_columns(speed=speed, pressure=pressure, flow=flow, viscosity=viscosity)
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
    speeds = count_levels(n[use]) if use.any() else 0
    if speeds < 2:
        raise PhysicsError(
            "speed", f"must take two or more values at low pressure to derive the displacement (found "
            f"{speeds} among the points used); add a speed or give the displacement")
    nu, pu, qu, mu_u = n[use], p[use], q[use], mu[use]
    vis_labels, vis_count = levels(mu_u)
    leak_cols = [-pu * (vis_labels == j) for j in range(vis_count)]
    columns = [nu, np.ones_like(nu), *leak_cols]
    try:
        coef, cov, _ = least_squares(columns, qu, "flow")
    except ModelError:
        # Leakage and offset cannot be told apart (one pressure): the slope alone is what we need.
        coef, cov, _ = least_squares(columns[:2], qu, "flow")
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


def displacement_or_derived(t: dict[str, np.ndarray], displacement: float | None, notes: list[str]) -> float:
    """The displacement given [m³/rev], or (None or NaN) the one derived from the table's columns ``t``
    (:func:`derived_displacement`), said so in ``notes``."""
    if displacement is not None and not (isinstance(displacement, float) and math.isnan(displacement)):
        v = float(np.asarray(displacement, dtype=float).reshape(-1)[0])
        positive(v, "displacement")
        return v
    d = derived_displacement(t["speed"], t["pressure"], t["flow"], viscosity=t["viscosity"])
    notes.append(f"displacement derived from the table (ISO 8426 idea) from {d.points} low-pressure points")
    return d.value


def derived_displacement_value(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike,
                               max_pressure: float = 0.0) -> float:
    r"""Displacement derived from a measured table [m³/rev]: the formula of ``SP_DERIVED_DISPLACEMENT``.

    .. math:: Q = V_i\,n + c - k\,\Delta p \quad\text{fitted over the points with } \Delta p \le p_{max}

    V_i, the slope of flow on speed extrapolated to zero pressure, is the derived displacement
    (:func:`derived_displacement`, which this calls in cell-argument order).

    Parameters
    ----------
    speed, pressure, flow : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s].
    max_pressure : float, optional
        Highest pressure of the points used [Pa]; 0 (the default): a third of the highest measured.

    Examples
    --------
    >>> derived_displacement_value([20.0, 20.0, 40.0, 40.0], [0.0, 1e6, 0.0, 1e6], [4e-4, 3.9e-4, 8e-4, 7.9e-4])
    2e-05

    References
    ----------
    ISO 8426 (derived capacity; the method from memory); ISO 4409.
    """
    d = derived_displacement(speed, pressure, flow, max_pressure if max_pressure > 0 else None)
    return d.value


def derived_displacement_uncertainty(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike,
                                     max_pressure: float = 0.0) -> float:
    r"""Standard uncertainty of the derived displacement [m³/rev]: the formula of ``SP_DERIVED_DISPLACEMENT_U``.

    .. math:: u(V_i) = \sqrt{\left[s^2 (A^T A)^{-1}\right]_{11}}, \qquad s^2 = \frac{RSS}{N - p}

    from the least-squares fit of :func:`derived_displacement_value` (N points, p coefficients), never
    below :data:`UNCERTAINTY_FLOOR` of the value.

    Parameters
    ----------
    speed, pressure, flow : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s].
    max_pressure : float, optional
        Highest pressure of the points used [Pa]; 0 (the default): a third of the highest measured.

    Raises
    ------
    PhysicsError
        Where no point is redundant (the uncertainty cannot be estimated).

    Examples
    --------
    An invented 28 cm³/rev pump at three speeds and three pressures, its flow off by ±1e-7 m³/s:

    >>> n = np.repeat([1000 / 60, 1500 / 60, 2000 / 60], 3)
    >>> p = np.tile([10e5, 30e5, 50e5], 3)
    >>> q = 28e-6 * n - 2e-12 * p + np.array([1, -1, 0, 0, 1, -1, -1, 0, 1]) * 1e-7
    >>> round(derived_displacement_uncertainty(n, p, q, 60e5) * 1e6, 4)  # cm³/rev
    0.0049

    References
    ----------
    ISO 8426 (derived capacity; from memory); the least-squares covariance of any statistics textbook.
    """
    d = derived_displacement(speed, pressure, flow, max_pressure if max_pressure > 0 else None)
    if not math.isfinite(d.uncertainty):
        raise PhysicsError("flow", f"has only {d.points} points at the pressures used, one per coefficient: "
                           "the uncertainty cannot be estimated; add points or raise max_pressure")
    return d.uncertainty
