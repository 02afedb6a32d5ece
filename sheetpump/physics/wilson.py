r"""Wilson's loss model of a pump: its prediction and its fit to a measured table.

Wilson's model (symbols of Merritt [2]_, D = V/2π the displacement per radian, ω = 2π·n):

.. math::

    Q = D\,\omega - C_s\,\frac{D\,\Delta p}{\mu}, \qquad
    T = D\,\Delta p\,(1 + C_f) + C_v\,D\,\mu\,\omega + T_c

C_s (laminar slip), C_f (friction proportional to pressure) and C_v (viscous drag) are dimensionless;
T_c is a constant friction torque [N·m]. Both equations are linear in the coefficients, so they fit by
linear least squares (:func:`fit_wilson`). :class:`Prediction` is what a model of a table predicts
(Wilson's, or the interpolation of :mod:`sheetpump.physics.prediction`).

Pure functions of SI numbers or numpy arrays: speed n [rev/s], pressure rise Δp [Pa], flow Q [m³/s],
torque T [N·m], power P [W], dynamic viscosity μ [Pa·s], displacement V [m³/rev].

References
----------
.. [1] Wilson, W. E., Positive-Displacement Pumps and Fluid Motors, Pitman, 1950 (from memory).
.. [2] Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 5 (from memory).
.. [3] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ModelError
from . import pump
from .displacement import displacement_or_derived
from .measured import MeasuredRanges, ranges_of
from .table import complete_points, count_levels, least_squares
from .validate import non_negative, positive

__all__ = ["Prediction", "Residuals", "WilsonModel", "fit_wilson", "operating_point", "prediction_from"]


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


def prediction_from(v: float, n: np.ndarray, p: np.ndarray, flow: np.ndarray, torque: np.ndarray,
                    left: np.ndarray) -> Prediction:
    """A :class:`Prediction` from a model's flow [m³/s] and torque [N·m] at speed ``n`` [rev/s] and pressure
    ``p`` [Pa] of a pump of displacement ``v`` [m³/rev]; ``left`` says which measured range each point leaves."""
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


def operating_point(speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike
                    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The asked points broadcast together and checked: speed [rev/s] > 0, pressure [Pa] >= 0, μ [Pa·s] > 0."""
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
        n, p, mu = operating_point(speed, pressure, viscosity)
        d = self.displacement / pump.TWO_PI
        q_th = pump.geometric_flow(self.displacement, n)
        flow = np.maximum(q_th - self.c_s * d * p / mu, 0.0)
        torque = d * p * (1 + self.c_f) + self.c_v * d * mu * pump.TWO_PI * n + self.t_c
        return prediction_from(self.displacement, n, p, flow, torque, self.ranges.left(n, p, mu))


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
        Displacement V [m³/rev]; default the derived displacement
        (:func:`~sheetpump.physics.displacement.derived_displacement`).

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
    t, notes = complete_points(speed, pressure, flow, torque, viscosity)
    n, p, q, tq, mu = t["speed"], t["pressure"], t["flow"], t["torque"], t["viscosity"]
    v = displacement_or_derived(t, displacement, notes)
    d = v / pump.TWO_PI
    omega = pump.TWO_PI * n
    speeds, viscosities, pressures = count_levels(n), count_levels(mu), count_levels(p)
    if pressures < 2:
        raise ModelError("pressure", "must take two or more values for Wilson's model (one measured)")

    # Flow: one coefficient, no intercept (Wilson's leakage vanishes at zero pressure).
    if q.size < 2:
        raise ModelError("table", "has too few points for Wilson's model")
    (c_s,), cov_s, res_q = least_squares([d * p / mu], pump.geometric_flow(v, n) - q, "flow")

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
    coef, cov, res_t = least_squares(columns, tq - d * p, "torque")
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
        uncertainty=uncertainty, ranges=ranges_of(t),
        residuals=Residuals(flow_rms=float(np.sqrt(np.mean(res_q**2))), flow_max=float(np.abs(res_q).max()),
                            torque_rms=float(np.sqrt(np.mean(res_t**2))),
                            torque_max=float(np.abs(res_t).max())),
        points=int(p.size), notes=tuple(notes))
