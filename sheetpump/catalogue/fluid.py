"""Cell functions of the oil: viscosity at a temperature, viscosity index, ISO VG oils, dynamic viscosity.

The formulas live in :mod:`sheetpump.physics.fluid` (ASTM D341, ASTM D2270, ISO 3448); this module only
says how a cell calls them.
"""

from __future__ import annotations

from ..declarations import Arg, Calculation
from ..physics import fluid
from ..units import DENSITY, DYN_VISCOSITY, NUMBER, TEMPERATURE, VISCOSITY
from . import CATALOGUE

_T = Arg("temperature", TEMPERATURE, "Oil temperature at which the viscosity is wanted")
_VI = Arg("vi", NUMBER, "Viscosity index of the oil (ASTM D2270), e.g. 100")

declare = CATALOGUE.declare

declare(Calculation(
    "SP_VISCOSITY", fluid.viscosity_from_points,
    (Arg("nu1", VISCOSITY, "Kinematic viscosity at the first temperature (e.g. at 40 degC)"),
     Arg("t1", TEMPERATURE, "First temperature"),
     Arg("nu2", VISCOSITY, "Kinematic viscosity at the second temperature (e.g. at 100 degC)"),
     Arg("t2", TEMPERATURE, "Second temperature"),
     _T), VISCOSITY,
    "Kinematic viscosity at a temperature from two known points (ASTM D341 Walther line).",
    example=(46, 40, 6.8, 100, 60)))
declare(Calculation(
    "SP_VISCOSITY_INDEX", fluid.viscosity_index,
    (Arg("nu40", VISCOSITY, "Kinematic viscosity at 40 degC"),
     Arg("nu100", VISCOSITY, "Kinematic viscosity at 100 degC (at least 2 mm^2/s)")), NUMBER,
    "Viscosity index from the viscosities at 40 and 100 degC (ASTM D2270), not rounded.",
    example=(46, 6.8)))
declare(Calculation(
    "SP_VG_VISCOSITY", fluid.vg_viscosity,
    (Arg("grade", NUMBER, "ISO 3448 viscosity grade, e.g. 46 for ISO VG 46"), _VI, _T), VISCOSITY,
    "Kinematic viscosity at a temperature of an ISO VG oil of a given viscosity index "
    "(mid-point at 40 degC, ASTM D2270, ASTM D341).",
    example=(46, 100, "122 degF")))
declare(Calculation(
    "SP_DYNAMIC_VISCOSITY", fluid.dynamic_viscosity,
    (Arg("nu", VISCOSITY, "Kinematic viscosity"), Arg("density", DENSITY, "Oil density at the same temperature")),
    DYN_VISCOSITY,
    "Dynamic viscosity: kinematic viscosity x density.",
    example=("46 cSt", 870), plain_scalars=True))
