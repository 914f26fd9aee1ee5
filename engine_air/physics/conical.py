"""Supersonic flow past a circular cone at zero incidence: the Taylor-Maccoll conical flow (weak solution).

Behind the attached conical shock of wave angle beta the flow is isentropic and depends only on the ray
angle omega from the cone axis (spherical coordinates about the tip). With the velocity made dimensionless
by the limiting speed V_max = sqrt(2 c_p T_t) (V' = V/V_max, components V_r along the ray and V_w normal
to it, V_w < 0 towards the axis) the Taylor-Maccoll equation [1; 2, eq. 10.15] is

    dV_r/dw = V_w
    dV_w/dw = [V_w^2 V_r - (g-1)/2 (1 - V_r^2 - V_w^2)(2 V_r + V_w cot w)] / [(g-1)/2 (1 - V_r^2 - V_w^2) - V_w^2]

Here it is integrated outwards from the cone surface (w = theta_c, V_w = 0, V_r = V_c' from the surface
Mach number) with scipy ``solve_ivp`` until the shock condition holds: the free stream of speed
V0' = V_r/cos(w) (tangential component continuous) and the flow behind satisfy Prandtl's oblique-shock
relation V_n1 V_n2 = a*^2 - (g-1)/(g+1) V_t^2 [4, eq. 137], in V_max units

    f(w) = -V_w V_r tan(w) - (g-1)/(g+1) (1 - V_r^2) = 0   at w = beta,

so that each surface Mach number gives one (M0, beta) exactly. For one cone the family over the surface
Mach number is tabulated once (``_family``): the flight Mach number falls to a minimum (the detachment Mach
number of the cone: below it no attached shock exists) and rises again; the weak branch is the one with the
higher surface Mach number. A flight Mach column is then solved by Newton/secant steps on the surface Mach
number started from a cubic spline through the table (mostly one integration), until its flight Mach number
is matched to 1e-6 relative (beta to about 1e-6 rad), and its dense solution is kept.

Local Mach: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2). Total pressure behind the shock: the normal-shock ratio
at M0 sin(beta) [4, eq. 99]; so p/p0 = pi_s ((1 - V'^2)/(1 - V0'^2))^(g/(g-1)), rho/rho0 likewise with 1/(g-1).

Cost: never per point. ``cone_solution`` (one flight Mach number) is cached (``functools.lru_cache``) on
(M0, angle) rounded to 1e-9. A map's Mach columns go through ``solve_columns`` first: every new column of a
cone is solved in one vectorised ``solve_ivp`` per Newton step (each column on its own ray scale
w = theta_c + s (w_end - theta_c), s in [0, 1], w_end just beyond the shock angle from the table), two or
three in all, and kept as a Chebyshev series of V_r and V_w on [theta_c, beta] in the same per-column cache.
The vectorised front end ``cone_flow`` solves the unique Mach numbers of an array once and maps back.

Worked example (checked in the tests against NACA Report 1135's cone charts, NASA SP-3004's tables and
``pygasflow``): a 20 deg cone at M0 = 2 has beta = 37.80 deg and a surface Mach number of 1.568.

>>> s = cone_solution(2.0, 20.0)
>>> round(s.wave_angle_deg, 2), round(s.surface_mach, 3)
(37.8, 1.568)

[1] Taylor, G. I., Maccoll, J. W., "The air pressure on a cone moving at high speeds", Proc. R. Soc. A 139 (1933).
[2] Anderson, J. D., Modern Compressible Flow, 3rd ed. (2003), section 10.4.
[3] Sims, J. L., Tables for supersonic flow around right circular cones at zero angle of attack, NASA SP-3004 (1964).
[4] NACA Report 1135, Equations, Tables, and Charts for Compressible Flow (1953); charts 5-6 are for cones.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from engine_air.physics.constants import GAMMA

_G1 = 0.5 * (GAMMA - 1.0)
_K = (GAMMA - 1.0) / (GAMMA + 1.0)
_RTOL = 1e-9
_ATOL = 1e-13
_ROUND = 9  # decimals of the cache keys (Mach number, degrees)
_MACH_TOL = 1e-6  # relative: a column's flight Mach number is matched to this (beta then to ~1e-6 rad)


def _speed_from_mach(m: float) -> float:
    """V/V_max from Mach number: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2)."""
    x = _G1 * m * m
    return math.sqrt(x / (1.0 + x))


def _mach_from_speed(v):
    """Mach number from V/V_max (the inverse of ``_speed_from_mach``), arrays."""
    v2 = np.asarray(v) ** 2
    return np.sqrt(v2 / (_G1 * (1.0 - v2)))


def _rhs(w, y):
    vr, vw = y
    a = _G1 * (1.0 - vr * vr - vw * vw)
    return [vw, (vw * vw * vr - a * (2.0 * vr + vw / math.tan(w))) / (a - vw * vw)]


def _shock_condition(w, y):
    return -y[1] * y[0] * math.tan(w) - _K * (1.0 - y[0] * y[0])


_shock_condition.terminal = True
_shock_condition.direction = 1.0


def _normal_shock_pt(mn1: float) -> float:
    """Normal-shock total-pressure ratio at normal Mach ``mn1`` [4, eq. 99]."""
    m2 = mn1 * mn1
    return ((GAMMA + 1.0) * m2 / ((GAMMA - 1.0) * m2 + 2.0)) ** (GAMMA / (GAMMA - 1.0)) * (
        (GAMMA + 1.0) / (2.0 * GAMMA * m2 - (GAMMA - 1.0))) ** (1.0 / (GAMMA - 1.0))


def _outward(theta_c: float, surface_mach: float, dense: bool = False):
    """Integrate from the cone surface outwards to the shock. Returns (M0, beta, solution) or None when the
    surface Mach number belongs to no free stream (past the hypersonic limit, or no shock before 90 deg)."""
    from scipy.integrate import solve_ivp  # scipy only where a column is solved
    sol = solve_ivp(_rhs, (theta_c, 0.5 * math.pi - 1e-9), [_speed_from_mach(surface_mach), 0.0],
                    events=_shock_condition, rtol=_RTOL, atol=_ATOL, dense_output=dense)
    if not sol.t_events[0].size:
        return None
    beta = float(sol.t_events[0][0])
    vr = float(sol.y_events[0][0][0])
    v0 = vr / math.cos(beta)
    if not v0 < 1.0:
        return None
    return float(_mach_from_speed(v0)), beta, sol


@dataclass(frozen=True)
class _Family:
    detachment_mach: float
    detachment_surface_mach: float
    weak: CubicSpline  # surface Mach against sqrt(M0 - M_det) on the weak branch
    top_mach: float  # largest tabulated flight Mach number
    wave_angle: CubicSpline  # beta (rad) against sqrt(M0 - M_det) on the weak branch


@lru_cache(maxsize=64)
def _family(cone_deg: float) -> _Family:
    """Tabulate (M0, surface Mach) over the surface Mach number for one cone; find the detachment point."""
    th = math.radians(cone_deg)
    mcs, m0s, betas = [], [], []
    for mc in np.concatenate([np.linspace(0.3, 1.0, 6, endpoint=False), np.geomspace(1.0, 40.0, 12)]):
        r = _outward(th, float(mc))
        if r is None:
            if mcs:
                break
            continue
        mcs.append(float(mc))
        m0s.append(r[0])
        betas.append(r[1])
        if r[0] > 6.2 and mc > 1.0:  # far enough up the weak branch (maps reach Mach 6)
            break
    mcs, m0s = np.array(mcs), np.array(m0s)
    k = int(np.argmin(m0s))
    lo, hi = mcs[max(k - 1, 0)], mcs[min(k + 1, mcs.size - 1)]
    from scipy.interpolate import CubicSpline
    from scipy.optimize import minimize_scalar

    res = minimize_scalar(lambda mc: _outward(th, mc)[0], bounds=(lo, hi), method="bounded",
                          options={"xatol": 1e-6})  # M0 is flat there: M_det to ~1e-12
    m_det, mc_det = float(res.fun), float(res.x)
    beta_det = _outward(th, mc_det)[1]
    keep = mcs > mc_det
    x = np.concatenate([[0.0], np.sqrt(np.maximum(m0s[keep] - m_det, 0.0))])
    y = np.concatenate([[mc_det], mcs[keep]])
    b = np.concatenate([[beta_det], np.array(betas)[keep]])
    return _Family(m_det, mc_det, CubicSpline(x, y), float(m0s[keep][-1]), CubicSpline(x, b))


def detachment_mach(cone_half_angle_deg: float) -> float:
    """Lowest flight Mach number at which a cone carries an attached shock: the minimum of M0 over the
    Taylor-Maccoll family of the cone [1, 3].

    Parameters
    ----------
    cone_half_angle_deg : float
        Cone half-angle, deg.

    Returns
    -------
    float
        Detachment Mach number (dimensionless).

    Examples
    --------
    About 1.21 for a 20 deg cone (NACA Report 1135 [4], chart 5, at chart precision; pygasflow agrees in
    the tests):

    >>> round(detachment_mach(20.0), 3)
    1.211
    """
    return _family(round(float(cone_half_angle_deg), _ROUND)).detachment_mach


@dataclass(frozen=True)
class ConicalRay:
    """The conical flow on rays: Mach number, velocity components over V0 (radial V_r and normal V_w,
    V_w < 0 towards the axis), density rho/rho0 and pressure p/p0."""

    mach: np.ndarray
    radial_velocity_ratio: np.ndarray
    normal_velocity_ratio: np.ndarray
    density_ratio: np.ndarray
    pressure_ratio: np.ndarray


@dataclass(frozen=True)
class ConeSolution:
    """The attached conical flow about one cone at one flight Mach number (weak solution)."""

    flight_mach: float
    cone_half_angle_deg: float
    wave_angle_deg: float
    surface_mach: float
    shock_total_pressure_ratio: float  # p_t behind / p_t0 (normal shock at M0 sin beta)
    surface_pressure_ratio: float  # p_c / p0
    _velocity: object  # w (rad, array) -> (V_r, V_w) over [theta_c, beta]: dense ODE solution or series
    _v0: float  # V0 / V_max

    def _state(self, w):
        vr, vw = self._velocity(np.ravel(w))
        return vr.reshape(np.shape(w)), vw.reshape(np.shape(w))

    def ray(self, omega_deg) -> ConicalRay:
        """Flow on rays ``omega_deg`` (deg, clipped to cone <= omega <= beta; array)."""
        w = np.radians(np.clip(np.asarray(omega_deg, dtype=float), self.cone_half_angle_deg, self.wave_angle_deg))
        vr, vw = self._state(w)
        v2 = vr * vr + vw * vw
        e = 1.0 / (GAMMA - 1.0)
        x = (1.0 - v2) / (1.0 - self._v0 ** 2)
        return ConicalRay(mach=_mach_from_speed(np.sqrt(v2)), radial_velocity_ratio=vr / self._v0,
                          normal_velocity_ratio=vw / self._v0, density_ratio=self.shock_total_pressure_ratio * x ** e,
                          pressure_ratio=self.shock_total_pressure_ratio * x ** (GAMMA * e))

    def captured_flow_ratio(self, lip_ray_deg: float) -> float:
        """Flow through the cone-shaped surface of half-angle omega_L from the tip to the lip circle, over the
        free-stream flow through the lip circle (method section 9):
        MFR = rho(w_L) |V_w(w_L)| / (rho0 V0 sin w_L); 1 for omega_L at or beyond the shock."""
        if lip_ray_deg >= self.wave_angle_deg:
            return 1.0
        r = self.ray(lip_ray_deg)
        return float(r.density_ratio * abs(r.normal_velocity_ratio) / math.sin(math.radians(lip_ray_deg)))

    def stream_surface_pressure_integral(self, lip_ray_deg: float, n: int = 65) -> tuple[float, float]:
        """Along the conical stream line that ends on the lip (ray omega_L), from the shock to the lip:
        (I, s) with I = integral (p/p0 - 1) d(r^2/r_L^2) (r the radius from the axis) and s = (r_s/r_L)^2
        at the shock crossing; (0, 1) when omega_L lies at or beyond the shock.

        The stream line obeys dR/(R dw) = V_r/V_w (R the distance from the tip, r = R sin w); both integrals
        by Simpson's rule on ``n`` rays of the solution (smooth integrands, error below 1e-8).
        """
        wl, wb = math.radians(lip_ray_deg), math.radians(self.wave_angle_deg)
        if not wl < wb:
            return 0.0, 1.0
        w = np.linspace(wl, wb, n)
        vr, vw = self._state(w)
        from scipy.integrate import cumulative_simpson, simpson

        ln_r = cumulative_simpson(vr / vw, x=w, initial=0.0)
        s = (np.exp(ln_r) * np.sin(w) / math.sin(wl)) ** 2
        v2 = vr * vr + vw * vw
        p = self.shock_total_pressure_ratio * ((1.0 - v2) / (1.0 - self._v0 ** 2)) ** (GAMMA / (GAMMA - 1.0))
        # from the shock (w = beta, s_shock) to the lip (w = w_L, s = 1)
        integral = -float(simpson(p - 1.0, x=s))
        return integral, float(s[-1])


def _solve(m0: float, cone_deg: float):
    """(surface Mach, beta, dense solution) for the weak conical shock at ``m0``; None where detached.

    Newton steps on the surface Mach number: the first from the tabulated family and its slope, then secant
    steps on the last two integrations, until the flight Mach number is matched to ``_MACH_TOL``.
    """
    fam = _family(cone_deg)
    if m0 < fam.detachment_mach:
        return None
    th = math.radians(cone_deg)
    x = min(math.sqrt(m0 - fam.detachment_mach), math.sqrt(fam.top_mach - fam.detachment_mach))
    mc = float(fam.weak(x))
    slope = float(fam.weak(x, 1)) / (2.0 * x) if x > 0.0 else 0.0  # d(surface Mach)/d(M0)
    floor = fam.detachment_surface_mach
    prev = None
    r = None
    for _ in range(40):
        r = _outward(th, mc, dense=True)
        if r is None:  # stepped past the hypersonic limit: halve the step
            mc = 0.5 * (mc + (prev[0] if prev else floor))
            continue
        err = r[0] - m0
        if abs(err) <= _MACH_TOL * m0:
            break
        if prev is not None and r[0] != prev[1]:
            slope = (mc - prev[0]) / (r[0] - prev[1])
        prev = (mc, r[0])
        mc = max(mc - slope * err, 0.5 * (mc + floor))
    return mc, r[1], r[2]


@lru_cache(maxsize=16384)
def _cone_solution_cached(m0: float, cone_deg: float) -> ConeSolution | None:
    found = _solve(m0, cone_deg)
    if found is None:
        return None
    mc, beta, sol = found
    return _make_solution(m0, cone_deg, mc, beta, lambda w: tuple(sol.sol(w)))


def _make_solution(m0, cone_deg, mc, beta, velocity) -> ConeSolution:
    pt = _normal_shock_pt(m0 * math.sin(beta))
    v0 = _speed_from_mach(m0)
    vc = _speed_from_mach(mc)
    pc = pt * ((1.0 - vc * vc) / (1.0 - v0 * v0)) ** (GAMMA / (GAMMA - 1.0))
    return ConeSolution(m0, cone_deg, math.degrees(beta), mc, pt, pc, velocity, v0)


_CHEB = 32  # Chebyshev series degree + 1 kept per column of a batch
_BATCH_MARGIN = 0.004  # rad integrated beyond the estimated shock angle


def _outward_batch(theta_c: float, surface_mach: np.ndarray, end: np.ndarray):
    """Columns integrated together (one ``solve_ivp`` on 2n states): member i runs from the cone to the ray
    end[i] (rad, just beyond its expected shock) on its own scale w_i = theta_c + s (end_i - theta_c),
    s in [0, 1]. Returns (M0, beta, Chebyshev coefficients of V_r and V_w on [theta_c, beta], ok)."""
    n = surface_mach.size
    span = end - theta_c
    y0 = np.concatenate([np.array([_speed_from_mach(m) for m in surface_mach]), np.zeros(n)])

    def rhs(s_, y):
        w = theta_c + s_ * span
        vr, vw = y[:n], y[n:]
        a = _G1 * (1.0 - vr * vr - vw * vw)
        d = a - vw * vw
        live = d > 1e-3 * a  # past a member's shock its continuation may reach a characteristic: hold it
        dvw = np.where(live, (vw * vw * vr - a * (2.0 * vr + vw / np.tan(w))) / np.where(live, d, 1.0), 0.0)
        return np.concatenate([np.where(live, vw, 0.0) * span, dvw * span])

    with np.errstate(all="ignore"):
        from scipy.integrate import solve_ivp

        sol = solve_ivp(rhs, (0.0, 1.0), y0, rtol=_RTOL, atol=_ATOL, dense_output=True)
        if not sol.success:
            return None
        grid = np.linspace(0.0, 1.0, 257)
        y = sol.sol(grid)
        w = theta_c + grid[None, :] * span[:, None]
        vr, vw = y[:n], y[n:]
        f = -vw * vr * np.tan(w) - _K * (1.0 - vr * vr)
        pos = f > 0.0
        ok = pos.any(axis=1) & ~pos[:, 0]
        i1 = np.where(ok, np.argmax(pos, axis=1), 1)
        i0 = i1 - 1
        rows = np.arange(n)
        f0, f1 = f[rows, i0], f[rows, i1]
        sb = grid[i0] + (grid[i1] - grid[i0]) * f0 / (f0 - f1)
        for _ in range(4):  # Newton on the dense solution: f(s) = 0
            yb = sol.sol(sb)
            vr_b, vw_b = yb[rows, rows], yb[n + rows, rows]
            wb = theta_c + sb * span
            a = _G1 * (1.0 - vr_b ** 2 - vw_b ** 2)
            dvw = (vw_b * vw_b * vr_b - a * (2.0 * vr_b + vw_b / np.tan(wb))) / (a - vw_b * vw_b)
            fb = -vw_b * vr_b * np.tan(wb) - _K * (1.0 - vr_b ** 2)
            dfdw = -(dvw * vr_b + vw_b * vw_b) * np.tan(wb) - vw_b * vr_b / np.cos(wb) ** 2 + 2.0 * _K * vr_b * vw_b
            sb = np.clip(sb - fb / (dfdw * span), 0.0, 1.0)
        yb = sol.sol(sb)
        vr_b = yb[rows, rows]
        beta = theta_c + sb * span
        v0 = vr_b / np.cos(beta)
        ok &= np.isfinite(v0) & (v0 < 1.0) & (sb < 1.0)
        m0 = np.where(ok, _mach_from_speed(np.where(ok, v0, 0.5)), np.nan)
        # Chebyshev series of V_r, V_w on [theta_c, beta] per member
        t = np.cos(np.pi * (np.arange(_CHEB) + 0.5) / _CHEB)
        s_nodes = sb[:, None] * 0.5 * (t[None, :] + 1.0)
        yn = sol.sol(s_nodes.ravel()).reshape(2 * n, n, _CHEB)
        vr_n, vw_n = yn[rows, rows], yn[n + rows, rows]  # (n, _CHEB)
        cheb = np.polynomial.chebyshev
        c_r = cheb.chebfit(t, vr_n.T, _CHEB - 1).T
        c_w = cheb.chebfit(t, vw_n.T, _CHEB - 1).T
    return m0, beta, c_r, c_w, ok


def _series(theta_c, beta, c_r, c_w):
    coef = np.stack([c_r, c_w], axis=1)  # (degree + 1, 2): both series in one Clenshaw recurrence

    def velocity(w):
        t = 2.0 * (np.asarray(w) - theta_c) / (beta - theta_c) - 1.0
        vr, vw = np.polynomial.chebyshev.chebval(t, coef)
        return vr, vw
    return velocity


def solve_columns(flight_mach, cone_half_angle_deg: float) -> None:
    """Solve every not yet cached attached column of ``flight_mach`` for one cone together: one vectorised
    ``solve_ivp`` per Newton step on the surface Mach numbers (two or three in all), started from the family
    table; the results fill the per-column cache of ``cone_solution``. Columns a batch does not settle are
    left to ``cone_solution``'s own per-column solve. Fewer than four new columns: nothing is done.

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach numbers M0 (dimensionless), any shape.
    cone_half_angle_deg : float
        Cone half-angle, deg.

    Examples
    --------
    The batch and the single-column solve agree to the column matching (1e-6 in M0):

    >>> import numpy as np
    >>> solve_columns(np.linspace(1.5, 2.5, 11), 20.0)
    >>> round(cone_solution(2.0, 20.0).wave_angle_deg, 4)
    37.7959
    """
    cone = round(float(cone_half_angle_deg), _ROUND)
    if not cone > 0.0:
        return
    fam = _family(cone)
    ms = np.unique(np.round(np.asarray(flight_mach, dtype=float).ravel(), _ROUND))
    ms = ms[(ms > 1.0) & (ms >= fam.detachment_mach) & (ms <= fam.top_mach)]
    if len(_BATCH_SOLUTIONS) >= 64 and cone not in _BATCH_SOLUTIONS:  # bounded like the lru caches
        _BATCH_SOLUTIONS.clear()
    cached = _BATCH_SOLUTIONS.setdefault(cone, {})
    ms = np.array([m for m in ms if m not in cached])
    if ms.size < 4:
        return
    th = math.radians(cone)
    x = np.sqrt(np.maximum(ms - fam.detachment_mach, 0.0))
    mc = fam.weak(x)
    beta_est = fam.wave_angle(x)
    slope = fam.weak(x, 1) / (2.0 * np.maximum(x, 1e-12))
    todo = np.ones(ms.size, bool)
    prev = None
    for _ in range(4):
        idx = np.nonzero(todo)[0]
        res = _outward_batch(th, mc[idx], beta_est[idx] + _BATCH_MARGIN)
        if res is None:
            return
        m0, beta, c_r, c_w, ok = res
        err = m0 - ms[idx]
        done = ok & (np.abs(err) <= _MACH_TOL * ms[idx])
        for j in np.nonzero(done)[0]:
            i = idx[j]
            cached[float(ms[i])] = _make_solution(float(ms[i]), cone, float(mc[i]), float(beta[j]),
                                                  _series(th, float(beta[j]), c_r[j], c_w[j]))
        todo[idx[done]] = False
        if not todo.any():
            return
        move = idx[~done & ok]
        keep = ~done & ok
        if prev is not None:
            pm, pm0 = prev
            d = m0[keep] - pm0[move]
            good = np.isfinite(d) & (np.abs(d) > 0.0)
            slope[move] = np.where(good, (mc[move] - pm[move]) / np.where(good, d, 1.0), slope[move])
        prev_mc, prev_m0 = mc.copy(), np.full(ms.size, np.nan)
        prev_m0[idx] = m0
        prev = (prev_mc, prev_m0)
        mc[move] = np.maximum(mc[move] - slope[move] * err[keep], 0.5 * (mc[move] + fam.detachment_surface_mach))
        beta_est[move] = beta[keep]  # the last shock angle found
        todo[idx[~ok]] = False  # left to the per-column solve


_BATCH_SOLUTIONS: dict[float, dict[float, ConeSolution]] = {}


def clear_cache() -> None:
    """Empty every per-column and per-cone cache (for timing from cold).

    Examples
    --------
    >>> clear_cache()
    >>> round(cone_solution(2.0, 20.0).surface_mach, 3)
    1.568
    """
    _BATCH_SOLUTIONS.clear()
    _family.cache_clear()
    _cone_solution_cached.cache_clear()


def cone_solution(flight_mach: float, cone_half_angle_deg: float) -> ConeSolution | None:
    """The weak conical-shock solution for one cone at one flight Mach number [1] (cached on (M0, angle)
    rounded to 1e-9).

    Parameters
    ----------
    flight_mach : float
        Flight Mach number M0 (dimensionless).
    cone_half_angle_deg : float
        Cone half-angle, deg.

    Returns
    -------
    ConeSolution or None
        Wave angle (deg), surface Mach, shock total-pressure ratio, surface pressure ratio p_c/p0 and the
        flow on every ray (``ray``); ``None`` where M0 <= 1 or the shock is detached (M0 below
        ``detachment_mach``).

    Examples
    --------
    A 10 deg cone at M0 = 2: beta about 31.2 deg (NASA SP-3004 [3], NACA Report 1135 [4], chart precision);
    a 41 deg cone detaches there.

    >>> round(cone_solution(2.0, 10.0).wave_angle_deg, 1), cone_solution(2.0, 41.0)
    (31.2, None)
    """
    m0 = round(float(flight_mach), _ROUND)
    cone = round(float(cone_half_angle_deg), _ROUND)
    if not (m0 > 1.0 and cone > 0.0):
        return None
    batch = _BATCH_SOLUTIONS.get(cone)
    if batch is not None and m0 in batch:
        return batch[m0]
    return _cone_solution_cached(m0, cone)


@dataclass(frozen=True)
class ConeFlow:
    """``cone_flow`` on an array of flight Mach numbers (NaN where subsonic or detached)."""

    wave_angle_rad: np.ndarray
    surface_mach: np.ndarray
    total_pressure_ratio: np.ndarray  # across the conical shock
    surface_pressure_ratio: np.ndarray  # p_c / p0
    detached: np.ndarray  # bool: supersonic and the cone's shock is detached


def cone_flow(flight_mach, cone_half_angle_deg: float) -> ConeFlow:
    """Wave angle, surface Mach and pressure ratios for one cone at an array of flight Mach numbers.

    The unique Mach numbers of the array are solved once each (``solve_columns``, then ``cone_solution``,
    cached) and mapped back.

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach numbers M0 (dimensionless), any shape.
    cone_half_angle_deg : float
        Cone half-angle, deg.

    Returns
    -------
    ConeFlow
        Arrays of the Mach array's shape; NaN where subsonic or detached, ``detached`` true where the
        flight is supersonic and the shock detached.

    Examples
    --------
    >>> import numpy as np
    >>> f = cone_flow(np.array([0.8, 1.1, 2.0]), 20.0)
    >>> print(np.round(np.degrees(f.wave_angle_rad), 2), f.detached)
    [ nan  nan 37.8] [False  True False]
    """
    m0 = np.asarray(flight_mach, dtype=float)
    uniq, inverse = np.unique(np.round(m0, _ROUND), return_inverse=True)
    solve_columns(uniq, cone_half_angle_deg)
    out = np.full((4, uniq.size), np.nan)
    det = np.zeros(uniq.size, bool)
    for i, m in enumerate(uniq):
        if not m > 1.0:
            continue
        s = cone_solution(m, cone_half_angle_deg)
        if s is None:
            det[i] = True
            continue
        out[:, i] = (math.radians(s.wave_angle_deg), s.surface_mach, s.shock_total_pressure_ratio,
                     s.surface_pressure_ratio)
    inverse = inverse.reshape(m0.shape)
    return ConeFlow(out[0][inverse], out[1][inverse], out[2][inverse], out[3][inverse], det[inverse])
