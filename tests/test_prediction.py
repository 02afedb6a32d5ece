"""Tests of sheetpump.physics.prediction: the model of a table (Wilson's or the interpolation fallback)
and the SP_PREDICT_* cell functions.

Sources: linear interpolation in pressure between measured points (the fallback's definition); pint for
unit conversions. Predictions of a table made from the invented pump of tests/measured_tables.py,
compared with that pump, are self-consistency checks, so named.
"""

from __future__ import annotations

import numpy as np
import pint
import pytest

from sheetpump.catalogue import CATALOGUE
from sheetpump.errors import PhysicsError
from sheetpump.physics.measured import evaluate_points
from sheetpump.physics.prediction import InterpolatedPerformance, fit_performance

try:  # tests/ may or may not be a package; both layouts work
    from tests import measured_tables as tables
except ImportError:  # pragma: no cover - depends on how pytest was started
    import measured_tables as tables  # type: ignore[no-redef]

RPM = tables.RPM
TRUE = tables.TRUE
one_curve = tables.one_curve
practical_table = tables.practical_table

ureg = pint.UnitRegistry()  # an independent registry: the reference, not ours


def test_small_table_falls_back_to_interpolation():
    n, p, q, t, _ = one_curve()
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


# -- cell functions --------------------------------------------------------------------------------
def test_self_consistency_cell_predictions():
    # Self-consistency check (no outside source): the table is made by the invented model TRUE and the
    # fit must give it back; the outside checks are the textbook examples and Merritt's forms.
    table = practical_table()
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
