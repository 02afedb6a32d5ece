"""Tests of sheetpump.physics.displacement: the derived displacement (ISO 8426 idea) and its cells.

Sources: the ISO 8426 idea (the displacement is the slope of flow on speed at zero pressure; from
memory); the normal distribution (a ±1u interval holds the truth about 68 % of the time, ±2u about
95 %); pint for unit conversions. The tables are made from known displacements, so a derivation that
gives its displacement back is a self-consistency check; so named.
"""

from __future__ import annotations

import numpy as np
import pint
import pytest

from sheetpump.catalogue import CATALOGUE
from sheetpump.declarations import ERROR_PREFIX
from sheetpump.errors import PhysicsError
from sheetpump.physics.displacement import UNCERTAINTY_FLOOR, derived_displacement
from sheetpump.physics.measured import evaluate_points

try:  # tests/ may or may not be a package; both layouts work
    from tests import measured_tables as tables
except ImportError:  # pragma: no cover - depends on how pytest was started
    import measured_tables as tables  # type: ignore[no-redef]

grid = tables.grid
noisy_table = tables.noisy_table
practical_table = tables.practical_table

ureg = pint.UnitRegistry()  # an independent registry: the reference, not ours


def test_self_consistency_derived_displacement_uncertainty_covers_the_truth():
    # Self-consistency check on a made table; the coverage expected is that of the normal distribution.
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


def test_self_consistency_derived_displacement_from_wilson_table():
    # Self-consistency check (no outside source): the table is made by the invented model TRUE and the
    # fit must give it back; the outside checks are the textbook examples and Merritt's forms.
    n, p, q, _, mu = noisy_table(seed=2)
    d = derived_displacement(n, p, q, viscosity=mu)
    assert abs(d.value - 28e-6) < 3 * d.uncertainty


def test_derived_displacement_needs_two_speeds():
    n, p, q, _, _ = noisy_table(speeds_rpm=(1500,), viscosities=(0.03,))
    with pytest.raises(PhysicsError, match="two or more"):
        derived_displacement(n, p, q)
    with pytest.raises(PhysicsError, match="two or more"):
        evaluate_points(n, p, q, torque=np.ones_like(n))


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


# -- cell functions --------------------------------------------------------------------------------
def test_cell_derived_displacement_in_two_unit_systems():
    n, p, q, _, _ = practical_table()
    cc = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n, p, q)
    assert cc == pytest.approx(28.0, rel=0.002)
    # The same table written in psi and gpm, result asked in in³/rev (pint as the reference).
    psi = [[f"{float(ureg.Quantity(x, 'bar').to('psi').magnitude)!r} psi"] for x in p.ravel()]
    gpm = [[f"{float(ureg.Quantity(x, 'L/min').to('gallon/minute').magnitude)!r} gpm"] for x in q.ravel()]
    inch3 = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n, psi, gpm, None, "in^3/rev")
    assert inch3 == pytest.approx(ureg.Quantity(cc, "cm**3").to("inch**3").magnitude, rel=1e-9)
    u = CATALOGUE["SP_DERIVED_DISPLACEMENT_U"].cell(n, p, q)
    assert 0 < u < 0.01 * cc


def test_cell_errors_are_text():
    n, p, q, t, mu = practical_table()
    one = n == 1500
    out = CATALOGUE["SP_DERIVED_DISPLACEMENT"].cell(n[one], p[one], q[one])
    assert out.startswith(ERROR_PREFIX) and "speed" in out and "two or more" in out
    out = CATALOGUE["SP_PREDICT_FLOW"].cell(n, p, q, t, mu, 28, 1500, "-5 bar", 30)
    assert out.startswith(ERROR_PREFIX) and "at_pressure" in out
