"""A side view of the inlet at one operating point, as lines to draw (Qt-free; the program and the pack draw it).

The view is to scale where the project file fixes the geometry: the ramps (or cones) and the cowl lip laid out
shock-on-lip at the design Mach number (method §6, §9), the cowl entrance of a mixed-compression inlet (method
§11: the section from the lip to the last ramp, A_e), the throat and face heights from their areas. Duct lengths
are not in the file; the throat and face are placed at fixed distances behind the lip (drawn as such, "duct
length not to scale").

Shocks are drawn at their computed angles and places, and never cross one another:
- each ramp or cone shock from its corner at (flow direction ahead of it + wave angle), up to the lip height;
  where a later shock would cross an earlier one the two merge (the earlier one ends where they meet and the
  later one carries on);
- mixed compression, started: the cowl shock from the lip at the cowl's wave angle to the ramp wall (ramp
  shocks that enter the cowl end on it), the internal contraction to the throat and the terminal normal shock
  just downstream of the throat; unstarted: the normal shock ahead of the cowl;
- otherwise the terminal normal shock at the lip when critical (behind the point where the ramp shocks reach
  the cowl when they enter it), ahead of it when subcritical (further ahead the more the inlet spills, ending
  where it meets the ramp shocks), inside the duct when supercritical;
- a bow shock (normal at its nose, bending towards the free-stream Mach angle) ahead of the inlet when a shock
  is detached, and ahead of a pitot inlet spilling in supersonic flight;
- the captured stream tube: its height far upstream is the captured share of the capture height
  (2-D: MFR·H; axisymmetric: √MFR·r_lip), joining the lip;
- auxiliary (take-off) doors and bypass doors, drawn open where they pass flow at the point.

Lengths in metres: a two-dimensional inlet's capture height is taken as √A_c (a square capture; the file gives
the area, not the width), an axisymmetric or pitot inlet's lip radius as √(A_c/π). Flow areas become heights in
proportion (2-D: h = H·A/A_c) or annuli (axisymmetric).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from engine_air.envelope import flags as F
from engine_air.flow.match import CRITICAL, SUBCRITICAL, SUPERCRITICAL, OperatingPoints
from engine_air.inlets.registry import inlet_type
from engine_air.inlets.schedule import inlet_at
from engine_air.physics.shocks import oblique_shock
from engine_air.project.model import Project

AXISYMMETRIC_TYPES = ("pitot", "axisymmetric-spike")
SHOCK_ROLES = ("shock", "cowl-shock", "terminal-shock", "bow-shock")
DUCT_THROAT_AFTER_LIP = 0.6  # in capture heights: placement only (not in the file)
DUCT_FACE_AFTER_LIP = 1.8
MIXED_THROAT_AFTER_SHOULDER = 0.45  # mixed compression: throat behind the cowl shock's foot, capture heights
MIXED_FACE_AFTER_THROAT = 1.3
TERMINAL_AFTER_THROAT = 0.08  # a started terminal shock stands just downstream of the throat
COWL_THICKNESS = 0.10  # drawn cowl wall, capture heights
DOOR_LENGTH = 0.22
DOOR_OPENING_DEG = 30.0


@dataclass(frozen=True)
class SketchLine:
    role: str  # "wall", "cowl", "entrance", "throat", "face", "shock", "cowl-shock", "terminal-shock",
    #            "bow-shock", "stream-tube", "axis", "auxiliary-door", "bypass-door"
    label: str
    x_m: np.ndarray
    y_m: np.ndarray


@dataclass
class InletSketch:
    lines: list[SketchLine] = field(default_factory=list)
    shock_angles_deg: dict[str, float] = field(default_factory=dict)  # label -> angle from the free stream
    notes: list[str] = field(default_factory=list)
    axisymmetric: bool = False
    labels: list[tuple[float, float, str]] = field(default_factory=list)  # (x m, y m, text): station names

    def of_role(self, role: str) -> list[SketchLine]:
        return [line for line in self.lines if line.role == role]

    def line(self, label: str) -> SketchLine:
        return next(line for line in self.lines if line.label == label)

    def bounds(self) -> tuple[float, float, float, float]:
        """(x_min, x_max, y_min, y_max) of everything drawn, metres."""
        xs = np.concatenate([line.x_m for line in self.lines] + [np.array([x for x, _, _ in self.labels])])
        ys = np.concatenate([line.y_m for line in self.lines] + [np.array([y for _, y, _ in self.labels])])
        return float(xs.min()), float(xs.max()), float(ys.min()), float(ys.max())


def _at(array, index) -> float:
    return float(np.asarray(array)[index])


def _design_layout(inlet) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Corners (n, 2), lip (2,), flow angles (n + 1,) in capture heights, from the shock-on-lip design."""
    kind = inlet_type(inlet.type)
    design = float(inlet.shock_on_lip_mach)
    if inlet.type in ("external-ramp", "mixed-compression"):
        from engine_air.inlets.ramp_layout import ramp_design_geometry

        g = ramp_design_geometry(inlet.ramp_angles_deg, design)
        return np.asarray(g.corners, float), np.asarray(g.lip, float), np.asarray(g.flow_angle_rad, float)
    # cones (or any type with shock-on-lip design): lip on the first shock's ray at the design Mach number
    angles = tuple(getattr(inlet, "cone_half_angles_deg", ()) or ())
    shocks = kind.shock_system(inlet, np.array([design]))
    beta = float(np.asarray(shocks.ramp_wave_angle_rad)[0, 0]) if np.size(shocks.ramp_wave_angle_rad) else math.pi / 4
    lip = np.array([1.0 / math.tan(beta), 1.0])
    flow = np.concatenate([[0.0], np.radians(np.asarray(angles, float))])
    corners = [np.zeros(2)]
    for k in range(1, len(angles)):
        # a second cone starts part-way to the lip along the first cone's surface
        s = 0.55 * lip[0] / math.cos(flow[k])
        corners.append(corners[-1] + s * np.array([math.cos(flow[k]), math.sin(flow[k])]))
    return np.array(corners), lip, flow


def _surface_height(corners: np.ndarray, flow: np.ndarray, x: float) -> float:
    """Height of the ramp (or cone) surface at station x (capture heights)."""
    k = int(np.searchsorted(corners[:, 0], x, side="right")) - 1
    k = max(0, min(k, len(corners) - 1))
    cx, cy = corners[k]
    return float(cy + (x - cx) * math.tan(flow[k + 1] if k + 1 < len(flow) else flow[-1]))


def _bow_shock(x_nose: float, y_nose: float, mach: float, height: float) -> tuple[np.ndarray, np.ndarray]:
    """A hyperbola normal at its nose whose branches tend to the free-stream Mach angle (Moeckel's shape)."""
    mu = math.asin(1.0 / max(mach, 1.0 + 1e-9))
    b = 0.25  # nose radius scale, capture heights
    y = np.linspace(-0.2 * height, 1.35 * height, 60)
    dy = y - y_nose
    x = x_nose + np.sqrt(b * b + (dy / math.tan(mu)) ** 2) - b
    return x, y


def _segment_hit(p0, p1, q0, q1) -> tuple[float, float] | None:
    """Where segment p0-p1 meets segment q0-q1: (t along p, s along q), both in [0, 1]; None if they do not."""
    d = np.subtract(p1, p0)
    e = np.subtract(q1, q0)
    det = d[0] * e[1] - d[1] * e[0]
    if abs(det) < 1e-12:
        return None
    w = np.subtract(q0, p0)
    t = (w[0] * e[1] - w[1] * e[0]) / det
    s = (w[0] * d[1] - w[1] * d[0]) / det
    if -1e-12 <= t <= 1.0 + 1e-12 and -1e-12 <= s <= 1.0 + 1e-12:
        return float(t), float(s)
    return None


def _first_hit(p0, p1, xs, ys) -> float | None:
    """Smallest t in (0, 1] at which segment p0-p1 meets the polyline (xs, ys)."""
    best = None
    for k in range(len(xs) - 1):
        hit = _segment_hit(p0, p1, (xs[k], ys[k]), (xs[k + 1], ys[k + 1]))
        if hit is not None and hit[0] > 1e-9 and (best is None or hit[0] < best):
            best = hit[0]
    return best


@dataclass
class _Shock:
    label: str
    start: np.ndarray
    end: np.ndarray
    angle_deg: float


def _merged_ramp_shocks(corners, flow, betas, m0, top) -> list[_Shock]:
    """Ramp or cone shocks from each corner to height ``top``; a later shock that meets an earlier one merges
    with it (the earlier ends at the meeting point, the later carries on)."""
    shocks: list[_Shock] = []
    for k, beta in enumerate(np.atleast_1d(betas)):
        if not (m0 > 1.0 and math.isfinite(beta)) or k >= len(corners):
            break
        angle = float(flow[k] + beta)
        start = np.asarray(corners[k], float)
        end = start + (top - start[1]) / math.sin(angle) * np.array([math.cos(angle), math.sin(angle)])
        for earlier in shocks:
            hit = _segment_hit(start, end, earlier.start, earlier.end)
            if hit is not None and 1e-9 < hit[1] < 1.0 - 1e-9:
                earlier.end = earlier.start + hit[1] * (earlier.end - earlier.start)
        shocks.append(_Shock(f"shock {k + 1}", start, end, math.degrees(angle)))
    return shocks


def _clip_at(shock: _Shock, xs, ys) -> None:
    """End ``shock`` where it first meets the polyline (xs, ys)."""
    t = _first_hit(shock.start, shock.end, xs, ys)
    if t is not None:
        shock.end = shock.start + t * (shock.end - shock.start)


def _door(x_hinge: float, y_hinge: float, inward: bool, up: bool) -> tuple[list[float], list[float]]:
    """A flap hinged at its downstream end, opened by DOOR_OPENING_DEG (into the duct or out of it)."""
    a = math.radians(DOOR_OPENING_DEG)
    sign = (1.0 if up else -1.0) * (-1.0 if inward else 1.0)
    return [x_hinge - DOOR_LENGTH * math.cos(a), x_hinge], [y_hinge + sign * DOOR_LENGTH * math.sin(a), y_hinge]


@dataclass
class _Layout:
    """Geometry in capture heights: the inner walls and the stations, for one inlet."""

    corners: np.ndarray
    lip: np.ndarray
    flow: np.ndarray
    wall_x: list  # lower wall (ramps or spike, then the duct), upstream to the face
    wall_y: list
    x_throat: float
    x_face: float
    entrance_foot: np.ndarray | None = None  # mixed compression: where the entrance section meets the ramp


def _mixed_layout(inlet, corners, lip, flow) -> _Layout:
    """Ramps, the cowl entrance (lip to its foot on the last ramp), the shoulder where the cowl shock meets the
    ramp at the design Mach number, a straight internal contraction to the throat and the diffuser to the face."""
    from engine_air.inlets.ramp_layout import cowl_entrance, ramp_design_geometry

    foot, _ = cowl_entrance(ramp_design_geometry(inlet.ramp_angles_deg, float(inlet.shock_on_lip_mach)))
    theta = float(flow[-1])
    ramp_dir = np.array([math.cos(theta), math.sin(theta)])
    m_e = float(inlet.shock_on_lip_mach)
    for angle in inlet.ramp_angles_deg:
        m_e = float(oblique_shock(m_e, math.radians(angle)).downstream_mach)
    cowl = oblique_shock(m_e, theta)
    shoulder = foot + 0.3 * ramp_dir
    if bool(cowl.attached):
        phi = theta - float(cowl.wave_angle_rad)
        hit = _segment_hit(lip, lip + 5.0 * np.array([math.cos(phi), math.sin(phi)]), foot, foot + 5.0 * ramp_dir)
        if hit is not None:
            shoulder = foot + hit[1] * 5.0 * ramp_dir
    h_th = inlet.throat_area_m2 / inlet.capture_area_m2
    h_face = inlet.face_area_m2 / inlet.capture_area_m2
    x_th = float(max(shoulder[0], lip[0])) + MIXED_THROAT_AFTER_SHOULDER
    x_face = x_th + MIXED_FACE_AFTER_THROAT
    wall_x = list(corners[:, 0]) + [float(shoulder[0]), x_th, x_face]
    wall_y = list(corners[:, 1]) + [float(shoulder[1]), lip[1] - h_th, lip[1] - h_face]
    return _Layout(corners, lip, flow, wall_x, wall_y, x_th, x_face, foot)


def _external_layout(inlet, corners, lip, flow, axisymmetric: bool) -> _Layout:
    """Ramps or cones to the lip station, then the duct's inner wall to the throat and the face."""
    x_lip, y_lip = float(lip[0]), float(lip[1])
    x_th, x_face = x_lip + DUCT_THROAT_AFTER_LIP, x_lip + DUCT_FACE_AFTER_LIP
    h_th = inlet.throat_area_m2 / inlet.capture_area_m2
    h_face = inlet.face_area_m2 / inlet.capture_area_m2
    if axisymmetric:  # annuli: the cowl at radius 1, the centre body inside
        h_th, h_face = 1.0 - math.sqrt(max(0.0, 1.0 - h_th)), 1.0 - math.sqrt(max(0.0, 1.0 - h_face))
    wall_x = list(corners[:, 0]) + [x_lip, x_th, x_face]
    wall_y = list(corners[:, 1]) + [_surface_height(corners, flow, x_lip), y_lip - h_th, y_lip - h_face]
    return _Layout(corners, lip, flow, wall_x, wall_y, x_th, x_face)


@dataclass
class _State:
    """What the point says about the flow: Mach, regime, spill, started, doors."""

    m0: float
    regime: int
    spill: float
    mfr: float
    detached: bool
    started: bool | None
    entry_mach: float
    aux_open: bool
    bypass_open: bool


def _state(points: OperatingPoints, index) -> _State:
    m0 = _at(points.mach, index)
    mfr, mfr_max = _at(points.mass_flow_ratio, index), _at(points.max_mass_flow_ratio, index)
    ok = math.isfinite(mfr) and math.isfinite(mfr_max) and mfr_max > 0
    started = None if points.started is None else bool(_at(points.started, index))
    machs = np.asarray(points.ramp_downstream_mach) if points.ramp_downstream_mach is not None else np.zeros((0,))
    entry = m0
    for k in range(machs.shape[0] if machs.ndim else 0):
        value = float(machs[(k,) + (index if isinstance(index, tuple) else (index,))])
        if math.isfinite(value):
            entry = value
    return _State(m0, int(_at(points.regime, index)), max(0.0, 1.0 - mfr / mfr_max) if ok else 0.0, mfr,
                  bool(int(_at(points.flags, index)) & F.SHOCK_DETACHED), started, entry,
                  _at(points.auxiliary_flow_kg_s, index) > 0.0, _at(points.bypass_flow_kg_s, index) > 0.0)


class _Drawing:
    """Collects lines and labels in capture heights and scales them to metres."""

    def __init__(self, scale: float, axisymmetric: bool) -> None:
        self.scale = scale
        self.sketch = InletSketch(axisymmetric=axisymmetric)

    def add(self, role, label, x, y) -> None:
        s = self.scale
        self.sketch.lines.append(SketchLine(role, label, np.asarray(x, float) * s, np.asarray(y, float) * s))

    def text(self, x, y, text) -> None:
        self.sketch.labels.append((float(x) * self.scale, float(y) * self.scale, text))

    def shock(self, role, s: _Shock) -> None:
        self.add(role, s.label, [s.start[0], s.end[0]], [s.start[1], s.end[1]])
        self.sketch.shock_angles_deg[s.label] = s.angle_deg


def _cowl(d: _Drawing, x_lip: float, y_lip: float, x_face: float, sign: float = 1.0, label: str = "cowl") -> None:
    """The cowl as a thin wall: outer surface rising from the lip, inner surface parallel to the free stream."""
    t = sign * COWL_THICKNESS
    d.add("cowl", label, [x_face, x_lip + 0.6, x_lip, x_face], [y_lip + t, y_lip + t, y_lip, y_lip])


def _pitot(d: _Drawing, inlet, st: _State) -> _Layout:
    x_th, x_face = DUCT_THROAT_AFTER_LIP, DUCT_FACE_AFTER_LIP
    r_th = math.sqrt(inlet.throat_area_m2 / inlet.capture_area_m2)
    r_face = math.sqrt(inlet.face_area_m2 / inlet.capture_area_m2)
    d.add("cowl", "cowl", [x_face, 0.6, 0.0, x_th, x_face], [1.0 + COWL_THICKNESS, 1.0 + COWL_THICKNESS, 1.0, r_th,
                                                              r_face])
    d.add("cowl", "cowl (lower)", [x_face, 0.6, 0.0, x_th, x_face],
          [-1.0 - COWL_THICKNESS, -1.0 - COWL_THICKNESS, -1.0, -r_th, -r_face])
    d.add("throat", "throat", [x_th, x_th], [-r_th, r_th])
    d.add("face", "engine face", [x_face, x_face], [-r_face, r_face])
    d.add("axis", "axis", [-0.6, x_face], [0.0, 0.0])
    return _Layout(np.zeros((0, 2)), np.array([0.0, 1.0]), np.array([0.0]), [0.0, x_th, x_face], [-1.0, -r_th, -r_face],
                   x_th, x_face)


def _walls(d: _Drawing, inlet, lay: _Layout, mixed: bool, axisymmetric: bool) -> None:
    x_lip, y_lip = float(lay.lip[0]), float(lay.lip[1])
    n = len(lay.corners)
    ramp_x = lay.wall_x[:n] + [lay.wall_x[n]]
    ramp_y = lay.wall_y[:n] + [lay.wall_y[n]]
    d.add("wall", "ramps" if not axisymmetric else "spike", ramp_x, ramp_y)
    d.add("wall", "duct wall", lay.wall_x[n:], lay.wall_y[n:])
    _cowl(d, x_lip, y_lip, lay.x_face)
    if axisymmetric:
        d.add("axis", "axis", [min(-0.6, float(lay.corners[0, 0]) - 0.6), lay.x_face], [0.0, 0.0])
    if mixed:
        foot = lay.entrance_foot
        d.add("entrance", "cowl entrance", [x_lip, foot[0]], [y_lip, foot[1]])
        d.text(0.5 * (x_lip + foot[0]) - 0.12, 0.5 * (y_lip + foot[1]), "e")
    y_th_wall = float(np.interp(lay.x_throat, lay.wall_x, lay.wall_y))
    y_face_wall = float(np.interp(lay.x_face, lay.wall_x, lay.wall_y))
    d.add("throat", "throat", [lay.x_throat, lay.x_throat], [y_th_wall, y_lip])
    d.add("face", "engine face", [lay.x_face, lay.x_face], [y_face_wall, y_lip])


def _above_wall(x: np.ndarray, y: np.ndarray, lay: _Layout) -> tuple[np.ndarray, np.ndarray]:
    """The run of the polyline (x, y) through its nose (its most upstream point) that stays above the lower wall
    (the ramp plane or the spike's axis ahead of the first corner): a bow shock does not enter the body."""
    above = y >= np.interp(x, lay.wall_x, lay.wall_y) - 1e-9
    nose = int(np.argmin(x))
    if not above[nose]:
        return x, y
    lo, hi = nose, nose
    while lo > 0 and above[lo - 1]:
        lo -= 1
    while hi < len(x) - 1 and above[hi + 1]:
        hi += 1
    return x[lo:hi + 1], y[lo:hi + 1]


def _down_to_wall(top: np.ndarray, local: float, lay: _Layout) -> np.ndarray:
    """Where a line normal to the local flow (direction ``local``, rad) from ``top`` down meets the lower wall."""
    bottom = top + 3.0 * np.array([math.sin(local), -math.cos(local)])
    t = _first_hit(top, bottom, lay.wall_x, lay.wall_y)
    return top + (t if t is not None else 1.0 / 3.0) * (bottom - top)


def _started_mixed_shocks(d: _Drawing, lay: _Layout, ramp_shocks: list[_Shock], st: _State, inlet) -> None:
    """Cowl shock from the lip to the wall (ramp shocks inside the cowl end on it), the terminal normal shock
    just downstream of the throat (method §11)."""
    theta = float(lay.flow[-1])
    cowl = oblique_shock(st.entry_mach, theta)
    lip = lay.lip
    if bool(cowl.attached) and st.entry_mach > 1.0:
        phi = theta - float(cowl.wave_angle_rad)
        far = lip + 5.0 * np.array([math.cos(phi), math.sin(phi)])
        t = _first_hit(lip, far, lay.wall_x, lay.wall_y)
        end = lip + (t if t is not None else 0.1) * (far - lip)
        cowl_shock = _Shock("cowl shock", lip.copy(), end, math.degrees(phi))
        for s in ramp_shocks:
            _clip_at(s, [lip[0], end[0]], [lip[1], end[1]])
        d.shock("cowl-shock", cowl_shock)
    x_ns = lay.x_throat + TERMINAL_AFTER_THROAT
    top = np.array([x_ns, float(lip[1])])
    bottom = _down_to_wall(top, 0.0, lay)
    d.shock("terminal-shock", _Shock("terminal shock behind the throat (started)", bottom, top, 90.0))


def _terminal_or_bow(d: _Drawing, lay: _Layout, ramp_shocks: list[_Shock], st: _State, has_layout: bool,
                     mixed: bool) -> None:
    """The terminal normal shock (ahead of the lip, at it or in the duct) or a bow shock (module text)."""
    x_lip, y_lip = float(lay.lip[0]), float(lay.lip[1])
    if st.detached or (not has_layout and st.regime == SUBCRITICAL and st.spill > 0.0):
        k_det = len(ramp_shocks)
        x_nose = (float(lay.corners[min(k_det, len(lay.corners) - 1), 0]) if has_layout and st.detached else x_lip)
        x_nose -= 0.15 + 0.8 * st.spill
        y_mid = 0.5 * (lay.wall_y[len(lay.corners)] + y_lip) if has_layout else 0.0
        x, y = _bow_shock(x_nose, y_mid, st.m0, 1.0)
        if has_layout:
            x, y = _above_wall(x, y, lay)
        for s in ramp_shocks:
            _clip_at(s, x, y)
        d.add("bow-shock", "bow shock", x, y)
        d.sketch.shock_angles_deg["bow shock (nose)"] = 90.0
        return
    local = float(lay.flow[len(ramp_shocks)]) if has_layout else 0.0
    reach = max([float(s.end[0]) for s in ramp_shocks if abs(s.end[1] - y_lip) < 1e-9] + [x_lip])
    if mixed:  # unstarted: a normal shock stands ahead of the cowl
        x_top, where = x_lip - 0.15 - 0.8 * st.spill, "ahead of the cowl (unstarted)"
    elif st.regime == SUPERCRITICAL:
        x_top, where = max(x_lip + 0.3, reach + 0.1), "inside the duct (supercritical)"
    elif st.regime == CRITICAL or st.spill == 0.0:
        x_top, where = (reach + 0.02 if reach > x_lip else x_lip), "at the lip (critical)"
    else:
        x_top, where = x_lip - 0.15 - 0.8 * st.spill, "ahead of the lip (subcritical)"
    top = np.array([x_top, y_lip])
    if has_layout:
        bottom = _down_to_wall(top, local, lay)
    else:
        bottom = np.array([x_top, -1.0])
    ns = _Shock(f"terminal shock {where}", bottom, top, math.degrees(local) + 90.0)
    for s in ramp_shocks:  # ahead of the lip it ends where it meets the oblique shocks
        _clip_at(ns, [s.start[0], s.end[0]], [s.start[1], s.end[1]])
    d.shock("terminal-shock", ns)
    d.sketch.shock_angles_deg["terminal shock"] = math.degrees(local) + 90.0


def _doors(d: _Drawing, lay: _Layout, st: _State) -> None:
    """Auxiliary doors (into the duct) and bypass doors (out of it) in the cowl, where they pass flow."""
    y_cowl = float(lay.lip[1])
    if st.aux_open:
        x_a = lay.x_throat + 0.45 * (lay.x_face - lay.x_throat)
        x, y = _door(x_a, y_cowl, inward=True, up=True)
        d.add("auxiliary-door", "auxiliary door (open)", x, y)
    if st.bypass_open:
        x_b = lay.x_face - 0.1
        x, y = _door(x_b, y_cowl + COWL_THICKNESS, inward=False, up=True)
        d.add("bypass-door", "bypass door (open)", x, y)


def _stream_tube(d: _Drawing, lay: _Layout, st: _State, axisymmetric: bool, has_layout: bool) -> None:
    if not (math.isfinite(st.mfr) and st.m0 > 0.0):
        return
    x_lip, y_lip = float(lay.lip[0]), float(lay.lip[1])
    x_min = min(-0.6, (float(lay.corners[0, 0]) if len(lay.corners) else 0.0) - 0.6)
    captured = min(max(st.mfr, 0.0), 1.5)
    y0 = captured if not axisymmetric else math.sqrt(captured)
    if not has_layout:
        d.add("stream-tube", "captured stream tube", [x_min, x_lip - 0.3, x_lip], [y0, y0, 1.0])
        d.add("stream-tube", "captured stream tube (lower)", [x_min, x_lip - 0.3, x_lip], [-y0, -y0, -1.0])
    else:
        # measured from the axis (spike) or from the extension of the first ramp's plane (2-D)
        d.add("stream-tube", "captured stream tube", [x_min, min(x_lip - 0.3, 0.0), x_lip], [y0, y0, y_lip])


def inlet_sketch(project: Project, points: OperatingPoints, index) -> InletSketch:
    """The side view of ``project``'s inlet at the point ``index`` of ``points`` (see the module text)."""
    st = _state(points, index)
    inlet = inlet_at(project.inlet, st.m0)
    axisymmetric = inlet.type in AXISYMMETRIC_TYPES
    mixed = inlet.type == "mixed-compression"
    scale = math.sqrt(inlet.capture_area_m2 / math.pi) if axisymmetric else math.sqrt(inlet.capture_area_m2)
    d = _Drawing(scale, axisymmetric)
    has_layout = inlet.type != "pitot" and inlet.shock_on_lip_mach is not None
    if has_layout:
        corners, lip, flow = _design_layout(inlet)
        lay = _mixed_layout(inlet, corners, lip, flow) if mixed else _external_layout(inlet, corners, lip, flow,
                                                                                         axisymmetric)
        _walls(d, inlet, lay, mixed, axisymmetric)
    else:
        lay = _pitot(d, inlet, st)
    betas = np.asarray(points.ramp_wave_angle_rad)[(slice(None),) + (index if isinstance(index, tuple) else (index,))] \
        if points.ramp_wave_angle_rad is not None and np.size(points.ramp_wave_angle_rad) else np.array([])
    ramp_shocks = _merged_ramp_shocks(lay.corners, lay.flow, betas, st.m0, float(lay.lip[1])) if has_layout else []
    if st.m0 > 1.0:
        if mixed and st.started:
            _started_mixed_shocks(d, lay, ramp_shocks, st, inlet)
        else:
            _terminal_or_bow(d, lay, ramp_shocks, st, has_layout, mixed)
    for s in ramp_shocks:
        d.shock("shock", s)
    _stream_tube(d, lay, st, axisymmetric, has_layout)
    _doors(d, lay, st)
    top = float(lay.lip[1]) + COWL_THICKNESS + 0.12
    d.text(float(lay.lip[0]), top, "1")
    d.text(lay.x_throat, top, "th")
    d.text(lay.x_face, top, "2")
    d.sketch.notes.append("duct length not to scale; "
                          + ("lip radius sqrt(A_c/pi)" if axisymmetric else "capture height sqrt(A_c) (square capture)"))
    return d.sketch
