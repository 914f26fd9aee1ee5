"""The colour scales of the program, as data: one module for the pictures and the GUI (no Qt).

Two scales, chosen by a quantity's kind (``engine_air.outputs.quantities``):

- **margin** (signed, zero is the limit): diverging and centred on zero.
  Below zero (the limit fails) the orange-brown arm of ColorBrewer *PuOr*,
  above zero (the limit holds) the blue arm of ColorBrewer *RdBu*; both arms
  meet at their common near-white centre #f7f7f7. The scale ends are
  symmetric about zero (``levels_for``), so zero is always the middle of the
  colour bar. Both arms stay distinct with the common colour-vision
  deficiencies (ColorBrewer's "colourblind safe" schemes).
- **level**: sequential *cividis* (perceptually uniform, designed for readers
  with colour-vision deficiencies).

The colours themselves come from matplotlib's colour-map tables (imported
lazily, Agg-free: no figure is made here); nothing here is hand-typed except
which scheme is used. ``stops(kind)`` gives positions and RGBA bytes for a
pyqtgraph ``ColorMap``; ``matplotlib_colormap(kind)`` the same scale for
matplotlib. Points that are not judged (a margin that is NaN, or a check that
does not apply there) are ``NOT_JUDGED_GREY``; points outside the envelope
``OUTSIDE_GREY``.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

MARGIN = "margin"
LEVEL = "level"

# (scheme, first position, last position) pieces of each scale, in order along the scale.
SCALES: dict[str, tuple[tuple[str, float, float], ...]] = {
    MARGIN: (("PuOr", 0.0, 0.5), ("RdBu", 0.5, 1.0)),
    LEVEL: (("cividis", 0.0, 1.0),),
}
"""Each kind's scale as pieces of named matplotlib colour maps (sampled evenly)."""

OUTSIDE_GREY = (212, 212, 212)
"""Outside the flight envelope (sRGB bytes)."""
NOT_JUDGED_GREY = (150, 150, 150)
"""Inside the envelope where the quantity is not defined or its check does not apply."""
NEUTRAL_GREY = NOT_JUDGED_GREY
FAIL_MARK = (0, 0, 0)
"""Failing-point marks."""
ZERO_LINE = (0, 0, 0)
RAM_LINE = (61, 20, 102)
"""The face static = ambient (p2/p0 = 1) line: dark violet, dashed."""
OUTLINE = (32, 32, 32)


def hex_colour(rgb) -> str:
    """'#rrggbb' of an sRGB byte triple."""
    return "#" + "".join(f"{int(c):02x}" for c in rgb[:3])


def kind_of(kind: str) -> str:
    return MARGIN if kind == MARGIN else LEVEL


@lru_cache(maxsize=8)
def _table(kind: str, n: int) -> np.ndarray:
    from matplotlib import colormaps  # lazily: the GUI pays for it only once

    pieces = SCALES[kind_of(kind)]
    per = max(2, -(-(n + len(pieces) - 1) // len(pieces)))  # k pieces share k - 1 meeting points
    parts = []
    for k, (name, a, b) in enumerate(pieces):
        t = np.linspace(a, b, per)
        rgba = colormaps[name](t)
        parts.append(rgba if k == 0 else rgba[1:])  # pieces share their meeting point
    out = np.concatenate(parts)
    out.setflags(write=False)
    return out


def lut(kind: str, n: int = 256) -> np.ndarray:
    """(m, 4) RGBA floats in 0..1 along the scale of ``kind`` (m close to ``n``)."""
    return _table(kind_of(kind), int(n))


def stops(kind: str, n: int = 33) -> tuple[np.ndarray, np.ndarray]:
    """(positions 0..1, (m, 4) uint8 RGBA) of the scale of ``kind``: the data for a pyqtgraph ColorMap."""
    table = lut(kind, n)
    pos = np.linspace(0.0, 1.0, len(table))
    return pos, np.rint(table * 255).astype(np.uint8)


def anchors(kind: str, n: int = 33) -> tuple[tuple[float, tuple[int, int, int]], ...]:
    """The scale as ((position, (r, g, b)), ...) with sRGB bytes."""
    pos, rgba = stops(kind, n)
    return tuple((float(p), (int(c[0]), int(c[1]), int(c[2]))) for p, c in zip(pos, rgba))


def matplotlib_colormap(kind: str, n: int = 256):
    """The scale of ``kind`` as a matplotlib ``ListedColormap`` (bad values: transparent)."""
    from matplotlib.colors import ListedColormap

    cmap = ListedColormap(np.asarray(lut(kind, n)), name=f"engine-air-{kind_of(kind)}")
    return cmap.with_extremes(bad=(0, 0, 0, 0))


def nice_ceiling(x: float) -> float:
    """The smallest of 1, 2, 2.5, 5 times a power of ten that is >= x (1 for x <= 0 or not finite)."""
    if not math.isfinite(x) or x <= 0:
        return 1.0
    exp = math.floor(math.log10(x))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        v = m * 10.0 ** exp
        if v >= x * (1 - 1e-12):
            return v
    return 10.0 ** (exp + 1)


def levels_for(kind: str, values) -> tuple[float, float]:
    """Colour-scale ends: symmetric about zero (a rounded maximum magnitude) for margins, the data range
    for levels; (-1, 1) or (0, 1) when no value is finite."""
    finite = np.asarray(values, dtype=float).ravel()
    finite = finite[np.isfinite(finite)]
    if finite.size == 0:
        return (-1.0, 1.0) if kind == MARGIN else (0.0, 1.0)
    if kind == MARGIN:
        a = nice_ceiling(float(np.max(np.abs(finite))))
        return (-a, a)
    lo, hi = float(finite.min()), float(finite.max())
    if hi - lo < 1e-12 * max(1.0, abs(hi)):
        pad = max(abs(hi) * 0.01, 1e-6)
        lo, hi = lo - pad, hi + pad
    return (lo, hi)


__all__ = [
    "LEVEL", "MARGIN", "NEUTRAL_GREY", "NOT_JUDGED_GREY", "OUTSIDE_GREY", "SCALES", "anchors", "hex_colour",
    "levels_for", "lut", "matplotlib_colormap", "nice_ceiling", "stops",
]
