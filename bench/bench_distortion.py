"""Distortion reduction speed: 10 000 rake points of 40 probes (5 rings x 8), reduced against reading the file.

Writes an invented rake file (CSV, and Parquet with --parquet) into a temporary folder, then prints the best of
several runs of: reading and checking the file (``read_rake_set``), and reducing every point (``reduce_rakes``:
ring averages, low arcs, intensities, DC(60) by exact sector search) and the stack-up. Goal: reduction <= read.

    python bench/bench_distortion.py [--points 10000] [--repeats 3] [--parquet]
"""

from __future__ import annotations

import argparse
import sys
import tempfile
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from bench.timing import best_time  # noqa: E402
from engine_air.distortion import read_rake_set, reduce_rakes  # noqa: E402
from engine_air.distortion.stack_up import build_stack_up  # noqa: E402
from engine_air.project.model import Stability  # noqa: E402

RINGS, PROBES = 5, 8


def write_rakes(folder: Path, points: int, parquet: bool) -> Path:
    rng = np.random.default_rng(1)
    angle = np.tile(np.arange(PROBES) * 45.0, points * RINGS)
    ring = np.tile(np.repeat(np.arange(1, RINGS + 1), PROBES), points)
    label = np.repeat(np.array([f"P{k:05d}" for k in range(points)], dtype=object), RINGS * PROBES)
    pressure = 90000.0 * (1.0 + 0.03 * rng.standard_normal(points * RINGS * PROBES))
    face_mach = np.repeat(rng.uniform(0.4, 0.6, points), RINGS * PROBES)
    if parquet:
        import pyarrow as pa
        import pyarrow.parquet as pq

        path = folder / "rakes.parquet"
        pq.write_table(pa.table({"point": label.tolist(), "ring": ring, "angle_deg": angle,
                                 "total_pressure_pa": pressure, "face_mach": face_mach}), path)
        return path
    path = folder / "rakes.csv"
    with path.open("w", encoding="utf-8") as f:
        f.write("point,ring,angle_deg,total_pressure_pa,face_mach\n")
        f.writelines(f"{a},{b},{c:g},{d:.2f},{e:.4f}\n" for a, b, c, d, e in zip(label, ring, angle, pressure, face_mach))
    return path


def main() -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--points", type=int, default=10_000)
    p.add_argument("--repeats", type=int, default=3)
    p.add_argument("--parquet", action="store_true")
    args = p.parse_args()
    stability = Stability(0.2, (1.2, 1.0, 0.9, 0.8, 0.7), (0.3, 0.2, 0.1, 0.2, 0.4), (("tolerances", 0.04),))
    with tempfile.TemporaryDirectory() as tmp:
        path = write_rakes(Path(tmp), args.points, args.parquet)
        size = path.stat().st_size
        rakes = read_rake_set(path)
        t_read = best_time(lambda: read_rake_set(path), args.repeats)

        def reduce():
            d = reduce_rakes(rakes)
            for g in d.groups:
                build_stack_up(stability, g.circumferential_intensity, g.radial_intensity)

        t_reduce = best_time(reduce, args.repeats)
    n = args.points * RINGS * PROBES
    print(f"{args.points} points x {RINGS * PROBES} probes ({n} rows, {'Parquet' if args.parquet else 'CSV'}, "
          f"{size / 1e6:.1f} MB)")
    print(f"read and check the file: {t_read:8.3f} s  ({n / t_read / 1e6:.2f} M rows/s)")
    print(f"reduce every point:      {t_reduce:8.3f} s  ({args.points / t_reduce:,.0f} points/s)")
    print(f"reduction / read: {t_reduce / t_read:.2f} (goal <= 1)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
