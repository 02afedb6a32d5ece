"""Clean output on degenerate but valid inputs, and values echoed in the unit they were typed in.

Issue 11 §4: "JSON output is always valid JSON; no warning text ever reaches stdout or stderr of a
successful run" (a LAPACK complaint once landed on standard output). Each command runs in a subprocess,
so anything printed below Python (LAPACK writes straight to file descriptor 1) is caught too.
Issue 12 §2: a drive speed typed in rev/s is echoed as typed in the finding on the segments that take it.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path
from typing import Any

import numpy as np
import openpyxl
import pytest

from sheetpump.errors import ModelError
from sheetpump.physics.table import least_squares

DEMO = Path(__file__).resolve().parents[1] / "workbooks" / "demo"
APP = DEMO / "baling-press.xlsx"
PUMP = DEMO / "sandlow-sl-32.xlsx"  # its table: pressure, flow, -, torque, speed, viscosity


def edit(src: Path, dst: Path, fields: dict[str, tuple[Any, ...]] | None = None,
         table: list[list[Any]] | None = None) -> Path:
    """A copy of a demo workbook with fields changed (found by their name in column A) and the table
    of its second sheet (Performance or Duty) replaced from row 6."""
    wb = openpyxl.load_workbook(src)
    for row in wb.worksheets[0].iter_rows(min_row=1):
        if fields and row[0].value in fields:
            value = fields[row[0].value]
            row[1].value = value[0]
            if len(value) > 1:
                row[2].value = value[1]
    if table is not None:
        ws = wb.worksheets[1]
        for r in range(6, ws.max_row + 1):
            for c in range(1, ws.max_column + 1):
                ws.cell(r, c).value = None
        for i, values in enumerate(table):
            for j, v in enumerate(values):
                ws.cell(6 + i, 1 + j).value = v
    wb.save(dst)
    return dst


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "sheetpump", *args], capture_output=True, text=True, cwd=cwd,
                          timeout=300)


def _pumps(folder: Path) -> dict[str, Path]:
    return {
        # every point at one pressure: leakage cannot be separated from the no-load flow
        "one pressure": edit(PUMP, folder / "one-pressure.xlsx",
                             table=[[100, 47.88 - 0.01 * i, None, 56.8 + 0.1 * i, 1500, 32] for i in range(5)]),
        # the same flow and torque at every pressure: no leakage, no pressure-dependent torque
        "flat": edit(PUMP, folder / "flat.xlsx", table=[[p, 40.0, None, 50.0, 1500, 32] for p in (10, 50, 100, 200)]),
        # values at the ends of the ranges sheetpump reads (sheetpump.units.KINDS)
        "extreme": edit(PUMP, folder / "extreme.xlsx",
                        fields={"displacement": (99999,), "speed_max": (99999,), "torque_max": (999999,)},
                        table=[[1e-6, 1e5, None, 1e6 - 1, 1500, 32], [9999, 99999, None, 999999, 1500, 32],
                               [5000, 1e-6, None, 1e-6, 1500, 32]]),
    }


@pytest.mark.parametrize("case", ["one pressure", "flat", "extreme"])
def test_check_json_is_valid_and_nothing_else_is_printed(tmp_path: Path, case: str) -> None:
    pump = _pumps(tmp_path)[case]
    app = edit(APP, tmp_path / "app.xlsx", fields={"drive_speed": (99999,), "cycles_per_hour": (1,)},
               table=[["a", 3000, 9999, 99999], ["b", 1e-6, 1e-6, 1e-6], ["c", 10, 1e-6, 1e-6]]) \
        if case == "extreme" else APP
    result = run("check", "--app", str(app), str(pump), "--format", "json", cwd=tmp_path)
    assert result.returncode in (0, 1), result.stderr
    json.loads(result.stdout)  # the whole of standard output is one JSON document
    assert result.stderr == ""


def test_compare_on_degenerate_tables_prints_nothing_but_where_it_wrote(tmp_path: Path) -> None:
    pumps = _pumps(tmp_path)
    result = run("compare", "--app", str(APP), *map(str, pumps.values()), "-o", str(tmp_path / "c.xlsx"), cwd=tmp_path)
    assert result.returncode in (0, 1), result.stderr
    assert result.stderr == "" and (tmp_path / "c.xlsx").exists()


def _csv(path: Path, rows: list[list[float]]) -> Path:
    head = "speed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity [mm^2/s]\n"
    path.write_text(head + "".join(",".join(map(str, r)) + "\n" for r in rows))
    return path


@pytest.mark.parametrize(("rows", "extra"), [
    ([[1500, 100, 40 - 0.1 * i, 50, 32] for i in range(6)], ["--displacement", "28 cc"]),  # one pressure
    ([[n, p, 40.0, 50.0, 32] for n in (1000, 1500) for p in (10, 100, 200)], ["--displacement", "28 cc"]),
    ([[n, p, 1e-6, 1e-6, 0.01] for n in (0.01, 0.02) for p in (1e-6, 2e-6, 3e-6)], []),  # tiny
    ([[n, p, 40 - p / 100, 50 + p / 10, 32] for n in (1000, 1500) for p in (10, 100, 200)],
     ["--displacement", "99999 cc"]),  # huge displacement against the flows
    ([[n, p, 1e5 - p, 1e6 - p, 1e6] for n in (99999, 50000) for p in (1e-6, 9999, 5000)],
     ["--displacement", "1e5 cc"]),
], ids=["one-pressure", "constant", "tiny", "huge-displacement", "huge-values"])
def test_evaluate_json_is_valid_and_nothing_else_is_printed(tmp_path: Path, rows: list[list[float]],
                                                           extra: list[str]) -> None:
    table = _csv(tmp_path / "bench.csv", rows)
    result = run("evaluate", str(table), "--format", "json", *extra, cwd=tmp_path)
    assert result.returncode in (0, 1), result.stderr
    json.loads(result.stdout)
    assert result.stderr == ""


def test_a_derived_displacement_that_is_not_positive_is_refused_as_such(tmp_path: Path) -> None:
    # The same flow at 1000 and 1500 rpm: the slope of flow on speed (ISO 8426's idea: V = dQ/dn) is 0.
    table = _csv(tmp_path / "bench.csv", [[n, p, 40.0, 50.0, 32] for n in (1000, 1500) for p in (10, 100, 200)])
    result = run("evaluate", str(table), "--format", "json", cwd=tmp_path)
    assert result.returncode == 2 and result.stdout == ""
    assert "flow does not rise with the speed" in result.stderr and result.stderr.count("\n") == 1


def test_the_fit_refuses_non_finite_terms_before_lapack_sees_them() -> None:
    # numpy's lstsq hands NaN to LAPACK, which prints "On entry to DLASCL parameter number 4 had an
    # illegal value" on standard output; the fit refuses first (a ModelError names the fit).
    with pytest.raises(ModelError, match="too large or too small"):
        least_squares([np.array([1.0, np.inf, 2.0]), np.ones(3)], np.array([1.0, 2.0, 3.0]), "flow")


def test_a_drive_speed_typed_in_rev_s_is_echoed_as_typed(tmp_path: Path) -> None:
    # 50 rev/s = 3000 rpm (1 rev/s = 60 rpm, definition) > the pump's 2800 rpm: the finding names the
    # segment and says its speed is the machine's drive_speed as it was typed.
    app = edit(APP, tmp_path / "app.xlsx", fields={"drive_speed": (50, "rev/s")})
    result = run("check", "--app", str(app), str(PUMP), "--format", "json", cwd=tmp_path)
    finding = next(f for f in json.loads(result.stdout)["pumps"][0]["findings"] if f["rule"] == "speed.max")
    assert finding["measured"]["value"] == pytest.approx(3000.0)
    assert finding["application_where"]["note"] == "speed: drive_speed, typed as 50 rev/s"
    text = run("check", "--app", str(app), str(PUMP), cwd=tmp_path).stdout
    assert "(unload; speed: drive_speed, typed as 50 rev/s)" in text
    assert "e+04" not in text  # never 8.7e+04 rpm
    # a segment with its own speed says nothing of the drive's
    own = edit(APP, tmp_path / "own.xlsx", fields={"drive_speed": (50, "rev/s")},
               table=[["unload", 8, 12, 0, 1470, 45], ["press", 10, 185, 33, 3000, 52]])
    finding = next(f for f in json.loads(run("check", "--app", str(own), str(PUMP), "--format", "json",
                                             cwd=tmp_path).stdout)["pumps"][0]["findings"] if f["rule"] == "speed.max")
    assert "note" not in finding["application_where"] and finding["application_where"]["field"] == "press"


def test_a_datasheet_limit_typed_in_rev_s_is_echoed_in_the_finding_and_the_cell_note(tmp_path: Path) -> None:
    # speed_max typed as 46 rev/s (2760 rpm; 1 rev/s = 60 rpm, definition) against a drive at 1470 rpm x
    # 2 = 2940 rpm: the finding's cell and the annotated copy's note on that cell say how it was typed.
    pump = edit(PUMP, tmp_path / "pump.xlsx", fields={"speed_max": (46, "rev/s")})
    app = edit(APP, tmp_path / "app.xlsx", fields={"drive_speed": (2940,)})
    out = tmp_path / "marked.xlsx"
    result = run("check", "--app", str(app), str(pump), "--annotate", str(out), cwd=tmp_path)
    assert result.returncode == 1 and result.stderr == ""
    assert "Pump!B14 (speed_max; typed as 46 rev/s)" in result.stdout
    assert "2760 rpm" in result.stdout  # the limit itself in the report's unit
    note = openpyxl.load_workbook(out)["Pump"]["B14"].comment.text
    assert "speed.max" in note and note.endswith("(this cell: typed as 46 rev/s)"), note
