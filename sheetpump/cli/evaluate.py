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
column). The run itself is :func:`sheetpump.pipeline.evaluate_file`; the reports are
:mod:`sheetpump.reports.evaluation_report`.
"""

from __future__ import annotations

import argparse
import math
import sys
from typing import Any

from ..duty import Oil
from ..errors import InputError, PhysicsError, Where, as_input_error
from ..physics import fluid
from ..units import (
    DENSITY,
    DISPLACEMENT,
    SPEED,
    VISCOSITY,
    to_si,
)
from .exit_codes import EXIT_FAIL, EXIT_OK


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
    rho = density_15 if density_15 is not None else fluid.MINERAL_OIL_DENSITY_15
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
        raise as_input_error(exc, Where(field="--vg" if grade is not None else "--nu40"), "the oil") from None
    if vi is not None:
        raise InputError("--vi without --vg", Where(field="--vi"), "e.g. --vg 46 --vi 100")
    return None


def run(args: argparse.Namespace) -> int:
    from ..pipeline import evaluate_file
    from ..reports.evaluation_report import results, summary, write_json

    displacement = _option(args.displacement, DISPLACEMENT, "--displacement")
    density = _option(args.density, DENSITY, "--density")
    speed = _option(args.speed, SPEED, "--speed")
    viscosity = _option(args.viscosity, VISCOSITY, "--viscosity")
    for name, value in (("--displacement", displacement), ("--density", density), ("--speed", speed),
                        ("--viscosity", viscosity)):
        if value is not None and value <= 0:
            raise InputError("must be positive", Where(field=name))
    oil = oil_from_args(args, density)
    e = evaluate_file(args.table, sheet=args.sheet, speed=speed, displacement=displacement, oil=oil,
                      density_15=density, viscosity=viscosity, output=args.output, paper=args.paper)
    if args.format == "json":
        write_json(e, args.table, sys.stdout)
    else:
        if args.output:
            sys.stdout.write(f"wrote {args.output}\n")
        sys.stdout.write(summary(results(e, args.table, points=False), e))
    return EXIT_FAIL if e.flagged else EXIT_OK


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
                     help=f"oil density at 15 °C, e.g. '870 kg/m^3' (default {fluid.MINERAL_OIL_DENSITY_15:g} kg/m³, "
                          "mineral oil)")
    table = parser.add_argument_group("whole-table values", "for a table without the column")
    table.add_argument("--speed", metavar="VALUE", help="speed of every point, e.g. '1500 rpm'")
    table.add_argument("--viscosity", metavar="VALUE", help="viscosity of every point, e.g. '32 cSt'")
    parser.set_defaults(run=run)
    return parser
