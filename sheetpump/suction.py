"""The machine's suction line as plain data, read from the Machine sheet, and its inlet pressure.

A :class:`SuctionLine` holds the line in SI: inner diameter, length, lift (pump inlet above the oil
level, negative when flooded), reservoir pressure, the fittings' loss coefficients (from their trade
names, :func:`sheetpump.physics.suction.fitting`, or a stated sum of K) and the strainer's stated
point. :func:`line_from_fields` builds it from the Machine sheet's values, refusing a line that cannot
be computed with the cell to fix. :func:`inlet` gives the inlet pressure and its terms at any flows and
viscosities in one array pass (:func:`sheetpump.physics.suction.suction_terms`).

>>> line = SuctionLine(diameter=0.032, length=1.2, lift=-0.4, k_inf=0.57)
>>> t = inlet(line, 41e-3 / 60, 46e-6, 870.0)
>>> round(t.inlet / 1e5, 3), dominant(t)
(1.03, 'friction')
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from .errors import InputError, PhysicsError, Where
from .physics import suction as physics

__all__ = ["LINE_FIELDS", "TERM_WORDS", "SuctionLine", "dominant", "inlet", "line_from_fields", "value_at"]

#: Machine-sheet keys of the suction line (their defined names are ``machine.<key>``).
LINE_FIELDS = ("suction_lift", "reservoir_pressure", "suction_length", "suction_diameter", "suction_fittings",
               "strainer_dp", "strainer_flow", "strainer_viscosity", "strainer_law")

#: Each term of the inlet pressure in words, and the field a user changes to move it.
TERM_WORDS: dict[str, tuple[str, str]] = {
    "lift": ("the lift above the oil level", "suction_lift"),
    "friction": ("line friction", "suction_diameter"),
    "fittings": ("the fittings", "suction_fittings"),
    "strainer": ("the strainer", "strainer_dp"),
    "velocity_head": ("the velocity head", "suction_diameter"),
}


@dataclass(frozen=True)
class SuctionLine:
    """A suction line from the reservoir to the pump's inlet port (SI)."""

    diameter: float  # inner [m]
    length: float  # [m]
    lift: float = 0.0  # inlet above the oil level [m]; negative when flooded
    reservoir_pressure: float = physics.STANDARD_ATMOSPHERE  # absolute [Pa]
    k_re: float = 0.0  # sum of the fittings' laminar coefficients K1 [-]
    k_inf: float = 0.0  # sum of the fittings' high-Re coefficients [-]
    fittings: str = ""  # the fittings as written
    strainer: tuple[float, float, float] | None = None  # stated drop [Pa], flow [m^3/s], viscosity [m^2/s]
    strainer_law: str = "laminar"


def inlet(line: SuctionLine, flow: np.ndarray | float, viscosity: np.ndarray | float,
          density: float) -> physics.SuctionTerms:
    """Inlet pressure and its terms at flows [m³/s] and kinematic viscosities [m²/s] (arrays broadcast)."""
    return physics.suction_terms(flow, viscosity, density, line.diameter, line.length, line.lift,
                                 line.reservoir_pressure, line.k_re, line.k_inf, line.strainer,
                                 line.strainer_law)


def value_at(x: object, i: int | None = None) -> float:
    """Element ``i`` of an array term, or the term itself when it is one number."""
    return float(np.asarray(x).reshape(-1)[i]) if i is not None and np.ndim(x) else float(np.asarray(x))


def dominant(terms: physics.SuctionTerms, i: int | None = None) -> str:
    """The term that lowers the inlet pressure most (at element ``i`` of array terms)."""
    return max(physics.SuctionTerms.TERMS, key=lambda name: value_at(getattr(terms, name), i))


_COUNT = re.compile(r"^\s*(\d+)\s*(?:x|×|\*)\s*(.+)$", re.IGNORECASE)


def _fittings(text: str, diameter: float, where: Where) -> tuple[float, float]:
    """Sum of (K1, K∞) of a list of fittings by trade name ("entrance, 2 x elbow 90, ball valve") or a K."""
    try:
        return 0.0, _k_sum(float(text), where)
    except ValueError:
        pass
    k_re = k_inf = 0.0
    for item in re.split(r"[,;+\n]", text):
        if not item.strip():
            continue
        match = _COUNT.match(item)
        count, name = (int(match.group(1)), match.group(2)) if match else (1, item)
        try:
            f = physics.fitting(name.strip(), diameter)
        except PhysicsError:
            raise InputError(f"{name.strip()!r} is not a fitting sheetpump knows; known: "
                             f"{', '.join(physics.FITTINGS)}", where,
                             "write trade names separated by commas, e.g. 'entrance, 2 x elbow 90', "
                             "or the sum of the loss coefficients K as a number") from None
        k_re += count * f.k_re
        k_inf += count * f.k_inf
    return k_re, k_inf


def _k_sum(k: float, where: Where) -> float:
    if not (math.isfinite(k) and k >= 0):
        raise InputError(f"a sum of loss coefficients must be a number >= 0, not {k:g}", where)
    return k


def line_from_fields(got: Mapping[str, object], where: Callable[[str], Where]) -> SuctionLine | None:
    """The suction line from the Machine sheet's values (SI, as read); ``None`` when none is given.

    A line needs its inner diameter, length and lift; a strainer drop needs the flow and viscosity it is
    stated at. Lengths and diameters must be above zero (the reader refuses those already).

    Raises
    ------
    InputError
        Naming the cell to fill or fix.
    """
    given = [k for k in LINE_FIELDS if got.get(k) is not None]
    if not given:
        return None
    for key, what in (("suction_diameter", "inner diameter"), ("suction_length", "length"),
                      ("suction_lift", "lift (height of the pump's inlet above the oil level; negative "
                       "when flooded)")):
        if got.get(key) is None:
            raise InputError(f"a suction line needs its {what}", where(key),
                             f"fill it, or empty {', '.join(given)} to use the stated inlet pressure")
    diameter, length = float(got["suction_diameter"]), float(got["suction_length"])  # type: ignore[arg-type]
    for key, value in (("suction_diameter", diameter), ("suction_length", length)):
        if not value > 0:
            raise InputError(f"must be greater than zero, not {value:g} m", where(key))
    k_re = k_inf = 0.0
    text = got.get("suction_fittings")
    if text is not None:
        k_re, k_inf = _fittings(str(text), diameter, where("suction_fittings"))
    strainer = None
    if got.get("strainer_dp") is not None:
        for key, what in (("strainer_flow", "flow"), ("strainer_viscosity", "viscosity")):
            if got.get(key) is None:
                raise InputError(f"a strainer drop needs the {what} it is stated at", where(key),
                                 "copy it from the strainer's data; the drop is scaled with flow and viscosity")
        strainer = (float(got["strainer_dp"]), float(got["strainer_flow"]),  # type: ignore[arg-type]
                    float(got["strainer_viscosity"]))  # type: ignore[arg-type]
    else:
        for key in ("strainer_flow", "strainer_viscosity", "strainer_law"):
            if got.get(key) is not None:
                raise InputError(f"{key} is given without a strainer drop", where("strainer_dp"),
                                 "give the strainer's pressure drop at that flow and viscosity")
    reservoir = got.get("reservoir_pressure")
    return SuctionLine(diameter, length, float(got["suction_lift"]),  # type: ignore[arg-type]
                       float(reservoir) if reservoir is not None else physics.STANDARD_ATMOSPHERE,  # type: ignore[arg-type]
                       k_re, k_inf, str(text or ""), strainer, str(got.get("strainer_law") or "laminar"))
