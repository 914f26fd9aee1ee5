"""The flight envelope over the evaluation grid: the grid's axes and the mask of the envelope polygon.

The polygon geometry (containment, area, crossing edges) is ``engine_air.project.polygon``'s, where the loader
validates a file's envelope with it; its names are re-exported here.
"""

from __future__ import annotations

import numpy as np

from engine_air.project.model import Envelope, Grid
from engine_air.project.polygon import (  # noqa: F401
    EDGE_TOLERANCE,
    polygon_area,
    polygon_contains,
    polygon_crossing_edges,
    polygon_self_intersects,
    vertices_collinear,
)


def grid_axes(envelope: Envelope, grid: Grid) -> tuple[np.ndarray, np.ndarray]:
    """Evaluation axes spanning the envelope's bounding box.

    Returns ``(mach_1d, alt_1d)``: ``grid.mach_points`` flight Mach numbers (-)
    from the smallest to the largest vertex Mach, and ``grid.altitude_points``
    altitudes (m, geopotential) from the lowest to the highest vertex, both
    evenly spaced and including the end values.
    """
    mach = np.asarray(envelope.mach, dtype=float)
    alt = np.asarray(envelope.altitude_m, dtype=float)
    return (np.linspace(mach.min(), mach.max(), grid.mach_points),
            np.linspace(alt.min(), alt.max(), grid.altitude_points))


def envelope_mask(envelope: Envelope, mach_2d, alt_2d) -> np.ndarray:
    """Boolean array: which points (Mach (-), altitude (m)) lie in the envelope.

    ``mach_2d`` and ``alt_2d`` are any broadcastable arrays, typically from
    ``numpy.meshgrid(*grid_axes(...))``. Points on the boundary count as inside.
    """
    return polygon_contains(envelope.mach, envelope.altitude_m, mach_2d, alt_2d)
