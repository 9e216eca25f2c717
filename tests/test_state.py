"""Tests of gasdyn2d.relations.flow_state.FlowState and gasdyn2d.relations.gas.Gas."""

import dataclasses
import math
import warnings

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import reference as ref
from gasdyn2d import AIR, FlowState, Gas, ProbablyDegreesWarning, isentropic_flow, ureg
from gasdyn2d.errors import InvalidInputError
from gasdyn2d.relations.expansion_fans import prandtl_meyer_angle


def test_sea_level_air_matches_the_standard_atmosphere():
    # ICAO Standard Atmosphere, sea level (from memory): p = 101325 Pa, T = 288.15 K,
    # ρ = 1.2250 kg/m³, a = 340.29 m/s (γ = 1.4, R = 287.05 J/(kg·K) as in AIR)
    sea_level = FlowState(0.0, 101325.0, 288.15)
    assert ref.agrees_to_print(sea_level.rho, "1.2250")
    assert ref.agrees_to_print(sea_level.a, "340.29")
    assert sea_level.V == 0.0 and sea_level.q == 0.0
    assert sea_level.p0 == 101325.0 and sea_level.T0 == 288.15


@pytest.mark.parametrize("M", [1.5, 2.0, 2.5, 3.0, 5.0])
def test_stagnation_values_follow_the_published_isentropic_table(M):
    # SOURCES.md, "Computed values": p/p0 and T/T0 at M (agreement with NACA Report 1135
    # Table II from memory)
    table = {1.5: ("0.272403", "0.689655"), 2.0: ("0.127805", "0.555556"),
             2.5: ("0.0585277", "0.444444"), 3.0: ("0.0272237", "0.357143"),
             5.0: ("0.00189004", "0.166667")}
    state = FlowState(M, 20e3, 220.0)
    assert ref.agrees_to_print(state.p / state.p0, table[M][0])
    assert ref.agrees_to_print(state.T / state.T0, table[M][1])


@settings(max_examples=50, deadline=None)
@given(M=st.floats(0.0, 20.0), p=st.floats(1.0, 1e7), T=st.floats(20.0, 3000.0),
       g=st.floats(1.05, 1.67), R=st.floats(100.0, 5000.0))
def test_derived_fields_are_consistent(M, p, T, g, R):
    gas = Gas(g, R)
    state = FlowState(M, p, T, gas=gas)
    assert state.rho == pytest.approx(p / (R * T), rel=1e-15)  # perfect gas, p = ρRT
    assert state.a == pytest.approx(math.sqrt(g * R * T), rel=1e-15)
    assert state.V == pytest.approx(M * state.a, rel=1e-15)
    assert state.q == pytest.approx(0.5 * state.rho * state.V**2, rel=1e-13)  # q = γpM²/2
    flow = isentropic_flow(M, gamma=g)
    assert state.p0 == pytest.approx(p / flow.p_p0, rel=1e-13)
    assert state.T0 == pytest.approx(T / flow.T_T0, rel=1e-14)
    # energy: cp T0 = cp T + V²/2
    assert gas.cp * state.T0 == pytest.approx(gas.cp * T + 0.5 * state.V**2, rel=1e-13)
    if M >= 1:
        assert state.nu == pytest.approx(prandtl_meyer_angle(M, g), rel=1e-15, abs=0)
        assert state.mu == pytest.approx(math.asin(1 / M), rel=1e-14)
    else:
        assert np.isnan(state.nu) and np.isnan(state.mu)


def test_plain_numbers_in_give_plain_floats_out():
    state = FlowState(2.0, 50e3, 250.0)
    for name in ("M", "p", "T", "direction", "rho", "a", "V", "p0", "T0", "q", "nu", "mu"):
        assert type(getattr(state, name)) is float, name
    assert state.shape == ()


def test_quantities_in_give_quantities_out_in_the_callers_units():
    state = FlowState(2.5, 18 * ureg.kPa, ureg.Quantity(-103.15, "degC"),
                      direction=5 * ureg.deg)
    assert str(state.p.units) == "kilopascal" and str(state.p0.units) == "kilopascal"
    assert str(state.q.units) == "kilopascal"
    assert str(state.T0.units) == "degree_Celsius"
    assert state.T0.to("K").m == pytest.approx(170.0 * (1 + 0.2 * 6.25), rel=1e-12)
    for name in ("direction", "nu", "mu"):
        assert str(getattr(state, name).units) == "degree", name
    assert state.V.to("m/s").m == pytest.approx(2.5 * math.sqrt(1.4 * 287.05 * 170.0))
    assert str(state.rho.units) == "kilogram / meter ** 3"
    # *_si attributes are always plain SI
    assert state.p_si == pytest.approx(18e3) and state.T_si == pytest.approx(170.0)
    assert state.direction_si == pytest.approx(math.radians(5.0))


def test_a_pressure_quantity_alone_makes_angles_radians():
    state = FlowState(2.0, 1 * ureg.bar, 300.0)
    assert str(state.direction.units) == "radian" and str(state.T.units) == "kelvin"


def test_arrays_broadcast_like_a_ufunc():
    M = np.array([[1.5], [2.0], [3.0]])
    p = np.array([10e3, 50e3])
    state = FlowState(M, p, 220.0, direction=np.radians([1.0, 2.0]))
    assert state.shape == (3, 2) and state.V.shape == (3, 2) and state.nu.shape == (3, 2)
    assert state.p0[1, 0] == FlowState(2.0, 10e3, 220.0).p0
    assert FlowState([2.0, 3.0], 1e5, 300.0).q.tolist() == [
        FlowState(2.0, 1e5, 300.0).q, FlowState(3.0, 1e5, 300.0).q]


def test_state_is_immutable_and_compares_by_value():
    state = FlowState([2.0, 3.0], 1e5, 300.0)
    with pytest.raises(dataclasses.FrozenInstanceError):
        state.M = 4.0
    with pytest.raises(ValueError):
        state.M_si[0] = 4.0  # the stored arrays are read-only
    assert state == FlowState([2.0, 3.0], 1e5, 300.0)
    assert state != FlowState([2.0, 3.0], 1e5, 301.0)
    assert FlowState(np.nan, 1e5, 300.0) == FlowState(np.nan, 1e5, 300.0)


def test_nan_in_nan_out():
    state = FlowState([2.0, np.nan], [1e5, 1e5], [300.0, 300.0])
    assert np.isnan(state.V[1]) and np.isfinite(state.V[0])
    assert np.isnan(FlowState(2.0, np.nan, 300.0).p0)


@pytest.mark.parametrize("kwargs, argument, limit", [
    (dict(M=-1.0, p=1e5, T=300.0), "M", ">= 0"),
    (dict(M=np.inf, p=1e5, T=300.0), "M", "finite"),
    (dict(M=2.0, p=-1e5, T=300.0), "p", "> 0 Pa"),
    (dict(M=2.0, p=0.0, T=300.0), "p", "> 0 Pa"),
    (dict(M=2.0, p=np.inf, T=300.0), "p", "finite"),
    (dict(M=2.0, p=1e5, T=0.0), "T", "> 0 K"),
    (dict(M=2.0, p=1e5, T=ureg.Quantity(-300.0, "degC")), "T", "> 0 K"),
    (dict(M=2.0, p=1e5, T=300.0, direction=np.inf), "direction", "finite"),
])
def test_bad_values_raise_naming_argument_and_limit(kwargs, argument, limit):
    with pytest.raises(InvalidInputError) as info:
        FlowState(**kwargs)
    message = str(info.value)
    assert message.startswith(argument + " ") and limit in message


def test_bad_units_shapes_and_gas():
    with pytest.raises(InvalidInputError, match=r"^p has units of m"):
        FlowState(2.0, 3 * ureg.m, 300.0)
    with pytest.raises(InvalidInputError, match=r"^T has units of"):
        FlowState(2.0, 1e5, 3 * ureg.Pa)
    with pytest.raises(InvalidInputError, match=r"direction has units"):
        FlowState(2.0, 1e5, 300.0, direction=2 * ureg.s)
    with pytest.raises(InvalidInputError, match=r"do not broadcast.*M \(3,\), p \(2,\)"):
        FlowState([1.0, 2.0, 3.0], [1e5, 2e5], 300.0)
    with pytest.raises(InvalidInputError, match="gas must be a gasdyn2d.Gas"):
        FlowState(2.0, 1e5, 300.0, gas=1.4)


def test_direction_in_degrees_by_mistake_warns_at_the_callers_line():
    with pytest.warns(ProbablyDegreesWarning, match="direction = 10") as record:
        FlowState(2.0, 1e5, 300.0, direction=10.0)
    assert record[0].filename == __file__
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        FlowState(2.0, 1e5, 300.0, direction=10 * ureg.deg)  # a Quantity never warns


def test_display_and_dataframe():
    state = FlowState([2.0, 3.0], 1e5, 300.0)
    text = repr(state)
    assert text.startswith("FlowState: 2 rows") and "V [m/s]" in text  # one row per case
    assert "<table>" in state._repr_html_()
    frame = FlowState(2.0, 1e5, 300.0).to_dict()
    assert frame["M"] == 2.0


# ----------------------------------------------------------------- Gas


def test_gas_properties_and_air():
    # facts of the trade: cp = γR/(γ-1), cv = R/(γ-1); for AIR cp = 1004.675 J/(kg·K)
    assert AIR.gamma == 1.4 and AIR.R == 287.05
    assert AIR.cp == pytest.approx(3.5 * 287.05, rel=1e-15)
    assert AIR.cv == pytest.approx(2.5 * 287.05, rel=1e-15)
    helium = Gas(5 / 3, 2077.1)
    assert helium.cp - helium.cv == pytest.approx(2077.1, rel=1e-14)
    assert Gas(1.4, 287.05 * ureg("J/(kg*K)")).R == pytest.approx(287.05)
    assert Gas(1.3, 0.3 * ureg("kJ/(kg*K)")).R == pytest.approx(300.0)
    with pytest.raises(dataclasses.FrozenInstanceError):
        AIR.gamma = 1.3


@pytest.mark.parametrize("kwargs, text", [
    (dict(gamma=1.0), "gamma must be a finite number > 1; got 1.0"),
    (dict(gamma=0.5), "gamma must be a finite number > 1"),
    (dict(gamma=np.nan), "gamma must be a finite number > 1"),
    (dict(R=-1.0), "R must be a finite number > 0"),
    (dict(R=np.inf), "R must be a finite number > 0"),
    (dict(gamma=[1.4, 1.3]), "gamma must be a single ratio of specific heats"),
    (dict(gamma="1.4"), "gamma must be a real number or an array of real numbers; got the string"),
    (dict(R=287 * ureg("J/kg")), "R has units of"),
])
def test_gas_rejects_bad_input(kwargs, text):
    with pytest.raises(InvalidInputError, match=text.replace("(", r"\(")):
        Gas(**kwargs)


def test_result_tables_convert_to_a_dataframe_with_units_in_the_column_names():
    from gasdyn2d import oblique_shock

    shock = oblique_shock([2.0, 3.0, 4.0], deflection=[0.1, 0.2, 0.3])
    frame = shock.to_dataframe()
    assert list(frame.columns)[:3] == ["M1", "deflection [rad]", "wave_angle [rad]"]
    assert len(frame) == 3 and frame["p2_p1"].tolist() == shock.p2_p1.tolist()
    in_degrees = oblique_shock(2.0, deflection=[5.0, 10.0] * ureg.deg).to_dataframe()
    assert "wave_angle [deg]" in in_degrees.columns
