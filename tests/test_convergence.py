"""Grid and time-step refinement: the default settings give effective case depth to 0.1 %.

Refining cells and time steps twice (``Accuracy.refined``) must change the effective case depth by
less than 0.1 % of itself, and the soak time of the inverse likewise, for each geometry and the
carbon-dependent models. This is a self-convergence check (Roache 1998, *Verification and
Validation in Computational Science and Engineering*): the refined run stands for the exact one.
"""

import dataclasses

import pytest

import casedepth
from casedepth.numerics.solver import Accuracy

CASES = [
    ("plate, Tibbetts, finite beta", {}, "tibbetts", 1.5e-7),
    ("plate, Ågren, surface held", {}, "agren", "inf"),
    ("cylinder 12 mm", {"geometry": "cylinder", "diameter": "12mm"}, "tibbetts", 1.5e-7),
    ("bore 10 mm", {"geometry": "bore", "diameter": "10mm"}, "tibbetts", 1.5e-7),
    ("sphere 8 mm", {"geometry": "sphere", "diameter": "8mm"}, "tibbetts", "inf"),
]


@pytest.mark.parametrize("name,shape,model,beta", CASES, ids=[c[0] for c in CASES])
def test_forward_depth_converged(name, shape, model, beta):
    setup = casedepth.setup("8620", "925C", 1.0, diffusivity=model, beta=f"{beta}m/s", **shape)
    coarse = casedepth.carburize(setup, 6 * 3600.0).case_depth
    fine = casedepth.carburize(dataclasses.replace(setup, accuracy=Accuracy().refined(4)), 6 * 3600.0).case_depth
    assert coarse == pytest.approx(fine, rel=1e-3)


@pytest.mark.parametrize("target_mm", [0.3, 1.0, 2.5])
def test_inverse_time_converged(target_mm):
    setup = casedepth.setup("8620", "925C", 1.0)
    coarse = casedepth.soak_time_for_case_depth(setup, target_mm * 1e-3).soak_time
    fine = casedepth.soak_time_for_case_depth(dataclasses.replace(setup, accuracy=Accuracy().refined(4)),
                                              target_mm * 1e-3).soak_time
    assert coarse == pytest.approx(fine, rel=1e-3)


def test_refinement_sequence_converges_monotonically():
    """Errors shrink as cells and steps shrink (the scheme is consistent, not just lucky)."""
    setup = casedepth.setup("8620", "925C", 1.0)
    depths = [casedepth.carburize(dataclasses.replace(setup, accuracy=Accuracy().refined(k)), 8 * 3600.0).case_depth
              for k in (1, 2, 4, 8)]
    errors = [abs(d - depths[-1]) for d in depths[:-1]]
    assert errors[0] > errors[2]
    assert errors[2] < 2e-5 * depths[-1]
