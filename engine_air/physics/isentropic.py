"""One-dimensional compressible flow of a perfect gas: isentropic relations,
the mass-flow function and its inverse, normal and weak oblique shocks.

All functions take numpy arrays of any shape (they broadcast) and use
gamma = 1.4 unless told otherwise. Equation numbers refer to NACA Report 1135 [1].

Worked examples [1]: at M = 2, p/p_t = 0.12780, T/T_t = 0.55556, A/A* = 1.6875;
a normal shock at M1 = 2 gives M2 = 0.57735, p_t2/p_t1 = 0.72087, p2/p1 = 4.5;
an oblique shock at M1 = 2 turning the flow 10 degrees has a wave angle of
39.31 degrees, M2 = 1.6405 and p_t2/p_t1 = 0.98464.

[1] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953).
[2] Thompson, M. J., "A note on the calculation of oblique shock-wave characteristics",
    J. Aero. Sci. 17 (1950) 741; closed-form wave angle as given by
    Wolf, T., "Comment on approximate formula of weak oblique shock wave angle", AIAA J. 31 (1993).
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
    """Static-to-total temperature T/T_t = (1 + (g-1)/2 M^2)^-1, dimensionless [1, eq. 43]."""
    return 1.0 / _isentropic_base(mach, gamma)


def pressure_ratio(mach, gamma=GAMMA):
    """Static-to-total pressure p/p_t = (1 + (g-1)/2 M^2)^(-g/(g-1)), dimensionless [1, eq. 44]."""
    return _power(_isentropic_base(mach, gamma), -gamma / (gamma - 1.0))


def density_ratio(mach, gamma=GAMMA):
    """Static-to-total density rho/rho_t = (1 + (g-1)/2 M^2)^(-1/(g-1)), dimensionless [1, eq. 45]."""
    return _isentropic_base(mach, gamma) ** (-1.0 / (gamma - 1.0))


def dynamic_to_total_pressure(mach, gamma=GAMMA):
    """q/p_t = (g/2) M^2 (p/p_t), dimensionless (q = rho V^2 / 2 = g p M^2 / 2)."""
    m = np.asarray(mach, dtype=float)
    return 0.5 * gamma * m * m * pressure_ratio(m, gamma)


def area_ratio(mach, gamma=GAMMA):
    """A/A* = (1/M) [ (2/(g+1)) (1 + (g-1)/2 M^2) ]^((g+1)/(2(g-1))), dimensionless [1, eq. 80]."""
    m = np.asarray(mach, dtype=float)
    with np.errstate(divide="ignore"):
        return _power(2.0 / (gamma + 1.0) * _isentropic_base(m, gamma), (gamma + 1.0) / (2.0 * (gamma - 1.0))) / m


def mass_flow_parameter(mach, gamma=GAMMA, r=R_AIR):
    """Mass-flow function MFP = W sqrt(T_t) / (A p_t), kg K^0.5 / (N s).

    MFP(M) = sqrt(g/R) M (1 + (g-1)/2 M^2)^(-(g+1)/(2(g-1))).
    At M = 1 (choking) and air, MFP* = 0.0404147; times p_ref/sqrt(T_ref) this is
    the choking corrected flow per unit area, 241.24 kg/(s m^2).
    """
    m = np.asarray(mach, dtype=float)
    return np.sqrt(gamma / r) * m * _power(_isentropic_base(m, gamma), -(gamma + 1.0) / (2.0 * (gamma - 1.0)))


def choked_mass_flow_parameter(gamma=GAMMA, r=R_AIR) -> float:
    """MFP at M = 1, kg K^0.5 / (N s)."""
    return float(mass_flow_parameter(1.0, gamma, r))


def choked_corrected_flow_per_area(gamma=GAMMA, r=R_AIR) -> float:
    """Choking corrected flow per unit area, W_c/A = MFP* p_ref / sqrt(T_ref), kg/(s m^2) (241.24 for air)."""
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
    """Mach number from MFP/MFP* = A*/A, dimensionless, on the chosen branch.

    Returns NaN where ``flow_ratio`` > 1 (more flow than choking allows) or is
    not finite, 1 where it equals 1, 0 (subsonic) where it is 0.
    Accurate to about 1e-11 in Mach number (about 1e-8 within 1e-6 of Mach 1, where the
    flow ratio itself no longer resolves the Mach number in double precision).
    """
    r = np.asarray(flow_ratio, dtype=float)
    s_sub, m_sub, s_sup, m_sup = _tables(gamma)
    valid = np.isfinite(r) & (r >= 0.0) & (r <= 1.0 + 1e-12)
    rc = np.clip(np.where(valid, r, 0.5), 0.0, 1.0)
    s = np.sqrt(1.0 - rc)
    if supersonic:
        m = np.interp(s, s_sup, m_sup)
    else:
        m = np.interp(s, s_sub, m_sub)
    # One Newton step on f(M) = MFP(M)/MFP* - r, with
    # f'(M) = (MFP/MFP*) (1 - M^2) / (M (1 + (g-1)/2 M^2)); the table start is good to ~1e-8.
    polish = (rc > 0.0) & (np.abs(1.0 - m) > 1e-7)
    mm = np.where(polish, m, 2.0)
    f = 1.0 / area_ratio(mm, gamma)
    df = f * (1.0 - mm * mm) / (mm * _isentropic_base(mm, gamma))
    m = np.where(polish, mm - (f - rc) / df, m)
    if not supersonic:
        m = np.where(rc == 0.0, 0.0, m)
    return np.where(valid, m, np.nan)


def mach_from_mass_flow_parameter(mfp, supersonic=False, gamma=GAMMA, r=R_AIR):
    """Mach number from MFP = W sqrt(T_t)/(A p_t) in kg K^0.5/(N s); subsonic root unless ``supersonic``.

    NaN where MFP exceeds the choking value (no solution).
    """
    return mach_from_flow_ratio(np.asarray(mfp, dtype=float) / choked_mass_flow_parameter(gamma, r), supersonic, gamma)
