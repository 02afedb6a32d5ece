"""Headless recalculation (sheetpump.recalc and ``sheetpump recalc``).

Outside references: LibreOffice Calc (headless, forced to recompute; see tests/libreoffice.py) for the
standard functions, and direct Python calls of ``CATALOGUE[...].cell`` for sheetpump's own functions,
whose results are in turn checked against trade rules of thumb in tests/test_pump.py (and once here).
"""

from __future__ import annotations

import math
import re
import zipfile
from pathlib import Path

import numpy as np
import openpyxl
import pytest
import xlsxwriter

from sheetpump.catalogue import CATALOGUE
from sheetpump.cli import main
from sheetpump.declarations import Arg, Calculation
from sheetpump.errors import InputError
from sheetpump.files import sha256
from sheetpump.recalc import (
    CellError,
    compare,
    evaluate_workbook,
    recalculate,
    values_differ,
    write_values,
)
from sheetpump.units import NUMBER

try:
    from tests.libreoffice import needs_soffice, recalculate_many
except ImportError:  # tests/ on sys.path (pytest's rootdir-less import mode)
    from libreoffice import needs_soffice, recalculate_many  # type: ignore[no-redef]

# ----------------------------------------------------------------------------------------- workbooks

# The standard-functions workbook: (cell, formula) on sheet "Calc"; inputs on "Inputs" and "Pump data".
STANDARD = [
    ("B1", "=Inputs!A1+Inputs!A2*Inputs!A3-Inputs!A4/7"),
    ("B2", "=SUM(Inputs!A1:A6)"),
    ("B3", "=AVERAGE(Inputs!A1:A6)"),
    ("B4", "=MIN(Inputs!A1:A6)+MAX(Inputs!B1:B6)"),
    ("B5", "=IF(Inputs!A1>Inputs!A2,Inputs!A1,Inputs!A2*2)"),
    ("B6", "=INDEX(Inputs!B1:B6,MATCH(12.5,Inputs!A1:A6,0))"),
    ("B7", "=VLOOKUP(3,Inputs!A1:B6,2,FALSE)"),
    ("B8", "=ROUND(Inputs!A5/3,4)"),
    ("B9", "=SQRT(Inputs!B6)*PI()"),
    ("B10", "='Pump data'!B2*2+total_flow"),
    ("B11", "=SUMPRODUCT(Inputs!A1:A6,Inputs!B1:B6)"),
    ("B12", "=ABS(Inputs!A4-100)^1.5"),
    ("B13", "=MOD(17,5)+INT(-2.5)"),
    ("B14", "=EXP(LN(Inputs!B3))/LOG10(1000)"),
    ("B15", "=B1*B2-B3"),  # depends on other formulas
    ("B16", "=COUNT(Inputs!A1:B6)+COUNTIF(Inputs!A1:A6,\">3\")"),
    ("B17", "=SUMIF(Inputs!A1:A6,\">3\",Inputs!B1:B6)"),
    ("B18", "=HLOOKUP(\"speed\",'Pump data'!A1:C2,2,FALSE)"),
    ("B19", "=IFERROR(1/0,-1)+AND(B1>0,B2>0)"),
    ("B20", "=MEDIAN(Inputs!A1:A6)*STDEV(Inputs!B1:B6)"),
]
INPUTS = [(1.5, 2.0), (3.0, 4.25), (7.0, 0.5), (12.5, 8.0), (0.1, 3.3), (42.0, 9.75)]


def _standard_book(path: Path) -> Path:
    book = xlsxwriter.Workbook(str(path))
    calc = book.add_worksheet("Calc")
    inputs = book.add_worksheet("Inputs")
    pump = book.add_worksheet("Pump data")
    for row, (a, b) in enumerate(INPUTS):
        inputs.write_number(row, 0, a)
        inputs.write_number(row, 1, b)
    pump.write_row(0, 0, ["flow", "speed", "pressure"])
    pump.write_row(1, 0, [40.0, 1500.0, 250.0])
    book.define_name("total_flow", "='Pump data'!$A$2")
    for cell, formula in STANDARD:
        calc.write_formula(cell, formula)
    # A column of relative formulas, as an engineer fills one down.
    for row in range(6):
        calc.write_formula(row, 3, f"=Inputs!A{row + 1}*Inputs!B{row + 1}+{row}")
    book.close()
    return path


def _sp_book(path: Path) -> Path:
    """sheetpump functions mixed with standard ones, over sheets, ranges, names and array formulas."""
    book = xlsxwriter.Workbook(str(path))
    duty = book.add_worksheet("Duty")
    pump = book.add_worksheet("Pump")
    duty.write_row(0, 0, ["pressure", "flow", "speed"])
    duty.write_column(1, 0, [200.0, 150.0, "3000 psi", 80.0])
    duty.write_column(1, 1, [60.0, 45.5, "10 gpm", 12.0])
    duty.write_column(1, 2, [1500.0, 1800.0, 1200.0, 2400.0])
    pump.write("A1", "displacement")
    pump.write("B1", 28.0)
    pump.write("A2", "vol_eff")
    pump.write("B2", 0.93)
    book.define_name("disp", "=Pump!$B$1")
    duty.write_formula("D2", "=SP_HYDRAULIC_POWER(A2,B2)")
    duty.write_formula("D3", "=SP_HYDRAULIC_POWER(A3,B3)*2+1")
    duty.write_formula("D4", '=SP_HYDRAULIC_POWER(A4,B4,"hp")')
    duty.write_formula("E2", "=SP_EFFECTIVE_FLOW(disp,C2,Pump!B2)")
    duty.write_formula("E3", '=SP_GEOMETRIC_FLOW("1.2 in^3/rev",C3,"gpm")')
    duty.write_formula("E4", "=ROUND(SP_DRIVE_TORQUE(disp,A2,0.9),3)")
    duty.write_formula("E5", "=SUM(D2:D3)+SP_PULSATION_FREQ(9,C5)")
    duty.write_formula("F2", "=SP_HYDRAULIC_POWER(-5,B2)")  # an error text, not a crash
    duty.write_formula("F3", "=IF(SP_EFFECTIVE_FLOW(disp,C3,0.95)>40,\"enough\",\"short\")")
    # A sheetpump function over ranges: its array result spills over G2:G5.
    duty.write_array_formula("G2:G5", "{=SP_EFFECTIVE_FLOW(disp,C2:C5,Pump!B2)}")
    duty.write_formula("H2", "=SUM(G2:G5)")
    book.close()
    return path


def _sp_expected() -> dict[tuple[str, str], object]:
    """The same cells computed by calling the catalogue directly."""
    power, eflow = CATALOGUE["SP_HYDRAULIC_POWER"], CATALOGUE["SP_EFFECTIVE_FLOW"]
    flows = eflow.cell(28.0, np.array([[1500.0], [1800.0], [1200.0], [2400.0]]), 0.93)
    expected: dict[tuple[str, str], object] = {
        ("Duty", "D2"): power.cell(200.0, 60.0),
        ("Duty", "D3"): power.cell(150.0, 45.5) * 2 + 1,
        ("Duty", "D4"): power.cell("3000 psi", "10 gpm", "hp"),
        ("Duty", "E2"): eflow.cell(28.0, 1500.0, 0.93),
        ("Duty", "E3"): CATALOGUE["SP_GEOMETRIC_FLOW"].cell("1.2 in^3/rev", 1800.0, "gpm"),
        ("Duty", "E4"): round(CATALOGUE["SP_DRIVE_TORQUE"].cell(28.0, 200.0, 0.9), 3),
        ("Duty", "E5"): power.cell(200.0, 60.0) + power.cell(150.0, 45.5) * 2 + 1
        + CATALOGUE["SP_PULSATION_FREQ"].cell(9, 2400.0),
        ("Duty", "F2"): power.cell(-5, 60.0),
        ("Duty", "F3"): "enough" if eflow.cell(28.0, 1800.0, 0.95) > 40 else "short",
        ("Duty", "H2"): sum(row[0] for row in flows),
    }
    for i, row in enumerate(flows):
        expected[("Duty", f"G{i + 2}")] = row[0]
    return expected


def _close(a: object, b: object, rel: float = 1e-9) -> bool:
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) and not isinstance(a, bool):
        return math.isclose(float(a), float(b), rel_tol=rel, abs_tol=1e-12)
    return a == b


def _set_stored(path: Path, target: Path, sheet_part: str, cell: str, text: str) -> None:
    """Copy a workbook with the stored <v> of one cell replaced (as if someone edited the cache)."""
    with zipfile.ZipFile(path) as src, zipfile.ZipFile(target, "w", zipfile.ZIP_DEFLATED) as out:
        for info in src.infolist():
            data = src.read(info)
            if info.filename == sheet_part:
                xml = data.decode()
                pattern = rf'(<c r="{cell}"[^>]*>(?:(?!</c>).)*?<v>)[^<]*(</v>)'
                xml, n = re.subn(pattern, rf"\g<1>{text}\g<2>", xml, count=1, flags=re.S)
                assert n == 1, f"{cell} has no stored value in {sheet_part}"
                data = xml.encode()
            out.writestr(info, data)


# ------------------------------------------------------------------------------ against LibreOffice


@pytest.fixture(scope="module")
def standard(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    """The standard workbook and LibreOffice's recalculated copy of it."""
    folder = tmp_path_factory.mktemp("standard")
    book = _standard_book(folder / "standard.xlsx")
    return book, folder / "lo"


@needs_soffice
def test_standard_functions_agree_with_libreoffice(standard: tuple[Path, Path]) -> None:
    book, lo_dir = standard
    (lo_book,) = recalculate_many([book], lo_dir)
    reference = openpyxl.load_workbook(lo_book, data_only=True)  # LibreOffice is the outside reference
    ours = evaluate_workbook(book)
    formula_cells = [("Calc", c) for c, _ in STANDARD] + [("Calc", f"D{r}") for r in range(1, 7)]
    assert set(formula_cells) <= set(ours)
    for sheet, cell in formula_cells:
        theirs = reference[sheet][cell].value
        assert isinstance(theirs, (int, float)), f"LibreOffice gave {theirs!r} for {sheet}!{cell}"
        assert _close(ours[(sheet, cell)], theirs), f"{sheet}!{cell}: {ours[(sheet, cell)]} vs {theirs}"
    # The comparison can fail: a value off by one part in a million is caught at this tolerance.
    b1 = reference["Calc"]["B1"].value
    assert not _close(ours[("Calc", "B1")], b1 * (1 + 1e-6))

    # A file as a spreadsheet program saved it passes --verify ...
    assert main(["recalc", str(lo_book), "--verify"]) == 0
    # ... and one whose stored value was altered does not, and names the cell.
    altered = lo_dir / "altered.xlsx"
    _set_stored(lo_book, altered, "xl/worksheets/sheet1.xml", "B2", "123.456")
    result = recalculate(altered)
    assert [(d.sheet, d.cell, d.stored) for d in compare(result)] == [("Calc", "B2", 123.456)]
    assert main(["recalc", str(altered), "--verify"]) == 1


# ------------------------------------------------------------------------- sheetpump's own functions


def test_sheetpump_functions_equal_direct_calls(tmp_path: Path) -> None:
    book = _sp_book(tmp_path / "duty.xlsx")
    values = evaluate_workbook(book)
    for key, expected in _sp_expected().items():
        assert _close(values[key], expected), f"{key}: {values[key]!r} vs {expected!r}"
    assert str(values[("Duty", "F2")]).startswith("#SP! pressure")
    # Trade rule, independent of the code: P[kW] = p[bar] * Q[L/min] / 600 (common practice).
    assert values[("Duty", "D2")] == pytest.approx(200 * 60 / 600, rel=1e-12)
    # Imperial rule of thumb: P[hp] = p[psi] * Q[gpm] / 1714 (common practice; 1714 is rounded).
    assert values[("Duty", "D4")] == pytest.approx(3000 * 10 / 1714, rel=1e-3)


def test_recalc_writes_values_beside_formulas(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    book = _sp_book(tmp_path / "duty.xlsx")
    before = sha256(book)
    out = tmp_path / "out" / "duty-recalculated.xlsx"
    assert main(["recalc", str(book), "-o", str(out)]) == 0
    assert sha256(book) == before  # the input is never modified
    assert not list(out.parent.glob("*.part"))  # written atomically: no temporary file left
    values = openpyxl.load_workbook(out, data_only=True)["Duty"]
    for (_, cell), expected in _sp_expected().items():
        got = values[cell].value
        assert _close(got, expected), f"{cell}: {got!r} vs {expected!r}"
        if isinstance(expected, float):
            assert isinstance(got, (int, float)) and not isinstance(got, bool)
    formulas = openpyxl.load_workbook(out)["Duty"]
    assert formulas["D2"].value == "=SP_HYDRAULIC_POWER(A2,B2)"
    assert formulas["G2"].value.ref == "G2:G5"  # the array formula is kept
    # The written copy is consistent with itself.
    assert main(["recalc", str(out), "--verify"]) == 0
    assert "agree" in capsys.readouterr().out


def test_spill_cells_missing_from_the_file_are_added(tmp_path: Path) -> None:
    # openpyxl writes only the anchor of an array formula; the cells it covers must be created.
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Ratings"
    for row, (p, q) in enumerate([(100.0, 20.0), (210.0, 35.0), (250.0, 50.0)], start=1):
        ws.cell(row, 1, p)
        ws.cell(row, 2, q)
    ws["C1"] = openpyxl.worksheet.formula.ArrayFormula("C1:C3", "=SP_HYDRAULIC_POWER(A1:A3,B1:B3)")
    ws["D5"] = "=SUM(C1:C3)"
    source = tmp_path / "ratings.xlsx"
    wb.save(source)
    out = tmp_path / "ratings-out.xlsx"
    assert main(["recalc", str(source), "-o", str(out)]) == 0
    got = openpyxl.load_workbook(out, data_only=True)["Ratings"]
    power = CATALOGUE["SP_HYDRAULIC_POWER"]
    expected = power.cell([[100.0], [210.0], [250.0]], [[20.0], [35.0], [50.0]])
    assert [got[f"C{r}"].value for r in (1, 2, 3)] == pytest.approx([row[0] for row in expected], rel=1e-12)
    assert got["D5"].value == pytest.approx(sum(row[0] for row in expected), rel=1e-12)


def test_shared_formulas_are_expanded_and_kept(tmp_path: Path) -> None:
    # Spreadsheet programs store a filled-down column once: <f t="shared" ref=.. si=..> on the first
    # cell and <f t="shared" si=../> on the others. Build one by hand from an openpyxl file.
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Col"
    for row in (1, 2, 3):
        ws.cell(row, 1, 100.0 * row)
        ws.cell(row, 2, f"=SP_HYDRAULIC_POWER(A{row},30)+1")
    plain = tmp_path / "plain.xlsx"
    wb.save(plain)
    shared = tmp_path / "shared.xlsx"
    with zipfile.ZipFile(plain) as src, zipfile.ZipFile(shared, "w") as out:
        for info in src.infolist():
            data = src.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                xml = data.decode()
                xml = xml.replace("<f>SP_HYDRAULIC_POWER(A1,30)+1</f>",
                                  '<f t="shared" ref="B1:B3" si="0">SP_HYDRAULIC_POWER(A1,30)+1</f>')
                xml, n = re.subn(r"<f>SP_HYDRAULIC_POWER\(A[23],30\)\+1</f>", '<f t="shared" si="0"/>', xml)
                assert n == 2
                data = xml.encode()
            out.writestr(info, data)
    out_path = tmp_path / "shared-out.xlsx"
    assert main(["recalc", str(shared), "-o", str(out_path)]) == 0
    got = openpyxl.load_workbook(out_path, data_only=True)["Col"]
    power = CATALOGUE["SP_HYDRAULIC_POWER"]
    for row in (1, 2, 3):
        assert got[f"B{row}"].value == pytest.approx(power.cell(100.0 * row, 30) + 1, rel=1e-12)
    assert openpyxl.load_workbook(out_path)["Col"]["B3"].value == "=SP_HYDRAULIC_POWER(A3,30)+1"


def test_verify_catches_an_altered_value_and_passes_an_untouched_file(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    book = _sp_book(tmp_path / "duty.xlsx")
    good = tmp_path / "good.xlsx"
    write_values(book, good, recalculate(book).values)
    assert main(["recalc", str(good), "--verify"]) == 0
    bad = tmp_path / "bad.xlsx"
    _set_stored(good, bad, "xl/worksheets/sheet1.xml", "D2", "20.0001")  # 5e-6 relative off
    capsys.readouterr()
    assert main(["recalc", str(bad), "--verify"]) == 1
    lines = capsys.readouterr().out.splitlines()
    assert lines == [line for line in lines if line.startswith("Duty!D2:")] and len(lines) == 1
    assert "20.0001" in lines[0]
    # A looser tolerance accepts it.
    assert main(["recalc", str(bad), "--verify", "--rel-tol", "1e-4"]) == 0
    # A file written by a program that does not compute stores no values: every cell is listed.
    assert main(["recalc", str(book), "--verify"]) == 1


def test_values_differ_rules() -> None:
    assert not values_differ(1500.0, 1500.0 * (1 + 5e-10))
    assert values_differ(1500.0, 1500.0 * (1 + 5e-9))
    assert not values_differ(0.0, 5e-13)  # the absolute floor
    assert values_differ(None, 1.0)  # no stored value
    assert values_differ(CellError("#DIV/0!"), "#DIV/0!")  # an error is not a text
    assert values_differ(1.0, True)


# ------------------------------------------------------------------------------------ bad workbooks


def test_unsupported_function_names_cell_and_function(tmp_path: Path,
                                                      capsys: pytest.CaptureFixture[str]) -> None:
    wb = openpyxl.Workbook()
    wb.active.title = "Checks"
    wb.active["A1"] = 3
    wb.active["B4"] = '=IF(A1>0,FROBNICATE(A1),"(none)")'
    source = tmp_path / "odd.xlsx"
    wb.save(source)
    out = tmp_path / "odd-out.xlsx"
    assert main(["recalc", str(source), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "Checks!B4" in err and "FROBNICATE" in err and "not supported" in err
    assert err.count("\n") == 1  # one line, no traceback
    assert not out.exists()


def test_circular_reference_is_reported(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Loop"
    ws["A1"] = "=B1+1"
    ws["B1"] = "=A1*2"
    ws["C1"] = "=A1+10"
    ws["D1"] = "=2*3"
    source = tmp_path / "loop.xlsx"
    wb.save(source)
    assert main(["recalc", str(source), "--verify"]) == 2
    err = capsys.readouterr().err
    assert "circular" in err and "Loop!A1" in err and "Loop!B1" in err
    result = recalculate(source)
    assert {(p.sheet, p.cell) for p in result.problems} == {("Loop", "A1"), ("Loop", "C1")}
    assert result.values[("Loop", "D1")] == 6.0  # the rest is still computed


def test_failing_cell_function_is_reported(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # A calculation declared in the catalogue is picked up with no work in recalc. One whose physics
    # raises (a bug: cell() should return an error text) is reported with the reason, not a bare #VALUE!.
    def broken(teeth: float) -> float:
        raise RuntimeError("physics bug")

    calc = Calculation("SP_TEST_BROKEN", broken, (Arg("teeth", NUMBER, "teeth"),), NUMBER, "test only")
    monkeypatch.setitem(CATALOGUE, calc.name, calc)
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "T"
    ws["A1"] = "=SP_TEST_BROKEN(9)"
    ws["A2"] = "=A1+1"
    ws["A3"] = "=1+1"
    source = tmp_path / "broken.xlsx"
    wb.save(source)
    result = recalculate(source)
    problems = {(p.sheet, p.cell): p.message for p in result.problems}
    assert set(problems) == {("T", "A1"), ("T", "A2")}
    assert "SP_TEST_BROKEN" in problems[("T", "A1")] and "physics bug" in problems[("T", "A1")]
    assert result.values == {("T", "A3"): 2.0}
    with pytest.raises(InputError, match="T!A1"):
        evaluate_workbook(source)


def test_cell_the_engine_leaves_out_is_reported(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # The engine logs a function that raises while it runs and leaves its cell out of the solution.
    import formulas

    def raw(x: object) -> float:
        raise ZeroDivisionError("raw engine function")

    monkeypatch.setitem(formulas.get_functions(), "RAW_FAILING", raw)
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "T"
    ws["A1"] = 4
    ws["B1"] = "=RAW_FAILING(A1)"
    ws["C1"] = "=B1*2"
    ws["D1"] = "=A1*2"
    source = tmp_path / "raw.xlsx"
    wb.save(source)
    result = recalculate(source)
    problems = {(p.sheet, p.cell): p.message for p in result.problems}
    assert set(problems) == {("T", "B1"), ("T", "C1")}
    assert "raw engine function" in problems[("T", "B1")]
    assert result.values == {("T", "D1"): 8.0}


def test_bad_inputs_exit_2(tmp_path: Path) -> None:
    not_a_book = tmp_path / "notes.xlsx"
    not_a_book.write_text("not a workbook")
    assert main(["recalc", str(not_a_book), "--verify"]) == 2
    assert main(["recalc", str(tmp_path / "missing.xlsx"), "--verify"]) == 2
    book = _sp_book(tmp_path / "duty.xlsx")
    before = sha256(book)
    assert main(["recalc", str(book), "-o", str(book)]) == 2  # would overwrite the input
    assert main(["recalc", str(book)]) == 2  # nothing asked
    assert sha256(book) == before


# --- the worked-example workbook, written without stored values, recalculates headlessly ----------

def test_worked_example_recalculates_to_its_expected_values(tmp_path):
    from sheetpump.workbooks.example import EXAMPLE_SHEET, write_worked_example

    bare = tmp_path / "worked-example-bare.xlsx"
    write_worked_example(bare, store_values=False)
    assert openpyxl.load_workbook(bare, data_only=True)[EXAMPLE_SHEET]["B5"].value in (None, "")
    out = tmp_path / "worked-example-recalculated.xlsx"
    assert main(["recalc", str(bare), "-o", str(out)]) == 0
    sheet = openpyxl.load_workbook(out, data_only=True)[EXAMPLE_SHEET]
    rows = 0
    for row in range(5, sheet.max_row + 1):
        if sheet.cell(row, 1).value is None:
            continue
        # the expected column was written by a direct call of the declaration (see test_committed)
        assert sheet.cell(row, 2).value == pytest.approx(sheet.cell(row, 3).value, rel=1e-9), sheet.cell(row, 1).value
        rows += 1
    assert rows >= 25
    # and --verify passes on the recalculated copy, and fails on the bare one (no stored values)
    assert main(["recalc", str(out), "--verify"]) == 0
    assert main(["recalc", str(bare), "--verify"]) == 1


# ------------------------------------------------------------------- dynamic arrays: results that spill

# Geometric flow Q[L/min] = V[cm^3/rev] x n[rpm] / 1000 and hydraulic power P[kW] = p[bar] x Q[L/min] / 600
# (common practice). 8 cm^3/rev at 1000, 1500, 2000 rpm: 8, 12, 16 L/min, 36 L/min in all; at 200 bar
# that is 8/3, 4, 16/3 kW, 12 kW in all. 28 cm^3/rev at 1500 and 3000 rpm: 42 and 84 L/min.
SPEEDS = [1000.0, 1500.0, 2000.0]
SPILLING = [  # (cell, formula with sheetpump's functions, the same with plain arithmetic)
    ("B1", "=SP_GEOMETRIC_FLOW(8,A1:A3)", "=8*A1:A3/1000"),  # spills down
    ("C1", "=SP_HYDRAULIC_POWER(200,B1:B3)", "=200*B1:B3/600"),  # fed by the spill above: spills too
    ("D1", "=SUM(B1:B3)", "=SUM(B1:B3)"),
    ("E1", "=SUM(C1:C3)", "=SUM(C1:C3)"),
    ("A6", "=SP_GEOMETRIC_FLOW(A5,B5:C5)", "=A5*B5:C5/1000"),  # spills right
    ("D6", "=SUM(A6:B6)", "=SUM(A6:B6)"),
]


def _spill_book(path: Path, column: int) -> Path:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Spill"
    for row, speed in enumerate(SPEEDS, start=1):
        ws.cell(row, 1, speed)
    ws["A5"], ws["B5"], ws["C5"] = 28.0, 1500.0, 3000.0
    for spec in SPILLING:
        ws[spec[0]] = spec[column]
    wb.save(path)
    return path


def test_a_range_result_spills_and_formulas_see_the_spilled_cells(tmp_path: Path,
                                                                 capsys: pytest.CaptureFixture[str]) -> None:
    book = _spill_book(tmp_path / "spill.xlsx", 1)
    result = recalculate(book)
    assert result.problems == [] and result.blocked == []
    assert result.spills == {("Spill", "B1"): "B1:B3", ("Spill", "C1"): "C1:C3", ("Spill", "A6"): "A6:B6"}
    got = {cell: value for (_, cell), value in result.values.items()}
    expected = {"B1": 8.0, "B2": 12.0, "B3": 16.0, "C1": 8 / 3, "C2": 4.0, "C3": 16 / 3, "D1": 36.0,
                "E1": 12.0, "A6": 42.0, "B6": 84.0, "D6": 126.0}
    assert got == pytest.approx(expected, rel=1e-12)
    # the original stores none of the spilled values: --verify says so, cell by cell
    assert main(["recalc", str(book), "--verify"]) == 1
    assert "Spill!B2: stored (no stored value), recomputed 12.0" in capsys.readouterr().out
    # the copy: the formula as an array formula over its range, the spilled cells as values
    out = tmp_path / "spill-out.xlsx"
    assert main(["recalc", str(book), "-o", str(out)]) == 0
    formulas = openpyxl.load_workbook(out)["Spill"]
    assert formulas["B1"].value.ref == "B1:B3" and formulas["B1"].value.text == "=SP_GEOMETRIC_FLOW(8,A1:A3)"
    assert formulas["A6"].value.ref == "A6:B6"
    assert formulas["D1"].value == "=SUM(B1:B3)"
    values = openpyxl.load_workbook(out, data_only=True)["Spill"]
    assert {cell: values[cell].value for cell in expected} == pytest.approx(expected, rel=1e-12)
    assert main(["recalc", str(out), "--verify"]) == 0  # the copy is consistent with itself


def test_a_spill_with_no_room_names_the_cell_in_the_way(tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Spill"
    for row, speed in enumerate(SPEEDS, start=1):
        ws.cell(row, 1, speed)
    ws["B1"] = "=SP_GEOMETRIC_FLOW(8,A1:A3)"
    ws["B3"] = "kept"  # in the way
    ws["C1"] = "=SUM(B1:B3)"
    ws["D1"] = "=SP_GEOMETRIC_FLOW(8,A1:B1)"  # would spill right over E1, which a formula holds
    ws["E1"] = "=1+1"
    book = tmp_path / "blocked.xlsx"
    wb.save(book)
    out = tmp_path / "blocked-out.xlsx"
    assert main(["recalc", str(book), "-o", str(out)]) == 1
    err = capsys.readouterr().err
    assert "Spill!B1: the formula's 3 x 1 results need B1:B3, but B3 is not empty" in err
    assert "Spill!D1: the formula's 1 x 2 results need D1:E1, but E1 is not empty" in err
    values = openpyxl.load_workbook(out, data_only=True)["Spill"]
    assert values["B1"].value.startswith("#SPILL! ") and "B3 is not empty" in values["B1"].value
    assert values["B2"].value is None and values["B3"].value == "kept"  # nothing written over
    assert values["C1"].value == "#N/A"  # never the first element alone
    assert values["E1"].value == 2
    assert main(["recalc", str(book), "--verify"]) == 1
    with pytest.raises(InputError, match="B3 is not empty"):
        evaluate_workbook(book)


def test_a_spill_over_another_spill_is_blocked(tmp_path: Path) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    for row, speed in enumerate(SPEEDS, start=1):
        ws.cell(row, 1, speed)
    ws["B1"] = "=SP_GEOMETRIC_FLOW(8,A1:A3)"  # B1:B3
    ws["B4"] = "=SP_GEOMETRIC_FLOW(8,A1:A1)"  # one value: no spill, no conflict
    ws["C2"] = "=SP_GEOMETRIC_FLOW(8,TRANSPOSE(A1:A3))"  # wants C2:E2 ...
    ws["D1"] = "=SP_GEOMETRIC_FLOW(8,A1:A3)"  # ... but D1:D3 spilled first (row order)
    wb.save(tmp_path / "two.xlsx")
    result = recalculate(tmp_path / "two.xlsx")
    assert result.spills.get((ws.title, "D1")) == "D1:D3"
    assert [(p.cell, p.message) for p in result.blocked] == [
        ("C2", "the formula's 1 x 3 results need C2:E2, but D2 is in the spilled range of D1 "
               "(move one of the formulas)")]


@needs_soffice
def test_spills_agree_with_libreoffice_array_formulas(tmp_path: Path) -> None:
    # The same workbook with plain arithmetic in place of sheetpump's functions: LibreOffice (7.x has
    # no dynamic arrays) computes our copy, whose spilling formulas are array formulas over their
    # ranges; its values must equal ours for the arithmetic and for sheetpump's functions.
    plain = _spill_book(tmp_path / "plain.xlsx", 2)
    ours_plain = recalculate(plain)
    out = tmp_path / "plain-out.xlsx"
    write_values(plain, out, ours_plain.values, ours_plain.spills)
    (lo_book,) = recalculate_many([out], tmp_path / "lo")
    theirs = openpyxl.load_workbook(lo_book, data_only=True)["Spill"]
    ours_sp = recalculate(_spill_book(tmp_path / "sp.xlsx", 1)).values
    assert set(ours_plain.values) == set(ours_sp)
    for (sheet, cell), value in ours_sp.items():
        assert _close(theirs[cell].value, value), f"{cell}: LibreOffice {theirs[cell].value!r}, ours {value!r}"
        assert _close(ours_plain.values[(sheet, cell)], value)
    assert theirs["D1"].value == pytest.approx(36.0, rel=1e-12)  # not 8: the whole spilled range summed
