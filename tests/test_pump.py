"""Pump relations against handbook identities, worked examples and properties of the trade."""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from sheetpump.catalogue import CATALOGUE
from sheetpump.errors import PhysicsError
from sheetpump.physics import pump

REF = pint.UnitRegistry()  # outside reference for conversions, not sheetpump's registry


def si(value, unit):
    return REF.Quantity(value, unit).to_base_units().magnitude


def cell(name, *args):
    out = CATALOGUE[name].cell(*args)
    assert not isinstance(out, str), out
    return out


# --- handbook identities in two unit systems ----------------------------------------------------

def test_hydraulic_power_metric_and_imperial_agree():
    # P[kW] = p[bar]·Q[L/min]/600 (common practice, exact in SI); 200 bar x 60 L/min = 20 kW
    assert cell("SP_HYDRAULIC_POWER", 200, 60) == pytest.approx(200 * 60 / 600, rel=1e-12)
    # the same operating point given in psi and gpm, answered in hp, converted back with pint
    p_psi = REF.Quantity(200, "bar").to("psi").magnitude
    q_gpm = REF.Quantity(60, "L/min").to("gallon/minute").magnitude
    hp = cell("SP_HYDRAULIC_POWER", f"{p_psi!r} psi", f"{q_gpm!r} gpm", "hp")
    assert REF.Quantity(hp, "hp").to("kW").magnitude == pytest.approx(20.0, rel=1e-9)
    # P[hp] = p[psi]·Q[gpm]/1714 (common practice; the exact constant is 1714.3, so 2e-4)
    assert hp == pytest.approx(p_psi * q_gpm / 1714, rel=2e-4)


def test_geometric_flow_metric_and_imperial():
    # Q[L/min] = V[cm³/rev]·n[rpm]/1000 (common practice)
    assert cell("SP_GEOMETRIC_FLOW", 28, 1500) == pytest.approx(42.0, rel=1e-12)
    # Q[gpm] = V[in³/rev]·n[rpm]/231: a US gallon is 231 in³ by definition
    assert cell("SP_GEOMETRIC_FLOW", "1.5 in^3/rev", "1800 rpm", "gpm") == pytest.approx(1.5 * 1800 / 231, rel=1e-12)


def test_drive_torque_metric_and_imperial():
    # T[N·m] = V[cm³]·Δp[bar]/(20π·η_hm) (common practice)
    assert cell("SP_DRIVE_TORQUE", 28, 200, 0.9) == pytest.approx(28 * 200 / (20 * math.pi * 0.9), rel=1e-12)
    # T[lbf·in] = V[in³/rev]·p[psi]/(2π·η_hm) (the same relation in inch-pound units)
    t = cell("SP_DRIVE_TORQUE", "1.2 in^3/rev", "3000 psi", 0.9, "lbf*in")
    assert t == pytest.approx(1.2 * 3000 / (2 * math.pi * 0.9), rel=1e-12)


def test_shaft_power_practical_constant():
    # P[kW] = T[N·m]·n[rpm]/9549 (common practice; 9549 = 60000/2π rounded)
    assert cell("SP_SHAFT_POWER", 100, 1500) == pytest.approx(100 * 1500 / 9549, rel=1e-4)
    assert cell("SP_SHAFT_POWER", 100, 1500) == pytest.approx(100 * 1500 * 2 * math.pi / 60000, rel=1e-12)
    # 5252 rule: hp = lbf·ft·rpm/5252 (common practice)
    assert cell("SP_SHAFT_POWER", "100 lbf*ft", "1800 rpm", "hp") == pytest.approx(100 * 1800 / 5252, rel=1e-4)


def test_pulsation_frequency():
    # f = z·n/60 (common practice for external gear pumps): 12 teeth at 1500 rpm -> 300 Hz
    assert cell("SP_PULSATION_FREQ", 12, 1500) == pytest.approx(300.0)
    assert cell("SP_PULSATION_FREQ", 12, 1500, 2) == pytest.approx(600.0)


# --- textbook worked examples (from memory) -------------------------------------------------------

def test_worked_example_gear_pump_volumetric_efficiency():
    # Esposito, Fluid Power with Applications, gear-pump example (from memory): D_o = 75 mm,
    # D_i = 50 mm, L = 25 mm, 1600 rpm, measured 0.00160 m³/s -> V = 0.0000614 m³/rev, η_v ≈ 97.7 %.
    v = math.pi / 4 * (0.075**2 - 0.050**2) * 0.025  # the book's V = π/4·(D_o² − D_i²)·L
    # Theoretical flow Q_T = V·n by hand from the book's rounded V: 0.0000614 m³/rev × 1600/60 rev/s =
    # 0.001637 m³/s (Esposito gives 0.00164 m³/s; from memory)
    assert pump.geometric_flow(v, 1600 / 60) == pytest.approx(0.001637, rel=1e-3)
    eta_v = pump.volumetric_efficiency(0.00160, v, 1600 / 60)
    assert eta_v == pytest.approx(0.977, abs=1e-3)


def test_worked_example_overall_efficiency():
    # Esposito, Fluid Power with Applications, pump-efficiency example (from memory): V = 100 cm³/rev,
    # 0.0015 m³/s at 1000 rpm and 70 bar, input torque 120 N·m -> η_v = 0.90, theoretical torque
    # 111.4 N·m, η_m = 0.928, η_o = 0.835.
    v, n, p, q, t = 100e-6, 1000 / 60, 70e5, 0.0015, 120.0
    eta_v = pump.volumetric_efficiency(q, v, n)
    eta_hm = pump.hydromechanical_efficiency(v, p, t)
    eta_t = pump.total_efficiency(p, q, pump.shaft_power(t, n))
    assert eta_v == pytest.approx(0.90, abs=5e-4)
    # Theoretical torque T_T = V·Δp/2π, the shaft torque at η_hm = 1: 100e-6 × 70e5 / 2π = 111.4 N·m, the
    # book's value (from memory)
    assert pump.drive_torque(v, p, 1.0) == pytest.approx(111.4, abs=0.05)
    assert eta_hm == pytest.approx(0.928, abs=5e-4)
    assert eta_t == pytest.approx(0.835, abs=1e-3)  # the book rounds η_v and η_m first


# --- invalid physics ------------------------------------------------------------------------------

@pytest.mark.parametrize(
    ("call", "argument"),
    [
        (lambda: pump.geometric_flow(-1e-6, 25.0), "displacement"),
        (lambda: pump.effective_flow(28e-6, 25.0, 1.2), "volumetric_efficiency"),
        (lambda: pump.effective_flow(28e-6, 25.0, 0.0), "volumetric_efficiency"),
        (lambda: pump.displacement_for_flow(1e-3, 0.0, 0.9), "speed"),
        (lambda: pump.speed_for_flow(1e-3, 0.0, 0.9), "displacement"),
        (lambda: pump.drive_torque(28e-6, 2e7, np.array([0.9, 1.5])), "hydromechanical_efficiency"),
        (lambda: pump.total_efficiency(2e7, 1e-3, 0.0), "input_power"),
        (lambda: pump.pulsation_frequency(1, 25.0), "teeth"),
        (lambda: pump.pulsation_frequency(12.5, 25.0), "teeth"),
    ],
)
def test_invalid_physics_raises_naming_the_parameter(call, argument):
    with pytest.raises(PhysicsError) as info:
        call()
    assert info.value.argument == argument


# --- properties -----------------------------------------------------------------------------------

eff = st.floats(0.05, 1.0)
disp = st.floats(1e-7, 1e-3)
speed = st.floats(1.0, 100.0)
pres = st.floats(1e4, 5e7)


@given(disp, speed, pres, eff, eff)
def test_total_efficiency_never_exceeds_partials(v, n, p, eta_v, eta_hm):
    # η_t = η_v·η_hm ≤ min(η_v, η_hm) (ISO 4391 definitions)
    q = pump.effective_flow(v, n, eta_v)
    t = pump.drive_torque(v, p, eta_hm)
    eta_t = pump.total_efficiency(p, q, pump.shaft_power(t, n))
    assert eta_t == pytest.approx(eta_v * eta_hm, rel=1e-9)
    assert eta_t <= min(eta_v, eta_hm) * (1 + 1e-12)


@given(disp, speed, eff)
def test_displacement_for_flow_inverts_flow(v, n, eta_v):
    q = pump.effective_flow(v, n, eta_v)
    assert pump.displacement_for_flow(q, n, eta_v) == pytest.approx(v, rel=1e-12)
    assert pump.speed_for_flow(q, v, eta_v) == pytest.approx(n, rel=1e-12)


@given(st.floats(1, 500), st.floats(1, 400), eff)
def test_metric_and_imperial_inputs_give_the_same_result(v_cc, p_bar, eta):
    # the same operating point written in inch-pound units (converted with the reference pint)
    v_in3 = REF.Quantity(v_cc, "cm**3").to("inch**3").magnitude
    p_psi = REF.Quantity(p_bar, "bar").to("psi").magnitude
    metric = cell("SP_DRIVE_TORQUE", v_cc, p_bar, eta)
    imperial = cell("SP_DRIVE_TORQUE", f"{v_in3!r} in^3/rev", f"{p_psi!r} psi", eta)
    assert imperial == pytest.approx(metric, rel=1e-9)


@given(st.lists(st.tuples(pres, st.floats(0, 1e-2), eff), min_size=1, max_size=8))
def test_arrays_equal_elementwise_scalars(rows):
    p, q, e = (np.array(c) for c in zip(*rows, strict=True))
    vector = pump.input_power(p, q, e)
    scalars = [pump.input_power(float(a), float(b), float(c)) for a, b, c in rows]
    np.testing.assert_allclose(vector, scalars, rtol=1e-15)
