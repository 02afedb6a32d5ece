"""The Assumptions sheet of the comparison workbook: what the figures rest on.

The safety caution; the settings of the application and of the motor sizing, the oil and its viscosity
relation, the suction line when one is given, the motor standard and how the energy and heat are
reckoned; the version; the input files with their SHA-256; the standard motor ratings with their
full-load efficiencies.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from typing import Any

from ... import SAFETY_CAUTION, __version__
from ...comparison import Comparison
from ...files import sha256
from ...physics import drive
from ...units import PRESSURE, TEMPERATURE, VISCOSITY, from_si
from ..writer import (
    LINE_HEIGHT,
    PCT,
    book_styles,
    cell_format,
    display_path,
    page_setup,
    text_lines,
    write_value,
)

__all__ = ["write_assumptions"]


def _suction_assumptions(app: Any) -> list[tuple[str, Any, str | None]]:
    """Assumptions rows of the suction line, when one is given."""
    line = app.suction
    if line is None:
        return [("inlet pressure", "as stated in the application (no suction line given)", None)]
    strainer = "none"
    if line.strainer is not None:
        dp, q, nu = line.strainer
        strainer = (f"{dp / 1e5:g} bar at {q * 60000:g} L/min and {nu * 1e6:g} mm^2/s, scaled as a "
                    f"{line.strainer_law} element")
    return [
        ("suction line", f"inner diameter {line.diameter * 1e3:g} mm, length {line.length:g} m, lift "
                         f"{line.lift:g} m, reservoir {line.reservoir_pressure / 1e5:.4g} bara", None),
        ("suction fittings", f"{line.fittings or 'none'} (K = {line.k_re:g}/Re + {line.k_inf:.3g})", None),
        ("suction strainer", strainer, None),
        ("inlet pressure", "reservoir - rho g lift - Darcy-Weisbach friction (64/Re laminar, Colebrook by "
                           "Clamond's method turbulent, linear between Re 2000 and 4000) - fittings (3-K method, "
                           "fluids.fittings) - strainer - velocity head, at the pump's geometric flow", None),
    ]


def _assumption_rows(comp: Comparison) -> list[tuple[str, Any, str | None]]:
    """The Assumptions sheet's settings: label, value, number format (a share shows as a percentage)."""
    app, oil = comp.application, comp.application.oil
    settings = comp.settings
    return [
        ("application", app.name, None),
        ("relief-valve setting [bar]", float(from_si(app.relief_setting, PRESSURE, "bar")), "#,##0.#"),
        ("overshoot allowed", app.overshoot, "0.#%"),
        ("surplus flow to tank", "at each segment's pump pressure (the duty's: over the relief valve or a "
         "throttle the pump runs at its pressure, and the duty says so)", None),
        ("cycles per hour", app.cycles_per_hour, "#,##0.##"),
        ("hours per year", app.hours_per_year, "#,##0"),
        (f"energy price [{app.currency}/kWh]", app.energy_price, "#,##0.00##"),
        ("evaluation period [years]", app.evaluation_years, "#,##0.#"),
        ("flow margin required", app.flow_margin, "0.#%"),
        ("pressure margin required", app.pressure_margin, "0.#%"),
        ("speed margin required", app.speed_margin, "0.#%"),
        ("oil", oil.name or (f"ISO VG {oil.grade}" if oil.grade else "two viscosity points"), None),
        ("oil viscosity point 1 [mm^2/s at degC]",
         f"{from_si(oil.nu1, VISCOSITY):.4g} at {from_si(oil.t1, TEMPERATURE):.4g}", None),
        ("oil viscosity point 2 [mm^2/s at degC]",
         f"{from_si(oil.nu2, VISCOSITY):.4g} at {from_si(oil.t2, TEMPERATURE):.4g}", None),
        ("oil viscosity index", oil.viscosity_index, "0.#"),
        ("oil density at 15 degC [kg/m^3]", oil.density_15, "#,##0.#"),
        ("viscosity against temperature", "Walther relation, ASTM D341", None),
        *_suction_assumptions(app),
        ("motor standard", app.motor_standard, None),
        ("motor sizing rule", "smallest standard rating with rating x service factor >= RMS input power (over "
         "the cycle, or over the worst thermal window of a longer one) and rating x overload factor >= peak, "
         "each size tried in turn; how long a peak lasts does not enter (heating follows the RMS, "
         "IEC 60034-1 S6; its 60 % for 15 s is a stall test)", None),
        ("overload factor", f"{settings.overload_factor:g} x rating: the peak torque the motor carries without "
         "stalling, IEC 60034-1 momentary excess torque (60 %), from memory", None),
        ("service factor", f"{settings.service_factor:g} (1: sized to the nameplate rating; NEMA's 1.15 kept "
         "as a reserve, common practice)", None),
        ("motor thermal time [min]", settings.thermal_window / 60.0, "#,##0.#"),
        ("motor series", "IEC 60072-1 rated outputs (kW)" if app.motor_standard == "IEC"
         else "NEMA MG 1 horsepower ratings", None),
        ("motor efficiency table", "IEC 60034-30-1 IE3, 4-pole 50 Hz (full load)" if app.motor_standard == "IEC"
         else "NEMA MG 1 Table 12-12, NEMA Premium, 4-pole enclosed (full load)", None),
        ("electrical energy", "shaft energy + motor losses at the part load: a constant third of the "
         "full-load losses plus two thirds times the load squared (efficiency at half load = full-load "
         "efficiency, from memory)", None),
        ("heat into the oil", "pump power loss + surplus flow x the pressure it crosses (see the Summary's "
         "'surplus flow crosses')", None),
        ("settings not given (defaults used)", ", ".join(app.defaulted) or "none", None),
        ("sheetpump version", __version__, None),
    ]


def _motor_ratings(book: Any, sheet: Any, r: int, standard: str, label: Any) -> int:
    """Write the standard motor ratings and their full-load efficiencies from row ``r`` on; returns the
    last row written."""
    series = drive.IEC_RATINGS_KW if standard == "IEC" else drive.NEMA_RATINGS_HP
    unit = "kW" if standard == "IEC" else "hp"
    sheet.write_string(r, 0, f"standard motor ratings [{unit}]", label)
    sheet.write_string(r, 1, "full-load efficiency", label)
    rating_fmt = cell_format(book, num_format="#,##0.###", align="left")
    eff_fmt = cell_format(book, num_format=PCT, align="left")
    for rating in series:
        r += 1
        write_value(sheet, r, 0, rating, rating_fmt)
        watts = rating * (1000.0 if unit == "kW" else drive.HP)
        write_value(sheet, r, 1, float(drive.motor_efficiency(watts, standard)), eff_fmt)
    return r


def write_assumptions(book: Any, comp: Comparison, inputs: Sequence[str | os.PathLike[str]], paper: str,
                 base: str) -> None:
    """Write the Assumptions sheet: the caution, the settings, the input files and the motor ratings."""
    f = book_styles(book)
    sheet = book.add_worksheet("Assumptions")
    app = comp.application
    rows = _assumption_rows(comp)
    label_w, value_w = 40, 70
    sheet.set_column(0, 0, label_w)
    sheet.set_column(1, 1, value_w)
    sheet.write_string(0, 0, "Assumptions and inputs", f["title"])
    sheet.merge_range(1, 0, 1, 1, SAFETY_CAUTION, f["caution"])
    sheet.set_row(1, LINE_HEIGHT * text_lines(SAFETY_CAUTION, (label_w + value_w) * 0.85))
    label = cell_format(book, "header", text_wrap=False)
    left = cell_format(book, "wrap", align="left")
    r = 3
    for text, value, num in rows:
        sheet.write_string(r, 0, text, label)
        write_value(sheet, r, 1, value, cell_format(book, num_format=num, align="left") if num else left)
        if isinstance(value, str) and len(value) > value_w:
            sheet.set_row(r, LINE_HEIGHT * text_lines(value, value_w))
        r += 1
    r += 1
    sheet.write_string(r, 0, "input file (relative to this workbook)", label)
    sheet.write_string(r, 1, "SHA-256", label)
    for path in inputs:
        r += 1
        write_value(sheet, r, 0, display_path(path, base), left)
        write_value(sheet, r, 1, sha256(path), left)
    r = _motor_ratings(book, sheet, r + 2, app.motor_standard, label)
    page_setup(sheet, app.name, paper=paper, landscape=False, area=(0, 0, r, 1))
