"""Tests for gasdyn2d.design.sections: section geometry, constructors and validation."""

import dataclasses

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gasdyn2d.errors import InvalidInputError
from gasdyn2d.design.sections import Section


# ------------------------------------------------------------------ constructors


def test_flat_plate_is_one_panel_each_side():
    plate = Section.flat_plate()
    assert plate.n_panels == (1, 1)
    assert plate.thickness_ratio == 0.0
    assert plate.is_symmetric
    np.testing.assert_array_equal(plate.upper_angles, [0.0])


def test_double_wedge_geometry():
    # Invented case: t/c = 0.06 with the ridge at 30 % chord.
    wedge = Section.double_wedge(0.06, ridge=0.3)
    np.testing.assert_allclose(wedge.upper, [[0, 0], [0.3, 0.03], [1, 0]], rtol=0, atol=0)
    np.testing.assert_allclose(wedge.lower, [[0, 0], [0.3, -0.03], [1, 0]], rtol=0, atol=0)
    # Panel angles by hand: atan(0.03/0.3) and -atan(0.03/0.7).
    np.testing.assert_allclose(wedge.upper_angles, [np.arctan(0.1), -np.arctan(0.03 / 0.7)], rtol=1e-15)
    np.testing.assert_allclose(wedge.lower_angles, -wedge.upper_angles, rtol=1e-15)
    assert wedge.thickness_ratio == pytest.approx(0.06, rel=1e-15)
    assert wedge.is_symmetric


@pytest.mark.parametrize("tau", [0.01, 0.1, 0.5])
@pytest.mark.parametrize("n", [2, 4, 33])
def test_biconvex_points_lie_on_the_circular_arc(tau, n):
    arc = Section.biconvex(tau, n=n)
    h = tau / 2
    radius = (0.25 + h * h) / (2 * h)  # chord-height relation of a circle (geometry)
    x, y = arc.upper.T
    np.testing.assert_allclose(np.hypot(x - 0.5, y - (h - radius)), radius, rtol=1e-14)
    assert arc.n_panels == (n, n)
    assert arc.is_symmetric
    # Cosine spacing in arc angle: the chord of the arc between tangent angles φ_i and
    # φ_(i+1) has the mid angle (geometry of the circle), φ_i = φ0 cos(πi/n), φ0 = 2 atan(t/c).
    phi = 2 * np.arctan(tau) * np.cos(np.pi * np.arange(n + 1) / n)
    # (relative 1e-11: each angle comes from differences of neighbouring points)
    np.testing.assert_allclose(arc.upper_angles, 0.5 * (phi[1:] + phi[:-1]), rtol=1e-11, atol=1e-15)
    if n % 2 == 0:
        assert arc.thickness_ratio == pytest.approx(tau, rel=1e-14)


def test_from_points_accepts_cambered_and_asymmetric_sections():
    # Invented fin with a flat lower surface and a bent upper one.
    fin = Section.from_points([(0, 0), (0.2, 0.02), (0.7, 0.02), (1, 0)], [(0, 0), (1, 0)])
    assert fin.n_panels == (3, 1)
    assert not fin.is_symmetric
    mirror = fin.mirrored()
    np.testing.assert_array_equal(mirror.upper, [[0, 0], [1, 0]])
    np.testing.assert_array_equal(mirror.lower[:, 1], [0, -0.02, -0.02, 0])
    # A cambered plate: both surfaces coincide (zero thickness) but are bent.
    plate = Section.from_points([(0, 0), (0.5, 0.03), (1, 0)], [(0, 0), (0.5, 0.03), (1, 0)])
    assert plate.thickness_ratio == 0.0


def test_end_points_within_tolerance_are_snapped():
    section = Section.from_points([(1e-12, 0), (0.5, 0.01), (1, -1e-12)], [(0, 0), (1, 0)])
    np.testing.assert_array_equal(section.upper[[0, -1]], [[0, 0], [1, 0]])


# ------------------------------------------------------------------ immutability


def test_section_is_immutable():
    wedge = Section.double_wedge(0.05)
    with pytest.raises(dataclasses.FrozenInstanceError):
        wedge.upper = np.zeros((2, 2))
    with pytest.raises(ValueError):
        wedge.upper[1, 1] = 0.5
    points = np.array([[0, 0], [0.5, 0.02], [1, 0]], dtype=float)
    section = Section.from_points(points, [(0, 0), (1, 0)])
    points[1, 1] = 0.3  # the caller's array is copied
    assert section.upper[1, 1] == 0.02


def test_repr_names_panels_and_thickness():
    assert repr(Section.double_wedge(0.05)) == "Section(2 upper and 2 lower panels, thickness ratio 0.05)"


# -------------------------------------------------------------------- rejection


@pytest.mark.parametrize(
    "upper, lower, words",
    [
        ([(0, 0), (0.9, 0)], [(0, 0), (1, 0)], ["upper", "trailing edge", "open"]),
        ([(0, 0), (1, 0)], [(0.1, 0), (1, 0)], ["lower", "leading edge", "open"]),
        ([(0, 0), (0.6, 0.02), (0.4, 0.03), (1, 0)], [(0, 0), (1, 0)], ["upper", "increase", "0.4"]),
        ([(0, 0), (1, 0)], [(0, 0), (0.5, -0.1), (0.5, -0.05), (1, 0)], ["lower", "increase"]),
        ([(0, 0), (0.5, -0.02), (1, 0)], [(0, 0), (1, 0)], ["below", "swapped"]),
        ([(0, 0), (0.3, 0.02), (0.6, -0.02), (1, 0)], [(0, 0), (1, 0)], ["below", "crosses itself", "0.6"]),
        ([(0, 0, 0), (1, 0, 0)], [(0, 0), (1, 0)], ["shape (n, 2)"]),
        ([[0, 0.5, 1], [0, 0.1, 0]], [(0, 0), (1, 0)], ["transpose"]),
        ([(0, 0), (0.5, np.nan), (1, 0)], [(0, 0), (1, 0)], ["not finite"]),
        ("wing", [(0, 0), (1, 0)], ["sequence of (x, y)"]),
    ],
)
def test_from_points_rejects_bad_outlines(upper, lower, words):
    # Invented bad inputs, labelled by what is wrong with them.
    with pytest.raises(InvalidInputError) as info:
        Section.from_points(upper, lower)
    for word in words:
        assert word in str(info.value)


@pytest.mark.parametrize(
    "make, words",
    [
        (lambda: Section.double_wedge(0.0), ["thickness_ratio", "> 0"]),
        (lambda: Section.double_wedge(0.05, ridge=1.0), ["ridge", "< 1"]),
        (lambda: Section.biconvex(1.2), ["thickness_ratio", "< 1"]),
        (lambda: Section.biconvex(0.1, n=0), ["n must be"]),
        (lambda: Section.biconvex(0.1, n=2.5), ["n must be"]),
    ],
)
def test_constructors_reject_bad_parameters(make, words):
    with pytest.raises(InvalidInputError) as info:
        make()
    for word in words:
        assert word in str(info.value)


# ------------------------------------------------------------------- properties


@settings(max_examples=40, deadline=None)
@given(
    xs=st.lists(st.floats(0.01, 0.99), min_size=1, max_size=6, unique=True),
    ys=st.lists(st.floats(0.0, 0.1), min_size=6, max_size=6),
)
def test_random_nonnegative_upper_over_flat_lower_is_accepted(xs, ys):
    # Property: any x-monotonic outline with upper >= lower is a valid section,
    # and mirroring twice gives the same points.
    xs = sorted(xs)
    upper = [(0.0, 0.0)] + [(x, y) for x, y in zip(xs, ys)] + [(1.0, 0.0)]
    section = Section.from_points(upper, [(0, 0), (1, 0)])
    assert section.thickness_ratio == pytest.approx(max(ys[: len(xs)]), abs=1e-15)
    twice = section.mirrored().mirrored()
    np.testing.assert_array_equal(twice.upper, section.upper)
    np.testing.assert_array_equal(twice.lower, section.lower)


@pytest.mark.parametrize(
    "make, words",
    [
        # Regression (issue 9): n = 1 silently gave a flat plate of zero thickness.
        (lambda: Section.biconvex(0.1, n=1), ["n must be", ">= 2", "flat plate"]),
        (lambda: Section.biconvex(0.1, n=True), ["n must be", "bool"]),
        (lambda: Section.biconvex(0.1, n="8"), ["n must be", "string"]),
        # Regression (issue 9): a plain ValueError from float("abc").
        (lambda: Section.double_wedge("abc"), ["thickness_ratio", "string"]),
        (lambda: Section.double_wedge(True), ["thickness_ratio", "bool"]),
        (lambda: Section.double_wedge(0.05, ridge=0.5 + 0.1j), ["ridge", "complex"]),
        (lambda: Section.double_wedge(float("nan")), ["thickness_ratio", "nan"]),
        (lambda: Section.from_points([(0, 0), (1 + 0j, 0)], [(0, 0), (1, 0)]), ["upper", "complex"]),
        (lambda: Section.from_points([(0, 0), (1, 0)], [(False, False), (True, False)]),
         ["lower", "bool"]),
    ],
)
def test_bad_parameter_types_are_invalid_input_naming_the_argument(make, words):
    with pytest.raises(InvalidInputError) as info:
        make()
    for word in words:
        assert word in str(info.value)


def test_two_panel_biconvex_is_the_inscribed_double_wedge():
    # Geometry: with n = 2 the arc is sampled at both edges and at mid-chord.
    arc = Section.biconvex(0.1, n=2)
    np.testing.assert_allclose(arc.upper, [(0, 0), (0.5, 0.05), (1, 0)], atol=1e-15)
