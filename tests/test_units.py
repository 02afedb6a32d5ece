"""Turning cell values into SI numbers: defaults, unit strings, the revolution pitfall, errors."""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest

from sheetpump import units as u
from sheetpump.errors import InputError

# An independent pint registry (not sheetpump's) is the outside reference for conversions.
REF = pint.UnitRegistry()


@pytest.mark.parametrize(
    ("text", "kind", "ref_value", "ref_unit"),
    [
        ("3000 psi", u.PRESSURE, 3000, "psi"),
        ("20.7 MPa", u.PRESSURE, 20.7, "MPa"),
        ("10 gpm", u.FLOW, 10, "gallon/minute"),
        ("40 L/min", u.FLOW, 40, "liter/minute"),
        ("20 hp", u.POWER, 20, "hp"),
        ("15 kW", u.POWER, 15, "kW"),
        ("100 lbf*ft", u.TORQUE, 100, "lbf*ft"),
        ("900 lbf*in", u.TORQUE, 900, "lbf*inch"),
        ("120 N·m", u.TORQUE, 120, "N*m"),
        ("46 cSt", u.VISCOSITY, 46, "centistokes"),
        ("46 mm²/s", u.VISCOSITY, 46, "mm**2/s"),
        ("9.5 kg", u.MASS, 9.5, "kg"),
    ],
)
def test_unit_strings_match_pint(text, kind, ref_value, ref_unit):
    # pint (a separate registry) is the reference for the factor
    expected = REF.Quantity(ref_value, ref_unit).to_base_units().magnitude
    assert u.to_si(text, kind, "x") == pytest.approx(expected, rel=1e-12)


def test_displacement_is_per_revolution_in_every_spelling():
    # 1 in³ = 16.387064 cm³ exactly (international inch, a definition)
    expected = 1.2 * 16.387064e-6
    for text in ("1.2 in^3/rev", "1.2 in³/rev", "1.2 in**3/rev", "1.2 in^3", "1.2 in3/rev"):
        assert u.to_si(text, u.DISPLACEMENT, "displacement") == pytest.approx(expected, rel=1e-12), text
    for text in ("28 cc", "28 cc/rev", "28 cm^3/rev", "28 cm³", "28"):
        assert u.to_si(text, u.DISPLACEMENT, "displacement") == pytest.approx(28e-6, rel=1e-12), text
    # per radian is a real angle: 1 cm³/rad is 2π cm³/rev
    assert u.to_si("1 cm^3/rad", u.DISPLACEMENT, "d") == pytest.approx(2 * math.pi * 1e-6, rel=1e-12)


def test_speed_is_revolutions_per_time():
    # 1500 rpm = 25 rev/s; "1/min" and Hz count revolutions too (common practice on datasheets)
    for text in ("1500 rpm", "1500 1/min", "25 Hz", "1500", 1500, 1500.0):
        assert u.to_si(text, u.SPEED, "speed") == pytest.approx(25.0, rel=1e-12)
    # rad/s is an angular speed: 2π rad/s = 1 rev/s
    assert u.to_si(f"{2 * math.pi} rad/s", u.SPEED, "speed") == pytest.approx(1.0, rel=1e-12)


def test_temperatures_and_absolute_pressure():
    assert u.to_si("104 degF", u.TEMPERATURE, "t") == pytest.approx(313.15, abs=1e-9)  # 40 °C
    assert u.to_si("40 °C", u.TEMPERATURE, "t") == pytest.approx(313.15, abs=1e-12)
    assert u.to_si(40, u.TEMPERATURE, "t") == pytest.approx(313.15, abs=1e-12)
    assert u.to_si("0.8 bara", u.ABS_PRESSURE, "inlet") == pytest.approx(80000.0)
    # gauge to absolute: plus one standard atmosphere, 101325 Pa (ISO 2533)
    assert u.to_si("-0.2 barg", u.ABS_PRESSURE, "inlet") == pytest.approx(101325.0 - 20000.0)
    assert u.to_si("11.6 psia", u.ABS_PRESSURE, "inlet") == pytest.approx(
        REF.Quantity(11.6, "psi").to("Pa").magnitude)


def test_bare_numbers_take_the_documented_default_unit():
    assert u.to_si(250, u.PRESSURE, "p") == 250e5
    assert u.to_si(40, u.FLOW, "q") == pytest.approx(40 / 60000)
    assert u.to_si(15, u.POWER, "p") == 15000.0
    assert u.to_si(0.92, u.EFFICIENCY, "eff") == 0.92
    assert u.to_si("92 %", u.EFFICIENCY, "eff") == pytest.approx(0.92)


@pytest.mark.parametrize(
    ("value", "kind", "message"),
    [
        ("250 rpm", u.PRESSURE, "pressure: 'rpm' is a speed, not a pressure"),
        ("3,000", u.PRESSURE, "'3,000' is ambiguous"),
        ("1,250 bar", u.PRESSURE, "'1,250' is ambiguous"),
        ("1.234,5 bar", u.PRESSURE, "'1.234,5 bar' is ambiguous"),
        ("high", u.PRESSURE, "'high' is not a number with a unit"),
        ("5 furlongs/fortnight^2", u.PRESSURE, "is a unit of another kind, not a pressure"),
        ("5 blorps", u.PRESSURE, "unknown unit 'blorps'"),
        (None, u.PRESSURE, "missing (empty cell)"),
        ("  ", u.PRESSURE, "missing (empty cell)"),
        (True, u.PRESSURE, "True is a true/false value, not a pressure"),
        (math.nan, u.PRESSURE, "nan is not a finite number"),
        ("1 bara", u.PRESSURE, "'bara' is an absolute pressure"),
    ],
)
def test_bad_values_name_the_argument(value, kind, message):
    with pytest.raises(InputError) as info:
        u.to_si(value, kind, "pressure")
    text = str(info.value)
    assert message.split(": ", 1)[-1] in text
    assert info.value.where.field == "pressure"


def test_ambiguous_text_says_how_to_write_it():
    with pytest.raises(InputError) as info:
        u.to_si("3,000", u.PRESSURE, "pressure")
    assert "write 3000 for three thousand" in info.value.hint


def test_empty_cell_takes_declared_default():
    assert u.to_si(None, u.PRESSURE, "p", default=1e5) == 1e5


def test_ranges_become_arrays_and_name_the_bad_element():
    out = u.to_si([[100, "2000 psi"], ["10 MPa", 0]], u.PRESSURE, "pressure")
    assert out.shape == (2, 2)
    assert out[0, 1] == pytest.approx(REF.Quantity(2000, "psi").to("Pa").magnitude)
    with pytest.raises(InputError) as info:
        u.to_si([[100, "x"]], u.PRESSURE, "pressure")
    assert info.value.where.field == "pressure[0, 1]"
    arr = u.to_si(np.array([1.0, 2.0]), u.PRESSURE, "p")
    assert arr.tolist() == [1e5, 2e5]


def test_parsed_strings_are_cached():
    u._parse_text.cache_clear()
    for _ in range(100):
        u.to_si("250 bar", u.PRESSURE, "p")
    info = u._parse_text.cache_info()
    assert info.misses == 1 and info.hits == 99


def test_from_si_round_trips_in_trade_units():
    assert u.from_si(25.0, u.SPEED) == 1500.0
    assert u.from_si(u.to_si("10 gpm", u.FLOW, "q"), u.FLOW, "gpm") == pytest.approx(10.0, rel=1e-12)
    assert u.from_si(313.15, u.TEMPERATURE, "degF") == pytest.approx(104.0, abs=1e-9)
