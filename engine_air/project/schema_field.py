"""One key of the project file (``Field``): ``engine_air.spec.field`` re-exported (the leaf the inlet types share)."""

from __future__ import annotations

from engine_air.spec.field import (  # noqa: F401
    Field,
    KINDS,
    REQUIRED,
    finite_float,
)
