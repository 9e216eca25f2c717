"""The state behind one simple wave: the record every simple-wave primitive returns.

:func:`gasdyn2d.relations.simple_waves.turn_state` (perfect gas) and
:func:`gasdyn2d.relations.thermally_perfect_oblique.turn_state` (thermally perfect gas)
both return it; it lives on its own so that neither has to import the other.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

__all__ = ["WaveState"]


class WaveState(NamedTuple):
    """State behind one simple wave (plain ndarrays; angles in radians).

    ``wave_angle`` is the shock angle β from the upstream flow (NaN for a fan);
    ``dlnp_dturn`` is d ln(p2/p1)/d(turn), continuous through turn = 0 where
    both sides equal γM1²/√(M1² - 1); ``detached`` marks compressions beyond
    θmax and ``vacuum`` expansions beyond ν_max.
    """

    M2: np.ndarray
    p2_p1: np.ndarray
    T2_T1: np.ndarray
    p02_p01: np.ndarray
    wave_angle: np.ndarray
    is_shock: np.ndarray
    dlnp_dturn: np.ndarray
    detached: np.ndarray
    vacuum: np.ndarray
