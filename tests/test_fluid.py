"""Tests of the oil: ASTM D341 (Walther), ASTM D2270 (viscosity index), ISO 3448 grades, density.

Outside references: the formulas of ASTM D341 and ASTM D2270 evaluated by hand, the reference library
``chemicals`` (``chemicals.viscosity.viscosity_index``, in m²/s), ``fluids`` (ν-μ conversion) and the
ISO 3448 table of grades.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from chemicals.viscosity import viscosity_index as chemicals_vi
from fluids.core import nu_mu_converter
from hypothesis import assume, given
from hypothesis import strategies as st

from sheetpump.catalogue import CATALOGUE
from sheetpump.declarations import ERROR_PREFIX
from sheetpump.errors import PhysicsError
from sheetpump.physics import fluid

MM2 = 1e-6  # m²/s per mm²/s (cSt)
C0 = 273.15

# An invented oil: 38.0 mm²/s at 40 °C and 6.1 mm²/s at 100 °C.
NU40, NU100 = 38.0 * MM2, 6.1 * MM2
OIL = (NU40, 313.15, NU100, 373.15)


def _hand_walther(nu1_mm2: float, t1: float, nu2_mm2: float, t2: float, t: float) -> float:
    """ASTM D341 written out step by step with the math module (mm²/s and K)."""
    z1 = math.log10(math.log10(nu1_mm2 + 0.7))
    z2 = math.log10(math.log10(nu2_mm2 + 0.7))
    b = (z1 - z2) / (math.log10(t2) - math.log10(t1))
    a = z1 + b * math.log10(t1)
    return 10 ** (10 ** (a - b * math.log10(t))) - 0.7


# -- ASTM D341 ------------------------------------------------------------------------------------


def test_walther_coefficients_hand_evaluation():
    # ASTM D341, evaluated by hand (40-digit decimal arithmetic) for the invented oil:
    # Z40 = lg lg 38.7 = 0.2007714441, Z100 = lg lg 6.8 = -0.0796111083, B = 3.6828945138, A = 9.3923643250
    a, b = fluid.walther_coefficients(*OIL)
    assert a == pytest.approx(9.3923643250, abs=1e-9)
    assert b == pytest.approx(3.6828945138, abs=1e-9)


def test_walther_reproduces_both_points():
    # ASTM D341: the line passes through the two points it is drawn through.
    assert fluid.viscosity_at(313.15, *OIL) == pytest.approx(NU40, rel=1e-12)
    assert fluid.viscosity_at(373.15, *OIL) == pytest.approx(NU100, rel=1e-12)
    # The points may be given in either order.
    assert fluid.viscosity_at(333.15, NU100, 373.15, NU40, 313.15) == pytest.approx(
        fluid.viscosity_at(333.15, *OIL), rel=1e-12)


def test_walther_intermediate_and_extrapolated_temperature():
    # ASTM D341 by hand (40-digit decimal arithmetic): 17.66549 mm²/s at 60 °C, 422.3276 mm²/s at 0 °C.
    assert fluid.viscosity_at(333.15, *OIL) / MM2 == pytest.approx(17.665495, rel=1e-7)
    assert fluid.viscosity_at(273.15, *OIL) / MM2 == pytest.approx(422.32760, rel=1e-7)
    # and the same formula written out with the math module, at a few more temperatures
    for t_c in (-20.0, 25.0, 55.0, 80.0, 120.0):
        expected = _hand_walther(38.0, 313.15, 6.1, 373.15, t_c + C0)
        assert fluid.viscosity_at(t_c + C0, *OIL) / MM2 == pytest.approx(expected, rel=1e-10)


def test_temperature_for_viscosity_inverts():
    # ASTM D341 solved for T: the oil reaches its 40 °C viscosity at 40 °C, and 17.66549 mm²/s at 60 °C
    # (the hand evaluation above).
    assert fluid.temperature_for_viscosity(NU40, *OIL) == pytest.approx(313.15, abs=1e-9)
    assert fluid.temperature_for_viscosity(17.665495 * MM2, *OIL) == pytest.approx(333.15, abs=1e-4)


@pytest.mark.parametrize(
    ("args", "argument"),
    [
        ((-38e-6, 313.15, 6.1e-6, 373.15), "nu1"),
        ((38e-6, 313.15, 0.0, 373.15), "nu2"),
        ((38e-6, -1.0, 6.1e-6, 373.15), "t1"),
        ((38e-6, 313.15, 6.1e-6, 313.15), "t2"),  # the same temperature twice
        ((6.1e-6, 313.15, 38e-6, 373.15), "nu2"),  # viscosity rising with temperature
        ((38e-6, 313.15, 38e-6, 373.15), "nu2"),  # not falling at all
    ],
)
def test_walther_rejects(args, argument):
    with pytest.raises(PhysicsError) as info:
        fluid.walther_coefficients(*args)
    assert info.value.argument == argument


@given(
    nu40=st.floats(5.0, 1000.0),
    ratio=st.floats(0.05, 0.6),
    ta=st.floats(-30.0, 150.0),
    tb=st.floats(-30.0, 150.0),
)
def test_viscosity_falls_with_temperature(nu40, ratio, ta, tb):
    # Fact of the trade: an oil thins as it warms; the D341 line through two such points keeps that.
    nu100 = max(nu40 * ratio, 2.0)
    assume(nu100 < nu40 * 0.99)
    assume(tb - ta > 0.01)
    oil = (nu40 * MM2, 313.15, nu100 * MM2, 373.15)
    assert fluid.viscosity_at(ta + C0, *oil) > fluid.viscosity_at(tb + C0, *oil)


# -- ASTM D2270 -----------------------------------------------------------------------------------


def test_vi_worked_example():
    # ASTM D2270 example (procedure A), also the doctest of chemicals: 73.30 and 8.86 mm²/s give VI 92.
    assert round(fluid.viscosity_index(73.30e-6, 8.86e-6)) == 92
    assert round(fluid.viscosity_index(73.30e-6, 8.86e-6)) == chemicals_vi(73.30e-6, 8.86e-6, rounding=True)


NU100_GRID = (2.0, 2.05, 3.0, 4.37, 5.0, 6.8, 8.86, 12.34, 19.95, 20.1, 25.0, 29.9, 33.3, 45.25, 60.0, 69.9,
              70.5, 75.0, 120.0, 250.0)


def test_vi_against_chemicals_grid():
    # chemicals.viscosity.viscosity_index (ASTM D2270-10(2016)), unrounded, takes m²/s.
    seen_low = seen_high = seen_above_70 = False
    for y in NU100_GRID:
        for k in np.geomspace(1.3, 30.0, 25):
            u = y * k
            expected = chemicals_vi(u * MM2, y * MM2)
            assert fluid.viscosity_index(u * MM2, y * MM2) == pytest.approx(expected, rel=1e-10, abs=1e-9)
            seen_low |= expected < 100
            seen_high |= expected > 100
            seen_above_70 |= y > 70
    assert seen_low and seen_high and seen_above_70  # the grid covers procedures A and B and the formulas


def test_vi_every_table_row_against_chemicals():
    # Every row of the ASTM D2270 table (steps of 0.1, 0.2 and 0.5 mm²/s up to 70) and the points between
    # rows, against chemicals; ν40 on both sides of H so that L and H both count.
    y = np.round(np.arange(20, 700) / 10 + 0.05 * (np.arange(680) % 2 == 1), 2)  # 2.0, 2.15, 2.2, 2.35, ...
    for k in (1.6, 4.0, 12.0):
        got = fluid.viscosity_index(y * k * MM2, y * MM2)
        expected = [chemicals_vi(float(yy * k) * MM2, float(yy) * MM2) for yy in y]
        assert got == pytest.approx(expected, rel=1e-10, abs=1e-9)


def test_vi_at_table_end_uses_table():
    # ASTM D2270 gives L and H by formula only "above 70 mm²/s"; at 70.0 its table reads L = 4905,
    # H = 1558. (chemicals switches to the formulas at 70.0 itself, so it is not the reference here.)
    u = 2000.0
    assert fluid.viscosity_index(u * MM2, 70.0 * MM2) == pytest.approx((4905 - u) / (4905 - 1558) * 100,
                                                                      rel=1e-12)


def test_vi_procedure_b_by_hand():
    # ASTM D2270 procedure B by hand: ν100 = 8.0 → H = 59.60 (table); U = 46:
    # N = (lg 59.60 - lg 46) / lg 8 = 0.124563..., VI = (10^N - 1) / 0.00715 + 100
    n = (math.log10(59.60) - math.log10(46.0)) / math.log10(8.0)
    assert fluid.viscosity_index(46e-6, 8.0e-6) == pytest.approx((10**n - 1) / 0.00715 + 100, rel=1e-12)


def test_vi_undefined_below_2():
    # ASTM D2270 covers ν100 >= 2 mm²/s only (chemicals returns None there).
    assert chemicals_vi(10e-6, 1.9e-6) is None
    with pytest.raises(PhysicsError) as info:
        fluid.viscosity_index(10e-6, 1.9e-6)
    assert info.value.argument == "nu100"


@pytest.mark.parametrize("nu40", [4.0, 10.0, 22.0, 46.0, 68.0, 150.0, 460.0, 1000.0])
@pytest.mark.parametrize("vi", [-20.0, 0.0, 60.0, 95.0, 100.0, 105.0, 140.0, 200.0])
def test_nu100_from_vi_round_trip(nu40, vi):
    try:
        nu100 = fluid.nu100_from_vi(nu40 * MM2, vi)
    except PhysicsError as exc:
        # only where ν100 would have to fall below the 2 mm²/s where D2270 stops
        assert exc.argument == "vi"
        assert chemicals_vi(nu40 * MM2, 2.0 * MM2) > vi
        return
    # checked with the outside implementation, not only our own forward function
    assert chemicals_vi(nu40 * MM2, nu100) == pytest.approx(vi, abs=1e-6)
    assert 2.0 * MM2 <= nu100 < nu40 * MM2


def test_nu100_from_vi_typical_hydraulic_oil():
    # Fact of the trade (common practice): an ISO VG 46 mineral oil of VI about 100 has about
    # 6.7-6.9 mm²/s at 100 °C.
    assert 6.6 < fluid.nu100_from_vi(46e-6, 100.0) / MM2 < 7.0


# -- ISO 3448 -------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("grade", "mid", "low", "high"),
    [
        (46, 46.0, 41.4, 50.6),  # ISO 3448 table
        (2, 2.2, 1.98, 2.42),  # ISO 3448 table: the mid-point of VG 2 is 2.2 mm²/s
        (7, 6.8, 6.12, 7.48),  # ISO 3448 table
        (32, 32.0, 28.8, 35.2),  # ISO 3448 table
        (1500, 1500.0, 1350.0, 1650.0),  # ISO 3448 table
    ],
)
def test_iso_vg_limits(grade, mid, low, high):
    got = fluid.iso_vg_limits(grade)
    assert [v / MM2 for v in got] == pytest.approx([mid, low, high], rel=1e-12)


@pytest.mark.parametrize("grade", [0, 45, 47, 4.6, -46, 5000])
def test_iso_vg_unknown_grade(grade):
    with pytest.raises(PhysicsError) as info:
        fluid.iso_vg_limits(grade)
    assert info.value.argument == "grade"


def test_oil_points_from_grade():
    # ISO 3448 mid-point at 40 °C; ν100 gives back the asked VI by chemicals (ASTM D2270).
    nu40, t40, nu100, t100 = fluid.oil_points_from_grade(68, 105)
    assert nu40 == pytest.approx(68.0 * MM2)
    assert (t40, t100) == (313.15, 373.15)
    assert chemicals_vi(nu40, nu100) == pytest.approx(105, abs=1e-6)


# -- density and dynamic viscosity ----------------------------------------------------------------


def test_density_at():
    # Linear expansion with the common-practice 6.5e-4 1/K: 870 * (1 - 6.5e-4 * 35) = 850.2075 kg/m³ at 50 °C.
    assert fluid.density_at(288.15, 870.0) == pytest.approx(870.0, rel=1e-12)
    assert fluid.density_at(323.15, 870.0) == pytest.approx(850.2075, rel=1e-12)
    # Common practice: mineral oil loses roughly 0.6-0.7 % of its density per 10 K.
    loss = 1 - fluid.density_at(298.15, 870.0) / 870.0
    assert 0.006 < loss < 0.007
    with pytest.raises(PhysicsError):
        fluid.density_at(323.15, -870.0)


def test_dynamic_viscosity_against_fluids():
    # fluids.core.nu_mu_converter: μ = ν ρ.
    assert fluid.dynamic_viscosity(46e-6, 870.0) == pytest.approx(nu_mu_converter(870.0, nu=46e-6), rel=1e-12)


# -- vectorised equals element-wise ---------------------------------------------------------------


def test_vectorised_equals_elementwise():
    temps = np.array([[253.15, 293.15], [333.15, 393.15]])
    nu40 = np.array([10.0, 32.0, 46.0, 220.0, 1000.0]) * MM2
    nu100 = np.array([2.6, 5.4, 8.0, 19.0, 75.0]) * MM2
    vis = np.array([-10.0, 95.0, 100.0, 150.0, 60.0])
    grades = np.array([22.0, 32.0, 46.0, 68.0, 100.0])

    got = fluid.viscosity_at(temps, *OIL)
    assert got.shape == temps.shape
    assert got == pytest.approx(np.vectorize(lambda t: fluid.viscosity_at(float(t), *OIL))(temps), rel=1e-14)

    got = fluid.viscosity_index(nu40, nu100)
    assert got == pytest.approx([fluid.viscosity_index(float(u), float(y)) for u, y in zip(nu40, nu100,
                                                                                           strict=True)])
    got = fluid.nu100_from_vi(nu40, vis)
    assert got == pytest.approx([fluid.nu100_from_vi(float(u), float(v)) for u, v in zip(nu40, vis,
                                                                                         strict=True)])
    got = fluid.vg_viscosity(grades, 100.0, 323.15)
    assert got == pytest.approx([fluid.vg_viscosity(float(g), 100.0, 323.15) for g in grades])
    mids = fluid.iso_vg_limits(grades)[0]
    assert mids == pytest.approx(grades * MM2)
    got = fluid.temperature_for_viscosity(nu40[1:4], *OIL)
    assert got == pytest.approx([fluid.temperature_for_viscosity(float(n), *OIL) for n in nu40[1:4]])


def test_vectorised_error_names_argument():
    with pytest.raises(PhysicsError) as info:
        fluid.viscosity_at(np.array([300.0, -1.0]), *OIL)
    assert info.value.argument == "temperature"


# -- cell functions -------------------------------------------------------------------------------


def test_cells_declared():
    for name in ("SP_VISCOSITY", "SP_VISCOSITY_INDEX", "SP_VG_VISCOSITY", "SP_DYNAMIC_VISCOSITY"):
        assert name in CATALOGUE


def test_cell_viscosity_metric_and_imperial():
    calc = CATALOGUE["SP_VISCOSITY"]
    expected = _hand_walther(38.0, 313.15, 6.1, 373.15, 60 + C0)  # ASTM D341 by hand, mm²/s
    assert calc.cell(38, 40, 6.1, 100, 60) == pytest.approx(expected, rel=1e-10)
    # 104 °F = 40 °C, 212 °F = 100 °C, 140 °F = 60 °C; 1 cSt = 1 mm²/s
    assert calc.cell("38 cSt", "104 degF", "6.1 cSt", "212 degF", "140 degF", "cSt") == pytest.approx(
        expected, rel=1e-10)
    assert calc.cell("38 cSt", "313.15 K", "6.1 mm^2/s", "100 degC", "60 degC") == pytest.approx(
        expected, rel=1e-10)
    # 1 ft²/s = 92903.04 mm²/s (0.3048 m per ft, exact)
    assert calc.cell(38, 40, 6.1, 100, 60, "ft^2/s") == pytest.approx(expected / 92903.04, rel=1e-10)


def test_cell_viscosity_range_spills():
    calc = CATALOGUE["SP_VISCOSITY"]
    out = calc.cell(38, 40, 6.1, 100, [[0, 60]])
    assert len(out) == 1
    assert out[0] == pytest.approx([_hand_walther(38.0, 313.15, 6.1, 373.15, t + C0) for t in (0, 60)])


@pytest.mark.parametrize(
    ("args", "start"),
    [
        ((-38, 40, 6.1, 100, 60), "nu1: "),  # negative viscosity
        ((38, 40, 6.1, 40, 60), "t2: must differ from t1"),  # the same temperature twice
        ((38, 40, 6.1, "104 degF", 60), "t2: must differ from t1"),  # the same, in two units
        ((6.1, 40, 38, 100, 60), "nu2: "),  # viscosity rising with temperature
        ((38, 40, 6.1, 100, -300), "temperature: must be above absolute zero"),
        (("38 bar", 40, 6.1, 100, 60), "nu1: "),  # a pressure where a viscosity belongs
        ((38, 40, 6.1, 100), "temperature: missing"),
    ],
)
def test_cell_viscosity_errors(args, start):
    out = CATALOGUE["SP_VISCOSITY"].cell(*args)
    assert isinstance(out, str)
    assert out.startswith(ERROR_PREFIX + start), out


def test_cell_viscosity_index():
    calc = CATALOGUE["SP_VISCOSITY_INDEX"]
    # ASTM D2270 example via chemicals; the cell takes mm²/s (cSt)
    assert calc.cell(73.30, 8.86) == pytest.approx(chemicals_vi(73.30e-6, 8.86e-6), rel=1e-12)
    assert calc.cell("73.3 cSt", "8.86 cSt") == pytest.approx(chemicals_vi(73.30e-6, 8.86e-6), rel=1e-12)
    out = calc.cell(10, 1.5)
    assert isinstance(out, str) and out.startswith(ERROR_PREFIX + "nu100: ")


def test_cell_vg_viscosity():
    calc = CATALOGUE["SP_VG_VISCOSITY"]
    # ISO VG 46 of VI 100: at 40 °C its ISO 3448 mid-point, 46 mm²/s; at 100 °C the ν100 that gives VI 100
    # by chemicals (ASTM D2270).
    assert calc.cell(46, 100, 40) == pytest.approx(46.0, rel=1e-10)
    assert calc.cell(46, 100, "104 degF", "cSt") == pytest.approx(46.0, rel=1e-10)
    nu100 = calc.cell(46, 100, 100)
    assert chemicals_vi(46e-6, nu100 * MM2) == pytest.approx(100.0, abs=1e-6)
    # in between: ASTM D341 by hand through those two points
    assert calc.cell(46, 100, 50) == pytest.approx(_hand_walther(46.0, 313.15, nu100, 373.15, 323.15), rel=1e-9)


@pytest.mark.parametrize(
    ("args", "start"),
    [
        ((47, 100, 50), "grade: is not an ISO 3448 viscosity grade"),  # unknown grade
        ((2, 100, 40), "vi: is too low"),  # VG 2 of VI 100 would need ν100 < 2 mm²/s
        ((46, 5000, 40), "vi: is too high"),
        (("46 cSt", 100, 40), "grade: "),  # a grade is a number, not a viscosity
    ],
)
def test_cell_vg_viscosity_errors(args, start):
    out = CATALOGUE["SP_VG_VISCOSITY"].cell(*args)
    assert isinstance(out, str)
    assert out.startswith(ERROR_PREFIX + start), out


def test_cell_dynamic_viscosity():
    calc = CATALOGUE["SP_DYNAMIC_VISCOSITY"]
    expected = nu_mu_converter(870.0, nu=46e-6) * 1e3  # fluids: μ = ν ρ, in mPa·s
    assert calc.cell(46, 870) == pytest.approx(expected, rel=1e-12)
    # 1 cP = 1 mPa·s; 0.87 g/cm³ = 870 kg/m³; 1 lb/ft³ = 16.018463 kg/m³
    assert calc.cell("46 cSt", "0.87 g/cm^3", "cP") == pytest.approx(expected, rel=1e-12)
    assert calc.cell(46, "54.3121 lb/ft^3") == pytest.approx(expected, rel=1e-5)
    out = calc.cell(-46, 870)
    assert isinstance(out, str) and out.startswith(ERROR_PREFIX + "nu: ")
