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
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .errors import InputError, Where
from .physics.pump import PhysicsError
from .units import Kind, from_si, to_si, unit_factor

__all__ = ["ERROR_PREFIX", "Arg", "Calculation", "Registry"]

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
    """

    name: str
    kind: Kind | Choice
    help: str
    default: float | None = None

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
    category: str = "sheetpump"
    _defaults: tuple[float | None, ...] = field(init=False, repr=False, compare=False)
    _physics_names: list[str] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "_defaults", tuple(a.default_si for a in self.args))
        optional = [a.default is not None for a in self.args]
        if optional != sorted(optional):
            raise ValueError(f"{self.name}: a required argument follows an optional one")
        physics_names = list(inspect.signature(self.func).parameters)
        if len(physics_names) < len(self.args):
            raise ValueError(f"{self.name}: {self.formula_source} takes fewer arguments than declared")
        object.__setattr__(self, "_physics_names", physics_names)

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

    # -- Python-side evaluation -------------------------------------------------------------------
    def si(self, *values: Any) -> float | np.ndarray:
        """Convert cell values to SI and compute; raises :class:`InputError` or ``PhysicsError``."""
        n = len(self.args)
        if len(values) > n:
            raise InputError(f"{self.name} takes at most {n} arguments and a result unit")
        converted = []
        for i, a in enumerate(self.args):
            value = values[i] if i < len(values) else None
            if isinstance(a.kind, Choice):
                converted.append(a.kind.pick(value, a.name))
            else:
                converted.append(to_si(value, a.kind, a.name, self._defaults[i]))
        return self.func(*converted)

    def cell(self, *values: Any) -> float | list[list[Any]] | str:
        """Evaluate as a spreadsheet cell does: never raises.

        The arguments are the calculation's arguments followed by an optional result unit. A range
        (nested lists or an array) gives a 2-D list of the broadcast shape; single cells give a number.
        Errors come back as text starting with :data:`ERROR_PREFIX`.
        """
        n = len(self.args)
        unit = None
        if len(values) > n:
            unit = values[n]
            values = values[:n]
        try:
            if unit is not None and not isinstance(unit, str):
                if isinstance(unit, float) and math.isnan(unit):
                    unit = None
                else:
                    raise InputError(f"{unit!r} is not a unit name", hint=f"write e.g. {self.result.default!r}")
            if unit is not None and not unit.strip():
                unit = None
            if unit is not None:
                try:
                    unit_factor(unit, self.result)
                except InputError as exc:
                    raise exc.at(field="unit") from None
            result = self.si(*values)
            out = from_si(result, self.result, unit)
        except InputError as exc:
            return ERROR_PREFIX + _cell_text(exc)
        except PhysicsError as exc:
            return f"{ERROR_PREFIX}{self._cell_argument(exc.argument)}: {exc.reason}"
        except (ValueError, TypeError, ArithmeticError) as exc:  # broadcasting and other numpy misuse
            return f"{ERROR_PREFIX}{self.name}: {_plain(exc)}"
        return _finish(out)

    def __call__(self, *values: Any) -> float | list[list[Any]] | str:
        return self.cell(*values)


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


def _finish(out: float | np.ndarray) -> float | list[list[Any]] | str:
    if isinstance(out, np.ndarray):
        if out.ndim == 0:
            out = float(out)
        else:
            if not np.isfinite(out).all():
                return ERROR_PREFIX + "result is not a finite number (check for zero or huge inputs)"
            if out.ndim == 1:
                out = out.reshape(1, -1)
            return out.tolist()
    out = float(out)
    if not math.isfinite(out):
        return ERROR_PREFIX + "result is not a finite number (check for zero or huge inputs)"
    return out


class Registry(dict[str, Calculation]):
    """All declared calculations by cell-function name."""

    def declare(self, calc: Calculation) -> Calculation:
        if calc.name in self:
            raise ValueError(f"{calc.name} is declared twice")
        self[calc.name] = calc
        return calc
