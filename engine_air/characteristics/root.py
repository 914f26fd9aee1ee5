"""The inlet-engine match on measured characteristics (method §17).

The engine fixes its corrected flow W_c2; the physical flow it swallows is W = W_c2·(π·p_t0/p_ref)/√θ2, so the
captured mass-flow ratio it asks for is proportional to the recovery it gets:

    MFR = c·π,   c = W_c2·p_t0 / (p_ref·√θ2·ρ0·V0·A_c·(1 − b))     (b the bleed fraction of the captured flow)

With the measured recovery a function of the fraction f = MFR/MFR_crit along the (interpolated) curve, the
operating point is the root of g(f) = f·MFR_crit − c·π(f) on [f_min, 1]. g rises with f wherever
d ln π / d ln f < 1 — on every physical subcritical branch, where recovery changes by a few per cent while the
flow changes by tens — so the root is unique; it is found by bisection over all points at once (a fixed number
of halvings, no per-point Python).

- g(1) ≤ 0: the demand reaches or passes the critical point. Above it the supercritical rule of §6: the captured
  flow is held at MFR_crit and the recovery falls to π_crit·MFR_crit/MFR_demand = MFR_crit/c.
- g(f_min) > 0: the engine asks for less than the smallest flow tested on the neighbouring curves: not covered
  (the caller falls back to the model and flags ``outside-data``).

Example: a flat curve π = 0.9 with MFR_crit = 0.8 and c = 0.5 gives MFR = 0.45 (f = 0.5625) and π = 0.9.

>>> import numpy as np
>>> from engine_air.characteristics.table import CharacteristicsTable
>>> from engine_air.characteristics.curves import find_curves
>>> from engine_air.characteristics.interpolate import locate
>>> t = CharacteristicsTable("t", {"mach": np.array([2.0, 2.0]), "mass_flow_ratio": np.array([0.2, 0.8]),
...     "recovery": np.array([0.9, 0.9])})
>>> op = match_on_data(locate(find_curves(t), np.array([2.0, 2.0])), np.array([0.5, 2.0]))
>>> [round(float(x), 6) for x in op.mass_flow_ratio], [round(float(x), 6) for x in op.recovery]
([0.45, 0.8], [0.9, 0.4])
>>> op.supercritical.tolist()
[False, True]
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.characteristics.interpolate import Located, recovery_at

HALVINGS = 48
"""Bisection steps: the fraction is found to 2^-48 of the tested range (far below any measured scatter)."""


@dataclass(frozen=True)
class DataOperatingPoint:
    """The match on data at each point (NaN where not covered)."""

    covered: np.ndarray  # bool: the data decide the point
    fraction: np.ndarray  # MFR / MFR_crit (1 when supercritical)
    mass_flow_ratio: np.ndarray  # captured
    recovery: np.ndarray  # p_t2/p_t0 delivered
    supercritical: np.ndarray  # bool: the demand passes the critical point
    below_tested: np.ndarray  # bool: the demand is below the smallest flow tested (not covered)


def match_on_data(located: Located, demand_coefficient) -> DataOperatingPoint:
    """Solve MFR = c·π(MFR) on the located curves; ``demand_coefficient`` c as in the module text."""
    c = np.asarray(demand_coefficient, float)
    mfr_crit = located.critical_mass_flow_ratio
    lo = np.where(np.isfinite(located.min_fraction), located.min_fraction, 1.0)
    hi = np.ones(np.shape(lo))
    with np.errstate(invalid="ignore"):
        g_lo = lo * mfr_crit - c * recovery_at(located, lo)
        g_hi = mfr_crit - c * located.critical_recovery
        supercritical = located.covered & (g_hi <= 0.0)
        below = located.covered & ~supercritical & (g_lo > 0.0)
        for _ in range(HALVINGS):
            mid = 0.5 * (lo + hi)
            g = mid * mfr_crit - c * recovery_at(located, mid)
            up = g > 0.0
            hi = np.where(up, mid, hi)
            lo = np.where(up, lo, mid)
        f = 0.5 * (lo + hi)
        covered = located.covered & ~below & np.isfinite(c)
        fraction = np.where(supercritical, 1.0, f)
        recovery = np.where(supercritical, mfr_crit / c, recovery_at(located, fraction))
    return DataOperatingPoint(
        covered=covered,
        fraction=np.where(covered, fraction, np.nan),
        mass_flow_ratio=np.where(covered, fraction * mfr_crit, np.nan),
        recovery=np.where(covered, recovery, np.nan),
        supercritical=covered & supercritical,
        below_tested=below,
    )
