"""The inlet-engine match on measured characteristics (method §17).

The engine fixes its corrected flow W_c2; the physical flow it swallows is W = W_c2·(π·p_t0/p_ref)/√θ2, so the
captured mass-flow ratio it asks for is proportional to the recovery it gets:

    MFR = c·π,   c = W_c2·p_t0 / (p_ref·√θ2·ρ0·V0·A_c·(1 − b))     (b the bleed fraction of the captured flow)

With the measured recovery a function of the fraction f = MFR/MFR_crit along the (interpolated) curve, the
operating point is the root of g(f) = f·MFR_crit − c·π(f) on [f_min, 1]. g rises with f wherever
d ln π / d ln f < 1 — on every physical subcritical branch, where recovery changes by a few per cent while the
flow changes by tens — so the root is unique. π(f) is piecewise linear in f between the nodes of the curves'
common fraction grid, so the root is found exactly: a binary search over the grid nodes brackets it between two
neighbouring nodes (about log2 of the grid's size steps, all points at once, no per-point Python), and on that
segment g is linear, so one linear interpolation gives it (to rounding; the 48 halvings of a bisection it replaces
reach 2^-48 of the range).

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

@dataclass(frozen=True)
class DataOperatingPoint:
    """The match on data at each point (NaN where not covered)."""

    covered: np.ndarray  # bool: the data decide the point
    fraction: np.ndarray  # MFR / MFR_crit (1 when supercritical)
    mass_flow_ratio: np.ndarray  # captured
    recovery: np.ndarray  # p_t2/p_t0 delivered
    supercritical: np.ndarray  # bool: the demand passes the critical point
    below_tested: np.ndarray  # bool: the demand is below the smallest flow tested (not covered)


def _node_values(located: Located, table: np.ndarray, shape: tuple[int, ...]):
    """A function j -> the blended per-curve ``table`` at fraction-grid node ``j`` (an int array of ``shape``).

    When far fewer conditions are located than points asked (a map: one located condition per Mach column), the
    blend of the neighbouring curves is made once per condition over the whole grid and each step is one gather;
    otherwise the neighbours are gathered at each step."""
    k = table.shape[-1]
    weight, index = located.weight, located.index
    conditions = int(np.prod(weight.shape[:-1], dtype=np.int64))
    if conditions * k <= int(np.prod(shape, dtype=np.int64)):
        rows = np.where(weight[..., None] > 0.0, table[index], 0.0)
        blended = np.sum(weight[..., None] * rows, axis=-2).reshape(-1, k)  # (conditions, k)
        cell = np.broadcast_to(np.arange(conditions).reshape(weight.shape[:-1]), shape) * k
        flat = blended.ravel()
        return lambda j: flat[cell + j]

    def per_point(j):
        values = np.where(weight > 0.0, table[index, j[..., None]], 0.0)
        return np.sum(weight * values, axis=-1)

    return per_point


def _bracket_root(located: Located, c, lo, g_lo, g_hi, shape):
    """The root of g(f) = f·MFR_crit − c·π(f) between ``lo`` (g ≤ 0) and 1 (g > 0): the binary search over the
    grid nodes to the segment holding it, then the linear interpolation on that segment."""
    grid = located.curves.fraction_grid
    k = len(grid)
    crit = np.broadcast_to(located.critical_mass_flow_ratio, shape)
    c = np.broadcast_to(c, shape)
    node_value = _node_values(located, located.curves.recovery, shape)
    start = np.broadcast_to(np.searchsorted(grid, lo, side="right") - 1, shape)  # the node at or below lo
    low, high = start, np.full(shape, k - 1)
    g_low, g_high = np.broadcast_to(g_lo, shape), np.broadcast_to(g_hi, shape)
    for _ in range(max(1, int(np.ceil(np.log2(k))) + 1)):
        active = high - low > 1
        if not active.any():
            break
        mid = np.clip((low + high) // 2, 0, k - 1)
        g = grid[mid] * crit - c * node_value(mid)
        up = g > 0.0
        move_high, move_low = active & up, active & ~up
        high, g_high = np.where(move_high, mid, high), np.where(move_high, g, g_high)
        low, g_low = np.where(move_low, mid, low), np.where(move_low, g, g_low)
    x_low = np.where(low == start, np.broadcast_to(lo, shape), grid[np.clip(low, 0, k - 1)])
    x_high = grid[high]
    step = np.where(g_high > g_low, -g_low / (g_high - g_low), 0.0)
    return np.clip(x_low + (x_high - x_low) * step, x_low, x_high)


def match_on_data(located: Located, demand_coefficient) -> DataOperatingPoint:
    """Solve MFR = c·π(MFR) on the located curves; ``demand_coefficient`` c as in the module text."""
    c = np.asarray(demand_coefficient, float)
    mfr_crit = located.critical_mass_flow_ratio
    lo = np.where(np.isfinite(located.min_fraction), located.min_fraction, 1.0)
    shape = np.broadcast_shapes(np.shape(c), np.shape(lo))
    with np.errstate(invalid="ignore", divide="ignore"):
        g_lo = lo * mfr_crit - c * recovery_at(located, lo)
        g_hi = mfr_crit - c * located.critical_recovery
        supercritical = located.covered & (g_hi <= 0.0)
        below = located.covered & ~supercritical & (g_lo > 0.0)
        f = _bracket_root(located, c, lo, g_lo, g_hi, shape)
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
