"""``engine-air check PROJECT [--case NAME] [--units si|us]``: the review verdict, limit by limit."""

from __future__ import annotations

from engine_air import __version__
from engine_air.cli.common import EXIT_FAILS, EXIT_HOLDS, FT, cases, fmt, load, name, out, path_text


def add_parser(sub) -> None:
    c = sub.add_parser("check", help="review verdict: each limit holds or fails, worst value and where")
    c.add_argument("project")
    c.add_argument("--case", action="append", help="case name (repeatable); default every case")
    c.add_argument("--units", choices=("si", "us"), default="si",
                   help="units of the text: si (m, default) or us (altitude in ft)")
    c.set_defaults(handler=run)


def run(args) -> int:
    from engine_air.envelope.evaluate import evaluate_project, not_judged_reason, verdict_text
    from engine_air.envelope.explain import mechanism
    from engine_air.envelope.ranking import nearest_index
    from engine_air.flow.match import REGIMES

    project = load(args.project)
    result = evaluate_project(project, cases(project, args.case))
    us = args.units == "us"
    alt_unit, alt_scale = ("ft", 1.0 / FT) if us else ("m", 1.0)
    inside = int(result.inside.sum())
    out(f"engine-air {__version__} check: {path_text(args.project)}")
    if project.title:
        out(f"  {name(project.title)}")
    out(f"  cases: {name(', '.join(c.name for c in result.cases))}")
    out(f"  grid {len(result.mach)} Mach x {len(result.altitude_m)} altitude, {inside} points inside the envelope "
        f"per case" + ("; altitudes in feet" if us else ""))
    out()
    header = (f"{'limit':<40} {'criterion':<28} {'verdict':<7} {'worst':>8} {'margin':>8} {'Mach':>6} "
              f"{'alt ' + alt_unit:>7}  {'fails':>6}  case")
    out(header)
    out("-" * len(header))
    failing = []
    for s in result.summary:
        if not s.judged:
            out(f"{s.label:<40} {s.limit_text:<28} {s.verdict}: {not_judged_reason(project, s)}")
            continue
        out(
            f"{s.label:<40} {s.limit_text:<28} {s.verdict:<7} {fmt(s.worst_value):>8} "
            f"{fmt(s.worst_margin):>8} {fmt(s.worst_mach, 3):>6} {fmt(s.worst_altitude_m * alt_scale, 0):>7}  "
            f"{100 * s.failing_share:5.1f}%  {name(s.worst_case)}"
        )
        if s.fails:
            failing.append(s)
    out()
    for s in failing:
        points = result.case_map(s.worst_case).points
        j = nearest_index(result.mach, result.altitude_m, s.worst_mach, s.worst_altitude_m)
        regime = REGIMES[int(points.regime[j])]
        out(f"{s.label}: worst at Mach {s.worst_mach:.3f}, {s.worst_altitude_m * alt_scale:.0f} {alt_unit}, "
            f"case {name(repr(s.worst_case))}, {regime} operation: {mechanism(project, points, j, s.name, args.units)}.")
    if failing:
        out("\nVERDICT: " + verdict_text(result))
        return EXIT_FAILS
    out("VERDICT: " + verdict_text(result))
    return EXIT_HOLDS
