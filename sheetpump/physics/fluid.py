"""Hydraulic oil: viscosity against temperature, viscosity index, ISO viscosity grades and density.

Pure functions of SI numbers or numpy arrays (they broadcast like numpy): kinematic viscosity ν in
m²/s, temperature T in K, density ρ in kg/m³, dynamic viscosity μ in Pa·s. The standards write their
relations in mm²/s (cSt); the conversion happens inside each function.

References
----------
.. [1] ASTM D341, Standard Practice for Viscosity-Temperature Equations and Charts for Liquid Petroleum
   or Hydrocarbon Products (the Walther relation).
.. [2] ASTM D2270, Standard Practice for Calculating Viscosity Index from Kinematic Viscosity at 40 °C
   and 100 °C (identical in substance to ISO 2909).
.. [3] ISO 3448, Industrial liquid lubricants -- ISO viscosity classification.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from .validate import plain, positive, require

__all__ = [
    "ISO_VG_GRADES",
    "MINERAL_OIL_DENSITY_15",
    "MINERAL_OIL_EXPANSION",
    "T40",
    "T100",
    "density_at",
    "dynamic_viscosity",
    "iso_vg_limits",
    "nu100_from_vi",
    "oil_points_from_grade",
    "temperature_for_viscosity",
    "vg_viscosity",
    "viscosity_at",
    "viscosity_from_points",
    "viscosity_index",
    "walther_coefficients",
]

Number = float | np.ndarray

#: The two reference temperatures of ASTM D2270 and ISO 3448 [K].
T40 = 313.15
T100 = 373.15

_MM2 = 1e-6  # m²/s per mm²/s
_WALTHER_SHIFT = 0.7  # mm²/s, the constant of ASTM D341's simple form
# Below this the double logarithm is undefined (log10(ν + 0.7) must be > 0).
_WALTHER_FLOOR = 1.0 - _WALTHER_SHIFT  # mm²/s
_SAME_TEMPERATURE = 1e-3  # K; two points closer than this are one point


def _mm2(nu: ArrayLike) -> Number:
    return np.asarray(nu, dtype=float) * 1e6 if isinstance(nu, np.ndarray) else float(nu) * 1e6


def _walther_z(nu_mm2: Number, argument: str) -> Number:
    require(nu_mm2 > _WALTHER_FLOOR, argument,
             "is too low for the ASTM D341 relation (must be above 0.3 mm²/s)")
    return np.log10(np.log10(nu_mm2 + _WALTHER_SHIFT))


def _absolute(t: Number, argument: str) -> None:
    require(t > 0, argument, "must be above absolute zero (-273.15 °C)")


def walther_coefficients(nu1: Number, t1: Number, nu2: Number, t2: Number) -> tuple[Number, Number]:
    r"""Constants A and B of the ASTM D341 (Walther) relation through two viscosity points.

    .. math:: \log_{10}\log_{10}(\nu + 0.7) = A - B \log_{10} T

    with ν in mm²/s and T in K. Through two points (ν₁, T₁) and (ν₂, T₂), with
    Z = log10(log10(ν + 0.7)):

    .. math:: B = \frac{Z_1 - Z_2}{\log_{10} T_2 - \log_{10} T_1}, \qquad A = Z_1 + B \log_{10} T_1

    This is the simple form of ASTM D341, good for ν ≥ 2 mm²/s; below that the standard adds
    correction terms to the 0.7, which are not applied here.

    Parameters
    ----------
    nu1 : float or array
        Kinematic viscosity at the first temperature [m²/s].
    t1 : float or array
        First temperature [K].
    nu2 : float or array
        Kinematic viscosity at the second temperature [m²/s].
    t2 : float or array
        Second temperature [K], at least 0.001 K away from ``t1``.

    Returns
    -------
    A : float or array
        Intercept [-] (for ν in mm²/s and T in K).
    B : float or array
        Slope [-], > 0 since viscosity falls as temperature rises.

    Raises
    ------
    PhysicsError
        For a viscosity or temperature that is not positive, equal temperatures, or a viscosity that
        does not fall as temperature rises.

    Examples
    --------
    An ISO VG 46 oil with 46 mm²/s at 40 °C and 6.8 mm²/s at 100 °C:

    >>> A, B = walther_coefficients(46e-6, 313.15, 6.8e-6, 373.15)
    >>> round(A, 4), round(B, 4)
    (9.418, 3.6844)

    References
    ----------
    ASTM D341.
    """
    positive(nu1, "nu1")
    _absolute(t1, "t1")
    positive(nu2, "nu2")
    _absolute(t2, "t2")
    # Temperatures converted from other units (104 °F) land a rounding error away from 313.15 K.
    require(np.abs(t2 - t1) > _SAME_TEMPERATURE, "t2",
             "must differ from t1 (two different temperatures are needed)")
    z1 = _walther_z(_mm2(nu1), "nu1")
    z2 = _walther_z(_mm2(nu2), "nu2")
    log_t1 = np.log10(t1)
    b = (z1 - z2) / (np.log10(t2) - log_t1)
    # Equal viscosities or a viscosity that rises with temperature describe no mineral oil.
    require(b > 0, "nu2", "must be below nu1 when t2 is above t1, and above it when t2 is below "
             "(viscosity falls as temperature rises)")
    a = z1 + b * log_t1
    return plain(a), plain(b)


def viscosity_at(temperature: Number, nu1: Number, t1: Number, nu2: Number, t2: Number) -> Number:
    r"""Kinematic viscosity at a temperature from two known points, by ASTM D341 (Walther).

    .. math:: \nu = 10^{10^{A - B \log_{10} T}} - 0.7

    with ν in mm²/s, T in K and A, B from :func:`walther_coefficients`. Between the two points this
    interpolates; outside them it extrapolates along the same straight line of the ASTM D341 chart.

    Parameters
    ----------
    temperature : float or array
        Temperature at which the viscosity is wanted [K].
    nu1, t1 : float or array
        First known point: kinematic viscosity [m²/s] at temperature [K].
    nu2, t2 : float or array
        Second known point: kinematic viscosity [m²/s] at temperature [K].

    Returns
    -------
    float or array
        Kinematic viscosity ν [m²/s].

    Examples
    --------
    The VG 46 oil above at 60 °C, in mm²/s:

    >>> round(viscosity_at(333.15, 46e-6, 313.15, 6.8e-6, 373.15) * 1e6, 2)
    20.62

    References
    ----------
    ASTM D341.
    """
    _absolute(temperature, "temperature")
    a, b = walther_coefficients(nu1, t1, nu2, t2)
    nu_mm2 = 10.0 ** (10.0 ** (a - b * np.log10(temperature))) - _WALTHER_SHIFT
    return plain(nu_mm2 * _MM2)


def viscosity_from_points(nu1: Number, t1: Number, nu2: Number, t2: Number, temperature: Number) -> Number:
    r"""Kinematic viscosity at a temperature from two known points (ASTM D341), points first.

    .. math:: \nu = 10^{10^{A - B \log_{10} T}} - 0.7

    with ν in mm²/s, T in K and A, B the Walther line through (T1, ν1) and (T2, ν2)
    (:func:`walther_coefficients`): :func:`viscosity_at` in the argument order of a cell.

    Parameters
    ----------
    nu1, t1 : float or array
        First known point: kinematic viscosity [m²/s] at temperature [K].
    nu2, t2 : float or array
        Second known point: kinematic viscosity [m²/s] at temperature [K].
    temperature : float or array
        Temperature at which the viscosity is wanted [K].

    Returns
    -------
    float or array
        Kinematic viscosity ν [m²/s].

    Examples
    --------
    >>> round(viscosity_from_points(46e-6, 313.15, 6.8e-6, 373.15, 333.15) * 1e6, 2)
    20.62

    References
    ----------
    ASTM D341.
    """
    return viscosity_at(temperature, nu1, t1, nu2, t2)


def temperature_for_viscosity(nu: Number, nu1: Number, t1: Number, nu2: Number, t2: Number) -> Number:
    r"""Temperature at which an oil has a given kinematic viscosity (ASTM D341 solved for T).

    .. math:: T = 10^{(A - \log_{10}\log_{10}(\nu + 0.7)) / B}

    with ν in mm²/s, T in K. Handy for a viscosity window: the temperature at which the oil reaches a
    pump's cold-start maximum or short-term minimum viscosity.

    Parameters
    ----------
    nu : float or array
        Kinematic viscosity wanted [m²/s], above 0.3 mm²/s.
    nu1, t1 : float or array
        First known point: kinematic viscosity [m²/s] at temperature [K].
    nu2, t2 : float or array
        Second known point: kinematic viscosity [m²/s] at temperature [K].

    Returns
    -------
    float or array
        Temperature T [K].

    Examples
    --------
    The VG 46 oil above reaches 1000 mm²/s at about -6.1 °C:

    >>> round(temperature_for_viscosity(1000e-6, 46e-6, 313.15, 6.8e-6, 373.15) - 273.15, 1)
    -6.1

    References
    ----------
    ASTM D341.
    """
    positive(nu, "nu")
    a, b = walther_coefficients(nu1, t1, nu2, t2)
    z = _walther_z(_mm2(nu), "nu")
    return plain(10.0 ** ((a - z) / b))


# ASTM D2270, Table 1: L and H [mm²/s] against the kinematic viscosity at 100 °C, Y [mm²/s], in steps of
# 0.1 from 2.0 to 20.0, 0.2 to 30.0 and 0.5 to 70.0. L belongs to the oil series of VI 0, H to VI 100.
_TABLE_NU100 = np.concatenate((np.arange(20, 200) / 10, np.arange(100, 150) / 5, np.arange(60, 141) / 2))
_TABLE_L = np.array((
     7.994,  8.640,  9.309,  10.00,  10.71,  11.45,  12.21,  13.00,  13.80,  14.63,  # from 2.00
     15.49,  16.36,  17.26,  18.18,  19.12,  20.09,  21.08,  22.09,  23.13,  24.19,  # from 3.00
     25.32,  26.50,  27.75,  29.07,  30.48,  31.96,  33.52,  35.13,  36.79,  38.50,  # from 4.00
     40.23,  41.99,  43.76,  45.53,  47.31,  49.09,  50.87,  52.64,  54.42,  56.20,  # from 5.00
     57.97,  59.74,  61.52,  63.32,  65.18,  67.12,  69.16,  71.29,  73.48,  75.72,  # from 6.00
     78.00,  80.25,  82.39,  84.53,  86.66,  88.85,  91.04,  93.20,  95.43,  97.72,  # from 7.00
     100.0,  102.3,  104.6,  106.9,  109.2,  111.5,  113.9,  116.2,  118.5,  120.9,  # from 8.00
     123.3,  125.7,  128.0,  130.4,  132.8,  135.3,  137.7,  140.1,  142.7,  145.2,  # from 9.00
     147.7,  150.3,  152.9,  155.4,  158.0,  160.6,  163.2,  165.8,  168.5,  171.2,  # from 10.0
     173.9,  176.6,  179.4,  182.1,  184.9,  187.6,  190.4,  193.3,  196.2,  199.0,  # from 11.0
     201.9,  204.8,  207.8,  210.7,  213.6,  216.6,  219.6,  222.6,  225.7,  228.8,  # from 12.0
     231.9,  235.0,  238.1,  241.2,  244.3,  247.4,  250.6,  253.8,  257.0,  260.1,  # from 13.0
     263.3,  266.6,  269.8,  273.0,  276.3,  279.6,  283.0,  286.4,  289.7,  293.0,  # from 14.0
     296.5,  300.0,  303.4,  306.9,  310.3,  313.9,  317.5,  321.1,  324.6,  328.3,  # from 15.0
     331.9,  335.5,  339.2,  342.9,  346.6,  350.3,  354.1,  358.0,  361.7,  365.6,  # from 16.0
     369.4,  373.3,  377.1,  381.0,  384.9,  388.9,  392.7,  396.7,  400.7,  404.6,  # from 17.0
     408.6,  412.6,  416.7,  420.7,  424.9,  429.0,  433.2,  437.3,  441.5,  445.7,  # from 18.0
     449.9,  454.2,  458.4,  462.7,  467.0,  471.3,  475.7,  479.7,  483.9,  488.6,  # from 19.0
     493.2,  501.5,  510.8,  519.9,  528.8,  538.4,  547.5,  556.7,  566.4,  575.6,  # from 20.0
     585.2,  595.0,  604.3,  614.2,  624.1,  633.6,  643.4,  653.8,  663.3,  673.7,  # from 22.0
     683.9,  694.5,  704.2,  714.9,  725.7,  736.5,  747.2,  758.2,  769.3,  779.7,  # from 24.0
     790.4,  801.6,  812.8,  824.1,  835.5,  847.0,  857.5,  869.0,  880.6,  892.3,  # from 26.0
     904.1,  915.8,  927.6,  938.6,  951.2,  963.4,  975.4,  987.1,  998.9,   1011,  # from 28.0
      1023,   1055,   1086,   1119,   1151,   1184,   1217,   1251,   1286,   1321,  # from 30.0
      1356,   1391,   1427,   1464,   1501,   1538,   1575,   1613,   1651,   1691,  # from 35.0
      1730,   1770,   1810,   1851,   1892,   1935,   1978,   2021,   2064,   2108,  # from 40.0
      2152,   2197,   2243,   2288,   2333,   2380,   2426,   2473,   2521,   2570,  # from 45.0
      2618,   2667,   2717,   2767,   2817,   2867,   2918,   2969,   3020,   3073,  # from 50.0
      3126,   3180,   3233,   3286,   3340,   3396,   3452,   3507,   3563,   3619,  # from 55.0
      3676,   3734,   3792,   3850,   3908,   3966,   4026,   4087,   4147,   4207,  # from 60.0
      4268,   4329,   4392,   4455,   4517,   4580,   4645,   4709,   4773,   4839,  # from 65.0
      4905,  # from 70.0
))
_TABLE_H = np.array((
     6.394,  6.894,  7.410,  7.944,  8.496,  9.063,  9.647,  10.25,  10.87,  11.50,  # from 2.00
     12.15,  12.82,  13.51,  14.21,  14.93,  15.66,  16.42,  17.19,  17.97,  18.77,  # from 3.00
     19.56,  20.37,  21.21,  22.05,  22.92,  23.81,  24.71,  25.63,  26.57,  27.53,  # from 4.00
     28.49,  29.46,  30.43,  31.40,  32.37,  33.34,  34.32,  35.29,  36.26,  37.23,  # from 5.00
     38.19,  39.17,  40.15,  41.13,  42.14,  43.18,  44.24,  45.33,  46.44,  47.51,  # from 6.00
     48.57,  49.61,  50.69,  51.78,  52.88,  53.98,  55.09,  56.20,  57.31,  58.45,  # from 7.00
     59.60,  60.74,  61.89,  63.05,  64.18,  65.32,  66.48,  67.64,  68.79,  69.94,  # from 8.00
     71.10,  72.27,  73.42,  74.57,  75.73,  76.91,  78.08,  79.27,  80.46,  81.67,  # from 9.00
     82.87,  84.08,  85.30,  86.51,  87.72,  88.95,  90.19,  91.40,  92.65,  93.92,  # from 10.0
     95.19,  96.45,  97.71,  98.97,  100.2,  101.5,  102.8,  104.1,  105.4,  106.7,  # from 11.0
     108.0,  109.4,  110.7,  112.0,  113.3,  114.7,  116.0,  117.4,  118.7,  120.1,  # from 12.0
     121.5,  122.9,  124.2,  125.6,  127.0,  128.4,  129.8,  131.2,  132.6,  134.0,  # from 13.0
     135.4,  136.8,  138.2,  139.6,  141.0,  142.4,  143.9,  145.3,  146.8,  148.2,  # from 14.0
     149.7,  151.2,  152.6,  154.1,  155.6,  157.0,  158.6,  160.1,  161.6,  163.1,  # from 15.0
     164.6,  166.1,  167.7,  169.2,  170.7,  172.3,  173.8,  175.4,  177.0,  178.6,  # from 16.0
     180.2,  181.7,  183.3,  184.9,  186.5,  188.1,  189.7,  191.3,  192.9,  194.6,  # from 17.0
     196.2,  197.8,  199.4,  201.0,  202.6,  204.3,  205.9,  207.6,  209.3,  211.0,  # from 18.0
     212.7,  214.4,  216.1,  217.7,  219.4,  221.1,  222.8,  224.5,  226.2,  227.7,  # from 19.0
     229.5,  233.0,  236.4,  240.1,  243.5,  247.1,  250.7,  254.2,  257.8,  261.5,  # from 20.0
     264.9,  268.6,  272.3,  275.8,  279.6,  283.3,  286.8,  290.5,  294.4,  297.9,  # from 22.0
     301.8,  305.6,  309.4,  313.0,  317.0,  320.9,  324.9,  328.8,  332.7,  336.7,  # from 24.0
     340.5,  344.4,  348.4,  352.3,  356.4,  360.5,  364.6,  368.3,  372.3,  376.4,  # from 26.0
     380.6,  384.6,  388.8,  393.0,  396.6,  401.1,  405.3,  409.5,  413.5,  417.6,  # from 28.0
     421.7,  432.4,  443.2,  454.0,  464.9,  475.9,  487.0,  498.1,  509.6,  521.1,  # from 30.0
     532.5,  544.0,  555.6,  567.1,  579.3,  591.3,  603.1,  615.0,  627.1,  639.2,  # from 35.0
     651.8,  664.2,  676.6,  689.1,  701.9,  714.9,  728.2,  741.3,  754.4,  767.6,  # from 40.0
     780.9,  794.5,  808.2,  821.9,  835.5,  849.2,  863.0,  876.9,  890.9,  905.3,  # from 45.0
     919.6,  933.6,  948.2,  962.9,  977.5,  992.1,   1007,   1021,   1036,   1051,  # from 50.0
      1066,   1082,   1097,   1112,   1127,   1143,   1159,   1175,   1190,   1206,  # from 55.0
      1222,   1238,   1254,   1270,   1286,   1303,   1319,   1336,   1352,   1369,  # from 60.0
      1386,   1402,   1419,   1436,   1454,   1471,   1488,   1506,   1523,   1541,  # from 65.0
      1558,  # from 70.0
))
_TABLE_TOP = 70.0  # mm²/s; above it the standard gives L and H by formulas
_VI_LOWEST_NU100 = 2.0  # mm²/s; ASTM D2270 defines no VI below this


def _l_and_h(y: Number) -> tuple[Number, Number]:
    """ASTM D2270 L and H [mm²/s] for ν100 = y ≥ 2 mm²/s: table (linear between rows), formulas above 70."""
    table_l = np.interp(y, _TABLE_NU100, _TABLE_L)
    table_h = np.interp(y, _TABLE_NU100, _TABLE_H)
    above = y > _TABLE_TOP
    formula_l = 0.8353 * y**2 + 14.67 * y - 216.0
    formula_h = 0.1684 * y**2 + 11.85 * y - 97.0
    return np.where(above, formula_l, table_l), np.where(above, formula_h, table_h)


def _vi_mm2(u: Number, y: Number) -> Number:
    # u = ν40, y = ν100, both mm²/s, y >= 2; no validation here (used inside the bisection).
    low, high = _l_and_h(y)
    procedure_a = (low - u) / (low - high) * 100.0
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        n = (np.log10(high) - np.log10(u)) / np.log10(y)
        procedure_b = (10.0**n - 1.0) / 0.00715 + 100.0
    return np.where(u > high, procedure_a, procedure_b)


def viscosity_index(nu40: Number, nu100: Number) -> Number:
    r"""Viscosity index (VI) of an oil from its kinematic viscosities at 40 °C and 100 °C, by ASTM D2270.

    With U = ν40 and Y = ν100 in mm²/s, L and H are the 40 °C viscosities of the reference oils of VI 0
    and VI 100 that have the same ν100 as the oil: from the standard's table for 2 ≤ Y ≤ 70 (linear
    between its rows) and above 70 mm²/s from

    .. math:: L = 0.8353 Y^2 + 14.67 Y - 216, \qquad H = 0.1684 Y^2 + 11.85 Y - 97

    Procedure A (U ≥ H, VI ≤ 100):

    .. math:: VI = \frac{L - U}{L - H} \cdot 100

    Procedure B (U < H, VI > 100):

    .. math:: N = \frac{\log_{10} H - \log_{10} U}{\log_{10} Y}, \qquad
              VI = \frac{10^N - 1}{0.00715} + 100

    The value is not rounded; the standard reports VI rounded to a whole number.

    Parameters
    ----------
    nu40 : float or array
        Kinematic viscosity at 40 °C [m²/s].
    nu100 : float or array
        Kinematic viscosity at 100 °C [m²/s], at least 2 mm²/s.

    Returns
    -------
    float or array
        Viscosity index VI [-].

    Examples
    --------
    The first worked example of ASTM D2270 (procedure A), ν40 = 73.30 and ν100 = 8.86 mm²/s, VI 92:

    >>> round(viscosity_index(73.30e-6, 8.86e-6))
    92

    The second worked example (procedure B), ν40 = 22.83 and ν100 = 5.05 mm²/s, VI 156 (from memory):

    >>> round(viscosity_index(22.83e-6, 5.05e-6))
    156

    References
    ----------
    ASTM D2270; ISO 2909.
    """
    positive(nu40, "nu40")
    positive(nu100, "nu100")
    u, y = _mm2(nu40), _mm2(nu100)
    require(y >= _VI_LOWEST_NU100, "nu100", "is below 2 mm²/s, where ASTM D2270 defines no viscosity index")
    return plain(_vi_mm2(u, y))


def nu100_from_vi(nu40: Number, vi: Number) -> Number:
    r"""Kinematic viscosity at 100 °C of an oil with a given ν40 and viscosity index (ASTM D2270 inverted).

    For a fixed ν40 the viscosity index of :func:`viscosity_index` rises steadily with ν100, so the
    ν100 with VI(ν40, ν100) = vi is found by bisection on log ν100 between 2 mm²/s (the lowest ν100 the
    standard covers) and ν40, for all elements at once.

    Parameters
    ----------
    nu40 : float or array
        Kinematic viscosity at 40 °C [m²/s].
    vi : float or array
        Viscosity index [-].

    Returns
    -------
    float or array
        Kinematic viscosity at 100 °C, ν100 [m²/s].

    Raises
    ------
    PhysicsError
        If no ν100 of at least 2 mm²/s (and below ν40) gives that VI.

    Notes
    -----
    The standard's table ends at ν100 = 70 mm²/s with L and H a little above its formulas, so the VI
    steps down by a few hundredths there; this only matters for oils with ν40 > 70 mm²/s and VI of
    several hundred, where the root found lies within that step.

    Examples
    --------
    An ISO VG 46 oil of VI 100 has about 6.76 mm²/s at 100 °C:

    >>> round(nu100_from_vi(46e-6, 100) * 1e6, 3)
    6.76

    References
    ----------
    ASTM D2270.
    """
    positive(nu40, "nu40")
    u = _mm2(nu40)
    vi = np.asarray(vi, dtype=float)
    u, vi = np.broadcast_arrays(np.asarray(u, dtype=float), vi)
    require(np.isfinite(vi), "vi", "must be a finite number")
    require(u > _VI_LOWEST_NU100, "nu40", "must be above 2 mm²/s for a viscosity index")
    lo = np.full(u.shape, np.log(_VI_LOWEST_NU100))
    hi = np.log(u) - 1e-12  # ν100 < ν40 for any oil
    require(_vi_mm2(u, np.exp(lo)) <= vi, "vi",
             "is too low for this viscosity at 40 °C (it would need a viscosity at 100 °C below 2 mm²/s)")
    require(_vi_mm2(u, np.exp(hi)) >= vi, "vi", "is too high for this viscosity at 40 °C")
    # 60 halvings of a bracket at most ln(3200/2) ≈ 7.4 wide reach below 1e-17: float resolution.
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        below = _vi_mm2(u, np.exp(mid)) < vi
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    return plain(np.exp(0.5 * (lo + hi)) * _MM2)


#: ISO 3448 viscosity grades: grade number -> mid-point kinematic viscosity at 40 °C [mm²/s]. The
#: grade number is the mid-point rounded; for VG 2 to VG 7 the mid-points are 2.2, 3.2, 4.6 and 6.8.
ISO_VG_GRADES: dict[int, float] = {
    2: 2.2, 3: 3.2, 5: 4.6, 7: 6.8, 10: 10.0, 15: 15.0, 22: 22.0, 32: 32.0, 46: 46.0, 68: 68.0,
    100: 100.0, 150: 150.0, 220: 220.0, 320: 320.0, 460: 460.0, 680: 680.0, 1000: 1000.0,
    1500: 1500.0, 2200: 2200.0, 3200: 3200.0,
}
_VG_NUMBERS = np.array(sorted(ISO_VG_GRADES), dtype=float)
_VG_MIDS = np.array([ISO_VG_GRADES[g] for g in sorted(ISO_VG_GRADES)])
_VG_TOLERANCE = 0.10  # ISO 3448: limits are the mid-point ±10 %


def iso_vg_limits(grade: Number) -> tuple[Number, Number, Number]:
    r"""Mid-point and limits of kinematic viscosity at 40 °C of an ISO 3448 viscosity grade.

    .. math:: \nu_{min} = 0.9\,\nu_{mid}, \qquad \nu_{max} = 1.1\,\nu_{mid}

    The mid-point is the grade number, except for VG 2, 3, 5 and 7, whose mid-points are 2.2, 3.2, 4.6
    and 6.8 mm²/s (the grade number is the mid-point rounded).

    Parameters
    ----------
    grade : float or array
        ISO VG number [-]: 2, 3, 5, 7, 10, 15, 22, 32, 46, 68, 100, 150, 220, 320, 460, 680, 1000, 1500,
        2200 or 3200.

    Returns
    -------
    nu40_mid, nu40_min, nu40_max : float or array
        Mid-point, minimum and maximum kinematic viscosity at 40 °C [m²/s].

    Examples
    --------
    >>> [round(v * 1e6, 2) for v in iso_vg_limits(46)]
    [46.0, 41.4, 50.6]

    References
    ----------
    ISO 3448.
    """
    g = np.asarray(grade, dtype=float)
    require(np.isin(g, _VG_NUMBERS), "grade",
             "is not an ISO 3448 viscosity grade (2, 3, 5, 7, 10, 15, 22, 32, 46, 68, 100, 150, 220, "
             "320, 460, 680, 1000, 1500, 2200, 3200)")
    mid = _VG_MIDS[np.searchsorted(_VG_NUMBERS, g)] * _MM2
    return plain(mid), plain(mid * (1 - _VG_TOLERANCE)), plain(mid * (1 + _VG_TOLERANCE))


def oil_points_from_grade(grade: Number, vi: Number) -> tuple[Number, float, Number, float]:
    """The two ASTM D341 points of an ISO VG oil of a given viscosity index.

    ν40 is the grade's mid-point (ISO 3448) and ν100 the viscosity at 100 °C that gives the viscosity
    index (ASTM D2270, :func:`nu100_from_vi`).

    Parameters
    ----------
    grade : float or array
        ISO VG number [-].
    vi : float or array
        Viscosity index [-].

    Returns
    -------
    nu40 : float or array
        Kinematic viscosity at 40 °C [m²/s].
    t40 : float
        313.15 K.
    nu100 : float or array
        Kinematic viscosity at 100 °C [m²/s].
    t100 : float
        373.15 K.

    Examples
    --------
    >>> nu40, t40, nu100, t100 = oil_points_from_grade(32, 100)
    >>> round(nu40 * 1e6, 2), t40, round(nu100 * 1e6, 3), t100
    (32.0, 313.15, 5.362, 373.15)

    References
    ----------
    ISO 3448; ASTM D2270.
    """
    nu40 = iso_vg_limits(grade)[0]
    return nu40, T40, nu100_from_vi(nu40, vi), T100


def vg_viscosity(grade: Number, vi: Number, temperature: Number) -> Number:
    r"""Kinematic viscosity at a temperature of an ISO VG oil of a given viscosity index.

    .. math:: \nu_{40} = \mathrm{VG}, \qquad \nu_{100} = \nu_{100}(\nu_{40}, \mathrm{VI}), \qquad
              \nu = 10^{10^{A - B \log_{10} T}} - 0.7

    The oil is taken at its grade's mid-point at 40 °C (ISO 3448), ν100 follows from the viscosity index
    (ASTM D2270, :func:`oil_points_from_grade`), and the ASTM D341 line through the two points
    (:func:`viscosity_at`) gives the viscosity at the temperature (ν in mm²/s, T in K).

    Parameters
    ----------
    grade : float or array
        ISO VG number [-].
    vi : float or array
        Viscosity index [-].
    temperature : float or array
        Oil temperature [K].

    Returns
    -------
    float or array
        Kinematic viscosity ν [m²/s].

    Examples
    --------
    An ISO VG 46 oil of VI 100 at 50 °C, in mm²/s:

    >>> round(vg_viscosity(46, 100, 323.15) * 1e6, 2)
    29.92

    References
    ----------
    ISO 3448; ASTM D2270; ASTM D341.
    """
    _absolute(temperature, "temperature")
    nu40, t40, nu100, t100 = oil_points_from_grade(grade, vi)
    return viscosity_at(temperature, nu40, t40, nu100, t100)


#: Density of mineral hydraulic oil at 15 °C [kg/m³], assumed where none is given: HM/HLP oils of ISO VG
#: 32 to 68 lie between about 860 and 880 kg/m³ (common practice).
MINERAL_OIL_DENSITY_15 = 870.0

#: Volumetric thermal expansion of mineral hydraulic oil [1/K]: common practice (hydraulics handbooks
#: give 6.5e-4 to 7e-4 1/K; from memory). Give the supplier's value where known.
MINERAL_OIL_EXPANSION = 6.5e-4
_T15 = 288.15  # K, the reference temperature of oil density (15 °C, ISO 3675 / ISO 12185)


def density_at(temperature: Number, density_15: Number, expansion: Number = MINERAL_OIL_EXPANSION) -> Number:
    r"""Density of an oil at a temperature from its density at 15 °C, with linear thermal expansion.

    .. math:: \rho(T) = \rho_{15} \left(1 - \alpha (T - 288.15\,\mathrm{K})\right)

    Parameters
    ----------
    temperature : float or array
        Oil temperature [K].
    density_15 : float or array
        Density at 15 °C [kg/m³].
    expansion : float or array, optional
        Volumetric thermal expansion coefficient α [1/K]; default :data:`MINERAL_OIL_EXPANSION`
        (6.5e-4 1/K, common practice for mineral oil).

    Returns
    -------
    float or array
        Density ρ [kg/m³].

    Examples
    --------
    A mineral oil of 870 kg/m³ at 15 °C, at 50 °C:

    >>> round(density_at(323.15, 870.0), 2)
    850.21

    References
    ----------
    Common practice (linear expansion; coefficient from memory, see :data:`MINERAL_OIL_EXPANSION`).
    """
    _absolute(temperature, "temperature")
    positive(density_15, "density_15")
    require(np.asarray(expansion) >= 0, "expansion", "must not be negative")
    rho = density_15 * (1.0 - expansion * (temperature - _T15))
    require(rho > 0, "temperature", "is too high for a linear thermal expansion (density would be <= 0)")
    return plain(rho)


def dynamic_viscosity(nu: Number, density: Number) -> Number:
    r"""Dynamic viscosity from kinematic viscosity and density.

    .. math:: \mu = \nu \cdot \rho

    Parameters
    ----------
    nu : float or array
        Kinematic viscosity ν [m²/s].
    density : float or array
        Density ρ [kg/m³].

    Returns
    -------
    float or array
        Dynamic viscosity μ [Pa·s].

    Examples
    --------
    46 mm²/s at 870 kg/m³ is 40.02 mPa·s:

    >>> round(dynamic_viscosity(46e-6, 870.0) * 1e3, 2)
    40.02

    References
    ----------
    Definition of kinematic viscosity (ISO 80000-4).
    """
    positive(nu, "nu")
    positive(density, "density")
    return nu * density
