"""The one guarded way every reader opens a file a user gives us.

Before any parser sees a file, :func:`check_file` makes sure it is what its reader expects:

* an Office Open XML workbook (``.xlsx``/``.xlsm``, a zip holding ``xl/workbook.xml``), or, where the
  reader takes one, a CSV text file; an old binary ``.xls``, a password-protected workbook (an encrypted
  OLE container), an OpenDocument file, a CSV named ``.xlsx`` or a damaged zip is refused with a message
  saying what it is and what to do;
* no zip bomb: the members' declared uncompressed sizes are capped in total and each member's
  compression ratio is capped (Python's zipfile, which openpyxl reads through, stops a member at its
  declared size and checks its CRC, so the declared sizes bind);
* no XML entity declarations (``<!DOCTYPE``/``<!ENTITY``) in any XML member, whatever parser reads it
  next; openpyxl parses through defusedxml too (checked: :func:`open_workbook` refuses to run without it).

Macros in an ``.xlsm`` are never run: openpyxl does not execute anything, and it is told not to keep the
VBA part. A sheet read by python-calamine (which builds a dense grid spanning the used cells) is first
scanned for the cells it really holds (:func:`check_sheet_extent`), so a sheet with two cells a million
rows and sixteen thousand columns apart is refused instead of exhausting memory. A sheet read by openpyxl
holds only its real cells, and the readers iterate over a bounded number of rows.
"""

from __future__ import annotations

import os
import re
import warnings
import zipfile
import zlib
from pathlib import Path
from typing import Any

from ..errors import InputError, Where
from .refs import column_number, sheet_parts

__all__ = [
    "MAX_CELLS",
    "MAX_RATIO",
    "MAX_UNCOMPRESSED",
    "check_file",
    "check_sheet_extent",
    "open_workbook",
    "sheet_members",
]

#: Caps on a workbook's zip members: total uncompressed bytes and the compression ratio of any member
#: larger than 1 MiB. A datasheet is some 20 kB; a million-row log some 250 MB; a zip bomb 1000:1 or more.
MAX_UNCOMPRESSED = 2 * 1024**3
MAX_RATIO = 200.0
#: Cap on the cells of the dense grid a calamine read builds (rows × columns).
MAX_CELLS = 60_000_000

_ZIP = b"PK\x03\x04"
_EMPTY_ZIP = b"PK\x05\x06"
_OLE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
_SAVE_AS = "open it in the spreadsheet program and save it as an Excel workbook (.xlsx)"


def _refuse(path: Path, message: str, hint: str = "") -> InputError:
    return InputError(message, Where(file=str(path)), hint)


def _looks_like_text(head: bytes) -> bool:
    if not head:
        return False
    if b"\x00" in head:
        return False
    try:
        head.decode("utf-8")
    except UnicodeDecodeError:
        try:
            head.decode("cp1252")
        except UnicodeDecodeError:
            return False
    return True


def check_file(path: str | os.PathLike[str], *, allow_csv: bool = False,
               max_uncompressed: int = MAX_UNCOMPRESSED, max_ratio: float = MAX_RATIO) -> str:
    """Check that ``path`` is a workbook (or, with ``allow_csv``, a CSV file) that is safe to parse.

    Returns ``"xlsx"`` or ``"csv"``. Raises :class:`InputError` naming the file otherwise.

    >>> import tempfile, pathlib
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "log.xlsx"
    >>> _ = p.write_text("time [s],pressure [bar]\\n0,10\\n")
    >>> check_file(p)
    Traceback (most recent call last):
    ...
    sheetpump.errors.InputError: ...log.xlsx: this is a text (CSV) file with a workbook's name...
    """
    path = Path(path)
    if not path.exists():
        raise _refuse(path, "file not found")
    if not path.is_file():
        raise _refuse(path, "not a file")
    with open(path, "rb") as handle:
        head = handle.read(1 << 16)
    if not head:
        raise _refuse(path, "the file is empty (0 bytes)",
                      "save the workbook again from the spreadsheet program, or start from `sheetpump template`")
    suffix = path.suffix.lower()
    if head.startswith(_OLE):
        # Both old .xls files and password-protected .xlsx files are OLE compound documents; an
        # encrypted one holds an "EncryptionInfo" stream (its name is stored in UTF-16).
        with open(path, "rb") as handle:
            blob = handle.read(4 << 20)
        if "EncryptionInfo".encode("utf-16-le") in blob or "EncryptedPackage".encode("utf-16-le") in blob:
            raise _refuse(path, "the workbook is password-protected (encrypted)",
                          "remove the password (File > Info > Protect Workbook) and save again")
        raise _refuse(path, "this is an old binary Excel file (.xls, Excel 97-2003)", _SAVE_AS)
    if head.startswith(_ZIP) or head.startswith(_EMPTY_ZIP):
        if allow_csv and suffix in (".csv", ".txt"):
            raise _refuse(path, "this is a zip file (perhaps a workbook) with a CSV name",
                          "rename it to .xlsx or export the sheet as CSV")
        _check_zip(path, max_uncompressed, max_ratio)
        return "xlsx"
    if _looks_like_text(head):
        if allow_csv and suffix not in (".xlsx", ".xlsm", ".xltx", ".xltm"):
            return "csv"
        if head.lstrip().startswith((b"<?xml", b"<")):
            raise _refuse(path, "this is an XML or HTML file, not an Excel workbook", _SAVE_AS)
        raise _refuse(path, "this is a text (CSV) file with a workbook's name, not an Excel workbook",
                      "rename it to .csv (a time series may be a CSV file) or " + _SAVE_AS)
    raise _refuse(path, "not an Excel workbook (.xlsx) nor a CSV file", _SAVE_AS)


def _check_zip(path: Path, max_uncompressed: int, max_ratio: float) -> None:
    try:
        with zipfile.ZipFile(path) as archive:
            infos = archive.infolist()
            names = {info.filename for info in infos}
            if "mimetype" in names and "xl/workbook.xml" not in names:
                raise _refuse(path, "this is an OpenDocument file (.ods), not an Excel workbook", _SAVE_AS)
            if "xl/workbook.xml" not in names:
                if "EncryptedPackage" in names:
                    raise _refuse(path, "the workbook is password-protected (encrypted)")
                raise _refuse(path, "this zip file is not an Excel workbook (no xl/workbook.xml)", _SAVE_AS)
            total = 0
            for info in infos:
                total += info.file_size
                if info.file_size > (1 << 20) and info.file_size > max_ratio * max(info.compress_size, 1):
                    ratio = info.file_size / max(1, info.compress_size)
                    raise _refuse(path, f"member {info.filename!r} expands {ratio:.0f} times (more than "
                                  f"{max_ratio:.0f}): refused as a possible zip bomb")
                if info.flag_bits & 0x1:
                    raise _refuse(path, "the workbook's parts are encrypted", "remove the password and save again")
            if total > max_uncompressed:
                raise _refuse(path, f"the workbook expands to {total / 1024**2:.0f} MB (more than "
                              f"{max_uncompressed / 1024**2:.0f} MB): refused as too large or a zip bomb")
            for info in infos:
                if info.filename.endswith((".xml", ".rels", ".vml")) and info.file_size:
                    with archive.open(info) as member:
                        start = member.read(_PROLOG_MAX)
                    if _declares_entities(start):
                        raise _refuse(path, f"member {info.filename!r} declares XML entities (refused: "
                                      "entity expansion can exhaust memory)", _SAVE_AS)
    except zipfile.BadZipFile as exc:
        raise _refuse(path, f"the workbook is damaged (not a readable zip file: {exc})",
                      "open it in the spreadsheet program, repair it and save again") from None
    except (zipfile.LargeZipFile, NotImplementedError, EOFError, OSError, zlib.error) as exc:
        raise _refuse(path, f"the workbook cannot be read ({_one_line(exc)})",
                      "open it in the spreadsheet program, repair it and save again") from None


#: Bytes of an XML part read to find its prolog's end; a DOCTYPE can only stand in the prolog.
_PROLOG_MAX = 1 << 16
# What may stand before the root element: the declaration, processing instructions, comments, blanks.
_PROLOG_ITEM = re.compile(rb"\s+|<\?.*?\?>|<!--.*?-->", re.S)


def _declares_entities(start: bytes) -> bool:
    """Whether an XML part's prolog holds a DOCTYPE (or one cannot tell within :data:`_PROLOG_MAX` bytes).

    >>> _declares_entities(b'<?xml version="1.0"?><!-- note --><worksheet/>')
    False
    >>> _declares_entities(b'<?xml version="1.0"?><!--' + b' ' * 9000 + b'--><!DOCTYPE x [<!ENTITY a "b">]><x/>')
    True
    """
    if start.startswith(b"\xef\xbb\xbf"):
        start = start[3:]
    at = 0
    while True:
        match = _PROLOG_ITEM.match(start, at)
        if not match:
            break
        at = match.end()
    rest = start[at:at + 9]
    if rest.startswith(b"<!"):
        return True  # a DOCTYPE (or an unclosed comment): refused
    # The root element starts here; a prolog running past what was read is refused too.
    return not rest.startswith(b"<") and len(start) >= _PROLOG_MAX


def _one_line(exc: BaseException) -> str:
    return " ".join(str(exc).split())[:200]


def open_workbook(path: str | os.PathLike[str], *, data_only: bool = True,
                  max_uncompressed: int = 256 * 1024**2) -> Any:
    """Open a checked workbook with openpyxl (``data_only``: cached values instead of formulas).

    openpyxl parses through defusedxml (refused otherwise), VBA is dropped, nothing is executed.
    """
    import openpyxl
    from openpyxl.xml import DEFUSEDXML

    if not DEFUSEDXML:
        raise InputError("defusedxml is not installed: refusing to parse workbooks without it",
                         hint="pip install defusedxml")
    path = Path(path)
    check_file(path, max_uncompressed=max_uncompressed)
    try:
        with open(path, "rb") as handle, warnings.catch_warnings():
            # openpyxl warns about features it drops (extensions, slicers ...): not the user's problem.
            warnings.simplefilter("ignore")
            # A file object, so that the extension (.xlsm, or none) does not matter to openpyxl.
            return openpyxl.load_workbook(handle, data_only=data_only, keep_vba=False, keep_links=False,
                                          rich_text=False)
    except InputError:
        raise
    except Exception as exc:  # openpyxl raises many kinds on a damaged part
        chain, cause = [], exc
        while cause is not None and len(chain) < 10:
            chain.append(cause)
            cause = cause.__cause__ or cause.__context__
        if any("Entities" in type(e).__name__ or "DTD" in type(e).__name__ for e in chain):
            raise _refuse(path, "the workbook declares XML entities (refused)", _SAVE_AS) from None
        inner = chain[-1]
        raise _refuse(path, f"the workbook cannot be read: a part holds invalid XML or values "
                      f"({type(inner).__name__}: {_one_line(inner)})",
                      "open it in the spreadsheet program and save it again") from None


def sheet_members(path: str | os.PathLike[str]) -> dict[str, str]:
    """Map each worksheet's name to its zip member (``xl/worksheets/sheet1.xml``), in workbook order."""
    with zipfile.ZipFile(path) as archive:
        try:
            return dict(sheet_parts(archive))
        except KeyError:  # no relationships: no sheet can be found
            return {}


#: The start of a formula element (``<f>``, ``<f t="shared" .../>``, ``<x:f>``) in a worksheet's XML.
_FORMULA_ELEMENT = re.compile(rb"<(?:[A-Za-z_][\w.-]*:)?f[\s/>]")


def holds_formulas(path: str | os.PathLike[str]) -> bool:
    """Whether any worksheet of a checked workbook holds a formula: a byte scan, no XML parsing.

    A reader that finds a cell without a cached value opens the workbook a second time for its
    formulas; when no worksheet holds one, that cell is simply empty and the second opening is saved.
    ``True`` whenever unsure (no relationships, a missing part, a damaged archive).
    """
    try:
        members = sheet_members(path)
        if not members:
            return True
        with zipfile.ZipFile(path) as archive:
            return any(_FORMULA_ELEMENT.search(archive.read(member)) for member in members.values())
    except Exception:  # a damaged or hostile part: the full opening decides and says what is wrong
        return True


_ROW_REF = re.compile(rb'\br="(\d+)"')
# Cell references with two or three column letters (column AA or beyond), in the form spreadsheet
# programs and libraries write (r first); single-letter columns are counted as 26 without scanning.
_WIDE_COL = re.compile(rb'c r="([A-Z]{2,3})\d')


def check_sheet_extent(path: str | os.PathLike[str], member: str, *, sheet: str = "",
                       max_cells: int = MAX_CELLS) -> tuple[int, int]:
    """Scan a sheet's XML for the last row and column it really holds; refuse a grid over ``max_cells``.

    Returns ``(rows, columns)``. The ``<dimension>`` a file states is not trusted either way: the cells
    themselves are looked at, in one streamed pass (about a second for a million rows).
    """
    rows, cols, tail = 0, 1, b""
    with zipfile.ZipFile(path) as archive, archive.open(member) as stream:
        while True:
            block = stream.read(1 << 24)
            if not block:
                break
            chunk = tail + block
            # Rows are stored in ascending order (ECMA-376): the last row tag of a chunk is its highest.
            at = max(chunk.rfind(b"<row "), chunk.rfind(b":row "))
            if at >= 0:
                match = _ROW_REF.search(chunk, at, at + 512)
                if match:
                    rows = max(rows, int(match.group(1)))
            for letters in set(_WIDE_COL.findall(chunk)):
                cols = max(cols, column_number(letters.decode("ascii")))
            tail = chunk[-512:]
    if cols < 26:
        cols = 26  # single-letter columns are not scanned; count them all
    if rows * cols > max_cells:
        raise InputError(f"the sheet spans {rows} rows and {cols} columns, more than sheetpump reads "
                         f"({max_cells} cells)", Where(file=str(path), sheet=sheet or None),
                         "delete unused rows and columns far from the data, or export the data as CSV")
    return rows, cols
