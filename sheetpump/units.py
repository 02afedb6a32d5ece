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
import re
import tokenize
from dataclasses import dataclass
from functools import cache, lru_cache
from typing import Any

import numpy as np
import pint

from .errors import InputError, Where

__all__ = [
    "KINDS",
    "Kind",
    "all_finite",
    "check_unit",
    "default_factor",
    "from_si",
    "to_si",
    "unit_factor",
    "ureg",
]

#: The one unit registry of sheetpump. Quantities exist only at the edges.
ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
for _definition in (
    "rev = revolution",
    "gpm = gallon / minute",
    "lpm = liter / minute",
    "bara = bar",
    "barg = bar",
    "psia = psi",
    "psig = psi",
    "kPaa = kPa",
    "kPag = kPa",
):
    ureg.define(_definition)

_TWO_PI = 2.0 * math.pi
_ATMOSPHERE = 101325.0  # Pa, standard atmosphere (ISO 2533)
_GAUGE_UNITS = ("barg", "psig", "kPag")
_ABSOLUTE_UNITS = ("bara", "psia", "kPaa")


@dataclass(frozen=True, eq=False)
class Kind:
    """A kind of quantity as a cell sees it.

    ``default`` is the unit a bare number is taken in; ``si`` the unit of the number inside;
    ``angle`` is -1 for "per revolution" kinds, +1 for "revolutions per time", 0 otherwise.
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

    def __repr__(self) -> str:
        return f"Kind({self.name!r})"

    def __reduce__(self) -> tuple[Any, tuple[str]]:
        return _kind_named, (self.name,)  # unpickles as the one object of that kind


def _kind_named(name: str) -> Kind:
    return KINDS[name]


DISPLACEMENT = Kind("displacement", "cm^3/rev", "m^3/rev", "28 cm^3/rev", angle=-1)
SPEED = Kind("speed", "rpm", "rev/s", "1500 rpm", angle=+1)
PRESSURE = Kind("pressure", "bar", "Pa", "250 bar")
ABS_PRESSURE = Kind("absolute pressure", "bara", "Pa", "0.8 bara", absolute=True)
FLOW = Kind("flow", "L/min", "m^3/s", "40 L/min")
POWER = Kind("power", "kW", "W", "15 kW")
TORQUE = Kind("torque", "N*m", "N*m", "120 N*m")
TEMPERATURE = Kind("temperature", "degC", "K", "50 degC", offset=True)
VISCOSITY = Kind("kinematic viscosity", "mm^2/s", "m^2/s", "46 mm^2/s")
DYN_VISCOSITY = Kind("dynamic viscosity", "mPa*s", "Pa*s", "40 mPa*s")
DENSITY = Kind("density", "kg/m^3", "kg/m^3", "870 kg/m^3")
DURATION = Kind("duration", "s", "s", "12 s")
FREQUENCY = Kind("frequency", "Hz", "Hz", "250 Hz")
ENERGY = Kind("energy", "kWh", "J", "3.5 kWh")
MASS = Kind("mass", "kg", "kg", "9.5 kg")
EFFICIENCY = Kind("efficiency", "", "", "0.92")
NUMBER = Kind("number", "", "", "9")

KINDS: dict[str, Kind] = {
    k.name: k
    for k in (
        DISPLACEMENT, SPEED, PRESSURE, ABS_PRESSURE, FLOW, POWER, TORQUE, TEMPERATURE, VISCOSITY,
        DYN_VISCOSITY, DENSITY, DURATION, FREQUENCY, ENERGY, MASS, EFFICIENCY, NUMBER,
    )
}

# Kinds of the suction line (added apart from the table above so it stays as it was).
LENGTH = Kind("length", "m", "m", "1.5 m")
DIAMETER = Kind("inner diameter", "mm", "m", "25 mm")
VELOCITY = Kind("velocity", "m/s", "m/s", "0.8 m/s")
KINDS.update({k.name: k for k in (LENGTH, DIAMETER, VELOCITY)})

_NUMBER_UNIT = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")
_SPELLINGS = (
    ("³", "**3"), ("²", "**2"), ("·", "*"), ("⋅", "*"), ("×", "*"), ("µ", "u"), ("μ", "u"),
    ("°C", "degC"), ("°F", "degF"), ("℃", "degC"), ("℉", "degF"), ("in3", "in**3"), ("cm3", "cm**3"),
    ("mm2", "mm**2"),
)


def _normalise(unit: str) -> str:
    for old, new in _SPELLINGS:
        unit = unit.replace(old, new)
    return unit.strip()


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


@lru_cache(maxsize=4096)
def unit_factor(unit: str, kind: Kind) -> tuple[float, float]:
    """Return ``(factor, offset)`` with ``si = value * factor + offset`` for ``unit`` as a ``kind``.

    Raises :class:`InputError` (without a place) for an unknown unit or one of another dimension.

    >>> unit_factor("L/min", FLOW)
    (1.666...e-05, 0.0)
    >>> unit_factor("cc", DISPLACEMENT)[0]
    1.0000000000000002e-06
    """
    text = _normalise(unit)
    if kind in (EFFICIENCY, NUMBER) and text in ("", "1"):
        return 1.0, 0.0
    if not text:
        text = kind.default
    try:
        parsed = ureg.parse_units(text)
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError, AttributeError,
            TypeError, ValueError, SyntaxError, AssertionError, tokenize.TokenError) as exc:
        raise InputError(f"unknown unit {unit!r}", hint=f"write e.g. {kind.example!r}") from exc
    if kind.offset:
        try:
            zero = ureg.Quantity(0.0, parsed).to("kelvin").magnitude
            one = ureg.Quantity(1.0, parsed).to("kelvin").magnitude
        except pint.errors.DimensionalityError as exc:
            raise InputError(f"{unit!r} is not a {kind.name}", hint=f"write e.g. {kind.example!r}") from exc
        return one - zero, zero
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


def check_unit(unit: str, kind: Kind, name: str = "unit") -> tuple[float, float]:
    """Like :func:`unit_factor` but the error names the argument ``name``."""
    try:
        return unit_factor(unit, kind)
    except InputError as exc:
        raise exc.at(field=name) from None


_COMMA_HINT = ("write numbers without thousands separators and with a point for decimals, "
               "e.g. '3000 psi' or '3.5 bar'")


@lru_cache(maxsize=65536)
def _parse_text(text: str, kind: Kind) -> float:
    if "," in text:
        raise InputError(f"{text!r} is ambiguous", hint=_COMMA_HINT)
    match = _NUMBER_UNIT.match(text)
    if not match:
        raise InputError(f"{text!r} is not a number with a unit", hint=f"write e.g. {kind.example!r}")
    number, unit = match.groups()
    factor, offset = unit_factor(unit, kind)
    value = float(number) * factor + offset
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
