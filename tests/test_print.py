"""The outputs as printed documents: page counts of LibreOffice's plain PDF export, readable cells, no
absolute paths, and the same cells from two runs in different folders.

The page limits are the ones a design review asked for (issue: the comparison on at most 20 pages, its
Summary on at most 2); each printed page names its sheet in the header ("sheet: Summary"), which is how
the pages are counted per sheet.
"""

from __future__ import annotations

import collections
import os
import re
import shutil
import subprocess
from pathlib import Path
from typing import Any

import numpy as np
import openpyxl
import pytest

from sheetpump import SAFETY_CAUTION_SHORT, demo
from sheetpump.cli import main
from sheetpump.comparison import compare
from sheetpump.workbooks.readers import read_application, read_datasheet
from sheetpump.workbooks.writer import VERDICT_FILLS as FILLS
from sheetpump.workbooks.writer import display_path, number_format, text_lines
from tests import libreoffice as lo

ROOT = Path(__file__).resolve().parents[1]
_SHEET = re.compile(r"sheet: (.+)")


def _pages_per_sheet(pdf: Path) -> tuple[collections.Counter[str], list[str]]:
    """Pages of each sheet (from the header each page prints) and every page's text."""
    tool = shutil.which("pdftotext")
    if tool is None:
        if os.environ.get("SHEETPUMP_REQUIRE_SOFFICE"):
            pytest.fail("pdftotext (poppler-utils) is missing")
        pytest.skip("pdftotext (poppler-utils) is missing")
    text = subprocess.run([tool, "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout
    pages = text.split("\f")
    if pages and not pages[-1].strip():
        pages.pop()
    counts: collections.Counter[str] = collections.Counter()
    for page in pages:
        found = _SHEET.search(page)
        counts[found.group(1).split("  ")[0].strip() if found else "?"] += 1
    return counts, pages


def _cells(path: Path) -> dict[tuple[str, str], Any]:
    book = openpyxl.load_workbook(path)
    return {(ws.title, c.coordinate): c.value for ws in book for row in ws.iter_rows() for c in row
            if c.value is not None}


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    return demo.run(tmp_path_factory.mktemp("print") / "first" / "demo")


# -- pages ------------------------------------------------------------------------------------------------
@lo.needs_soffice
@pytest.mark.libreoffice
@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_demo_comparison_prints_on_few_pages(demo_run, tmp_path, paper):
    book = demo_run.comparison
    if paper != "A4":  # the same comparison on US Letter, as the application's paper_size would ask
        app = read_application(demo_run.inputs[0])
        comp = compare([read_datasheet(p) for p in demo_run.inputs[1:]], app)
        book = tmp_path / "letter" / "comparison.xlsx"
        book.parent.mkdir()
        from sheetpump.workbooks.comparison_book import write_comparison
        write_comparison(book, comp, demo_run.inputs, paper="Letter")
    # LibreOffice's plain PDF export: a fresh profile with default settings, no filter options
    pdf = lo.to_pdf_many([book], tmp_path / "pdf", recalc="default")[0]
    counts, pages = _pages_per_sheet(pdf)
    assert "?" not in counts, "every page names its sheet in the header"
    assert counts["Summary"] <= 2, counts
    assert sum(counts.values()) <= 20, counts
    n = len(demo_run.verdicts)
    for i in range(1, n + 1):
        assert counts[f"Duty {i}"] == 1, counts
    # each chart whole on a page: two bands (efficiencies, flow) and the envelopes two a page, nothing more
    assert counts["Charts"] == 2 + (n + 1) // 2, counts
    for page in pages:
        assert re.search(r"page \d+ of \d+", page), "page x of y in the header"
        assert "sheetpump " in page
    # the caution's one-line form is in the footer of every page (pdftotext may break the line)
    assert all(" ".join(SAFETY_CAUTION_SHORT.split()[:6]) in " ".join(p.split()) for p in pages)


@lo.needs_soffice
@pytest.mark.libreoffice
def test_evaluation_and_annotated_copy_print_with_a_page_setup(demo_run, tmp_path):
    table = demo_run.inputs[1]  # a datasheet's Performance sheet is a measured table
    out = tmp_path / "eval.xlsx"
    assert main(["evaluate", str(table), "--sheet", "Performance", "--displacement", "28 cc", "-o", str(out),
                 "--paper", "Letter"]) in (0, 1)
    marked = tmp_path / "marked.xlsx"
    main(["check", "--app", str(demo_run.inputs[0]), str(demo_run.inputs[3]), "--annotate", str(marked)])
    pdfs = lo.to_pdf_many([out, marked], tmp_path / "pdf", recalc="default")
    counts, _ = _pages_per_sheet(pdfs[0])
    assert "?" not in counts and counts["Summary"] == 1 and counts["Charts"] == 3, counts
    assert sum(counts.values()) <= 8, counts
    counts, _ = _pages_per_sheet(pdfs[1])
    assert "?" not in counts and sum(counts.values()) <= 4, counts


# -- cells ------------------------------------------------------------------------------------------------
_ABSOLUTE = re.compile(r"(^|[\s(\"'])(/[^/\s]+){2,}|[A-Za-z]:\\")


def test_no_cell_of_any_output_holds_an_absolute_path(demo_run, tmp_path):
    eval_out = tmp_path / "eval.xlsx"
    main(["evaluate", str(demo_run.inputs[1]), "--sheet", "Performance", "-o", str(eval_out)])
    marked = tmp_path / "marked.xlsx"
    main(["check", "--app", str(demo_run.inputs[0]), str(demo_run.inputs[3]), "--annotate", str(marked)])
    roots = {str(demo_run.folder.resolve()), str(tmp_path.resolve()), str(Path.home())}
    for book in (demo_run.comparison, eval_out, marked):
        texts = [v for v in _cells(book).values() if isinstance(v, str)]
        wb = openpyxl.load_workbook(book)
        texts += [c.comment.text for ws in wb for row in ws.iter_rows() for c in row if c.comment]
        assert texts
        for text in texts:
            assert not _ABSOLUTE.search(text), (book.name, text)
            assert not any(root in text for root in roots), (book.name, text)
    # the inputs are named relative to the comparison, and their SHA-256 stays on Assumptions
    assumptions = [v for (s, _), v in _cells(demo_run.comparison).items() if s == "Assumptions"]
    assert "inputs/orrin-og-22.xlsx" in assumptions
    assert sum(1 for v in assumptions if isinstance(v, str) and re.fullmatch(r"[0-9a-f]{64}", v)) == 5


def test_two_demo_runs_in_different_folders_give_the_same_cells(demo_run, tmp_path):
    second = demo.run(tmp_path / "elsewhere" / "deeper" / "demo")
    assert _cells(second.comparison) == _cells(demo_run.comparison)


def test_numbers_are_formatted_and_tabs_short(demo_run):
    book = openpyxl.load_workbook(demo_run.comparison)
    names = book.sheetnames
    assert names[:1 + len(demo_run.verdicts)] == ["Summary"] + [f"Duty {i + 1}" for i in range(len(demo_run.verdicts))]
    # the candidate's full name is in the duty sheet's title
    assert "Quillfeather Fluid Power QF-175" in book["Duty 2"]["A1"].value
    for ws in book:
        for row in ws.iter_rows():
            for c in row:
                if isinstance(c.value, float):  # every number has a format: no 500.0000000000001 on screen
                    assert c.number_format != "General", (ws.title, c.coordinate)
                    assert c.number_format != "0.000", (ws.title, c.coordinate)
    # a setting entered as a share shows as a percentage: an overshoot of 10 % shows 10 %
    rows = {r[0].value: r[1] for r in book["Assumptions"].iter_rows() if r[0].value}
    assert rows["overshoot allowed"].value == pytest.approx(0.1) and "%" in rows["overshoot allowed"].number_format
    summary = {r[0].value: r[1:] for r in book["Summary"].iter_rows() if r[0].value}
    # pulsation frequency z·n/60 (common practice): 12 teeth at 1470 rpm is 294 Hz
    assert summary["pulsation frequency, teeth x speed / 60 [Hz]"][0].value == pytest.approx(12 * 1470 / 60)
    assert summary["worst margin"][0].number_format.startswith("+")


def test_the_annotated_copy_comments_hold_the_findings(demo_run, tmp_path):
    marked = tmp_path / "marked.xlsx"
    main(["check", "--app", str(demo_run.inputs[0]), str(demo_run.inputs[3]), "--annotate", str(marked)])
    wb = openpyxl.load_workbook(marked)
    marks = {v.upper()[-6:] for v in FILLS.values()}
    filled = [c for row in wb["Pump"].iter_rows() for c in row
              if c.fill is not None and c.fill.fill_type == "solid" and str(c.fill.start_color.rgb)[-6:] in marks]
    assert filled
    for c in filled:
        assert c.comment is not None and c.comment.text.startswith("sheetpump "), c.coordinate


# -- helpers ----------------------------------------------------------------------------------------------
def test_number_format_gives_three_significant_digits():
    assert number_format([1470.0]) == "#,##0"
    assert number_format([96.04]) == "#,##0.0"
    assert number_format([0.0964]) == "#,##0.0000"
    assert number_format([np.nan, None, "text"]) == "#,##0"


def test_text_lines_and_display_path(tmp_path):
    assert text_lines("a " * 30, 10) == 6
    assert display_path(tmp_path / "inputs" / "a.xlsx", tmp_path) == "inputs/a.xlsx"
    assert display_path(tmp_path / "a.xlsx", tmp_path / "out") == "../a.xlsx"
