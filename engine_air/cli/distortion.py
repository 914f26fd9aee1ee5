"""``engine-air distortion RAKES [--project P --rating R] [--sector-deg 60] [--json] [--csv FILE] [--png FILE]
[--characteristics-out FILE]``: engine-face distortion descriptors of a rake file (method §18).

Descriptors after SAE ARP1420 and the stack-up after SAE AIR1419, recalled in method §18, not copied from the
documents. Exit codes: 0 every limit the project sets (``dc60_max``, ``surge_margin_min``) holds at every
judged point (or none is set), 1 some limit fails, 2 the rake file, the project or an option is unusable.
"""

from __future__ import annotations

import json
import math
import sys

from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, UsageError, check_input_path, check_output_path, fmt,
                                   load, name, out, write_error)

EPILOG = ("exit codes: 0 the project's distortion limits (dc60_max, surge_margin_min) hold at every judged point, "
          "or none is set; 1 some limit fails; 2 unusable input. DC(60) needs the rake file's face_mach column; the "
          "surge margin needs --project with an [engine.rating.stability] table. Descriptors after SAE ARP1420 and "
          "stack-up after SAE AIR1419, recalled in method section 18, not copied: check them against the documents.")


def add_parser(sub) -> None:
    q = sub.add_parser("distortion", help="engine-face distortion descriptors of a rake file", epilog=EPILOG)
    q.add_argument("rakes", help="rake file, CSV or Parquet: point, ring, angle_deg, total_pressure_pa, ...")
    q.add_argument("--project", help="project file: its distortion limits and a rating's surge-margin stack-up")
    q.add_argument("--rating", help="rating whose [engine.rating.stability] to use; default the first that has one")
    q.add_argument("--sector-deg", type=float, default=60.0, help="sector width of DC(theta), degrees (default 60)")
    q.add_argument("--json", action="store_true", help="write the results as JSON on stdout")
    q.add_argument("--csv", help="write one row per point and ring to this CSV file")
    q.add_argument("--png", help="draw the face pictures (and the stack-up) to this PNG file")
    q.add_argument("--characteristics-out", help="write the rake set as characteristics-table rows (CSV)")
    q.set_defaults(handler=run)


def _summary(assessment) -> None:
    d = assessment.descriptors
    out(f"rakes: {name(d.rakes.path)}: {d.rakes.points} points; DC({d.sector_deg:g}) sector")
    if assessment.rating is not None:
        s = assessment.stability
        out(f"stack-up of rating {name(repr(assessment.rating))}: available {s.available_surge_margin:g}, other items "
            + (", ".join(f"{name(n)} {v:g}" for n, v in s.other_losses) or "none"))
    shown = min(d.rakes.points, 20)
    out(f"{'point':<20} {'PFAV Pa':>12} {'DC60':>8} {'dPRS':>8} {'remaining':>10}")
    dc60 = d.per_point("dc60")
    face = d.per_point("face_average_pa")
    for k in range(shown):
        out(f"{name(d.rakes.labels[k])[:20]:<20} {face[k]:>12.1f} {fmt(dc60[k]):>8} "
            f"{fmt(assessment.surge_margin_loss[k]):>8} {fmt(assessment.remaining_surge_margin[k]):>10}")
    if d.rakes.points > shown:
        out(f"... and {d.rakes.points - shown} more points (--json or --csv for all)")
    for v in assessment.verdicts:
        verdict = {None: "not judged (no point gives the value)", True: "holds", False: "FAILS"}[v.holds]
        out(f"{v.name}: {v.limit_text}: {verdict}" + (f" at {int(v.fails.sum())} of {int(v.judged.sum())} judged "
                                                      "points" if v.holds is False else ""))


def _write(args, assessment) -> None:
    from engine_air.distortion.report import characteristics_columns, ring_table_columns
    from engine_air.outputs.table import write_table

    if args.csv:
        try:
            write_table(ring_table_columns(assessment), args.csv)
        except OSError as exc:
            raise write_error(args.csv, "ring table", exc) from exc
    if args.characteristics_out:
        columns = characteristics_columns(assessment)
        try:
            write_table(columns, args.characteristics_out)
        except OSError as exc:
            raise write_error(args.characteristics_out, "characteristics table", exc) from exc
    if args.png:
        from engine_air.distortion.pictures import write_distortion_png

        try:
            write_distortion_png(assessment, args.png, _minimum(args))
        except OSError as exc:
            raise write_error(args.png, "picture", exc) from exc


def _minimum(args):
    project = getattr(args, "loaded_project", None)
    return None if project is None else project.limits.surge_margin_min


def run(args) -> int:
    from engine_air.distortion.assessment import assess
    from engine_air.distortion.descriptors import reduce_rakes
    from engine_air.distortion.rake import read_rake_set
    from engine_air.distortion.report import distortion_record

    if not math.isfinite(args.sector_deg) or not 0.0 < args.sector_deg < 360.0:
        raise UsageError(f"--sector-deg {args.sector_deg}: must be between 0 and 360 degrees")
    if args.rating is not None and args.project is None:
        raise UsageError("--rating needs --project (the rating's stability table is in the project file)")
    check_input_path(args.rakes, "rakes")
    for option in ("csv", "png", "characteristics_out"):
        if getattr(args, option):
            check_output_path(getattr(args, option), "--" + option.replace("_", "-"))
    project = load(args.project) if args.project is not None else None
    args.loaded_project = project
    rakes = read_rake_set(args.rakes)
    assessment = assess(reduce_rakes(rakes, args.sector_deg), project, args.rating, args.project)
    _write(args, assessment)
    if args.json:
        json.dump(distortion_record(assessment), sys.stdout, indent=2, allow_nan=False)
        sys.stdout.write("\n")
    else:
        _summary(assessment)
    return EXIT_FAILS if assessment.holds is False else EXIT_HOLDS
