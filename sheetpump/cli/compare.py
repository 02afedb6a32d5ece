"""``sheetpump compare``: the comparison workbook of several candidate pumps on one application.

    sheetpump compare --app APPLICATION.xlsx DATASHEET.xlsx [...] -o COMPARISON.xlsx

A folder stands for every ``.xlsx`` in it. Exit codes as for ``check``: 0 all pass, 1 a candidate fails
(with ``--strict`` also when one warns), 2 bad input or usage.
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from pathlib import Path
from typing import Any

from ..checks import FAIL, WARN, CheckSettings
from ..errors import InputError, Where
from ..files import check_outputs
from . import check as _check  # by module: its readers are looked up at call time

EXIT_OK, EXIT_FAIL = 0, 1


def datasheet_paths(items: list[str], app: str | None = None) -> list[str]:
    """Expand folders into their ``.xlsx`` files (sorted; Excel's ``~$`` lock files and the application
    workbook ``app`` left out)."""
    paths: list[str] = []
    skip = Path(app).resolve() if app else None
    for item in items:
        p = Path(item)
        if p.is_dir():
            found = sorted(str(x) for x in p.iterdir()
                           if x.suffix.lower() in (".xlsx", ".xlsm") and not x.name.startswith(("~$", "."))
                           and x.resolve() != skip)
            if not found:
                raise InputError("folder holds no .xlsx datasheets", Where(file=item))
            paths.extend(found)
        else:
            paths.append(item)
    return paths


class _Progress:
    """A one-line progress count on stderr, only when stderr is a terminal and there are many."""

    def __init__(self, total: int, minimum: int = 5) -> None:
        self.total = total
        self.on = total >= minimum and sys.stderr.isatty()

    def step(self, i: int, label: str) -> None:
        if self.on:
            sys.stderr.write(f"\rchecking {i}/{self.total}: {label[:40]:<40}")
            sys.stderr.flush()

    def done(self) -> None:
        if self.on:
            sys.stderr.write("\r" + " " * 70 + "\r")


def build(app_path: str, datasheets: list[str], out: str, units: str = "metric", strict: bool = False,
          settings: CheckSettings | None = None):
    """Read, check, compare and write; returns the :class:`~sheetpump.comparison.Comparison`.

    ``settings`` (when given) replaces ``units`` and ``strict``, with the motor settings."""
    from ..comparison import compare
    from ..workbooks.comparison_book import write_comparison
    from ..workbooks.size_series import is_series_workbook

    app = _check._read(_check._read_application, app_path, "application workbook")
    paths = datasheet_paths(datasheets, app_path)
    progress = _Progress(len(paths))
    sheets: list = []
    for i, path in enumerate(paths, start=1):
        progress.step(i, Path(path).name)
        if is_series_workbook(path):
            from .select import read_series

            sheets.append(read_series(path))
        else:
            sheets.append(_check._read(_check._read_datasheet, path, "datasheet workbook"))
    progress.done()
    settings = settings or CheckSettings(units=units, strict=strict)
    inputs = _check.inputs_of(app, app_path, paths)
    check_outputs([("--output", out)], inputs)
    sheets, notes = proposed_sizes(sheets, app, settings)
    comp = compare(sheets, app, settings)
    if any(notes):
        comp = replace(comp, candidates=[replace(c, notes=c.notes + n) for c, n in zip(comp.candidates, notes,
                                                                                       strict=True)])
    write_comparison(out, comp, inputs=[path for _, path in inputs], units=settings.units)
    return comp


def proposed_sizes(items: list, app: Any, settings: CheckSettings) -> tuple[list, list[tuple[str, ...]]]:
    """Datasheets for the comparison: a series stands for its proposed size (its largest, failing, where
    none passes), with notes saying so and what was assumed; a datasheet stands for itself."""
    from ..selection import SizeSeries, select

    series = [x for x in items if isinstance(x, SizeSeries)]
    chosen = iter(select(series, app, settings).choices if series else [])
    sheets, notes = [], []
    for item in items:
        if not isinstance(item, SizeSeries):
            sheets.append(item)
            notes.append(())
            continue
        ch = next(chosen)
        pick = ch.choice or ch.candidates[-1]
        sheets.append(pick.datasheet)
        scaled = [a for a in item.assumptions if a.startswith(f"{pick.datasheet.model}:")]
        head = (f"proposed size of the series {item.name}" if ch.choice else
                f"no size of the series {item.name} passes: its largest shown")
        notes.append((f"{head} ({ch.summary})", *scaled))
    return sheets, notes


def exit_code(verdicts: list[str], strict: bool) -> int:
    if FAIL in verdicts or (strict and WARN in verdicts):
        return EXIT_FAIL
    return EXIT_OK


def run(args: argparse.Namespace) -> int:
    comp = build(args.app, args.datasheets, args.output, settings=_check.settings_from(args))
    for c in comp.candidates:
        rank = f"rank {c.rank}" if c.rank else "not ranked"
        print(f"{c.result.verdict:4}  {c.datasheet.label}  ({rank})")
    print(f"comparison written to {args.output}")
    return exit_code([c.result.verdict for c in comp.candidates], args.strict)


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser("compare", help="write the comparison workbook of several candidate pumps")
    parser.add_argument("--app", required=True, metavar="APPLICATION.xlsx", help="the application workbook")
    parser.add_argument("datasheets", nargs="+", metavar="DATASHEET",
                        help="datasheet or series workbooks, or folders of them (a series: its proposed size)")
    parser.add_argument("-o", "--output", required=True, metavar="COMPARISON.xlsx", help="the workbook to write")
    parser.add_argument("--units", choices=("metric", "imperial"), default="metric",
                        help="units shown in the comparison (default metric)")
    parser.add_argument("--strict", action="store_true",
                        help="warnings (and rules not checked that matter for the duty) count as failures "
                             "for the exit code")
    _check.add_motor_options(parser)
    parser.set_defaults(run=run)
    return parser
