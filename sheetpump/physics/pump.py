"""Relations of a fixed-displacement pump: flow, power, torque, efficiencies and pulsation.

Pure functions of SI numbers or numpy arrays (they broadcast like numpy). No units, files or
spreadsheets here: :mod:`sheetpump.units` converts at the edge.

Symbols follow ISO 4391: V displacement per revolution [m³/rev], n shaft speed [rev/s], Δp pressure
rise across the pump [Pa], Q flow [m³/s], T shaft torque [N·m], P power [W], η_v volumetric, η_hm
hydro-mechanical and η_t total efficiency [-].

References
----------
.. [1] ISO 4391, Hydraulic fluid power -- Pumps, motors and integral transmissions -- Parameter
   definitions and letter symbols.
.. [2] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
.. [3] Merritt, H. E., Hydraulic Control Systems, Wiley, 1967, ch. 5 (pump relations; from memory).
"""

from __future__ import annotations

import math

import numpy as np

from .validate import non_negative, positive, require, require_efficiency

__all__ = [
    "displacement_for_flow",
    "drive_torque",
    "effective_flow",
    "geometric_flow",
    "hydraulic_power",
    "hydromechanical_efficiency",
    "input_power",
    "power_loss",
    "pulsation_frequency",
    "shaft_power",
    "speed_for_flow",
    "total_efficiency",
    "volumetric_efficiency",
]

TWO_PI = 2.0 * math.pi

Number = float | np.ndarray


def geometric_flow(displacement: Number, speed: Number) -> Number:
    r"""Geometric (theoretical) flow of a pump, without leakage.

    .. math:: Q_{th} = V \cdot n

    In practical units Q [L/min] = V [cm³/rev] · n [rpm] / 1000.

    Parameters
    ----------
    displacement : float or array
        Geometric displacement V [m³/rev].
    speed : float or array
        Shaft speed n [rev/s].

    Returns
    -------
    float or array
        Geometric flow Q_th [m³/s].

    Examples
    --------
    28 cm³/rev at 1500 rpm gives 42 L/min:

    >>> round(geometric_flow(28e-6, 25.0) * 60000, 9)
    42.0

    References
    ----------
    ISO 4391 (symbols); Merritt (1967), ch. 5.
    """
    non_negative(displacement, "displacement")
    non_negative(speed, "speed")
    return displacement * speed


def effective_flow(displacement: Number, speed: Number, volumetric_efficiency: Number) -> Number:
    r"""Effective (delivered) flow after leakage.

    .. math:: Q_e = V \cdot n \cdot \eta_v

    Parameters
    ----------
    displacement : float or array
        Geometric displacement V [m³/rev].
    speed : float or array
        Shaft speed n [rev/s].
    volumetric_efficiency : float or array
        Volumetric efficiency η_v [-], in (0, 1].

    Returns
    -------
    float or array
        Effective flow Q_e [m³/s].

    Examples
    --------
    >>> round(effective_flow(28e-6, 25.0, 0.95) * 60000, 9)
    39.9

    References
    ----------
    ISO 4391; Merritt (1967), ch. 5.
    """
    require_efficiency(volumetric_efficiency, "volumetric_efficiency")
    return geometric_flow(displacement, speed) * volumetric_efficiency


def displacement_for_flow(flow: Number, speed: Number, volumetric_efficiency: Number) -> Number:
    r"""Displacement a pump needs to deliver a flow at a speed.

    .. math:: V = \frac{Q_e}{n \cdot \eta_v}

    Parameters
    ----------
    flow : float or array
        Required effective flow Q_e [m³/s].
    speed : float or array
        Shaft speed n [rev/s], > 0.
    volumetric_efficiency : float or array
        Volumetric efficiency η_v [-], in (0, 1].

    Returns
    -------
    float or array
        Displacement V [m³/rev].

    Examples
    --------
    40 L/min at 1500 rpm with η_v = 0.95 needs about 28.07 cm³/rev:

    >>> round(displacement_for_flow(40 / 60000, 25.0, 0.95) * 1e6, 4)
    28.0702

    References
    ----------
    ISO 4391; Merritt (1967), ch. 5.
    """
    non_negative(flow, "flow")
    positive(speed, "speed")
    require_efficiency(volumetric_efficiency, "volumetric_efficiency")
    return flow / (speed * volumetric_efficiency)


def speed_for_flow(flow: Number, displacement: Number, volumetric_efficiency: Number) -> Number:
    r"""Shaft speed a pump needs to deliver a flow.

    .. math:: n = \frac{Q_e}{V \cdot \eta_v}

    Parameters
    ----------
    flow : float or array
        Required effective flow Q_e [m³/s].
    displacement : float or array
        Geometric displacement V [m³/rev], > 0.
    volumetric_efficiency : float or array
        Volumetric efficiency η_v [-], in (0, 1].

    Returns
    -------
    float or array
        Shaft speed n [rev/s].

    Examples
    --------
    >>> round(speed_for_flow(39.9 / 60000, 28e-6, 0.95) * 60, 6)
    1500.0

    References
    ----------
    ISO 4391; Merritt (1967), ch. 5.
    """
    non_negative(flow, "flow")
    positive(displacement, "displacement")
    require_efficiency(volumetric_efficiency, "volumetric_efficiency")
    return flow / (displacement * volumetric_efficiency)


def hydraulic_power(pressure: Number, flow: Number) -> Number:
    r"""Hydraulic output power of a pump.

    .. math:: P_{hyd} = \Delta p \cdot Q_e

    In practical units P [kW] = Δp [bar] · Q [L/min] / 600, and P [hp] = p [psi] · Q [gpm] / 1714.

    Parameters
    ----------
    pressure : float or array
        Pressure rise Δp [Pa], >= 0.
    flow : float or array
        Effective flow Q_e [m³/s], >= 0.

    Returns
    -------
    float or array
        Hydraulic power P_hyd [W].

    Examples
    --------
    200 bar and 60 L/min give 20 kW:

    >>> round(hydraulic_power(200e5, 60 / 60000), 6)
    20000.0

    References
    ----------
    ISO 4391; Merritt (1967), ch. 5.
    """
    non_negative(pressure, "pressure")
    non_negative(flow, "flow")
    return pressure * flow


def drive_torque(displacement: Number, pressure: Number, hydromechanical_efficiency: Number) -> Number:
    r"""Torque needed at the pump shaft.

    .. math:: T = \frac{V \cdot \Delta p}{2\pi \cdot \eta_{hm}}

    In practical units T [N·m] = V [cm³/rev] · Δp [bar] / (20π · η_hm).

    Parameters
    ----------
    displacement : float or array
        Geometric displacement V [m³/rev].
    pressure : float or array
        Pressure rise Δp [Pa].
    hydromechanical_efficiency : float or array
        Hydro-mechanical efficiency η_hm [-], in (0, 1].

    Returns
    -------
    float or array
        Shaft torque T [N·m].

    Examples
    --------
    28 cm³/rev at 200 bar with η_hm = 0.9 needs about 99.03 N·m:

    >>> round(drive_torque(28e-6, 200e5, 0.9), 2)
    99.03

    References
    ----------
    ISO 4391; Merritt (1967), ch. 5.
    """
    non_negative(displacement, "displacement")
    non_negative(pressure, "pressure")
    require_efficiency(hydromechanical_efficiency, "hydromechanical_efficiency")
    return displacement * pressure / (TWO_PI * hydromechanical_efficiency)


def shaft_power(torque: Number, speed: Number) -> Number:
    r"""Mechanical power at the shaft from torque and speed.

    .. math:: P = T \cdot 2\pi n

    In practical units P [kW] = T [N·m] · n [rpm] / 9549.

    Parameters
    ----------
    torque : float or array
        Shaft torque T [N·m].
    speed : float or array
        Shaft speed n [rev/s].

    Returns
    -------
    float or array
        Shaft power P [W].

    Examples
    --------
    >>> round(shaft_power(100.0, 25.0), 3)
    15707.963

    References
    ----------
    ISO 4391.
    """
    non_negative(torque, "torque")
    non_negative(speed, "speed")
    return torque * TWO_PI * speed


def input_power(pressure: Number, flow: Number, total_efficiency: Number) -> Number:
    r"""Drive (input) power a pump takes for a hydraulic output.

    .. math:: P_{in} = \frac{\Delta p \cdot Q_e}{\eta_t}

    Parameters
    ----------
    pressure : float or array
        Pressure rise Δp [Pa].
    flow : float or array
        Effective flow Q_e [m³/s].
    total_efficiency : float or array
        Total efficiency η_t [-], in (0, 1].

    Returns
    -------
    float or array
        Input power P_in [W].

    Examples
    --------
    20 kW hydraulic at η_t = 0.8 takes 25 kW:

    >>> round(input_power(200e5, 60 / 60000, 0.8), 6)
    25000.0

    References
    ----------
    ISO 4391; ISO 4409.
    """
    require_efficiency(total_efficiency, "total_efficiency")
    return hydraulic_power(pressure, flow) / total_efficiency


def volumetric_efficiency(flow: Number, displacement: Number, speed: Number) -> Number:
    r"""Volumetric efficiency from a measured flow.

    .. math:: \eta_v = \frac{Q_e}{V \cdot n}

    Parameters
    ----------
    flow : float or array
        Measured effective flow Q_e [m³/s].
    displacement : float or array
        Geometric (or derived) displacement V [m³/rev], > 0.
    speed : float or array
        Shaft speed n [rev/s], > 0.

    Returns
    -------
    float or array
        η_v [-]. A measured value above 1 is returned as is; judging it is the caller's job.

    Examples
    --------
    >>> round(volumetric_efficiency(39.9 / 60000, 28e-6, 25.0), 12)
    0.95

    References
    ----------
    ISO 4391; ISO 4409.
    """
    non_negative(flow, "flow")
    positive(displacement, "displacement")
    positive(speed, "speed")
    return flow / (displacement * speed)


def hydromechanical_efficiency(displacement: Number, pressure: Number, torque: Number) -> Number:
    r"""Hydro-mechanical efficiency from a measured shaft torque.

    .. math:: \eta_{hm} = \frac{V \cdot \Delta p}{2\pi \cdot T}

    Parameters
    ----------
    displacement : float or array
        Geometric displacement V [m³/rev].
    pressure : float or array
        Pressure rise Δp [Pa].
    torque : float or array
        Measured shaft torque T [N·m], > 0.

    Returns
    -------
    float or array
        η_hm [-].

    Examples
    --------
    >>> round(hydromechanical_efficiency(28e-6, 200e5, 99.0302), 4)
    0.9

    References
    ----------
    ISO 4391; ISO 4409.
    """
    non_negative(displacement, "displacement")
    non_negative(pressure, "pressure")
    positive(torque, "torque")
    return displacement * pressure / (TWO_PI * torque)


def total_efficiency(pressure: Number, flow: Number, input_power: Number) -> Number:
    r"""Total (overall) efficiency from a measured input power.

    .. math:: \eta_t = \frac{\Delta p \cdot Q_e}{P_{in}} = \eta_v \cdot \eta_{hm}

    Parameters
    ----------
    pressure : float or array
        Pressure rise Δp [Pa].
    flow : float or array
        Effective flow Q_e [m³/s].
    input_power : float or array
        Measured input power P_in [W], > 0.

    Returns
    -------
    float or array
        η_t [-].

    Examples
    --------
    >>> round(total_efficiency(200e5, 60 / 60000, 25000.0), 12)
    0.8

    References
    ----------
    ISO 4391; ISO 4409.
    """
    positive(input_power, "input_power")
    return hydraulic_power(pressure, flow) / input_power


def power_loss(input_power: Number, pressure: Number, flow: Number) -> Number:
    r"""Power a pump turns into heat: input power less hydraulic output power.

    .. math:: P_{loss} = P_{in} - \Delta p \cdot Q_e

    Parameters
    ----------
    input_power : float or array
        Input power P_in [W].
    pressure : float or array
        Pressure rise Δp [Pa].
    flow : float or array
        Effective flow Q_e [m³/s].

    Returns
    -------
    float or array
        Power loss [W]. Negative only if the inputs are inconsistent (η_t > 1).

    Examples
    --------
    >>> round(power_loss(25000.0, 200e5, 60 / 60000), 6)
    5000.0

    References
    ----------
    ISO 4391.
    """
    non_negative(input_power, "input_power")
    return input_power - hydraulic_power(pressure, flow)


def pulsation_frequency(teeth: Number, speed: Number, harmonic: Number = 1) -> Number:
    r"""Fundamental (or a harmonic) flow-pulsation frequency of a gear pump.

    Each tooth of one gear passing the mesh delivers one pulse:

    .. math:: f = k \cdot z \cdot n

    i.e. f [Hz] = k · z · n [rpm] / 60.

    Parameters
    ----------
    teeth : float or array
        Number of teeth z on one gear [-], a whole number >= 2.
    speed : float or array
        Shaft speed n [rev/s].
    harmonic : float or array, optional
        Harmonic order k [-], a whole number >= 1 (1: the fundamental).

    Returns
    -------
    float or array
        Frequency f [Hz].

    Examples
    --------
    12 teeth at 1500 rpm pulse at 300 Hz:

    >>> pulsation_frequency(12, 25.0)
    300.0

    References
    ----------
    Common practice for external gear pumps; Merritt (1967) (from memory).
    """
    require((teeth >= 2) & (np.floor(teeth) == teeth), "teeth", "must be a whole number of at least 2")
    require((harmonic >= 1) & (np.floor(harmonic) == harmonic), "harmonic",
             "must be a whole number of at least 1")
    non_negative(speed, "speed")
    return harmonic * teeth * speed
