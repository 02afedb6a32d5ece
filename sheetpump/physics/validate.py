"""Argument validators of the physics: each raises :class:`~sheetpump.errors.PhysicsError` naming the argument.

Every physics function checks its arguments with these before it computes, so a cell or a message can
say which argument is wrong and why. They run on every call, arrays of a million elements included:
one read pass, no temporary array, and a fast path for plain Python numbers.

>>> positive(28e-6, "displacement")
>>> positive(-1.0, "speed")
Traceback (most recent call last):
    ...
sheetpump.errors.PhysicsError: speed must be greater than zero
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike

from ..errors import PhysicsError

__all__ = ["non_negative", "plain", "positive", "require", "require_efficiency"]


def require(ok: bool | np.ndarray, argument: str, message: str) -> None:
    """Raise :class:`PhysicsError` for ``argument`` with ``message`` unless ``ok`` holds everywhere."""
    # Fast path for Python scalars: a comparison of floats gives a bool.
    if ok is True:
        return
    if ok is False or not np.all(ok):
        raise PhysicsError(argument, message)


def plain(x: ArrayLike) -> float | np.ndarray:
    """A result as callers want it: a plain float for a scalar (numpy gives 0-d arrays or numpy floats),
    the array itself otherwise."""
    return float(x) if np.ndim(x) == 0 else x


def _lowest(x: ArrayLike) -> float:
    # One read pass and no temporary array: the validators run on every call, arrays of 1e6 included.
    return x.min() if isinstance(x, np.ndarray) and x.size else (float(np.min(x)) if np.size(x) else math.inf)


def positive(x: ArrayLike, argument: str) -> None:
    """Raise :class:`PhysicsError` unless every element of ``x`` is > 0."""
    if type(x) is float or type(x) is int:
        if x > 0:
            return
    elif _lowest(x) > 0:
        return
    raise PhysicsError(argument, "must be greater than zero")


def non_negative(x: ArrayLike, argument: str) -> None:
    """Raise :class:`PhysicsError` unless every element of ``x`` is >= 0."""
    if type(x) is float or type(x) is int:
        if x >= 0:
            return
    elif _lowest(x) >= 0:
        return
    raise PhysicsError(argument, "must not be negative")


def require_efficiency(x: ArrayLike, argument: str) -> None:
    """Raise :class:`PhysicsError` unless every element of the efficiency ``x`` lies in (0, 1].

    >>> require_efficiency(92.0, "total_efficiency")
    Traceback (most recent call last):
        ...
    sheetpump.errors.PhysicsError: total_efficiency must lie in (0, 1]; write 92 % as 0.92
    """
    if type(x) is float or type(x) is int:
        if 0 < x <= 1:
            return
    elif not np.size(x) or (_lowest(x) > 0 and np.max(x) <= 1):
        return
    raise PhysicsError(argument, "must lie in (0, 1]; write 92 % as 0.92")
