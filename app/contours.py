"""Iso-lines on a grid by marching squares, vectorised with numpy.

``iso_segments(x, y, z, level)`` returns line segments (pairs of points) in
data coordinates where the bilinear field through the grid values crosses
``level``. Cells with a NaN corner are skipped, so a contour stops at the
envelope boundary instead of following the NaN fill.
"""

from __future__ import annotations

import numpy as np


def iso_segments(x: np.ndarray, y: np.ndarray, z: np.ndarray, level: float = 0.0):
    """Segments of the ``level`` iso-line of ``z`` (shape (ny, nx), rows along ``y``).

    Returns ``(xs, ys)``: 1-D arrays of even length; points 2k and 2k+1 are the
    ends of one segment (suited to ``PlotDataItem(connect='pairs')``).
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    z = np.asarray(z, dtype=float) - level
    if z.ndim != 2 or z.shape[0] < 2 or z.shape[1] < 2:
        return np.empty(0), np.empty(0)
    # corners of each cell: a (i, j), b (i, j+1), c (i+1, j+1), d (i+1, j)
    za, zb = z[:-1, :-1], z[:-1, 1:]
    zc, zd = z[1:, 1:], z[1:, :-1]
    valid = np.isfinite(za) & np.isfinite(zb) & np.isfinite(zc) & np.isfinite(zd)
    x0, x1 = x[:-1][None, :], x[1:][None, :]
    y0, y1 = y[:-1][:, None], y[1:][:, None]
    shape = za.shape
    x0 = np.broadcast_to(x0, shape)
    x1 = np.broadcast_to(x1, shape)
    y0 = np.broadcast_to(y0, shape)
    y1 = np.broadcast_to(y1, shape)

    def crossing(p, q):
        with np.errstate(invalid="ignore", divide="ignore"):
            hit = valid & ((p < 0) != (q < 0))
            t = np.where(hit, p / (p - q), 0.0)
        return hit, t

    # edges: bottom a-b (y0), right b-c (x1), top d-c (y1), left a-d (x0)
    hb, tb = crossing(za, zb)
    hr, tr = crossing(zb, zc)
    ht, tt = crossing(zd, zc)
    hl, tl = crossing(za, zd)
    ex = [x0 + tb * (x1 - x0), x1, x0 + tt * (x1 - x0), x0]
    ey = [y0, y0 + tr * (y1 - y0), y1, y0 + tl * (y1 - y0)]
    hits = np.stack([hb, hr, ht, hl])
    count = hits.sum(axis=0)

    xs, ys = [], []
    two = count == 2
    if two.any():
        order = np.argsort(~hits, axis=0, kind="stable")  # hit edges first
        first, second = order[0][two], order[1][two]
        exs = np.stack(ex)[:, two]
        eys = np.stack(ey)[:, two]
        k = np.arange(first.size)
        xs.append(np.stack([exs[first, k], exs[second, k]], axis=1).ravel())
        ys.append(np.stack([eys[first, k], eys[second, k]], axis=1).ravel())
    four = count == 4
    if four.any():
        centre = (za + zb + zc + zd)[four] / 4.0
        below_a = za[four] < 0
        # pair edges so that the centre's side separates corners correctly
        same = (centre < 0) == below_a
        exs = np.stack(ex)[:, four]
        eys = np.stack(ey)[:, four]
        # if the centre is on a's side: segments (bottom, right) and (top, left); else (bottom, left) and (top, right)
        p1 = np.where(same, 0, 0), np.where(same, 1, 3)
        p2 = np.where(same, 2, 2), np.where(same, 3, 1)
        k = np.arange(centre.size)
        for a_idx, b_idx in (p1, p2):
            xs.append(np.stack([exs[a_idx, k], exs[b_idx, k]], axis=1).ravel())
            ys.append(np.stack([eys[a_idx, k], eys[b_idx, k]], axis=1).ravel())
    if not xs:
        return np.empty(0), np.empty(0)
    return np.concatenate(xs), np.concatenate(ys)


def join_segments(xs: np.ndarray, ys: np.ndarray, digits: int = 9):
    """Join segment pairs (from ``iso_segments``) into polylines separated by NaN.

    Dashed pens need continuous lines: drawn as separate one-cell segments a
    dash pattern restarts in every cell and the line looks solid.
    Returns ``(x, y)`` for ``PlotDataItem(connect='finite')``.
    """
    n = len(xs) // 2
    if n == 0:
        return np.empty(0), np.empty(0)
    pts = np.stack([np.asarray(xs, float), np.asarray(ys, float)], axis=1).reshape(n, 2, 2)
    scale = np.maximum(np.abs(pts).max(axis=(0, 1)), 1e-300)
    keys = [tuple(k) for k in np.round(pts / scale, digits).reshape(-1, 2).tolist()]
    ends: dict = {}
    for idx, key in enumerate(keys):
        ends.setdefault(key, []).append(idx)
    used = np.zeros(n, bool)

    def other_end(end_index: int) -> int:
        return end_index ^ 1  # 2s <-> 2s+1

    def walk(end_index: int, chain: list) -> None:
        """Extend ``chain`` from the end ``end_index`` (an index into the flattened ends)."""
        while True:
            nxt = None
            for cand in ends[keys[end_index]]:
                if not used[cand // 2]:
                    nxt = cand
                    break
            if nxt is None:
                return
            used[nxt // 2] = True
            far = other_end(nxt)
            chain.append(pts[far // 2, far % 2])
            end_index = far

    out_x, out_y = [], []
    for s in range(n):
        if used[s]:
            continue
        used[s] = True
        forward = [pts[s, 0], pts[s, 1]]
        walk(2 * s + 1, forward)
        backward: list = []
        walk(2 * s, backward)
        line = np.array(backward[::-1] + forward)
        out_x.extend(line[:, 0].tolist() + [np.nan])
        out_y.extend(line[:, 1].tolist() + [np.nan])
    return np.array(out_x), np.array(out_y)
