"""Review pack and map pictures: every section present, valid PNGs, reproducible inputs, escaped text."""

from __future__ import annotations

import base64
import html.parser
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

import engine_air
from engine_air.outputs import pictures as P
from engine_air.cli import main
from engine_air.envelope.evaluate import WORST, evaluate_project
from engine_air.project import load_project
from engine_air.outputs.review_pack import PACK_QUANTITIES, SECTION_IDS, SOURCES, write_review_pack

SAMPLES = Path(__file__).resolve().parents[1] / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"
RAMP = SAMPLES / "supersonic_two_ramp.toml"
FAILING = SAMPLES / "undersized_business_jet.toml"


class _Page(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.ids, self.images, self.text = [], [], []
        self.sections = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if "id" in a:
            self.ids.append(a["id"])
        if tag == "section":
            self.sections.append(a.get("id"))
        if tag == "img":
            self.images.append(a)

    def handle_data(self, data):
        self.text.append(data)


def parse(path) -> _Page:
    page = _Page()
    page.feed(Path(path).read_text(encoding="utf-8"))
    page.all_text = "".join(page.text)
    return page


@pytest.fixture(scope="module")
def ramp_pack(tmp_path_factory):
    folder = tmp_path_factory.mktemp("pack")
    return write_review_pack(RAMP, folder)


def test_pack_has_every_section(ramp_pack):
    page = parse(ramp_pack.index_path)
    assert page.sections == list(SECTION_IDS)
    text = page.all_text
    assert engine_air.__version__ in text
    assert engine_air.CAUTION in " ".join(text.split())
    for source in SOURCES:
        assert source in text
    for needle in ("U.S. Standard Atmosphere, 1976", "NACA Report 1135", "MIL-E-5008B", "SAE AS755",
                   "Intake Aerodynamics, 2nd ed.", "Aircraft Engine Design, 2nd ed."):
        assert needle in text
    assert "FAILS" in text and not ramp_pack.holds
    result = ramp_pack.result
    for s in result.summary:
        assert s.label in text
    # station and shock tables at the worst point (supersonic here: ramp shocks and the terminal shock)
    assert "engine face" in text and "capture plane" in text
    assert "ramp 1 oblique" in text and "terminal normal" in text


def test_pack_pictures_are_valid_pngs(ramp_pack):
    page = parse(ramp_pack.index_path)
    result = ramp_pack.result
    n_cases = len(result.cases) + 1  # each case and the worst of all
    assert len(page.images) == n_cases * len(PACK_QUANTITIES) == len(ramp_pack.pictures)
    for img in page.images:
        prefix = "data:image/png;base64,"
        assert img["src"].startswith(prefix)
        data = base64.b64decode(img["src"][len(prefix):])
        rgb = P.read_png(data)
        assert rgb.shape == (int(img["height"]), int(img["width"]), 3)
    for path in ramp_pack.pictures:
        assert P.read_png(Path(path).read_bytes()).ndim == 3
    ids = set(page.ids)
    for q in PACK_QUANTITIES:
        assert f"map-isa-max-{q}" in ids


def test_pack_inputs_reproduce_the_project(ramp_pack):
    saved = Path(ramp_pack.project_path)
    assert saved.read_text(encoding="utf-8") == RAMP.read_text(encoding="utf-8")
    assert load_project(saved) == load_project(RAMP)
    page = parse(ramp_pack.index_path)
    assert "shock_on_lip_mach = 2.0" in page.all_text


def test_pack_from_a_project_escapes_text(tmp_path):
    p = load_project(PITOT)
    p = replace(p, title="<script>alert(1)</script> & co", notes="<b>bold</b>")
    pack = write_review_pack(p, tmp_path / "esc", quantities=("face_mach_margin",))
    raw = Path(pack.index_path).read_text(encoding="utf-8")
    assert "<script>" not in raw and "&lt;script&gt;" in raw and "<b>bold</b>" not in raw
    assert pack.holds and "every envelope point of every case" in raw
    assert load_project(pack.project_path) == p  # written by dumps_project: reproduces the project
    with pytest.raises(KeyError):
        write_review_pack(p, tmp_path / "bad", quantities=("no_such_quantity",))


def test_map_picture_cues():
    result = evaluate_project(load_project(FAILING))
    pic = P.render_map(result, "face_mach_margin")
    rgb = P.read_png(pic.png)
    left, top, w, h = pic.map_box
    fx, fy = pic.cell
    ny, nx = result.inside.shape
    assert (w, h) == (nx * fx, ny * fy)
    cells = rgb[top:top + h, left:left + w][::-1]  # back to row 0 = lowest altitude
    outside = ~result.inside
    i, j = np.argwhere(outside)[0]
    assert tuple(cells[i * fy, j * fx]) == P.OUTSIDE_GREY
    failing = result.failing(WORST)
    assert pic.failing_points == int(failing.sum()) > 0
    i, j = np.argwhere(failing)[len(np.argwhere(failing)) // 2]
    block = cells[i * fy:(i + 1) * fy, j * fx:(j + 1) * fx].reshape(-1, 3)
    hatch = {P.HATCH_DARK, P.HATCH_LIGHT}
    assert any(tuple(px) in hatch for px in block) or fx * fy < P.HATCH_PERIOD
    assert pic.vmin == -pic.vmax  # margins: symmetric scale


def test_ramps():
    div = P.ramp_lut(P.DIVERGING_ANCHORS, 257)
    assert tuple(div[128]) == (247, 247, 247)  # zero margin is the white centre
    assert div[0, 2] < div[0, 0] and div[-1, 2] > div[-1, 0]  # orange below zero, blue above
    seq = P.ramp_lut(P.SEQUENTIAL_ANCHORS, 256).astype(float)
    lum = seq @ np.array([0.2126, 0.7152, 0.0722])
    assert np.all(np.diff(lum) >= -1e-9)  # lightness rises monotonically along the sequential ramp


def test_png_writer_round_trip():
    rgb = (np.arange(5 * 7 * 3) % 256).astype(np.uint8).reshape(5, 7, 3)
    assert np.array_equal(P.read_png(P.png_bytes(rgb)), rgb)
    bad = bytearray(P.png_bytes(rgb))
    bad[20] ^= 0xFF
    with pytest.raises(ValueError):
        P.read_png(bytes(bad))


def test_write_map_png_signature_used_by_the_cli(tmp_path, capsys):
    result = evaluate_project(load_project(PITOT))
    out = tmp_path / "m.png"
    pic = P.write_map_png(result, out, "recovery")
    assert P.read_png(out.read_bytes()).shape == (pic.height, pic.width, 3)
    P.write_map_png(result, tmp_path / "c.png", "spillage_fraction", case="ISA, take-off")
    with pytest.raises(KeyError):
        P.write_map_png(result, tmp_path / "x.png", "no_such_quantity")
    png = tmp_path / "cli.png"
    assert main(["map", str(PITOT), "--case", "ISA, take-off", "--csv", str(tmp_path / "m.csv"), "--png", str(png)]) == 0
    assert P.read_png(png.read_bytes()).ndim == 3


def test_cli_pack_exit_codes(tmp_path, capsys):
    assert main(["pack", str(PITOT), "--out", str(tmp_path / "a"), "--quantity", "face_mach_margin"]) == 0
    assert (tmp_path / "a" / "index.html").exists()
    assert main(["pack", str(FAILING), "--out", str(tmp_path / "b"), "--quantity", "recovery"]) == 1
    capsys.readouterr()
    assert main(["pack", str(tmp_path / "missing.toml"), "--out", str(tmp_path / "c")]) == 2
    assert main(["pack", str(PITOT), "--out", str(tmp_path / "d"), "--quantity", "nonsense"]) == 2
    err = capsys.readouterr().err
    assert "missing.toml" in err and "nonsense" in err


def test_analysis_modules_never_import_qt():
    import subprocess
    import sys

    code = ("import sys, engine_air.studies.sizing, engine_air.studies.compare, engine_air.studies.sweep, engine_air.outputs.review_pack, "
            "engine_air.outputs.pictures, engine_air.cli; "
            "print(any(m.split('.')[0] in ('PySide6', 'pyqtgraph', 'PyQt5', 'PyQt6') for m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"
