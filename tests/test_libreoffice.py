"""The LibreOffice harness really recomputes: proof with workbooks whose cached values are wrong on purpose.

XlsxWriter stores whatever result we hand ``write_formula`` as the cell's cached value. We store wrong
ones; LibreOffice (the outside reference) must come back with the right ones, which Python computes from
the same inputs. A second run with LibreOffice's own default setting shows the wrong cached values survive
without our recalculation setting, i.e. that the setting is what makes the harness work.
"""

from __future__ import annotations

import importlib.util
import math
import re
import shutil
import subprocess
from pathlib import Path

import openpyxl
import pytest
import xlsxwriter

try:  # tests/ may or may not be a package; both layouts work
    from tests import libreoffice as lo
except ImportError:  # pragma: no cover - depends on how pytest was started
    import libreoffice as lo  # type: ignore[no-redef]

from sheetpump.files import sha256

ROOT = Path(__file__).resolve().parents[1]

# Inputs of the arithmetic book, and the wrong values cached for its formulas.
A1, B1 = 3.0, 4.0
COLUMN = [2.5, 7.0, -1.5, 12.0]  # Data!A3:A6
WRONG = {"C1": 999.0, "C2": 998.0, "C3": -1.0, "C4": 997.0, "C5": "small", "C6": False, "C7": 0.0}

# Inputs of the two-sheet pump book (invented pump).
DISPLACEMENT_CM3 = 28.0  # cm³/rev
SPEED_RPM = 1500.0  # 1/min
PRESSURE_BAR = 210.0  # bar


def write_arithmetic(path: Path) -> None:
    book = xlsxwriter.Workbook(str(path))
    sheet = book.add_worksheet("Data")
    sheet.write("A1", A1)
    sheet.write("B1", B1)
    sheet.write_column("A3", COLUMN)
    sheet.write_formula("C1", "=A1*B1", None, WRONG["C1"])
    sheet.write_formula("C2", "=SUM(A3:A6)", None, WRONG["C2"])
    sheet.write_formula("C3", "=SQRT(A1*A1+B1*B1)", None, WRONG["C3"])
    sheet.write_formula("C4", "=C1*2+C2", None, WRONG["C4"])  # a chain: depends on two formula cells
    sheet.write_formula("C5", '=IF(A1>2,"big","small")', None, WRONG["C5"])
    sheet.write_formula("C6", "=B1>A1", None, WRONG["C6"])
    sheet.write_formula("C7", "=A1/(B1-4)", None, WRONG["C7"])  # division by zero
    book.close()


def write_pump(path: Path) -> None:
    book = xlsxwriter.Workbook(str(path))
    pump = book.add_worksheet("Pump")
    duty = book.add_worksheet("Duty cycle")  # a space: the reference needs quoting
    for sheet in (pump, duty):
        sheet.set_column("A:A", 36)  # wide enough that the printed labels are not cut
    pump.write_column("A1", ["displacement [cm³/rev]", "speed [rpm]"])
    pump.write_column("B1", [DISPLACEMENT_CM3, SPEED_RPM])
    book.define_name("Speed", "=Pump!$B$2")
    duty.write("A1", "pressure [bar]")
    duty.write("B1", PRESSURE_BAR)
    duty.write("A2", "flow [L/min]")
    duty.write_formula("B2", "=Pump!B1*Speed/1000", None, 1.0)
    duty.write("A3", "hydraulic power [kW]")
    duty.write_formula("B3", "=B1*B2/600", None, 2.0)
    pump.write("A3", "power back on the pump sheet [kW]")
    pump.write_formula("B3", "='Duty cycle'!B3", None, 3.0)
    book.add_worksheet("Notes")  # left empty: LibreOffice prints it as a blank sliver of a page
    book.close()


def cached_values(path: Path) -> dict[str, object]:
    """What a reader sees without any recomputation: the values stored in the file."""
    book = openpyxl.load_workbook(path, data_only=True)
    try:
        return {f"{s.title}!{c.coordinate}": c.value for s in book.worksheets for r in s.iter_rows() for c in r}
    finally:
        book.close()


@pytest.fixture(scope="module")
def books(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("books")
    paths = {"arithmetic": folder / "arithmetic.xlsx", "pump": folder / "pump.xlsx"}
    write_arithmetic(paths["arithmetic"])
    write_pump(paths["pump"])
    return paths


@pytest.fixture(scope="module")
def recalculated(books: dict[str, Path], tmp_path_factory: pytest.TempPathFactory) -> dict[str, dict]:
    """Both books through ONE LibreOffice start; values of formula cells by (sheet, cell)."""
    lo.require_soffice()
    before = {name: sha256(path) for name, path in books.items()}
    out = tmp_path_factory.mktemp("recalculated")
    done = lo.recalculate_many(list(books.values()), out)
    assert [p.name for p in done] == [p.name for p in books.values()]
    assert before == {name: sha256(path) for name, path in books.items()}, "an input was modified"
    return {
        name: {
            "formulas": lo.read_values(path, made),
            "all": lo.read_values(path, made, formulas_only=False),
        }
        for (name, path), made in zip(books.items(), done, strict=True)
    }


def test_cached_values_really_are_wrong(books: dict[str, Path]) -> None:
    # Precondition, so the tests below can fail: the file itself carries the wrong results.
    cached = cached_values(books["arithmetic"])
    assert cached["Data!C1"] == WRONG["C1"] != A1 * B1
    assert cached["Data!C3"] == WRONG["C3"]


@lo.needs_soffice
def test_arithmetic_is_recomputed(recalculated: dict[str, dict]) -> None:
    got = recalculated["arithmetic"]["formulas"]
    # Expected values from Python's own arithmetic on the same inputs.
    expected = {
        "C1": A1 * B1,
        "C2": sum(COLUMN),
        "C3": math.sqrt(A1 * A1 + B1 * B1),  # 3-4-5 triangle
        "C4": A1 * B1 * 2 + sum(COLUMN),
        "C5": "big" if A1 > 2 else "small",
        "C6": B1 > A1,
    }
    for ref, value in expected.items():
        assert value != WRONG[ref]
        assert got["Data", ref] == pytest.approx(value), ref
    assert got["Data", "C7"] == "#DIV/0!"  # spreadsheet convention for x/0 (common practice)


@lo.needs_soffice
def test_only_formula_cells_or_all_cells(recalculated: dict[str, dict]) -> None:
    formulas = recalculated["arithmetic"]["formulas"]
    every = recalculated["arithmetic"]["all"]
    assert set(formulas) == {("Data", f"C{i}") for i in range(1, 8)}
    assert every["Data", "A1"] == A1 and every["Data", "A6"] == COLUMN[-1]
    assert set(formulas) < set(every)


@lo.needs_soffice
def test_cross_sheet_references_and_a_defined_name(recalculated: dict[str, dict]) -> None:
    got = recalculated["pump"]["formulas"]
    # Q [L/min] = V [cm³/rev] · n [rpm] / 1000 and P [kW] = Δp [bar] · Q [L/min] / 600 (DESIGN.md §4,
    # common practice): 28 cm³/rev at 1500 rpm gives 42 L/min, at 210 bar 14.7 kW.
    flow = DISPLACEMENT_CM3 * SPEED_RPM / 1000
    power = PRESSURE_BAR * flow / 600
    assert got["Duty cycle", "B2"] == pytest.approx(flow) != 1.0
    assert got["Duty cycle", "B3"] == pytest.approx(power) != 2.0
    assert got["Pump", "B3"] == pytest.approx(power) != 3.0


@lo.needs_soffice
def test_without_the_setting_the_cached_values_come_back(books: dict[str, Path], tmp_path: Path) -> None:
    # LibreOffice's own default ("never recalculate" for .xlsx) keeps what the file says; this is why the
    # harness writes OOXMLRecalcMode = 0 into its profile.
    lo.require_soffice()
    made = lo.recalculate(books["arithmetic"], tmp_path, recalc="default")
    got = lo.read_values(books["arithmetic"], made)
    assert got["Data", "C1"] == WRONG["C1"]
    assert got["Data", "C3"] == WRONG["C3"]


@pytest.fixture(scope="module")
def pump_pdf(books: dict[str, Path], tmp_path_factory: pytest.TempPathFactory) -> Path:
    lo.require_soffice()
    out = tmp_path_factory.mktemp("pdf")
    pdf = lo.to_pdf(books["pump"], out, single_page_sheets=True)
    assert pdf == out / "pump.pdf"
    return pdf


def _poppler(*command: str) -> str:
    if shutil.which(command[0]) is None:
        pytest.skip(f"{command[0]} (poppler-utils) not installed")
    return subprocess.run(command, capture_output=True, text=True, check=True).stdout


@lo.needs_soffice
def test_pdf(pump_pdf: Path) -> None:
    assert pump_pdf.read_bytes().startswith(b"%PDF-")
    text = _poppler("pdftotext", str(pump_pdf), "-")
    assert "hydraulic power [kW]" in text
    assert "14.7" in text  # the recomputed power is printed, not the cached 2 (see the tests above)
    assert "Pages:           3" in _poppler("pdfinfo", str(pump_pdf))  # one page per sheet


def _png_size(path: Path) -> tuple[int, int]:
    # PNG signature, then the IHDR chunk: width and height as big-endian 32-bit (ISO/IEC 15948 §11.2.2).
    data = path.read_bytes()[:24]
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and data[12:16] == b"IHDR"
    return int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")


@lo.needs_soffice
def test_pictures_of_the_pages(pump_pdf: Path, tmp_path: Path) -> None:
    _poppler("pdftoppm", "-v")
    spec = importlib.util.spec_from_file_location("render_pages", ROOT / "scripts" / "render_pages.py")
    render = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(render)
    whole = render.pdf_to_pngs(pump_pdf, tmp_path / "whole", dpi=72)
    assert [p.name for p in whole] == ["pump-1.png", "pump-2.png"]  # the blank third page is left out
    kept = render.pdf_to_pngs(pump_pdf, tmp_path / "kept", dpi=72, skip_blank=False)
    assert [p.name for p in kept] == ["pump-1.png", "pump-2.png", "pump-3.png"]
    # At 72 dpi one pixel is one point, so the picture is the page size pdfinfo reports (ISO 32000 units).
    size = re.search(r"Page size:\s+([\d.]+) x ([\d.]+) pts", _poppler("pdfinfo", str(pump_pdf)))
    assert _png_size(whole[0]) == (pytest.approx(float(size[1]), abs=1), pytest.approx(float(size[2]), abs=1))
    cropped = render.pdf_to_pngs(pump_pdf, tmp_path / "crop", dpi=72, crop=(0, 0, 40, 10))
    assert [_png_size(p) for p in cropped] == [(40, 10), (40, 10)]  # pdftoppm -x -y -W -H
    trimmed = render.pdf_to_pngs(pump_pdf, tmp_path / "trim", dpi=72, trim=True, margin=0)
    for full, cut in zip(whole, trimmed, strict=True):
        assert 0 < _png_size(cut)[0] <= _png_size(full)[0] and 0 < _png_size(cut)[1] <= _png_size(full)[1]


@lo.needs_soffice
def test_a_file_that_is_no_workbook_gives_soffice_own_words(tmp_path: Path) -> None:
    lo.require_soffice()
    bad = tmp_path / "in" / "broken.xlsx"
    bad.parent.mkdir()
    bad.write_bytes(b"not a zip file")
    with pytest.raises(
        lo.LibreOfficeError, match=r"(?s)outputs not written: \['broken\.xlsx'\].*stderr:\n.*could not be loaded"
    ):
        lo.recalculate(bad, tmp_path / "out")
    assert not (tmp_path / "out" / "broken.xlsx").exists()
    assert list((tmp_path / "out").iterdir()) == []  # no staging folder left behind


@lo.needs_soffice
def test_a_hung_soffice_is_killed(books: dict[str, Path], tmp_path: Path) -> None:
    lo.require_soffice()
    with pytest.raises(lo.LibreOfficeError, match="did not finish within"):
        lo.recalculate(books["arithmetic"], tmp_path, timeout=0.05)


# ---- no LibreOffice needed below


def test_inputs_are_never_replaced(books: dict[str, Path]) -> None:
    with pytest.raises(ValueError, match="would replace the input"):
        lo.recalculate(books["arithmetic"], books["arithmetic"].parent)


def test_a_missing_input_is_named(tmp_path: Path) -> None:
    with pytest.raises(lo.LibreOfficeError, match=r"no such workbook: .*nothing\.xlsx"):
        lo.recalculate(tmp_path / "nothing.xlsx", tmp_path / "out")


def test_absence_skips_unless_required(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    monkeypatch.setenv(lo.SOFFICE_ENV, str(tmp_path / "no-soffice-here"))
    assert lo.soffice_path() is None
    monkeypatch.delenv(lo.REQUIRE_ENV, raising=False)
    assert any(m.name == "skip" for m in lo.needs_soffice.marks)
    with pytest.raises(pytest.skip.Exception, match="LibreOffice Calc is needed"):
        lo.require_soffice()
    monkeypatch.setenv(lo.REQUIRE_ENV, "1")
    assert [m.name for m in lo.needs_soffice.marks] == ["libreoffice"]
    with pytest.raises(pytest.fail.Exception, match="forbids skipping"):
        lo.require_soffice()
    book = tmp_path / "any.xlsx"
    write_arithmetic(book)
    with pytest.raises(lo.LibreOfficeMissingError, match=r"SHEETPUMP_SOFFICE=.* is not an executable"):
        lo.recalculate(book, tmp_path / "out")
