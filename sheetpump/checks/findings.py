"""What a check gives: severities, one :class:`Finding` per rule, the drive figures, and the verdict.

A rule not checked that matters for the duty (its subject is one of :data:`DUTY_SUBJECTS`) counts as a
warning: a ``pass`` means every rating was proven.

>>> ok = Finding(rule="speed.max", severity=PASS, message="worst 1500 rpm")
>>> unknown = Finding(rule="inlet.min", severity=NOT_CHECKED, message="not checked: no minimum stated")
>>> ok.effect, unknown.effect, worst_effect([ok, unknown], strict=False), worst_effect([ok], strict=False)
('pass', 'warn', 'warn', 'pass')
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field

import numpy as np

from ..datasheet import Datasheet
from ..duty import Application
from ..errors import Where
from ..physics import drive
from ..physics.suction import SuctionTerms
from ..units import Kind
from .registry import RULES

__all__ = [
    "DUTY_SUBJECTS", "FAIL", "INFO", "NOT_CHECKED", "PASS", "WARN", "CheckResult", "CheckSettings",
    "DriveFigures", "Finding", "worst_effect",
]

FAIL, WARN, INFO, PASS = "fail", "warn", "info", "pass"
NOT_CHECKED = "not checked"
_ORDER = {PASS: 0, INFO: 1, NOT_CHECKED: 1, WARN: 2, FAIL: 3}

#: Subjects (the rule id before the dot) whose rules matter for the duty: one of them not checked makes
#: the verdict at best ``warn`` (``fail`` under ``strict``).
DUTY_SUBJECTS = ("pressure", "speed", "flow", "inlet", "viscosity", "temperature", "torque")


@dataclass(frozen=True)
class CheckSettings:
    """How to check and report.

    ``units`` picks the display units (``"metric"`` or ``"imperial"``); ``strict`` makes warnings (and
    rules not checked that matter for the duty) fail; ``listed`` caps the number of offending segments a
    finding names. The motor settings of the comparison: ``overload_factor`` k (peak ≤ k × rating,
    default 1.6), ``service_factor`` (RMS ≤ SF × rating, default 1: size to the nameplate) and
    ``thermal_window`` [s] (the motor's thermal time over which a long series' RMS is taken, default
    10 min); see :mod:`sheetpump.physics.drive`.
    ``suction_velocity`` is the range of suction line velocities [m/s] the ``inlet.velocity`` rule
    accepts (common practice 0.5–1.2 m/s).
    """

    units: str = "metric"
    strict: bool = False
    listed: int = 5
    overload_factor: float = drive.IEC_OVERLOAD_FACTOR
    service_factor: float = 1.0
    thermal_window: float = drive.THERMAL_WINDOW
    suction_velocity: tuple[float, float] = (0.5, 1.2)  # common practice for suction lines [m/s]


@dataclass(frozen=True)
class Finding:
    """The outcome of one rule for one pump.

    ``measured`` and ``limit`` are SI numbers of ``kind`` (or text, for a cleanliness code or a
    rotation); ``unit`` is the unit a report shows them in. ``margin`` is a fraction of the limit (for
    a temperature, of the pump's temperature range where both ends are stated), positive inside.
    ``segment`` names the worst segment (or time range or stretch), ``count`` how many segments or
    samples are outside and ``share`` their share of the cycle time. ``where`` is the datasheet cell
    the rule rests on, ``app_where`` the application cell (duty row or setting).
    """

    rule: str
    severity: str
    message: str
    measured: float | str | None = None
    limit: float | str | None = None
    margin: float | None = None
    kind: Kind | None = None
    unit: str = ""
    segment: str = ""
    count: int = 0
    share: float | None = None
    segments: tuple[str, ...] = ()
    where: Where = field(default_factory=Where)
    app_where: Where | None = None

    @property
    def title(self) -> str:
        """The rule's plain description."""
        return RULES.get(self.rule, self.rule)

    @property
    def matters(self) -> bool:
        """Whether the rule judges the duty (its subject is one of :data:`DUTY_SUBJECTS`)."""
        return self.rule.split(".")[0] in DUTY_SUBJECTS

    @property
    def effect(self) -> str:
        """The severity this finding gives the verdict: a rule not checked that matters counts as a warning."""
        if self.severity == NOT_CHECKED:
            return WARN if self.matters else INFO
        return self.severity


def worst_effect(findings: Iterable[Finding], strict: bool) -> str:
    """The verdict of some findings: ``fail``, ``warn`` or ``pass`` (``strict`` turns ``warn`` into ``fail``).

    A rule not checked that matters for the duty counts as a warning (:attr:`Finding.effect`); ``info``
    counts as a pass.
    """
    worst = max((_ORDER[f.effect] for f in findings), default=0)
    if worst == _ORDER[FAIL] or (worst == _ORDER[WARN] and strict):
        return FAIL
    return WARN if worst == _ORDER[WARN] else PASS


@dataclass(frozen=True)
class DriveFigures:
    """Drive figures of one pump over the duty: per-segment arrays and whole-cycle numbers (SI)."""

    duration: np.ndarray  # [s]
    viscosity: np.ndarray  # kinematic, at the segment's oil temperature [m^2/s]
    volumetric_efficiency: np.ndarray  # [-]
    total_efficiency: np.ndarray  # [-]
    flow: np.ndarray  # delivered [m^3/s]
    torque: np.ndarray  # shaft [N*m]
    input_power: np.ndarray  # shaft power [W]
    hydraulic_power: np.ndarray  # [W]
    power_loss: np.ndarray  # the pump's own power loss [W]
    peak_torque: float  # [N*m]
    peak_power: float  # [W]
    rms_power: float  # [W]
    mean_power: float  # [W]
    mean_power_loss: float  # the pump's own loss, time mean [W]
    energy_per_cycle: float  # shaft energy [J]
    basis: str = ""  # performance basis: "table", "stated" or "none"
    surplus_heat: np.ndarray | None = None  # surplus flow x the pressure it crosses, per segment [W]
    mean_surplus_heat: float = 0.0  # its time mean [W]
    surplus_path: str = ""  # which pressure the surplus crosses, in words

    @property
    def mean_heat(self) -> float:
        """Heat into the oil, time mean [W]: the pump's own loss plus the surplus flow at the pressure it crosses."""
        return self.mean_power_loss + self.mean_surplus_heat


#: A motor sizing: the motor, the text of its loads, the RMS power it was sized on [W] and over what.
MotorSizing = tuple[drive.MotorChoice, str, float, str]


@dataclass(frozen=True)
class CheckResult:
    """All findings for one pump, its drive figures and the overall verdict."""

    datasheet: Datasheet
    application: Application
    findings: list[Finding]
    drive: DriveFigures
    settings: CheckSettings = field(default_factory=CheckSettings)
    suction: SuctionTerms | None = None  # the inlet pressure computed from the suction line, per segment
    # the motor sizing (size_motor) made once for the check and the comparison, or why there is none
    motor: MotorSizing | str = ""

    @property
    def worst_margin(self) -> float | None:
        """The smallest numeric margin among the rules that were judged (None if there is none)."""
        margins = [f.margin for f in self.findings
                   if f.severity != INFO and f.margin is not None and math.isfinite(f.margin)]
        return min(margins) if margins else None

    @property
    def verdict(self) -> str:
        """``fail``, ``warn`` or ``pass`` (``strict`` settings turn ``warn`` into ``fail``).

        A rule not checked that matters for the duty counts as a warning (:attr:`Finding.effect`).
        """
        return worst_effect(self.findings, self.settings.strict)

    def counts(self) -> dict[str, int]:
        """How many findings of each severity."""
        out = {FAIL: 0, WARN: 0, INFO: 0, NOT_CHECKED: 0, PASS: 0}
        for f in self.findings:
            out[f.severity] += 1
        return out
