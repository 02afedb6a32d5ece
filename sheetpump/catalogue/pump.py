"""Cell functions of a fixed-displacement pump: flow, power, torque, efficiencies and pulsation.

The formulas live in :mod:`sheetpump.physics.pump`; this module only says how a cell calls them.
"""

from __future__ import annotations

from ..declarations import Arg, Calculation
from ..physics import pump
from ..units import DISPLACEMENT, EFFICIENCY, FLOW, FREQUENCY, NUMBER, POWER, PRESSURE, SPEED, TORQUE
from . import CATALOGUE

_V = Arg("displacement", DISPLACEMENT, "Geometric displacement per revolution")
_N = Arg("speed", SPEED, "Shaft speed")
_P = Arg("pressure", PRESSURE, "Pressure rise across the pump (outlet less inlet)")
_Q = Arg("flow", FLOW, "Effective (delivered) flow")
_EV = Arg("vol_eff", EFFICIENCY, "Volumetric efficiency, 0 to 1 (or '95 %')")
_EHM = Arg("hm_eff", EFFICIENCY, "Hydro-mechanical efficiency, 0 to 1 (or '90 %')")
_ET = Arg("total_eff", EFFICIENCY, "Total efficiency, 0 to 1 (or '85 %')")

declare = CATALOGUE.declare

declare(Calculation(
    "SP_GEOMETRIC_FLOW", pump.geometric_flow, (_V, _N), FLOW,
    "Geometric flow without leakage: displacement x speed.",
    scaling=(1, 1),
    example=(28, 1500)))
declare(Calculation(
    "SP_EFFECTIVE_FLOW", pump.effective_flow, (_V, _N, _EV), FLOW,
    "Delivered flow after leakage: displacement x speed x volumetric efficiency.",
    scaling=(1, 1, 1),
    example=("1.7 in^3/rev", "1800 rpm", 0.94, "gpm")))
declare(Calculation(
    "SP_DISPLACEMENT_FOR_FLOW", pump.displacement_for_flow,
    (Arg("flow", FLOW, "Required effective flow"), _N, _EV), DISPLACEMENT,
    "Displacement needed for a flow: flow / (speed x volumetric efficiency).",
    scaling=(1, -1, -1),
    example=(40, 1500, 0.94)))
declare(Calculation(
    "SP_SPEED_FOR_FLOW", pump.speed_for_flow,
    (Arg("flow", FLOW, "Required effective flow"), _V, _EV), SPEED,
    "Speed needed for a flow: flow / (displacement x volumetric efficiency).",
    scaling=(1, -1, -1),
    example=("10 gpm", 28, "94 %")))
declare(Calculation(
    "SP_HYDRAULIC_POWER", pump.hydraulic_power, (_P, _Q), POWER,
    "Hydraulic output power: pressure x flow.",
    scaling=(1, 1),
    example=(210, 39.5)))
declare(Calculation(
    "SP_DRIVE_TORQUE", pump.drive_torque, (_V, _P, _EHM), TORQUE,
    "Shaft torque: displacement x pressure / (2 pi x hydro-mechanical efficiency).",
    scaling=(1, 1, -1),
    example=(28, "3000 psi", 0.9, "lbf*ft")))
declare(Calculation(
    "SP_SHAFT_POWER", pump.shaft_power, (Arg("torque", TORQUE, "Shaft torque"), _N), POWER,
    "Shaft power from torque and speed: torque x 2 pi x speed.",
    scaling=(1, 1),
    example=(98, 1500)))
declare(Calculation(
    "SP_INPUT_POWER", pump.input_power, (_P, _Q, _ET), POWER,
    "Drive power: pressure x flow / total efficiency.",
    scaling=(1, 1, -1),
    example=(210, 39.5, 0.85, "hp")))
declare(Calculation(
    "SP_VOL_EFF", pump.volumetric_efficiency,
    (Arg("flow", FLOW, "Measured effective flow"), _V, _N), EFFICIENCY,
    "Volumetric efficiency from measured flow: flow / (displacement x speed).",
    scaling=(1, -1, -1),
    example=(39.5, 28, 1500)))
declare(Calculation(
    "SP_HM_EFF", pump.hydromechanical_efficiency,
    (_V, _P, Arg("torque", TORQUE, "Measured shaft torque")), EFFICIENCY,
    "Hydro-mechanical efficiency from measured torque: displacement x pressure / (2 pi x torque).",
    scaling=(1, 1, -1),
    example=(28, 210, 103)))
declare(Calculation(
    "SP_TOTAL_EFF", pump.total_efficiency,
    (_P, _Q, Arg("input_power", POWER, "Measured input power")), EFFICIENCY,
    "Total efficiency from measured input power: pressure x flow / input power.",
    scaling=(1, 1, -1),
    example=(210, 39.5, 16.2)))
declare(Calculation(
    "SP_POWER_LOSS", pump.power_loss,
    (Arg("input_power", POWER, "Input power at the shaft"), _P, _Q), POWER,
    "Power turned into heat: input power less pressure x flow.",
    example=(16.2, 210, 39.5), plain_scalars=True))
declare(Calculation(
    "SP_PULSATION_FREQ", pump.pulsation_frequency,
    (Arg("teeth", NUMBER, "Number of teeth on one gear"), _N,
     Arg("harmonic", NUMBER, "Harmonic order (1 = fundamental)", default=1)), FREQUENCY,
    "Flow-pulsation frequency of a gear pump: harmonic x teeth x speed.",
    example=(12, 1500)))
