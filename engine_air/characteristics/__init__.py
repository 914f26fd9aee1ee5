"""Measured or computed inlet characteristics over the model (method §16, §17).

- ``table``: reading and checking a characteristics table (CSV or Parquet).
- ``curves``: the curves in it (critical point, subcritical branch, stability limit).
- ``interpolate``: between curves in (Mach, alpha, beta), at the same fraction MFR/MFR_crit.
- ``root``: the inlet-engine match on the data (MFR = c·pi(MFR)).
"""
