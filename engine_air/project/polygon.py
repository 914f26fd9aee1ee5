"""The flight envelope's polygon in (flight Mach number, geopotential altitude): plane geometry only.

Mach is dimensionless and of order 1; altitude is in metres and of order 10^4.
Every geometric test therefore first maps both axes onto [0, 1] by the
polygon's own bounding box ("normalised units"), so that a tolerance or an
area means the same thing along either axis. The polygon is closed
automatically: the last vertex joins the first.

All functions broadcast over the query points with numpy; the only Python
loops run over polygon edges. The loader validates a file's envelope with these functions; the grid and
the mask over it are ``engine_air.envelope.polygon``'s.
"""

from __future__ import annotations

import numpy as np


EDGE_TOLERANCE = 1e-9
"""Distance, in normalised units, within which a point counts as on an edge."""


def _frame(poly_mach, poly_alt):
    """Vertices as float arrays plus the (origin, span) of each axis.

    A zero span (all vertices share one value) is replaced by 1 so that the
    mapping stays defined; such a polygon has zero area.
    """
    px = np.asarray(poly_mach, dtype=float).ravel()
    py = np.asarray(poly_alt, dtype=float).ravel()
    if px.shape != py.shape:
        raise ValueError("polygon Mach and altitude lists differ in length")
    if px.size == 0:
        raise ValueError("polygon has no vertices")
    x0, y0 = px.min(), py.min()
    sx, sy = px.max() - x0, py.max() - y0
    sx = sx if sx > 0 else 1.0
    sy = sy if sy > 0 else 1.0
    return px, py, (x0, sx), (y0, sy)


def _normalised(poly_mach, poly_alt):
    """Polygon vertices in normalised units, shape (n,) each."""
    px, py, (x0, sx), (y0, sy) = _frame(poly_mach, poly_alt)
    return (px - x0) / sx, (py - y0) / sy


def _segment_distance(x, y, ax, ay, bx, by):
    """Distance from points (x, y) to segments (a, b); all arguments broadcast."""
    dx, dy = bx - ax, by - ay
    length2 = dx * dx + dy * dy
    with np.errstate(invalid="ignore", divide="ignore"):
        t = ((x - ax) * dx + (y - ay) * dy) / length2
    t = np.where(length2 > 0, np.clip(t, 0.0, 1.0), 0.0)
    return np.hypot(x - (ax + t * dx), y - (ay + t * dy))


def polygon_contains(poly_mach, poly_alt, mach, alt) -> np.ndarray:
    """Which points (mach, alt) lie inside the polygon (poly_mach, poly_alt).

    Parameters
    ----------
    poly_mach, poly_alt : sequence of float
        Polygon vertices in order: flight Mach number (-) and altitude (m).
        The polygon is closed automatically.
    mach, alt : array_like
        Query points: flight Mach number (-) and altitude (m); any shapes that
        broadcast together.

    Returns
    -------
    numpy.ndarray of bool
        Broadcast shape of ``mach`` and ``alt``. Even-odd rule (ray casting);
        points on an edge, within ``EDGE_TOLERANCE`` of the polygon's span in
        each axis, count as inside. NaN points are outside.
    """
    px, py, (x0, sx), (y0, sy) = _frame(poly_mach, poly_alt)
    px, py = (px - x0) / sx, (py - y0) / sy
    mach, alt = np.asarray(mach, dtype=float), np.asarray(alt, dtype=float)
    if mach.ndim == 2 and alt.ndim == 2 and mach.shape[0] == 1 and alt.shape[1] == 1:  # a grid: row and column
        return _grid_contains(px, py, (mach[0] - x0) / sx, (alt[:, 0] - y0) / sy)
    xb, yb = np.broadcast_arrays((mach - x0) / sx, (alt - y0) / sy)
    shape = xb.shape
    x, y = xb.ravel(), yb.ravel()
    # Sort the points by altitude once: the points an edge can affect then form
    # one contiguous run, found by binary search (NaN sorts last, never hit).
    order = np.argsort(y, kind="stable")
    ys = y[order]
    inside = np.zeros(x.size, dtype=bool)
    on_edge = np.zeros(x.size, dtype=bool)
    tol = EDGE_TOLERANCE
    for ax, ay, bx, by, lo_y, hi_y in _edges(px, py):
        if ay != by:
            # the ray towards +x crosses this edge for lo_y <= y < hi_y
            run = order[np.searchsorted(ys, lo_y, "left"):np.searchsorted(ys, hi_y, "left")]
            x_cross = ax + (y[run] - ay) * (bx - ax) / (by - ay)
            inside[run] ^= x[run] < x_cross
        run = order[np.searchsorted(ys, lo_y - tol, "left"):np.searchsorted(ys, hi_y + tol, "right")]
        near = run[(x[run] >= min(ax, bx) - tol) & (x[run] <= max(ax, bx) + tol)]
        on_edge[near] |= _segment_distance(x[near], y[near], ax, ay, bx, by) <= tol
    return (inside | on_edge).reshape(shape)


def _edges(px, py):
    """Each edge of the closed polygon (vertices ``px``, ``py``): its ends (ax, ay, bx, by) and its lowest and
    highest y."""
    n = px.size
    for i in range(n):
        ax, ay = px[i], py[i]
        bx, by = px[(i + 1) % n], py[(i + 1) % n]
        yield ax, ay, bx, by, min(ay, by), max(ay, by)


def _grid_contains(px, py, x, y) -> np.ndarray:
    """``polygon_contains`` on the grid of the row ``x`` and the column ``y`` (normalised units): the same tests,
    edge by edge, on the rows an edge spans and the block of points near it, without sorting the points."""
    inside = np.zeros((y.size, x.size), dtype=bool)
    on_edge = np.zeros((y.size, x.size), dtype=bool)
    tol = EDGE_TOLERANCE
    for ax, ay, bx, by, lo_y, hi_y in _edges(px, py):
        if ay != by:
            rows = (y >= lo_y) & (y < hi_y)
            x_cross = ax + (y[rows] - ay) * (bx - ax) / (by - ay)
            inside[rows] ^= x[None, :] < x_cross[:, None]
        rows = (y >= lo_y - tol) & (y <= hi_y + tol)
        cols = (x >= min(ax, bx) - tol) & (x <= max(ax, bx) + tol)
        if rows.any() and cols.any():
            block = np.ix_(rows, cols)
            on_edge[block] |= _segment_distance(x[cols][None, :], y[rows][:, None], ax, ay, bx, by) <= tol
    return inside | on_edge


def polygon_area(poly_mach, poly_alt) -> float:
    """Enclosed area of the polygon in normalised units (0 to 1), always >= 0.

    Shoelace formula on the vertices mapped onto the unit bounding box. A
    self-crossing polygon can show a small or zero area (the lobes cancel);
    test ``polygon_self_intersects`` first.
    """
    x, y = _normalised(poly_mach, poly_alt)
    return float(abs(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y)) / 2.0)


def vertices_collinear(poly_mach, poly_alt) -> bool:
    """True when all vertices lie on one straight line (within ``EDGE_TOLERANCE``, normalised units).

    Such a polygon encloses no area. Vertices are flight Mach number (-) and
    altitude (m).
    """
    x, y = _normalised(poly_mach, poly_alt)
    pts = np.column_stack((x - x.mean(), y - y.mean()))
    if pts.shape[0] < 3:
        return True
    return bool(np.linalg.svd(pts, compute_uv=False)[-1] <= EDGE_TOLERANCE)


def polygon_crossing_edges(poly_mach, poly_alt) -> tuple[int, int] | None:
    """The first pair of edges (i, j) that cross or touch, or None.

    Edge ``i`` joins vertex ``i`` to vertex ``i + 1`` (the last edge joins the
    last vertex to the first). Two non-adjacent edges conflict when they cross
    or come within ``EDGE_TOLERANCE`` (normalised units) of each other; two
    adjacent edges conflict when they fold back over each other.
    """
    x, y = _normalised(poly_mach, poly_alt)
    n = x.size
    ax, ay = x, y
    bx, by = np.roll(x, -1), np.roll(y, -1)
    tol = EDGE_TOLERANCE

    def orient(px_, py_, qx, qy, rx, ry):
        return (qx - px_) * (ry - py_) - (qy - py_) * (rx - px_)

    for i in range(n):
        # adjacent edge i+1 shares vertex i+1: it must not run back along edge i
        k = (i + 1) % n
        if n > 2 and k != i and (
            _segment_distance(ax[i], ay[i], ax[k], ay[k], bx[k], by[k]) <= tol
            or _segment_distance(bx[k], by[k], ax[i], ay[i], bx[i], by[i]) <= tol
        ):
            return (i, k)
        j = np.arange(i + 2, n - 1 if i == 0 else n)
        if j.size == 0:
            continue
        d1 = orient(ax[j], ay[j], bx[j], by[j], ax[i], ay[i])
        d2 = orient(ax[j], ay[j], bx[j], by[j], bx[i], by[i])
        d3 = orient(ax[i], ay[i], bx[i], by[i], ax[j], ay[j])
        d4 = orient(ax[i], ay[i], bx[i], by[i], bx[j], by[j])
        hit = ((d1 * d2) < 0) & ((d3 * d4) < 0)
        hit |= _segment_distance(ax[i], ay[i], ax[j], ay[j], bx[j], by[j]) <= tol
        hit |= _segment_distance(bx[i], by[i], ax[j], ay[j], bx[j], by[j]) <= tol
        hit |= _segment_distance(ax[j], ay[j], ax[i], ay[i], bx[i], by[i]) <= tol
        hit |= _segment_distance(bx[j], by[j], ax[i], ay[i], bx[i], by[i]) <= tol
        if hit.any():
            return (i, int(j[np.argmax(hit)]))
    return None


def polygon_self_intersects(poly_mach, poly_alt) -> bool:
    """True when any two non-adjacent edges cross or touch, or adjacent edges fold back.

    Vertices are flight Mach number (-) and altitude (m); the test runs in
    normalised units with tolerance ``EDGE_TOLERANCE``. A zero-area polygon
    is a separate degenerate case: see ``polygon_area``.
    """
    return polygon_crossing_edges(poly_mach, poly_alt) is not None
