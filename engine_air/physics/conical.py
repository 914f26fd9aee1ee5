"""Supersonic flow past a circular cone at zero incidence: the Taylor-Maccoll conical flow (weak solution).

Behind the attached conical shock of wave angle beta the flow is isentropic and depends only on the ray
angle omega from the cone axis (spherical coordinates about the tip). With the velocity made dimensionless
by the limiting speed V_max = sqrt(2 c_p T_t) (V' = V/V_max, components V_r along the ray and V_w normal
to it, V_w < 0 towards the axis) the Taylor-Maccoll equation [1; 2, eq. 10.15] is

    dV_r/dw = V_w
    dV_w/dw = [V_w^2 V_r - (g-1)/2 (1 - V_r^2 - V_w^2)(2 V_r + V_w cot w)] / [(g-1)/2 (1 - V_r^2 - V_w^2) - V_w^2]

On the shock the tangential component is continuous and the normal one falls by the normal-shock density
ratio at M0 sin(beta) [4, eqs. 93, 137]: V_r = V0' cos(beta), V_w = -V0' sin(beta) rho0/rho. Equivalently
(Prandtl's relation V_n1 V_n2 = a*^2 - (g-1)/(g+1) V_t^2 in V_max units [4, eq. 137]) the shock stands where

    f(w) = -V_w V_r tan(w) - (g-1)/(g+1) (1 - V_r^2) = 0.

Two ways of integrating, both with the fixed-step order-8 Runge-Kutta of ``engine_air.physics.rk8`` over many
members at once (numpy; never a Python loop over points or columns):

- outwards from the cone surface (w = theta_c, V_w = 0, V_r from the surface Mach number) to where f = 0, for
  the family of one cone over the surface Mach number (``_family``): the flight Mach number falls to a minimum,
  the detachment Mach number of the cone (below it no attached shock exists), and rises again; the weak branch
  is the one with the higher surface Mach number;
- inwards from the shock (the state above at a trial beta) to the cone angle, for flight Mach columns
  (``cone_columns``): V_w must vanish on the cone, so beta is found by secant steps on V_w(theta_c) started
  from the family, every column of a map in the same steps, until a step is below 1e-12 rad. On the way in
  the same integration carries the dividing stream line of a spike inlet from the shock to the lip ray
  (d ln R / dw = V_r / V_w) and its pressure integral (method section 13).

Local Mach: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2). Total pressure behind the shock: the normal-shock ratio
at M0 sin(beta) [4, eq. 99]; so p/p0 = pi_s ((1 - V'^2)/(1 - V0'^2))^(g/(g-1)), rho/rho0 likewise with 1/(g-1).

Cost: never per point; per cone a family of 48 surface Mach numbers and one refinement of the detachment point
(about 70 steps of the integrator in all, once per cone), then three or four inward passes for all the
columns of a map together (about 20 steps each). Results are kept per cone and flight Mach number (rounded to
1e-9); ``clear_cache`` empties them.

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
from functools import cached_property, lru_cache

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.rk8 import integrate

_G1 = 0.5 * (GAMMA - 1.0)
_K = (GAMMA - 1.0) / (GAMMA + 1.0)
_E = 1.0 / (GAMMA - 1.0)
_ROUND = 9  # decimals of the cache keys (Mach number, degrees)
_H = 0.025  # rad: longest integrator step (wave angles to about 1e-9 rad against a tight solve_ivp)
_BETA_TOL = 1e-12  # rad: a column is settled when its secant step on beta is below this
_TOP_MACH = 6.2  # the family is tabulated up this far (maps reach Mach 6)
_CHEB = 32  # Chebyshev series degree + 1 of a single solution's rays


def _speed_from_mach(m):
    """V/V_max from Mach number: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2)."""
    x = _G1 * np.square(m)
    return np.sqrt(x / (1.0 + x))


def _mach_from_speed(v):
    """Mach number from V/V_max (the inverse of ``_speed_from_mach``), arrays."""
    v2 = np.square(v)
    return np.sqrt(v2 / (_G1 * (1.0 - v2)))


def _steps(span, longest: float = _H) -> int:
    """Equal steps no longer than ``longest`` (rad) over the widest of the members' spans."""
    return max(4, int(math.ceil(float(np.max(np.abs(span), initial=0.0)) / longest)))


def _taylor_maccoll(w, y, cot=None):
    """dy/dw for y = (V_r, V_w) (outward past a shock a member may reach the sonic line of V_w and turn to
    NaN; the callers read nothing beyond); ``cot``: cot(w) when known."""
    vr, vw = y[0], y[1]
    q = vw * vw
    a = _G1 * (1.0 - vr * vr - q)
    out = np.empty_like(y)
    out[0] = vw
    out[1] = (q * vr - a * (2.0 * vr + vw * (1.0 / np.tan(w) if cot is None else cot))) / (a - q)
    return out


def _cot(w):
    return 1.0 / np.tan(w)


def _tm_cot(cot, y):
    """``_taylor_maccoll`` with the cotangents of the stages computed once (``rk8.integrate(..., at=_cot)``)."""
    return _taylor_maccoll(None, y, cot)


def _shock_f(w, vr, vw):
    """Prandtl's shock condition f(w) (zero on the shock) and df/dw."""
    t = np.tan(w)
    dvw = _taylor_maccoll(w, np.stack([vr, vw]))[1]
    f = -vw * vr * t - _K * (1.0 - vr * vr)
    df = -(dvw * vr + vw * vw) * t - vw * vr / np.cos(w) ** 2 + 2.0 * _K * vr * vw
    return f, df


def _normal_shock_pt(mn1):
    """Normal-shock total-pressure ratio at normal Mach ``mn1`` [4, eq. 99] (arrays)."""
    m2 = np.square(mn1)
    return ((GAMMA + 1.0) * m2 / ((GAMMA - 1.0) * m2 + 2.0)) ** (GAMMA * _E) * (
        (GAMMA + 1.0) / (2.0 * GAMMA * m2 - (GAMMA - 1.0))) ** _E


def _behind_shock(m0, beta):
    """(V_r, V_w, p_t ratio, V0') just behind the shock of wave angle ``beta`` at flight Mach ``m0`` [4]."""
    v0 = _speed_from_mach(m0)
    mn2 = np.square(m0 * np.sin(beta))
    density = (GAMMA + 1.0) * mn2 / ((GAMMA - 1.0) * mn2 + 2.0)  # rho behind / rho0, eq. 93
    return v0 * np.cos(beta), -v0 * np.sin(beta) / density, _normal_shock_pt(m0 * np.sin(beta)), v0


# -- outwards: the family of one cone --------------------------------------------------------------------------------

def _scan(w0, y0, w1, steps: int):
    """Integrate members from rays ``w0`` to ``w1`` keeping every step: the rays, states, f and df/dw at every
    step end, whether the flow there is sound (inside the sonic line of V_w) and whether f is smooth over the
    step before (its change within 20 % of the linear one: a step that ran into the sonic line is not)."""
    with np.errstate(all="ignore"):
        y = integrate(_tm_cot, w0, w1, y0, steps, nodes=True, at=_cot)
        w = w0 + (np.asarray(w1) - w0) * (np.arange(steps + 1) / steps)[:, None]
        vr, vw = y[:, 0], y[:, 1]
        f, df = _shock_f(w, vr, vw)
        sound = np.isfinite(f) & (_G1 * (1.0 - vr * vr - vw * vw) - vw * vw > 0.0)
        lin = df[:-1] * (w[1] - w[0])
        smooth = np.ones(f.shape, bool)
        smooth[1:] = (np.abs(f[1:] - f[:-1] - lin) < 0.2 * np.abs(lin)) & (np.abs(df[1:] - df[:-1]) * (w[1] - w[0])
                                                                           < 0.5 * np.abs(lin))
    return w, y, f, df, sound & smooth


def _outward(theta_c: float, surface_mach, end, steps: int):
    """Integrate members from the cone (surface Mach numbers) towards the rays ``end`` and find each one's first
    shock (f = 0). A step in which f turns positive, the flow reaches the sonic line (just beyond a weak shock)
    or f is not smooth is integrated again in 16 parts, until the root lies in a smooth part, where it is taken
    on the cubic Hermite interpolant of f (past a refined step the parts grow fourfold again). Returns (M0, beta); NaN where a member meets no shock before the
    sonic line (or ``end``), or its free stream would not be supersonic or would pass V_max."""
    mc = np.asarray(surface_mach, dtype=float)
    m0, beta = np.full(mc.size, np.nan), np.full(mc.size, np.nan)
    todo = np.arange(mc.size)
    end = np.broadcast_to(np.asarray(end, dtype=float), mc.shape)
    w0, w1 = np.full(mc.size, float(theta_c)), end.copy()
    y0 = np.stack([_speed_from_mach(mc), np.zeros(mc.size)])
    for level in range(24):
        w, y, f, df, fine = _scan(w0, y0, w1, steps)
        stop = (f > 0.0) | ~fine
        stopped = stop[1:].any(axis=0)
        i = np.where(stopped, np.argmax(stop[1:], axis=0) + 1, steps)
        c = np.arange(todo.size)
        done = stopped & (f[i, c] > 0.0) & fine[i, c] & (level > 0)  # the first pass only brackets
        if done.any():
            m0[todo[done]], beta[todo[done]] = _hermite_root(w[:, done], y[:, :, done], f[:, done], df[:, done],
                                                             i[done])
        go_on = ~stopped & (w1 < end[todo])  # a part passed without a stop: on to the end
        keep = (stopped & ~done) | go_on
        if not keep.any():
            break
        start = np.where(go_on, i, i - 1)[keep]
        todo, c = todo[keep], c[keep]
        w0, y0 = w[start, c], y[start, :, c].T
        h = w[1, c] - w[0, c]
        w1 = np.where(go_on[keep], np.minimum(end[todo], w0 + 64.0 * h), w0 + h)  # 16 parts of 4 h, or of h / 16
        steps = 16
    return m0, beta


def _hermite_root(w, y, f, df, j):
    """(M0, beta) from the root of the cubic Hermite interpolant of f over step j - 1 .. j of each member."""
    c = np.arange(j.size)
    h = w[1] - w[0]
    with np.errstate(all="ignore"):
        f0, f1, d0, d1 = f[j - 1, c], f[j, c], df[j - 1, c] * h, df[j, c] * h
        t = np.clip(f0 / (f0 - f1), 0.0, 1.0)
        for _ in range(4):  # Newton on the cubic
            t2, t3 = t * t, t * t * t
            p = (2 * t3 - 3 * t2 + 1) * f0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * f1 + (t3 - t2) * d1
            dp = (6 * t2 - 6 * t) * f0 + (3 * t2 - 4 * t + 1) * d0 + (-6 * t2 + 6 * t) * f1 + (3 * t2 - 2 * t) * d1
            t = np.clip(t - p / np.where(dp != 0.0, dp, 1.0), 0.0, 1.0)
        t2, t3 = t * t, t * t * t
        r0, r1, s0, s1 = y[j - 1, 0, c], y[j, 0, c], y[j - 1, 1, c] * h, y[j, 1, c] * h
        vr = (2 * t3 - 3 * t2 + 1) * r0 + (t3 - 2 * t2 + t) * s0 + (-2 * t3 + 3 * t2) * r1 + (t3 - t2) * s1
        beta = w[j - 1, c] + t * h
        v0 = vr / np.cos(beta)
        ok = np.isfinite(v0) & (v0 < 1.0) & (v0 > _speed_from_mach(1.0))
        return np.where(ok, _mach_from_speed(np.where(ok, v0, 0.5)), np.nan), np.where(ok, beta, np.nan)


@dataclass(frozen=True)
class _Family:
    detachment_mach: float
    detachment_surface_mach: float
    x: np.ndarray  # sqrt(M0 - M_det) along the weak branch, from 0 (the detachment point)
    beta: np.ndarray  # wave angle (rad) there


def _vertex(x, y, degree: int = 4):
    """The least value of the least-squares polynomial of ``degree`` through (x, y) within [x[0], x[-1]]:
    (x, value, largest residual of the fit)."""
    mid = x[len(x) // 2]
    c = np.polyfit(x - mid, y, degree)
    d1, d2 = np.polyder(c), np.polyder(c, 2)
    t = float(x[int(np.argmin(y))] - mid)
    with np.errstate(all="ignore"):
        for _ in range(8):  # Newton on the derivative
            step = np.polyval(d1, t) / np.polyval(d2, t)
            t = float(np.clip(t - step, x[0] - mid, x[-1] - mid)) if np.isfinite(step) else t
    return float(mid + t), float(np.polyval(c, t)), float(np.max(np.abs(np.polyval(c, x - mid) - y)))


@lru_cache(maxsize=64)
def _family(cone_deg: float) -> _Family:
    """Tabulate (M0, beta) over the surface Mach number for one cone; find the detachment point."""
    th = math.radians(cone_deg)
    # surface Mach numbers from 0.6 (below every detachment point of a cone up to 41 deg: the strong branch
    # further down only costs steps) far up the weak branch
    mc = np.concatenate([np.linspace(0.6, 1.0, 24, endpoint=False), np.geomspace(1.0, 40.0, 120)])
    top = 0.5 * math.pi - 1e-6
    m0, beta = _outward(th, mc, np.full(mc.size, top), _steps(top - th, 0.05))
    # the family: the members next to one another about the least flight Mach number, up to _TOP_MACH
    ok = np.isfinite(m0)
    k = int(np.nanargmin(np.where(ok, m0, np.nan)))
    first = k - int(np.argmin(ok[k::-1])) + 1 if not ok[:k + 1].all() else 0
    last = k + int(np.argmin(ok[k:])) if not ok[k:].all() else mc.size
    over = np.nonzero((m0[k:last] > _TOP_MACH) & (mc[k:last] > 1.0))[0]
    if over.size:
        last = k + int(over[0]) + 1
    mc, m0, beta = mc[first:last], m0[first:last], beta[first:last]
    # the detachment point: the least flight Mach number; 17 surface Mach numbers across the members next to
    # the least one, closer in about the least of them until a quartic through nine of them fits to 1e-9
    k = int(np.argmin(m0))
    lo, hi = mc[max(k - 1, 0)], mc[min(k + 1, mc.size - 1)]
    if 2 <= k <= mc.size - 3:  # the quartic through the five members about it: probes within half a spacing
        guess, _, _ = _vertex(mc[k - 2:k + 3], m0[k - 2:k + 3])
        half = 0.25 * (hi - lo)
        lo, hi = max(lo, guess - half), min(hi, guess + half)
    for _ in range(6):
        probe = np.linspace(lo, hi, 17)
        end = np.minimum(np.interp(probe, mc, beta) + 0.1, top)
        pm0, pbeta = _outward(th, probe, end, _steps(end - th, 0.03))
        if not np.isfinite(pm0).all():
            pm0, pbeta = _outward(th, probe, np.full(probe.size, top), _steps(top - th, 0.03))
        if not np.isfinite(pm0).any():
            raise ValueError(f"no attached conical shock found about the detachment point of a {cone_deg:g} deg cone")
        j = int(np.nanargmin(pm0))
        near = slice(int(np.clip(j - 4, 0, 8)), int(np.clip(j - 4, 0, 8)) + 9)
        if np.isfinite(pm0[near]).all():
            mc_det, m_det, misfit = _vertex(probe[near], pm0[near])
            if misfit < 1e-9 and probe[near][0] < mc_det < probe[near][-1]:
                break
        lo, hi = probe[max(j - 1, 0)], probe[min(j + 1, 16)]
    else:
        mc_det, m_det = float(probe[j]), float(pm0[j])
    beta_det = float(np.polyval(np.polyfit(probe[near] - mc_det, pbeta[near], 4), 0.0))
    weak = mc > mc_det
    x = np.concatenate([[0.0], np.sqrt(np.maximum(m0[weak] - m_det, 0.0))])
    return _Family(m_det, mc_det, x, np.concatenate([[beta_det], beta[weak]]))


def _interpolate(x, y, xq):
    """Four-point Lagrange interpolation of the table (x increasing) at ``xq`` (held at the ends)."""
    xq = np.clip(xq, x[0], x[-1])
    if x.size < 4:
        return np.interp(xq, x, y)
    i = np.clip(np.searchsorted(x, xq) - 2, 0, x.size - 4)[:, None] + np.arange(4)
    xs, ys = x[i], y[i]
    out = np.zeros(xq.shape)
    for j in range(4):
        others = [m for m in range(4) if m != j]
        weight = np.prod([(xq - xs[:, m]) / (xs[:, j] - xs[:, m]) for m in others], axis=0)
        out += weight * ys[:, j]
    return out


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


# -- inwards: flight Mach columns ------------------------------------------------------------------------------------

def _lip_rhs(pt, v0):
    """dy/dw for y = (V_r, V_w, Q, J): Taylor-Maccoll, the conical stream line Q = R^2 (R from the tip, 1 on the
    shock; dR/(R dw) = V_r/V_w) and J = int (p/p0 - 1) d(Q sin^2 w) along it."""
    def rhs(w, y):
        out = _taylor_maccoll(w, y)  # rows 2, 3 are overwritten
        vr, vw, q = y[0], y[1], y[2]
        p = pt * ((1.0 - vr * vr - vw * vw) / (1.0 - v0 * v0)) ** (GAMMA * _E)
        s = np.sin(w)
        ratio = vr / vw
        out[2] = 2.0 * q * ratio
        out[3] = (p - 1.0) * q * (2.0 * ratio * s * s + np.sin(2.0 * w))
        return out
    return rhs


def _lip_values(m0, beta, lip):
    """Per member, from its shock inwards to the lip ray ``lip`` (rad, < beta): MFR_max, the pressure integral,
    and the stream line's (r_s/r_L)^2 at the shock."""
    vr, vw, pt, v0 = _behind_shock(m0, beta)
    y0 = np.stack([vr, vw, np.ones(m0.size), np.zeros(m0.size)])
    with np.errstate(all="ignore"):
        vr, vw, q, j = integrate(_lip_rhs(pt, v0), beta, lip, y0, _steps(beta - lip))
    x = (1.0 - vr * vr - vw * vw) / (1.0 - v0 * v0)
    mfr = pt * x ** _E * np.abs(vw) / (v0 * np.sin(lip))
    rl2 = q * np.sin(lip) ** 2  # (r_L / R_shock)^2
    return mfr, j / rl2, np.sin(beta) ** 2 / rl2


def _inward_pass(th: float, m0, beta):
    """From trial wave angles to the cone: V_w there (zero at the solution) and the surface speed."""
    vr, vw, _, _ = _behind_shock(m0, beta)
    with np.errstate(all="ignore"):
        y = integrate(_tm_cot, beta, np.full(m0.size, th), np.stack([vr, vw]), _steps(beta - th), at=_cot)
    return y[1], np.hypot(y[0], y[1])


def _solve(th: float, m0, beta):
    """Secant steps on the wave angles of all columns together, started from ``beta`` with a finite-difference
    slope, until every step is below 1e-12 rad. Returns (beta, surface speed)."""
    n = m0.size
    eps = 1e-7
    r, speed = _inward_pass(th, np.concatenate([m0, m0]), np.concatenate([beta, beta + eps]))
    slope = (r[n:] - r[:n]) / eps
    r, speed = r[:n], speed[:n]
    for _ in range(12):
        step = np.clip(-r / np.where(slope != 0.0, slope, 1.0), -0.05, 0.05)
        idx = np.nonzero(~(np.abs(step) < _BETA_TOL))[0]
        if not idx.size:
            break
        new = np.clip(beta[idx] + step[idx], th + 1e-9, 0.5 * math.pi - 1e-9)
        r_new, speed[idx] = _inward_pass(th, m0[idx], new)
        moved = new - beta[idx]
        slope[idx] = np.where(moved != 0.0, (r_new - r[idx]) / np.where(moved != 0.0, moved, 1.0), slope[idx])
        beta[idx], r[idx] = new, r_new
    return beta, speed


_COLUMNS: dict[tuple[float, float | None], dict[float, tuple[float, ...]]] = {}


def cone_columns(flight_mach, cone_half_angle_deg: float, design_mach: float | None = None) -> np.ndarray:
    """The first cone's flow at flight Mach columns, all columns solved together (cached per column).

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach numbers M0 (dimensionless), 1-D.
    cone_half_angle_deg : float
        Cone half-angle, deg.
    design_mach : float, optional
        The spike's shock-on-lip Mach number M_d: the lip lies on the ray of the shock angle there
        (method section 9). Without it the last two rows are NaN.

    Returns
    -------
    numpy.ndarray
        Shape (6, n): wave angle (rad), surface Mach, shock total-pressure ratio, p_c/p0, MFR_max and the
        pre-entry pressure integral int (p/p0 - 1) d(r^2/r_L^2) along the dividing stream line (1 and 0 at
        and above M_d); NaN where M0 <= 1 or the shock is detached (M0 below ``detachment_mach``).

    Examples
    --------
    >>> import numpy as np
    >>> c = cone_columns(np.array([1.1, 1.8, 2.0]), 20.0, design_mach=2.0)
    >>> print(np.round(np.degrees(c[0]), 2), np.round(c[4], 4))
    [  nan 41.13 37.8 ] [  nan 0.949 1.   ]
    """
    cone = round(float(cone_half_angle_deg), _ROUND)
    design = None if design_mach is None else round(float(design_mach), _ROUND)
    ms = np.round(np.asarray(flight_mach, dtype=float).ravel(), _ROUND)
    out = np.full((6, ms.size), np.nan)
    fam = _family(cone) if cone > 0.0 else None
    if fam is None:
        return out
    if len(_COLUMNS) >= 64 and (cone, design) not in _COLUMNS:
        _COLUMNS.clear()
    cache = _COLUMNS.setdefault((cone, design), {})
    attached = (ms > 1.0) & (ms >= fam.detachment_mach)
    if design is not None and design < fam.detachment_mach:
        attached[:] = False  # no lip ray: the spike's design check refuses this inlet
    new = np.unique(ms[attached & np.array([m not in cache for m in ms])])
    if new.size:
        m = new if design is None or design in cache else np.unique(np.append(new, design))
        th = math.radians(cone)
        beta, speed = _solve(th, m, _interpolate(fam.x, fam.beta, np.sqrt(m - fam.detachment_mach)))
        v0 = _speed_from_mach(m)
        pt = _normal_shock_pt(m * np.sin(beta))
        pc = pt * ((1.0 - speed ** 2) / (1.0 - v0 ** 2)) ** (GAMMA * _E)
        mfr, integral = np.full(m.size, np.nan), np.full(m.size, np.nan)
        if design is not None:
            lip = beta[m == design][0] if design not in cache else cache[design][0]
            below = m < design
            mfr[~below], integral[~below] = 1.0, 0.0
            if below.any():
                mfr[below], integral[below], _ = _lip_values(m[below], beta[below], np.full(below.sum(), lip))
        for row in zip(m.tolist(), beta.tolist(), _mach_from_speed(speed).tolist(), pt.tolist(), pc.tolist(),
                       mfr.tolist(), integral.tolist()):
            cache[row[0]] = row[1:]
    for i in np.nonzero(attached)[0]:
        out[:, i] = cache[float(ms[i])]
    return out


def solve_columns(flight_mach, cone_half_angle_deg: float) -> None:
    """Solve every attached column of ``flight_mach`` for one cone together and keep the results
    (``cone_columns`` without a lip); ``cone_solution`` and ``cone_flow`` then read them.

    Parameters
    ----------
    flight_mach : array_like
        Flight Mach numbers M0 (dimensionless), any shape.
    cone_half_angle_deg : float
        Cone half-angle, deg.

    Examples
    --------
    The batch and the single-column solve agree (the same columns, solved to 1e-12 rad in beta):

    >>> import numpy as np
    >>> solve_columns(np.linspace(1.5, 2.5, 11), 20.0)
    >>> round(cone_solution(2.0, 20.0).wave_angle_deg, 4)
    37.7959
    """
    cone_columns(np.unique(np.asarray(flight_mach, dtype=float)), cone_half_angle_deg)


def clear_cache() -> None:
    """Empty every per-column and per-cone cache (for timing from cold).

    Examples
    --------
    >>> clear_cache()
    >>> round(cone_solution(2.0, 20.0).surface_mach, 3)
    1.568
    """
    _COLUMNS.clear()
    _family.cache_clear()


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

    @cached_property
    def _series(self):
        """Chebyshev series of (V_r, V_w) over [theta_c, beta]: one inward integration to its nodes."""
        th, beta = math.radians(self.cone_half_angle_deg), math.radians(self.wave_angle_deg)
        t = np.cos(np.pi * (np.arange(_CHEB) + 0.5) / _CHEB)
        nodes = th + 0.5 * (t + 1.0) * (beta - th)
        vr, vw, _, _ = _behind_shock(self.flight_mach, beta)
        y = integrate(_taylor_maccoll, np.full(_CHEB, beta), nodes, np.stack([np.full(_CHEB, vr), np.full(_CHEB, vw)]),
                      _steps(beta - th))
        return np.polynomial.chebyshev.chebfit(t, y.T, _CHEB - 1)

    def ray(self, omega_deg) -> ConicalRay:
        """Flow on rays ``omega_deg`` (deg, clipped to cone <= omega <= beta; array)."""
        th, beta = math.radians(self.cone_half_angle_deg), math.radians(self.wave_angle_deg)
        w = np.radians(np.clip(np.asarray(omega_deg, dtype=float), self.cone_half_angle_deg, self.wave_angle_deg))
        vr, vw = np.polynomial.chebyshev.chebval(2.0 * (w - th) / (beta - th) - 1.0, self._series)
        v0 = float(_speed_from_mach(self.flight_mach))
        v2 = vr * vr + vw * vw
        x = (1.0 - v2) / (1.0 - v0 ** 2)
        return ConicalRay(mach=_mach_from_speed(np.sqrt(v2)), radial_velocity_ratio=vr / v0,
                          normal_velocity_ratio=vw / v0, density_ratio=self.shock_total_pressure_ratio * x ** _E,
                          pressure_ratio=self.shock_total_pressure_ratio * x ** (GAMMA * _E))

    def _lip(self, lip_ray_deg: float):
        m0, beta = np.array([self.flight_mach]), np.array([math.radians(self.wave_angle_deg)])
        return [float(v[0]) for v in _lip_values(m0, beta, np.array([math.radians(lip_ray_deg)]))]

    def captured_flow_ratio(self, lip_ray_deg: float) -> float:
        """Flow through the cone-shaped surface of half-angle omega_L from the tip to the lip circle, over the
        free-stream flow through the lip circle (method section 9):
        MFR = rho(w_L) |V_w(w_L)| / (rho0 V0 sin w_L); 1 for omega_L at or beyond the shock."""
        if lip_ray_deg >= self.wave_angle_deg:
            return 1.0
        return self._lip(lip_ray_deg)[0]

    def stream_surface_pressure_integral(self, lip_ray_deg: float) -> tuple[float, float]:
        """Along the conical stream line that ends on the lip (ray omega_L), from the shock to the lip:
        (I, s) with I = integral (p/p0 - 1) d(r^2/r_L^2) (r the radius from the axis) and s = (r_s/r_L)^2
        at the shock crossing; (0, 1) when omega_L lies at or beyond the shock.

        The stream line obeys dR/(R dw) = V_r/V_w (R the distance from the tip, r = R sin w); both are integrated
        with the flow from the shock inwards (the same integration as a map's columns).
        """
        if not lip_ray_deg < self.wave_angle_deg:
            return 0.0, 1.0
        _, integral, s_shock = self._lip(lip_ray_deg)
        return integral, s_shock


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
    beta, mc, pt, pc = cone_columns(np.array([m0]), cone)[:4, 0]
    if not np.isfinite(beta):
        return None
    return ConeSolution(m0, cone, math.degrees(beta), float(mc), float(pt), float(pc))


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

    The unique Mach numbers of the array are solved together once (``cone_columns``, cached) and mapped back.

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
    cols = cone_columns(uniq, cone_half_angle_deg)
    det = (uniq > 1.0) & ~np.isfinite(cols[0])
    inverse = inverse.reshape(m0.shape)
    return ConeFlow(cols[0][inverse], cols[1][inverse], cols[2][inverse], cols[3][inverse], det[inverse])
