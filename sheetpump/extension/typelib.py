"""A UNO type library (``.rdb``) written from the declarations, without LibreOffice's SDK.

A Calc add-in is a UNO component whose functions are the methods of an interface type; LibreOffice
finds the methods (names, parameter names and types) through that type's description, which an
extension ships as a type library. The SDK compiles IDL text to such a file (``unoidl-write``); here
the one interface sheetpump needs is written directly in the same binary format, so a user needs
neither the SDK nor a compiler.

The format (LibreOffice's ``unoidl`` "new" registry format, read by ``unoidl::UnoidlProvider``): the
8 bytes ``UNOIDL\\xFF\\0``, the offset and entry count of the root map (32-bit little-endian), then
entities. A map is a sorted list of (name offset, entity offset) pairs, a name is NUL-terminated ASCII,
a module entity is a kind byte 0 and a nested map. An interface entity is a kind byte 5, its mandatory
and optional bases, attributes, and methods; each method is its name, return type, parameters
(direction byte, name, type) and exceptions. Strings inside entities are a 32-bit length and the bytes.
Type names are UNO's: ``any``, ``double``, ``[]any`` for a sequence.

>>> data = interface_library("org.example.XThing", [("TWICE", ["x"])])
>>> data[:8]
b'UNOIDL\\xff\\x00'
>>> read_interface(data, "org.example.XThing")
[('TWICE', 'any', [('x', 'any')])]

References: LibreOffice ``unoidl/source/unoidl-write.cxx`` (the writer) and
``unoidl/source/unoidlprovider.cxx`` (the reader), and ``unoidl/inc/unoidl/unoidl.hxx`` (entity sorts).
"""

from __future__ import annotations

import struct
from collections.abc import Sequence

__all__ = ["interface_library", "read_interface"]

_MAGIC = b"UNOIDL\xff\x00"
_SORT_MODULE = 0
_SORT_INTERFACE = 5
_DIRECTION_IN = 0
_BASE = "com.sun.star.uno.XInterface"


def _u32(value: int) -> bytes:
    return struct.pack("<I", value)


def _idx(text: str) -> bytes:
    raw = text.encode("ascii")
    return _u32(len(raw)) + raw


def _interface_entity(methods: Sequence[tuple[str, Sequence[str]]], result: str, argument: str) -> bytes:
    out = bytearray([_SORT_INTERFACE])
    out += _u32(1) + _idx(_BASE)  # mandatory bases: every interface derives from XInterface
    out += _u32(0)  # optional bases
    out += _u32(0)  # attributes
    out += _u32(len(methods))
    for name, params in methods:
        out += _idx(name) + _idx(result) + _u32(len(params))
        for param in params:
            out += bytes([_DIRECTION_IN]) + _idx(param) + _idx(argument)
        out += _u32(0)  # exceptions
    return bytes(out)


def interface_library(name: str, methods: Sequence[tuple[str, Sequence[str]]],
                      result: str = "any", argument: str = "any") -> bytes:
    """The bytes of a type library holding one interface ``name`` (dotted, e.g. ``org.x.XThing``).

    Parameters
    ----------
    name : str
        Full interface name; the parts before the last dot are its modules.
    methods : sequence of (str, sequence of str)
        Each method's name and its parameter names, in order; all parameters are ``in``.
    result, argument : str
        UNO type of every method's result and of every parameter (Calc passes a number, a text, an
        empty argument or a whole range through ``any``).
    """
    *modules, leaf = name.split(".")
    out = bytearray(_MAGIC + _u32(0) + _u32(0) + b"\0** sheetpump type library **\0")

    def nul_name(text: str) -> int:
        offset = len(out)
        out.extend(text.encode("ascii") + b"\0")
        return offset

    def write_map(entries: list[tuple[str, int]], root: bool) -> int:
        # entries: (name, entity offset); maps are binary-searched by name, so they must be sorted.
        names = [(nul_name(n), data) for n, data in sorted(entries)]
        offset = len(out)
        if not root:
            out.extend(bytes([_SORT_MODULE]) + _u32(len(names)))
        for name_offset, data_offset in names:
            out.extend(_u32(name_offset) + _u32(data_offset))
        return offset

    entity = len(out)
    out.extend(_interface_entity(methods, result, argument))
    child = (leaf, entity)
    for module in reversed(modules):  # innermost module first: each is a map holding the next
        child = (module, write_map([child], False))
    offset = write_map([child], True)
    out[8:16] = _u32(offset) + _u32(1)
    return bytes(out)


def read_interface(data: bytes, name: str) -> list[tuple[str, str, list[tuple[str, str]]]]:
    """Read back one interface's methods ``(name, result type, [(parameter, type), ...])``.

    A small reader of the same format, for the tests and for checking a built extension; it follows
    only what :func:`interface_library` writes.
    """
    if data[:8] != _MAGIC:
        raise ValueError("not a UNO type library (new format)")

    def u32(at: int) -> int:
        return struct.unpack_from("<I", data, at)[0]

    def cstr(at: int) -> str:
        return data[at:data.index(b"\0", at)].decode("ascii")

    def idx(at: int) -> tuple[str, int]:
        size = u32(at)
        return data[at + 4:at + 4 + size].decode("ascii"), at + 4 + size

    def find(map_at: int, count: int, key: str) -> int:
        for i in range(count):
            if cstr(u32(map_at + 8 * i)) == key:
                return u32(map_at + 8 * i + 4)
        raise KeyError(key)

    map_at, count = u32(8), u32(12)
    *modules, leaf = name.split(".")
    for module in modules:
        at = find(map_at, count, module)
        if data[at] != _SORT_MODULE:
            raise ValueError(f"{module} is not a module")
        map_at, count = at + 5, u32(at + 1)
    at = find(map_at, count, leaf)
    if data[at] & 0x3F != _SORT_INTERFACE:
        raise ValueError(f"{name} is not an interface")
    at += 1
    for _ in range(2):  # mandatory and optional bases
        n, at = u32(at), at + 4
        for _ in range(n):
            _, at = idx(at)
    if u32(at):
        raise ValueError("attributes are not read here")
    n, at = u32(at + 4), at + 8
    methods = []
    for _ in range(n):
        method, at = idx(at)
        result, at = idx(at)
        params = []
        k, at = u32(at), at + 4
        for _ in range(k):
            pname, at = idx(at + 1)
            ptype, at = idx(at)
            params.append((pname, ptype))
        e, at = u32(at), at + 4
        for _ in range(e):
            _, at = idx(at)
        methods.append((method, result, params))
    return methods
