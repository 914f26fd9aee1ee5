"""The error types of project input and saving: ``engine_air.spec.errors`` re-exported (a leaf every package may
import, so that the data readers below ``project`` can raise them too)."""

from __future__ import annotations

from engine_air.spec.errors import ProjectError, ProjectSaveError, _short_repr  # noqa: F401

__all__ = ["ProjectError", "ProjectSaveError"]
