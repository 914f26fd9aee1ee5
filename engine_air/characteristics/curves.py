"""Characteristic curves found in a characteristics table (method §17).

A curve is the rows sharing (mach, alpha_deg, beta_deg). Its critical mass-flow ratio is its largest MFR; its
critical recovery the highest recovery within 0.5 % of that MFR; its subcritical branch the rows with MFR
below that band (at equal MFR the highest recovery), linear in MFR and closed by the critical point; its
stability (buzz) limit the smallest MFR among ``stable`` = 1 rows where some row has ``stable`` = 0 (not judged
otherwise).

So that curves of different critical flow can be interpolated at the same *fraction* MFR/MFR_crit (§17),
every curve's branch is sampled on one fraction grid: the union of all branch fractions (exact for the
piecewise-linear curves), thinned to at most ``MAX_GRID`` points for very large tables. Values below a curve's
smallest tested fraction are NaN there (no extrapolation).

Example
-------
>>> import numpy as np
>>> from engine_air.characteristics.table import CharacteristicsTable
>>> t = CharacteristicsTable("t.csv", {"mach": np.array([2.0, 2.0, 2.0]),
...     "mass_flow_ratio": np.array([0.5, 0.7, 0.8]), "recovery": np.array([0.86, 0.88, 0.90])})
>>> c = find_curves(t)
>>> float(c.critical_mass_flow_ratio[0]), float(c.critical_recovery[0]), float(c.min_fraction[0])
(0.8, 0.9, 0.625)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from engine_air.spec.errors import ProjectError

CRITICAL_BAND = 0.005
"""Rows within 0.5 % of a curve's largest MFR belong to its critical point (method §17)."""

MAX_GRID = 2001
EXTRA_COLUMNS_SKIPPED = ("mach", "mass_flow_ratio", "recovery", "alpha_deg", "beta_deg", "stable")


@dataclass(frozen=True)
class Curves:
    """One entry per curve (arrays of length n_curves), branches sampled on ``fraction_grid``."""

    mach: np.ndarray
    alpha_deg: np.ndarray
    beta_deg: np.ndarray
    critical_mass_flow_ratio: np.ndarray
    critical_recovery: np.ndarray
    stability_limit: np.ndarray  # MFR, NaN where the curve does not judge stability
    min_fraction: np.ndarray  # smallest tested MFR / MFR_crit
    fraction_grid: np.ndarray  # (k,) increasing, last value 1
    recovery: np.ndarray  # (n_curves, k), NaN below min_fraction
    extra: dict[str, np.ndarray] = field(default_factory=dict)  # other columns on the grid, same shape
    rows: tuple[np.ndarray, ...] = ()  # the table's row indices of each curve
    table: object = field(default=None, repr=False, compare=False)  # the CharacteristicsTable read
    nodes: tuple[np.ndarray, ...] = ()  # each curve's own branch fractions, closed by 1 (for display)

    @property
    def count(self) -> int:
        return len(self.mach)


def _branch(mfr: np.ndarray, rec: np.ndarray):
    """(critical MFR, critical recovery, branch fractions, branch order) of one curve's rows."""
    crit = mfr.max()
    band = mfr >= (1.0 - CRITICAL_BAND) * crit
    crit_rec = rec[band].max()
    below = np.flatnonzero(~band)
    # at equal MFR keep the highest recovery: sort by MFR, then recovery descending, keep the first of each MFR
    order = below[np.lexsort((-rec[below], mfr[below]))]
    keep = np.ones(len(order), bool)
    keep[1:] = mfr[order][1:] != mfr[order][:-1]
    order = order[keep]
    return crit, crit_rec, mfr[order] / crit, order


def _grid(all_fractions: list[np.ndarray]) -> np.ndarray:
    grid = np.unique(np.concatenate(all_fractions + [np.array([1.0])]))
    if len(grid) > MAX_GRID:
        grid = np.unique(np.concatenate([np.linspace(grid[0], 1.0, MAX_GRID), [1.0]]))
    return grid


def find_curves(table) -> Curves:
    """The curves of a ``CharacteristicsTable`` (loops over curves, never over rows within a column).

    Raises ``ProjectError`` naming the rows of a curve with fewer than two points."""
    mach, alpha, beta = table.column("mach"), table.column("alpha_deg"), table.column("beta_deg")
    mfr_all, rec_all = table.column("mass_flow_ratio"), table.column("recovery")
    keys, inverse = np.unique(np.stack([mach, alpha, beta], axis=1), axis=0, return_inverse=True)
    inverse = np.asarray(inverse).ravel()
    stable = table.columns.get("stable")
    extras = [c for c in table.columns if c not in EXTRA_COLUMNS_SKIPPED]
    crit, crit_rec, stab, fmin, fracs, orders, rows = [], [], [], [], [], [], []
    for i in range(len(keys)):
        idx = np.flatnonzero(inverse == i)
        if len(idx) < 2:
            m, a, b = keys[i]
            raise ProjectError(table.path, f"row {idx[0] + 1}", None,
                               f"is the only point of the curve at mach {m:g}, alpha_deg {a:g}, beta_deg {b:g}: "
                               "a curve needs at least two points")
        c, cr, f, order = _branch(mfr_all[idx], rec_all[idx])
        crit.append(c)
        crit_rec.append(cr)
        fmin.append(f[0] if len(f) else 1.0)
        fracs.append(f)
        orders.append(idx[order])
        rows.append(idx)
        limit = np.nan
        if stable is not None and (stable[idx] == 0.0).any() and (stable[idx] == 1.0).any():
            limit = float(mfr_all[idx][stable[idx] == 1.0].min())
        stab.append(limit)
    grid = _grid(fracs)
    n = len(keys)
    recovery = np.full((n, len(grid)), np.nan)
    extra = {name: np.full((n, len(grid)), np.nan) for name in extras}
    for i in range(n):
        f = np.append(fracs[i], 1.0)
        inside = grid >= f[0] - 1e-12
        recovery[i, inside] = np.interp(grid[inside], f, np.append(rec_all[orders[i]], crit_rec[i]))
        crit_rows = rows[i][mfr_all[rows[i]] >= (1.0 - CRITICAL_BAND) * crit[i]]
        best = crit_rows[np.argmax(rec_all[crit_rows])]
        for name in extras:
            column = table.columns[name]
            extra[name][i, inside] = np.interp(grid[inside], f, np.append(column[orders[i]], column[best]))
    return Curves(keys[:, 0], keys[:, 1], keys[:, 2], np.array(crit), np.array(crit_rec), np.array(stab),
                  np.array(fmin), grid, recovery, extra, tuple(rows), table,
                  tuple(np.append(f, 1.0) for f in fracs))
