"""The reliability issue's bad-input table for the relations and the boundary.

One row per item of issue 9 that concerns the relations floor or the boundary every
public function crosses (the patterns, design and characteristics floors keep their own
tables beside their tests: test_pattern_reliability.py, test_sections.py,
test_section_loads.py, test_characteristics.py). Each row asserts the error class and
that the message names the argument; the sweep rows assert that ``errors="nan"`` makes
only the bad elements NaN. The values are invented edge cases.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pint
import pytest

import gasdyn2d as gd
from gasdyn2d.errors import DetachedShockError, InvalidInputError

U = gd.ureg

# (label, call, error class, text the message must contain: the argument first)
BAD_INPUTS = [
    # strings are not numbers
    ("string Mach number", lambda: gd.normal_shock("2.5"), InvalidInputError,
     "M1 must be a real number"),
    ("string gamma", lambda: gd.oblique_shock(2.0, deflection=0.1, gamma="1.3"),
     InvalidInputError, "gamma must be a real number"),
    ("string Gas", lambda: gd.Gas("1.4"), InvalidInputError, "gamma must be a real number"),
    ("string in a list", lambda: gd.isentropic_flow([2.0, "3.0"]), InvalidInputError,
     "M must be a real number"),
    # complex numbers would lose their imaginary part
    ("complex array", lambda: gd.normal_shock(np.array([2.0 + 0.5j])), InvalidInputError,
     "M1 must be a real number"),
    ("complex scalar", lambda: gd.prandtl_meyer(2.0 + 0j), InvalidInputError,
     "M must be a real number"),
    # bools are not Mach numbers or angles
    ("True as a Mach number", lambda: gd.normal_shock(True), InvalidInputError, "the bool True"),
    ("True as a deflection", lambda: gd.oblique_shock(2.0, deflection=True), InvalidInputError,
     "deflection must be a real number"),
    ("bool array", lambda: gd.isentropic_flow(np.array([True, False])), InvalidInputError,
     "dtype bool"),
    # objects
    ("an object", lambda: gd.expansion_fan(object(), deflection=0.1), InvalidInputError,
     "M1 must be a real number"),
    ("a Dataset is not a DataArray", lambda: gd.normal_shock(__import__("xarray").Dataset()),
     InvalidInputError, "M1 must be"),
    # wrong dimensions
    ("pressure as an angle", lambda: gd.oblique_shock(2.0, deflection=3 * U.kPa),
     InvalidInputError, "deflection has units of kPa"),
    ("temperature as a pressure", lambda: gd.FlowState(2.0, 300 * U.K, 300 * U.K),
     InvalidInputError, "p has units of K"),
    ("a list mixing Quantities and numbers", lambda: gd.oblique_shock(
        2.0, deflection=[10 * U.deg, 0.2]), InvalidInputError, "deflection mixes Quantities"),
    # a density ratio at the strong-shock limit is M1 = ∞, not a finite Mach number
    ("density ratio at its limit", lambda: gd.normal_shock(rho2_rho1=6.000000000000001),
     InvalidInputError, "rho2_rho1 must be in [1, (γ+1)/(γ-1))"),
    # an infinite Mach number is a limit, not an input
    ("infinite Mach number", lambda: gd.isentropic_flow(np.inf), InvalidInputError,
     "M must be finite"),
    # FlowState now takes errors=, so its message's advice is true
    ("FlowState pressure", lambda: gd.FlowState(2.0, -1.0, 300.0), InvalidInputError,
     "p must be finite and > 0"),
    ("FlowState errors", lambda: gd.FlowState(2.0, 1e5, 300.0, errors="warn"), InvalidInputError,
     "errors must be"),
    # a deflection beyond detachment names the limit
    ("detached", lambda: gd.oblique_shock(1.5, deflection=20 * U.deg), DetachedShockError,
     "deflection must be at most the detachment deflection"),
]


@pytest.mark.parametrize("label, call, error, text", BAD_INPUTS, ids=[r[0] for r in BAD_INPUTS])
def test_bad_input_gives_a_clear_error_naming_the_argument(label, call, error, text):
    with pytest.raises(error) as info:
        call()
    assert isinstance(info.value, ValueError)
    assert text in str(info.value), str(info.value)


def test_masked_arrays_keep_their_mask():
    # we keep the mask (not refuse): masked elements are not checked and stay masked
    mach = np.ma.array([2.0, -5.0, 3.0], mask=[False, True, False])
    shock = gd.normal_shock(mach)
    assert isinstance(shock.p2_p1, np.ma.MaskedArray)
    assert shock.p2_p1.mask.tolist() == [False, True, False]
    assert shock.p2_p1[0] == gd.normal_shock(2.0).p2_p1


def test_offset_temperatures_work_everywhere():
    # °C in, °C out for temperatures, and through a solved pattern's states (issue 9)
    state = gd.FlowState(2.2, 30 * U.kPa, U.Quantity(-40.0, "degC"))
    assert state.T.units == U.degC
    np.testing.assert_allclose(state.T0.to("K").m, 233.15 * (1 + 0.2 * 2.2**2), rtol=1e-14)
    duct = gd.WavePattern(state)
    duct.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=8 * U.deg)
    solved = duct.solve().state("2")
    assert solved.T.units == U.degC and solved.T.m > -40.0


def test_huge_mach_numbers_give_limits_without_warnings():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        flow = gd.isentropic_flow(1e160)
        shock = gd.normal_shock(1e160)
        nu = gd.prandtl_meyer(1e160)
    assert flow.T_T0 == 0.0 or flow.T_T0 < 1e-300
    assert shock.M2 == pytest.approx(math.sqrt(0.4 / 2.8), rel=1e-12)  # √((γ-1)/(2γ))
    assert nu == pytest.approx(0.5 * math.pi * (math.sqrt(6.0) - 1.0), rel=1e-12)  # ν_max


def test_no_false_degrees_warning_for_a_legal_large_fan_turn():
    # at γ = 1.01, ν_max is 20.3 rad: a 7 rad turn is legal, not degrees
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        fan = gd.expansion_fan(1.5, deflection=7.0, gamma=1.01)
    assert fan.M2 > 1.5


def test_a_quantity_from_a_registry_that_forces_arrays_is_accepted():
    registry = pint.UnitRegistry(force_ndarray_like=True)
    shock = gd.oblique_shock(2.0, deflection=[10 * registry.deg, 12 * registry.deg])
    np.testing.assert_allclose(shock.wave_angle.m, [39.3139, 41.5752], atol=1e-4)
    single = gd.oblique_shock(2.0, deflection=10 * registry.deg)
    assert single.wave_angle.units == registry.deg


@pytest.mark.parametrize("call, field, nan_out", [
    # element 1 is invalid; element 2 of the first row is NaN in (NaN out, no error)
    (lambda e: gd.normal_shock([2.0, 0.5, np.nan, 3.0], errors=e), "p2_p1", [1, 2]),
    (lambda e: gd.oblique_shock([2.0, 2.0, 3.0], deflection=[0.1, 0.9, 0.1], errors=e),
     "wave_angle", [1]),
    (lambda e: gd.isentropic_flow(A_Astar=[2.0, 0.5, 3.0], errors=e), "M", [1]),
    (lambda e: gd.expansion_fan([2.0, 2.0], deflection=[0.1, 3.0], errors=e), "M2", [1]),
], ids=["normal shock", "detached", "area ratio", "vacuum"])
def test_sweeps_nan_only_the_bad_elements(call, field, nan_out):
    with pytest.raises(InvalidInputError):
        call("raise")
    values = np.asarray(getattr(call("nan"), field), dtype=float)
    assert np.flatnonzero(np.isnan(values)).tolist() == nan_out
