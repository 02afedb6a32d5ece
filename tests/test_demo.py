"""The bundled demo: committed inputs match their generator; the demo runs and says what it should."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import openpyxl
import pytest

from sheetpump import SAFETY_CAUTION, demo

ROOT = Path(__file__).resolve().parents[1]


def _content(path: Path) -> dict:
    book = openpyxl.load_workbook(path)
    return {(ws.title, c.coordinate): c.value for ws in book for row in ws.iter_rows() for c in row
            if c.value is not None}


def test_committed_demo_inputs_match_the_generator(tmp_path):
    for fresh in demo.write_inputs(tmp_path):
        committed = ROOT / "workbooks" / "demo" / fresh.name
        assert committed.exists(), f"{committed} missing: run scripts/regenerate.py"
        assert _content(fresh) == _content(committed), f"{fresh.name} differs: run scripts/regenerate.py"


@pytest.fixture(scope="module")
def result(tmp_path_factory):
    return demo.run(tmp_path_factory.mktemp("demo") / "out")


@pytest.fixture(scope="module")
def found(result):
    """Each demo pump's findings by rule, by the pump's label."""
    from sheetpump.checks import check
    from sheetpump.workbooks.readers import read_application, read_datasheet

    app = read_application(result.inputs[0])
    return {ds.label: {f.rule: f for f in check(ds, app).findings}
            for ds in (read_datasheet(p) for p in result.inputs[1:])}


def test_demo_verdicts_follow_from_hand_arithmetic(result, found):
    v = result.verdicts
    # the verdicts of the README's demo table
    assert v == {"Marrow & Tepp Hydraulics MT-G28": "warn", "Quillfeather Fluid Power QF-175": "fail",
                 "Orrin Gearworks OG-22": "fail", "Sandlow Pumpen SL-32": "warn"}
    # 7 s of a 40 s cycle above continuous pressure is 17.5 %; this pump allows 10 % (its datasheet;
    # arithmetic on the invented demo data, rule as in DESIGN §6)
    share = found["Quillfeather Fluid Power QF-175"]["pressure.intermittent-share"]
    assert share.severity == "fail"
    assert share.measured == pytest.approx(7 / 40, rel=1e-9) and share.limit == pytest.approx(0.10, rel=1e-9)
    # 22 cm³/rev x 1470 rpm = 32.3 L/min even without leakage, below 36 L/min x 1.05 = 37.8 L/min
    # (Q = V·n, common practice)
    flow = found["Orrin Gearworks OG-22"]["flow.delivered"]
    assert flow.severity == "fail"
    assert flow.limit == pytest.approx(36 * 1.05 / 60000, rel=1e-9)  # float rounding only
    assert flow.measured < 22 * 1470 / 1000 / 60000
    assert flow.measured * 60000 == pytest.approx(31.4, abs=0.05)  # the README's "31.4 L/min after leakage"


def test_demo_warnings_are_the_ones_the_readme_gives(found):
    """The two "warn" pumps of the README's table warn for the reasons it gives, and for no other."""
    def flagged(label: str) -> dict[str, str]:
        return {rule: f.severity for rule, f in found[label].items() if f.severity not in ("pass", "info")}

    # MT-G28: "every duty pressure within its ratings, but the press's 250 bar relief setting is above its
    # 230 bar continuous rating" (the relief rule of DESIGN §6; figures of the invented demo data)
    mt = "Marrow & Tepp Hydraulics MT-G28"
    assert flagged(mt) == {"pressure.relief-stall": "warn"}
    relief = found[mt]["pressure.relief-stall"]
    assert relief.measured == pytest.approx(250e5, rel=1e-12) and relief.limit == pytest.approx(230e5, rel=1e-12)
    # SL-32: "passes every rating it states; its maximum inlet pressure is not stated (not checked), and its
    # table is at one speed and one viscosity, so the efficiencies ... are extrapolated"
    sl = "Sandlow Pumpen SL-32"
    assert flagged(sl) == {"inlet.max": "not checked", "performance.basis": "warn"}
    assert "extrapolat" in found[sl]["performance.basis"].message


def test_demo_cold_start_starves_the_inch_pound_pump(result, found):
    """At 5 °C the VG 46 oil is thick; the suction line's friction takes the inlet below 12.5 psia."""
    import math

    from sheetpump.suction import inlet
    from sheetpump.workbooks.readers import read_application

    qf = found["Quillfeather Fluid Power QF-175"]["inlet.cold-start"]
    # by hand: 1.75 in³ = 28.68 cm³ x 1470 rpm = 42.2 L/min in 32 mm: 0.874 m/s; VG 46 (VI 100) at 5 °C
    # about 387 mm²/s: Re = 0.874 x 0.032 / 387e-6 = 72, laminar; Hagen–Poiseuille over 1.2 m:
    # 32 μ L v / d² = 32 x (387e-6 x 870) x 1.2 x 0.874 / 0.032² = 0.110 bar (Hagen–Poiseuille, any fluid
    # mechanics textbook, e.g. White, Fluid Mechanics); lift 870 x 9.81 x 0.3 = 0.026 bar
    assert qf.severity == "fail" and "line friction dominates" in qf.message
    friction = 32 * (386.5e-6 * 870) * 1.2 * 0.8736 / 0.032**2  # by hand, 0.110 bar
    line = read_application(result.inputs[0]).suction
    terms = inlet(line, 0.8736 * math.pi / 4 * 0.032**2, 386.5e-6, 870.0)  # the product's line, same flow
    assert terms.friction == pytest.approx(friction, rel=1e-6)  # float rounding only
    assert terms.reynolds == pytest.approx(0.8736 * 0.032 / 386.5e-6, rel=1e-6)  # laminar, Re 72
    # fittings by Darby's 3-K method with the fluids library's coefficients, plus Rennels' sharp entrance 0.57
    from fluids.fittings import Darby3K

    re, head = 0.8736 * 0.032 / 386.5e-6, 0.5 * 870 * 0.8736**2
    k = 0.57 + sum(Darby3K(Re=re, name=n, Di=0.032) for n in (
        "Elbow, 90°, threaded, standard, (r/D = 1)", "Valve, Ball valve, standard, β = 1"))
    assert qf.measured == pytest.approx(101325 - 870 * 9.80665 * 0.3 - friction - k * head - head, rel=0.002)
    assert qf.limit == pytest.approx(12.5 * 6894.757, rel=1e-6)  # 12.5 psia
    assert qf.app_where.field == "suction_diameter"
    # the others start: their minimum is 0.8 bara (0.7 for the SL-32)
    for label in ("Marrow & Tepp Hydraulics MT-G28", "Orrin Gearworks OG-22", "Sandlow Pumpen SL-32"):
        assert found[label]["inlet.cold-start"].severity == "pass"
        assert found[label]["torque.cold-start"].severity == "pass"
        # the loss model's torque (no stated breakaway torque): the finding states what it is compared with
        assert "at full speed set against the locked-rotor torque" in found[label]["torque.cold-start"].message
    book = openpyxl.load_workbook(result.comparison, data_only=True)
    labels = [row[0] for row in book["Summary"].iter_rows(values_only=True) if row[0]]
    assert any(str(x).startswith("inlet pressure at the cold start") for x in labels)
    assert any(str(x).startswith("torque to start cold") for x in labels)
    assert all(isinstance(x, str) for x in labels)  # plain texts


def test_demo_writes_comparison_and_report(result):
    assert result.comparison.exists() and result.report.exists()
    assert SAFETY_CAUTION in result.report.read_text(encoding="utf-8")
    book = openpyxl.load_workbook(result.comparison, data_only=True)
    assert book.sheetnames[0] == "Summary" and "Findings" in book.sheetnames
    summary = book["Summary"]
    ranks = [row for row in summary.iter_rows(values_only=True) if row[0] and str(row[0]).startswith("rank")]
    assert ranks and 1 in ranks[0]


def test_demo_command_prints_where_results_are(tmp_path):
    out = tmp_path / "d"
    proc = subprocess.run([sys.executable, "-m", "sheetpump", "demo", "-o", str(out)], capture_output=True,
                          text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert str(out / "comparison.xlsx") in proc.stdout
    assert "Caution" in proc.stdout
    assert (out / "inputs" / demo.APPLICATION_FILE).exists()


def test_demo_default_folder_is_new(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    first = demo.run()
    second = demo.run()
    assert first.folder.name == "sheetpump-demo" and second.folder.name == "sheetpump-demo-2"
