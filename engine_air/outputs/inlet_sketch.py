"""A side view of the inlet at one operating point, as lines to draw (Qt-free; the program and the pack draw it).

The view is to scale where the project file fixes the geometry: the ramps (or cones) and the cowl lip laid out
shock-on-lip at the design Mach number (method §6, §9), the throat and face heights from their areas. Duct
lengths are not in the file; the throat and face are placed at a fixed distance behind the lip (drawn as such,
"duct length not to scale").

Shocks are drawn at their computed angles and places:
- each ramp or cone shock from its corner at (flow direction ahead of it + wave angle), up to the lip height;
- the terminal normal shock at the lip when critical, ahead of it when subcritical (further ahead the more the
  inlet spills), inside the duct when supercritical;
- a bow shock (normal at its nose, bending towards the free-stream Mach angle) ahead of the inlet when a shock
  is detached, and ahead of a pitot inlet spilling in supersonic flight;
- the captured stream tube: its height far upstream is the captured share of the capture height
  (2-D: MFR·H; axisymmetric: √MFR·r_lip), joining the lip.

Lengths in metres: a two-dimensional inlet's capture height is taken as √A_c (a square capture; the file gives
the area, not the width), an axisymmetric or pitot inlet's lip radius as √(A_c/π).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from engine_air.envelope import flags as F
from engine_air.flow.match import CRITICAL, SUBCRITICAL, SUBSONIC, SUPERCRITICAL, OperatingPoints
from engine_air.inlets.registry import inlet_type
from engine_air.inlets.schedule import inlet_at
from engine_air.project.model import Project

AXISYMMETRIC_TYPES = ("pitot", "axisymmetric-spike")
DUCT_THROAT_AFTER_LIP = 0.6  # in capture heights: placement only (not in the file)
DUCT_FACE_AFTER_LIP = 1.8


@dataclass(frozen=True)
class SketchLine:
    role: str  # "wall", "cowl", "throat", "face", "shock", "terminal-shock", "bow-shock", "stream-tube"
    label: str
    x_m: np.ndarray
    y_m: np.ndarray


@dataclass
class InletSketch:
    lines: list[SketchLine] = field(default_factory=list)
    shock_angles_deg: dict[str, float] = field(default_factory=dict)  # label -> angle from the free stream
    notes: list[str] = field(default_factory=list)
    axisymmetric: bool = False

    def of_role(self, role: str) -> list[SketchLine]:
        return [line for line in self.lines if line.role == role]


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


def inlet_sketch(project: Project, points: OperatingPoints, index) -> InletSketch:
    """The side view of ``project``'s inlet at the point ``index`` of ``points`` (see the module text)."""
    m0 = _at(points.mach, index)
    inlet = inlet_at(project.inlet, m0)
    axisymmetric = inlet.type in AXISYMMETRIC_TYPES
    scale = math.sqrt(inlet.capture_area_m2 / math.pi) if axisymmetric else math.sqrt(inlet.capture_area_m2)
    sketch = InletSketch(axisymmetric=axisymmetric)
    regime = int(_at(points.regime, index))
    bits = int(_at(points.flags, index))
    mfr = _at(points.mass_flow_ratio, index)
    mfr_max = _at(points.max_mass_flow_ratio, index)
    detached = bool(bits & F.SHOCK_DETACHED)

    has_layout = inlet.type != "pitot" and inlet.shock_on_lip_mach is not None
    if has_layout:
        corners, lip, flow = _design_layout(inlet)
    else:
        corners, lip, flow = np.zeros((0, 2)), np.array([0.0, 1.0]), np.array([0.0])
    x_lip, y_lip = float(lip[0]), float(lip[1])
    x_min = min(-0.6, (corners[0, 0] if len(corners) else 0.0) - 0.6)

    def add(role, label, x, y):
        sketch.lines.append(SketchLine(role, label, np.asarray(x, float) * scale, np.asarray(y, float) * scale))

    # walls: ramps or cones, then the duct's inner wall to the face
    x_th = x_lip + DUCT_THROAT_AFTER_LIP
    x_face = x_lip + DUCT_FACE_AFTER_LIP
    h_th = inlet.throat_area_m2 / inlet.capture_area_m2
    h_face = inlet.face_area_m2 / inlet.capture_area_m2
    if axisymmetric and not has_layout:  # pitot: lips at +-1, duct walls to throat and face
        add("cowl", "cowl", [x_lip, x_th, x_face], [1.0, math.sqrt(h_th), math.sqrt(h_face)])
        add("cowl", "cowl (lower)", [x_lip, x_th, x_face], [-1.0, -math.sqrt(h_th), -math.sqrt(h_face)])
        add("throat", "throat", [x_th, x_th], [-math.sqrt(h_th), math.sqrt(h_th)])
        add("face", "engine face", [x_face, x_face], [-math.sqrt(h_face), math.sqrt(h_face)])
        surface_at_lip = -1.0
    else:
        wall_x = list(corners[:, 0]) + [x_lip]
        wall_y = list(corners[:, 1]) + [_surface_height(corners, flow, x_lip)]
        surface_at_lip = wall_y[-1]
        add("wall", "ramps" if not axisymmetric else "spike", wall_x, wall_y)
        y_th_wall = y_lip - (h_th if not axisymmetric else (1.0 - math.sqrt(max(0.0, 1.0 - h_th))))
        y_face_wall = y_lip - (h_face if not axisymmetric else (1.0 - math.sqrt(max(0.0, 1.0 - h_face))))
        add("wall", "duct wall", [x_lip, x_th, x_face], [surface_at_lip, y_th_wall, y_face_wall])
        add("cowl", "cowl", [x_lip, x_th, x_face], [y_lip, y_lip, y_lip])
        add("throat", "throat", [x_th, x_th], [y_th_wall, y_lip])
        add("face", "engine face", [x_face, x_face], [y_face_wall, y_lip])

    # oblique or conical shocks from each corner, at the computed wave angles
    betas = np.asarray(points.ramp_wave_angle_rad)[(slice(None),) + (index if isinstance(index, tuple) else (index,))] \
        if points.ramp_wave_angle_rad is not None and np.size(points.ramp_wave_angle_rad) else np.array([])
    last_attached = -1
    for k, beta in enumerate(np.atleast_1d(betas)):
        if not (m0 > 1.0 and math.isfinite(beta)) or k >= len(corners):
            break
        angle = float(flow[k] + beta)
        cx, cy = corners[k]
        length = (y_lip - cy) / math.sin(angle)
        add("shock", f"shock {k + 1}", [cx, cx + length * math.cos(angle)], [cy, cy + length * math.sin(angle)])
        sketch.shock_angles_deg[f"shock {k + 1}"] = math.degrees(angle)
        last_attached = k

    # terminal normal shock, or a bow shock ahead of the inlet
    if m0 > 1.0:
        spill = 0.0 if not (math.isfinite(mfr) and math.isfinite(mfr_max) and mfr_max > 0) else max(0.0, 1.0 - mfr / mfr_max)
        bottom = surface_at_lip
        if detached or (not has_layout and regime == SUBCRITICAL and spill > 0.0):
            x_nose = (corners[0, 0] if len(corners) and detached else x_lip) - 0.15 - 0.8 * spill
            x, y = _bow_shock(x_nose, 0.5 * (bottom + y_lip) if has_layout else 0.0, m0, 1.0)
            add("bow-shock", "bow shock", x, y)
            sketch.shock_angles_deg["bow shock (nose)"] = 90.0
        else:
            if regime == SUPERCRITICAL:
                x_ns, where = x_lip + 0.5 * DUCT_THROAT_AFTER_LIP + 0.3, "inside the duct (supercritical)"
            elif regime == CRITICAL or spill == 0.0:
                x_ns, where = x_lip, "at the lip (critical)"
            else:
                x_ns, where = x_lip - 0.15 - 0.8 * spill, "ahead of the lip (subcritical)"
            local = float(flow[last_attached + 1]) if has_layout else 0.0
            y_bottom = _surface_height(corners, flow, x_ns) if has_layout and x_ns <= x_lip else bottom
            if not has_layout:
                y_bottom = -1.0
            add("terminal-shock", f"terminal shock {where}", [x_ns, x_ns - (y_lip - y_bottom) * math.tan(local)],
                [y_bottom, y_lip])
            sketch.shock_angles_deg["terminal shock"] = math.degrees(local) + 90.0

    # captured stream tube
    if math.isfinite(mfr) and m0 > 0.0:
        captured = min(max(mfr, 0.0), 1.5)
        y0 = captured if not axisymmetric else math.sqrt(captured)
        if axisymmetric and not has_layout:
            add("stream-tube", "captured stream tube", [x_min, x_lip - 0.3, x_lip], [y0, y0, 1.0])
            add("stream-tube", "captured stream tube (lower)", [x_min, x_lip - 0.3, x_lip], [-y0, -y0, -1.0])
        else:
            # measured from the axis (spike) or from the extension of the first ramp's plane (2-D)
            add("stream-tube", "captured stream tube", [x_min, min(x_lip - 0.3, 0.0), x_lip], [y0, y0, y_lip])
    sketch.notes.append("duct length not to scale; "
                        + ("lip radius sqrt(A_c/pi)" if axisymmetric else "capture height sqrt(A_c) (square capture)"))
    return sketch
