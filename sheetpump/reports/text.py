"""The readable report of a check: per pump every rule, then the drive, heat, motor, energy, cost and rank.

It takes the :class:`~sheetpump.comparison.Comparison` (every pump's check, motor, energy, heat, cost and
rank: the whole answer, the same numbers the comparison workbook shows) and only formats it; numbers are
shown in the display units of the check's settings. Every rule appears for every pump, ``not checked``
ones with their reason and the cell to fill.
"""

from __future__ import annotations

import math

from .. import SAFETY_CAUTION
from ..checks import FAIL, INFO, NOT_CHECKED, PASS, WARN, Finding, display_units
from ..comparison import Candidate, Comparison
from ..physics.drive import J_PER_KWH
from ..units import POWER, TORQUE, Kind, from_si, pretty_unit
from .formatting import in_display_unit, worst_first

__all__ = ["text_report"]


def _value_text(value: float | str | None, kind: Kind | None, unit: str) -> str:
    if isinstance(value, str):
        return value
    if value is None:
        return "—"
    if not math.isfinite(value):
        return "unlimited"
    if kind is not None and kind.name == "efficiency" and not unit:
        return f"{value:.1%}"
    shown = in_display_unit(value, kind, unit)
    return f"{shown:.4g} {pretty_unit(unit)}".strip()


def _margin_text(margin: float | None) -> str:
    if margin is None:
        return ""
    if not math.isfinite(margin):
        return "margin ∞" if margin > 0 else "margin −∞"
    return f"margin {margin:+.1%}"


def _label(severity: str, strict: bool) -> str:
    return "FAIL" if severity == WARN and strict else severity.upper()


def _show(v: float | None, kind: Kind, units: dict[Kind, str]) -> str:
    if v is None or not math.isfinite(v):
        return "unknown"
    return f"{from_si(v, kind, units[kind]):.4g} {pretty_unit(units[kind])}"


def _money(v: float | None, currency: str) -> str:
    return "unknown" if v is None or not math.isfinite(v) else f"{v:,.0f} {currency}"


def _drive_lines(c: Candidate) -> list[str]:
    r = c.result
    units = display_units(r.settings.units)
    d = r.drive
    app = r.application
    lines = [
        f"  Drive: peak torque {_show(d.peak_torque, TORQUE, units)}, peak power {_show(d.peak_power, POWER, units)}, "
        f"RMS power {_show(d.rms_power, POWER, units)}, mean power {_show(d.mean_power, POWER, units)}",
        "         shaft energy per cycle "
        + ("unknown" if not math.isfinite(d.energy_per_cycle) else f"{d.energy_per_cycle / J_PER_KWH:.4g} kWh")
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
    lines.append(f"  Energy: {c.electrical_energy_per_cycle / J_PER_KWH:.4g} kWh per cycle, "
                 f"{c.electrical_energy_per_year / J_PER_KWH:,.0f} kWh per year at the motor's part-load efficiency, "
                 f"{_money(c.energy_cost_per_year, app.currency)} per year")
    lines.append(f"  Cost: price {_money(price, app.currency)}, over {app.evaluation_years:g} years "
                 f"{_money(c.cost_over_period, app.currency)}; "
                 + (f"rank {c.rank}" if c.rank else "not ranked (fails a rule, or no cost)"))
    return lines


def _outside_text(f: Finding) -> str:
    """The segments outside a limit: how many (unless the message ends saying so), share, names."""
    share = f"{f.share:.1%} of the cycle" if f.share else ""
    names = ", ".join(f.segments) + (" …" if f.count > len(f.segments) else "") if f.segments else ""
    if f.message.endswith(f"; {f.count} outside"):  # said already: the share and the names only
        return ": ".join(x for x in (share, names) if x)
    return f"{f.count} outside" + (f" ({share})" if share else "") + (f": {names}" if names else "")


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
        for f in worst_first(r.findings):
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
                    extra.append(_outside_text(f))
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
