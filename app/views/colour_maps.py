"""Colour scales for the envelope map, read from ``engine_air.outputs.colours`` (the one colour module).

Level quantities use cividis; margins the diverging orange-white-blue scale
centred on zero (orange where the limit fails, blue where it holds), with
levels symmetric about zero so that zero is always the centre of the bar. The
pictures the analysis package writes (review pack, ``engine-air map --png``)
use the same scales, so both read alike.
"""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg

from engine_air.outputs import colours

NOT_JUDGED_GREY = colours.NOT_JUDGED_GREY
OUTSIDE_GREY = colours.OUTSIDE_GREY


def _colour_map(kind: str, name: str) -> pg.ColorMap:
    pos, rgba = colours.stops(kind)
    return pg.ColorMap(pos, np.asarray(rgba, dtype=np.ubyte), name=name)


def margin_colour_map() -> pg.ColorMap:
    return _colour_map(colours.MARGIN, "margin-orange-blue")


def level_colour_map() -> pg.ColorMap:
    return _colour_map(colours.LEVEL, "cividis")


def colour_map_for(kind: str) -> pg.ColorMap:
    return margin_colour_map() if kind == "margin" else level_colour_map()


def levels_for(kind: str, values: np.ndarray) -> tuple[float, float]:
    """Colour-scale limits: symmetric about 0 for margins, the data range for levels."""
    return colours.levels_for(kind, values)
