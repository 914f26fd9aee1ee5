"""Every limit has the data it is judged by: the load-time rule between ``[limits]`` and the ratings.

A limit the project cannot judge anywhere would otherwise pass silently ("all N limits hold" for a limit
judged nowhere). Called by the loader and by ``validate_project`` alike:

- a thrust table (``net_thrust_n``) without its ``recovery_thrust_exchange`` (no default: it comes from the
  engine maker) is an error;
- ``installation_loss_max`` with no rating (of those the cases use) giving ``net_thrust_n`` is an error; with
  some of them lacking it, a warning naming them (the limit is not judged for cases of those ratings);
- ``relative_tip_mach_max`` with no rating (of those the cases use) giving a tip speed (``fan_tip_speed_m_s``
  or ``corrected_tip_speed_m_s``) is an error; with some of them lacking one, a warning naming them.

``limit_data_rules(project, path)`` raises ``ProjectError`` for the first error and returns the warnings as
``(key, text)`` pairs.
"""

from __future__ import annotations

import os

from engine_air.project.errors import ProjectError
from engine_air.project.model import Project, Rating


def _has_tip_speed(r: Rating) -> bool:
    return r.fan_tip_speed_m_s is not None or r.corrected_tip_speed_m_s is not None


def _has_thrust(r: Rating) -> bool:
    return r.net_thrust_n is not None


def _names(ratings) -> str:
    return ", ".join(repr(r.name) for r in ratings)


def _partial(project: Project, path, key: str, value, has, what: str, fix: str) -> list[tuple[str, str]]:
    """Error when no rating has the data, a warning naming the ratings without it when some lack it."""
    used = {c.name: c.rating for c in project.cases}.values()
    judged = [r for r in project.ratings if r.name in used] or list(project.ratings)
    lacking = [r for r in judged if not has(r)]
    if not lacking:
        return []
    if len(lacking) == len(judged):
        raise ProjectError(path, key, value, f"this limit needs {what}, and no [[engine.rating]] a case uses gives "
                                             f"it, so it would be judged nowhere; {fix}")
    return [(key, f"not judged for cases of rating(s) {_names(lacking)}: they give no {what}")]


def limit_data_rules(project: Project, path: str | os.PathLike | None = None) -> list[tuple[str, str]]:
    """Raise ``ProjectError`` (naming the key and what is missing) for a limit or table that lacks its data;
    return the warnings ``[(key, text)]`` for a limit some ratings cannot be judged by."""
    for i, r in enumerate(project.ratings):
        if _has_thrust(r) and r.recovery_thrust_exchange is None:
            raise ProjectError(path, f"engine.rating[{i}].recovery_thrust_exchange", None,
                               f"missing; rating {r.name!r} gives a thrust table (net_thrust_n), which needs the "
                               "thrust exchange rate X = (dF/F)/(dp_t/p_t) from the engine maker (there is no "
                               "default); give it, or remove the thrust table")
    warnings: list[tuple[str, str]] = []
    lim = project.limits
    if lim.installation_loss_max is not None:
        warnings += _partial(project, path, "limits.installation_loss_max", lim.installation_loss_max, _has_thrust,
                             "thrust data (net_thrust_n with thrust_mach, thrust_altitude_m and "
                             "recovery_thrust_exchange)", "add a thrust table or remove the limit")
    if lim.relative_tip_mach_max is not None:
        warnings += _partial(project, path, "limits.relative_tip_mach_max", lim.relative_tip_mach_max,
                             _has_tip_speed, "fan tip speed (fan_tip_speed_m_s or corrected_tip_speed_m_s)",
                             "give a rating its tip speed or remove the limit")
    return warnings


__all__ = ["limit_data_rules"]
