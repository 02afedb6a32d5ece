r"""Predicting a pump from its measured table: Wilson's model, or interpolation where the table is too small.

:func:`fit_performance` is the entry point: it fits Wilson's loss model
(:func:`sheetpump.physics.wilson.fit_wilson`) and falls back to interpolating the measured efficiencies
in pressure (:func:`interpolate_performance`) where the table cannot carry the model. The
``predicted_*`` functions are the ``SP_PREDICT_*`` cell functions: the table and the point to predict
at, in cell-argument order.

Pure functions of SI numbers or numpy arrays, in the units and with the references of
:mod:`sheetpump.physics.wilson`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ModelError
from . import pump
from .displacement import displacement_or_derived
from .measured import MeasuredRanges, evaluate_points, ranges_of
from .table import LEVEL_TOLERANCE, complete_points, group_points
from .wilson import Prediction, WilsonModel, fit_wilson, operating_point, prediction_from

__all__ = [
    "InterpolatedPerformance",
    "PerformanceModel",
    "fit_performance",
    "interpolate_performance",
    "predicted_extrapolated",
    "predicted_flow",
    "predicted_input_power",
    "predicted_torque",
    "predicted_total_efficiency",
    "predicted_volumetric_efficiency",
]


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
        n, p, mu = operating_point(speed, pressure, viscosity)
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
        return prediction_from(self.displacement, n, p, flow, torque, left)


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
    t, more = complete_points(speed, pressure, flow, torque, viscosity)
    notes = (*notes, *more)
    more = []
    v = displacement_or_derived(t, displacement, more)
    e = evaluate_points(t["speed"], t["pressure"], t["flow"], torque=t["torque"], displacement=v,
                        viscosity=t["viscosity"])
    curves = []
    for idx in group_points(t["speed"], t["pressure"], t["viscosity"]):
        curves.append(_Curve(speed=float(np.mean(t["speed"][idx])), viscosity=float(np.mean(t["viscosity"][idx])),
                             pressure=t["pressure"][idx], volumetric=e.volumetric[idx],
                             hydromechanical=e.hydromechanical[idx], torque=t["torque"][idx]))
    return InterpolatedPerformance(displacement=v, curves=tuple(curves), ranges=ranges_of(t),
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
    says so in ``notes``. Bad values (negative flow, ...) still raise
    :class:`~sheetpump.errors.PhysicsError`.

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
        note = (f"Wilson's model not fitted ({exc}); measured efficiencies "
                "interpolated linearly in pressure at the measured speed and viscosity")
        return interpolate_performance(speed, pressure, flow, torque, viscosity, displacement, (note,))


def _predict(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike, viscosity: ArrayLike,
             displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike, at_viscosity: ArrayLike
             ) -> Prediction:
    """:func:`fit_performance` of the table, predicted at the asked points."""
    model = fit_performance(speed, pressure, flow, torque, viscosity, displacement)
    return model.predict(at_speed, at_pressure, at_viscosity)


def predicted_flow(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                   viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                   at_viscosity: ArrayLike) -> np.ndarray:
    r"""Delivered flow [m³/s] at a speed, pressure and viscosity, from the measured table.

    The formula of the cell function ``SP_PREDICT_FLOW``:

    .. math:: Q = V n - C_s \frac{D \Delta p}{\mu}, \quad D = \frac{V}{2\pi}

    with Wilson's C_s fitted to the table (:func:`fit_performance`), or Q = V·n·η_v with η_v
    interpolated in pressure where the table is too small for the model.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> round(float(predicted_flow(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)) * 60000, 3)
    39.683

    References
    ----------
    Wilson (1950); Merritt (1967), ch. 5; ISO 4409.
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).flow


def predicted_torque(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                     viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                     at_viscosity: ArrayLike) -> np.ndarray:
    r"""Input torque [N·m] at a speed, pressure and viscosity, from the measured table.

    The formula of the cell function ``SP_PREDICT_TORQUE``:

    .. math:: T = D \Delta p (1 + C_f) + C_v D \mu \omega + T_c, \quad D = \frac{V}{2\pi},\ \omega = 2\pi n

    with Wilson's C_f, C_v and T_c fitted to the table (:func:`fit_performance`), or
    T = V·Δp/(2π·η_hm) with η_hm interpolated in pressure where the table is too small for the model.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> round(float(predicted_torque(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)), 3)
    95.792

    References
    ----------
    Wilson (1950); Merritt (1967), ch. 5; ISO 4409.
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).torque


def predicted_input_power(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                          viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                          at_viscosity: ArrayLike) -> np.ndarray:
    r"""Input power [W] at a speed, pressure and viscosity, from the measured table.

    The formula of the cell function ``SP_PREDICT_INPUT_POWER``:

    .. math:: P_{in} = 2\pi n T

    with T the torque of :func:`predicted_torque`.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> round(float(predicted_input_power(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)), 1)
    15046.9

    References
    ----------
    ISO 4391 (P = 2π·n·T); Wilson (1950); Merritt (1967), ch. 5.
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).input_power


def predicted_volumetric_efficiency(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                                    viscosity: ArrayLike, displacement: float, at_speed: ArrayLike,
                                    at_pressure: ArrayLike, at_viscosity: ArrayLike) -> np.ndarray:
    r"""Volumetric efficiency η_v [-] at a speed, pressure and viscosity, from the measured table.

    The formula of the cell function ``SP_PREDICT_VOL_EFF``:

    .. math:: \eta_v = \frac{Q}{V n} = 1 - \frac{C_s \Delta p}{2\pi \mu n}

    with Q the flow of :func:`predicted_flow`.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> round(float(predicted_volumetric_efficiency(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)), 4)
    0.9448

    References
    ----------
    ISO 4391 (η_v = Q/(V·n)); Merritt (1967), ch. 5.
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).volumetric


def predicted_total_efficiency(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                               viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                               at_viscosity: ArrayLike) -> np.ndarray:
    r"""Total efficiency η_t [-] at a speed, pressure and viscosity, from the measured table.

    The formula of the cell function ``SP_PREDICT_TOTAL_EFF``:

    .. math:: \eta_t = \eta_v \, \eta_{hm} = \frac{Q}{V n} \cdot \frac{V \Delta p}{2\pi T}

    with Q and T of :func:`predicted_flow` and :func:`predicted_torque`.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> round(float(predicted_total_efficiency(n, p, t.flow, t.torque, mu, 28e-6, 25.0, 200e5, 0.03)), 4)
    0.8791

    References
    ----------
    ISO 4391 (η_t = η_v·η_hm); Merritt (1967), ch. 5.
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).total


def predicted_extrapolated(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike,
                           viscosity: ArrayLike, displacement: float, at_speed: ArrayLike, at_pressure: ArrayLike,
                           at_viscosity: ArrayLike) -> np.ndarray:
    r"""1 where the asked point lies outside the measured table's ranges, else 0 [-].

    The formula of the cell function ``SP_PREDICT_EXTRAPOLATED``:

    .. math:: e = \begin{cases} 0 & n_{min} \le n \le n_{max},\ \Delta p_{min} \le \Delta p \le \Delta p_{max},\
              \mu_{min} \le \mu \le \mu_{max} \\ 1 & \text{otherwise} \end{cases}

    over the measured ranges (:class:`~sheetpump.physics.measured.MeasuredRanges`); the interpolation
    fallback allows the level tolerance around each measured speed and viscosity.

    Parameters
    ----------
    speed, pressure, flow, torque, viscosity : array
        The measured table, one value per point: n [rev/s], Δp [Pa], Q [m³/s], T [N·m], μ [Pa·s].
    displacement : float
        Displacement V [m³/rev] (None or NaN: derived from the table).
    at_speed, at_pressure, at_viscosity : array
        Where to predict: n [rev/s], Δp [Pa], μ [Pa·s] (broadcast together).

    Examples
    --------
    >>> n, p, mu = np.meshgrid([1000 / 60, 2000 / 60], [50e5, 150e5, 250e5], [0.02, 0.05])
    >>> t = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0).predict(n, p, mu)  # an invented pump
    >>> [float(x) for x in predicted_extrapolated(n, p, t.flow, t.torque, mu, 28e-6, [25.0, 50.0], 200e5, 0.03)]
    [0.0, 1.0]

    References
    ----------
    ISO 4409 (the measured ranges a test covers).
    """
    return _predict(speed, pressure, flow, torque, viscosity, displacement, at_speed, at_pressure,
                    at_viscosity).extrapolated.astype(float)
