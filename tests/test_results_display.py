"""Every public result type reads well in a terminal and a notebook, and batches become tables.

Checks: a text ``repr`` naming the type and every field with its unit, an HTML
``<table>`` from ``_repr_html_``, and for batch results a pandas DataFrame with
one row per case and columns named ``"<field> [<unit>]"``. The list of result
types is discovered from the package, so a new type without a case here fails.
"""

import dataclasses
import importlib
import pkgutil

import numpy as np
import pandas as pd
import pytest

import gasdyn2d
from gasdyn2d.boundary.results import ResultTable
from gasdyn2d.characteristics.channels import channel_flow
from gasdyn2d.characteristics.unit_processes import WallContour
from gasdyn2d.design.intake_design import contraction_limits, optimal_ramps
from gasdyn2d.design.intakes import ramp_intake
from gasdyn2d.characteristics.jets import underexpanded_slot_jet
from gasdyn2d.characteristics.nozzles import minimum_length_nozzle, rounded_throat_nozzle
from gasdyn2d.patterns.polars import pressure_deflection_polar
from gasdyn2d.patterns.reflections import free_boundary_reflection, reflection_transition, wall_reflection
from gasdyn2d.patterns.interactions import merging_shocks, shock_crossing, turn_to_pressure
from gasdyn2d.patterns.graph import WavePattern
from gasdyn2d.design.section_loads import shock_expansion_loads
from gasdyn2d.design.sections import Section

MACHS = np.array([2.0, 2.5, 3.0])  # invented batch of three cases
DEG = np.pi / 180


def _duct(M):
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=6 * DEG)
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0)
    return p.solve()


def _placed_duct(M):
    # invented: a 6° ramp at the origin, a flat roof at 0.1 m
    p = WavePattern(M)
    p.add_wave("ramp shock", upstream="1", downstream="2", family="left", turn=6 * DEG,
               start=(0.0, 0.0))
    p.add_wave("reflected", upstream="2", downstream="3", family="right")
    p.add_wall("3", direction=0.0, through=(0.0, 0.1))
    return p.solve()


# name -> (single-case factory, batch factory or None); batches have three cases
CASES = {
    "IsentropicFlow": (lambda: gasdyn2d.isentropic_flow(2.0),
                       lambda: gasdyn2d.isentropic_flow(MACHS)),
    "NormalShock": (lambda: gasdyn2d.normal_shock(2.0), lambda: gasdyn2d.normal_shock(MACHS)),
    "ObliqueShock": (lambda: gasdyn2d.oblique_shock(2.0, deflection=10 * DEG),
                     lambda: gasdyn2d.oblique_shock(MACHS, deflection=10 * DEG)),
    "ExpansionFan": (lambda: gasdyn2d.expansion_fan(2.0, deflection=10 * DEG),
                     lambda: gasdyn2d.expansion_fan(MACHS, deflection=10 * DEG)),
    "FlowState": (lambda: gasdyn2d.FlowState(2.0, 50e3, 220.0),
                  lambda: gasdyn2d.FlowState(MACHS, 50e3, 220.0)),
    "Gas": (lambda: gasdyn2d.Gas(gamma=1.4), None),
    "RampIntake": (lambda: ramp_intake(2.5, np.radians([7.0, 8.0])),
                   lambda: ramp_intake(MACHS, np.radians([7.0, 8.0]), design_mach=2.5)),
    "OptimalRamps": (lambda: optimal_ramps(2.5, 2), lambda: optimal_ramps(MACHS, 2)),
    "ContractionLimits": (lambda: contraction_limits(2.0), lambda: contraction_limits(MACHS)),
    "PressureDeflectionPolar": (lambda: pressure_deflection_polar(2.0, n=11), None),
    "RegionSolution": (lambda: _duct(2.6).region("3"), lambda: _duct(MACHS).region("3")),
    "WaveSolution": (lambda: _duct(2.6).wave("reflected"), lambda: _duct(MACHS).wave("reflected")),
    "WallReflection": (lambda: wall_reflection(2.5, 10 * DEG),
                       lambda: wall_reflection(MACHS, 10 * DEG)),
    "TransitionCondition": (lambda: reflection_transition(3.0).detachment,
                            lambda: reflection_transition(MACHS).detachment),
    "ReflectionTransition": (lambda: reflection_transition(3.0),
                             lambda: reflection_transition(MACHS)),
    "WaveConnection": (lambda: _placed_duct(2.6).connection("reflected"),
                       lambda: _placed_duct(MACHS).connection("reflected")),
    "MeetingPoint": (lambda: _placed_duct(2.6).meeting_points[0],
                     lambda: _placed_duct(MACHS).meeting_points[0]),
    "PatternCondition": (lambda: _placed_duct(2.6).conditions[0], None),
    "ShockCrossing": (lambda: shock_crossing(2.5, 8 * DEG, 5 * DEG),
                      lambda: shock_crossing(MACHS, 8 * DEG, 5 * DEG)),
    "MergingShocks": (lambda: merging_shocks(3.0, 5 * DEG, 5 * DEG),
                      lambda: merging_shocks(MACHS, 5 * DEG, 5 * DEG)),
    "FreeBoundaryReflection": (lambda: free_boundary_reflection(2.0, 5 * DEG),
                               lambda: free_boundary_reflection(MACHS, 5 * DEG)),
    "PressureMatchingWave": (lambda: turn_to_pressure(2.0, 1.5),
                             lambda: turn_to_pressure(MACHS, 1.5)),
    "SectionLoads": (lambda: shock_expansion_loads(Section.double_wedge(0.05), 2.0, 2 * DEG),
                     lambda: shock_expansion_loads(Section.double_wedge(0.05), MACHS, 2 * DEG)),
    "MinimumLengthNozzle": (lambda: minimum_length_nozzle(2.0, n_characteristics=6), None),
    "RoundedThroatNozzle": (lambda: rounded_throat_nozzle(2.0, n_points=7), None),
    "SlotJet": (lambda: underexpanded_slot_jet(1.5, 2.0, n_characteristics=6), None),
    "ChannelFlow": (lambda: channel_flow(2.0, lower_wall=WallContour.straight(0.0),
                                         upper_wall=WallContour.straight(1.0), length=1.0,
                                         n_points=5), None),
    "CharacteristicNet": (lambda: minimum_length_nozzle(2.0, n_characteristics=6).net, None),
}
# Types without a batch: one design or one stream per call (nets, polars, the gas, a
# pattern's conditions, which are the same for every case).


def _result_types():
    found = {}
    for info in pkgutil.iter_modules(gasdyn2d.__path__):
        if info.name.startswith("_") or info.name in ("plot",):
            continue
        module = importlib.import_module(f"gasdyn2d.{info.name}")
        for value in vars(module).values():
            if (isinstance(value, type) and issubclass(value, ResultTable)
                    and value is not ResultTable and value.__module__ == module.__name__):
                found[value.__name__] = value
    return found


def test_every_result_type_has_a_case():
    missing = sorted(set(_result_types()) - set(CASES))
    assert not missing, f"result types with no display case: {missing}"


@pytest.mark.parametrize("name", sorted(CASES))
def test_repr_and_html(name):
    result = CASES[name][0]()
    assert type(result).__name__ == name
    text = repr(result)
    assert text.startswith(name)
    html = result._repr_html_()
    assert html.startswith("<table>") and html.endswith("</table>")
    # a net's nodes and a polar's points are rows of a table: "<name>: 34 rows"
    rows = name in ("CharacteristicNet", "PressureDeflectionPolar")
    assert (f"<caption>{name}: " if rows else f"<caption>{name}</caption>") in html
    shown = [f for f in dataclasses.fields(result) if f.repr]
    for field in shown:
        # a nested result may show its own fields as "<name>.<field>"
        assert f"<code>{field.name}</code>" in html or f"<code>{field.name}." in html
        assert field.name in text
        unit = field.metadata.get("unit", "")
        value = getattr(result, field.name)
        if (unit and not hasattr(value, "units") and not dataclasses.is_dataclass(value)
                and np.ndim(value) <= 1 and not rows):
            line = next(x for x in text.splitlines() if x.strip().startswith(field.name + " "))
            assert line.endswith(f"[{unit}]"), line
    lines = text.splitlines()
    assert all(len(x) < 100 for x in lines)
    if not rows:
        # one line a field at least (FlowState adds derived quantities), head and closing line
        assert len(lines) >= len(shown) + 2 and lines[-1] == ")"


@pytest.mark.parametrize("name", sorted(n for n, (_, batch) in CASES.items() if batch))
def test_batch_to_dataframe(name):
    result = CASES[name][1]()
    frame = result.to_dataframe()
    assert isinstance(frame, pd.DataFrame)
    assert len(frame) == MACHS.size, f"{name}: {len(frame)} rows for {MACHS.size} cases"
    assert len(frame.columns) >= 1
    for field in dataclasses.fields(result):
        unit = field.metadata.get("unit", "")
        if unit and f"{field.name} [{unit}]" not in frame.columns:
            assert field.name not in frame.columns  # a field with a unit is never unlabelled
    angle_columns = [c for c in frame.columns if c.endswith("[rad]")]
    for column in angle_columns:
        values = frame[column].to_numpy(dtype=float)
        assert np.all(np.abs(values[np.isfinite(values)]) <= 2 * np.pi)


def test_dataframe_rows_hold_the_cases():
    # each row is one case: the Mach column reproduces the inputs in order
    frame = gasdyn2d.oblique_shock(MACHS, deflection=10 * DEG).to_dataframe()
    assert list(frame["M1"]) == list(MACHS)
    assert "wave_angle [rad]" in frame.columns
    # NACA Report 1135 oblique-shock charts via SOURCES.md: M1 = 2, θ = 10°, β = 39.3139°
    assert np.degrees(frame["wave_angle [rad]"][0]) == pytest.approx(39.3139, abs=1e-4)


def test_nested_results_flatten_into_columns():
    # ReflectionTransition holds two TransitionCondition results: one column per inner field
    frame = reflection_transition(MACHS).to_dataframe()
    assert list(frame.columns) == ["detachment.deflection [rad]", "detachment.wave_angle [rad]",
                                   "von_neumann.deflection [rad]", "von_neumann.wave_angle [rad]"]
    inner = reflection_transition(MACHS).detachment.to_dataframe()
    np.testing.assert_array_equal(frame["detachment.deflection [rad]"],
                                  inner["deflection [rad]"])
    # M1 = 2 is below the Mach number where the two criteria meet: no von Neumann condition
    assert np.isnan(frame["von_neumann.wave_angle [rad]"][0])
    assert np.all(np.isfinite(frame["von_neumann.wave_angle [rad]"][1:]))


def test_tuples_of_names_read_as_lists():
    text = repr(_placed_duct(2.6).meeting_points[0])
    assert "incoming        = ramp shock" in text and "outgoing        = reflected" in text


def test_quantity_fields_show_their_own_unit():
    state = gasdyn2d.FlowState(2.0, 50 * gasdyn2d.ureg.kPa, 220 * gasdyn2d.ureg.K)
    text = repr(state)
    assert "[kPa]" in text and "[K]" in text


# ------------------------------------------------------------------ many cases as rows


@pytest.mark.parametrize("name", sorted(n for n, (_, batch) in CASES.items() if batch))
def test_batch_shows_a_row_per_case(name):
    result = CASES[name][1]()
    text, html = repr(result), result._repr_html_()
    assert text.startswith(f"{name}: 3 rows") and f"<caption>{name}: 3 rows</caption>" in html
    assert html.count("<tr><th>") - 1 == MACHS.size  # one row per case (after the header)
    assert all(len(line) < 100 for line in text.splitlines())
    assert "shape (3,)" not in text and "array of 3 labels" not in text


def test_few_rows_html_holds_every_value_and_units_in_headers():
    shocks = gasdyn2d.oblique_shock(MACHS, deflection=10 * DEG)
    html = shocks._repr_html_()
    assert "<th><code>wave_angle</code> [rad]</th>" in html and "<th><code>M2</code></th>" in html
    frame = shocks.to_dataframe()
    for column in frame.columns:
        for value in frame[column]:
            assert f"<td>{value:.6g}</td>" in html, (column, value)
    text = repr(shocks)
    assert "wave_angle [rad]" in text.splitlines()[1]
    # NACA Report 1135 oblique-shock charts via SOURCES.md: M1 = 2, θ = 10°, β = 39.3139°
    row = text.splitlines()[2].split()  # the first case, M1 = 2
    assert np.degrees(float(row[3])) == pytest.approx(39.3139, abs=2e-4)  # six digits shown


def test_many_rows_show_head_and_tail():
    machs = np.linspace(1.5, 4.0, 101)  # invented sweep of 101 cases
    flow = gasdyn2d.isentropic_flow(machs)
    text, html = repr(flow), flow._repr_html_()
    lines = text.splitlines()
    assert lines[0] == "IsentropicFlow: 101 rows"
    labels = [line.split()[0] for line in lines[2:13]]
    assert labels == ["0", "1", "2", "3", "4", "…", "96", "97", "98", "99", "100"]
    assert "91 rows not shown" in text and "91 rows not shown" in html
    assert html.count("<tr><th>") - 1 == 10
    assert "<td>1.5</td>" in html and "<td>4</td>" in html and "<td>2.75</td>" not in html


def test_labels_flags_and_quantities_in_rows():
    sweep = wall_reflection(2.8, np.radians([9.0, 14.0, 22.0]))
    text = repr(sweep)
    # the README's sweep: regular, regular, Mach reflection (three-shock theory)
    kinds = [line.split()[1] for line in text.splitlines()[2:5]]
    assert kinds == ["regular", "regular", "mach"]
    state = gasdyn2d.FlowState(MACHS, 50 * gasdyn2d.ureg.kPa, 220 * gasdyn2d.ureg.K)
    assert "p [kPa]" in repr(state) and "<code>p</code> [kPa]" in state._repr_html_()
    assert "V [m/s]" in repr(state)  # the derived quantities are columns too
    grid = gasdyn2d.isentropic_flow(np.full((2, 3), 2.0))
    assert repr(grid).startswith("IsentropicFlow: 6 rows (shape (2, 3))")
    assert "<th>1,2</th>" in grid._repr_html_()


def test_fields_beside_the_rows_are_listed_under_the_table():
    loads = shock_expansion_loads(Section.double_wedge(0.05), MACHS, 2 * DEG)
    text = repr(loads)
    assert "theory" in text.splitlines()[-1] and "shock-expansion" in text
    assert "<code>theory</code> = shock-expansion" in loads._repr_html_()


def test_short_text_arrays_are_shown():
    from gasdyn2d.boundary.results import _format

    assert _format(np.array(["regular", "regular", "mach"])) == "regular, regular, mach"
    many = _format(np.array(["regular"] * 40))
    assert many.startswith("regular, regular, regular, …") and "(40 labels)" in many
