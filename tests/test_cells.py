"""Cell functions as a spreadsheet calls them: numbers, unit strings, ranges, empties, errors."""

from __future__ import annotations

import numpy as np
import pint
import pytest

from sheetpump import cells
from sheetpump.catalogue import CATALOGUE

REF = pint.UnitRegistry()  # outside reference


def test_numbers_in_default_units():
    # 200 bar x 60 L/min = 20 kW (P[kW] = p[bar]·Q[L/min]/600, common practice)
    assert cells.SP_HYDRAULIC_POWER(200, 60) == pytest.approx(20.0, rel=1e-12)
    # 28 cm³/rev x 1500 rpm x 0.95 = 39.9 L/min
    assert cells.SP_EFFECTIVE_FLOW(28, 1500, 0.95) == pytest.approx(39.9, rel=1e-12)


def test_unit_strings_and_result_unit():
    hp = cells.SP_HYDRAULIC_POWER("3000 psi", "10 gpm", "hp")
    expected = (REF.Quantity(3000, "psi") * REF.Quantity(10, "gallon/minute")).to("hp").magnitude
    assert hp == pytest.approx(expected, rel=1e-12)
    assert cells.SP_DRIVE_TORQUE(28, 200, 0.9, "lbf*ft") == pytest.approx(
        REF.Quantity(28e-6 * 200e5 / (2 * 3.141592653589793 * 0.9), "N*m").to("lbf*ft").magnitude, rel=1e-12)
    assert cells.SP_VOL_EFF(39.9, 28, 1500, "%") == pytest.approx(95.0, rel=1e-12)


def test_single_cell_ranges_are_plain_values():
    # xlwings with ndim=2 passes a single cell as [[x]]
    assert cells.SP_HYDRAULIC_POWER([[200]], [[60]]) == pytest.approx(20.0)


def test_ranges_spill_elementwise_and_broadcast():
    column = cells.SP_HYDRAULIC_POWER([[100], [200], [300]], 60)
    np.testing.assert_allclose(column, [[10.0], [20.0], [30.0]], rtol=1e-12)
    grid = cells.SP_HYDRAULIC_POWER([[100, 200]], [[30], [60]])
    assert grid == [[pytest.approx(5.0), pytest.approx(10.0)], [pytest.approx(10.0), pytest.approx(20.0)]]
    mixed = cells.SP_HYDRAULIC_POWER([["3000 psi"], [200]], "40 L/min")
    assert mixed[1][0] == pytest.approx(200 * 40 / 600)


@pytest.mark.parametrize(
    ("call", "text"),
    [
        (lambda: cells.SP_HYDRAULIC_POWER(None, 60),
         "#SP! pressure: missing (empty cell) (give a pressure, e.g. '250 bar')"),
        (lambda: cells.SP_HYDRAULIC_POWER("250 rpm", 60),
         "#SP! pressure: 'rpm' is a speed, not a pressure (write e.g. '250 bar')"),
        (lambda: cells.SP_HYDRAULIC_POWER("3,000", 60),
         "#SP! pressure: '3,000' is ambiguous (a comma before exactly three digits may group thousands: "
         "write 3000 for three thousand, 3.5 or 3,5 for three and a half)"),
        (lambda: cells.SP_HYDRAULIC_POWER(200, "plenty"),
         "#SP! flow: 'plenty' is not a number with a unit (write e.g. '40 L/min')"),
        (lambda: cells.SP_HYDRAULIC_POWER(200, 60, "rpm"),
         "#SP! unit: 'rpm' is a speed, not a power (write e.g. '15 kW')"),
        (lambda: cells.SP_HYDRAULIC_POWER(200, 60, "zorks"),
         "#SP! unit: unknown unit 'zorks' (write e.g. '15 kW')"),
        (lambda: cells.SP_DRIVE_TORQUE(28, 200, 90),
         "#SP! hm_eff: must lie in (0, 1]; write 92 % as 0.92"),
        (lambda: cells.SP_DISPLACEMENT_FOR_FLOW(40, 0, 0.9), "#SP! speed: must be greater than zero"),
        (lambda: cells.SP_GEOMETRIC_FLOW(-28, 1500), "#SP! displacement: must not be negative"),
        (lambda: cells.SP_HYDRAULIC_POWER([[1, "x"]], 2),
         "#SP! pressure[0, 1]: 'x' is not a number with a unit (write e.g. '250 bar')"),
        (lambda: cells.SP_HYDRAULIC_POWER([[1, 2, 3]], [[1, 2]]),
         "#SP! SP_HYDRAULIC_POWER: ranges of different shapes cannot be combined"),
        (lambda: cells.SP_HYDRAULIC_POWER(True, 60),
         "#SP! pressure: True is a true/false value, not a pressure"),
        (lambda: cells.SP_HYDRAULIC_POWER(1e308, 1e308),
         "#SP! result is not a finite number (check for zero or huge inputs)"),
    ],
)
def test_errors_are_texts_naming_the_argument(call, text):
    assert call() == text


def test_optional_argument_takes_its_default():
    assert cells.SP_PULSATION_FREQ(9, 1500) == pytest.approx(225.0)  # 9 teeth x 25 rev/s
    assert cells.SP_PULSATION_FREQ(9, 1500, None, "1/min") == pytest.approx(225.0 * 60)


def test_every_declared_function_documents_its_arguments():
    for calc in CATALOGUE.values():
        assert calc.help and calc.help.endswith(".")
        for arg in calc.args:
            assert arg.help, (calc.name, arg.name)
        assert calc.name.startswith("SP_")
        assert calc.formula_source.startswith("sheetpump.physics.")


# --- the folded array path: declared scaling exponents are right, and it equals the full path ----

SCALED = [c for c in CATALOGUE.values() if c.scaling is not None]


@pytest.mark.parametrize("calc", SCALED, ids=[c.name for c in SCALED])
def test_declared_scaling_exponents_hold(calc):
    # f(a·x, b·y, ...) = aᵉ¹·bᵉ²·...·f(x, y, ...): checked on the physics itself, one argument at a time
    base = [0.9 if a.kind.si == "" else 3.0 for a in calc.args]
    f0 = calc.func(*base)
    for i, e in enumerate(calc.scaling):
        scaled = list(base)
        scaled[i] *= 0.5
        assert calc.func(*scaled) == pytest.approx(0.5**e * f0, rel=1e-12)


@pytest.mark.parametrize("calc", SCALED, ids=[c.name for c in SCALED])
def test_folded_path_equals_elementwise_cells(calc):
    rng = np.random.default_rng(7)
    arrays = [rng.uniform(0.5, 0.99, 50) if a.kind.si == "" else rng.uniform(10, 300, 50) for a in calc.args]
    folded = calc.evaluate(*arrays)
    one_by_one = [calc.cell(*(float(x[i]) for x in arrays)) for i in range(50)]
    np.testing.assert_allclose(folded, one_by_one, rtol=1e-12)
    # with units carried by pint quantity arrays of the one registry, and a result unit
    from sheetpump.units import ureg
    quantities = [x if a.kind.si == "" else ureg.Quantity(x, a.kind.default)
                  for x, a in zip(arrays, calc.args, strict=True)]
    np.testing.assert_allclose(calc.evaluate(*quantities), folded, rtol=1e-12)


def test_folded_path_still_validates():
    power = CATALOGUE["SP_INPUT_POWER"]
    assert power.cell(np.array([100.0, -1.0]), np.array([10.0, 10.0]), np.array([0.9, 0.9])) == (
        "#SP! pressure: must not be negative")
    assert power.cell(np.array([100.0]), np.array([10.0]), np.array([1.5])).startswith("#SP! total_eff:")
    assert power.cell(np.array([100.0, np.nan]), np.array([10.0, 10.0]), 0.9).startswith("#SP! pressure[1]")


# --- Python users: the form of a range is kept (arrays in, arrays out) ----------------------------

# P[kW] = p[bar]·Q[L/min]/(600·η): drive power, the handbook formula (common practice).
_P_BAR = [100.0, 210.0, 250.0]
_Q_LPM = [20.0, 39.5, 60.0]
_ETA = [0.8, 0.85, 0.9]
_EXPECTED_KW = [p * q / (600 * e) for p, q, e in zip(_P_BAR, _Q_LPM, _ETA, strict=True)]  # 4.17, 16.26, 27.78


def test_numpy_arrays_in_give_a_numpy_array_of_the_same_shape():
    got = cells.SP_INPUT_POWER(np.array(_P_BAR), np.array(_Q_LPM), np.array(_ETA))
    assert type(got) is np.ndarray and got.shape == (3,) and got.dtype == np.float64
    np.testing.assert_allclose(got, _EXPECTED_KW, rtol=1e-12)
    assert got[1] == pytest.approx(13.825 / 0.85, rel=1e-12)  # 210 bar x 39.5 L/min = 13.825 kW hydraulic
    column = cells.SP_INPUT_POWER(np.array(_P_BAR).reshape(3, 1), 39.5, 0.85)  # a column broadcasts
    assert type(column) is np.ndarray and column.shape == (3, 1)
    # a number broadcast against an array, and a result unit (pint's hp as the outside reference)
    hp = cells.SP_INPUT_POWER(np.array(_P_BAR), 39.5, 0.85, "hp")
    expected = [REF.Quantity(p * 39.5 / (600 * 0.85), "kW").to("hp").magnitude for p in _P_BAR]
    np.testing.assert_allclose(hp, expected, rtol=1e-12)
    # the caller's arrays are never modified
    p = np.array(_P_BAR)
    cells.SP_INPUT_POWER(p, 39.5, 0.85, "hp")
    assert p.tolist() == _P_BAR


def test_pint_quantity_arrays_give_a_numpy_array():
    from sheetpump.units import ureg
    got = cells.SP_INPUT_POWER(ureg.Quantity(np.array([3000.0]), "psi"), ureg.Quantity(np.array([10.0]), "gpm"),
                               np.array([1.0]), "hp")
    expected = (REF.Quantity(3000, "psi") * REF.Quantity(10, "gallon/minute")).to("hp").magnitude
    assert type(got) is np.ndarray and got == pytest.approx([expected], rel=1e-12)


def test_a_series_gives_a_series_with_its_index():
    pd = pytest.importorskip("pandas")
    index = pd.Index(["approach", "press", "hold"], name="segment")
    p = pd.Series(_P_BAR, index=index, name="pressure [bar]")
    q = pd.Series(_Q_LPM, index=index, name="flow [L/min]")
    got = cells.SP_INPUT_POWER(p, q, pd.Series(_ETA, index=index))
    assert type(got) is pd.Series
    assert got.index.equals(index) and got.index.name == "segment"
    assert got.name == "power [kW]"  # the result's kind and unit, as sheetpump names table columns
    np.testing.assert_allclose(got.to_numpy(), _EXPECTED_KW, rtol=1e-12)
    # with a number, a text with a unit and a result unit
    hp = cells.SP_INPUT_POWER(p, "39.5 L/min", 0.85, "hp")
    assert hp.name == "power [hp]" and list(hp.index) == list(index)
    assert hp["press"] == pytest.approx(REF.Quantity(13.825 / 0.85, "kW").to("hp").magnitude, rel=1e-12)
    # a Series of texts with units
    texts = cells.SP_INPUT_POWER(pd.Series(["3000 psi", "210 bar"], index=[7, 9]), "10 gpm", 1.0, "hp")
    assert list(texts.index) == [7, 9]
    assert texts[7] == pytest.approx((REF.Quantity(3000, "psi") * REF.Quantity(10, "gallon/minute"))
                                     .to("hp").magnitude, rel=1e-12)
    assert cells.SP_VOL_EFF(pd.Series([39.9]), 28, 1500, "%").name == "efficiency [%]"


def test_series_with_different_indexes_are_refused_not_aligned():
    pd = pytest.importorskip("pandas")
    p = pd.Series([100.0, 200.0], index=["a", "b"])
    q = pd.Series([10.0, 20.0], index=["b", "a"])
    assert cells.SP_HYDRAULIC_POWER(p, q) == (
        "#SP! flow: the series' index differs from the first series' (align them first, e.g. with .reindex)")


def test_lists_give_the_2d_list_a_spreadsheet_spills():
    got = cells.SP_INPUT_POWER([[p] for p in _P_BAR], [[q] for q in _Q_LPM], [[e] for e in _ETA])
    assert type(got) is list and all(type(r) is list and len(r) == 1 for r in got)
    assert [r[0] for r in got] == pytest.approx(_EXPECTED_KW, rel=1e-12)
    assert cells.SP_INPUT_POWER(_P_BAR, 39.5, 0.85) == [pytest.approx([p * 39.5 / 510 for p in _P_BAR])]


def test_bad_array_elements_are_still_error_texts():
    assert cells.SP_INPUT_POWER(np.array([100.0, -1.0]), 10.0, 0.9) == "#SP! pressure: must not be negative"
