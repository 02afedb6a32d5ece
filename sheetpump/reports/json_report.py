"""The machine-readable report of a check: findings per pump and rule, drive, motor, energy, cost and rank.

It takes the :class:`~sheetpump.comparison.Comparison` and only formats it: every number in the display
unit of the check's settings with its SI value beside it; non-finite numbers are ``null``.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from .. import SAFETY_CAUTION, __version__
from ..checks import FAIL, PASS, WARN, CheckResult, Finding, display_units
from ..comparison import Candidate, Comparison
from ..errors import Where
from ..physics.drive import J_PER_KWH
from ..units import FLOW, POWER, TORQUE, VISCOSITY, Kind, from_si
from .formatting import fails, finite, in_display_unit

__all__ = ["json_report"]


def _where_dict(where: Where | None) -> dict[str, str | None] | None:
    if where is None:
        return None
    out = {"file": where.file, "sheet": where.sheet, "cell": where.cell, "field": where.field}
    if where.note:
        out["note"] = where.note
    return out


def _quantity(value: float | str | None, f: Finding) -> dict[str, Any] | str | None:
    if value is None or isinstance(value, str):
        return value
    return {"value": finite(in_display_unit(value, f.kind, f.unit)), "unit": f.unit,
            "si": finite(value), "si_unit": f.kind.si if f.kind is not None else ""}


def _finding_json(f: Finding, strict: bool) -> dict[str, Any]:
    return {
        "rule": f.rule,
        "title": f.title,
        "verdict": f.severity,
        "severity": f.severity,
        "matters_for_the_duty": f.matters,
        "failed": fails(f, strict),
        "message": f.message,
        "measured": _quantity(f.measured, f),
        "limit": _quantity(f.limit, f),
        "margin": finite(f.margin),
        "segment": f.segment,
        "count": f.count,
        "share": finite(f.share),
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
    units = display_units(r.settings.units)
    d = r.drive
    out: dict[str, Any] = {"basis": d.basis, "cycle": {}}
    for name, kind in (("peak_torque", TORQUE), ("peak_power", POWER), ("rms_power", POWER),
                       ("mean_power", POWER), ("mean_power_loss", POWER), ("mean_surplus_heat", POWER),
                       ("mean_heat", POWER)):
        v = getattr(d, name)
        out["cycle"][name] = _power(v, kind, units)
    out["cycle"]["surplus_path"] = d.surplus_path
    out["cycle"]["energy_per_cycle"] = {"value": finite(d.energy_per_cycle / J_PER_KWH), "unit": "kWh",
                                        "si": finite(d.energy_per_cycle)}
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
    return {"value": finite(float(from_si(v, kind, units[kind]))) if math.isfinite(v) else None,
            "unit": units[kind], "si": finite(v)}


def _motor_json(c: Candidate) -> dict[str, Any]:
    units = display_units(c.result.settings.units)
    app = c.result.application
    m = c.motor
    out: dict[str, Any] = {"motor": None, "note": c.motor_note}
    if m is not None:
        out["motor"] = {
            "label": m.label, "standard": m.standard, "rated_power": _power(m.rated_power, POWER, units),
            "rms_load": _power(c.motor_rms, POWER, units), "rms_over": c.motor_rms_basis,
            "peak_load": _power(max(c.result.drive.peak_power, c.motor_rms), POWER, units),
            "rms_share_of_rating": finite(m.rms_load), "peak_share_of_rating": finite(m.peak_load),
            "overload_factor": m.overload_factor, "service_factor": m.service_factor, "binding": m.binding,
            "full_load_efficiency": finite(m.efficiency),
        }
    out["energy"] = {"per_cycle_kwh": finite(c.electrical_energy_per_cycle / J_PER_KWH),
                     "per_year_kwh": finite(c.electrical_energy_per_year / J_PER_KWH),
                     "basis": "the motor's part-load efficiency"}
    out["cost"] = {"currency": app.currency, "price": c.datasheet.price,
                   "energy_per_year": finite(c.energy_cost_per_year),
                   "over_period": finite(c.cost_over_period) if c.cost_over_period is not None else None,
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
            "verdict": r.verdict, "worst_margin": finite(r.worst_margin), "counts": r.counts(),
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
