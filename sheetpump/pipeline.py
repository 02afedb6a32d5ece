"""The one way from input files to results: read → check → compare (or select) → write.

The command line (``check``, ``compare``, ``select``) and the demo all go through here, so they read the
same way, refuse the same bad input with the same message, and guard their outputs alike:

1. **read** the application workbook and each datasheet or series workbook (:func:`read_application`,
   :func:`read_datasheet`, :func:`read_size_series`; a folder stands for its workbooks,
   :func:`read_candidates`), every error naming the file;
2. **guard** the outputs: none may be an input or another output (:func:`sheetpump.files.check_outputs`,
   with the inputs of :func:`inputs_of`);
3. **check and compare** (:func:`sheetpump.comparison.compare`) or **select**
   (:func:`sheetpump.selection.select`);
4. **write** the results atomically: the reports (:mod:`sheetpump.reports`) and the workbooks
   (:mod:`sheetpump.workbooks`).

:func:`check_files`, :func:`compare_files` and :func:`select_files` are the three runs; each returns its
answer and the report text, so a face only prints it and turns the verdicts into an exit code.
:func:`evaluate_file` is the same way for a measured performance table: read → evaluate → write.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .checks import CheckSettings
from .errors import InputError, PhysicsError, Where, as_input_error
from .files import atomic_write, check_outputs

if TYPE_CHECKING:
    from .comparison import Comparison
    from .datasheet import Datasheet
    from .duty import Application, Oil
    from .evaluation import Evaluation
    from .selection import Selection, SizeSeries

__all__ = [
    "CheckRun",
    "SelectRun",
    "annotate_target",
    "check_files",
    "compare_files",
    "datasheet_paths",
    "evaluate_file",
    "inputs_of",
    "proposed_sizes",
    "read_application",
    "read_candidates",
    "read_datasheet",
    "read_size_series",
    "select_files",
]

#: A progress display: ``progress(i, total, file name)`` before reading the i-th of ``total`` files, and
#: ``progress(total, total, "")`` once all are read.
Progress = Callable[[int, int, str], None]


# --------------------------------------------------------------------------------------------------
# Read


def _read(reader: Callable[[str], Any], path: str, what: str) -> Any:
    """``reader(path)``, with every error it raises turned into an :class:`InputError` naming ``path``."""
    p = Path(path)
    if not p.is_file():
        raise InputError(f"{what} not found" if not p.exists() else f"{what} is not a file", Where(file=path))
    try:
        return reader(path)
    except InputError as exc:
        raise exc.at(file=path) from None
    except PhysicsError as exc:
        raise as_input_error(exc, Where(file=path)) from None
    except OSError as exc:
        raise InputError(f"cannot read the {what} ({exc.strerror or exc})", Where(file=path)) from None


def read_application(path: str) -> Application:
    """Read the application workbook (machine, oil, settings, duty cycle); errors name the file."""
    from .workbooks import readers  # looked up at call time: tests replace the reader with a stand-in

    return _read(readers.read_application, path, "application workbook")


def read_datasheet(path: str) -> Datasheet:
    """Read one pump datasheet workbook; errors name the file."""
    from .workbooks import readers

    return _read(readers.read_datasheet, path, "datasheet workbook")


def read_size_series(path: str) -> SizeSeries:
    """Read one series workbook (a supplier's sizes); errors name the file."""
    from .workbooks import size_series

    return _read(size_series.read_size_series, path, "series workbook")


def datasheet_paths(items: Sequence[str], app: str | None = None) -> list[str]:
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


def read_candidates(paths: Sequence[str], progress: Progress | None = None) -> list[Datasheet | SizeSeries]:
    """Read each datasheet or series workbook (a workbook with a sheet named Series is a series)."""
    from .workbooks.size_series import is_series_workbook

    items: list[Datasheet | SizeSeries] = []
    for i, path in enumerate(paths, start=1):
        if progress:
            progress(i, len(paths), Path(path).name)
        items.append(read_size_series(path) if is_series_workbook(path) else read_datasheet(path))
    if progress:
        progress(len(paths), len(paths), "")
    return items


def inputs_of(app: Application, app_path: str, datasheets: Sequence[str]) -> list[tuple[str, str]]:
    """The input files of a check or comparison, each with what it is (for :func:`check_outputs`)."""
    found = [("the application workbook", app_path)]
    if app.duty.source == "series" and app.duty.where.file:
        found.append(("the application's duty log", app.duty.where.file))
    return found + [("a datasheet", path) for path in datasheets]


# --------------------------------------------------------------------------------------------------
# Check


@dataclass(frozen=True)
class CheckRun:
    """What :func:`check_files` found: the comparison (every pump's check) and its report text."""

    comparison: Comparison
    report: str


def annotate_target(out: str, datasheet: str, several: bool) -> Path:
    """The annotated copy's path: ``out`` itself for one datasheet, ``out``'s stem + datasheet stem else."""
    target = Path(out)
    if not several:
        return target
    return target.with_name(f"{target.stem}-{Path(datasheet).stem}{target.suffix or '.xlsx'}")


def check_files(app_path: str, datasheets: Sequence[str], settings: CheckSettings, *, report_format: str = "text",
                output: str | None = None, junit: str | None = None, annotate: str | None = None) -> CheckRun:
    """Check each datasheet against the application: read, check and compare, then write the annotated
    copies (``annotate``: one path, or its stem + each datasheet's for several), the JUnit XML (``junit``)
    and the report (``report_format`` ``"text"`` or ``"json"``) to ``output`` when given.

    The report's text is returned either way (a face prints it where no ``output`` is given).
    """
    from .comparison import compare

    app = read_application(app_path)
    sheets = [read_datasheet(path) for path in datasheets]
    comp = compare(sheets, app, settings)  # an error in one datasheet's check names its file
    results = [c.result for c in comp.candidates]
    several = len(results) > 1
    annotated = [annotate_target(annotate, path, several) for path in datasheets] if annotate else []
    shown = [str(target) for target in annotated] if several else [annotate] * len(annotated)  # as typed
    outputs = [*(("--annotate", target) for target in shown), ("--junit", junit), ("--output", output)]
    check_outputs([(option, path) for option, path in outputs if path], inputs_of(app, app_path, datasheets))
    if annotated:
        from .reports.annotate import annotate as annotate_copy

        for path, r, target in zip(datasheets, results, annotated, strict=True):
            annotate_copy(r, target, source=path)
    if junit:
        from .reports.junit import junit_report

        atomic_write(junit, junit_report(results, strict=settings.strict))
    if report_format == "json":
        from .reports.json_report import json_report

        text = json_report(comp, strict=settings.strict)
    else:
        from .reports.text import text_report

        text = text_report(comp, strict=settings.strict)
    if output:
        atomic_write(output, text)
    return CheckRun(comp, text)


# --------------------------------------------------------------------------------------------------
# Compare


def proposed_sizes(items: Sequence[Datasheet | SizeSeries], app: Application,
                   settings: CheckSettings) -> tuple[list[Datasheet], list[tuple[str, ...]]]:
    """Datasheets for the comparison: a series stands for its proposed size (its largest, failing, where
    none passes), with notes saying so and what was assumed; a datasheet stands for itself."""
    from .selection import SizeSeries, select

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


def compare_files(app_path: str, datasheets: Sequence[str], output: str | os.PathLike[str],
                  settings: CheckSettings | None = None, progress: Progress | None = None) -> Comparison:
    """Read, check, compare and write the comparison workbook ``output``; returns the comparison.

    ``datasheets`` are datasheet or series workbooks or folders of them; a series stands for its proposed
    size (:func:`proposed_sizes`). ``settings`` default to metric, not strict, the usual motor sizing.
    """
    from .comparison import compare
    from .workbooks.comparison_book import write_comparison

    app = read_application(app_path)
    paths = datasheet_paths(datasheets, app_path)
    items = read_candidates(paths, progress)
    settings = settings or CheckSettings()
    inputs = inputs_of(app, app_path, paths)
    check_outputs([("--output", output)], inputs)
    sheets, notes = proposed_sizes(items, app, settings)
    comp = compare(sheets, app, settings)
    if any(notes):
        comp = replace(comp, candidates=[replace(c, notes=c.notes + n) for c, n in zip(comp.candidates, notes,
                                                                                       strict=True)])
    write_comparison(output, comp, inputs=[path for _, path in inputs], units=settings.units)
    return comp


# --------------------------------------------------------------------------------------------------
# Select


@dataclass(frozen=True)
class SelectRun:
    """What :func:`select_files` found: the selection and its report text."""

    selection: Selection
    report: str


def select_files(app_path: str, series_paths: Sequence[str], settings: CheckSettings | None = None,
                 mains_frequency: float | None = None, *, output: str | os.PathLike[str] | None = None,
                 report_format: str = "text", report: str | os.PathLike[str] | None = None,
                 junit: str | None = None) -> SelectRun:
    """Propose a size of each series: read, check every size, select, then write the selection workbook
    (``output``, in ``settings.units``), the JUnit XML (``junit``) and the report (``report_format``
    ``"text"`` or ``"json"``) to ``report`` when given. The report's text is returned either way."""
    from .reports.selection_report import json_selection, junit_selection, text_selection
    from .selection import select
    from .workbooks.selection_book import write_selection

    settings = settings or CheckSettings()
    app = read_application(app_path)
    series = [read_size_series(path) for path in series_paths]
    inputs = inputs_of(app, app_path, []) + [("a series workbook", p) for p in series_paths]
    outputs = [("--output", output), ("--junit", junit), ("--report", report)]
    check_outputs([(option, path) for option, path in outputs if path], inputs)
    sel = select(series, app, settings, mains_frequency)
    if output:
        write_selection(output, sel, inputs=[p for _, p in inputs], units=settings.units)
    if junit:
        atomic_write(junit, junit_selection(sel))
    text = json_selection(sel) if report_format == "json" else text_selection(sel)
    if report:
        atomic_write(report, text)
    return SelectRun(sel, text)


# --------------------------------------------------------------------------------------------------
# A measured performance table

def evaluate_file(table_path: str, *, sheet: str | None = None, speed: float | None = None,
                  displacement: float | None = None, oil: Oil | None = None, density_15: float | None = None,
                  viscosity: float | None = None, output: str | None = None, paper: str = "A4") -> Evaluation:
    """Read a measured table (CSV or a sheet), evaluate it and write the evaluation workbook if asked.

    Parameters
    ----------
    table_path : str
        The ``.csv`` or ``.xlsx`` holding the table.
    sheet : str, optional
        Sheet of a workbook (default the first holding a table).
    speed, displacement, density_15, viscosity : float, optional
        Whole-table values in SI: speed [rev/s], nominal displacement [m³/rev], oil density at 15 °C
        [kg/m³], kinematic viscosity [m²/s]; None where the table (or a default) gives them.
    oil : Oil, optional
        The oil, where the table gives temperature instead of viscosity.
    output : str, optional
        The evaluation workbook to write (guarded: never the table itself).
    paper : str
        ``"A4"`` or ``"Letter"``.
    """
    from .evaluation import evaluate_table
    from .workbooks.evaluation_book import write_evaluation
    from .workbooks.measured_table import read_measured

    if output:
        check_outputs([("--output", output)], [("the measured table", table_path)])
    try:
        table = read_measured(table_path, sheet=sheet, speed=speed)
    except OSError as exc:
        raise InputError(f"cannot read the table ({exc.strerror or exc})", Where(file=table_path)) from None
    evaluation = evaluate_table(table, displacement, oil=oil, density_15=density_15, viscosity=viscosity)
    if output:
        write_evaluation(evaluation, output, source=table_path, paper=paper)
    return evaluation
