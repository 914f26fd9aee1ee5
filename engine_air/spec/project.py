"""The design variant as plain, immutable data (SI units throughout).

These dataclasses mirror the project file of the interfaces document one to
one; ``engine_air.project.load`` loads and validates them, ``engine_air.project.save`` saves them
(every key is described once in ``engine_air.project.schema``). Edits make a
new object with ``dataclasses.replace``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

INLET_TYPES = ("pitot", "external-ramp")  # the registry in engine_air.inlets is authoritative
REFERENCE_RECOVERY_NAME = "mil-e-5008b"


@dataclass(frozen=True)
class LimitRegion:
    """Where one check is judged (method section 15): ``check`` is a check name (``point --json``
    ``checks[].name``); bounds included, ``None`` for no bound on that axis."""

    check: str
    mach_range: tuple[float, float] | None = None
    altitude_range_m: tuple[float, float] | None = None


@dataclass(frozen=True)
class Limits:
    face_mach_max: float
    throat_mach_max: float | None = None
    recovery_min: float | str | None = None  # a number, or "mil-e-5008b"
    stable_flow_fraction: float | None = None
    relative_tip_mach_max: float | None = None
    spillage_fraction_max: float | None = None  # extension: optional limit on spillage
    started_required: bool | None = None  # mixed-compression: None means the type's default (true)
    installation_loss_max: float | None = None  # needs thrust data in the ratings
    dc60_max: float | None = None  # method §18: judged where distortion data give DC(60)
    surge_margin_min: float | None = None  # method §18: remaining surge margin after the stack-up
    regions: tuple[LimitRegion, ...] = ()  # [limits.region.NAME]: where a check is judged (default everywhere)

    def region(self, check: str) -> LimitRegion | None:
        """The region of the check named ``check``; None when it is judged everywhere."""
        for r in self.regions:
            if r.check == check:
                return r
        return None


@dataclass(frozen=True)
class Schedule:
    """Geometry scheduled against flight Mach number (linear, ends held); ``None`` where not scheduled."""

    mach: tuple[float, ...]
    throat_area_m2: tuple[float, ...] | None = None
    shock_on_lip_mach: tuple[float, ...] | None = None
    ramp_angles_deg: tuple[tuple[float, ...], ...] | None = None
    bleed_fraction: tuple[float, ...] | None = None


@dataclass(frozen=True)
class Inlet:
    """Inlet geometry and airflow management. Which keys a type uses is declared by its module in
    ``engine_air.inlets``; keys of other types keep their defaults here."""

    type: str
    capture_area_m2: float
    throat_area_m2: float
    face_area_m2: float
    duct_loss_coefficient: float = 0.0
    lip_suction_factor: float = 0.0
    ramp_angles_deg: tuple[float, ...] = ()
    shock_on_lip_mach: float | None = None
    cone_half_angles_deg: tuple[float, ...] = ()
    internal_recovery_factor: float = 1.0
    supersonic_lip_suction_factor: float = 0.0
    bleed_fraction: float = 0.0
    bleed_exit_velocity_ratio: float = 0.0
    bypass_area_m2: float = 0.0
    bypass_discharge_coefficient: float = 0.9
    bypass_exit_velocity_ratio: float = 0.0
    auxiliary_inlet_area_m2: float = 0.0
    auxiliary_door_mach_max: float | None = None
    auxiliary_loss_coefficient: float = 0.0
    schedule: Schedule | None = None


@dataclass(frozen=True)
class Stability:
    """The engine maker's surge-margin stack-up for one rating (method §18, after SAE AIR1419).

    Fractions of the surge pressure ratio; sensitivities per equal-area ring, innermost first;
    ``other_losses`` the named stack-up items as (name, fraction) pairs in file order."""

    available_surge_margin: float
    circumferential_sensitivity: tuple[float, ...]
    radial_sensitivity: tuple[float, ...]
    other_losses: tuple[tuple[str, float], ...] = ()


@dataclass(frozen=True)
class Rating:
    name: str
    theta: tuple[float, ...]
    corrected_flow_kg_s: tuple[float, ...]
    fan_tip_speed_m_s: float | None = None
    corrected_tip_speed_m_s: tuple[float, ...] | None = None  # against theta, instead of fan_tip_speed_m_s
    thrust_mach: tuple[float, ...] | None = None
    thrust_altitude_m: tuple[float, ...] | None = None
    net_thrust_n: tuple[tuple[float, ...], ...] | None = None  # one row per thrust_altitude_m
    thrust_reference_recovery: float | str | None = None  # a number or "mil-e-5008b"
    recovery_thrust_exchange: float | None = None  # dF/F per dpi/pi, from the engine maker
    stability: Stability | None = None  # [engine.rating.stability], method §18


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
    mach_range: tuple[float, float] | None = None  # region where the case is judged (bounds included)
    altitude_range_m: tuple[float, float] | None = None
    # incidence (method section 17): a number, or ((mach...), (deg...)) linear in M0, ends held; None: 0
    angle_of_attack_deg: float | tuple[tuple[float, ...], tuple[float, ...]] | None = None
    sideslip_deg: float | tuple[tuple[float, ...], tuple[float, ...]] | None = None


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
    warnings: tuple[str, ...] = field(default=(), compare=False)  # e.g. a limit no rating lets be checked
    characteristics_file: str | None = None  # [characteristics] file, as written (relative to the project file)
    characteristics: object = field(default=None, compare=False, repr=False)  # its curves, read at load time

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


def incidence_at(value, mach):
    """An incidence key (number, Mach table or None) at flight Mach ``mach``, degrees (arrays broadcast).

    >>> float(incidence_at(((0.2, 0.9), (8.0, 4.0)), 0.55))
    6.0
    """
    import numpy as np

    if value is None:
        return np.zeros(np.shape(mach))
    if isinstance(value, (int, float)):
        return np.full(np.shape(mach), float(value))
    machs, degs = value
    return np.interp(mach, np.asarray(machs, float), np.asarray(degs, float))
