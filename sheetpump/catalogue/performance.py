"""Cell functions of measured pump performance: derived displacement and predictions from a table.

A table is given as ranges of one length (one row per measured point): speed, pressure, flow,
torque and the oil's dynamic viscosity (a single cell for the whole table is fine). The prediction
functions fit Wilson's loss model to the table (or interpolate the measured efficiencies in pressure
where the table is too small) and return the value at the asked speed, pressure and viscosity, which
may be ranges too. The formulas live in :mod:`sheetpump.physics.displacement` (the derived displacement) and
:mod:`sheetpump.physics.prediction` (the predictions), one written-out function per cell function.
"""

from __future__ import annotations

from ..declarations import Arg, Calculation
from ..physics import displacement, prediction
from ..units import DISPLACEMENT, DYN_VISCOSITY, EFFICIENCY, FLOW, NUMBER, POWER, PRESSURE, SPEED, TORQUE
from . import CATALOGUE

_N = Arg("speed", SPEED, "Measured speed of each point (a range)")
_P = Arg("pressure", PRESSURE, "Measured pressure rise of each point (a range)")
_Q = Arg("flow", FLOW, "Measured delivered flow of each point (a range)")
_T = Arg("torque", TORQUE, "Measured input torque of each point (a range)")
_MU = Arg("viscosity", DYN_VISCOSITY, "Dynamic viscosity of the oil at each point (a range or one cell)")
_V = Arg("displacement", DISPLACEMENT, "Displacement (e.g. the result of SP_DERIVED_DISPLACEMENT)", scalar=True)
_AT_N = Arg("at_speed", SPEED, "Speed to predict at")
_AT_P = Arg("at_pressure", PRESSURE, "Pressure rise to predict at")
_AT_MU = Arg("at_viscosity", DYN_VISCOSITY, "Dynamic viscosity to predict at")
_MAXP = Arg("max_pressure", PRESSURE, "Highest pressure of the points used (0: a third of the highest "
            "measured)", default=0, scalar=True)
_TABLE = (_N, _P, _Q, _T, _MU, _V, _AT_N, _AT_P, _AT_MU)
_FIT = " Wilson's loss model fitted to the table (interpolation in pressure if the table is too small)."

# An invented bench test of a 28 cm³/rev gear pump (three speeds, three pressures, one oil), used as
# the example for the worked-example workbook and the README.
_SPEEDS = [1000, 1500, 2000, 1000, 1500, 2000, 1000, 1500, 2000]
_PRESSURES = [20, 20, 20, 150, 150, 150, 250, 250, 250]
_FLOWS = [27.76, 41.73, 55.77, 26.12, 40.16, 54.13, 24.91, 38.88, 52.92]
_TORQUES = [11.61, 12.2, 12.9, 71.8, 72.5, 73.1, 118.2, 118.8, 119.5]
_AT = (_SPEEDS, _PRESSURES, _FLOWS, _TORQUES, 28, 28, 1800, 200, 28)

declare = CATALOGUE.declare

declare(Calculation(
    "SP_DERIVED_DISPLACEMENT", displacement.derived_displacement_value, (_N, _P, _Q, _MAXP), DISPLACEMENT,
    "Displacement derived from flow at two or more speeds at low pressure (slope of flow on speed, "
    "extrapolated to zero pressure; ISO 8426 idea).",
    example=(_SPEEDS, _PRESSURES, _FLOWS)))
declare(Calculation(
    "SP_DERIVED_DISPLACEMENT_U", displacement.derived_displacement_uncertainty, (_N, _P, _Q, _MAXP), DISPLACEMENT,
    "Standard uncertainty of SP_DERIVED_DISPLACEMENT (from the least-squares fit).",
    example=(_SPEEDS, _PRESSURES, _FLOWS)))
declare(Calculation(
    "SP_PREDICT_FLOW", prediction.predicted_flow, _TABLE, FLOW,
    "Delivered flow at a speed, pressure and viscosity:" + _FIT,
    example=_AT))
declare(Calculation(
    "SP_PREDICT_TORQUE", prediction.predicted_torque, _TABLE, TORQUE,
    "Input torque at a speed, pressure and viscosity:" + _FIT,
    example=_AT))
declare(Calculation(
    "SP_PREDICT_INPUT_POWER", prediction.predicted_input_power, _TABLE, POWER,
    "Input power at a speed, pressure and viscosity:" + _FIT,
    example=_AT))
declare(Calculation(
    "SP_PREDICT_VOL_EFF", prediction.predicted_volumetric_efficiency, _TABLE, EFFICIENCY,
    "Volumetric efficiency at a speed, pressure and viscosity:" + _FIT,
    example=_AT))
declare(Calculation(
    "SP_PREDICT_TOTAL_EFF", prediction.predicted_total_efficiency, _TABLE, EFFICIENCY,
    "Total efficiency at a speed, pressure and viscosity:" + _FIT,
    example=_AT))
declare(Calculation(
    "SP_PREDICT_EXTRAPOLATED", prediction.predicted_extrapolated, _TABLE, NUMBER,
    "1 where the asked speed, pressure or viscosity lies outside the measured table, else 0.",
    example=(*_AT[:6], 2500, 200, 28)))
