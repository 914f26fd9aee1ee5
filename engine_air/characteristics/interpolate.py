"""Interpolating characteristic curves between their (Mach, alpha, beta) (method §17).

Between curves the critical MFR, the critical recovery, the stability limit and the recovery at the same
fraction MFR/MFR_crit are interpolated linearly in (M0, alpha, beta): 1-D in Mach when only Mach varies in the
table, otherwise barycentric on scipy's Delaunay triangulation of the curves' (M0[, alpha][, beta]) (the
piecewise-linear interpolation of ``scipy.interpolate.LinearNDInterpolator``, done here by hand so that one
triangulation serves every quantity and every fraction). A query outside the hull of the tested conditions,
or at an angle the table does not vary but the query differs from, is not covered (the caller falls back to
the model and flags ``outside-data``).

Every function works on arrays of any shape; no Python loop over points.

Example
-------
>>> import numpy as np
>>> from engine_air.characteristics.table import CharacteristicsTable
>>> from engine_air.characteristics.curves import find_curves
>>> t = CharacteristicsTable("t", {"mach": np.array([2.0, 2.0, 3.0, 3.0]),
...     "mass_flow_ratio": np.array([0.5, 1.0, 0.4, 0.8]), "recovery": np.array([0.80, 0.90, 0.60, 0.70])})
>>> at = locate(find_curves(t), np.array([2.5]))
>>> float(at.critical_mass_flow_ratio[0]), float(at.critical_recovery[0]), bool(at.covered[0])
(0.9, 0.8, True)
>>> float(recovery_at(at, np.array([0.75]))[0])   # half-way along each branch: 0.85 and 0.65
0.75
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

ANGLE_TOLERANCE_DEG = 1e-9


@dataclass(frozen=True)
class Located:
    """Where queries sit among the curves: for each query point the curves around it and their weights."""

    curves: object  # Curves
    index: np.ndarray  # (..., V) int curve indices
    weight: np.ndarray  # (..., V) barycentric weights (0 where not covered)
    covered: np.ndarray  # (...) bool: inside the tested conditions
    critical_mass_flow_ratio: np.ndarray
    critical_recovery: np.ndarray
    stability_limit: np.ndarray  # NaN where no neighbouring curve judges stability
    min_fraction: np.ndarray  # the largest smallest-tested fraction of the neighbouring curves


def _varying(curves) -> list[int]:
    cols = [curves.mach, curves.alpha_deg, curves.beta_deg]
    return [0] + [d for d in (1, 2) if np.ptp(cols[d]) > 0.0]


def _locate_1d(m_nodes: np.ndarray, order: np.ndarray, m: np.ndarray):
    n = len(m_nodes)
    if n == 1:
        covered = np.abs(m - m_nodes[0]) <= 1e-12
        index = np.zeros(m.shape + (2,), int) + order[0]
        weight = np.stack([np.where(covered, 1.0, 0.0), np.zeros(m.shape)], axis=-1)
        return index, weight, covered
    covered = (m >= m_nodes[0]) & (m <= m_nodes[-1])
    i = np.clip(np.searchsorted(m_nodes, m, side="right") - 1, 0, n - 2)
    t = np.clip((m - m_nodes[i]) / (m_nodes[i + 1] - m_nodes[i]), 0.0, 1.0)
    index = np.stack([order[i], order[i + 1]], axis=-1)
    weight = np.where(covered[..., None], np.stack([1.0 - t, t], axis=-1), 0.0)
    return index, weight, covered


INSIDE_TOLERANCE = 100 * np.finfo(float).eps
"""A query is in a simplex when every barycentric weight is within this of [0, 1] (as scipy's ``find_simplex``)."""
_CHUNK = 1_000_000


def _barycentric_maps(nodes: np.ndarray, simplices: np.ndarray):
    """Each simplex's affine map x -> barycentric weights: (inverse of the edge matrix, last vertex, usable).

    The same map as ``scipy.spatial.Delaunay.transform``, written out for d = 2 or 3 (adjugate over determinant)
    with numpy alone: scipy computes it through its threaded BLAS, which can stall for tenths of a second on a
    busy machine. A degenerate simplex (no volume) is not usable."""
    d = nodes.shape[1]
    verts = nodes[simplices]  # (S, d+1, d)
    last = verts[:, d, :]
    cols = [verts[:, i, :] - last for i in range(d)]  # the edge matrix's columns r_i - r_d
    if d == 2:
        (a, c), (b, e) = cols[0].T, cols[1].T
        det = a * e - b * c
        adjugate = np.stack([np.stack([e, -b], -1), np.stack([-c, a], -1)], 1)
    else:
        rows = [np.cross(cols[1], cols[2]), np.cross(cols[2], cols[0]), np.cross(cols[0], cols[1])]
        det = np.einsum("si,si->s", cols[0], rows[0])
        adjugate = np.stack(rows, 1)
    size = np.max(np.abs(np.stack(cols, 1)), axis=(1, 2)) ** d
    usable = np.abs(det) > 1e-12 * size
    inverse = adjugate / np.where(usable, det, 1.0)[:, None, None]
    return inverse, last, usable


def _locate_nd(nodes: np.ndarray, query: np.ndarray):
    """Barycentric location in the Delaunay triangulation of ``nodes`` (scipy's qhull); each distinct query
    once, against every simplex (in chunks of queries)."""
    from scipy.spatial import Delaunay, QhullError

    try:
        tri = Delaunay(nodes)
    except QhullError:
        raise ValueError("the curves' (mach, alpha_deg, beta_deg) must not all lie on one line or plane "
                         "when the angles vary") from None
    d = nodes.shape[1]
    inverse, last, usable = _barycentric_maps(nodes, tri.simplices)
    distinct, back = np.unique(query.reshape(-1, d), axis=0, return_inverse=True)
    n, rows = len(distinct), max(1, _CHUNK // max(1, len(usable)))
    simplex, weight = np.zeros(n, int), np.zeros((n, d + 1))
    covered = np.zeros(n, bool)
    for lo in range(0, n, rows):  # chunks of distinct queries, never a loop over points
        q = distinct[lo:lo + rows]
        bary = np.einsum("sij,qsj->qsi", inverse, q[:, None, :] - last[None, :, :])
        w = np.concatenate([bary, 1.0 - bary.sum(axis=-1, keepdims=True)], axis=-1)
        inside = usable & np.all((w >= -INSIDE_TOLERANCE) & (w <= 1.0 + INSIDE_TOLERANCE), axis=-1)
        s = np.argmax(inside, axis=1)
        simplex[lo:lo + rows], covered[lo:lo + rows] = s, inside.any(axis=1)
        weight[lo:lo + rows] = w[np.arange(len(q)), s]
    weight = np.where(covered[:, None], np.clip(weight, 0.0, 1.0), 0.0)
    back = np.asarray(back).ravel()
    shape = query.shape[:-1]
    return (tri.simplices[simplex][back].reshape(shape + (d + 1,)), weight[back].reshape(shape + (d + 1,)),
            covered[back].reshape(shape))


def locate(curves, mach, alpha_deg=0.0, beta_deg=0.0) -> Located:
    """Place query conditions among the curves; arrays broadcast."""
    m, a, b = np.broadcast_arrays(np.asarray(mach, float), np.asarray(alpha_deg, float), np.asarray(beta_deg, float))
    varying = _varying(curves)
    cols = [curves.mach, curves.alpha_deg, curves.beta_deg]
    queries = [m, a, b]
    fixed_ok = np.ones(m.shape, bool)
    for d in (1, 2):
        if d not in varying:
            fixed_ok &= np.abs(queries[d] - cols[d][0]) <= ANGLE_TOLERANCE_DEG
    if varying == [0]:
        order = np.argsort(curves.mach)
        index, weight, covered = _locate_1d(curves.mach[order], order, m)
    else:
        nodes = np.stack([cols[d] for d in varying], axis=1)
        index, weight, covered = _locate_nd(nodes, np.stack([queries[d] for d in varying], axis=-1))
    covered = covered & fixed_ok
    # a weight of rounding size (a query on a tested condition, a node or an edge, reached with a last-bit error)
    # is none: the curves that decide there are the ones the query sits on, whichever simplex found it
    weight = np.where(covered[..., None] & (weight > INSIDE_TOLERANCE), weight, 0.0)
    total = np.sum(weight, axis=-1, keepdims=True)
    weight = weight / np.where(total > 0.0, total, 1.0)

    def blend(values):
        return np.where(covered, np.sum(weight * values[index], axis=-1), np.nan)

    used = weight > 0.0
    stab_nodes = curves.stability_limit[index]
    stab_known = np.where(used, np.isfinite(stab_nodes), True).all(axis=-1) & used.any(axis=-1)
    stab = np.where(stab_known, np.sum(weight * np.nan_to_num(stab_nodes), axis=-1), np.nan)
    fmin = np.max(np.where(used, curves.min_fraction[index], 0.0), axis=-1)
    return Located(curves, index, weight, covered, blend(curves.critical_mass_flow_ratio),
                   blend(curves.critical_recovery), np.where(covered, stab, np.nan), np.where(covered, fmin, np.nan))


def _on_grid(located: Located, table: np.ndarray, fraction) -> np.ndarray:
    """A per-curve quantity sampled on the fraction grid, at ``fraction``, blended over the neighbours."""
    grid = located.curves.fraction_grid
    f = np.clip(np.asarray(fraction, float), grid[0], 1.0)
    if len(grid) == 1:
        k, t = np.zeros(f.shape, int), np.zeros(f.shape)
    else:
        k = np.clip(np.searchsorted(grid, f, side="right") - 1, 0, len(grid) - 2)
        t = (f - grid[k]) / (grid[k + 1] - grid[k])
    k1 = np.minimum(k + 1, len(grid) - 1)
    lo = table[located.index, k[..., None]]
    hi = table[located.index, k1[..., None]]
    values = lo + t[..., None] * (hi - lo)
    values = np.where(located.weight > 0.0, values, 0.0)
    out = np.sum(located.weight * values, axis=-1)
    below = np.asarray(fraction, float) < located.min_fraction - 1e-12
    return np.where(located.covered & ~below, out, np.nan)


def recovery_at(located: Located, fraction) -> np.ndarray:
    """Recovery at ``fraction`` = MFR/MFR_crit (clipped to 1 above); NaN where not covered or below the smallest
    fraction tested on a neighbouring curve."""
    return _on_grid(located, located.curves.recovery, fraction)


def column_at(located: Located, name: str, fraction) -> np.ndarray | None:
    """Another column of the table (drag coefficient, distortion) at ``fraction``; None if the table lacks it."""
    table = located.curves.extra.get(name)
    return None if table is None else _on_grid(located, table, fraction)
