"""Cell functions of the suction line: line velocity, line pressure drop and the pump's inlet pressure.

The formulas live in :mod:`sheetpump.physics.suction` (Darcy–Weisbach with 64/Re in laminar flow and the
Colebrook equation by Clamond's method in turbulent flow, the K method for fittings); this module only says
how a cell calls them.
"""

from __future__ import annotations

from ..declarations import Arg, Calculation
from ..physics import suction
from ..units import ABS_PRESSURE, DENSITY, DIAMETER, FLOW, LENGTH, NUMBER, PRESSURE, VELOCITY, VISCOSITY
from . import CATALOGUE

_Q = Arg("flow", FLOW, "Flow through the line")
_D = Arg("diameter", DIAMETER, "Inner diameter of the line")
_L = Arg("length", LENGTH, "Length of the line")
_NU = Arg("viscosity", VISCOSITY, "Kinematic viscosity of the oil in the line")
_RHO = Arg("density", DENSITY, "Density of the oil")

declare = CATALOGUE.declare

declare(Calculation(
    "SP_LINE_VELOCITY", suction.line_velocity, (_Q, _D), VELOCITY,
    "Mean velocity in a round line: 4 x flow / (pi x inner diameter^2).",
    example=(40, 25)))
declare(Calculation(
    "SP_LINE_PRESSURE_DROP", suction.line_pressure_drop,
    (_Q, _D, _L, _NU, _RHO, Arg("k", NUMBER, "Sum of the fittings' loss coefficients K", default=0)), PRESSURE,
    "Pressure drop of a straight line and its fittings: (f L/d + K) x density x velocity^2 / 2; "
    "f = 64/Re laminar, Colebrook (Clamond) turbulent.",
    example=(40, 32, 2.0, 46, 870, 1.5)))
declare(Calculation(
    "SP_SUCTION_PRESSURE", suction.suction_pressure,
    (_Q, _D, _L, _NU, _RHO,
     Arg("lift", LENGTH, "Height of the pump's inlet above the oil level; negative when flooded", default=0),
     Arg("k", NUMBER, "Sum of the fittings' (and strainer's) loss coefficients K", default=0),
     Arg("reservoir", ABS_PRESSURE, "Absolute pressure on the oil in the reservoir",
         default=suction.STANDARD_ATMOSPHERE / 1e5)),  # the default is in the kind's unit, bara
    ABS_PRESSURE,
    "Absolute pressure at the pump's inlet: reservoir - density x g x lift - line and fitting losses - "
    "velocity head. A value at or below 0 is below vacuum: the line cannot feed the pump.",
    example=(40, 32, 2.0, 46, 870, 0.3, 1.5)))
