"""Benchmark: the cell functions live in LibreOffice Calc (the extension) against Calc's native formulas.

One headless LibreOffice with the extension installed in a throw-away profile (``sheetpump extension
--install --profile``), driven over UNO by :mod:`tests.calc_uno`. Each case is a new spreadsheet with
10,000 rows of inputs (displacement [cm³/rev] in A, speed [rpm] in B) and the same arithmetic twice:

- 10,000 single-cell calls ``=SP_GEOMETRIC_FLOW(A1;B1)`` ... against ``=A1*B1/1000`` in each row;
- one 10,000-row range call ``{=SP_GEOMETRIC_FLOW(A1:A10000;B1:B10000)}`` against the native array
  formula ``{=A1:A10000*B1:B10000/1000}``.

The time is Calc's ``calculateAll`` of the document (median over ``ROUNDS`` x ``REPEATS``), measured
inside the driver so start-up and the UNO connection are not in it. Targets: the range call at most 3x
native; the single cells have no target (each is a call into Python, shown per cell). Not a test: it
times things.

Where the range call's time goes: sheetpump's own part (:func:`sheetpump.extension.runtime.call` on
10,000 rows) takes about 3.5 ms (4-8 ms timed inside LibreOffice); the rest is LibreOffice's side of an
add-in call: ranges to UNO sequences, its Python bridge converting every value one by one (20,000 in,
10,000 out; measured once alone: 7.7 ms for 10,000 values to UNO and back through
``com.sun.star.script.Converter``, about as much as Calc's whole native array formula), and the result
back to a matrix.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

ROWS = 10_000
#: Recalculations timed per case and round (after one untimed), and rounds: each round runs the four
#: cases in turn, so a change of load on a shared machine falls on all of them alike.
REPEATS = 3
ROUNDS = 3
RANGE_TARGET = 3.0
_SHEET = "Sheet1"


def _inputs() -> list[list[float]]:
    return [[float(10 + i % 50), float(800 + (i * 7) % 2200)] for i in range(ROWS)]


def _case(formulas: list[list[str]] | None = None, array: str | None = None) -> list[dict[str, Any]]:
    steps: list[dict[str, Any]] = [{"new": True}, {"fill": [_SHEET, f"A1:B{ROWS}", _inputs()]}]
    if formulas is not None:
        steps.append({"fill": [_SHEET, f"C1:C{ROWS}", formulas]})
    if array is not None:
        steps.append({"array": [_SHEET, f"C1:C{ROWS}", array]})
    steps += [{"calculate": True}] * (REPEATS + 1)  # the first one warms up
    steps.append({"read": [[_SHEET, "C1"], [_SHEET, f"C{ROWS}"]]})
    return steps


def run() -> list[dict[str, Any]]:
    """Time the four cases in one LibreOffice; rows for :mod:`tests.benchmarks.run`."""
    from tests.benchmarks.common import row
    from tests.calc_uno import run_job
    from tests.libreoffice import soffice_path

    soffice = soffice_path()
    if soffice is None:
        raise RuntimeError("LibreOffice (soffice) is not installed")
    cases = {
        "single": _case(formulas=[[f"=SP_GEOMETRIC_FLOW(A{r};B{r})"] for r in range(1, ROWS + 1)]),
        "single native": _case(formulas=[[f"=A{r}*B{r}/1000"] for r in range(1, ROWS + 1)]),
        "range": _case(array=f"=SP_GEOMETRIC_FLOW(A1:A{ROWS};B1:B{ROWS})"),
        "range native": _case(array=f"=A1:A{ROWS}*B1:B{ROWS}/1000"),
    }
    with tempfile.TemporaryDirectory(prefix="bench-extension-") as tmp:
        profile = Path(tmp) / "profile"
        subprocess.run([sys.executable, "-m", "sheetpump", "extension", "--install", "--profile", str(profile)],
                       check=True, capture_output=True, timeout=600)
        steps = [step for _ in range(ROUNDS) for case in cases.values() for step in case]
        results = run_job(soffice, profile, steps)
    times: dict[str, list[float]] = {name: [] for name in cases}
    at = 0
    for _ in range(ROUNDS):
        for name, case in cases.items():
            out = results[at:at + len(case)]
            at += len(case)
            first, last = out[-1]
            want = [10.0 * 800.0 / 1000, _inputs()[-1][0] * _inputs()[-1][1] / 1000]
            got = [first["value"], last["value"]]
            if any(not isinstance(g, float) or abs(g - w) > 1e-9 * w for g, w in zip(got, want, strict=True)):
                raise RuntimeError(f"{name}: Calc computed {got}, expected {want}")
            times[name] += [r["seconds"] for r in out if isinstance(r, dict) and "seconds" in r][1:]
    median = {name: statistics.median(t) for name, t in times.items()}
    per_cell = median["single"] / ROWS
    return [
        row(f"Calc: {ROWS:,} single-cell SP_GEOMETRIC_FLOW", median["single"], median["single native"],
            "Calc native =A*B/1000", at_most=float("inf"), note=f"{per_cell * 1e6:.0f} µs per cell; no target"),
        row(f"Calc: one {ROWS:,}-row SP_GEOMETRIC_FLOW range", median["range"], median["range native"],
            "Calc native array formula", at_most=RANGE_TARGET),
    ]


if __name__ == "__main__":
    for r in run():
        print(f"{r['benchmark']}: {r['ours'] * 1e3:.1f} ms vs {r['reference'] * 1e3:.2f} ms "
              f"({r['reference_name']}), ratio {r['ratio']:.1f} (target {r['target']}) {r['note']}")
