r"""The suction line: line velocity, friction, fittings, strainer and the pressure at the pump's inlet.

Pure functions of SI numbers or numpy arrays (flows in m³/s, lengths in m, pressures in Pa, kinematic
viscosity in m²/s, density in kg/m³). Every function broadcasts like numpy, so a measured series of a
million samples is a handful of array passes.

The pressure at the pump's inlet port (absolute) is the reservoir pressure less everything the oil
loses on its way up the line:

.. math::

    p_{in} = p_{res} - \rho g z - f \frac{L}{d} \frac{\rho v^2}{2} - \sum K \frac{\rho v^2}{2}
             - \Delta p_{strainer} - \frac{\rho v^2}{2}

with z the height of the pump's inlet above the oil level (negative when the pump sits below it:
flooded), v = 4Q/(πd²) the mean line velocity, f the Darcy friction factor of the flow regime
(:func:`friction_factor`), K the loss coefficients of the fittings (:func:`fitting`) and the last term
the velocity head the oil must be given.

References
----------
.. [1] Crane Co., *Flow of Fluids Through Valves, Fittings, and Pipe*, Technical Paper 410 (Darcy–Weisbach,
   K method; from memory).
.. [2] Clamond, D. "Efficient Resolution of the Colebrook Equation." *Industrial & Engineering
   Chemistry Research* 48, no. 7 (2009): 3665–3671.
.. [3] Darby, R. "Correlate Pressure Drops Through Fittings." *Chemical Engineering* 106 (1999): 101–104
   (the 3-K method, as tabulated by ``fluids.fittings.Darby3K``).
.. [4] Rennels, D. C., and Hudson, H. M. *Pipe Flow: A Practical and Comprehensive Guide*. Wiley, 2012
   (the sharp-edged entrance, as ``fluids.fittings.entrance_sharp``).
.. [5] Bell, C. et al. ``fluids`` (ChEDL), the reference library the fittings' coefficients come from.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike

from ..errors import PhysicsError
from .validate import non_negative, plain, positive

#: The standard atmosphere [Pa] (ISO 2533): the default pressure on the oil of a vented reservoir.
STANDARD_ATMOSPHERE = 101325.0

__all__ = [
    "FITTINGS",
    "LAMINAR_RE",
    "STANDARD_ATMOSPHERE",
    "TURBULENT_RE",
    "Fitting",
    "G",
    "SuctionTerms",
    "darcy_drop",
    "fitting",
    "fittings_drop",
    "friction_factor",
    "line_pressure_drop",
    "line_velocity",
    "reynolds_number",
    "strainer_drop",
    "suction_pressure",
    "suction_terms",
    "velocity_head",
]

Number = float | np.ndarray

#: Standard acceleration of gravity [m/s²] (ISO 80000-3; CGPM 1901).
G = 9.80665
#: Below this Reynolds number the flow is laminar: f = 64/Re (Hagen–Poiseuille).
LAMINAR_RE = 2000.0
#: Above this Reynolds number the flow is turbulent: f from the Colebrook equation (Clamond's solution).
TURBULENT_RE = 4000.0



def line_velocity(flow: ArrayLike, diameter: ArrayLike) -> Number:
    r"""Mean velocity of the oil in a round line.

    .. math:: v = \frac{4 Q}{\pi d^2}

    Parameters
    ----------
    flow : array
        Volume flow Q [m³/s], >= 0.
    diameter : array
        Inner diameter d [m], > 0.

    Returns
    -------
    float or array
        Mean velocity v [m/s].

    Examples
    --------
    40 L/min in a 25 mm line:

    >>> round(line_velocity(40 / 60000, 0.025), 4)
    1.3581

    References
    ----------
    Continuity, Q = v·A (any fluid mechanics text).
    """
    q = np.asarray(flow, float)
    d = np.asarray(diameter, float)
    positive(d, "diameter")
    return plain(q * (4.0 / math.pi) / (d * d))


def reynolds_number(velocity: ArrayLike, diameter: ArrayLike, viscosity: ArrayLike) -> Number:
    r"""Reynolds number of the flow in a line.

    .. math:: Re = \frac{v d}{\nu}

    Parameters
    ----------
    velocity : array
        Mean velocity v [m/s].
    diameter : array
        Inner diameter d [m], > 0.
    viscosity : array
        Kinematic viscosity ν [m²/s], > 0.

    Returns
    -------
    float or array
        Re [-].

    Examples
    --------
    >>> round(reynolds_number(1.358, 0.025, 46e-6), 1)
    738.0

    References
    ----------
    Reynolds, O. (1883), *Phil. Trans. R. Soc.* 174: 935–982.
    """
    nu = np.asarray(viscosity, float)
    positive(nu, "viscosity")
    return plain(np.abs(np.asarray(velocity, float)) * np.asarray(diameter, float) / nu)


def _clamond(re: np.ndarray, ed: np.ndarray) -> np.ndarray:
    # Clamond (2009), the two-step solution of the Colebrook equation, as in fluids.friction.Clamond
    # (same constants), written over numpy arrays. Exact to machine precision for Re > 2000 or so.
    x1 = ed * re * 0.1239681863354175460160858261654858382699  # ln(10)/18.574
    x2 = np.log(re) - 0.7793974884556819406441139701653776731705  # ln(ln(10)/5.02)
    f = x2 - 0.2
    x1f = x1 + f
    x1f1 = 1.0 + x1f
    e = (np.log(x1f) - 0.2) / x1f1
    f = f - (x1f1 + 0.5 * e) * e * x1f / (x1f1 + e * (1.0 + e / 3.0))
    x1f = x1 + f
    x1f1 = 1.0 + x1f
    e = (np.log(x1f) + f - x2) / x1f1
    f = f - (x1f1 + 0.5 * e) * e * x1f / (x1f1 + e * (1.0 + e / 3.0))
    return 1.325474527619599502640416597148504422899 / (f * f)  # (ln(10)/2)²


def friction_factor(reynolds: ArrayLike, relative_roughness: ArrayLike = 0.0) -> Number:
    r"""Darcy friction factor of a round line, laminar, transitional or turbulent.

    .. math::

        f = \begin{cases}
            64/Re & Re \le 2000 \text{ (laminar, Hagen–Poiseuille)} \\
            f_{C}(Re, \varepsilon/d) & Re \ge 4000 \text{ (turbulent, Colebrook)} \\
            \text{linear in } Re \text{ from } 64/2000 \text{ to } f_C(4000, \varepsilon/d) & \text{between}
        \end{cases}

    The turbulent factor f_C solves the Colebrook equation
    1/√f = −2 log10(ε/(3.7 d) + 2.51/(Re √f)) by Clamond's method [2]_ (the method of
    ``fluids.friction.Clamond``, written here over numpy arrays). Between Re = 2000 and 4000 the flow is
    neither; the factor is interpolated linearly between the two ends, so the pressure drop is
    continuous in flow and viscosity: a rounding never flips a verdict by jumping from one regime to the
    other. The turbulent end is the higher factor there, so the blend errs towards a lower inlet pressure.

    Parameters
    ----------
    reynolds : array
        Reynolds number Re [-], > 0.
    relative_roughness : array, optional
        Roughness over inner diameter ε/d [-], >= 0; 0 (smooth: drawn tube or hose) by default.

    Returns
    -------
    float or array
        Darcy friction factor f [-] (four times the Fanning factor).

    Examples
    --------
    >>> friction_factor(1000.0)
    0.064
    >>> round(friction_factor(1e5, 1e-4), 5)
    0.01852

    References
    ----------
    .. [1] Hagen–Poiseuille law for laminar flow (any fluid mechanics text).
    .. [2] Clamond, D. (2009), *Ind. Eng. Chem. Res.* 48(7): 3665–3671.
    .. [3] Colebrook, C. F. (1939), *J. Inst. Civil Eng.* 11: 133–156.
    """
    re = np.asarray(reynolds, float)
    ed = np.asarray(relative_roughness, float)
    positive(re, "reynolds")
    non_negative(ed, "relative_roughness")
    re, ed = np.broadcast_arrays(re, ed)
    f = 64.0 / re
    turbulent = re > LAMINAR_RE
    if np.any(turbulent):
        f_turb = _clamond(np.maximum(re, TURBULENT_RE), ed)
        # transition: straight line from the laminar factor at 2000 to the turbulent one at 4000
        w = np.clip((re - LAMINAR_RE) * (1.0 / (TURBULENT_RE - LAMINAR_RE)), 0.0, 1.0)
        f = np.where(turbulent, (1.0 - w) * (64.0 / LAMINAR_RE) + w * f_turb, f)
    return plain(f)


def velocity_head(velocity: ArrayLike, density: ArrayLike) -> Number:
    r"""Dynamic pressure of the oil, the pressure spent to give it its velocity.

    .. math:: p_v = \frac{\rho v^2}{2}

    Parameters
    ----------
    velocity : array
        Mean velocity v [m/s].
    density : array
        Density ρ [kg/m³], > 0.

    Returns
    -------
    float or array
        p_v [Pa].

    Examples
    --------
    >>> velocity_head(1.0, 870.0)
    435.0

    References
    ----------
    Bernoulli's equation (any fluid mechanics text).
    """
    v = np.asarray(velocity, float)
    return plain(0.5 * np.asarray(density, float) * v * v)


def darcy_drop(flow: ArrayLike, diameter: ArrayLike, length: ArrayLike, viscosity: ArrayLike,
               density: ArrayLike, roughness: ArrayLike = 0.0) -> Number:
    r"""Friction pressure drop of a straight round line (Darcy–Weisbach).

    .. math:: \Delta p = f(Re, \varepsilon/d) \frac{L}{d} \frac{\rho v^2}{2}, \qquad v = \frac{4Q}{\pi d^2},
              \qquad Re = \frac{v d}{\nu}

    In laminar flow this is the Hagen–Poiseuille law Δp = 128 μ L Q / (π d⁴).

    Parameters
    ----------
    flow : array
        Volume flow Q [m³/s], >= 0.
    diameter : array
        Inner diameter d [m], > 0.
    length : array
        Line length L [m], >= 0.
    viscosity : array
        Kinematic viscosity ν [m²/s], > 0.
    density : array
        Density ρ [kg/m³], > 0.
    roughness : array, optional
        Absolute roughness ε [m], >= 0; 0 by default (drawn tube, hose).

    Returns
    -------
    float or array
        Δp [Pa]; 0 where there is no flow.

    Examples
    --------
    40 L/min of an oil at 1500 mm²/s through 1.5 m of 25 mm line (laminar):

    >>> round(darcy_drop(40 / 60000, 0.025, 1.5, 1500e-6, 870.0))
    136116

    References
    ----------
    Darcy (1857), Weisbach (1845); Crane TP-410 (from memory); :func:`friction_factor`.
    """
    q = np.asarray(flow, float)
    d = np.asarray(diameter, float)
    length_ = np.asarray(length, float)
    nu = np.asarray(viscosity, float)
    rho = np.asarray(density, float)
    positive(d, "diameter")
    non_negative(length_, "length")
    positive(nu, "viscosity")
    positive(rho, "density")
    non_negative(q, "flow")
    v = q * (4.0 / math.pi) / (d * d)
    re = np.maximum(v * d / nu, 1e-12)  # no flow: any factor, the drop is 0
    f = np.asarray(friction_factor(re, np.asarray(roughness, float) / d))
    return plain(f * (length_ / d) * 0.5 * rho * v * v)


@dataclass(frozen=True)
class Fitting:
    """A fitting of a line: its loss coefficient K = k_re/Re + k_inf (the 2-K form; k_re = 0: constant K).

    ``name`` is the trade name sheetpump reads; ``source`` the reference library function and entry.
    """

    name: str
    k_re: float  # [-] the laminar part, divided by Re
    k_inf: float  # [-] the coefficient at high Re
    source: str

    def k(self, reynolds: ArrayLike) -> Number:
        """K [-] at Reynolds number ``reynolds`` [-]."""
        return plain(self.k_re / np.asarray(reynolds, float) + self.k_inf)


#: Fittings sheetpump knows by trade name: trade name -> entry of ``fluids.fittings.Darby`` (3-K method,
#: Darby 1999/2001) or ``None`` for the sharp-edged entrance (``fluids.fittings.entrance_sharp``, Rennels).
FITTINGS: dict[str, str | None] = {
    "entrance": None,
    "elbow 90": "Elbow, 90°, threaded, standard, (r/D = 1)",
    "elbow 90 long": "Elbow, 90°, threaded, long radius, (r/D = 1.5)",
    "elbow 45": "Elbow, 45°, threaded standard, (r/D = 1)",
    "bend 180": "Elbow, 180°, threaded, close-return bend, (r/D = 1)",
    "tee run": "Tee, Run-through, threaded, (r/D = 1)",
    "tee branch": "Tee, Through-branch, (as elbow), threaded, (r/D = 1)",
    "ball valve": "Valve, Ball valve, standard, β = 1",
    "gate valve": "Valve, Gate valve, standard, β = 1",
    "check valve": "Valve, Swing check",
}


def _fitting_key(name: str) -> str:
    key = " ".join(str(name).strip().lower().replace("°", " ").replace("-", " ").split())
    return key.replace("degrees", "").replace("deg", "").strip()


@lru_cache(maxsize=256)
def fitting(name: str, diameter: float) -> Fitting:
    r"""A fitting by trade name, with its loss coefficient for a line of inner diameter ``diameter``.

    .. math:: K = \frac{K_1}{Re} + K_i \left(1 + \frac{K_d}{D_n^{0.3}}\right)

    the 3-K method of Darby [3]_ with the coefficients of ``fluids.fittings.Darby`` and D_n the nominal
    size ``fluids.fittings.Darby3K`` takes for the inner diameter; the sharp-edged entrance is the
    constant K of ``fluids.fittings.entrance_sharp`` (Rennels [4]_). Known names: the keys of
    :data:`FITTINGS` ("entrance", "elbow 90", "ball valve", ...; "°", "-" and case are ignored).

    Parameters
    ----------
    name : str
        Trade name of the fitting.
    diameter : float
        Inner diameter of the line [m], > 0.

    Returns
    -------
    Fitting
        K = k_re/Re + k_inf and its source.

    Raises
    ------
    PhysicsError
        For an unknown name (the message lists the known ones) or a diameter not above zero.

    Examples
    --------
    >>> fitting("entrance", 0.025).k_inf
    0.57
    >>> f = fitting("Elbow 90°", 0.025)
    >>> f.k_re, round(f.k_inf, 3)
    (800.0, 0.713)
    """
    positive(float(diameter), "diameter")
    key = _fitting_key(name)
    if key not in FITTINGS:
        raise PhysicsError("fitting", f"{name!r} is not a fitting sheetpump knows; known: "
                           f"{', '.join(FITTINGS)} (or give the sum of the loss coefficients K as a number)")
    from fluids import fittings as lib  # the reference library of fitting coefficients

    entry = FITTINGS[key]
    if entry is None:
        return Fitting(key, 0.0, float(lib.entrance_sharp(method="Rennels")),
                       "fluids.fittings.entrance_sharp (Rennels)")
    k1 = float(lib.Darby[entry][0])
    k_inf = float(lib.Darby3K(Re=math.inf, name=entry, Di=float(diameter)))
    return Fitting(key, k1, k_inf, f"fluids.fittings.Darby3K ({entry})")


def fittings_drop(k_re: ArrayLike, k_inf: ArrayLike, reynolds: ArrayLike, velocity: ArrayLike,
                  density: ArrayLike) -> Number:
    r"""Pressure drop of a line's fittings by the K method.

    .. math:: \Delta p = \left(\frac{\sum K_1}{Re} + \sum K_\infty\right) \frac{\rho v^2}{2}

    Parameters
    ----------
    k_re : array
        Sum of the fittings' laminar coefficients K₁ [-] (0 for constant K values).
    k_inf : array
        Sum of the fittings' high-Re coefficients K∞ [-], or the stated sum of K.
    reynolds : array
        Re of the line flow [-], > 0.
    velocity : array
        Mean velocity v [m/s].
    density : array
        Density ρ [kg/m³].

    Returns
    -------
    float or array
        Δp [Pa].

    Examples
    --------
    >>> fittings_drop(0.0, 2.0, 1e4, 1.0, 870.0)
    870.0

    References
    ----------
    Crane TP-410 (the K method; from memory); Darby (1999), the 3-K method.
    """
    re = np.asarray(reynolds, float)
    v = np.asarray(velocity, float)
    k = np.asarray(k_re, float) / np.maximum(re, 1e-12) + np.asarray(k_inf, float)
    return plain(k * 0.5 * np.asarray(density, float) * v * v)


def line_pressure_drop(flow: ArrayLike, diameter: ArrayLike, length: ArrayLike, viscosity: ArrayLike,
                       density: ArrayLike, k: ArrayLike = 0.0) -> Number:
    r"""Pressure drop of a straight line and its fittings: Darcy–Weisbach plus the K method.

    .. math:: \Delta p = \left(f(Re) \frac{L}{d} + K\right) \frac{\rho v^2}{2}

    f from :func:`friction_factor` (smooth line), K the constant sum of the fittings' loss coefficients.

    Parameters
    ----------
    flow : array
        Volume flow Q [m³/s], >= 0.
    diameter : array
        Inner diameter d [m], > 0.
    length : array
        Length L [m], >= 0.
    viscosity : array
        Kinematic viscosity ν [m²/s], > 0.
    density : array
        Density ρ [kg/m³], > 0.
    k : array, optional
        Sum of the fittings' loss coefficients K [-], >= 0; 0 by default.

    Returns
    -------
    float or array
        Δp [Pa].

    Examples
    --------
    >>> round(line_pressure_drop(40 / 60000, 0.032, 2.0, 46e-6, 870.0, 1.5))
    2522

    References
    ----------
    Crane TP-410 (from memory); :func:`darcy_drop`.
    """
    kk = np.asarray(k, float)
    non_negative(kk, "k")
    friction = np.asarray(darcy_drop(flow, diameter, length, viscosity, density))
    v = np.asarray(line_velocity(flow, diameter))
    return plain(friction + kk * 0.5 * np.asarray(density, float) * v * v)


def strainer_drop(flow: ArrayLike, viscosity: ArrayLike, stated_drop: float, stated_flow: float,
                  stated_viscosity: float, law: str = "laminar") -> Number:
    r"""Pressure drop of a suction strainer, scaled from one stated point.

    .. math::

        \Delta p = \Delta p_0 \frac{Q}{Q_0} \frac{\nu}{\nu_0} \quad\text{(laminar element)}, \qquad
        \Delta p = \Delta p_0 \left(\frac{Q}{Q_0}\right)^2 \quad\text{(turbulent)}

    A strainer's mesh passes the oil in creeping (laminar) flow, so its drop grows in proportion to flow
    and to viscosity (Darcy's law for a porous medium); a coarse element may behave like an orifice
    instead (``law="turbulent"``).

    Parameters
    ----------
    flow : array
        Flow through the strainer Q [m³/s], >= 0.
    viscosity : array
        Kinematic viscosity ν [m²/s], > 0.
    stated_drop : float
        The drop Δp₀ the maker states [Pa], >= 0.
    stated_flow : float
        The flow Q₀ it is stated at [m³/s], > 0.
    stated_viscosity : float
        The viscosity ν₀ it is stated at [m²/s], > 0.
    law : str, optional
        ``"laminar"`` (default) or ``"turbulent"``.

    Returns
    -------
    float or array
        Δp [Pa].

    Examples
    --------
    A strainer stated at 0.05 bar for 60 L/min of 30 mm²/s oil, at 40 L/min of 300 mm²/s oil:

    >>> round(strainer_drop(40 / 60000, 300e-6, 5000.0, 60 / 60000, 30e-6))
    33333

    References
    ----------
    Darcy, H. (1856), the law of flow through porous media; common practice for strainer data.
    """
    positive(stated_flow, "stated_flow")
    positive(stated_viscosity, "stated_viscosity")
    non_negative(stated_drop, "stated_drop")
    q = np.asarray(flow, float) / stated_flow
    if law == "laminar":
        return plain(stated_drop * q * (np.asarray(viscosity, float) / stated_viscosity))
    if law == "turbulent":
        return plain(stated_drop * q * q)
    raise PhysicsError("law", f"must be 'laminar' or 'turbulent', not {law!r}")


@dataclass(frozen=True)
class SuctionTerms:
    """The pressure at the pump's inlet and each term it is made of (arrays or floats, SI).

    ``inlet = reservoir - lift - friction - fittings - strainer - velocity_head`` [Pa]; ``velocity``
    [m/s] and ``reynolds`` [-] of the line flow.
    """

    inlet: Number  # absolute [Pa]
    reservoir: Number  # [Pa]
    lift: Number  # ρ g z [Pa] (negative when flooded)
    friction: Number  # [Pa]
    fittings: Number  # [Pa]
    strainer: Number  # [Pa]
    velocity_head: Number  # [Pa]
    velocity: Number  # [m/s]
    reynolds: Number  # [-]

    #: Names of the terms that lower the pressure, in the order of the formula.
    TERMS = ("lift", "friction", "fittings", "strainer", "velocity_head")


def suction_terms(flow: ArrayLike, viscosity: ArrayLike, density: ArrayLike, diameter: float,
                  length: float, lift: float = 0.0, reservoir_pressure: float = STANDARD_ATMOSPHERE,
                  k_re: float = 0.0, k_inf: float = 0.0, strainer: tuple[float, float, float] | None = None,
                  strainer_law: str = "laminar", roughness: float = 0.0) -> SuctionTerms:
    r"""The inlet pressure of a pump fed through a suction line, term by term.

    .. math::

        p_{in} = p_{res} - \rho g z - f \frac{L}{d}\frac{\rho v^2}{2}
                 - \left(\frac{\sum K_1}{Re} + \sum K_\infty\right)\frac{\rho v^2}{2}
                 - \Delta p_{strainer} - \frac{\rho v^2}{2}

    Parameters
    ----------
    flow : array
        Flow the pump draws Q [m³/s], >= 0.
    viscosity : array
        Kinematic viscosity ν of the oil in the line [m²/s], > 0.
    density : array
        Density ρ [kg/m³], > 0.
    diameter : float
        Inner diameter d [m], > 0.
    length : float
        Length L [m], >= 0.
    lift : float, optional
        Height z of the pump's inlet above the oil level [m]; negative when flooded. Default 0.
    reservoir_pressure : float, optional
        Absolute pressure on the oil in the reservoir [Pa]; default one standard atmosphere.
    k_re, k_inf : float, optional
        Sums of the fittings' coefficients (see :class:`Fitting`) [-].
    strainer : (float, float, float), optional
        Strainer stated drop [Pa], flow [m³/s] and viscosity [m²/s]; None: no strainer.
    strainer_law : str, optional
        ``"laminar"`` or ``"turbulent"``, see :func:`strainer_drop`.
    roughness : float, optional
        Absolute roughness of the line ε [m]; 0 (smooth) by default.

    Returns
    -------
    SuctionTerms
        The terms [Pa]; ``inlet`` is not clipped at zero: at or below 0 it is below vacuum, and the line
        cannot feed the pump.

    Examples
    --------
    VG 46 at 1500 mm²/s (about −10 °C), 40 L/min through 1.5 m of 25 mm line, 0.5 m lift:

    >>> t = suction_terms(40 / 60000, 1500e-6, 870.0, 0.025, 1.5, lift=0.5)
    >>> round(t.friction), round(t.lift), round(t.inlet)
    (136116, 4266, -39860)

    References
    ----------
    Crane TP-410 (from memory); :func:`darcy_drop`, :func:`fittings_drop`, :func:`strainer_drop`.
    """
    q = np.asarray(flow, float)
    nu = np.asarray(viscosity, float)
    rho = np.asarray(density, float)
    positive(float(diameter), "diameter")
    non_negative(float(length), "length")
    positive(rho, "density")
    v = q * (4.0 / math.pi) / (diameter * diameter)
    re = np.asarray(reynolds_number(v, diameter, nu))
    re_safe = np.maximum(re, 1e-12)
    f = np.asarray(friction_factor(re_safe, roughness / diameter))
    head = 0.5 * rho * v * v
    friction = f * (length / diameter) * head
    fit = (k_re / re_safe + k_inf) * head
    strain = (np.asarray(strainer_drop(q, nu, *strainer, law=strainer_law)) if strainer is not None
              else np.zeros_like(head))
    lift_p = rho * G * lift
    inlet = reservoir_pressure - lift_p - friction - fit - strain - head
    return SuctionTerms(plain(inlet), reservoir_pressure, plain(lift_p), plain(friction), plain(fit), plain(strain),
                        plain(head), plain(v), plain(re))


def suction_pressure(flow: ArrayLike, diameter: ArrayLike, length: ArrayLike, viscosity: ArrayLike,
                     density: ArrayLike, lift: ArrayLike = 0.0, k: ArrayLike = 0.0,
                     reservoir_pressure: ArrayLike = STANDARD_ATMOSPHERE) -> Number:
    r"""Absolute pressure at a pump's inlet fed through a straight suction line (cell-function form).

    .. math:: p_{in} = p_{res} - \rho g z - \left(f \frac{L}{d} + K + 1\right) \frac{\rho v^2}{2}

    Parameters
    ----------
    flow : array
        Flow the pump draws Q [m³/s], >= 0.
    diameter : array
        Inner diameter d [m], > 0.
    length : array
        Length L [m], >= 0.
    viscosity : array
        Kinematic viscosity ν [m²/s], > 0.
    density : array
        Density ρ [kg/m³], > 0.
    lift : array, optional
        Height of the pump's inlet above the oil level z [m]; negative when flooded. Default 0.
    k : array, optional
        Sum of the fittings' (and strainer's) loss coefficients K [-], >= 0. Default 0.
    reservoir_pressure : array, optional
        Absolute pressure on the oil in the reservoir [Pa], > 0; default one standard atmosphere.

    Returns
    -------
    float or array
        p_in [Pa], absolute. Not clipped at zero: a value at or below 0 is below vacuum, a sign that the
        line cannot feed the pump at all (the oil column breaks and the pump runs starved).

    Examples
    --------
    >>> round(suction_pressure(40 / 60000, 0.032, 2.0, 46e-6, 870.0, 0.3, 1.5))
    95945

    References
    ----------
    :func:`line_pressure_drop`; :func:`velocity_head`.
    """
    p_res = np.asarray(reservoir_pressure, float)
    positive(p_res, "reservoir_pressure")
    drop = np.asarray(line_pressure_drop(flow, diameter, length, viscosity, density, k))
    v = np.asarray(line_velocity(flow, diameter))
    rho = np.asarray(density, float)
    return plain(p_res - rho * G * np.asarray(lift, float) - drop - 0.5 * rho * v * v)
