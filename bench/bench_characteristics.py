"""Benchmark: measured characteristics (method §17) against the model, one line per figure.

    python bench/bench_characteristics.py [PROJECT.toml] [--repeats R] [--mach M] [--altitude-m H]

(default: sample_projects/tunnel_data/two_ramp_with_tunnel_data.toml, its own 121 x 101 grid and 3 cases)

Prints:
1. the whole map over the characteristics table (``evaluate_project`` of the project as loaded) against the same
   map from the model (the same project without its table), best of R each, as a ratio (goal <= 2x);
2. a characteristic of 200 points at one Mach number in ms: the model's (``model_curve``), the chain's demand sweep
   matched on the data (``flow.chain.characteristic``), and the whole figure of the program
   (``characteristic_at``: the data curve, the model's beside it and every case's operating point), goal
   "interactive" (<= 100 ms, common practice for a response that feels immediate);
3. calibration against the table's zero-incidence rows (``studies.calibrate``), one parameter and two, in s.
"""

from __future__ import annotations

import argparse
import dataclasses
import pathlib
import sys
import time

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(HERE))

from timing import best_time  # noqa: E402
from engine_air.envelope.characteristic import SWEEP_POINTS, characteristic_at, demand_sweep, model_curve  # noqa: E402
from engine_air.envelope.evaluate import evaluate_project  # noqa: E402
from engine_air.flow.chain import characteristic  # noqa: E402
from engine_air.project import load_project  # noqa: E402

MAP_RATIO_GOAL = 2.0
INTERACTIVE_MS = 100.0


def _verdict(ok: bool) -> str:
    return "meets" if ok else "MISSES"


def bench_map(project, repeats: int) -> None:
    model = dataclasses.replace(project, characteristics=None)
    evaluate_project(project), evaluate_project(model)  # warm-up: imports, caches
    t_data = best_time(lambda: evaluate_project(project), repeats)
    t_model = best_time(lambda: evaluate_project(model), repeats)
    g = project.grid
    print(f"map over the characteristics table vs the same map from the model, {g.mach_points} x "
          f"{g.altitude_points} x {len(project.cases)} cases: data {1e3 * t_data:.1f} ms, model {1e3 * t_model:.1f} ms,"
          f" ratio {t_data / t_model:.2f}x  (goal <= {MAP_RATIO_GOAL:.0f}x: {_verdict(t_data / t_model <= MAP_RATIO_GOAL)})")


def bench_characteristic(project, mach: float, altitude: float, repeats: int) -> None:
    case = project.cases[0]
    wc2 = demand_sweep(project, SWEEP_POINTS)
    m, h = np.float64(mach), np.float64(altitude)
    figures = (
        ("model (model_curve)", lambda: model_curve(project, case, mach, altitude)),
        ("chain matched on the data (characteristic)", lambda: characteristic(project, case, m, h, wc2)),
        ("the program's figure (characteristic_at: data, model, operating points)",
         lambda: characteristic_at(project, case, mach, altitude)),
    )
    for label, fn in figures:
        fn()
        t = best_time(fn, repeats)
        print(f"characteristic of {SWEEP_POINTS} points at Mach {mach:g}, {label}: {1e3 * t:.1f} ms  "
              f"(goal interactive, <= {INTERACTIVE_MS:.0f} ms: {_verdict(1e3 * t <= INTERACTIVE_MS)})")


def bench_calibration(project) -> None:
    from engine_air.studies.calibrate import calibrate

    for keys in (["duct_loss_coefficient"], ["duct_loss_coefficient", "stable_flow_fraction"]):
        t = time.perf_counter()
        result = calibrate(project, project.characteristics.table, keys)
        seconds = time.perf_counter() - t
        fitted = ", ".join(f"{k} = {v:.4f} +- {e:.4f}" for k, (v, e) in result.fitted.items())
        print(f"calibration of {' and '.join(keys)} against {project.characteristics.table.rows} rows: "
              f"{seconds:.2f} s ({fitted}; rms residual {result.rms_residual:.4f})")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("project", nargs="?",
                    default=str(ROOT / "sample_projects" / "tunnel_data" / "two_ramp_with_tunnel_data.toml"))
    ap.add_argument("--repeats", type=int, default=7)
    ap.add_argument("--mach", type=float, default=1.7, help="Mach number of the characteristic (default 1.7)")
    ap.add_argument("--altitude-m", type=float, default=11000.0)
    args = ap.parse_args(argv)
    project = load_project(args.project)
    if project.characteristics is None:
        print(f"{args.project}: the project names no characteristics table", file=sys.stderr)
        return 2
    print(f"{args.project}: {project.characteristics.table.rows} rows, {project.characteristics.count} curves, "
          f"fraction grid of {len(project.characteristics.fraction_grid)} nodes")
    bench_map(project, args.repeats)
    bench_characteristic(project, args.mach, args.altitude_m, args.repeats)
    bench_calibration(project)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
