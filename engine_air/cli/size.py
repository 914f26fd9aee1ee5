"""``engine-air size PROJECT --variable V [--lower L] [--upper U] ...``: feasible range and an optimum."""

from __future__ import annotations

from engine_air import __version__
from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, UsageError, cases, finite, load, name, out, path_text,
                                   progress_printer)

SIZE_OBJECTIVES = ("spillage_fraction", "additive_drag_coefficient", "spillage_drag_coefficient", "-worst_margin",
                   "max_worst_margin")


def add_parser(sub) -> None:
    z = sub.add_parser("size", help="feasible range of one design variable, and an optimum inside it")
    z.add_argument("project")
    z.add_argument("--variable", required=True,
                   help="capture_area_m2, throat_area_m2, face_area_m2, duct_loss_coefficient, "
                        "ramp_angles_deg[k] (k from 1), shock_on_lip_mach, bleed_fraction, bypass_area_m2, "
                        "auxiliary_inlet_area_m2, schedule.KEY[i] (row i from 1; KEY throat_area_m2, "
                        "shock_on_lip_mach, bleed_fraction), schedule.ramp_angles_deg[i][k]")
    z.add_argument("--lower", type=float, help="lower end of the search range (the variable's SI unit)")
    z.add_argument("--upper", type=float, help="upper end of the search range")
    z.add_argument("--scan", type=int, default=25, help="values scanned before refining (3 to 201; default 25)")
    z.add_argument("--case", action="append", help="case name (repeatable); default every case")
    z.add_argument("--limits", metavar="NAME[,NAME...]",
                   help="judge only these checks (names as in point --json checks[].name, e.g. face-mach,stability); "
                        "default every check of the project")
    z.add_argument("--objective", choices=SIZE_OBJECTIVES,
                   help="figure to minimise in the feasible range; write --objective=-worst_margin (or "
                        "max_worst_margin) to maximise the worst relative margin")
    z.add_argument("--at-mach", type=float, help="flight Mach number of the point objective")
    z.add_argument("--at-altitude-m", type=float, help="geopotential altitude of the point objective, m")
    z.add_argument("--at-case", help="case of the point objective; default the first case")
    z.set_defaults(handler=run)


def run(args) -> int:
    from engine_air.studies.sizing import feasible_range, optimise

    for option, value in (("--lower", args.lower), ("--upper", args.upper), ("--at-mach", args.at_mach),
                          ("--at-altitude-m", args.at_altitude_m)):
        finite(value, option)
    project = load(args.project)
    chosen = cases(project, args.case)
    limits = _limits(project, args.limits)
    objective = "-worst_margin" if args.objective == "max_worst_margin" else args.objective
    at = None
    if objective is not None and objective != "-worst_margin":
        if args.at_mach is None or args.at_altitude_m is None:
            raise UsageError(f"--objective {objective} needs the point: --at-mach M --at-altitude-m H [--at-case C]")
        if args.at_case is not None:
            cases(project, [args.at_case])
        at = (args.at_mach, args.at_altitude_m, args.at_case)
    elif args.at_mach is not None or args.at_altitude_m is not None or args.at_case is not None:
        raise UsageError("--at-mach/--at-altitude-m/--at-case go with a point --objective "
                         "(spillage_fraction, additive_drag_coefficient, spillage_drag_coefficient)")
    out(f"engine-air {__version__} size: {path_text(args.project)}")
    result = feasible_range(project, args.variable, args.lower, args.upper, scan_points=args.scan,
                            case_names=chosen, limits=limits, progress=progress_printer("size"))
    for line in result.describe():
        out(name(line))
    if not result.feasible:
        out("ANSWER: the feasible range is EMPTY.")
        return EXIT_FAILS
    if objective is None:
        ranges = ", ".join(f"{iv.lower.value:.6g} to {iv.upper.value:.6g}" for iv in result.intervals)
        out(f"ANSWER: {name(args.variable)} feasible from {ranges} {result.unit}".rstrip() + ".")
        return EXIT_HOLDS
    best = optimise(project, args.variable, objective, at=at, within=result, case_names=chosen, limits=limits)
    for line in best.describe():
        out(name(line))
    if best.value is None:
        return EXIT_FAILS
    out(f"ANSWER: {name(args.variable)} = {best.value:.6g} {result.unit}".rstrip() + ".")
    return EXIT_HOLDS


def _limits(project, text: str | None) -> tuple[str, ...] | None:
    """The checks named by ``--limits`` (comma-separated); UsageError naming the project's checks otherwise."""
    from engine_air.studies.sizing import project_check_names

    if text is None:
        return None
    names = tuple(dict.fromkeys(n.strip() for n in text.split(",") if n.strip()))
    allowed = project_check_names(project)
    listing = ", ".join(allowed)
    if not names:
        raise UsageError(f"--limits {name(repr(text))}: name at least one check; this project's checks are: {listing}")
    unknown = [n for n in names if n not in allowed]
    if unknown:
        raise UsageError(f"--limits {name(', '.join(unknown))}: not a check of this project; its checks are: "
                         f"{listing}")
    return names
