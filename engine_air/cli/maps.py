"""``engine-air map PROJECT [--case NAME] [--csv FILE] [--parquet FILE] [--png FILE]``: every grid point."""

from __future__ import annotations

import os

from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, UsageError, cases, check_output_path, load, name, out,
                                   path_text, recheck_outputs, with_tables, write_error)


def add_parser(sub) -> None:
    m = sub.add_parser("map", help="every grid point of every case as CSV and/or Parquet (and a PNG picture)")
    m.add_argument("project")
    m.add_argument("--case", action="append", help="case name (repeatable); default every case")
    m.add_argument("--csv", help="CSV file to write (one row per grid point and case)")
    m.add_argument("--parquet", help="Parquet file to write (the same columns as the CSV)")
    m.add_argument("--png", help="PNG picture of the map of --quantity to write")
    m.add_argument("--quantity", help="quantity drawn in the PNG; default the least margin over every limit "
                                      "(worst_relative_margin) when some limit fails, else the face Mach margin")
    m.set_defaults(handler=run)


def write_map_csv(result, path) -> int:
    """Every grid point of every case of ``result`` as CSV rows; returns the number of rows."""
    from engine_air.outputs.table import write_point_table

    return write_point_table(result, path, "csv")


def _csv_case_by_case(project, chosen, path, inputs) -> int:
    """``map --csv`` alone: each case evaluated, written and let go before the next (the memory of one case, not
    of all); the same rows as one evaluation of every case."""
    from engine_air.envelope.evaluate import check_grid_size, evaluate_project
    from engine_air.outputs.table import write_point_table

    names = chosen if chosen is not None else [c.name for c in project.cases]
    check_grid_size(project, len(names))
    holds = []

    def results():
        for case in names:
            r = evaluate_project(project, [case])
            holds.append(r.holds)
            yield r
            del r  # before the next case is evaluated
    try:
        rows = write_point_table(results(), path, "csv", inputs)
    except OSError as exc:
        raise write_error(path, "CSV file", exc) from None
    out(f"wrote {rows} rows to {path_text(path)}")
    return EXIT_HOLDS if all(holds) else EXIT_FAILS


def run(args) -> int:
    from engine_air.envelope.evaluate import evaluate_project
    from engine_air.outputs.quantities import QUANTITIES
    from engine_air.outputs.table import write_point_table

    if not (args.csv or args.parquet or args.png):
        raise UsageError("map: give at least one of --csv FILE, --parquet FILE, --png FILE")
    if args.quantity is not None and args.quantity not in QUANTITIES:
        raise UsageError(f"--quantity {args.quantity!r}: unknown quantity; choose from {', '.join(QUANTITIES)}")
    targets = [(opt, p) for opt, p in (("--csv", args.csv), ("--parquet", args.parquet), ("--png", args.png)) if p]
    inputs = (args.project,)  # every file this run reads
    for opt, p in targets:
        check_output_path(p, opt, inputs)
    if len({os.path.realpath(p) for _, p in targets}) < len(targets):
        raise UsageError("map: --csv, --parquet and --png must name different files")
    project = load(args.project)
    inputs = with_tables(inputs, project)  # its characteristics table is read too
    recheck_outputs(targets, inputs)
    chosen = cases(project, args.case)
    if args.csv and not (args.parquet or args.png):
        return _csv_case_by_case(project, chosen, args.csv, inputs)
    result = evaluate_project(project, chosen)
    if args.csv or args.parquet:
        for fmt, p in (("csv", args.csv), ("parquet", args.parquet)):
            if not p:
                continue
            try:
                rows = write_point_table(result, p, fmt, inputs)  # CSV batch by batch, never the whole table
            except OSError as exc:
                raise write_error(p, f"{fmt.upper() if fmt == 'csv' else 'Parquet'} file", exc) from None
            out(f"wrote {rows} rows to {path_text(p)}")
    if args.png:
        from engine_air.outputs.pictures import default_quantity, write_map_png

        quantity = args.quantity or default_quantity(result)
        try:
            pic = write_map_png(result, args.png, quantity, inputs=inputs)
        except OSError as exc:
            raise write_error(args.png, "PNG file", exc) from None
        out(f"wrote {path_text(args.png)} ({quantity}, {name(pic.case)}{'; ' + pic.note if pic.note else ''})")
    return EXIT_HOLDS if result.holds else EXIT_FAILS
