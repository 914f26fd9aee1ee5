"""Map pictures and section plots (matplotlib, no Qt): checked through the figure's own objects, not pixels.

What a picture must carry (issue 8): axes in the chosen units, a title naming the quantity and the case, a colour
bar with the unit, the envelope outline, failing-point marks, the zero-margin line and the face static = ambient
(p2/p0 = 1) line; margins on a diverging scale centred on zero with not-judged points grey (issue 9).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from matplotlib.collections import PathCollection, QuadMesh
from matplotlib.colors import rgb_to_hsv

from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.outputs import colours as C
from engine_air.outputs import pictures as P
from engine_air.outputs.sections import cut, stretches
from engine_air.project.toml_file import load_project

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
FAILING = SAMPLES / "undersized_business_jet.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"


@pytest.fixture(scope="module")
def failing():
    return evaluate_project(load_project(FAILING))


@pytest.fixture(scope="module")
def ramp():
    return evaluate_project(load_project(RAMP))


def legend_texts(legend):
    return [t.get_text() for t in legend.get_texts()]


def test_map_carries_axes_title_colour_bar_and_lines(failing):
    m = P.map_figure(failing, "face_mach_margin", None)
    ax = m.axes
    assert ax.get_xlabel() == "Flight Mach number M0"
    assert ax.get_ylabel() == "Pressure altitude (km)"
    assert "Face Mach margin" in ax.get_title() and "worst of all cases" in ax.get_title()
    assert "Face Mach margin (–)" in m.colour_bar.ax.get_ylabel()
    texts = legend_texts(m.legend)
    assert "flight envelope" in texts
    assert "Face Mach margin = 0" in texts  # this sample fails on face Mach: the zero line is drawn
    assert "face static = ambient (p2/p0 = 1)" in texts and m.ram_line
    # the marks and their count are the failures of the quantity shown (issue 14), not of every limit
    assert "Face Mach number: fails here" in texts
    assert m.failing_points == int(failing.failing(WORST, "face-mach").sum()) > 0
    # the failing marks are plotted at failing grid points
    marks = [c for c in ax.collections if isinstance(c, PathCollection)]
    xy = marks[-1].get_offsets()
    assert len(xy) > 0
    fail = failing.failing(WORST, "face-mach")
    for mach, alt_km in np.asarray(xy)[:5]:
        i = int(np.argmin(np.abs(failing.altitude_m / 1000 - alt_km)))
        j = int(np.argmin(np.abs(failing.mach - mach)))
        assert fail[i, j]
    # the envelope outline is the project's polygon, closed, in km
    env = failing.project.envelope
    line = ax.get_lines()[0]
    assert np.allclose(line.get_xdata()[:-1], env.mach)
    assert np.allclose(line.get_ydata()[:-1], np.asarray(env.altitude_m) / 1000)
    # a margin scale is centred on zero
    assert m.vmin == -m.vmax


def test_map_in_us_units_and_of_one_case(failing):
    case = failing.cases[0].name
    assert failing.failing(case).any()
    m = P.map_figure(failing, "throat_mach", case, units="us")
    assert m.axes.get_ylabel() == "Pressure altitude (ft)"
    assert f"case “{case}”" in m.axes.get_title()
    # top of the axis is the top of the grid in feet (1 ft = 0.3048 m exactly)
    assert m.axes.get_ylim()[1] > failing.altitude_m[-1] / 0.3048
    assert "limit boundary (least margin = 0)" in legend_texts(m.legend)  # a level quantity: the limit boundary
    with pytest.raises(KeyError):
        P.map_figure(failing, "no_such_quantity")
    with pytest.raises(KeyError):
        P.map_figure(failing, "face_mach", "no such case")
    with pytest.raises(ValueError):
        P.map_figure(failing, "face_mach", units="imperial")


def test_not_judged_points_are_neutral_grey(ramp):
    # recovery against MIL-E-5008B is judged above Mach 1 only: below it the map is grey, not coloured
    m = P.map_figure(ramp, "recovery_minus_reference", None)
    subsonic = ramp.inside & (ramp.mach[None, :] <= 1.0)
    assert m.not_judged_points >= int(subsonic.sum()) > 0
    meshes = [c for c in m.axes.collections if isinstance(c, QuadMesh)]
    grey_layer, colour_layer = meshes[0], meshes[1]
    coloured = ~np.ma.getmaskarray(colour_layer.get_array()).reshape(ramp.inside.shape)
    assert not (coloured & subsonic).any()
    grey = ~np.ma.getmaskarray(grey_layer.get_array()).reshape(ramp.inside.shape)
    assert (grey & subsonic).sum() == subsonic.sum()
    assert tuple(round(255 * v) for v in grey_layer.get_cmap()(0.5)[:3]) == C.NOT_JUDGED_GREY


def test_colour_scales():
    div = C.lut("margin", 257)
    centre = div[len(div) // 2, :3]
    assert np.all(centre > 0.95)  # near-white at zero margin
    low, high = div[0, :3], div[-1, :3]
    assert low[0] > low[2] and high[2] > high[0]  # orange-brown where it fails, blue where it holds
    hue_low = rgb_to_hsv(low)[0] * 360
    hue_high = rgb_to_hsv(high)[0] * 360
    assert 15 <= hue_low <= 45 and 190 <= hue_high <= 230  # orange and blue, by hue angle
    seq = C.lut("level", 256)[:, :3]
    lum = seq @ np.array([0.2126, 0.7152, 0.0722])  # relative luminance weights, ITU-R BT.709
    assert np.all(np.diff(lum) >= -1e-9)  # a sequential scale grows monotonically in lightness
    assert C.levels_for("margin", [-0.03, 0.012]) == (-0.05, 0.05)  # symmetric, rounded up to 1-2-2.5-5
    pos, rgba = C.stops("margin")
    assert pos[0] == 0 and pos[-1] == 1 and rgba.dtype == np.uint8 and rgba.shape[1] == 4


def test_section_along_mach_and_altitude(failing):
    alt = float(failing.altitude_m[-1])
    sec = cut(failing, "face_mach", altitude_m=alt + 5.0)
    assert sec.axis == "mach" and sec.at == alt and np.array_equal(sec.x, failing.mach)
    assert sec.limit == failing.project.limits.face_mach_max
    assert sec.case_names == [c.name for c in failing.cases] + [WORST]
    i = len(failing.altitude_m) - 1
    for cs in sec.cases:
        assert np.array_equal(cs.values, failing.quantity(cs.case, "face_mach")[i], equal_nan=True)
        # failing exactly where the face Mach check fails on that row
        assert np.array_equal(cs.failing, failing.failing(cs.case, "face-mach")[i] & cs.judged)
    assert sec.case(WORST).failing.any()
    f = P.section_figure(sec)
    assert f.axes.get_xlabel() == "Flight Mach number M0"
    assert f.axes.get_ylabel() == "Face Mach number (–)"
    assert "against flight Mach number" in f.axes.get_title()
    texts = legend_texts(f.legend)
    assert "limit 0.55" in texts and "limit fails" in texts
    assert any(t.startswith("case “") for t in texts) and "worst of all cases" in texts

    sec2 = cut(failing, "face_mach_margin", mach=0.45)
    assert sec2.axis == "altitude" and sec2.limit == 0.0
    f2 = P.section_figure(sec2, units="us")
    assert f2.axes.get_ylabel() == "Pressure altitude (ft)" and "margin = 0 (the limit)" in legend_texts(f2.legend)
    with pytest.raises(ValueError):
        cut(failing, "face_mach")


def test_stretches():
    assert stretches([0, 1, 1, 0, 1]) == [(1, 2), (4, 4)]
    assert stretches([]) == []


def test_pictures_write_png(tmp_path, failing):
    out = tmp_path / "m.png"
    pic = P.write_map_png(failing, out, "face_mach_margin")
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and pic.width > 400 and pic.height > 300
    png = P.section_png_bytes(failing, "face_mach", mach=0.4)
    assert png[:8] == b"\x89PNG\r\n\x1a\n"


def test_long_names_are_cut_in_titles(failing):
    from dataclasses import replace

    project = replace(failing.project, title="T" * 10_000)
    result = evaluate_project(replace(project, grid=replace(project.grid, mach_points=9, altitude_points=7)))
    m = P.map_figure(result, "face_mach", result.cases[0].name)
    assert len(m.axes.get_title()) < 200


# -- issue 14: the picture tells the truth ------------------------------------------------------------------------

def test_default_quantity_is_the_least_margin_when_a_limit_fails(failing, ramp):
    assert not failing.holds and P.default_quantity(failing) == "worst_relative_margin"
    holding = evaluate_project(load_project(SAMPLES / "subsonic_transport_nacelle.toml"))
    assert holding.holds and P.default_quantity(holding) == "face_mach_margin"


def test_map_png_default_size_title_and_case(tmp_path, capsys):
    from engine_air.cli import main

    out = tmp_path / "m.png"
    assert main(["map", str(FAILING), "--png", str(out), "--case", "ISA, take-off"]) == 1
    assert "worst_relative_margin" in capsys.readouterr().out  # a limit fails: the least margin by default
    import struct

    width, height = struct.unpack(">II", out.read_bytes()[16:24])  # the PNG IHDR chunk: width, height
    assert width >= 900 and height >= 600
    result = evaluate_project(load_project(FAILING), ["ISA, take-off"])
    m = P.map_figure(result, "worst_relative_margin")
    assert "case “ISA, take-off”" in m.axes.get_title() and "worst of" not in m.axes.get_title()
    three = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    names = [c.name for c in three.cases]
    assert len(names) == 3
    two = evaluate_project(three, names[:2])
    title = P.map_figure(two, "face_mach").axes.get_title()
    assert "worst of cases" in title and names[0] in title and names[2] not in title


def test_titles_fit_their_figure(failing):
    from dataclasses import replace

    project = replace(failing.project, title="A long project title with many words in it " * 6)
    result = evaluate_project(replace(project, grid=replace(project.grid, mach_points=9, altitude_points=7)))
    for fig, ax in ((m.figure, m.axes) for m in [P.map_figure(result, "face_mach_margin")]):
        renderer = fig.canvas.get_renderer()
        fig.draw(renderer)
        box, page = ax.title.get_window_extent(renderer), fig.bbox
        assert box.x0 >= page.x0 - 0.5 and box.x1 <= page.x1 + 0.5 and box.y1 <= page.y1 + 0.5
        assert ax.get_title().count("\n") <= 2


def test_a_quantity_defined_nowhere_says_why_without_a_colour_scale(ramp):
    # the two-ramp sample's rating has no thrust table (method §13: installation loss null, flag no-thrust-data)
    m = P.map_figure(ramp, "installation_loss_fraction", ramp.cases[0].name)
    assert m.colour_bar is None and m.note == "no thrust data: installation loss is not computed"
    assert any(t.get_text().replace("\n", " ") == m.note for t in m.axes.texts)
    pic = P.render_map(ramp, "installation_loss_fraction")
    assert pic.note == m.note
