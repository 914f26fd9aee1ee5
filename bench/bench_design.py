"""Benchmark of the design answers: sweep throughput, distributed/local ratio, sizing time.

    python bench/bench_design.py [--variants 16] [--no-dask]

Bounded in count and time: one sweep of ``--variants`` variants (at most 64) of a
sample project at its full grid, run in this process, on local processes (all
cores) and on a 2-worker dask LocalCluster on the loopback interface; then the
feasible range of the face area of each sample. Prints:

- variants per second for the in-process and the local-process sweep,
- the ratio of the distributed run's wall time to the local run's (same sweep),
- the time to refuse a sweep over the point-evaluation limit (1000 x 10 variants of the pitot sample; the size is
  checked before any work, goal: well under 1 s; tests/test_sweep.py checks the refusal, not its time),
- the sizing time per sample (goal: under a few seconds each, at most 10 s; tests/test_sizing.py checks the
  answer, not its time).

The process pool's first start (forkserver) is timed separately as warm-up.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from engine_air.project.errors import ProjectError  # noqa: E402
from engine_air.project import load_project  # noqa: E402
from engine_air.studies.sizing import feasible_range  # noqa: E402
from engine_air.studies.sweep import sweep  # noqa: E402

SAMPLES = ROOT / "sample_projects"


def _variables(project, n: int):
    k = max(1, int(round(math.sqrt(n))))
    m = max(1, n // k)
    a2 = project.inlet.face_area_m2
    k_duct = project.inlet.duct_loss_coefficient
    return {"face_area_m2": np.linspace(0.9 * a2, 1.2 * a2, k),
            "duct_loss_coefficient": np.linspace(0.5 * k_duct, 1.5 * k_duct, m)}


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--variants", type=int, default=16, help="variants in the sweep (4 to 64; default 16)")
    ap.add_argument("--no-dask", action="store_true", help="skip the distributed run")
    args = ap.parse_args(argv)
    n = min(64, max(4, args.variants))
    project = load_project(SAMPLES / "subsonic_transport_nacelle.toml")
    variables = _variables(project, n)
    count = math.prod(len(v) for v in variables.values())
    cells = project.grid.mach_points * project.grid.altitude_points * len(project.cases)
    print(f"sweep: {count} variants x {cells} case-points ({project.grid.mach_points} x "
          f"{project.grid.altitude_points} grid, {len(project.cases)} cases); {os.cpu_count()} cores")

    one = sweep(project, variables, workers=1)
    print(f"  in-process     {one.seconds:7.2f} s  {count / one.seconds:8.1f} variants/s")
    t0 = time.perf_counter()
    sweep(project, {"face_area_m2": [project.inlet.face_area_m2] * 2}, workers=2, chunk_size=1)  # warm-up
    warm = time.perf_counter() - t0
    local = sweep(project, variables)
    print(f"  local x{local.workers:<2}      {local.seconds:7.2f} s  {count / local.seconds:8.1f} variants/s "
          f"(pool warm-up {warm:.2f} s, not included)")
    assert [repr(r) for r in local.rows] == [repr(r) for r in one.rows]

    if not args.no_dask:
        try:
            from distributed import Client, LocalCluster
        except ImportError:
            print("  dask.distributed not installed: distributed run skipped")
        else:
            t0 = time.perf_counter()
            with LocalCluster(n_workers=2, threads_per_worker=1, host="127.0.0.1", dashboard_address=None,
                              processes=True) as cluster, Client(cluster, set_as_default=False) as client:
                start = time.perf_counter() - t0
                sweep(project, {"face_area_m2": [project.inlet.face_area_m2] * 2}, scheduler=client)  # warm-up
                dist = sweep(project, variables, scheduler=client)
            assert [repr(r) for r in dist.rows] == [repr(r) for r in one.rows]
            print(f"  dask 2 workers {dist.seconds:7.2f} s  {count / dist.seconds:8.1f} variants/s "
                  f"(cluster start {start:.2f} s, not included)")
            print(f"  distributed / local wall-time ratio: {dist.seconds / local.seconds:.2f}")

    t0 = time.perf_counter()
    try:
        sweep(project, {"face_area_m2": np.linspace(1, 3, 1000), "capture_area_m2": np.linspace(2.3, 3, 10)})
    except ProjectError:
        print(f"size check: 10 000-variant sweep refused in {1000 * (time.perf_counter() - t0):.1f} ms")
    else:
        print("size check: the 10 000-variant sweep was NOT refused")

    print("sizing (face_area_m2, default search range, 25 scan values):")
    for path in sorted(SAMPLES.glob("*.toml")):
        p = load_project(path)
        r = feasible_range(p, "face_area_m2")
        answer = ", ".join(f"{iv.lower.value:.4g}-{iv.upper.value:.4g}" for iv in r.intervals) or "empty"
        print(f"  {path.stem:<28} {r.seconds:6.2f} s  {r.evaluations:3d} envelope evaluations  range {answer}" + (" m^2" if r.intervals else ""))
    return 0


if __name__ == "__main__":
    sys.exit(main())
