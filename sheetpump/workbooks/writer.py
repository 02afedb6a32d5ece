"""The one workbook writer: XlsxWriter, deterministic, atomic, and safe with text from inputs.

Why XlsxWriter: it stores a formula *together with* its computed value, so a reader that does not
recalculate (pandas, openpyxl with ``data_only=True``, a file previewer) still sees the numbers, while a
spreadsheet recomputes the live formula. openpyxl can store only one of the two.

Rules every output follows:

* **Deterministic**: the document's creation time is ``SOURCE_DATE_EPOCH`` when set, else a fixed
  date, so the same inputs give the same bytes.
* **Atomic**: the file is written to a temporary path and renamed (:func:`sheetpump.files.atomic_path`).
* **Text stays text**: a string that came from an input is always written as a string, never parsed as
  a formula, number or link, even when it starts with ``=``, ``+``, ``-`` or ``@``.
"""

from __future__ import annotations

import datetime as _dt
import math
import os
import textwrap
import weakref
from collections.abc import Iterable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # XlsxWriter itself is imported when a workbook is written (start-up of commands)
    import xlsxwriter
    from xlsxwriter.worksheet import Worksheet

from .. import SAFETY_CAUTION_SHORT, __version__
from ..files import atomic_path

__all__ = [
    "LINE_HEIGHT", "MARKERS", "PALETTE", "PAPER_SIZES", "PCT", "SIGNED_PCT", "STYLES", "VERDICT_FILLS", "as_stored",
    "book_styles", "cell_format", "column_width", "creation_time", "display_path", "header_footer",
    "header_footer_parts", "number_format", "open_book", "page_setup", "text_lines", "text_width", "write_formula",
    "write_header", "write_value",
]

#: Our own verdict colours (RGB hex), the one definition: the fill of a verdict's cell in every workbook
#: sheetpump writes (:data:`STYLES`) and of a marked cell in the annotated copy of a datasheet. A soft
#: green, amber, red, blue (info) and violet (not checked: a cell to fill in).
VERDICT_FILLS: dict[str, str] = {
    "pass": "D7EFD9", "warn": "FBE7B5", "fail": "F6CFCB", "info": "E4ECF7", "not checked": "E6DDF3",
}

#: Our own colours: input cells, headers, and the verdicts (with info and not checked).
STYLES: dict[str, dict[str, Any]] = {
    "title": {"bold": True, "font_size": 14},
    "header": {"bold": True, "bg_color": "#DCE3EA", "bottom": 1, "text_wrap": True, "valign": "top"},
    "input": {"bg_color": "#FFF6D5", "border": 1, "border_color": "#C9B458"},
    "pass": {"bg_color": "#" + VERDICT_FILLS["pass"], "font_color": "#1E5B28"},
    "warn": {"bg_color": "#" + VERDICT_FILLS["warn"], "font_color": "#6B4A00"},
    "fail": {"bg_color": "#" + VERDICT_FILLS["fail"], "font_color": "#7A1B12", "bold": True},
    "info": {"bg_color": "#" + VERDICT_FILLS["info"], "font_color": "#22406B"},
    "not checked": {"bg_color": "#" + VERDICT_FILLS["not checked"], "font_color": "#4A2C7A", "italic": True},
    "note": {"italic": True, "font_color": "#555555", "text_wrap": True, "valign": "top"},
    "caution": {"bold": True, "font_color": "#7A1B12", "text_wrap": True, "valign": "top"},
    "wrap": {"text_wrap": True, "valign": "top"},
    # number formats
    "n0": {"num_format": "#,##0"},
    "n1": {"num_format": "#,##0.0"},
    "n2": {"num_format": "#,##0.00"},
    "n3": {"num_format": "0.000"},
    "pct": {"num_format": "0.0%"},
}

#: Number formats of shares: plain (an efficiency) and signed (a margin, a difference).
PCT = "0.0%"
SIGNED_PCT = "+0.0%;-0.0%;0.0%"

#: Series colours, one per candidate (or per speed), in this order: the colour-blind-safe palette of
#: M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and presentations that are
#: friendly to colorblind people" (2002/2008), without its yellow (too light on white paper). The order
#: alternates dark and light, so neighbours stay apart in grey print too.
PALETTE = ("#0072B2", "#E69F00", "#009E73", "#CC79A7", "#000000", "#56B4E9", "#D55E00", "#999999")
#: Marker shapes paired with the colours, so series differ in shape as well as in colour.
MARKERS = ("circle", "square", "triangle", "diamond", "x", "star", "plus", "short_dash")

#: Paper sizes a printed output may use, with XlsxWriter's paper codes.
PAPER_SIZES: dict[str, int] = {"A4": 9, "Letter": 1}


def number_format(values: Iterable[Any], digits: int = 3, most: int = 4) -> str:
    """A number format that shows ``digits`` significant digits of the largest of ``values``.

    The decimals follow the largest magnitude, so one column reads alike (at most ``most`` decimals);
    texts, None and non-finite numbers are ignored.

    >>> number_format([1470.0, 500.0]), number_format([12.34, 3.1]), number_format([0.0123]), number_format([])
    ('#,##0', '#,##0.0', '#,##0.0000', '#,##0')
    """
    finite = [abs(float(v)) for v in values
              if isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v) and v != 0]
    if not finite:
        return "#,##0"
    decimals = min(most, max(0, digits - 1 - math.floor(math.log10(max(finite)))))
    return "#,##0" + ("." + "0" * decimals if decimals else "")


#: The formats :func:`cell_format` made, per open workbook (kept here, not on XlsxWriter's object).
_FORMATS: weakref.WeakKeyDictionary[Any, dict[tuple[tuple[str, str], ...], Any]] = weakref.WeakKeyDictionary()


#: The formats of :data:`STYLES` of each open workbook, by name (ours, not an attribute on XlsxWriter's object).
_STYLES: weakref.WeakKeyDictionary[Any, dict[str, Any]] = weakref.WeakKeyDictionary()


def book_styles(book: Any) -> dict[str, Any]:
    """The formats of :data:`STYLES`, by name, of a workbook opened by :func:`open_book`."""
    return _STYLES[book]


def cell_format(book: Any, *styles: str | None, num_format: str | None = None, **extra: Any) -> Any:
    """The workbook's format of :data:`STYLES` names plus a number format and extras, made once per book."""
    spec: dict[str, Any] = {}
    for name in styles:
        if name:
            spec.update(STYLES[name])
    if num_format:
        spec["num_format"] = num_format
    spec.update(extra)
    spec.setdefault("valign", "top")  # figures beside a wrapped text stand on its first line
    cache = _FORMATS.setdefault(book, {})
    key = tuple(sorted((k, str(v)) for k, v in spec.items()))
    if key not in cache:
        cache[key] = book.add_format(spec)
    return cache[key]


def text_width(value: Any, num_format: str | None = None) -> int:
    """Characters a value takes when shown (a number with ``num_format``, roughly)."""
    if value is None:
        return 0
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if not math.isfinite(value):
            return 5
        fmt = num_format or "General"
        if "%" in fmt:
            decimals = len(fmt.split(";")[0].split(".")[1].rstrip("%")) if "." in fmt else 0
            return len(f"{value * 100:+,.{decimals}f}") + 2
        if "." in fmt and fmt.startswith("#"):
            decimals = len(fmt.split(".")[1])
            return len(f"{value:,.{decimals}f}") + 1
        if fmt.startswith("#"):
            return len(f"{value:,.0f}") + 1
        return len(f"{value:.6g}") + 1
    return max((len(line) for line in str(value).splitlines()), default=0)


def text_lines(text: Any, width: float) -> int:
    """Lines a wrapped text takes in a column ``width`` characters wide.

    >>> text_lines("volumetric efficiency", 12), text_lines("", 5)
    (2, 1)
    """
    if text is None or text == "":
        return 1
    width = max(int(width), 1)
    return sum(max(1, len(textwrap.wrap(part, width, break_long_words=True))) for part in str(text).split("\n"))


#: Height of one line of 11-point text [pt], the default font of the outputs.
LINE_HEIGHT = 15.0


def column_width(header: str, values: Iterable[Any] = (), num_format: str | None = None, *, least: int = 6,
                 most: int = 40) -> int:
    """Width of a column [characters]: its widest value, and at least the header's longest word.

    The header wraps (:func:`write_header`); a value wider than ``most`` wraps or is cut.
    """
    widest = max((text_width(v, num_format) for v in values), default=0)
    word = max((len(w) for w in str(header).split()), default=0) + 1
    return int(min(most, max(least, widest + 1, word)))


def write_header(sheet: Worksheet, row: int, headers: Sequence[str], widths: Sequence[float], fmt: Any,
                 first_col: int = 0) -> None:
    """Write a header row: set the columns' widths and give the row the height its wrapped texts need."""
    lines = 1
    for c, (text, width) in enumerate(zip(headers, widths, strict=True), start=first_col):
        sheet.set_column(c, c, width)
        write_value(sheet, row, c, text, fmt)
        lines = max(lines, text_lines(text, width * 0.9))  # bold text is a little wider
    sheet.set_row(row, LINE_HEIGHT * lines)


def header_footer_parts(machine: str) -> tuple[dict[str, str], dict[str, str]]:
    """The texts of the page header and footer by position (``left``, ``center``, ``right``), in the
    spreadsheet's header codes: the machine's name, the sheet's name (``&A``), page x of y (``&P``, ``&N``);
    sheetpump's version and the one-line safety caution.

    ``machine`` comes from an input: ``&`` (the code character) is doubled and the text kept short (a
    header holds at most 255 characters).
    """
    name = " ".join(str(machine).split())
    if len(name) > 60:
        name = name[:59] + "…"
    name = name.replace("&", "&&")
    return ({"left": name, "center": "sheet: &A", "right": "page &P of &N"},
            {"left": f"sheetpump {__version__}", "center": SAFETY_CAUTION_SHORT})


def header_footer(machine: str) -> tuple[str, str]:
    """Page header and footer of :func:`header_footer_parts` as XlsxWriter takes them (9 and 8 point)."""
    head, foot = header_footer_parts(machine)
    codes = {"left": "&L", "center": "&C", "right": "&R"}
    return ("".join(f"{codes[k]}&9{v}" for k, v in head.items()),
            "".join(f"{codes[k]}&8{v}" for k, v in foot.items()))


def page_setup(sheet: Worksheet, machine: str, *, paper: str = "A4", landscape: bool = True,
               title_rows: tuple[int, int] | None = None, title_columns: tuple[int, int] | None = None,
               area: tuple[int, int, int, int] | None = None, fit_width: bool = True,
               breaks: Sequence[int] = ()) -> None:
    """Print setup of one sheet: paper, orientation, margins, header and footer, fit to one page wide.

    ``title_rows``/``title_columns`` (first, last; 0-based) repeat on every page; ``area`` is the print
    area (first row, first column, last row, last column); ``breaks`` are rows that start a new page.
    """
    if paper not in PAPER_SIZES:
        raise ValueError(f"paper must be one of {sorted(PAPER_SIZES)}, not {paper!r}")
    sheet.set_paper(PAPER_SIZES[paper])
    if landscape:
        sheet.set_landscape()
    else:
        sheet.set_portrait()
    sheet.set_margins(left=0.45, right=0.45, top=0.7, bottom=0.7)  # inches
    header, footer = header_footer(machine)
    sheet.set_header(header, {"margin": 0.3})
    sheet.set_footer(footer, {"margin": 0.3})
    if fit_width:
        sheet.fit_to_pages(1, 0)
    if title_rows is not None:
        sheet.repeat_rows(*title_rows)
    if title_columns is not None:
        sheet.repeat_columns(*title_columns)
    if area is not None:
        sheet.print_area(*area)
    if breaks:
        sheet.set_h_pagebreaks(list(breaks))


def as_stored(x: float) -> float:
    """A number as the workbook file stores it: XlsxWriter writes 16 significant digits.

    A formula's stored value computed from the numbers as stored agrees with a spreadsheet's recomputation.

    >>> as_stored(28.000000000000004), as_stored(0.1)
    (28.0, 0.1)
    """
    return float(f"{float(x):.16G}")


def display_path(path: str | os.PathLike[str], base: str | os.PathLike[str]) -> str:
    """An input file's name as an output shows it: relative to the output's folder ``base``.

    Never the absolute path of the machine that ran it, so two runs in different folders write the
    same cells; a file on another drive shows its name only.

    >>> display_path("/data/run/inputs/pump.xlsx", "/data/run")
    'inputs/pump.xlsx'
    """
    try:
        rel = os.path.relpath(Path(path).resolve(), Path(base).resolve())
    except ValueError:  # another drive (Windows)
        return Path(path).name
    return Path(rel).as_posix()


def creation_time() -> _dt.datetime:
    """The timestamp written into outputs: ``SOURCE_DATE_EPOCH`` if set, else 2000-01-01 UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.strip().isdigit():
        return _dt.datetime.fromtimestamp(int(epoch), tz=_dt.UTC).replace(tzinfo=None)
    return _dt.datetime(2000, 1, 1)


@contextmanager
def open_book(target: str | os.PathLike[str], title: str = "") -> Iterator[xlsxwriter.Workbook]:
    """Open an XlsxWriter workbook that lands at ``target`` atomically when the block ends.

    Its formats of :data:`STYLES`, by name, are :func:`book_styles` of it.
    """
    with atomic_path(Path(target)) as tmp:
        import xlsxwriter

        book = xlsxwriter.Workbook(
            str(tmp),
            {"strings_to_formulas": False, "strings_to_urls": False, "strings_to_numbers": False,
             "nan_inf_to_errors": True},
        )
        book.set_properties({"title": title, "author": "sheetpump", "created": creation_time()})
        _STYLES[book] = {name: book.add_format(spec) for name, spec in STYLES.items()}
        try:
            yield book
        finally:
            book.close()


def write_value(sheet: Worksheet, row: int, col: int, value: Any, fmt: Any = None) -> None:
    """Write a plain value: numbers as numbers, everything else as text (never a formula or link)."""
    if value is None:
        sheet.write_blank(row, col, None, fmt)
    elif isinstance(value, bool):
        sheet.write_boolean(row, col, value, fmt)
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        if math.isfinite(value):
            sheet.write_number(row, col, value, fmt)
        else:
            sheet.write_string(row, col, str(value), fmt)
    else:
        sheet.write_string(row, col, str(value), fmt)


def write_formula(sheet: Worksheet, row: int, col: int, formula: str, value: Any, fmt: Any = None) -> None:
    """Write a live formula with its computed value stored beside it.

    ``formula`` is built by sheetpump's code (never from input text); ``value`` is what sheetpump
    computed, stored so readers that do not recalculate see it.
    """
    if not formula.startswith("="):
        raise ValueError("a formula starts with '='")
    if isinstance(value, float) and not math.isfinite(value):
        value = "#NUM!"
    sheet.write_formula(row, col, formula, fmt, value)
