"""Reports of the rating checker: readable text, JSON, JUnit XML and an annotated copy of a datasheet.

Text and JSON take the :class:`~sheetpump.comparison.Comparison` (every pump's check, motor, energy,
heat, cost and rank: the whole answer, the same numbers the comparison workbook shows); JUnit and the
annotated copy take the :class:`~sheetpump.checks.CheckResult` of each pump. They only format; numbers are
shown in the display units of the check's settings, and JSON carries the SI value beside each. Every rule
appears for every pump, ``not checked`` ones with their reason and the cell to fill. Files are written
atomically (:mod:`sheetpump.files`) and the datasheet a copy is made of is only ever read.
"""

from __future__ import annotations

import dataclasses
import json
import math
import os
import xml.etree.ElementTree as ET
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import numpy as np

from . import SAFETY_CAUTION, __version__
from .checks import DISPLAY_UNITS, FAIL, INFO, NOT_CHECKED, PASS, WARN, CheckResult, Finding
from .comparison import Candidate, Comparison
from .errors import InputError, Where
from .files import atomic_path, check_outputs, same_file
from .units import FLOW, POWER, TORQUE, VISCOSITY, Kind, from_si, pretty_unit

__all__ = ["FILLS", "FINDINGS_SHEET", "annotate", "json_report", "junit_caution", "junit_report", "text_report"]

_SEVERITY_ORDER = {FAIL: 0, WARN: 1, NOT_CHECKED: 2, INFO: 3, PASS: 4}

#: Fill colours (RGB hex) of the annotated copy, our own: a soft red, amber, violet (a cell to fill in:
#: the rule could not be checked) and blue.
FILLS = {FAIL: "F2B8B5", WARN: "FCE3A4", NOT_CHECKED: "DCD0EE", INFO: "CFE2F3"}

#: Name of the sheet the annotated copy lists the findings on.
FINDINGS_SHEET = "Check findings"

_FORMULA_STARTS = ("=", "+", "-", "@")


# --------------------------------------------------------------------------------------------------
# Shared formatting


def _shown(value: float | str | None, kind: Kind | None, unit: str) -> float | str | None:
    """A finding's SI value in its display unit (text stays text; non-finite becomes None)."""
    if value is None or isinstance(value, str):
        return value
    if not math.isfinite(value):
        return None
    if kind is None or not unit:
        return float(value)
    return float(from_si(value, kind, unit))


def _value_text(value: float | str | None, kind: Kind | None, unit: str) -> str:
    if isinstance(value, str):
        return value
    if value is None:
        return "—"
    if not math.isfinite(value):
        return "unlimited"
    if kind is not None and kind.name == "efficiency" and not unit:
        return f"{value:.1%}"
    shown = _shown(value, kind, unit)
    return f"{shown:.4g} {pretty_unit(unit)}".strip()


def _margin_text(margin: float | None) -> str:
    if margin is None:
        return ""
    if not math.isfinite(margin):
        return "margin ∞" if margin > 0 else "margin −∞"
    return f"margin {margin:+.1%}"


def _sorted(findings: Sequence[Finding]) -> list[Finding]:
    return sorted(findings, key=lambda f: _SEVERITY_ORDER.get(f.severity, 9))


def _where_dict(where: Where | None) -> dict[str, str | None] | None:
    if where is None:
        return None
    out = {"file": where.file, "sheet": where.sheet, "cell": where.cell, "field": where.field}
    if where.note:
        out["note"] = where.note
    return out


def _label(severity: str, strict: bool) -> str:
    return "FAIL" if severity == WARN and strict else severity.upper()


def _failed(f: Finding, strict: bool) -> bool:
    """Whether the finding fails the pump: a failure, or under ``strict`` anything that counts as a warning."""
    return f.severity == FAIL or (strict and f.effect == WARN)


# --------------------------------------------------------------------------------------------------
# Text


def _show(v: float | None, kind: Kind, units: dict[Kind, str]) -> str:
    if v is None or not math.isfinite(v):
        return "unknown"
    return f"{from_si(v, kind, units[kind]):.4g} {pretty_unit(units[kind])}"


def _money(v: float | None, currency: str) -> str:
    return "unknown" if v is None or not math.isfinite(v) else f"{v:,.0f} {currency}"


def _drive_lines(c: Candidate) -> list[str]:
    r = c.result
    units = DISPLAY_UNITS.get(r.settings.units, DISPLAY_UNITS["metric"])
    d = r.drive
    app = r.application
    lines = [
        f"  Drive: peak torque {_show(d.peak_torque, TORQUE, units)}, peak power {_show(d.peak_power, POWER, units)}, "
        f"RMS power {_show(d.rms_power, POWER, units)}, mean power {_show(d.mean_power, POWER, units)}",
        "         shaft energy per cycle "
        + ("unknown" if not math.isfinite(d.energy_per_cycle) else f"{d.energy_per_cycle / 3.6e6:.4g} kWh")
        + f" (efficiencies: {d.basis})",
        f"  Heat into the oil, mean: {_show(d.mean_heat, POWER, units)} = pump loss "
        f"{_show(d.mean_power_loss, POWER, units)} + surplus flow {_show(d.mean_surplus_heat, POWER, units)} "
        f"({d.surplus_path})",
    ]
    m = c.motor
    if m is None:
        lines.append(f"  Motor: none ({c.motor_note})")
    else:
        peak = max(d.peak_power, c.motor_rms)
        lines.append(f"  Motor: {m.label} {m.standard}, sized on RMS {_show(c.motor_rms, POWER, units)} "
                     f"{c.motor_rms_basis} and peak {_show(peak, POWER, units)}: {c.motor_note}; "
                     f"full-load efficiency {m.efficiency:.1%}")
    price = c.datasheet.price
    lines.append(f"  Energy: {c.electrical_energy_per_cycle / 3.6e6:.4g} kWh per cycle, "
                 f"{c.electrical_energy_per_year / 3.6e6:,.0f} kWh per year at the motor's part-load efficiency, "
                 f"{_money(c.energy_cost_per_year, app.currency)} per year")
    lines.append(f"  Cost: price {_money(price, app.currency)}, over {app.evaluation_years:g} years "
                 f"{_money(c.cost_over_period, app.currency)}; "
                 + (f"rank {c.rank}" if c.rank else "not ranked (fails a rule, or no cost)"))
    return lines


def text_report(comparison: Comparison, strict: bool = False) -> str:
    """A readable report, the whole answer: per pump every rule's outcome (``not checked`` ones with their
    reason and the cell to fill), margin, worst segment and the cell to fix; the drive, the heat into the
    oil in its parts, the motor (size, loads, which criterion binds), energy, cost and rank.

    Ends with a one-line summary per pump and :data:`sheetpump.SAFETY_CAUTION`.
    """
    results = [c.result for c in comparison.candidates]
    lines: list[str] = []
    if results:
        app = results[0].application
        lines.append(f"sheetpump check: application {app.name!r}" + (f" ({app.file})" if app.file else "")
                     + f", {len(results)} pump(s)" + (", strict (warnings fail)" if strict else ""))
    for cand in comparison.candidates:
        r = cand.result
        worst = r.worst_margin
        lines.append("")
        lines.append(f"== {r.datasheet.label}" + (f"  ({r.datasheet.file})" if r.datasheet.file else "")
                     + f"  verdict: {r.verdict.upper()}"
                     + (f"  worst margin {worst:+.1%}" if worst is not None else ""))
        for f in _sorted(r.findings):
            head = f"  {_label(f.severity, strict):<11} {f.rule:<31}"
            parts = []
            if f.measured is not None or f.limit is not None:
                parts.append(f"{_value_text(f.measured, f.kind, f.unit)} (limit "
                             f"{_value_text(f.limit, f.kind, f.unit)})")
            if f.margin is not None:
                parts.append(_margin_text(f.margin))
            if f.segment:
                parts.append(f.segment)
            lines.append(head + "  ".join(parts))
            if f.severity in (FAIL, WARN, INFO, NOT_CHECKED):
                lines.append(f"        {f.message}")
                extra = []
                if f.count > 1 or f.segments:
                    extra.append(f"{f.count} outside" + (f" ({f.share:.1%} of the cycle)" if f.share else "")
                                 + (": " + ", ".join(f.segments) + (" …" if f.count > len(f.segments) else "")
                                    if f.segments else ""))
                if str(f.where) and f.severity != INFO:
                    extra.append(f"{'cell to fill' if f.severity == NOT_CHECKED else 'cell'}: {f.where}")
                if f.app_where is not None and str(f.app_where):
                    extra.append(f"application: {f.app_where}")
                if extra:
                    lines.append("        " + "; ".join(extra))
        lines.extend(_drive_lines(cand))
    lines.append("")
    for r in results:
        c = r.counts()
        lines.append(f"{r.verdict.upper():<5} {r.datasheet.label}: {c[FAIL]} fail, {c[WARN]} warn, "
                     f"{c[NOT_CHECKED]} not checked, {c[INFO]} info, {c[PASS]} pass")
    lines.append("")
    lines.append(SAFETY_CAUTION)
    return "\n".join(lines) + "\n"


# --------------------------------------------------------------------------------------------------
# JSON


def _num(x: float | None) -> float | None:
    return None if x is None or not math.isfinite(x) else float(x)


def _quantity(value: float | str | None, f: Finding) -> dict[str, Any] | str | None:
    if value is None or isinstance(value, str):
        return value
    return {"value": _num(_shown(value, f.kind, f.unit)), "unit": f.unit,
            "si": _num(value), "si_unit": f.kind.si if f.kind is not None else ""}


def _finding_json(f: Finding, strict: bool) -> dict[str, Any]:
    return {
        "rule": f.rule,
        "title": f.title,
        "verdict": f.severity,
        "severity": f.severity,
        "matters_for_the_duty": f.matters,
        "failed": _failed(f, strict),
        "message": f.message,
        "measured": _quantity(f.measured, f),
        "limit": _quantity(f.limit, f),
        "margin": _num(f.margin),
        "segment": f.segment,
        "count": f.count,
        "share": _num(f.share),
        "segments": list(f.segments),
        "where": _where_dict(f.where),
        "application_where": _where_dict(f.app_where),
    }


_DRIVE_COLUMNS: tuple[tuple[str, str, Kind | None], ...] = (
    ("duration", "duration", None),
    ("viscosity", "viscosity", VISCOSITY),
    ("volumetric_efficiency", "volumetric_efficiency", None),
    ("total_efficiency", "total_efficiency", None),
    ("flow", "flow", FLOW),
    ("torque", "torque", TORQUE),
    ("input_power", "input_power", POWER),
    ("hydraulic_power", "hydraulic_power", POWER),
    ("power_loss", "power_loss", POWER),
    ("surplus_heat", "surplus_heat", POWER),
)


def _drive_json(r: CheckResult, max_segments: int) -> dict[str, Any]:
    units = DISPLAY_UNITS.get(r.settings.units, DISPLAY_UNITS["metric"])
    d = r.drive
    out: dict[str, Any] = {"basis": d.basis, "cycle": {}}
    for name, kind in (("peak_torque", TORQUE), ("peak_power", POWER), ("rms_power", POWER),
                       ("mean_power", POWER), ("mean_power_loss", POWER), ("mean_surplus_heat", POWER),
                       ("mean_heat", POWER)):
        v = getattr(d, name)
        out["cycle"][name] = _power(v, kind, units)
    out["cycle"]["surplus_path"] = d.surplus_path
    out["cycle"]["energy_per_cycle"] = {"value": _num(d.energy_per_cycle / 3.6e6), "unit": "kWh",
                                        "si": _num(d.energy_per_cycle)}
    n = len(d.duration)
    out["units"] = {col: (units[kind] if kind is not None else ("s" if col == "duration" else ""))
                    for col, _, kind in _DRIVE_COLUMNS}
    duty = r.application.duty
    if n > max_segments:
        out["segments"] = []
        out["segments_omitted"] = n
        return out
    cols = {}
    for col, attr, kind in _DRIVE_COLUMNS:
        arr = np.asarray(getattr(d, attr), float)
        if kind is not None:
            arr = np.asarray(from_si(arr, kind, units[kind]), float)
        cols[col] = [None if not math.isfinite(x) else x for x in np.broadcast_to(arr, (n,)).tolist()]
    out["segments"] = [{"segment": duty.label(i), **{c: cols[c][i] for c in cols}} for i in range(n)]
    return out


def _power(v: float, kind: Kind, units: dict[Kind, str]) -> dict[str, Any]:
    return {"value": _num(float(from_si(v, kind, units[kind]))) if math.isfinite(v) else None,
            "unit": units[kind], "si": _num(v)}


def _motor_json(c: Candidate) -> dict[str, Any]:
    units = DISPLAY_UNITS.get(c.result.settings.units, DISPLAY_UNITS["metric"])
    app = c.result.application
    m = c.motor
    out: dict[str, Any] = {"motor": None, "note": c.motor_note}
    if m is not None:
        out["motor"] = {
            "label": m.label, "standard": m.standard, "rated_power": _power(m.rated_power, POWER, units),
            "rms_load": _power(c.motor_rms, POWER, units), "rms_over": c.motor_rms_basis,
            "peak_load": _power(max(c.result.drive.peak_power, c.motor_rms), POWER, units),
            "rms_share_of_rating": _num(m.rms_load), "peak_share_of_rating": _num(m.peak_load),
            "overload_factor": m.overload_factor, "service_factor": m.service_factor, "binding": m.binding,
            "full_load_efficiency": _num(m.efficiency),
        }
    out["energy"] = {"per_cycle_kwh": _num(c.electrical_energy_per_cycle / 3.6e6),
                     "per_year_kwh": _num(c.electrical_energy_per_year / 3.6e6),
                     "basis": "the motor's part-load efficiency"}
    out["cost"] = {"currency": app.currency, "price": c.datasheet.price,
                   "energy_per_year": _num(c.energy_cost_per_year),
                   "over_period": _num(c.cost_over_period) if c.cost_over_period is not None else None,
                   "years": app.evaluation_years}
    out["rank"] = c.rank
    return out


def json_report(comparison: Comparison, strict: bool = False, max_segments: int = 10000) -> str:
    """Machine-readable findings per pump and rule (``"verdict"`` of each: pass, warn, fail, info or
    not checked), the per-segment drive figures, the heat into the oil in its parts, the motor, energy,
    cost and rank.

    A long measured series lists its drive figures only up to ``max_segments`` elements (the count
    of the rest is given as ``segments_omitted``).
    """
    pumps = []
    results = [c.result for c in comparison.candidates]
    for c in comparison.candidates:
        r = c.result
        ds = r.datasheet
        pumps.append({
            "pump": ds.label, "supplier": ds.supplier, "model": ds.model, "file": ds.file or None,
            "verdict": r.verdict, "worst_margin": _num(r.worst_margin), "counts": r.counts(),
            "findings": [_finding_json(f, strict) for f in r.findings],
            "drive": _drive_json(r, max_segments),
            **_motor_json(c),
        })
    app = results[0].application if results else None
    doc = {
        "tool": "sheetpump", "version": __version__, "strict": strict,
        "application": {"name": app.name, "file": app.file or None} if app else None,
        "display_units": results[0].settings.units if results else "metric",
        "verdict": (FAIL if any(r.verdict == FAIL for r in results) else
                    WARN if any(r.verdict == WARN for r in results) else PASS),
        "pumps": pumps,
        "caution": SAFETY_CAUTION,
    }
    return json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


# --------------------------------------------------------------------------------------------------
# JUnit XML


def junit_caution(suite: ET.Element) -> None:
    """Give a JUnit ``<testsuite>`` the caution as its first child: ``<properties><property
    name="caution" value="..."/></properties>`` (where JUnit XML keeps a suite's properties)."""
    ET.SubElement(ET.SubElement(suite, "properties"), "property", name="caution", value=SAFETY_CAUTION)


def junit_report(results: Sequence[CheckResult], strict: bool = False) -> str:
    """JUnit XML: one test suite per pump, one test case per rule; failures as ``<failure>``.

    Every suite carries :data:`sheetpump.SAFETY_CAUTION` as its property ``caution``.

    A warning is a failure under ``strict``, otherwise a passing case with the warning in
    ``<system-out>``. A rule not checked is a skipped case with the reason and the cell to fill (a
    failure under ``strict`` when it matters for the duty).
    """
    root = ET.Element("testsuites", name="sheetpump check")
    total = total_fail = total_skipped = 0
    for r in results:
        suite = ET.SubElement(root, "testsuite", name=r.datasheet.label)
        junit_caution(suite)
        failed = skipped = 0
        for f in r.findings:
            case = ET.SubElement(suite, "testcase", name=f.rule,
                                 classname=f"sheetpump.check.{r.datasheet.label}")
            body = f.message + (f"\ncell: {f.where}" if str(f.where) else "") + (
                f"\napplication: {f.app_where}" if f.app_where is not None and str(f.app_where) else "")
            if _failed(f, strict):
                failed += 1
                el = ET.SubElement(case, "failure", message=f.message[:200], type=f.severity)
                el.text = body
            elif f.severity == NOT_CHECKED:
                skipped += 1
                ET.SubElement(case, "skipped", message=f.message[:200]).text = body
            elif f.severity in (WARN, INFO):
                ET.SubElement(case, "system-out").text = f"{f.severity}: {body}"
        suite.set("tests", str(len(r.findings)))
        suite.set("failures", str(failed))
        suite.set("errors", "0")
        suite.set("skipped", str(skipped))
        total += len(r.findings)
        total_fail += failed
        total_skipped += skipped
    root.set("tests", str(total))
    root.set("failures", str(total_fail))
    root.set("errors", "0")
    root.set("skipped", str(total_skipped))
    ET.indent(root)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, encoding="unicode") + "\n"


# --------------------------------------------------------------------------------------------------
# Annotated copy


def _put(cell: Any, value: Any) -> None:
    """Write ``value`` as data: a text that looks like a formula stays text."""
    cell.value = value
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        cell.data_type = "s"
        cell.quotePrefix = True


def _print_setup(ws: Any, name: str, paper: str, landscape: bool) -> None:
    """Page setup of one sheet of the annotated copy: paper, orientation, one page wide, margins, and the
    header and footer every sheetpump output prints (:func:`~sheetpump.workbooks.writer.header_footer_parts`)."""
    from .workbooks.writer import PAPER_SIZES, header_footer_parts

    ws.page_setup.paperSize = PAPER_SIZES.get(paper, PAPER_SIZES["A4"])
    ws.page_setup.orientation = "landscape" if landscape else "portrait"
    ws.sheet_properties.pageSetUpPr.fitToPage = True
    ws.page_setup.fitToWidth = 1
    ws.page_setup.fitToHeight = 0
    ws.page_margins.left = ws.page_margins.right = 0.45
    ws.page_margins.top = ws.page_margins.bottom = 0.7
    ws.page_margins.header = ws.page_margins.footer = 0.3
    head, foot = header_footer_parts(name)
    for part, texts, size in ((ws.oddHeader, head, 9), (ws.oddFooter, foot, 8)):
        for position, text in texts.items():
            item = getattr(part, position)
            item.text, item.size = text, size


def annotate(result: CheckResult, target: str | os.PathLike[str], source: str | None = None) -> Path:
    """Write a copy of the datasheet workbook with the offending cells filled and a findings sheet.

    Parameters
    ----------
    result : CheckResult
        The check of the datasheet.
    target : path
        The copy to write (atomically); must not be the datasheet itself.
    source : path, optional
        The datasheet workbook (default ``result.datasheet.file``). It is only read.

    Returns
    -------
    Path
        ``target``.
    """
    import openpyxl
    from openpyxl.comments import Comment
    from openpyxl.styles import Alignment, Font, PatternFill
    from openpyxl.utils.exceptions import InvalidFileException

    from .workbooks.writer import LINE_HEIGHT, SIGNED_PCT, display_path, number_format, text_lines

    source = source or result.datasheet.file
    if not source:
        raise InputError("the datasheet was not read from a workbook, so there is nothing to annotate",
                         Where(field="--annotate"))
    inputs = [("the datasheet", source), ("the application workbook", result.application.file)]
    check_outputs([("--annotate", target)], [(what, path) for what, path in inputs if path])
    try:
        from .workbooks.safe import open_workbook
    except ImportError:  # pragma: no cover - the guarded opener is part of the package
        open_workbook = None
    try:
        # formulas kept (data_only=False): the copy is the user's datasheet, with marks added
        wb = open_workbook(source, data_only=False) if open_workbook else openpyxl.load_workbook(source)
    except (OSError, InvalidFileException, KeyError, ValueError) as exc:
        raise InputError(f"cannot open the datasheet to annotate it ({exc})", Where(file=str(source))) \
            from None
    # each marked cell's comment holds its findings (worst first), in place of the template's help
    marked: dict[tuple[str, str], tuple[str, Any, list[str]]] = {}
    for f in _sorted(result.findings):
        w = f.where
        if f.severity not in FILLS or not w.sheet or not w.cell or w.sheet not in wb.sheetnames:
            continue
        if w.file and not same_file(w.file, source):
            continue
        ws = wb[w.sheet]
        try:
            block = ws[w.cell]
        except (ValueError, KeyError):
            continue
        cells = [c for row in block for c in row] if isinstance(block, tuple) and block and \
            isinstance(block[0], tuple) else (list(block) if isinstance(block, tuple) else [block])
        for c in cells:
            key = (w.sheet, c.coordinate)
            if key not in marked:  # the worse severity (sorted first) keeps its colour
                marked[key] = (f.severity, c, [])
                c.fill = PatternFill(fill_type="solid", start_color=FILLS[f.severity], end_color=FILLS[f.severity])
            note = f"\n(this cell: {w.note})" if w.note else ""  # "typed as 46.7 rev/s": the unit in the cell
            marked[key][2].append(f"sheetpump {f.severity}: {f.rule}\n{f.message}{note}")
    for _severity, c, texts in marked.values():
        c.comment = Comment("\n\n".join(texts)[:2000], "sheetpump", width=360, height=160)
    name = FINDINGS_SHEET
    k = 2
    while name in wb.sheetnames:
        name = f"{FINDINGS_SHEET} {k}"
        k += 1
    ws = wb.create_sheet(name)
    header = ("Rule", "Result", "Measured", "Limit", "Unit", "Margin", "Segment", "Outside", "Cell",
              "Application cell", "Message")
    widths = (24, 8, 10, 10, 9, 9, 16, 8, 30, 30, 60)
    top = Alignment(vertical="top", wrap_text=True)
    for j, h in enumerate(header, start=1):
        _put(ws.cell(row=1, column=j), h)
        ws.cell(row=1, column=j).font = Font(bold=True)
        ws.cell(row=1, column=j).alignment = top
    base = Path(target).resolve().parent
    for i, f in enumerate(_sorted(result.findings), start=2):
        measured = _shown(f.measured, f.kind, f.unit)
        limit = _shown(f.limit, f.kind, f.unit)
        place = lambda w: str(dataclasses.replace(w, file=display_path(w.file, base)) if w.file else w)  # noqa: E731
        row = (f.rule, f.severity, measured, limit, pretty_unit(f.unit), _num(f.margin), f.segment, f.count,
               place(f.where), place(f.app_where) if f.app_where is not None else "", f.message)
        numbers = number_format([v for v in (measured, limit) if isinstance(v, float)])
        lines = 1
        for j, v in enumerate(row, start=1):
            cell = ws.cell(row=i, column=j)
            _put(cell, v)
            cell.alignment = top
            if isinstance(v, float) and j in (3, 4):
                cell.number_format = numbers
            if isinstance(v, str):
                lines = max(lines, text_lines(v, widths[j - 1]))
        ws.row_dimensions[i].height = LINE_HEIGHT * lines
        if f.severity in FILLS:
            ws.cell(row=i, column=2).fill = PatternFill(fill_type="solid", start_color=FILLS[f.severity],
                                                        end_color=FILLS[f.severity])
        if f.margin is not None:
            ws.cell(row=i, column=6).number_format = SIGNED_PCT
    last = len(result.findings) + 3
    _put(ws.cell(row=last, column=1), SAFETY_CAUTION)
    for col, width in zip("ABCDEFGHIJK", widths, strict=True):
        ws.column_dimensions[col].width = width
    ws.print_title_rows = "1:1"
    ws.freeze_panes = "A2"
    paper = getattr(result.application, "paper_size", None) or "A4"
    for sheet in wb.worksheets:
        _print_setup(sheet, result.datasheet.label, paper, landscape=sheet is ws)
    with atomic_path(target) as tmp:
        wb.save(tmp)
    return Path(target)
