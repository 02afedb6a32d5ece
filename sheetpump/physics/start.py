r"""Starting a pump cold: the electric motor's starting torque against the torque the pump asks.

Pure functions of SI numbers. A cage induction motor started direct on line gives its locked-rotor
torque at standstill, and (for the design classes below) no less than about that through its run-up,
up to the breakdown torque near full speed; a star–delta start gives a third of it. The pump asks its
torque at the starting pressure and the cold oil's viscosity, in which the viscous drag (Wilson's
C_v·D·μ·ω term) dominates when the oil is thick.

Standard tables, each with its source:

* :data:`IEC_DESIGN_N_LOCKED_ROTOR` -- the minimum locked-rotor torque of IEC 60034-12 design N motors,
  4-pole, as a multiple of rated torque, by rated output (from memory).
* :data:`NEMA_DESIGN_B_LOCKED_ROTOR` -- the locked-rotor torque of NEMA MG 1 design B motors, 1800 rpm
  (4-pole), as a multiple of rated torque, by horsepower (NEMA MG 1 12.38.1; from memory).

References
----------
.. [1] IEC 60034-12, Rotating electrical machines -- Part 12: Starting performance of single-speed
   three-phase cage induction motors (design N; from memory).
.. [2] NEMA MG 1, Motors and Generators, 12.38.1 Locked-rotor torque of design A and B motors
   (from memory).
"""

from __future__ import annotations

import math

from ..errors import PhysicsError
from .drive import HP
from .validate import positive

__all__ = [
    "IEC_DESIGN_N_LOCKED_ROTOR",
    "NEMA_DESIGN_B_LOCKED_ROTOR",
    "STAR_DELTA",
    "locked_rotor_ratio",
    "rated_torque",
]

#: IEC 60034-12 design N, 4-pole: (upper end of the output band [kW], minimum T_l / T_N) (from memory).
IEC_DESIGN_N_LOCKED_ROTOR: tuple[tuple[float, float], ...] = (
    (0.63, 1.9), (1.0, 1.9), (1.6, 1.8), (2.5, 1.8), (4.0, 1.7), (6.3, 1.6), (10.0, 1.6), (16.0, 1.5),
    (25.0, 1.4), (40.0, 1.3), (63.0, 1.2), (100.0, 1.1), (160.0, 1.0), (250.0, 0.9), (400.0, 0.75),
    (630.0, 0.65),
)

#: NEMA MG 1 design B, 1800 rpm: (horsepower up to, locked-rotor torque / full-load torque) (from memory).
NEMA_DESIGN_B_LOCKED_ROTOR: tuple[tuple[float, float], ...] = (
    (1.0, 2.75), (1.5, 2.50), (2.0, 2.35), (3.0, 2.15), (5.0, 1.85), (7.5, 1.75), (10.0, 1.65), (15.0, 1.60),
    (20.0, 1.50), (30.0, 1.50), (75.0, 1.40), (100.0, 1.25), (150.0, 1.10), (500.0, 1.00),
)

#: A star–delta start gives a third of the direct-on-line torque (the phase voltage falls by √3).
STAR_DELTA = 1.0 / 3.0


def locked_rotor_ratio(rated_power: float, standard: str = "IEC") -> float:
    """Locked-rotor torque of a standard 4-pole cage motor as a multiple of its rated torque.

    IEC: the minimum of design N (IEC 60034-12); NEMA: design B (NEMA MG 1 12.38.1). Both from
    memory, for direct-on-line starting; multiply by :data:`STAR_DELTA` for a star–delta start.

    Parameters
    ----------
    rated_power : float
        Rated output of the motor [W], > 0.
    standard : str, optional
        ``"IEC"`` (default) or ``"NEMA"``.

    Returns
    -------
    float
        T_l / T_N [-].

    Examples
    --------
    >>> locked_rotor_ratio(15e3), locked_rotor_ratio(20 * HP, "NEMA")
    (1.5, 1.5)

    References
    ----------
    IEC 60034-12 (design N); NEMA MG 1 12.38.1 (design B); both from memory.
    """
    positive(float(rated_power), "rated_power")
    std = str(standard).strip().upper()
    if std == "IEC":
        size, table = rated_power / 1e3, IEC_DESIGN_N_LOCKED_ROTOR
    elif std == "NEMA":
        size, table = rated_power / HP, NEMA_DESIGN_B_LOCKED_ROTOR
    else:
        raise PhysicsError("standard", f"must be 'IEC' or 'NEMA', not {standard!r}")
    for upper, ratio in table:
        if size <= upper * (1 + 1e-9):
            return ratio
    return table[-1][1]


def rated_torque(rated_power: float, speed: float) -> float:
    r"""Rated torque of a motor from its rated output and speed.

    .. math:: T_N = \frac{P_N}{2 \pi n}

    Parameters
    ----------
    rated_power : float
        P_N [W], > 0.
    speed : float
        n [rev/s], > 0.

    Returns
    -------
    float
        T_N [N·m].

    Examples
    --------
    >>> round(rated_torque(15e3, 1470 / 60), 1)
    97.4

    References
    ----------
    P = T·ω (ISO 4391 for the pump; any machines text).
    """
    positive(float(rated_power), "rated_power")
    positive(float(speed), "speed")
    return float(rated_power / (2.0 * math.pi * speed))

