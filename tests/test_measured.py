"""Tests of sheetpump.physics.measured: per-point efficiencies, powers and plausibility flags.

Sources: textbook worked examples of pump efficiencies (Esposito, Fluid Power with Applications, from
memory, numbers as used below); the definitions of ISO 4391 (η_t = η_v·η_hm ≤ each); pint for unit
conversions. Tables made from the invented pump of tests/measured_tables.py check the flags.
"""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetpump.errors import PhysicsError
from sheetpump.physics.measured import FLAG_TEXT, MeasuredRanges, evaluate_points
from sheetpump.physics.wilson import WilsonModel

try:  # tests/ may or may not be a package; both layouts work
    from tests import measured_tables as tables
except ImportError:  # pragma: no cover - depends on how pytest was started
    import measured_tables as tables  # type: ignore[no-redef]

RPM = tables.RPM
coefficients = tables.coefficients
noisy_table = tables.noisy_table
one_curve = tables.one_curve
pressures = tables.pressures
speeds = tables.speeds
viscosities = tables.viscosities

ureg = pint.UnitRegistry()  # an independent registry: the reference, not ours


# -- published worked examples ---------------------------------------------------------------------
def test_textbook_example_metric_torque_and_power():
    # Esposito, Fluid Power with Applications, pump-efficiency example in SI units (from memory):
    # V = 100 cm³, Q = 0.0015 m³/s at 1000 rpm and 70 bar, input torque 120 N·m.
    # Answers: η_v = 90 %, theoretical torque 111.4 N·m, η_m = 92.8 %, η_o = 83.5 %.
    n, p, q, t, v = 1000 * RPM, 70e5, 0.0015, 120.0, 100e-6
    e = evaluate_points(n, p, q, torque=t, displacement=v)
    assert e.volumetric[0] == pytest.approx(0.90, abs=0.0005)
    assert e.hydromechanical[0] == pytest.approx(0.928, abs=0.0005)
    assert e.total[0] == pytest.approx(0.835, abs=0.001)  # the book multiplies the rounded 0.90 and 0.928
    assert e.flags == ((),)
    # The same point given as input power (P = 2π·n·T) gives the same efficiencies; P [kW] = T·n/9549
    # (common practice).
    power = 120.0 * 1000 / 9549 * 1000
    e2 = evaluate_points(n, p, q, input_power=power, displacement=v)
    assert e2.total[0] == pytest.approx(0.835, abs=0.001)
    assert e2.torque[0] == pytest.approx(120.0, rel=1e-4)
    # Hydraulic power P [kW] = Δp [bar]·Q [L/min]/600 (common practice); loss = input − hydraulic.
    assert e.hydraulic_power[0] == pytest.approx(70 * 90 / 600 * 1000, rel=1e-12)
    assert e.power_loss[0] == pytest.approx(power - 10500.0, rel=1e-3)


def test_textbook_example_imperial():
    # Esposito, Fluid Power with Applications, the same example in US units (from memory):
    # V = 5 in³, 20 gpm at 1000 rpm and 1000 psi, input torque 900 in·lb.
    # Answers: η_v = 92.4 %, η_m = 88.4 %, η_o = 81.7 %.
    def si(x, unit):
        return ureg.Quantity(x, unit).to_base_units().magnitude

    e = evaluate_points(1000 * RPM, si(1000, "psi"), si(20, "gallon/minute"), torque=si(900, "inch*lbf"),
                        displacement=si(5, "inch**3"))
    assert e.volumetric[0] == pytest.approx(0.924, abs=0.0005)
    assert e.hydromechanical[0] == pytest.approx(0.884, abs=0.0005)
    assert e.total[0] == pytest.approx(0.817, abs=0.0005)
    # P [hp] = p [psi]·Q [gpm]/1714 (common practice).
    assert ureg.Quantity(e.hydraulic_power[0], "W").to("hp").magnitude == pytest.approx(1000 * 20 / 1714,
                                                                                           rel=1e-3)


# -- properties ------------------------------------------------------------------------------------


@settings(max_examples=200, deadline=None)
@given(coefficients, speeds, pressures, viscosities)
def test_efficiencies_physical(c, n, p, mu):
    # For physical (non-negative) coefficients: 0 < η ≤ 1 and η_t ≤ η_v, η_t ≤ η_hm (ISO 4391 definitions).
    r = WilsonModel(c[4], c_s=c[0], c_f=c[1], c_v=c[2], t_c=c[3]).predict(n, p, mu)
    for eta in (r.volumetric, r.hydromechanical, r.total):
        assert 0 < eta <= 1 + 1e-12  # rounding at zero loss coefficients
    assert r.total <= r.volumetric * (1 + 1e-12) and r.total <= r.hydromechanical * (1 + 1e-12)  # rounding
    # Self-consistency: evaluating the predicted point as a measurement gives the same efficiencies back.
    e = evaluate_points(n, p, r.flow, torque=r.torque, displacement=c[4])
    assert e.total[0] == pytest.approx(float(r.total), rel=1e-9)
    assert e.flags == ((),)


@settings(max_examples=50, deadline=None)
@given(st.integers(0, 10_000))
def test_evaluated_table_total_below_partials(seed):
    n, p, q, t, mu = noisy_table(seed=seed)
    e = evaluate_points(n, p, q, torque=t, viscosity=mu)  # derived displacement
    assert np.all(e.total <= np.minimum(e.volumetric, e.hydromechanical) + e.tolerance)
    assert all(f == () for f in e.flags)


# -- plausibility flags ----------------------------------------------------------------------------
def test_flags_efficiency_above_one():
    n, p, q, t, mu = one_curve()
    q[2] = 1.05 * 28e-6 * n[2]  # more than the geometric flow
    t[4] = 0.9 * 28e-6 * p[4] / (2 * math.pi)  # less than the ideal torque
    e = evaluate_points(n, p, q, torque=t, displacement=28e-6, viscosity=mu)
    assert "eff_above_1" in e.flags[2] and "eff_above_1" in e.flags[4]
    assert "total_above_partial" in e.flags[4]  # η_hm > 1 makes η_t > η_v
    assert e.flags[0] == ()


def test_flags_volumetric_efficiency_rising_with_pressure():
    n, p, q, t, mu = one_curve()
    q[-1] = q[0]  # the highest pressure delivers as much as the lowest: η_v does not fall
    e = evaluate_points(n, p, q, torque=t, displacement=28e-6, viscosity=mu)
    assert e.flags[-1] == ("vol_eff_rises_with_pressure",)
    assert all(f == () for f in e.flags[:-1])
    # At another viscosity the same flow is no contradiction.
    mu2 = mu.copy()
    mu2[-1] = 0.2
    e2 = evaluate_points(n, p, q, torque=t, displacement=28e-6, viscosity=mu2)
    assert "vol_eff_rises_with_pressure" not in e2.flags[-1]


def test_flags_duplicates_and_missing():
    n, p, q, t, _ = one_curve()
    n, p, q, t = (np.append(a, a[1]) for a in (n, p, q, t))
    q[3] = np.nan
    e = evaluate_points(n, p, q, torque=t, displacement=28e-6)
    assert "duplicate_point" in e.flags[1] and "duplicate_point" in e.flags[-1]
    assert e.flags[3] == ("missing_value",)
    assert math.isnan(e.volumetric[3]) and not math.isnan(e.volumetric[2])
    assert set(FLAG_TEXT) >= {f for flags in e.flags for f in flags}


def test_torque_or_power_exactly_one():
    with pytest.raises(PhysicsError):
        evaluate_points(25.0, 100e5, 1e-3, displacement=28e-6)
    with pytest.raises(PhysicsError):
        evaluate_points(25.0, 100e5, 1e-3, torque=50.0, input_power=8000.0, displacement=28e-6)


def test_ranges_default_unbounded():
    assert not MeasuredRanges().left(np.array([25.0]), np.array([1e7]), np.array([0.03]))[0]
