"""Run every benchmark and print one table: ``python -m tests.benchmarks.run [name ...]``.

Collects each ``tests/benchmarks/bench_*.py`` module (any that exists, so a new one needs no line here),
calls its ``run() -> list[dict]`` (rows made by :func:`tests.benchmarks.common.row`) and prints
``benchmark | sheetpump median | reference median | ratio | target | met?``. Optional arguments pick
modules by name (``cells``, ``bench_checker`` ...). A module that fails is reported and the others run.
The exit status is 1 if any target is missed or any module failed, else 0.
"""

from __future__ import annotations

import importlib
import math
import sys
import time
import traceback
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve().parent


def modules(wanted: list[str]) -> list[str]:
    """Names of the benchmark modules to run, sorted; ``wanted`` filters by (part of) the name."""
    names = sorted(p.stem for p in HERE.glob("bench_*.py"))
    if wanted:
        names = [n for n in names if any(w.removeprefix("bench_").removesuffix(".py") in n for w in wanted)]
    return names


def _seconds(t: float) -> str:
    if t >= 1:
        return f"{t:.3g} s"
    if t >= 1e-3:
        return f"{t * 1e3:.3g} ms"
    if t >= 1e-6:
        return f"{t * 1e6:.3g} µs"
    return f"{t * 1e9:.3g} ns"


def normalise(r: dict[str, Any]) -> dict[str, Any]:
    """A row in the form of :func:`tests.benchmarks.common.row`, from any module's dict.

    Also accepted: ``sheetpump`` for ``ours``, a number as ``target`` (an upper bound on the ratio
    ``ours / reference``), and no ``met`` / ``reference_name`` / ``ratio`` (worked out here).
    """
    r = dict(r)
    if "ours" not in r:
        r["ours"] = r.get("sheetpump", math.nan)
    r.setdefault("reference", math.nan)
    r.setdefault("reference_name", "reference")
    target = r.get("target")
    if isinstance(target, (int, float)):
        r["ratio"] = r.get("ratio", r["ours"] / r["reference"] if r["reference"] else math.nan)
        r["target"] = f"<= {target:g}"
        r.setdefault("met", bool(r["ratio"] <= target))
    r.setdefault("ratio", math.nan)
    r.setdefault("target", "")
    r.setdefault("met", False)
    return r


def table(rows: list[dict[str, Any]]) -> str:
    """The rows as a Markdown table."""
    head = ("benchmark", "sheetpump median", "reference median", "ratio", "target", "met?")
    body = [(r["benchmark"], _seconds(r["ours"]), f"{_seconds(r['reference'])} ({r['reference_name']})",
             f"{r['ratio']:.3g}", r["target"], "yes" if r["met"] else "NO") for r in rows]
    widths = [max(len(str(x)) for x in col) for col in zip(head, *body, strict=True)]
    lines = ["| " + " | ".join(str(x).ljust(w) for x, w in zip(line, widths, strict=True)) + " |"
             for line in (head, *body)]
    lines.insert(1, "|" + "|".join("-" * (w + 2) for w in widths) + "|")
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    rows: list[dict[str, Any]] = []
    failed: list[str] = []
    for name in modules(argv):
        t0 = time.perf_counter()
        print(f"running {name} ...", file=sys.stderr, flush=True)
        try:
            module = importlib.import_module(f"{__package__ or 'tests.benchmarks'}.{name}")
            rows += [normalise(r) for r in module.run()]
        except Exception:
            failed.append(name)
            traceback.print_exc()
        print(f"  {name}: {time.perf_counter() - t0:.1f} s", file=sys.stderr, flush=True)
    print(table(rows) if rows else "no benchmark rows")
    notes = [f"- {r['benchmark']}: {r['note']}" for r in rows if r.get("note")]
    if notes:
        print("\nNotes:\n" + "\n".join(notes))
    if failed:
        print("\nFailed modules: " + ", ".join(failed))
    return 1 if failed or not all(r["met"] for r in rows) else 0


if __name__ == "__main__":
    sys.exit(main())
