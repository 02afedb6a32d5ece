"""What the reports share: the order of severities, display units, and a finding's value in its unit."""

from __future__ import annotations

import math
from collections.abc import Sequence

from ..checks import FAIL, INFO, NOT_CHECKED, PASS, WARN, Finding
from ..units import Kind, from_si

__all__ = ["SEVERITY_ORDER", "fails", "finite", "in_display_unit", "worst_first"]

#: Severities worst first: the order findings are listed in.
SEVERITY_ORDER = {FAIL: 0, WARN: 1, NOT_CHECKED: 2, INFO: 3, PASS: 4}


def worst_first(findings: Sequence[Finding]) -> list[Finding]:
    """The findings sorted worst severity first (stable: rules keep their order within a severity)."""
    return sorted(findings, key=lambda f: SEVERITY_ORDER.get(f.severity, 9))


def finite(x: float | None) -> float | None:
    """``x`` as a float, or None when it is None or not finite (JSON and cells hold no infinities).

    >>> finite(2), finite(float("inf")), finite(None)
    (2.0, None, None)
    """
    return None if x is None or not math.isfinite(x) else float(x)


def in_display_unit(value: float | str | None, kind: Kind | None, unit: str) -> float | str | None:
    """A finding's SI value in its display unit (text stays text; non-finite becomes None)."""
    if value is None or isinstance(value, str):
        return value
    if not math.isfinite(value):
        return None
    if kind is None or not unit:
        return float(value)
    return float(from_si(value, kind, unit))


def fails(f: Finding, strict: bool) -> bool:
    """Whether the finding fails the pump: a failure, or under ``strict`` anything that counts as a warning."""
    return f.severity == FAIL or (strict and f.effect == WARN)
