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
  the family of one cone over the surface Mach number (``taylor_maccoll.cone_family``): the flight Mach number
  falls to a minimum, the detachment Mach number of the cone (below it no attached shock exists), and rises
  again; the weak branch is the one with the higher surface Mach number;
- inwards from the shock (the state above at a trial beta) to the cone angle, for flight Mach columns
  (``cone_columns``): V_w must vanish on the cone, so beta is found by secant steps on V_w(theta_c) started
  from the family until a step is below 1e-12 rad. Every column of a map is integrated in one pass at three
  trial wave angles about its start value, and the steps are taken on the quadratic through the three V_w
  (a column whose result lies beyond the trials' reach passes again from there); one more pass at the settled
  wave angles gives the surface speeds. Another inward pass carries the dividing stream line of a spike inlet from the shock to the lip ray (d ln R / dw = V_r / V_w)
  and its pressure integral (method section 13). Behind a weak shock (normal Mach near 1, the equation's
  denominator nearly zero) the first fifth of the way is taken in graded steps.

Local Mach: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2). Total pressure behind the shock: the normal-shock ratio
at M0 sin(beta) [4, eq. 99]; so p/p0 = pi_s ((1 - V'^2)/(1 - V0'^2))^(g/(g-1)), rho/rho0 likewise with 1/(g-1).

Cost: never per point; per cone a family of 84 surface Mach numbers and a refinement of the detachment point
on 17 more (about 95 steps of the integrator, once per cone), then for all the columns of a map together one
inward pass to the cone and one to the lip ray (20 to 50 steps each). Results are kept per cone and flight
Mach number (rounded to 1e-9); ``clear_cache`` empties them. Wave angles agree with a tight ``solve_ivp`` to
about 1e-10 rad.

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
from functools import cached_property

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.rk8 import integrate
from engine_air.physics.taylor_maccoll import (  # the equation and one cone's family (same package)
    _E,
    _G1,
    _behind_shock,
    _cot,
    _interpolate,
    _mach_from_speed,
    _normal_shock_pt,
    _speed_from_mach,
    _steps,
    _tm_cot,
    cone_family as _family,
)

_ROUND = 9  # decimals of the cache keys (Mach number, degrees)
_BETA_TOL = 1e-12  # rad: the secant steps stop when a step is below this
_CHEB = 32  # Chebyshev series degree + 1 of a single solution's rays


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

def _lip_rays(w):
    """What the stream line's equations need of the rays ``w``: cot w, sin^2 w and sin 2w (rows), all from
    t = tan w (sin^2 w = t^2 / (1 + t^2), sin 2w = 2 t / (1 + t^2))."""
    t = np.tan(w, out=w)  # over the stage rays rk8.integrate made for it
    t2 = t * t
    return np.stack([1.0 / t, t2 / (1.0 + t2), 2.0 * t / (1.0 + t2)], axis=-2)


def _lip_rhs(pt, v0):
    """dy/dw for y = (V_r, V_w, Q, J): Taylor-Maccoll, the conical stream line Q = R^2 (R from the tip, 1 on the
    shock; dR/(R dw) = V_r/V_w) and J = int (p/p0 - 1) d(Q sin^2 w) along it, with
    p/p0 = pi_s ((1 - V^2) / (1 - V0^2))^(g/(g-1)); ``rays`` from ``_lip_rays``."""
    scale = pt / (1.0 - v0 * v0) ** (GAMMA * _E)
    room = np.empty(np.shape(v0))  # 1 - V^2, from the Taylor-Maccoll step

    def rhs(rays, y, out):
        _tm_cot(rays[0], y, out, room)  # rows 2, 3 are overwritten
        vr, vw, q = y[0], y[1], y[2]
        dq = vr / vw
        dq *= q
        np.multiply(dq, 2.0, out=out[2])  # dQ/dw = 2 Q V_r / V_w
        p = room ** (GAMMA * _E)
        p *= scale
        p -= 1.0
        t = q * rays[2]
        t += out[2] * rays[1]  # d(Q sin^2 w)/dw
        np.multiply(p, t, out=out[3])
        return out
    rhs.writes_out = True  # rk8.integrate passes each stage's slot as ``out``
    return rhs


def _from_shock(rhs, beta, end, y0, near: float, at=None):
    """Integrate inwards from the shock rays ``beta`` to ``end`` (``at``: what ``rhs`` takes of the rays, see
    ``rk8.integrate``). Behind a weak shock the normal Mach number is close to 1 and the equation's denominator
    nearly vanishes: there the first fifth of the way is taken in 12 steps growing as s^3 (s from 0 at the
    shock), the rest in equal steps."""
    vr, vw = y0[0], y0[1]
    if np.max(vw * vw / (_G1 * (1.0 - vr * vr - vw * vw))) > 0.9:
        mid = beta + 0.2 * (end - beta)
        span = mid - beta

        def graded(s):  # w = beta + span s^3: what ``at`` makes of the stage rays, and dw/ds as the last row
            w = beta + span * s ** 3
            rays = at(w) if at is not None else w
            if rays.ndim == w.ndim:
                rays = rays[..., None, :]
            return np.concatenate([rays, (3.0 * s * s * span)[..., None, :]], axis=-2)

        def scaled(a, y, out):  # dy/ds = dy/dw dw/ds, written into the stage's slot
            rhs(a[0] if a.shape[0] == 2 else a[:-1], y, out)
            out *= a[-1]
            return out
        scaled.writes_out = True
        y0 = integrate(scaled, np.zeros(beta.shape), np.ones(beta.shape), y0, 12, at=graded)
        beta = mid
    return integrate(rhs, beta, end, y0, _steps(beta - end, near=near), at=at)


def _lip_values(m0, beta, lip):
    """Per member, from its shock inwards to the lip ray ``lip`` (rad, < beta): MFR_max, the pressure integral,
    and the stream line's (r_s/r_L)^2 at the shock."""
    vr, vw, pt, v0 = _behind_shock(m0, beta)
    y0 = np.stack([vr, vw, np.ones(m0.size), np.zeros(m0.size)])
    with np.errstate(all="ignore"):
        vr, vw, q, j = _from_shock(_lip_rhs(pt, v0), beta, lip, y0, float(np.min(lip)), at=_lip_rays)
    x = (1.0 - vr * vr - vw * vw) / (1.0 - v0 * v0)
    mfr = pt * x ** _E * np.abs(vw) / (v0 * np.sin(lip))
    rl2 = q * np.sin(lip) ** 2  # (r_L / R_shock)^2
    return mfr, j / rl2, np.sin(beta) ** 2 / rl2


def _inward_pass(th: float, m0, beta):
    """From trial wave angles to the cone: V_w there (zero at the solution) and the surface speed."""
    vr, vw, _, _ = _behind_shock(m0, beta)
    with np.errstate(all="ignore"):
        y = _from_shock(_tm_cot, beta, np.full(m0.size, th), np.stack([vr, vw]), th, at=_cot)
    return y[1], np.hypot(y[0], y[1])


def _solve(th: float, m0, beta):
    """Wave angles of all columns together, from the start values ``beta``. A pass integrates every open column
    at three trial angles b, b + 1e-7 and b - 1e-6 rad; the secant steps, started with the slope over the first
    two, are taken on the quadratic through the three V_w(theta_c) (``_secant``) until one is below 1e-12 rad.
    A column whose result lies within 2e-6 rad of b, with V_w(theta_c) small there (not beside a pole of it,
    which a slender cone's flow has just below its wave angle), is settled there; the surface speeds come from
    one more pass at the settled wave angles (read off the quadratic they moved drag coefficients just below the
    design Mach number by up to 3e-12 relative). The others pass again after a secant step through this pass's b and
    the last one's (the first from the slope at b; at most 0.05 rad, and at most halfway to the Mach angle or
    the cone). The family's start values are within 1e-6 rad, so one pass settles every column of a map; there
    the wave angle is the one the secant passes of before ended on (the same bits where they ended after one
    step). Returns (beta, surface speed)."""
    beta = np.array(beta, dtype=float)
    last = np.full((2, m0.size), np.nan)  # the last pass's b and V_w(theta_c) there
    todo = np.arange(m0.size)
    for _ in range(12):
        n = todo.size
        b = beta[todo]
        trial = np.concatenate([b, b + 1e-7, b - 1e-6])
        r, _ = _inward_pass(th, np.tile(m0[todo], 3), trial)
        r, offsets = r.reshape(3, n), trial.reshape(3, n)[1:] - b  # the offsets exactly
        quadratic = _quadratic(r, offsets)
        d = _secant(quadratic, (r[1] - r[0]) / 1e-7, b, th) - b
        settled = (np.abs(d) <= 2e-6) & (np.abs(r[0]) <= 1e-4)
        moved = b - last[0, todo]
        slope = np.where(moved != 0.0, (r[0] - last[1, todo]) / np.where(moved != 0.0, moved, 1.0), np.nan)
        slope = np.where(np.isfinite(slope), slope, quadratic[1])
        step = np.clip(-r[0] / np.where(slope != 0.0, slope, 1.0), -0.05, 0.05)
        last[:, todo] = b, r[0]
        low = np.maximum(th, np.arcsin(1.0 / m0[todo]))  # the cone, and the Mach angle (M0 sin beta > 1)
        new = np.minimum(b + step, 0.5 * math.pi - 1e-9)
        new = np.where(new > low, new, 0.5 * (b + low))  # halfway to a bound it would pass
        beta[todo] = np.where(settled, b + d, new)
        todo = todo[~settled]
        if not todo.size:
            break
    _, speed = _inward_pass(th, m0, beta)  # the surface speed integrated at the wave angle itself
    return beta, speed


def _quadratic(values, offsets):
    """Coefficients (c0, c1, c2) of c0 + c1 d + c2 d^2 through ``values[0]`` at d = 0 and ``values[1:]`` at the
    two ``offsets`` (arrays, one column a member)."""
    s1 = (values[1] - values[0]) / offsets[0]
    s2 = (values[2] - values[0]) / offsets[1]
    c2 = (s1 - s2) / (offsets[0] - offsets[1])
    return values[0], s1 - c2 * offsets[0], c2


def _secant(c, slope, b, th: float):
    """Secant steps on V_w(theta_c) = 0 from ``b`` with the start ``slope``, then through each column's last two
    points, until a step is below 1e-12 rad (steps at most 0.05 rad, beta within (theta_c, pi/2)); V_w is read
    off the quadratic with coefficients ``c`` in beta - b (``_quadratic``)."""
    c0, c1, c2 = c
    beta, value, slope = b.copy(), c0.copy(), slope.copy()
    for _ in range(12):
        step = np.clip(-value / np.where(slope != 0.0, slope, 1.0), -0.05, 0.05)
        idx = np.nonzero(~(np.abs(step) < _BETA_TOL))[0]
        if not idx.size:
            break
        new = np.clip(beta[idx] + step[idx], th + 1e-9, 0.5 * math.pi - 1e-9)
        d = new - b[idx]
        v_new = c0[idx] + d * (c1[idx] + d * c2[idx])
        moved = new - beta[idx]
        slope[idx] = np.where(moved != 0.0, (v_new - value[idx]) / np.where(moved != 0.0, moved, 1.0), slope[idx])
        beta[idx], value[idx] = new, v_new
    return beta


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
    new = np.unique(ms[attached & np.array([m not in cache for m in ms.tolist()], dtype=bool)])
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
    idx = np.nonzero(attached)[0]
    if idx.size:  # one array from the cached rows (a loop over columns cost a column's lookup each)
        out[:, idx] = np.array([cache[m] for m in ms[idx].tolist()]).T
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
        y = _from_shock(_tm_cot, np.full(_CHEB, beta), nodes, np.stack([np.full(_CHEB, vr), np.full(_CHEB, vw)]), th,
                        at=_cot)
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
