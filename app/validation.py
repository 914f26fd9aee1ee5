"""Checking an edited project by the loader's own rules.

``validate(project)`` round-trips the project through the file layout
(``project_to_dict`` then ``project_from_dict``), so an edit is accepted only
if the same values would load from a file; otherwise the loader's one-line
``ProjectError`` says which key is wrong and what is allowed.
"""

from __future__ import annotations

from engine_air.project.toml_file import project_from_dict, project_to_dict


def validate(project):
    """The project as the loader would build it; raises ``engine_air.project.errors.ProjectError``."""
    return project_from_dict(project_to_dict(project))
