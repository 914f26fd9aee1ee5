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

from engine_air import __version__
from engine_air.envelope import flags as F
from engine_air.project.errors import ProjectError
from engine_air.envelope.evaluate import evaluate_project
from engine_air.flow.match import REGIMES, evaluate_conditions
from engine_air.envelope.polygon import polygon_contains
from engine_air.envelope.explain import mechanism
from engine_air.project import load_project
from engine_air.outputs.point_record import point_record

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

    z = sub.add_parser("size", help="feasible range of one design variable, and an optimum inside it")
    z.add_argument("project")
    z.add_argument("--variable", required=True,
                   help="capture_area_m2, throat_area_m2, face_area_m2, duct_loss_coefficient, "
                        "ramp_angles_deg[k] (k from 1), shock_on_lip_mach")
    z.add_argument("--lower", type=float, help="lower end of the search range (the variable's SI unit)")
    z.add_argument("--upper", type=float, help="upper end of the search range")
    z.add_argument("--scan", type=int, default=25, help="values scanned before refining (3 to 201; default 25)")
    z.add_argument("--case", action="append", help="case name (repeatable); default every case")
    z.add_argument("--objective", choices=SIZE_OBJECTIVES,
                   help="figure to minimise in the feasible range; write --objective=-worst_margin (or "
                        "max_worst_margin) to maximise the worst relative margin")
    z.add_argument("--at-mach", type=float, help="flight Mach number of the point objective")
    z.add_argument("--at-altitude-m", type=float, help="geopotential altitude of the point objective, m")
    z.add_argument("--at-case", help="case of the point objective; default the first case")

    k = sub.add_parser("compare", help="two projects on one grid: both verdicts and the differences B - A")
    k.add_argument("a", metavar="A")
    k.add_argument("b", metavar="B")
    k.add_argument("--csv", help="CSV file of every common grid point: A, B and B - A per quantity")
    k.add_argument("--grid-from", choices=("a", "b", "union"), default="a",
                   help="whose grid to use: a (default), b, or union of both envelopes")

    w = sub.add_parser("sweep", help="trade sweep: every combination of 1 to 4 design variables")
    w.add_argument("project")
    w.add_argument("--vary", action="append", required=True, metavar="V=lo:hi:n",
                   help="design variable and n evenly spaced values from lo to hi (repeatable, up to 4)")
    w.add_argument("--csv", help="CSV file with one row per variant")
    w.add_argument("--scheduler", metavar="ADDR", help="dask.distributed scheduler, e.g. tcp://127.0.0.1:8786")
    w.add_argument("--workers", type=int, help="local worker processes (default every core)")
    w.add_argument("--case", action="append", help="case name (repeatable); default every case")
    w.add_argument("--cruise-mach", type=float, help="cruise point for the spillage column: flight Mach number")
    w.add_argument("--cruise-altitude-m", type=float, help="cruise point: geopotential altitude, m")
    w.add_argument("--cruise-case", help="cruise point: case name; default the first case")
    w.add_argument("--rows", type=int, default=100, help="most rows printed (all go to --csv; default 100)")

    r = sub.add_parser("pack", help="review pack: one folder with an HTML page, the maps and the inputs")
    r.add_argument("project")
    r.add_argument("--out", required=True, help="folder to write (created if needed)")
    r.add_argument("--quantity", action="append", help="quantity to map (repeatable); default face Mach margin, "
                                                       "recovery, spillage fraction, throat Mach")
    r.add_argument("--case", action="append", help="case name (repeatable); default every case")
    return p


SIZE_OBJECTIVES = ("spillage_fraction", "additive_drag_coefficient", "spillage_drag_coefficient", "-worst_margin",
                   "max_worst_margin")


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
        from engine_air.outputs.pictures import write_map_png

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
    if record["holds"] is None:
        print(f"engine-air: no limit can be judged at Mach {args.mach:g}, {args.altitude_m:g} m: "
              + "; ".join(F.DESCRIPTIONS[n] for n in record["flags"] if n != "ok"), file=sys.stderr)
        return EXIT_UNUSABLE
    return EXIT_HOLDS if record["holds"] else EXIT_FAILS


def _warn(project) -> None:
    for w in project.warnings:
        print(f"warning: {w}", file=sys.stderr)


def _progress_printer(what: str):
    """A progress callback writing "what: 40%" lines to stderr at most every 10 % (or 0.5 s on a terminal)."""
    import time

    state = {"last": -1.0, "t": 0.0}
    tty = sys.stderr.isatty()

    def report(fraction: float) -> None:
        pct = 100.0 * fraction
        now = time.monotonic()
        if tty:
            if now - state["t"] >= 0.5 or fraction >= 1.0:
                state["t"] = now
                print(f"\r{what}: {pct:5.1f}%", end="\n" if fraction >= 1.0 else "", file=sys.stderr, flush=True)
        elif pct >= state["last"] + 10.0 or (fraction >= 1.0 and state["last"] < 100.0):
            state["last"] = pct if fraction < 1.0 else 100.0
            print(f"{what}: {pct:.0f}%", file=sys.stderr, flush=True)

    return report


def cmd_size(args) -> int:
    from engine_air.studies.sizing import feasible_range, optimise

    project = load_project(args.project)
    _warn(project)
    cases = _cases(project, args.case)
    objective = "-worst_margin" if args.objective == "max_worst_margin" else args.objective
    at = None
    if objective is not None and objective != "-worst_margin":
        if args.at_mach is None or args.at_altitude_m is None:
            raise UsageError(f"--objective {objective} needs the point: --at-mach M --at-altitude-m H [--at-case C]")
        if args.at_case is not None:
            _cases(project, [args.at_case])
        at = (args.at_mach, args.at_altitude_m, args.at_case)
    elif args.at_mach is not None or args.at_altitude_m is not None or args.at_case is not None:
        raise UsageError("--at-mach/--at-altitude-m/--at-case go with a point --objective "
                         "(spillage_fraction, additive_drag_coefficient, spillage_drag_coefficient)")
    print(f"engine-air {__version__} size: {args.project}")
    result = feasible_range(project, args.variable, args.lower, args.upper, scan_points=args.scan,
                            case_names=cases, progress=_progress_printer("size"))
    for line in result.describe():
        print(line)
    if not result.feasible:
        print("ANSWER: the feasible range is EMPTY.")
        return EXIT_FAILS
    if objective is None:
        ranges = ", ".join(f"{iv.lower.value:.6g} to {iv.upper.value:.6g}" for iv in result.intervals)
        print(f"ANSWER: {args.variable} feasible from {ranges} {result.unit}".rstrip() + ".")
        return EXIT_HOLDS
    best = optimise(project, args.variable, objective, at=at, within=result, case_names=cases)
    for line in best.describe():
        print(line)
    if best.value is None:
        return EXIT_FAILS
    print(f"ANSWER: {args.variable} = {best.value:.6g} {result.unit}".rstrip() + ".")
    return EXIT_HOLDS


def cmd_compare(args) -> int:
    from engine_air.studies.compare import compare_projects, write_compare_csv
    from engine_air.envelope.evaluate import WORST
    from engine_air.outputs.quantities import QUANTITIES

    a = load_project(args.a)
    _warn(a)
    b = load_project(args.b)
    _warn(b)
    c = compare_projects(a, b, grid_from=args.grid_from)
    print(f"engine-air {__version__} compare: A = {args.a}, B = {args.b}")
    print(f"  grid from {args.grid_from}: {len(c.mach)} Mach x {len(c.altitude_m)} altitude; "
          f"{int(c.both.sum())} points inside both envelopes (A {int(c.inside_a.sum())}, B {int(c.inside_b.sum())})")
    print(f"  cases compared: {', '.join(c.cases)}")
    if c.only_a:
        print(f"  cases only in A: {', '.join(c.only_a)}")
    if c.only_b:
        print(f"  cases only in B: {', '.join(c.only_b)}")
    print()
    head = f"{'limit':<40} {'A':<6} {'A margin':>9} {'B':<6} {'B margin':>9}  change"
    print(head)
    print("-" * len(head))
    for row in c.verdicts:
        va = "-" if row.a is None else ("holds" if row.a.holds else "FAILS")
        vb = "-" if row.b is None else ("holds" if row.b.holds else "FAILS")
        ma = None if row.a is None else row.a.worst_margin
        mb = None if row.b is None else row.b.worst_margin
        print(f"{row.label[:40]:<40} {va:<6} {_fmt(ma):>9} {vb:<6} {_fmt(mb):>9}  {row.change}")
    print()
    head = f"{'difference B - A':<34} {'case':<24} {'min':>9} {'max':>9} {'max |d| at Mach, alt m':>24}"
    print(head)
    print("-" * len(head))
    for s in c.stats:
        if s.case != WORST and s.quantity not in ("face_mach_margin", "recovery", "spillage_fraction"):
            continue
        where = "-" if not (math.isfinite(s.max_abs_mach) and s.max_abs > 0) else \
            f"{s.max_abs_mach:.3f}, {s.max_abs_altitude_m:.0f}"
        print(f"{QUANTITIES[s.quantity].label[:34]:<34} {s.case[:24]:<24} {_fmt(s.min):>9} {_fmt(s.max):>9} "
              f"{where:>24}")
    if args.csv:
        try:
            rows = write_compare_csv(c, args.csv)
        except OSError as exc:
            raise UsageError(f"{args.csv}: cannot write the CSV file: {exc.strerror or exc}") from None
        print(f"\nwrote {rows} rows to {args.csv}")
    both = c.holds_a and c.holds_b
    print(f"\nVERDICT: A {'holds' if c.holds_a else 'FAILS'}, B {'holds' if c.holds_b else 'FAILS'}"
          + (" (identical results)." if c.identical else "."))
    return EXIT_HOLDS if both else EXIT_FAILS


def cmd_sweep(args) -> int:
    from engine_air.studies.sweep import format_rows, parse_vary, sweep, write_sweep_csv

    project = load_project(args.project)
    _warn(project)
    cases = _cases(project, args.case)
    variables = [parse_vary(v) for v in args.vary]
    cruise = None
    if args.cruise_mach is not None or args.cruise_altitude_m is not None:
        if args.cruise_mach is None or args.cruise_altitude_m is None:
            raise UsageError("the cruise point needs both --cruise-mach and --cruise-altitude-m")
        if args.cruise_case is not None:
            _cases(project, [args.cruise_case])
        cruise = (args.cruise_mach, args.cruise_altitude_m, args.cruise_case)
    if args.workers is not None and args.workers < 1:
        raise UsageError(f"--workers {args.workers}: must be 1 or more")
    try:
        result = sweep(project, variables, cruise=cruise, case_names=cases, workers=args.workers,
                       scheduler=args.scheduler, progress=_progress_printer("sweep"))
    except OSError as exc:
        if args.scheduler:
            raise UsageError(f"--scheduler {args.scheduler}: cannot use the cluster: {exc}") from None
        raise
    except KeyboardInterrupt:
        print("engine-air: sweep interrupted", file=sys.stderr)
        return EXIT_UNUSABLE
    print(f"engine-air {__version__} sweep: {args.project}")
    where = f"cluster {args.scheduler}" if result.mode == "dask" else \
        f"{result.workers} local process(es)" if result.mode == "local" else "this process"
    print(f"  {len(result.rows)} variants x {result.grid_points} grid points x {result.cases} cases on {where} "
          f"in {result.seconds:.2f} s ({len(result.rows) / max(result.seconds, 1e-9):.1f} variants/s)")
    print()
    for line in format_rows(result, args.rows):
        print(line)
    if len(result.rows) > args.rows:
        print(f"... {len(result.rows) - args.rows} more rows" + (" in the CSV file" if args.csv else " (use --csv)"))
    if args.csv:
        try:
            write_sweep_csv(result, args.csv)
        except OSError as exc:
            raise UsageError(f"{args.csv}: cannot write the CSV file: {exc.strerror or exc}") from None
        print(f"wrote {len(result.rows)} rows to {args.csv}")
    best = result.best()
    if best is not None:
        values = ", ".join(f"{n} = {v:.6g}" for n, v in zip(result.variables, best.values))
        print(f"best variant: {values} (worst relative margin {best.worst_relative_margin:+.4f}, {best.verdict})")
    holds, fails, invalid = result.count("holds"), result.count("fails"), result.count("invalid")
    print(f"VERDICT: {holds} of {len(result.rows)} variants hold every limit; {fails} fail"
          + (f"; {invalid} break a project rule" if invalid else "") + ".")
    return EXIT_HOLDS if result.holds else EXIT_FAILS


def cmd_pack(args) -> int:
    from engine_air.outputs.review_pack import PACK_QUANTITIES, write_review_pack

    project = load_project(args.project)
    _warn(project)
    cases = _cases(project, args.case)
    quantities = tuple(args.quantity) if args.quantity else PACK_QUANTITIES
    from engine_air.outputs.quantities import QUANTITIES

    for q in quantities:
        if q not in QUANTITIES:
            raise UsageError(f"--quantity {q!r}: unknown quantity; choose from {', '.join(QUANTITIES)}")
    try:
        pack = write_review_pack(args.project, args.out, quantities=quantities, case_names=cases)
    except OSError as exc:
        if isinstance(exc, ProjectError):
            raise
        raise UsageError(f"{args.out}: cannot write the review pack: {exc.strerror or exc}") from None
    print(f"wrote {pack.index_path} ({len(pack.pictures)} maps, inputs in {pack.project_path})")
    print("VERDICT: " + ("every limit holds." if pack.holds else "some limit FAILS somewhere in the envelope."))
    return EXIT_HOLDS if pack.holds else EXIT_FAILS


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    handler = {"check": cmd_check, "map": cmd_map, "point": cmd_point, "size": cmd_size, "compare": cmd_compare,
               "sweep": cmd_sweep, "pack": cmd_pack}[args.command]
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
