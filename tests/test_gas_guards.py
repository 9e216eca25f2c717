"""No silent frozen γ: every consumer of a Gas refuses a thermally perfect gas it cannot handle.

Issue 15: before the thermally perfect gas was wired through the library, FlowState, the
pressure-deflection polars, the region graph and the polar plots accepted a Gas with a
vibrational temperature and quietly used its frozen (low-temperature) γ, a wrong number
once vibration is excited. Each must either handle the gas correctly or refuse it with an
InvalidInputError that names the argument and says what is not supported.
"""

import pytest

import gasdyn2d as gd

from gasdyn2d import AIR, FlowState, Gas, InvalidInputError
from gasdyn2d.relations.gas import AIR_THERMALLY_PERFECT, refuse_thermally_perfect

HOT = AIR_THERMALLY_PERFECT


def test_refusal_names_the_argument_and_the_tool():
    refuse_thermally_perfect(AIR, "gas", "a tool")  # a perfect gas passes
    refuse_thermally_perfect(Gas(5 / 3, 2077.1), "gas", "a tool")
    with pytest.raises(InvalidInputError, match=r"gas\.x is a thermally perfect Gas .*3055\.6 K.*"
                                                r"a tool does not support"):
        refuse_thermally_perfect(HOT, "gas.x", "a tool")


def test_flow_state_handles_a_thermally_perfect_gas():
    # FlowState computes T0, p0, a, q and ν with γ(T) (tests/test_thermally_perfect_calls.py);
    # at 230 K and M 6 the frozen γ would overstate T0 by about 180 K
    hot = FlowState(6.0, 2e3, 230.0, gas=HOT)
    assert hot.T0 < FlowState(6.0, 2e3, 230.0).T0 - 150.0


def test_the_region_graph_and_the_polars_take_it():
    # WavePattern and pressure_deflection_polar work with the gas at each region's
    # temperature (tests/test_thermally_perfect_patterns.py); they no longer refuse it
    from gasdyn2d import WavePattern
    from gasdyn2d.patterns.polars import pressure_deflection_polar

    hot = FlowState(6.0, 2e3, 230.0, gas=HOT)
    WavePattern(hot)
    assert pressure_deflection_polar(hot).max_deflection > pressure_deflection_polar(6.0).max_deflection


def test_the_tools_that_still_need_a_perfect_gas_refuse_it_by_name():
    import numpy as np

    from gasdyn2d.design.intakes import ramp_intake
    from gasdyn2d.design.section_loads import second_order_loads
    from gasdyn2d.design.sections import Section

    with pytest.raises(InvalidInputError, match="gas is a thermally perfect Gas.*"
                                                "second_order_loads does not support"):
        second_order_loads(Section.flat_plate(), 3.0, 0.05, T=1500.0, gas=HOT)
    with pytest.raises(InvalidInputError, match="'isentropic' stage does not support"):
        ramp_intake(6.0, np.radians([8.0, 9.0]), T=230.0, gas=HOT,
                    stages=["shock", "isentropic"])


def test_nozzle_performance_refuses_a_thermally_perfect_gas():
    # its frozen γ of 1.4 would pass the nozzle's γ check and be used silently
    nozzle = gd.minimum_length_nozzle(2.0, n_characteristics=10)
    with pytest.raises(InvalidInputError, match="gas is a thermally perfect Gas"):
        nozzle.performance(p0=1e6, T0=300.0, p_ambient=1e5, gas=gd.AIR_THERMALLY_PERFECT)
