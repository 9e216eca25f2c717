"""Every public function of the wave-pattern floor on every kind of input the boundary takes.

One fixture of input kinds (the MetPy habit of running each test on every array
type): plain numbers, 0-d arrays, lists, ndarrays of several shapes, pint Quantities
of the application registry and of a second registry, lists of Quantities, xarray
DataArrays (two named dimensions broadcasting), pint-xarray DataArrays in degrees,
pandas Series and dask arrays. Each result is compared with the ndarray result, and
its type, labels and units are checked. Values are invented cases.
"""

from __future__ import annotations

import numpy as np
import pint
import pytest

import gasdyn2d as gd
from gasdyn2d import ureg
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure
from gasdyn2d.patterns.polars import pressure_deflection_polar
from gasdyn2d.patterns.reflections import (free_boundary_reflection, reflection_transition,
                                           wall_reflection)

xr = pytest.importorskip("xarray")
pd = pytest.importorskip("pandas")
da = pytest.importorskip("dask.array")

MACH = np.array([2.4, 3.0, 3.6])
ANGLE_DEG = np.array([6.0, 8.0])
OTHER = pint.UnitRegistry()
XR_UNITS = pint.UnitRegistry(force_ndarray_like=True)  # as pint-xarray wants its registries


def _duct(M, ramp):
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=ramp)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    return p.solve()


# name -> (call(M, angle), field that is an angle, field that is a ratio)
FUNCTIONS = {
    "wall_reflection": (wall_reflection, "reflected_angle_to_wall", "p3_p1"),
    "shock_crossing": (lambda M, a: shock_crossing(M, a, 0.1), "slip_direction", "p_p1"),
    "merging_shocks": (lambda M, a: merging_shocks(M, a, a), "slip_direction", "p_p1"),
    "free_boundary_reflection": (free_boundary_reflection, "boundary_turn", "M3"),
    "WavePattern": (lambda M, a: _duct(M, a).region("3"), "direction", "p_ratio"),
}


def _reference(name, M, angle_rad):
    call, angle_field, ratio_field = FUNCTIONS[name]
    r = call(np.asarray(M, dtype=float), np.asarray(angle_rad, dtype=float))
    return np.asarray(getattr(r, angle_field)), np.asarray(getattr(r, ratio_field))


def _magnitude_in(value, unit):
    return value.m_as(unit) if hasattr(value, "m_as") else value


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_scalars_arrays_and_lists(name):
    call, angle_field, ratio_field = FUNCTIONS[name]
    a = np.radians(7.0)
    single = call(3.0, a)
    assert isinstance(getattr(single, ratio_field), float)
    for M in (np.float64(3.0), np.array(3.0), 3):
        assert getattr(call(M, a), ratio_field) == getattr(single, ratio_field)
    listed = call([2.4, 3.0, 3.6], a)
    np.testing.assert_array_equal(getattr(listed, ratio_field),
                                  _reference(name, MACH, a)[1])
    grid = call(MACH[:, None], np.radians(ANGLE_DEG))
    angle, ratio = _reference(name, MACH[:, None], np.radians(ANGLE_DEG))
    assert np.shape(getattr(grid, ratio_field)) == (3, 2)
    np.testing.assert_array_equal(getattr(grid, ratio_field), ratio)
    np.testing.assert_array_equal(getattr(grid, angle_field), angle)
    assert not getattr(grid, ratio_field).flags.writeable


@pytest.mark.parametrize("registry", [ureg, OTHER], ids=["application", "second registry"])
@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_quantities_come_back_in_the_callers_unit_and_registry(name, registry):
    call, angle_field, ratio_field = FUNCTIONS[name]
    result = call(MACH, 7.0 * registry.deg)
    angle = getattr(result, angle_field)
    assert angle.units == registry.deg
    angle + 1.0 * registry.deg  # adds to the caller's own Quantities (same registry)
    expected_angle, expected_ratio = _reference(name, MACH, np.radians(7.0))
    np.testing.assert_allclose(angle.m_as("rad"), expected_angle, rtol=1e-14, atol=1e-16)
    np.testing.assert_allclose(getattr(result, ratio_field), expected_ratio, rtol=1e-14)
    listed = call(MACH[:2], [6.0 * registry.deg, 8.0 * registry.deg])
    assert getattr(listed, angle_field).units == registry.deg
    np.testing.assert_allclose(getattr(listed, ratio_field),
                               _reference(name, MACH[:2], np.radians(ANGLE_DEG))[1],
                               rtol=1e-14)


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_dataarrays_broadcast_by_name_and_keep_coordinates(name):
    call, angle_field, ratio_field = FUNCTIONS[name]
    M = xr.DataArray(MACH, dims="mach", coords={"mach": MACH})
    a = xr.DataArray(np.radians(ANGLE_DEG), dims="ramp", coords={"ramp": ANGLE_DEG})
    ratio = getattr(call(M + a * 0, a) if name == "WavePattern" else call(M, a), ratio_field)
    assert isinstance(ratio, xr.DataArray) and ratio.dims == ("mach", "ramp")
    np.testing.assert_array_equal(ratio.coords["ramp"], ANGLE_DEG)
    expected = _reference(name, MACH[:, None], np.radians(ANGLE_DEG))[1]
    np.testing.assert_allclose(ratio.values, expected, rtol=1e-14)
    # degrees through pint-xarray are converted, never read as radians (a registry of the
    # test's own: importing pint-xarray switches the application registry to
    # force_ndarray_like, which the rest of the test run must not inherit)
    application = pint.get_application_registry().get()
    flag = application.force_ndarray_like
    try:
        pytest.importorskip("pint_xarray")
    finally:
        application.force_ndarray_like = flag
    deg = xr.DataArray(ANGLE_DEG, dims="ramp").pint.quantify("deg", unit_registry=XR_UNITS)
    angle = getattr(call(M, deg), angle_field)
    assert angle.dims == ("mach", "ramp")
    np.testing.assert_allclose(np.asarray(angle.data.m_as("rad")),
                               _reference(name, MACH[:, None], np.radians(ANGLE_DEG))[0],
                               rtol=1e-14, atol=1e-16)


@pytest.mark.parametrize("name", sorted(FUNCTIONS))
def test_series_keep_their_index(name):
    call, _, ratio_field = FUNCTIONS[name]
    M = pd.Series(MACH, index=["low", "mid", "high"], name="rig Mach")
    ratio = getattr(call(M, np.radians(7.0)), ratio_field)
    assert isinstance(ratio, pd.Series) and list(ratio.index) == ["low", "mid", "high"]
    np.testing.assert_allclose(ratio.to_numpy(), _reference(name, MACH, np.radians(7.0))[1],
                               rtol=1e-14)


class _Counter:
    """Counts the dask tasks run (nothing must run before .compute())."""

    def __init__(self):
        from dask.callbacks import Callback

        counter = self

        class Count(Callback):
            def _start_state(self, dsk, state):
                counter.runs += 1

        self.runs = 0
        self.callback = Count()


@pytest.mark.parametrize("name", sorted(set(FUNCTIONS) - {"WavePattern"}))
def test_ready_functions_stay_lazy_on_dask(name):
    call, angle_field, ratio_field = FUNCTIONS[name]
    counter = _Counter()
    M = da.from_array(np.tile(MACH, 3), chunks=4)
    with counter.callback:
        result = call(M, np.radians(7.0))
        ratio = getattr(result, ratio_field)
        assert counter.runs == 0 and isinstance(ratio, da.Array)
        values = ratio.compute()
    np.testing.assert_allclose(values, _reference(name, np.tile(MACH, 3), np.radians(7.0))[1],
                               rtol=1e-14)
    if name == "wall_reflection":  # labels compute to the same labels
        assert list(result.kind.compute()) == ["regular"] * 9


def test_turn_to_pressure_on_every_kind():
    # its inputs are ratios: a dimensionless Quantity gives angles in radians of its registry
    ratio = np.array([0.5, 1.5, 2.5])
    plain = turn_to_pressure(3.0, ratio)
    q = turn_to_pressure(3.0, ratio * OTHER.dimensionless)
    assert q.deflection.units == OTHER.radian
    np.testing.assert_allclose(q.deflection.m, plain.deflection, rtol=1e-15)
    series = turn_to_pressure(pd.Series(MACH, index=list("abc")), 1.5)
    assert list(series.M2.index) == list("abc")
    lazy = turn_to_pressure(da.from_array(MACH, chunks=2), xr.DataArray(1.5).values)
    np.testing.assert_allclose(lazy.M2.compute(), turn_to_pressure(MACH, 1.5).M2, rtol=1e-15)


def test_reflection_transition_on_every_kind():
    t = reflection_transition(MACH)
    lazy = reflection_transition(da.from_array(MACH, chunks=2))
    assert isinstance(lazy.detachment.deflection, da.Array)
    np.testing.assert_array_equal(lazy.detachment.deflection.compute(),
                                  t.detachment.deflection)
    series = reflection_transition(pd.Series(MACH, index=list("abc")))
    assert list(series.von_neumann.wave_angle.index) == list("abc")
    q = reflection_transition(MACH * OTHER.dimensionless)
    assert q.detachment.deflection._REGISTRY is OTHER


def test_wave_pattern_and_polar_refuse_what_they_cannot_keep():
    with pytest.raises(InvalidInputError, match="cannot stay lazy"):
        WavePattern(da.from_array(MACH, chunks=2))
    with pytest.raises(InvalidInputError, match="last axis of points"):
        pressure_deflection_polar(xr.DataArray(MACH, dims="mach"))
    for bad, text in (("2.5", "string"), (True, "bool"), (2 + 1j, "complex")):
        with pytest.raises(InvalidInputError, match=text):
            WavePattern(bad)
        with pytest.raises(InvalidInputError, match=text):
            wall_reflection(bad, 0.1)
        with pytest.raises(InvalidInputError, match=text):
            turn_to_pressure(2.0, bad)


def test_flowstate_inflow_with_offset_temperature_units():
    # °C and °F inflow temperatures: state() gives them back in the caller's unit
    # (pint's offset-unit arithmetic never runs on them)
    rig = gd.FlowState(2.6, 20 * ureg.kPa, ureg.Quantity(-90.0, "degC"))
    p = WavePattern(rig)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=6 * ureg.deg)
    state = p.solve().state("2")
    assert state.T.units == ureg.degC and state.p.units == ureg.kPa
    kelvin = WavePattern(gd.FlowState(2.6, 20e3, 183.15)).add_wave(
        "ramp shock", upstream="1", downstream="2", family="left",
        turn=np.radians(6.0)).solve().state("2")
    assert state.T.to("K").m == pytest.approx(kelvin.T, rel=1e-13)
    assert state.p.m_as("Pa") == pytest.approx(kelvin.p, rel=1e-13)


def test_pattern_solution_tables():
    M = xr.DataArray(MACH, dims="mach", coords={"mach": MACH})
    s = _duct(M, np.radians(6.0))
    frame = s.to_dataframe()
    assert len(frame) == 3 and frame.index.name == "mach"
    assert "region/3/M" in frame.columns and "wave/reflected/turn [rad]" in frame.columns
    np.testing.assert_array_equal(frame["region/3/M"].to_numpy(), s.region("3").M.values)
    ds = s.to_xarray()
    assert ds["M"].dims == ("mach", "region") and list(ds["region"].values) == ["1", "2", "3"]
    assert ds["wave_turn"].attrs["units"] == "rad" and ds["wave_kind"].dims == ("mach", "wave")
    np.testing.assert_array_equal(ds["M"].sel(region="3").values, s.region("3").M.values)
    plain = _duct(MACH, 6 * ureg.deg)
    assert "wave/reflected/turn [deg]" in plain.to_dataframe().columns
    assert plain.to_xarray()["M"].dims == ("case", "region")
