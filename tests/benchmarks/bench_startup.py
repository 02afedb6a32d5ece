"""Start-up: ``sheetpump check`` of one demo datasheet, whole process, against importing numpy and openpyxl.

A command line is judged by how long it takes to answer. The floor of any Python tool that reads a
workbook is starting Python and importing numpy and openpyxl (``python -c "import numpy, openpyxl"``);
the target is that the whole ``sheetpump check --app workbooks/demo/baling-press.xlsx
workbooks/demo/marrow-tepp-mt-g28.xlsx`` (start-up, unit registry, reading two workbooks, every rule, the
text report) takes at most 2.5 times that floor. Both run as separate processes, in alternation so they
see the same machine load, after one untimed warm-up each (file cache, pint's definitions cache, Python's
bytecode cache); the table shows the medians.

Both processes run with Python's default bytecode caching: ``PYTHONDONTWRITEBYTECODE`` is removed from
their environment, as it is for a user's install (pip writes the bytecode of installed packages), so
that neither pays for compiling its source on every run.

    python tests/benchmarks/bench_startup.py
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from tests.benchmarks.common import compare, row  # noqa: E402

REPEATS = 9
TARGET = 2.5
DEMO = ROOT / "workbooks" / "demo"
CHECK = [sys.executable, "-m", "sheetpump", "check", "--app", str(DEMO / "baling-press.xlsx"),
         str(DEMO / "marrow-tepp-mt-g28.xlsx")]
FLOOR = [sys.executable, "-c", "import numpy, openpyxl"]


def _process(command: list[str], env: dict[str, str]) -> Any:
    def call() -> None:
        done = subprocess.run(command, cwd=ROOT, env=env, stdin=subprocess.DEVNULL, capture_output=True,
                              text=True)
        if done.returncode not in (0, 1):  # 1: a rule failed; still a complete run
            raise RuntimeError(f"{' '.join(command)} failed ({done.returncode}):\n{done.stderr}")
    return call


def run(repeats: int = REPEATS) -> list[dict[str, Any]]:
    """One row: the median wall time of ``sheetpump check`` and of the numpy + openpyxl import."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    t0 = time.perf_counter()
    ours, floor = compare(_process(CHECK, env), _process(FLOOR, env), repeat=repeats)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    return [row("`sheetpump check`, one demo datasheet (process)", ours, floor,
                "`python -c \"import numpy, openpyxl\"`", at_most=TARGET,
                note=f"{repeats} alternated runs each after a warm-up, {time.perf_counter() - t0:.0f} s; "
                     f"load average {load:.1f} on {os.cpu_count()} cores")]


if __name__ == "__main__":
    from tests.benchmarks.run import table

    print(table(run()))
