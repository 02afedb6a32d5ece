"""The report of a measured table's evaluation (``sheetpump evaluate``): JSON for scripts, a short text.

:func:`results` is the evaluation as plain data (metric units named in each key), :func:`write_json`
streams it with every point (a table of millions of points is converted a chunk at a time), and
:func:`summary` is the text a reader sees: points, derived displacement against the nominal one, the
loss model's coefficients and residuals, flagged points, notes and the caution.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from .. import SAFETY_CAUTION
from ..evaluation import TABLE_FLAG_TEXT, Evaluation, all_notes, coefficients
from ..physics.measured import FLAG_TEXT
from ..units import DISPLACEMENT, DYN_VISCOSITY, FLOW, POWER, PRESSURE, SPEED, TEMPERATURE, VISCOSITY, from_si

__all__ = ["JSON_CHUNK", "SUMMARY_FLAGGED_ROWS", "point_records", "results", "summary", "write_json"]


def _list(x: Any, kind: Any, unit: str | None = None) -> list[float | None]:
    values = [float(v) for v in np.ravel(from_si(np.asarray(x, dtype=float), kind, unit))]
    return [v if math.isfinite(v) else None for v in values]


def _f(x: float | None) -> float | None:
    return x if x is not None and math.isfinite(x) else None


#: Points converted to records at a time when the JSON is written (memory stays bounded).
JSON_CHUNK = 10_000
#: Flagged points listed one by one in the text summary; the rest are counted.
SUMMARY_FLAGGED_ROWS = 50


def _column(x: Any, kind: Any = None) -> np.ndarray:
    x = np.asarray(x, dtype=float)
    return np.asarray(from_si(x, kind), dtype=float) if kind is not None else x


def point_records(e: Evaluation, start: int = 0, stop: int | None = None) -> list[dict[str, Any]]:
    """The points ``start:stop`` of the evaluation as plain data for JSON (metric units in each key).

    Each column is converted once for the slice (not value by value), so a table of millions of
    points is written in chunks of :data:`JSON_CHUNK`.
    """
    t, pe = e.table, e.points
    stop = t.size if stop is None else min(stop, t.size)
    cut = slice(start, stop)
    rows = t.rows[cut].tolist() if t.rows.size else list(range(start + 1, stop + 1))
    columns = {
        "speed_rpm": (t.speed, SPEED), "pressure_bar": (t.pressure, PRESSURE), "flow_L_min": (t.flow, FLOW),
        "torque_N_m": (pe.torque, None), "input_power_kW": (pe.input_power, POWER),
        "viscosity_mm2_s": (e.viscosity, VISCOSITY), "dynamic_viscosity_mPa_s": (e.dynamic_viscosity, DYN_VISCOSITY),
        "density_kg_m3": (e.density, None), "geometric_flow_L_min": (pe.geometric_flow, FLOW),
        "volumetric_efficiency": (pe.volumetric, None), "hydromechanical_efficiency": (pe.hydromechanical, None),
        "total_efficiency": (pe.total, None), "hydraulic_power_kW": (pe.hydraulic_power, POWER),
        "power_loss_kW": (pe.power_loss, POWER),
    }
    if t.temperature is not None:
        columns["temperature_degC"] = (t.temperature, TEMPERATURE)
    values = {k: [_f(v) for v in _column(x[cut], kind).tolist()] for k, (x, kind) in columns.items()}
    model = e.prediction
    if model is not None:
        m_ev, m_ehm, m_et = ([_f(v) for v in np.asarray(a[cut], dtype=float).tolist()]
                             for a in (model.volumetric, model.hydromechanical, model.total))
        extrapolated = np.asarray(model.extrapolated[cut], dtype=bool).tolist()
    out = []
    for j, row in enumerate(rows):
        point: dict[str, Any] = {"row": int(row)}
        point.update({k: v[j] for k, v in values.items() if k != "temperature_degC"})
        point["flags"] = list(pe.flags[start + j])
        if "temperature_degC" in values:
            point["temperature_degC"] = values["temperature_degC"][j]
        if model is not None:
            point["model"] = {"volumetric_efficiency": m_ev[j], "hydromechanical_efficiency": m_ehm[j],
                              "total_efficiency": m_et[j], "extrapolated": extrapolated[j]}
        out.append(point)
    return out


def results(e: Evaluation, source: str, *, points: bool = True) -> dict[str, Any]:
    """The evaluation as plain data for JSON (metric units named in each key).

    With ``points=False`` the ``points`` list is left empty (:func:`write_json` streams it).
    """
    t, pe = e.table, e.points
    d = e.derived
    derived = None if d is None else {
        "value_cm3_rev": float(from_si(d.value, DISPLACEMENT)),
        "uncertainty_cm3_rev": _f(float(from_si(d.uncertainty, DISPLACEMENT))),
        "points": d.points, "max_pressure_bar": float(from_si(d.max_pressure, PRESSURE)),
        "difference_from_nominal": _f(e.displacement_difference),
    }
    m = e.model
    model_out: dict[str, Any] | None = None
    if m is not None:
        model_out = {"method": m.method, "points": m.points,
                     "coefficients": [{k: (_f(v) if isinstance(v, float) else v) for k, v in c.items()}
                                      for c in coefficients(m)],
                     "ranges": {"pressure_bar": _list(m.ranges.pressure, PRESSURE),
                                "speed_rpm": _list(m.ranges.speed, SPEED),
                                "dynamic_viscosity_mPa_s": _list(m.ranges.viscosity, DYN_VISCOSITY)}}
        res = getattr(m, "residuals", None)
        if res is not None:
            model_out["residuals"] = {"flow_rms_L_min": float(from_si(res.flow_rms, FLOW)),
                                      "flow_max_L_min": float(from_si(res.flow_max, FLOW)),
                                      "torque_rms_N_m": res.torque_rms, "torque_max_N_m": res.torque_max}
    flagged_index = [i for i, f in enumerate(pe.flags) if f]
    flagged = [int(t.rows[i]) if t.rows.size else i + 1 for i in flagged_index]
    return {
        "file": source, "sheet": t.sheet, "points": point_records(e) if points else [],
        "point_count": t.size,
        "nominal_displacement_cm3_rev": None if e.nominal_displacement is None
        else float(from_si(e.nominal_displacement, DISPLACEMENT)),
        "displacement_used_cm3_rev": float(from_si(e.displacement, DISPLACEMENT)),
        "derived_displacement": derived, "derived_displacement_error": e.derived_error or None,
        "model": model_out, "model_error": e.model_error or None,
        "table_flags": list(e.table_flags), "flagged_rows": flagged,
        "flag_meanings": {**FLAG_TEXT, **TABLE_FLAG_TEXT},
        "notes": all_notes(e), "flagged": e.flagged, "caution": SAFETY_CAUTION,
    }


def write_json(e: Evaluation, source: str, stream: Any) -> None:
    """Write :func:`results` as JSON to ``stream``, the points converted :data:`JSON_CHUNK` at a time."""
    text = json.dumps(results(e, source, points=False), indent=2, ensure_ascii=False, allow_nan=False)
    # The key is written with its quotes only as a key: a text value would hold them escaped.
    head, tail = text.split('"points": []', 1)
    stream.write(head + '"points": [')
    for start in range(0, e.table.size, JSON_CHUNK):
        for j, point in enumerate(point_records(e, start, start + JSON_CHUNK)):
            sep = "" if start + j == 0 else ","
            stream.write(sep + "\n    " + json.dumps(point, ensure_ascii=False, allow_nan=False))
    stream.write("\n  ]" + tail + "\n")


def summary(r: dict[str, Any], e: Evaluation) -> str:
    """A short readable summary of :func:`results` (without its points) and the evaluation ``e``."""
    pe = e.points
    out = [f"Measured performance of {r['file']}" + (f" (sheet {r['sheet']})" if r["sheet"] else ""),
           f"  points: {r['point_count']}, flagged: {len(r['flagged_rows'])}"]
    nominal, d = r["nominal_displacement_cm3_rev"], r["derived_displacement"]
    out.append(f"  nominal displacement: {nominal:.3f} cm³/rev" if nominal is not None
               else "  nominal displacement: not given")
    if d is not None:
        unc = f" ± {d['uncertainty_cm3_rev']:.3f}" if d["uncertainty_cm3_rev"] is not None else ""
        diff = (f" ({d['difference_from_nominal'] * 100:+.2f} % from nominal)"
                if d["difference_from_nominal"] is not None else "")
        out.append(f"  derived displacement: {d['value_cm3_rev']:.3f}{unc} cm³/rev{diff}")
    else:
        out.append(f"  derived displacement: none ({r['derived_displacement_error']})")
    if np.isfinite(pe.volumetric).any():
        out.append(f"  η_v {np.nanmin(pe.volumetric):.3f} to {np.nanmax(pe.volumetric):.3f}, "
                   f"η_t {np.nanmin(pe.total):.3f} to {np.nanmax(pe.total):.3f}")
    m = r["model"]
    if m is None:
        out.append(f"  loss model: none ({r['model_error']})")
    else:
        out.append(f"  loss model: {m['method']}" + (f", {m['points']} points" if m["points"] else ""))
        for c in m["coefficients"]:
            unc = f" ± {c['uncertainty']:.3g}" if c["uncertainty"] is not None else ""
            unit = "" if c["unit"] == "-" else f" {c['unit']}"
            out.append(f"    {c['symbol']} = {c['value']:.4g}{unc}{unit}" + ("" if c["fitted"] else " (assumed)"))
        if "residuals" in m:
            res = m["residuals"]
            out.append(f"    residuals: flow RMS {res['flow_rms_L_min']:.3g} L/min, torque RMS "
                       f"{res['torque_rms_N_m']:.3g} N·m")
    flagged = [i for i, f in enumerate(pe.flags) if f]
    for i in flagged[:SUMMARY_FLAGGED_ROWS]:
        row = int(e.table.rows[i]) if e.table.rows.size else i + 1
        for code in pe.flags[i]:
            out.append(f"  row {row}: {code}: {r['flag_meanings'][code]}")
    if len(flagged) > SUMMARY_FLAGGED_ROWS:
        out.append(f"  ... and {len(flagged) - SUMMARY_FLAGGED_ROWS} more flagged points (each listed by "
                   "--format json)")
    for code in r["table_flags"]:
        out.append(f"  table: {code}: {r['flag_meanings'][code]}")
    for note in r["notes"]:
        out.append(f"  note: {note}")
    out.append("")
    out.append(SAFETY_CAUTION)
    return "\n".join(out) + "\n"
