"""Every public relation on every kind of input the boundary accepts, against the ndarray call.

One shared fixture of input kinds (the MetPy habit of running each test on every array
type): plain float, numpy scalar, 0-d array, list, ndarray (1-d and broadcast 2-d),
Quantity, Quantity from a second registry, list of Quantities, xarray DataArrays with
two named dimensions, pint-xarray quantified DataArrays, pandas Series, dask arrays and
masked arrays. Each result is compared with the plain ndarray result (the reference is
the same library on ndarrays: what is tested here is that no kind changes a number,
loses a label or a unit, or computes a lazy array), and its type, labels and units are
asserted.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pint
import pytest

import gasdyn2d as gd
from gasdyn2d.boundary import result_fields
from gasdyn2d.errors import InvalidInputError

xr = pytest.importorskip("xarray")
pd = pytest.importorskip("pandas")
da = pytest.importorskip("dask.array")

UREG = gd.ureg
HOT = gd.AIR_THERMALLY_PERFECT
SECOND_REGISTRY = pint.UnitRegistry()

# Each relation: (function, {argument: (unit text, three values in SI)}, options).
# The values are invented, inside each relation's domain.
RELATIONS = {
    "isentropic_flow(M)": (gd.isentropic_flow, {"M": ("", [0.5, 2.0, 3.5])}, {}),
    "isentropic_flow(A_Astar)": (gd.isentropic_flow, {"A_Astar": ("", [1.2, 2.0, 4.0])}, {}),
    "isentropic_flow(mach_angle)": (gd.isentropic_flow,
                                    {"mach_angle": ("rad", [0.3, 0.5, 1.2])}, {}),
    "normal_shock(M1)": (gd.normal_shock, {"M1": ("", [1.3, 2.0, 4.5])}, {}),
    "normal_shock(p02_p01)": (gd.normal_shock, {"p02_p01": ("", [0.9, 0.6, 0.3])}, {}),
    "oblique_shock(deflection)": (gd.oblique_shock, {"M1": ("", [2.0, 3.0, 4.0]),
                                                     "deflection": ("rad", [0.05, 0.1, 0.2])}, {}),
    "oblique_shock(wave_angle, strong)": (gd.oblique_shock,
                                          {"M1": ("", [2.0, 3.0, 4.0]),
                                           "wave_angle": ("rad", [0.6, 0.7, 0.8])}, {}),
    "max_deflection": (gd.max_deflection, {"M1": ("", [1.5, 2.0, 6.0])}, {}),
    "sonic_deflection": (gd.sonic_deflection, {"M1": ("", [1.5, 2.0, 6.0])}, {}),
    "prandtl_meyer": (gd.prandtl_meyer, {"M": ("", [1.1, 2.0, 5.0])}, {}),  # returns ν [rad]
    "mach_from_prandtl_meyer": (gd.mach_from_prandtl_meyer, {"nu": ("rad", [0.1, 0.5, 1.5])},
                                {}),  # returns M [-]
    "expansion_fan(deflection)": (gd.expansion_fan, {"M1": ("", [1.5, 2.0, 3.0]),
                                                     "deflection": ("rad", [0.05, 0.2, 0.4])}, {}),
    "expansion_fan(p2_p1)": (gd.expansion_fan, {"M1": ("", [1.5, 2.0, 3.0]),
                                                "p2_p1": ("", [0.8, 0.5, 0.1])}, {}),
    "cone_flow(cone_angle)": (gd.cone_flow, {"M1": ("", [1.8, 2.5, 4.0]),
                                             "cone_angle": ("rad", [0.1, 0.2, 0.3])}, {}),
    "cone_flow(wave_angle)": (gd.cone_flow, {"M1": ("", [1.8, 2.5, 4.0]),
                                             "wave_angle": ("rad", [0.7, 0.75, 0.8])}, {}),
    "max_cone_angle": (gd.max_cone_angle, {"M1": ("", [1.5, 2.0, 6.0])}, {}),
    "FlowState": (gd.FlowState, {"M": ("", [0.8, 2.0, 3.0]), "p": ("Pa", [5e3, 2e4, 1e5]),
                                 "T": ("K", [210.0, 250.0, 290.0])}, {}),
    # the thermally perfect gas (issue 15): the temperature is one more case argument,
    # given in °C as a Quantity (an offset unit the boundary converts)
    "isentropic_flow(M, T0, hot)": (gd.isentropic_flow, {"M": ("", [0.5, 2.0, 3.5]),
                                                         "T0": ("K", [400.0, 1500.0, 2800.0])},
                                    {"gas": HOT}),
    "isentropic_flow(p_p0, T0, hot)": (gd.isentropic_flow, {"p_p0": ("", [0.9, 0.2, 0.01]),
                                                            "T0": ("K", [400.0, 1500.0, 2800.0])},
                                       {"gas": HOT}),
    "normal_shock(M1, T1, hot)": (gd.normal_shock, {"M1": ("", [1.3, 4.0, 9.0]),
                                                    "T1": ("K", [220.0, 600.0, 1800.0])},
                                  {"gas": HOT}),
    "normal_shock(p02_p01, T1, hot)": (gd.normal_shock, {"p02_p01": ("", [0.9, 0.6, 0.3]),
                                                         "T1": ("K", [220.0, 600.0, 1800.0])},
                                       {"gas": HOT}),
    "normal_shock(M1, T1, perfect)": (gd.normal_shock, {"M1": ("", [1.3, 4.0, 9.0]),
                                                        "T1": ("K", [220.0, 600.0, 1800.0])}, {}),
    "oblique_shock(deflection, T1, hot)": (gd.oblique_shock,
                                           {"M1": ("", [2.0, 4.0, 7.0]),
                                            "deflection": ("rad", [0.05, 0.1, 0.2]),
                                            "T1": ("K", [220.0, 900.0, 2000.0])}, {"gas": HOT}),
    "oblique_shock(wave_angle, T1, hot, strong)": (gd.oblique_shock,
                                                   {"M1": ("", [2.0, 4.0, 7.0]),
                                                    "wave_angle": ("rad", [0.6, 0.7, 0.8]),
                                                    "T1": ("K", [220.0, 900.0, 2000.0])},
                                                   {"gas": HOT}),
    "max_deflection(T1, hot)": (gd.max_deflection, {"M1": ("", [1.5, 3.0, 8.0]),
                                                    "T1": ("K", [250.0, 1000.0, 2500.0])},
                                {"gas": HOT}),
    "sonic_deflection(T1, hot)": (gd.sonic_deflection, {"M1": ("", [1.5, 3.0, 8.0]),
                                                        "T1": ("K", [250.0, 1000.0, 2500.0])},
                                  {"gas": HOT}),
    "prandtl_meyer(T0, hot)": (gd.prandtl_meyer, {"M": ("", [1.1, 2.0, 5.0]),
                                                  "T0": ("K", [300.0, 1200.0, 3000.0])},
                               {"gas": HOT}),
    "mach_from_prandtl_meyer(T0, hot)": (gd.mach_from_prandtl_meyer,
                                         {"nu": ("rad", [0.1, 0.5, 1.5]),
                                          "T0": ("K", [300.0, 1200.0, 3000.0])}, {"gas": HOT}),
    "expansion_fan(deflection, T1, hot)": (gd.expansion_fan,
                                           {"M1": ("", [1.5, 2.0, 3.0]),
                                            "deflection": ("rad", [0.05, 0.2, 0.4]),
                                            "T1": ("K", [300.0, 1200.0, 2500.0])}, {"gas": HOT}),
    "expansion_fan(p2_p1, T1, hot)": (gd.expansion_fan, {"M1": ("", [1.5, 2.0, 3.0]),
                                                         "p2_p1": ("", [0.8, 0.5, 0.1]),
                                                         "T1": ("K", [300.0, 1200.0, 2500.0])},
                                      {"gas": HOT}),
}

#: caller units for each SI unit text in the Quantity kinds
CALLER_UNITS = {"rad": "deg", "Pa": "kPa", "K": "degC", "": None}

KINDS = ["float", "numpy scalar", "0-d array", "list", "ndarray", "ndarray 2-d", "Quantity",
         "Quantity, second registry", "list of Quantities", "xarray", "pint-xarray",
         "pandas Series", "dask", "dask under xarray", "masked array"]


def _quantity(registry, value, unit_text):
    """``value`` (SI) as a Quantity in the caller unit of its kind, or plain if dimensionless."""
    unit = CALLER_UNITS[unit_text]
    if unit is None:
        return value
    si = registry.Quantity(np.asarray(value, dtype=float), {"rad": "radian", "Pa": "pascal",
                                                             "K": "kelvin"}[unit_text])
    return si.to(unit) if np.ndim(value) else registry.Quantity(si.to(unit).magnitude.item(),
                                                                 unit)


def make_inputs(kind, arguments):
    """The arguments as ``kind``; returns (kwargs, positional names in order, reference kwargs
    in SI ndarrays broadcast the way the kind broadcasts)."""
    names = list(arguments)
    si = {name: np.array(values, dtype=float) for name, (_, values) in arguments.items()}
    units = {name: unit for name, (unit, _) in arguments.items()}
    if kind == "float":
        return {n: float(si[n][1]) for n in names}, {n: si[n][1] for n in names}
    if kind == "numpy scalar":
        return {n: np.float64(si[n][1]) for n in names}, {n: si[n][1] for n in names}
    if kind == "0-d array":
        return {n: np.array(si[n][1]) for n in names}, {n: si[n][1] for n in names}
    if kind == "list":
        return {n: si[n].tolist() for n in names}, si
    if kind == "ndarray":
        return dict(si), si
    if kind == "ndarray 2-d":  # first argument down the rows, the others along the columns
        shaped = {n: (si[n][:, None] if i == 0 else si[n][None, :]) for i, n in enumerate(names)}
        return shaped, shaped
    if kind in ("Quantity", "Quantity, second registry"):
        registry = UREG if kind == "Quantity" else SECOND_REGISTRY
        return {n: _quantity(registry, si[n], units[n]) for n in names}, si
    if kind == "list of Quantities":
        out = {}
        for n in names:
            q = _quantity(UREG, si[n], units[n])
            out[n] = [q[i] for i in range(3)] if units[n] else si[n].tolist()
        return out, si
    if kind in ("xarray", "pint-xarray", "dask under xarray"):
        out, ref = {}, {}
        for i, n in enumerate(names):
            dim = f"axis_{n}"
            data = si[n]
            if kind == "dask under xarray":
                data = da.from_array(data, chunks=2)
            array = xr.DataArray(data, dims=dim, coords={dim: [10, 20, 30]},
                                 attrs={"note": "invented sweep"})
            if kind == "pint-xarray" and units[n]:
                array = xr.DataArray(_quantity(UREG, si[n], units[n]), dims=dim,
                                     coords={dim: [10, 20, 30]})
            out[n] = array
            shape = [1] * len(names)
            shape[i] = 3
            ref[n] = si[n].reshape(shape)
        return out, ref
    if kind == "pandas Series":
        index = pd.Index(["a", "b", "c"], name="case")
        return {n: pd.Series(si[n], index=index) for n in names}, si
    if kind == "dask":
        return {n: da.from_array(si[n], chunks=2) for n in names}, si
    if kind == "masked array":
        return {n: np.ma.array(si[n], mask=[False, True, False]) for n in names}, si
    raise AssertionError(kind)


#: the unit of the single value some relations return
SINGLE_VALUE_UNITS = {gd.prandtl_meyer: "rad", gd.mach_from_prandtl_meyer: ""}


def _fields(result, function=None):
    """(name, value, unit text) for each field of a result, a tuple of angles or one value."""
    if isinstance(result, tuple):
        return [("deflection", result[0], "rad"), ("wave_angle", result[1], "rad")]
    if isinstance(result, gd.FlowState):
        return [(n, getattr(result, n), u) for n, u in
                (("M", ""), ("p", "Pa"), ("T", "K"), ("direction", "rad"), ("rho", "kg/m³"),
                 ("a", "m/s"), ("p0", "Pa"), ("T0", "K"), ("nu", "rad"), ("mu", "rad"))]
    if hasattr(type(result), "__dataclass_fields__"):
        return [(f.name, getattr(result, f.name), f.unit) for f in result_fields(type(result))]
    return [("value", result, SINGLE_VALUE_UNITS[function])]


def _si_magnitude(value, unit_text):
    """Plain SI numbers of an output of any kind (computing lazy ones)."""
    if isinstance(value, xr.DataArray):
        value = value.data
    if isinstance(value, pd.Series):
        value = value.to_numpy()
    if isinstance(value, pint.Quantity):
        value = value.to({"rad": "radian", "Pa": "pascal", "K": "kelvin", "m/s": "m/s",
                          "kg/m³": "kg/m**3", "": "dimensionless"}[unit_text]).magnitude
    if hasattr(value, "compute"):
        value = value.compute()
    if isinstance(value, np.ma.MaskedArray):
        value = np.ma.filled(value, np.nan)
    return np.asarray(value, dtype=float)


def _call(function, kwargs, options):
    if function is gd.FlowState:
        return function(**kwargs, **options)
    names = list(kwargs)
    first = names[0]
    positional = first in ("M", "M1", "nu")
    if positional:
        return function(kwargs[first], **{k: v for k, v in kwargs.items() if k != first}, **options)
    return function(**kwargs, **options)


@pytest.mark.parametrize("kind", KINDS)
@pytest.mark.parametrize("relation", list(RELATIONS))
def test_every_kind_gives_the_ndarray_numbers_with_labels_and_units(relation, kind):
    function, arguments, options = RELATIONS[relation]
    if relation.endswith("strong)"):
        options = {**options, "branch": "strong"}
    if kind in ("dask", "dask under xarray") and function is gd.FlowState:
        kwargs, _ = make_inputs(kind, arguments)
        with pytest.raises(InvalidInputError, match="dask"):
            _call(function, kwargs, options)
        return
    kwargs, reference_kwargs = make_inputs(kind, arguments)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no pint, numpy or degrees warning on legal input
        result = _call(function, kwargs, options)
    reference = _call(function, {k: np.asarray(v) for k, v in reference_kwargs.items()}, options)
    ref_fields = {name: (value, unit) for name, value, unit in _fields(reference, function)}
    for name, value, unit in _fields(result, function):
        expected = np.asarray(ref_fields[name][0], dtype=float)
        got = _si_magnitude(value, unit)
        if kind == "masked array":
            assert isinstance(value, np.ma.MaskedArray), name
            assert value.mask.tolist() == [False, True, False], name
            expected = np.where([False, True, False], np.nan, expected)
        elif kind in ("float", "numpy scalar", "0-d array"):
            quantity_given = False
            assert isinstance(value, float if not quantity_given else pint.Quantity), (name, value)
        np.testing.assert_allclose(got, expected, rtol=1e-13, atol=0, equal_nan=True,
                                   err_msg=f"{relation}, {kind}, field {name}")
        _assert_container(kind, value, unit, arguments, name)


def _assert_container(kind, value, unit, arguments, name):
    dimensional = bool(unit)
    if kind in ("xarray", "pint-xarray", "dask under xarray"):
        assert isinstance(value, xr.DataArray), name
        assert value.dims == tuple(f"axis_{n}" for n in arguments), name
        for n in arguments:
            assert value.coords[f"axis_{n}"].values.tolist() == [10, 20, 30]
        if kind == "pint-xarray" and dimensional and any(u for u, _ in arguments.values()):
            assert isinstance(value.data, pint.Quantity), name  # quantified where inputs were
        if kind == "dask under xarray":
            assert type(value.data).__module__.startswith("dask"), name  # still lazy
    elif kind == "pandas Series":
        assert isinstance(value, pd.Series), name
        assert value.index.tolist() == ["a", "b", "c"], name
    elif kind == "dask":
        assert type(value).__module__.startswith("dask"), name
    elif kind in ("Quantity", "Quantity, second registry", "list of Quantities"):
        any_quantity = any(u for u, _ in arguments.values())
        if dimensional and any_quantity:
            assert isinstance(value, pint.Quantity), name
            registry = UREG.get() if kind != "Quantity, second registry" else SECOND_REGISTRY
            assert value._REGISTRY is registry, name  # the caller's own registry
            given = {u for u, _ in arguments.values() if u}
            if unit in given:  # results of a kind the caller gave come back in the caller's unit
                assert str(value.units) == str(registry.Unit(CALLER_UNITS[unit])), name
        elif not dimensional:
            assert not isinstance(value, pint.Quantity), name


def test_quantity_results_add_to_the_callers_own_quantities():
    # a Quantity from the caller's own registry comes back in that registry
    shock = gd.oblique_shock(3.0, deflection=12 * SECOND_REGISTRY.deg)
    total = shock.wave_angle + 1 * SECOND_REGISTRY.deg
    assert total.units == SECOND_REGISTRY.deg


def test_pint_xarray_degrees_are_never_read_as_radians():
    # the silent wrong answer of issue 10: 0.2 and 0.3 degrees at M = 3 are tiny turns, whose
    # wave angles lie just above the Mach angle asin(1/3) = 19.47° (not 28.7° and 34.6°)
    turns = xr.DataArray(_quantity(UREG, np.radians([0.2, 0.3]), "rad"), dims="turn")
    beta = gd.oblique_shock(3.0, deflection=turns).wave_angle
    degrees = beta.data.to("deg").magnitude
    assert np.all(degrees > math.degrees(math.asin(1 / 3)))
    assert np.all(degrees < 20.0)


def test_dataarrays_broadcast_by_dimension_name():
    mach = xr.DataArray([2.0, 3.0, 4.0], dims="mach")
    turn = xr.DataArray(np.radians([4.0, 8.0]), dims="turn")
    shock = gd.oblique_shock(mach, deflection=turn)
    assert shock.p2_p1.dims == ("mach", "turn")
    assert shock.p2_p1.shape == (3, 2)
    swapped = gd.oblique_shock(mach.T, deflection=turn.T)
    xr.testing.assert_identical(swapped.p2_p1, shock.p2_p1)


def test_dataarrays_with_different_coordinates_on_one_dimension_are_refused():
    a = xr.DataArray([2.0, 3.0], dims="case", coords={"case": [1, 2]})
    b = xr.DataArray([0.1, 0.2], dims="case", coords={"case": [1, 3]})
    with pytest.raises(InvalidInputError, match="coordinates"):
        gd.oblique_shock(a, deflection=b)


def test_an_unlabelled_array_beside_dataarrays_is_refused():
    with pytest.raises(InvalidInputError, match="DataArray"):
        gd.oblique_shock(xr.DataArray([2.0, 3.0], dims="mach"), deflection=np.array([0.1, 0.2]))


def test_series_with_different_indexes_are_refused():
    with pytest.raises(InvalidInputError, match="index"):
        gd.oblique_shock(pd.Series([2.0, 3.0], index=[0, 1]),
                         deflection=pd.Series([0.1, 0.2], index=[1, 2]))


def test_nothing_is_computed_before_compute():
    calls = []

    def counted(block):
        calls.append(block.shape)
        return block

    mach = da.from_array(np.linspace(1.5, 4.0, 8), chunks=4).map_blocks(
        counted, meta=np.array((), dtype=float))
    flow = gd.isentropic_flow(mach)
    shock = gd.oblique_shock(mach, deflection=0.1, errors="nan")
    assert calls == []  # building the results computed nothing
    np.testing.assert_allclose(flow.p_p0.compute(), gd.isentropic_flow(
        np.linspace(1.5, 4.0, 8)).p_p0, rtol=1e-15)
    assert calls  # computing did
    assert shock.M2.chunks == ((4, 4),)


def test_dask_errors_are_raised_at_compute_with_the_argument_named():
    mach = da.from_array(np.array([2.0, 0.5, 3.0, 4.0]), chunks=2)
    shock = gd.normal_shock(mach)  # lazy: nothing checked yet
    with pytest.raises(InvalidInputError, match="M1 must be finite and >= 1.*dask block"):
        shock.p2_p1.compute()


def test_float32_is_computed_in_float64():
    flow = gd.isentropic_flow(np.array([2.0, 3.0], dtype=np.float32))
    assert flow.p_p0.dtype == np.float64
    np.testing.assert_array_equal(flow.p_p0, gd.isentropic_flow(np.array([2.0, 3.0])).p_p0)


def test_result_arrays_are_read_only_and_unshared():
    mach = np.array([2.0, 3.0])
    shock = gd.oblique_shock(mach, deflection=np.array([0.1, 0.1]))
    for name in ("M1", "deflection", "wave_angle", "M2", "p2_p1"):
        array = getattr(shock, name)
        assert not array.flags.writeable, name
        assert not np.shares_memory(array, mach), name
    fields = [getattr(shock, f.name) for f in result_fields(type(shock))]
    for i, a in enumerate(fields):
        for b in fields[i + 1:]:
            assert not np.shares_memory(a, b)
    with pytest.raises(Exception):  # frozen: fields cannot be reassigned
        shock.M2 = 0.0
