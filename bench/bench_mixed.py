"""Benchmark: a mixed-compression map against the external-ramp map, 201 x 201 grid, 2 cases each.

    python bench/bench_mixed.py [--grid N] [--repeats R]

Prints the best-of-R time of ``evaluate_project`` for
- sample_projects/supersonic_two_ramp.toml (external-ramp, its two cases), and
- sample_projects/mixed_compression_throat_schedule.toml (mixed-compression with a throat schedule; a second
  case at ISA-15 is added so that both maps have 2 cases),
and their ratio (goal: mixed within 3x of external-ramp). Also the time of the started-state scan alone.
"""

from __future__ import annotations

import argparse
import dataclasses
import pathlib
import sys


ROOT = pathlib.Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from timing import best_time  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.envelope.polygon import grid_axes  # noqa: E402
from engine_air.inlets.mixed_compression import started_accelerating  # noqa: E402
from engine_air.project.model import Case, Grid  # noqa: E402
from engine_air.project.toml_file import load_project  # noqa: E402

GOAL = 3.0


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--grid", type=int, default=201)
    ap.add_argument("--repeats", type=int, default=5)
    args = ap.parse_args(argv)
    grid = Grid(mach_points=args.grid, altitude_points=args.grid)

    ramp = load_project(ROOT / "sample_projects" / "supersonic_two_ramp.toml")
    ramp = dataclasses.replace(ramp, grid=grid)
    mixed = load_project(ROOT / "sample_projects" / "mixed_compression_throat_schedule.toml")
    cold = Case(name="ISA-15, max", rating=mixed.cases[0].rating, isa_offset_K=-15.0)
    mixed = dataclasses.replace(mixed, grid=grid, cases=mixed.cases + (cold,))

    times = {}
    for label, project in (("external-ramp", ramp), ("mixed-compression", mixed)):
        evaluate_project(project)  # warm-up
        times[label] = best_time(lambda: evaluate_project(project), args.repeats)
        n = args.grid * args.grid * len(project.cases)
        print(f"{label:18s} {args.grid} x {args.grid} x {len(project.cases)} cases: {times[label] * 1e3:8.1f} ms "
              f"({n / times[label] / 1e6:.2f} M case-points/s)")
    mach_1d, _ = grid_axes(mixed.envelope, mixed.grid)
    t_scan = best_time(lambda: started_accelerating(mixed.inlet, mach_1d[None, :]), max(5, args.repeats))
    print(f"started-state scan alone (one Mach row of {mach_1d.size}): {t_scan * 1e3:.2f} ms")
    ratio = times["mixed-compression"] / times["external-ramp"]
    print(f"ratio mixed / external-ramp: {ratio:.2f} (goal <= {GOAL:g}): {'met' if ratio <= GOAL else 'NOT met'}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
