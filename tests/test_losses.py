"""Tests of sheetpump.physics.losses (measured performance) and its cell functions.

Sources: Wilson's model in Merritt, Hydraulic Control Systems (1967), ch. 5, with its efficiency forms
η_v = 1 − C_s/S and η_hm = 1/(1 + C_f + C_v·S + T_c/(D·Δp)), S = μ·ω/Δp (from memory); textbook
worked examples of pump efficiencies (Esposito, Fluid Power with Applications, from memory, numbers
as used below); pint for unit conversions. The pump of the synthetic tables is invented: 28 cm³/rev,
C_s = 1.3e-8, C_f = 0.04, C_v = 1e5, T_c = 1.0 N·m, values of the size Merritt describes for real
pumps (from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sheetpump.catalogue import CATALOGUE
from sheetpump.declarations import ERROR_PREFIX
from sheetpump.physics.losses import (
    FLAG_TEXT,
    UNCERTAINTY_FLOOR,
    InterpolatedPerformance,
    MeasuredRanges,
    PhysicsError,
    WilsonModel,
    derived_displacement,
    evaluate_points,
    fit_performance,
    fit_wilson,
)

ureg = pint.UnitRegistry()  # an independent registry: the reference, not ours

TRUE = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)  # invented pump
RPM = 1 / 60


def grid(speeds_rpm=(1000, 1500, 2000, 2500), pressures_bar=tuple(range(10, 251, 40)),
         viscosities=(0.015, 0.03, 0.06)):
    n, p, mu = np.meshgrid(np.asarray(speeds_rpm, float) * RPM, np.asarray(pressures_bar, float) * 1e5,
                           np.asarray(viscosities, float))
    return n.ravel(), p.ravel(), mu.ravel()


def noisy_table(seed=1, flow_noise=0.001, torque_noise=0.002, **kw):
    n, p, mu = grid(**kw)
    r = TRUE.predict(n, p, mu)
    rng = np.random.default_rng(seed)
    q = r.flow * (1 + flow_noise * rng.standard_normal(n.size))
    t = r.torque * (1 + torque_noise * rng.standard_normal(n.size))
    return n, p, q, t, mu


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


def test_wilson_prediction_matches_merritt_efficiency_forms():
    # Merritt (1967), ch. 5 (from memory): η_v = 1 − C_s/S, η_hm = 1/(1 + C_f + C_v·S + T_c/(D·Δp)),
    # S = μ·ω/Δp.
    n, p, mu = 1800 * RPM, 180e5, 0.025
    omega, d = 2 * math.pi * n, TRUE.displacement / (2 * math.pi)
    s = mu * omega / p
    r = TRUE.predict(n, p, mu)
    assert float(r.volumetric) == pytest.approx(1 - TRUE.c_s / s, rel=1e-12)
    assert float(r.hydromechanical) == pytest.approx(
        1 / (1 + TRUE.c_f + TRUE.c_v * s + TRUE.t_c / (d * p)), rel=1e-12)
    assert float(r.total) == pytest.approx(float(r.volumetric * r.hydromechanical), rel=1e-12)
    assert float(r.input_power) == pytest.approx(float(r.torque) * omega, rel=1e-12)


# -- recovery of known coefficients ----------------------------------------------------------------
def test_wilson_fit_recovers_known_coefficients():
    # Tolerances: about four standard deviations of the estimates over 200 noise draws at 0.1 % flow
    # and 0.2 % torque noise.
    n, p, q, t, mu = noisy_table(seed=7)
    m = fit_wilson(n, p, q, t, mu, 28e-6)
    assert m.method == "wilson"
    assert m.c_s == pytest.approx(TRUE.c_s, rel=0.01)
    assert m.c_f == pytest.approx(TRUE.c_f, rel=0.05)
    assert m.c_v == pytest.approx(TRUE.c_v, rel=0.05)
    assert m.t_c == pytest.approx(TRUE.t_c, abs=0.15)
    for name in ("c_s", "c_f", "c_v", "t_c"):
        assert abs(getattr(m, name) - getattr(TRUE, name)) < 4 * m.uncertainty[name], name
    assert m.notes == ()
    # The residuals are of the size of the noise put in.
    assert 0.5e-3 < m.residuals.flow_rms / np.mean(q) < 2e-3
    assert m.residuals.torque_max >= m.residuals.torque_rms > 0
    assert m.ranges.pressure == pytest.approx((10e5, 250e5))
    assert m.ranges.viscosity == pytest.approx((0.015, 0.06))


def test_wilson_fit_predicts_held_out_points():
    n, p, q, t, mu = noisy_table(seed=3)
    m = fit_performance(n, p, q, t, mu, 28e-6)
    # Held-out points between the measured ones (speed, pressure and viscosity not in the table).
    at_n, at_p, at_mu = np.array([1250, 1750, 2250]) * RPM, np.array([75e5, 145e5, 215e5]), [0.02, 0.04, 0.05]
    got, want = m.predict(at_n, at_p, at_mu), TRUE.predict(at_n, at_p, at_mu)
    np.testing.assert_allclose(got.flow, want.flow, rtol=0.002)
    np.testing.assert_allclose(got.torque, want.torque, rtol=0.003)
    np.testing.assert_allclose(got.total, want.total, atol=0.003)
    assert not got.extrapolated.any()


def test_fit_with_derived_displacement():
    n, p, q, t, mu = noisy_table(seed=5)
    m = fit_wilson(n, p, q, t, mu)
    assert m.displacement == pytest.approx(28e-6, rel=0.002)
    assert any("derived" in note for note in m.notes)


# -- derived displacement --------------------------------------------------------------------------
def test_derived_displacement_uncertainty_covers_the_truth():
    # Flow = V·n − k·Δp + noise, V = 28 cm³/rev; over many draws the ±2u interval should hold the
    # truth about 95 % of the time and ±1u about 68 % (normal distribution).
    n, p, _ = grid(speeds_rpm=(800, 1200, 1600, 2000), pressures_bar=(5, 20, 35, 50, 150, 250),
                   viscosities=(0.03,))
    clean = 28e-6 * n - 2.5e-12 * p
    inside1 = inside2 = 0
    rng = np.random.default_rng(11)
    for _ in range(300):
        q = clean + 2e-7 * rng.standard_normal(n.size)
        d = derived_displacement(n, p, q)
        error = abs(d.value - 28e-6)
        inside1 += error <= d.uncertainty
        inside2 += error <= 2 * d.uncertainty
    assert d.points == 16  # up to a third of 250 bar: 5, 20, 35 and 50 bar at four speeds
    assert d.max_pressure == 50e5
    assert 0.58 < inside1 / 300 < 0.78
    assert 0.90 < inside2 / 300 <= 1.0
    assert d.uncertainty < 0.005 * 28e-6
    assert d.leakage[0] == pytest.approx(2.5e-12, rel=0.2)


def test_derived_displacement_from_wilson_table():
    n, p, q, _, mu = noisy_table(seed=2)
    d = derived_displacement(n, p, q, viscosity=mu)
    assert abs(d.value - 28e-6) < 3 * d.uncertainty


def test_derived_displacement_needs_two_speeds():
    n, p, q, _, _ = noisy_table(speeds_rpm=(1500,), viscosities=(0.03,))
    with pytest.raises(PhysicsError, match="two or more"):
        derived_displacement(n, p, q)
    with pytest.raises(PhysicsError, match="two or more"):
        evaluate_points(n, p, q, torque=np.ones_like(n))


# -- properties ------------------------------------------------------------------------------------
coefficients = st.tuples(
    st.floats(1e-10, 1e-8),   # C_s: at most 95 % slip at the corner of the ranges below
    st.floats(0.0, 0.2),      # C_f
    st.floats(0.0, 3e5),      # C_v
    st.floats(0.0, 5.0),      # T_c [N·m]
    st.floats(5e-6, 100e-6),  # V [m³/rev]
)
speeds = st.floats(10.0, 60.0)         # rev/s
pressures = st.floats(1e5, 3e7)        # Pa
viscosities = st.floats(0.005, 0.2)    # Pa·s


@settings(max_examples=200, deadline=None)
@given(coefficients, speeds, pressures, pressures, viscosities, viscosities)
def test_volumetric_efficiency_falls_with_pressure_rises_with_viscosity(c, n, p1, p2, mu1, mu2):
    # Leakage grows with Δp and falls with viscosity (common practice; Merritt 1967).
    m = WilsonModel(c[4], c_s=c[0], c_f=c[1], c_v=c[2], t_c=c[3])
    lo, hi = sorted((p1, p2))
    thin, thick = sorted((mu1, mu2))
    assert m.predict(n, hi, thin).volumetric <= m.predict(n, lo, thin).volumetric
    assert m.predict(n, lo, thick).volumetric >= m.predict(n, lo, thin).volumetric


@settings(max_examples=200, deadline=None)
@given(coefficients, speeds, pressures, viscosities)
def test_efficiencies_physical(c, n, p, mu):
    # For physical (non-negative) coefficients: 0 < η ≤ 1 and η_t ≤ η_v, η_t ≤ η_hm (ISO 4391 definitions).
    r = WilsonModel(c[4], c_s=c[0], c_f=c[1], c_v=c[2], t_c=c[3]).predict(n, p, mu)
    for eta in (r.volumetric, r.hydromechanical, r.total):
        assert 0 < eta <= 1 + 1e-12  # rounding at zero loss coefficients
    assert r.total <= r.volumetric * (1 + 1e-12) and r.total <= r.hydromechanical * (1 + 1e-12)  # rounding
    # Evaluating the predicted point as a measurement gives the same efficiencies back.
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
def _one_curve():
    n, p, mu = grid(speeds_rpm=(1500,), viscosities=(0.03,))
    r = TRUE.predict(n, p, mu)
    return n, p, r.flow.copy(), r.torque.copy(), mu


def test_flags_efficiency_above_one():
    n, p, q, t, mu = _one_curve()
    q[2] = 1.05 * 28e-6 * n[2]  # more than the geometric flow
    t[4] = 0.9 * 28e-6 * p[4] / (2 * math.pi)  # less than the ideal torque
    e = evaluate_points(n, p, q, torque=t, displacement=28e-6, viscosity=mu)
    assert "eff_above_1" in e.flags[2] and "eff_above_1" in e.flags[4]
    assert "total_above_partial" in e.flags[4]  # η_hm > 1 makes η_t > η_v
    assert e.flags[0] == ()


def test_flags_volumetric_efficiency_rising_with_pressure():
    n, p, q, t, mu = _one_curve()
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
    n, p, q, t, _ = _one_curve()
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


# -- what a table cannot tell ---------------------------------------------------------------------
def test_single_viscosity_notes():
    n, p, q, t, mu = noisy_table(viscosities=(0.03,))
    m = fit_wilson(n, p, q, t, mu, 28e-6)
    assert any("viscosity dependence" in s and "assumed" in s and "not fitted" in s for s in m.notes)
    assert not any("one speed" in s for s in m.notes)
    # The speed dependence of the viscous torque is still fitted: C_v·μ recovered.
    assert m.c_v == pytest.approx(TRUE.c_v, rel=0.1)


def test_single_speed_and_viscosity_notes():
    n, p, q, t, mu = noisy_table(speeds_rpm=(1500,), viscosities=(0.03,))
    m = fit_wilson(n, p, q, t, mu, 28e-6)
    assert any("one speed and one viscosity" in s and "not fitted" in s for s in m.notes)
    assert m.t_c == 0.0 and "t_c" not in m.uncertainty
    # At the measured speed and viscosity the model still reproduces the torque.
    np.testing.assert_allclose(m.predict(n, p, mu).torque, TRUE.predict(n, p, mu).torque, rtol=0.01)


def test_single_speed_notes():
    n, p, q, t, mu = noisy_table(speeds_rpm=(1500,))
    m = fit_wilson(n, p, q, t, mu, 28e-6)
    assert any("speed dependence" in s and "not fitted: one speed" in s for s in m.notes)


def test_extrapolation_marked():
    n, p, q, t, mu = noisy_table()
    m = fit_performance(n, p, q, t, mu, 28e-6)
    r = m.predict([1500 * RPM, 1500 * RPM, 3000 * RPM, 1500 * RPM], [100e5, 300e5, 100e5, 5e5],
                  [0.03, 0.03, 0.03, 0.1])
    assert r.extrapolated.tolist() == [False, True, True, True]
    assert r.extrapolation[1] == "pressure above the measured range"
    assert r.extrapolation[2] == "speed above the measured range"
    assert "pressure below" in r.extrapolation[3] and "viscosity above" in r.extrapolation[3]
    # A model with one viscosity extrapolates at any other.
    n1, p1, q1, t1, mu1 = noisy_table(viscosities=(0.03,))
    assert fit_wilson(n1, p1, q1, t1, mu1, 28e-6).predict(25.0, 100e5, 0.04).extrapolated


def test_small_table_falls_back_to_interpolation():
    n, p, q, t, _ = _one_curve()
    keep = [0, 3]
    m = fit_performance(n[keep], p[keep], q[keep], t[keep], 0.03, 28e-6)
    assert isinstance(m, InterpolatedPerformance)
    assert any("interpolated" in s for s in m.notes)
    # At a measured point the measured efficiencies come back; in between, linear in pressure.
    e = evaluate_points(n[keep], p[keep], q[keep], torque=t[keep], displacement=28e-6)
    r = m.predict(n[keep], p[keep], 0.03)
    np.testing.assert_allclose(r.volumetric, e.volumetric, rtol=1e-12)
    np.testing.assert_allclose(r.torque, t[keep], rtol=1e-12)
    mid = m.predict(n[0], (p[0] + p[3]) / 2, 0.03)
    assert float(mid.volumetric) == pytest.approx(e.volumetric.mean(), rel=1e-12)
    assert m.predict(n[0], 300e5, 0.03).extrapolated
    assert m.predict(2 * n[0], p[1], 0.03).extrapolated


def test_single_pressure_falls_back():
    n = np.array([1000, 2000]) * RPM
    r = TRUE.predict(n, 100e5, 0.03)
    m = fit_performance(n, [100e5, 100e5], r.flow, r.torque, 0.03, 28e-6)
    assert m.method == "interpolation"
    assert any("pressure" in s for s in m.notes)


def test_negative_flow_is_an_error_not_a_fallback():
    with pytest.raises(PhysicsError, match="flow"):
        fit_performance([25.0, 25.0], [0.0, 100e5], [7e-4, -1e-4], [5.0, 50.0], 0.03, 28e-6)


def test_ranges_default_unbounded():
    assert not MeasuredRanges().left(np.array([25.0]), np.array([1e7]), np.array([0.03]))[0]


# -- cell functions --------------------------------------------------------------------------------
def _practical_table():
    n, p, q, t, mu = noisy_table(seed=4)
    col = np.reshape
    return (col(n * 60, (-1, 1)), col(p / 1e5, (-1, 1)), col(q * 60000, (-1, 1)), col(t, (-1, 1)),
            col(mu * 1000, (-1, 1)))


def test_cell_derived_displacement_in_two_unit_systems():
    n, p, q, _, _ = _practical_table()
    cc = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n, p, q)
    assert cc == pytest.approx(28.0, rel=0.002)
    # The same table written in psi and gpm, result asked in in³/rev (pint as the reference).
    psi = [[f"{float(ureg.Quantity(x, 'bar').to('psi').magnitude)!r} psi"] for x in p.ravel()]
    gpm = [[f"{float(ureg.Quantity(x, 'L/min').to('gallon/minute').magnitude)!r} gpm"] for x in q.ravel()]
    inch3 = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n, psi, gpm, None, "in^3/rev")
    assert inch3 == pytest.approx(ureg.Quantity(cc, "cm**3").to("inch**3").magnitude, rel=1e-9)
    u = CATALOGUE["SP_DERIVED_DISPLACEMENT_U"].cell(n, p, q)
    assert 0 < u < 0.01 * cc


def test_cell_predictions():
    table = _practical_table()
    at = (1500, [[100], [200]], 30)
    flow = CATALOGUE["SP_PREDICT_FLOW"].cell(*table, 28, *at)
    want = TRUE.predict(25.0, np.array([100e5, 200e5]), 0.03)
    np.testing.assert_allclose(np.ravel(flow), want.flow * 60000, rtol=0.003)
    gpm = CATALOGUE["SP_PREDICT_FLOW"].cell(*table, 28, *at, "gpm")
    np.testing.assert_allclose(np.ravel(gpm), ureg.Quantity(np.ravel(flow), "L/min").to("gallon/minute").magnitude,
                               rtol=1e-9)
    eff = CATALOGUE["SP_PREDICT_TOTAL_EFF"].cell(*table, 28, *at)
    np.testing.assert_allclose(np.ravel(eff), want.total, atol=0.003)
    kw = CATALOGUE["SP_PREDICT_INPUT_POWER"].cell(*table, 28, *at)
    np.testing.assert_allclose(np.ravel(kw), want.input_power / 1000, rtol=0.003)
    ex = CATALOGUE["SP_PREDICT_EXTRAPOLATED"].cell(*table, 28, 1500, [[100, 400]], 30)
    # the table's columns are numpy arrays, so the result is one too (Calculation.cell keeps the form)
    assert type(ex) is np.ndarray and ex.tolist() == [[0.0, 1.0]]


def test_cell_errors_are_text():
    n, p, q, t, mu = _practical_table()
    one = n == 1500
    out = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n[one], p[one], q[one])
    assert out.startswith(ERROR_PREFIX) and "speed" in out and "two or more" in out
    out = CATALOGUE["SP_PREDICT_FLOW"].cell(n, p, q, t, mu, 28, 1500, "-5 bar", 30)
    assert out.startswith(ERROR_PREFIX) and "at_pressure" in out


def test_derived_displacement_uncertainty_has_a_floor():
    # A noiseless table: the fit's uncertainty is round-off (about 1e-15 of the value); the floor of
    # 1e-6 of the value is given instead and said in the notes. Flow = V·n exactly (ISO 8426 idea: the
    # slope of flow on speed at zero pressure is the displacement).
    n = np.repeat([1000 / 60, 1500 / 60, 2000 / 60], 3)
    p = np.tile([0.0, 10e5, 20e5], 3)
    d = derived_displacement(n, p, 28e-6 * n - 2e-12 * p, max_pressure=30e5)
    assert d.value == pytest.approx(28e-6, rel=1e-12)
    assert d.uncertainty == pytest.approx(UNCERTAINTY_FLOOR * d.value, rel=1e-12)
    assert any("floor" in note for note in d.notes)
    # With a bench's noise (1e-3 of the flow) the fitted uncertainty stands, well above the floor.
    rng = np.random.default_rng(4409)
    noisy = derived_displacement(n, p, (28e-6 * n - 2e-12 * p) * (1 + rng.normal(0, 1e-3, n.size)),
                                 max_pressure=30e5)
    assert noisy.uncertainty > 100 * UNCERTAINTY_FLOOR * noisy.value
    assert not any("floor" in note for note in noisy.notes)
