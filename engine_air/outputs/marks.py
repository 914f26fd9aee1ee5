"""Which grid points of a map get a mark: a regular subset, so that a dense grid stays readable.

The program's map and the pictures mark failing (or unstarted) points on every ``stride``-th row and column,
with at most about ``MAX_MARKER_AXIS`` marks along either axis; a region smaller than the stride still gets
every one of its points marked.
"""

from __future__ import annotations

import math

import numpy as np

MAX_MARKER_AXIS = 40
"""At most about this many marks along either axis of a map."""


def marked_points(mask: np.ndarray, max_per_axis: int = MAX_MARKER_AXIS, half_step: bool = False):
    """The (row, column) indices to mark: ``mask`` on a regular pattern of every ``stride``-th point.

    ``half_step`` shifts the pattern half a stride along the columns (a second layer of marks, e.g. a hatch,
    then falls between the first layer's).

    >>> rows, cols = marked_points(np.ones((100, 100), bool))
    >>> len(set(rows.tolist())), len(set(cols.tolist()))
    (34, 34)
    """
    mask = np.asarray(mask, dtype=bool)
    ny, nx = mask.shape
    stride = max(1, math.ceil(max(nx, ny) / max_per_axis))
    pattern = np.zeros_like(mask)
    pattern[::stride, (stride // 2 if half_step else 0)::stride] = True
    shown = mask & pattern
    if mask.any() and not shown.any():
        shown = mask
    return np.nonzero(shown)
