"""Make the invented characteristics table of ``two_ramp_with_tunnel_data.toml`` (run from the repo root).

Invented data, documented as such: no wind tunnel produced them. They come from engine_air's own model of the
two-ramp inlet of ``../supersonic_two_ramp.toml`` with *known* parameters that differ from the project's
(duct_loss_coefficient 0.07 instead of 0.04, stable_flow_fraction 0.80 instead of 0.65), sampled along each
characteristic at fractions 0.50-1.00 of the critical mass-flow ratio, then three supercritical points, plus
Gaussian noise of standard deviation 0.002 on recovery (seed 20261203). Two curves at 4 deg angle of attack have
their recovery lowered by an invented 0.6 % per degree. Face distortion is invented too: DC(60) = 0.08 +
0.30 (1 - f)^2 + 0.015 alpha (f = MFR/MFR_crit: more distortion as the inlet spills) and a loss of surge margin
of 0.25 DC(60), both with a little noise. A test calibrates the table back and must recover the known parameters
within the noise.

    python sample_projects/tunnel_data/make_tunnel_characteristics.py
"""

from __future__ import annotations

import dataclasses
import pathlib
import sys

import numpy as np

HERE = pathlib.Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent.parent))

TRUE_DUCT_LOSS = 0.07
TRUE_STABLE_FRACTION = 0.80
NOISE = 0.002
SEED = 20261203
MACHS = (0.6, 0.9, 1.3, 1.5, 1.7, 1.9, 2.1)
FRACTIONS = (0.50, 0.60, 0.70, 0.75, 0.80, 0.85, 0.90, 0.95, 1.00)
INCIDENCE = ((1.5, 4.0), (1.9, 4.0))  # (mach, alpha_deg)
LOSS_PER_DEG = 0.006


def rows(project, rng, rng_faces):
    from engine_air.envelope.characteristic import model_sweep, subcritical_branch

    true = dataclasses.replace(
        project, inlet=dataclasses.replace(project.inlet, duct_loss_coefficient=TRUE_DUCT_LOSS),
        limits=dataclasses.replace(project.limits, stable_flow_fraction=TRUE_STABLE_FRACTION))
    out = []
    curves = [(m, 0.0) for m in MACHS] + list(INCIDENCE)
    for mach, alpha in curves:
        x, y, top, crit = subcritical_branch(model_sweep(true, true.cases[0], mach, 11000.0))
        scale = 1.0 - LOSS_PER_DEG * alpha
        for f in FRACTIONS:
            rec = np.interp(f * top, x, y) * scale
            stable = 1 if (mach <= 1.0 or f >= TRUE_STABLE_FRACTION) else 0
            out.append((mach, alpha, f * top, rec + rng.normal(0.0, NOISE), stable, distortion(f, alpha, rng_faces)))
        if mach > 1.0:
            for drop in (0.97, 0.93, 0.88):  # supercritical: captured flow held, recovery falling
                out.append((mach, alpha, top, crit * scale * drop + rng.normal(0.0, NOISE), 1,
                            distortion(1.0, alpha, rng_faces, 0.1 * (1.0 - drop))))
    return out


def distortion(fraction, alpha, rng, supercritical=0.0):
    """(DC(60), loss of surge margin): invented, rising as the inlet spills, with incidence and supercritical."""
    dc60 = 0.08 + 0.30 * (1.0 - fraction) ** 2 + 0.015 * alpha + supercritical + rng.normal(0.0, 0.005)
    return dc60, 0.25 * dc60 + rng.normal(0.0, 0.002)


def main() -> None:
    from engine_air.project.toml_file import load_project

    project = load_project(HERE.parent / "supersonic_two_ramp.toml")
    rng = np.random.default_rng(SEED)
    lines = ["mach,alpha_deg,mass_flow_ratio,recovery,stable,dc60,surge_margin_loss"]
    for mach, alpha, mfr, rec, stable, (dc60, loss) in rows(project, rng, np.random.default_rng(SEED + 1)):
        lines.append(f"{mach:g},{alpha:g},{mfr:.5f},{min(rec, 1.0):.5f},{stable},{dc60:.4f},{loss:.4f}")
    (HERE / "tunnel_characteristics.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
