"""Map pictures as PNG files without Qt: a raster writer on zlib and struct.

``write_map_png(result, path, quantity_key, case=None)`` draws one quantity of
an envelope evaluation (``engine_air.envelope.evaluate.MapResult``) for one case, or the
worst of all cases when ``case`` is None:

- one grid cell per map point, upscaled by whole numbers (nearest neighbour) to
  about 480 x 360 pixels, altitude upwards and Mach to the right, inside a thin
  dark frame;
- colour from a ramp: a viridis-like sequential ramp for level quantities
  (``SEQUENTIAL_ANCHORS``), a blue-white-orange diverging ramp centred on zero
  for margins (``DIVERGING_ANCHORS``: blue where the limit holds, orange where
  it fails, white at zero; the scale is symmetric about zero). Both ramps stay
  readable with the common colour-vision deficiencies and grow monotonically in
  lightness along each arm;
- points outside the envelope polygon in light grey (``OUTSIDE_GREY``), points
  inside it where the quantity is not defined (e.g. spillage below Mach 0.05) in
  mid grey (``UNDEFINED_GREY``);
- points where some limit fails carry a second cue besides colour: a diagonal
  hatch of dark pixels (light pixels on dark colours);
- a colour-bar strip below the map with the scale's low end, centre and high end
  written in a small built-in pixel font (``labels=False`` leaves the numbers to
  the surrounding document). Labels with units belong in the
  document around the picture (see ``MapPicture`` for the numbers).

``map_png_bytes(...)`` returns the same PNG as bytes; ``render_map(...)`` returns
a ``MapPicture`` with the bytes and the scale used; ``array_picture(...)`` draws
any (altitude x Mach) array, e.g. a difference map.

The PNG is 8-bit RGB, one IDAT chunk, filter type 0 on every row (PNG
specification, ISO/IEC 15948). ``read_png`` decodes exactly such files (for tests).
"""

from __future__ import annotations

import math
import struct
import zlib
from dataclasses import dataclass

import numpy as np

from engine_air.envelope.evaluate import WORST, MapResult
from engine_air.outputs.quantities import QUANTITIES

# position along the ramp (0..1) -> sRGB colour. Viridis-like: dark blue-violet
# through teal and green to yellow, lightness rising steadily.
SEQUENTIAL_ANCHORS: tuple[tuple[float, tuple[int, int, int]], ...] = (
    (0.000, (68, 1, 84)),
    (0.125, (72, 36, 117)),
    (0.250, (59, 82, 139)),
    (0.375, (44, 114, 142)),
    (0.500, (33, 145, 140)),
    (0.625, (40, 174, 128)),
    (0.750, (94, 201, 98)),
    (0.875, (173, 220, 48)),
    (1.000, (253, 231, 37)),
)
# Diverging about 0.5 (= margin 0): orange-brown below (the limit fails), blue above.
DIVERGING_ANCHORS: tuple[tuple[float, tuple[int, int, int]], ...] = (
    (0.00, (127, 59, 8)),
    (0.20, (224, 130, 20)),
    (0.40, (253, 184, 99)),
    (0.50, (247, 247, 247)),
    (0.60, (146, 197, 222)),
    (0.80, (67, 147, 195)),
    (1.00, (5, 48, 97)),
)
OUTSIDE_GREY = (212, 212, 212)
UNDEFINED_GREY = (150, 150, 150)
FRAME = (70, 70, 70)
BACKGROUND = (255, 255, 255)
HATCH_DARK = (20, 20, 20)
HATCH_LIGHT = (235, 235, 235)
HATCH_PERIOD = 5  # pixels between hatch lines

TARGET_WIDTH, TARGET_HEIGHT = 480, 360
BAR_GAP, BAR_HEIGHT = 6, 14
FONT_SCALE = 2

# 3 x 5 pixel glyphs, rows top to bottom.
_GLYPHS = {
    "0": ("111", "101", "101", "101", "111"), "1": ("010", "110", "010", "010", "111"),
    "2": ("111", "001", "111", "100", "111"), "3": ("111", "001", "111", "001", "111"),
    "4": ("101", "101", "111", "001", "001"), "5": ("111", "100", "111", "001", "111"),
    "6": ("111", "100", "111", "101", "111"), "7": ("111", "001", "001", "001", "001"),
    "8": ("111", "101", "111", "101", "111"), "9": ("111", "101", "111", "001", "111"),
    "-": ("000", "000", "111", "000", "000"), "+": ("000", "010", "111", "010", "000"),
    ".": ("000", "000", "000", "000", "010"), "e": ("111", "100", "111", "100", "111"),
    " ": ("000", "000", "000", "000", "000"),
}


def ramp_lut(anchors, n: int = 256) -> np.ndarray:
    """(n, 3) uint8 colours interpolated linearly (sRGB) between the anchors."""
    pos = np.array([p for p, _ in anchors], dtype=float)
    col = np.array([c for _, c in anchors], dtype=float)
    t = np.linspace(0.0, 1.0, n)
    return np.stack([np.interp(t, pos, col[:, k]) for k in range(3)], axis=1).round().astype(np.uint8)


def anchors_for(kind: str):
    """The ramp anchors for a quantity kind: ``"margin"`` diverging, anything else sequential."""
    return DIVERGING_ANCHORS if kind == "margin" else SEQUENTIAL_ANCHORS


def levels_for(kind: str, values) -> tuple[float, float]:
    """Colour-scale ends: symmetric about zero for margins, the finite data range for levels."""
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v)]
    if kind == "margin":
        a = float(np.max(np.abs(v))) if v.size else 1.0
        a = a if a > 0 else 1.0
        return -a, a
    if v.size == 0:
        return 0.0, 1.0
    lo, hi = float(v.min()), float(v.max())
    if hi - lo <= 1e-12 * max(1.0, abs(hi)):
        pad = max(abs(hi) * 0.01, 1e-6)
        lo, hi = lo - pad, hi + pad
    return lo, hi


def _colour(values: np.ndarray, kind: str, vmin: float, vmax: float) -> np.ndarray:
    lut = ramp_lut(anchors_for(kind))
    with np.errstate(invalid="ignore"):
        t = (values - vmin) / (vmax - vmin)
    t = np.clip(np.nan_to_num(t, nan=0.0), 0.0, 1.0)
    return lut[np.rint(t * (len(lut) - 1)).astype(np.intp)]


# -- PNG ---------------------------------------------------------------------------

def _chunk(kind: bytes, data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)


def png_bytes(rgb: np.ndarray) -> bytes:
    """An 8-bit RGB PNG of the (height, width, 3) uint8 array ``rgb``."""
    rgb = np.ascontiguousarray(rgb, dtype=np.uint8)
    if rgb.ndim != 3 or rgb.shape[2] != 3 or rgb.shape[0] < 1 or rgb.shape[1] < 1:
        raise ValueError(f"need a (height, width, 3) array, got shape {rgb.shape}")
    h, w, _ = rgb.shape
    raw = np.zeros((h, 1 + 3 * w), dtype=np.uint8)  # filter byte 0 on every row
    raw[:, 1:] = rgb.reshape(h, 3 * w)
    header = struct.pack(">IIBBBBB", w, h, 8, 2, 0, 0, 0)
    return (b"\x89PNG\r\n\x1a\n" + _chunk(b"IHDR", header) + _chunk(b"IDAT", zlib.compress(raw.tobytes(), 6))
            + _chunk(b"IEND", b""))


def read_png(data: bytes) -> np.ndarray:
    """Decode a PNG written by ``png_bytes`` (8-bit RGB, filter 0) to (height, width, 3) uint8.

    Checks the signature and every chunk's CRC; raises ValueError otherwise.
    """
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError("not a PNG file (bad signature)")
    pos, idat, header = 8, [], None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        (crc,) = struct.unpack(">I", data[pos + 8 + length:pos + 12 + length])
        if zlib.crc32(kind + body) & 0xFFFFFFFF != crc:
            raise ValueError(f"bad CRC in chunk {kind!r}")
        if kind == b"IHDR":
            header = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
        pos += 12 + length
    if header is None:
        raise ValueError("no IHDR chunk")
    w, h, depth, colour, _, _, interlace = header
    if (depth, colour, interlace) != (8, 2, 0):
        raise ValueError("only 8-bit RGB, non-interlaced PNGs are read")
    raw = np.frombuffer(zlib.decompress(b"".join(idat)), dtype=np.uint8).reshape(h, 1 + 3 * w)
    if np.any(raw[:, 0] != 0):
        raise ValueError("only filter type 0 is read")
    return raw[:, 1:].reshape(h, w, 3).copy()


# -- text ----------------------------------------------------------------------------

def _number_text(x: float) -> str:
    if not math.isfinite(x):
        return ""
    if x == 0:
        return "0"
    text = f"{x:.3g}"
    if "e" in text:
        mant, exp = text.split("e")
        text = f"{mant}e{int(exp)}"
    return text


def _draw_text(img: np.ndarray, text: str, x: int, y: int, colour=(30, 30, 30), scale: int = FONT_SCALE) -> None:
    """Draw ``text`` with its top-left corner at (x, y), clipped to the image."""
    h, w, _ = img.shape
    for i, ch in enumerate(text):
        glyph = _GLYPHS.get(ch, _GLYPHS[" "])
        mask = np.array([[c == "1" for c in row] for row in glyph], dtype=bool)
        mask = np.repeat(np.repeat(mask, scale, axis=0), scale, axis=1)
        gx = x + i * 4 * scale
        ys, xs = np.nonzero(mask)
        ys, xs = ys + y, xs + gx
        keep = (ys >= 0) & (ys < h) & (xs >= 0) & (xs < w)
        img[ys[keep], xs[keep]] = colour


def _text_width(text: str, scale: int = FONT_SCALE) -> int:
    return max(0, len(text) * 4 * scale - scale)


# -- pictures ------------------------------------------------------------------------

@dataclass(frozen=True)
class MapPicture:
    """A rendered map: the PNG bytes and what they show.

    ``vmin``/``vmax`` are the colour-scale ends (SI units of the quantity);
    ``map_box`` is (left, top, width, height) of the map area in pixels, inside
    the frame; ``cell`` the pixel size of one grid point (width, height).
    """

    png: bytes
    width: int
    height: int
    kind: str
    vmin: float
    vmax: float
    map_box: tuple[int, int, int, int]
    cell: tuple[int, int]
    failing_points: int
    undefined_points: int
    quantity: str = ""
    label: str = ""
    unit: str = ""
    case: str = ""


def _scale_factors(ny: int, nx: int) -> tuple[int, int]:
    return max(1, math.ceil(TARGET_WIDTH / nx)), max(1, math.ceil(TARGET_HEIGHT / ny))


def array_picture(
    values,
    kind: str = "level",
    inside=None,
    failing=None,
    levels: tuple[float, float] | None = None,
    colour_bar: bool = True,
    labels: bool = True,
) -> MapPicture:
    """Render a (altitude, Mach) array (row 0 = lowest altitude) as a ``MapPicture``.

    ``inside`` (bool array, default all True) marks the envelope: outside is
    light grey. NaN inside is mid grey (not defined). ``failing`` (bool array)
    hatches those points. ``levels`` fixes the colour-scale ends (default
    ``levels_for(kind, values inside)``), e.g. to share one scale between maps.
    """
    v = np.asarray(values, dtype=float)
    if v.ndim != 2 or v.shape[0] < 1 or v.shape[1] < 1:
        raise ValueError(f"need a 2-D map, got shape {v.shape}")
    ny, nx = v.shape
    inside = np.ones(v.shape, bool) if inside is None else np.asarray(inside, bool)
    failing = np.zeros(v.shape, bool) if failing is None else (np.asarray(failing, bool) & inside)
    if levels is None:
        levels = levels_for(kind, v[inside])
    vmin, vmax = float(levels[0]), float(levels[1])
    if not (math.isfinite(vmin) and math.isfinite(vmax)) or vmax <= vmin:
        vmin, vmax = levels_for(kind, np.array([vmin, vmax]))
    undefined = inside & ~np.isfinite(v)
    cells = _colour(v, kind, vmin, vmax)
    cells[~inside] = OUTSIDE_GREY
    cells[undefined] = UNDEFINED_GREY
    # altitude upwards: the last row of the map is the top of the picture
    cells, fail_cells = cells[::-1], failing[::-1]
    fx, fy = _scale_factors(ny, nx)
    big = np.repeat(np.repeat(cells, fy, axis=0), fx, axis=1)
    fail_big = np.repeat(np.repeat(fail_cells, fy, axis=0), fx, axis=1)
    hgt, wid = big.shape[:2]
    yy, xx = np.mgrid[0:hgt, 0:wid]
    hatch = fail_big & (((xx + yy) % HATCH_PERIOD) == 0)
    luminance = big @ np.array([0.2126, 0.7152, 0.0722]) / 255.0
    big[hatch & (luminance >= 0.35)] = HATCH_DARK
    big[hatch & (luminance < 0.35)] = HATCH_LIGHT

    label_h = (5 * FONT_SCALE + 4) if labels else 0
    total_h = hgt + 2 + ((BAR_GAP + BAR_HEIGHT + 2 + label_h) if colour_bar else 0)
    total_w = wid + 2
    img = np.empty((total_h, total_w, 3), np.uint8)
    img[:] = BACKGROUND
    img[0:hgt + 2, 0:wid + 2] = FRAME
    img[1:hgt + 1, 1:wid + 1] = big
    if colour_bar:
        top = hgt + 2 + BAR_GAP
        lut = ramp_lut(anchors_for(kind), n=total_w - 2)
        img[top:top + BAR_HEIGHT + 2, :] = FRAME
        img[top + 1:top + 1 + BAR_HEIGHT, 1:total_w - 1] = lut[None, :, :]
    if colour_bar and labels:
        ty = top + BAR_HEIGHT + 2 + 3
        lo_t, hi_t = _number_text(vmin), _number_text(vmax)
        mid_t = "0" if kind == "margin" else _number_text(0.5 * (vmin + vmax))
        _draw_text(img, lo_t, 0, ty)
        _draw_text(img, hi_t, total_w - _text_width(hi_t), ty)
        mid_x = (total_w - _text_width(mid_t)) // 2
        if mid_x > _text_width(lo_t) + 6 and mid_x + _text_width(mid_t) < total_w - _text_width(hi_t) - 6:
            _draw_text(img, mid_t, mid_x, ty)
    return MapPicture(
        png=png_bytes(img), width=total_w, height=total_h, kind=kind, vmin=vmin, vmax=vmax,
        map_box=(1, 1, wid, hgt), cell=(fx, fy), failing_points=int(failing.sum()),
        undefined_points=int(undefined.sum()),
    )


def quantity_kind(quantity_key: str) -> str:
    """``"margin"`` or ``"level"``; KeyError for a key that is not a map quantity."""
    return QUANTITIES[quantity_key].kind


def render_map(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
    colour_bar: bool = True,
    labels: bool = True,
) -> MapPicture:
    """Render ``quantity_key`` (a key of ``engine_air.outputs.quantities.QUANTITIES``) for ``case``
    (None: the worst of all cases) of ``result``; KeyError for an unknown quantity or case."""
    q = QUANTITIES[quantity_key]
    name = WORST if case is None else case
    values = result.quantity(name, quantity_key)
    failing = result.failing(name)
    pic = array_picture(values, q.kind, inside=result.inside, failing=failing, levels=levels, colour_bar=colour_bar,
                        labels=labels)
    return MapPicture(**{**pic.__dict__, "quantity": quantity_key, "label": q.label, "unit": q.unit, "case": name})


def map_png_bytes(
    result: MapResult,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
) -> bytes:
    """The PNG bytes of ``render_map(result, quantity_key, case, levels)``."""
    return render_map(result, quantity_key, case, levels).png


def write_map_png(
    result: MapResult,
    path,
    quantity_key: str = "face_mach_margin",
    case: str | None = None,
    levels: tuple[float, float] | None = None,
) -> MapPicture:
    """Write the map of ``quantity_key`` for ``case`` (None: worst of all cases) to ``path`` as PNG.

    Returns the ``MapPicture`` (scale ends, size). Raises KeyError for an
    unknown quantity or case and OSError when the file cannot be written.
    """
    pic = render_map(result, quantity_key, case, levels)
    with open(path, "wb") as fh:
        fh.write(pic.png)
    return pic
