"""Reading a measured duty log of 1,000,000 rows (``sheetpump.workbooks.time_series.read_series``).

The log is invented (see :func:`write_logs`): six columns ``time [s]``, ``pressure [bar]``, ``flow
[L/min]``, ``speed [rpm]``, ``temperature [degC]``, ``inlet pressure [bara]``, sampled at 1 kHz. The files
are written once into the system's temporary directory (``sheetpump-bench``) and reused, since writing the
workbook takes a while; delete the directory to have them written again.

* xlsx: against ``pandas.read_excel(engine="openpyxl")``, which takes tens of seconds on a million rows,
  so it runs once (no warm-up) while sheetpump's reader runs three times after a warm-up;
* CSV: against ``pandas.read_csv`` with its defaults, each several times after a warm-up.

Both references only parse the file into a table; ``read_series`` also converts units, checks every
signal and the time steps, and builds the :class:`~sheetpump.duty.Duty`.
"""

from __future__ import annotations

import tempfile
from pathlib import Path
from typing import Any

import numpy as np

from sheetpump.workbooks.time_series import read_series

from .common import compare, median_time, row

N = 1_000_000
HEADERS = ("time [s]", "pressure [bar]", "flow [L/min]", "speed [rpm]", "temperature [degC]",
           "inlet pressure [bara]")
FOLDER = Path(tempfile.gettempdir()) / "sheetpump-bench"


def _columns(n: int) -> list[np.ndarray]:
    rng = np.random.default_rng(11)
    t = np.round(np.arange(n) * 1e-3, 3)
    phase = (t % 20.0) / 20.0
    p = np.round(np.where(phase < 0.4, 30.0, 240.0) + rng.normal(0.0, 2.0, n), 2).clip(0.0)
    q = np.round(np.where(phase < 0.4, 10.0, 38.0) + rng.normal(0.0, 0.2, n), 3).clip(0.0)
    speed = np.round(1500.0 - p * 0.5 + rng.normal(0.0, 2.0, n), 1)
    temp = np.round(35.0 + 20.0 * t / t[-1], 2)
    inlet = np.round(0.95 + rng.normal(0.0, 0.01, n), 4)
    return [t, p, q, speed, temp, inlet]


def write_logs(n: int = N) -> tuple[Path, Path]:
    """The invented log as CSV and as xlsx (written once, then reused)."""
    FOLDER.mkdir(exist_ok=True)
    csv_path, xlsx_path = FOLDER / f"log-{n}.csv", FOLDER / f"log-{n}.xlsx"
    if not csv_path.exists() or not xlsx_path.exists():
        import pandas as pd
        import xlsxwriter

        cols = _columns(n)
        frame = pd.DataFrame(dict(zip(HEADERS, cols, strict=True)))
        part = csv_path.with_suffix(".part.csv")
        frame.to_csv(part, index=False)
        part.replace(csv_path)
        part = xlsx_path.with_suffix(".part.xlsx")
        book = xlsxwriter.Workbook(str(part), {"constant_memory": True})
        sheet = book.add_worksheet("Log")
        sheet.write_row(0, 0, HEADERS)
        rows = np.column_stack(cols).tolist()
        for i, values in enumerate(rows, start=1):
            sheet.write_row(i, 0, values)
        book.close()
        part.replace(xlsx_path)
    return csv_path, xlsx_path


def run() -> list[dict[str, Any]]:
    import pandas as pd

    csv_path, xlsx_path = write_logs()
    rows = []

    duty = read_series(csv_path)
    assert len(duty) == N
    ours, ref = compare(lambda: read_series(csv_path), lambda: pd.read_csv(csv_path), repeat=5)
    rows.append(row("read_series, 1e6-row CSV log", ours, ref, "pandas.read_csv", at_most=1.2))

    duty = read_series(xlsx_path)
    assert len(duty) == N and np.allclose(duty.pressure[:5], pd.read_csv(csv_path, nrows=5)["pressure [bar]"] * 1e5)
    ours = median_time(lambda: read_series(xlsx_path), repeat=3, warmup=1)
    ref = median_time(lambda: pd.read_excel(xlsx_path, engine="openpyxl"), repeat=1, warmup=0)
    rows.append(row("read_series, 1e6-row xlsx log", ours, ref, "pandas.read_excel(openpyxl)",
                    at_least_faster=5, note="pandas.read_excel with openpyxl ran once (no warm-up): it takes "
                    "tens of seconds; read_series ran 3 times after a warm-up"))
    return rows
