"""The GUI reads the package's colour module, and draws its lines with pyqtgraph's isocurve in data coordinates."""

from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("pyqtgraph")

from app.views.colour_maps import colour_map_for, levels_for  # noqa: E402
from app.views.map_view import iso_line  # noqa: E402
from engine_air.outputs import colours as C  # noqa: E402


@pytest.mark.parametrize("kind", ["margin", "level"])
def test_gui_scales_are_the_package_scales(kind):
    pos, rgba = C.stops(kind)
    cmap = colour_map_for(kind)
    got = np.asarray(cmap.getLookupTable(0.0, 1.0, nPts=len(pos), alpha=True), dtype=int)
    assert np.abs(got - rgba.astype(int)).max() <= 1
    assert levels_for(kind, np.array([-0.03, 0.012])) == C.levels_for(kind, np.array([-0.03, 0.012]))


def test_iso_line_in_data_coordinates():
    # z = x - 0.3 on x in [0, 1], y in [100, 300]: the zero line is the vertical x = 0.3 (worked by hand)
    x = np.linspace(0.0, 1.0, 11)
    y = np.linspace(100.0, 300.0, 5)
    z = np.tile(x - 0.3, (len(y), 1))
    xs, ys = iso_line(x, y, z, 0.0)
    finite = np.isfinite(xs)
    assert np.allclose(xs[finite], 0.3)
    assert ys[finite].min() == pytest.approx(100.0) and ys[finite].max() == pytest.approx(300.0)


def test_iso_line_stops_at_nan():
    x = np.linspace(0.0, 1.0, 11)
    y = np.linspace(0.0, 4.0, 5)
    z = np.tile(x - 0.3, (len(y), 1))
    z[3:, :] = np.nan  # outside the envelope from y = 3 up
    with np.errstate(all="raise"):
        xs, ys = iso_line(x, y, z, 0.0)
    finite = np.isfinite(ys)
    assert ys[finite].max() <= 2.0 + 1e-12  # no segment reaches into a cell with a NaN corner
    xs, _ = iso_line(x, y, np.full((5, 11), np.nan), 0.0)
    assert not np.isfinite(xs).any()  # nothing defined: no line
