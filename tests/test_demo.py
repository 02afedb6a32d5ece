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


def test_demo_verdicts_follow_from_hand_arithmetic(result):
    v = result.verdicts
    # 7 s of a 40 s cycle above continuous pressure is 17.5 %; this pump allows 10 % (its datasheet)
    assert v["Quillfeather Fluid Power QF-175"] == "fail"
    # 22 cm³/rev x 1470 rpm = 32.3 L/min even without leakage, below 36 L/min x 1.05 = 37.8 L/min
    assert v["Orrin Gearworks OG-22"] == "fail"
    assert 22 * 1470 / 1000 < 36 * 1.05
    assert v["Marrow & Tepp Hydraulics MT-G28"] in ("pass", "warn")
    assert v["Sandlow Pumpen SL-32"] in ("pass", "warn")


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
