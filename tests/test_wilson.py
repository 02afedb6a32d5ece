"""Tests of sheetpump.physics.wilson: Wilson's loss model and its fit.

Sources: Wilson's model in Merritt, Hydraulic Control Systems (1967), ch. 5, with its efficiency forms
η_v = 1 − C_s/S and η_hm = 1/(1 + C_f + C_v·S + T_c/(D·Δp)), S = μ·ω/Δp (from memory); leakage grows
with pressure and falls with viscosity (common practice). The fits of tables made from the invented
pump of tests/measured_tables.py are self-consistency checks (a fit recovers its own model), so named.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings

from sheetpump.physics.prediction import fit_performance
from sheetpump.physics.wilson import WilsonModel, fit_wilson

try:  # tests/ may or may not be a package; both layouts work
    from tests import measured_tables as tables
except ImportError:  # pragma: no cover - depends on how pytest was started
    import measured_tables as tables  # type: ignore[no-redef]

RPM = tables.RPM
TRUE = tables.TRUE
coefficients = tables.coefficients
noisy_table = tables.noisy_table
pressures = tables.pressures
speeds = tables.speeds
viscosities = tables.viscosities


# -- outside sources -------------------------------------------------------------------------------
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




@settings(max_examples=200, deadline=None)
@given(coefficients, speeds, pressures, pressures, viscosities, viscosities)
def test_volumetric_efficiency_falls_with_pressure_rises_with_viscosity(c, n, p1, p2, mu1, mu2):
    # Leakage grows with Δp and falls with viscosity (common practice; Merritt 1967).
    m = WilsonModel(c[4], c_s=c[0], c_f=c[1], c_v=c[2], t_c=c[3])
    lo, hi = sorted((p1, p2))
    thin, thick = sorted((mu1, mu2))
    assert m.predict(n, hi, thin).volumetric <= m.predict(n, lo, thin).volumetric
    assert m.predict(n, lo, thick).volumetric >= m.predict(n, lo, thin).volumetric


# -- self-consistency: a fit recovers the model that made its table --------------------------------
def test_self_consistency_wilson_fit_recovers_its_own_coefficients():
    # Self-consistency check (no outside source): the table is made by the invented model TRUE and the
    # fit must give it back; the outside checks are the textbook examples and Merritt's forms.
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


def test_self_consistency_wilson_fit_predicts_held_out_points():
    # Self-consistency check (no outside source): the table is made by the invented model TRUE and the
    # fit must give it back; the outside checks are the textbook examples and Merritt's forms.
    n, p, q, t, mu = noisy_table(seed=3)
    m = fit_performance(n, p, q, t, mu, 28e-6)
    # Held-out points between the measured ones (speed, pressure and viscosity not in the table).
    at_n, at_p, at_mu = np.array([1250, 1750, 2250]) * RPM, np.array([75e5, 145e5, 215e5]), [0.02, 0.04, 0.05]
    got, want = m.predict(at_n, at_p, at_mu), TRUE.predict(at_n, at_p, at_mu)
    np.testing.assert_allclose(got.flow, want.flow, rtol=0.002)
    np.testing.assert_allclose(got.torque, want.torque, rtol=0.003)
    np.testing.assert_allclose(got.total, want.total, atol=0.003)
    assert not got.extrapolated.any()


def test_self_consistency_fit_with_derived_displacement():
    # Self-consistency check (no outside source): the table is made by the invented model TRUE and the
    # fit must give it back; the outside checks are the textbook examples and Merritt's forms.
    n, p, q, t, mu = noisy_table(seed=5)
    m = fit_wilson(n, p, q, t, mu)
    assert m.displacement == pytest.approx(28e-6, rel=0.002)
    assert any("derived" in note for note in m.notes)


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
