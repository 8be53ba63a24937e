"""Hydraulic fluid properties: viscosity grades, viscosity-temperature, viscosity
index, density, specific heat and thermal conductivity.

Everything is SI inside (kinematic viscosity [m^2/s], temperature [K], pressure
gauge [Pa], density [kg/m^3]); the standards' own units (mm^2/s, degC) appear
only inside the formulas.  Every function accepts scalars or numpy arrays and
returns a float for scalar input and an array otherwise.

Contents
--------
- ISO 3448 viscosity grades: :data:`ISO_VG_GRADES`, :func:`iso_grade_viscosity`.
- ASTM D341 viscosity-temperature: :func:`d341_coefficients`, :func:`d341_fit`,
  :func:`kinematic_viscosity_d341`, :func:`temperature_d341`.
- ASTM D2270 viscosity index: :func:`viscosity_index`, :func:`nu100_from_vi`,
  :func:`d2270_basic_values`.
- Density with thermal expansion and compressibility: :func:`density`.
- Cragoe correlations for petroleum oils: :func:`specific_heat_cragoe`,
  :func:`thermal_conductivity_cragoe`, :func:`specific_gravity_60F`.
- Barus pressure-viscosity factor: :func:`viscosity_pressure_factor`.
- Functions of a :class:`heatload.model.Fluid`: :func:`fluid_from_grade`,
  :func:`kinematic_viscosity`, :func:`dynamic_viscosity`, :func:`fluid_density`,
  :func:`fluid_specific_heat`, :func:`fluid_thermal_conductivity`,
  :func:`temperature_for_viscosity`, :func:`check_temperature`,
  :func:`validate_fluid`, :func:`fluid_d341`, and example fluids :data:`PRESETS`.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from heatload.errors import HeatloadError
from heatload.model import Fluid

#: 0 degC [K]
T0_CELSIUS = 273.15
#: 15 degC, reference temperature of ``Fluid.density_15C`` [K]
T_REF_DENSITY = 288.15
#: 60 degF [K], reference temperature of the specific gravity 60/60 degF
T_60F = (60.0 - 32.0) / 1.8 + T0_CELSIUS
#: Density of air-free water at 60 degF and 1 atm [kg/m^3] (IAPWS-95: 999.017;
#: the petroleum tables' 999.016 is the same to 1 ppm)
WATER_DENSITY_60F = 999.016

_MM2 = 1e-6  # 1 mm^2/s (cSt) in m^2/s


def _out(x):
    """Return a float for a 0-d result, else the array (keeps scalar in, scalar out)."""
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def _arr(x, field, what="a finite number"):
    a = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(a)):
        raise HeatloadError(f"expected {what}, got {x!r}", field=field)
    return a


# ---------------------------------------------------------------------------
# ISO 3448 viscosity grades
# ---------------------------------------------------------------------------

#: ISO 3448 viscosity grades of industrial liquid lubricants: grade ->
#: (mid-point, minimum, maximum) kinematic viscosity at 40 degC [m^2/s].
#: The limits are the mid-point +-10 % (ISO 3448:1992, Table 1).
ISO_VG_GRADES: dict[int, tuple[float, float, float]] = {
    g: (g * _MM2, 0.9 * g * _MM2, 1.1 * g * _MM2)
    for g in (10, 15, 22, 32, 46, 68, 100, 150)
}


def iso_grade_viscosity(grade) -> tuple[float, float, float]:
    """Kinematic viscosity at 40 degC of an ISO 3448 viscosity grade.

    nu_mid = VG [mm^2/s]; nu_min = 0.9 nu_mid; nu_max = 1.1 nu_mid.

    Parameters
    ----------
    grade : int
        The ISO VG number, one of :data:`ISO_VG_GRADES` (10 ... 150).

    Returns
    -------
    (mid, low, high) : tuple of float
        Mid-point and limits at 40 degC [m^2/s].

    Raises
    ------
    HeatloadError
        Unknown grade (field ``fluid.iso_grade``), listing the valid grades.

    Notes
    -----
    Only the grades hydraulic systems commonly use are tabulated.

    References
    ----------
    ISO 3448:1992, Industrial liquid lubricants -- ISO viscosity classification.

    Examples
    --------
    >>> [round(v * 1e6, 1) for v in iso_grade_viscosity(46)]
    [46.0, 41.4, 50.6]
    """
    try:
        key = int(grade)
    except (TypeError, ValueError):
        key = None
    if key is None or key != grade or key not in ISO_VG_GRADES:
        valid = ", ".join(str(g) for g in ISO_VG_GRADES)
        raise HeatloadError(f"unknown ISO VG grade {grade!r}; expected one of {valid}",
                            field="fluid.iso_grade")
    return ISO_VG_GRADES[key]


# ---------------------------------------------------------------------------
# ASTM D341 viscosity-temperature relation
# ---------------------------------------------------------------------------

def _z_of_nu(nu_cst, low_viscosity):
    z = nu_cst + 0.7
    if low_viscosity:
        n = nu_cst
        z = (z + np.exp(-1.14883 - 2.65868 * n) - np.exp(-0.0038138 - 12.5645 * n)
             + np.exp(5.46491 - 37.6289 * n) - np.exp(13.0458 - 74.6851 * n)
             + np.exp(37.4262 - 192.643 * n) - np.exp(80.4945 - 400.468 * n))
    return z


def _nu_of_z(z, low_viscosity):
    x = z - 0.7
    if low_viscosity:
        x = x - np.exp(-0.7487 - 3.295 * x + 0.6119 * x ** 2 - 0.3193 * x ** 3)
    return x


def d341_coefficients(T1, nu1, T2, nu2, low_viscosity=False):
    """Constants A, B of the ASTM D341 line through two viscosity points.

    log10 log10 Z = A - B log10 T,  Z = nu + 0.7  (nu in mm^2/s, T in K), so
    B = (w1 - w2) / (log10 T2 - log10 T1),  A = w1 + B log10 T1,  w = log10 log10 Z.

    Parameters
    ----------
    T1, T2 : float or array
        Temperatures of the two points [K], different.
    nu1, nu2 : float or array
        Kinematic viscosities at T1, T2 [m^2/s].
    low_viscosity : bool
        Use the standard's extended Z (correction terms below 2 mm^2/s).

    Returns
    -------
    (A, B) : tuple of float or array
        D341 constants [-] (for nu in mm^2/s and T in K).

    Raises
    ------
    HeatloadError
        Equal temperatures, non-positive temperature or viscosity.

    Notes
    -----
    Z = nu + 0.7 is valid above about 2 mm^2/s; below, pass
    ``low_viscosity=True``.  Extrapolation far beyond the two points (or below
    the pour point) is not reliable.

    References
    ----------
    ASTM D341, Standard Practice for Viscosity-Temperature Equations and
    Charts for Liquid Petroleum or Hydrocarbon Products.

    Examples
    --------
    >>> A, B = d341_coefficients(313.15, 32e-6, 373.15, 5.4e-6)
    >>> round(A, 3), round(B, 3)
    (9.531, 3.747)
    """
    T1 = _arr(T1, "T1"); T2 = _arr(T2, "T2")
    n1 = _arr(nu1, "nu1") / _MM2; n2 = _arr(nu2, "nu2") / _MM2
    if np.any(T1 <= 0) or np.any(T2 <= 0):
        raise HeatloadError("temperatures must be above 0 K", field="temperature")
    if np.any(n1 <= 0) or np.any(n2 <= 0):
        raise HeatloadError("kinematic viscosities must be positive", field="viscosity")
    if np.any(T1 == T2):
        raise HeatloadError("the two points need different temperatures", field="temperature")
    w1 = np.log10(np.log10(_z_of_nu(n1, low_viscosity)))
    w2 = np.log10(np.log10(_z_of_nu(n2, low_viscosity)))
    B = (w1 - w2) / (np.log10(T2) - np.log10(T1))
    A = w1 + B * np.log10(T1)
    return _out(A), _out(B)


def d341_fit(points, low_viscosity=False):
    """Least-squares ASTM D341 line through two or more viscosity points.

    Minimises sum (w_i - (A - B log10 T_i))^2 with w = log10 log10 (nu + 0.7).

    Parameters
    ----------
    points : sequence of (T [K], nu [m^2/s])
        At least two points at two or more different temperatures.
    low_viscosity : bool
        Use the standard's extended Z below 2 mm^2/s.

    Returns
    -------
    (A, B) : tuple of float
        D341 constants [-].

    Raises
    ------
    HeatloadError
        Fewer than two distinct temperatures, non-positive values, or a fit
        with viscosity rising with temperature (field ``fluid.viscosity_points``).

    Notes
    -----
    Through exactly two points the fit equals :func:`d341_coefficients`.

    References
    ----------
    ASTM D341 (the straight line on the viscosity-temperature chart).
    """
    field = "fluid.viscosity_points"
    try:
        pts = np.asarray(points, dtype=float)
    except (TypeError, ValueError):
        raise HeatloadError("expected pairs (temperature [K], viscosity [m^2/s])",
                            field=field) from None
    if pts.ndim != 2 or pts.shape[1] != 2 or pts.shape[0] < 2:
        raise HeatloadError("expected at least two pairs (temperature [K], viscosity [m^2/s])",
                            field=field)
    if not np.all(np.isfinite(pts)) or np.any(pts <= 0):
        raise HeatloadError("temperatures and viscosities must be positive finite numbers",
                            field=field)
    T, nu = pts[:, 0], pts[:, 1] / _MM2
    if np.unique(T).size < 2:
        raise HeatloadError("the points need at least two different temperatures", field=field)
    x = np.log10(T)
    w = np.log10(np.log10(_z_of_nu(nu, low_viscosity)))
    slope, intercept = np.polyfit(x, w, 1)
    if slope >= 0:
        raise HeatloadError("viscosity must fall as temperature rises", field=field)
    return float(intercept), float(-slope)


def kinematic_viscosity_d341(T, A, B, low_viscosity=False):
    """Kinematic viscosity from the ASTM D341 constants.

    nu = 10^(10^(A - B log10 T)) - 0.7  [mm^2/s]

    Parameters
    ----------
    T : float or array
        Temperature [K].
    A, B : float
        D341 constants from :func:`d341_coefficients` or :func:`d341_fit`.
    low_viscosity : bool
        Apply the standard's inverse correction below 2 mm^2/s.

    Returns
    -------
    float or array
        Kinematic viscosity [m^2/s].

    Notes
    -----
    Without ``low_viscosity`` valid above about 2 mm^2/s (the 0.7 constant);
    the correction terms (remembered from the 2009 edition, checked here by
    the consistency of its forward and inverse forms: 0.4 % at 0.5 mm^2/s,
    0.1 % from 0.8 to 3 mm^2/s) extend it down to about 0.5 mm^2/s.

    References
    ----------
    ASTM D341.

    Examples
    --------
    >>> A, B = d341_coefficients(313.15, 32e-6, 373.15, 5.4e-6)
    >>> round(kinematic_viscosity_d341(353.15, A, B) * 1e6, 2)
    8.53
    """
    T = np.asarray(T, dtype=float)
    z = 10.0 ** (10.0 ** (A - B * np.log10(T)))
    return _out(_nu_of_z(z, low_viscosity) * _MM2)


def temperature_d341(nu, A, B, low_viscosity=False):
    """Temperature at which the D341 line has viscosity *nu* (closed-form inverse).

    T = 10^((A - log10 log10 Z) / B),  Z = nu + 0.7 (nu in mm^2/s)

    Parameters
    ----------
    nu : float or array
        Kinematic viscosity [m^2/s], above 0.3 mm^2/s (Z > 1).
    A, B : float
        D341 constants.
    low_viscosity : bool
        Use the extended Z below 2 mm^2/s.

    Returns
    -------
    float or array
        Temperature [K].

    Raises
    ------
    HeatloadError
        Viscosity too low for the D341 form (field ``viscosity``).

    References
    ----------
    ASTM D341.
    """
    n = _arr(nu, "viscosity") / _MM2
    z = _z_of_nu(n, low_viscosity)
    if np.any(z <= 1.0):
        raise HeatloadError("kinematic viscosity must be above 0.3 mm^2/s for ASTM D341",
                            field="viscosity")
    return _out(10.0 ** ((A - np.log10(np.log10(z))) / B))


# ---------------------------------------------------------------------------
# ASTM D2270 viscosity index
# ---------------------------------------------------------------------------

# ASTM D2270 Table 1: Y = kinematic viscosity at 100 degC [mm^2/s], L and H =
# kinematic viscosities at 40 degC [mm^2/s] of the VI 0 and VI 100 reference
# oils with that Y.  Rows "Y L H".  Checked for typing errors by: the
# standard's worked example (H(5.05) = 28.97 by interpolation), continuity at
# 70 mm^2/s with the standard's quadratic formulas for Y > 70, agreement with
# the standard's Appendix X2 quadratic fits, and smooth second differences
# (see tests/test_oil.py).
_D2270_TABLE_TEXT = """
2.00 7.994 6.394  2.10 8.640 6.894  2.20 9.309 7.410  2.30 10.00 7.944
2.40 10.71 8.496  2.50 11.45 9.063  2.60 12.21 9.647  2.70 13.00 10.25
2.80 13.80 10.87  2.90 14.63 11.50  3.00 15.49 12.15  3.10 16.36 12.82
3.20 17.26 13.51  3.30 18.18 14.21  3.40 19.12 14.93  3.50 20.09 15.66
3.60 21.08 16.42  3.70 22.09 17.19  3.80 23.13 17.97  3.90 24.19 18.77
4.00 25.32 19.56  4.10 26.50 20.37  4.20 27.75 21.21  4.30 29.07 22.05
4.40 30.48 22.92  4.50 31.96 23.81  4.60 33.52 24.71  4.70 35.13 25.63
4.80 36.79 26.57  4.90 38.50 27.53  5.00 40.23 28.49  5.10 41.99 29.46
5.20 43.76 30.43  5.30 45.53 31.40  5.40 47.31 32.37  5.50 49.09 33.34
5.60 50.87 34.32  5.70 52.64 35.29  5.80 54.42 36.26  5.90 56.20 37.23
6.00 57.97 38.19  6.10 59.74 39.17  6.20 61.52 40.15  6.30 63.32 41.13
6.40 65.18 42.14  6.50 67.12 43.18  6.60 69.16 44.24  6.70 71.29 45.33
6.80 73.48 46.44  6.90 75.72 47.51  7.00 78.00 48.57  7.10 80.25 49.61
7.20 82.39 50.69  7.30 84.53 51.78  7.40 86.66 52.88  7.50 88.85 53.98
7.60 91.04 55.09  7.70 93.20 56.20  7.80 95.43 57.31  7.90 97.72 58.45
8.00 100.0 59.60  8.10 102.3 60.74  8.20 104.6 61.89  8.30 106.9 63.05
8.40 109.2 64.18  8.50 111.5 65.32  8.60 113.9 66.48  8.70 116.2 67.64
8.80 118.5 68.79  8.90 120.9 69.94  9.00 123.3 71.10  9.10 125.7 72.27
9.20 128.0 73.42  9.30 130.4 74.57  9.40 132.8 75.73  9.50 135.3 76.91
9.60 137.7 78.08  9.70 140.1 79.27  9.80 142.7 80.46  9.90 145.2 81.67
10.0 147.7 82.87  10.1 150.3 84.08  10.2 152.9 85.30  10.3 155.4 86.51
10.4 158.0 87.72  10.5 160.6 88.95  10.6 163.2 90.19  10.7 165.8 91.40
10.8 168.5 92.65  10.9 171.2 93.92  11.0 173.9 95.19  11.1 176.6 96.45
11.2 179.4 97.71  11.3 182.1 98.97  11.4 184.9 100.2  11.5 187.6 101.5
11.6 190.4 102.8  11.7 193.3 104.1  11.8 196.2 105.4  11.9 199.0 106.7
12.0 201.9 108.0  12.1 204.8 109.4  12.2 207.8 110.7  12.3 210.7 112.0
12.4 213.6 113.3  12.5 216.6 114.7  12.6 219.6 116.0  12.7 222.6 117.4
12.8 225.7 118.7  12.9 228.8 120.1  13.0 231.9 121.5  13.1 235.0 122.9
13.2 238.1 124.2  13.3 241.2 125.6  13.4 244.3 127.0  13.5 247.4 128.4
13.6 250.6 129.8  13.7 253.8 131.2  13.8 257.0 132.6  13.9 260.1 134.0
14.0 263.3 135.4  14.1 266.6 136.8  14.2 269.8 138.2  14.3 273.0 139.6
14.4 276.3 141.0  14.5 279.6 142.4  14.6 283.0 143.9  14.7 286.4 145.3
14.8 289.7 146.8  14.9 293.0 148.2  15.0 296.5 149.7  15.1 300.0 151.2
15.2 303.4 152.6  15.3 306.9 154.1  15.4 310.3 155.6  15.5 313.9 157.0
15.6 317.5 158.6  15.7 321.1 160.1  15.8 324.6 161.6  15.9 328.3 163.1
16.0 331.9 164.6  16.1 335.5 166.1  16.2 339.2 167.7  16.3 342.9 169.2
16.4 346.6 170.7  16.5 350.3 172.3  16.6 354.1 173.8  16.7 358.0 175.4
16.8 361.7 177.0  16.9 365.6 178.6  17.0 369.4 180.2  17.1 373.3 181.7
17.2 377.1 183.3  17.3 381.0 184.9  17.4 384.9 186.5  17.5 388.9 188.1
17.6 392.7 189.7  17.7 396.7 191.3  17.8 400.7 192.9  17.9 404.6 194.6
18.0 408.6 196.2  18.1 412.6 197.8  18.2 416.7 199.4  18.3 420.7 201.0
18.4 424.9 202.6  18.5 429.0 204.3  18.6 433.2 205.9  18.7 437.3 207.6
18.8 441.5 209.3  18.9 445.7 211.0  19.0 449.9 212.7  19.1 454.2 214.4
19.2 458.4 216.1  19.3 462.7 217.7  19.4 467.0 219.4  19.5 471.3 221.1
19.6 475.7 222.8  19.7 479.7 224.5  19.8 483.9 226.2  19.9 488.6 227.7
20.0 493.2 229.5  20.2 501.5 233.0  20.4 510.8 236.4  20.6 519.9 240.1
20.8 528.8 243.5  21.0 538.4 247.1  21.2 547.5 250.7  21.4 556.7 254.2
21.6 566.4 257.8  21.8 575.6 261.5  22.0 585.2 264.9  22.2 595.0 268.6
22.4 604.3 272.3  22.6 614.2 275.8  22.8 624.1 279.6  23.0 633.6 283.3
23.2 643.4 286.8  23.4 653.8 290.5  23.6 663.3 294.4  23.8 673.7 297.9
24.0 683.9 301.8  24.2 694.5 305.6  24.4 704.2 309.4  24.6 714.9 313.0
24.8 725.7 317.0  25.0 736.5 320.9  25.2 747.2 324.9  25.4 758.2 328.8
25.6 769.3 332.7  25.8 779.7 336.7  26.0 790.4 340.5  26.2 801.6 344.4
26.4 812.8 348.4  26.6 824.1 352.3  26.8 835.5 356.4  27.0 847.0 360.5
27.2 857.5 364.6  27.4 869.0 368.3  27.6 880.6 372.3  27.8 892.3 376.4
28.0 904.1 380.6  28.2 915.8 384.6  28.4 927.6 388.8  28.6 938.6 393.0
28.8 951.2 396.6  29.0 963.4 401.1  29.2 975.4 405.3  29.4 987.1 409.5
29.6 998.9 413.5  29.8 1011 417.6   30.0 1023 421.7   30.5 1055 432.4
31.0 1086 443.2   31.5 1119 454.0   32.0 1151 464.9   32.5 1184 475.9
33.0 1217 487.0   33.5 1251 498.1   34.0 1286 509.6   34.5 1321 521.1
35.0 1356 532.5   35.5 1391 544.0   36.0 1427 555.6   36.5 1464 567.1
37.0 1501 579.3   37.5 1538 591.3   38.0 1575 603.1   38.5 1613 615.0
39.0 1651 627.1   39.5 1691 639.2   40.0 1730 651.8   40.5 1770 664.2
41.0 1810 676.6   41.5 1851 689.1   42.0 1892 701.9   42.5 1935 714.9
43.0 1978 728.2   43.5 2021 741.3   44.0 2064 754.4   44.5 2108 767.6
45.0 2152 780.9   45.5 2197 794.5   46.0 2243 808.2   46.5 2288 821.9
47.0 2333 835.5   47.5 2380 849.2   48.0 2426 863.0   48.5 2473 876.9
49.0 2521 890.9   49.5 2570 905.3   50.0 2618 919.6   50.5 2667 933.6
51.0 2717 948.2   51.5 2767 962.9   52.0 2817 977.5   52.5 2867 992.1
53.0 2918 1007    53.5 2969 1021    54.0 3020 1036    54.5 3073 1051
55.0 3126 1066    55.5 3180 1082    56.0 3233 1097    56.5 3286 1112
57.0 3340 1127    57.5 3396 1143    58.0 3452 1159    58.5 3507 1175
59.0 3563 1190    59.5 3619 1206    60.0 3676 1222    60.5 3734 1238
61.0 3792 1254    61.5 3850 1270    62.0 3908 1286    62.5 3966 1303
63.0 4026 1319    63.5 4087 1336    64.0 4147 1352    64.5 4207 1369
65.0 4268 1386    65.5 4329 1402    66.0 4392 1419    66.5 4455 1436
67.0 4517 1454    67.5 4580 1471    68.0 4645 1488    68.5 4709 1506
69.0 4773 1523    69.5 4839 1541    70.0 4905 1558
"""

#: ASTM D2270 Table 1 as an array of rows (Y, L, H) [mm^2/s], Y from 2 to 70.
D2270_TABLE: np.ndarray = np.array(_D2270_TABLE_TEXT.split(), dtype=float).reshape(-1, 3)
D2270_TABLE.setflags(write=False)


def d2270_basic_values(nu100):
    """ASTM D2270 basic values L and H for a kinematic viscosity at 100 degC.

    2 <= Y <= 70 mm^2/s: linear interpolation in Table 1.
    Y > 70 mm^2/s: L = 0.8353 Y^2 + 14.67 Y - 216,  H = 0.1684 Y^2 + 11.85 Y - 97.

    Parameters
    ----------
    nu100 : float or array
        Kinematic viscosity at 100 degC, Y [m^2/s].

    Returns
    -------
    (L, H) : tuple of float or array
        Kinematic viscosities at 40 degC of the VI 0 and VI 100 reference oils
        with the same Y [m^2/s].

    Raises
    ------
    HeatloadError
        Y below 2 mm^2/s (VI undefined; field ``fluid.nu100``).

    References
    ----------
    ASTM D2270, Standard Practice for Calculating Viscosity Index from
    Kinematic Viscosity at 40 and 100 degC, Table 1 and section 5.
    """
    Y = _arr(nu100, "fluid.nu100") / _MM2
    if np.any(Y < 2.0 - 1e-9):
        raise HeatloadError("viscosity index is undefined below 2 mm^2/s at 100 degC "
                            f"(got {np.min(Y):.4g} mm^2/s)", field="fluid.nu100")
    y_t, l_t, h_t = D2270_TABLE.T
    L = np.where(Y <= 70.0, np.interp(Y, y_t, l_t), 0.8353 * Y ** 2 + 14.67 * Y - 216.0)
    H = np.where(Y <= 70.0, np.interp(Y, y_t, h_t), 0.1684 * Y ** 2 + 11.85 * Y - 97.0)
    return _out(L * _MM2), _out(H * _MM2)


def _vi_mm2(U, Y):
    """VI from U, Y in mm^2/s (arrays, Y >= 2 already checked)."""
    y_t, l_t, h_t = D2270_TABLE.T
    L = np.where(Y <= 70.0, np.interp(Y, y_t, l_t), 0.8353 * Y ** 2 + 14.67 * Y - 216.0)
    H = np.where(Y <= 70.0, np.interp(Y, y_t, h_t), 0.1684 * Y ** 2 + 11.85 * Y - 97.0)
    low = 100.0 * (L - U) / (L - H)
    with np.errstate(divide="ignore", invalid="ignore"):
        N = (np.log10(H) - np.log10(U)) / np.log10(Y)
        high = (10.0 ** N - 1.0) / 0.00715 + 100.0
    return np.where(U >= H, low, high)


def viscosity_index(nu40, nu100):
    """Viscosity index by ASTM D2270 (procedures A and B).

    U >= H (VI <= 100): VI = 100 (L - U) / (L - H)
    U <  H (VI > 100):  VI = (10^N - 1) / 0.00715 + 100,  N = (log H - log U) / log Y
    with U = nu40, Y = nu100 in mm^2/s and L, H from :func:`d2270_basic_values`.

    Parameters
    ----------
    nu40 : float or array
        Kinematic viscosity at 40 degC, U [m^2/s].
    nu100 : float or array
        Kinematic viscosity at 100 degC, Y [m^2/s], at least 2 mm^2/s and
        below nu40.

    Returns
    -------
    float or array
        Viscosity index [-], not rounded (the standard reports the nearest
        whole number).

    Raises
    ------
    HeatloadError
        nu100 < 2 mm^2/s or nu100 >= nu40 (field ``fluid.nu100``), non-positive
        nu40 (field ``fluid.nu40``).

    References
    ----------
    ASTM D2270, sections 5 and 6 (Equations 1 to 4).

    Examples
    --------
    >>> round(viscosity_index(22.83e-6, 5.05e-6))
    156
    """
    U = _arr(nu40, "fluid.nu40") / _MM2
    Y = _arr(nu100, "fluid.nu100") / _MM2
    if np.any(U <= 0):
        raise HeatloadError("kinematic viscosity at 40 degC must be positive", field="fluid.nu40")
    if np.any(Y < 2.0 - 1e-9):
        raise HeatloadError("viscosity index is undefined below 2 mm^2/s at 100 degC "
                            f"(got {np.min(Y):.4g} mm^2/s)", field="fluid.nu100")
    if np.any(Y >= U):
        raise HeatloadError("viscosity at 100 degC must be below the viscosity at 40 degC",
                            field="fluid.nu100")
    return _out(_vi_mm2(U, Y))


def nu100_from_vi(nu40, vi, iterations=60):
    """Kinematic viscosity at 100 degC giving viscosity index *vi* with *nu40*
    (ASTM D2270 solved for Y).

    Solves VI(U, Y) = vi for Y by bisection in log Y between 2 mm^2/s and U,
    element by element and vectorised (VI rises monotonically with Y at fixed U).

    Parameters
    ----------
    nu40 : float or array
        Kinematic viscosity at 40 degC [m^2/s].
    vi : float or array
        Viscosity index [-].
    iterations : int
        Bisection steps; 60 halve the bracket to ~1e-18 of its log width.

    Returns
    -------
    float or array
        Kinematic viscosity at 100 degC [m^2/s].

    Raises
    ------
    HeatloadError
        No Y >= 2 mm^2/s gives that VI (field ``fluid.viscosity_index``).

    References
    ----------
    ASTM D2270 (inverse use of its equations).

    Examples
    --------
    >>> round(nu100_from_vi(22.83e-6, 156.0) * 1e6, 2)
    5.05
    """
    U = _arr(nu40, "fluid.nu40") / _MM2
    target = _arr(vi, "fluid.viscosity_index")
    U, target = np.broadcast_arrays(U, target)
    if np.any(U <= 2.0):
        raise HeatloadError("kinematic viscosity at 40 degC must exceed 2 mm^2/s",
                            field="fluid.nu40")
    lo = np.full(U.shape, math.log(2.0))
    hi = np.log(U) - 1e-12
    f_lo = _vi_mm2(U, np.exp(lo)) - target
    f_hi = _vi_mm2(U, np.exp(hi)) - target
    if np.any(f_lo > 0) or np.any(f_hi < 0) or not np.all(np.isfinite(f_lo + f_hi)):
        raise HeatloadError(
            f"no viscosity at 100 degC of at least 2 mm^2/s gives VI {vi!r} with "
            f"{nu40!r} m^2/s at 40 degC", field="fluid.viscosity_index")
    for _ in range(int(iterations)):
        mid = 0.5 * (lo + hi)
        above = _vi_mm2(U, np.exp(mid)) > target
        hi = np.where(above, mid, hi)
        lo = np.where(above, lo, mid)
    return _out(np.exp(0.5 * (lo + hi)) * _MM2)


# ---------------------------------------------------------------------------
# Density, specific heat, conductivity, pressure-viscosity
# ---------------------------------------------------------------------------

def density(T, density_15C, expansion_coefficient, pressure=0.0, bulk_modulus=1.6e9):
    """Oil density with thermal expansion and compression.

    rho = rho15 / (1 + alpha (T - 288.15)) / (1 - p / K)

    Parameters
    ----------
    T : float or array
        Temperature [K].
    density_15C : float
        Density at 15 degC and atmospheric pressure [kg/m^3].
    expansion_coefficient : float
        Volumetric thermal expansion coefficient alpha [1/K].
    pressure : float or array
        Gauge pressure p [Pa].
    bulk_modulus : float
        Isothermal secant bulk modulus K [Pa].

    Returns
    -------
    float or array
        Density [kg/m^3].

    Notes
    -----
    The pressure term follows the definition of the secant modulus,
    K = V0 p / (V0 - V), i.e. V = V0 (1 - p/K); it differs from the
    linearised (1 + p/K) by (p/K)^2, 0.05 % at 350 bar.  Linear expansion in
    temperature is adequate between about -20 and 120 degC for mineral oils.

    References
    ----------
    Merritt, H. E., Hydraulic Control Systems, Wiley 1967, ch. 2 (bulk
    modulus and expansion of fluids).

    Examples
    --------
    >>> round(density(313.15, 870.0, 7e-4), 2)
    855.04
    """
    T = np.asarray(T, dtype=float)
    p = np.asarray(pressure, dtype=float)
    return _out(density_15C / (1.0 + expansion_coefficient * (T - T_REF_DENSITY))
                / (1.0 - p / bulk_modulus))


def specific_gravity_60F(density_15C, expansion_coefficient=7.0e-4):
    """Specific gravity 60/60 degF of an oil from its density at 15 degC.

    d = rho15 / (1 + alpha (T60F - 288.15)) / rho_water(60 degF)

    Parameters
    ----------
    density_15C : float or array
        Density at 15 degC [kg/m^3].
    expansion_coefficient : float
        Volumetric expansion [1/K], to move from 15 degC to 60 degF (15.56 degC).

    Returns
    -------
    float or array
        Specific gravity [-].

    Notes
    -----
    The 0.56 K shift changes d by about 0.04 %; water at 60 degF is
    999.016 kg/m^3.

    References
    ----------
    IAPWS-95 for the water density; ASTM D1250 (petroleum measurement tables)
    for the 60/60 degF convention.

    Examples
    --------
    >>> round(specific_gravity_60F(870.0), 4)
    0.8705
    """
    rho = np.asarray(density_15C, dtype=float)
    rho60 = rho / (1.0 + expansion_coefficient * (T_60F - T_REF_DENSITY))
    return _out(rho60 / WATER_DENSITY_60F)


def specific_heat_cragoe(T, specific_gravity):
    """Specific heat of a petroleum oil by Cragoe.

    c_p = (1.685 + 0.00339 t) / sqrt(d)  [kJ/(kg K)],  t in degC

    Parameters
    ----------
    T : float or array
        Temperature [K].
    specific_gravity : float or array
        Specific gravity 60/60 degF, d [-].

    Returns
    -------
    float or array
        Specific heat [J/(kg K)].

    Notes
    -----
    For petroleum (mineral) oils, roughly -20 to 200 degC and d 0.75 to 0.96;
    accuracy a few percent.  Not for water-glycol or other water-based fluids.

    References
    ----------
    Cragoe, C. S., Thermal Properties of Petroleum Products, US Bureau of
    Standards Miscellaneous Publication 97, 1929.

    Examples
    --------
    >>> round(specific_heat_cragoe(313.15, 0.87))
    1952
    """
    t = np.asarray(T, dtype=float) - T0_CELSIUS
    d = np.asarray(specific_gravity, dtype=float)
    return _out(1e3 * (1.685 + 0.00339 * t) / np.sqrt(d))


def thermal_conductivity_cragoe(T, specific_gravity):
    """Thermal conductivity of a petroleum oil by Cragoe.

    k = (0.1173 / d) (1 - 0.00054 t)  [W/(m K)],  t in degC

    Parameters
    ----------
    T : float or array
        Temperature [K].
    specific_gravity : float or array
        Specific gravity 60/60 degF, d [-].

    Returns
    -------
    float or array
        Thermal conductivity [W/(m K)].

    Notes
    -----
    Petroleum oils, about 0 to 200 degC; accuracy about 10 %.  The constant
    0.1173 W/(m K) is the SI form of the original, from memory.

    References
    ----------
    Cragoe, C. S., US Bureau of Standards Misc. Publ. 97, 1929.

    Examples
    --------
    >>> round(thermal_conductivity_cragoe(313.15, 0.87), 3)
    0.132
    """
    t = np.asarray(T, dtype=float) - T0_CELSIUS
    d = np.asarray(specific_gravity, dtype=float)
    return _out(0.1173 / d * (1.0 - 0.00054 * t))


def viscosity_pressure_factor(pressure, alpha=2.0e-8):
    """Barus pressure-viscosity factor mu(p) / mu(0).

    mu(p) / mu(0) = exp(alpha p)

    Parameters
    ----------
    pressure : float or array
        Gauge pressure p [Pa].
    alpha : float
        Pressure-viscosity coefficient [1/Pa]; mineral oils about 1.5e-8 to
        2.5e-8 at 40 degC (common practice, from memory), lower when hot;
        water-glycol about 0.3e-8.

    Returns
    -------
    float or array
        Factor on the dynamic viscosity [-].

    Notes
    -----
    Barus' exponential over-predicts above about 100 MPa; at hydraulic
    pressures (< 40 MPa) it raises viscosity by up to about 2x.

    References
    ----------
    Barus, C., Isothermals, isopiestics and isometrics relative to viscosity,
    Am. J. Sci. 45 (1893) 87-96.

    Examples
    --------
    >>> round(viscosity_pressure_factor(20e6), 3)
    1.492
    """
    p = np.asarray(pressure, dtype=float)
    return _out(np.exp(alpha * p))


# ---------------------------------------------------------------------------
# Functions of a Fluid
# ---------------------------------------------------------------------------

def fluid_from_grade(grade, viscosity_index=100.0, **fields) -> Fluid:
    """A mineral hydraulic oil of an ISO grade and viscosity index.

    nu40 = ISO 3448 mid-point; nu100 from ASTM D2270 (:func:`nu100_from_vi`).

    Parameters
    ----------
    grade : int
        ISO VG grade, one of :data:`ISO_VG_GRADES`.
    viscosity_index : float
        VI [-]; 100 is a typical HM oil, 140 to 160 an HV oil (common practice).
    **fields
        Further :class:`~heatload.model.Fluid` fields (``density_15C``,
        ``temperature_max``, ``name`` ...).

    Returns
    -------
    Fluid
        Validated fluid.

    Raises
    ------
    HeatloadError
        Unknown grade, unreachable VI or invalid further fields.

    References
    ----------
    ISO 3448; ASTM D2270.

    Examples
    --------
    >>> f = fluid_from_grade(46, 100)
    >>> round(f.nu100 * 1e6, 2)
    6.76
    """
    mid, _, _ = iso_grade_viscosity(grade)
    nu100 = nu100_from_vi(mid, viscosity_index)
    fields.setdefault("name", f"ISO VG {grade} mineral oil, VI {viscosity_index:g}")
    fields.setdefault("kind", "mineral")
    fluid = Fluid(iso_grade=int(grade), nu40=mid, nu100=float(nu100),
                  viscosity_index=float(viscosity_index), **fields)
    validate_fluid(fluid)
    return fluid


@lru_cache(maxsize=512)
def fluid_d341(fluid: Fluid) -> tuple[float, float]:
    """ASTM D341 constants (A, B) of a fluid, cached per (frozen) fluid.

    From ``viscosity_points`` by :func:`d341_fit` when given, else through
    (40 degC, nu40) and (100 degC, nu100) by :func:`d341_coefficients`.

    Parameters
    ----------
    fluid : Fluid

    Returns
    -------
    (A, B) : tuple of float

    References
    ----------
    ASTM D341.
    """
    if fluid.viscosity_points:
        return d341_fit(fluid.viscosity_points)
    A, B = d341_coefficients(313.15, fluid.nu40, 373.15, fluid.nu100)
    return float(A), float(B)


def kinematic_viscosity(fluid: Fluid, T):
    """Kinematic viscosity of *fluid* at temperature *T* (ASTM D341).

    nu = 10^(10^(A - B log10 T)) - 0.7 [mm^2/s], A, B from :func:`fluid_d341`.

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature [K].

    Returns
    -------
    float or array
        Kinematic viscosity [m^2/s].

    References
    ----------
    ASTM D341.

    Examples
    --------
    >>> round(kinematic_viscosity(Fluid(), 313.15) * 1e6, 6)
    46.0
    """
    A, B = fluid_d341(fluid)
    return kinematic_viscosity_d341(T, A, B)


def fluid_density(fluid: Fluid, T, pressure=0.0):
    """Density of *fluid* at *T* and gauge *pressure* (see :func:`density`).

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature [K].
    pressure : float or array
        Gauge pressure [Pa].

    Returns
    -------
    float or array
        Density [kg/m^3].
    """
    return density(T, fluid.density_15C, fluid.expansion_coefficient, pressure,
                   fluid.bulk_modulus)


def dynamic_viscosity(fluid: Fluid, T, pressure=0.0, pressure_viscosity_coefficient=0.0):
    """Dynamic viscosity of *fluid*.

    mu = nu(T) rho(T, p) exp(alpha_p p)

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature [K].
    pressure : float or array
        Gauge pressure [Pa]; by default acts on the density only.
    pressure_viscosity_coefficient : float
        Barus alpha [1/Pa]; 0 (default) leaves out the pressure-viscosity
        effect, 2e-8 is typical of mineral oil (:func:`viscosity_pressure_factor`).

    Returns
    -------
    float or array
        Dynamic viscosity [Pa s].

    References
    ----------
    ASTM D341; Barus (1893).
    """
    mu = np.asarray(kinematic_viscosity(fluid, T)) * np.asarray(fluid_density(fluid, T, pressure))
    if pressure_viscosity_coefficient:
        mu = mu * np.asarray(viscosity_pressure_factor(pressure, pressure_viscosity_coefficient))
    return _out(mu)


def _cragoe_allowed(fluid: Fluid, field: str) -> None:
    if fluid.kind == "water-glycol":
        raise HeatloadError("the petroleum-oil correlation does not apply to water-glycol; "
                            "give the fluid's value from its datasheet", field=field)


def fluid_specific_heat(fluid: Fluid, T):
    """Specific heat of *fluid*: the given value, else Cragoe.

    c_p = fluid.specific_heat, or (1.685 + 0.00339 t)/sqrt(d) kJ/(kg K).

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature [K].

    Returns
    -------
    float or array
        Specific heat [J/(kg K)], shaped like *T*.

    Raises
    ------
    HeatloadError
        A water-glycol fluid without ``specific_heat`` (field ``fluid.specific_heat``).

    References
    ----------
    Cragoe (1929), see :func:`specific_heat_cragoe`.
    """
    if fluid.specific_heat is not None:
        return _out(np.full(np.shape(T), float(fluid.specific_heat)))
    _cragoe_allowed(fluid, "fluid.specific_heat")
    d = specific_gravity_60F(fluid.density_15C, fluid.expansion_coefficient)
    return specific_heat_cragoe(T, d)


def fluid_thermal_conductivity(fluid: Fluid, T):
    """Thermal conductivity of *fluid*: the given value, else Cragoe.

    k = fluid.thermal_conductivity, or (0.1173/d)(1 - 0.00054 t) W/(m K).

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature [K].

    Returns
    -------
    float or array
        Thermal conductivity [W/(m K)], shaped like *T*.

    Raises
    ------
    HeatloadError
        A water-glycol fluid without ``thermal_conductivity``.

    References
    ----------
    Cragoe (1929), see :func:`thermal_conductivity_cragoe`.
    """
    if fluid.thermal_conductivity is not None:
        return _out(np.full(np.shape(T), float(fluid.thermal_conductivity)))
    _cragoe_allowed(fluid, "fluid.thermal_conductivity")
    d = specific_gravity_60F(fluid.density_15C, fluid.expansion_coefficient)
    return thermal_conductivity_cragoe(T, d)


def temperature_for_viscosity(fluid: Fluid, nu):
    """Temperature at which *fluid* has kinematic viscosity *nu* (inverse D341).

    T = 10^((A - log10 log10 (nu + 0.7)) / B), nu in mm^2/s.

    Parameters
    ----------
    fluid : Fluid
    nu : float or array
        Kinematic viscosity [m^2/s].

    Returns
    -------
    float or array
        Temperature [K].

    References
    ----------
    ASTM D341.

    Examples
    --------
    >>> round(temperature_for_viscosity(Fluid(), 46e-6) - 273.15, 6)
    40.0
    """
    A, B = fluid_d341(fluid)
    return temperature_d341(nu, A, B)


def check_temperature(fluid: Fluid, T) -> list[str]:
    """Warnings for temperatures outside the fluid's allowed range.

    Parameters
    ----------
    fluid : Fluid
    T : float or array
        Temperature(s) [K].

    Returns
    -------
    list of str
        Empty when every temperature is within temperature_min..temperature_max.
    """
    t = np.asarray(T, dtype=float)
    out = []
    if t.size == 0:
        return out
    lo, hi = float(np.nanmin(t)), float(np.nanmax(t))
    if hi > fluid.temperature_max:
        out.append(f"oil temperature {hi - T0_CELSIUS:.1f} degC is above the limit "
                   f"{fluid.temperature_max - T0_CELSIUS:.1f} degC of {fluid.name}")
    if lo < fluid.temperature_min:
        out.append(f"oil temperature {lo - T0_CELSIUS:.1f} degC is below the limit "
                   f"{fluid.temperature_min - T0_CELSIUS:.1f} degC of {fluid.name}")
    return out


def validate_fluid(fluid: Fluid) -> Fluid:
    """Reject physically impossible fluid data.

    Parameters
    ----------
    fluid : Fluid

    Returns
    -------
    Fluid
        The same fluid, when valid.

    Raises
    ------
    HeatloadError
        Naming the field (``fluid.nu100`` ...) and what was expected:
        non-positive or non-finite viscosities, nu100 >= nu40, density outside
        500..2000 kg/m^3, expansion outside 0..5e-3 1/K, non-positive bulk
        modulus, specific heat or conductivity, temperatures at or below 0 K or
        temperature_min >= temperature_max, bad viscosity points, or a
        water-glycol fluid without its specific heat and conductivity.
    """
    def num(name):
        v = getattr(fluid, name)
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
            raise HeatloadError(f"expected a finite number, got {v!r}", field=f"fluid.{name}")
        return float(v)

    nu40, nu100 = num("nu40"), num("nu100")
    if not fluid.viscosity_points:
        if nu40 <= 0:
            raise HeatloadError(f"kinematic viscosity at 40 degC must be positive, got {nu40!r} m^2/s",
                                field="fluid.nu40")
        if nu100 <= 0:
            raise HeatloadError(f"kinematic viscosity at 100 degC must be positive, got {nu100!r} m^2/s",
                                field="fluid.nu100")
        if nu100 >= nu40:
            raise HeatloadError(f"viscosity at 100 degC ({nu100 * 1e6:g} mm^2/s) must be below "
                                f"the viscosity at 40 degC ({nu40 * 1e6:g} mm^2/s)",
                                field="fluid.nu100")
    else:
        d341_fit(fluid.viscosity_points)
    rho = num("density_15C")
    if not 500.0 <= rho <= 2000.0:
        raise HeatloadError(f"density at 15 degC must be 500..2000 kg/m^3, got {rho!r}",
                            field="fluid.density_15C")
    a = num("expansion_coefficient")
    if not 0.0 <= a <= 5e-3:
        raise HeatloadError(f"expansion coefficient must be 0..5e-3 1/K, got {a!r}",
                            field="fluid.expansion_coefficient")
    if num("bulk_modulus") <= 0:
        raise HeatloadError("bulk modulus must be positive", field="fluid.bulk_modulus")
    for name in ("specific_heat", "thermal_conductivity"):
        if getattr(fluid, name) is not None and num(name) <= 0:
            raise HeatloadError(f"{name.replace('_', ' ')} must be positive",
                                field=f"fluid.{name}")
        if getattr(fluid, name) is None and fluid.kind == "water-glycol":
            raise HeatloadError(f"a water-glycol fluid needs its {name.replace('_', ' ')} "
                                "(the petroleum-oil correlation does not apply)",
                                field=f"fluid.{name}")
    tmin, tmax = num("temperature_min"), num("temperature_max")
    if tmin <= 0:
        raise HeatloadError(f"temperature must be above 0 K, got {tmin!r} K",
                            field="fluid.temperature_min")
    if tmax <= 0:
        raise HeatloadError(f"temperature must be above 0 K, got {tmax!r} K",
                            field="fluid.temperature_max")
    if tmin >= tmax:
        raise HeatloadError(f"temperature_min ({tmin:g} K) must be below temperature_max "
                            f"({tmax:g} K)", field="fluid.temperature_min")
    return fluid


#: Example fluids (invented generic types; typical values, from memory).
#: Water-glycol and ester viscosities are given as points, as their
#: datasheets do; mineral oils by grade and VI.
PRESETS: dict[str, Fluid] = {
    "HM 32 mineral": Fluid(name="HM 32 mineral oil (VI 100)", iso_grade=32, nu40=32e-6,
                           nu100=5.4e-6, density_15C=870.0),
    "HM 46 mineral": Fluid(name="HM 46 mineral oil (VI 100)", iso_grade=46, nu40=46e-6,
                           nu100=6.8e-6, density_15C=875.0),
    "HM 68 mineral": Fluid(name="HM 68 mineral oil (VI 100)", iso_grade=68, nu40=68e-6,
                           nu100=8.7e-6, density_15C=880.0),
    "HV 46 mineral": Fluid(name="HV 46 mineral oil (VI 150)", iso_grade=46, nu40=46e-6,
                           nu100=8.2e-6, density_15C=865.0, temperature_min=243.15),
    "water-glycol HFC 46": Fluid(
        name="water-glycol HFC 46 (typical)", iso_grade=46, nu40=46e-6, nu100=8.6e-6,
        density_15C=1080.0, expansion_coefficient=6.5e-4, bulk_modulus=3.0e9,
        specific_heat=3300.0, thermal_conductivity=0.40,
        temperature_min=253.15, temperature_max=323.15,
        viscosity_points=((273.15, 350e-6), (293.15, 110e-6), (313.15, 46e-6),
                          (323.15, 32e-6)),
        kind="water-glycol"),
    "synthetic ester HEES 46": Fluid(
        name="synthetic ester HEES 46 (typical)", iso_grade=46, nu40=46e-6, nu100=9.2e-6,
        density_15C=920.0, expansion_coefficient=7.5e-4, bulk_modulus=1.8e9,
        specific_heat=2000.0, thermal_conductivity=0.15,
        temperature_min=248.15, temperature_max=363.15,
        viscosity_points=((273.15, 330e-6), (313.15, 46e-6), (373.15, 9.2e-6)),
        kind="ester"),
}
