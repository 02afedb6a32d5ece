"""Tests of ``sheetpump evaluate``: reading a measured table, the evaluation, its workbook and JSON.

The pump is invented: 28 cm³/rev with Wilson's coefficients C_s = 1.3e-8, C_f = 0.04, C_v = 1e5 and
T_c = 1.0 N·m (of the size Merritt, Hydraulic Control Systems, 1967, ch. 5, describes for real pumps;
from memory), run on an invented ISO VG 46 oil of viscosity index 100. Its tables are generated here
from Wilson's model, written once in imperial units (CSV: rpm, psi, gpm, lbf·in, °F) and once in
metric units (xlsx: rpm, MPa, L/min, kW, cSt and °C), each converted with pint's own registry (the
outside reference for the unit conversions, not sheetpump's).
"""

from __future__ import annotations

import io
import json
import math
import zipfile
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import numpy as np
import openpyxl
import pint
import pytest

from sheetpump import SAFETY_CAUTION
from sheetpump.cli import main
from sheetpump.files import sha256
from sheetpump.physics import fluid
from sheetpump.physics.wilson import WilsonModel

try:  # tests/ may or may not be a package; both layouts work
    from tests import libreoffice as lo
except ImportError:  # pragma: no cover - depends on how pytest was started
    import libreoffice as lo  # type: ignore[no-redef]

ureg = pint.UnitRegistry()  # an independent registry: the reference, not ours
Q_ = ureg.Quantity

TRUE = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)  # the invented pump
SPEEDS_RPM = (1000.0, 1500.0, 2000.0, 2500.0)
PRESSURES_BAR = (10.0, 50.0, 100.0, 150.0, 200.0, 250.0)
TEMPERATURES_C = (40.0, 60.0)
RHO15 = 870.0  # kg/m³ at 15 °C, the density sheetpump assumes by default
V_IN3 = float(Q_(28.0, "cm**3").to("inch**3").magnitude)  # the nominal displacement in in³/rev


def bench_points() -> list[dict[str, float]]:
    """The invented pump's points in SI, with the oil's viscosity and density at each temperature."""
    out = []
    for rpm in SPEEDS_RPM:
        for temp_c in TEMPERATURES_C:
            t_k = temp_c + 273.15
            nu = fluid.vg_viscosity(46, 100, t_k)
            rho = fluid.density_at(t_k, RHO15)
            for bar in PRESSURES_BAR:
                n = Q_(rpm, "rpm").to("turn/s").magnitude  # rev/s
                p = Q_(bar, "bar").to("Pa").magnitude
                r = TRUE.predict(n, p, nu * rho)
                out.append({"rpm": rpm, "bar": bar, "temp_c": temp_c, "nu": float(nu), "n": n, "p": p,
                            "q": float(r.flow), "t": float(r.torque)})
    return out


def _si(value: float, unit: str, to: str) -> float:
    return float(Q_(value, unit).to(to).magnitude)


def write_imperial_csv(path: Path, points: list[dict[str, float]]) -> None:
    # Columns in an unusual order, imperial units, temperature instead of viscosity.
    lines = ["flow [gpm],pressure [psi],temperature [degF],speed [rpm],torque [lbf*in]"]
    for pt in points:
        lines.append(",".join(repr(x) for x in (
            _si(pt["q"], "m**3/s", "gallon/minute"), _si(pt["p"], "Pa", "psi"),
            Q_(pt["temp_c"], ureg.degC).to(ureg.degF).magnitude, pt["rpm"], _si(pt["t"], "N*m", "inch*lbf"))))
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


def write_metric_xlsx(path: Path, points: list[dict[str, float]]) -> None:
    # Written with openpyxl (not sheetpump's writer); a title above the header, input power, cSt.
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Bench"
    sheet["A1"] = "Bench test of an invented pump"
    headers = ["speed [rpm]", "pressure [MPa]", "flow [L/min]", "input power [kW]", "viscosity [cSt]",
               "temperature [degC]"]
    for j, h in enumerate(headers, start=1):
        sheet.cell(3, j, h)
    for i, pt in enumerate(points, start=4):
        power_w = pt["t"] * 2 * math.pi * pt["n"]  # P = T·ω, ω = 2π·n
        row = (pt["rpm"], _si(pt["p"], "Pa", "MPa"), _si(pt["q"], "m**3/s", "L/min"), _si(power_w, "W", "kW"),
               _si(pt["nu"], "m**2/s", "centistokes"), pt["temp_c"])
        for j, v in enumerate(row, start=1):
            sheet.cell(i, j, v)
    book.save(path)


def run_cli(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main(["evaluate", *argv])
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def tables(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("tables")
    points = bench_points()
    paths = {"csv": folder / "bench-imperial.csv", "xlsx": folder / "bench-metric.xlsx"}
    write_imperial_csv(paths["csv"], points)
    write_metric_xlsx(paths["xlsx"], points)
    return paths


@pytest.fixture(scope="module")
def evaluated(tables: dict[str, Path], tmp_path_factory: pytest.TempPathFactory) -> dict[str, object]:
    """Both tables through the command line: JSON of each and the workbook of the metric one."""
    before = {k: sha256(p) for k, p in tables.items()}
    out = tmp_path_factory.mktemp("out") / "evaluation.xlsx"
    code_csv, text_csv, err_csv = run_cli(str(tables["csv"]), "--displacement", f"{V_IN3!r} in^3/rev", "--vg", "46",
                                          "--vi", "100", "--format", "json")
    code_xlsx, text_xlsx, err_xlsx = run_cli(str(tables["xlsx"]), "--displacement", "28 cc", "-o", str(out),
                                             "--format", "json")
    assert (code_csv, err_csv) == (0, "") and (code_xlsx, err_xlsx) == (0, "")
    return {"csv": json.loads(text_csv), "xlsx": json.loads(text_xlsx), "book": out, "before": before,
            "tables": tables}


# -- the same coefficients from both unit systems ------------------------------------------------------
def test_imperial_and_metric_tables_give_the_known_coefficients(evaluated: dict) -> None:
    # The nominal 28 cm³/rev is given to the imperial run in in³/rev (converted by pint); the tables are
    # noise-free, so the fit returns the coefficients they were made from, in either unit system.
    got = {}
    for key in ("csv", "xlsx"):
        model = evaluated[key]["model"]
        assert model["method"] == "wilson"
        got[key] = {c["symbol"]: c for c in model["coefficients"]}
        assert got[key]["C_s"]["value"] == pytest.approx(TRUE.c_s, rel=1e-5)
        assert got[key]["C_f"]["value"] == pytest.approx(TRUE.c_f, rel=1e-5)
        assert got[key]["C_v"]["value"] == pytest.approx(TRUE.c_v, rel=1e-5)
        assert got[key]["T_c"]["value"] == pytest.approx(TRUE.t_c, rel=1e-4)
        assert got[key]["T_c"]["unit"] == "N*m" and got[key]["C_s"]["unit"] == "-"
        assert all(c["fitted"] for c in got[key].values())
    for symbol in ("C_s", "C_f", "C_v", "T_c"):
        assert got["csv"][symbol]["value"] == pytest.approx(got["xlsx"][symbol]["value"], rel=2e-5), symbol


def test_points_against_hand_formulas_in_imperial_units(evaluated: dict, tables: dict[str, Path]) -> None:
    # η_v = Q/(V·n) and P_hyd [hp] = p [psi]·Q [gpm]/1714 (common practice), from the CSV's own numbers.
    lines = tables["csv"].read_text().splitlines()[1:]
    points = evaluated["csv"]["points"]
    assert len(points) == len(lines) == len(SPEEDS_RPM) * len(TEMPERATURES_C) * len(PRESSURES_BAR)
    v_in3 = V_IN3
    for line, pt in zip(lines, points, strict=True):
        gpm, psi, _, rpm, lbf_in = (float(x) for x in line.split(","))
        q_th_gpm = _si(v_in3 * rpm, "inch**3/minute", "gallon/minute")
        assert pt["volumetric_efficiency"] == pytest.approx(gpm / q_th_gpm, rel=1e-9)
        hp = psi * gpm / 1714
        assert pt["hydraulic_power_kW"] == pytest.approx(_si(hp, "hp", "kW"), rel=2e-4)
        # η_hm = V·Δp/(2π·T), all in inch units: in³·psi = in·lbf.
        assert pt["hydromechanical_efficiency"] == pytest.approx(v_in3 * psi / (2 * math.pi * lbf_in), rel=1e-9)
        assert pt["total_efficiency"] == pytest.approx(
            pt["volumetric_efficiency"] * pt["hydromechanical_efficiency"], rel=1e-9)
        assert pt["flags"] == []


def test_json_fields(evaluated: dict) -> None:
    r = evaluated["xlsx"]
    assert r["sheet"] == "Bench" and r["flagged"] is False and r["flagged_rows"] == []
    assert r["points"][0]["row"] == 4  # the header is on row 3 under a title
    assert set(r["points"][0]) >= {"speed_rpm", "pressure_bar", "flow_L_min", "torque_N_m", "input_power_kW",
                                   "viscosity_mm2_s", "temperature_degC", "geometric_flow_L_min",
                                   "volumetric_efficiency", "hydromechanical_efficiency", "total_efficiency",
                                   "hydraulic_power_kW", "power_loss_kW", "flags", "model"}
    d = r["derived_displacement"]
    assert d["value_cm3_rev"] == pytest.approx(28.0, rel=1e-6)
    assert 0 <= d["uncertainty_cm3_rev"] < 1e-3
    assert r["nominal_displacement_cm3_rev"] == pytest.approx(28.0)
    m = r["model"]
    assert m["ranges"]["pressure_bar"] == pytest.approx([10.0, 250.0])
    assert m["ranges"]["speed_rpm"] == pytest.approx([1000.0, 2500.0])
    assert m["residuals"]["torque_rms_N_m"] < 1e-6
    assert r["caution"] == SAFETY_CAUTION
    assert any("kg/m³ at 15 °C" in note for note in r["notes"])  # the density assumed is said
    # The model at the measured points reproduces them (noise-free table) and is not extrapolated.
    for pt in r["points"]:
        assert pt["model"]["total_efficiency"] == pytest.approx(pt["total_efficiency"], rel=1e-6)
        assert pt["model"]["extrapolated"] is False


def test_inputs_unchanged(evaluated: dict) -> None:
    assert {k: sha256(p) for k, p in evaluated["tables"].items()} == evaluated["before"]


# -- the workbook ---------------------------------------------------------------------------------------
def test_workbook_formula_cells_hold_numbers_and_charts_exist(evaluated: dict) -> None:
    path = evaluated["book"]
    formulas = openpyxl.load_workbook(path, data_only=False)
    values = openpyxl.load_workbook(path, data_only=True)
    count = 0
    for sheet in formulas.worksheets:
        for row in sheet.iter_rows():
            for cell in row:
                if isinstance(cell.value, str) and cell.value.startswith("="):
                    count += 1
                    stored = values[sheet.title][cell.coordinate].value
                    assert isinstance(stored, (int, float)) and math.isfinite(stored), (sheet.title, cell.coordinate)
    assert count >= 7 * len(evaluated["xlsx"]["points"])
    assert values.sheetnames == ["Summary", "Points", "Charts", "Curves"]
    summary = values["Summary"]
    assert SAFETY_CAUTION in [c.value for row in summary.iter_rows() for c in row]
    points = values["Points"]
    assert points.freeze_panes == "B5"
    headers = [c.value for c in points[4]]
    assert "hydraulic power [kW]" in headers and "volumetric efficiency η_v [-]" in headers
    # Hydraulic power against the trade's imperial rule P [hp] = p [psi]·Q [gpm]/1714 (common practice).
    col_p, col_q = headers.index("pressure [bar]"), headers.index("flow [L/min]")
    col_h = headers.index("hydraulic power [kW]")
    for row in points.iter_rows(min_row=5, values_only=True):
        psi, gpm = _si(row[col_p], "bar", "psi"), _si(row[col_q], "L/min", "gallon/minute")
        assert row[col_h] == pytest.approx(_si(psi * gpm / 1714, "hp", "kW"), rel=2e-4)
    with zipfile.ZipFile(path) as archive:
        charts = sorted(n for n in archive.namelist() if n.startswith("xl/charts/chart"))
        assert charts == ["xl/charts/chart1.xml", "xl/charts/chart2.xml", "xl/charts/chart3.xml"]
        xml = archive.read(charts[0]).decode("utf-8")
    groups = len(SPEEDS_RPM) * len(TEMPERATURES_C)  # one speed and viscosity each
    assert xml.count("<c:ser>") == 2 * groups  # measured points and the model curve per group
    assert "Curves" in xml and "Points" in xml


def test_workbook_is_deterministic(tables: dict[str, Path], tmp_path: Path) -> None:
    a, b = tmp_path / "a.xlsx", tmp_path / "b.xlsx"
    for target in (a, b):
        assert run_cli(str(tables["xlsx"]), "--displacement", "28 cc", "-o", str(target))[0] == 0
    assert sha256(a) == sha256(b)


@lo.needs_soffice
def test_libreoffice_recomputes_the_stored_values(evaluated: dict) -> None:
    # LibreOffice, an independent spreadsheet engine, recomputes every formula from the stored inputs.
    path = evaluated["book"]
    got = lo.recalculated_values(path)
    stored = openpyxl.load_workbook(path, data_only=True)
    assert len(got) >= 7 * len(evaluated["xlsx"]["points"])
    # rel 1e-9: two engines evaluating the same formulas on the same stored inputs agree to round-off.
    # abs 1e-8: LibreOffice returns 0 for a difference below about 2^-48 of its operands (its
    # approximate subtraction; from memory), as in "derived less nominal" on this noiseless table; over
    # the uncertainty's floor of 1e-6 of the displacement (displacement.UNCERTAINTY_FLOOR) the "× std. unc."
    # ratio of such a difference is at most 2^-48/1e-6 = 3.6e-9.
    for (sheet, ref), value in got.items():
        assert value == pytest.approx(stored[sheet][ref].value, rel=1e-9, abs=1e-8), (sheet, ref)


# -- flags and text -------------------------------------------------------------------------------------
def _csv(path: Path, header: str, rows: list[str]) -> Path:
    path.write_text(header + "\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


HEADER = "speed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity [cSt]"


def test_flags_on_a_bad_table_give_exit_1(tmp_path: Path) -> None:
    # 28 cm³/rev at 1500 rpm gives 42 L/min geometric flow (V·n/1000, common practice); 43 L/min is
    # more than a pump can deliver, and a torque below V·Δp/(2π) is less than it can take.
    p = _csv(tmp_path / "bad.csv", HEADER, [
        "1500,50,41.5,24,32", "1500,150,43,70,32", "1500,250,39,112,32", "1500,250,39,112,32",
        "1500,200,40,60,32"])
    before = sha256(p)
    code, out, err = run_cli(str(p), "--displacement", "28", "--format", "json")
    assert code == 1 and err == ""
    r = json.loads(out)
    flags = {pt["row"]: pt["flags"] for pt in r["points"]}
    assert "eff_above_1" in flags[3] and "vol_eff_rises_with_pressure" in flags[3]
    assert "duplicate_point" in flags[4] and "duplicate_point" in flags[5]
    assert "eff_above_1" in flags[6]  # η_hm = 28·200/(20π·60) = 1.49
    assert flags[2] == []
    assert r["flagged_rows"] == [3, 4, 5, 6]
    # The text summary names the flagged rows and carries the caution.
    code, out, _ = run_cli(str(p), "--displacement", "28")
    assert code == 1 and "row 3: eff_above_1" in out and SAFETY_CAUTION in out
    assert sha256(p) == before


def test_derived_displacement_far_from_nominal_is_flagged(tables: dict[str, Path]) -> None:
    # The table is of a 28 cm³/rev pump; a nominal 26 cm³/rev is 7 % off.
    code, out, _ = run_cli(str(tables["xlsx"]), "--displacement", "26 cc", "--format", "json")
    r = json.loads(out)
    assert code == 1 and r["table_flags"] == ["derived_displacement_differs"]
    assert r["derived_displacement"]["difference_from_nominal"] == pytest.approx(28 / 26 - 1, rel=1e-5)


def test_small_table_notes_say_what_is_assumed(tmp_path: Path) -> None:
    # One speed and one viscosity: Wilson's viscosity and speed dependences cannot be fitted.
    n, p, mu = 25.0, np.array([50e5, 100e5, 150e5, 200e5, 250e5]), 32e-6 * RHO15
    r0 = TRUE.predict(n, p, mu)
    rows = [f"1500,{float(pp) / 1e5!r},{float(q) * 60000!r},{float(t)!r},32"
            for pp, q, t in zip(p, r0.flow, r0.torque, strict=True)]
    code, out, _ = run_cli(str(_csv(tmp_path / "one.csv", HEADER, rows)), "--displacement", "28", "--format", "json")
    r = json.loads(out)
    assert code == 0
    assert r["derived_displacement"] is None and "two or more" in r["derived_displacement_error"]
    assert any("assumed" in note and "not fitted" in note for note in r["notes"])
    t_c = next(c for c in r["model"]["coefficients"] if c["symbol"] == "T_c")
    assert t_c["fitted"] is False and t_c["value"] == 0.0


# -- bad input: exit 2, one line naming the place --------------------------------------------------------
@pytest.mark.parametrize(("header", "rows", "expected"), [
    ("speeed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity [cSt]", ["1500,50,41,24,32"],
     ["unknown column 'speeed [rpm]'", "A1"]),
    ("speed [rpm],pressure [L/min],flow [L/min],torque [N*m],viscosity [cSt]", ["1500,50,41,24,32"],
     ["not a pressure", "B1", "pressure"]),
    (HEADER, ["1500,50,41,24,32", "1500,100,forty,48,32"], ["'forty' is text", "C3", "flow"]),
    ("speed [rpm],pressure [bar],flow [L/min],flow [gpm],torque [N*m],viscosity [cSt]", ["1500,50,41,11,24,32"],
     ["appears twice", "D1"]),
    ("speed [rpm],pressure [bar],torque [N*m],viscosity [cSt]", ["1500,50,24,32"], ["missing column 'flow"]),
    (HEADER, [], ["no points"]),
    ("speed [rpm],pressure [bar],flow [L/min],viscosity [cSt]", ["1500,50,41,32"], ["torque", "input power"]),
    ("speed [rpm],pressure [bar],flow [L/min],torque [N*m],temperature [degC]", ["1500,50,41,24,50"],
     ["temperature", "--vg"]),
    ("speed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity",
     ["1500,50,41,24,32"], ["has no unit", "E1"]),
])
def test_bad_csv_exits_2_naming_the_place(tmp_path: Path, header: str, rows: list[str], expected: list[str]) -> None:
    p = _csv(tmp_path / "table.csv", header, rows)
    code, out, err = run_cli(str(p), "--displacement", "28")
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and err.startswith("sheetpump: error: ") and "Traceback" not in err
    assert str(p) in err
    for part in expected:
        assert part in err, (part, err)


def test_bad_xlsx_cell_is_named_with_its_sheet(tmp_path: Path) -> None:
    path = tmp_path / "table.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Test 1"
    for j, h in enumerate(HEADER.split(","), start=1):
        sheet.cell(1, j, h)
    for i, row in enumerate([[1500, 50, 41, 24, 32], [1500, 100, 40, "=x", 32]], start=2):
        for j, v in enumerate(row, start=1):
            sheet.cell(i, j).value = v
            sheet.cell(i, j).data_type = "s" if isinstance(v, str) else "n"  # "=x" is text, not a formula
    book.save(path)
    code, _, err = run_cli(str(path), "--displacement", "28")
    assert code == 2 and "Test 1!D3" in err and "torque" in err
    code, _, err = run_cli(str(path), "--sheet", "Other")
    assert code == 2 and "no sheet 'Other'" in err


@pytest.mark.parametrize(("argv", "expected"), [
    (["--displacement", "28 bar"], "--displacement"),
    (["--displacement", "-3"], "must be positive"),
    (["--vg", "47", "--vi", "100"], "viscosity grade"),
    (["--vg", "46"], "--vi"),
    (["--nu40", "46 cSt"], "--nu100"),
])
def test_bad_options_exit_2(tmp_path: Path, argv: list[str], expected: str) -> None:
    p = _csv(tmp_path / "ok.csv", HEADER, ["1500,50,41,24,32", "2000,50,55,26,32"])
    code, _, err = run_cli(str(p), *argv)
    assert code == 2 and expected in err and err.count("\n") == 1


def test_missing_and_disguised_files_exit_2(tmp_path: Path) -> None:
    code, _, err = run_cli(str(tmp_path / "nowhere.csv"))
    assert code == 2 and "file not found" in err
    fake = tmp_path / "table.xlsx"
    fake.write_text(HEADER + "\n1500,50,41,24,32\n")
    code, _, err = run_cli(str(fake))
    assert code == 2 and "text (CSV) file" in err
