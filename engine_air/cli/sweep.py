"""``engine-air sweep PROJECT --vary V=lo:hi:n [...] [--csv FILE] [--scheduler ADDR --timeout S]``: trade sweep."""

from __future__ import annotations

from engine_air import __version__
from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, EXIT_UNUSABLE, UsageError, cases, check_output_path,
                                   err, finite, load, name, out, path_text, progress_printer, recheck_outputs,
                                   with_tables, write_error)


def add_parser(sub) -> None:
    w = sub.add_parser("sweep", help="trade sweep: every combination of 1 to 4 design variables")
    w.add_argument("project")
    w.add_argument("--vary", action="append", required=True, metavar="V=lo:hi:n",
                   help="design variable and n evenly spaced values from lo to hi (repeatable, up to 4)")
    w.add_argument("--csv", help="CSV file with one row per variant")
    w.add_argument("--scheduler", metavar="ADDR", help="dask.distributed scheduler, e.g. tcp://127.0.0.1:8786")
    w.add_argument("--timeout", type=float, default=30.0, metavar="S",
                   help="with --scheduler: seconds allowed for connecting, for the first answer and for each "
                        "result (default 30)")
    w.add_argument("--workers", type=int, help="local worker processes (default every core)")
    w.add_argument("--case", action="append", help="case name (repeatable); default every case")
    w.add_argument("--cruise-mach", type=float, help="cruise point for the spillage column: flight Mach number")
    w.add_argument("--cruise-altitude-m", type=float, help="cruise point: geopotential altitude, m")
    w.add_argument("--cruise-case", help="cruise point: case name; default the first case")
    w.add_argument("--rows", type=int, default=100, help="most rows printed (all go to --csv; default 100)")
    w.set_defaults(handler=run)


def run(args) -> int:
    import math

    from engine_air.studies.sweep import SchedulerError, format_rows, parse_scheduler, parse_vary, sweep, \
        write_sweep_csv

    if args.scheduler is not None:
        parse_scheduler(args.scheduler)
        if args.workers is not None:
            raise UsageError(f"--workers {args.workers} and --scheduler {args.scheduler}: they are exclusive (the "
                             "cluster's scheduler decides its workers); give one of them")
    if not (math.isfinite(args.timeout) and args.timeout > 0):
        raise UsageError(f"--timeout {args.timeout}: must be a number of seconds above 0")
    if args.workers is not None and args.workers < 1:
        raise UsageError(f"--workers {args.workers}: must be 1 or more")
    if args.rows < 0:
        raise UsageError(f"--rows {args.rows}: must be 0 or more")
    finite(args.cruise_mach, "--cruise-mach")
    finite(args.cruise_altitude_m, "--cruise-altitude-m")
    inputs = (args.project,)  # every file this run reads
    if args.csv:
        check_output_path(args.csv, "--csv", inputs)
    variables = [parse_vary(v) for v in args.vary]
    project = load(args.project)
    inputs = with_tables(inputs, project)
    recheck_outputs([("--csv", args.csv)], inputs)
    chosen = cases(project, args.case)
    cruise = None
    if args.cruise_mach is not None or args.cruise_altitude_m is not None:
        if args.cruise_mach is None or args.cruise_altitude_m is None:
            raise UsageError("the cruise point needs both --cruise-mach and --cruise-altitude-m")
        if args.cruise_case is not None:
            cases(project, [args.cruise_case])
        cruise = (args.cruise_mach, args.cruise_altitude_m, args.cruise_case)
    try:
        result = sweep(project, variables, cruise=cruise, case_names=chosen, workers=args.workers,
                       scheduler=args.scheduler, progress=progress_printer("sweep"), timeout=args.timeout)
    except SchedulerError as exc:
        raise UsageError(str(exc)) from None
    except OSError as exc:
        if args.scheduler:
            raise UsageError(f"--scheduler {args.scheduler}: cannot use the cluster: {exc}") from None
        raise
    except KeyboardInterrupt:
        err("engine-air: sweep interrupted")
        return EXIT_UNUSABLE
    out(f"engine-air {__version__} sweep: {path_text(args.project)}")
    where = f"cluster {name(args.scheduler)}" if result.mode == "dask" else \
        f"{result.workers} local process(es)" if result.mode == "local" else "this process"
    out(f"  {len(result.rows)} variants x {result.grid_points} grid points x {result.cases} cases on {where} "
        f"in {result.seconds:.2f} s ({len(result.rows) / max(result.seconds, 1e-9):.1f} variants/s)")
    out()
    for line in format_rows(result, args.rows):
        out(name(line))
    if len(result.rows) > args.rows:
        out(f"... {len(result.rows) - args.rows} more rows" + (" in the CSV file" if args.csv else " (use --csv)"))
    if args.csv:
        try:
            write_sweep_csv(result, args.csv, inputs)
        except OSError as exc:
            raise write_error(args.csv, "CSV file", exc) from None
        out(f"wrote {len(result.rows)} rows to {path_text(args.csv)}")
    best = result.best()
    if best is not None:
        values = ", ".join(f"{n} = {v:.6g}" for n, v in zip(result.variables, best.values))
        out(f"best variant: {values} (worst relative margin {best.worst_relative_margin:+.4f}, {best.verdict})")
    holds, fails, invalid = result.count("holds"), result.count("fails"), result.count("invalid")
    out(f"VERDICT: {holds} of {len(result.rows)} variants hold every limit; {fails} fail"
        + (f"; {invalid} break a project rule" if invalid else "") + ".")
    return EXIT_HOLDS if result.holds else EXIT_FAILS
