"""Cell functions of the electric drive: duty-cycle power, motor size, motor efficiency and energy.

The formulas and the standard tables live in :mod:`sheetpump.physics.drive`; this module only says how
a cell calls them. A range of segment powers and a range of segment durations (a row or a column
each, in the same order) reduce to one number.

``SP_MOTOR_SIZE`` and ``SP_MOTOR_EFF`` take the motor standard as a word ("IEC" or "NEMA"), a
:class:`~sheetpump.declarations.Choice` argument.
"""

from __future__ import annotations

from ..declarations import Arg, Calculation, Choice
from ..physics import drive
from ..units import DURATION, EFFICIENCY, ENERGY, POWER
from . import CATALOGUE

_P = Arg("power", POWER, "Shaft power of each segment of the cycle (a row or column)")
_T = Arg("duration", DURATION, "Duration of each segment, in the same order as the powers")

declare = CATALOGUE.declare

declare(Calculation(
    "SP_RMS_POWER", drive.rms_power, (_P, _T), POWER,
    "RMS power of a duty cycle, sqrt(sum(P^2 t) / sum(t)): the motor's equivalent continuous load.",
    example=([12.5, 18.0, 4.0], [20, 8, 30])))
declare(Calculation(
    "SP_MEAN_POWER", drive.mean_power, (_P, _T), POWER,
    "Time-weighted mean power of a duty cycle: sum(P t) / sum(t).",
    example=([12.5, 18.0, 4.0], [20, 8, 30])))
declare(Calculation(
    "SP_CYCLE_ENERGY", drive.electrical_energy,
    (_P, _T, Arg("motor_eff", EFFICIENCY, "Motor efficiency, 0 to 1: one value or one per segment")),
    ENERGY,
    "Electrical energy per cycle: sum(P t / motor efficiency), at the motor efficiency you give "
    "(one value: the full-load efficiency); the comparison uses the part-load model.",
    example=([12.5, 18.0, 4.0], [20, 8, 30], 0.92)))

_STD = Arg("standard", Choice("motor standard", drive.STANDARDS),
           "Motor standard: IEC (kW series, IE3) or NEMA (hp series, NEMA Premium)")
declare(Calculation(
    "SP_MOTOR_SIZE", drive.motor_rating,
    (Arg("rms_power", POWER, "RMS power of the cycle"),
     Arg("peak_power", POWER, "Highest power of the cycle"), _STD), POWER,
    "Smallest standard motor rating covering the RMS power and, at 1.6 x rating, the peak.",
    example=(9.8, 18.0, "IEC")))
declare(Calculation(
    "SP_MOTOR_EFF", drive.motor_efficiency,
    (Arg("rated_power", POWER, "Rated output of the motor"), _STD), EFFICIENCY,
    "Full-load efficiency of a standard motor: IEC IE3 or NEMA Premium, 4-pole.",
    example=(11, "IEC")))
