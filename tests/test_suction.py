"""The suction line and the cold start (issue 18), checked against outside values.

Sources: the Hagen–Poiseuille law (laminar Darcy–Weisbach by hand); the ``fluids`` library's own
functions and docstring examples (turbulent friction factor, pressure drop, fitting coefficients); hand
arithmetic for a cold start; IEC 60034-12 for the design N locked-rotor torque (from memory).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from fluids import fittings as lib
from fluids import friction as fr

from sheetpump import cells, demo
from sheetpump.catalogue import CATALOGUE
from sheetpump.checks import check
from sheetpump.datasheet import Datasheet
from sheetpump.duty import Application, Duty, Oil
from sheetpump.errors import InputError
from sheetpump.physics import start
from sheetpump.physics import suction as s
from sheetpump.physics.drive import HP
from sheetpump.suction import SuctionLine, inlet
from sheetpump.workbooks.readers import read_application
from sheetpump.workbooks.templates import DUTY_COLUMNS, write_template

RHO = 870.0
REL = 1e-9


# --- friction ---------------------------------------------------------------------------------------


@pytest.mark.parametrize(("q_lpm", "d_mm", "length", "nu_cst"), [
    (40, 25, 1.5, 1500), (10, 12, 3.0, 46), (60, 38, 0.8, 400), (5, 20, 10.0, 32)])
def test_laminar_drop_is_hagen_poiseuille(q_lpm, d_mm, length, nu_cst):
    q, d, nu = q_lpm / 60000, d_mm / 1000, nu_cst * 1e-6
    assert 4 * q / (math.pi * d * nu) < 2000  # laminar (by hand)
    mu = nu * RHO
    by_hand = 128 * mu * length * q / (math.pi * d**4)  # Hagen–Poiseuille
    assert s.darcy_drop(q, d, length, nu, RHO) == pytest.approx(by_hand, rel=1e-12)


@pytest.mark.filterwarnings("ignore:overflow:RuntimeWarning")  # inside fluids' Colebrook at Re 1e8, ε/d 0.05
def test_turbulent_factor_is_clamonds_solution_of_colebrook():
    re = np.geomspace(4000, 1e8, 60)
    for ed in (0.0, 1e-5, 1e-3, 0.05):
        ours = s.friction_factor(re, ed)
        # the library's scalar Clamond, and its exact Colebrook (Lambert W) for a second opinion
        assert ours == pytest.approx([fr.Clamond(r, ed) for r in re], rel=1e-13)
        assert ours == pytest.approx([fr.Colebrook(r, ed) for r in re], rel=1e-9)
    # fluids.friction.Clamond's docstring example: Clamond(1E5, 1E-4) = 0.01851386607747165
    assert s.friction_factor(1e5, 1e-4) == pytest.approx(0.01851386607747165, rel=1e-14)


def test_turbulent_drop_agrees_with_fluids_one_phase_dp():
    q, d, length, nu = 200 / 60000, 0.025, 4.0, 10e-6  # Re ≈ 17000
    assert 4 * q / (math.pi * d * nu) > 4000
    ref = fr.one_phase_dP(m=q * RHO, rho=RHO, mu=nu * RHO, D=d, roughness=0.0, L=length, Method="Clamond")
    assert s.darcy_drop(q, d, length, nu, RHO) == pytest.approx(ref, rel=1e-9)


def test_factor_is_continuous_through_the_transition():
    # no jump at Re = 2000 or 4000: a rounding of the flow cannot flip a verdict
    for edge in (2000.0, 4000.0):
        below, above = s.friction_factor(edge * (1 - 1e-9)), s.friction_factor(edge * (1 + 1e-9))
        assert above == pytest.approx(below, rel=1e-6)
    re = np.linspace(1500, 5000, 20001)
    f = s.friction_factor(re)
    assert np.max(np.abs(np.diff(f))) < 1e-5
    # between the ends it lies between the laminar value at 2000 and Colebrook's at 4000
    mid = s.friction_factor(3000.0)
    assert min(0.032, fr.Clamond(4000, 0)) <= mid <= max(0.032, fr.Clamond(4000, 0))


# --- fittings and strainer ----------------------------------------------------------------------------


@pytest.mark.parametrize("name", [n for n, entry in s.FITTINGS.items() if entry is not None])
@pytest.mark.parametrize("d", [0.012, 0.025, 0.05])
def test_fitting_k_is_darbys_3k_from_fluids(name, d):
    f = s.fitting(name, d)
    for re in (20.0, 500.0, 1e4, 1e6):
        assert f.k(re) == pytest.approx(lib.Darby3K(Re=re, name=s.FITTINGS[name], Di=d), rel=1e-12)


def test_sharp_entrance():
    k = s.fitting("Entrance", 0.025).k(1e4)
    assert k == lib.entrance_sharp(method="Rennels")
    assert 0.4 <= k <= 0.6  # Crane TP-410 gives 0.5 for a sharp-edged entrance (from memory)


def test_unknown_fitting_lists_the_known_ones():
    with pytest.raises(ValueError, match=r"elbow 90.*ball valve"):
        s.fitting("swan neck", 0.025)


def test_strainer_scales_as_a_laminar_element():
    # by hand: 0.05 bar at 60 L/min, 30 mm²/s -> at 30 L/min, 300 mm²/s: 0.05 x 0.5 x 10 = 0.25 bar
    assert s.strainer_drop(30 / 60000, 300e-6, 5000.0, 60 / 60000, 30e-6) == pytest.approx(25000.0)
    # turbulent element: with flow squared, not viscosity: 0.05 x 0.25
    assert s.strainer_drop(30 / 60000, 300e-6, 5000.0, 60 / 60000, 30e-6, "turbulent") == pytest.approx(1250.0)


def test_vectorised_equals_one_by_one():
    rng = np.random.default_rng(18)
    q = rng.uniform(0, 100, 1000) / 60000
    nu = rng.uniform(10, 2000, 1000) * 1e-6
    line = SuctionLine(0.025, 1.5, 0.4, 101325.0, 1600.0, 1.3, "", (5000.0, 1e-3, 30e-6))
    t = inlet(line, q, nu, RHO)
    for i in (0, 17, 500, 999):
        one = inlet(line, float(q[i]), float(nu[i]), RHO)
        assert float(t.inlet[i]) == pytest.approx(one.inlet, rel=1e-12)


# --- a cold start worked by hand -------------------------------------------------------------------


def test_cold_start_by_hand():
    """VG 46 at -10 °C (taken as 1500 mm²/s), 40 L/min through 1.5 m of 25 mm line, 0.5 m lift, an entrance."""
    q, d, length, nu, lift = 40 / 60000, 0.025, 1.5, 1500e-6, 0.5
    v = q / (math.pi * d**2 / 4)  # 1.3581 m/s
    re = v * d / nu  # 22.6: laminar
    head = RHO * v**2 / 2  # 802.3 Pa
    friction = 128 * (nu * RHO) * length * q / (math.pi * d**4)  # 136 116 Pa (Hagen–Poiseuille)
    by_hand = 101325 - RHO * 9.80665 * lift - friction - 0.57 * head - head  # entrance K 0.57 (Rennels)
    assert (round(v, 4), round(re, 1), round(friction)) == (1.3581, 22.6, 136116)
    line = SuctionLine(d, length, lift, k_inf=s.fitting("entrance", d).k_inf)
    assert inlet(line, q, nu, RHO).inlet == pytest.approx(by_hand, rel=1e-12)  # -40 317 Pa: starved

    # the checker: one segment at 1500 rpm, the pump draws 26.67 cm³ x 1500 rpm = 40 L/min
    oil = Oil(1500e-6, 263.15, 46e-6, 313.15)  # 1500 mm²/s at -10 °C, VG 46 at 40 °C
    duty = Duty(np.array([10.0]), np.array([100e5]), np.array([35 / 60000]), np.array([25.0]),
                np.array([313.15]), np.array([1e5]), names=("run",))
    app = Application("invented", duty, oil, relief_setting=150e5, cold_start_temperature=263.15,
                      suction=line, motor_starting_torque=0.5)
    ds = Datasheet("Invented", "G27", q / 25.0, 8.0, 50.0, 200e5, 250e5, inlet_pressure_min=0.8e5,
                   volumetric_efficiency=0.93, total_efficiency=0.85, starting_torque=40.0)
    f = {x.rule: x for x in check(ds, app).findings}
    cold = f["inlet.cold-start"]
    assert cold.severity == "fail" and cold.measured == pytest.approx(by_hand, rel=1e-9)
    assert "line friction dominates" in cold.message and cold.app_where.field == "suction_diameter"
    assert by_hand < 0 and "below vacuum: the line cannot feed the pump" in cold.message
    # torque by hand: T = V Δp / (2π η_hm) = 26.67e-6 x 1e7 / (2π x 0.85/0.93) = 46.4 N·m, P = T 2π n =
    # 7.29 kW -> a 7.5 kW motor (IEC 60072-1 series), rated torque 7.5 kW / (2π x 25/s) = 47.75 N·m;
    # stated 0.5 x rated (a star–delta start): 23.87 N·m, below the stated breakaway torque of 40 N·m
    torque = f["torque.cold-start"]
    assert torque.limit == pytest.approx(0.5 * 7500 / (2 * math.pi * 25), rel=1e-9)
    assert torque.severity == "fail" and torque.measured == 40.0
    assert "7.5 kW" in torque.message
    assert "at full speed" not in torque.message  # a stated breakaway torque is a standstill torque
    # without the stated multiple: IEC 60034-12 design N, 7.5 kW 4-pole: 1.6 x rated = 76.4 N·m (from memory)
    app2 = dataclasses.replace(app, motor_starting_torque=None)
    t2 = next(x for x in check(ds, app2).findings if x.rule == "torque.cold-start")
    assert t2.severity == "pass" and t2.limit == pytest.approx(1.6 * 7500 / (2 * math.pi * 25), rel=1e-9)


def test_locked_rotor_defaults():
    # IEC 60034-12 design N 4-pole and NEMA MG 1 design B 1800 rpm (both from memory)
    assert start.locked_rotor_ratio(1.5e3) == 1.8 and start.locked_rotor_ratio(55e3) == 1.2
    assert start.locked_rotor_ratio(10 * HP, "NEMA") == 1.65


def test_velocity_rule_warns_above_common_practice():
    line = SuctionLine(0.016, 1.0, 0.0)  # 40 L/min in 16 mm: 3.3 m/s, far above 1.2 m/s (common practice)
    duty = Duty(np.array([10.0]), np.array([50e5]), np.array([35 / 60000]), np.array([25.0]),
                np.array([323.15]), np.array([1e5]), names=("run",))
    app = Application("invented", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=150e5, suction=line)
    ds = Datasheet("Invented", "G27", 40 / 60000 / 25, 8.0, 50.0, 200e5, 250e5, volumetric_efficiency=0.93)
    f = next(x for x in check(ds, app).findings if x.rule == "inlet.velocity")
    assert f.severity == "warn" and f.measured == pytest.approx(40 / 60000 / (math.pi * 0.016**2 / 4))


# --- reading the line, refusing bad ones ----------------------------------------------------------


def _app(tmp_path, **changes):
    values = {**demo.MACHINE, **changes}
    values = {k: v for k, v in values.items() if v is not None}
    return write_template("application", tmp_path / "app.xlsx", values, demo.DUTY,
                          [c.header for c in DUTY_COLUMNS])


def test_standing_pump_sees_the_static_pressure():
    # no flow: only the reservoir and the column of oil act (by hand: 1.01325 bar - 870 x 9.80665 x 0.3 Pa)
    t = inlet(SuctionLine(0.032, 1.2, 0.3, k_re=1100.0, k_inf=1.3), np.array([0.0, 1e-20]), 300e-6, RHO)
    assert np.all(t.inlet == pytest.approx(101325 - RHO * 9.80665 * 0.3, rel=1e-12))


def test_demo_line_is_read(tmp_path):
    app = read_application(_app(tmp_path, inlet_pressure=None, motor_starting_torque=(0.5, "x rated")))
    assert app.motor_starting_torque == 0.5
    line = app.suction
    assert (line.diameter, line.length, line.lift) == pytest.approx((0.032, 1.2, 0.3))
    elbow = lib.Darby["Elbow, 90°, threaded, standard, (r/D = 1)"][0]
    ball = lib.Darby["Valve, Ball valve, standard, β = 1"][0]
    assert line.k_re == pytest.approx(elbow + ball)
    assert app.sources["suction_diameter"].cell


@pytest.mark.parametrize(("changes", "field", "message"), [
    ({"suction_diameter": (0, "mm")}, "suction_diameter", "greater than zero"),
    ({"suction_length": (-1, "m")}, "suction_length", "greater than zero"),
    ({"suction_length": None}, "suction_length", "needs its length"),
    ({"suction_fittings": ("entrance, swan neck",)}, "suction_fittings", "elbow 90"),
    ({"strainer_dp": (0.05, "bar")}, "strainer_flow", "flow it is stated at"),
    ({"strainer_dp": (0.05, "bar"), "strainer_flow": (60, "L/min")}, "strainer_viscosity", "viscosity"),
])
def test_bad_lines_are_refused_naming_the_cell(tmp_path, changes, field, message):
    with pytest.raises(InputError, match=message) as err:
        read_application(_app(tmp_path, **changes))
    assert err.value.where.field == field and err.value.where.cell


def test_bad_line_exits_2(tmp_path, capsys):
    from sheetpump.cli import main

    app = _app(tmp_path, suction_fittings=("elbow 91",))
    pumps = demo.write_inputs(tmp_path / "in")[1:2]
    assert main(["check", "--app", str(app), str(pumps[0])]) == 2
    assert "suction_fittings" in capsys.readouterr().err


# --- cell functions -----------------------------------------------------------------------------------


def test_cell_functions():
    # Hagen–Poiseuille in cell units: 40 L/min, 25 mm, 1.5 m, 1500 mm²/s, 870 kg/m³ -> 1.36117 bar
    assert cells.SP_LINE_PRESSURE_DROP(40, 25, 1.5, 1500, 870) == pytest.approx(1.361167, rel=1e-5)
    assert cells.SP_LINE_VELOCITY(40, 25) == pytest.approx(1.358122, rel=1e-6)  # 4Q/(πd²) by hand
    assert cells.SP_LINE_VELOCITY(40, 0).startswith("#SP!")
    # flooded by 1 m, no flow: reservoir + ρ g 1 m = 1.01325 + 0.0853 bar
    assert cells.SP_SUCTION_PRESSURE(0, 25, 1, 46, 870, -1) == pytest.approx(1.01325 + 870 * 9.80665 / 1e5)
    # below vacuum, the number is kept (its help says so): 40 L/min, 25 mm, 1.5 m, 1500 mm²/s, 0.5 m lift,
    # no fittings: 1.01325 - 0.04266 (ρ g z) - 1.36117 (Hagen–Poiseuille) - 0.00802 (ρv²/2) = -0.3986 bar
    assert cells.SP_SUCTION_PRESSURE(40, 25, 1.5, 1500, 870, 0.5) == pytest.approx(-0.3986, abs=1e-4)
    assert "below vacuum" in CATALOGUE["SP_SUCTION_PRESSURE"].help


def test_inlet_above_vacuum_is_not_called_below_it():
    """The cold start of :func:`test_cold_start_by_hand` with thinner oil: 400 mm²/s at -10 °C."""
    q, d, length, nu, lift = 40 / 60000, 0.025, 1.5, 400e-6, 0.5
    v = q / (math.pi * d**2 / 4)
    head = RHO * v**2 / 2
    friction = 128 * (nu * RHO) * length * q / (math.pi * d**4)  # 36 298 Pa (Hagen–Poiseuille)
    by_hand = 101325 - RHO * 9.80665 * lift - friction - 0.57 * head - head  # about 59 500 Pa absolute
    assert 59000 < by_hand < 60000
    line = SuctionLine(d, length, lift, k_inf=s.fitting("entrance", d).k_inf)
    oil = Oil(400e-6, 263.15, 46e-6, 313.15)
    duty = Duty(np.array([10.0]), np.array([100e5]), np.array([35 / 60000]), np.array([25.0]),
                np.array([313.15]), np.array([1e5]), names=("run",))
    app = Application("invented", duty, oil, relief_setting=150e5, cold_start_temperature=263.15,
                      suction=line)
    ds = Datasheet("Invented", "G27", q / 25.0, 8.0, 50.0, 200e5, 250e5, inlet_pressure_min=0.8e5,
                   volumetric_efficiency=0.93, total_efficiency=0.85)
    cold = next(x for x in check(ds, app).findings if x.rule == "inlet.cold-start")
    assert cold.severity == "fail" and cold.measured == pytest.approx(by_hand, rel=1e-9)
    assert "below vacuum" not in cold.message
