"""The design variant as plain, immutable data (SI units throughout).

These dataclasses mirror the project file of the interfaces document one to
one; ``engine_air.project.toml_file`` loads, validates and saves them. Edits make a
new object with ``dataclasses.replace``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

INLET_TYPES = ("pitot", "external-ramp")
REFERENCE_RECOVERY_NAME = "mil-e-5008b"


@dataclass(frozen=True)
class Limits:
    face_mach_max: float
    throat_mach_max: float | None = None
    recovery_min: float | str | None = None  # a number, or "mil-e-5008b"
    stable_flow_fraction: float | None = None
    relative_tip_mach_max: float | None = None
    spillage_fraction_max: float | None = None  # extension: optional limit on spillage


@dataclass(frozen=True)
class Inlet:
    type: str
    capture_area_m2: float
    throat_area_m2: float
    face_area_m2: float
    duct_loss_coefficient: float = 0.0
    lip_suction_factor: float = 0.0
    ramp_angles_deg: tuple[float, ...] = ()
    shock_on_lip_mach: float | None = None


@dataclass(frozen=True)
class Rating:
    name: str
    theta: tuple[float, ...]
    corrected_flow_kg_s: tuple[float, ...]
    fan_tip_speed_m_s: float | None = None


@dataclass(frozen=True)
class Envelope:
    mach: tuple[float, ...]
    altitude_m: tuple[float, ...]


@dataclass(frozen=True)
class Grid:
    mach_points: int = 121
    altitude_points: int = 101


@dataclass(frozen=True)
class Case:
    name: str
    rating: str
    isa_offset_K: float = 0.0


@dataclass(frozen=True)
class Project:
    limits: Limits
    inlet: Inlet
    ratings: tuple[Rating, ...]
    envelope: Envelope
    grid: Grid = Grid()
    cases: tuple[Case, ...] = ()
    title: str = ""
    notes: str = ""
    format: int = 1
    warnings: tuple[str, ...] = field(default=(), compare=False)  # e.g. unknown keys met on loading

    def rating(self, name: str) -> Rating:
        for r in self.ratings:
            if r.name == name:
                return r
        raise KeyError(name)

    def case(self, name: str) -> Case:
        for c in self.cases:
            if c.name == name:
                return c
        raise KeyError(name)
