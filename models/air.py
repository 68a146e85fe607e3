"""Dry-air properties and the standard atmosphere (troposphere); vectorized numpy, SI units.

Property fits (dry air, any pressure 50-120 kPa, 200-500 K)
------------------------------------------------------------
Viscosity and conductivity: ``ln y = a0 + a1 X + a2 X**2 + a3 X**3`` with ``X = ln(T / 300 K)``.
Specific heat: ``cp = b0 + b1 x + b2 x**2 + b3 x**3`` with ``x = (T - 300 K) / 100 K``.

The coefficients are a least-squares fit, made once and offline, to dry-air reference values
at 101.325 kPa and 180-520 K: the equation of state of Lemmon, Jacobsen, Penoncello & Friend,
J. Phys. Chem. Ref. Data 29 (2000) 331, and the transport correlations of Lemmon & Jacobsen,
Int. J. Thermophys. 25 (2004) 21, as evaluated by CoolProp 8.0 (``PropsSI``). CoolProp is not
used at run time; ``tests/test_air.py`` repeats the fit and checks the coefficients below.
Pressure is neglected in mu, k and cp (at 60 kPa that costs < 0.2 %). Density is the ideal
gas with R = 287.05 J/(kg K) (compressibility ignored: < 0.3 % at 200 K, 120 kPa).

Outside 200-500 K (or 50-120 kPa) the fits are extrapolated, smoothly (the log-log form follows
the kinetic-theory power law; deviation from the reference < 0.6 % at 100 K and 1000 K); the
caller tests :func:`air_in_range`. Non-physical input (T <= 0 or p <= 0) returns NaN.

Standard atmosphere
-------------------
U.S. Standard Atmosphere 1976 (identical to the ICAO / ISO 2533 atmosphere below 32 km), first
layer only: geopotential altitude -5 km to 11 km, lapse rate 6.5 K/km. Inputs are geometric
altitudes; they are converted to geopotential altitude with r0 = 6 356 766 m. Outside the layer
the functions return NaN; :func:`troposphere_in_range` gives the flag.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]

R_AIR = 287.05  # J/(kg K), specific gas constant of dry air used by air_density
T_MIN_K, T_MAX_K = 200.0, 500.0  # validity range of the property fits
P_MIN_PA, P_MAX_PA = 50.0e3, 120.0e3  # pressure range in which neglecting p in mu, k, cp is < 0.3 %

# ln(mu / Pa s) and ln(k / W m-1 K-1) as cubics in X = ln(T / 300 K); cp / J kg-1 K-1 cubic in x.
_MU_COEF = (-1.089574277467e01, 7.797384984928e-01, -7.724645891186e-02, 9.261263100101e-03)
_K_COEF = (-3.635000827951e00, 8.443946000150e-01, -7.038544478400e-02, 1.315277664400e-02)
_CP_COEF = (1.006336654346e03, 3.745576744585e00, 4.180885239943e00, -8.531646836444e-02)

# U.S. Standard Atmosphere 1976, layer 0 (Table 4 of the standard; constants of Sec. 1.2).
G0 = 9.80665  # m/s2, standard gravity
R_STAR = 8.31432  # J/(mol K), gas constant as defined by the 1976 standard
M0 = 28.9644e-3  # kg/mol, sea-level mean molar mass of air
R0_EARTH = 6356766.0  # m, effective Earth radius for geopotential altitude
T_SEA_LEVEL_K = 288.15
P_SEA_LEVEL_PA = 101325.0
LAPSE_K_PER_M = -6.5e-3
H_MIN_M, H_MAX_M = -5000.0, 11000.0  # geopotential altitude range of layer 0


class AirProperties(NamedTuple):
    """Dry-air properties, SI units, each an array broadcast from (T_K, p_Pa)."""

    density: FloatArray  # kg/m3
    viscosity: FloatArray  # Pa s (dynamic)
    kinematic_viscosity: FloatArray  # m2/s
    conductivity: FloatArray  # W/(m K)
    specific_heat: FloatArray  # J/(kg K), isobaric
    prandtl: FloatArray  # -


def _positive(x: ArrayLike) -> FloatArray:
    """Float array with non-positive (or NaN) entries replaced by NaN."""
    a = np.asarray(x, dtype=float)
    return np.where(a > 0.0, a, np.nan)


def _horner(c: tuple[float, ...], x: FloatArray) -> FloatArray:
    return c[0] + x * (c[1] + x * (c[2] + x * c[3]))


def _scalar(a: FloatArray) -> FloatArray:
    """Return numpy scalars for scalar input (0-d arrays become np.float64 / np.bool_)."""
    return a[()] if isinstance(a, np.ndarray) and a.ndim == 0 else a


def air_density(T_K: ArrayLike, p_Pa: ArrayLike) -> FloatArray:
    """Density of dry air as an ideal gas, kg/m3.

    Formula: rho = p / (R T), R = 287.05 J/(kg K).

    Parameters: T_K -- temperature, K; p_Pa -- absolute pressure, Pa.
    Returns: density, kg/m3 (about 0.3-2.1 kg/m3 over 200-500 K, 50-120 kPa).
    Validity: 200-500 K, 50-120 kPa: within 0.3 % of the reference equation of state (the
    ideal-gas error grows at low T and high p). Outside: the ideal-gas law is extrapolated
    (flag with :func:`air_in_range`); T <= 0 or p <= 0 gives NaN.
    Source: ideal-gas law; R = 287.05 J/(kg K) is R*/M of dry air (common practice; the 1976
    standard atmosphere uses 8.31432 / 0.0289644 = 287.053).

    Example: 300 K, 101325 Pa -> 101325 / (287.05 * 300) = 1.1766 kg/m3
    (reference EOS, Lemmon et al. 2000: 1.1770 kg/m3).

    >>> round(float(air_density(300.0, 101325.0)), 4)
    1.1766
    """
    return _scalar(_positive(p_Pa) / (R_AIR * _positive(T_K)))


def air_viscosity(T_K: ArrayLike) -> FloatArray:
    """Dynamic viscosity of dry air, Pa s.

    Formula: ln(mu / Pa s) = a0 + a1 X + a2 X^2 + a3 X^3, X = ln(T / 300 K),
    a = (-10.89574277467, 0.7797384984928, -0.07724645891186, 0.009261263100101).

    Parameters: T_K -- temperature, K.
    Returns: viscosity, Pa s (1.33e-5 at 200 K to 2.71e-5 at 500 K).
    Validity: 200-500 K, 50-120 kPa: within 0.1 % of the reference correlation.
    Outside: extrapolated (within 0.5 % of the reference at 100 K and at 1000 K, 1 atm);
    T <= 0 gives NaN.
    Source: fit to Lemmon & Jacobsen (2004), Int. J. Thermophys. 25:21, Eqs. (1)-(5) for air,
    as evaluated by CoolProp 8.0 at 101.325 kPa, 180-520 K (see module docstring).

    Example: 300 K -> 1.8537e-5 Pa s (reference 1.8537e-5; Incropera & DeWitt, Table A.4,
    184.6e-7 N s/m2).

    >>> round(float(air_viscosity(300.0)) * 1e5, 4)
    1.8537
    """
    X = np.log(_positive(T_K) / 300.0)
    return _scalar(np.exp(_horner(_MU_COEF, X)))


def air_conductivity(T_K: ArrayLike) -> FloatArray:
    """Thermal conductivity of dry air, W/(m K).

    Formula: ln(k / W m-1 K-1) = a0 + a1 X + a2 X^2 + a3 X^3, X = ln(T / 300 K),
    a = (-3.635000827951, 0.8443946000150, -0.07038544478400, 0.01315277664400).

    Parameters: T_K -- temperature, K.
    Returns: conductivity, W/(m K) (0.0185 at 200 K to 0.0399 at 500 K).
    Validity: 200-500 K, 50-120 kPa: within 0.15 % of the reference correlation.
    Outside: extrapolated (within 0.6 % of the reference at 100 K and at 1000 K, 1 atm);
    T <= 0 gives NaN.
    Source: fit to Lemmon & Jacobsen (2004), Int. J. Thermophys. 25:21, Eqs. (6)-(7) for air,
    as evaluated by CoolProp 8.0 at 101.325 kPa, 180-520 K (see module docstring).

    Example: 300 K -> 0.026384 W/(m K) (reference 0.026384; Incropera & DeWitt, Table A.4,
    26.3e-3 W/m K).

    >>> round(float(air_conductivity(300.0)), 6)
    0.026384
    """
    X = np.log(_positive(T_K) / 300.0)
    return _scalar(np.exp(_horner(_K_COEF, X)))


def air_specific_heat(T_K: ArrayLike) -> FloatArray:
    """Isobaric specific heat of dry air, J/(kg K).

    Formula: cp = b0 + b1 x + b2 x^2 + b3 x^3, x = (T - 300 K) / 100 K,
    b = (1006.336654346, 3.745576744585, 4.180885239943, -0.08531646836444).

    Parameters: T_K -- temperature, K.
    Returns: specific heat, J/(kg K) (1005.5 to 1030 over 200-500 K).
    Validity: 200-500 K, 50-120 kPa: within 0.2 % of the reference (pressure neglected).
    Outside: extrapolated (within 1 % of the reference between 130 K and 700 K; the cubic
    diverges beyond); T <= 0 gives NaN.
    Source: fit to the equation of state of Lemmon, Jacobsen, Penoncello & Friend (2000),
    J. Phys. Chem. Ref. Data 29:331, as evaluated by CoolProp 8.0 at 101.325 kPa.

    Example: 300 K -> 1006.3 J/(kg K) (reference 1006.37; Incropera & DeWitt, Table A.4,
    1.007 kJ/kg K).

    >>> round(float(air_specific_heat(300.0)), 1)
    1006.3
    """
    x = (_positive(T_K) - 300.0) / 100.0
    return _scalar(_horner(_CP_COEF, x))


def air_prandtl(T_K: ArrayLike) -> FloatArray:
    """Prandtl number of dry air, -.

    Formula: Pr = cp mu / k, with the fits of :func:`air_specific_heat`,
    :func:`air_viscosity` and :func:`air_conductivity`.

    Parameters: T_K -- temperature, K.
    Returns: Prandtl number, - (0.7255 at 200 K, 0.698 at 450-500 K).
    Validity: 200-500 K, 50-120 kPa: within 0.2 % of the reference. Outside: extrapolated as
    its three factors; T <= 0 gives NaN.
    Source: definition; property fits as above (Lemmon & Jacobsen 2004; Lemmon et al. 2000).

    Example: 300 K -> 0.7070 (reference 0.7071; Incropera & DeWitt, Table A.4, 0.707).

    >>> round(float(air_prandtl(300.0)), 3)
    0.707
    """
    return _scalar(air_specific_heat(T_K) * air_viscosity(T_K) / air_conductivity(T_K))


def air_properties(T_K: ArrayLike, p_Pa: ArrayLike) -> AirProperties:
    """All dry-air properties at (T_K, p_Pa), broadcast together, as an AirProperties tuple.

    Formula: rho = p / (R T); mu, k, cp from the fits of this module (see their docstrings);
    nu = mu / rho; Pr = cp mu / k.

    Parameters: T_K -- temperature, K; p_Pa -- absolute pressure, Pa.
    Returns: AirProperties(density kg/m3, viscosity Pa s, kinematic_viscosity m2/s,
    conductivity W/(m K), specific_heat J/(kg K), prandtl -), arrays of the broadcast shape.
    Validity: 200-500 K, 50-120 kPa (each property within 0.3 % of the reference there).
    Outside: extrapolated; flag with :func:`air_in_range`. T <= 0 or p <= 0 gives NaN.
    Source: as the single-property functions (Lemmon et al. 2000; Lemmon & Jacobsen 2004).

    Example: 300 K, 101325 Pa -> nu = 1.8537e-5 / 1.1766 = 1.5754e-5 m2/s
    (reference 1.5750e-5; Incropera & DeWitt, Table A.4: 15.89e-6 with their density 1.1614).

    >>> props = air_properties(300.0, 101325.0)
    >>> round(float(props.kinematic_viscosity) * 1e5, 4)
    1.5754
    """
    T, p = np.broadcast_arrays(_positive(T_K), _positive(p_Pa))
    X = np.log(T / 300.0)
    mu = np.exp(_horner(_MU_COEF, X))
    k = np.exp(_horner(_K_COEF, X))
    cp = _horner(_CP_COEF, (T - 300.0) / 100.0)
    rho = p / (R_AIR * T)
    return AirProperties(
        density=_scalar(rho),
        viscosity=_scalar(mu),
        kinematic_viscosity=_scalar(mu / rho),
        conductivity=_scalar(k),
        specific_heat=_scalar(cp),
        prandtl=_scalar(cp * mu / k),
    )


def air_in_range(T_K: ArrayLike, p_Pa: ArrayLike) -> NDArray[np.bool_]:
    """True where (T_K, p_Pa) lies inside the validated range of the property fits.

    Formula: 200 K <= T <= 500 K and 50 kPa <= p <= 120 kPa.

    Parameters: T_K -- temperature, K; p_Pa -- absolute pressure, Pa.
    Returns: boolean array of the broadcast shape (False for NaN input).
    Validity: any input; this is the flag that goes with the property functions.
    Source: range of the fit and of its check against the reference (module docstring).

    Example: 300 K at 101325 Pa is in range; 550 K is not.

    >>> bool(air_in_range(300.0, 101325.0)), bool(air_in_range(550.0, 101325.0))
    (True, False)
    """
    T = np.asarray(T_K, dtype=float)
    p = np.asarray(p_Pa, dtype=float)
    ok = (T >= T_MIN_K) & (T <= T_MAX_K) & (p >= P_MIN_PA) & (p <= P_MAX_PA)
    return _scalar(ok)


def geopotential_altitude(z_m: ArrayLike) -> FloatArray:
    """Geopotential altitude for a geometric altitude, m.

    Formula: H = r0 z / (r0 + z), r0 = 6 356 766 m.

    Parameters: z_m -- geometric altitude above mean sea level, m.
    Returns: geopotential altitude, m (H < z above sea level; 4996.07 m at z = 5000 m).
    Validity: z > -r0 (anything on Earth); z <= -r0 gives NaN.
    Source: U.S. Standard Atmosphere 1976, Eq. (18).

    Example: z = 11 019.1 m -> H = 11 000 m, the top of the troposphere.

    >>> round(float(geopotential_altitude(5000.0)), 2)
    4996.07
    """
    z = np.asarray(z_m, dtype=float)
    denom = np.where(R0_EARTH + z > 0.0, R0_EARTH + z, np.nan)
    return _scalar(R0_EARTH * z / denom)


def troposphere_in_range(z_m: ArrayLike) -> NDArray[np.bool_]:
    """True where a geometric altitude lies in the first layer of the 1976 standard atmosphere.

    Formula: -5000 m <= H(z) <= 11000 m, H the geopotential altitude.

    Parameters: z_m -- geometric altitude, m.
    Returns: boolean array (False for NaN input); geometric limits -4996.1 m and 11019.1 m.
    Validity: any input; this is the flag for the altitude functions.
    Source: U.S. Standard Atmosphere 1976, Table 4 (layer 0: H from -5 km to 11 km).

    Example: 3000 m is in range, 12000 m is not.

    >>> bool(troposphere_in_range(3000.0)), bool(troposphere_in_range(12000.0))
    (True, False)
    """
    H = np.asarray(geopotential_altitude(z_m), dtype=float)
    return _scalar((H >= H_MIN_M) & (H <= H_MAX_M))


def _layer0_H(z_m: ArrayLike) -> FloatArray:
    H = np.asarray(geopotential_altitude(z_m), dtype=float)
    return np.where((H >= H_MIN_M) & (H <= H_MAX_M), H, np.nan)


def temperature_at_altitude(z_m: ArrayLike) -> FloatArray:
    """Standard-atmosphere air temperature at a geometric altitude, K.

    Formula: T = 288.15 K - 0.0065 K/m * H, H = r0 z / (r0 + z) the geopotential altitude.

    Parameters: z_m -- geometric altitude above mean sea level, m.
    Returns: temperature, K (320.6 K at H = -5 km down to 216.65 K at H = 11 km).
    Validity: troposphere, H from -5000 m to 11000 m; outside it returns NaN
    (flag: :func:`troposphere_in_range`).
    Source: U.S. Standard Atmosphere 1976, Eq. (23) with Table 4 (layer 0); same as ICAO.

    Example: z = 1000 m -> 281.651 K (1976 standard, geometric-altitude table: 281.651 K).

    >>> round(float(temperature_at_altitude(1000.0)), 3)
    281.651
    """
    H = _layer0_H(z_m)
    return _scalar(T_SEA_LEVEL_K + LAPSE_K_PER_M * H)


def pressure_at_altitude(z_m: ArrayLike) -> FloatArray:
    """Standard-atmosphere pressure at a geometric altitude, Pa.

    Formula: p = 101325 Pa * (T / 288.15 K) ** (g0 M0 / (R* 0.0065 K/m)), exponent 5.255877,
    T from :func:`temperature_at_altitude`; g0 = 9.80665, M0 = 0.0289644, R* = 8.31432.

    Parameters: z_m -- geometric altitude above mean sea level, m.
    Returns: pressure, Pa (101325 at sea level, 54048 at 5000 m, 22632 at H = 11 km).
    Validity: troposphere, H from -5000 m to 11000 m; outside it returns NaN
    (flag: :func:`troposphere_in_range`).
    Source: U.S. Standard Atmosphere 1976, Eq. (33a) with Table 4 (layer 0); same as ICAO.

    Example: z = 2000 m -> 79501 Pa (1976 standard, geometric-altitude table: 7.9501E+04 Pa).

    >>> round(float(pressure_at_altitude(2000.0)))
    79501
    """
    T = np.asarray(temperature_at_altitude(z_m), dtype=float)
    exponent = G0 * M0 / (R_STAR * -LAPSE_K_PER_M)
    return _scalar(P_SEA_LEVEL_PA * (T / T_SEA_LEVEL_K) ** exponent)


def density_at_altitude(z_m: ArrayLike) -> FloatArray:
    """Standard-atmosphere air density at a geometric altitude, kg/m3.

    Formula: rho = p M0 / (R* T), with p and T of the standard atmosphere
    (M0 / R* = 0.0289644 / 8.31432 kg K/J).

    Parameters: z_m -- geometric altitude above mean sea level, m.
    Returns: density, kg/m3 (1.2250 at sea level, 0.73643 at 5000 m).
    Validity: troposphere, H from -5000 m to 11000 m; outside it returns NaN
    (flag: :func:`troposphere_in_range`).
    Source: U.S. Standard Atmosphere 1976, Eq. (42) with Table 4 (layer 0); same as ICAO.

    Example: z = 3000 m -> 0.90925 kg/m3 (1976 standard, geometric-altitude table: 0.90925).

    >>> round(float(density_at_altitude(3000.0)), 5)
    0.90925
    """
    T = np.asarray(temperature_at_altitude(z_m), dtype=float)
    p = np.asarray(pressure_at_altitude(z_m), dtype=float)
    return _scalar(p * M0 / (R_STAR * T))
