"""A corpus of broken and hostile inputs, every one generated here from the demo's valid workbooks.

Each :class:`Case` writes its file(s) into a folder and says what role the file plays (a datasheet, an
application, a measured table, or just "a file" given to every command), which file the error must
name, and which words the one error line must hold (sheet!cell, field). Nothing binary is committed:
the bombs are built from a few kilobytes of deflate data repeated, so the corpus is written in seconds
and takes little disk.

The demo data (:mod:`sheetpump.demo`) is invented; so are the "suppliers" written here.
"""

from __future__ import annotations

import random
import re
import struct
import zipfile
import zlib
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from sheetpump import demo
from sheetpump.workbooks.templates import DUTY_COLUMNS, write_template

__all__ = ["CASES", "INJECTIONS", "Case", "good_application", "good_datasheet", "injection_datasheet"]

SHEET_NS = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
PUMP = demo.PUMPS[0]  # the invented pump that passes the invented press's duty

#: Formula-injection texts a hostile datasheet may hold where a name belongs (CSV/DDE injection forms).
INJECTIONS = {
    "supplier": '=HYPERLINK("http://invented.example/x","Click for the price list")',
    "model": "+cmd|' /C calc'!A0",
    "source_note": "@SUM(1+1)*cmd|' /C calc'!A0",
}


# --------------------------------------------------------------------------------------------- inputs


def good_datasheet(path: Path, **changes: Any) -> Path:
    """The demo's passing datasheet, with fields changed (``key=(value, unit)``; ``key=None`` empties it)."""
    values = dict(PUMP.values)
    for key, value in changes.items():
        if value is None:
            values.pop(key, None)
        else:
            values[key] = value if isinstance(value, tuple) else (value,)
    headers, rows = demo._table(PUMP)
    return write_template("datasheet", path, values, rows, headers)


def good_application(path: Path, duty: list[list[Any]] | None = None, **changes: Any) -> Path:
    """The demo's application, with Machine fields changed and optionally another duty table."""
    values = dict(demo.MACHINE)
    for key, value in changes.items():
        if value is None:
            values.pop(key, None)
        else:
            values[key] = value if isinstance(value, tuple) else (value,)
    return write_template("application", path, values, demo.DUTY if duty is None else duty,
                          [c.header for c in DUTY_COLUMNS])


def injection_datasheet(path: Path) -> Path:
    """A valid datasheet whose name fields hold formula-injection texts (as plain text cells)."""
    return good_datasheet(path, **{k: (v,) for k, v in INJECTIONS.items()})


def _rewrite(src: Path, dst: Path, edits: dict[str, Callable[[bytes], bytes] | bytes | None]) -> Path:
    """Copy a zip member by member; ``edits`` replaces (bytes), transforms (callable) or drops (None)."""
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename in edits:
                edit = edits[info.filename]
                if edit is None:
                    continue
                data = edit(data) if callable(edit) else edit
            zout.writestr(info.filename, data)
        for name, edit in edits.items():
            if name not in zin.namelist() and isinstance(edit, bytes):
                zout.writestr(name, edit)
    return dst


def _sub(pattern: str, repl: str, count: int = 1) -> Callable[[bytes], bytes]:
    def edit(data: bytes) -> bytes:
        out, n = re.subn(pattern.encode(), repl.encode(), data, count=count)
        assert n, f"pattern {pattern!r} not found"
        return out
    return edit


def _cell(coord: str, inner: str, t: str = "") -> Callable[[bytes], bytes]:
    """Replace the XML of one cell (``<c r="B11" ...>...</c>``) by ours, keeping its style."""
    typ = f' t="{t}"' if t else ""
    return _sub(rf'<c r="{coord}"( s="\d+")?( t="\w+")?(/>|>.*?</c>)', rf'<c r="{coord}"\1{typ}>{inner}</c>')


def _field_cell(path: Path, key: str, sheet: str = "Pump") -> str:
    """The value cell (``B11``) of a field row in a template workbook."""
    import openpyxl

    ws = openpyxl.load_workbook(path)[sheet]
    for row in ws.iter_rows(min_col=1, max_col=1):
        if row[0].value == key:
            return f"B{row[0].row}"
    raise KeyError(key)


# -------------------------------------------------------------------------------------- raw zip files


def _zip_bytes(members: list[tuple[str, bytes, int, int]]) -> bytes:
    """A zip file from already deflated members: ``(name, raw deflate data, crc32, uncompressed size)``."""
    out = bytearray()
    central = bytearray()
    for name, data, crc, size in members:
        raw = name.encode()
        offset = len(out)
        out += struct.pack("<IHHHHHIIIHH", 0x04034B50, 20, 0, 8, 0, 0x21, crc, len(data), size, len(raw), 0)
        out += raw + data
        central += struct.pack("<IHHHHHHIIIHHHHHII", 0x02014B50, 20, 20, 0, 8, 0, 0x21, crc, len(data), size,
                               len(raw), 0, 0, 0, 0, 0, offset) + raw
    start = len(out)
    out += central
    out += struct.pack("<IHHHHIIH", 0x06054B50, 0, 0, len(members), len(members), len(central), start, 0)
    return bytes(out)


def _deflate(data: bytes) -> tuple[bytes, int, int]:
    c = zlib.compressobj(9, zlib.DEFLATED, -15)
    return c.compress(data) + c.flush(), zlib.crc32(data), len(data)


def _bomb_member(prefix: bytes, suffix: bytes, gib: int = 2) -> tuple[bytes, int, int]:
    """Deflate data inflating to ``prefix`` + ``gib`` GiB of spaces + ``suffix``, built from one block.

    After a full flush deflate starts afresh, so one compressed 4 MiB block of spaces can be repeated;
    the CRC is computed honestly (about a second), so the member is valid to a reader that inflates it.
    """
    chunk = b" " * (4 << 20)
    c = zlib.compressobj(9, zlib.DEFLATED, -15)
    head = c.compress(prefix) + c.flush(zlib.Z_FULL_FLUSH)
    block = c.compress(chunk) + c.flush(zlib.Z_FULL_FLUSH)
    n = (gib << 30) // len(chunk)
    tail = c.compress(suffix) + c.flush()
    crc = zlib.crc32(prefix)
    for _ in range(n):
        crc = zlib.crc32(chunk, crc)
    crc = zlib.crc32(suffix, crc)
    size = len(prefix) + n * len(chunk) + len(suffix)
    assert size < 1 << 32  # no zip64 needed
    return head + block * n + tail, crc, size


def _members(path: Path) -> list[tuple[str, bytes]]:
    with zipfile.ZipFile(path) as z:
        return [(i.filename, z.read(i)) for i in z.infolist()]


def zip_bomb(good: Path, dst: Path) -> Path:
    """A valid workbook whose first sheet inflates to 2 GiB (whitespace inside its sheetData)."""
    members = []
    for name, data in _members(good):
        if name == "xl/worksheets/sheet1.xml":
            at = data.index(b"<sheetData>") + len(b"<sheetData>")
            members.append((name, *_bomb_member(data[:at], data[at:])))
        else:
            members.append((name, *_deflate(data)))
    dst.write_bytes(_zip_bytes(members))
    return dst


def declared_bomb(good: Path, dst: Path) -> Path:
    """A workbook whose first sheet *declares* 3.9 GB uncompressed (a hand-crafted header)."""
    members = []
    for name, data in _members(good):
        deflated, crc, size = _deflate(data)
        members.append((name, deflated, crc, 0xE8000000 if name == "xl/worksheets/sheet1.xml" else size))
    dst.write_bytes(_zip_bytes(members))
    return dst


# ------------------------------------------------------------------------------------------ the cases


LAUGHS = ('<!DOCTYPE worksheet [<!ENTITY lol "lol">'
          + "".join(f'<!ENTITY lol{i} "{("&lol" + (str(i - 1) if i > 1 else "") + ";") * 10}">' for i in range(1, 10))
          + "]>")


@dataclass(frozen=True)
class Case:
    """One broken or hostile input.

    ``role``: ``file`` (given to every command in every place), ``datasheet``, ``application`` or
    ``table``. ``build(folder, good)`` writes the input and returns the path passed to the command;
    ``good`` holds the valid demo inputs (``app``, ``datasheet``). ``names`` is the file the error line
    must name (default: the built file); ``expect`` are further words it must hold. ``bomb`` cases are
    also run in a subprocess under a memory limit. ``recalc``: ``sheetpump recalc`` applies too.
    """

    name: str
    role: str
    build: Callable[[Path, dict[str, Path]], Path]
    expect: tuple[str, ...] = ()
    names: str | None = None
    bomb: bool = False
    recalc: bool = False
    #: Not an error: the commands must cope (exit 0 or 1), within the same time and memory bounds.
    valid: bool = False


def _bytes(name: str, data: bytes) -> Callable[[Path, dict[str, Path]], Path]:
    def build(folder: Path, good: dict[str, Path]) -> Path:
        path = folder / name
        path.write_bytes(data)
        return path
    return build


def _ole(*streams: str) -> bytes:
    # The eight-byte OLE2 compound-file signature, a header's worth of zeros, and directory entry names
    # in UTF-16 as they sit in a real file's directory sector.
    head = bytes.fromhex("d0cf11e0a1b11ae1") + bytes(16) + b"\x3e\x00\x03\x00\xfe\xff\x09\x00"
    body = bytearray(head.ljust(512, b"\xff"))
    for s in ("Root Entry", *streams):
        entry = s.encode("utf-16-le").ljust(64, b"\x00") + struct.pack("<H", 2 * (len(s) + 1))
        body += entry.ljust(128, b"\x00")
    return bytes(body)


def _from_good(kind: str, name: str, edits: Callable[[Path], dict[str, Any]] | dict[str, Any]
               ) -> Callable[[Path, dict[str, Path]], Path]:
    def build(folder: Path, good: dict[str, Path]) -> Path:
        src = good["datasheet" if kind == "datasheet" else "app"]
        e = edits(src) if callable(edits) else edits
        return _rewrite(src, folder / name, e)
    return build


def _datasheet(name: str, **changes: Any) -> Callable[[Path, dict[str, Path]], Path]:
    return lambda folder, good: good_datasheet(folder / name, **changes)


def _application(name: str, duty: list[list[Any]] | None = None, **changes: Any
                 ) -> Callable[[Path, dict[str, Path]], Path]:
    return lambda folder, good: good_application(folder / name, duty, **changes)


def _with_openpyxl(kind: str, name: str, change: Callable[[Any], None]) -> Callable[[Path, dict[str, Path]], Path]:
    def build(folder: Path, good: dict[str, Path]) -> Path:
        import openpyxl

        wb = openpyxl.load_workbook(good["datasheet" if kind == "datasheet" else "app"])
        change(wb)
        wb.save(folder / name)
        return folder / name
    return build


def _series(name: str, text: str, **changes: Any) -> Callable[[Path, dict[str, Path]], Path]:
    """An application whose duty is a measured CSV series next to it."""
    def build(folder: Path, good: dict[str, Path]) -> Path:
        (folder / name).write_text(text)
        return good_application(folder / f"app-{Path(name).stem}.xlsx", [], duty_series=(name,), **changes)
    return build


def _series_xlsx(name: str, dimension: str) -> Callable[[Path, dict[str, Path]], Path]:
    """An application whose duty is a measured xlsx series whose sheet claims ``dimension``."""
    def build(folder: Path, good: dict[str, Path]) -> Path:
        import xlsxwriter

        log = folder / name
        book = xlsxwriter.Workbook(str(log))
        ws = book.add_worksheet("log")
        for r, row in enumerate([["time [s]", "pressure [bar]", "flow [L/min]"], [0, 100, 30], [1, 150, 30],
                                 [2, 120, 30]]):
            ws.write_row(r, 0, row)
        book.close()
        _rewrite(log, log.with_suffix(".tmp"), {"xl/worksheets/sheet1.xml": _sub(
            r'<dimension ref="[^"]*"/>', f'<dimension ref="{dimension}"/>')})
        log.with_suffix(".tmp").replace(log)
        return good_application(folder / f"app-{log.stem}.xlsx", [], duty_series=(name,))
    return build


def _table(name: str, text: str) -> Callable[[Path, dict[str, Path]], Path]:
    return _bytes(name, text.encode())


_BENCH = "speed [rpm],pressure [bar],flow [L/min],torque [N*m],viscosity [cSt]\n"
_LOG = "time [s],pressure [bar],flow [L/min]\n"


def _xlsm(folder: Path, good: dict[str, Path]) -> Path:
    """The good datasheet saved as a macro-enabled workbook with a VBA project that would start a program."""
    vba = (b"\xcc\x61" + b"Attribute VB_Name = \"ThisWorkbook\"\r\nSub Workbook_Open()\r\n"
           b"  Shell \"calc.exe\"\r\nEnd Sub\r\n") * 4
    return _rewrite(good["datasheet"], folder / "macro-pump.xlsm", {
        "[Content_Types].xml": _sub(
            r"application/vnd\.openxmlformats-officedocument\.spreadsheetml\.sheet\.main\+xml",
            "application/vnd.ms-excel.sheet.macroEnabled.main+xml"),
        "xl/_rels/workbook.xml.rels": _sub(
            "</Relationships>", '<Relationship Id="rId99" Type="http://schemas.microsoft.com/office/2006/'
            'relationships/vbaProject" Target="vbaProject.bin"/></Relationships>'),
        "xl/vbaProject.bin": vba,
    })


def _random(folder: Path, good: dict[str, Path]) -> Path:
    data = random.Random(4409).randbytes(8192)
    path = folder / "random.xlsx"
    path.write_bytes(b"\x00" + data)  # a NUL first: never mistaken for text or a zip
    return path


def _truncated(folder: Path, good: dict[str, Path]) -> Path:
    data = good["datasheet"].read_bytes()
    path = folder / "truncated.xlsx"
    path.write_bytes(data[: len(data) // 2])
    return path


def _corrupt_member(folder: Path, good: dict[str, Path]) -> Path:
    """Bytes flipped inside the first sheet's compressed data (the zip directory is intact)."""
    data = bytearray(good["datasheet"].read_bytes())
    with zipfile.ZipFile(good["datasheet"]) as z:
        info = z.getinfo("xl/worksheets/sheet1.xml")
    start = info.header_offset + 30 + len(info.filename) + len(info.extra)
    for i in range(start + 200, start + 260):
        data[i] ^= 0x5A
    path = folder / "corrupt-member.xlsx"
    path.write_bytes(bytes(data))
    return path


def _bomb(folder: Path, good: dict[str, Path]) -> Path:
    return zip_bomb(good["datasheet"], folder / "zip-bomb.xlsx")


def _declared(folder: Path, good: dict[str, Path]) -> Path:
    return declared_bomb(good["datasheet"], folder / "declared-bomb.xlsx")


def _laughs(where: str) -> Callable[[bytes], bytes]:
    """Put the billion laughs into a part: a DTD after the XML declaration, ``&lol9;`` in a cell."""
    def edit(data: bytes) -> bytes:
        text = data.decode()
        decl = text.index("?>") + 2
        text = text[:decl] + where + LAUGHS + text[decl:]
        if "<sheetData>" in text:
            text = re.sub(r'<c r="B7"( s="\d+")? t="s"><v>\d+</v></c>',
                          r'<c r="B7"\1 t="inlineStr"><is><t>&lol9;</t></is></c>', text, count=1)
        elif "<sst" in text:
            text = text.replace("<t>", "<t>&lol9;", 1)
        return text.encode()
    return edit


def _remove_pump_sheet(wb: Any) -> None:
    del wb["Pump"]


def _merge_over_value(wb: Any) -> None:
    ws = wb["Pump"]
    for row in ws.iter_rows(min_col=1, max_col=1):
        if row[0].value == "displacement":
            ws.merge_cells(f"A{row[0].row}:B{row[0].row}")
            return


def _duplicate_field(wb: Any) -> None:
    ws = wb["Pump"]
    for row in ws.iter_rows(min_col=1, max_col=1):
        if row[0].value == "speed_rated":
            row[0].value = "speed_max"  # a second row saying speed_max
            return


def _formula_without_value(path: Path) -> dict[str, Any]:
    coord = _field_cell(path, "displacement")
    return {"xl/worksheets/sheet1.xml": _cell(coord, "<f>NOSUCHFUNCTION(28)</f>")}


def _number_xml(text: str) -> Callable[[Path], dict[str, Any]]:
    def edits(path: Path) -> dict[str, Any]:
        return {"xl/worksheets/sheet1.xml": _cell(_field_cell(path, "displacement"), f"<v>{text}</v>")}
    return edits


def _dimension(ref: str) -> dict[str, Any]:
    return {"xl/worksheets/sheet1.xml": _sub(r'<dimension ref="[^"]*"/>', f'<dimension ref="{ref}"/>'),
            "xl/worksheets/sheet2.xml": _sub(r'<dimension ref="[^"]*"/>', f'<dimension ref="{ref}"/>')}


def _far_cell(path: Path) -> dict[str, Any]:
    """A real cell at the sheet's last row and column (the dense grid of calamine: 17 G cells)."""
    far = '<row r="1048576"><c r="XFD1048576" t="inlineStr"><is><t>x</t></is></c></row></sheetData>'
    return {"xl/worksheets/sheet2.xml": _sub("</sheetData>", far)}


# the demo's duty, in the template's column order: name, duration, pressure, flow, speed, temp, inlet
_DUTY_NAN = [["press", 10, 200, 30, None, 50, None], ["return", 5, "inf", 30, None, 50, None]]
_DUTY_NEG = [["press", 10, 200, 30, None, 50, None], ["return", -5, 60, 30, None, 50, None]]

CASES: tuple[Case, ...] = (
    # --- not a workbook at all
    Case("empty file", "file", _bytes("empty.xlsx", b""), ("empty",)),
    Case("random bytes named .xlsx", "file", _random, ("not an Excel workbook",)),
    Case("CSV named .xlsx", "file", _bytes("log-as.xlsx", (_LOG + "0,100,30\n1,150,30\n").encode()),
         ("text (CSV) file", "rename it to .csv")),
    Case("old binary .xls", "file", _bytes("old.xls", _ole("Workbook", "\x05SummaryInformation")),
         (".xls", "save it as an Excel workbook")),
    Case("old binary .xls named .xlsx", "file", _bytes("old-renamed.xlsx", _ole("Workbook")), (".xls",)),
    Case("password-protected workbook", "file",
         _bytes("locked.xlsx", _ole("EncryptionInfo", "EncryptedPackage", "\x06DataSpaces")),
         ("password-protected", "remove the password")),
    Case("empty zip", "file", _bytes("empty-zip.xlsx", b"PK\x05\x06" + bytes(18)), ("not an Excel workbook",)),
    Case("OpenDocument spreadsheet", "file",
         _bytes("sheet.xlsx", _zip_bytes([("mimetype", *_deflate(b"application/vnd.oasis.opendocument."
                                                                 b"spreadsheet"))])), ("OpenDocument",)),
    Case("truncated zip", "file", _truncated, ("damaged", "repair")),
    Case("corrupt zip member", "file", _corrupt_member, ("cannot be read", "repair")),
    Case("zip bomb (2 GiB of whitespace in a sheet)", "file", _bomb, ("zip bomb",), bomb=True),
    Case("zip bomb by declared size", "file", _declared, ("zip bomb",), bomb=True),
    Case("billion laughs in a sheet", "file",
         _from_good("datasheet", "laughs.xlsx", {"xl/worksheets/sheet1.xml": _laughs("")}),
         ("entities",), bomb=True),
    Case("billion laughs behind a long comment", "file",
         _from_good("datasheet", "laughs-late.xlsx",
                    {"xl/worksheets/sheet1.xml": _laughs("<!--" + " " * 8000 + "-->")}),
         ("entities",), bomb=True),
    Case("billion laughs in the shared strings", "file",
         _from_good("datasheet", "laughs-sst.xlsx", {"xl/sharedStrings.xml": _laughs("")}), ("entities",),
         bomb=True),
    # --- a workbook, but not the one expected
    Case("missing sheet", "datasheet", _with_openpyxl("datasheet", "no-pump-sheet.xlsx", _remove_pump_sheet),
         ("no sheet 'Pump'", "sheetpump template")),
    Case("missing required field", "datasheet", _datasheet("no-displacement.xlsx", displacement=None),
         ("Pump!B11", "(displacement)", "required")),
    Case("duplicated field", "datasheet",
         _with_openpyxl("datasheet", "twice.xlsx", _duplicate_field), ("Pump!A", "speed_max", "twice")),
    Case("text where a number belongs", "datasheet",
         _datasheet("text-number.xlsx", displacement=("twenty-eight", "cm^3/rev")),
         ("Pump!B11", "(displacement)", "text")),
    Case("unit of the wrong dimension", "datasheet", _datasheet("bar-displacement.xlsx", displacement=(28, "bar")),
         ("Pump!C11", "(displacement)", "pressure")),
    Case("unknown unit", "datasheet", _datasheet("blorp.xlsx", pressure_peak=(280, "blorps")),
         ("Pump!C", "(pressure_peak)", "blorps")),
    Case("negative displacement", "datasheet", _datasheet("negative.xlsx", displacement=(-28, "cm^3/rev")),
         ("Pump!B11", "(displacement)", "-28 cm^3/rev", "greater than zero")),
    Case("zero maximum speed", "datasheet", _datasheet("zero-speed.xlsx", speed_max=(0, "rpm")),
         ("Pump!B", "(speed_max)", "greater than zero")),
    Case("NaN stored as a number", "datasheet", _from_good("datasheet", "nan.xlsx", _number_xml("NaN")),
         ("cannot be read", "invalid XML or values", "save it again")),
    Case("infinite value stored as a number", "datasheet",
         _from_good("datasheet", "inf.xlsx", _number_xml("1e999")), ("Pump!B11", "(displacement)", "finite")),
    Case("'inf' typed as text", "datasheet", _datasheet("inf-text.xlsx", pressure_peak=("inf", "bar")),
         ("Pump!B", "(pressure_peak)")),
    Case("intermittent rating without its limits", "datasheet",
         _datasheet("no-limits.xlsx", intermittent_max_duration=None, intermittent_max_share=None),
         ("Pump!B", "(intermittent_max_duration)", "longest single stretch")),
    Case("peak below continuous", "datasheet",
         _datasheet("peak-low.xlsx", pressure_peak=(200, "bar"), pressure_intermittent=None,
                    intermittent_max_duration=None, intermittent_max_share=None),
         ("Pump!B", "(pressure_peak)", "peak pressure is below")),
    Case("minimum speed above maximum", "datasheet",
         _datasheet("speeds.xlsx", speed_min=(3500, "rpm"), speed_rated=None),
         ("Pump!B", "(speed_max)", "minimum speed")),
    Case("share above 100 %", "datasheet", _datasheet("share.xlsx", intermittent_max_share=(150, "%")),
         ("Pump!B", "(intermittent_max_share)", "100 %")),
    Case("formula without a stored value, unknown function", "datasheet",
         _from_good("datasheet", "formula.xlsx", _formula_without_value), ("Pump!B11", "NOSUCHFUNCTION"),
         recalc=True),
    Case("merged cell over a value", "datasheet", _with_openpyxl("datasheet", "merged.xlsx", _merge_over_value),
         ("Pump!B11", "(displacement)", "merged", "unmerge")),
    Case("dimension claims a million rows", "datasheet",
         _from_good("datasheet", "dimension.xlsx", _dimension("A1:XFD1048576")), bomb=True, valid=True),
    Case("dimension claims a million rows (measured table)", "table",
         _from_good("datasheet", "dimension-table.xlsx", _dimension("A1:XFD1048576")), bomb=True, valid=True),
    Case("a cell at the last row and column (measured table)", "table",
         _from_good("datasheet", "far-cell.xlsx", _far_cell), ("Performance", "delete unused rows"), bomb=True),
    # --- applications
    Case("empty duty", "application", _application("empty-duty.xlsx", []), ("Duty!A6", "empty")),
    Case("duty duration negative", "application", _application("neg-duty.xlsx", _DUTY_NEG),
         ("Duty!B7", "(duration)", "greater than zero")),
    Case("duty pressure infinite", "application", _application("inf-duty.xlsx", _DUTY_NAN),
         ("Duty!C7", "(pressure)")),
    Case("relief setting in the wrong unit", "application",
         _application("relief-flow.xlsx", relief_setting=(250, "L/min")), ("Machine!C", "(relief_setting)", "flow")),
    Case("series with repeated timestamps", "application",
         _series("repeat.csv", _LOG + "0,100,30\n1,150,30\n1,160,30\n2,120,30\n"),
         ("A4", "(time)", "repeats", "sort"), names="repeat.csv"),
    Case("series with unsorted timestamps", "application",
         _series("unsorted.csv", _LOG + "0,100,30\n2,150,30\n1,160,30\n3,120,30\n"),
         ("A4", "(time)", "backwards"), names="unsorted.csv"),
    Case("series with a gap", "application",
         _series("gap.csv", _LOG + "".join(f"{t},100,30\n" for t in (0, 1, 2, 3, 4, 500, 501))),
         ("A7", "(time)", "gap", "split"), names="gap.csv"),
    Case("series with text in a number column", "application",
         _series("text.csv", _LOG + "0,100,30\n1,lots,30\n2,120,30\n"), ("B3", "(pressure)"), names="text.csv"),
    Case("series whose dimension claims the whole sheet", "application",
         _series_xlsx("log-dim.xlsx", "A1:XFD1048576"), bomb=True, valid=True),
    Case("series file missing", "application",
         lambda folder, good: good_application(folder / "app-missing.xlsx", [], duty_series=("nowhere.csv",)),
         ("Machine!B", "(duty_series)", "not found")),
    # --- measured tables
    Case("table: text where a number belongs", "table",
         _table("bench-text.csv", _BENCH + "1500,10,40,20,32\n1500,high,39,60,32\n"), ("B3", "(pressure)", "text")),
    Case("table: unit of the wrong dimension", "table",
         _table("bench-unit.csv", _BENCH.replace("flow [L/min]", "flow [bar]") + "1500,10,40,20,32\n"),
         ("C1", "(flow)", "pressure")),
    Case("table: unknown unit", "table",
         _table("bench-unknown.csv", _BENCH.replace("[N*m]", "[wobble]") + "1500,10,40,20,32\n"), ("D1", "wobble")),
    Case("table: duplicated column", "table",
         _table("bench-dup.csv", _BENCH.strip() + ",flow [gpm]\n1500,10,40,20,32,10\n"), ("F1", "twice")),
    Case("table: missing column", "table",
         _table("bench-noflow.csv", "speed [rpm],pressure [bar],torque [N*m]\n1500,10,20\n"), ("flow",)),
    Case("table: infinite value", "table",
         _table("bench-inf.csv", _BENCH + "1500,10,40,20,32\n1500,inf,39,60,32\n"), ("B3", "(pressure)", "finite")),
    Case("table: no points", "table", _table("bench-empty.csv", _BENCH), ("no points",)),
)

#: Cases that are not errors (the reader copes): the macro workbook and the injection texts are tested
#: separately; these run as ordinary inputs under the memory limit.
MACRO = _xlsm
