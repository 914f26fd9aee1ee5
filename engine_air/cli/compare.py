"""``engine-air compare A B [--csv FILE] [--grid-from a|b|union]``: both verdicts and the differences B - A."""

from __future__ import annotations

import math

from engine_air import __version__
from engine_air.cli.common import (EXIT_FAILS, EXIT_HOLDS, check_output_path, fmt, load, name, out, path_text,
                                   write_error, recheck_outputs, with_tables)


def add_parser(sub) -> None:
    k = sub.add_parser("compare", help="two projects on one grid: both verdicts and the differences B - A")
    k.add_argument("a", metavar="A")
    k.add_argument("b", metavar="B")
    k.add_argument("--csv", help="CSV file of every common grid point: A, B and B - A per quantity")
    k.add_argument("--grid-from", choices=("a", "b", "union"), default="a",
                   help="whose grid to use: a (default), b, or union of both envelopes")
    k.set_defaults(handler=run)


SHOWN = ("worst_relative_margin", "face_mach_margin", "recovery", "spillage_fraction")


def run(args) -> int:
    from engine_air.envelope.evaluate import WORST
    from engine_air.outputs.quantities import QUANTITIES
    from engine_air.studies.compare import compare_projects, write_compare_csv

    inputs = (args.a, args.b)  # every file this run reads
    if args.csv:
        check_output_path(args.csv, "--csv", inputs)
    a = load(args.a, "A")
    b = load(args.b, "B")
    inputs = with_tables(inputs, a, b)
    recheck_outputs([("--csv", args.csv)], inputs)
    c = compare_projects(a, b, grid_from=args.grid_from)
    out(f"engine-air {__version__} compare: A = {path_text(args.a)}, B = {path_text(args.b)}")
    out(f"  grid from {args.grid_from}: {len(c.mach)} Mach x {len(c.altitude_m)} altitude; "
        f"{int(c.both.sum())} points inside both envelopes (A {int(c.inside_a.sum())}, B {int(c.inside_b.sum())})")
    out(f"  cases compared: {name(', '.join(c.cases))}; differences only where both projects judge the point "
        "(inside both envelopes and the case's region); drags in newtons")
    if c.only_a:
        out(f"  cases only in A: {name(', '.join(c.only_a))}")
    if c.only_b:
        out(f"  cases only in B: {name(', '.join(c.only_b))}")
    out()
    head = f"{'limit':<40} {'A':<6} {'A margin':>9} {'B':<6} {'B margin':>9}  change"
    out(head)
    out("-" * len(head))
    for row in c.verdicts:
        va = "-" if row.a is None else row.a.verdict
        vb = "-" if row.b is None else row.b.verdict
        ma = None if row.a is None else row.a.worst_margin
        mb = None if row.b is None else row.b.worst_margin
        out(f"{row.label[:40]:<40} {va:<6} {fmt(ma):>9} {vb:<6} {fmt(mb):>9}  {row.change}")
    out()
    head = f"{'difference B - A':<34} {'case':<24} {'min':>9} {'max':>9} {'max |d| at Mach, alt m':>24}"
    out(head)
    out("-" * len(head))
    for s in c.stats:
        if s.case != WORST and s.quantity not in SHOWN:
            continue
        where = "-" if not (math.isfinite(s.max_abs_mach) and s.max_abs > 0) else \
            f"{s.max_abs_mach:.3f}, {s.max_abs_altitude_m:.0f}"
        out(f"{QUANTITIES[s.quantity].label[:34]:<34} {name(s.case[:24]):<24} {fmt(s.min):>9} {fmt(s.max):>9} "
            f"{where:>24}")
    if c.has_data:
        _data_region(c)
    if args.csv:
        try:
            rows = write_compare_csv(c, args.csv, inputs=inputs)
        except OSError as exc:
            raise write_error(args.csv, "CSV file", exc) from None
        out(f"\nwrote {rows} rows to {path_text(args.csv)}")
    both = c.holds_a and c.holds_b
    out(f"\nVERDICT: A {'holds' if c.holds_a else 'FAILS'}, B {'holds' if c.holds_b else 'FAILS'}"
        + (" (identical results)." if c.identical else "."))
    return EXIT_HOLDS if both else EXIT_FAILS


def _table_name(project) -> str:
    return "none" if project.characteristics is None else name(project.characteristics_file or "(in memory)")


def _data_region(c) -> None:
    """The differences where a characteristics table decides the match (method §17) in A or B."""
    from engine_air.envelope.evaluate import WORST
    from engine_air.outputs.quantities import QUANTITIES

    region = c.data_region(WORST)
    out()
    out(f"characteristics tables: A {_table_name(c.a)}, B {_table_name(c.b)}; {int(region.sum())} of "
        f"{int(c.judged_both(WORST).sum())} points both judge are from data in A or B (flag from-data)")
    head = f"{'difference B - A, from-data points':<34} {'case':<24} {'min':>9} {'max':>9} {'max |d| at Mach, alt m':>24}"
    out(head)
    out("-" * len(head))
    for case in c.cases:
        for key in SHOWN:
            s = c.data_stat(case, key)
            where = "-" if not (math.isfinite(s.max_abs_mach) and s.max_abs > 0) else \
                f"{s.max_abs_mach:.3f}, {s.max_abs_altitude_m:.0f}"
            out(f"{QUANTITIES[key].label[:34]:<34} {name(case[:24]):<24} {fmt(s.min):>9} {fmt(s.max):>9} {where:>24}")
