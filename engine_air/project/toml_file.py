"""Former single module of the project file, kept so that old imports keep working.

The project file now lives in: ``schema`` (every key once), ``load`` (TOML → validated ``Project``,
``validate_project``), ``save`` (``Project`` → TOML, ``save_project``), ``atomic`` (``write_bytes_atomic``)
and ``errors``. Import from ``engine_air.project`` or those modules.
"""

from __future__ import annotations

import os  # noqa: F401  (tests patch os/tempfile functions through this module)
import tempfile  # noqa: F401

from engine_air.project.atomic import write_bytes_atomic  # noqa: F401
from engine_air.project.errors import ProjectError, ProjectSaveError  # noqa: F401
from engine_air.project.load import load_project, loads_project, project_from_dict, validate_project  # noqa: F401
from engine_air.project.save import dumps_project, project_to_dict, save_project  # noqa: F401
from engine_air.project.schema import (  # noqa: F401
    MAX_AREA_M2,
    MAX_AXIS_POINTS,
    MAX_CASE_POINTS,
    MAX_CASES,
    MAX_CORRECTED_FLOW_KG_S,
    MAX_ENVELOPE_VERTICES,
    MAX_FILE_BYTES,
    MAX_GRID_POINTS,
    MAX_KEY_PARTS,
    MAX_TIP_SPEED_M_S,
    MIN_AXIS_POINTS,
    SUPPORTED_FORMATS,
)
from engine_air.inlets.external_ramp import MAX_RAMP_DEG, MAX_RAMPS, MAX_TOTAL_RAMP_DEG  # noqa: F401
