"""The columnar recalculation path (sheetpump.recalc.columnar) against the ``formulas`` engine.

Outside reference: the ``formulas`` package from PyPI (an Excel formula engine), run through
``recalculate(path, engine="formulas")``, is the reference every fast result must equal (to 1e-12
relative; texts, TRUE/FALSE and error codes exactly). One trade rule checks the physics end to end.
"""

from __future__ import annotations

import math
import random
import re
import zipfile
from pathlib import Path
from typing import Any

import openpyxl
import pytest

from sheetpump.catalogue import CATALOGUE
from sheetpump.cli import main
from sheetpump.recalc import CellError, recalculate
from sheetpump.recalc.columnar import recalculate_columns


def _same(a: Any, b: Any) -> bool:
    if type(a) is float and type(b) is float:
        return math.isclose(a, b, rel_tol=1e-12, abs_tol=0.0)
    return type(a) is type(b) and a == b


def _assert_same_as_engine(path: Path) -> dict[tuple[str, str], Any]:
    fast = recalculate_columns(path)
    assert fast is not None, "the fast path should handle this workbook"
    reference = recalculate(path, engine="formulas")
    assert not reference.problems
    assert list(fast.values) == list(reference.values)  # same cells, same order
    for key, expected in reference.values.items():
        assert _same(fast.values[key], expected), f"{key}: fast {fast.values[key]!r}, engine {expected!r}"
    assert fast.stored == reference.stored and fast.formulas == reference.formulas
    return fast.values


def _inputs(ws: Any) -> None:
    # Column A: a number, a number, text, (empty), TRUE, a number as text, (empty), an error formula.
    for row, value in enumerate([1.5, 2.0, "text", None, True, "  4 ", None], start=1):
        if value is not None:
            ws.cell(row, 1, value)
    ws["A8"] = "=1/0"
    ws["B1"] = "=A1*2"
    ws["B2"] = "=A4"  # a formula pointing at an empty cell
    ws["B3"] = "=A3"


MIXED = [
    "-2^2", "2^3^2", "1+2*3-4/5", "A1", "A3", "A4", "A5", "A8", "A1&A2", 'A3&"x"', "A4&1.5", "A5&A1",
    "A1/0", "A3*2", "A4+1", "A5+1", "A6+1", '"3"+1', "A1>A2", "A1=A3", "A3>1", "A5>A1", 'A3="TEXT"',
    "A4<>0", "A8=1", 'IF(A1>1,"big","small")', "IF(A3,1,2)", "IF(A4,1,2)", "IF(A5,A1,A3)", "IF(0,1)",
    "IF(A8,1,2)", "ABS(-A1)", "SQRT(A1)", "SQRT(-1)", "ROUND(A1/3,2)", "ROUND(2.5,0)", "ROUND(-2.5,0)",
    "ROUND(1234.5,-2)", "ROUND(A1,400)", "ROUND(-A1,-400)", "ROUND(A1,1E+20)", "ROUND(A1,-1E+20)",
    "SUM(A1:A6)", "SUM(A1:B6)", "SUM(A1:A8)", "MIN(A1:A2)", "MAX(A1:B2)", "AVERAGE(A1:A2)",
    "AVERAGE(A4)", "SUM(A1,A2,5)", "SP_HYDRAULIC_POWER(A1,A2)", "SP_HYDRAULIC_POWER(A3,A2)",
    "SP_HYDRAULIC_POWER(A4,A2)", "SP_HYDRAULIC_POWER(A5,A2)", "SP_HYDRAULIC_POWER(A8,A2)",
    "SP_HYDRAULIC_POWER(-5,A2)", 'SP_HYDRAULIC_POWER(A1,A2,"hp")', 'SP_HYDRAULIC_POWER("3000 psi","10 gpm","hp")',
    "SP_HYDRAULIC_POWER(A1,A2)*0.9+A2", "SP_HYDRAULIC_POWER(-5,A2)*2", 'B1&"!"', "B2", 'B2&"x"', "Other!A1*2",
    "'Other sheet'!A2+1", "A1^0.5", "A2-A1*-1", "+A1", "-A4", "TRUE+1", 'TRUE&""', "1E+3+1", ".5*2",
    "A1*1E+300*1E+300", "A1/A4", "SP_PULSATION_FREQ(9,A1)", 'SP_MOTOR_EFF(11,"IEC")', "SP_MOTOR_EFF(A1,A3)",
    '"a"<"B"', "A3<A1", "SP_VISCOSITY(46,40,6.8,100,A1)", "0.1+0.2", 'A2/3&""', "SUM(B1:B3)",
]


def test_mixed_values_equal_the_engine(tmp_path: Path) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    _inputs(ws)
    other = wb.create_sheet("Other")
    other["A1"] = 10.0
    wb.create_sheet("Other sheet")["A2"] = "7"
    for row, formula in enumerate(MIXED, start=1):
        ws.cell(row, 3, "=" + formula)
    path = tmp_path / "mixed.xlsx"
    wb.save(path)
    values = _assert_same_as_engine(path)
    # The checks can fail: a few kinds of result, each as a spreadsheet shows it.
    got = {f: values[("S", f"C{row}")] for row, f in enumerate(MIXED, start=1)}
    assert got["A1/0"] == CellError("#DIV/0!") and isinstance(got["A1/0"], CellError)
    assert got["A3*2"] == CellError("#VALUE!")
    assert got["A1>A2"] is False and got['A3="TEXT"'] is True
    assert got["-2^2"] == 4.0  # unary minus binds before ^ in spreadsheets (common practice)
    assert str(got["SP_HYDRAULIC_POWER(-5,A2)"]).startswith("#SP! pressure")
    # Trade rule: P[kW] = p[bar] * Q[L/min] / 600 (common practice).
    assert got["SP_HYDRAULIC_POWER(A1,A2)"] == pytest.approx(1.5 * 2.0 / 600, rel=1e-12)


def _make_shared(plain: Path, shared: Path, column: str, first: int, last: int) -> None:
    """Rewrite a column of formulas as one shared formula, as spreadsheet programs store a fill-down."""
    with zipfile.ZipFile(plain) as src, zipfile.ZipFile(shared, "w") as out:
        for info in src.infolist():
            data = src.read(info)
            if info.filename == "xl/worksheets/sheet1.xml":
                xml = data.decode()

                def share(m: re.Match[str]) -> str:
                    row = int(m.group(1))
                    if row == first:
                        return f'<c r="{column}{row}"{m.group(2)}><f t="shared" ref="{column}{first}:{column}{last}" ' \
                               f'si="{column}">{m.group(3)}</f>'
                    return f'<c r="{column}{row}"{m.group(2)}><f t="shared" si="{column}"/>'

                xml = re.sub(rf'<c r="{column}(\d+)"([^>]*)><f>(.*?)</f>', share, xml)
                data = xml.encode()
            out.writestr(info, data)


def test_shared_formula_column_with_odd_cells(tmp_path: Path) -> None:
    # A filled-down column with a text unit, an empty cell, a negative pressure and a true/false value in
    # it: the column is computed at once, the odd cells one by one, with the engine's texts.
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Duty"
    pressures: list[Any] = [100.0 + 7 * i for i in range(40)]
    pressures[5], pressures[9], pressures[13], pressures[21] = "3000 psi", None, -20.0, True
    for i, p in enumerate(pressures, start=2):
        if p is not None:
            ws.cell(i, 1, p)
        ws.cell(i, 2, 10.0 + i / 4)
        ws.cell(i, 3, f"=SP_HYDRAULIC_POWER(A{i},B{i})")
        ws.cell(i, 4, f"=C{i}*0.9+B{i}")
    ws["D43"] = "=SUM(D2:D41)"
    ws["E1"] = "=MAX(C2:C41)"
    plain, shared, final = tmp_path / "plain.xlsx", tmp_path / "shared-c.xlsx", tmp_path / "shared.xlsx"
    wb.save(plain)
    _make_shared(plain, shared, "C", 2, 41)
    _make_shared(shared, final, "D", 2, 41)
    assert 'si="D"/>' in zipfile.ZipFile(final).read("xl/worksheets/sheet1.xml").decode()
    values = _assert_same_as_engine(final)
    power = CATALOGUE["SP_HYDRAULIC_POWER"]
    assert values[("Duty", "C7")] == power.cell("3000 psi", 10.0 + 7 / 4)
    assert values[("Duty", "C11")] == power.cell(None, 10.0 + 11 / 4)  # an empty cell is a missing argument
    assert str(values[("Duty", "C15")]).startswith("#SP! pressure")
    assert values[("Duty", "D15")] == CellError("#VALUE!")  # text in arithmetic, as in a spreadsheet


def test_running_total_is_computed_cell_by_cell(tmp_path: Path) -> None:
    # A column that reads the cell above it is not circular: computed in cell order.
    wb = openpyxl.Workbook()
    ws = wb.active
    ws["A1"] = 1.0
    ws["B1"] = "=A1"
    for row in range(2, 30):
        ws.cell(row, 1, row * 1.5)
        ws.cell(row, 2, f"=B{row - 1}+A{row}")
    path = tmp_path / "running.xlsx"
    wb.save(path)
    values = _assert_same_as_engine(path)
    assert values[("Sheet", "B29")] == pytest.approx(sum(r * 1.5 for r in range(2, 30)) + 1.0, rel=1e-12)


def test_random_formulas_equal_the_engine(tmp_path: Path) -> None:
    rng = random.Random(20240611)
    cells = ["A1", "A2", "A3", "A4", "A5", "A6", "$A$1", "B1", "B3"]
    consts = ["0", "1", "2.5", "-3", "0.001", '"x"', '"7"', "TRUE", "FALSE"]

    def expr(depth: int) -> str:
        pick = rng.random()
        if depth == 0 or pick < 0.3:
            return rng.choice(cells + consts)
        if pick < 0.6:
            op = rng.choice(["+", "-", "*", "/", "&", "=", "<", ">=", "<>"])
            return f"{expr(depth - 1)}{op}{expr(depth - 1)}"
        if pick < 0.7:
            return f"-({expr(depth - 1)})"
        if pick < 0.8:
            return f"IF({expr(depth - 1)},{expr(depth - 1)},{expr(depth - 1)})"
        if pick < 0.9:
            return f"SP_GEOMETRIC_FLOW({expr(depth - 1)},{expr(depth - 1)})"
        return f"ROUND({expr(depth - 1)},{rng.choice(['0', '1', '3'])})"

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "R"
    _inputs(ws)
    formulas = [expr(3) for _ in range(150)]
    for row, formula in enumerate(formulas, start=1):
        ws.cell(row, 4, "=" + formula)
    path = tmp_path / "random.xlsx"
    wb.save(path)
    _assert_same_as_engine(path)


@pytest.mark.parametrize(
    "formula",
    ['=IF(A1>0,FROBNICATE(A1),"(none)")', "=A1*total", "=A1%", "=A1:A2*2", "=SUM(A:A)", "=#N/A+1"],
)
def test_outside_the_subset_goes_to_the_engine(tmp_path: Path, formula: str) -> None:
    wb = openpyxl.Workbook()
    wb.active["A1"] = 3.0
    wb.active["A2"] = 4.0
    wb.active["B1"] = formula
    path = tmp_path / "odd.xlsx"
    wb.save(path)
    assert recalculate_columns(path) is None


def test_problems_still_reported_as_before(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Loop"
    ws["A1"] = "=B1+1"
    ws["B1"] = "=A1*2"
    ws["D1"] = "=2*3"
    source = tmp_path / "loop.xlsx"
    wb.save(source)
    assert recalculate_columns(source) is None
    result = recalculate(source)
    assert {(p.sheet, p.cell) for p in result.problems} == {("Loop", "A1")}
    assert "circular" in result.problems[0].message
    assert main(["recalc", str(source), "--verify"]) == 2
    assert "Loop!B1" in capsys.readouterr().err


def test_written_copy_holds_the_fast_values(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Duty"
    for row in range(1, 21):
        ws.cell(row, 1, 50.0 * row)
        ws.cell(row, 2, 3.0 + row)
        ws.cell(row, 3, f"=SP_HYDRAULIC_POWER(A{row},B{row})")
        ws.cell(row, 4, f'=IF(C{row}>5,"large","small")')
        ws.cell(row, 5, f"=C{row}>5")
    ws["C2"] = "=SP_HYDRAULIC_POWER(-1,B2)"
    source = tmp_path / "duty.xlsx"
    wb.save(source)
    out = tmp_path / "duty-out.xlsx"
    assert main(["recalc", str(source), "-o", str(out)]) == 0
    expected = recalculate(source, engine="formulas").values
    got = openpyxl.load_workbook(out, data_only=True)["Duty"]
    for (_, cell), value in expected.items():
        shown = got[cell].value
        if isinstance(value, float):
            assert shown == pytest.approx(value, rel=1e-15)
        else:
            assert shown == value, cell
    assert main(["recalc", str(out), "--verify"]) == 0
    assert "agree" in capsys.readouterr().out


def test_cell_by_cell_columns_equal_the_engine(tmp_path: Path) -> None:
    # As a script writes them (openpyxl, one formula per cell, no shared formulas): four columns of
    # arithmetic and MIN/MAX of expressions. Rows 5-7 hold text, an empty cell and TRUE in column A, so
    # those columns take the cell-by-cell path; the other workbook below is all numbers (vectorised).
    def book(name: str, odd: bool) -> Path:
        wb = openpyxl.Workbook()
        ws = wb.active
        ws.title = "Duty"
        for i in range(60):
            r = i + 1  # append fills rows 1, 2, ...
            a: Any = 50.0 + (i * 37) % 300
            if odd and r in (5, 6, 7):
                a = {5: "text", 6: None, 7: True}[r]
            ws.append([a, 5.0 + (i * 13) % 160 / 2, f"=A{r}*B{r}/600", f"=C{r}*0.9+B{r}",
                       f"=MAX(C{r},D{r}/2,$B$2)", f"=MIN(A{r}-B{r},C{r}*2)", f"=max(c{r},-D{r})",
                       f"=MIN(B{r},B{r})"])
        path = tmp_path / name
        wb.save(path)
        return path

    values = _assert_same_as_engine(book("numbers.xlsx", odd=False))
    # From the definition of MIN (the smaller of its arguments): row 1, A=50, B=5, C=50*5/600.
    assert values[("Duty", "F1")] == pytest.approx(min(50.0 - 5.0, 50 * 5 / 600 * 2), rel=1e-12)
    _assert_same_as_engine(book("odd.xlsx", odd=True))


def test_one_parse_per_relative_formula_gives_the_same_trees() -> None:
    # Self-consistency: the parse shared through the relative text equals a parse of each formula.
    from sheetpump.errors import UnsupportedError
    from sheetpump.recalc.formula import parse, parse_cached

    rng = random.Random(7)
    shapes = ["A{r}*B{r}/600", "MAX(C{r},$D$2)*0.9+Data!C{r}", "Q1!A{r}+1", "'My sheet'!b{r}^2",
              "SUM(A{r}:B{s})", "A0{r}+$A{r}", "A{r}&\"A{r}\"", "SP_HYDRAULIC_POWER(A{r},B$1)", "XFD{r}+1",
              "XFE{r}+1", "A1048576+A{r}", "LOG10(A{r})", "A{r}1+TRUE"]

    def outcome(parse: Any, *args: Any) -> Any:
        try:
            return parse(*args)
        except UnsupportedError as exc:
            return str(exc)

    cache: dict[str, Any] = {}
    for _ in range(400):
        shape = rng.choice(shapes)
        row, col = rng.randint(1, 3000), rng.randint(1, 30)
        text = shape.format(r=row + rng.choice([-1, 0, 0, 1]) if row > 1 else row, s=row + 2)
        direct = outcome(parse, text, row, col)
        cached = outcome(parse_cached, text, row, col, cache)
        cached = cached[0] if isinstance(cached, tuple) else cached
        assert cached == direct, (text, row, col)


def test_round_with_huge_digits_answers_as_libreoffice_and_does_not_hang(tmp_path: Path) -> None:
    # LibreOffice 7.4 headless (soffice --convert-to csv, checked): ROUND(1234.5678, 400) = 1234.5678,
    # ROUND(1234.5678, -400) = 0, ROUND(1234.5678, 1E20) = Err:502 (an invalid argument: #NUM! here).
    # Computing 10**1E20 instead would hang both the columnar path and the formulas engine.
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "S"
    ws["A1"] = 1234.5678
    for row, digits in enumerate(("400", "-400", "1E+20", "-1E+20", "2"), start=1):
        ws.cell(row, 2, f"=ROUND(A1,{digits})")
    path = tmp_path / "round.xlsx"
    wb.save(path)
    for values in (recalculate_columns(path).values, recalculate(path, engine="formulas").values):
        got = [values[("S", f"B{row}")] for row in range(1, 6)]
        assert got[0] == pytest.approx(1234.5678, rel=1e-15) and got[1] == 0.0 and got[4] == pytest.approx(1234.57)
        assert got[2] == CellError("#NUM!") and got[3] == CellError("#NUM!")
