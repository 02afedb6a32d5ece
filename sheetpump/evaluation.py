"""Evaluating a measured performance table: the points, the derived displacement and the loss model.

A test bench's log or a supplier's performance table (:class:`MeasuredTable`, read by
:func:`sheetpump.workbooks.measured_table.read_measured`) goes through :func:`evaluate_table`, which

1. gives each point its oil viscosity: the table's viscosity column, or the oil's viscosity at the
   point's temperature (ASTM D341 through :mod:`sheetpump.physics.fluid`), and its dynamic viscosity
   μ = ν·ρ, which Wilson's model needs; the density ρ is the oil's density at 15 °C
   (:data:`sheetpump.physics.fluid.MINERAL_OIL_DENSITY_15` unless given, a common value for mineral
   hydraulic oil) corrected for thermal expansion where the
   temperature is known, and taken as it is where it is not;
2. derives the displacement from the table (the ISO 8426 idea) and compares it with the nominal one;
3. evaluates every point (:func:`sheetpump.physics.measured.evaluate_points`): η_v, η_hm, η_t, powers
   and plausibility flags;
4. fits the loss model (:func:`sheetpump.physics.prediction.fit_performance`: Wilson's model, or
   interpolation where the table is too small) and predicts each point and a curve per measured
   speed and viscosity.

Everything here is SI; the faces (the workbook writer, the command line) convert for display.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .duty import Oil
from .errors import InputError, PhysicsError, Where, as_input_error
from .physics import fluid
from .physics.displacement import DerivedDisplacement, derived_displacement
from .physics.measured import DEFAULT_TOLERANCE, PointEvaluation, evaluate_points
from .physics.prediction import PerformanceModel, fit_performance
from .physics.table import group_points
from .physics.wilson import Prediction, WilsonModel
from .units import TEMPERATURE, VISCOSITY, from_si

__all__ = [
    "COEFFICIENTS",
    "DISPLACEMENT_DIFFERS",
    "TABLE_FLAG_TEXT",
    "Evaluation",
    "Group",
    "MeasuredTable",
    "all_notes",
    "coefficients",
    "evaluate_table",
]

#: Table-level flag: the derived displacement and the nominal one differ by more than three standard
#: uncertainties *and* more than :data:`DISPLACEMENT_TOLERANCE`.
DISPLACEMENT_DIFFERS = "derived_displacement_differs"
#: Relative difference of derived and nominal displacement below which they count as agreeing [-]: a
#: gear pump's displacement is made to about a percent or two (common practice).
DISPLACEMENT_TOLERANCE = 0.02

TABLE_FLAG_TEXT = {
    DISPLACEMENT_DIFFERS: "the displacement derived from the table differs from the nominal one by more "
                          "than three standard uncertainties and more than 2 %",
}

#: Why neither the displacement is derived nor the model fitted when no point can be used.
_NO_USABLE_POINT = "no complete, possible point in the table"

#: Points on each model curve (over the measured pressure range).
CURVE_POINTS = 26


@dataclass(frozen=True, eq=False)
class MeasuredTable:
    """A measured performance table in SI, one array element per point, with where it came from.

    ``torque`` or ``input_power`` is None when the table lacks that column; so are ``viscosity``
    (kinematic) and ``temperature``. ``rows`` are the 1-based rows of the points in the file,
    ``columns`` the column letter of each key, ``units`` the unit each header named.
    """

    speed: np.ndarray  # [rev/s]
    pressure: np.ndarray  # [Pa]
    flow: np.ndarray  # [m^3/s]
    torque: np.ndarray | None = None  # [N*m]
    input_power: np.ndarray | None = None  # [W]
    viscosity: np.ndarray | None = None  # kinematic [m^2/s]
    temperature: np.ndarray | None = None  # [K]
    rows: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    columns: dict[str, str] = field(default_factory=dict)
    units: dict[str, str] = field(default_factory=dict)
    file: str = ""
    sheet: str | None = None
    notes: tuple[str, ...] = ()

    @property
    def size(self) -> int:
        return int(self.speed.size)

    def where(self, key: str | None = None) -> Where:
        """Where the table (or its column ``key``) was read from."""
        return Where(self.file or None, self.sheet, None, key)


@dataclass(frozen=True, eq=False)
class Group:
    """Points measured at one speed and one viscosity (within the level tolerance), by rising pressure.

    The groups are those of the plausibility flags (:func:`sheetpump.physics.table.group_points`).
    """

    speed: float  # mean speed [rev/s]
    viscosity: float  # mean kinematic viscosity [m^2/s]
    dynamic_viscosity: float  # mean [Pa*s]
    index: np.ndarray  # indices into the table, by rising pressure


@dataclass(frozen=True, eq=False)
class Evaluation:
    """Everything :func:`evaluate_table` found (SI).

    ``derived``/``model`` are None when they could not be had; ``derived_error``/``model_error`` say
    why. ``prediction`` is the model at each measured point; ``curves`` the model along pressure per
    group (pressure array [Pa] and the prediction). ``table_flags`` are flags of the whole table.
    """

    table: MeasuredTable
    viscosity: np.ndarray  # kinematic [m^2/s]
    density: np.ndarray  # [kg/m^3]
    dynamic_viscosity: np.ndarray  # [Pa*s]
    nominal_displacement: float | None  # [m^3/rev]
    displacement: float  # the one the points were evaluated with [m^3/rev]
    points: PointEvaluation
    derived: DerivedDisplacement | None
    derived_error: str
    model: PerformanceModel | None
    model_error: str
    prediction: Prediction | None
    groups: tuple[Group, ...]
    curves: tuple[tuple[np.ndarray, Prediction], ...]
    table_flags: tuple[str, ...]
    notes: tuple[str, ...]

    @property
    def flagged(self) -> bool:
        """True when any point or the table carries a plausibility flag."""
        return bool(self.table_flags) or any(self.points.flags)

    @property
    def displacement_difference(self) -> float:
        """(derived − nominal)/nominal [-]; NaN without both."""
        if self.derived is None or self.nominal_displacement is None:
            return math.nan
        return (self.derived.value - self.nominal_displacement) / self.nominal_displacement


def _groups(n: np.ndarray, nu: np.ndarray, mu: np.ndarray, p: np.ndarray, usable: np.ndarray
            ) -> tuple[Group, ...]:
    """Group the usable points by speed level, then viscosity level, as the plausibility flags do
    (:func:`sheetpump.physics.table.group_points`: one sort, O(N log N))."""
    return tuple(Group(speed=float(n[members].mean()), viscosity=float(nu[members].mean()),
                       dynamic_viscosity=float(mu[members].mean()), index=members)
                 for members in group_points(n, p, mu, usable))


def _viscosity(table: MeasuredTable, oil: Oil | None, density_15: float | None, viscosity: float | None,
               notes: list[str]) -> tuple[np.ndarray, np.ndarray]:
    """Kinematic viscosity [m²/s] and density [kg/m³] of each point; notes say what was assumed."""
    size = table.size
    default = fluid.MINERAL_OIL_DENSITY_15
    rho15 = density_15 if density_15 is not None else (oil.density_15 if oil is not None else default)
    given = density_15 is not None or (oil is not None and oil.density_15 != default)
    source = "given" if given else "assumed: a common value for mineral hydraulic oil; give --density to change it"
    if table.viscosity is not None:
        nu = table.viscosity
    elif table.temperature is not None:
        if oil is None:
            raise InputError("the table gives the oil temperature but not its viscosity: the oil is needed",
                             table.where("temperature"),
                             "give the oil as --vg 46 --vi 100, or as --nu40 '46 cSt' --nu100 '6.8 cSt'")
        t = table.temperature
        ok = np.isfinite(t)
        nu = np.full(size, np.nan)
        try:
            nu[ok] = fluid.viscosity_at(t[ok], oil.nu1, oil.t1, oil.nu2, oil.t2)
        except PhysicsError as exc:
            raise as_input_error(exc, table.where("temperature"), "the oil's viscosity cannot be had") from None
        notes.append(f"viscosity from the oil temperature by ASTM D341 (Walther) through {_oil_text(oil)}")
    elif viscosity is not None:
        nu = np.full(size, float(viscosity))
        notes.append(f"viscosity {viscosity * 1e6:g} mm²/s at every point (given; no viscosity column)")
    else:
        raise InputError("missing column 'viscosity [mm^2/s]' (or 'temperature [degC]' with the oil)",
                         table.where(), "add one of the columns, or give --viscosity for the whole table")
    if table.temperature is not None:
        t = table.temperature
        ok = np.isfinite(t)
        rho = np.full(size, rho15)
        try:
            rho[ok] = fluid.density_at(t[ok], rho15)
        except PhysicsError as exc:
            raise as_input_error(exc, table.where("temperature"), "the oil's density cannot be had") from None
        notes.append(f"dynamic viscosity μ = ν·ρ with ρ from {rho15:g} kg/m³ at 15 °C ({source}) and thermal "
                     f"expansion {fluid.MINERAL_OIL_EXPANSION:g} 1/K (common practice for mineral oil) at each "
                     "point's temperature")
    else:
        rho = np.full(size, rho15)
        notes.append(f"dynamic viscosity μ = ν·ρ with ρ = {rho15:g} kg/m³ at every point ({source}; no "
                     "temperature column, so no thermal expansion applied); C_s and C_v scale with the "
                     "density assumed, predictions at the same kinematic viscosity do not")
    return nu, rho


def _oil_text(oil: Oil) -> str:
    if oil.grade is not None:
        return f"ISO VG {oil.grade} of viscosity index {oil.viscosity_index:g}"
    nu1, nu2 = (float(from_si(nu, VISCOSITY, "mm^2/s")) for nu in (oil.nu1, oil.nu2))
    t1, t2 = (float(from_si(t, TEMPERATURE, "degC")) for t in (oil.t1, oil.t2))
    return f"{nu1:g} mm²/s at {t1:g} °C and {nu2:g} mm²/s at {t2:g} °C"


def evaluate_table(
    table: MeasuredTable,
    displacement: float | None = None,
    *,
    oil: Oil | None = None,
    density_15: float | None = None,
    viscosity: float | None = None,
    tolerance: float = DEFAULT_TOLERANCE,
) -> Evaluation:
    """Evaluate a measured table: viscosity, derived displacement, per-point efficiencies, loss model.

    Parameters
    ----------
    table : MeasuredTable
        The measured points (SI).
    displacement : float, optional
        Nominal displacement [m³/rev]; without it the derived one is used.
    oil : Oil, optional
        The oil, needed when the table gives temperature instead of viscosity.
    density_15 : float, optional
        Oil density at 15 °C [kg/m³]; default the oil's, else
        :data:`sheetpump.physics.fluid.MINERAL_OIL_DENSITY_15`.
    viscosity : float, optional
        Kinematic viscosity of every point [m²/s] for a table without viscosity or temperature column.
    tolerance : float, optional
        Noise tolerance of the plausibility flags [-].

    Raises
    ------
    InputError
        Naming the file and sheet: no displacement to evaluate with, no viscosity, impossible oil.

    Examples
    --------
    Three points of an invented 28 cm³/rev pump at 1500 rpm, 32 mm²/s (Wilson's coefficients C_s =
    1.3e-8, C_f = 0.04, C_v = 1e5, T_c = 1 N·m):

    >>> m = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)
    >>> p = np.array([50e5, 150e5, 250e5])
    >>> r = m.predict(25.0, p, 32e-6 * 870)
    >>> t = MeasuredTable(speed=np.full(3, 25.0), pressure=p, flow=r.flow, torque=r.torque,
    ...                   viscosity=np.full(3, 32e-6))
    >>> e = evaluate_table(t, 28e-6)
    >>> [round(float(x), 4) for x in e.points.volumetric]  # 1 − C_s·Δp/(μ·ω), Merritt's form
    [0.9851, 0.9554, 0.9257]
    >>> e.model.method, round(e.model.c_s * 1e8, 6), e.flagged
    ('wilson', 1.3, False)
    """
    notes: list[str] = list(table.notes)
    if table.size == 0:
        raise InputError("the table has no points", table.where(), "add one row per measured point")
    nu, rho = _viscosity(table, oil, density_15, viscosity, notes)
    with np.errstate(invalid="ignore"):
        mu = nu * rho
    n, p, q = table.speed, table.pressure, table.flow
    measured = table.torque if table.torque is not None else table.input_power
    if measured is None:
        raise InputError("missing column 'torque [N*m]' or 'input power [kW]'", table.where(),
                         "add the input torque or the input power of each point")
    with np.errstate(invalid="ignore"):
        usable = (np.isfinite(n) & np.isfinite(p) & np.isfinite(q) & np.isfinite(measured) & np.isfinite(mu)
                  & (n > 0) & (p >= 0) & (q >= 0) & (measured > 0) & (mu > 0))

    derived, derived_error = _derived(n, p, q, mu, usable)
    if displacement is not None:
        used = float(displacement)
    elif derived is not None:
        used = derived.value
        notes.append("no nominal displacement given: the points are evaluated with the derived displacement")
    else:
        raise InputError(f"the displacement cannot be derived from the table ({derived_error})", table.where(),
                         "give the nominal displacement, e.g. --displacement '28 cc'")
    try:
        points = evaluate_points(n, p, q, torque=table.torque if table.torque is not None else None,
                                 input_power=table.input_power if table.torque is None else None,
                                 displacement=used, viscosity=mu, tolerance=tolerance)
    except PhysicsError as exc:
        raise as_input_error(exc, table.where()) from None

    table_flags: list[str] = []
    if derived is not None and displacement is not None:
        diff = abs(derived.value - displacement)
        u = derived.uncertainty if math.isfinite(derived.uncertainty) else 0.0
        if diff > 3 * u and diff > DISPLACEMENT_TOLERANCE * displacement:
            table_flags.append(DISPLACEMENT_DIFFERS)

    prediction = None
    groups = _groups(n, nu, mu, p, usable)
    curves: list[tuple[np.ndarray, Prediction]] = []
    model, model_error = _model(n, p, q, points.torque, mu, used, usable)
    if model is not None:
        if (~usable).any():
            notes.append(f"{int((~usable).sum())} point(s) with a missing or impossible value left out of the fit")
        nn, pp, mm = (np.where(usable, x, 1.0) for x in (n, p, mu))  # placeholders, blanked below
        pred = model.predict(nn, np.where(usable, pp, 0.0), mm)
        prediction = _blank(pred, usable)
        # Curves over the measured pressure range only: the model is not shown where it extrapolates.
        pressure = np.linspace(float(p[usable].min()), float(p[usable].max()), CURVE_POINTS)
        for g in groups:
            curves.append((pressure, model.predict(g.speed, pressure, g.dynamic_viscosity)))
    return Evaluation(
        table=table, viscosity=nu, density=rho, dynamic_viscosity=mu, nominal_displacement=displacement,
        displacement=used, points=points, derived=derived, derived_error=derived_error, model=model,
        model_error=model_error, prediction=prediction, groups=groups, curves=tuple(curves),
        table_flags=tuple(table_flags), notes=tuple(notes))


def _derived(n: np.ndarray, p: np.ndarray, q: np.ndarray, mu: np.ndarray, usable: np.ndarray
             ) -> tuple[DerivedDisplacement | None, str]:
    """The displacement derived from the usable points, or None and why not."""
    if not usable.any():
        return None, _NO_USABLE_POINT
    try:
        derived = derived_displacement(n[usable], p[usable], q[usable], viscosity=mu[usable])
    except PhysicsError as exc:
        return None, str(exc)
    if not derived.value > 0:  # flow that does not rise with speed
        return None, (f"the flow does not rise with the speed at low pressure (the slope gives "
                      f"{derived.value * 1e6:.3g} cm^3/rev)")
    return derived, ""


def _model(n: np.ndarray, p: np.ndarray, q: np.ndarray, torque: np.ndarray, mu: np.ndarray, displacement: float,
           usable: np.ndarray) -> tuple[PerformanceModel | None, str]:
    """The loss model of the usable points (:func:`fit_performance`), or None and why not."""
    if not usable.any():
        return None, _NO_USABLE_POINT
    try:
        return fit_performance(n[usable], p[usable], q[usable], torque[usable], mu[usable], displacement), ""
    except PhysicsError as exc:
        return None, str(exc)


def _blank(pred: Prediction, keep: np.ndarray) -> Prediction:
    def f(x: np.ndarray) -> np.ndarray:
        return np.where(keep, x, np.nan)

    return Prediction(
        flow=f(pred.flow), torque=f(pred.torque), volumetric=f(pred.volumetric),
        hydromechanical=f(pred.hydromechanical), total=f(pred.total), input_power=f(pred.input_power),
        extrapolated=pred.extrapolated & keep, extrapolation=np.where(keep, pred.extrapolation, ""))


#: Wilson's coefficients: attribute, symbol, SI unit and what each stands for.
COEFFICIENTS = (
    ("c_s", "C_s", "-", "laminar slip (leakage ∝ D·Δp/μ)"),
    ("c_f", "C_f", "-", "friction torque proportional to pressure (∝ D·Δp)"),
    ("c_v", "C_v", "-", "viscous drag torque (∝ D·μ·ω)"),
    ("t_c", "T_c", "N*m", "constant friction torque"),
)


def coefficients(model: PerformanceModel | None) -> list[dict[str, object]]:
    """Wilson's coefficients of a fitted model as records: symbol, value, unit, uncertainty, meaning, fitted.

    ``fitted`` is False for a coefficient assumed rather than fitted (its uncertainty is then NaN).
    Empty for the interpolation fallback (it has no coefficients).

    >>> m = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=0.0, notes=("... (T_c = 0) ...",))
    >>> [(c["symbol"], c["unit"], c["fitted"]) for c in coefficients(m)][::3]
    [('C_s', '-', True), ('T_c', 'N*m', False)]
    """
    if not isinstance(model, WilsonModel):
        return []
    # fit_wilson always fits C_s, C_f and C_v; T_c only where speed or viscosity varies (else it says
    # "T_c = 0" in a note). An uncertainty may be absent for a fitted one too (no redundant point).
    t_c_assumed = "t_c" not in model.uncertainty and any("T_c = 0" in note for note in model.notes)
    return [{"symbol": symbol, "value": float(getattr(model, attr)), "unit": unit,
             "uncertainty": float(model.uncertainty.get(attr, math.nan)), "meaning": meaning,
             "fitted": not (attr == "t_c" and t_c_assumed)}
            for attr, symbol, unit, meaning in COEFFICIENTS]


def all_notes(e: Evaluation) -> list[str]:
    """The notes of the evaluation, the derivation and the model, each once, in that order."""
    out: list[str] = []
    for note in (*e.notes, *(e.derived.notes if e.derived else ()), *(e.model.notes if e.model else ())):
        if note not in out:
            out.append(note)
    if e.derived is None:
        out.append(f"displacement not derived: {e.derived_error}")
    if e.model is None:
        out.append(f"no loss model: {e.model_error}")
    return out
