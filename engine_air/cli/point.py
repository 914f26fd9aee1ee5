"""``engine-air point PROJECT --mach M (--altitude-m H | --altitude-ft H | --fl FL) [--case NAME] [--units us]``.

Exit codes: 0 every limit judged at the point holds, 1 some limit fails, 2 the
input is unusable or the point lies outside the atmosphere model (nothing can be
computed), 3 the point is *not judged*: it lies outside the envelope polygon (or
no limit applies there); it is still computed and written, with ``holds: null``.
A point inside the envelope but outside its case's region (``mach_range``,
``altitude_range_m``) is not judged either, and exits 0: the case does not apply
there.
"""

from __future__ import annotations

import json
import math
import sys

from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, EXIT_NOT_JUDGED, EXIT_UNUSABLE, FT, UsageError, cases,
                                   err, load, name)

EPILOG = ("exit codes: 0 every limit holds at the point; 1 some limit fails; 2 unusable input, or a point outside the "
          "atmosphere model; 3 not judged: the point lies outside the envelope polygon (it is computed and written "
          "with \"holds\": null and \"judged\": false); a point inside the envelope but outside its case's region is not "
          "judged either and exits 0. Altitude: --altitude-m (geopotential pressure altitude, m), "
          "--altitude-ft (ft) or --fl (flight level, hundreds of feet: FL350 = 35 000 ft).")


def add_parser(sub) -> None:
    q = sub.add_parser("point", help="one flight condition, station by station", epilog=EPILOG)
    q.add_argument("project")
    q.add_argument("--mach", type=float, required=True)
    add_altitude_options(q)
    q.add_argument("--case", help="case name; default the first case")
    q.add_argument("--json", action="store_true", help="write JSON (the default and only format)")
    q.add_argument("--units", choices=("si", "us"), default="si",
                   help="us: the JSON keeps its SI keys and values and adds \"units\": \"us\" and a \"us\" block: "
                        "every dimensional value in US customary units, as {\"value\": ..., \"unit\": ...}")
    q.set_defaults(handler=run)


def add_altitude_options(parser) -> None:
    """--altitude-m | --altitude-ft | --fl, one of them required (read back by ``altitude_m``)."""
    alt = parser.add_mutually_exclusive_group(required=True)
    alt.add_argument("--altitude-m", type=float, help="geopotential pressure altitude, m")
    alt.add_argument("--altitude-ft", type=float, help="geopotential pressure altitude, ft")
    alt.add_argument("--fl", type=float, help="flight level: pressure altitude in hundreds of feet (350 = 35 000 ft)")


def altitude_m(args) -> float:
    """The altitude option in metres (the one given of --altitude-m, --altitude-ft, --fl)."""
    if args.altitude_m is not None:
        value, option = args.altitude_m, "--altitude-m"
        metres = value
    elif args.altitude_ft is not None:
        value, option = args.altitude_ft, "--altitude-ft"
        metres = value * FT
    else:
        value, option = args.fl, "--fl"
        metres = value * 100.0 * FT
    if not math.isfinite(value):
        raise UsageError(f"{option} {value}: must be a finite number")
    return metres


def run(args) -> int:
    from engine_air.envelope import flags as F
    from engine_air.outputs.point import evaluate_point
    from engine_air.outputs.point_record import record_in_us_units

    if not math.isfinite(args.mach):
        raise UsageError(f"--mach {args.mach}: must be a finite number")
    if args.mach < 0:
        raise UsageError(f"--mach {args.mach}: must be 0 or more")
    alt = altitude_m(args)
    project = load(args.project)
    if args.case is None:
        case = project.cases[0]
    else:
        cases(project, [args.case])
        case = project.case(args.case)
    record = evaluate_point(project, args.mach, alt, case.name)
    if args.units == "us":
        record = record_in_us_units(record)
    json.dump(record, sys.stdout, indent=2, allow_nan=False)
    sys.stdout.write("\n")
    where = f"Mach {args.mach:g}, {alt:g} m" + (f" ({alt / FT:g} ft)" if args.units == "us" else "")
    if "outside-atmosphere" in record["flags"]:
        err(f"engine-air: no limit can be judged at {where}: {F.DESCRIPTIONS['outside-atmosphere']}")
        return EXIT_UNUSABLE
    if record["holds"] is None and "outside-case-region" in record["flags"] and \
            "outside-envelope" not in record["flags"]:
        return EXIT_HOLDS  # computed, not judged: the case does not apply here (method section 14)
    if record["holds"] is None:
        reasons = [F.DESCRIPTIONS[n] for n in record["flags"] if n == "outside-envelope"] or \
            ["no limit applies at this point"]
        err(f"engine-air: not judged at {where}, case {name(repr(case.name))}: " + "; ".join(reasons))
        return EXIT_NOT_JUDGED
    return EXIT_HOLDS if record["holds"] else EXIT_FAILS
