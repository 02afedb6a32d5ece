"""Values and units as people type them: trade spellings, absurd units and magnitudes, and common slips."""

from __future__ import annotations

import pint
import pytest

from sheetpump import cells
from sheetpump import units as u
from sheetpump.errors import InputError, Where
from sheetpump.workbooks.fields import convert
from sheetpump.workbooks.measured_table import read_measured
from sheetpump.workbooks.templates import APPLICATION_FIELDS, DATASHEET_FIELDS

# An independent pint registry (not sheetpump's) is the outside reference for every conversion.
REF = pint.UnitRegistry()
FIELDS = {f.key: f for f in (*DATASHEET_FIELDS, *APPLICATION_FIELDS)}
ALL_KINDS = list(u.KINDS.values())


@pytest.mark.parametrize(
    ("alias", "kind", "reference"),
    [  # the trade's spelling -> pint's unambiguous spelling of the same unit (pint is the reference)
        ("PSI", u.PRESSURE, "psi"), ("psi", u.PRESSURE, "psi"), ("Bar", u.PRESSURE, "bar"),
        ("KW", u.POWER, "kilowatt"), ("kw", u.POWER, "kilowatt"), ("HP", u.POWER, "horsepower"),
        ("hp", u.POWER, "horsepower"), ("GPM", u.FLOW, "gallon/minute"), ("gpm", u.FLOW, "gallon/minute"),
        ("LPM", u.FLOW, "liter/minute"), ("lpm", u.FLOW, "liter/minute"), ("l/min", u.FLOW, "liter/minute"),
        ("m3/h", u.FLOW, "meter**3/hour"),
        ("cc", u.DISPLACEMENT, "centimeter**3"), ("ccm", u.DISPLACEMENT, "centimeter**3"),
        ("cc/rev", u.DISPLACEMENT, "centimeter**3"), ("cm3/rev", u.DISPLACEMENT, "centimeter**3"),
        ("in3/rev", u.DISPLACEMENT, "inch**3"), ("cu in/rev", u.DISPLACEMENT, "inch**3"),
        ("Nm", u.TORQUE, "newton*meter"), ("N.m", u.TORQUE, "newton*meter"), ("NM", u.TORQUE, "newton*meter"),
        ("lb-ft", u.TORQUE, "force_pound*foot"), ("lbf-ft", u.TORQUE, "force_pound*foot"),
        ("ft-lb", u.TORQUE, "force_pound*foot"), ("lb-in", u.TORQUE, "force_pound*inch"),
        ("in-lb", u.TORQUE, "force_pound*inch"),
        ("cSt", u.VISCOSITY, "centistokes"), ("mm2/s", u.VISCOSITY, "millimeter**2/second"),
        ("mPa.s", u.DYN_VISCOSITY, "millipascal*second"),
        ("barg", u.PRESSURE, "bar"), ("psig", u.PRESSURE, "psi"), ("bara", u.ABS_PRESSURE, "bar"),
        ("psia", u.ABS_PRESSURE, "psi"), ("BARA", u.ABS_PRESSURE, "bar"),
    ],
)
def test_trade_spellings_convert_as_pint_converts_the_plain_unit(alias, kind, reference):
    # displacement is per revolution: pint's plain volume is the reference for "cc/rev" (DESIGN §3)
    expected = REF.Quantity(7.5, reference).to_base_units().magnitude
    assert u.to_si(f"7.5 {alias}", kind, "x") == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("alias", "reference"), [
    ("degC", "degC"), ("°C", "degC"), ("C", "degC"), ("c", "degC"), ("°F", "degF"), ("F", "degF"), ("K", "kelvin")])
def test_temperature_spellings_match_pint(alias, reference):
    expected = REF.Quantity(40.0, reference).to("kelvin").magnitude  # pint, offset units
    assert u.to_si(f"40 {alias}", u.TEMPERATURE, "t") == pytest.approx(expected, abs=1e-9)


def test_gauge_spellings_add_one_atmosphere_to_an_absolute_pressure():
    # 101325 Pa, standard atmosphere (ISO 2533)
    for text in ("2 barg", "2 BARG", "2 bar(g)", "2 Bar (g)"):
        assert u.to_si(text, u.ABS_PRESSURE, "inlet") == pytest.approx(2e5 + 101325.0), text
    assert u.to_si("30 psig", u.ABS_PRESSURE, "inlet") == pytest.approx(
        REF.Quantity(30, "psi").to("Pa").magnitude + 101325.0)


def test_case_is_folded_only_for_listed_words_so_prefixes_keep_their_meaning():
    # mW is a milliwatt and MW a megawatt (SI prefixes, BIPM SI brochure): never folded
    assert u.to_si("5 mW", u.POWER, "p") == pytest.approx(5e-3)
    assert u.to_si("5 MW", u.POWER, "p") == pytest.approx(5e6)
    assert u.to_si("5 MPa", u.PRESSURE, "p") == pytest.approx(5e6)
    for text, candidates in (("5 mw", ("'MW' (megawatt)", "'mW' (milliwatt)")),
                             ("5 Mpa", ("'MPa' (megapascal)", "'mPa' (millipascal)")),
                             ("5 MBAR", ("'mbar' (millibar)", "'Mbar' (megabar)"))):
        with pytest.raises(InputError) as info:
            u.to_si(text, u.POWER if "w" in text else u.PRESSURE, "p")
        assert all(c in info.value.message for c in candidates), info.value.message
    assert set(u.FOLDED) >= {"psi", "bar", "kw", "hp", "gpm", "lpm", "cc", "cst", "rpm"}


ABSURD = ["1/0", "m/0", "bar^1e9", "bar^-0", "dB(A)", "dB/s", "bar^1000", "((bar", "bar**bar", "1e999 bar",
          "x" * 500, "°", "delta_degC", "Δ°C"]


@pytest.mark.parametrize("unit", ABSURD)
def test_absurd_units_are_refused_with_input_error_for_every_kind(unit):
    for kind in ALL_KINDS:
        try:
            u.unit_factor(unit, kind)
        except InputError:
            pass  # the only exception allowed


@pytest.mark.parametrize("unit", ["1/0", "m/0", "bar^1e9", "bar^-0", "dB(A)", "dB/s"])
def test_absurd_units_in_a_cell_name_the_argument(unit):
    assert cells.SP_HYDRAULIC_POWER(f"200 {unit}", 60).startswith("#SP! pressure: ")
    assert cells.SP_HYDRAULIC_POWER(200, 60, unit).startswith("#SP! unit: ")


def test_a_temperature_refuses_a_temperature_difference():
    with pytest.raises(InputError, match="temperature difference"):
        u.to_si("40 delta_degC", u.TEMPERATURE, "t")
    with pytest.raises(InputError, match="temperature difference"):
        convert(FIELDS["oil_temperature"], 40, "delta_degC", Where(cell="B20"))


@pytest.mark.parametrize(("key", "value", "unit", "message"), [
    ("teeth", 9, "bar", "unit 'bar' where no unit belongs"),
    ("price", 480, "kg", "unit 'kg' is a mass; a price takes a currency"),
    ("cycles_per_hour", 60, "bar", "unit 'bar' where '1/h' belongs"),
])
def test_fields_without_a_unit_kind_refuse_physical_units(key, value, unit, message):
    with pytest.raises(InputError) as info:
        convert(FIELDS[key], value, unit, Where(cell="B2"), Where(cell="C2"))
    assert message in info.value.message
    assert info.value.where.cell == "C2"  # the unit cell holds the wrong unit


def test_counts_keep_their_own_labels_and_a_price_its_currency():
    assert convert(FIELDS["price"], 480, "EUR", Where()) == 480
    assert convert(FIELDS["noise"], 68, "dBA", Where()) == 68
    assert convert(FIELDS["teeth"], 9, None, Where()) == 9


@pytest.mark.parametrize(("key", "value", "unit", "range_text"), [
    ("displacement", 1e308, "cm^3/rev", "0.01 to 100000 cm^3/rev"),
    ("displacement", 1e-300, "cm^3/rev", "0.01 to 100000 cm^3/rev"),
    ("drive_speed", 1e308, "rpm", "0.01 to 100000 rpm"),
    ("intermittent_max_duration", 1e308, "s", "1e-06 to 3.16224e+07 s"),
    ("oil_temperature", 900, "degC", "-100 to 500 degC"),
    ("hours_per_year", 9000, "h", "0 to 8784"),  # a year has at most 366 x 24 = 8784 h
    ("teeth", 1000, None, "3 to 100"),
])
def test_values_outside_the_declared_span_are_refused_naming_it(key, value, unit, range_text):
    with pytest.raises(InputError) as info:
        convert(FIELDS[key], value, unit, Where(cell="B9"))
    assert range_text in info.value.message
    assert info.value.where.cell == "B9"


def test_a_share_typed_as_a_fraction_in_a_percent_cell_is_caught():
    with pytest.raises(InputError) as info:
        convert(FIELDS["volumetric_efficiency"], 0.92, "%", Where(cell="B30"))
    assert "did you mean 92 %?" in info.value.message
    assert convert(FIELDS["volumetric_efficiency"], 92, "%", Where()) == pytest.approx(0.92)
    assert convert(FIELDS["volumetric_efficiency"], 0.92, "fraction", Where()) == pytest.approx(0.92)
    # an overshoot is not a share: 0.5 % stays 0.5 %
    assert convert(FIELDS["overshoot"], 0.5, "%", Where()) == pytest.approx(0.005)


def test_a_unit_typed_in_the_value_cell_is_blamed_on_the_value_cell():
    with pytest.raises(InputError) as info:
        convert(FIELDS["relief_setting"], "3000 rpm", None, Where(cell="B23"), Where(cell="C23"))
    assert info.value.where.cell == "B23"
    assert "'rpm' is a speed, not a pressure" in info.value.message


def test_one_decimal_comma_rule_for_cells_and_workbooks():
    assert u.to_si("3,5 bar", u.PRESSURE, "p") == pytest.approx(3.5e5)
    assert convert(FIELDS["relief_setting"], "3,5 bar", None, Where()) == pytest.approx(3.5e5)
    for text in ("3,000 bar", "1,250", "1.234,5 bar", "1,234,567"):
        with pytest.raises(InputError, match="ambiguous"):
            u.to_si(text, u.PRESSURE, "p")
        with pytest.raises(InputError, match="ambiguous"):
            convert(FIELDS["relief_setting"], text, None, Where())


_HEADER = "pressure [bar],speed [rpm],flow [L/min],torque [N*m],viscosity [cSt]\n"


def test_measured_csv_with_decimal_commas_in_a_comma_separated_file_names_row_and_column(tmp_path):
    path = tmp_path / "bench.csv"
    path.write_text(_HEADER + "100,1500,40.5,60,32\n200,1500,39,8,110,32\n")
    with pytest.raises(InputError) as info:
        read_measured(path)
    assert info.value.where.cell == "C3"  # flow of row 3: "39,8"
    assert "\n" not in str(info.value)


def test_measured_csv_with_a_huge_sample_names_its_cell(tmp_path):
    path = tmp_path / "bench.csv"
    path.write_text(_HEADER + "100,1500,40.5,60,32\n200,1500,1e308,110,32\n")
    with pytest.raises(InputError) as info:
        read_measured(path)
    assert info.value.where.cell == "C3"
    assert "1e-06 to 100000 L/min" in info.value.message


def test_semicolon_csv_reads_decimal_commas_and_refuses_thousands(tmp_path):
    path = tmp_path / "bench.csv"
    head = _HEADER.replace(",", ";")
    path.write_text(head + "100;1500;40,5;60;32\n200;1500;39,8;110;32\n")
    assert read_measured(path).flow.tolist() == pytest.approx([40.5 / 60000, 39.8 / 60000])
    path.write_text(head + "100;1500;40,5;60;32\n200;1500;1,250;110;32\n")
    with pytest.raises(InputError, match="ambiguous") as info:
        read_measured(path)
    assert info.value.where.cell == "C3"


# --- whole workbooks: the source note, the intermittent advice, a duty table's span -------------------

def _datasheet(tmp_path, **changes):
    from tests.test_workbooks import IDENTITY, METRIC_PUMP, fill

    values = {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in METRIC_PUMP}, **changes}
    return fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx")


def test_an_empty_unit_cell_is_read_in_the_default_unit_and_the_source_says_so(tmp_path):
    from sheetpump.workbooks.readers import read_datasheet

    ds = read_datasheet(_datasheet(tmp_path, pressure_peak=(300, None), speed_max=(50, "rev/s")))
    assert ds.pressure_peak == pytest.approx(300e5)
    assert ds.sources["pressure_peak"].note == "read as bar (the default unit)"
    assert "read as bar (the default unit)" in str(ds.sources["pressure_peak"])
    assert ds.sources["speed_max"].note == "typed as 50 rev/s"  # echoed in the unit it was typed in
    assert ds.sources["displacement"].note is None  # typed in the default unit: nothing to say


def test_an_intermittent_rating_without_its_limits_says_what_to_write(tmp_path):
    from sheetpump.workbooks.readers import read_datasheet

    path = _datasheet(tmp_path, intermittent_max_duration=(None,), intermittent_max_share=(None,))
    with pytest.raises(InputError) as info:
        read_datasheet(path)
    assert "if the supplier states none" in info.value.hint
    assert "leave pressure_intermittent empty" in info.value.hint


def test_a_huge_flow_in_the_performance_table_names_its_cell(tmp_path):
    from sheetpump.workbooks.readers import read_datasheet
    from tests.test_workbooks import IDENTITY, METRIC_PUMP, fill

    values = {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in METRIC_PUMP}}
    table = [[10, 40, 1.0, None, 1500, 32], [200, 1e308, 15.0, None, 1500, 32]]
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx", table=table)
    with pytest.raises(InputError) as info:
        read_datasheet(path)
    assert info.value.where.cell == "B7"
    assert "0 to" not in info.value.message and "1e-06 to 100000 L/min" in info.value.message


# --- every alias of issue 12 §1 through both faces: a cell function and a workbook field -----------------
# (alias, pint's unambiguous spelling, a cell function computing value -> SI from it, a workbook field)
_FACES = {
    # hydraulic power in W of p x 60 L/min (1e-3 m³/s): p [Pa] = P / 1e-3
    "pressure": (lambda v: cells.SP_HYDRAULIC_POWER(f"7.5 {v}", 60, "W") / 1e-3, "pressure_continuous"),
    # hydraulic power in W of 1 bar (1e5 Pa) x q: q [m³/s] = P / 1e5
    "flow": (lambda v: cells.SP_HYDRAULIC_POWER(1, f"7.5 {v}", "W") / 1e5, None),
    # the result unit: 100 kW asked in the alias
    "power": (lambda v: 1e5 / cells.SP_HYDRAULIC_POWER(100, 600, v) * 7.5, None),
    # geometric flow in m³/s at 60 rpm (1 rev/s): V [m³/rev] = Q
    "displacement": (lambda v: cells.SP_GEOMETRIC_FLOW(f"7.5 {v}", 60, "m^3/s"), "displacement"),
    # shaft power in W at 60 rpm: T [N·m] = P / 2π
    "torque": (lambda v: cells.SP_SHAFT_POWER(f"7.5 {v}", 60, "W") / (2 * 3.141592653589793), "torque_max"),
    # dynamic viscosity in Pa·s at 1000 kg/m³: ν [m²/s] = μ / 1000
    "viscosity": (lambda v: cells.SP_DYNAMIC_VISCOSITY(f"7.5 {v}", 1000, "Pa*s") / 1000, "viscosity_max"),
}


@pytest.mark.parametrize(("alias", "face", "reference"), [
    ("PSI", "pressure", "psi"), ("psi", "pressure", "psi"), ("Bar", "pressure", "bar"), ("barg", "pressure", "bar"),
    ("psig", "pressure", "psi"),
    ("GPM", "flow", "gallon/minute"), ("gpm", "flow", "gallon/minute"), ("LPM", "flow", "liter/minute"),
    ("lpm", "flow", "liter/minute"), ("l/min", "flow", "liter/minute"),
    ("KW", "power", "kilowatt"), ("kw", "power", "kilowatt"), ("HP", "power", "horsepower"),
    ("hp", "power", "horsepower"),
    ("cc", "displacement", "centimeter**3"), ("ccm", "displacement", "centimeter**3"),
    ("cc/rev", "displacement", "centimeter**3"), ("cm3/rev", "displacement", "centimeter**3"),
    ("in3/rev", "displacement", "inch**3"), ("cu in/rev", "displacement", "inch**3"),
    ("Nm", "torque", "newton*meter"), ("N.m", "torque", "newton*meter"), ("lb-ft", "torque", "force_pound*foot"),
    ("lbf-ft", "torque", "force_pound*foot"), ("ft-lb", "torque", "force_pound*foot"),
    ("lb-in", "torque", "force_pound*inch"), ("in-lb", "torque", "force_pound*inch"),
    ("cSt", "viscosity", "centistokes"), ("mm2/s", "viscosity", "millimeter**2/second"),
])
def test_each_trade_alias_reads_the_same_in_a_cell_and_in_a_workbook_field(alias, face, reference):
    # pint (an independent registry) converts the unambiguous spelling: the reference
    expected = REF.Quantity(7.5, reference).to_base_units().magnitude
    through_cell, field = _FACES[face]
    assert through_cell(alias) == pytest.approx(expected, rel=1e-12), "cell"
    if field is not None:  # the value in its cell, the alias in the unit cell beside it
        assert convert(FIELDS[field], 7.5, alias, Where(cell="B9")) == pytest.approx(expected, rel=1e-12), "field"
        assert convert(FIELDS[field], f"7.5 {alias}", None, Where(cell="B9")) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("alias", "reference"), [("°C", "degC"), ("C", "degC"), ("degC", "degC"), ("°F", "degF"),
                                                  ("F", "degF")])
def test_temperature_aliases_in_a_workbook_field(alias, reference):
    expected = REF.Quantity(40.0, reference).to("kelvin").magnitude  # pint, offset units
    assert convert(FIELDS["temperature_max"], 40, alias, Where(cell="B9")) == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize(("alias", "reference"), [("bara", "bar"), ("psia", "psi"), ("BARA", "bar")])
def test_absolute_pressure_aliases_in_a_workbook_field(alias, reference):
    expected = REF.Quantity(0.8, reference).to("pascal").magnitude
    assert convert(FIELDS["inlet_pressure_min"], 0.8, alias, Where(cell="B9")) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("spelling", "candidates"), [("Mpa", ("'MPa' (megapascal)", "'mPa' (millipascal)")),
                                                      ("MBAR", ("'mbar' (millibar)", "'Mbar' (megabar)"))])
def test_an_ambiguous_spelling_is_refused_naming_the_candidates_in_both_faces(spelling, candidates):
    out = cells.SP_HYDRAULIC_POWER(f"7.5 {spelling}", 60)
    assert out.startswith("#SP! pressure:") and all(c in out for c in candidates), out
    with pytest.raises(InputError) as info:
        convert(FIELDS["pressure_continuous"], 7.5, spelling, Where(cell="B9"), Where(cell="C9"))
    assert info.value.where.cell == "C9" and all(c in info.value.message for c in candidates)
