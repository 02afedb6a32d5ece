"""Ordinary edits of the input workbooks that used to crash or be ignored (issue 11 §3).

Defined names broken by a deleted row, a value above a table's header, a duty longer than 20,000 rows,
TRUE/FALSE in a number cell. The field-by-field corpus of edits is ``tests/mutations``. Every refusal
is one line, exit 2, naming the file and the cell or field; the demo data is invented.
"""

from __future__ import annotations

import json
from pathlib import Path

import openpyxl
import pytest

from sheetpump import demo
from sheetpump.cli import main
from sheetpump.files import sha256
from sheetpump.workbooks import read_application, read_datasheet, tables
from sheetpump.workbooks.templates import DUTY_COLUMNS, write_template

DEMO = Path(__file__).resolve().parents[1] / "workbooks" / "demo"
APP = DEMO / "baling-press.xlsx"
DATASHEET = DEMO / "marrow-tepp-mt-g28.xlsx"


def refused(argv: list[str], capsys: pytest.CaptureFixture[str]) -> str:
    """Run a command that must refuse its input: the one error line."""
    code = main(argv)
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("sheetpump: error: "), lines
    return lines[0]


def good_application(path: Path, duty: list[list[object]], **machine: object) -> Path:
    """The demo's application with another duty table (and any machine fields changed)."""
    fields = {**demo.MACHINE, **machine}
    return write_template("application", path, fields, duty, [c.header for c in DUTY_COLUMNS])


def edited(src: Path, dst: Path, sheet: str, cells: dict[str, object]) -> Path:
    wb = openpyxl.load_workbook(src)
    for coord, value in cells.items():
        wb[sheet][coord] = value
    wb.save(dst)
    return dst


def row_of(path: Path, sheet: str, key: str) -> int:
    ws = openpyxl.load_workbook(path, read_only=True)[sheet]
    return next(i for i, (a,) in enumerate(ws.iter_rows(max_col=1, values_only=True), 1) if a == key)


# ------------------------------------------------------------------------------------- defined names


@pytest.mark.parametrize("broken", ["#REF!", "'Pump'!#REF!", "'Pump'!$B$#REF!", "'Pump'!$B$", "'Pump'!$B:$B",
                                    "'Pump'!$B$1048577"])
def test_a_broken_defined_name_of_a_deleted_row_never_matters(broken, tmp_path, capsys):
    """The row of `model` deleted, its name broken in any way: refused as an empty required value."""
    row = row_of(DATASHEET, "Pump", "model")
    wb = openpyxl.load_workbook(DATASHEET)
    wb["Pump"].delete_rows(row)
    wb.defined_names["pump.model"].attr_text = broken
    wb.save(tmp_path / "pump.xlsx")
    line = refused(["check", "--app", str(APP), str(tmp_path / "pump.xlsx")], capsys)
    assert "(model): required value is missing" in line and "no row 'model'" in line


def test_a_name_left_on_the_next_fields_row_is_ignored(tmp_path):
    """A script deleted `price`: pump.price now points at the `mass` row; price is not given, not 6.2."""
    row = row_of(DATASHEET, "Pump", "price")
    wb = openpyxl.load_workbook(DATASHEET)
    wb["Pump"].delete_rows(row)
    wb.save(tmp_path / "pump.xlsx")
    assert wb.defined_names["pump.price"].attr_text.endswith(f"${row}")  # left where it was
    pump = read_datasheet(tmp_path / "pump.xlsx")
    assert pump.price is None and pump.mass == pytest.approx(6.2)  # the demo's 6.2 kg stays the mass


def test_a_row_that_lost_its_word_is_still_found_by_its_name(tmp_path):
    """The documented fallback: column A emptied, the value found through pump.displacement."""
    row = row_of(DATASHEET, "Pump", "displacement")
    path = edited(DATASHEET, tmp_path / "pump.xlsx", "Pump", {f"A{row}": None})
    pump = read_datasheet(path)
    assert pump.displacement == pytest.approx(28e-6, rel=1e-12)  # 28 cm^3/rev in m^3/rev
    assert pump.sources["displacement"].cell == f"B{row}"


# ---------------------------------------------------------------------------------------------- tables


def test_a_segment_above_the_duty_header_is_refused(tmp_path, capsys):
    app = edited(APP, tmp_path / "app.xlsx", "Duty", {"A4": "warm-up", "B4": 30, "C4": 20, "D4": 5})
    before = sha256(app)
    line = refused(["check", "--app", str(app), str(DATASHEET)], capsys)
    assert "Duty!B4" in line and "above the header row (row 5)" in line
    assert sha256(app) == before


def test_a_point_above_the_performance_header_is_refused(tmp_path, capsys):
    pump = edited(DATASHEET, tmp_path / "pump.xlsx", "Performance", {"A4": "120 bar", "B4": 40})
    line = refused(["check", "--app", str(APP), str(pump)], capsys)
    assert "Performance!A4" in line


def test_a_note_with_one_number_above_the_header_is_no_segment(tmp_path):
    app = edited(APP, tmp_path / "app.xlsx", "Duty", {"A4": "revision 3"})
    app = edited(app, tmp_path / "app2.xlsx", "Duty", {"B4": 2026})
    assert len(read_application(app).duty.duration) == 7


def test_the_demo_top_rows_are_no_segments():
    assert len(read_application(APP).duty.duration) == 7  # the demo's seven segments, none refused


@pytest.mark.slow
def test_every_row_of_a_long_duty_is_checked(tmp_path, capsys):
    """25,000 segments, the last at 400 bar: read whole, so the peak rating (280 bar) fails there."""
    rows = [[f"s{i}", 1, 100, 10, None, 50, None] for i in range(24_999)] + [["last", 1, 400, 10, None, 50, None]]
    # a 25,000 s cycle: one cycle an hour at most (the demo press runs 90 of its 40 s cycles)
    app = good_application(tmp_path / "long.xlsx", duty=rows, cycles_per_hour=(0.1,))
    code = main(["check", "--app", str(app), str(DATASHEET), "--format", "json"])
    report = json.loads(capsys.readouterr().out)
    assert code == 1
    peak = next(f for f in report["pumps"][0]["findings"] if f["rule"] == "pressure.peak")
    assert peak["failed"] and peak["segment"] == "last"
    assert peak["measured"]["value"] == pytest.approx(400)  # bar, as entered
    assert peak["application_where"]["cell"] == "A25005:G25005"  # header on row 5, 25,000 rows below


def test_a_table_beyond_the_bound_is_refused_naming_the_limit(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(tables, "MAX_TABLE_ROWS", 50)  # the bound, scaled down: the rule is the same
    app = good_application(tmp_path / "app.xlsx", duty=[["s", 1, 100, 10, None, 50, None]] * 51)
    line = refused(["check", "--app", str(app), str(DATASHEET)], capsys)
    assert "sheet 'Duty'" in line and "more than 50 rows" in line and "duty_series" in line


def test_a_table_at_the_bound_is_read(tmp_path, monkeypatch):
    monkeypatch.setattr(tables, "MAX_TABLE_ROWS", 60)  # the template's 60 rows are within it
    app = good_application(tmp_path / "app.xlsx", duty=[["s", 1, 100, 10, None, 50, None]] * 60)
    assert len(read_application(app).duty.duration) == 60


# -------------------------------------------------------------------------------------------- booleans


@pytest.mark.parametrize(("sheet", "column", "field"), [("Duty", "D", "flow"), ("Duty", "B", "duration"),
                                                        ("Duty", "F", "temperature")])
def test_true_in_a_duty_number_cell_is_refused(sheet, column, field, tmp_path, capsys):
    app = edited(APP, tmp_path / "app.xlsx", sheet, {f"{column}7": True})
    line = refused(["check", "--app", str(app), str(DATASHEET)], capsys)
    assert f"Duty!{column}7 ({field})" in line and "true/false" in line


def test_false_in_a_performance_cell_is_refused(tmp_path, capsys):
    pump = edited(DATASHEET, tmp_path / "pump.xlsx", "Performance", {"B6": False})
    line = refused(["check", "--app", str(APP), str(pump)], capsys)
    assert "Performance!B6 (flow)" in line and "true/false" in line


@pytest.mark.parametrize("key", ["displacement", "price", "teeth", "intermittent_max_share"])
def test_true_in_a_datasheet_number_field_is_refused(key, tmp_path, capsys):
    row = row_of(DATASHEET, "Pump", key)
    pump = edited(DATASHEET, tmp_path / "pump.xlsx", "Pump", {f"B{row}": True})
    line = refused(["check", "--app", str(APP), str(pump)], capsys)
    assert f"Pump!B{row} ({key})" in line and "true/false" in line
