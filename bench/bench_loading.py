"""Benchmark of the project loader on the largest inputs its rules allow.

    python bench/bench_loading.py [--repeats 3]

Prints, best of ``--repeats`` runs each (the tests check only that these files load, not how fast):

- the worst file of dotted keys: 1 MiB (``MAX_FILE_BYTES``) of keys of ``MAX_KEY_PARTS`` parts each, ahead of the
  pitot sample (tests/test_bad_files.py, ``test_worst_file_of_dotted_keys_loads``; goal: well under 10 s);
- the largest envelope: ``MAX_ENVELOPE_VERTICES`` vertices on a circle, whose self-crossing test is quadratic
  (tests/test_bad_files.py, ``test_largest_envelope_loads_quickly``; goal: well under a second);
- the three samples, for scale.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from pathlib import Path

import numpy as np
import tomli_w

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from timing import best_time  # noqa: E402
from engine_air.project import toml_file as pf  # noqa: E402
from engine_air.project.errors import ProjectError  # noqa: E402
from engine_air.project.load import tomllib  # noqa: E402  (tomli on Python 3.10)

SAMPLES = ROOT / "sample_projects"
PITOT = SAMPLES / "subsonic_transport_nacelle.toml"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=3, help="runs of each load, best kept (1 to 10; default 3)")
    args = ap.parse_args(argv)
    repeats = min(10, max(1, args.repeats))
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        # the same file as test_worst_file_of_dotted_keys_loads
        key = ".".join(["d"] * (pf.MAX_KEY_PARTS - 1))
        lines = [f"{key}.k{i} = 1" for i in range((pf.MAX_FILE_BYTES - 4096) // (2 * pf.MAX_KEY_PARTS + 12))]
        dotted = tmp / "dotted.toml"
        dotted.write_text("\n".join(lines) + "\n" + PITOT.read_text(encoding="utf-8"), encoding="utf-8")
        def parse_and_refuse():  # unknown keys are errors: the time is the parse and the refusal
            try:
                pf.load_project(dotted)
            except ProjectError:
                pass

        t = best_time(parse_and_refuse, repeats)
        print(f"worst dotted-key file   {os.path.getsize(dotted) / 1024:7.0f} KiB  {len(lines):6d} keys of "
              f"{pf.MAX_KEY_PARTS} parts  parsed and refused {t:7.3f} s")

        # the same envelope as test_largest_envelope_loads_quickly
        n = pf.MAX_ENVELOPE_VERTICES
        a = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
        with open(PITOT, "rb") as f:
            data = tomllib.load(f)
        data["envelope"] = {"mach": list(0.5 + 0.3 * np.cos(a)), "altitude_m": list(6000.0 + 5000.0 * np.sin(a))}
        circle = tmp / "circle.toml"
        circle.write_text(tomli_w.dumps(data), encoding="utf-8")
        t = best_time(lambda: pf.load_project(circle), repeats)
        print(f"largest envelope        {n:7d} vertices                       load {t:7.3f} s")

    for path in sorted(SAMPLES.glob("*.toml")):
        t = best_time(lambda: pf.load_project(path), repeats)
        print(f"sample {path.stem:<28}                          load {t:7.3f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
