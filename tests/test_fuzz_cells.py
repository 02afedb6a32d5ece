"""Every declared cell function under arbitrary cell values: it never raises and never shows NaN or inf.

A spreadsheet hands a cell function whatever is in the cells: numbers of any size, NaN and infinity
(from a script), text, texts with units, empty cells, true/false, dates, and ranges — lists of lists,
ragged or nested, of mixed types. Whatever comes in, the result must be a finite number, a 2-D list of
finite numbers or error texts, or an error text starting with ``#SP! ``. Checked through both faces:
``CATALOGUE[name].cell`` and the xlwings function ``sheetpump.cells.NAME``.

``SHEETPUMP_FUZZ_EXAMPLES`` sets the examples per function and face (default below: 1000 per face, so
2000 per function, a few minutes in all; run with e.g. 20000 for a deeper search).
"""

from __future__ import annotations

import datetime as dt
import math
import os
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sheetpump import cells
from sheetpump.calc import ERROR_PREFIX
from sheetpump.catalogue import CATALOGUE
from sheetpump.workbooks.templates import UNITS

EXAMPLES = int(os.environ.get("SHEETPUMP_FUZZ_EXAMPLES", "1000"))  # per face: 2000 per function

_UNITS = sorted({u for units in UNITS.values() for u in units} | {"%", "Pa", "m^3/s", "rev/s", "K", "mPa*s",
                                                                  "1/min", "degF", "W", "furlong", "", "  "})
numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, 1e-300, -1e-300, 5e-324, 1e300, -1e300, 1e308, math.nan, math.inf, -math.inf,
                     0.5, 1.0, 1.0000001, 0.9999999, 28.0, 1500.0, 250.0, -1.0]),
    st.integers(min_value=-(10**20), max_value=10**20),
)
unit_texts = st.builds(lambda n, u: f"{n} {u}", st.sampled_from(["1", "0", "-5", "1e400", "nan", "inf", "28",
                                                                 "3000", ".5", "1,5", ""]),
                       st.sampled_from(_UNITS))
scalars = st.one_of(
    numbers, unit_texts, st.text(max_size=12), st.sampled_from(_UNITS), st.none(), st.booleans(),
    st.dates(), st.datetimes(), st.just(dt.time(12, 0)), st.just(dt.timedelta(seconds=5)),
    st.sampled_from(["IEC", "NEMA", "iec", " nema ", "#N/A", "#SP! bad", "=1+1"]),
)
rows = st.lists(scalars, min_size=0, max_size=4)
ranges = st.one_of(
    st.lists(rows, min_size=0, max_size=4),  # 2-D, ragged and empty too
    rows,  # 1-D
    st.lists(st.lists(rows, min_size=1, max_size=2), min_size=1, max_size=2),  # deeper than a sheet has
    st.lists(st.lists(numbers, min_size=3, max_size=3), min_size=1, max_size=3),  # well-formed numeric
)
cell_values = st.one_of(scalars, scalars, ranges)


def _ok_number(x: Any) -> bool:
    return (type(x) is float and math.isfinite(x)) or type(x) is int


def _ok_error(x: Any) -> bool:
    return isinstance(x, str) and x.startswith(ERROR_PREFIX)


def check_result(out: Any) -> None:
    """A finite number, an error text, or a 2-D list of finite numbers or error texts."""
    if _ok_number(out) or _ok_error(out):
        return
    assert isinstance(out, list) and out and all(isinstance(r, list) and r for r in out), out
    assert len({len(r) for r in out}) == 1, out  # rectangular
    for r in out:
        for x in r:
            assert _ok_number(x) or _ok_error(x), (x, out)


def _arguments(name: str) -> st.SearchStrategy[list[Any]]:
    n = len(CATALOGUE[name].args)
    # any number of arguments up to all of them and a result unit (and one too many)
    return st.lists(cell_values, min_size=0, max_size=n + 2)


_SETTINGS = settings(max_examples=EXAMPLES, deadline=None, database=None,
                     suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                            HealthCheck.filter_too_much])

# Known failures, each with the reason and the fix the owner must make (marked strict: when fixed, the
# mark must go). Empty when every function holds.
KNOWN: dict[str, str] = {}


def _params() -> list[Any]:
    return [pytest.param(n, marks=pytest.mark.xfail(strict=True, reason=KNOWN[n])) if n in KNOWN else n
            for n in CATALOGUE]


@pytest.mark.parametrize("name", _params())
def test_catalogue_cell_never_raises(name: str) -> None:
    calc = CATALOGUE[name]

    @_SETTINGS
    @given(_arguments(name))
    def run(args: list[Any]) -> None:
        check_result(calc.cell(*args))

    run()


@pytest.mark.parametrize("name", _params())
def test_xlwings_face_never_raises(name: str) -> None:
    function = getattr(cells, name)

    @_SETTINGS
    @given(_arguments(name))
    def run(args: list[Any]) -> None:
        check_result(function(*args))

    run()


def test_every_function_is_fuzzed() -> None:
    # The parametrisation is the catalogue itself; and the xlwings face offers each one.
    assert set(CATALOGUE) <= set(dir(cells)) and len(CATALOGUE) >= 20


@pytest.mark.parametrize("bad", [[], [[]], [[[28.0]]], [[[]]]], ids=["[]", "[[]]", "[[[28]]]", "[[[]]]"])
def test_empty_or_3d_range_is_an_error_text(bad: Any) -> None:
    check_result(CATALOGUE["SP_GEOMETRIC_FLOW"].cell(bad, 1500))
    check_result(cells.SP_GEOMETRIC_FLOW(bad, 1500))


@pytest.mark.parametrize("unit", ["]", "(", "bar)"])
def test_unbalanced_unit_text_is_an_error_text(unit: str) -> None:
    check_result(CATALOGUE["SP_HYDRAULIC_POWER"].cell(200, 60, unit))  # as the result unit
    check_result(cells.SP_HYDRAULIC_POWER(f"200 {unit}", 60))  # inside an argument
