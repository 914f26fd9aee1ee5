"""The Taylor-Maccoll equation in V_max units and the family of conical flows of one cone (its detachment point).

The equation, the shock condition and the state behind a conical shock are those of ``engine_air.physics.conical``
(see its text and references [1-4] there); this module holds them with the outward integration from the cone
surface, which tabulates one cone's family over the surface Mach number: the flight Mach number falls to a minimum,
the detachment Mach number (below it no attached shock exists), and rises again along the weak branch.
``cone_family`` finds that minimum to about 1e-11 and keeps the weak branch's wave angles against
x = sqrt(M0 - M_det) as start values for ``conical.cone_columns``.

>>> round(cone_family(20.0).detachment_mach, 3)
1.211
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from engine_air.physics.constants import GAMMA
from engine_air.physics.rk8 import integrate

_G1 = 0.5 * (GAMMA - 1.0)
_K = (GAMMA - 1.0) / (GAMMA + 1.0)
_E = 1.0 / (GAMMA - 1.0)
_H = 0.025  # rad: longest integrator step (wave angles to about 1e-9 rad against a tight solve_ivp)
_TOP_MACH = 6.2  # the family is tabulated up this far (maps reach Mach 6)
# The family's surface Mach numbers: from 0.6 (below every detachment point of a cone up to 41 deg: the strong
# branch further down only costs steps) up the weak branch to the first at or above _TOP_MACH; the flight Mach
# number is above the surface Mach number (the flow is compressed through the shock and along the rays), so the
# members beyond that one would all lie past the table's end.
_MEMBERS = np.concatenate([np.linspace(0.6, 1.0, 24, endpoint=False), np.geomspace(1.0, 40.0, 120)])
_MEMBERS = _MEMBERS[:int(np.searchsorted(_MEMBERS, _TOP_MACH)) + 1]


def _speed_from_mach(m):
    """V/V_max from Mach number: V'^2 = (g-1)/2 M^2 / (1 + (g-1)/2 M^2)."""
    x = _G1 * np.square(m)
    return np.sqrt(x / (1.0 + x))


def _mach_from_speed(v):
    """Mach number from V/V_max (the inverse of ``_speed_from_mach``), arrays."""
    v2 = np.square(v)
    return np.sqrt(v2 / (_G1 * (1.0 - v2)))


def _steps(span, longest: float = _H, near: float | None = None, share: float = 0.08) -> int:
    """Equal steps no longer than ``longest`` (rad) over the widest of the members' spans, nor than ``share`` of
    the least ray ``near`` reached (rad): the cot(w) term grows as 1/w towards a slender cone's axis."""
    if near is not None:
        longest = min(longest, share * near)
    return max(4, int(math.ceil(float(np.max(np.abs(span), initial=0.0)) / longest)))


def _taylor_maccoll(w, y, cot=None, out=None):
    """dy/dw for y = (V_r, V_w) (outward past a shock a member may reach the sonic line of V_w and turn to
    NaN; the callers read nothing beyond); ``cot``: cot(w) when known; ``out``: where to write it."""
    return _tm_cot(1.0 / np.tan(w) if cot is None else cot, y, np.empty_like(y) if out is None else out)


def _cot(w):
    """cot w, written over ``w`` (the stage rays ``rk8.integrate`` makes for its ``at``; large, so in place)."""
    np.tan(w, out=w)
    return np.divide(1.0, w, out=w)


def _tm_cot(cot, y, out, room=None):
    """``_taylor_maccoll`` at rays of cotangent ``cot`` (``rk8.integrate(..., at=_cot)`` computes those of every
    stage at once), written into ``out``; ``room``: where to write 1 - V_r^2 - V_w^2 as well."""
    vr, vw = y[0], y[1]
    sq = y * y  # both squares in one operation (this runs thousands of times a map)
    q = sq[1]
    a = sq[0]  # a = G1 (1 - vr^2 - q): the same operations in place
    np.subtract(1.0, a, out=a)
    a -= q
    if room is not None:
        room[...] = a
    a *= _G1
    t = vw * cot
    t += 2.0 * vr
    t *= a
    num = q * vr
    num -= t
    out[0] = vw
    np.divide(num, np.subtract(a, q, out=q), out=out[1])  # (q vr - a (2 vr + vw cot w)) / (a - q)
    return out


_tm_cot.writes_out = True  # rk8.integrate passes each stage's slot as ``out``


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


def _outward(theta_c: float, surface_mach, end, steps: int, least: bool = False):
    """Integrate members from the cone (surface Mach numbers) towards the rays ``end`` and find each one's first
    shock (f = 0). A step in which f turns positive, the flow reaches the sonic line (just beyond a weak shock)
    or f is not smooth is integrated again in 16 parts, until the root lies in a smooth part, where it is taken
    on the cubic Hermite interpolant of f (past a refined step the parts grow fourfold again). Returns (M0, beta);
    NaN where a member meets no shock before the sonic line (or ``end``), or its free stream would not be
    supersonic or would pass V_max. With ``least`` (members in increasing surface Mach, one cone's family) the
    members that cannot be the least M0 nor its two neighbours below are left NaN (``_below_least``)."""
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
        if least:
            keep &= ~_below_least(m0, todo, keep)
        if not keep.any():
            break
        start = np.where(go_on, i, i - 1)[keep]
        todo, c = todo[keep], c[keep]
        w0, y0 = w[start, c], y[start, :, c].T
        h = w[1, c] - w[0, c]
        w1 = np.where(go_on[keep], np.minimum(end[todo], w0 + 64.0 * h), w0 + h)  # 16 parts of 4 h, or of h / 16
        steps = 16
    return m0, beta


def _below_least(m0, todo, keep):
    """Which of the members ``todo`` still open (``keep``) lie on the strong branch well below the least M0
    found: when every member from the highest open one below the least up to the least is finished, the least
    of all lies there or above (M0 falls along the family to its least value and rises again), so open members
    more than two below it are never needed (``cone_family`` reads the least and its neighbours)."""
    drop = np.zeros(todo.size, bool)
    if np.isfinite(m0).any():
        k = int(np.nanargmin(m0))
        below = keep & (todo < k)
        if below.any() and todo[below].max() < k - 2:
            drop = below
    return drop


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
class ConeFamily:
    """One cone's detachment point and the wave angles of its weak branch (``cone_family``)."""

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
def cone_family(cone_deg: float) -> ConeFamily:
    """The family of one cone (half-angle ``cone_deg``, deg): (M0, beta) over the surface Mach number from one
    outward integration of 84 members, the detachment point (least M0) refined on 17 more, and the weak branch's
    wave angles (rad) against x = sqrt(M0 - M_det) [1-3 of ``engine_air.physics.conical``]; cached per cone.

    >>> f = cone_family(10.0)  # NACA Report 1135 chart 5: a 10 deg cone detaches just above Mach 1.05
    >>> round(f.detachment_mach, 4), round(f.detachment_surface_mach, 3)
    (1.0527, 0.9)
    """
    th = math.radians(cone_deg)
    mc = _MEMBERS
    top = 0.5 * math.pi - 1e-6
    m0, beta = _outward(th, mc, np.full(mc.size, top), _steps(top - th, 0.05, th, 0.16), least=True)
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
        pm0, pbeta = _outward(th, probe, end, _steps(end - th, 0.03, th, 0.1))
        if not np.isfinite(pm0).all():
            pm0, pbeta = _outward(th, probe, np.full(probe.size, top), _steps(top - th, 0.03, th, 0.1))
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
    return ConeFamily(m_det, mc_det, x, np.concatenate([[beta_det], beta[weak]]))


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
