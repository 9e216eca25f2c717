"""The planar method of characteristics stays bit for bit what it was before the geometry switch.

Issue 12 adds the axisymmetric source term to the unit processes and marchers behind a
``geometry`` switch; where ``geometry="planar"`` (the default) every number must be
unchanged. The fingerprints below are SHA-256 hashes of the exact bytes of every array of a
few nozzle, channel, jet and unit-process results, recorded from the code *before* the
switch was added, on x86-64 Linux, numpy 2.4.6, Python 3.11: first at commit c1dad73, then
again on main just before the switch was merged, because the relations' scalar `math`
forms, merged in between, moved three of them by rounding (the rounded-throat length at
M 2.8 by 2 parts in 10^16). A few values are also kept as exact float reprs, so that a
failure says how far off it is.

Caution: the hashes depend on the platform's floating-point library (numpy's SIMD
dispatch, libm). If this test fails on a different machine while the planar code is
untouched, re-record with ``python tests/test_planar_bit_for_bit.py`` on a checkout of
c1dad73 and compare there.
"""

from __future__ import annotations

import dataclasses
import functools
import hashlib
import math

import numpy as np
import pytest

from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.jets import underexpanded_slot_jet
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle, rounded_throat_nozzle
from gasdyn2d.characteristics.unit_processes import (
    WallContour,
    cancellation_point,
    free_boundary_point,
    interior_point,
    symmetry_point,
    wall_point,
)

# The fingerprints were recorded with the throat (slot) half-height 1 m, the default of the
# time; the default is now 0.01 m, so these designs give h = 1 m explicitly.
minimum_length_nozzle = functools.partial(minimum_length_nozzle, throat_half_height=1.0)
rounded_throat_nozzle = functools.partial(rounded_throat_nozzle, throat_half_height=1.0)
underexpanded_slot_jet = functools.partial(underexpanded_slot_jet, slot_half_height=1.0)


# The result fields as they were when the fingerprints were recorded: fields added later
# (such as the geometry of a nozzle) are not part of the planar record.
RECORDED_FIELDS = {
    'MinimumLengthNozzle': ('mach_exit', 'n_characteristics', 'wall_x', 'wall_y', 'length',
                            'exit_half_height', 'area_ratio', 'area_ratio_isentropic',
                            'max_wall_angle', 'net'),
    'RoundedThroatNozzle': ('mach_exit', 'throat_radius', 'wall_x', 'wall_y', 'inflection_x',
                            'inflection_angle', 'length', 'exit_half_height', 'area_ratio',
                            'area_ratio_isentropic', 'discharge_coefficient', 'net'),
    'ChannelFlow': ('mach_inlet', 'stop_reason', 'shock_x', 'shock_y', 'lower_wall_x',
                    'lower_wall_mach', 'lower_wall_p_p0', 'upper_wall_x', 'upper_wall_mach',
                    'upper_wall_p_p0', 'lower_wall_nodes', 'upper_wall_nodes', 'handover_x',
                    'handover_y', 'handover_mach', 'handover_theta', 'net', 'lower_wall_y',
                    'upper_wall_y'),
    'SlotJet': ('mach_exit', 'mach_jet', 'p_exit_p_ambient', 'lip_turn', 'boundary_x',
                'boundary_y', 'boundary_theta', 'boundary_nodes', 'max_half_width', 'max_width_x',
                'cell_length', 'cell_length_linear', 'shock_formed', 'shock_x', 'shock_y', 'net'),
    'CharacteristicNet': ('x', 'y', 'mach', 'theta', 'p_p0', 'plus_segments', 'minus_segments'),
}


def _fingerprint(value, digest=None):
    """SHA-256 over the exact bytes of every numeric array in ``value`` (nested results too)."""
    digest = digest or hashlib.sha256()
    if dataclasses.is_dataclass(value):
        for name in RECORDED_FIELDS[type(value).__name__]:
            digest.update(name.encode())
            _fingerprint(getattr(value, name), digest)
    elif isinstance(value, (tuple, list)):
        for item in value:
            _fingerprint(item, digest)
    elif isinstance(value, str) or value is None:
        digest.update(repr(value).encode())
    elif callable(value):
        pass
    else:
        array = np.asarray(getattr(value, "magnitude", value))
        digest.update(str(array.dtype).encode() + str(array.shape).encode())
        digest.update(np.ascontiguousarray(array).tobytes())
    return digest


def _unit_process_cases(**switch):
    rng = np.random.default_rng(12)  # invented states
    th1, th2 = rng.uniform(-0.2, 0.2, (2, 7))
    nu1, nu2 = rng.uniform(0.2, 0.9, (2, 7))
    y2 = 1.0 + rng.uniform(0.0, 0.5, 7)
    bend = WallContour.bend(0.0, 0.3, 0.12, 1.5)
    roof = WallContour.bend(2.0, 0.3, -0.1, 1.5)
    return (
        interior_point(0.0, 0.0, th1, nu1, 0.1, y2, th2, nu2, **switch),
        interior_point(0.0, 0.0, th1, nu1, 0.1, y2, th2, nu2, gamma=1.3, **switch),
        symmetry_point(0.0, y2, th2, nu2, **switch),
        wall_point(0.0, 1.0, th2, nu2, bend, "lower", **switch),
        wall_point(0.0, 1.0, th1, nu1, roof, "upper", **switch),
        free_boundary_point(0.0, 0.0, th1, nu1, -0.5, y2, th2, 0.5 * (nu1 + nu2), **switch),
        cancellation_point(0.0, 0.0, th1, nu1, -1.0, y2, th2),
    )


CASES = {
    "unit processes": _unit_process_cases,
    "minimum_length_nozzle M2.8 n50": lambda: minimum_length_nozzle(2.8, n_characteristics=50),
    "minimum_length_nozzle M2.4 g1.3 n13": lambda: minimum_length_nozzle(
        2.4, n_characteristics=13, gamma=1.3),
    "rounded_throat_nozzle M2.8 R2 n21": lambda: rounded_throat_nozzle(
        2.8, throat_radius=2.0, n_points=21),
    "rounded_throat_nozzle M2 R5 n11": lambda: rounded_throat_nozzle(
        2.0, throat_radius=5.0, n_points=11),
    "channel_flow expansion roof": lambda: channel_flow(
        2.2, lower_wall=WallContour.straight(0.0),
        upper_wall=WallContour.bend(0.1, 0.05, math.radians(6.0), 0.2), length=0.5,
        n_points=31),
    "channel_flow compression (shock)": lambda: channel_flow(
        2.2, lower_wall=WallContour.straight(0.0),
        upper_wall=WallContour.bend(0.1, 0.05, math.radians(-6.0), 0.2), length=0.5,
        n_points=41),
    "channel_flow two bends": lambda: channel_flow(
        2.0, lower_wall=WallContour.bend(0.0, 0.4, math.radians(2.0), 0.4),
        upper_wall=WallContour.bend(0.3, 0.3, math.radians(4.0), 0.3), length=1.2, n_points=9),
    "underexpanded_slot_jet M1.6 1.1 n60": lambda: underexpanded_slot_jet(
        1.6, 1.1, n_characteristics=60),
    "underexpanded_slot_jet M2 1.5 n20 g1.3": lambda: underexpanded_slot_jet(
        2.0, 1.5, n_characteristics=20, gamma=1.3),
}

# Recorded before the geometry switch, see the module docstring.
RECORDED = {
    'channel_flow compression (shock)': 'dd74572ab66a69c13754b094b34bc0940cb47eeb5c756a4c4eb6d82c13317ea1',
    'channel_flow expansion roof': '8e865ae732424a89fbc19e7a2f4df4f2f836893fd52409edc29982ff2c604045',
    'channel_flow two bends': '10a10a833ad189f001c3109cdc9b54061d769b5e6fc7f90a217b5a722443e043',
    'minimum_length_nozzle M2.4 g1.3 n13': 'ce67c0cea8958dbcaa2c893f80a1cd0da52f0b8f875393227333f3282806bdc5',
    'minimum_length_nozzle M2.8 n50': 'd6f9c571e63daf84a62f3129551d7a73d5dc926e7c6621871c22a699fbb98699',
    'rounded_throat_nozzle M2 R5 n11': '140e8f7707338db2ad6ce5ff0aaeed40149ad8071957d22be37a0d73c44fd1e5',
    'rounded_throat_nozzle M2.8 R2 n21': 'b00310b2d070fbfea1f97048ae21471e693a82eaf86a70dc57cb190cff5c3502',
    'underexpanded_slot_jet M1.6 1.1 n60': 'ee5df324143f4fb57227438c20946cfd49d5d11041977583d629f7b6351eadb0',
    'underexpanded_slot_jet M2 1.5 n20 g1.3': '0cba28f02c867b0af3bd705dee5e719b75f84832166522af53da1b6f01128025',
    'unit processes': '2f4fdb7a5107ce27fe6f7c0cc8cc9b52c4721477a01c63f50d05e1d3f1a9279e',
}

# Exact values recorded alongside (float repr round-trips exactly).
RECORDED_VALUES = {
    'minimum_length_nozzle M2.8 n50': {'area_ratio': 3.493870186773575,
                                       'length': 13.256892249446594},
    'rounded_throat_nozzle M2.8 R2 n21': {'area_ratio': 3.4715520970812865,
                                          'length': 14.350316171545167},
    'underexpanded_slot_jet M1.6 1.1 n60': {'cell_length': 5.547223372943593,
                                            'shock_x': 4.221839171221133},
    'channel_flow compression (shock)': {'shock_x': 0.1093821737239857,
                                         'shock_y': 0.06956638803301958},
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_planar_results_are_bit_for_bit_unchanged(name):
    assert _fingerprint(CASES[name]()).hexdigest() == RECORDED[name]


# The same cases with the geometry switch set to "planar" explicitly: the same bits.
EXPLICIT_PLANAR = {
    "minimum_length_nozzle M2.8 n50": lambda: minimum_length_nozzle(
        2.8, n_characteristics=50, geometry="planar"),
    "rounded_throat_nozzle M2.8 R2 n21": lambda: rounded_throat_nozzle(
        2.8, throat_radius=2.0, n_points=21, geometry="planar"),
    "underexpanded_slot_jet M1.6 1.1 n60": lambda: underexpanded_slot_jet(
        1.6, 1.1, n_characteristics=60, geometry="planar"),
    "unit processes": lambda: _unit_process_cases(geometry="planar"),
}


@pytest.mark.parametrize("name", sorted(EXPLICIT_PLANAR))
def test_explicit_planar_switch_is_bit_for_bit_unchanged(name):
    assert _fingerprint(EXPLICIT_PLANAR[name]()).hexdigest() == RECORDED[name]


@pytest.mark.parametrize("name, field, expected", [
    (name, field, value) for name, fields in RECORDED_VALUES.items()
    for field, value in fields.items()])
def test_recorded_planar_values(name, field, expected):
    result = CASES[name]()
    assert float(getattr(result, field)) == expected  # exact: no tolerance


def _record():
    for name in sorted(CASES):
        print(f"    {name!r}: {_fingerprint(CASES[name]()).hexdigest()!r},")
    print()
    for name, fields in (("minimum_length_nozzle M2.8 n50", ("area_ratio", "length")),
                         ("rounded_throat_nozzle M2.8 R2 n21", ("area_ratio", "length")),
                         ("underexpanded_slot_jet M1.6 1.1 n60", ("cell_length", "shock_x")),
                         ("channel_flow compression (shock)", ("shock_x", "shock_y"))):
        result = CASES[name]()
        values = ", ".join(f"{f!r}: {float(getattr(result, f))!r}" for f in fields)
        print(f"    {name!r}: {{{values}}},")


if __name__ == "__main__":
    _record()
