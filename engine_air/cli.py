"""Command line ``engine-air``: check, map and point (interfaces document).

Exit codes: 0 every limit holds, 1 some limit fails, 2 the input is unusable
(one-line message on stderr, never a traceback).
"""

from __future__ import annotations

import argparse
import csv
import json
import math
import sys

import numpy as np

from . import __version__
from . import flags as F
from .errors import ProjectError
from .evaluate import evaluate_project
from .match import REGIMES, evaluate_conditions
from .envelope import polygon_contains
from .explain import mechanism
from .project_file import load_project
from .report import point_record

EXIT_HOLDS, EXIT_FAILS, EXIT_UNUSABLE = 0, 1, 2


class UsageError(Exception):
    """Input that is unusable for a reason other than the project file's content."""


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="engine-air",
        description="Inlet operability over the flight envelope: face Mach, recovery, spillage, throat choking.",
    )
    p.add_argument("--version", action="version", version=f"engine-air {__version__}")
    sub = p.add_subparsers(dest="command", required=True)

    c = sub.add_parser("check", help="review verdict: each limit holds or fails, worst value and where")
    c.add_argument("project")
    c.add_argument("--case", action="append", help="case name (repeatable); default every case")

    m = sub.add_parser("map", help="every grid point of every case as CSV (and a PNG picture)")
    m.add_argument("project")
    m.add_argument("--case", action="append", help="case name (repeatable); default every case")
    m.add_argument("--csv", required=True, help="CSV file to write")
    m.add_argument("--png", help="PNG picture of the face Mach margin map to write")
    m.add_argument("--quantity", default="face_mach_margin", help="quantity drawn in the PNG")

    q = sub.add_parser("point", help="one flight condition, station by station")
    q.add_argument("project")
    q.add_argument("--mach", type=float, required=True)
    q.add_argument("--altitude-m", type=float, required=True, help="geopotential pressure altitude, m")
    q.add_argument("--case", help="case name; default the first case")
    q.add_argument("--json", action="store_true", help="write JSON (the default and only format)")
    return p


def _cases(project, names):
    if not names:
        return None
    known = [c.name for c in project.cases]
    for n in names:
        if n not in known:
            raise UsageError(f"--case {n!r}: no such case; the project has {known}")
    return names


def _fmt(x, digits=4) -> str:
    return "-" if x is None or not math.isfinite(x) else f"{x:.{digits}f}"


def cmd_check(args) -> int:
    project = load_project(args.project)
    _warn(project)
    result = evaluate_project(project, _cases(project, args.case))
    inside = int(result.inside.sum())
    print(f"engine-air {__version__} check: {args.project}")
    if project.title:
        print(f"  {project.title}")
    print(f"  cases: {', '.join(c.name for c in result.cases)}")
    print(f"  grid {len(result.mach)} Mach x {len(result.altitude_m)} altitude, {inside} points inside the envelope per case")
    print()
    header = (f"{'limit':<40} {'criterion':<28} {'verdict':<7} {'worst':>8} {'margin':>8} {'Mach':>6} "
              f"{'alt m':>7}  {'fails':>6}  case")
    print(header)
    print("-" * len(header))
    failing = []
    for s in result.summary:
        verdict = "holds" if s.holds else "FAILS"
        print(
            f"{s.label:<40} {s.limit_text:<28} {verdict:<7} {_fmt(s.worst_value):>8} "
            f"{_fmt(s.worst_margin):>8} {_fmt(s.worst_mach, 3):>6} {_fmt(s.worst_altitude_m, 0):>7}  "
            f"{100 * s.failing_share:5.1f}%  {s.worst_case}"
        )
        if not s.holds:
            failing.append(s)
    print()
    for s in failing:
        points = result.case_map(s.worst_case).points
        j = (int(np.argmin(np.abs(result.altitude_m - s.worst_altitude_m))), int(np.argmin(np.abs(result.mach - s.worst_mach))))
        regime = REGIMES[int(points.regime[j])]
        print(f"{s.label}: worst at Mach {s.worst_mach:.3f}, {s.worst_altitude_m:.0f} m, case {s.worst_case!r}, "
              f"{regime} operation: {mechanism(project, points, j, s.name)}.")
    if failing:
        print(f"\nVERDICT: {len(failing)} of {len(result.summary)} limits FAIL somewhere in the envelope.")
        return EXIT_FAILS
    print(f"VERDICT: all {len(result.summary)} limits hold at every envelope point of every case.")
    return EXIT_HOLDS


CSV_COLUMNS = (
    "mach", "altitude_m", "static_pressure_pa", "static_temperature_k", "total_pressure_pa", "total_temperature_k",
    "velocity_m_s", "density_kg_m3", "theta2", "corrected_flow_kg_s", "mass_flow_kg_s", "recovery",
    "external_recovery", "duct_recovery", "reference_recovery", "face_mach", "face_mach_margin", "throat_mach",
    "capture_mach", "mass_flow_ratio", "max_mass_flow_ratio", "spillage_fraction", "additive_drag_coefficient",
    "spillage_drag_coefficient", "face_static_to_ambient", "relative_tip_mach",
)


def write_map_csv(result, path) -> int:
    """Every grid point of every case of ``result`` as CSV rows; returns the number of rows."""
    rows = 0
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(("case", "inside_envelope", *CSV_COLUMNS, "regime", "limiting", "holds", "flags"))
        for cm in result.cases:
            pts = cm.points
            cols = [np.asarray(pts.value(k), dtype=float).ravel() for k in CSV_COLUMNS]
            inside = result.inside.ravel()
            regime = pts.regime.ravel()
            limiting = pts.limiting.ravel()
            fails = np.zeros(inside.shape, bool)
            for c in pts.checks:
                fails |= c.fails.ravel()
            bits = pts.flags.ravel()
            names = [c.name for c in pts.checks]
            for n in range(inside.size):
                w.writerow(
                    (
                        cm.name,
                        int(inside[n]),
                        *("" if not math.isfinite(col[n]) else repr(float(col[n])) for col in cols),
                        REGIMES[regime[n]],
                        names[limiting[n]] if limiting[n] >= 0 else "",
                        int(not fails[n]),
                        ";".join(F.names_of(int(bits[n]))),
                    )
                )
                rows += 1
    return rows


def cmd_map(args) -> int:
    project = load_project(args.project)
    _warn(project)
    result = evaluate_project(project, _cases(project, args.case))
    try:
        rows = write_map_csv(result, args.csv)
    except OSError as exc:
        raise UsageError(f"{args.csv}: cannot write the CSV file: {exc.strerror or exc}") from None
    print(f"wrote {rows} rows to {args.csv}")
    if args.png:
        from .picture import write_map_png

        try:
            write_map_png(result, args.png, args.quantity)
        except KeyError:
            raise UsageError(f"--quantity {args.quantity!r}: unknown quantity") from None
        except OSError as exc:
            raise UsageError(f"{args.png}: cannot write the PNG file: {exc.strerror or exc}") from None
        print(f"wrote {args.png}")
    return EXIT_HOLDS if result.holds else EXIT_FAILS


def cmd_point(args) -> int:
    project = load_project(args.project)
    _warn(project)
    if not (math.isfinite(args.mach) and math.isfinite(args.altitude_m)):
        raise UsageError("--mach and --altitude-m must be finite numbers")
    if args.mach < 0:
        raise UsageError(f"--mach {args.mach}: must be 0 or more")
    if args.case is None:
        case = project.cases[0]
    else:
        _cases(project, [args.case])
        case = project.case(args.case)
    points = evaluate_conditions(project, case, np.array([args.mach]), np.array([args.altitude_m]))
    env = project.envelope
    if not bool(polygon_contains(env.mach, env.altitude_m, np.array([args.mach]), np.array([args.altitude_m]))[0]):
        points.flags = points.flags | F.OUTSIDE_ENVELOPE
    record = point_record(points, 0, case.name)
    json.dump(record, sys.stdout, indent=2, allow_nan=False)
    sys.stdout.write("\n")
    return EXIT_HOLDS if record["holds"] else EXIT_FAILS


def _warn(project) -> None:
    for w in project.warnings:
        print(f"warning: {w}", file=sys.stderr)


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    handler = {"check": cmd_check, "map": cmd_map, "point": cmd_point}[args.command]
    try:
        return handler(args)
    except ProjectError as exc:
        print(f"engine-air: {exc}", file=sys.stderr)
    except UsageError as exc:
        print(f"engine-air: {exc}", file=sys.stderr)
    except OSError as exc:
        print(f"engine-air: {getattr(exc, 'filename', '') or ''}: {exc.strerror or exc}", file=sys.stderr)
    except MemoryError:
        print("engine-air: not enough memory for this grid; reduce grid.mach_points or grid.altitude_points", file=sys.stderr)
    except Exception as exc:  # last resort: never a traceback
        print(f"engine-air: internal error ({type(exc).__name__}: {exc}); please report it with the project file",
              file=sys.stderr)
    return EXIT_UNUSABLE


if __name__ == "__main__":
    sys.exit(main())
