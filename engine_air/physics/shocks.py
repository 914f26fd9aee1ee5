"""Normal and weak oblique shocks of a perfect gas (arrays of any shape, gamma = 1.4 by default).

Equation numbers refer to NACA Report 1135 [1].

Worked examples: a normal shock at M1 = 2 gives M2 = 0.57735, p_t2/p_t1 = 0.72087,
p2/p1 = 4.5000 [1, Table II]; an oblique shock at M1 = 2 turning the flow 10 degrees
has a wave angle of about 39.3 degrees, M2 about 1.64 and p_t2/p_t1 about 0.985
[1, Chart 2 and the oblique-shock charts, read by eye; 39.314 deg, 1.6405 and 0.98464
from the relations].

[1] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953).
[2] Thompson, M. J., "A note on the calculation of oblique shock-wave characteristics",
    J. Aero. Sci. 17 (1950) 741; closed-form wave angle as given by
    Wolf, T., "Comment on approximate formula of weak oblique shock wave angle", AIAA J. 31 (1993).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.isentropic import area_ratio, mach_from_flow_ratio, pressure_ratio, temperature_ratio  # noqa: F401


@dataclass(frozen=True)
class NormalShock:
    """State change across a normal shock (arrays)."""

    downstream_mach: np.ndarray
    total_pressure_ratio: np.ndarray  # p_t2 / p_t1
    static_pressure_ratio: np.ndarray  # p2 / p1
    static_temperature_ratio: np.ndarray  # T2 / T1


def normal_shock(upstream_mach, gamma=GAMMA) -> NormalShock:
    """Normal shock at upstream Mach M1 [1, eqs. 96, 93, 94, 99].

    M2^2 = (1 + (g-1)/2 M1^2) / (g M1^2 - (g-1)/2)
    p2/p1 = 1 + 2g/(g+1) (M1^2 - 1)
    T2/T1 = (p2/p1) (2 + (g-1) M1^2) / ((g+1) M1^2)
    p_t2/p_t1 = [(g+1) M1^2 / ((g-1) M1^2 + 2)]^(g/(g-1)) [(g+1) / (2 g M1^2 - (g-1))]^(1/(g-1))

    Parameters
    ----------
    upstream_mach : array_like
        Mach number M1 ahead of the shock (dimensionless).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    NormalShock
        ``downstream_mach`` M2, ``total_pressure_ratio`` p_t2/p_t1, ``static_pressure_ratio``
        p2/p1 and ``static_temperature_ratio`` T2/T1 (all dimensionless, the shape of
        ``upstream_mach``). Where M1 <= 1 there is no shock: M2 = M1 and every ratio is 1.

    Examples
    --------
    NACA Report 1135, Table II: at M1 = 2, M2 = 0.57735, p_t2/p_t1 = 0.72087,
    p2/p1 = 4.5000, T2/T1 = 1.6875.

    >>> ns = normal_shock(2.0)
    >>> print(f"{float(ns.downstream_mach):.5f} {float(ns.total_pressure_ratio):.5f} "
    ...       f"{float(ns.static_pressure_ratio):.4f} {float(ns.static_temperature_ratio):.4f}")
    0.57735 0.72087 4.5000 1.6875
    """
    m1 = np.asarray(upstream_mach, dtype=float)
    shock = m1 > 1.0
    ms = np.where(shock, m1, 2.0)
    m1s = ms * ms
    m2 = np.sqrt((1.0 + 0.5 * (gamma - 1.0) * m1s) / (gamma * m1s - 0.5 * (gamma - 1.0)))
    p_ratio = 1.0 + 2.0 * gamma / (gamma + 1.0) * (m1s - 1.0)
    pt_ratio = ((gamma + 1.0) * m1s / ((gamma - 1.0) * m1s + 2.0)) ** (gamma / (gamma - 1.0)) * (
        (gamma + 1.0) / (2.0 * gamma * m1s - (gamma - 1.0))
    ) ** (1.0 / (gamma - 1.0))
    t_ratio = p_ratio * (2.0 + (gamma - 1.0) * m1s) / ((gamma + 1.0) * m1s)
    one = np.ones_like(m1)
    return NormalShock(
        np.where(shock, m2, m1),
        np.where(shock, pt_ratio, one),
        np.where(shock, p_ratio, one),
        np.where(shock, t_ratio, one),
    )


def max_deflection_rad(upstream_mach, gamma=GAMMA):
    """Largest flow deflection (rad) for an attached oblique shock at M1 [1, eq. 168].

    sin^2(beta_max) = [ (g+1)/4 M^2 - 1 + sqrt((g+1)((g+1)/16 M^4 + (g-1)/2 M^2 + 1)) ] / (g M^2),
    then the deflection from the theta-beta-M relation [1, eq. 138].

    Parameters
    ----------
    upstream_mach : array_like
        Mach number M1 ahead of the shock (dimensionless).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        Maximum deflection theta_max, rad; 0 where M1 <= 1.

    Examples
    --------
    NACA Report 1135, Chart 2 (read by eye): about 23 deg at M1 = 2 (22.97 deg from the relation).

    >>> import math
    >>> print(f"{math.degrees(float(max_deflection_rad(2.0))):.1f}")
    23.0
    """
    m = np.asarray(upstream_mach, dtype=float)
    sup = m > 1.0
    ms = np.where(sup, m, 2.0)
    m2 = ms * ms
    sin2 = ((gamma + 1.0) / 4.0 * m2 - 1.0 + np.sqrt((gamma + 1.0) * ((gamma + 1.0) / 16.0 * m2 * m2 + 0.5 * (gamma - 1.0) * m2 + 1.0))) / (gamma * m2)
    beta = np.arcsin(np.sqrt(np.clip(sin2, 0.0, 1.0)))
    return np.where(sup, deflection_from_wave_angle(ms, beta, gamma), 0.0)


def deflection_from_wave_angle(upstream_mach, wave_angle_rad, gamma=GAMMA):
    """Flow deflection (rad) behind an oblique shock of wave angle beta at M1 [1, eq. 138].

    tan(theta) = 2 cot(beta) (M^2 sin^2 beta - 1) / (M^2 (g + cos 2 beta) + 2)

    Parameters
    ----------
    upstream_mach : array_like
        Mach number M1 ahead of the shock (dimensionless).
    wave_angle_rad : array_like
        Wave angle beta between the shock and the upstream flow, rad (broadcasts with M1).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ndarray
        Deflection theta, rad (0 for a Mach wave, beta = asin(1/M1), and for a normal shock, beta = 90 deg).

    Examples
    --------
    NACA Report 1135, Chart 2 (read by eye): at M1 = 2 a wave angle of 39.3 deg turns the flow 10 deg.

    >>> import math
    >>> print(f"{math.degrees(float(deflection_from_wave_angle(2.0, math.radians(39.3)))):.1f}")
    10.0
    """
    m = np.asarray(upstream_mach, dtype=float)
    b = np.asarray(wave_angle_rad, dtype=float)
    m2 = m * m
    return np.arctan(2.0 / np.tan(b) * (m2 * np.sin(b) ** 2 - 1.0) / (m2 * (gamma + np.cos(2.0 * b)) + 2.0))


def _polish_weak_wave_angle(m, theta, beta, mu, turning, gamma):
    """Newton steps on the theta-beta-M relation [1, eq. 138] for the weak wave angle (rad).

    The closed form of [2] cancels catastrophically at small deflections (the
    numerator M^2 - 1 + 2 L cos(...) tends to 0): at M = 2 it gives a negative
    wave angle for 1e-9 deg. Where it leaves a residual in theta, the better of
    it and the weak-shock estimate beta = mu + (g+1) M^2 theta / (4 (M^2 - 1))
    (mu the Mach angle) starts a few Newton steps, kept within [mu, beta_max]
    on which theta(beta) rises. Where the closed form is already exact to
    rounding (in particular near the maximum deflection, where d theta/d beta
    vanishes) it is kept unchanged.
    """
    m2 = m * m
    sin2_max = ((gamma + 1.0) / 4.0 * m2 - 1.0
                + np.sqrt((gamma + 1.0) * ((gamma + 1.0) / 16.0 * m2 * m2 + 0.5 * (gamma - 1.0) * m2 + 1.0))) / (gamma * m2)
    beta_max = np.arcsin(np.sqrt(np.clip(sin2_max, 0.0, 1.0)))

    def residual(b):
        return deflection_from_wave_angle(m, b, gamma) - theta

    tol = 1e-14 * np.maximum(theta, 1e-300)
    res = residual(beta)
    need = turning & ~(np.abs(res) <= tol)  # NaN residuals are polished too
    if not need.any():
        return beta
    estimate = np.clip(mu + (gamma + 1.0) * m2 * theta / (4.0 * np.maximum(m2 - 1.0, 1e-300)), mu, beta_max)
    res_est = residual(estimate)
    start = np.where(np.abs(res_est) < np.abs(res), estimate, beta)
    start = np.where(np.isfinite(res), start, estimate)
    b = np.where(need, np.clip(start, mu, beta_max), beta)
    for _ in range(6):
        # theta = atan(N / D), N = 2 cot(b) (M^2 sin^2 b - 1), D = M^2 (g + cos 2b) + 2
        sb, cb = np.sin(b), np.cos(b)
        n = 2.0 * cb / sb * (m2 * sb * sb - 1.0)
        d = m2 * (gamma + np.cos(2.0 * b)) + 2.0
        dn = 2.0 * (2.0 * m2 * cb * cb - (m2 * sb * sb - 1.0) / (sb * sb))
        dd = -2.0 * m2 * np.sin(2.0 * b)
        slope = (dn * d - n * dd) / (d * d + n * n)
        r = np.arctan(n / d) - theta
        active = need & (np.abs(r) > tol) & (slope > 0.0)
        step = np.where(active, r / np.where(slope > 0.0, slope, 1.0), 0.0)
        b = np.clip(b - step, mu, beta_max)
    return np.where(need, b, beta)


@dataclass(frozen=True)
class ObliqueShock:
    """State change across a weak (attached) oblique shock (arrays).

    Where the shock is detached (``attached`` False) the other fields are NaN.
    """

    wave_angle_rad: np.ndarray
    downstream_mach: np.ndarray
    total_pressure_ratio: np.ndarray
    static_pressure_ratio: np.ndarray
    attached: np.ndarray


def oblique_shock(upstream_mach, deflection_rad, gamma=GAMMA) -> ObliqueShock:
    """Weak oblique shock turning a supersonic stream by ``deflection_rad`` (>= 0).

    Wave angle in closed form [2]:
        tan(beta) = (M^2 - 1 + 2 L cos((4 pi + acos X)/3)) / (3 (1 + (g-1)/2 M^2) tan(theta))
        L = sqrt((M^2 - 1)^2 - 3 (1 + (g-1)/2 M^2)(1 + (g+1)/2 M^2) tan^2(theta))
        X = ((M^2 - 1)^3 - 9 (1 + (g-1)/2 M^2)(1 + (g-1)/2 M^2 + (g+1)/4 M^4) tan^2(theta)) / L^3
    polished by Newton steps on the theta-beta-M relation [1, eq. 138] where it
    loses precision (small deflections), then the normal-shock relations on
    M1 sin(beta), and M2 = M_n2 / sin(beta - theta) [1, eq. 132].

    Parameters
    ----------
    upstream_mach : array_like
        Mach number M1 ahead of the shock (dimensionless).
    deflection_rad : array_like
        Flow deflection theta (ramp angle), rad, >= 0 (broadcasts with M1).
    gamma : float
        Ratio of specific heats g (dimensionless), 1.4 for air.

    Returns
    -------
    ObliqueShock
        ``wave_angle_rad`` beta (rad), ``downstream_mach`` M2, ``total_pressure_ratio``
        p_t2/p_t1, ``static_pressure_ratio`` p2/p1 and ``attached`` (bool). A zero
        deflection is a Mach wave (beta = asin(1/M1), no loss). The shock is detached
        (NaN fields, ``attached`` False) where M1 <= 1 or theta exceeds ``max_deflection_rad(M1)``.

    Examples
    --------
    NACA Report 1135, Chart 2 and the oblique-shock charts (read by eye): at M1 = 2 and
    theta = 10 deg, beta is about 39.3 deg, M2 about 1.64, p_t2/p_t1 about 0.985.

    >>> import math
    >>> ob = oblique_shock(2.0, math.radians(10.0))
    >>> print(f"{math.degrees(float(ob.wave_angle_rad)):.1f} {float(ob.downstream_mach):.2f} "
    ...       f"{float(ob.total_pressure_ratio):.3f}")
    39.3 1.64 0.985

    A zero deflection is a Mach wave, asin(1/2) = 30 deg:

    >>> print(f"{math.degrees(float(oblique_shock(2.0, 0.0).wave_angle_rad)):.4f}")
    30.0000
    """
    m = np.asarray(upstream_mach, dtype=float)
    th = np.asarray(deflection_rad, dtype=float)
    m, th = np.broadcast_arrays(m, th)
    attached = (m > 1.0) & (th >= 0.0) & (th <= max_deflection_rad(m, gamma))
    turning = attached & (th > 1e-12)
    ms = np.where(attached, m, 2.0)
    ts = np.where(turning, th, 0.1)
    m2 = ms * ms
    tan_t = np.tan(ts)
    base = 1.0 + 0.5 * (gamma - 1.0) * m2
    lam2 = (m2 - 1.0) ** 2 - 3.0 * base * (1.0 + 0.5 * (gamma + 1.0) * m2) * tan_t**2
    lam = np.sqrt(np.maximum(lam2, 0.0))
    safe_lam = np.where(lam > 0.0, lam, 1.0)
    chi = ((m2 - 1.0) ** 3 - 9.0 * base * (base + 0.25 * (gamma + 1.0) * m2 * m2) * tan_t**2) / safe_lam**3
    tan_b = (m2 - 1.0 + 2.0 * lam * np.cos((4.0 * np.pi + np.arccos(np.clip(chi, -1.0, 1.0))) / 3.0)) / (3.0 * base * tan_t)
    mu = np.arcsin(1.0 / ms)
    beta = np.where(turning, np.arctan(tan_b), mu)
    beta = _polish_weak_wave_angle(ms, ts, beta, mu, turning, gamma)
    normal = normal_shock(np.where(turning, ms * np.sin(beta), 1.0), gamma)
    m_down = np.where(turning, normal.downstream_mach / np.sin(beta - np.where(turning, ts, 0.0)), ms)
    nan = np.nan
    return ObliqueShock(
        np.where(attached, beta, nan),
        np.where(attached, m_down, nan),
        np.where(attached, normal.total_pressure_ratio, nan),
        np.where(attached, normal.static_pressure_ratio, nan),
        attached,
    )
