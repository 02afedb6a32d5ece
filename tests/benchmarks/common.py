"""Timing helper shared by the benchmarks: warm-up, several repetitions, medians, one result row.

Each benchmark module ``bench_*.py`` has ``run() -> list[dict]``; each dict is one row of the table that
:mod:`tests.benchmarks.run` prints, as built by :func:`row`. A row compares sheetpump's median time with a
reference's median time; the target is either an upper bound on ``ours / reference`` (``"<="``, "at most
this many times slower") or a lower bound on ``reference / ours`` (``">="``, "at least this many times
faster").
"""

from __future__ import annotations

import gc
import statistics
import time
from collections.abc import Callable
from typing import Any

__all__ = ["compare", "median_time", "row"]


def median_time(func: Callable[[], Any], *, repeat: int = 7, number: int = 1, warmup: int = 1) -> float:
    """Median wall time of one call of ``func`` [s].

    ``func`` is called ``warmup`` times untimed (caches, imports, page faults), then ``repeat`` batches of
    ``number`` calls are timed; the result is the median batch time divided by ``number``. The garbage
    collector is paused during a batch (as :mod:`timeit` does) so a collection does not land in one sample.
    """
    for _ in range(warmup):
        func()
    samples = []
    enabled = gc.isenabled()
    try:
        for _ in range(repeat):
            gc.disable()
            t0 = time.perf_counter()
            for _ in range(number):
                func()
            samples.append((time.perf_counter() - t0) / number)
            if enabled:
                gc.enable()
    finally:
        if enabled:
            gc.enable()
    return statistics.median(samples)


def compare(ours: Callable[[], Any], reference: Callable[[], Any], *, repeat: int = 7, number: int = 1,
            warmup: int = 1) -> tuple[float, float]:
    """Median times of ``ours`` and ``reference`` [s], timed in alternation.

    Alternating (ours, reference, ours, ...) lets both see the same machine: on a shared machine the load
    of other processes, and numpy's and the C allocator's state (whether a large array comes from a
    freed block or from fresh pages), drift over seconds. Each sample is ``number`` calls, per call.
    """
    a: list[float] = []
    b: list[float] = []
    for _ in range(repeat):
        a.append(median_time(ours, repeat=1, number=number, warmup=warmup))
        b.append(median_time(reference, repeat=1, number=number, warmup=warmup))
        warmup = 0
    return statistics.median(a), statistics.median(b)


def row(name: str, ours: float, reference: float, reference_name: str, *, at_most: float | None = None,
        at_least_faster: float | None = None, note: str = "") -> dict[str, Any]:
    """One result row.

    Give exactly one target: ``at_most`` (``ours / reference`` must be ≤ it) or ``at_least_faster``
    (``reference / ours`` must be ≥ it). The ratio shown is the one the target is stated in.
    """
    if (at_most is None) == (at_least_faster is None):
        raise ValueError("give exactly one of at_most and at_least_faster")
    if at_most is not None:
        ratio = ours / reference
        target = f"<= {at_most:g}"
        met = ratio <= at_most
    else:
        ratio = reference / ours
        target = f">= {at_least_faster:g}x faster"
        met = ratio >= at_least_faster
    return {"benchmark": name, "ours": ours, "reference": reference, "reference_name": reference_name,
            "ratio": ratio, "target": target, "met": met, "note": note}
