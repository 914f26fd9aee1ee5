"""Load, validate and save project files (TOML, SI units).

The layout is the project-file contract of the interfaces document. Loading
checks every rule and raises ``ProjectError`` (file, dotted key path, value,
what is allowed) at the first rule broken; unknown tables or keys are not an
error but are listed in ``Project.warnings``. Files are data only: they are
parsed with ``tomllib`` and nothing in them is ever executed.

Saving is atomic: the text goes to a temporary file beside the target, is
flushed to disk, and is then renamed over the target, so a crash or a full
disk never leaves half a file and the previous file survives a failed save.
"""

from __future__ import annotations

import math
import os
import re
import stat
import tempfile
import tomllib
from datetime import date, datetime, time

import tomli_w

from engine_air.envelope.polygon import polygon_area, polygon_crossing_edges, vertices_collinear
from engine_air.project.errors import ProjectError, ProjectSaveError
from engine_air.project.model import (
    REFERENCE_RECOVERY_NAME,
    Case,
    Envelope,
    Grid,
    Inlet,
    Limits,
    Project,
    Rating,
    Schedule,
)

MAX_FILE_BYTES = 1_048_576
"""Largest project file accepted, bytes (1 MiB)."""
MAX_AXIS_POINTS = 1001
"""Most grid points along one axis (Mach or altitude)."""
MIN_AXIS_POINTS = 2
"""Fewest grid points along one axis."""
MAX_GRID_POINTS = 250_000
"""Most grid points per case (mach_points x altitude_points)."""
MAX_CASES = 100
"""Most [[case]] tables in one file."""
MAX_CASE_POINTS = 2_000_000
"""Most grid points per case x cases evaluated together (each case-point keeps about 260 bytes:
8 cases of the largest grid, about 520 MB)."""
MAX_ENVELOPE_VERTICES = 1000
"""Most envelope polygon vertices (the crossing test is quadratic in this)."""
SUPPORTED_FORMATS = (1,)
"""Project-file format numbers this version reads and writes."""

MAX_AREA_M2 = 100.0
MAX_CORRECTED_FLOW_KG_S = 5000.0
MAX_TIP_SPEED_M_S = 1000.0
MAX_RAMPS = 3
MAX_RAMP_DEG = 25.0
MAX_TOTAL_RAMP_DEG = 40.0

_TOP_KEYS = ("project", "limits", "inlet", "engine", "envelope", "grid", "case")
_PROJECT_KEYS = ("format", "title", "notes")
_LIMIT_KEYS = ("face_mach_max", "throat_mach_max", "recovery_min", "stable_flow_fraction",
               "relative_tip_mach_max", "spillage_fraction_max", "started_required", "installation_loss_max")
_INLET_KEYS = ("type", "capture_area_m2", "throat_area_m2", "face_area_m2", "duct_loss_coefficient",
               "lip_suction_factor", "ramp_angles_deg", "shock_on_lip_mach", "internal_recovery_factor",
               "schedule", "cone_half_angles_deg") + (
    # airflow management (method section 12)
    "supersonic_lip_suction_factor", "bleed_fraction", "bleed_exit_velocity_ratio", "bypass_area_m2",
    "bypass_discharge_coefficient", "bypass_exit_velocity_ratio", "auxiliary_inlet_area_m2",
    "auxiliary_door_mach_max", "auxiliary_loss_coefficient")
_AIRFLOW_NUMBERS = (  # key, lo, hi, lo_open, hi_open, default
    ("supersonic_lip_suction_factor", 0.0, 1.0, False, False, 0.0),
    ("bleed_fraction", 0.0, 0.5, False, False, 0.0),
    ("bleed_exit_velocity_ratio", 0.0, 1.0, False, False, 0.0),
    ("bypass_area_m2", 0.0, MAX_AREA_M2, False, False, 0.0),
    ("bypass_discharge_coefficient", 0.0, 1.0, True, False, 0.9),
    ("bypass_exit_velocity_ratio", 0.0, 1.0, False, False, 0.0),
    ("auxiliary_inlet_area_m2", 0.0, MAX_AREA_M2, False, False, 0.0),
    ("auxiliary_door_mach_max", 0.0, 1.0, True, False, None),
    ("auxiliary_loss_coefficient", 0.0, 5.0, False, False, 0.0),
)
_RAMP_KEYS = ("ramp_angles_deg", "shock_on_lip_mach")
_RAMP_TYPES = ("external-ramp", "mixed-compression")
MAX_CONES = 2
MAX_CONE_DEG = 40.0
_SCHEDULE_KEYS = ("mach", "throat_area_m2", "shock_on_lip_mach", "ramp_angles_deg", "bleed_fraction")
_RATING_KEYS = ("name", "theta", "corrected_flow_kg_s", "fan_tip_speed_m_s", "corrected_tip_speed_m_s",
                "thrust_mach", "thrust_altitude_m", "net_thrust_n", "thrust_reference_recovery",
                "recovery_thrust_exchange")
_THRUST_KEYS = ("thrust_mach", "thrust_altitude_m", "net_thrust_n", "thrust_reference_recovery",
                "recovery_thrust_exchange")
_ENVELOPE_KEYS = ("mach", "altitude_m")
_GRID_KEYS = ("mach_points", "altitude_points")
_CASE_KEYS = ("name", "rating", "isa_offset_K", "mach_range", "altitude_range_m")

_MISSING = object()

MAX_KEY_PARTS = 64
"""Most parts of one dotted key or table name (``a.b.c`` has 3). ``tomllib`` spends time and memory
quadratic in this number: a 500 kB key of 100 000 parts would take gigabytes."""

_KEY_PART = r"""(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*')"""
_LONG_DOTTED_KEY = re.compile(r"""(?<![A-Za-z0-9_\-."'\\])""" + _KEY_PART
                              + rf"(?:[ \t]*\.[ \t]*{_KEY_PART}){{{MAX_KEY_PARTS}}}")
"""A run of more than MAX_KEY_PARTS dot-joined key parts (bare or quoted); linear-time to search."""


def _kind(value: object) -> str:
    """Plain-words name of a TOML value's type, for messages."""
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, (datetime, date, time)):
        return "a date/time"
    return type(value).__name__


def _g(x: float) -> str:
    return f"{x:g}"


class _Reader:
    """Validation state for one file: its path and the warnings met so far."""

    def __init__(self, path: str | os.PathLike | None) -> None:
        self.path = None if path is None else os.fspath(path)
        self.warnings: list[str] = []

    # -- reporting -----------------------------------------------------------
    def fail(self, key: str, value: object, allowed: str):
        raise ProjectError(self.path, key, value, allowed)

    def warn(self, key: str, text: str) -> None:
        prefix = f"{self.path}: " if self.path is not None else ""
        self.warnings.append(f"{prefix}{key}: {text}")

    def check_known(self, table: dict, keypath: str, known: tuple[str, ...]) -> None:
        for name in table:
            if name not in known:
                self.warn(f"{keypath}.{name}" if keypath else str(name), "unknown key, ignored")

    # -- structure -----------------------------------------------------------
    def table(self, parent: dict, name: str, keypath: str, required: bool = True,
              missing: str | None = None) -> dict | None:
        value = parent.get(name, _MISSING)
        if value is _MISSING:
            if required:
                self.fail(keypath, None, "missing; " + (missing or f"the file needs the table [{keypath}]"))
            return None
        if not isinstance(value, dict):
            self.fail(keypath, value, f"must be a table [{keypath}], not {_kind(value)}")
        return value

    def table_array(self, parent: dict, name: str, keypath: str, header: str) -> list[dict]:
        value = parent.get(name, _MISSING)
        if value is _MISSING:
            self.fail(keypath, None, f"missing; at least one {header} table is required")
        if not isinstance(value, (list, tuple)):
            self.fail(keypath, value, f"must be a list of tables written {header}, not {_kind(value)}")
        if len(value) == 0:
            self.fail(keypath, list(value), f"at least one {header} table is required")
        for i, item in enumerate(value):
            if not isinstance(item, dict):
                self.fail(f"{keypath}[{i}]", item, f"must be a table written {header}, not {_kind(item)}")
        return list(value)

    # -- scalars -------------------------------------------------------------
    def number(self, table: dict, name: str, keypath: str, lo: float | None = None, hi: float | None = None,
               lo_open: bool = True, hi_open: bool = False, unit: str = "", default: object = _MISSING):
        """A finite float within the given bounds; ``default`` when absent (required if no default)."""
        value = table.get(name, _MISSING)
        if value is _MISSING:
            if default is _MISSING:
                self.fail(keypath, None, "missing; required: " + self.range_text(name, lo, hi, lo_open, hi_open, unit))
            return default
        return self.check_number(value, keypath, name, lo, hi, lo_open, hi_open, unit)

    @staticmethod
    def range_text(name: str, lo, hi, lo_open: bool, hi_open: bool, unit: str) -> str:
        text = "a finite number"
        if lo is not None or hi is not None:
            text += " with "
            if lo is not None:
                text += f"{_g(lo)} {'<' if lo_open else '<='} "
            text += name
            if hi is not None:
                text += f" {'<' if hi_open else '<='} {_g(hi)}"
        if unit:
            text += f" ({unit})"
        return text

    def check_number(self, value: object, keypath: str, name: str, lo=None, hi=None,
                     lo_open: bool = True, hi_open: bool = False, unit: str = "") -> float:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(keypath, value, f"must be a number, not {_kind(value)}")
        try:
            x = float(value)
        except OverflowError:
            x = math.inf
        if not math.isfinite(x):
            self.fail(keypath, value, "must be a finite number")
        too_low = lo is not None and (x <= lo if lo_open else x < lo)
        too_high = hi is not None and (x >= hi if hi_open else x > hi)
        if too_low or too_high:
            self.fail(keypath, value, "must be " + self.range_text(name, lo, hi, lo_open, hi_open, unit))
        return x

    def integer(self, table: dict, name: str, keypath: str, lo: int, hi: int, default: int) -> int:
        value = table.get(name, _MISSING)
        if value is _MISSING:
            return default
        if isinstance(value, bool) or not isinstance(value, int):
            self.fail(keypath, value, f"must be a whole number from {lo} to {hi}, not {_kind(value)}")
        if not lo <= value <= hi:
            self.fail(keypath, value, f"must be a whole number from {lo} to {hi}")
        return int(value)

    def string(self, table: dict, name: str, keypath: str, default: object = _MISSING,
               non_empty: bool = False) -> str:
        value = table.get(name, _MISSING)
        if value is _MISSING:
            if default is _MISSING:
                self.fail(keypath, None, "missing; required: " + ("non-empty text" if non_empty else "text"))
            return default
        if not isinstance(value, str):
            self.fail(keypath, value, f"must be text (in quotes), not {_kind(value)}")
        if non_empty and not value.strip():
            self.fail(keypath, value, "must be non-empty text")
        return value

    def number_list(self, table: dict, name: str, keypath: str, min_len: int, max_len: int | None,
                    lo=None, hi=None, lo_open: bool = True, hi_open: bool = False, unit: str = "",
                    required: bool = True) -> tuple[float, ...] | None:
        value = table.get(name, _MISSING)
        if value is _MISSING:
            if required:
                self.fail(keypath, None, "missing; required: a list of numbers in square brackets")
            return None
        if not isinstance(value, (list, tuple)):
            self.fail(keypath, value, f"must be a list of numbers in square brackets, not {_kind(value)}")
        if len(value) < min_len or (max_len is not None and len(value) > max_len):
            size = f"{min_len} to {max_len}" if max_len is not None else f"at least {min_len}"
            noun = "entry" if (max_len or min_len) == 1 else "entries"
            self.fail(keypath, list(value), f"must have {size} {noun}; it has {len(value)}")
        return tuple(self.check_number(v, f"{keypath}[{i}]", name, lo, hi, lo_open, hi_open, unit)
                     for i, v in enumerate(value))


# -- sections ------------------------------------------------------------------

def _read_header(r: _Reader, data: dict) -> tuple[int, str, str]:
    meta = r.table(data, "project", "project")
    r.check_known(meta, "project", _PROJECT_KEYS)
    supported = ", ".join(str(f) for f in SUPPORTED_FORMATS)
    fmt = meta.get("format", _MISSING)
    if fmt is _MISSING:
        r.fail("project.format", None, f"missing; required: the file-format number (this program reads format {supported})")
    if isinstance(fmt, bool) or not isinstance(fmt, int):
        r.fail("project.format", fmt, f"must be a whole number (this program reads format {supported})")
    if fmt not in SUPPORTED_FORMATS:
        if fmt > max(SUPPORTED_FORMATS):
            why = f"this program reads format {supported}; the file says format {fmt} \u2014 it was written by a newer version"
        else:
            why = f"this program reads format {supported}; format {fmt} is not a valid format number"
        r.fail("project.format", fmt, why)
    title = r.string(meta, "title", "project.title", default="")
    notes = r.string(meta, "notes", "project.notes", default="")
    return fmt, title, notes


def _read_limits(r: _Reader, data: dict) -> Limits:
    t = r.table(data, "limits", "limits")
    r.check_known(t, "limits", _LIMIT_KEYS)
    recovery = t.get("recovery_min", None)
    if recovery is not None:
        if isinstance(recovery, str):
            if recovery.strip().lower() != REFERENCE_RECOVERY_NAME:
                r.fail("limits.recovery_min", recovery,
                       f"must be a number with 0 < recovery_min <= 1 or the name \"{REFERENCE_RECOVERY_NAME}\"")
            recovery = REFERENCE_RECOVERY_NAME
        elif isinstance(recovery, bool) or not isinstance(recovery, (int, float)):
            r.fail("limits.recovery_min", recovery,
                   f"must be a number with 0 < recovery_min <= 1 or the name \"{REFERENCE_RECOVERY_NAME}\", "
                   f"not {_kind(recovery)}")
        else:
            recovery = r.check_number(recovery, "limits.recovery_min", "recovery_min", 0.0, 1.0)
    started_required = t.get("started_required", None)
    if started_required is not None and not isinstance(started_required, bool):
        r.fail("limits.started_required", started_required, f"must be true or false, not {_kind(started_required)}")
    return Limits(
        face_mach_max=r.number(t, "face_mach_max", "limits.face_mach_max", 0.0, 1.0, hi_open=True),
        throat_mach_max=r.number(t, "throat_mach_max", "limits.throat_mach_max", 0.0, 1.0, default=None),
        recovery_min=recovery,
        stable_flow_fraction=r.number(t, "stable_flow_fraction", "limits.stable_flow_fraction", 0.0, 1.0,
                                      hi_open=True, default=None),
        relative_tip_mach_max=r.number(t, "relative_tip_mach_max", "limits.relative_tip_mach_max", 0.0, 3.0,
                                       hi_open=True, default=None),
        spillage_fraction_max=r.number(t, "spillage_fraction_max", "limits.spillage_fraction_max", 0.0, 1.0,
                                       lo_open=False, hi_open=True, default=None),
        started_required=started_required,
        installation_loss_max=r.number(t, "installation_loss_max", "limits.installation_loss_max", -1.0, 1.0,
                                       hi_open=True, default=None),
    )


def _read_inlet(r: _Reader, data: dict) -> Inlet:
    t = r.table(data, "inlet", "inlet")
    r.check_known(t, "inlet", _INLET_KEYS)
    kind = r.string(t, "type", "inlet.type")
    from engine_air.inlets.registry import INLET_TYPES as known_types  # the registry is authoritative

    if kind not in known_types:
        r.fail("inlet.type", kind, "must be one of " + ", ".join(f'"{k}"' for k in known_types))

    def area(name: str) -> float:
        return r.number(t, name, f"inlet.{name}", 0.0, MAX_AREA_M2, unit="m^2")

    capture, throat, face = area("capture_area_m2"), area("throat_area_m2"), area("face_area_m2")
    if throat > capture:
        r.fail("inlet.throat_area_m2", t["throat_area_m2"],
               f"must not exceed capture_area_m2 = {_g(capture)} m^2")
    duct_k = r.number(t, "duct_loss_coefficient", "inlet.duct_loss_coefficient", 0.0, 2.0, lo_open=False,
                      default=0.0)
    suction = r.number(t, "lip_suction_factor", "inlet.lip_suction_factor", 0.0, 1.0, lo_open=False, default=0.0)
    ramps: tuple[float, ...] = ()
    cones: tuple[float, ...] = ()
    lip_mach = None
    if kind in _RAMP_TYPES:
        ramps = r.number_list(t, "ramp_angles_deg", "inlet.ramp_angles_deg", 1, MAX_RAMPS, 0.0, MAX_RAMP_DEG,
                              unit="deg")
        if sum(ramps) > MAX_TOTAL_RAMP_DEG:
            r.fail("inlet.ramp_angles_deg", list(t["ramp_angles_deg"]),
                   f"total deflection {_g(sum(ramps))} deg exceeds {_g(MAX_TOTAL_RAMP_DEG)} deg")
        lip_mach = r.number(t, "shock_on_lip_mach", "inlet.shock_on_lip_mach", 1.0, 5.0)
        for name in ("cone_half_angles_deg",):
            if name in t:
                r.warn(f"inlet.{name}", f'ignored: it applies to type = "axisymmetric-spike" only, this inlet is "{kind}"')
    elif kind == "axisymmetric-spike":
        cones = r.number_list(t, "cone_half_angles_deg", "inlet.cone_half_angles_deg", 1, MAX_CONES, 0.0,
                              MAX_CONE_DEG, unit="deg")
        lip_mach = r.number(t, "shock_on_lip_mach", "inlet.shock_on_lip_mach", 1.0, 5.0)
        if "ramp_angles_deg" in t:
            r.warn("inlet.ramp_angles_deg", f'ignored: it applies to type = "external-ramp" only, this inlet is "{kind}"')
    else:
        for name in _RAMP_KEYS:
            if name in t:
                r.warn(f"inlet.{name}", f'ignored: it applies to ramp inlets only, this inlet is "{kind}"')
        if "cone_half_angles_deg" in t:
            r.warn("inlet.cone_half_angles_deg",
                   f'ignored: it applies to type = "axisymmetric-spike" only, this inlet is "{kind}"')
    eta_int = 1.0
    if kind == "mixed-compression":
        eta_int = r.number(t, "internal_recovery_factor", "inlet.internal_recovery_factor", 0.0, 1.0, default=1.0)
    elif "internal_recovery_factor" in t:
        r.warn("inlet.internal_recovery_factor", f'ignored: it applies to type = "mixed-compression" only, '
               f'this inlet is "{kind}"')
    airflow = {key: r.number(t, key, f"inlet.{key}", lo, hi, lo_open=lo_o, hi_open=hi_o, default=d)
               for key, lo, hi, lo_o, hi_o, d in _AIRFLOW_NUMBERS}
    if airflow["auxiliary_inlet_area_m2"] > 0.0 and airflow["auxiliary_door_mach_max"] is None:
        r.fail("inlet.auxiliary_door_mach_max", None,
               "missing; required with auxiliary_inlet_area_m2: the flight Mach number below which the doors open")
    schedule = _read_schedule(r, t, kind, capture, ramps)
    return Inlet(type=kind, capture_area_m2=capture, throat_area_m2=throat, face_area_m2=face,
                 duct_loss_coefficient=duct_k, lip_suction_factor=suction, ramp_angles_deg=ramps,
                 shock_on_lip_mach=lip_mach, cone_half_angles_deg=cones, internal_recovery_factor=eta_int,
                 schedule=schedule, **airflow)


def _read_schedule(r: _Reader, inlet_table: dict, kind: str, capture: float, ramps: tuple[float, ...]):
    """``[inlet.schedule]`` (method section 12): lists as long as ``mach`` (strictly increasing)."""
    t = r.table(inlet_table, "schedule", "inlet.schedule", required=False)
    if t is None:
        return None
    kp = "inlet.schedule"
    r.check_known(t, kp, _SCHEDULE_KEYS)
    mach = r.number_list(t, "mach", f"{kp}.mach", 1, 64, 0.0, 6.0, lo_open=False)
    for k in range(1, len(mach)):
        if mach[k] <= mach[k - 1]:
            r.fail(f"{kp}.mach[{k}]", t["mach"][k], f"must be greater than mach[{k - 1}] = {_g(mach[k - 1])} "
                                                    "(the schedule's Mach numbers must increase strictly)")
    n = len(mach)

    def same_length(name, values):
        if values is not None and len(values) != n:
            r.fail(f"{kp}.{name}", list(t[name]), f"must have one entry per schedule mach value ({n}); "
                                                 f"it has {len(values)}")
        return values

    throat = same_length("throat_area_m2", r.number_list(t, "throat_area_m2", f"{kp}.throat_area_m2", 1, None,
                                                         0.0, capture, unit="m^2, at most capture_area_m2",
                                                         required=False))
    ramp_kind = kind in _RAMP_TYPES
    lip = None
    rows = None
    if ramp_kind:
        lip = same_length("shock_on_lip_mach", r.number_list(t, "shock_on_lip_mach", f"{kp}.shock_on_lip_mach", 1,
                                                             None, 1.0, 5.0, required=False))
        raw = t.get("ramp_angles_deg", _MISSING)
        if raw is not _MISSING:
            if not isinstance(raw, (list, tuple)):
                r.fail(f"{kp}.ramp_angles_deg", raw, "must be a list of ramp-angle lists, one per schedule mach value")
            rows = same_length("ramp_angles_deg", tuple(
                r.number_list({"row": row}, "row", f"{kp}.ramp_angles_deg[{i}]", len(ramps), len(ramps), 0.0,
                              MAX_RAMP_DEG, unit=f"deg, {len(ramps)} ramps as inlet.ramp_angles_deg")
                for i, row in enumerate(raw)))
    else:
        for name in ("shock_on_lip_mach", "ramp_angles_deg"):
            if name in t:
                r.warn(f"{kp}.{name}", f'ignored: this inlet is "{kind}"')
    bleed = same_length("bleed_fraction", r.number_list(t, "bleed_fraction", f"{kp}.bleed_fraction", 1, None,
                                                        0.0, 0.5, lo_open=False, required=False))
    return Schedule(mach=mach, throat_area_m2=throat, shock_on_lip_mach=lip, ramp_angles_deg=rows,
                    bleed_fraction=bleed)


def _read_ratings(r: _Reader, data: dict) -> tuple[Rating, ...]:
    engine = r.table(data, "engine", "engine", missing="at least one [[engine.rating]] table is required")
    r.check_known(engine, "engine", ("rating",))
    items = r.table_array(engine, "rating", "engine.rating", "[[engine.rating]]")
    ratings: list[Rating] = []
    seen: dict[str, int] = {}
    for i, t in enumerate(items):
        kp = f"engine.rating[{i}]"
        r.check_known(t, kp, _RATING_KEYS)
        name = r.string(t, "name", f"{kp}.name", non_empty=True)
        if name in seen:
            r.fail(f"{kp}.name", name, f"must be unique: engine.rating[{seen[name]}] has the same name")
        seen[name] = i
        theta = r.number_list(t, "theta", f"{kp}.theta", 1, None, 0.3, 3.0, hi_open=True)
        for k in range(1, len(theta)):
            if theta[k] <= theta[k - 1]:
                r.fail(f"{kp}.theta[{k}]", t["theta"][k],
                       f"must be greater than theta[{k - 1}] = {_g(theta[k - 1])} (theta must increase strictly)")
        flow = r.number_list(t, "corrected_flow_kg_s", f"{kp}.corrected_flow_kg_s", 1, None, 0.0,
                             MAX_CORRECTED_FLOW_KG_S, unit="kg/s")
        if len(flow) != len(theta):
            r.fail(f"{kp}.corrected_flow_kg_s", list(t["corrected_flow_kg_s"]),
                   f"must have one entry per theta value ({len(theta)}); it has {len(flow)}")
        tip = r.number(t, "fan_tip_speed_m_s", f"{kp}.fan_tip_speed_m_s", 0.0, MAX_TIP_SPEED_M_S, unit="m/s",
                       default=None)
        corrected_tip = r.number_list(t, "corrected_tip_speed_m_s", f"{kp}.corrected_tip_speed_m_s", len(theta),
                                      len(theta), 0.0, MAX_TIP_SPEED_M_S, unit="m/s, one per theta value",
                                      required=False)
        if tip is not None and corrected_tip is not None:
            r.fail(f"{kp}.corrected_tip_speed_m_s", list(t["corrected_tip_speed_m_s"]),
                   "give either fan_tip_speed_m_s (physical) or corrected_tip_speed_m_s (against theta), not both")
        ratings.append(Rating(name=name, theta=theta, corrected_flow_kg_s=flow, fan_tip_speed_m_s=tip,
                              corrected_tip_speed_m_s=corrected_tip, **_read_thrust(r, t, kp)))
    return tuple(ratings)


def _read_thrust(r: _Reader, t: dict, kp: str) -> dict:
    """The optional thrust table of a rating (method section 13): all of its keys or none."""
    given = [k for k in _THRUST_KEYS if k in t]
    if not given:
        return {}
    for k in _THRUST_KEYS:
        if k not in t:
            r.fail(f"{kp}.{k}", None, "missing; a thrust table needs thrust_mach, thrust_altitude_m, net_thrust_n, "
                                      "thrust_reference_recovery and recovery_thrust_exchange together")
    out = {}
    for name, lo, hi in (("thrust_mach", 0.0, 6.0), ("thrust_altitude_m", -5000.0, 84000.0)):
        axis = r.number_list(t, name, f"{kp}.{name}", 1, 200, lo, hi, lo_open=False)
        for k in range(1, len(axis)):
            if axis[k] <= axis[k - 1]:
                r.fail(f"{kp}.{name}[{k}]", t[name][k], f"must be greater than {name}[{k - 1}] (increase strictly)")
        out[name] = axis
    raw = t["net_thrust_n"]
    rows_needed, cols = len(out["thrust_altitude_m"]), len(out["thrust_mach"])
    if not isinstance(raw, (list, tuple)) or len(raw) != rows_needed:
        r.fail(f"{kp}.net_thrust_n", raw, f"must be a list of {rows_needed} rows (one per thrust_altitude_m value), "
                                          f"each of {cols} numbers (one per thrust_mach value)")
    out["net_thrust_n"] = tuple(r.number_list({"row": row}, "row", f"{kp}.net_thrust_n[{i}]", cols, cols, 0.0, 1e7,
                                              unit="N")
                                for i, row in enumerate(raw))
    ref = t["thrust_reference_recovery"]
    if isinstance(ref, str):
        if ref.strip().lower() != REFERENCE_RECOVERY_NAME:
            r.fail(f"{kp}.thrust_reference_recovery", ref,
                   f"must be a number with 0 < value <= 1 or the name \"{REFERENCE_RECOVERY_NAME}\"")
        out["thrust_reference_recovery"] = REFERENCE_RECOVERY_NAME
    else:
        out["thrust_reference_recovery"] = r.check_number(ref, f"{kp}.thrust_reference_recovery",
                                                          "thrust_reference_recovery", 0.0, 1.0)
    out["recovery_thrust_exchange"] = r.number(t, "recovery_thrust_exchange", f"{kp}.recovery_thrust_exchange",
                                               0.0, 10.0, lo_open=False)
    return out


def _read_range(r: _Reader, t: dict, name: str, kp: str, lo: float, hi: float):
    """An optional ``[lo, hi]`` pair with lo <= hi (bounds included)."""
    pair = r.number_list(t, name, f"{kp}.{name}", 2, 2, lo, hi, lo_open=False, required=False)
    if pair is not None and pair[1] < pair[0]:
        r.fail(f"{kp}.{name}", list(t[name]), "must be [low, high] with low <= high")
    return pair


def _read_envelope(r: _Reader, data: dict) -> Envelope:
    t = r.table(data, "envelope", "envelope")
    r.check_known(t, "envelope", _ENVELOPE_KEYS)
    n_max = MAX_ENVELOPE_VERTICES
    mach = r.number_list(t, "mach", "envelope.mach", 3, n_max, 0.0, 6.0, lo_open=False)
    alt = r.number_list(t, "altitude_m", "envelope.altitude_m", 3, n_max, -5000.0, 84000.0, lo_open=False,
                        unit="m, geopotential")
    if len(alt) != len(mach):
        r.fail("envelope.altitude_m", list(t["altitude_m"]),
               f"must have one entry per envelope.mach value ({len(mach)}); it has {len(alt)}")
    if vertices_collinear(mach, alt):
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               "the vertices all lie on one line, so the polygon encloses no area")
    n = len(mach)
    for i in range(n):
        j = (i + 1) % n
        if mach[i] == mach[j] and alt[i] == alt[j]:
            r.fail("envelope", (mach[j], alt[j]),
                   f"vertex {j} repeats vertex {i}; neighbouring vertices must differ "
                   "(the polygon closes itself: do not repeat the first vertex at the end)")
    crossing = polygon_crossing_edges(mach, alt)
    if crossing is not None:
        a, b = crossing
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               f"the polygon crosses itself (edge {a}-{(a + 1) % n} meets edge {b}-{(b + 1) % n}); "
               "list the vertices in order around the boundary")
    if polygon_area(mach, alt) <= 1e-9:
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               "the polygon encloses no area")
    return Envelope(mach=mach, altitude_m=alt)


def _read_grid(r: _Reader, data: dict) -> Grid:
    t = r.table(data, "grid", "grid", required=False)
    if t is None:
        return Grid()
    r.check_known(t, "grid", _GRID_KEYS)
    default = Grid()
    m = r.integer(t, "mach_points", "grid.mach_points", MIN_AXIS_POINTS, MAX_AXIS_POINTS, default.mach_points)
    a = r.integer(t, "altitude_points", "grid.altitude_points", MIN_AXIS_POINTS, MAX_AXIS_POINTS,
                  default.altitude_points)
    if m * a > MAX_GRID_POINTS:
        r.fail("grid", m * a,
               f"mach_points x altitude_points = {m} x {a} = {m * a} points; at most {MAX_GRID_POINTS} per case "
               "are allowed, because every case keeps a few dozen arrays of that size in memory")
    return Grid(mach_points=m, altitude_points=a)


def _read_cases(r: _Reader, data: dict, ratings: tuple[Rating, ...], grid: Grid) -> tuple[Case, ...]:
    items = r.table_array(data, "case", "case", "[[case]]")
    if len(items) > MAX_CASES:
        r.fail("case", len(items), f"the file has {len(items)} [[case]] tables; at most {MAX_CASES} are allowed")
    points = grid.mach_points * grid.altitude_points
    if points * len(items) > MAX_CASE_POINTS:
        r.fail("case", len(items),
               f"{len(items)} cases x {points} grid points = {points * len(items)} case-points; at most "
               f"{MAX_CASE_POINTS} are allowed, because every case keeps a few dozen arrays of the grid's size in "
               "memory: use fewer cases or a coarser [grid]")
    names = [x.name for x in ratings]
    cases: list[Case] = []
    seen: dict[str, int] = {}
    for i, t in enumerate(items):
        kp = f"case[{i}]"
        r.check_known(t, kp, _CASE_KEYS)
        name = r.string(t, "name", f"{kp}.name", non_empty=True)
        if name in seen:
            r.fail(f"{kp}.name", name, f"must be unique: case[{seen[name]}] has the same name")
        seen[name] = i
        rating = r.string(t, "rating", f"{kp}.rating")
        if rating not in names:
            r.fail(f"{kp}.rating", rating, "must name one of the engine ratings: " + ", ".join(repr(x) for x in names))
        offset = r.number(t, "isa_offset_K", f"{kp}.isa_offset_K", -100.0, 100.0, lo_open=False, unit="K",
                          default=0.0)
        cases.append(Case(name=name, rating=rating, isa_offset_K=offset,
                          mach_range=_read_range(r, t, "mach_range", kp, 0.0, 6.0),
                          altitude_range_m=_read_range(r, t, "altitude_range_m", kp, -5000.0, 84852.0)))
    return tuple(cases)


def _check_physics(project: Project, path: str | os.PathLike | None) -> None:
    """Design checks of the inlet's own type (e.g. ramp shocks attached at the shock-on-lip Mach),
    raised as the first ``ProjectError``."""
    from engine_air.inlets.registry import inlet_type

    from engine_air.inlets.schedule import inlet_at

    kind = inlet_type(project.inlet.type)
    for key, value, allowed in kind.check_design(project.inlet):
        raise ProjectError(path, key, value, allowed)
    schedule = project.inlet.schedule
    if schedule is not None and not getattr(kind, "handles_schedule", False):
        for i, m in enumerate(schedule.mach):  # each scheduled geometry as a fixed one (method section 12)
            for key, value, allowed in kind.check_design(inlet_at(project.inlet, m)):
                raise ProjectError(path, f"inlet.schedule (row {i}, mach {m:g}): {key}", value, allowed)


# -- public API ----------------------------------------------------------------

def project_from_dict(data: dict, path: str | os.PathLike | None = None) -> Project:
    """Validate parsed project data (the dict ``tomllib`` gives) and build a ``Project``.

    ``path`` names the source file in messages and warnings. Raises
    ``ProjectError`` at the first broken rule; unknown keys become warnings
    in ``Project.warnings``.
    """
    r = _Reader(path)
    if not isinstance(data, dict):
        r.fail("(file)", data, f"must be a table of project tables, not {_kind(data)}")
    for name in data:
        if name not in _TOP_KEYS:
            r.warn(str(name), "unknown key, ignored")
    fmt, title, notes = _read_header(r, data)
    limits = _read_limits(r, data)
    inlet = _read_inlet(r, data)
    ratings = _read_ratings(r, data)
    envelope = _read_envelope(r, data)
    grid = _read_grid(r, data)
    cases = _read_cases(r, data, ratings, grid)
    if limits.relative_tip_mach_max is not None and all(x.fan_tip_speed_m_s is None for x in ratings):
        r.warn("limits.relative_tip_mach_max", "no rating gives fan_tip_speed_m_s, so this limit cannot be checked")
    project = Project(limits=limits, inlet=inlet, ratings=ratings, envelope=envelope, grid=grid, cases=cases,
                      title=title, notes=notes, format=fmt, warnings=tuple(r.warnings))
    _check_physics(project, r.path)
    return project


def load_project(path: str | os.PathLike) -> Project:
    """Read, parse and validate the project file at ``path``.

    Raises ``ProjectError`` (key ``"(file)"`` for problems with the file as a
    whole) when the file cannot be read, exceeds ``MAX_FILE_BYTES``, is not
    UTF-8 text, is not valid TOML, or breaks any project rule.
    """
    p = os.fspath(path)
    limit = f"project files may be at most {MAX_FILE_BYTES} bytes (1 MiB)"
    try:
        info = os.stat(p)
        if stat.S_ISDIR(info.st_mode):
            raise ProjectError(p, "(file)", None, "is a folder, not a project file")
        if not stat.S_ISREG(info.st_mode):
            raise ProjectError(p, "(file)", None, "is not a regular file")
        if info.st_size > MAX_FILE_BYTES:
            raise ProjectError(p, "(file)", info.st_size, f"the file has {info.st_size} bytes; {limit}")
        with open(p, "rb") as f:
            raw = f.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ProjectError(p, "(file)", None, f"cannot be read: {exc.strerror or exc}") from exc
    if len(raw) > MAX_FILE_BYTES:
        raise ProjectError(p, "(file)", None, f"the file has more than {MAX_FILE_BYTES} bytes; {limit}")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise ProjectError(p, "(file)", None, f"is not UTF-8 text: byte 0x{raw[exc.start]:02x} on line {line} "
                                              "cannot be decoded; save the file as UTF-8") from exc
    long_key = _LONG_DOTTED_KEY.search(text)
    if long_key is not None:
        line = text.count("\n", 0, long_key.start()) + 1
        raise ProjectError(p, "(file)", None, f"line {line} has a dotted key or table name of more than "
                                              f"{MAX_KEY_PARTS} parts; keys may be nested at most {MAX_KEY_PARTS} deep")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ProjectError(p, "(file)", None, f"is not valid TOML: {exc}") from exc
    except RecursionError as exc:
        raise ProjectError(p, "(file)", None, "is not a usable project file: values are nested too deeply") from exc
    return project_from_dict(data, p)


def project_to_dict(project: Project) -> dict:
    """The project as a plain dict in the file layout (optional keys that are None left out)."""
    meta: dict = {"format": project.format}
    if project.title:
        meta["title"] = project.title
    if project.notes:
        meta["notes"] = project.notes
    lim = project.limits
    limits = {name: getattr(lim, name) for name in _LIMIT_KEYS if getattr(lim, name) is not None}
    inl = project.inlet
    inlet: dict = {
        "type": inl.type,
        "capture_area_m2": inl.capture_area_m2,
        "throat_area_m2": inl.throat_area_m2,
        "face_area_m2": inl.face_area_m2,
        "duct_loss_coefficient": inl.duct_loss_coefficient,
        "lip_suction_factor": inl.lip_suction_factor,
    }
    if inl.type in _RAMP_TYPES:
        inlet["ramp_angles_deg"] = list(inl.ramp_angles_deg)
        if inl.shock_on_lip_mach is not None:
            inlet["shock_on_lip_mach"] = inl.shock_on_lip_mach
    if inl.type == "axisymmetric-spike":
        inlet["cone_half_angles_deg"] = list(inl.cone_half_angles_deg)
        if inl.shock_on_lip_mach is not None:
            inlet["shock_on_lip_mach"] = inl.shock_on_lip_mach
    if inl.type == "mixed-compression":
        inlet["internal_recovery_factor"] = inl.internal_recovery_factor
    for key, _lo, _hi, _a, _b, default in _AIRFLOW_NUMBERS:
        if getattr(inl, key) != default:
            inlet[key] = getattr(inl, key)
    if inl.schedule is not None:
        sched = {"mach": list(inl.schedule.mach)}
        for key in _SCHEDULE_KEYS[1:]:
            value = getattr(inl.schedule, key)
            if value is not None:
                sched[key] = [list(v) for v in value] if key == "ramp_angles_deg" else list(value)
        inlet["schedule"] = sched
    ratings = []
    for x in project.ratings:
        item: dict = {"name": x.name, "theta": list(x.theta), "corrected_flow_kg_s": list(x.corrected_flow_kg_s)}
        if x.fan_tip_speed_m_s is not None:
            item["fan_tip_speed_m_s"] = x.fan_tip_speed_m_s
        if x.corrected_tip_speed_m_s is not None:
            item["corrected_tip_speed_m_s"] = list(x.corrected_tip_speed_m_s)
        for key in _THRUST_KEYS:
            value = getattr(x, key)
            if value is not None:
                item[key] = [list(v) for v in value] if key == "net_thrust_n" else (
                    list(value) if isinstance(value, tuple) else value)
        ratings.append(item)
    return {
        "project": meta,
        "limits": limits,
        "inlet": inlet,
        "engine": {"rating": ratings},
        "envelope": {"mach": list(project.envelope.mach), "altitude_m": list(project.envelope.altitude_m)},
        "grid": {"mach_points": project.grid.mach_points, "altitude_points": project.grid.altitude_points},
        "case": [_case_dict(c) for c in project.cases],
    }


def _case_dict(c: Case) -> dict:
    item = {"name": c.name, "rating": c.rating, "isa_offset_K": c.isa_offset_K}
    if c.mach_range is not None:
        item["mach_range"] = list(c.mach_range)
    if c.altitude_range_m is not None:
        item["altitude_range_m"] = list(c.altitude_range_m)
    return item


_HEADER = "# engine-air project file. SI units: m, m^2, kg/s, m/s, K; angles in degrees."
_ITEMS_PER_LINE = 8


def _toml_value(value: object) -> str:
    """One TOML value: scalars formatted by ``tomli_w``, lists written inline (wrapped when long)."""
    if isinstance(value, (list, tuple)):
        items = [_toml_value(v) for v in value]
        if len(items) <= _ITEMS_PER_LINE:
            return "[" + ", ".join(items) + "]"
        rows = [", ".join(items[i:i + _ITEMS_PER_LINE]) for i in range(0, len(items), _ITEMS_PER_LINE)]
        return "[\n    " + ",\n    ".join(rows) + ",\n]"
    return tomli_w.dumps({"v": value})[len("v = "):].rstrip("\n")


def dumps_project(project: Project) -> str:
    """The project as TOML text in the file layout; loads back to an equal ``Project``."""
    d = project_to_dict(project)
    out = [_HEADER, ""]

    def table(header: str, body: dict) -> None:
        out.append(header)
        out.extend(f"{key} = {_toml_value(value)}" for key, value in body.items())
        out.append("")

    schedule = d["inlet"].pop("schedule", None)
    for name in ("project", "limits", "inlet"):
        table(f"[{name}]", d[name])
    if schedule is not None:
        table("[inlet.schedule]", schedule)
    for item in d["engine"]["rating"]:
        table("[[engine.rating]]", item)
    table("[envelope]", d["envelope"])
    table("[grid]", d["grid"])
    for item in d["case"]:
        table("[[case]]", item)
    return "\n".join(out)


def _default_mode() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


_NEW_FILE_MODE = _default_mode()


def write_bytes_atomic(path: str | os.PathLike, data: bytes) -> None:
    """Write ``data`` to ``path`` so that a crash never leaves half a file.

    The bytes go to a temporary file in the target's folder, are flushed and
    fsync'ed, then renamed over the target (``os.replace``); the target's
    permissions are kept. A symbolic link at ``path`` is followed. On any
    ``OSError`` the temporary file is removed, the previous file is left as it
    was, and the ``OSError`` is raised.
    """
    target = os.path.realpath(os.fspath(path))
    folder = os.path.dirname(target)
    tmp_name = None
    try:
        try:
            mode = stat.S_IMODE(os.stat(target).st_mode)
        except FileNotFoundError:
            mode = _NEW_FILE_MODE
        with tempfile.NamedTemporaryFile("wb", dir=folder, prefix="." + os.path.basename(target) + ".",
                                         suffix=".tmp", delete=False) as f:
            tmp_name = f.name
            f.write(data)
            f.flush()
            os.fsync(f.fileno())
        os.chmod(tmp_name, mode)
        os.replace(tmp_name, target)
        tmp_name = None
    finally:
        if tmp_name is not None:
            try:
                os.unlink(tmp_name)
            except OSError:
                pass
    _sync_folder(folder)


def save_project(project: Project, path: str | os.PathLike) -> None:
    """Write ``project`` to ``path`` atomically (``write_bytes_atomic``).

    On any ``OSError`` the previous file is left as it was and
    ``ProjectSaveError`` is raised.
    """
    try:
        write_bytes_atomic(path, dumps_project(project).encode("utf-8"))
    except OSError as exc:
        raise ProjectSaveError(os.fspath(path), exc.strerror or str(exc), exc.errno) from exc


def _sync_folder(folder: str) -> None:
    """Best effort: make the rename itself durable (POSIX only)."""
    if not hasattr(os, "O_DIRECTORY"):
        return
    try:
        fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
