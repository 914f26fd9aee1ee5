"""Engine-face distortion from rake measurements (method §18).

Descriptors after SAE ARP1420 and the surge-margin stack-up after SAE AIR1419, both recalled in method §18,
not copied from the documents: check them against ARP1420/AIR1419 before relying on a value.

Modules: ``rake_file`` (CSV/Parquet → columns), ``rake`` (every row checked; points × rings × probes),
``profile`` (the periodic linear ring profile and its exact integrals), ``arcs`` (low-pressure arcs and ring
circumferential descriptors), ``sector`` (the worst θ sector and DC(θ)), ``descriptors`` (the whole
reduction), ``stack_up`` (ΔPRS and remaining surge margin), ``report`` (the distortion record, table and
characteristics columns), ``pictures`` (face pictures and the stack-up waterfall, matplotlib).
"""

from __future__ import annotations

from engine_air.distortion.descriptors import RakeDescriptors, reduce_rakes
from engine_air.distortion.rake import RakeSet, read_rake_set
from engine_air.distortion.sector import DEFAULT_SECTOR_DEG
from engine_air.distortion.stack_up import StackUp, build_stack_up, remaining_surge_margin, surge_margin_loss

__all__ = ["DEFAULT_SECTOR_DEG", "RakeDescriptors", "RakeSet", "StackUp", "build_stack_up", "read_rake_set", "reduce_rakes",
           "remaining_surge_margin", "surge_margin_loss"]
