"""The project's dataclasses: ``engine_air.spec.project`` re-exported (the leaf the inlet types share)."""

from __future__ import annotations

from engine_air.spec.project import (  # noqa: F401
    Case,
    Envelope,
    Grid,
    INLET_TYPES,
    Inlet,
    LimitRegion,
    Limits,
    Project,
    REFERENCE_RECOVERY_NAME,
    Rating,
    Schedule,
    Stability,
    incidence_at,
)
