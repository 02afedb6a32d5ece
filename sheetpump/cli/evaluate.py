"""``sheetpump evaluate``: evaluate a measured performance table (a test bench's or a supplier's).

    sheetpump evaluate TABLE.xlsx|TABLE.csv [-o OUT.xlsx] [--sheet NAME] [--displacement "28 cc"]
                       [--vg 46 --vi 100 | --nu40 "46 cSt" --nu100 "6.8 cSt"] [--density "870 kg/m^3"]
                       [--format text|json]

Per point: geometric flow, η_v, η_hm, η_t, hydraulic power, power loss and plausibility flags; the
displacement derived from the table with its uncertainty, against the nominal one; Wilson's loss model
fitted to the table (coefficients with units, residuals, notes, measured ranges). ``-o`` writes the
evaluation workbook; ``--format json`` prints the results for scripts; otherwise a short text summary.

Exit codes: 0 no plausibility flag fired; 1 a plausibility flag fired on a point (or the derived
displacement differs from the nominal one); 2 bad input or usage (one line naming file, sheet, cell and
column).
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from typing import Any

import numpy as np

from .. import SAFETY_CAUTION
from ..duty import Oil
from ..errors import InputError, Where
from ..physics import fluid
from ..physics.losses import FLAG_TEXT
from ..physics.pump import PhysicsError
from ..units import (
    DENSITY,
    DISPLACEMENT,
    DYN_VISCOSITY,
    FLOW,
    POWER,
    PRESSURE,
    SPEED,
    TEMPERATURE,
    VISCOSITY,
    from_si,
    to_si,
)

EXIT_OK, EXIT_FLAGGED = 0, 1


def _option(value: str | None, kind: Any, name: str) -> float | None:
    if value is None:
        return None
    try:
        return float(to_si(value, kind, name))
    except InputError as exc:
        raise exc.at(field=name) from None


def _number(value: str | None, name: str) -> float | None:
    if value is None:
        return None
    try:
        x = float(value)
    except ValueError:
        raise InputError(f"{value!r} is not a number", Where(field=name)) from None
    if not math.isfinite(x):
        raise InputError(f"{value!r} is not a finite number", Where(field=name))
    return x


def oil_from_args(args: argparse.Namespace, density_15: float | None) -> Oil | None:
    """The oil of ``--vg``/``--vi`` or ``--nu40``/``--nu100`` (None when neither is given)."""
    rho = density_15 if density_15 is not None else 870.0
    grade, vi = _number(args.vg, "--vg"), _number(args.vi, "--vi")
    nu40 = _option(args.nu40, VISCOSITY, "--nu40")
    nu100 = _option(args.nu100, VISCOSITY, "--nu100")
    if grade is not None and (nu40 is not None or nu100 is not None):
        raise InputError("give the oil either as --vg/--vi or as --nu40/--nu100, not both", Where(field="--vg"))
    try:
        if grade is not None:
            if vi is None:
                raise InputError("--vg needs the viscosity index too", Where(field="--vi"), "e.g. --vg 46 --vi 100")
            nu40, t40, nu100, t100 = fluid.oil_points_from_grade(grade, vi)
            return Oil(float(nu40), t40, float(nu100), t100, density_15=rho, grade=int(grade),
                       viscosity_index=vi, name=f"ISO VG {grade:g}")
        if nu40 is not None or nu100 is not None:
            if nu40 is None or nu100 is None:
                raise InputError("give both --nu40 and --nu100", Where(field="--nu40" if nu40 is None else "--nu100"))
            fluid.walther_coefficients(nu40, fluid.T40, nu100, fluid.T100)  # refuse an impossible pair now
            return Oil(nu40, fluid.T40, nu100, fluid.T100, density_15=rho)
    except PhysicsError as exc:
        raise InputError(f"the oil: {exc.argument} {exc.reason}", Where(field="--vg" if grade is not None
                                                                         else "--nu40")) from None
    if vi is not None:
        raise InputError("--vi without --vg", Where(field="--vi"), "e.g. --vg 46 --vi 100")
    return None


def _list(x: Any, kind: Any, unit: str | None = None) -> list[float | None]:
    values = [float(v) for v in np.ravel(from_si(np.asarray(x, dtype=float), kind, unit))]
    return [v if math.isfinite(v) else None for v in values]


def _f(x: float | None) -> float | None:
    return x if x is not None and math.isfinite(x) else None


def results(e: Any, source: str) -> dict[str, Any]:
    """The evaluation as plain data for JSON (metric units named in each key)."""
    from ..evaluation import TABLE_FLAG_TEXT, all_notes, coefficients

    t, pe = e.table, e.points
    points = []
    model = e.prediction
    for i in range(t.size):
        point = {
            "row": int(t.rows[i]) if t.rows.size else i + 1,
            "speed_rpm": _f(float(from_si(t.speed[i], SPEED))),
            "pressure_bar": _f(float(from_si(t.pressure[i], PRESSURE))),
            "flow_L_min": _f(float(from_si(t.flow[i], FLOW))),
            "torque_N_m": _f(float(pe.torque[i])),
            "input_power_kW": _f(float(from_si(pe.input_power[i], POWER))),
            "viscosity_mm2_s": _f(float(from_si(e.viscosity[i], VISCOSITY))),
            "dynamic_viscosity_mPa_s": _f(float(from_si(e.dynamic_viscosity[i], DYN_VISCOSITY))),
            "density_kg_m3": _f(float(e.density[i])),
            "geometric_flow_L_min": _f(float(from_si(pe.geometric_flow[i], FLOW))),
            "volumetric_efficiency": _f(float(pe.volumetric[i])),
            "hydromechanical_efficiency": _f(float(pe.hydromechanical[i])),
            "total_efficiency": _f(float(pe.total[i])),
            "hydraulic_power_kW": _f(float(from_si(pe.hydraulic_power[i], POWER))),
            "power_loss_kW": _f(float(from_si(pe.power_loss[i], POWER))),
            "flags": list(pe.flags[i]),
        }
        if t.temperature is not None:
            point["temperature_degC"] = _f(float(from_si(t.temperature[i], TEMPERATURE)))
        if model is not None:
            point["model"] = {"volumetric_efficiency": _f(float(model.volumetric[i])),
                              "hydromechanical_efficiency": _f(float(model.hydromechanical[i])),
                              "total_efficiency": _f(float(model.total[i])),
                              "extrapolated": bool(model.extrapolated[i])}
        points.append(point)
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
    flagged = [p["row"] for p in points if p["flags"]]
    return {
        "file": source, "sheet": t.sheet, "points": points,
        "nominal_displacement_cm3_rev": None if e.nominal_displacement is None
        else float(from_si(e.nominal_displacement, DISPLACEMENT)),
        "displacement_used_cm3_rev": float(from_si(e.displacement, DISPLACEMENT)),
        "derived_displacement": derived, "derived_displacement_error": e.derived_error or None,
        "model": model_out, "model_error": e.model_error or None,
        "table_flags": list(e.table_flags), "flagged_rows": flagged,
        "flag_meanings": {**FLAG_TEXT, **TABLE_FLAG_TEXT},
        "notes": all_notes(e), "flagged": e.flagged, "caution": SAFETY_CAUTION,
    }


def summary(r: dict[str, Any]) -> str:
    """A short readable summary of :func:`results`."""
    out = [f"Measured performance of {r['file']}" + (f" (sheet {r['sheet']})" if r["sheet"] else ""),
           f"  points: {len(r['points'])}, flagged: {len(r['flagged_rows'])}"]
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
    effs = [(p["volumetric_efficiency"], p["total_efficiency"]) for p in r["points"]
            if p["volumetric_efficiency"] is not None]
    if effs:
        out.append(f"  η_v {min(e[0] for e in effs):.3f} to {max(e[0] for e in effs):.3f}, "
                   f"η_t {min(e[1] for e in effs):.3f} to {max(e[1] for e in effs):.3f}")
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
    for p in r["points"]:
        for code in p["flags"]:
            out.append(f"  row {p['row']}: {code}: {r['flag_meanings'][code]}")
    for code in r["table_flags"]:
        out.append(f"  table: {code}: {r['flag_meanings'][code]}")
    for note in r["notes"]:
        out.append(f"  note: {note}")
    out.append("")
    out.append(SAFETY_CAUTION)
    return "\n".join(out) + "\n"


def run(args: argparse.Namespace) -> int:
    from ..evaluation import evaluate_table
    from ..workbooks.evaluation import write_evaluation
    from ..workbooks.measured import read_measured

    displacement = _option(args.displacement, DISPLACEMENT, "--displacement")
    density = _option(args.density, DENSITY, "--density")
    speed = _option(args.speed, SPEED, "--speed")
    viscosity = _option(args.viscosity, VISCOSITY, "--viscosity")
    for name, value in (("--displacement", displacement), ("--density", density), ("--speed", speed),
                        ("--viscosity", viscosity)):
        if value is not None and value <= 0:
            raise InputError("must be positive", Where(field=name))
    oil = oil_from_args(args, density)
    try:
        table = read_measured(args.table, sheet=args.sheet, speed=speed)
    except OSError as exc:
        raise InputError(f"cannot read the table ({exc.strerror or exc})", Where(file=args.table)) from None
    e = evaluate_table(table, displacement, oil=oil, density_15=density, viscosity=viscosity)
    if args.output:
        write_evaluation(e, args.output, source=args.table, paper=args.paper)
    r = results(e, args.table)
    if args.format == "json":
        sys.stdout.write(json.dumps(r, indent=2, ensure_ascii=False, allow_nan=False) + "\n")
    else:
        if args.output:
            sys.stdout.write(f"wrote {args.output}\n")
        sys.stdout.write(summary(r))
    return EXIT_FLAGGED if e.flagged else EXIT_OK


def register(sub: argparse._SubParsersAction) -> argparse.ArgumentParser:
    parser = sub.add_parser(
        "evaluate", help="evaluate a measured performance table: efficiencies, displacement, loss model",
        description="Evaluate a measured pump performance table (CSV or a sheet of a workbook; header row: "
                    "'speed [rpm]', 'pressure [psi]', 'flow [gpm]', 'torque [lbf*in]' or 'input power [kW]', "
                    "'viscosity [cSt]' or 'temperature [degC]', any order, any unit of the kind). "
                    "Exit code 0: no plausibility flag fired; 1: a flag fired; 2: bad input or usage.")
    parser.add_argument("table", metavar="TABLE.xlsx|TABLE.csv", help="the measured table")
    parser.add_argument("-o", "--output", metavar="OUT.xlsx", help="write the evaluation workbook")
    parser.add_argument("--sheet", metavar="NAME", help="sheet of a workbook (default: the first holding a table)")
    parser.add_argument("--paper", choices=("A4", "Letter"), default="A4",
                        help="paper the evaluation workbook prints on (default A4)")
    parser.add_argument("--displacement", metavar="VALUE",
                        help="nominal displacement, e.g. '28 cc' or '1.7 in^3/rev' (bare number: cm³/rev); "
                             "default the displacement derived from the table")
    parser.add_argument("--format", choices=("text", "json"), default="text",
                        help="what to print (default: a text summary)")
    oil = parser.add_argument_group("oil", "needed where the table gives temperature instead of viscosity")
    oil.add_argument("--vg", metavar="GRADE", help="ISO VG grade, e.g. 46 (with --vi)")
    oil.add_argument("--vi", metavar="VI", help="viscosity index, e.g. 100")
    oil.add_argument("--nu40", metavar="VALUE", help="viscosity at 40 °C, e.g. '46 cSt' (with --nu100)")
    oil.add_argument("--nu100", metavar="VALUE", help="viscosity at 100 °C, e.g. '6.8 cSt'")
    oil.add_argument("--density", metavar="VALUE",
                     help="oil density at 15 °C, e.g. '870 kg/m^3' (default 870 kg/m³, mineral oil)")
    table = parser.add_argument_group("whole-table values", "for a table without the column")
    table.add_argument("--speed", metavar="VALUE", help="speed of every point, e.g. '1500 rpm'")
    table.add_argument("--viscosity", metavar="VALUE", help="viscosity of every point, e.g. '32 cSt'")
    parser.set_defaults(run=run)
    return parser
