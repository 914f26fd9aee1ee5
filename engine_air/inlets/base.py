"""What every inlet type provides (method §4, §6, §7, §9–§11, §13), and the shock system it returns.

An inlet type is one module in ``engine_air.inlets`` with one object implementing ``InletType``:
its own file keys (``fields``), the checks on its design, its shock system and maximum capture at
any array of flight Mach numbers, its supersonic pre-entry drag, and the design variables that sizing and
sweeps may vary. The registry (``engine_air.inlets.registry``) lists the types; the loader, the match,
the studies and the program ask it, never ``inlet.type == ...``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol, runtime_checkable

import numpy as np

from engine_air.spec.project import Inlet
from engine_air.spec.field import Field


@dataclass(frozen=True)
class ShockSystem:
    """External (and, for mixed compression, internal) compression at each flight Mach number.

    Arrays have the flight Mach array's shape; per-shock arrays are stacked on axis 0.
    """

    external_recovery: np.ndarray  # p_t ahead of the subsonic duct / p_t0 (all shocks)
    terminal_upstream_mach: np.ndarray  # Mach ahead of the terminal normal shock (M0 for pitot)
    terminal_downstream_mach: np.ndarray  # Mach behind it (subsonic); M0 where M0 <= 1
    max_mass_flow_ratio: np.ndarray  # from the shock geometry; NaN for M0 <= 1
    detached: np.ndarray  # bool: a ramp or cone shock is detached
    inside_cowl: np.ndarray  # bool: the shocks fall inside the cowl (M0 above the shock-on-lip Mach)
    ramp_wave_angle_rad: np.ndarray  # (n_shocks, ...) NaN where detached or subsonic
    ramp_downstream_mach: np.ndarray  # (n_shocks, ...) Mach behind each ramp or cone shock
    ramp_total_pressure_ratio: np.ndarray  # (n_shocks, ...)
    ramp_static_pressure_ratio: np.ndarray  # (n_shocks, ...) p behind / p ahead of each shock
    oblique_ahead_of_cowl: np.ndarray | None = None  # bool: an oblique or conical shock stands ahead (buzz)
    started: np.ndarray | None = None  # bool, mixed compression only
    self_start_contraction: np.ndarray | None = None  # Kantrowitz limit K(M_e) on A_th/A_e, mixed compression only
    entrance_area_m2: np.ndarray | None = None  # cowl entrance area A_e, mixed compression only
    internal_contraction_ratio: np.ndarray | None = None  # CR = A_th/A_e, mixed compression only


@dataclass(frozen=True)
class CaptureState:
    """The free stream and the captured stream tube at each point, for the pre-entry drag (SI units)."""

    flight_mach: np.ndarray
    static_pressure_pa: np.ndarray
    dynamic_pressure_pa: np.ndarray  # q0 = gamma/2 p0 M0^2
    mass_flow_ratio: np.ndarray  # captured flow over the flow through A_c
    capture_area_m2: float
    momentum_balance_drag_n: np.ndarray  # method §7 momentum balance, station 0 to 1 (A1 = A_c)


@runtime_checkable
class InletType(Protocol):
    """Optional attribute (read with ``getattr(kind, "handles_schedule", False)``, so not a protocol member):
    ``handles_schedule = True`` when the type evaluates a scheduled inlet itself (``shock_system`` then gets the
    inlet with its ``[inlet.schedule]``, e.g. for a starting history). Otherwise the match evaluates the shock
    system per unique flight Mach number with the fixed inlet at that Mach (``engine_air.flow.schedule_columns``).
    """

    name: str  # the value of inlet.type in the file
    label: str  # a few words for menus
    fields: tuple[Field, ...]  # the keys only this type (or a few types) reads

    def check_design(self, inlet: Inlet) -> list[tuple[str, object, str]]:
        """Problems with the design as (key path, value, what is allowed); empty when sound."""

    def shock_system(self, inlet: Inlet, flight_mach: np.ndarray) -> ShockSystem:
        """The shock system and maximum capture at flight Mach numbers ``flight_mach`` (array)."""

    def supersonic_pre_entry_drag(self, inlet: Inlet, shocks: ShockSystem, state: CaptureState) -> np.ndarray | None:
        """Pre-entry (additive) drag in newtons where M0 > 1; ``None`` where the type does not model it."""

    def design_variables(self, inlet: Inlet) -> list[str]:
        """Names of the type's own design variables, e.g. ``ramp_angles_deg[1]``."""


def no_shocks(flight_mach: np.ndarray) -> np.ndarray:
    """An empty per-shock array (0, ...) for a type without oblique shocks."""
    return np.empty((0,) + np.shape(flight_mach))
