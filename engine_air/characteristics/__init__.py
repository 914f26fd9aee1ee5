"""Measured or computed inlet characteristics (method §17): the data, apart from the model.

- ``table``: reading and checking a characteristics table (CSV or Parquet).
- ``curves``: the curves in it (critical point, subcritical branch, stability limit).
- ``interpolate``: between curves in (Mach, alpha, beta), at the same fraction MFR/MFR_crit.
- ``root``: the inlet-engine match on the data (MFR = c·pi(MFR)).

The match uses them as one of its stages (``engine_air.flow.measured``); the characteristic at a condition
(method §16) is ``engine_air.envelope.characteristic``; calibration of the model against them
``engine_air.studies.calibrate``.
"""
