"""Measured time series as a duty: CSV and xlsx, irregular sampling, units in headers, every refusal.

The outside reference for conversions is an independent pint registry. The log data is invented.
"""

from __future__ import annotations

import datetime as dt

import numpy as np
import openpyxl
import pint
import pytest
import xlsxwriter

from sheetpump.errors import InputError
from sheetpump.workbooks.time_series import parse_header, read_series

REF = pint.UnitRegistry()


def si(values, unit):
    return REF.Quantity(np.asarray(values, float), unit).to_base_units().magnitude


# irregular sampling: steps 0.5, 1.0, 0.25, 0.25 s
TIMES = [0.0, 0.5, 1.5, 1.75, 2.0]
PSI = [500.0, 2500.0, 3600.0, 3000.0, 800.0]
GPM = [10.0, 9.5, 2.0, 2.5, 10.0]
DEGF = [120.0, 121.0, 122.0, 123.0, 124.0]


def check_imperial(duty):
    assert duty.source == "series" and len(duty) == 5
    assert duty.start.tolist() == TIMES
    # each sample held until the next; the last one for the median step (of 0.5, 1, 0.25, 0.25: 0.375)
    assert duty.duration.tolist() == pytest.approx([0.5, 1.0, 0.25, 0.25, 0.375])
    assert duty.pressure == pytest.approx(si(PSI, "psi"))
    assert duty.flow == pytest.approx(si(GPM, "gallon/minute"))
    assert duty.temperature == pytest.approx(REF.Quantity(np.array(DEGF), REF.degF).to(REF.kelvin).magnitude)
    assert duty.speed == pytest.approx([30.0] * 5)  # 1800 rpm = 30 rev/s
    assert duty.inlet_pressure == pytest.approx(si([14.0] * 5, "psi"))


def test_csv_irregular_imperial_any_column_order(tmp_path):
    path = tmp_path / "log.csv"
    lines = ["flow [gpm],logger channel 7,time [s],temperature [degF],pressure [psi],speed [rpm],"
             "inlet pressure [psia]"]
    for t, p, q, f in zip(TIMES, PSI, GPM, DEGF, strict=True):
        lines.append(f"{q},x,{t},{f},{p},1800,14")
    path.write_text("\n".join(lines) + "\n")
    duty = read_series(path)
    check_imperial(duty)
    assert duty.columns == {"time": "C", "pressure": "E", "flow": "A", "speed": "F", "temperature": "D",
                            "inlet_pressure": "G"}


def test_xlsx_irregular_imperial(tmp_path):
    path = tmp_path / "log.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "run 1"
    ws.append(["time [s]", "pressure [psi]", "flow [gpm]", "speed [rpm]", "temperature [degF]",
               "inlet pressure [psia]"])
    for t, p, q, f in zip(TIMES, PSI, GPM, DEGF, strict=True):
        ws.append([t, p, q, 1800, f, 14])
    wb.create_sheet("notes")["A1"] = "not the log"
    wb.save(path)
    duty = read_series(path)
    check_imperial(duty)
    assert duty.where.sheet == "run 1"


def test_xlsx_named_sheet_datetimes_and_defaults(tmp_path):
    path = tmp_path / "log.xlsx"
    book = xlsxwriter.Workbook(path)
    book.add_worksheet("summary").write(0, 0, "nothing here")
    ws = book.add_worksheet("log")
    stamp = book.add_format({"num_format": "yyyy-mm-dd hh:mm:ss.000"})
    ws.write_row(0, 0, ["time [s]", "pressure [bar]", "flow [L/min]"])
    t0 = dt.datetime(2024, 3, 1, 8, 0, 0)
    for i, (s, p) in enumerate([(0, 100), (2, 200), (2.5, 150)], 1):
        ws.write_datetime(i, 0, t0 + dt.timedelta(seconds=s), stamp)
        ws.write_row(i, 1, [p, 40])
    book.close()
    duty = read_series(path, sheet="log", defaults={"speed": 25.0, "temperature": 323.15, "inlet_pressure": 9e4})
    assert duty.start == pytest.approx([0, 2, 2.5], abs=1e-3)
    assert duty.duration == pytest.approx([2, 0.5, 1.25], abs=1e-3)
    assert duty.pressure == pytest.approx(si([100, 200, 150], "bar"))
    assert duty.speed.tolist() == [25.0] * 3


def test_semicolon_csv_with_decimal_commas(tmp_path):
    path = tmp_path / "log.csv"
    path.write_text("time [s];pressure [bar];flow [L/min]\n0;12,5;40\n0,5;250;8,5\n1;30;35\n", encoding="utf-8")
    duty = read_series(path, defaults={"speed": 25.0, "temperature": 323.15, "inlet_pressure": 9e4})
    assert duty.pressure == pytest.approx(si([12.5, 250, 30], "bar"))
    assert duty.flow == pytest.approx(si([40, 8.5, 35], "liter/minute"))


def test_header_words():
    assert parse_header("Inlet  Pressure [psia]") == ("inlet pressure", "psia")
    assert parse_header("time[ms]") == ("time", "ms")


def write_csv(tmp_path, rows, header="time [s],pressure [bar],flow [L/min],speed [rpm],temperature [degC],"
                                     "inlet pressure [bara]"):
    path = tmp_path / "log.csv"
    path.write_text(header + "\n" + "\n".join(",".join(str(v) for v in r) for r in rows) + "\n")
    return path


GOOD = [[0, 100, 40, 1500, 50, 0.9], [1, 200, 40, 1500, 50, 0.9], [2, 150, 40, 1500, 50, 0.9],
        [3, 150, 40, 1500, 50, 0.9]]


@pytest.mark.parametrize(("rows", "header", "cell", "message"), [
    ([GOOD[0], GOOD[2], GOOD[1], GOOD[3]], None, "A4", "backwards"),
    ([GOOD[0], GOOD[1], GOOD[1], GOOD[3]], None, "A4", "repeats"),
    ([GOOD[0], GOOD[1], GOOD[2], [60, 150, 40, 1500, 50, 0.9]], None, "A5", "gap"),
    ([GOOD[0], [1, "", 40, 1500, 50, 0.9], GOOD[2]], None, "B3", "empty cell"),
    ([GOOD[0], [1, "high", 40, 1500, 50, 0.9], GOOD[2]], None, "B3", "where a number belongs"),
    ([GOOD[0], [1, 100, -4, 1500, 50, 0.9], GOOD[2]], None, "C3", "negative"),
    ([GOOD[0], [1, 100, 4, 1500, 50, 0]], None, "F3", "absolute"),
    ([r[:3] for r in GOOD], "time [s],pressure [L/min],flow [L/min]", "B1", "not a pressure"),
    ([r[:3] for r in GOOD], "time [s],pressure [bar],flow [flurbs]", "C1", "unknown unit"),
    ([r[:3] for r in GOOD], "time [s],pressure,flow [L/min]", "B1", "no unit"),
    ([r[:4] for r in GOOD], "time [s],pressure [bar],pressure [psi],flow [L/min]", "C1", "twice"),
])
def test_series_refusals_name_the_cell(tmp_path, rows, header, cell, message):
    # (the rows have as many values as the header names columns: a row with more is refused by itself)
    path = write_csv(tmp_path, rows, header) if header else write_csv(tmp_path, rows)
    with pytest.raises(InputError, match=message) as info:
        read_series(path)
    assert (info.value.where.file, info.value.where.cell) == (str(path), cell)


def test_missing_columns_and_samples(tmp_path):
    path = write_csv(tmp_path, [[0, 1, 2], [1, 2, 3]], "time [s],pressure [bar],flow [L/min]")
    with pytest.raises(InputError, match="speed") as info:
        read_series(path)
    assert "drive_speed" in str(info.value)
    path = write_csv(tmp_path, [[0, 1], [1, 2]], "time [s],pressure [bar]")
    with pytest.raises(InputError, match="missing column 'flow"):
        read_series(path)
    path = write_csv(tmp_path, GOOD[:1])
    with pytest.raises(InputError, match="two samples"):
        read_series(path)


def test_gap_accepted_with_max_step(tmp_path):
    rows = [GOOD[0], GOOD[1], GOOD[2], [60, 150, 40, 1500, 50, 0.9]]
    duty = read_series(write_csv(tmp_path, rows), max_step=120)
    assert duty.duration.tolist() == [1, 1, 58, 1]


def test_sheet_with_absurd_extent_is_refused(tmp_path):
    # two real cells a million rows and 16 thousand columns apart: a dense read would need 10^10 cells
    path = tmp_path / "wide.xlsx"
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.append(["time [s]", "pressure [bar]", "flow [L/min]"])
    ws.append([0, 1, 2])
    ws["XFD1048576"] = 1
    wb.save(path)
    with pytest.raises(InputError, match="spans"):
        read_series(path)


def test_csv_named_xlsx_and_workbook_named_csv(tmp_path):
    csv_named_xlsx = write_csv(tmp_path, GOOD).rename(tmp_path / "log.xlsx")
    with pytest.raises(InputError, match="CSV"):
        read_series(csv_named_xlsx)
    wb = openpyxl.Workbook()
    wb.save(tmp_path / "book.csv")
    with pytest.raises(InputError, match="zip file"):
        read_series(tmp_path / "book.csv")


def test_many_rows_xlsx(tmp_path):
    n = 20_000
    rng = np.random.default_rng(7)
    t = np.cumsum(rng.uniform(0.005, 0.015, n))
    p = rng.uniform(0, 250, n)
    path = tmp_path / "log.xlsx"
    book = xlsxwriter.Workbook(path, {"constant_memory": True})
    ws = book.add_worksheet("log")
    ws.write_row(0, 0, ["time [s]", "pressure [bar]", "flow [L/min]", "speed [rpm]"])
    for i in range(n):
        ws.write_row(i + 1, 0, (t[i], p[i], 40.0, 1500))
    book.close()
    duty = read_series(path, defaults={"temperature": 323.15, "inlet_pressure": 9e4}, max_step=1.0)
    assert len(duty) == n
    assert duty.pressure == pytest.approx(p * 1e5)  # 1 bar = 1e5 Pa (definition)
    assert duty.duration[:-1] == pytest.approx(np.diff(t))
    assert duty.cycle_time == pytest.approx(t[-1] - t[0] + np.median(np.diff(t)))


@pytest.mark.slow
def test_million_rows_csv(tmp_path):
    n = 1_000_000
    rng = np.random.default_rng(3)
    t = np.cumsum(rng.uniform(0.005, 0.015, n))
    data = np.column_stack([t, rng.uniform(0, 3600, n), np.full(n, 10.0), np.full(n, 1800.0)])
    path = tmp_path / "log.csv"
    np.savetxt(path, data, delimiter=",", fmt="%.9g", header="time [s],pressure [psi],flow [gpm],speed [rpm]",
               comments="")
    duty = read_series(path, defaults={"temperature": 323.15, "inlet_pressure": 9e4})
    assert len(duty) == n
    assert duty.pressure == pytest.approx(si(np.loadtxt(path, delimiter=",", skiprows=1, usecols=1), "psi"))
