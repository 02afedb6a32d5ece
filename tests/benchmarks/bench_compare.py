"""``sheetpump compare`` of 20 candidates on a 1,000-segment duty, whole process, against LibreOffice.

The reference is LibreOffice headless opening the produced comparison workbook and converting it to PDF
(whole process, a fresh profile that recalculates on load): what a reviewer's spreadsheet has to do with
the file anyway. Inputs are invented: the demo's baling press with its seven segments repeated to 1,000,
and the demo's four pumps each in five sizes.

    python tests/benchmarks/bench_compare.py
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(ROOT))

REPEATS = 3
CANDIDATES = 20
SEGMENTS = 1000


def inputs(folder: Path) -> tuple[Path, list[Path]]:
    """Write the application (1,000 segments) and 20 datasheets; return their paths."""
    from sheetpump import demo
    from sheetpump.workbooks.templates import DUTY_COLUMNS, write_template

    duty = [[f"{row[0]} {i // len(demo.DUTY) + 1}", *row[1:]]
            for i, row in enumerate(demo.DUTY * (SEGMENTS // len(demo.DUTY) + 1))][:SEGMENTS]
    app = write_template("application", folder / "app.xlsx", demo.MACHINE, duty, [c.header for c in DUTY_COLUMNS])
    sheets = []
    for k in range(CANDIDATES):
        pump = demo.PUMPS[k % len(demo.PUMPS)]
        values = dict(pump.values)
        values["model"] = (f"{values['model'][0]}-{k}",)
        value, unit = values["displacement"]
        values["displacement"] = (round(value * (1 + 0.05 * (k // len(demo.PUMPS))), 3), unit)
        headers, rows = demo._table(pump)
        sheets.append(write_template("datasheet", folder / f"pump{k:02d}.xlsx", values, rows, headers))
    return app, sheets


def _time(command: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True, timeout=600)
    return time.perf_counter() - start


def run(repeats: int = REPEATS) -> list[dict[str, Any]]:
    from libreoffice import _make_profile, soffice_command, soffice_path

    soffice = soffice_path()
    with tempfile.TemporaryDirectory(prefix="bench-compare-") as tmp:
        folder = Path(tmp)
        app, sheets = inputs(folder)
        out = folder / "comparison.xlsx"
        ours_cmd = [sys.executable, "-m", "sheetpump", "compare", "--app", str(app), *map(str, sheets),
                    "-o", str(out)]
        subprocess.run(ours_cmd, capture_output=True, timeout=600)  # warm-up (exit 1: some candidates fail)
        ours = []
        for _ in range(repeats):
            start = time.perf_counter()
            subprocess.run(ours_cmd, capture_output=True, timeout=600)
            ours.append(time.perf_counter() - start)
        reference = float("nan")
        if soffice:
            profile = _make_profile(folder / "profile", "always")
            command = soffice_command(soffice, profile, "pdf", folder / "pdf", [out])
            _time(command)
            reference = statistics.median(_time(command) for _ in range(repeats))
    median = statistics.median(ours)
    return [{"benchmark": f"sheetpump compare, {CANDIDATES} candidates x {SEGMENTS}-segment duty (process)",
             "sheetpump": median, "reference": reference, "ratio": median / reference, "target": 1.0,
             "reference_name": "LibreOffice opening it and writing a PDF (process)"}]


if __name__ == "__main__":
    for r in run():
        print(f"{r['benchmark']}: {r['sheetpump']:.2f} s vs {r['reference']:.2f} s -> {r['ratio']:.2f}x "
              f"(target <= {r['target']:.1f}x)")
