"""Loss of surge pressure ratio and the surge-margin stack-up (method §18, after SAE AIR1419).

The stability assessment follows SAE AIR1419 (inlet/engine compatibility) as recalled in method §18, not
copied from the document: check it against AIR1419 and the engine maker's own method before relying on a
value.

    ΔPRS = Σ_i [KC_i·(ΔPC/P)_i + KR_i·(ΔPR/P)_i]
    remaining surge margin = available margin − ΔPRS − Σ other stack-up items

with KC_i, KR_i the engine maker's sensitivities per equal-area ring (``[engine.rating.stability]``). The
sum is taken as written: a ring above the face average has a negative radial intensity and lowers ΔPRS.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from engine_air.project.errors import ProjectError
from engine_air.project.model import Stability


@dataclass(frozen=True)
class StackUp:
    """The stack-up at each point (P,): the distortion loss and what remains."""

    available: float
    distortion_loss: np.ndarray  # ΔPRS
    other_losses: tuple[tuple[str, float], ...]
    remaining: np.ndarray

    @property
    def other_total(self) -> float:
        return float(sum(v for _n, v in self.other_losses))


def surge_margin_loss(stability: Stability, circumferential, radial) -> np.ndarray:
    """ΔPRS from ring intensities of shape (..., R); R must match the sensitivities.

    >>> from engine_air.project.model import Stability
    >>> s = Stability(0.2, (1.0, 2.0), (0.5, 0.5))
    >>> float(surge_margin_loss(s, np.array([0.01, 0.02]), np.array([0.01, -0.01])))
    0.05
    """
    kc = np.asarray(stability.circumferential_sensitivity, float)
    kr = np.asarray(stability.radial_sensitivity, float)
    return np.asarray(circumferential) @ kc + np.asarray(radial) @ kr


def remaining_surge_margin(stability: Stability, loss) -> np.ndarray:
    """available − ΔPRS − Σ other items."""
    other = sum(v for _n, v in stability.other_losses)
    return stability.available_surge_margin - np.asarray(loss, float) - other


def build_stack_up(stability: Stability, circumferential, radial, key: str = "engine.rating.stability",
             path: str | None = None) -> StackUp:
    """The whole stack-up; ``ProjectError`` (naming ``key``) when the rake's ring count differs from the
    number of sensitivities."""
    rings = np.shape(circumferential)[-1]
    if rings != len(stability.circumferential_sensitivity):
        raise ProjectError(path, f"{key}.circumferential_sensitivity", list(stability.circumferential_sensitivity),
                           f"has {len(stability.circumferential_sensitivity)} entries; the rake has {rings} rings: "
                           "give one sensitivity per ring, innermost first")
    loss = surge_margin_loss(stability, circumferential, radial)
    return StackUp(stability.available_surge_margin, loss, stability.other_losses,
                   remaining_surge_margin(stability, loss))
