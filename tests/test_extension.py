"""The cell functions live in LibreOffice Calc: the extension built, installed and computed headless.

One LibreOffice start serves every case (module fixture): ``sheetpump extension --install`` into a
throw-away profile, then Calc (driven over UNO by :mod:`tests.calc_uno`, run with LibreOffice's Python)
opens the worked example written by sheetpump **without** stored values, computes, and every ``SP_``
cell is compared with a direct call of the declaration in this Python. The reference is sheetpump's
own declaration: what is checked here is that the extension hands Calc's arguments and results through
unchanged (the physics has its own externally sourced tests). Also: an input changed through Calc's
API and the dependent cell following, a unit text, a range as an array formula, an optional argument
left out, a bad argument giving the same ``#SP!`` text as the xlwings face, the Function Wizard's
argument help, and an .xlsx keeping its ``SP_`` names through LibreOffice (opened and saved).
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import zipfile
from pathlib import Path
from typing import Any

import openpyxl
import pytest
from openpyxl.worksheet.formula import ArrayFormula

try:  # tests/ may or may not be a package; both layouts work
    from tests import calc_uno
    from tests import libreoffice as lo
except ImportError:  # pragma: no cover - depends on how pytest was started
    import calc_uno  # type: ignore[no-redef]
    import libreoffice as lo  # type: ignore[no-redef]

from sheetpump.catalogue import CATALOGUE
from sheetpump.cli import extension as extension_cli
from sheetpump.cli import main
from sheetpump.extension import build
from sheetpump.extension.build import IMPLEMENTATION
from sheetpump.extension.office import find_office
from sheetpump.workbooks.example import EXAMPLE_SHEET, write_worked_example

pytestmark = lo.needs_soffice.marks

REL = 1e-12  # the same code in two Pythons: agreement to rounding
FIRST_ROW, FUNCTION_COL, RESULT_COL = 5, "A", "B"
# Extra cases, in free cells of the example sheet (1-based rows, as Calc's A1 names).
SCALARS = {
    "Z40": ('=SP_HYDRAULIC_POWER("3000 psi";"10 gpm";"hp")', "SP_HYDRAULIC_POWER", ("3000 psi", "10 gpm", "hp")),
    "Z41": ("=SP_PULSATION_FREQ(9;1500)", "SP_PULSATION_FREQ", (9, 1500)),  # harmonic left out
    "Z42": ('=SP_GEOMETRIC_FLOW("16 rpm";1450)', "SP_GEOMETRIC_FLOW", ("16 rpm", 1450)),  # bad argument
    "Z43": ("=SP_GEOMETRIC_FLOW(16;1450)", "SP_GEOMETRIC_FLOW", (16, 1450)),  # the README's example
}
RANGE_INPUTS = {"Y45": 16.0, "Y46": 28.0, "Y47": 45.0}
RANGE_FORMULA = ("Z45:Z47", "=SP_GEOMETRIC_FLOW(Y45:Y47;1450)")
CHANGED_INPUT = ("F5", 16.0)
TEXT_MENTION = "see sp_geometric_flow(A1:A3,1450)"  # the displacement of SP_GEOMETRIC_FLOW in row 5


def _uno_python_or_skip() -> str:
    python = calc_uno.uno_python()
    ok = subprocess.run([python, "-c", "import uno"], capture_output=True, timeout=60).returncode == 0
    if not ok:
        reason = f"{python} has no LibreOffice Python bridge (Debian: apt-get install python3-uno)"
        if os.environ.get(lo.REQUIRE_ENV) == "1":
            pytest.fail(reason, pytrace=False)
        pytest.skip(reason)
    return python


@pytest.fixture(scope="module")
def calc(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Any]:
    soffice = lo.require_soffice()
    _uno_python_or_skip()
    root = tmp_path_factory.mktemp("extension")
    profile = root / "profile"
    installed = subprocess.run(
        [sys.executable, "-m", "sheetpump", "extension", "--install", "--profile", str(profile)],
        capture_output=True, text=True, timeout=600, env={**os.environ, lo.SOFFICE_ENV: soffice})
    assert installed.returncode == 0, installed.stderr + installed.stdout
    book = root / "worked-example.xlsx"
    write_worked_example(book, store_values=False)
    sheet = openpyxl.load_workbook(book)[EXAMPLE_SHEET]
    rows = {}
    for r in range(FIRST_ROW, sheet.max_row + 1):
        name, formula = sheet[f"{FUNCTION_COL}{r}"].value, sheet[f"{RESULT_COL}{r}"].value
        if name in CATALOGUE and str(formula).startswith(f"={name}("):
            rows[name] = f"{RESULT_COL}{r}"
    cells = [[EXAMPLE_SHEET, ref] for ref in rows.values()]
    arrays = openpyxl.Workbook()  # an array formula with an SP_ name, as an .xlsx holds it
    arrays.active.title = "Arrays"
    for r, value in enumerate(RANGE_INPUTS.values(), 1):
        arrays.active[f"A{r}"] = value
    arrays.active["B1"] = ArrayFormula("B1:B3", "=SP_GEOMETRIC_FLOW(A1:A3,1450)")
    arrays.active["C1"] = TEXT_MENTION  # a text, not a formula: left as it is
    arrays.save(root / "arrays.xlsx")
    steps: list[dict[str, Any]] = [
        {"open": str(book)},
        {"read": [[EXAMPLE_SHEET, rows["SP_GEOMETRIC_FLOW"]]]},
        *({"set": [EXAMPLE_SHEET, ref, value]} for ref, value in RANGE_INPUTS.items()),
        *({"formula": [EXAMPLE_SHEET, ref, formula]} for ref, (formula, _, _) in SCALARS.items()),
        {"array": [EXAMPLE_SHEET, *RANGE_FORMULA]},
        {"calculate": True},
        {"read": cells + [[EXAMPLE_SHEET, ref] for ref in SCALARS] + [[EXAMPLE_SHEET, f"Z{r}"] for r in (45, 46, 47)]},
        {"set": [EXAMPLE_SHEET, *CHANGED_INPUT]},
        {"read": [[EXAMPLE_SHEET, rows["SP_GEOMETRIC_FLOW"]]]},
        {"functions": sorted(CATALOGUE)},
        {"save": str(root / "saved.xlsx")},
        {"open": str(root / "saved.xlsx")},
        {"calculate": True},
        {"read": cells},
        {"open": str(root / "arrays.xlsx")},
        {"read": [["Arrays", f"B{r}"] for r in (1, 2, 3)] + [["Arrays", "C1"]]},
    ]
    results = calc_uno.run_job(soffice, profile, steps)
    _, first, *_, computed, _, changed, functions, _, _, _, reopened, _, arrays_read = results
    return {"rows": rows, "first": first[0], "computed": computed, "changed": changed[0], "functions": functions,
            "saved": root / "saved.xlsx", "reopened": reopened, "arrays": arrays_read,
            "install": installed.stdout, "soffice": soffice, "root": root}


def test_install_message(calc: dict[str, Any]) -> None:
    assert "installed the sheetpump extension" in calc["install"]


def test_every_function_computes_live_as_declared(calc: dict[str, Any]) -> None:
    rows = calc["rows"]
    assert set(rows) == set(CATALOGUE)  # every function of the catalogue is in the workbook
    for (name, ref), got in zip(rows.items(), calc["computed"][:len(rows)], strict=True):
        decl = CATALOGUE[name]
        want = decl(*decl.example)
        assert got["formula"].startswith(f"={IMPLEMENTATION.upper()}.{name}("), (ref, got)
        assert isinstance(got["value"], float), (name, got)
        assert got["value"] == pytest.approx(want, rel=REL, abs=0), name


def test_unit_text_omitted_optional_bad_argument(calc: dict[str, Any]) -> None:
    n = len(calc["rows"])
    for (ref, (_, name, args)), got in zip(SCALARS.items(), calc["computed"][n:n + len(SCALARS)], strict=True):
        want = CATALOGUE[name](*args)
        if isinstance(want, str):  # the bad argument: the very text the xlwings face gives
            assert want.startswith("#SP! ")
            assert got["value"] == want, ref
        else:
            assert got["value"] == pytest.approx(want, rel=REL, abs=0), ref
    assert calc["computed"][n + 3]["value"] == pytest.approx(23.2, rel=1e-12)  # 16 cm³ x 1450 /min = 23.2 L/min
    # hydraulic horsepower = psi x gpm / 1714 (common practice; 1714 rounded, hence 1e-3)
    assert calc["computed"][n]["value"] == pytest.approx(3000 * 10 / 1714, rel=1e-3)


def test_range_argument_gives_an_array(calc: dict[str, Any]) -> None:
    got = [c["value"] for c in calc["computed"][-3:]]
    want = CATALOGUE["SP_GEOMETRIC_FLOW"]([[v] for v in RANGE_INPUTS.values()], 1450)
    assert got == pytest.approx([row[0] for row in want], rel=REL, abs=0)


def test_changed_input_recomputes_dependent(calc: dict[str, Any]) -> None:
    decl = CATALOGUE["SP_GEOMETRIC_FLOW"]
    want = decl(CHANGED_INPUT[1], *decl.example[1:])
    assert want != pytest.approx(decl(*decl.example))  # the change must show
    assert calc["changed"]["value"] == pytest.approx(want, rel=REL, abs=0)


def test_function_wizard_shows_declared_help(calc: dict[str, Any]) -> None:
    functions = calc["functions"]
    assert set(functions) == set(CATALOGUE)
    for name, decl in CATALOGUE.items():
        shown = functions[name]
        assert [[a, h] for a, h, _ in shown["arguments"]] == [list(t) for t in decl.argument_help()], name
        assert shown["description"].startswith(decl.help), name


def _saved_formula(path: Path, ref: str) -> str:
    with zipfile.ZipFile(path) as book:
        names = [n for n in book.namelist() if n.startswith("xl/worksheets/sheet")]
        xml = book.read(sorted(names)[0]).decode()
    found = re.search(rf'<c r="{ref}"[^>]*><f[^>]*>([^<]*)</f>', xml)
    assert found, ref
    return found.group(1)


def test_xlsx_keeps_the_names_both_ways(calc: dict[str, Any]) -> None:
    """An .xlsx with SP_ formulas computes as opened; saved as .xlsx, it keeps the SP_ names.

    Each function's compatibility name (Addins.xcu ``CompatibilityName``, en-US) is its own name, which
    is what xlwings registers in Excel. LibreOffice 7.4 maps compatibility names only in formulas set
    through its API, not in .xlsx (its formula compiler has no add-in-to-Excel-name step for OOXML); the
    extension's job mends that on opening and after saving (see :mod:`sheetpump.extension.build`).
    """
    assert isinstance(calc["first"]["value"], float)  # computed as opened, before anything else
    for ref in calc["rows"].values():
        assert _saved_formula(calc["saved"], ref).startswith("SP_"), ref
    with zipfile.ZipFile(calc["saved"]) as book:
        assert not any(IMPLEMENTATION.upper().encode() in book.read(n) for n in book.namelist())
    for (name, ref), before, after in zip(calc["rows"].items(), calc["computed"][:len(calc["rows"])], calc["reopened"],
                                      strict=True):
        if name != "SP_GEOMETRIC_FLOW":  # its input was changed before saving
            assert after["value"] == pytest.approx(before["value"], rel=REL, abs=0), ref


def test_xlsx_array_formula_computes_as_opened(calc: dict[str, Any]) -> None:
    want = CATALOGUE["SP_GEOMETRIC_FLOW"]([[v] for v in RANGE_INPUTS.values()], 1450)
    *arrays, text = calc["arrays"]
    assert text["value"] == TEXT_MENTION
    got = [c["value"] for c in arrays]
    assert got == pytest.approx([row[0] for row in want], rel=REL, abs=0)
    assert all(c["formula"].startswith("{=") for c in arrays)  # still one array formula


def test_sheetpump_gone_says_so_in_the_cell(calc: dict[str, Any], monkeypatch: pytest.MonkeyPatch) -> None:
    """An extension whose recorded sheetpump is gone: the cell says what happened and what to do."""
    gone = calc["root"] / "gone"
    monkeypatch.setattr(build, "recorded_paths", lambda: [str(gone / "sheetpump-was-here")])
    oxt = build.build(calc["root"] / "gone.oxt")
    profile = gone / "profile"
    monkeypatch.setenv(lo.SOFFICE_ENV, calc["soffice"])
    find_office().manage("add", build.IDENTIFIER, oxt, profile=profile)
    steps = [{"new": True}, {"formula": ["Sheet1", "A1", "=SP_GEOMETRIC_FLOW(16;1450)"]}, {"read": [["Sheet1", "A1"]]}]
    text = calc_uno.run_job(calc["soffice"], profile, steps)[-1][0]["value"]
    assert text.startswith(f"#SP! sheetpump could not be loaded from {gone / 'sheetpump-was-here'}"), text
    assert "run 'sheetpump extension --install' again" in text


def test_another_version_installed_then_uninstall(calc: dict[str, Any], monkeypatch: pytest.MonkeyPatch,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    """``--install`` over an extension of another sheetpump version: exit 2; ``--uninstall`` removes it.

    Last in this file on purpose: it removes the extension from the module's profile (the LibreOffice
    results the other tests read were all taken by the fixture before).
    """
    profile = calc["root"] / "profile"  # the fixture's, holding this version's extension
    monkeypatch.setenv(lo.SOFFICE_ENV, calc["soffice"])
    monkeypatch.setattr(extension_cli, "__version__", "0.0.0")
    assert main(["extension", "--install", "--profile", str(profile)]) == 2
    err = capsys.readouterr().err
    assert "already has the sheetpump extension" in err and "--uninstall" in err
    assert main(["extension", "--uninstall", "--profile", str(profile)]) == 0
    assert "removed the sheetpump extension" in capsys.readouterr().out
    assert main(["extension", "--uninstall", "--profile", str(profile)]) == 0
    assert "is not installed" in capsys.readouterr().out
