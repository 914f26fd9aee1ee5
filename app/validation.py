"""Checking an edited project by the schema's rules.

``validate(project)`` checks the dataclasses directly (``engine_air.project.load.validate_project``): each
key's type, bounds and shape, the rules between keys and the inlet type's design checks, the same rules a
file is loaded by. A project that breaks one raises the loader's one-line ``ProjectError`` saying which key
is wrong and what is allowed.
"""

from __future__ import annotations

from engine_air.project.load import validate_project


def validate(project):
    """``project`` itself when every rule holds; raises ``engine_air.project.errors.ProjectError`` otherwise."""
    validate_project(project)
    return project
