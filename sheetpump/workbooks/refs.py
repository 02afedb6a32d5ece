"""Cell references, column letters and the sheet-XML pieces: the one place sheetpump spells them.

A cell reference is column letters and a row number (``B11``, ``$B$11``); columns run ``A`` … ``Z``,
``AA`` … ``XFD`` (bijective base 26, ECMA-376 Part 1 §18.3.1.4 "c (Cell)", attribute ``r``). Rows and
columns are 1-based here, as in the sheet XML, except :func:`column_letter`, which takes the 0-based
index of a header list. The grid ends at row :data:`MAX_ROW` and column :data:`MAX_COL` (``XFD``).

>>> split_ref("$C$12"), cell_name(12, 3), column_letter(27), column_number("AB")
((12, 3), 'C12', 'AB', 28)
>>> range_cells("C1:D2")
[['C1', 'D1'], ['C2', 'D2']]

The sheet-XML helpers read a worksheet part with regular expressions (no DTD, so no entity
expansion): :data:`CELL_ELEMENT` and its neighbours match an element with any namespace prefix
(group 1 the prefix, then its attribute text and body); :func:`attributes` and :func:`cell_ref_attribute`
read attribute text; :func:`sheet_parts` finds each worksheet's package part through the workbook's
relationships; :func:`shared_strings` reads the shared-string table.
"""

from __future__ import annotations

import html
import re
import zipfile
from pathlib import PurePosixPath

__all__ = [
    "CELL_ELEMENT",
    "CELL_REF",
    "FORMULA_ELEMENT",
    "INLINE_STRING_ELEMENT",
    "MAIN_NS",
    "MAX_COL",
    "MAX_ROW",
    "PKG_REL_NS",
    "REL_NS",
    "ROW_ELEMENT",
    "SHEETDATA_ELEMENT",
    "TEXT_ELEMENT",
    "VALUE_ELEMENT",
    "attributes",
    "cell_name",
    "cell_ref_attribute",
    "column_letter",
    "column_number",
    "normalise_part",
    "range_cells",
    "shared_strings",
    "sheet_parts",
    "split_ref",
]

#: The last row and column of a sheet (Excel's grid: 2^20 rows, 2^14 columns, ``XFD``).
MAX_ROW, MAX_COL = 1_048_576, 16_384

#: One cell reference, ``$`` allowed: group 1 the column letters, group 2 the row (1 … 9,999,999).
CELL_REF = re.compile(r"^\$?([A-Za-z]{1,3})\$?([1-9]\d{0,6})$")

_NUMBERS: dict[str, int] = {}  # column letters -> number, filled as met (a sheet uses few)


def column_letter(index: int) -> str:
    """Spreadsheet letters of a 0-based column index: 0 → ``A``, 27 → ``AB``.

    >>> column_letter(0), column_letter(25), column_letter(26), column_letter(16383)
    ('A', 'Z', 'AA', 'XFD')
    """
    letters = ""
    index += 1
    while index:
        index, rem = divmod(index - 1, 26)
        letters = chr(65 + rem) + letters
    return letters


def column_number(letters: str) -> int:
    """The 1-based column number of column letters (either case): ``"A"`` → 1, ``"xfd"`` → 16384.

    >>> column_number("A"), column_number("z"), column_number("AA"), column_number("XFD")
    (1, 26, 27, 16384)
    """
    number = _NUMBERS.get(letters)
    if number is None:
        number = 0
        for ch in letters.upper():
            number = number * 26 + ord(ch) - 64
        _NUMBERS[letters] = number
    return number


def split_ref(ref: str) -> tuple[int, int]:
    """``"C12"`` (or ``"$C$12"``) → (12, 3): row and column numbers, 1-based; ValueError if not a cell.

    >>> split_ref("xfd1048576")
    (1048576, 16384)
    """
    m = CELL_REF.match(ref)
    if not m:
        raise ValueError(ref)
    return int(m.group(2)), column_number(m.group(1))


def cell_name(row: int, col: int) -> str:
    """The reference of a cell by its 1-based row and column: (12, 3) → ``"C12"``."""
    return f"{column_letter(col - 1)}{row}"


def range_cells(ref: str) -> list[list[str]]:
    """The cells of a range, row by row: ``"C1:D2"`` → [["C1", "D1"], ["C2", "D2"]] (one cell: [["C1"]])."""
    first, _, last = ref.partition(":")
    r1, c1 = split_ref(first)
    r2, c2 = split_ref(last or first)
    return [[cell_name(r, c) for c in range(c1, c2 + 1)] for r in range(r1, r2 + 1)]


# ------------------------------------------------------------------------------------------ sheet XML

MAIN_NS = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
REL_NS = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
PKG_REL_NS = "http://schemas.openxmlformats.org/package/2006/relationships"

#: A cell element: (prefix, attribute text, body or None).
CELL_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)c\b([^>]*?)(?:/>|>(.*?)</\1c>)", re.S)
#: A row element: (prefix, attribute text, body or None).
ROW_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)row\b([^>]*?)(?:/>|>(.*?)</\1row>)", re.S)
#: The sheetData element: (prefix, attribute text, body or None).
SHEETDATA_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)sheetData\b([^>]*?)(?:/>|>(.*?)</\1sheetData>)", re.S)
#: A formula element: (prefix, attribute text, formula text or None).
FORMULA_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)f\b([^>]*?)(?:/>|>(.*?)</\1f>)", re.S)
#: A value element: (prefix, value text or None).
VALUE_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)v\b[^>]*?(?:/>|>(.*?)</\1v>)", re.S)
#: An inline-string element (whole match).
INLINE_STRING_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)is\b[^>]*?(?:/>|>.*?</\1is>)", re.S)
#: A text element: (prefix, text or None).
TEXT_ELEMENT = re.compile(r"<((?:[\w.-]+:)?)t\b[^>]*?(?:/>|>(.*?)</\1t>)", re.S)

_ATTR_RE = re.compile(r"""([\w:.-]+)\s*=\s*(?:"([^"]*)"|'([^']*)')""")
_R_ATTR_RE = re.compile(r"""(?:^|\s)r\s*=\s*(?:"([^"]*)"|'([^']*)')""")
_SHARED_ITEM_RE = re.compile(r"<(?:[\w.-]+:)?si\b[^>]*?(?:/>|>(.*?)</(?:[\w.-]+:)?si>)", re.S)


def attributes(text: str) -> dict[str, str]:
    """The attributes of an element's attribute text, unescaped.

    >>> attributes(''' r="B2" t='s' ''')
    {'r': 'B2', 't': 's'}
    """
    return {m.group(1): html.unescape(m.group(2) if m.group(2) is not None else m.group(3))
            for m in _ATTR_RE.finditer(text)}


def cell_ref_attribute(text: str) -> str | None:
    """The ``r`` attribute of a cell's attribute text (what ``attributes(text).get("r")`` gives, faster)."""
    m = _R_ATTR_RE.search(text)
    if m is None:
        return None
    ref = m.group(1) if m.group(1) is not None else m.group(2)
    return html.unescape(ref) if "&" in ref else ref


def normalise_part(part: str) -> str:
    """A package part name without ``.`` and ``..`` steps: ``"xl/a/../b.xml"`` → ``"xl/b.xml"``."""
    parts: list[str] = []
    for piece in part.split("/"):
        if piece == "..":
            if parts:
                parts.pop()
        elif piece and piece != ".":
            parts.append(piece)
    return "/".join(parts)


def sheet_parts(archive: zipfile.ZipFile) -> list[tuple[str, str]]:
    """(name, package part) of every sheet of a workbook package that has a relationship, in tab order.

    The part is where the relationship points (``xl/worksheets/sheet1.xml``; a chart sheet's part too),
    whether or not the package holds it. KeyError when ``xl/workbook.xml`` or its relationships are
    missing.
    """
    from defusedxml import ElementTree

    book = ElementTree.fromstring(archive.read("xl/workbook.xml"))
    rels = ElementTree.fromstring(archive.read("xl/_rels/workbook.xml.rels"))
    targets = {r.get("Id"): r.get("Target", "") for r in rels.iter(f"{{{PKG_REL_NS}}}Relationship")}
    out = []
    for node in book.iter(f"{{{MAIN_NS}}}sheet"):
        target = targets.get(node.get(f"{{{REL_NS}}}id"))
        if target is None:
            continue
        part = target.lstrip("/") if target.startswith("/") else str(PurePosixPath("xl") / target)
        out.append((node.get("name", ""), normalise_part(part)))
    return out


def shared_strings(archive: zipfile.ZipFile) -> list[str]:
    """The shared-string table of a workbook package (empty when it has none)."""
    try:
        text = archive.read("xl/sharedStrings.xml").decode("utf-8")
    except KeyError:
        return []
    items = _SHARED_ITEM_RE.findall(text)
    return ["".join(html.unescape(t or "") for _, t in TEXT_ELEMENT.findall(item or "")) for item in items]
