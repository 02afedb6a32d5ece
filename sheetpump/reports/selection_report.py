"""Reports of a selection (``sheetpump select``): plain text, JSON and JUnit XML.

Per series: the proposed size (or that none passes and why the largest fails), then one line per size
with its verdict, worst rule and margin, motor and yearly energy, why it fails or its margin.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from typing import Any

from .. import SAFETY_CAUTION
from ..physics.drive import J_PER_KWH
from ..selection import Selection, worst
from .formatting import finite
from .junit import junit_caution

__all__ = ["json_selection", "junit_selection", "text_selection"]


def text_selection(sel: Selection) -> str:
    """The selection as text, one block per series."""
    app = sel.application
    lines = [f"sheetpump select: {app.name}", ""]
    for ch in sel.choices:
        lines.append(f"{ch.series.name} ({len(ch.candidates)} sizes)")
        lines.append(f"  {'proposed' if ch.proposed is not None else 'NONE'}: {ch.summary}")
        if ch.speed is None and ch.speed_note:
            lines.append(f"  drive speed: {ch.speed_note}")
        for note in ch.series.assumptions:
            lines.append(f"  assumption: {note}")
        for i, (c, why) in enumerate(zip(ch.candidates, ch.reasons, strict=True)):
            mark = ">>" if i == ch.proposed else "  "
            motor = c.motor.label if c.motor else "no motor"
            energy = c.electrical_energy_per_year / J_PER_KWH
            lines.append(f"  {mark} {c.result.verdict:4}  {c.datasheet.model:<14} "
                         f"{c.datasheet.displacement * 1e6:7.2f} cm³/rev  {motor:>8}  "
                         f"{energy:9.0f} kWh/year  {why}")
        lines.append("")
    lines.append(SAFETY_CAUTION)
    return "\n".join(lines) + "\n"


def _size(c: Any, why: str, proposed: bool) -> dict[str, Any]:
    w = worst(c)
    return {
        "model": c.datasheet.model, "displacement_cm3_per_rev": c.datasheet.displacement * 1e6,
        "verdict": c.result.verdict, "proposed": proposed,
        "worst_rule": w.rule if w else None, "worst_margin": finite(w.margin) if w else None,
        "flow_margin": finite(c.flow_margin), "motor": c.motor.label if c.motor else None,
        "energy_kwh_per_year": finite(c.electrical_energy_per_year / J_PER_KWH), "price": c.datasheet.price,
        "cost_over_period": finite(c.cost_over_period), "reason": why,
        "failing": [{"rule": f.rule, "margin": finite(f.margin), "message": f.message}
                    for f in c.result.findings if f.severity == "fail"],
    }


def json_selection(sel: Selection) -> str:
    """The selection as JSON."""
    out = {
        "application": sel.application.name, "verdict": sel.verdict, "mains_frequency_hz": sel.mains_frequency,
        "caution": SAFETY_CAUTION,
        "series": [{
            "name": ch.series.name, "file": ch.series.file,
            "proposed": ch.choice.datasheet.model if ch.choice else None, "summary": ch.summary,
            "speed_rpm": ch.speed * 60 if ch.speed is not None else None, "speed_note": ch.speed_note,
            "assumptions": list(ch.series.assumptions),
            "sizes": [_size(c, why, i == ch.proposed) for i, (c, why) in
                      enumerate(zip(ch.candidates, ch.reasons, strict=True))],
        } for ch in sel.choices],
    }
    return json.dumps(out, indent=2, ensure_ascii=False) + "\n"


def junit_selection(sel: Selection) -> str:
    """JUnit XML: one suite per series; its case ``proposed size`` fails when no size passes, and one
    passing case per size tells its verdict and reason (a smaller size failing is the selection working).
    Every suite carries the caution as its property ``caution``."""
    root = ET.Element("testsuites", name="sheetpump select")
    failures = tests = 0
    for ch in sel.choices:
        suite = ET.SubElement(root, "testsuite", name=ch.series.name)
        junit_caution(suite)
        case = ET.SubElement(suite, "testcase", name="proposed size", classname=f"sheetpump.select.{ch.series.name}")
        if ch.proposed is None:
            ET.SubElement(case, "failure", message=ch.summary[:200], type="fail").text = ch.summary
        else:
            ET.SubElement(case, "system-out").text = ch.summary
        for c, why in zip(ch.candidates, ch.reasons, strict=True):
            size = ET.SubElement(suite, "testcase", name=f"size {c.datasheet.model}",
                                 classname=f"sheetpump.select.{ch.series.name}")
            ET.SubElement(size, "system-out").text = f"{c.result.verdict}: {why}"
        failed = int(ch.proposed is None)
        suite.set("tests", str(1 + len(ch.candidates)))
        suite.set("failures", str(failed))
        suite.set("errors", "0")
        tests += 1 + len(ch.candidates)
        failures += failed
    root.set("tests", str(tests))
    root.set("failures", str(failures))
    root.set("errors", "0")
    ET.indent(root)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, encoding="unicode") + "\n"
