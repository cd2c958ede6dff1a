"""Property tests: what must hold for any reasonable furnace step (hypothesis draws the steps).

More time, a higher temperature or a higher carbon potential never gives a shallower case, and the
case never goes deeper than the centre of the section. Physical monotonicity of diffusion with a
rising source (maximum principle for the diffusion equation; Crank 1975, ch. 1), not a published number.
"""

import math

import pytest

from hypothesis import given, settings
from hypothesis import strategies as st

import casedepth

SHAPES = st.sampled_from([
    {}, {"thickness": "3mm"}, {"geometry": "cylinder", "diameter": "5mm"},
    {"geometry": "bore", "diameter": "5mm"}, {"geometry": "sphere", "diameter": "5mm"},
])
RUN = settings(max_examples=10, deadline=None)


def depth(shape, celsius, potential, hours, model="tibbetts"):
    setup = casedepth.setup("8620", f"{celsius}C", potential, diffusivity=model, **shape)
    return casedepth.carburize(setup, hours * 3600.0).case_depth


@RUN
@given(shape=SHAPES, celsius=st.floats(850, 1000), potential=st.floats(0.7, 1.2), hours=st.floats(0.5, 10),
       more=st.floats(1.05, 3.0))
def test_more_time_never_shallower(shape, celsius, potential, hours, more):
    assert depth(shape, celsius, potential, hours * more) >= depth(shape, celsius, potential, hours) * (1 - 1e-9)


@RUN
@given(shape=SHAPES, celsius=st.floats(850, 990), potential=st.floats(0.7, 1.2), hours=st.floats(0.5, 10),
       hotter=st.floats(2, 60))
def test_higher_temperature_never_shallower(shape, celsius, potential, hours, hotter):
    assert depth(shape, celsius + hotter, potential, hours) >= depth(shape, celsius, potential, hours) * (1 - 1e-9)


@RUN
@given(shape=SHAPES, celsius=st.floats(850, 1000), potential=st.floats(0.6, 1.1), hours=st.floats(0.5, 10),
       richer=st.floats(0.01, 0.4), model=st.sampled_from(["tibbetts", "agren", "arrhenius"]))
def test_higher_potential_never_shallower(shape, celsius, potential, hours, richer, model):
    assert depth(shape, celsius, potential + richer, hours, model) >= depth(shape, celsius, potential, hours, model) * (1 - 1e-9)


@RUN
@given(shape=SHAPES, hours=st.floats(1, 60), celsius=st.floats(900, 1050))
def test_case_never_exceeds_the_section(shape, hours, celsius):
    setup = casedepth.setup("8620", f"{celsius}C", 1.1, **shape)
    result = casedepth.carburize(setup, hours * 3600.0)
    assert result.case_depth <= setup.geometry.half_section
    assert math.isfinite(result.case_depth)


def test_curvature_orders_the_shapes():
    """Convex surfaces concentrate carbon (deeper case), concave ones spread it (shallower):
    shaft > flat > bore for the same soak (Crank 1975, ch. 5: radial diffusion)."""
    flat = depth({}, 925, 1.0, 8)
    shaft = depth({"geometry": "cylinder", "diameter": "10mm"}, 925, 1.0, 8)
    bore = depth({"geometry": "bore", "diameter": "10mm"}, 925, 1.0, 8)
    ball = depth({"geometry": "sphere", "diameter": "10mm"}, 925, 1.0, 8)
    assert ball > shaft > flat > bore
    big_bore = depth({"geometry": "bore", "diameter": "400mm"}, 925, 1.0, 8)
    assert big_bore == pytest.approx(flat, rel=5e-3)
