"""Rules between the tables of a project: throat and capture, the inlet type's design checks (fixed geometry
and every schedule row), unique names, cases naming known ratings, the grid and case count, the envelope
polygon, and the limit regions. Used by the loader and by ``validate_project`` alike.
"""

from __future__ import annotations

import dataclasses

from engine_air.project.polygon import polygon_area, polygon_crossing_edges, vertices_collinear
from engine_air.project import schema as S
from engine_air.project.key_checks import Reader, number_text
from engine_air.project.limit_data import limit_data_rules
from engine_air.spec.check_names import CHECK_NAMES
from engine_air.project.model import Envelope, Grid, Inlet, Limits, Project

REGION_LIMIT_KEYS = {"recovery": "recovery_min", "stability": "stable_flow_fraction",
                     "relative-tip-mach": "relative_tip_mach_max", "spillage": "spillage_fraction_max",
                     "installation-loss": "installation_loss_max", "dc60": "dc60_max",
                     "surge-margin": "surge_margin_min"}
"""Checks that exist only when their [limits] key is given (a region for them alone is warned about)."""


def case_count(r: Reader, n: int, grid: Grid) -> None:
    """The grid size, the number of cases and the case-points they make together."""
    if grid.mach_points * grid.altitude_points > S.MAX_GRID_POINTS:
        m, a = grid.mach_points, grid.altitude_points
        r.fail("grid", m * a,
               f"mach_points x altitude_points = {m} x {a} = {m * a} points; at most {S.MAX_GRID_POINTS} per case "
               "are allowed, because every case keeps a few dozen arrays of that size in memory")
    if n > S.MAX_CASES:
        r.fail("case", n, f"the file has {n} [[case]] tables; at most {S.MAX_CASES} are allowed")
    points = grid.mach_points * grid.altitude_points
    if points * n > S.MAX_CASE_POINTS:
        r.fail("case", n,
               f"{n} cases x {points} grid points = {points * n} case-points; at most "
               f"{S.MAX_CASE_POINTS} are allowed, because every case keeps a few dozen arrays of the grid's size in "
               "memory: use fewer cases or a coarser [grid]")


def project_rules(r: Reader, p: Project) -> None:
    """Rules between tables: throat and capture, the schedule rows, the inlet type's design checks, unique
    names, cases naming known ratings, the grid size and the envelope polygon."""
    inlet = p.inlet
    if inlet.throat_area_m2 > inlet.capture_area_m2:
        r.fail("inlet.throat_area_m2", inlet.throat_area_m2,
               f"must not exceed capture_area_m2 = {number_text(inlet.capture_area_m2)} m^2")
    if inlet.auxiliary_inlet_area_m2 > 0.0 and inlet.auxiliary_door_mach_max is None:
        r.fail("inlet.auxiliary_door_mach_max", None,
               "missing; required when auxiliary_inlet_area_m2 > 0: the flight Mach number above which the doors "
               "are closed, 0 < auxiliary_door_mach_max <= 1")
    _check_design(r, inlet)
    names: dict[str, int] = {}
    for i, rating in enumerate(p.ratings):
        if rating.name in names:
            r.fail(f"engine.rating[{i}].name", rating.name,
                   f"must be unique: engine.rating[{names[rating.name]}] has the same name")
        names[rating.name] = i
    seen: dict[str, int] = {}
    for i, case in enumerate(p.cases):
        if case.name in seen:
            r.fail(f"case[{i}].name", case.name, f"must be unique: case[{seen[case.name]}] has the same name")
        seen[case.name] = i
        if case.rating not in names:
            r.fail(f"case[{i}].rating", case.rating,
                   "must name one of the engine ratings: " + ", ".join(repr(x) for x in names))
    _envelope_rules(r, p.envelope)
    lim = p.limits
    for key, text in limit_data_rules(p, r.path):  # every limit has the data it is judged by
        r.warn(key, text)
    _region_rules(r, lim, inlet.type)


def check_region_name(r: Reader, name: object, value: object) -> None:
    """A ``[limits.region.NAME]`` table must name a check (``engine-air point --json`` ``checks[].name``)."""
    if name in CHECK_NAMES:
        return
    hint = S.suggestion(str(name), CHECK_NAMES)
    r.fail(f"limits.region.{name}", value,
           "names no check" + (f'; did you mean "{hint}"?' if hint else "")
           + " ([limits.region.NAME] names one of the checks: " + ", ".join(CHECK_NAMES) + ")")


def _region_rules(r: Reader, lim: Limits, inlet_type: str) -> None:
    """Each region names a known check once and bounds at least one axis; a region of a check this project
    does not have is warned about (it restricts nothing)."""
    seen = set()
    for region in lim.regions:
        keypath = f"limits.region.{region.check}"
        check_region_name(r, region.check, region)
        if region.check in seen:
            r.fail(keypath, region.check, "is given twice: one [limits.region.NAME] table per check")
        seen.add(region.check)
        if region.mach_range is None and region.altitude_range_m is None:
            r.fail(keypath, {}, "bounds nothing: give mach_range, altitude_range_m or both (or remove the table "
                                "to judge the check everywhere)")
        key = REGION_LIMIT_KEYS.get(region.check)
        if key is not None and getattr(lim, key) is None:
            r.warn(keypath, f"no limits.{key} is given, so there is no {region.check} check for this region")
        if region.check == "started" and (inlet_type != "mixed-compression" or lim.started_required is False):
            r.warn(keypath, "only a mixed-compression inlet with started operation required has a started check; "
                            "this region restricts nothing")


def _check_design(r: Reader, inlet: Inlet) -> None:
    """The inlet type's own design checks (``check_design`` of its registry entry), on the fixed geometry and
    on the geometry at each schedule row (e.g. ramp shocks attached at that row's own shock-on-lip Mach)."""
    from engine_air.inlets.registry import inlet_type
    from engine_air.inlets.schedule import SCHEDULED_KEYS, is_scheduled

    kind = inlet_type(inlet.type)
    fixed = dataclasses.replace(inlet, schedule=None)
    for key, value, allowed in kind.check_design(fixed):
        r.fail(key, value, allowed)
    if inlet.schedule is not None:
        sch = inlet.schedule
        for i, m in enumerate(sch.mach):
            row = {key: getattr(sch, key)[i] for key in SCHEDULED_KEYS if is_scheduled(inlet, key)}
            where = f"at inlet.schedule row {i} (mach = {number_text(m)})"
            if "throat_area_m2" in row and row["throat_area_m2"] > inlet.capture_area_m2:
                r.fail(f"inlet.schedule.throat_area_m2[{i}]", row["throat_area_m2"],
                       f"must not exceed capture_area_m2 = {number_text(inlet.capture_area_m2)} m^2")
            if not row.keys() - {"bleed_fraction"}:
                continue
            at_row = dataclasses.replace(fixed, **{k: (tuple(v) if isinstance(v, tuple) else v) for k, v in row.items()})
            for key, value, allowed in kind.check_design(at_row):
                base = key.split("[")[0].removeprefix("inlet.")
                if base in row:
                    r.fail(f"inlet.schedule.{base}[{i}]", row[base], f"{where}: {allowed}")
                r.fail(key, value, f"{where}: {allowed}")


def _envelope_rules(r: Reader, env: Envelope) -> None:
    mach, alt = env.mach, env.altitude_m
    if vertices_collinear(mach, alt):
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               "the vertices all lie on one line, so the polygon encloses no area")
    n = len(mach)
    for i in range(n):
        j = (i + 1) % n
        if mach[i] == mach[j] and alt[i] == alt[j]:
            r.fail("envelope", (mach[j], alt[j]),
                   f"vertex {j} repeats vertex {i}; neighbouring vertices must differ "
                   "(the polygon closes itself: do not repeat the first vertex at the end)")
    crossing = polygon_crossing_edges(mach, alt)
    if crossing is not None:
        a, b = crossing
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)},
               f"the polygon crosses itself (edge {a}-{(a + 1) % n} meets edge {b}-{(b + 1) % n}); "
               "list the vertices in order around the boundary")
    if polygon_area(mach, alt) <= 1e-9:
        r.fail("envelope", {"mach": list(mach), "altitude_m": list(alt)}, "the polygon encloses no area")

