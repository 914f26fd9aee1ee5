"""Calibrating model parameters against measured characteristics (method §17).

Least squares (``scipy.optimize.least_squares``) of chosen model parameters against the zero-incidence rows of
the project's characteristics table:

- recovery residuals: for each subcritical or critical row (MFR within the curve's critical band or below it),
  measured π less the model's π at the same flight Mach and MFR (the model's characteristic, §16, interpolated
  along its subcritical branch; altitude does not enter, §16);
- stability residuals, when ``stable_flow_fraction`` is fitted: each curve's measured stability limit less the
  model's stable_flow_fraction·MFR_max.

Each fitted value's standard error comes from the Jacobian at the solution: cov = s²·(JᵀJ)⁻¹ with
s² = Σr²/(m − n) (the usual linearised estimate; Press et al., Numerical Recipes, §15.5). The residual per curve is
the root mean square of that curve's recovery residuals.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from engine_air.characteristics.curves import CRITICAL_BAND
from engine_air.project.errors import ProjectError

FITTABLE = {
    # key: (where, low, high)
    "duct_loss_coefficient": ("inlet", 0.0, 2.0),
    "internal_recovery_factor": ("inlet", 0.5, 1.0),
    "stable_flow_fraction": ("limits", 0.05, 1.0),
}
CALIBRATION_ALTITUDE_M = 11000.0
SWEEP_POINTS = 160


@dataclass
class Calibration:
    fitted: dict[str, tuple[float, float]]  # key -> (value, standard error)
    rms_residual: float
    curves: list[dict]  # mach, alpha_deg, beta_deg, rms_residual
    project: object  # the calibrated Project
    measured: list[tuple[np.ndarray, np.ndarray, np.ndarray]]  # per curve: mach, mfr, measured recovery
    fitted_model: list[tuple[np.ndarray, np.ndarray]]  # per curve: the fitted model's mfr, recovery

    def as_json(self) -> dict:
        return {
            "fitted": {k: {"value": v, "standard_error": (None if not np.isfinite(e) else e)}
                       for k, (v, e) in self.fitted.items()},
            "rms_residual": self.rms_residual,
            "curves": self.curves,
        }


def _with(project, keys, values):
    inlet, limits = {}, {}
    for key, value in zip(keys, values):
        (inlet if FITTABLE[key][0] == "inlet" else limits)[key] = float(value)
    return dataclasses.replace(project, inlet=dataclasses.replace(project.inlet, **inlet),
                               limits=dataclasses.replace(project.limits, **limits))


def _model_at(project, case, mach, mfr):
    """The model's π at each (mach, mfr) along the subcritical branch, and its MFR_max at each Mach."""
    from engine_air.envelope.characteristic import model_sweep, subcritical_branch

    rec = np.full(len(mach), np.nan)
    mfr_max = {}
    for m in np.unique(mach):  # one sweep per tested Mach (a handful of columns)
        x, y, top, _ = subcritical_branch(model_sweep(project, case, float(m), CALIBRATION_ALTITUDE_M, SWEEP_POINTS))
        sel = mach == m
        # a row within the critical band above the model's MFR_max is read at the critical point
        rec[sel] = np.where(mfr[sel] <= top * (1.0 + CRITICAL_BAND), np.interp(mfr[sel], x, y, left=np.nan), np.nan)
        mfr_max[float(m)] = top
    return rec, mfr_max


def _rows(table, curves):
    """Zero-incidence rows on the subcritical branch or at the critical point, with their curve index."""
    keep, which = [], []
    mfr, rec = table.column("mass_flow_ratio"), table.column("recovery")
    for i, idx in enumerate(curves.rows):
        if curves.alpha_deg[i] != 0.0 or curves.beta_deg[i] != 0.0:
            continue
        band = mfr[idx] >= (1.0 - CRITICAL_BAND) * curves.critical_mass_flow_ratio[i]
        best = idx[band][np.argmax(rec[idx][band])]
        chosen = np.concatenate([idx[~band], [best]])
        keep.append(chosen)
        which.append(np.full(len(chosen), i))
    if not keep:
        return np.array([], int), np.array([], int)
    return np.concatenate(keep), np.concatenate(which)


def _central_jacobian(residuals, x, lo, hi, relative=1e-3):
    """Jacobian by central differences (steps of 0.1 % of the value, at least 1e-5, kept inside the bounds): the
    model is a sampled curve, so steps far below its resolution would measure sampling, not sensitivity."""
    columns = []
    for k in range(len(x)):
        h = max(relative * abs(x[k]), 1e-5)
        up, down = x.copy(), x.copy()
        up[k] = min(x[k] + h, hi[k])
        down[k] = max(x[k] - h, lo[k])
        columns.append((residuals(up) - residuals(down)) / (up[k] - down[k]))
    return np.stack(columns, axis=1)


def calibrate(project, table, keys: list[str], case=None) -> Calibration:
    """Fit ``keys`` of ``project`` to the zero-incidence rows of ``table`` (a CharacteristicsTable)."""
    from scipy.optimize import least_squares

    from engine_air.characteristics.curves import find_curves

    for key in keys:
        if key not in FITTABLE:
            raise ProjectError(None, f"--fit {key}", None, f"can fit {', '.join(FITTABLE)}")
    if len(set(keys)) != len(keys):
        raise ProjectError(None, "--fit", ", ".join(keys), "name each key once")
    case = case or project.cases[0]
    curves = find_curves(table)
    rows, which = _rows(table, curves)
    if len(rows) <= len(keys):
        raise ProjectError(table.path, "(file)", None,
                           f"has {len(rows)} zero-incidence rows to fit {len(keys)} parameter(s): more rows are needed")
    mach, mfr, measured = table.column("mach")[rows], table.column("mass_flow_ratio")[rows], table.column("recovery")[rows]
    stab_curves = [i for i in set(which.tolist()) if np.isfinite(curves.stability_limit[i])]

    def residuals(values):
        trial = _with(project, keys, values)
        model, mfr_max = _model_at(trial, case, mach, mfr)
        r = measured - model
        if "stable_flow_fraction" in keys:
            f = values[keys.index("stable_flow_fraction")]
            r = np.concatenate([r, [curves.stability_limit[i] - f * mfr_max[float(curves.mach[i])]
                                    for i in sorted(stab_curves)]])
        return np.nan_to_num(r, nan=0.0)  # a row the model cannot reach (beyond its MFR_max) is not fitted

    start = [getattr(project.inlet if FITTABLE[k][0] == "inlet" else project.limits, k) or 0.5 for k in keys]
    lo = [FITTABLE[k][1] for k in keys]
    hi = [FITTABLE[k][2] for k in keys]
    start = np.clip(np.asarray(start, float), lo, hi)
    fit = least_squares(residuals, start, bounds=(lo, hi), x_scale="jac")
    dof = max(len(fit.fun) - len(keys), 1)
    s2 = float(fit.fun @ fit.fun) / dof
    jac = _central_jacobian(residuals, fit.x, lo, hi)
    try:
        cov = np.linalg.inv(jac.T @ jac) * s2
        errors = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    except np.linalg.LinAlgError:
        errors = np.full(len(keys), np.nan)
    calibrated = _with(project, keys, fit.x)
    model, _ = _model_at(calibrated, case, mach, mfr)
    r = measured - model  # NaN: a row beyond the model's MFR_max, left out of the figures
    per_curve, measured_curves, model_curves = [], [], []
    for i in sorted(set(which.tolist())):
        sel = which == i
        per_curve.append({"mach": float(curves.mach[i]), "alpha_deg": float(curves.alpha_deg[i]),
                          "beta_deg": float(curves.beta_deg[i]),
                          "rms_residual": float(np.sqrt(np.nanmean(r[sel] ** 2)))})
        measured_curves.append((mach[sel], mfr[sel], measured[sel]))
        order = np.argsort(mfr[sel])
        model_curves.append((mfr[sel][order], model[sel][order]))
    return Calibration({k: (float(v), float(e)) for k, v, e in zip(keys, fit.x, errors)},
                       float(np.sqrt(np.nanmean(r ** 2))), per_curve, calibrated, measured_curves, model_curves)
