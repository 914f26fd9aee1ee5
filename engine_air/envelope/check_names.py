"""The names of the checks: ``engine_air.spec.check_names`` re-exported (the project file names them, so they live
in the leaf ``spec`` that ``project`` imports; ``envelope.checks`` builds exactly these)."""

from __future__ import annotations

from engine_air.spec.check_names import CHECK_NAMES  # noqa: F401
