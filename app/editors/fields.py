"""What the editors read from the schema (``engine_air.project.schema``): a field's display dimension, tooltip
and a value to show when the project gives none; the resource limits the editors state."""

from __future__ import annotations

from PySide6.QtWidgets import QScrollArea, QWidget

from engine_air.project import schema as S

from .widgets import UnitSpin

MAX_AREA = S.MAX_AREA_M2
MAX_FLOW = S.MAX_CORRECTED_FLOW_KG_S
MAX_TIP = S.MAX_TIP_SPEED_M_S
MIN_AXIS = S.MIN_AXIS_POINTS
MAX_AXIS = S.MAX_AXIS_POINTS
MAX_GRID = S.MAX_GRID_POINTS

_DIMENSIONS = {"m^2": "area", "kg/s": "flow", "m/s": "blade_speed", "m": "altitude", "K": "temperature_difference",
               "N": "force"}


def dimension(f) -> str:
    """The display-unit dimension of a schema field (``app.units``); "none" for plain numbers and degrees."""
    return _DIMENSIONS.get(f.unit, "none")


def tooltip(f) -> str:
    """A field's one-line description and what is allowed, from the schema."""
    text = f"{f.path}: {f.description}.\nAllowed: {f.allowed_text()}"
    if f.inlet_types:
        text += "\nInlet types: " + ", ".join(f.inlet_types)
    return text


def fallback(f) -> float:
    """A value to show for a key the project does not give: its default, else a point inside its range."""
    if isinstance(f.default, (int, float)) and not isinstance(f.default, bool):
        return float(f.default)
    lo = f.lo if f.lo is not None else 0.0
    hi = f.hi if f.hi is not None else lo + 1.0
    typical = {"ramp_angles_deg": 8.0, "shock_on_lip_mach": 2.0, "cone_half_angles_deg": 20.0,
               "auxiliary_door_mach_max": 0.3}
    return typical.get(f.key, (lo + hi) / 2.0)


def field_spin(f, dimension_name: str | None = None, suffix: str | None = None) -> UnitSpin:
    """A spin box for the schema field ``f``: range, open bounds, decimals, step and tooltip from the field."""
    lo = f.lo if f.lo is not None else -1e12
    hi = f.hi if f.hi is not None else 1e12
    s = UnitSpin(dimension_name or dimension(f), lo, hi, f.decimals if f.decimals is not None else 4,
                 f.step if f.step is not None else 0.01, f.lo_open, f.hi_open,
                 suffix=suffix if suffix is not None else ("°" if f.unit == "deg" else None))
    s.setToolTip(tooltip(f))
    return s


def scroll(widget: QWidget) -> QScrollArea:
    s = QScrollArea()
    s.setWidgetResizable(True)
    s.setWidget(widget)
    return s
