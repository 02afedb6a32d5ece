"""The JUnit XML report of a check: one test suite per pump, one test case per rule.

CI systems read JUnit XML: a failing rule is a ``<failure>``, a rule not checked a skipped case, and every
suite carries :data:`sheetpump.SAFETY_CAUTION` as its property ``caution`` (:func:`junit_caution`, used by
the selection's JUnit report too).
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from collections.abc import Sequence

from .. import SAFETY_CAUTION
from ..checks import INFO, NOT_CHECKED, WARN, CheckResult
from .formatting import fails

__all__ = ["junit_caution", "junit_report"]


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
            if fails(f, strict):
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
