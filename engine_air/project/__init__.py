"""The project file and the design variant it holds.

``model`` (the frozen dataclasses), ``schema`` (every key of the file once, as ``Field`` objects),
``load`` (TOML → validated ``Project``; ``validate_project`` for projects edited in code), ``save``
(``Project`` → TOML; atomic ``save_project``), ``atomic`` (``write_bytes_atomic``), ``errors``
(``ProjectError``, ``ProjectSaveError``), ``reference_doc`` (the generated ``docs/project-file.md``).

``model`` and ``schema_field`` re-export ``engine_air.spec`` (the leaf the inlet types import, since the schema
and the loader here read the inlet types' registry). The names below are imported lazily, so that importing
``engine_air.project`` stays light.
"""

from __future__ import annotations

import importlib

_EXPORTS = {
    "Project": "model", "Inlet": "model", "Schedule": "model", "Limits": "model", "LimitRegion": "model", "Rating": "model",
    "Stability": "model",
    "Envelope": "model", "Grid": "model", "Case": "model",
    "ProjectError": "errors", "ProjectSaveError": "errors",
    "load_project": "load", "loads_project": "load", "project_from_dict": "load", "validate_project": "load",
    "save_project": "save", "dumps_project": "save", "project_to_dict": "save",
    "write_bytes_atomic": "atomic", "is_read_only": "atomic", "atomic_path": "atomic",
    "Fingerprint": "fingerprint", "FileChangedError": "fingerprint", "file_fingerprint": "fingerprint",
    "Field": "schema_field", "REQUIRED": "schema_field",
    "MAX_FILE_BYTES": "schema", "MAX_AXIS_POINTS": "schema", "MIN_AXIS_POINTS": "schema",
    "MAX_GRID_POINTS": "schema", "MAX_CASES": "schema", "MAX_CASE_POINTS": "schema",
    "MAX_ENVELOPE_VERTICES": "schema", "SUPPORTED_FORMATS": "schema", "MAX_KEY_PARTS": "schema",
    "MAX_AREA_M2": "schema", "MAX_CORRECTED_FLOW_KG_S": "schema", "MAX_TIP_SPEED_M_S": "schema",
    "MAX_RAMPS": "schema", "MAX_RAMP_DEG": "schema", "MAX_TOTAL_RAMP_DEG": "schema",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name: str):
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'engine_air.project' has no attribute {name!r}")
    value = getattr(importlib.import_module(f"engine_air.project.{module}"), name)
    globals()[name] = value
    return value
