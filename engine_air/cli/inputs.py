"""Outputs never over inputs: an output path that resolves (links followed) to a file the run reads is refused."""

from __future__ import annotations

import os

from engine_air.cli.common import UsageError, path_text


def input_paths(project, project_path) -> list[str]:
    """Every file a run over ``project`` reads: the project file and its characteristics table."""
    paths = [os.fspath(project_path)]
    if getattr(project, "characteristics", None) is not None and getattr(project.characteristics, "table", None):
        paths.append(project.characteristics.table.path)
    return paths


def refuse_inputs(project, project_path, targets) -> None:
    """UsageError for an output (option, path) that is an input of the run."""
    inputs = {os.path.realpath(p) for p in input_paths(project, project_path)}
    for option, path in targets:
        if os.path.realpath(os.fspath(path)) in inputs:
            raise UsageError(f"{option} {path_text(path)}: is an input of this run; write the output elsewhere")
