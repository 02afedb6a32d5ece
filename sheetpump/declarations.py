"""One declaration per calculation, and the cell semantics every face shares.

A :class:`Calculation` names a cell function, its arguments (each with a kind of quantity, hence a
default unit), its result kind and the pure physics function that computes it. From that single
declaration sheetpump derives the spreadsheet functions (:mod:`sheetpump.cells`), the function list
(``sheetpump functions`` and the README), the headless recalculation and the catalogue-driven tests.

Calling a calculation the way a cell does (:meth:`Calculation.cell`) never raises: a bad argument gives
a short error text naming the argument, and a result that is not finite is an error text too.

>>> from sheetpump.catalogue import CATALOGUE
>>> power = CATALOGUE["SP_HYDRAULIC_POWER"]
>>> power.cell(200, 60)
20.0
>>> power.cell("3000 psi", "10 gpm", "hp")
17.50...
>>> print(power.cell("200 rpm", 60))
#SP! pressure: 'rpm' is a speed, not a pressure (write e.g. '250 bar')
"""

from __future__ import annotations

import inspect
import math
import sys
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .errors import InputError, PhysicsError, Where
from .units import Kind, all_finite, check_unit, to_si, unit_factor, ureg

__all__ = ["ERROR_PREFIX", "Arg", "Calculation", "Catalogue", "Choice"]

_isfinite = math.isfinite
_QUANTITY = ureg.Quantity
_TEXTS_KEPT = 4096  # texts remembered per argument

#: Every error text a cell function returns starts with this, so a sheet can test for it.
ERROR_PREFIX = "#SP! "


@dataclass(frozen=True)
class Choice:
    """A text argument that takes one of a few words (any case), e.g. a motor standard.

    Used as an :class:`Arg`'s kind; the physics function gets the word as spelled in ``options``.
    """

    name: str
    options: tuple[str, ...]
    default: str = ""  # no unit: faces that show ``kind.default`` show nothing

    @property
    def example(self) -> str:
        return self.options[0]

    def pick(self, value: Any, arg: str) -> str:
        words = " or ".join(repr(o) for o in self.options)
        if value is None or (isinstance(value, str) and not value.strip()):
            raise InputError("missing (empty cell)", Where(field=arg), f"write {words}")
        if isinstance(value, str):
            for option in self.options:
                if value.strip().upper() == option.upper():
                    return option
        raise InputError(f"{value!r} is not a {self.name}", Where(field=arg), f"write {words}")


@dataclass(frozen=True)
class Arg:
    """One argument of a calculation.

    ``default`` is in the kind's *default unit* (as a user would type it); ``None`` means required.
    ``scalar`` marks an argument that takes one value (the physics takes a float, e.g. a displacement
    to fit with): a one-cell range gives its value, a larger range a ``#SP!`` text naming the argument.
    A :class:`Choice` always takes one value.
    """

    name: str
    kind: Kind | Choice
    help: str
    default: float | None = None
    scalar: bool = False

    @property
    def one_value(self) -> bool:
        """True when the argument takes a single value, never a range."""
        return self.scalar or isinstance(self.kind, Choice)

    @property
    def default_si(self) -> float | None:
        if self.default is None:
            return None
        factor, offset = unit_factor(self.kind.default, self.kind)
        return self.default * factor + offset


@dataclass(frozen=True)
class Calculation:
    """A declared calculation: the single source of a cell function.

    Parameters
    ----------
    name : str
        The cell function's name, e.g. ``"SP_HYDRAULIC_POWER"``.
    func : callable
        The pure physics function; takes SI numbers/arrays in ``args`` order and returns SI.
    args : tuple of Arg
        The arguments in order.
    result : Kind
        Kind of the result; the optional last cell argument ``unit`` names its unit.
    help : str
        One line for the function wizard and the function list.
    example : tuple
        A sample call with invented values (a list stands for a range).
    """

    name: str
    func: Callable[..., Any]
    args: tuple[Arg, ...]
    result: Kind
    help: str
    #: A sample call as a user would type it (arguments, then optionally the result unit); a list is a
    #: range. Used by the worked-example workbook and the README.
    example: tuple[Any, ...] = ()
    #: For a formula that is a product of powers of its arguments (most pump relations), the exponent
    #: of each argument: f(a·x, b·y) = aᵉ¹·bᵉ²·f(x, y). Arrays in their default units then go to the
    #: physics as they are and one scalar factor converts the result: no pass per argument.
    scaling: tuple[float, ...] | None = None
    category: str = "sheetpump"
    #: Whether the physics, given Python floats, computes with Python floats only (no numpy scalar),
    #: so that a call with numbers cannot make numpy warn and skips the ``np.errstate`` guard (about
    #: 1 µs). ``None``: true for a :attr:`scaling` calculation (plain products), else false.
    plain_scalars: bool | None = None
    _defaults: tuple[float | None, ...] = field(init=False, repr=False, compare=False)
    _physics_names: list[str] = field(init=False, repr=False, compare=False)
    #: Per argument, the factor from its default unit to SI when a bare number needs nothing else (no
    #: offset, not a choice), else None: a number in a cell then costs one multiply and no lookup.
    _factors: tuple[float | None, ...] = field(init=False, repr=False, compare=False)
    _result_default: tuple[float, float] = field(init=False, repr=False, compare=False)
    #: Per argument, texts already converted ("3000 psi" -> SI); and result units already looked up.
    #: Plain dicts: a sheet full of the same texts costs one lookup each. Bounded by _TEXTS_KEPT.
    _texts: tuple[dict[str, float], ...] = field(init=False, repr=False, compare=False)
    _units: dict[str, tuple[float, float]] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "_texts", tuple({} for _ in self.args))
        object.__setattr__(self, "_units", {})
        object.__setattr__(self, "_defaults", tuple(a.default_si for a in self.args))
        object.__setattr__(self, "_factors", tuple(
            None if isinstance(a.kind, Choice) or a.kind.offset else unit_factor(a.kind.default, a.kind)[0]
            for a in self.args))
        object.__setattr__(self, "_result_default", unit_factor(self.result.default, self.result))
        optional = [a.default is not None for a in self.args]
        if optional != sorted(optional):
            raise ValueError(f"{self.name}: a required argument follows an optional one")
        if self.scaling is not None and len(self.scaling) != len(self.args):
            raise ValueError(f"{self.name}: one scaling exponent per argument")
        physics_names = list(inspect.signature(self.func).parameters)
        if len(physics_names) < len(self.args):
            raise ValueError(f"{self.name}: {self.formula_source} takes fewer arguments than declared")
        object.__setattr__(self, "_physics_names", physics_names)
        if self.plain_scalars is None:
            object.__setattr__(self, "plain_scalars", self.scaling is not None)

    def _cell_argument(self, physics_name: str) -> str:
        # A physics error names the Python parameter; the cell user knows the cell argument.
        names = self._physics_names
        if physics_name in names and names.index(physics_name) < len(self.args):
            return self.args[names.index(physics_name)].name
        return physics_name

    @property
    def formula_source(self) -> str:
        """Where the formula lives: ``module.function`` of the physics layer."""
        return f"{self.func.__module__}.{self.func.__qualname__}"

    @property
    def result_unit(self) -> str:
        return self.result.default

    def signature_text(self) -> str:
        """``NAME(arg [unit], ..., [unit])`` as shown in the function list."""
        parts = []
        for a in self.args:
            unit = f" [{a.kind.default}]" if a.kind.default else ""
            text = f"{a.name}{unit}"
            parts.append(f"[{text}={a.default:g}]" if a.default is not None else text)
        parts.append("[unit]")
        return f"{self.name}({', '.join(parts)})"

    def _argument(self, i: int, value: Any) -> Any:
        a = self.args[i]
        if a.one_value and isinstance(value, (list, tuple, np.ndarray, _QUANTITY)):
            value = _one_cell(value, a.name)
        if isinstance(a.kind, Choice):
            return a.kind.pick(value, a.name)
        return to_si(value, a.kind, a.name, self._defaults[i])

    def _result_conversion(self, unit: Any) -> tuple[float, float]:
        """``(factor, offset)`` from SI to the asked result unit (``None``, blank or NaN: the default)."""
        if unit is None:
            return self._result_default
        if not isinstance(unit, str):
            if isinstance(unit, float) and math.isnan(unit):  # an empty cell through a numpy range
                return self._result_default
            raise InputError(f"{unit!r} is not a unit name", hint=f"write e.g. {self.result.default!r}")
        if not unit.strip():
            return self._result_default
        try:
            return unit_factor(unit, self.result)
        except InputError as exc:
            raise exc.at(field="unit") from None

    def evaluate(self, *values: Any) -> float | np.ndarray:
        """Compute as a cell does, but raise on bad input and give numpy arrays for ranges.

        The arguments are those of :meth:`cell`: the calculation's arguments, then optionally the
        result unit. A number in, a float out; a range in (nested lists, a numpy array, or a pint
        Quantity array of :data:`sheetpump.units.ureg`), a numpy array of the broadcast shape out.
        This is the numerical path of every cell: :meth:`cell` adds only the error texts and the
        conversion of an array to the 2-D list a spreadsheet spills.

        Raises :class:`InputError` (also for a result that is not finite), ``PhysicsError``, or
        ``ValueError`` for ranges whose shapes cannot be combined.

        >>> from sheetpump.catalogue import CATALOGUE
        >>> CATALOGUE["SP_HYDRAULIC_POWER"].evaluate(np.array([100.0, 200.0]), 60, "hp")
        array([13.41..., 26.82...])
        """
        return self._compute(values)

    def _compute(self, values: tuple[Any, ...]) -> float | np.ndarray:
        """Cell values (and an optional result unit) to the result in the asked unit."""
        factors = self._factors
        n = len(factors)
        if len(values) > n:
            unit = values[n]
            known = self._units.get(unit) if type(unit) is str else None
            factor, offset = known or self._result_conversion(unit)  # a bad unit is reported first
            if known is None and type(unit) is str and len(self._units) < _TEXTS_KEPT:
                self._units[unit] = (factor, offset)
            values = values[:n]
        else:
            factor, offset = self._result_default
        converted = []
        append = converted.append
        for value, f in zip(values, factors, strict=False):  # the common case: numbers, default units
            tv = type(value)
            if (tv is float or tv is int) and f is not None and _isfinite(value):
                append(value * f)
            else:
                break
        if len(converted) < len(values):  # texts: those seen before cost one lookup
            texts = self._texts
            for i in range(len(converted), len(values)):
                value = values[i]
                tv = type(value)
                if (tv is float or tv is int) and factors[i] is not None and _isfinite(value):
                    append(value * factors[i])
                elif tv is str and value in texts[i]:
                    append(texts[i][value])
                elif tv is str:
                    si_value = self._argument(i, value)  # raises for a bad text: nothing is kept
                    if type(si_value) is float and len(texts[i]) < _TEXTS_KEPT:
                        texts[i][value] = si_value
                    append(si_value)
                else:
                    break
        if len(converted) < len(values) or not self.plain_scalars:
            # A range, a text with a unit, an empty cell, or physics that computes with numpy: numpy
            # raises instead of printing a warning, and the cell names the problem (a sum of huge
            # durations that overflows would otherwise divide another sum to a wrong 0).
            try:
                with np.errstate(over="raise", invalid="raise", divide="raise"):
                    return self._guarded(values, converted, factor, offset)
            except FloatingPointError as exc:
                raise InputError(f"a value too large or too small to compute with ({exc})",
                                 hint="check for huge or tiny inputs") from None
        for i in range(len(values), n):
            converted.append(self._argument(i, None))  # an argument not given is an empty cell
        result = self.func(*converted)  # Python floats through plain products: nothing can warn
        if type(result) is float:  # inline: the scalar path is a handful of operations
            out = (result - offset) / factor if offset else result / factor
            if _isfinite(out):
                return out
            raise _not_finite()
        return self._result(result, factor, offset, values)

    def _guarded(self, values: tuple[Any, ...], converted: list[Any], factor: float,
                 offset: float) -> float | np.ndarray:
        """The rest of :meth:`_compute` past the numbers in default units (under ``np.errstate``)."""
        n = len(self._factors)
        if len(converted) < len(values):  # a range, a text with a unit, an empty cell, ...
            first = values[len(converted)]
            if (self.scaling is not None and not offset and len(values) == n
                    and (type(first) is np.ndarray or isinstance(first, _QUANTITY))):
                folded = self._folded(values, factor)
                if folded is not None:
                    return folded
            for i in range(len(converted), len(values)):
                converted.append(self._argument(i, values[i]))
        for i in range(len(values), n):
            converted.append(self._argument(i, None))  # an argument not given is an empty cell
        result = self.func(*converted)
        return self._result(result, factor, offset, values)

    @staticmethod
    def _result(result: Any, factor: float, offset: float, values: tuple[Any, ...]) -> float | np.ndarray:
        if not isinstance(result, np.ndarray) or result.ndim == 0:
            return _scalar_result(float(result), factor, offset)
        return _array_result(result, factor, offset, values)

    def _folded(self, values: tuple[Any, ...], factor: float) -> np.ndarray | None:
        """The array path of a :attr:`scaling` calculation, or None where it does not apply.

        It applies when every argument is a float array or a number in its default unit, and no
        efficiency is scaled (its (0, 1] check must see the true value). The physics' checks of sign
        see the raw values, which is the same as seeing SI values: unit factors are positive.
        """
        raw = []
        scale = 1.0
        array = False
        for value, f, e, a in zip(values, self._factors, self.scaling, self.args, strict=True):
            if f is None:
                return None
            if isinstance(value, _QUANTITY):  # an array with its unit: that unit's factor
                magnitude = value.magnitude
                if not isinstance(magnitude, np.ndarray) or magnitude.dtype != np.float64:
                    return None
                f, offset = check_unit(f"{value.units:~}", a.kind, a.name)
                if offset:
                    return None
                value = magnitude
            if isinstance(value, np.ndarray) and value.dtype == np.float64:
                if f != 1.0 and a.kind.si == "":
                    return None
                raw.append(value)
                scale *= f**e
                array = True
            elif (type(value) is float or type(value) is int) and _isfinite(value):
                raw.append(value * f)
            else:
                return None
        if not array:
            return None
        # Optimistic: anything wrong (a NaN, a bad sign, a result that is not finite) goes the full
        # way, which checks each argument in turn and names the element.
        try:
            return _array_result(self.func(*raw), factor / scale, 0.0, values)
        except (PhysicsError, InputError, FloatingPointError):
            return None

    def cell(self, *values: Any) -> Any:
        """Evaluate as a spreadsheet cell does: never raises.

        The arguments are the calculation's arguments followed by an optional result unit. Single
        values give a number. Ranges give the broadcast shape in the form they came in:

        * nested lists (a spreadsheet range, as xlwings passes it): a 2-D list of lists;
        * a numpy array (or a pint Quantity array) among the arguments: a numpy array, any shape;
        * a pandas Series among the arguments: a Series with its index, named after the result's
          kind and unit (``"power [kW]"``), as sheetpump names table columns. Series arguments must
          share one index (they are not aligned).

        Errors come back as text starting with :data:`ERROR_PREFIX` (:meth:`evaluate` raises instead).

        >>> from sheetpump.catalogue import CATALOGUE
        >>> CATALOGUE["SP_HYDRAULIC_POWER"].cell(np.array([100.0, 200.0]), 60)
        array([10., 20.])
        """
        return self.cell_values(values)

    def cell_values(self, values: tuple[Any, ...]) -> Any:
        """:meth:`cell` with the arguments as one tuple (what the generated cell functions call)."""
        try:
            out = self._compute(values)
        except InputError as exc:
            series = _series(values)  # refused as an argument: looked for only here, costing a number nothing
            if series is not None:
                return self._series_values(values, series)
            return ERROR_PREFIX + _cell_text(exc)
        except PhysicsError as exc:
            return f"{ERROR_PREFIX}{self._cell_argument(exc.argument)}: {exc.reason}"
        except (ValueError, TypeError, ArithmeticError) as exc:  # broadcasting and other numpy misuse
            return f"{ERROR_PREFIX}{self.name}: {_plain(exc)}"
        if type(out) is float:
            return out
        if out.size and any(type(v) is np.ndarray or isinstance(v, _QUANTITY) for v in values):
            return out  # arrays in, the array out: no copy, no list of a million floats
        if out.size == 0 or out.ndim > 2:
            return f"{ERROR_PREFIX}{self.name}: a range must be a non-empty row, column or block of cells"
        return (out.reshape(1, -1) if out.ndim == 1 else out).tolist()

    def _series_values(self, values: tuple[Any, ...], series: Any) -> Any:
        """:meth:`cell_values` for arguments among which is a pandas Series: a Series out, same index."""
        index = series.index
        plain = []
        for i, value in enumerate(values):
            if _series(value) is not None:
                if i < len(self.args) and not value.index.equals(index):
                    return (f"{ERROR_PREFIX}{self.args[i].name}: the series' index differs from the first "
                            "series' (align them first, e.g. with .reindex)")
                value = value.to_numpy()
            plain.append(value)
        out = self.cell_values(tuple(plain))
        if not isinstance(out, np.ndarray):
            return out
        unit = values[len(self.args)] if len(values) > len(self.args) else None
        unit = unit.strip() if isinstance(unit, str) and unit.strip() else self.result.default
        name = f"{self.result.name} [{unit}]" if unit else self.result.name
        return type(series)(out, index=index, name=name)

    def __call__(self, *values: Any) -> float | list[list[Any]] | str:
        return self.cell(*values)

    def argument_help(self) -> list[tuple[str, str]]:
        """Each cell argument's name and its help for a function wizard, the result ``unit`` last.

        Every spreadsheet face (xlwings, the LibreOffice extension) shows these same texts.

        >>> from sheetpump.catalogue import CATALOGUE
        >>> for name, text in CATALOGUE["SP_PULSATION_FREQ"].argument_help()[-2:]:
        ...     print(f"{name}: {text}")
        harmonic: Harmonic order (1 = fundamental). A number, a text with a unit, or a range. Optional, default 1.
        unit: Optional unit of the result, e.g. 'Hz'
        """
        texts = []
        for a in self.args:
            unit = f" [{a.kind.default}]" if a.kind.default else ""
            default = f" Optional, default {a.default:g}." if a.default is not None else ""
            texts.append((a.name, f"{a.help}{unit}. A number, a text with a unit, or a range.{default}"))
        example = self.result.example.split(" ", 1)[-1]
        texts.append(("unit", f"Optional unit of the result, e.g. {example!r}" if self.result.default
                      else "Optional unit of the result"))
        return texts


def _one_cell(value: Any, name: str) -> Any:
    """The value of a one-cell range given for a one-value argument; a larger range is refused."""
    if isinstance(value, _QUANTITY):
        magnitude = np.asarray(value.magnitude)
        if magnitude.size == 1:
            return _QUANTITY(magnitude.item(), value.units)
        size = magnitude.size
    else:
        try:
            cells = np.asarray(value, dtype=object)
        except ValueError:  # ragged
            cells = None
        if cells is not None and cells.size == 1:
            return cells.item()
        size = cells.size if cells is not None else None
    what = f"a range of {size} cells" if size else "an empty or ragged range"
    raise InputError(f"takes one value, not {what}", Where(field=name), "point it at a single cell")


def _series(values: Any) -> Any:
    """The first pandas Series among ``values`` (a tuple, or one value), or None; pandas not imported: None."""
    pandas = sys.modules.get("pandas")  # no Series can exist before pandas is imported
    if pandas is None:
        return None
    for value in values if type(values) is tuple else (values,):
        if isinstance(value, pandas.Series):
            return value
    return None


def _cell_text(exc: InputError) -> str:
    text = exc.message
    if exc.where.field:
        text = f"{exc.where.field}: {text}"
    if exc.hint:
        text += f" ({exc.hint})"
    return text


def _plain(exc: Exception) -> str:
    text = str(exc)
    if "broadcast" in text:
        return "ranges of different shapes cannot be combined"
    return text.split("\n")[0][:120]


def _not_finite() -> InputError:
    return InputError("result is not a finite number", hint="check for zero or huge inputs")


def _scalar_result(result: float, factor: float, offset: float) -> float:
    out = (result - offset) / factor if offset else result / factor
    if not _isfinite(out):
        raise _not_finite()
    return out


def _array_result(result: np.ndarray, factor: float, offset: float, values: tuple[Any, ...]) -> np.ndarray:
    """The physics' array result in the asked unit, checked finite.

    A result array that the physics made (not a view, not sharing memory with an argument) is ours, so
    the unit conversion is done in place: one pass and no new array.
    """
    if factor != 1.0 or offset:
        arguments = [getattr(v, "magnitude", v) for v in values]  # a Quantity's values are the caller's too
        own = result.flags.owndata and result.flags.writeable and not any(
            isinstance(v, np.ndarray) and np.may_share_memory(result, v) for v in arguments)
        if not own or result.dtype != np.float64:
            result = np.array(result, dtype=float)
        if offset:
            result -= offset
        result /= factor
    if not all_finite(result):
        raise _not_finite()
    return result


class Catalogue(dict[str, Calculation]):
    """All declared calculations by cell-function name."""

    def declare(self, calc: Calculation) -> Calculation:
        if calc.name in self:
            raise ValueError(f"{calc.name} is declared twice")
        self[calc.name] = calc
        return calc
