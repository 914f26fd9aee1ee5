"""Colour scales for the envelope map: sequential for levels, diverging about zero for margins.

Level quantities use 'cividis' (perceptually uniform, readable with the common
colour-vision deficiencies). Margins use a blue-white-orange ramp of our own:
blue where the limit holds (margin > 0), orange-brown where it fails (< 0),
near-white at zero, with levels symmetric about zero so that the colour of
zero is always the centre of the bar.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg

from engine_air.outputs.pictures import DIVERGING_ANCHORS

# position (0..1) -> colour; 0.5 is margin = 0. The same ramp as the pictures the
# analysis package writes (review pack, ``engine-air map --png``), so both read alike.
_MARGIN_STOPS = DIVERGING_ANCHORS


def margin_colour_map() -> pg.ColorMap:
    pos = np.array([p for p, _ in _MARGIN_STOPS])
    colours = np.array([c + (255,) for _, c in _MARGIN_STOPS], dtype=np.ubyte)
    return pg.ColorMap(pos, colours, name="margin-blue-orange")


def level_colour_map() -> pg.ColorMap:
    try:
        return pg.colormap.get("cividis")
    except Exception:  # pragma: no cover - pyqtgraph without bundled maps
        return pg.colormap.get("viridis")


def colour_map_for(kind: str) -> pg.ColorMap:
    return margin_colour_map() if kind == "margin" else level_colour_map()


def _nice_ceiling(x: float) -> float:
    """The smallest of 1, 2, 2.5, 5 times a power of ten that is >= x."""
    if not math.isfinite(x) or x <= 0:
        return 1.0
    exp = math.floor(math.log10(x))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        v = m * 10.0 ** exp
        if v >= x * (1 - 1e-12):
            return v
    return 10.0 ** (exp + 1)


def levels_for(kind: str, values: np.ndarray) -> tuple[float, float]:
    """Colour-scale limits: symmetric about 0 for margins, the data range for levels."""
    finite = np.asarray(values, dtype=float)
    finite = finite[np.isfinite(finite)]
    if finite.size == 0:
        return (-1.0, 1.0) if kind == "margin" else (0.0, 1.0)
    if kind == "margin":
        a = _nice_ceiling(float(np.max(np.abs(finite))))
        return (-a, a)
    lo, hi = float(finite.min()), float(finite.max())
    if hi - lo < 1e-12 * max(1.0, abs(hi)):
        pad = max(abs(hi) * 0.01, 1e-6)
        lo, hi = lo - pad, hi + pad
    return (lo, hi)
