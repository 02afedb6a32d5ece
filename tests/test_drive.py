"""The electric drive against hand calculations, named standards and the reference library fluids."""

from __future__ import annotations

import math

import fluids
import numpy as np
import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from sheetpump.catalogue import CATALOGUE
from sheetpump.errors import PhysicsError
from sheetpump.physics import drive
from sheetpump.units import POWER, to_si

REF = pint.UnitRegistry()  # outside reference for conversions, not sheetpump's registry

# A cycle to do by hand: 18 kW for 10 s, 6 kW for 30 s, 12 kW for 20 s (60 s in all).
CYCLE_KW = [18.0, 6.0, 12.0]
CYCLE_S = [10.0, 30.0, 20.0]


def cell(name, *args):
    out = CATALOGUE[name].cell(*args)
    assert not isinstance(out, str), out
    return out


# --- duty-cycle power -----------------------------------------------------------------------------

def test_rms_power_of_three_segments_by_hand():
    # Equivalent-load (RMS) method for periodic duty, IEC 60034-1 duty type S6 (from memory):
    # (18²·10 + 6²·30 + 12²·20) / 60 = (3240 + 1080 + 2880) / 60 = 120 kW², so √120 kW.
    assert drive.rms_power(np.array(CYCLE_KW) * 1e3, CYCLE_S) == pytest.approx(math.sqrt(120) * 1e3,
                                                                             rel=1e-12)
    # the mean by hand: (180 + 180 + 240) kJ / 60 s = 10 kW
    assert drive.mean_power(np.array(CYCLE_KW) * 1e3, CYCLE_S) == pytest.approx(10e3, rel=1e-12)


def test_rms_power_cell_takes_a_column_or_a_row_and_answers_one_number():
    column = cell("SP_RMS_POWER", [[p] for p in CYCLE_KW], [[t] for t in CYCLE_S])
    row = cell("SP_RMS_POWER", [CYCLE_KW], [[t] for t in CYCLE_S])
    assert column == pytest.approx(math.sqrt(120), rel=1e-12)  # kW, by hand as above
    assert row == pytest.approx(column, rel=1e-15)
    # the same cycle in hp and minutes, answered in hp; checked with pint
    powers_hp = [REF.Quantity(p, "kW").to("hp").magnitude for p in CYCLE_KW]
    answer = cell("SP_RMS_POWER", [[f"{p!r} hp" for p in powers_hp]], [[f"{t / 60!r} min" for t in CYCLE_S]],
                  "hp")
    assert REF.Quantity(answer, "hp").to("kW").magnitude == pytest.approx(math.sqrt(120), rel=1e-9)
    assert cell("SP_MEAN_POWER", [CYCLE_KW], [CYCLE_S]) == pytest.approx(10.0, rel=1e-12)


@pytest.mark.parametrize(
    ("args", "text"),
    [
        (([[18, 6, 12]], [[10, 30]]), "#SP! duration: has 2 segments where power has 3"),
        (([[18, -6, 12]], [[10, 30, 20]]), "#SP! power: must not be negative"),
        (([[18, 6, 12]], [[10, 0, 20]]), "#SP! duration: must be greater than zero"),
        (([[18, None]], [[10, 30]]),
         "#SP! power[0, 1]: missing (empty cell) (give a power, e.g. '15 kW')"),
        (([[18, 6]], [[10, "30 bar"]]),
         "#SP! duration[0, 1]: 'bar' is a pressure, not a duration (write e.g. '12 s')"),
    ],
)
def test_rms_power_cell_errors_name_the_argument(args, text):
    assert CATALOGUE["SP_RMS_POWER"].cell(*args) == text


def test_rms_power_one_duration_for_every_segment():
    # equal segments: the RMS is the plain root mean square, √((18² + 6² + 12²)/3) = √168 kW
    assert drive.rms_power(np.array(CYCLE_KW) * 1e3, 5.0) == pytest.approx(math.sqrt(168) * 1e3, rel=1e-12)


def test_rms_power_needs_a_segment():
    with pytest.raises(PhysicsError, match="at least one segment"):
        drive.rms_power([], [])


# --- hypothesis: properties of any duty cycle ----------------------------------------------------

_powers = hnp.arrays(float, st.integers(1, 12), elements=st.floats(0, 1e6))


@given(_powers, st.data())
def test_rms_is_never_below_the_mean_nor_above_the_peak(power, data):
    # RMS ≥ mean (Cauchy-Schwarz / Jensen); both lie between the smallest and largest power
    duration = data.draw(hnp.arrays(float, power.shape, elements=st.floats(1e-3, 1e5)))
    rms = drive.rms_power(power, duration)
    mean = drive.mean_power(power, duration)
    assert rms >= mean * (1 - 1e-12)
    assert power.min() * (1 - 1e-12) <= mean <= power.max() * (1 + 1e-12)
    assert rms <= power.max() * (1 + 1e-12)


@given(st.floats(0, 1e6), hnp.arrays(float, st.integers(1, 12), elements=st.floats(1e-3, 1e5)))
def test_rms_of_a_constant_load_is_that_load(power, duration):
    assert drive.rms_power(np.full(duration.shape, power), duration) == pytest.approx(power, rel=1e-12)
    assert drive.mean_power(np.full(duration.shape, power), duration) == pytest.approx(power, rel=1e-12)


@given(hnp.arrays(float, st.tuples(st.integers(1, 5), st.integers(1, 8)), elements=st.floats(0, 1e6)),
       st.data())
def test_stacked_cycles_equal_one_cycle_at_a_time(power, data):
    # one row per candidate, the durations shared: axis=-1 gives what each row alone gives
    duration = data.draw(hnp.arrays(float, power.shape[-1:], elements=st.floats(1e-3, 1e5)))
    rms = drive.rms_power(power, duration, axis=-1)
    mean = drive.mean_power(power, duration, axis=-1)
    energy = drive.electrical_energy(power, duration, 0.9, axis=-1)
    assert rms.shape == mean.shape == energy.shape == power.shape[:1]
    for i, row in enumerate(power):
        assert rms[i] == pytest.approx(drive.rms_power(row, duration), rel=1e-12)
        assert mean[i] == pytest.approx(drive.mean_power(row, duration), rel=1e-12)
        assert energy[i] == pytest.approx(drive.electrical_energy(row, duration, 0.9), rel=1e-12)


# --- energy ---------------------------------------------------------------------------------------

def test_electrical_energy_per_cycle_by_hand():
    # shaft energy 18·10 + 6·30 + 12·20 = 600 kJ; with a 92 % motor 600/0.92 = 652.17 kJ
    assert drive.electrical_energy(np.array(CYCLE_KW) * 1e3, CYCLE_S, 0.92) == pytest.approx(
        600e3 / 0.92, rel=1e-12)
    # one efficiency per segment: 180/0.9 + 180/0.8 + 240/0.9 = 691.67 kJ
    assert drive.electrical_energy(np.array(CYCLE_KW) * 1e3, CYCLE_S, [0.9, 0.8, 0.9]) == pytest.approx(
        (180 / 0.9 + 180 / 0.8 + 240 / 0.9) * 1e3, rel=1e-12)
    # the cell answers in kWh; pint converts the hand value
    kwh = cell("SP_CYCLE_ENERGY", [CYCLE_KW], [CYCLE_S], 0.92)
    assert kwh == pytest.approx(REF.Quantity(600 / 0.92, "kJ").to("kWh").magnitude, rel=1e-12)
    assert CATALOGUE["SP_CYCLE_ENERGY"].cell([CYCLE_KW], [CYCLE_S], 92) == (
        "#SP! motor_eff: must lie in (0, 1]; write 92 % as 0.92")


# --- standard motor series ------------------------------------------------------------------------

def test_horsepower_is_the_mechanical_horsepower_of_pint_and_fluids():
    assert drive.HP == pytest.approx(REF.Quantity(1, "hp").to("W").magnitude, rel=1e-15)
    assert drive.HP == pytest.approx(fluids.constants.hp, rel=1e-15)


def test_nema_ratings_are_nema_sizes_of_fluids():
    ours = drive.standard_ratings("NEMA")
    theirs = np.array(fluids.nema_sizes)
    for rating in ours:
        # every rating of ours is one of fluids' NEMA sizes, so fluids rounds it to itself
        assert fluids.motor_round_size(rating) == pytest.approx(rating, rel=1e-12)
    # fluids lists 4, 5.5 and 175 hp besides (sizes of the Canadian motor regulation it follows);
    # NEMA MG 1's preferred ratings skip them (from memory), so ours is fluids' list less those.
    extra = sorted(set(np.round(theirs / fluids.constants.hp, 6)) - set(np.round(ours / drive.HP, 6)))
    assert extra == [4.0, 5.5, 175.0]


@pytest.mark.parametrize("power_hp", [0.1, 0.25, 0.3, 0.9, 1.0, 1.2, 2.5, 3.5, 8, 14.9, 15, 15.1, 99, 180, 333,
                                      499.9, 500])
def test_nema_sizing_matches_fluids_rounding(power_hp):
    # fluids.motor_round_size: the smallest NEMA size >= P; with overload 1 the peak adds nothing
    power = power_hp * fluids.constants.hp
    ours = drive.motor_rating(power, power, "NEMA", overload_factor=1.0)
    theirs = fluids.motor_round_size(power)
    if round(theirs / fluids.constants.hp, 6) in (4.0, 5.5, 175.0):
        assert ours > theirs  # a size fluids has and MG 1's preferred series does not
    else:
        assert ours == pytest.approx(theirs, rel=1e-12)


def test_beyond_the_largest_size_both_refuse():
    with pytest.raises(ValueError):  # fluids: larger than any NEMA size
        fluids.motor_round_size(501 * fluids.constants.hp)
    with pytest.raises(PhysicsError, match=r"largest NEMA motor \(500 hp\)"):
        drive.motor_rating(501 * drive.HP, 501 * drive.HP, "NEMA")
    with pytest.raises(PhysicsError, match=r"largest IEC motor \(1000 kW\)"):
        drive.select_motor(1.2e6, 1.3e6, "IEC")
    # a peak beyond 1.6 × the largest rating, with an RMS that fits
    with pytest.raises(PhysicsError, match="peak capacity") as info:
        drive.motor_rating(500e3, 1.7e6, "IEC")
    assert info.value.argument == "peak_power"


def test_iec_ratings_are_the_iec_60072_output_series():
    # IEC 60072-1 rated outputs (from memory), as also listed by IEC 60034-30-1's tables
    assert drive.IEC_RATINGS_KW == (
        0.12, 0.18, 0.25, 0.37, 0.55, 0.75, 1.1, 1.5, 2.2, 3, 4, 5.5, 7.5, 11, 15, 18.5, 22, 30, 37, 45, 55,
        75, 90, 110, 132, 160, 200, 250, 315, 355, 400, 450, 500, 560, 630, 710, 800, 900, 1000)


def test_iec_ratings_lie_on_renard_preferred_numbers():
    # The output series is built on the R20/R40 preferred numbers of ISO 3 (from memory):
    # every rating is within 3 % of some 10^(k/40).
    for kw in drive.IEC_RATINGS_KW:
        k = round(40 * math.log10(kw))
        assert abs(kw / 10 ** (k / 40) - 1) < 0.03, kw


# --- efficiencies ---------------------------------------------------------------------------------

def test_nema_premium_efficiency_matches_fluids():
    # fluids.CSA_motor_efficiency(high_efficiency=True, closed=True, poles=4): the Canadian premium
    # table, the same values as NEMA MG 1 Table 12-12 from 1 hp to 200 hp (the range fluids covers)
    for rating_hp in (1, 1.5, 2, 3, 5, 7.5, 10, 15, 20, 25, 30, 40, 50, 60, 75, 100, 125, 150, 200):
        ours = drive.motor_efficiency(rating_hp * drive.HP, "NEMA")
        theirs = fluids.CSA_motor_efficiency(rating_hp * fluids.constants.hp, closed=True, poles=4,
                                             high_efficiency=True)
        assert ours == pytest.approx(theirs, abs=1e-9), rating_hp


def test_ie3_efficiency_matches_iec_60034_30_table():
    # IE3, 4-pole 50 Hz, 0.75 kW to 7.5 kW: IEC 60034-30:2008 table as reproduced in motor makers'
    # catalogues (the IE3 limits did not change in IEC 60034-30-1:2014)
    table = {0.75: 82.5, 1.1: 84.1, 1.5: 85.3, 2.2: 86.7, 3: 87.7, 4: 88.6, 5.5: 89.6, 7.5: 90.4}
    for kw, percent in table.items():
        assert drive.motor_efficiency(kw * 1e3, "IEC") == pytest.approx(percent / 100, abs=1e-12), kw


def _ie3_formula(kw):
    # IEC 60034-30-1:2014 interpolation for intermediate outputs, 0.75 kW to 200 kW, IE3 4-pole 50 Hz:
    # η = A·x³ + B·x² + C·x + D with x = log10(P/1 kW) (coefficients from memory)
    x = np.log10(kw)
    return (0.0773 * x ** 3 - 1.8951 * x ** 2 + 9.2984 * x + 83.7025) / 100


def test_ie3_interpolation_agrees_with_the_standards_formula():
    # at the tabulated ratings the standard rounds its formula to 0.1 %; between them our log-linear
    # interpolation stays within 0.1 % of it
    for kw in [p for p, _ in drive.IE3_4POLE_50HZ if 0.75 <= p <= 200]:
        assert drive.motor_efficiency(kw * 1e3, "IEC") == pytest.approx(_ie3_formula(kw), abs=0.0006), kw
    grid = np.geomspace(0.75, 200, 97)
    np.testing.assert_allclose(drive.motor_efficiency(grid * 1e3, "IEC"), _ie3_formula(grid), atol=0.001)


def test_efficiency_is_clamped_outside_the_tables():
    # IEC 60034-30-1: 96.0 % from 200 kW up to 1000 kW; beyond and below, the end values
    assert drive.motor_efficiency(500e3, "IEC") == pytest.approx(0.960)
    assert drive.motor_efficiency(2e6, "IEC") == pytest.approx(0.960)
    assert drive.motor_efficiency(60.0, "IEC") == pytest.approx(0.648)
    assert drive.motor_efficiency(0.25 * drive.HP, "nema") == pytest.approx(0.855)
    with pytest.raises(PhysicsError, match="standard"):
        drive.motor_efficiency(11e3, "JIS")
    with pytest.raises(PhysicsError, match="greater than zero"):
        drive.motor_efficiency(0.0, "IEC")


# --- selection at the boundaries ------------------------------------------------------------------

def test_rms_exactly_at_a_rating_takes_that_rating_and_just_above_the_next():
    assert drive.motor_rating(11e3, 11e3, "IEC") == 11e3
    assert drive.motor_rating(11e3 * 1.0001, 11e3 * 1.0001, "IEC") == 15e3
    # through the unit layer: "15 hp" must not round up to 20 hp
    fifteen = to_si("15 hp", POWER, "rms")
    assert drive.select_motor(fifteen, fifteen, "NEMA").label == "15 hp"
    assert drive.select_motor(fifteen * 1.0001, fifteen * 1.0001, "NEMA").label == "20 hp"


def test_peak_forces_a_larger_size():
    # IEC 60034-1 clause 9.4 (from memory): 60 % excess torque for 15 s, so a peak up to 1.6 x rating
    assert drive.motor_rating(10e3, 1.6 * 11e3, "IEC") == 11e3  # exactly at the peak capacity
    assert drive.motor_rating(10e3, 1.6 * 11e3 * 1.0001, "IEC") == 15e3
    # with no overload allowance the peak itself must fit the rating
    assert drive.motor_rating(10e3, 12e3, "IEC", overload_factor=1.0) == 15e3
    # the cycle done by hand: RMS √120 = 10.95 kW fits 11 kW, peak 18 kW > 17.6 kW does not
    choice = drive.select_motor(math.sqrt(120) * 1e3, 18e3, "IEC")
    assert (choice.label, choice.rated_power) == ("15 kW", 15e3)
    assert choice.rms_load == pytest.approx(math.sqrt(120) / 15, rel=1e-12)
    assert choice.peak_load == pytest.approx(18 / 15, rel=1e-12)
    assert choice.overload_factor == 1.6
    assert choice.efficiency == pytest.approx(0.921)  # IE3 15 kW 4-pole, IEC 60034-30-1 (from memory)


def test_motor_choice_labels_and_arguments():
    assert drive.select_motor(100.0, 100.0, "IEC").label == "0.12 kW"
    assert drive.select_motor(0.0, 0.0, "NEMA").label == "1/4 hp"
    assert drive.select_motor(6 * drive.HP, 6 * drive.HP, " nema ").label == "7.5 hp"
    assert drive.select_motor(300e3, 300e3, "IEC").label == "315 kW"
    with pytest.raises(PhysicsError, match="at least 1"):
        drive.select_motor(10e3, 12e3, "IEC", overload_factor=0.9)
    with pytest.raises(PhysicsError, match="below the RMS") as info:
        drive.select_motor(10e3, 0.0, "IEC")
    assert info.value.argument == "peak_power"
    with pytest.raises(PhysicsError, match="'IEC' or 'NEMA'"):
        drive.select_motor(10e3, 12e3, "DIN")


@given(st.lists(st.tuples(st.floats(0, 700e3), st.floats(1.0, 1.6)), min_size=1, max_size=20),
       st.sampled_from(drive.STANDARDS))
def test_vectorised_rating_equals_one_at_a_time(loads, standard):
    rms = np.array([r for r, _ in loads])
    if standard == "NEMA":
        rms = rms / 2  # stay inside 500 hp
    peak = rms * np.array([k for _, k in loads])
    rated = drive.motor_rating(rms, peak, standard)
    for i in range(rms.size):
        choice = drive.select_motor(rms[i], peak[i], standard)
        assert rated[i] == choice.rated_power
        # the smallest that carries the load: it covers, and the next smaller one does not
        series = drive.standard_ratings(standard)
        assert choice.rated_power >= rms[i] * (1 - 1e-9) and 1.6 * choice.rated_power >= peak[i] * (1 - 1e-9)
        k = int(np.searchsorted(series, choice.rated_power))
        if k > 0:
            assert series[k - 1] < rms[i] or 1.6 * series[k - 1] < peak[i]


# --- motor cells: the motor standard is a text-choice argument (declarations.Choice) --------------------


def test_motor_size_cell_in_kw_and_hp():
    # the cycle done by hand (RMS √120 kW, peak 18 kW): 15 kW IEC; 20 hp NEMA (peak 24.1 hp > 1.6 x 15 hp)
    assert cell("SP_MOTOR_SIZE", math.sqrt(120), 18, "IEC") == pytest.approx(15.0, rel=1e-12)
    assert cell("SP_MOTOR_SIZE", math.sqrt(120), 18, "nema", "hp") == pytest.approx(20.0, rel=1e-12)
    # a rating typed in hp stays that rating (pint converts both ways)
    assert cell("SP_MOTOR_SIZE", "15 hp", "15 hp", "NEMA", "hp") == pytest.approx(15.0, rel=1e-12)
    np.testing.assert_allclose(cell("SP_MOTOR_SIZE", [[1], [5], [11.1]], [[1], [8], [20]], "IEC"),
                               [[1.1], [5.5], [15.0]], rtol=1e-12)
    assert CATALOGUE["SP_MOTOR_SIZE"].cell(10, 18, "DIN").startswith("#SP! standard: ")
    assert CATALOGUE["SP_MOTOR_SIZE"].cell(2000, 2000, "IEC").startswith(
        "#SP! rms_power: is 2000 kW, beyond the continuous rating of the largest IEC motor (1000 kW)")


def test_motor_eff_cell():
    # IE3 11 kW 4-pole 91.4 % (IEC 60034-30-1, from memory); NEMA Premium 15 hp 92.4 % (fluids, above)
    assert cell("SP_MOTOR_EFF", 11, "IEC") == pytest.approx(0.914, abs=1e-12)
    assert cell("SP_MOTOR_EFF", "15 hp", "NEMA", "%") == pytest.approx(
        100 * fluids.CSA_motor_efficiency(15 * fluids.constants.hp, closed=True, poles=4, high_efficiency=True))
