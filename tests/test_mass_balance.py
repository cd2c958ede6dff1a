"""Conservation: carbon taken up by the part equals the time integral of the surface flux.

The integral is accumulated from the surface flux at each stage of each step with the scheme's
quadrature weights; the uptake is summed from the profile over the control volumes. A
finite-volume scheme must make the two agree to round-off; the issue asks for 1e-6 relative.
"""

import math

import pytest

import casedepth
from casedepth.numerics.solver import CarbonSolver

SHAPES = [
    {}, {"thickness": "2mm"}, {"geometry": "cylinder", "diameter": "6mm"},
    {"geometry": "bore", "diameter": "6mm"}, {"geometry": "sphere", "diameter": "6mm"},
]


@pytest.mark.parametrize("shape", SHAPES, ids=lambda s: s.get("geometry", "plate") + ("-thin" if "thickness" in s else ""))
@pytest.mark.parametrize("beta", [1.5e-7, math.inf], ids=["beta", "held"])
@pytest.mark.parametrize("model", ["tibbetts", "agren"])
def test_uptake_equals_integrated_surface_flux(shape, beta, model):
    setup = casedepth.setup("8620", "940C", 1.1, beta=f"{beta}m/s", diffusivity=model, **shape)
    solver = setup.solver(6 * 3600.0)
    solver.advance(6 * 3600.0, setup.surface_condition)
    uptake = solver.carbon_uptake()
    assert uptake > 0
    assert solver.flux_integral == pytest.approx(uptake, rel=1e-6)


def test_uptake_survives_a_change_of_atmosphere():
    """A boost then a lower-potential diffuse: conservation holds across the change of boundary."""
    boost = casedepth.setup("8620", "925C", 1.15)
    diffuse = casedepth.setup("8620", "925C", 0.8)
    solver: CarbonSolver = boost.solver(8 * 3600.0)
    solver.advance(3 * 3600.0, boost.surface_condition)
    solver.advance(2 * 3600.0, diffuse.surface_condition)
    assert solver.flux_integral == pytest.approx(solver.carbon_uptake(), rel=1e-6)
