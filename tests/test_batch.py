"""Many cases in one march give what each gives alone.

The batch (casedepth.numerics.batch) takes every row through the steps its own march would take, so the
check is identity to round-off (1e-12), not a tolerance: against the single solver on drawn cases of every
geometry, surface and diffusivity, through the shop's ramped stages, for the inverse, and for a load's
capability. Rows the batch cannot take (a diffusivity without the exponential form, a far end the carbon
reaches) are solved alone, and the test checks they are. One check is against a published solution:
a held surface with a constant D, batched, against the error-function solution (Crank 1975, *The
Mathematics of Diffusion*, 2nd ed., eq. 3.13).
"""

from __future__ import annotations

import importlib
import math
import random

import numpy as np
import pytest

import casedepth
from casedepth.carburizing.cycle import Stage, run_recipe, run_recipes, shop_stages
from casedepth.carburizing.planners import (boost_diffuse_times, plan_boost_diffuse, plan_single_soak,
                                            plan_single_soaks)
from casedepth.carburizing.soak import carburize, carburize_many, soak_time_for_case_depth, soak_times_many
from casedepth.errors import InputError, NotReachableError
from casedepth.plan import compare_temperatures, evaluate
from casedepth.plan.fileformat import load
from casedepth.numerics import batch
from casedepth.numerics.geometry import Geometry
from casedepth.numerics.solver import CarbonSolver, SurfaceCondition, threshold_depth
from casedepth.models.diffusivity import Diffusivity
from casedepth.shop.quote import ShopDefaults

from test_accuracy_domain import draw

ROUND_OFF = 1e-12


def same(a: float, b: float) -> bool:
    return abs(a - b) <= ROUND_OFF * max(abs(a), abs(b), 1e-30)


def test_threshold_depths_row_by_row_as_the_single_reading():
    rng = np.random.default_rng(4)
    n = 30
    nodes = np.cumsum(rng.uniform(0.5, 1.5, (200, n)), axis=1) * 1e-4
    nodes[:, 0] = 0.0
    carbon = np.sort(rng.uniform(0.1, 1.0, (200, n)), axis=1)[:, ::-1].copy()
    carbon[::7] += rng.normal(0, 0.02, (len(carbon[::7]), n))  # some rows not monotone: the fall-backs
    threshold = rng.uniform(0.05, 1.1, 200)  # some above the surface, some never reached
    half = np.where(rng.random(200) < 0.3, nodes[:, -1] * 0.8, np.inf)
    got = batch.threshold_depths(nodes, carbon, threshold, half)
    want = [threshold_depth(nodes[k], carbon[k], threshold[k], half[k]) for k in range(200)]
    assert all(same(g, w) or g == w for g, w in zip(got, want))


def drawn(count: int, seed: int):
    rng = random.Random(seed)
    return [draw(rng) for _ in range(count)]


def test_the_inverse_of_drawn_cases_is_what_each_gives_alone():
    """Every geometry, held and finite surfaces, each diffusivity (Ågren's is solved alone)."""
    cases = drawn(60, 20261204)
    setups, targets = [c[0] for c in cases], [c[1] for c in cases]
    many = soak_times_many(setups, targets)
    for (setup, target, text), result in zip(cases, many):
        alone = soak_time_for_case_depth(setup, target)
        assert same(result.soak_time, alone.soak_time), text
        assert same(result.case_depth, alone.case_depth), text
        assert same(result.surface_carbon, alone.surface_carbon), text
        assert same(result.carbon_uptake, alone.carbon_uptake), text
        assert result.warnings == alone.warnings, text


def test_the_forward_of_drawn_cases_is_what_each_gives_alone():
    cases = drawn(40, 7)
    setups = [c[0] for c in cases]
    soaks = [3600.0 * (1 + k % 9) for k in range(len(cases))]
    for (setup, _, text), soak, result in zip(cases, soaks, carburize_many(setups, soaks)):
        alone = carburize(setup, soak)
        assert same(result.case_depth, alone.case_depth), text
        assert same(result.surface_carbon, alone.surface_carbon), text
        assert same(result.carbon_uptake, alone.carbon_uptake), text


def test_recipes_with_the_shops_ramps_batched_as_alone():
    """Heat-up from room temperature (frozen below Ac3, then ramped), soak, drop and equalize ramped down."""
    rng = np.random.default_rng(11)
    setups, recipes = [], []
    for k in range(24):
        geometry = {} if k % 3 else {"geometry": "cylinder", "diameter": "30mm"}
        setup = casedepth.setup("8620" if k % 2 else "20MnCr5", f"{rng.uniform(900, 960):.1f}C",
                                f"{rng.uniform(0.8, 1.1):.3f}", beta="inf" if k % 5 == 0 else "1.5e-5cm/s", **geometry)
        before, after = shop_stages(ShopDefaults(), setup.temperature, setup.carbon_potential, None)
        setups.append(setup)
        recipes.append([*before, Stage("soak", 3600.0 * rng.uniform(2, 9), setup.temperature, setup.carbon_potential),
                        *after])
    for setup, recipe, result in zip(setups, recipes, run_recipes(setups, recipes)):
        alone = run_recipe(setup, recipe)
        assert same(result.case_depth, alone.case_depth)
        assert same(result.surface_carbon, alone.surface_carbon)
        assert all(same(a, b) for a, b in zip(result.stage_uptake, alone.stage_uptake))
        assert all(same(a, b) for a, b in zip(result.stage_start, alone.stage_start))


def test_single_soaks_with_the_shops_stages_batched_as_alone():
    """The soak for a depth at the end of the whole cycle (heat-up, soak, drop, equalize counted): the heat-ups and
    every round of the searches' trials run together give each row the soak it gets alone; a diffusivity without
    the exponential form is solved alone, a depth out of reach is refused in its place."""
    rng = np.random.default_rng(12)
    setups, aims, befores, afters = [], [], [], []
    for k in range(9):
        geometry = {} if k % 3 else {"geometry": "cylinder", "diameter": "30mm"}
        model = "agren" if k == 4 else "tibbetts"
        setup = casedepth.setup("8620" if k % 2 else "20MnCr5", f"{rng.uniform(890, 1000):.1f}C",
                                f"{rng.uniform(0.8, 1.1):.3f}", beta="inf" if k % 5 == 0 else "1.5e-5cm/s",
                                diffusivity=model, **geometry)
        before, after = shop_stages(ShopDefaults(), setup.temperature, setup.carbon_potential, None)
        setups.append(setup)
        aims.append(float(rng.uniform(0.5e-3, 2.0e-3)) if k != 7 else 30e-3)  # k = 7: not reached within the longest soak
        befores.append(tuple(before) if k != 2 else ())  # k = 2: a load already at heat
        afters.append(tuple(after))
    together = plan_single_soaks(setups, aims, befores, afters)
    for k, (setup, aim, before, after) in enumerate(zip(setups, aims, befores, afters)):
        if k == 7:
            assert isinstance(together[k], NotReachableError)
            continue
        alone = plan_single_soak(setup, [aim], before, after, cycle_for=0)
        assert same(together[k], alone.soak_times[0]), k


def test_boost_and_diffuse_searched_together_as_alone():
    """Boost and diffuse times for a depth and a surface window at the end of the cycle (the shop's heat-up, drop
    and equalize counted): the searches' trials run together give each row the times it gets alone; a boost above
    saturation is refused in its place, as the single planner refuses it."""
    rows = []
    for k, T in enumerate((900.0, 925.0, 955.0, 980.0, 1010.0)):
        setup = casedepth.setup("8620", f"{T}C", 1.0, beta="1.5e-5cm/s", **({} if k % 2 else {"geometry": "cylinder", "diameter": "25mm"}))
        before, after = shop_stages(ShopDefaults(), setup.temperature, 0.80, None)
        boost = 1.15 if k != 3 else 1.9  # k = 3: above the saturation of austenite
        rows.append((setup, 1.0e-3 + 0.2e-3 * k, (0.75, 0.85), boost, 0.80, tuple(before), tuple(after)))
    together = boost_diffuse_times(rows)
    for k, row in enumerate(rows):
        if k == 3:
            assert isinstance(together[k], InputError) and together[k].field == "boost_potential"
            continue
        alone = plan_boost_diffuse(*row[:5], before=row[5], after=row[6])
        assert same(together[k][0], alone.boost_time) and same(together[k][1], alone.diffuse_time), k


def test_pulse_tables_searched_together_as_alone():
    """Low-pressure pulse tables for the example's callout at four temperatures: the searches side by side, each
    round's drops and equalizes in one batch, give each row the table it gets alone; a surface window above the
    limit is refused in its place, as the single planner refuses it."""
    from casedepth.lpc.outcome import lpc_of
    from casedepth.lpc.planner import plan_pulses, pulse_tables

    values = load("resources/examples/pinion-lpc.cdplan.json").values()
    rows = []
    for T in (930.0, 950.0, 970.0, 990.0):
        lpc = lpc_of({**values, "temperature": T + 273.15})
        rows.append((lpc, 0.9e-3, (0.70, 0.80), None, 180.0))
    rows.insert(2, (rows[0][0], 0.9e-3, (0.70, 2.5), None, 180.0))  # above the limit
    together = pulse_tables(rows)
    assert isinstance(together[2], InputError) and together[2].field == "surface_min"
    for k, row in enumerate(rows):
        if k == 2:
            continue
        alone = plan_pulses(*row)
        assert len(together[k].pulses) == len(alone.pulses), k
        assert all(same(a.boost, b.boost) and same(a.diffuse, b.diffuse)
                   for a, b in zip(together[k].pulses, alone.pulses)), k


@pytest.mark.parametrize("example", ["pinion-shaft", "ring-gear-boost-diffuse", "pinion-lpc"])
def test_the_temperature_comparison_is_the_plan_evaluated_at_each_temperature(example):
    """casedepth.plan.compare_temperatures works the soaks out together (one soak with the shop's stages counted,
    boost and diffuse, low-pressure pulse tables): each is what casedepth.plan.evaluate
    gives at that temperature, to round-off, as a plain float; a temperature below the steel's Ac3 is left out."""
    values = load(f"resources/examples/{example}.cdplan.json").values()
    temperatures = [T + 273.15 for T in (700.0, 900.0, 940.0, 990.0)]
    pairs = compare_temperatures(values, temperatures)
    assert [T for T, _ in pairs] == temperatures[1:]
    for T, soak in pairs:
        assert type(soak) is float and same(soak, evaluate({**values, "temperature": T}).soak_time), T


def test_a_row_that_needs_what_only_a_single_march_does_is_left_to_it():
    """A grid sized for a far shorter soak: the carbon reaches its far end, which a single march extends
    and a batch does not; the batch marks the row, the others go on."""
    d = Diffusivity("tibbetts")
    condition = SurfaceCondition(1198.15, 1.0, 1.5e-7)
    right = CarbonSolver(Geometry(), d, 0.2, math.sqrt(3e-11 * 3600 * 8), 3600 * 8)
    short = CarbonSolver(Geometry(), d, 0.2, math.sqrt(3e-11 * 60), 60)
    program = batch.Program(1, (batch.Segment(0, 3600 * 8, condition),))
    out = batch.run_programs([right, short], [program, program], min_rows=1)
    assert out[1] is None and out[0] is not None
    batch.run_program(right, program)
    assert np.allclose(out[0].carbon, right.carbon, rtol=ROUND_OFF, atol=0)


def test_a_held_surface_with_constant_d_batched_follows_the_error_function():
    """Crank (1975) eq. 3.13: C = C_core + (C_s − C_core) erfc(x / 2√(Dt)); the depth where it falls to the
    threshold is 2√(Dt) erfc⁻¹((thr − C_core)/(C_s − C_core)). The solver's own tolerance (0.1 %) applies."""
    from scipy.special import erfcinv

    setups = [casedepth.setup("1018", f"{T}C", 1.0, beta="inf", diffusivity="arrhenius") for T in (900, 925, 950, 975)]
    soak = 6 * 3600.0
    assert len(setups) >= batch.MIN_ROWS  # marched as a batch
    for setup, result in zip(setups, carburize_many(setups, [soak] * len(setups))):
        D = float(setup.diffusivity(0.5, setup.temperature))
        core, surface = setup.steel.carbon, setup.equilibrium_carbon
        exact = 2 * math.sqrt(D * soak) * float(erfcinv((setup.threshold_carbon - core) / (surface - core)))
        assert abs(result.case_depth / exact - 1) < 1e-3


def test_too_few_rows_for_a_batch_are_marched_alone():
    """Below batch.MIN_ROWS rows a batch's fixed cost per step is more than it saves: such groups are left to the
    callers, which march them alone (the same numbers to round-off either way)."""
    solvers = [casedepth.setup("8620", f"{T}C", 1.0).solver(soak_time=3600.0 * 6) for T in (900, 925, 950, 975)]
    assert batch.batch_rows(solvers) == [[0, 1, 2, 3]]
    assert batch.batch_rows(solvers[:batch.MIN_ROWS - 1]) == []
    assert batch.batch_rows(solvers[:2], min_rows=1) == [[0, 1]]


def test_a_case_the_single_path_refuses_is_refused_in_place():
    good = casedepth.setup("8620", "925C", 1.0)
    lean = casedepth.setup("8620", "880C", 0.5)  # 4 mm is not reached within the longest soak (500 h)
    out = soak_times_many([good, lean, good], [1e-3, 4e-3, 50e-3], errors="return")
    assert same(out[0].soak_time, soak_time_for_case_depth(good, 1e-3).soak_time)
    assert isinstance(out[1], NotReachableError) and isinstance(out[2], InputError)
    with pytest.raises(InputError):
        soak_times_many([good, lean], [1e-3, 4e-3])


@pytest.mark.parametrize("example", ["pinion-shaft", "ring-gear-boost-diffuse"])
def test_capability_is_the_same_as_its_parts_one_by_one(monkeypatch, example):
    """The load's parts (with the shop's ramped heat-up and drop counted; one soak, or boost and diffuse in the
    plan's split), run in one batch, give what casedepth.plan.forward gives each."""
    evaluation = importlib.import_module("casedepth.plan.evaluate")
    from casedepth.shop.capability import Spread, capability

    values = load(f"resources/examples/{example}.cdplan.json").values()
    together = capability(values, Spread(samples=16), optimize=True)
    monkeypatch.setattr(evaluation, "forward_many", lambda plans, soaks, shares=None: [
        evaluation.forward(p, s, shares=shares) for p, s in zip(plans, soaks)])
    alone = capability(values, Spread(samples=16), optimize=True)
    assert same(together.nominal, alone.nominal)
    assert np.allclose(together.depths, alone.depths, rtol=ROUND_OFF, atol=0)
    assert same(together.centred.soak, alone.centred.soak)
    for key, ends in alone.sensitivity.items():
        assert all(same(a, b) for a, b in zip(together.sensitivity[key], ends))


def test_depth_histories_batched_as_alone():
    """The chart's band: each part's depth after every step, recorded by the batch, is the single march's history."""
    from casedepth.carburizing.soak import depth_histories_many

    setups = [casedepth.setup("8620", f"{T}C", p, beta=b) for T, p, b in
              ((900, 1.0, "1.5e-5cm/s"), (950, 0.9, "inf"), (925, 1.1, "8e-6cm/s"))]
    for setup, (times, depths) in zip(setups, depth_histories_many(setups, 10 * 3600.0)):
        history = carburize(setup, 10 * 3600.0).history
        assert np.allclose(times, history.times, rtol=ROUND_OFF, atol=0)
        assert np.allclose(depths, history.threshold_depths(setup.threshold_carbon), rtol=ROUND_OFF, atol=1e-18)


def test_rows_of_different_lengths_are_padded_and_give_what_each_gives_alone():
    """A shaft's grid runs to its centre, so its node count depends on the soak it was sized for: shafts of
    different soaks (and a plate) march in one batch, the shorter rows padded with nodes no carbon reaches; each
    row's numbers are its own to round-off, and its profile comes back on its own nodes."""
    from casedepth.numerics.batch import BatchMarch, batch_rows

    setups = [casedepth.setup("8620", "925C", "1.0", geometry="cylinder", diameter=f"{d}mm") for d in (12, 16, 20)]
    setups.append(casedepth.setup("8620", "925C", "1.0", geometry="plate", thickness="10mm"))
    soaks = [3600.0 * h for h in (3, 5, 7, 9)]
    solvers = [s.solver(soak_time=t) for s, t in zip(setups, soaks)]
    sizes = [len(s.nodes) for s in solvers]
    assert len(set(sizes)) > 1 and max(sizes) <= batch.PADDING * min(sizes)
    assert batch_rows(solvers) == [[0, 1, 2, 3]]
    marched = BatchMarch(solvers)
    assert marched.padded
    for setup, soak, result in zip(setups, soaks, carburize_many(setups, soaks)):
        alone = carburize(setup, soak)
        assert len(result.profile.carbon) == len(alone.profile.carbon)
        assert same(result.case_depth, alone.case_depth) and same(result.carbon_uptake, alone.carbon_uptake)
        assert np.max(np.abs(result.profile.carbon - alone.profile.carbon)) <= ROUND_OFF


def test_threshold_depths_read_only_a_padded_rows_own_nodes():
    """Through-carburized rows (never below the threshold on their own nodes) padded with core carbon beyond
    their centre still read their centre, as the single reading does."""
    nodes = np.array([[0.0, 1e-4, 2e-4, 3e-4], [0.0, 1e-4, 2e-4, 3e-4]])
    carbon = np.array([[0.9, 0.8, 0.7, 0.6], [0.9, 0.6, 0.3, 0.2]])
    padded_nodes = np.concatenate((nodes, np.full((2, 2), np.inf)), axis=1)
    padded_carbon = np.concatenate((carbon, np.full((2, 2), 0.2)), axis=1)
    threshold, half = np.array([0.4, 0.4]), np.array([3e-4, 3e-4])
    got = batch.threshold_depths(padded_nodes, padded_carbon, threshold, half)
    want = [threshold_depth(nodes[k], carbon[k], 0.4, 3e-4) for k in range(2)]
    assert got[0] == pytest.approx(3e-4) and all(same(g, w) for g, w in zip(got, want))
