"""Datasheet and application workbooks: templates, round trips in two unit systems, every refusal.

The outside reference for conversions is an independent pint registry (not sheetpump's); the viscosity
index of a grade-given oil is checked with the ``chemicals`` package (ASTM D2270). All data is invented.
"""

from __future__ import annotations

import sys
import types
import zipfile
from pathlib import Path

import openpyxl
import pint
import pytest
import xlsxwriter

from sheetpump import SAFETY_CAUTION
from sheetpump.cli import main
from sheetpump.errors import InputError
from sheetpump.workbooks import read_application, read_datasheet
from sheetpump.workbooks.safe import check_file, open_workbook
from sheetpump.workbooks.templates import (
    APPLICATION_FIELDS,
    DATASHEET_FIELDS,
    UNITS,
    write_template,
)

REF = pint.UnitRegistry()
ROOT = Path(__file__).resolve().parents[1]


def si(value: float, unit: str) -> float:
    """pint (a separate registry) is the reference: value in ``unit`` as SI base units."""
    q = REF.Quantity(value, REF(unit).units if unit not in ("degC", "degF") else getattr(REF, unit))
    return q.to_base_units().magnitude


def cell_of(wb: openpyxl.Workbook, name: str) -> tuple[str, str]:
    sheet, coord = next(iter(wb.defined_names[name].destinations))
    return sheet, coord.replace("$", "")


def fill(path: Path, kind: str, values: dict[str, tuple], out: Path, *,
         table: list[list] | None = None, headers: list[str] | None = None) -> Path:
    """Fill a fresh template by defined name (value, unit); write table rows under the header."""
    write_template(kind, path)
    wb = openpyxl.load_workbook(path)
    prefix = "pump" if kind == "datasheet" else "machine"
    for key, (value, *unit) in values.items():
        sheet, coord = cell_of(wb, f"{prefix}.{key}")
        ws = wb[sheet]
        ws[coord] = value
        if unit:
            ws.cell(ws[coord].row, 3).value = unit[0]
    ws = wb["Performance" if kind == "datasheet" else "Duty"]
    if headers:
        for col, text in enumerate(headers, 1):
            ws.cell(5, col, text)
    for r, row in enumerate(table or [], 6):
        for col, v in enumerate(row, 1):
            ws.cell(r, col, v)
    wb.save(out)
    return out


# --- datasheet round trip ------------------------------------------------------------------------------

# (field, value, unit in the workbook, pint unit of the reference; None: no unit)
METRIC_PUMP = [
    ("displacement", 28.0, "cm^3/rev", "cm**3"),
    ("speed_min", 500, "rpm", "1/min"),
    ("speed_max", 3000, "rpm", "1/min"),
    ("speed_rated", 1500, "rpm", "1/min"),
    ("speed_min_high_pressure", 800, "rpm", "1/min"),
    ("high_pressure_threshold", 200, "bar", "bar"),
    ("pressure_continuous", 250, "bar", "bar"),
    ("pressure_intermittent", 280, "bar", "bar"),
    ("intermittent_max_duration", 20, "s", "s"),
    ("intermittent_max_share", 10, "%", "percent"),
    ("pressure_peak", 300, "bar", "bar"),
    ("inlet_pressure_min", 0.7, "bara", "bar"),
    ("inlet_pressure_max", 3.0, "bara", "bar"),
    ("viscosity_min", 10, "mm^2/s", "mm**2/s"),
    ("viscosity_max", 300, "mm^2/s", "mm**2/s"),
    ("viscosity_min_short", 8, "mm^2/s", "mm**2/s"),
    ("viscosity_max_cold_start", 1000, "mm^2/s", "mm**2/s"),
    ("temperature_min", -20, "degC", "degC"),
    ("temperature_max", 80, "degC", "degC"),
    ("torque_max", 150, "N*m", "N*m"),
    ("volumetric_efficiency", 0.95, "fraction", "dimensionless"),
    ("total_efficiency", 90, "%", "percent"),
    ("mass", 9.5, "kg", "kg"),
]
IMPERIAL_PUMP = [
    ("displacement", 1.71, "in^3/rev", "inch**3"),
    ("speed_min", 500, "rpm", "1/min"),
    ("speed_max", 3000, "rpm", "1/min"),
    ("speed_rated", 1800, "rpm", "1/min"),
    ("speed_min_high_pressure", 800, "rpm", "1/min"),
    ("high_pressure_threshold", 2900, "psi", "psi"),
    ("pressure_continuous", 3600, "psi", "psi"),
    ("pressure_intermittent", 4000, "psi", "psi"),
    ("intermittent_max_duration", 0.25, "min", "minute"),
    ("intermittent_max_share", 0.1, "fraction", "dimensionless"),
    ("pressure_peak", 4350, "psi", "psi"),
    ("inlet_pressure_min", 10, "psia", "psi"),
    ("inlet_pressure_max", 40, "psia", "psi"),
    ("viscosity_min", 10, "cSt", "centistokes"),
    ("viscosity_max", 300, "cSt", "centistokes"),
    ("viscosity_min_short", 8, "cSt", "centistokes"),
    ("viscosity_max_cold_start", 1000, "cSt", "centistokes"),
    ("temperature_min", -4, "degF", "degF"),
    ("temperature_max", 176, "degF", "degF"),
    ("torque_max", 110, "lbf*ft", "lbf*ft"),
    ("volumetric_efficiency", 95, "%", "percent"),
    ("total_efficiency", 0.9, "fraction", "dimensionless"),
    ("mass", 21, "lb", "lb"),
]
IDENTITY = {"supplier": ("Fenwhistle Fluidtech",), "model": ("KG-28 (invented)",),
            "source_note": ("invented test data",), "cleanliness": ("18/16/13",), "rotation": ("clockwise",),
            "teeth": (12,), "price": (420,), "noise": (72,)}


@pytest.mark.parametrize("rows", [METRIC_PUMP, IMPERIAL_PUMP], ids=["metric", "imperial"])
def test_datasheet_round_trip(tmp_path, rows):
    values = {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in rows}}
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx")
    ds = read_datasheet(path)
    for key, value, _, ref_unit in rows:
        assert getattr(ds, key) == pytest.approx(si(value, ref_unit), rel=1e-9), key
    assert (ds.supplier, ds.model, ds.cleanliness, ds.rotation, ds.teeth) == (
        "Fenwhistle Fluidtech", "KG-28 (invented)", "18/16/13", "clockwise", 12)
    assert ds.price == 420 and ds.noise == 72
    # each value remembers its cell: the template's defined name points at the same place
    wb = openpyxl.load_workbook(path)
    for key in ("displacement", "pressure_peak", "supplier"):
        sheet, coord = cell_of(wb, f"pump.{key}")
        where = ds.sources[key]
        assert (where.file, where.sheet, where.cell, where.field) == (str(path), sheet, coord, key)
    assert ds.performance is None


def test_performance_table_imperial(tmp_path):
    values = {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in IMPERIAL_PUMP},
              "performance_viscosity": (150, "cSt")}
    table = [[145, 12.0, 1.5, None, 1800], [1450, 11.6, 11.0, None, 1800], [2900, 11.2, 21.0, None, 1800]]
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx", table=table,
                headers=["pressure [psi]", "flow [gpm]", "input power [hp]", "torque [lbf*ft]", "speed [rpm]"])
    perf = read_datasheet(path).performance
    assert perf is not None and len(perf) == 3
    assert perf.pressure.tolist() == pytest.approx([si(p, "psi") for p, *_ in table])
    assert perf.flow.tolist() == pytest.approx([si(q, "gallon/minute") for _, q, *_ in table])
    assert perf.input_power.tolist() == pytest.approx([si(w, "hp") for *_, w, _, _ in table])
    assert perf.speed.tolist() == pytest.approx([30.0] * 3)  # 1800 rpm = 30 rev/s
    assert perf.viscosity.tolist() == pytest.approx([si(150, "centistokes")] * 3)
    assert perf.torque is None


def test_value_text_with_unit(tmp_path):
    values = {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in METRIC_PUMP}}
    values["pressure_peak"] = ("4350 psi", None)
    values["displacement"] = ("1.71 in^3/rev", "in^3/rev")  # the same unit twice is fine
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx")
    ds = read_datasheet(path)
    assert ds.pressure_peak == pytest.approx(si(4350, "psi"))
    assert ds.displacement == pytest.approx(si(1.71, "inch**3"))


# --- application round trip ----------------------------------------------------------------------------

SEGMENTS_METRIC = [["approach", 5, 50, 40, None, None, None],
                   ["press", 12, 250, 8, 1500, 55, 0.85],
                   ["return", 6, 30, 35, None, None, None],
                   ["idle", 20, 5, 0, None, None, None]]
SEGMENTS_IMPERIAL = [["approach", 5, 725, 10.5, None, None, None],
                     ["press", 12, 3600, 2.1, 1800, 131, 12.5],
                     ["return", 6, 435, 9.2, None, None, None]]
IMPERIAL_HEADERS = ["name", "duration [s]", "pressure [psi]", "flow [gpm]", "speed [rpm]", "temperature [degF]",
                    "inlet pressure [psia]"]


def machine(**extra):
    base = {"name": ("Press line 3 (invented)",), "drive_speed": (1500, "rpm"), "relief_setting": (280, "bar"),
            "overshoot": (10, "%"), "oil_viscosity_1": (46, "mm^2/s"), "oil_temperature_1": (40, "degC"),
            "oil_viscosity_2": (6.8, "mm^2/s"), "oil_temperature_2": (100, "degC"),
            "oil_density": (870, "kg/m^3"), "oil_temperature": (50, "degC"), "inlet_pressure": (0.9, "bara"),
            "cleanliness": ("17/15/12",), "cycles_per_hour": (60,), "hours_per_year": (4000,),
            "energy_price": (0.2,), "currency": ("EUR",), "motor_standard": ("IEC",),
            "flow_margin": (10, "%"), "pressure_margin": (5, "%"), "speed_margin": (0.05, "fraction"),
            "evaluation_years": (10,), "cold_start_temperature": (-10, "degC")}
    base.update(extra)
    return {k: v for k, v in base.items() if v is not None}


def test_application_round_trip_metric(tmp_path):
    path = fill(tmp_path / "t.xlsx", "application", machine(), tmp_path / "app.xlsx", table=SEGMENTS_METRIC)
    app = read_application(path)
    duty = app.duty
    assert duty.names == ("approach", "press", "return", "idle")
    assert duty.duration.tolist() == [5, 12, 6, 20]
    assert duty.pressure.tolist() == pytest.approx([si(r[2], "bar") for r in SEGMENTS_METRIC])
    assert duty.flow.tolist() == pytest.approx([si(r[3], "liter/minute") for r in SEGMENTS_METRIC])
    assert duty.speed.tolist() == pytest.approx([25.0] * 4)  # 1500 rpm = 25 rev/s
    assert duty.temperature.tolist() == pytest.approx([si(50, "degC"), si(55, "degC"), si(50, "degC"),
                                                       si(50, "degC")])
    assert duty.inlet_pressure.tolist() == pytest.approx([0.9e5, 0.85e5, 0.9e5, 0.9e5])
    assert duty.rows[1].sheet == "Duty" and duty.rows[1].cell == "A7:G7" and duty.rows[1].field == "press"
    assert duty.columns["pressure"] == "C" and duty.source == "segments"
    assert app.relief_setting == pytest.approx(si(280, "bar"))
    assert (app.overshoot, app.flow_margin, app.speed_margin) == pytest.approx((0.10, 0.10, 0.05))
    assert app.speed_min == app.speed_max == pytest.approx(25.0)
    assert (app.oil.nu1, app.oil.t1, app.oil.nu2, app.oil.t2) == pytest.approx(
        (46e-6, si(40, "degC"), 6.8e-6, si(100, "degC")))
    assert app.cold_start_temperature == pytest.approx(si(-10, "degC"))
    assert (app.cycles_per_hour, app.hours_per_year, app.energy_price, app.currency, app.motor_standard) == (
        60, 4000, 0.2, "EUR", "IEC")
    wb = openpyxl.load_workbook(path)
    assert app.sources["relief_setting"].cell == cell_of(wb, "machine.relief_setting")[1]
    assert app.sources["speed_min"].cell == cell_of(wb, "machine.drive_speed")[1]


def test_application_round_trip_imperial_with_grade(tmp_path):
    from chemicals.viscosity import viscosity_index  # ASTM D2270, outside reference

    values = machine(relief_setting=(4000, "psi"), drive_speed=(1800, "rpm"), oil_viscosity_1=None,
                     oil_temperature_1=None, oil_viscosity_2=None, oil_temperature_2=None,
                     oil_grade=("46",), oil_viscosity_index=(140,), oil_density=(54.3, "lb/ft^3"),
                     oil_temperature=(122, "degF"), inlet_pressure=(13, "psia"), motor_standard=("NEMA",))
    path = fill(tmp_path / "t.xlsx", "application", values, tmp_path / "app.xlsx", table=SEGMENTS_IMPERIAL,
                headers=IMPERIAL_HEADERS)
    app = read_application(path)
    duty = app.duty
    assert duty.pressure.tolist() == pytest.approx([si(r[2], "psi") for r in SEGMENTS_IMPERIAL])
    assert duty.flow.tolist() == pytest.approx([si(r[3], "gallon/minute") for r in SEGMENTS_IMPERIAL])
    assert duty.temperature.tolist() == pytest.approx([si(122, "degF"), si(131, "degF"), si(122, "degF")])
    assert duty.inlet_pressure.tolist() == pytest.approx([si(13, "psi"), si(12.5, "psi"), si(13, "psi")])
    assert app.relief_setting == pytest.approx(si(4000, "psi"))
    assert app.oil.density_15 == pytest.approx(si(54.3, "lb/ft**3"))
    assert app.oil.grade == 46 and app.oil.viscosity_index == 140
    # ISO 3448: VG 46 is 46 mm²/s at 40 °C; the 100 °C point gives back VI 140 (ASTM D2270)
    assert app.oil.nu1 == pytest.approx(46e-6) and app.oil.t1 == pytest.approx(313.15)
    assert viscosity_index(app.oil.nu1, app.oil.nu2) == pytest.approx(140, abs=0.5)
    assert app.motor_standard == "NEMA"


def test_application_with_series(tmp_path):
    log = tmp_path / "logs" / "run.csv"
    log.parent.mkdir()
    log.write_text("time [s],pressure [psi],flow [gpm]\n0,1000,10\n0.5,2000,9\n1.5,3000,8\n1.7,1500,9\n")
    values = machine(duty_series=("logs/run.csv",))
    path = fill(tmp_path / "t.xlsx", "application", values, tmp_path / "app.xlsx")
    duty = read_application(path).duty
    assert duty.source == "series" and len(duty) == 4
    # sample held until the next; the last for the median step (0.5, 1.0, 0.2 -> 0.5)
    assert duty.duration.tolist() == pytest.approx([0.5, 1.0, 0.2, 0.5])
    assert duty.speed.tolist() == pytest.approx([25.0] * 4)  # drive_speed 1500 rpm
    assert duty.inlet_pressure.tolist() == pytest.approx([0.9e5] * 4)
    # segments and a series at once are refused
    both = fill(tmp_path / "t2.xlsx", "application", values, tmp_path / "both.xlsx", table=SEGMENTS_METRIC)
    with pytest.raises(InputError, match="both"):
        read_application(both)


# --- templates -----------------------------------------------------------------------------------------


def _structure(path: Path) -> dict:
    wb = openpyxl.load_workbook(path)
    out: dict = {"sheets": wb.sheetnames,
                 "names": sorted((n, str(d.attr_text)) for n, d in wb.defined_names.items())}
    for ws in wb:
        out[ws.title] = {
            "cells": [(c.coordinate, c.value, c.fill.fgColor.rgb if c.fill.fill_type else None)
                      for row in ws.iter_rows() for c in row if c.value is not None or c.fill.fill_type],
            "validations": sorted((str(v.sqref), v.formula1, v.errorStyle) for v in ws.data_validations.dataValidation),
            "comments": sorted((c.coordinate, c.comment.text) for row in ws.iter_rows() for c in row if c.comment),
            "merged": sorted(str(r) for r in ws.merged_cells.ranges),
        }
    return out


@pytest.mark.parametrize("kind", ["datasheet", "application"])
def test_committed_templates_match_the_generator(tmp_path, kind):
    fresh = write_template(kind, tmp_path / f"{kind}.xlsx")
    committed = ROOT / "workbooks" / f"{kind}-template.xlsx"
    assert _structure(fresh) == _structure(committed), f"regenerate: sheetpump template {kind} -o {committed} --force"


def test_template_features(tmp_path):
    path = write_template("datasheet", tmp_path / "d.xlsx")
    wb = openpyxl.load_workbook(path)
    ws = wb["Pump"]
    assert ws["A2"].value == SAFETY_CAUTION
    _sheet, coord = cell_of(wb, "pump.displacement")
    cell = ws[coord]
    assert cell.fill.fgColor.rgb.endswith("FFF6D5")  # the input fill shared with sheetpump's writer
    assert "displacement" in cell.comment.text.lower()
    unit_rules = [v for v in ws.data_validations.dataValidation if f"C{cell.row}" in str(v.sqref)]
    assert unit_rules and "in^3/rev" in unit_rules[0].formula1
    assert {f"pump.{f.key}" for f in DATASHEET_FIELDS} <= set(wb.defined_names)
    app = openpyxl.load_workbook(write_template("application", tmp_path / "a.xlsx"))
    assert {f"machine.{f.key}" for f in APPLICATION_FIELDS} <= set(app.defined_names)
    assert app["Duty"]["A2"].value == SAFETY_CAUTION


def test_every_offered_unit_is_read():
    from sheetpump.units import unit_factor

    for kind, units in UNITS.items():
        for unit in units:
            unit_factor(unit, kind)  # raises on a unit sheetpump does not know


def test_template_command(tmp_path, capsys):
    target = tmp_path / "mine.xlsx"
    assert main(["template", "application", "-o", str(target)]) == 0
    assert openpyxl.load_workbook(target).sheetnames == ["Machine", "Duty"]
    assert main(["template", "application", "-o", str(target)]) == 2  # never overwrites by accident
    assert "exists" in capsys.readouterr().err
    assert main(["template", "datasheet", "-o", str(target), "--force"]) == 0
    assert openpyxl.load_workbook(target).sheetnames == ["Pump", "Performance"]


# --- refusals ------------------------------------------------------------------------------------------


def good_pump() -> dict:
    return {**IDENTITY, **{k: (v, unit) for k, v, unit, _ in METRIC_PUMP}}


def where_of(tmp_path, key, col="B"):
    wb = openpyxl.load_workbook(write_template("datasheet", tmp_path / "probe.xlsx"))
    row = wb["Pump"][cell_of(wb, f"pump.{key}")[1]].row
    return f"{col}{row}"


@pytest.mark.parametrize(("change", "field", "col", "message"), [
    ({"displacement": (None,)}, "displacement", "B", "required"),
    ({"displacement": ("about 28",)}, "displacement", "B", "text where"),
    ({"displacement": (28, "flurbs")}, "displacement", "C", "unknown unit"),
    ({"displacement": (28, "bar")}, "displacement", "C", "not a displacement"),
    ({"displacement": (-28, "cm^3/rev")}, "displacement", "B", "greater than zero"),
    ({"speed_max": (0, "rpm")}, "speed_max", "B", "greater than zero"),
    ({"pressure_peak": ("inf",)}, "pressure_peak", "B", "text where"),
    ({"mass": (True, "kg")}, "mass", "B", "true/false"),
    ({"intermittent_max_share": (150, "%")}, "intermittent_max_share", "B", "100 %"),
    ({"intermittent_max_duration": (None,)}, "intermittent_max_duration", "B", "longest single stretch"),
    ({"intermittent_max_share": (None,)}, "intermittent_max_share", "B", "share of the cycle"),
    ({"pressure_intermittent": (None,)}, "pressure_intermittent", "B", "without an intermittent"),
    ({"pressure_peak": (240, "bar"), "pressure_intermittent": (245, "bar")}, "pressure_peak", "B",
     "below the continuous"),
    ({"pressure_intermittent": (320, "bar")}, "pressure_intermittent", "B", "at most at the peak"),
    ({"pressure_intermittent": (250, "bar")}, "pressure_intermittent", "B", "above the continuous"),
    ({"speed_min": (3500, "rpm")}, "speed_max", "B", "minimum speed is not below"),
    ({"high_pressure_threshold": (None,)}, "high_pressure_threshold", "B", "needs the pressure"),
    ({"cleanliness": ("clean",)}, "cleanliness", "B", "ISO 4406"),
    ({"rotation": ("sideways",)}, "rotation", "B", "not one of"),
    ({"teeth": (11.5,)}, "teeth", "B", "whole number"),
    ({"pressure_peak": ("300 psi", "bar")}, "pressure_peak", "B", "unit cell says"),
    ({"temperature_min": (-300, "degC")}, "temperature_min", "B", "absolute zero"),
])
def test_datasheet_refusals_name_the_cell(tmp_path, change, field, col, message):
    values = {**good_pump(), **change}
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx")
    with pytest.raises(InputError, match=message) as info:
        read_datasheet(path)
    where = info.value.where
    assert (where.file, where.sheet, where.cell, where.field) == (str(path), "Pump", where_of(tmp_path, field, col),
                                                                  field)


def test_duplicated_and_unknown_fields(tmp_path):
    path = fill(tmp_path / "t.xlsx", "datasheet", good_pump(), tmp_path / "pump.xlsx")
    wb = openpyxl.load_workbook(path)
    ws = wb["Pump"]
    row = ws.max_row + 1
    ws.cell(row, 1, "speed_max")
    ws.cell(row, 2, 2500)
    wb.save(tmp_path / "dup.xlsx")
    with pytest.raises(InputError, match="twice") as info:
        read_datasheet(tmp_path / "dup.xlsx")
    assert (info.value.where.sheet, info.value.where.cell, info.value.where.field) == ("Pump", f"A{row}", "speed_max")
    ws.cell(row, 1, "speed_maxx")
    wb.save(tmp_path / "typo.xlsx")
    with pytest.raises(InputError, match=r"unknown field.*speed_max") as info:
        read_datasheet(tmp_path / "typo.xlsx")
    assert info.value.where.cell == f"A{row}"


def test_merged_value_cell_is_refused(tmp_path):
    path = fill(tmp_path / "t.xlsx", "datasheet", good_pump(), tmp_path / "pump.xlsx")
    wb = openpyxl.load_workbook(path)
    coord = cell_of(wb, "pump.displacement")[1]
    row = wb["Pump"][coord].row
    wb["Pump"].merge_cells(f"B{row}:C{row}")
    wb.save(tmp_path / "merged.xlsx")
    with pytest.raises(InputError, match="merged") as info:
        read_datasheet(tmp_path / "merged.xlsx")
    assert info.value.where.cell == coord


def test_rows_may_be_sorted(tmp_path):
    # The reader finds fields by the words in the field column, not by row number.
    path = fill(tmp_path / "t.xlsx", "datasheet", good_pump(), tmp_path / "pump.xlsx")
    wb = openpyxl.load_workbook(path)
    ws = wb["Pump"]
    rows = [[c.value for c in r] for r in ws.iter_rows(min_row=6, max_row=ws.max_row, max_col=3)]
    rows.sort(key=lambda r: str(r[0]), reverse=True)
    for r, row in enumerate(rows, 6):
        for c, v in enumerate(row, 1):
            ws.cell(r, c).value = v
    wb.save(tmp_path / "sorted.xlsx")
    ds = read_datasheet(tmp_path / "sorted.xlsx")
    assert ds.displacement == pytest.approx(28e-6) and ds.pressure_peak == pytest.approx(300e5)


def _script_datasheet(path: Path, displacement_formula: str, cached: float | None) -> Path:
    """A datasheet written by a script (no template, no defined names), displacement as a formula."""
    book = xlsxwriter.Workbook(path)
    ws = book.add_worksheet("Pump")
    ws.write_row(0, 0, ["field", "value", "unit", "help"])
    rows = [("supplier", "Fenwhistle Fluidtech", ""), ("model", "KG-28", ""), ("displacement", None, "cm^3/rev"),
            ("speed_min", 500, "rpm"), ("speed_max", 3000, "rpm"), ("pressure_continuous", 250, "bar"),
            ("pressure_peak", 300, "bar")]
    for r, (key, value, unit) in enumerate(rows, 1):
        ws.write(r, 0, key)
        if key == "displacement":
            if cached is None:
                ws.write_formula(r, 1, displacement_formula)
            else:
                ws.write_formula(r, 1, displacement_formula, None, cached)
        else:
            ws.write(r, 1, value)
        ws.write(r, 2, unit)
    book.close()
    return path


def test_formula_with_cached_value(tmp_path):
    ds = read_datasheet(_script_datasheet(tmp_path / "f.xlsx", "=14*2", 28))
    assert ds.displacement == pytest.approx(28e-6)
    assert ds.sources["displacement"].cell == "B4"


def test_formula_without_value_is_refused_or_evaluated(tmp_path, monkeypatch):
    path = tmp_path / "f.xlsx"
    wb = openpyxl.load_workbook(_script_datasheet(path, "=14*2", 28))
    wb["Pump"]["B4"] = "=14*2"  # openpyxl stores the formula without a value, as scripts do
    wb.save(path)
    monkeypatch.setitem(sys.modules, "sheetpump.recalc", None)  # no evaluator importable
    with pytest.raises(InputError, match="no stored value") as info:
        read_datasheet(path)
    assert (info.value.where.sheet, info.value.where.cell) == ("Pump", "B4")
    fake = types.ModuleType("sheetpump.recalc")
    fake.evaluate_workbook = lambda p: {("Pump", "B4"): 28.0}
    monkeypatch.setitem(sys.modules, "sheetpump.recalc", fake)
    assert read_datasheet(path).displacement == pytest.approx(28e-6)


def test_formula_without_value_evaluated_by_recalc(tmp_path):
    recalc = pytest.importorskip("sheetpump.recalc")
    path = tmp_path / "f.xlsx"
    wb = openpyxl.load_workbook(_script_datasheet(path, "=14*2", 28))
    wb["Pump"]["B4"] = "=14*2"
    wb.save(path)
    assert recalc.evaluate_workbook(path)[("Pump", "B4")] == 28  # 14 × 2, by the headless evaluator
    assert read_datasheet(path).displacement == pytest.approx(28e-6)


def test_formula_error_value_is_refused(tmp_path):
    ds_path = _script_datasheet(tmp_path / "f.xlsx", "=1/0", None)
    wb = openpyxl.load_workbook(ds_path)
    wb["Pump"]["B4"] = "#DIV/0!"  # a cached error, as a spreadsheet stores it
    wb.save(ds_path)
    with pytest.raises(InputError, match="DIV/0") as info:
        read_datasheet(ds_path)
    assert info.value.where.cell == "B4"


@pytest.mark.parametrize(("table", "changes", "cell", "message"), [
    ([], {}, "A6", "duty is empty"),
    ([["a", 5, 50, 40, None, None, None], ["b", -1, 50, 40, None, None, None]], {}, "B7", "greater than zero"),
    ([["a", 5, "lots", 40, None, None, None]], {}, "C6", "text where"),
    ([["a", 5, 50, 40, None, None, None]], {"drive_speed": None}, "E6", "drive_speed"),
    ([["a", 5, 50, -1, None, None, None]], {}, "D6", "negative"),
])
def test_duty_refusals(tmp_path, table, changes, cell, message):
    path = fill(tmp_path / "t.xlsx", "application", machine(**changes), tmp_path / "app.xlsx", table=table)
    with pytest.raises(InputError, match=message) as info:
        read_application(path)
    assert (info.value.where.sheet, info.value.where.cell) == ("Duty", cell)


def test_duty_header_with_wrong_unit(tmp_path):
    headers = ["name", "duration [s]", "pressure [L/min]"]
    path = fill(tmp_path / "t.xlsx", "application", machine(), tmp_path / "app.xlsx", table=SEGMENTS_METRIC,
                headers=headers)
    with pytest.raises(InputError, match="not a pressure") as info:
        read_application(path)
    assert (info.value.where.sheet, info.value.where.cell) == ("Duty", "C5")


@pytest.mark.parametrize(("changes", "field", "message"), [
    ({"oil_grade": ("46",)}, "oil_grade", "not both"),
    ({"oil_viscosity_2": None}, "oil_viscosity_2", "incomplete"),
    ({"oil_viscosity_2": (60, "mm^2/s")}, "oil_viscosity_2", "fall"),
    ({"relief_setting": None}, "relief_setting", "required"),
    ({"drive_speed_min": (1000, "rpm")}, "drive_speed_max", "both its lowest"),
    ({"overshoot": (-5, "%")}, "overshoot", "negative"),
    ({"motor_standard": ("JIS",)}, "motor_standard", "not one of"),
    ({"cycles_per_hour": (60, "1/min")}, "cycles_per_hour", "unit"),
])
def test_machine_refusals(tmp_path, changes, field, message):
    path = fill(tmp_path / "t.xlsx", "application", machine(**changes), tmp_path / "app.xlsx",
                table=SEGMENTS_METRIC)
    with pytest.raises(InputError, match=message) as info:
        read_application(path)
    assert info.value.where.sheet == "Machine" and info.value.where.field == field
    wb = openpyxl.load_workbook(path)
    row = wb["Machine"][cell_of(wb, f"machine.{field}")[1]].row
    assert info.value.where.cell in (f"B{row}", f"C{row}")


# --- the safe opener -----------------------------------------------------------------------------------


def test_refuses_files_that_are_not_workbooks(tmp_path):
    csv = tmp_path / "log.xlsx"
    csv.write_text("time [s],pressure [bar]\n0,1\n")
    with pytest.raises(InputError, match="text \\(CSV\\) file"):
        check_file(csv)
    ole = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\x00" * 600
    (tmp_path / "old.xlsx").write_bytes(ole + b"Workbook".decode().encode("utf-16-le"))
    with pytest.raises(InputError, match="old binary Excel"):
        check_file(tmp_path / "old.xlsx")
    (tmp_path / "locked.xlsx").write_bytes(ole + "EncryptionInfo".encode("utf-16-le"))
    with pytest.raises(InputError, match="password"):
        read_datasheet(tmp_path / "locked.xlsx")
    (tmp_path / "broken.xlsx").write_bytes(b"PK\x03\x04" + b"\x13" * 200)
    with pytest.raises(InputError, match="damaged"):
        check_file(tmp_path / "broken.xlsx")
    with zipfile.ZipFile(tmp_path / "doc.xlsx", "w") as z:
        z.writestr("word/document.xml", "<w/>")
    with pytest.raises(InputError, match="not an Excel workbook"):
        check_file(tmp_path / "doc.xlsx")
    with pytest.raises(InputError, match="not found"):
        check_file(tmp_path / "missing.xlsx")


def test_refuses_zip_bomb_and_entities(tmp_path):
    template = write_template("datasheet", tmp_path / "d.xlsx")
    bomb = tmp_path / "bomb.xlsx"
    with zipfile.ZipFile(template) as src, zipfile.ZipFile(bomb, "w", zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            dst.writestr(info, src.read(info))
        dst.writestr("xl/media/zeros.bin", b"\x00" * (64 << 20))  # 64 MiB of zeros: ~1000:1
    with pytest.raises(InputError, match="zip bomb"):
        read_datasheet(bomb)
    laughs = tmp_path / "laughs.xlsx"
    with zipfile.ZipFile(template) as src, zipfile.ZipFile(laughs, "w", zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            data = src.read(info)
            if info.filename == "xl/sharedStrings.xml":
                data = data.replace(b"?>", b'?><!DOCTYPE s [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;">]>', 1)
            dst.writestr(info, data)
    with pytest.raises(InputError, match="entit"):
        read_datasheet(laughs)


def test_openpyxl_parses_through_defusedxml():
    from openpyxl.xml import DEFUSEDXML

    assert DEFUSEDXML


def test_xlsm_is_read(tmp_path):
    path = fill(tmp_path / "t.xlsx", "datasheet", good_pump(), tmp_path / "pump.xlsx")
    macro = tmp_path / "pump.xlsm"
    macro.write_bytes(path.read_bytes())
    assert read_datasheet(macro).displacement == pytest.approx(28e-6)
    assert open_workbook(macro).sheetnames == ["Pump", "Performance"]


def test_speed_min_above_max_message_is_clear(tmp_path):
    values = {**good_pump(), "speed_min": (3500, "rpm")}
    path = fill(tmp_path / "t.xlsx", "datasheet", values, tmp_path / "pump.xlsx")
    with pytest.raises(InputError) as info:
        read_datasheet(path)
    text = str(info.value)
    assert str(path) in text and "Pump!" in text and "(speed_max)" in text


def test_settings_left_empty_are_reported_as_defaulted(tmp_path):
    values = machine(cycles_per_hour=None, energy_price=None)
    path = fill(tmp_path / "t.xlsx", "application", values, tmp_path / "app.xlsx", table=SEGMENTS_METRIC)
    app = read_application(path)
    assert "cycles_per_hour" in app.defaulted and "energy_price" in app.defaulted
    assert "hours_per_year" not in app.defaulted
