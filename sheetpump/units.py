"""Units at the edge: one registry, kinds of quantity, and turning cell values into SI numbers.

Everything inside sheetpump computes with plain SI numbers (or numpy arrays of them). This module is the
only place where text such as ``"3000 psi"`` or ``"1.2 in^3/rev"`` becomes a number, and the only place
that knows the default unit of each kind of quantity (the unit a bare number in a cell is taken in).

Two conventions of the trade that a general unit library does not share:

* Displacement is a volume *per revolution* and speed is *revolutions* per time. pint counts a
  revolution as 2π radians, so ``cm**3 * rpm`` would come out 2π too large. Here a displacement given
  as a bare volume (``"28 cc"``) is taken per revolution, and a speed given as a bare rate (``"1/min"``,
  ``"Hz"``) is taken as revolutions per time; SI inside is m³/rev and rev/s.
* Inlet pressure is absolute. ``bara``/``psia`` say so explicitly; ``barg``/``psig`` are converted by
  adding one standard atmosphere (101.325 kPa).

Units are read as the trade writes them (:func:`spelling`): ``PSI``, ``Bar``, ``KW``, ``GPM``, ``LPM``,
``cc``, ``ccm``, ``cu in/rev``, ``Nm``, ``lb-ft``, ``°C``, ``C`` in a temperature, ``bar(g)`` ... The
words in :data:`FOLDED` are read in any case; every other word keeps its case, so SI prefixes keep their
meaning (``mW`` is not ``MW``), and a spelling that could be either (``Mpa``, ``mw``) is refused naming
both. Each kind of quantity declares the range of magnitudes sheetpump reads (:attr:`Kind.span`,
:func:`check_span`): a value outside it is a slip, not a pump.

Parsed unit strings and whole value strings are cached, so a spreadsheet full of ``"250 bar"`` costs
one parse.

>>> to_si("3000 psi", PRESSURE, "pressure")
20684271.87950509
>>> to_si(250, PRESSURE, "pressure")
25000000.0
>>> from_si(25e6, PRESSURE, "psi")
3625.943...
"""

from __future__ import annotations

import datetime as _dt
import math
import os
import re
import tokenize
from dataclasses import dataclass
from functools import cache, lru_cache
from pathlib import Path
from typing import Any

import numpy as np
import pint
import platformdirs

from .errors import InputError, Where

__all__ = [
    "FOLDED",
    "KINDS",
    "Kind",
    "all_finite",
    "build_registry",
    "check_span",
    "check_unit",
    "decimal_comma",
    "default_factor",
    "from_si",
    "outside_span",
    "physical_unit",
    "pretty_unit",
    "registry_cache_folder",
    "span_text",
    "spelling",
    "split_number",
    "to_si",
    "unit_factor",
    "ureg",
]

#: sheetpump's own units, defined on top of pint's default definitions.
_DEFINITIONS = (
    "rev = revolution",
    "gpm = gallon / minute",
    "lpm = liter / minute",
    "bara = bar",
    "barg = bar",
    "psia = psi",
    "psig = psi",
    "kPaa = kPa",
    "kPag = kPa",
)


def registry_cache_folder() -> Path | None:
    """The per-user folder where pint keeps its parsed definitions for sheetpump, or ``None``.

    Parsing pint's definitions file costs a few tenths of a second on every start; pint can keep the
    parsed result on disk (``UnitRegistry(cache_folder=...)``, keyed by the file's content, pint's and
    Python's versions). The folder is the platform's per-user cache folder (``platformdirs``:
    ``~/.cache/sheetpump/pint-VERSION`` on Linux, honouring ``XDG_CACHE_HOME``), never the installed
    package. It is used only if it can be made, is writable and (on POSIX) belongs to the user and is
    not writable by others, since pint reads it back with ``pickle``; otherwise ``None`` (no cache).
    """
    folder = platformdirs.user_cache_path("sheetpump", appauthor=False) / f"pint-{pint.__version__}"
    try:
        folder.mkdir(mode=0o700, parents=True, exist_ok=True)
        info = folder.stat()
    except OSError:
        return None
    if not os.access(folder, os.W_OK | os.X_OK):
        return None
    if hasattr(os, "getuid") and (info.st_uid != os.getuid() or info.st_mode & 0o022):
        return None
    return folder


def build_registry(cache_folder: Path | None = None) -> pint.UnitRegistry:
    """pint's full default registry plus sheetpump's units (:data:`_DEFINITIONS`).

    ``cache_folder`` (see :func:`registry_cache_folder`) lets pint load its parsed definitions instead
    of parsing them again; the registry is the same either way (tests/test_startup.py compares
    every unit). A cache that cannot be read (e.g. half written by a process that was killed) has its
    files (pint's ``*.pickle`` and ``*.json``, nothing else) removed and the registry is built without it.
    One difference, pint's own: a registry loaded from the cache (pint 0.25) does not restore pint's table
    of dimensionally equivalent units, so ``get_compatible_units`` answers an empty set; sheetpump never
    asks it (it converts through ``parse_units``, ``get_root_units`` and ``Quantity.to``).
    """
    try:
        registry = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=cache_folder)
    except Exception:
        if cache_folder is None:
            raise
        for part in (*Path(cache_folder).glob("*.pickle"), *Path(cache_folder).glob("*.json")):
            try:
                part.unlink(missing_ok=True)
            except OSError:  # another process's file, or read-only: the build below still works
                pass
        registry = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    for definition in _DEFINITIONS:
        registry.define(definition)
    return registry


#: The one unit registry of sheetpump. Quantities exist only at the edges.
ureg = build_registry(registry_cache_folder())

_TWO_PI = 2.0 * math.pi
_ATMOSPHERE = float(ureg.Quantity(1.0, "atm").to("Pa").magnitude)  # pint's standard atmosphere, 101325 Pa
_GAUGE_UNITS = ("barg", "psig", "kPag")
_ABSOLUTE_UNITS = ("bara", "psia", "kPaa")


@dataclass(frozen=True, eq=False)
class Kind:
    """A kind of quantity as a cell sees it.

    ``default`` is the unit a bare number is taken in; ``si`` the unit of the number inside;
    ``angle`` is -1 for "per revolution" kinds, +1 for "revolutions per time", 0 otherwise.
    ``span`` is the range of magnitudes read, in the default unit: a non-zero magnitude below the
    first or above the second is refused as a slip (for a temperature: the lowest and highest value).
    There is one object per kind (the constants below, listed in :data:`KINDS`), compared by identity:
    a kind keys the unit caches on every cell call, and an identity hash costs nothing.
    """

    name: str
    default: str
    si: str
    example: str
    angle: int = 0
    absolute: bool = False
    offset: bool = False
    span: tuple[float, float] | None = None

    def __repr__(self) -> str:
        return f"Kind({self.name!r})"

    def __reduce__(self) -> tuple[Any, tuple[str]]:
        return _kind_named, (self.name,)  # unpickles as the one object of that kind


def _kind_named(name: str) -> Kind:
    return KINDS[name]


# Spans are generous on purpose (far beyond any gear pump and machine), so they only catch slips and
# absurd values: 1e308 cm³/rev, 1e-300 rpm, a duration of a century.
DISPLACEMENT = Kind("displacement", "cm^3/rev", "m^3/rev", "28 cm^3/rev", angle=-1, span=(0.01, 1e5))
SPEED = Kind("speed", "rpm", "rev/s", "1500 rpm", angle=+1, span=(0.01, 1e5))
PRESSURE = Kind("pressure", "bar", "Pa", "250 bar", span=(1e-6, 1e4))
ABS_PRESSURE = Kind("absolute pressure", "bara", "Pa", "0.8 bara", absolute=True, span=(1e-6, 1e4))
FLOW = Kind("flow", "L/min", "m^3/s", "40 L/min", span=(1e-6, 1e5))
POWER = Kind("power", "kW", "W", "15 kW", span=(1e-6, 1e5))
TORQUE = Kind("torque", "N*m", "N*m", "120 N*m", span=(1e-6, 1e6))
TEMPERATURE = Kind("temperature", "degC", "K", "50 degC", offset=True, span=(-100.0, 500.0))
VISCOSITY = Kind("kinematic viscosity", "mm^2/s", "m^2/s", "46 mm^2/s", span=(0.01, 1e6))
DYN_VISCOSITY = Kind("dynamic viscosity", "mPa*s", "Pa*s", "40 mPa*s", span=(0.001, 1e7))
DENSITY = Kind("density", "kg/m^3", "kg/m^3", "870 kg/m^3", span=(10.0, 1e5))
DURATION = Kind("duration", "s", "s", "12 s", span=(1e-6, 366 * 86400.0))  # up to a (leap) year
FREQUENCY = Kind("frequency", "Hz", "Hz", "250 Hz", span=(1e-6, 1e7))
ENERGY = Kind("energy", "kWh", "J", "3.5 kWh", span=(1e-9, 1e12))
MASS = Kind("mass", "kg", "kg", "9.5 kg", span=(1e-4, 1e6))
EFFICIENCY = Kind("efficiency", "", "", "0.92")
NUMBER = Kind("number", "", "", "9")

KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        DISPLACEMENT, SPEED, PRESSURE, ABS_PRESSURE, FLOW, POWER, TORQUE, TEMPERATURE, VISCOSITY,
        DYN_VISCOSITY, DENSITY, DURATION, FREQUENCY, ENERGY, MASS, EFFICIENCY, NUMBER,
    )
}

# Kinds of the suction line (a lift may be negative: the span bounds its size).
LENGTH = Kind("length", "m", "m", "1.5 m", span=(1e-4, 1e4))
DIAMETER = Kind("inner diameter", "mm", "m", "25 mm", span=(0.1, 1e4))
VELOCITY = Kind("velocity", "m/s", "m/s", "0.8 m/s", span=(1e-6, 1e3))
KINDS.update({k.name: k for k in (LENGTH, DIAMETER, VELOCITY)})

_NUMBER_UNIT = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")
_SPELLINGS = (
    ("³", "**3"), ("²", "**2"), ("·", "*"), ("⋅", "*"), ("×", "*"), ("µ", "u"), ("μ", "u"),
    ("°C", "degC"), ("°F", "degF"), ("℃", "degC"), ("℉", "degF"), ("ºC", "degC"), ("ºF", "degF"),
    ("°K", "K"), ("Δ", "delta_"),
)

#: Unit words read in any case (``PSI``, ``Bar``, ``KW``, ``gpm``), lower case -> pint's spelling. These
#: are the trade words whose case carries no meaning; every other word keeps its case, so an SI prefix
#: keeps its meaning (``mW`` milliwatt, ``MW`` megawatt; ``mPa`` millipascal, ``MPa`` megapascal).
FOLDED: dict[str, str] = {w.lower(): w for w in (
    "psi", "psia", "psig", "ksi", "bar", "bara", "barg", "kPa", "kPaa", "kPag", "kW", "kWh", "hp",
    "gpm", "lpm", "cc", "cSt", "rpm", "rev", "degC", "degF", "min", "L", "lbf", "lb", "ft", "in",
)} | {"ccm": "cc"}  # ccm: the German "Kubikzentimeter", a displacement in cm³

#: Spellings that could mean two units when case is ignored: refused unless written exactly.
_AMBIGUOUS: dict[str, tuple[str, ...]] = {
    "mpa": ("MPa", "mPa"), "mw": ("MW", "mW"), "mbar": ("mbar", "Mbar"), "nm": ("N*m", "nm"),
}
_NAMES = {"MPa": "megapascal", "mPa": "millipascal", "MW": "megawatt", "mW": "milliwatt", "mbar": "millibar",
          "Mbar": "megabar", "N*m": "newton-metre", "nm": "nanometre"}
_WORD = re.compile(r"[A-Za-z_]+")
_POWER_DIGIT = re.compile(r"(?<=[A-Za-z])([23])(?![\w.])")  # cm3 -> cm**3, mm2 -> mm**2, m3/h -> m**3/h
_CUBIC = re.compile(r"(?i)\bcu\b\.?\s*(in|ft|cm|mm)\b\.?")  # cu in, cu. in., cu ft
_TORQUE_WORDS = re.compile(r"(?i)\b(?:lbf?\s*[-*. ]?\s*(ft|in)|(ft|in)\s*[-*. ]?\s*lbf?)\b")  # lb-ft, in-lb
_GAUGE_SUFFIX = re.compile(r"(?i)\b(bar|psi|kpa)\s*\(\s*([ag])\s*\)")  # bar(g), psi (a)
_DOT_PRODUCT = re.compile(r"(?<=[A-Za-z])\.(?=[A-Za-z])")  # N.m, mPa.s
_TEMPERATURE_WORDS = {"c": "degC", "deg c": "degC", "celsius": "degC", "f": "degF", "deg f": "degF",
                      "fahrenheit": "degF", "k": "K", "kelvin": "K"}
_MAX_UNIT_TEXT = 60


def _normalise(unit: str) -> str:
    for old, new in _SPELLINGS:
        unit = unit.replace(old, new)
    return unit.strip()


@lru_cache(maxsize=4096)
def spelling(unit: str, kind: Kind | None = None) -> str:
    """The unit as pint spells it, from the unit as the trade writes it (see :data:`FOLDED`).

    Raises :class:`InputError` (without a place) for a spelling that could be two units.

    >>> spelling("PSI"), spelling("KW"), spelling("cu in/rev"), spelling("lb-ft"), spelling("bar(g)")
    ('psi', 'kW', 'in**3/rev', 'lbf*ft', 'barg')
    >>> spelling("C", TEMPERATURE), spelling("Nm", TORQUE), spelling("N.m")
    ('degC', 'N*m', 'N*m')
    """
    text = _normalise(unit)
    if kind is not None and kind.offset and text.lower() in _TEMPERATURE_WORDS:
        return _TEMPERATURE_WORDS[text.lower()]
    text = _CUBIC.sub(lambda m: f"{m.group(1)}**3", text)
    text = _TORQUE_WORDS.sub(lambda m: f"lbf*{(m.group(1) or m.group(2)).lower()}", text)
    text = _GAUGE_SUFFIX.sub(lambda m: m.group(1) + m.group(2).lower(), text)
    text = _DOT_PRODUCT.sub("*", text)
    text = _POWER_DIGIT.sub(r"**\1", text)

    def word(match: re.Match[str]) -> str:
        w = match.group(0)
        if w == "Nm" or (w.lower() == "nm" and kind is TORQUE):
            return "N*m"  # newton-metre: sheetpump has no length, and no torque is written in nanometres
        low = w.lower()
        if low in FOLDED:
            return FOLDED[low]
        choices = _AMBIGUOUS.get(low)
        if choices and w not in choices:
            named = " or ".join(f"{c!r} ({_NAMES[c]})" for c in choices)
            raise InputError(f"{unit!r} could be {named}", hint="write the unit with its exact case")
        return w

    return _WORD.sub(word, text).strip()


def _dims_without_angle(root_units: Any) -> dict[str, float]:
    return {k: v for k, v in dict(root_units._units).items() if k != "radian"}


@cache
def _kind_root(kind: Kind) -> tuple[dict[str, float], float]:
    """Root units (without angle) and the factor from root to the kind's SI unit."""
    factor, root = ureg.get_root_units(ureg.parse_units(_normalise(kind.si)) if kind.si else ureg.dimensionless)
    if kind.angle:
        factor *= _TWO_PI ** (-kind.angle)  # back from per radian to per revolution
    return _dims_without_angle(root), factor


def _describe(root_dims: dict[str, float]) -> str:
    for k in KINDS.values():
        if k.offset or not k.si:
            continue
        if _kind_root(k)[0] == root_dims:
            return f"a {k.name}"
    return "a unit of another kind"


_PARSE_ERRORS = (pint.errors.PintError, AttributeError, TypeError, ValueError, SyntaxError, AssertionError,
                 KeyError, ArithmeticError, RecursionError, tokenize.TokenError)


def _parse(unit: str, text: str, kind: Kind) -> Any:
    """pint's reading of an already spelled unit; every failure of pint becomes one InputError."""
    if len(text) > _MAX_UNIT_TEXT:
        raise InputError(f"unit text of {len(text)} characters", hint=f"write e.g. {kind.example!r}")
    if re.search(r"(?i)\bdB|\bdecibel|\bneper|\bNp\b", text):
        raise InputError(f"{unit!r} is a level in decibels, not a {kind.name}", hint=f"write e.g. {kind.example!r}")
    try:
        parsed = ureg.parse_units(text)
    except _PARSE_ERRORS as exc:  # pint raises many kinds for nonsense like '1/0', 'bar^-0' or 'm/0'
        raise InputError(f"unknown unit {unit!r}", hint=f"write e.g. {kind.example!r}") from exc
    if any(name.startswith("delta_") for name in parsed._units):
        raise InputError(f"{unit!r} is a temperature difference, not a {kind.name}",
                         hint=f"write e.g. {kind.example!r}")
    return parsed


@lru_cache(maxsize=4096)
def unit_factor(unit: str, kind: Kind) -> tuple[float, float]:
    """Return ``(factor, offset)`` with ``si = value * factor + offset`` for ``unit`` as a ``kind``.

    The unit may be spelled as the trade writes it (:func:`spelling`). Raises :class:`InputError`
    (without a place) for an unknown, absurd or ambiguous unit or one of another kind; never anything else.

    >>> unit_factor("L/min", FLOW)
    (1.666...e-05, 0.0)
    >>> unit_factor("cc", DISPLACEMENT)[0]
    1.0000000000000002e-06
    """
    text = spelling(unit, kind)
    if kind in (EFFICIENCY, NUMBER) and text in ("", "1"):
        return 1.0, 0.0
    if not text:
        text = kind.default
    parsed = _parse(unit, text, kind)
    try:
        factor, offset = _factor(unit, text, parsed, kind)
    except InputError:
        raise
    except _PARSE_ERRORS as exc:  # overflow of 'bar^1e9' and the like while converting
        raise InputError(f"unknown unit {unit!r}", hint=f"write e.g. {kind.example!r}") from exc
    if not (math.isfinite(factor) and math.isfinite(offset) and factor > 0.0):
        raise InputError(f"{unit!r} is not a usable unit", hint=f"write e.g. {kind.example!r}")
    return factor, offset


def _factor(unit: str, text: str, parsed: Any, kind: Kind) -> tuple[float, float]:
    if kind.offset:
        try:
            zero = ureg.Quantity(0.0, parsed).to("kelvin").magnitude
            one = ureg.Quantity(1.0, parsed).to("kelvin").magnitude
        except pint.errors.DimensionalityError as exc:
            raise InputError(f"{unit!r} is not a {kind.name}", hint=f"write e.g. {kind.example!r}") from exc
        return float(one - zero), float(zero)
    factor, root = ureg.get_root_units(parsed)
    dims = _dims_without_angle(root)
    want, si_factor = _kind_root(kind)
    if dims != want:
        raise InputError(
            f"{unit!r} is {_describe(dims)}, not a {kind.name}", hint=f"write e.g. {kind.example!r}"
        )
    angle = dict(root._units).get("radian", 0)
    if kind.angle and angle == kind.angle:
        factor *= _TWO_PI ** (-kind.angle)  # per radian -> per revolution
    elif angle != 0:
        raise InputError(f"{unit!r} has an angle where a {kind.name} has none",
                         hint=f"write e.g. {kind.example!r}")
    factor = factor / si_factor
    offset = 0.0
    if kind.absolute and text in _GAUGE_UNITS:
        offset = _ATMOSPHERE
    if kind is PRESSURE and text in _ABSOLUTE_UNITS:
        raise InputError(f"{unit!r} is an absolute pressure where a gauge or differential pressure "
                         "belongs", hint="write the pressure above atmosphere, e.g. '250 bar'")
    return float(factor), offset


def physical_unit(unit: str) -> str | None:
    """What a unit text measures (``"a mass"``) if pint reads it as a unit with a dimension, else None.

    For fields that take no physical unit (a price takes a currency, a count none).

    >>> physical_unit("kg"), physical_unit("EUR"), physical_unit("bar")
    ('a mass', None, 'a pressure')
    """
    try:
        parsed = _parse(unit, spelling(unit), NUMBER)
        root = ureg.get_root_units(parsed)[1]
    except (InputError, *_PARSE_ERRORS):
        return None
    dims = _dims_without_angle(root)
    return _describe(dims) if dims else None


def check_unit(unit: str, kind: Kind, name: str = "unit") -> tuple[float, float]:
    """Like :func:`unit_factor` but the error names the argument ``name``."""
    try:
        return unit_factor(unit, kind)
    except InputError as exc:
        raise exc.at(field=name) from None


#: A comma followed by exactly three digits after one to three digits (1,250 or 3,000) may group thousands.
_THOUSANDS = re.compile(r"^[+-]?[1-9]\d{0,2},\d{3}$")
_COMMA_NUMBER = re.compile(r"^\s*([+-]?\d*,\d+(?:[eE][+-]?\d+)?)(?=\s|[^\d.,]|$)")
_COMMA_HINT = ("a comma before exactly three digits may group thousands: write 3000 for three thousand, "
               "3.5 or 3,5 for three and a half")


def decimal_comma(number: str) -> float:
    """A number written with a decimal comma (``"3,5"``); one that could group thousands is refused.

    The one rule for commas in numbers, in cells, workbooks and semicolon-separated tables: a single
    comma is a decimal comma, except after one to three digits and before exactly three (``1,250``,
    ``3,000``: a thousands separator to some, a decimal comma to others), which is refused as ambiguous,
    as is a number with two commas or with a comma and a point.

    >>> decimal_comma("3,5"), decimal_comma("0,125"), decimal_comma("-12,75")
    (3.5, 0.125, -12.75)
    """
    text = number.strip()
    if text.count(",") != 1 or "." in text or _THOUSANDS.match(text):
        raise InputError(f"{number!r} is ambiguous", hint=_COMMA_HINT)
    try:
        return float(text.replace(",", "."))
    except ValueError:
        raise InputError(f"{number!r} is not a number", hint=_COMMA_HINT) from None


def split_number(text: str) -> tuple[float, str] | None:
    """``(number, unit text)`` of a text such as ``"3000 psi"`` or ``"3,5 bar"``; None if it has no number.

    Raises :class:`InputError` for an ambiguous comma (see :func:`decimal_comma`).

    >>> split_number("3000 psi"), split_number(" 3,5 bar "), split_number("psi")
    ((3000.0, 'psi'), (3.5, 'bar'), None)
    """
    if "," in text:
        head = _COMMA_NUMBER.match(text)
        if head is None:
            raise InputError(f"{text!r} is ambiguous", hint=_COMMA_HINT)
        return decimal_comma(head.group(1)), text[head.end():].strip()
    match = _NUMBER_UNIT.match(text)
    if not match:
        return None
    number, unit = match.groups()
    return float(number), unit


@lru_cache(maxsize=65536)
def _parse_text(text: str, kind: Kind) -> float:
    parts = split_number(text)
    if parts is None:
        raise InputError(f"{text!r} is not a number with a unit", hint=f"write e.g. {kind.example!r}")
    number, unit = parts
    factor, offset = unit_factor(unit, kind)
    value = number * factor + offset
    if not math.isfinite(value):
        raise InputError(f"{text!r} is not a finite number")
    return value


def _scalar_to_si(value: Any, kind: Kind, name: str, default: float | None) -> float:
    tv = type(value)
    if tv is float or tv is int:
        if value != value or value in (math.inf, -math.inf):
            raise InputError(f"{value!r} is not a finite number", Where(field=name))
        if kind.offset:
            return value + 273.15
        return value * default_factor(kind)
    if tv is str and (text := value.strip()):
        try:
            return _parse_text(text, kind)
        except InputError as exc:
            raise exc.at(field=name) from None
    if value is None or tv is str:
        if default is not None:
            return default
        raise InputError("missing (empty cell)", Where(field=name), f"give a {kind.name}, e.g. {kind.example!r}")
    if tv is bool or isinstance(value, (bool, np.bool_)):
        raise InputError(f"{value!r} is a true/false value, not a {kind.name}", Where(field=name))
    if isinstance(value, (_dt.date, _dt.datetime, _dt.time, _dt.timedelta)):
        raise InputError(f"a date or time is not a {kind.name}", Where(field=name),
                         f"write e.g. {kind.example!r}")
    if isinstance(value, (np.floating, np.integer)):
        return _scalar_to_si(float(value), kind, name, default)
    if isinstance(value, pint.Quantity):
        return _quantity_to_si(value, kind, name)
    raise InputError(f"cannot use a {type(value).__name__} as a {kind.name}", Where(field=name))


_DEFAULT_FACTORS: dict[Kind, float] = {}


def default_factor(kind: Kind) -> float:
    """The factor from ``kind.default`` to SI (cached; offset kinds are all in degC here)."""
    f = _DEFAULT_FACTORS.get(kind)
    if f is None:
        f = _DEFAULT_FACTORS[kind] = unit_factor(kind.default, kind)[0]
    return f


@cache
def _si_span(kind: Kind) -> tuple[float, float]:
    assert kind.span is not None
    factor, offset = unit_factor(kind.default, kind)
    return kind.span[0] * factor + offset, kind.span[1] * factor + offset


def span_text(kind: Kind) -> str:
    """The range of a kind as a reader states it: ``"0.01 to 100000 cm^3/rev"``.

    >>> span_text(SPEED), span_text(TEMPERATURE)
    ('0.01 to 100000 rpm', '-100 to 500 degC')
    """
    assert kind.span is not None
    lo, hi = kind.span
    return f"{lo:g} to {hi:g} {kind.default}"


def outside_span(si: float | np.ndarray, kind: Kind) -> int | None:
    """Index of the first value outside the kind's span (flat index; 0 for a scalar), or None.

    Zero is inside for every kind without an offset (a stopped segment, no pressure): whether a zero
    makes sense is the field's own rule. A non-finite value is outside.

    >>> outside_span(np.array([25.0, 0.0, 1e308]), SPEED), outside_span(1e-300, DURATION), outside_span(0.0, FLOW)
    (2, 0, None)
    """
    if kind.span is None:
        return None
    lo, hi = _si_span(kind)
    arr = np.asarray(si, dtype=float).ravel()
    with np.errstate(invalid="ignore"):
        if kind.offset:
            bad = ~((arr >= lo) & (arr <= hi))
        else:
            mag = np.abs(arr)
            bad = ~(((mag >= lo) & (mag <= hi)) | (arr == 0.0))
    if not bad.any():
        return None
    return int(np.flatnonzero(bad)[0])


def check_span(si: float, kind: Kind, shown: str) -> float:
    """``si`` if it lies in the kind's span, else :class:`InputError` naming the span.

    ``shown`` is the value as the user wrote it (``"1e+308 cm^3/rev"``).

    >>> check_span(25.0, SPEED, "1500 rpm")
    25.0
    """
    if outside_span(si, kind) is not None:
        raise InputError(f"{shown} is outside the range sheetpump reads for a {kind.name}, "
                         f"{span_text(kind)}{'' if kind.offset else ' (or 0)'}",
                         hint="check the value and its unit")
    return si


def all_finite(arr: np.ndarray) -> bool:
    """Whether every element of a float array is finite, in one pass without a temporary array.

    A NaN or an infinity anywhere makes the sum non-finite, so a finite sum proves every element
    finite; only a sum that overflows (huge finite values) needs the exact element-wise test.

    >>> all_finite(np.array([1.0, 2.0])), all_finite(np.array([1.0, np.nan])), all_finite(np.array([1e308] * 2))
    (True, False, True)
    """
    with np.errstate(over="ignore", invalid="ignore"):
        total = arr.sum()
    return math.isfinite(total) or bool(np.isfinite(arr).all())


def _array_to_si(arr: np.ndarray, factor: float, offset: float, name: str) -> np.ndarray:
    """A float array times ``factor`` plus ``offset``; the caller's array is never modified.

    With factor 1 and no offset the array itself is returned, not a copy: physics never writes to its
    arguments. One pass for the finiteness check, one for the conversion.
    """
    if not all_finite(arr):
        bad = tuple(int(i) for i in np.argwhere(~np.isfinite(arr))[0])
        raise InputError("not a finite number", Where(field=f"{name}{list(bad)}"))
    if factor != 1.0:
        out = arr * factor
        if offset:
            out += offset  # our own new array
        return out
    return arr + offset if offset else arr


def _quantity_to_si(value: pint.Quantity, kind: Kind, name: str) -> float | np.ndarray:
    """A pint Quantity of this registry (a number or an array with one unit) in SI."""
    factor, offset = check_unit(f"{value.units:~}", kind, name)
    magnitude = value.magnitude
    if isinstance(magnitude, np.ndarray) and magnitude.ndim and magnitude.dtype.kind in "fiu":
        return _array_to_si(magnitude.astype(float, copy=False), factor, offset, name)
    number = float(magnitude)
    if not math.isfinite(number):
        raise InputError(f"{number!r} is not a finite number", Where(field=name))
    return number * factor + offset


def to_si(value: Any, kind: Kind, name: str, default: float | None = None) -> float | np.ndarray:
    """Turn a cell value (or a range of them) into an SI number (or a float array).

    Parameters
    ----------
    value : float, int, str, None, sequence, numpy array or pint Quantity
        A bare number (taken in ``kind.default``), a string with a unit (``"3000 psi"``), an empty
        cell (``None`` or ``""``), a range of such values (nested lists or an array), or a Quantity
        of :data:`ureg` (a number or a whole array with one unit: converted with one factor).
    kind : Kind
        The kind of quantity expected.
    name : str
        The argument's name, used in error messages.
    default : float, optional
        SI value used for an empty cell; without it an empty cell is an error.

    Returns
    -------
    float or numpy.ndarray
        The value in the kind's SI unit; an array (2-D for nested lists) for a range.

    Raises
    ------
    InputError
        Naming the argument (and the element, for a range) and what is wrong.

    >>> to_si("1.2 in^3/rev", DISPLACEMENT, "displacement")
    1.9664...e-05
    >>> to_si([[1500], [3000]], SPEED, "speed")
    array([[25.],
           [50.]])
    >>> to_si(ureg.Quantity(np.array([1000.0, 3000.0]), "psi"), PRESSURE, "pressure")
    array([ 6894757.29316836, 20684271.87950509])
    """
    tv = type(value)
    if tv is float or tv is int or tv is str or value is None:
        return _scalar_to_si(value, kind, name, default)
    if isinstance(value, np.ndarray) and value.dtype.kind in "fiu":
        arr = value.astype(float, copy=False)
        if kind.offset:
            return _array_to_si(arr, 1.0, 273.15, name)
        return _array_to_si(arr, default_factor(kind), 0.0, name)
    if isinstance(value, (list, tuple, np.ndarray)):
        arr = np.asarray(value, dtype=object)
        if arr.ndim == 0:
            return _scalar_to_si(arr.item(), kind, name, default)
        if arr.dtype == object and any(isinstance(x, (list, tuple)) for x in arr.flat):
            raise InputError("a range must be rectangular", Where(field=name))
        out = np.empty(arr.shape, dtype=float)
        for index, item in np.ndenumerate(arr):
            try:
                out[index] = _scalar_to_si(item, kind, name, default)
            except InputError as exc:
                raise InputError(exc.message, Where(field=f"{name}{list(index)}"), exc.hint) from None
        return out
    return _scalar_to_si(value, kind, name, default)


def from_si(value: float | np.ndarray, kind: Kind, unit: str | None = None) -> float | np.ndarray:
    """Convert an SI number (or array) of ``kind`` to ``unit`` (default: the kind's default unit).

    >>> from_si(25.0, SPEED)
    1500.0
    >>> round(from_si(1e-3, FLOW, "gpm"), 4)
    15.8503
    """
    factor, offset = unit_factor(unit or kind.default, kind)
    if offset:
        return (value - offset) / factor
    return value / factor if factor != 1.0 else value


def pretty_unit(unit: str) -> str:
    """A unit string as a report shows it: ``degC`` → ``°C``, ``degF`` → ``°F``, ``^2`` → ``²``,
    ``*`` → ``·`` (the string sheetpump parses stays the plain one).

    >>> pretty_unit("mm^2/s"), pretty_unit("N*m"), pretty_unit("degC"), pretty_unit("bar")
    ('mm²/s', 'N·m', '°C', 'bar')
    """
    return unit.replace("degC", "°C").replace("degF", "°F").replace("^2", "²").replace("*", "·")
