"""Drive a headless LibreOffice Calc over UNO: run by LibreOffice's own Python, not the test's.

The extension tests and benchmark need Calc to compute a workbook live (with the sheetpump extension
installed) and to change cells through its API. That takes LibreOffice's Python bridge (``uno``), which
lives in the Python LibreOffice runs (Debian: /usr/bin/python3 with python3-uno), not in the test's
virtual environment. :func:`run_job` (called from the tests) starts ``soffice --headless`` with a given
profile, listening on a private pipe, and runs this file with that Python; this file connects, performs
the steps of a job read as JSON from standard input and prints the results as JSON.

A job: ``{"pipe": NAME, "steps": [...]}``; each step one of

- ``{"open": PATH}`` loads a workbook (hidden; closing the one open before), ``{"calculate": true}``
  recomputes every formula (``calculateAll``) and reports the seconds it took in ``"seconds"``;
- ``{"read": [[SHEET, CELL], ...]}`` gives each cell's value (a number, a text, or an error text such as
  ``"Err:504"``) and formula;
- ``{"new": true}`` starts a new, empty spreadsheet (hidden; closing the one open before), whose one
  sheet is named "Sheet1";
- ``{"set": [SHEET, CELL, VALUE]}`` writes a number or text into a cell;
- ``{"fill": [SHEET, RANGE, ROWS]}`` writes rows of numbers or formulas (texts starting with ``=``) into a
  range in one call (``setFormulaArray``);
- ``{"array": [SHEET, RANGE, FORMULA]}`` enters an array formula over a range;
- ``{"formula": [SHEET, CELL, FORMULA]}`` enters a formula (English function names, ``;`` or ``,``);
- ``{"save": PATH}`` saves as .xlsx (File > Save As with Calc's "Calc Office Open XML" filter);
- ``{"functions": [NAME, ...]}`` gives the Function Wizard's description of each function (its
  category id and argument names and help), from ``com.sun.star.sheet.FunctionDescriptions``.

This module is imported by the tests only for :func:`run_job`; ``uno`` is imported inside ``main``.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
import uuid
from pathlib import Path
from typing import Any

#: The Python that LibreOffice's bridge belongs to (Debian's python3-uno is for the system Python).
UNO_PYTHON_ENV = "SHEETPUMP_UNO_PYTHON"


def uno_python() -> str:
    return os.environ.get(UNO_PYTHON_ENV, "/usr/bin/python3")


def run_job(soffice: str, profile: Path, steps: list[dict[str, Any]], timeout: float = 600.0) -> list[Any]:
    """Start a headless soffice on ``profile``, run ``steps`` through this file, stop soffice."""
    from sheetpump.extension.office import office_environment  # here: main() runs without sheetpump

    pipe = f"sheetpump-{uuid.uuid4().hex}"
    env = office_environment()
    office = subprocess.Popen(
        [soffice, f"-env:UserInstallation={profile.resolve().as_uri()}", "--headless", "--invisible",
         "--norestore", "--nolockcheck", "--nodefault", f"--accept=pipe,name={pipe};urp;"],
        stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True,
        env=env)
    try:
        done = subprocess.run([uno_python(), __file__], input=json.dumps({"pipe": pipe, "steps": steps}),
                              capture_output=True, text=True, timeout=timeout, check=False, env=env)
        if done.returncode != 0:
            raise RuntimeError(f"the UNO script failed:\n{done.stderr}\n{done.stdout}")
        return json.loads(done.stdout)
    finally:
        office.terminate()
        try:
            office.wait(30)
        except subprocess.TimeoutExpired:
            os.killpg(office.pid, 9)
            office.wait()


def _connect(uno: Any, pipe: str) -> Any:
    local = uno.getComponentContext()
    resolver = local.ServiceManager.createInstanceWithContext("com.sun.star.bridge.UnoUrlResolver", local)
    deadline = time.monotonic() + 120
    while True:
        try:
            return resolver.resolve(f"uno:pipe,name={pipe};urp;StarOffice.ComponentContext")
        except Exception:
            if time.monotonic() > deadline:
                raise
            time.sleep(0.3)


def _value(cell: Any) -> Any:
    from com.sun.star.table.CellContentType import FORMULA, TEXT  # type: ignore[import-not-found]

    kind = cell.getType()
    if kind == FORMULA:
        if cell.getError():
            return f"Err:{cell.getError()}"
        return cell.getString() if cell.FormulaResultType2 == 2 else cell.getValue()  # 2: TEXT
    if kind == TEXT:
        return cell.getString()
    return cell.getValue()


def main() -> None:
    import uno  # type: ignore[import-not-found]
    from com.sun.star.beans import PropertyValue  # type: ignore[import-not-found]

    def props(**kw: Any) -> tuple[Any, ...]:
        out = []
        for key, value in kw.items():
            p = PropertyValue()
            p.Name, p.Value = key, value
            out.append(p)
        return tuple(out)

    job = json.load(sys.stdin)
    ctx = _connect(uno, job["pipe"])
    desktop = ctx.ServiceManager.createInstanceWithContext("com.sun.star.frame.Desktop", ctx)
    doc = None
    results: list[Any] = []
    try:
        for step in job["steps"]:
            if "open" in step:
                url = uno.systemPathToFileUrl(str(Path(step["open"]).resolve()))
                if doc is not None:
                    doc.close(True)
                doc = desktop.loadComponentFromURL(url, "_blank", 0, props(Hidden=True))
                if doc is None:
                    raise RuntimeError(f"LibreOffice could not open {step['open']}")
                results.append(None)
            elif "new" in step:
                if doc is not None:
                    doc.close(True)
                doc = desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0, props(Hidden=True))
                results.append(None)
            elif "fill" in step:
                sheet, ref, rows = step["fill"]
                cells = doc.Sheets.getByName(sheet).getCellRangeByName(ref)
                cells.setFormulaArray(tuple(tuple(v if isinstance(v, str) else repr(v) for v in row)
                                            for row in rows))
                results.append(None)
            elif "calculate" in step:
                start = time.perf_counter()
                doc.calculateAll()
                results.append({"seconds": time.perf_counter() - start})
            elif "read" in step:
                out = []
                for sheet, ref in step["read"]:
                    cell = doc.Sheets.getByName(sheet).getCellRangeByName(ref)
                    out.append({"value": _value(cell), "formula": cell.getFormula()})
                results.append(out)
            elif "set" in step:
                sheet, ref, value = step["set"]
                cell = doc.Sheets.getByName(sheet).getCellRangeByName(ref)
                if isinstance(value, str):
                    cell.setString(value)
                else:
                    cell.setValue(value)
                results.append(None)
            elif "array" in step:
                sheet, ref, formula = step["array"]
                doc.Sheets.getByName(sheet).getCellRangeByName(ref).setArrayFormula(formula)
                results.append(None)
            elif "formula" in step:
                sheet, ref, formula = step["formula"]
                doc.Sheets.getByName(sheet).getCellRangeByName(ref).setFormula(formula)
                results.append(None)
            elif "save" in step:
                url = uno.systemPathToFileUrl(str(Path(step["save"]).resolve()))
                doc.storeAsURL(url, props(FilterName="Calc Office Open XML"))
                results.append(None)
            elif "functions" in step:
                descriptions = ctx.ServiceManager.createInstanceWithContext(
                    "com.sun.star.sheet.FunctionDescriptions", ctx)
                found = {}
                for i in range(descriptions.getCount()):
                    entry = {p.Name: p.Value for p in descriptions.getByIndex(i)}
                    if entry["Name"] in step["functions"]:
                        found[entry["Name"]] = {
                            "category": entry["Category"], "description": entry["Description"],
                            "arguments": [[a.Name, a.Description, a.IsOptional] for a in entry.get("Arguments") or ()]}
                results.append(found)
            else:
                raise ValueError(f"unknown step {step}")
    finally:
        if doc is not None:
            doc.close(True)
    json.dump(results, sys.stdout)


if __name__ == "__main__":
    main()
