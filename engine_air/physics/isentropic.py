"""One-dimensional isentropic flow of a perfect gas: static-to-total ratios,
area ratio, the mass-flow function and its inverse (shocks: ``engine_air.physics.shocks``).

All functions take numpy arrays of any shape (they broadcast) and use
gamma = 1.4 unless told otherwise. Equation numbers refer to NACA Report 1135 [1].

Worked examples [1, Table I]: at M = 2, p/p_t = 0.12780, T/T_t = 0.55556,
rho/rho_t = 0.23005, A/A* = 1.6875; at M = 0.5, p/p_t = 0.84302, A/A* = 1.3398.

[1] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953).
[2] U.S. Standard Atmosphere, 1976, NOAA/NASA/USAF: R = R*/M0 = 8314.32/28.9644 J/(kg K).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.physics.constants import GAMMA, R_AIR


def _isentropic_base(mach, gamma=GAMMA):
    m = np.asarray(mach, dtype=float)
    return 1.0 + 0.5 * (gamma - 1.0) * m * m


def _power(base, exponent):
    """base**exponent with multiplications for the exponents of gamma = 1.4 (3, 3.5 and their negatives)."""
    if exponent in (3.0, -3.0):
        cube = base * base * base
        return cube if exponent > 0 else 1.0 / cube
    if exponent in (3.5, -3.5):
        value = base * base * base * np.sqrt(base)
        return value if exponent > 0 else 1.0 / value
    return base**exponent


def temperature_ratio(mach, gamma=GAMMA):
    """Static-to-total temperature ratio T/T_t of isentropic flow [1, eq. 43].

    T/T_t = (1 + (g-1)/2 M^2)^-1

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        T/T_t (dimensionless), the shape of ``mach``.

    Examples
    --------
    NACA Report 1135, Table I: T/T_t = 0.55556 at M = 2, 0.95238 at M = 0.5.

    >>> print(f"{float(temperature_ratio(2.0)):.5f} {float(temperature_ratio(0.5)):.5f}")
    0.55556 0.95238
    """
    return 1.0 / _isentropic_base(mach, gamma)


def pressure_ratio(mach, gamma=GAMMA):
    """Static-to-total pressure ratio p/p_t of isentropic flow [1, eq. 44].

    p/p_t = (1 + (g-1)/2 M^2)^(-g/(g-1))

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        p/p_t (dimensionless), the shape of ``mach``.

    Examples
    --------
    NACA Report 1135, Table I: p/p_t = 0.12780 at M = 2, 0.84302 at M = 0.5.

    >>> print(f"{float(pressure_ratio(2.0)):.5f} {float(pressure_ratio(0.5)):.5f}")
    0.12780 0.84302
    """
    return _power(_isentropic_base(mach, gamma), -gamma / (gamma - 1.0))


def density_ratio(mach, gamma=GAMMA):
    """Static-to-total density ratio rho/rho_t of isentropic flow [1, eq. 45].

    rho/rho_t = (1 + (g-1)/2 M^2)^(-1/(g-1))

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        rho/rho_t (dimensionless), the shape of ``mach``.

    Examples
    --------
    NACA Report 1135, Table I: rho/rho_t = 0.23005 at M = 2.

    >>> print(f"{float(density_ratio(2.0)):.5f}")
    0.23005
    """
    return _isentropic_base(mach, gamma) ** (-1.0 / (gamma - 1.0))


def dynamic_to_total_pressure(mach, gamma=GAMMA):
    """Dynamic-to-total pressure ratio q/p_t [1, Table I, column q/p_t].

    q/p_t = (g/2) M^2 (p/p_t), since q = rho V^2 / 2 = g p M^2 / 2.

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        q/p_t (dimensionless), the shape of ``mach``.

    Examples
    --------
    NACA Report 1135, Table I: q/p_t = 0.10031 at M = 0.4.

    >>> print(f"{float(dynamic_to_total_pressure(0.4)):.5f}")
    0.10031
    """
    m = np.asarray(mach, dtype=float)
    return 0.5 * gamma * m * m * pressure_ratio(m, gamma)


def area_ratio(mach, gamma=GAMMA):
    """Isentropic area ratio A/A* (flow area over the sonic area of the same flow) [1, eq. 80].

    A/A* = (1/M) [ (2/(g+1)) (1 + (g-1)/2 M^2) ]^((g+1)/(2(g-1)))

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0; infinite at M = 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        A/A* (dimensionless, >= 1), the shape of ``mach``.

    Examples
    --------
    NACA Report 1135, Table I: A/A* = 1.6875 at M = 2, 1.3398 at M = 0.5.

    >>> print(f"{float(area_ratio(2.0)):.4f} {float(area_ratio(0.5)):.4f}")
    1.6875 1.3398
    """
    m = np.asarray(mach, dtype=float)
    with np.errstate(divide="ignore"):
        return _power(2.0 / (gamma + 1.0) * _isentropic_base(m, gamma), (gamma + 1.0) / (2.0 * (gamma - 1.0))) / m


def mass_flow_parameter(mach, gamma=GAMMA, r=R_AIR):
    """Mass-flow function MFP = W sqrt(T_t) / (A p_t), kg K^0.5 / (N s).

    MFP(M) = sqrt(g/R) M (1 + (g-1)/2 M^2)^(-(g+1)/(2(g-1)))

    from continuity with the isentropic relations [1, eqs. 43-45]; MFP/MFP* = A*/A
    [1, eq. 80]. At M = 1 (choking) and air, MFP* = 0.0404147; times
    p_ref/sqrt(T_ref) this is the choking corrected flow per unit area, 241.24 kg/(s m^2).

    Parameters
    ----------
    mach : array_like
        Mach number M (dimensionless, >= 0).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.
    r : float
        Specific gas constant R, J/(kg K); 8314.32/28.9644 = 287.0531 for air [2].

    Returns
    -------
    ndarray
        MFP, kg K^0.5 / (N s), the shape of ``mach``.

    Examples
    --------
    MFP*/MFP = A/A*, 1.3398 at M = 0.5 (NACA Report 1135, Table I):

    >>> print(f"{choked_mass_flow_parameter() / float(mass_flow_parameter(0.5)):.4f}")
    1.3398
    """
    m = np.asarray(mach, dtype=float)
    return np.sqrt(gamma / r) * m * _power(_isentropic_base(m, gamma), -(gamma + 1.0) / (2.0 * (gamma - 1.0)))


def choked_mass_flow_parameter(gamma=GAMMA, r=R_AIR) -> float:
    """Mass-flow function at choking, MFP* = sqrt(g/R) ((g+1)/2)^(-(g+1)/(2(g-1))), kg K^0.5 / (N s).

    Parameters
    ----------
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.
    r : float
        Specific gas constant R, J/(kg K); 287.0531 for air [2].

    Returns
    -------
    float
        MFP*, kg K^0.5 / (N s): sqrt(1.4/287.0531) / 1.2^3 = 0.0404147 for air (worked from the formula).

    Examples
    --------
    >>> print(f"{choked_mass_flow_parameter():.7f}")
    0.0404147
    """
    return float(mass_flow_parameter(1.0, gamma, r))


def choked_corrected_flow_per_area(gamma=GAMMA, r=R_AIR) -> float:
    """Choking corrected flow per unit area, W_c/A = MFP* p_ref / sqrt(T_ref), kg/(s m^2).

    The largest corrected flow a duct section can pass (M = 1 there), with
    p_ref = 101 325 Pa and T_ref = 288.15 K (the 1976 sea-level values [2]).

    Parameters
    ----------
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.
    r : float
        Specific gas constant R, J/(kg K); 287.0531 for air [2].

    Returns
    -------
    float
        W_c/A at choking, kg/(s m^2): 0.0404147 x 101325 / sqrt(288.15) = 241.24 for air
        (49.4 lbm/(s ft^2)).

    Examples
    --------
    >>> print(f"{choked_corrected_flow_per_area():.2f}")
    241.24
    """
    from engine_air.physics.constants import P_REF, T_REF

    return choked_mass_flow_parameter(gamma, r) * P_REF / np.sqrt(T_REF)


# Inverse of the flow function. A table in s = sqrt(1 - MFP/MFP*), in which the
# Mach number is a smooth function on each branch (near M = 1, 1 - MFP/MFP* grows
# like (1 - M)^2), gives a start value; Newton steps on ln(MFP) polish it.
_SUB_M = np.linspace(0.0, 1.0, 4097)
_SUP_M = 1.0 + np.expm1(np.linspace(0.0, np.log(60.0), 4097))


def _s_of(m, gamma):
    ratio = np.clip(area_ratio(np.maximum(m, 1e-300), gamma) ** -1.0, 0.0, 1.0)
    return np.sqrt(1.0 - ratio)


_TABLES: dict[float, tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]] = {}


def _tables(gamma):
    if gamma not in _TABLES:
        s_sub = _s_of(_SUB_M, gamma)
        s_sup = _s_of(_SUP_M, gamma)
        # np.interp needs increasing abscissae: s falls with M subsonically.
        _TABLES[gamma] = (s_sub[::-1], _SUB_M[::-1], s_sup, _SUP_M)
    return _TABLES[gamma]


def mach_from_flow_ratio(flow_ratio, supersonic=False, gamma=GAMMA):
    """Mach number from the flow ratio MFP/MFP* = A*/A, on the chosen branch: the inverse of [1, eq. 80].

    Solves A*/A = M [ (2/(g+1)) (1 + (g-1)/2 M^2) ]^(-(g+1)/(2(g-1))) for M: a
    table start value, then one Newton step.

    Parameters
    ----------
    flow_ratio : array_like
        MFP/MFP* = A*/A (dimensionless, 0..1).
    supersonic : bool
        The supersonic root (M > 1) instead of the subsonic one (M < 1).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        Mach number (dimensionless), the shape of ``flow_ratio``: NaN where
        ``flow_ratio`` > 1 (more flow than choking allows) or is not finite,
        1 where it equals 1, 0 (subsonic) where it is 0. Accurate to about 1e-11
        in Mach number (about 1e-8 within 1e-6 of Mach 1, where the flow ratio
        itself no longer resolves the Mach number in double precision).

    Examples
    --------
    NACA Report 1135, Table I: A/A* = 1.6875 at M = 2 and 1.3398 at M = 0.5.

    >>> print(f"{float(mach_from_flow_ratio(1 / 1.6875, supersonic=True)):.4f}")
    2.0000
    >>> print(f"{float(mach_from_flow_ratio(1 / 1.3398)):.4f}")
    0.5000
    """
    r = np.asarray(flow_ratio, dtype=float)
    s_sub, m_sub, s_sup, m_sup = _tables(gamma)
    valid = (r >= 0.0) & (r <= 1.0 + 1e-12)  # false for NaN, and for infinities by the bounds
    rc = np.minimum(np.where(valid, r, 0.5), 1.0)  # in [0, 1]
    s = np.sqrt(1.0 - rc)
    if supersonic:
        m = np.interp(s, s_sup, m_sup)
    else:
        m = np.interp(s, s_sub, m_sub)
    # One Newton step on f(M) = MFP(M)/MFP* - r, with
    # f'(M) = (MFP/MFP*) (1 - M^2) / (M (1 + (g-1)/2 M^2)); the table start is good to ~1e-8.
    polish = (rc > 0.0) & (np.abs(1.0 - m) > 1e-7)
    mm = np.where(polish, m, 2.0)
    base = _isentropic_base(mm, gamma)  # A/A* and f' share it (the same relations as area_ratio)
    f = 1.0 / (_power(2.0 / (gamma + 1.0) * base, (gamma + 1.0) / (2.0 * (gamma - 1.0))) / mm)
    df = f * (1.0 - mm * mm) / (mm * base)
    m = np.where(polish, mm - (f - rc) / df, m)
    if not supersonic:
        m = np.where(rc == 0.0, 0.0, m)
    return np.where(valid, m, np.nan)


def mach_from_mass_flow_parameter(mfp, supersonic=False, gamma=GAMMA, r=R_AIR):
    """Mach number from the mass-flow function MFP = W sqrt(T_t)/(A p_t): ``mach_from_flow_ratio(MFP/MFP*)``.

    Parameters
    ----------
    mfp : array_like
        Mass-flow function, kg K^0.5 / (N s).
    supersonic : bool
        The supersonic root instead of the subsonic one.
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.
    r : float
        Specific gas constant R, J/(kg K); 287.0531 for air [2].

    Returns
    -------
    ndarray
        Mach number (dimensionless); NaN where MFP exceeds the choking value (no solution).

    Examples
    --------
    A corrected flow of 180.05 kg/s per m^2 of face, MFP = (W_c/A) sqrt(T_ref)/p_ref, puts the
    face at M = 0.5 (A/A* = 1.3398 at M = 0.5, NACA Report 1135, Table I, gives 241.24/1.3398):

    >>> print(f"{float(mach_from_mass_flow_parameter(180.05 * 288.15**0.5 / 101325.0)):.3f}")
    0.500
    """
    return mach_from_flow_ratio(np.asarray(mfp, dtype=float) / choked_mass_flow_parameter(gamma, r), supersonic, gamma)
