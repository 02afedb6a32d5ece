"""What are η_v and η_t of this pump at (p, n, ν)? The one place that answers it.

The answer comes, in this order of preference, from

1. the datasheet's performance table, fitted with a loss model (:func:`sheetpump.physics.prediction.
   fit_performance`, Wilson's model) and evaluated at each duty point; points outside the measured range
   are flagged ``extrapolated``;
2. a single efficiency stated on the datasheet, applied at every pressure, speed and viscosity (an
   extrapolation by nature, and said so);
3. nothing: then the flow check can only use the geometric flow (η_v = 1) as an upper bound and the drive
   figures use η_t = η_v as a conservative (high) estimate where one of them is stated, and are unknown
   (NaN) otherwise.

Every route returns the same :class:`Estimate` of numpy arrays; ``basis`` and ``notes`` say which route
was taken and why, so the checker can turn them into findings. Pure SI numbers in and out.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .datasheet import Datasheet
from .physics import prediction
from .physics.fluid import MINERAL_OIL_DENSITY_15
from .physics.pump import TWO_PI

__all__ = ["Estimate", "efficiencies", "estimate"]



@dataclass(frozen=True)
class Estimate:
    """Performance of one pump at a set of duty points (arrays of the duty's length, SI).

    ``basis`` is ``"table"`` (a fitted performance table), ``"stated"`` (single stated efficiencies) or
    ``"none"``. ``volumetric_known`` / ``total_known`` say whether η_v / η_t come from data (False: a bound
    or an assumption, see ``notes``).
    """

    volumetric_efficiency: np.ndarray  # η_v [-]
    hydromechanical_efficiency: np.ndarray  # η_hm [-]
    total_efficiency: np.ndarray  # η_t [-]
    flow: np.ndarray  # delivered (effective) flow [m^3/s]
    torque: np.ndarray  # shaft torque [N*m]
    input_power: np.ndarray  # [W]
    extrapolated: np.ndarray  # bool: outside the data the figure rests on
    basis: str
    volumetric_known: bool
    total_known: bool
    notes: tuple[str, ...] = ()


def _from_table(ds: Datasheet, pressure: np.ndarray, speed: np.ndarray, viscosity: np.ndarray,
                density: np.ndarray | float, table_density: float) -> tuple[Estimate | None, str]:
    """Fit the performance table and evaluate it; ``(None, why)`` when that is not possible."""
    table = ds.performance
    if table is None or len(table) == 0:
        return None, "the datasheet has no performance table"
    t_speed = np.asarray(table.speed, float)
    if table.torque is not None:
        torque = np.asarray(table.torque, float)
    elif table.input_power is not None:
        torque = np.asarray(table.input_power, float) / (TWO_PI * t_speed)  # P = T·2πn (ISO 4391)
    else:
        return None, "the performance table gives neither torque nor input power"
    shape = np.broadcast_shapes(pressure.shape, speed.shape, viscosity.shape)
    p, n, nu, rho = (np.broadcast_to(x, shape) for x in (pressure, speed, viscosity, density))
    running = n > 0  # the model needs a turning shaft; standing points are filled in by _stopped
    try:
        # Wilson's model wants dynamic viscosity μ = ν·ρ
        model = prediction.fit_performance(
            t_speed, np.asarray(table.pressure, float), np.asarray(table.flow, float), torque,
            np.asarray(table.viscosity, float) * table_density, ds.displacement)
        pred = model.predict(n[running], p[running], nu[running] * rho[running])
    except (ValueError, ArithmeticError, np.linalg.LinAlgError) as exc:  # PhysicsError is a ValueError
        return None, f"the performance table could not be used ({exc})"

    def full(values: np.ndarray, fill: float | bool) -> np.ndarray:
        out = np.full(shape, fill, dtype=np.asarray(values).dtype)
        out[running] = values
        return out

    eta_v, eta_hm = full(pred.volumetric, math.nan), full(pred.hydromechanical, math.nan)
    torque_out, extrapolated = full(pred.torque, math.nan), full(pred.extrapolated, False)
    notes = [f"η_v and η_t from the performance table ({len(table)} points), {model.method}; table "
             "viscosity taken at the application oil's density", *model.notes]
    # A fit with a negative loss coefficient can promise η above 1: never count on more than the
    # geometric flow or less than the loss-free torque there, and say so (the rule then warns).
    unphysical = (eta_v > 1) | (eta_hm > 1)
    if unphysical.any():
        notes.append(f"the fitted model gives an efficiency above 1 at {int(unphysical.sum())} point(s) "
                     "(a negative loss coefficient): capped at 1 and treated as extrapolated")
        eta_v, eta_hm = np.minimum(eta_v, 1.0), np.minimum(eta_hm, 1.0)
        torque_out = np.maximum(torque_out, ds.displacement * p / TWO_PI)
        extrapolated = extrapolated | unphysical
    flow = ds.displacement * n * eta_v  # Q_e = V·n·η_v
    power = torque_out * TWO_PI * n  # P = T·2πn
    return Estimate(eta_v, eta_hm, eta_v * eta_hm, flow, torque_out, power, extrapolated, "table", True, True,
                    tuple(notes)), ""


def estimate(datasheet: Datasheet, pressure: np.ndarray, speed: np.ndarray, viscosity: np.ndarray,
             density: np.ndarray | float = MINERAL_OIL_DENSITY_15, table_density: float | None = None) -> Estimate:
    r"""Efficiencies, delivered flow, shaft torque and input power of a pump at duty points.

    .. math:: Q_e = V n \eta_v, \qquad T = \frac{V \Delta p}{2\pi \eta_{hm}}, \qquad
              P_{in} = T \cdot 2\pi n, \qquad \eta_{hm} = \eta_t / \eta_v

    Parameters
    ----------
    datasheet : Datasheet
        The pump (displacement V [m³/rev], performance table or stated efficiencies [-]).
    pressure : array
        Pressure rise Δp [Pa].
    speed : array
        Shaft speed n [rev/s].
    viscosity : array
        Kinematic viscosity ν of the oil at each point [m²/s].
    density : array or float, optional
        Oil density ρ at each point [kg/m³] (the loss model works with μ = ν·ρ); default
        :data:`sheetpump.physics.fluid.MINERAL_OIL_DENSITY_15`.
    table_density : float, optional
        Density [kg/m³] to turn the table's kinematic viscosities into dynamic ones (the supplier's
        test oil is rarely stated); default: ``density`` at its mean.

    Returns
    -------
    Estimate
        Arrays of the points' shape; see :class:`Estimate`. A point where the pump stands still
        (n = 0) delivers no flow and takes no power; its torque is the static V·Δp/2π.

    Examples
    --------
    An invented 28 cm³/rev pump stating η_v = 0.95 and η_t = 0.85, at 200 bar and 1500 rpm:

    >>> ds = Datasheet("Invented", "G28", 28e-6, 8.0, 50.0, 250e5, 300e5,
    ...                volumetric_efficiency=0.95, total_efficiency=0.85)
    >>> e = estimate(ds, np.array([200e5]), np.array([25.0]), np.array([32e-6]))
    >>> e.basis, round(float(e.flow[0]) * 60000, 3), round(float(e.input_power[0]), 1)
    ('stated', 39.9, 15647.1)

    References
    ----------
    ISO 4391 (symbols); ISO 4409 (test method); Wilson (1950) and Merritt (1967) for the loss model.
    """
    pressure = np.asarray(pressure, float)
    speed = np.asarray(speed, float)
    viscosity = np.asarray(viscosity, float)
    density = np.asarray(density, float)
    if table_density is None:
        table_density = float(np.mean(density))
    est, why = _from_table(datasheet, pressure, speed, viscosity, density, table_density)
    if est is None:
        est = _from_stated(datasheet, pressure, speed, why)
    return _stopped(datasheet, est, pressure, speed)


def _from_stated(ds: Datasheet, pressure: np.ndarray, speed: np.ndarray, why: str) -> Estimate:
    v, t = ds.volumetric_efficiency, ds.total_efficiency
    shape = np.broadcast_shapes(pressure.shape, speed.shape)
    notes = [why] if why else []
    if v is not None and t is not None:
        basis = "stated"
        notes.append(f"single stated efficiencies η_v = {v:g} and η_t = {t:g} applied at every point "
                     "(extrapolated: the datasheet does not say how they vary with pressure, speed and "
                     "viscosity)")
    elif v is not None:
        basis = "stated"
        t = v  # η_t ≤ η_v, so η_t = η_v can only understate the drive power: flagged below
        notes.append(f"single stated η_v = {v:g} applied at every point (extrapolated); no total "
                     "efficiency stated: drive figures assume η_hm = 1 and are too low")
    elif t is not None:
        basis = "stated"
        v = 1.0  # upper bound of the flow; with it the drive power P = V·n·Δp·η_v/η_t is an upper bound too
        notes.append(f"single stated η_t = {t:g} applied at every point (extrapolated); no volumetric "
                     "efficiency stated: delivered flow taken as the geometric flow (an upper bound)")
    else:
        basis = "none"
        notes.append("the datasheet states no efficiency: delivered flow taken as the geometric flow "
                     "(an upper bound); drive figures unknown")
    # constant efficiencies as read-only broadcast views: no per-sample work
    v_, t_ = (v if v is not None else 1.0), (t if t is not None else math.nan)
    eta_v = np.broadcast_to(np.float64(v_), shape)
    eta_t = np.broadcast_to(np.float64(t_), shape)
    eta_hm = np.broadcast_to(np.float64(t_ / v_), shape)
    flow = (ds.displacement * v_) * speed
    torque = (ds.displacement / (TWO_PI * (t_ / v_))) * pressure
    power = torque * (TWO_PI * speed)
    return Estimate(eta_v, eta_hm, eta_t, np.broadcast_to(flow, shape), np.broadcast_to(torque, shape),
                    np.broadcast_to(power, shape), np.broadcast_to(np.True_, shape), basis,
                    ds.volumetric_efficiency is not None,
                    ds.total_efficiency is not None, tuple(notes))


def _stopped(ds: Datasheet, est: Estimate, pressure: np.ndarray, speed: np.ndarray) -> Estimate:
    """A standing pump (n = 0) delivers nothing and takes no power; a model may give NaN there."""
    still = speed <= 0
    if not np.any(still):
        return est
    flow = np.where(still, 0.0, est.flow)
    power = np.where(still, 0.0, est.input_power)
    torque = np.where(still, ds.displacement * pressure / TWO_PI, est.torque)
    return Estimate(est.volumetric_efficiency, est.hydromechanical_efficiency, est.total_efficiency,
                    flow, torque, power, est.extrapolated & ~still, est.basis, est.volumetric_known,
                    est.total_known, est.notes)


def efficiencies(datasheet: Datasheet, pressure: float | np.ndarray, speed: float | np.ndarray,
                 viscosity: float | np.ndarray) -> tuple[float | np.ndarray, float | np.ndarray]:
    """``(η_v, η_t)`` of the pump at pressure [Pa], speed [rev/s] and kinematic viscosity [m²/s].

    Floats for scalar arguments, arrays for arrays.

    >>> ds = Datasheet("Invented", "G28", 28e-6, 8.0, 50.0, 250e5, 300e5,
    ...                volumetric_efficiency=0.93, total_efficiency=0.82)
    >>> efficiencies(ds, 200e5, 25.0, 32e-6)
    (0.93, 0.82)
    """
    p, n, nu = np.broadcast_arrays(np.atleast_1d(np.asarray(pressure, float)),
                                   np.atleast_1d(np.asarray(speed, float)),
                                   np.atleast_1d(np.asarray(viscosity, float)))
    est = estimate(datasheet, p, n, nu)
    if all(np.ndim(x) == 0 for x in (pressure, speed, viscosity)):
        return float(est.volumetric_efficiency[0]), float(est.total_efficiency[0])
    return est.volumetric_efficiency, est.total_efficiency
