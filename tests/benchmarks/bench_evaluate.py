"""``sheetpump evaluate`` on a measured table of 2,000,000 points, against reading it with pandas.

The table is invented (see :func:`write_table`): a 28 cm³/rev gear pump following Wilson's model
(C_s = 1.3e-8, C_f = 0.04, C_v = 1e5, T_c = 1 N·m), logged on a bench at four speeds (1000 to
2500 rpm, drooping a little with load) and two oil temperatures (about 32 and 20 mm²/s), at pressures
spread over 5 to 250 bar, with the flow and torque transducers' noise. Columns ``speed [rpm]``,
``pressure [bar]``, ``flow [L/min]``, ``torque [N*m]``, ``viscosity [cSt]``: about 60 MB of CSV, the
size of the log that once made ``evaluate`` try to allocate an N × N array. Written once into the
system's temporary directory (``sheetpump-bench``) and reused.

Rows:

* reading and evaluating the table (:func:`~sheetpump.workbooks.measured_table.read_measured` then
  :func:`~sheetpump.evaluation.evaluate_table`: per-point efficiencies, every plausibility flag, the
  derived displacement and Wilson's model fitted to all points) against ``pandas.read_csv`` of the
  same file, which only parses it;
* the whole command, ``sheetpump evaluate TABLE.csv --displacement 28 -o OUT.xlsx`` in this process
  (the text summary and the evaluation workbook, whose Points sheet is capped), against the same
  reference.

Each row's note gives the peak memory traced by :mod:`tracemalloc` (numpy's arrays included) in one
separate run of each side, and their ratio: no step may grow faster than the table.
"""

from __future__ import annotations

import contextlib
import gc
import io
import tempfile
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np

from sheetpump.cli import main
from sheetpump.evaluation import evaluate_table
from sheetpump.physics.wilson import WilsonModel
from sheetpump.workbooks.measured_table import read_measured

from .common import compare, row

N = 2_000_000
FOLDER = Path(tempfile.gettempdir()) / "sheetpump-bench"
HEADER = "speed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity [cSt]"
TRUE = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)  # the invented pump
RHO = 870.0  # kg/m³, sheetpump's default density (no temperature column)


def write_table(n: int = N) -> Path:
    """The invented bench log as CSV (written once, then reused)."""
    FOLDER.mkdir(exist_ok=True)
    path = FOLDER / f"measured-{n}.csv"
    if path.exists():
        return path
    rng = np.random.default_rng(8426)
    level = rng.integers(0, 4, n)
    warm = rng.integers(0, 2, n)
    bar = np.round(rng.uniform(5.0, 250.0, n), 2)
    rpm = np.round((1000.0 + 500.0 * level) * (1 - 2e-5 * bar) + rng.normal(0.0, 0.5, n), 1)
    cst = np.round(np.where(warm == 1, 20.0, 32.0) + rng.normal(0.0, 0.1, n), 2)
    r = TRUE.predict(rpm / 60.0, bar * 1e5, cst * 1e-6 * RHO)
    lpm = np.round(r.flow * 60000.0 * (1 + rng.normal(0.0, 2e-4, n)), 3)
    nm = np.round(r.torque * (1 + rng.normal(0.0, 5e-4, n)), 3)
    part = path.with_suffix(".part")
    with open(part, "w", encoding="utf-8") as handle:
        handle.write(HEADER + "\n")
        np.savetxt(handle, np.column_stack([rpm, bar, lpm, nm, cst]), fmt=["%.1f", "%.2f", "%.3f", "%.3f", "%.2f"],
                   delimiter=",")
    part.replace(path)
    return path


def peak_memory(func: Callable[[], Any]) -> int:
    """Peak memory [bytes] traced while ``func`` runs once."""
    gc.collect()
    tracemalloc.start()
    try:
        func()
        return tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def _command(path: Path, out: Path) -> int:
    with contextlib.redirect_stdout(io.StringIO()):
        return main(["evaluate", str(path), "--displacement", "28", "-o", str(out)])


def run() -> list[dict[str, Any]]:
    import pandas as pd

    path = write_table()
    out = FOLDER / "measured-evaluation.xlsx"
    e = evaluate_table(read_measured(path), 28e-6)
    assert e.table.size == N and e.model is not None and e.model.method == "wilson"
    assert abs(e.model.c_s / TRUE.c_s - 1) < 0.01  # the invented pump's slip coefficient recovered
    del e

    def ours() -> object:
        return evaluate_table(read_measured(path), 28e-6)

    def reference() -> object:
        return pd.read_csv(path)

    def command() -> int:
        return _command(path, out)

    rows = []
    mem_ref = peak_memory(reference)
    for name, func in ((f"read + evaluate a {N:,}-point measured table (CSV)", ours),
                       (f"`sheetpump evaluate -o OUT.xlsx`, {N:,} points", command)):
        mem = peak_memory(func)
        t_ours, t_ref = compare(func, reference, repeat=3)
        rows.append(row(name, t_ours, t_ref, "pandas.read_csv", at_most=10.0,
                        note=f"peak memory (tracemalloc) {mem / 2**20:.0f} MiB against pandas.read_csv's "
                             f"{mem_ref / 2**20:.0f} MiB: {mem / mem_ref:.1f}×"))
    return rows
