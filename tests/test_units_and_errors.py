"""The unit boundary and the error policy, across every public function of the core.

Conventions under test (issue 2): plain numbers are SI (radians); pint Quantities of any
compatible unit are accepted, from pint's application registry, and angular results come
back in the caller's angle unit; bad input raises a ValueError subclass from
gasdyn2d.errors naming the argument, the first offending value, how many failed and the
limit; ``errors="nan"`` NaNs only the bad elements; a plain angle above 2π warns
ProbablyDegreesWarning at the caller's line.
"""

import math
import warnings

import numpy as np
import pint
import pytest

import gasdyn2d
from gasdyn2d import (
    DetachedShockError,
    FlowState,
    GasDynamicsError,
    IllPosedProblemError,
    InvalidInputError,
    NoSolutionError,
    ProbablyDegreesWarning,
    expansion_fan,
    isentropic_flow,
    mach_from_prandtl_meyer,
    max_deflection,
    normal_shock,
    oblique_shock,
    prandtl_meyer,
    sonic_deflection,
    ureg,
)

# ----------------------------------------------------------------- error classes


def test_every_error_is_a_value_error_from_the_package():
    for cls in (GasDynamicsError, InvalidInputError, DetachedShockError, NoSolutionError,
                IllPosedProblemError):
        assert issubclass(cls, ValueError) and issubclass(cls, GasDynamicsError)
    assert issubclass(DetachedShockError, InvalidInputError)
    assert issubclass(ProbablyDegreesWarning, UserWarning)


# ----------------------------------------------------------------- bad values
# (call, error class, argument named first, text that must appear: the limit or the range)

BAD_VALUES = [
    # Mach number below 1 where the relation needs supersonic flow
    (lambda: normal_shock(0.8), InvalidInputError, "M1", ">= 1"),
    (lambda: oblique_shock(0.9, deflection=0.1), InvalidInputError, "M1", ">= 1"),
    (lambda: prandtl_meyer(0.99), InvalidInputError, "M", ">= 1"),
    (lambda: expansion_fan(0.5, deflection=0.1), InvalidInputError, "M1", ">= 1"),
    (lambda: max_deflection(0.5), InvalidInputError, "M1", ">= 1"),
    (lambda: sonic_deflection(0.5), InvalidInputError, "M1", ">= 1"),
    # negative or non-finite values
    (lambda: isentropic_flow(-0.1), InvalidInputError, "M", ">= 0"),
    (lambda: isentropic_flow(np.inf), InvalidInputError, "M", "finite"),
    (lambda: normal_shock(np.inf), InvalidInputError, "M1", "finite"),
    (lambda: oblique_shock(np.inf, deflection=0.1), InvalidInputError, "M1", "finite"),
    (lambda: prandtl_meyer(-np.inf), InvalidInputError, "M", "finite"),
    (lambda: oblique_shock(2.0, deflection=-0.01), InvalidInputError, "deflection", ">= 0"),
    (lambda: expansion_fan(2.0, deflection=-0.01), InvalidInputError, "deflection", ">= 0"),
    (lambda: mach_from_prandtl_meyer(-0.01), InvalidInputError, "nu", ">= 0"),
    # deflection beyond detachment: own error class, and θmax in the message
    (lambda: oblique_shock(2.0, deflection=25 * ureg.deg), DetachedShockError, "deflection",
     "the limit there is 0.40096377 rad (22.9735°)"),  # θmax(2) = 22.9735°, SOURCES.md
    (lambda: oblique_shock(3.0, deflection=np.radians([10.0, 35.0])), DetachedShockError,
     "deflection", "(34.0734°)"),  # θmax(3) = 34.0734°, SOURCES.md
    # pressure, density, temperature ratios of a shock below 1; other ranges
    (lambda: normal_shock(p2_p1=0.9), InvalidInputError, "p2_p1", ">= 1"),
    (lambda: normal_shock(T2_T1=0.99), InvalidInputError, "T2_T1", ">= 1"),
    (lambda: normal_shock(rho2_rho1=0.5), InvalidInputError, "rho2_rho1", "[1, (γ+1)/(γ-1))"),
    (lambda: normal_shock(rho2_rho1=7.0), InvalidInputError, "rho2_rho1",
     "the limit there is 6"),
    (lambda: normal_shock(M2=1.2), InvalidInputError, "M2", "1]"),
    (lambda: normal_shock(M2=0.3), InvalidInputError, "M2", "the limit there is 0.377964"),
    (lambda: normal_shock(p02_p01=1.01), InvalidInputError, "p02_p01", "(0, 1]"),
    (lambda: normal_shock(p02_p01=0.0), InvalidInputError, "p02_p01", "(0, 1]"),
    (lambda: normal_shock(p02_p1=1.5), InvalidInputError, "p02_p1", "the limit there is 1.89"),
    (lambda: oblique_shock(2.0, p2_p1=0.9), InvalidInputError, "p2_p1", "between 1"),
    (lambda: oblique_shock(2.0, p2_p1=5.0), InvalidInputError, "p2_p1", "the limit there is 4.5"),
    (lambda: oblique_shock(2.0, Mn1=0.9), InvalidInputError, "Mn1", "between 1 and M1"),
    (lambda: oblique_shock(2.0, Mn1=2.5), InvalidInputError, "Mn1", "the limit there is 2"),
    (lambda: oblique_shock(2.0, wave_angle=20 * ureg.deg), InvalidInputError, "wave_angle",
     "the limit there is 0.5235987756 rad (30°)"),
    (lambda: oblique_shock(2.0, wave_angle=100 * ureg.deg), InvalidInputError, "wave_angle",
     "π/2"),
    (lambda: expansion_fan(2.0, p2_p1=1.5), InvalidInputError, "p2_p1", "between 0 and 1"),
    (lambda: expansion_fan(2.0, M2=1.5), InvalidInputError, "M2", "the limit there is 2"),
    (lambda: expansion_fan(2.0, deflection=2.0), InvalidInputError, "deflection",
     "ν_max - ν(M1)"),
    (lambda: mach_from_prandtl_meyer(200 * ureg.deg), InvalidInputError, "nu", "(130.454°)"),
    # area ratio below 1 and isentropic ratios outside (0, 1]
    (lambda: isentropic_flow(A_Astar=0.9), InvalidInputError, "A_Astar", ">= 1"),
    (lambda: isentropic_flow(A_Astar=np.inf), InvalidInputError, "A_Astar", "finite"),
    (lambda: isentropic_flow(p_p0=1.2), InvalidInputError, "p_p0", "(0, 1]"),
    (lambda: isentropic_flow(T_T0=0.0), InvalidInputError, "T_T0", "(0, 1]"),
    (lambda: isentropic_flow(rho_rho0=-0.5), InvalidInputError, "rho_rho0", "(0, 1]"),
    (lambda: isentropic_flow(mach_angle=100 * ureg.deg), InvalidInputError, "mach_angle",
     "(0, π/2]"),
    (lambda: isentropic_flow(prandtl_meyer=-0.1), InvalidInputError, "prandtl_meyer", ">= 0"),
    # gamma <= 1 or not finite, everywhere
    (lambda: isentropic_flow(2.0, gamma=1.0), InvalidInputError, "gamma", "> 1"),
    (lambda: normal_shock(2.0, gamma=0.9), InvalidInputError, "gamma", "> 1"),
    (lambda: oblique_shock(2.0, deflection=0.1, gamma=[1.4, 1.0]), InvalidInputError, "gamma",
     "> 1"),
    (lambda: prandtl_meyer(2.0, gamma=np.inf), InvalidInputError, "gamma", "finite"),
    (lambda: mach_from_prandtl_meyer(0.5, gamma=-1.4), InvalidInputError, "gamma", "> 1"),
    (lambda: expansion_fan(2.0, M2=3.0, gamma=1.0), InvalidInputError, "gamma", "> 1"),
    (lambda: max_deflection(2.0, gamma=1.0), InvalidInputError, "gamma", "> 1"),
    (lambda: sonic_deflection(2.0, gamma=1.0), InvalidInputError, "gamma", "> 1"),
]


@pytest.mark.parametrize("call, error, argument, limit", BAD_VALUES)
def test_bad_values_raise_with_argument_value_and_limit(call, error, argument, limit):
    with pytest.raises(error) as info:
        call()
    message = str(info.value)
    assert type(info.value) is error
    assert message.startswith(f"{argument} must be "), message
    assert "; got " in message, message  # the first offending value is quoted
    assert limit in message, message
    assert "errors='nan'" in message  # and the way out is offered


def test_message_counts_failures_and_gives_the_first_index():
    with pytest.raises(InvalidInputError) as info:
        normal_shock([2.0, 0.5, 3.0, 0.7])
    message = str(info.value)
    assert "got 0.5 at index (1,) (2 of 4 elements fail)" in message


def test_detached_message_quotes_theta_max_of_the_first_failing_element():
    # the limit depends on M1 and γ: quote it for the element that failed
    # (θmax(3) = 34.0734°, SOURCES.md)
    with pytest.raises(DetachedShockError, match=r"at index \(1,\).*\(34\.0734°\)"):
        oblique_shock([2.0, 3.0], deflection=[20 * math.pi / 180, 36 * math.pi / 180])


def test_a_value_at_a_limit_up_to_rounding_shows_all_digits():
    # invented edge case: when value and limit print alike at 10 digits, all digits are shown
    with pytest.raises(InvalidInputError) as info:
        normal_shock(p02_p1=1.2**3.5 * (1 - 1e-13))
    message = str(info.value)
    got = message.split("; got ")[1].split(";")[0]
    assert len(got) > 12


# ----------------------------------------------------------------- bad arguments

BAD_ARGUMENTS = [
    # unknown errors / branch
    (lambda: isentropic_flow(2.0, errors="ignore"), "errors must be 'raise' or 'nan'"),
    (lambda: normal_shock(2.0, errors="warn"), "errors must be 'raise' or 'nan'"),
    (lambda: oblique_shock(2.0, deflection=0.1, errors=None), "errors must be"),
    (lambda: prandtl_meyer(2.0, errors="NaN"), "errors must be"),
    (lambda: mach_from_prandtl_meyer(0.1, errors="x"), "errors must be"),
    (lambda: expansion_fan(2.0, deflection=0.1, errors="x"), "errors must be"),
    (lambda: max_deflection(2.0, errors="x"), "errors must be"),
    (lambda: sonic_deflection(2.0, errors="x"), "errors must be"),
    (lambda: oblique_shock(2.0, deflection=0.1, branch="medium"),
     "branch must be 'weak' or 'strong'; got 'medium'"),
    (lambda: isentropic_flow(A_Astar=2.0, branch="weak"),
     "branch must be 'supersonic' or 'subsonic'; got 'weak'"),
    # zero or several inputs
    (lambda: isentropic_flow(), "isentropic_flow takes exactly one of M, T_T0"),
    (lambda: isentropic_flow(2.0, p_p0=0.1), "got M, p_p0"),
    (lambda: normal_shock(), "normal_shock takes exactly one of M1, M2"),
    (lambda: normal_shock(2.0, p2_p1=4.5), "got M1, p2_p1"),
    (lambda: oblique_shock(2.0), "oblique_shock takes exactly one of deflection, wave_angle"),
    (lambda: oblique_shock(2.0, deflection=0.1, Mn1=1.5), "got deflection, Mn1"),
    (lambda: expansion_fan(2.0), "expansion_fan takes exactly one of deflection, p2_p1, M2"),
    (lambda: expansion_fan(2.0, M2=3.0, p2_p1=0.5), "got p2_p1, M2"),
    # wrong unit dimension
    (lambda: isentropic_flow(2.0 * ureg.m), "M has units of m"),
    (lambda: oblique_shock(2.0, deflection=3 * ureg.m), "deflection has units of m"),
    (lambda: oblique_shock(2.0, wave_angle=1 * ureg.s), "wave_angle has units of s"),
    (lambda: oblique_shock(2.0 * ureg.kg, deflection=0.1), "M1 has units of kg"),
    (lambda: isentropic_flow(mach_angle=1 * ureg.kPa), "mach_angle has units of kPa"),
    (lambda: mach_from_prandtl_meyer(1 * ureg.K), "nu has units of K"),
    (lambda: expansion_fan(2.0, deflection=1 * ureg.m), "deflection has units of m"),
    (lambda: normal_shock(2.0, gamma=1.4 * ureg.m), "gamma has units of m"),
    # shapes that do not broadcast
    (lambda: isentropic_flow([2.0, 3.0], gamma=[1.3, 1.4, 1.5]), "do not broadcast"),
    (lambda: normal_shock([2.0, 3.0], gamma=[1.3, 1.4, 1.5]), "M1 (2,), gamma (3,)"),
    (lambda: oblique_shock([2.0, 3.0], deflection=[0.1, 0.2, 0.3]),
     "M1 (2,), deflection (3,)"),
    (lambda: prandtl_meyer(np.ones((2, 3)), gamma=np.ones(2) * 1.4), "M (2, 3), gamma (2,)"),
    (lambda: mach_from_prandtl_meyer([0.1, 0.2], gamma=[1.3, 1.4, 1.5]), "do not broadcast"),
    (lambda: expansion_fan([2.0, 3.0], M2=[3.0, 4.0, 5.0]), "do not broadcast"),
    (lambda: max_deflection([2.0, 3.0], gamma=[1.3, 1.4, 1.5]), "do not broadcast"),
    # not a number at all
    (lambda: isentropic_flow("fast"), "M must be a real number"),
    (lambda: oblique_shock(2.0, deflection="10 deg"), "deflection must be a real number"),
]


@pytest.mark.parametrize("call, text", BAD_ARGUMENTS)
def test_bad_arguments_raise_invalid_input_naming_them(call, text):
    with pytest.raises(InvalidInputError) as info:
        call()
    assert text in str(info.value)


# ----------------------------------------------------------------- errors="nan"

NAN_MODE = [
    # (call with errors="nan", output field or None, expected NaN mask)
    (lambda e: isentropic_flow([2.0, -1.0, 3.0], errors=e), "p_p0", [0, 1, 0]),
    (lambda e: isentropic_flow(A_Astar=[0.5, 2.0], errors=e), "M", [1, 0]),
    (lambda e: isentropic_flow(p_p0=[0.5, 2.0, 0.0], errors=e), "M", [0, 1, 1]),
    (lambda e: isentropic_flow([2.0, 3.0], gamma=[1.0, 1.4], errors=e), "p_p0", [1, 0]),
    (lambda e: normal_shock([0.5, 2.0, np.inf], errors=e), "M2", [1, 0, 1]),
    (lambda e: normal_shock(p2_p1=[0.5, 2.0], errors=e), "M1", [1, 0]),
    (lambda e: normal_shock(M2=[0.3, 0.5, 1.5], errors=e), "M1", [1, 0, 1]),
    (lambda e: oblique_shock([2.0, 2.0, 0.5], deflection=[0.1, 0.5, 0.1], errors=e),
     "wave_angle", [0, 1, 1]),
    (lambda e: oblique_shock(2.0, wave_angle=[0.2, 0.7, 2.0], errors=e), "p2_p1", [1, 0, 1]),
    (lambda e: oblique_shock(2.0, Mn1=[0.5, 1.5, 2.5], errors=e), "M2", [1, 0, 1]),
    (lambda e: oblique_shock(2.0, p2_p1=[0.5, 1.5, 5.0], errors=e), "M2", [1, 0, 1]),
    (lambda e: expansion_fan(2.0, deflection=[-0.1, 0.1, 3.0], errors=e), "M2", [1, 0, 1]),
    (lambda e: expansion_fan([2.0, 0.5], M2=[3.0, 3.0], errors=e), "p2_p1", [0, 1]),
    (lambda e: expansion_fan(2.0, p2_p1=[0.5, 1.5], errors=e), "M2", [0, 1]),
    (lambda e: prandtl_meyer([0.5, 2.0], errors=e), None, [1, 0]),
    (lambda e: mach_from_prandtl_meyer([-0.1, 0.5, 3.0], errors=e), None, [1, 0, 1]),
    (lambda e: max_deflection([0.5, 2.0], errors=e)[0], None, [1, 0]),
    (lambda e: sonic_deflection([0.5, 2.0], gamma=[1.4, 1.0], errors=e)[1], None, [1, 1]),
]


@pytest.mark.parametrize("call, field, mask", NAN_MODE)
def test_errors_nan_marks_only_the_bad_elements(call, field, mask):
    with pytest.raises(InvalidInputError):
        call("raise")
    result = call("nan")
    values = getattr(result, field) if field else result
    np.testing.assert_array_equal(np.isnan(np.asarray(values, dtype=float)), np.array(mask, bool))


def test_errors_nan_leaves_good_elements_identical():
    mixed = oblique_shock([2.0, 2.0, 3.0], deflection=[0.1, 0.9, 0.2], errors="nan")
    good = oblique_shock([2.0, 3.0], deflection=[0.1, 0.2])
    assert mixed.wave_angle[0] == good.wave_angle[0] and mixed.wave_angle[2] == good.wave_angle[1]


def test_nan_inputs_never_raise():
    assert np.isnan(normal_shock(np.nan).M2)
    assert np.isnan(oblique_shock(2.0, deflection=np.nan).M2)
    assert np.isnan(oblique_shock(2.0, deflection=0.1, gamma=np.nan).M2)
    assert np.isnan(isentropic_flow(p_p0=np.nan).M)
    assert np.isnan(mach_from_prandtl_meyer(np.nan))
    assert np.isnan(max_deflection(np.nan)[0])
    assert np.isnan(expansion_fan(2.0, M2=np.nan).p2_p1)


# ----------------------------------------------------------------- degrees warning

ANGLE_CALLS = [
    ("deflection", lambda: oblique_shock(2.0, deflection=10.0, errors="nan")),
    ("wave_angle", lambda: oblique_shock(2.0, wave_angle=45.0, errors="nan")),
    ("deflection", lambda: expansion_fan(2.0, deflection=10.0, errors="nan")),
    ("nu", lambda: mach_from_prandtl_meyer(26.4, errors="nan")),
    ("mach_angle", lambda: isentropic_flow(mach_angle=30.0, errors="nan")),
    ("prandtl_meyer", lambda: isentropic_flow(prandtl_meyer=[0.1, 26.4], errors="nan")),
    ("direction", lambda: FlowState(2.0, 1e5, 300.0, direction=-45.0)),
]


@pytest.mark.parametrize("name, call", ANGLE_CALLS)
def test_plain_angle_above_two_pi_warns_at_the_callers_line(name, call):
    with pytest.warns(ProbablyDegreesWarning, match=f"{name} = .* probably meant in degrees"
                      ) as record:
        call()
    assert len(record) == 1
    assert record[0].filename == __file__  # pointed at this file, not inside gasdyn2d


def test_no_warning_for_quantities_radians_or_infinity():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        oblique_shock(2.0, deflection=10 * ureg.deg)
        oblique_shock(2.0, deflection=0.1)
        expansion_fan(2.0, deflection=np.radians(10.0))
        mach_from_prandtl_meyer(400 * ureg.deg, errors="nan")  # invalid, but in degrees
        oblique_shock(2.0, deflection=np.inf, errors="nan")  # not a degrees slip


# ----------------------------------------------------------------- Quantities everywhere


def test_every_public_function_takes_and_returns_quantities():
    # degrees in -> degrees out; dimensionless Quantity in -> radian Quantity out; ratios plain
    flow = isentropic_flow(mach_angle=30 * ureg.deg)
    assert flow.mach_angle.units == ureg.deg and type(flow.p_p0) is float
    flow = isentropic_flow(2.0 * ureg.dimensionless)
    assert flow.prandtl_meyer.units == ureg.rad
    shock = normal_shock(2.0 * ureg.dimensionless, gamma=1.4 * ureg.dimensionless)
    assert type(shock.M2) is float
    shock = oblique_shock(2.0, deflection=10 * ureg.deg)
    assert shock.wave_angle.units == ureg.deg and type(shock.p2_p1) is float
    shock = oblique_shock(2.0, deflection=ureg.Quantity(0.17, "rad"))
    assert shock.wave_angle.units == ureg.rad
    shock = oblique_shock(2.0, wave_angle=ureg.Quantity(45.0, "deg"))
    assert shock.deflection.units == ureg.deg
    shock = oblique_shock(2.0 * ureg.dimensionless, Mn1=1.5)
    assert shock.wave_angle.units == ureg.rad
    theta, beta = max_deflection(2.0 * ureg.dimensionless)
    assert theta.units == beta.units == ureg.rad
    theta, beta = sonic_deflection(2.0 * ureg.dimensionless)
    assert theta.units == ureg.rad
    assert prandtl_meyer(2.0 * ureg.dimensionless).units == ureg.rad
    assert type(mach_from_prandtl_meyer(26.3798 * ureg.deg)) is float
    fan = expansion_fan(2.0, deflection=10 * ureg.deg)
    assert fan.nu2.units == ureg.deg and fan.mu1.units == ureg.deg
    assert type(fan.p2_p1) is float
    # the same numbers as plain radians
    plain = oblique_shock(2.0, deflection=math.radians(10.0))
    assert shock_angle_deg(plain) == pytest.approx(
        oblique_shock(2.0, deflection=10 * ureg.deg).wave_angle.m, rel=1e-14)


def shock_angle_deg(shock):
    return math.degrees(shock.wave_angle)


def test_other_angle_units_are_converted():
    by_turns = oblique_shock(2.0, deflection=ureg.Quantity(10 / 360, "turn"))
    by_degrees = oblique_shock(2.0, deflection=10 * ureg.deg)
    assert by_turns.p2_p1 == pytest.approx(by_degrees.p2_p1, rel=1e-14)
    assert by_turns.wave_angle.units == ureg.turn
    by_arcmin = expansion_fan(2.0, deflection=ureg.Quantity(600.0, "arcminute"))
    assert by_arcmin.M2 == pytest.approx(expansion_fan(2.0, deflection=10 * ureg.deg).M2)


def test_quantity_arrays_broadcast():
    shock = oblique_shock([[2.0], [3.0]], deflection=np.array([5.0, 10.0, 15.0]) * ureg.deg)
    assert shock.wave_angle.m.shape == (2, 3) and shock.wave_angle.units == ureg.deg


def test_a_users_own_registry_set_as_application_registry_works():
    # STYLE.md: a Quantity from the user's own registry, set as the application registry,
    # must work. Restore the registry afterwards whatever happens.
    previous = pint.get_application_registry()
    own = pint.UnitRegistry()
    try:
        pint.set_application_registry(own)
        shock = oblique_shock(2.0, deflection=own.Quantity(10.0, "degree"))
        assert shock.wave_angle.m_as("degree") == pytest.approx(39.3139, abs=5e-5)  # SOURCES.md
        assert isinstance(shock.wave_angle, own.Quantity)
        state = FlowState(2.0, own.Quantity(50.0, "kPa"), own.Quantity(250.0, "K"))
        assert state.p0.m_as("kPa") == pytest.approx(50.0 / 0.127805, rel=5e-6)  # SOURCES.md
        fan = expansion_fan(2.0, deflection=own.Quantity(10.0, "degree"))
        assert fan.nu2.units == own.degree
        assert gasdyn2d.ureg is pint.get_application_registry()
    finally:
        pint.set_application_registry(previous.get() if hasattr(previous, "get") else previous)
    # back to the package's registry
    assert oblique_shock(2.0, deflection=10 * ureg.deg).wave_angle.units == ureg.deg


def test_importing_gasdyn2d_changes_no_global_state():
    # STYLE.md: no import-time side effects (registry changes, warning filters); checked in
    # a fresh interpreter so that the import really happens
    import subprocess
    import sys

    # numpy and scipy add warning filters of their own when imported: import them first
    code = ("import warnings, pint, numpy, scipy.special, scipy.optimize; "
            "f = list(warnings.filters); "
            "r = pint.get_application_registry().get(); import gasdyn2d; "
            "assert warnings.filters == f, 'warning filters changed'; "
            "assert pint.get_application_registry().get() is r, 'registry changed'")
    subprocess.run([sys.executable, "-c", code], check=True, timeout=60)
