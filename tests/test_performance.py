"""Tests of nozzle performance: mass flow, thrust, thrust coefficient, specific impulse.

Sources:
- The ideal 1-D thrust coefficient and the choked mass flow (Sutton & Biblarz, Rocket
  Propulsion Elements; /work/shared/SOURCES.md, "Nozzle performance"), written below
  independently in mpmath at 30 digits.
- NACA Report 1135, eqs. 44 and 80 (p/p0, A/A*) inside that reference.
- Facts of the trade: thrust is linear in ambient pressure with slope -A_exit; a uniform,
  parallel exit has divergence factor 1; the vacuum thrust coefficient of an ideal nozzle
  rises with its area ratio.
- Summerfield criterion (Summerfield, Foster & Swan 1954, from memory; an estimate):
  separation where the wall pressure falls below about 0.25-0.4 of ambient.
"""

import math

import mpmath as mp
import numpy as np
import pytest

from gasdyn2d import AIR, Gas, ureg
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle
from gasdyn2d.characteristics.performance import (
    SUMMERFIELD_PRESSURE_RATIO,
    choked_mass_flow_parameter,
    ideal_thrust_coefficient,
)
from gasdyn2d.errors import InvalidInputError


def mp_mach_from_area(ratio, g):
    g = mp.mpf(g)

    def area(M):
        return (1 / M) * ((2 + (g - 1) * M * M) / (g + 1)) ** ((g + 1) / (2 * (g - 1)))

    return mp.findroot(lambda M: area(M) - ratio, 1 + 2 * mp.sqrt(mp.mpf(ratio) - 1))


def mp_thrust_coefficient(ratio, pa_p0, g=1.4):
    """Sutton's ideal CF (SOURCES.md), 30 digits."""
    with mp.workdps(30):
        g, ratio, pa_p0 = mp.mpf(g), mp.mpf(ratio), mp.mpf(pa_p0)
        M = mp_mach_from_area(ratio, g)
        pe = (1 + (g - 1) / 2 * M * M) ** (-g / (g - 1))
        momentum = mp.sqrt(2 * g * g / (g - 1) * (2 / (g + 1)) ** ((g + 1) / (g - 1))
                           * (1 - pe ** ((g - 1) / g)))
        return momentum + (pe - pa_p0) * ratio, pe


def mp_choked_mass_flow(p0, T0, area, g=1.4, R=287.05):
    """ṁ = p0 A* √(γ/(R T0)) (2/(γ+1))^((γ+1)/(2(γ-1))) (SOURCES.md), 30 digits."""
    with mp.workdps(30):
        g = mp.mpf(g)
        return (mp.mpf(p0) * area * mp.sqrt(g / (R * mp.mpf(T0)))
                * (2 / (g + 1)) ** ((g + 1) / (2 * (g - 1))))


@pytest.mark.parametrize("ratio, pa_p0, gamma", [(1.6875, 0.0, 1.4), (4.2346, 0.05, 1.4),
                                                 (25.0, 0.001, 1.25), (2.0, 0.3, 1.67)])
def test_ideal_thrust_coefficient_against_mpmath(ratio, pa_p0, gamma):
    # Sutton's formula at 30 digits (mpmath reference above)
    expected, _ = mp_thrust_coefficient(ratio, pa_p0, gamma)
    assert float(ideal_thrust_coefficient(ratio, pa_p0, gamma)) == pytest.approx(
        float(expected), rel=1e-12)


def test_choked_mass_flow_parameter():
    # √γ (2/(γ+1))^((γ+1)/(2(γ-1))): 0.6847314563772705 at γ = 1.4 (mpmath below)
    for g in (1.13, 1.4, 5 / 3):
        with mp.workdps(30):
            expected = mp.sqrt(g) * (2 / (mp.mpf(g) + 1)) ** ((g + 1) / (2 * (mp.mpf(g) - 1)))
        assert float(choked_mass_flow_parameter(g)) == pytest.approx(float(expected), rel=1e-14)


@pytest.fixture(scope="module", params=["planar", "axisymmetric"])
def ideal_nozzle(request):
    # Mach 2.5, 20 mm throat (half-height or radius), n = 100: uniform parallel exit
    return minimum_length_nozzle(2.5, n_characteristics=100, throat_half_height=0.01,
                                 geometry=request.param)


def _throat_area(nozzle, h=0.01):
    return math.pi * h * h if nozzle.geometry == "axisymmetric" else 2 * h


def test_mass_flow_is_the_choked_throat_formula(ideal_nozzle):
    # to rounding for the 1-D value; within the method's error (the contour's area-ratio
    # error, 7e-4 here) when integrated over the computed exit plane
    p0, T0 = 2.0e6, 320.0
    perf = ideal_nozzle.performance(p0=p0, T0=T0, p_ambient=1.0e5)
    expected = float(mp_choked_mass_flow(p0, T0, _throat_area(ideal_nozzle)))
    assert perf.mass_flow == pytest.approx(expected, rel=2e-15)
    relative_area = ideal_nozzle.area_ratio / ideal_nozzle.area_ratio_isentropic
    assert perf.mass_flow_exit_plane == pytest.approx(expected * relative_area, rel=1e-13)
    assert perf.mass_flow_exit_plane == pytest.approx(expected, rel=1e-3)


@pytest.mark.parametrize("pa_over_pe", [1.0, 3.0, 0.3, 0.0])  # matched, over-, under-, vacuum
def test_ideal_nozzle_thrust_coefficient_is_the_1d_value(ideal_nozzle, pa_over_pe):
    # Sutton's CF at the design area ratio A/A*(2.5) (mpmath), against the CF integrated over
    # the computed exit plane: equal within the method's error (area ratio 7e-4 short)
    design_ratio = 2.63671875  # A/A*(2.5) = 0.4·1.875³ exactly (NACA Report 1135, eq. 80)
    _, pe = mp_thrust_coefficient(design_ratio, 0.0)
    pa_p0 = float(pe) * pa_over_pe
    expected, _ = mp_thrust_coefficient(design_ratio, pa_p0)
    perf = ideal_nozzle.performance(p0=1.0, T0=300.0, p_ambient=pa_p0)
    assert perf.thrust_coefficient == pytest.approx(float(expected), rel=1.5e-3)
    assert perf.divergence_factor == 1.0  # uniform, parallel exit
    state = {1.0: "matched", 3.0: "over-expanded", 0.3: "under-expanded",
             0.0: "under-expanded"}[pa_over_pe]
    assert perf.expansion_state == state
    assert perf.separation_likely == (pa_over_pe > 1 / SUMMERFIELD_PRESSURE_RATIO)


def test_thrust_is_linear_in_ambient_pressure(ideal_nozzle):
    # Fact of the trade: dF/dpa = -A_exit
    pa = np.linspace(0.0, 2.0e5, 7)
    perf = ideal_nozzle.performance(p0=3.0e6, T0=300.0, p_ambient=pa)
    h_e = ideal_nozzle.exit_half_height
    exit_area = math.pi * h_e**2 if ideal_nozzle.geometry == "axisymmetric" else 2 * h_e
    assert np.allclose(np.diff(perf.thrust) / np.diff(pa), -exit_area, rtol=1e-12)
    assert perf.specific_impulse == pytest.approx(perf.thrust / perf.mass_flow / 9.80665,
                                                  rel=1e-15)
    assert perf.effective_exhaust_velocity == pytest.approx(perf.thrust / perf.mass_flow,
                                                            rel=1e-15)


def test_vacuum_thrust_coefficient_rises_with_area_ratio():
    # Property (fact of the trade): an ideal nozzle of larger area ratio gives more vacuum CF
    for geometry in ("planar", "axisymmetric"):
        cf = [minimum_length_nozzle(M, n_characteristics=20, geometry=geometry)
              .performance(p0=1.0, T0=300.0, p_ambient=0.0).thrust_coefficient
              for M in (1.5, 2.0, 3.0, 4.0)]
        assert np.all(np.diff(cf) > 0), cf


def test_summerfield_flag_and_expansion_states():
    nozzle = minimum_length_nozzle(3.0, n_characteristics=20, geometry="axisymmetric")
    pe = nozzle.performance(p0=1.0, T0=300.0, p_ambient=0.0).exit_pressure
    pa = pe * np.array([0.5, 1.0, 2.0, 2.4, 2.6, 4.0])
    perf = nozzle.performance(p0=1.0, T0=300.0, p_ambient=pa)
    assert perf.expansion_state.tolist() == ["under-expanded", "matched", "over-expanded",
                                             "over-expanded", "over-expanded", "over-expanded"]
    # Summerfield (estimate): wall pressure below 0.4 of ambient, i.e. pa > 2.5 pe here
    assert perf.separation_likely.tolist() == [False, False, False, False, True, True]


def test_altitude_sweep_is_vectorised_and_units_follow_the_inputs():
    nozzle = minimum_length_nozzle(2.5, n_characteristics=30, throat_half_height=15 * ureg.mm,
                                   geometry="axisymmetric")
    pa = np.linspace(0.0, 101.325, 10_000) * ureg.kPa
    perf = nozzle.performance(p0=2.0 * ureg.MPa, T0=290 * ureg.K, p_ambient=pa)
    assert perf.thrust.shape == (10_000,) and str(perf.thrust.units) == "newton"
    assert str(perf.exit_pressure.units) == "megapascal"
    assert str(perf.mass_flow.units) == "kilogram / second"
    assert str(perf.specific_impulse.units) == "second"
    plain = nozzle.performance(p0=2.0e6, T0=290.0, p_ambient=pa.m_as("Pa"))
    assert perf.thrust.m_as("N") == pytest.approx(plain.thrust, rel=1e-13)
    # planar results are per metre of depth
    planar = minimum_length_nozzle(2.5, n_characteristics=30, throat_half_height=15 * ureg.mm)
    per_depth = planar.performance(p0=2.0 * ureg.MPa, T0=290 * ureg.K, p_ambient=0 * ureg.Pa)
    assert per_depth.thrust.check("[force] / [length]")
    assert per_depth.mass_flow.check("[mass] / [time] / [length]")
    # scalars in, scalars out; p0 and T0 broadcast like p_ambient
    single = nozzle.performance(p0=2.0e6, T0=290.0, p_ambient=5.0e4)
    assert isinstance(single.thrust, float) and isinstance(single.expansion_state, str)
    grid = nozzle.performance(p0=np.array([[1e6], [2e6]]), T0=290.0, p_ambient=[0.0, 1e5, 2e5])
    assert grid.thrust.shape == (2, 3) and grid.mass_flow.shape == (2, 3)
    assert "NozzlePerformance" in repr(single)


def test_performance_bad_input():
    nozzle = minimum_length_nozzle(2.0, n_characteristics=12, geometry="axisymmetric")
    with pytest.raises(InvalidInputError, match="p0"):
        nozzle.performance(p0=-1.0, T0=300.0, p_ambient=0.0)
    with pytest.raises(InvalidInputError, match="T0"):
        nozzle.performance(p0=1e6, T0=0.0, p_ambient=0.0)
    with pytest.raises(InvalidInputError, match="p_ambient"):
        nozzle.performance(p0=1e6, T0=300.0, p_ambient=[1e5, -1.0])
    with pytest.raises(InvalidInputError, match="p0"):
        nozzle.performance(p0=3 * ureg.m, T0=300.0, p_ambient=0.0)
    with pytest.raises(InvalidInputError, match="gamma"):
        nozzle.performance(p0=1e6, T0=300.0, p_ambient=0.0, gas=Gas(1.3, 287.0))
    with pytest.raises(InvalidInputError, match="gas"):
        nozzle.performance(p0=1e6, T0=300.0, p_ambient=0.0, gas=1.4)
    swept = nozzle.performance(p0=1e6, T0=300.0, p_ambient=[1e5, -1.0, np.nan], errors="nan")
    assert np.isfinite(swept.thrust[0]) and np.all(np.isnan(swept.thrust[1:]))
    helium = minimum_length_nozzle(2.0, n_characteristics=12, gamma=5 / 3)
    assert helium.performance(p0=1e6, T0=300.0, p_ambient=0.0,
                              gas=Gas(5 / 3, 2077.1)).mass_flow > 0
    assert AIR.gamma == 1.4
