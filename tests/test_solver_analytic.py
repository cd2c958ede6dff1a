"""The solver against published analytic solutions at constant diffusivity.

With the Arrhenius model D does not depend on carbon, so the finite-volume solver must reproduce
the closed-form solutions of J. Crank, *The Mathematics of Diffusion*, 2nd ed. (Oxford, 1975),
implemented independently in ``tests/analytic.py``. Required agreement: 0.1 % in effective case
depth (forward) and in soak time (inverse), as the solver issue asks.
"""

import math

import numpy as np
import pytest

import analytic
import casedepth

CORE, POTENTIAL, THRESHOLD = 0.20, 1.00, 0.40
F_THRESHOLD = (THRESHOLD - CORE) / (POTENTIAL - CORE)
BETA = 1.5e-7  # m/s (1.5e-5 cm/s)
SOAK = 5 * 3600.0


def constant_d_setup(beta, geometry="plate", **size):
    return casedepth.setup("C=0.20", "925C", POTENTIAL, at=THRESHOLD, diffusivity="arrhenius", beta=f"{beta}m/s",
                           alloy_factor=False, geometry=geometry, **size)


def D_of(setup):
    return float(setup.diffusivity(0.4, setup.temperature))


CASES = [
    # (name, geometry kwargs, beta, analytic F(x, t, D), source)
    ("plate, surface held (Crank 1975 eq. 2.45, erfc)", {}, math.inf,
     lambda x, t, D: analytic.erfc_plane(x, t, D)),
    ("plate, mass transfer (Crank 1975 §3.3.3, surface evaporation)", {}, BETA,
     lambda x, t, D: analytic.evaporation_plane(x, t, D, BETA)),
    ("plate 3 mm from both faces (Crank 1975 eq. 4.17)", {"thickness": "3mm"}, math.inf,
     lambda x, t, D: analytic.slab_dirichlet(x, t, D, 1.5e-3)),
    ("cylinder 8 mm, surface held (Crank 1975 eq. 5.22, Bessel series)",
     {"geometry": "cylinder", "diameter": "8mm"}, math.inf,
     lambda x, t, D: analytic.cylinder_dirichlet(x, t, D, 4e-3)),
    ("cylinder 8 mm, mass transfer (Crank 1975 eq. 5.50)",
     {"geometry": "cylinder", "diameter": "8mm"}, BETA,
     lambda x, t, D: analytic.cylinder_evaporation(x, t, D, BETA, 4e-3)),
    ("sphere 6 mm, surface held (Crank 1975 eq. 6.18)",
     {"geometry": "sphere", "diameter": "6mm"}, math.inf,
     lambda x, t, D: analytic.sphere_dirichlet(x, t, D, 3e-3)),
]


@pytest.mark.parametrize("name,geometry,beta,exact", CASES, ids=[c[0].split(" (")[0] for c in CASES])
def test_forward_case_depth_and_profile(name, geometry, beta, exact):
    setup = constant_d_setup(beta, **geometry)
    D = D_of(setup)
    result = casedepth.carburize(setup, SOAK)
    x_max = min(setup.geometry.half_section, 30 * math.sqrt(D * SOAK))
    expected = analytic.depth_at(lambda x, t: exact(x, t, D), F_THRESHOLD, SOAK, x_max)
    assert result.case_depth == pytest.approx(expected, rel=1e-3)
    # the whole profile, not just one point: within 0.002 wt % C everywhere
    x = result.profile.depth[result.profile.depth <= x_max]
    carbon = CORE + (POTENTIAL - CORE) * np.array([exact(xi, SOAK, D) for xi in x])
    assert np.max(np.abs(result.profile.carbon[: len(x)] - carbon)) < 2e-3


@pytest.mark.parametrize("name,geometry,beta,exact", CASES, ids=[c[0].split(" (")[0] for c in CASES])
def test_inverse_soak_time(name, geometry, beta, exact):
    setup = constant_d_setup(beta, **geometry)
    D = D_of(setup)
    target = 0.6e-3
    result = casedepth.soak_time_for_case_depth(setup, target)
    expected = analytic.time_to_depth(lambda x, t: exact(x, t, D), F_THRESHOLD, target, 3600.0)
    assert result.soak_time == pytest.approx(expected, rel=1e-3)
    assert result.case_depth == pytest.approx(target, rel=1e-6)


def test_inverse_then_forward_gives_the_same_case():
    """Self-consistency: a forward soak of the planned length lands on the target, within the
    solver's stated accuracy (the two runs size their grids from different scales)."""
    setup = casedepth.setup("8620", "925C", 1.0)
    planned = casedepth.soak_time_for_case_depth(setup, 1.0e-3)
    assert planned.case_depth == pytest.approx(1.0e-3, rel=1e-6)
    replay = casedepth.carburize(setup, planned.soak_time)
    assert replay.case_depth == pytest.approx(1.0e-3, rel=5e-4)
    assert replay.surface_carbon == pytest.approx(planned.surface_carbon, rel=5e-4)


def test_several_targets_from_one_march():
    setup = casedepth.setup("8620", "925C", 1.0)
    low, aim, high = casedepth.soak_times_for_case_depths(setup, [0.8e-3, 1.0e-3, 1.2e-3])
    assert low.soak_time < aim.soak_time < high.soak_time
    alone = casedepth.soak_time_for_case_depth(setup, 0.8e-3)
    assert low.soak_time == pytest.approx(alone.soak_time, rel=1e-3)
    assert aim.history.times[-1] == aim.soak_time
    assert np.all(np.diff(aim.history.threshold_depths(aim.threshold_carbon)) >= 0)
