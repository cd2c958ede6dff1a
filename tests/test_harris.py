"""Loose cross-check of the default models against Harris's total-case-depth rule.

Harris (1943, *Metal Progress*) fitted total case depth in plain carbon steel carburized with
saturated austenite at the surface:  d [in] = 31.6 √t / 10^(6700/T),  t in h, T in °R  (about
0.025 in/√h at 1700 °F). Total case is taken where carbon exceeds the core by 0.04 % (SAE J423).

Tolerance ±20 %: the rule is an empirical fit to old data, and the published diffusivities differ
by about 2× (≈ 40 % in depth) among themselves, so a tighter check would test the choice of data set,
not the solver. The √t scaling, on the other hand, is exact for a constant surface and is checked to 0.5 %.
"""

import math

import pytest

import casedepth
from casedepth.models.austenite import saturation_carbon
from casedepth.units import parse_temperature


def harris_total_case(hours, fahrenheit):
    """Harris (1943) total case depth, [m]."""
    rankine = fahrenheit + 459.67
    return 31.6 * math.sqrt(hours) / 10 ** (6700.0 / rankine) * 0.0254


def saturated_setup(fahrenheit, model):
    T = parse_temperature(f"{fahrenheit}F")
    return casedepth.setup("1020", T - 273.15, saturation_carbon(T), at=0.205 + 0.04, beta="inf",
                           alloy_factor=False, diffusivity=model)


def test_harris_rule_value_at_1700F():
    """Harris (1943): about 0.025 in per √h at 1700 °F."""
    assert harris_total_case(1.0, 1700) / 0.0254 == pytest.approx(0.025, rel=0.01)


@pytest.mark.parametrize("model", ["tibbetts", "agren"])
@pytest.mark.parametrize("fahrenheit", [1600, 1700, 1750])
def test_total_case_near_harris(model, fahrenheit):
    setup = saturated_setup(fahrenheit, model)
    for hours in (2, 8):
        depth = casedepth.carburize(setup, hours * 3600.0).case_depth
        assert depth == pytest.approx(harris_total_case(hours, fahrenheit), rel=0.20)


def test_depth_grows_with_square_root_of_time():
    setup = saturated_setup(1700, "tibbetts")
    d2 = casedepth.carburize(setup, 2 * 3600.0).case_depth
    d8 = casedepth.carburize(setup, 8 * 3600.0).case_depth
    assert d8 / d2 == pytest.approx(2.0, rel=5e-3)
