"""Tests of ``sheetpump check`` (sheetpump.cli.check, sheetpump.pipeline) and its outputs (sheetpump.reports).

The workbook readers are replaced by stand-ins that return invented pumps and an invented machine built
in code (the command layer is what is tested here; the readers have their own tests). The datasheet
files exist on disk (the command checks that), and for ``--annotate`` one is a real workbook written with
openpyxl, whose cells the stand-in datasheet points at.
"""

from __future__ import annotations

import dataclasses
import json
import xml.etree.ElementTree as ET

import numpy as np
import openpyxl
import pytest

import sheetpump
from sheetpump.cli import main
from sheetpump.datasheet import Datasheet
from sheetpump.duty import Application, Duty, Oil
from sheetpump.errors import InputError, Where
from sheetpump.files import sha256
from sheetpump.reports.annotate import FINDINGS_SHEET
from sheetpump.workbooks import readers
from sheetpump.workbooks.writer import VERDICT_FILLS as FILLS

OIL = Oil(46e-6, 313.15, 6.8e-6, 373.15, name="invented VG 46")


def pump(path: str, **changes: object) -> Datasheet:
    """Invented 'Nordkap Hydraulik NK-22', everything stated, comfortably inside the duty below."""
    src = {
        "speed_max": Where(path, "Ratings", "C6", "speed_max"),
        "pressure_peak": Where(path, "Ratings", "C9", "pressure_peak"),
        "pressure_continuous": Where(path, "Ratings", "C7", "pressure_continuous"),
        "volumetric_efficiency": Where(path, "Ratings", "C12", "volumetric_efficiency"),
    }
    ds = Datasheet("Nordkap Hydraulik (invented)", "NK-22", 22e-6, 10.0, 50.0, 250e5, 300e5,
                   volumetric_efficiency=0.95, total_efficiency=0.85, file=path, sources=src)
    return dataclasses.replace(ds, **changes)


def machine(path: str, names: tuple[str, str] = ("press", "return"), **changes: object) -> Application:
    d = Duty(np.array([10.0, 20.0]), np.array([180e5, 40e5]), np.array([20e-3 / 60, 25e-3 / 60]),
             np.array([25.0, 25.0]), np.array([323.15, 323.15]), np.array([1e5, 1e5]), names=names,
             rows=(Where(path, "Duty", "A5"), Where(path, "Duty", "A6")))
    app = Application("invented baler", d, OIL, relief_setting=200e5, file=path)
    return dataclasses.replace(app, **changes)


@pytest.fixture
def files(tmp_path, monkeypatch):
    """Paths of an application and two datasheet files, and the stand-in readers behind them."""
    app_path = tmp_path / "baler.xlsx"
    good = tmp_path / "nk22.xlsx"
    bad = tmp_path / "nk22-fast.xlsx"
    for p in (app_path, bad):
        p.write_bytes(b"stand-in: the reader is replaced in these tests")
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Ratings"
    for row, (label, value) in enumerate([("Maximum speed", "3000 rpm"), ("Continuous pressure", 250),
                                          ("Total efficiency", "=0.95*0.9")], start=6):
        ws.cell(row=row, column=2, value=label)
        ws.cell(row=row, column=3, value=value)
    ws["C9"] = 300
    wb.save(good)
    state = {"app": machine(str(app_path)),
             "pumps": {str(good): pump(str(good)),
                       str(bad): pump(str(bad), speed_max=20.0)}}  # 1200 rpm: the duty's 1500 fails
    monkeypatch.setattr(readers, "read_application", lambda path: state["app"])
    monkeypatch.setattr(readers, "read_datasheet", lambda path: state["pumps"][path])
    return {"app": str(app_path), "good": str(good), "bad": str(bad), "state": state, "dir": tmp_path}


def run(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(["check", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_exit_0_when_everything_passes(files, capsys):
    code, out, err = run(capsys, "--app", files["app"], files["good"])
    assert code == 0, err
    assert "NK-22" in out and sheetpump.SAFETY_CAUTION in out
    assert "WARN" in out  # stated efficiencies only: a warning, not a failure


def test_strict_makes_warnings_fail(files, capsys):
    assert run(capsys, "--strict", "--app", files["app"], files["good"])[0] == 1


def test_exit_1_when_a_rule_fails_and_the_cell_is_named(files, capsys):
    code, out, _ = run(capsys, "--app", files["app"], files["good"], files["bad"])
    assert code == 1
    assert "FAIL        speed.max" in out
    assert "Ratings!C6" in out  # the cell to fix


def test_exit_2_for_a_missing_file(files, capsys):
    code, _out, err = run(capsys, "--app", files["app"], str(files["dir"] / "none.xlsx"))
    assert code == 2
    assert "none.xlsx" in err and "not found" in err
    assert "Traceback" not in err and len(err.strip().splitlines()) == 1


def test_exit_2_for_bad_input_names_file_sheet_and_cell(files, capsys):
    state = files["state"]
    state["pumps"][files["good"]] = pump(files["good"], cleanliness="clean",
                                        sources={"cleanliness": Where(files["good"], "Ratings", "C21")})
    code, _, err = run(capsys, "--app", files["app"], files["good"])
    assert code == 2
    assert "nk22.xlsx" in err and "Ratings!C21" in err
    assert len(err.strip().splitlines()) == 1


def test_exit_2_when_the_reader_refuses(files, capsys, monkeypatch):
    def refuse(path):
        raise InputError("missing (empty cell)", Where(sheet="Ratings", cell="C7", field="pressure_continuous"))

    monkeypatch.setattr(readers, "read_datasheet", refuse)
    code, _, err = run(capsys, "--app", files["app"], files["good"])
    assert code == 2
    assert "nk22.xlsx Ratings!C7 (pressure_continuous): missing" in err


def test_exit_2_for_usage(files, capsys):
    assert run(capsys, files["good"])[0] == 2  # --app is required


def test_json_schema(files, capsys):
    code, out, _ = run(capsys, "--format", "json", "--app", files["app"], files["good"], files["bad"])
    assert code == 1
    doc = json.loads(out)
    assert doc["caution"] == sheetpump.SAFETY_CAUTION
    assert [p["verdict"] for p in doc["pumps"]] == ["warn", "fail"]
    bad = doc["pumps"][1]
    f = next(x for x in bad["findings"] if x["rule"] == "speed.max")
    assert f["severity"] == "fail" and f["failed"] is True
    assert f["measured"]["unit"] == "rpm" and f["measured"]["value"] == pytest.approx(1500)
    assert f["limit"]["value"] == pytest.approx(1200) and f["limit"]["si"] == pytest.approx(20.0)
    assert f["margin"] == pytest.approx((1200 - 1500) / 1200)
    assert f["segment"] == "press" and f["count"] == 2
    assert f["where"] == {"file": files["bad"], "sheet": "Ratings", "cell": "C6", "field": "speed_max"}
    assert f["application_where"]["cell"] == "A5"
    seg = bad["drive"]["segments"]
    assert [s["segment"] for s in seg] == ["press", "return"]
    # Q [L/min] = V [cm³/rev] · n [rpm] / 1000 · η_v = 22·1500/1000·0.95 (DESIGN §4)
    assert seg[0]["flow"] == pytest.approx(22 * 1500 / 1000 * 0.95)
    assert bad["drive"]["units"]["flow"] == "L/min"
    assert set(bad["drive"]["cycle"]) >= {"peak_torque", "peak_power", "rms_power", "mean_power"}


def test_json_to_a_file_and_junit(files, capsys):
    out_json = files["dir"] / "report.json"
    junit = files["dir"] / "ci" / "check.xml"
    code, out, _ = run(capsys, "--format", "json", "-o", str(out_json), "--junit", str(junit),
                       "--app", files["app"], files["good"], files["bad"])
    assert code == 1 and out == ""
    doc = json.loads(out_json.read_text(encoding="utf-8"))
    root = ET.parse(junit).getroot()
    suites = root.findall("testsuite")
    assert len(suites) == 2
    for suite, p in zip(suites, doc["pumps"], strict=True):
        cases = suite.findall("testcase")
        # each rule a test case; the failures are the failed findings
        assert len(cases) == len(p["findings"]) == int(suite.get("tests"))
        failed = [c.get("name") for c in cases if c.find("failure") is not None]
        assert failed == [f["rule"] for f in p["findings"] if f["failed"]]
        assert int(suite.get("failures")) == len(failed)
        # the caution as a suite property, before the cases (JUnit XML keeps properties first)
        assert suite[0].tag == "properties"
        assert [(q.get("name"), q.get("value")) for q in suite[0]] == [("caution", sheetpump.SAFETY_CAUTION)]
    assert int(root.get("failures")) == 1 and "speed.max" in ET.tostring(root, encoding="unicode")


def test_junit_strict_counts_warnings(files, capsys):
    junit = files["dir"] / "check.xml"
    run(capsys, "--strict", "--junit", str(junit), "--app", files["app"], files["good"])
    root = ET.parse(junit).getroot()
    types_ = [f.get("type") for f in root.iter("failure")]
    # under --strict a warning fails, and so does a rule not checked that matters for the duty
    assert "warn" in types_ and set(types_) <= {"warn", "not checked"}


def test_annotate_leaves_the_input_unchanged(files, capsys):
    state = files["state"]
    state["app"] = machine(files["app"], names=("=HYPERLINK(\"x\")", "@run"))  # formula-looking text
    state["pumps"][files["good"]] = pump(files["good"], speed_max=20.0)
    before = sha256(files["good"])
    out = files["dir"] / "out" / "nk22-marked.xlsx"
    code, _, err = run(capsys, "--annotate", str(out), "--app", files["app"], files["good"])
    assert code == 1, err
    assert sha256(files["good"]) == before
    wb = openpyxl.load_workbook(out)
    cell = wb["Ratings"]["C6"]
    assert cell.fill.fgColor.rgb.endswith(FILLS["fail"])
    assert wb["Ratings"]["C8"].value == "=0.95*0.9"  # the datasheet's own formula kept
    ws = wb[FINDINGS_SHEET]
    rows = list(ws.iter_rows(min_row=2, values_only=True))
    speed = next(r for r in rows if r and r[0] == "speed.max")
    assert speed[1] == "fail" and speed[6] == '=HYPERLINK("x")'
    # text from the inputs stays text: the findings sheet holds no formula
    assert all(c.data_type != "f" for row in ws.iter_rows() for c in row)
    assert not list(out.parent.glob("*.part"))


def test_annotate_several_datasheets_and_refuse_to_overwrite(files, capsys):
    import shutil

    shutil.copyfile(files["good"], files["bad"])  # a second real workbook
    files["state"]["pumps"][files["bad"]] = pump(files["bad"], model="NK-22 B")
    out = files["dir"] / "marked.xlsx"
    code, _, err = run(capsys, "--annotate", str(out), "--app", files["app"], files["good"], files["bad"])
    assert code == 0, err
    assert (files["dir"] / "marked-nk22.xlsx").exists() and (files["dir"] / "marked-nk22-fast.xlsx").exists()
    before = sha256(files["good"])
    code, _, err = run(capsys, "--annotate", files["good"], "--app", files["app"], files["good"])
    assert code == 2 and "overwrite" in err
    assert sha256(files["good"]) == before


def test_imperial_text_report(files, capsys):
    code, out, _ = run(capsys, "--units", "imperial", "--app", files["app"], files["good"])
    assert code == 0
    # 250 bar = 3626 psi (pint: 1 bar = 14.5038 psi)
    assert "3626 psi" in out


def test_real_readers_blank_templates_give_exit_2(tmp_path, capsys):
    # end to end with the real workbook readers: a blank template is bad input, one line, exit 2
    templates = pytest.importorskip("sheetpump.workbooks.templates")
    pytest.importorskip("sheetpump.workbooks.readers")
    app, ds = tmp_path / "app.xlsx", tmp_path / "pump.xlsx"
    templates.write_template("application", app)
    templates.write_template("datasheet", ds)
    before = sha256(ds)
    code, _, err = run(capsys, "--app", str(app), str(ds))
    assert code == 2
    assert "app.xlsx" in err and "!" in err and len(err.strip().splitlines()) == 1
    assert sha256(ds) == before
