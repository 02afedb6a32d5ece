"""A seeded corpus of ordinary edits of the demo workbooks, one field at a time.

Every field of the datasheet's "Pump" sheet and of the application's "Machine" sheet meets each class of
edit a user (or a script of theirs) makes:

``deleted``
    Its row deleted as a spreadsheet program deletes it: the rows below move up, the defined names
    below are shifted with them, and the field's own name is broken or removed. LibreOffice writes it
    as ``#REF!`` (seen with ``soffice`` 7 saving to .xlsx); Excel as ``'Pump'!#REF!``; some tools drop
    it. The variant rotates over the three.
``deleted-by-script``
    Its row deleted by a tool that leaves every defined name where it was (openpyxl's
    ``delete_rows``, some editors): each name below now points at the next field's row.
``wrong-kind-unit``
    A unit of another kind in its unit cell (``kg`` for a pressure, ``bar`` for a count, a price or
    a mass, ``delta_degC`` for a temperature).
``absurd-unit``
    A unit that parses but means nothing: ``1/0``, ``m/0``, ``bar^1e9``, ``bar^-0``, ``dB(A)``,
    ``dB/s`` (except a field's own label: ``dB(A)`` is the noise's unit); the variant rotates over them.
``absurd-magnitude``
    ``1e308``, ``1e-300`` or ``-1e308`` as the value; the variant rotates over them.

Unit and magnitude edits apply to the fields that hold numbers (text and choice fields have no unit).
A field empty in the demo gets the value 1 with the edited unit, so the unit is read. The rotation of
variants over the fields is drawn from ``random.Random(seed)``: the same seed, the same corpus. With
``every_variant=True`` each field meets every variant (about three times as many cases).

The demo data (:mod:`sheetpump.demo`) is invented; nothing here is a real product.
"""

from __future__ import annotations

import random
import re
import zipfile
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from xml.sax.saxutils import escape

from sheetpump.units import Kind
from sheetpump.workbooks.templates import (
    APPLICATION_FIELDS,
    CHOICE,
    DATASHEET_FIELDS,
    MACHINE_SHEET,
    PUMP_SHEET,
    TEXT,
    Field,
)

__all__ = ["ABSURD_MAGNITUDES", "ABSURD_UNITS", "DEMO", "Mutation", "mutations", "wrong_unit"]

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "workbooks" / "demo"
#: The demo workbooks mutated: the datasheet with the most fields given, and the application.
BASES = {"datasheet": DEMO / "marrow-tepp-mt-g28.xlsx", "application": DEMO / "baling-press.xlsx"}
SHEETS = {"datasheet": (PUMP_SHEET, DATASHEET_FIELDS), "application": (MACHINE_SHEET, APPLICATION_FIELDS)}

NAME_BREAKS = ("libreoffice", "excel", "removed")
ABSURD_UNITS = ("1/0", "m/0", "bar^1e9", "bar^-0", "dB(A)", "dB/s")
ABSURD_MAGNITUDES = ("1e308", "1e-300", "-1e308")
CLASSES = ("deleted", "deleted-by-script", "wrong-kind-unit", "absurd-unit", "absurd-magnitude")


def wrong_unit(field: Field, variant: int = 0) -> str:
    """A unit of another kind than the field's (``kg`` for most, ``bar`` where mass or a plain number).

    >>> from sheetpump.workbooks.templates import DATASHEET_FIELDS
    >>> [wrong_unit(f) for f in DATASHEET_FIELDS if f.key in ("pressure_peak", "mass", "teeth", "price")]
    ['kg', 'bar', 'bar', 'bar']
    """
    if isinstance(field.kind, Kind):
        if field.kind.name == "mass":
            return "bar"
        if field.kind.offset and variant % 2:  # a temperature difference is no temperature
            return "delta_degC"
        return "kg"
    return "kg" if field.kind == "fraction" else "bar"


def numeric(field: Field) -> bool:
    return field.kind not in (TEXT, CHOICE)


@dataclass(frozen=True)
class Mutation:
    """One edited copy of a demo workbook: ``build(folder)`` writes it and returns its path."""

    role: str  # "datasheet" or "application"
    key: str  # the field edited
    edit: str  # one of CLASSES
    variant: str  # the name break, the unit or the magnitude

    @property
    def id(self) -> str:
        return f"{self.role}-{self.key}-{self.edit}[{self.variant}]"

    @property
    def sheet(self) -> str:
        return SHEETS[self.role][0]

    @property
    def field(self) -> Field:
        return next(f for f in SHEETS[self.role][1] if f.key == self.key)

    @property
    def deletes(self) -> bool:
        return self.edit.startswith("deleted")

    def build(self, folder: Path) -> Path:
        target = folder / f"{self.role}-{self.key}-{self.edit}.xlsx"
        base = BASES[self.role]
        if self.edit == "deleted":
            return delete_row(base, target, self.sheet, self.key, names=self.variant)
        if self.edit == "deleted-by-script":
            return delete_row(base, target, self.sheet, self.key, names="kept")
        row = field_rows(base, self.sheet)[self.key]
        value, unit = None, None
        if self.edit == "absurd-magnitude":
            value = self.variant
        else:
            unit = self.variant
            if not field_values(self.role).get(self.key):
                value = "1"
        return set_cells(base, target, self.sheet, row, value=value, unit=unit)


def mutations(seed: int = 11, *, every_variant: bool = False) -> list[Mutation]:
    """The corpus: every field of both field sheets × every class of edit, variants rotated by ``seed``."""
    rng = random.Random(seed)
    out: list[Mutation] = []
    for role, (_sheet, fields) in SHEETS.items():
        shift = {name: rng.randrange(len(choices)) for name, choices in
                 (("names", NAME_BREAKS), ("units", ABSURD_UNITS), ("magnitudes", ABSURD_MAGNITUDES))}
        for i, field in enumerate(fields):
            def pick(choices: tuple[str, ...], name: str, i: int = i, shift: dict[str, int] = shift
                     ) -> tuple[str, ...]:
                return choices if every_variant else (choices[(i + shift[name]) % len(choices)],)

            out += [Mutation(role, field.key, "deleted", v) for v in pick(NAME_BREAKS, "names")]
            out.append(Mutation(role, field.key, "deleted-by-script", "names kept"))
            if not numeric(field):
                continue
            units = {wrong_unit(field, 0), wrong_unit(field, 1)} if every_variant else {wrong_unit(field, i)}
            out += [Mutation(role, field.key, "wrong-kind-unit", u) for u in sorted(units)]
            absurd = tuple(v for v in ABSURD_UNITS if v != field.label)  # dB(A) is the noise's own label
            out += [Mutation(role, field.key, "absurd-unit", v) for v in pick(absurd, "units")]
            out += [Mutation(role, field.key, "absurd-magnitude", v) for v in pick(ABSURD_MAGNITUDES, "magnitudes")]
    return out


# ------------------------------------------------------------------------------------------- the edits

_ROWS: dict[tuple[Path, str], dict[str, int]] = {}


def field_rows(path: Path, sheet: str) -> dict[str, int]:
    """``field key -> row`` of a field sheet, by the words in column A (cached per file)."""
    if (path, sheet) not in _ROWS:
        import openpyxl

        ws = openpyxl.load_workbook(path, read_only=True)[sheet]
        keys = {f.key for f in SHEETS["datasheet" if sheet == PUMP_SHEET else "application"][1]}
        _ROWS[path, sheet] = {r[0]: i for i, r in enumerate(ws.iter_rows(max_col=1, values_only=True), 1)
                              if r[0] in keys}
    return _ROWS[path, sheet]


def field_values(role: str) -> dict[str, tuple]:
    from sheetpump import demo

    if role == "application":
        return demo.MACHINE
    return next(p.values for p in demo.PUMPS if p.file == BASES["datasheet"].name)


def delete_row(src: Path, dst: Path, sheet: str, key: str, *, names: str) -> Path:
    """Delete a field's row with openpyxl, then treat the defined names as ``names`` says.

    ``kept``: left as they were (a script). Otherwise as a spreadsheet program does: names below the
    row shifted up with their rows, the row's own name broken as LibreOffice (``#REF!``) or Excel
    (``'Pump'!#REF!``) write it, or ``removed``.
    """
    import openpyxl

    row = field_rows(src, sheet)[key]
    wb = openpyxl.load_workbook(src)
    wb[sheet].delete_rows(row)
    if names != "kept":
        for name in list(wb.defined_names):
            entry = wb.defined_names[name]
            match = re.fullmatch(r"'?([^'!]+)'?!\$([A-Z]+)\$(\d+)", entry.attr_text)
            if not match or match.group(1) != sheet:
                continue
            at = int(match.group(3))
            if at > row:
                entry.attr_text = f"'{sheet}'!${match.group(2)}${at - 1}"
            elif at == row:
                if names == "removed":
                    del wb.defined_names[name]
                else:
                    entry.attr_text = "#REF!" if names == "libreoffice" else f"'{sheet}'!#REF!"
    wb.save(dst)
    return dst


def set_cells(src: Path, dst: Path, sheet: str, row: int, *, value: str | None = None,
              unit: str | None = None) -> Path:
    """Copy a workbook with a field's value cell (B: a number) and / or unit cell (C: a text) replaced.

    Edited in the sheet's XML, so the rest of the file stays byte for byte as the demo wrote it.
    """
    member = _sheet_member(src, sheet)
    edits: list[Callable[[str], str]] = []
    if value is not None:
        edits.append(_put(f"B{row}", f"<v>{float(value)!r}</v>"))
    if unit is not None:
        edits.append(_put(f"C{row}", f"<is><t>{escape(unit)}</t></is>", "inlineStr", after=f"B{row}"))
    with zipfile.ZipFile(src) as zin, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            data = zin.read(info)
            if info.filename == member:
                text = data.decode()
                for edit in edits:
                    text = edit(text)
                data = text.encode()
            zout.writestr(info, data)
    return dst


def _put(coord: str, inner: str, t: str = "", *, after: str = "") -> Callable[[str], str]:
    """Replace cell ``coord``'s XML (keeping its style), or add it after cell ``after`` of its row."""
    typ = f' t="{t}"' if t else ""

    def edit(text: str) -> str:
        cell = re.compile(rf'<c r="{coord}"( s="\d+")?(?: t="\w+")?(?:/>|>.*?</c>)', re.S)
        out, n = cell.subn(lambda m: f'<c r="{coord}"{m.group(1) or ""}{typ}>{inner}</c>', text, count=1)
        if n:
            return out
        before = re.compile(rf'<c r="{after}"[^>]*?(?:/>|>.*?</c>)', re.S)
        out, n = before.subn(lambda m: f'{m.group(0)}<c r="{coord}"{typ}>{inner}</c>', text, count=1)
        assert n, f"no cell {coord} nor {after} in the sheet"
        return out
    return edit


def _sheet_member(path: Path, sheet: str) -> str:
    from sheetpump.workbooks.safe import sheet_members

    return sheet_members(path)[sheet]

