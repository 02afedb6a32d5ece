"""Committed files that are derived from code stay in sync with it."""

from __future__ import annotations

import re
from pathlib import Path

import openpyxl
import pytest

from sheetpump.catalogue import CATALOGUE
from sheetpump.cli.functions import markdown
from sheetpump.cli.rules import markdown as rules_markdown
from sheetpump.workbooks.example import EXAMPLE_SHEET, write_worked_example

ROOT = Path(__file__).resolve().parents[1]

#: Relative tolerance of computed values compared with the committed ones. The least-squares results
#: (SP_DERIVED_DISPLACEMENT_U, the Wilson coefficients behind SP_PREDICT_*) come from LAPACK through
#: numpy; another numpy or OpenBLAS build sums and blocks in another order, so the last digits move by
#: about cond(A)·eps (seen: 1.4e-13 relative on SP_DERIVED_DISPLACEMENT_U, 0.04041451884327792 against
#: 0.04041451884328355). 1e-9 leaves room for that and is far below any digit a user sees.
REL = 1e-9


def _block(text: str, name: str) -> str:
    match = re.search(rf"<!-- {name}:start -->\n(.*?)\n<!-- {name}:end -->", text, re.S)
    assert match, f"README has no {name} block"
    return match.group(1)


def test_readme_function_list_matches_declarations():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert _block(readme, "functions") == markdown(), "run scripts/regenerate.py"


def test_readme_rule_list_matches_the_checker():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert _block(readme, "rules") == rules_markdown(), "run scripts/regenerate.py"


def _cells(path: Path, data_only: bool) -> dict:
    book = openpyxl.load_workbook(path, data_only=data_only)
    return {(ws.title, c.coordinate): c.value for ws in book for row in ws.iter_rows() for c in row
            if c.value is not None}


def test_worked_example_matches_generator(tmp_path):
    fresh = tmp_path / "worked-example.xlsx"
    write_worked_example(fresh)
    committed = ROOT / "workbooks" / "worked-example.xlsx"
    # Formulas and texts exactly; numbers (the expected values are stored as numbers) within REL.
    assert_same_values(_cells(fresh, False), _cells(committed, False))
    assert_same_values(_cells(fresh, True), _cells(committed, True))


def assert_same_values(a: dict, b: dict) -> None:
    assert a.keys() == b.keys(), "run scripts/regenerate.py"
    for key, value in a.items():
        if isinstance(value, float):
            assert b[key] == pytest.approx(value, rel=REL), (key, "run scripts/regenerate.py")
        else:
            assert b[key] == value, (key, "run scripts/regenerate.py")


def test_worked_example_shows_every_function_with_its_expected_value(tmp_path):
    path = tmp_path / "example.xlsx"
    write_worked_example(path)
    formulas = openpyxl.load_workbook(path)[EXAMPLE_SHEET]
    values = openpyxl.load_workbook(path, data_only=True)[EXAMPLE_SHEET]
    shown = {}
    for row in range(5, formulas.max_row + 1):
        name = formulas.cell(row, 1).value
        formula = formulas.cell(row, 2).value
        assert formula.startswith(f"={name}(")
        # the stored result equals the expected column and a direct call of the declaration
        assert values.cell(row, 2).value == pytest.approx(values.cell(row, 3).value, rel=REL)
        direct = CATALOGUE[name].cell(*CATALOGUE[name].example)
        direct = direct[0][0] if isinstance(direct, list) else direct
        assert values.cell(row, 3).value == pytest.approx(direct, rel=REL)
        shown[name] = True
    assert set(shown) == set(CATALOGUE), "every cell function needs an example in its declaration"
