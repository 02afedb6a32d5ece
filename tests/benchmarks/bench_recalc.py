"""Benchmark: ``sheetpump recalc`` against LibreOffice headless on filled-down workbooks.

Run it as a script (``python tests/benchmarks/bench_recalc.py``) or call :func:`run`, which returns one
row per benchmark for a runner that collects all benchmarks into one table. Not a test: it times things.

Each workbook is what a spreadsheet program or XlsxWriter-style writer makes of a filled-down sheet:
inputs in columns A (pressure, bar) and B (flow, L/min), ``C = SP_HYDRAULIC_POWER(A2,B2)`` and
``D = C2*0.9+B2`` stored once per column as shared formulas (``<f t="shared" ref=.. si=..>``), and a SUM
of column D at the bottom. The cell-by-cell workbook is what a script makes with openpyxl, one formula
text per cell and no shared formulas (:func:`cell_by_cell_book`): four columns of arithmetic and MAX/MIN
over two input columns. Both programs run as a whole process, start-up included: ``python -m
sheetpump recalc BOOK -o OUT`` and ``soffice --headless --convert-to xlsx`` with a fresh profile that
forces recalculation on load (OOXMLRecalcMode=0, see tests/libreoffice.py). Each is run once to warm the
file cache, then ``REPEATS`` times; the table shows the medians and their ratio.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests"))
sys.path.insert(0, str(ROOT))

#: Timed runs of each program after one warm-up run.
REPEATS = 5
#: (name, workbook maker, formula cells, target ratio sheetpump / LibreOffice)
CASES = [("recalc 2,000 shared-formula cells", "shared", 2_000, 1.0),
         ("recalc 20,000 shared-formula cells", "shared", 20_000, 1.0),
         ("recalc 20,000 formula cells written cell by cell (openpyxl)", "cells", 20_000, 1.0)]

_CONTENT_TYPES = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
    '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
    '<Default Extension="xml" ContentType="application/xml"/>'
    '<Override PartName="/xl/workbook.xml" '
    'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>'
    '<Override PartName="/xl/worksheets/sheet1.xml" '
    'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>'
    "</Types>"
)
_ROOT_RELS = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
    '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/'
    'officeDocument" Target="xl/workbook.xml"/></Relationships>'
)
_WORKBOOK = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" '
    'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships">'
    '<sheets><sheet name="Duty" sheetId="1" r:id="rId1"/></sheets><calcPr fullCalcOnLoad="1"/></workbook>'
)
_BOOK_RELS = (
    '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
    '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">'
    '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/'
    'worksheet" Target="worksheets/sheet1.xml"/></Relationships>'
)


def shared_formula_book(path: str | os.PathLike[str], formula_cells: int) -> Path:
    """Write a one-sheet workbook with ``formula_cells`` formula cells in shared-formula columns."""
    rows = max(1, formula_cells // 2)
    last = rows + 1
    parts = ['<row r="1"><c r="A1" t="inlineStr"><is><t>pressure</t></is></c>'
             '<c r="B1" t="inlineStr"><is><t>flow</t></is></c>'
             '<c r="C1" t="inlineStr"><is><t>power</t></is></c>'
             '<c r="D1" t="inlineStr"><is><t>check</t></is></c></row>']
    for i in range(rows):
        r = i + 2
        pressure = 50.0 + (i * 37) % 300  # invented duty points: 50..349 bar, 5..84.5 L/min
        flow = 5.0 + (i * 13) % 160 / 2
        if i == 0:
            fc = f'<f t="shared" ref="C2:C{last}" si="0">SP_HYDRAULIC_POWER(A2,B2)</f>'
            fd = f'<f t="shared" ref="D2:D{last}" si="1">C2*0.9+B2</f>'
        else:
            fc, fd = '<f t="shared" si="0"/>', '<f t="shared" si="1"/>'
        parts.append(f'<row r="{r}"><c r="A{r}"><v>{pressure!r}</v></c><c r="B{r}"><v>{flow!r}</v></c>'
                     f'<c r="C{r}">{fc}</c><c r="D{r}">{fd}</c></row>')
    parts.append(f'<row r="{last + 1}"><c r="D{last + 1}"><f>SUM(D2:D{last})</f></c></row>')
    sheet = (
        '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
        '<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
        f'<dimension ref="A1:D{last + 1}"/><sheetData>{"".join(parts)}</sheetData></worksheet>'
    )
    path = Path(path)
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        z.writestr("[Content_Types].xml", _CONTENT_TYPES)
        z.writestr("_rels/.rels", _ROOT_RELS)
        z.writestr("xl/workbook.xml", _WORKBOOK)
        z.writestr("xl/_rels/workbook.xml.rels", _BOOK_RELS)
        z.writestr("xl/worksheets/sheet1.xml", sheet)
    return path


def cell_by_cell_book(path: str | os.PathLike[str], formula_cells: int) -> Path:
    """Write a one-sheet workbook as a script does (openpyxl, a formula text in each cell, no sharing).

    Columns A (pressure, bar) and B (flow, L/min) hold invented duty points; C-F hold
    ``=A2*B2/600`` (hydraulic power, kW), ``=C2*0.9+B2``, ``=MAX(C2,D2/2)`` and ``=MIN(A2-B2,C2*2)``.
    """
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Duty"
    sheet.append(["pressure", "flow", "power", "check", "peak", "floor"])
    for i in range(max(1, formula_cells // 4)):
        r = i + 2
        sheet.append([50.0 + (i * 37) % 300, 5.0 + (i * 13) % 160 / 2, f"=A{r}*B{r}/600", f"=C{r}*0.9+B{r}",
                      f"=MAX(C{r},D{r}/2)", f"=MIN(A{r}-B{r},C{r}*2)"])
    path = Path(path)
    book.save(path)
    return path


_MAKERS = {"shared": shared_formula_book, "cells": cell_by_cell_book}


#: Python's default bytecode caching for the timed processes (a user's install has its bytecode written
#: by pip); this project's CI sets PYTHONDONTWRITEBYTECODE, which would compile sheetpump on every run.
_ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _time(command: list[str], cwd: Path | None = None) -> float:
    start = time.perf_counter()
    done = subprocess.run(command, cwd=cwd, env=_ENV, stdin=subprocess.DEVNULL, capture_output=True, text=True)
    elapsed = time.perf_counter() - start
    if done.returncode != 0:
        raise RuntimeError(f"{' '.join(command)} failed ({done.returncode}):\n{done.stdout}\n{done.stderr}")
    return elapsed


def _medians(commands: list[list[str]], repeats: int) -> list[float]:
    """Median wall time of each command: one warm-up run each (file cache, bytecode), then ``repeats``
    rounds in alternation, so that every command sees the same machine load."""
    for command in commands:
        _time(command)
    times: list[list[float]] = [[] for _ in commands]
    for _ in range(repeats):
        for command, samples in zip(commands, times, strict=True):
            samples.append(_time(command))
    return [statistics.median(samples) for samples in times]


def run(repeats: int = REPEATS) -> list[dict[str, Any]]:
    """Time every case; one dict per benchmark: benchmark, sheetpump, reference, ratio, target (s)."""
    from libreoffice import _make_profile, soffice_command, soffice_path

    soffice = soffice_path()
    rows = []
    with tempfile.TemporaryDirectory(prefix="bench-recalc-") as tmp:
        folder = Path(tmp)
        profile = _make_profile(folder / "profile", "always")
        for name, kind, cells, target in CASES:
            book = _MAKERS[kind](folder / f"{kind}{cells}.xlsx", cells)
            commands = [[sys.executable, "-m", "sheetpump", "recalc", str(book), "-o",
                         str(folder / f"out-{kind}{cells}.xlsx")]]
            if soffice:
                commands.append(soffice_command(soffice, profile, "xlsx", folder / f"lo-{kind}{cells}", [book]))
            times = _medians(commands, repeats)
            ours, reference = times[0], (times[1] if soffice else float("nan"))
            rows.append({"benchmark": name, "sheetpump": ours, "reference": reference,
                         "reference_name": "LibreOffice headless", "ratio": ours / reference, "target": target})
    return rows


def _table(rows: list[dict[str, Any]]) -> str:
    lines = ["benchmark | sheetpump median | reference median | ratio | target",
             "--- | --- | --- | --- | ---"]
    for r in rows:
        lines.append(f"{r['benchmark']} | {r['sheetpump']:.3f} s | {r['reference']:.3f} s (LibreOffice) | "
                     f"{r['ratio']:.2f}x | <= {r['target']:.1f}x")
    return "\n".join(lines)


if __name__ == "__main__":
    print(_table(run()))
