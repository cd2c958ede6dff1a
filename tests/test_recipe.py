"""Whole furnace cycles: stages, ramps, boost/diffuse planning and the quote."""

import json
import math
from pathlib import Path

import numpy as np
import pytest
from scipy.special import erfc

import casedepth
from casedepth.cli import main
from casedepth.errors import InputError, NotReachableError
from casedepth.carburizing.cycle import Stage, run_recipe, shop_stages, stage_lines
from casedepth.carburizing.planners import plan_boost_diffuse, plan_single_soak
from casedepth.carburizing.soak import soak_times_for_case_depths
from casedepth.plan import Plan, compare_temperatures, evaluate
from casedepth.shop.quote import ShopDefaults, quote_lines

K = 273.15
T925 = 925 + K
EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"


def test_splitting_a_soak_changes_nothing():
    """Two identical half-soaks are one soak: same profile within the solver's accuracy (0.1 %)."""
    setup = casedepth.setup("8620", "925C", 1.0)
    one = run_recipe(setup, [Stage("soak", 6 * 3600, T925, 1.0)])
    two = run_recipe(setup, [Stage("soak", 3 * 3600, T925, 1.0), Stage("soak", 3 * 3600, T925, 1.0)])
    assert two.case_depth == pytest.approx(one.case_depth, rel=1e-3)
    assert two.surface_carbon == pytest.approx(one.surface_carbon, abs=1e-3)
    assert two.total_time == one.total_time == 6 * 3600


def test_boost_then_diffuse_against_superposition():
    """Constant D and a held surface make the problem linear: a boost at C_b then a diffuse at C_d is
    the sum of two erfc solutions, C0 + (C_b - C0) erfc(x/2√(Dt)) + (C_d - C_b) erfc(x/2√(D(t - t_b)))
    (superposition; Crank, The Mathematics of Diffusion, 1975, ch. 2). Agreement within 0.002 wt % C."""
    setup = casedepth.setup("C=0.20", "925C", 1.2, at=0.4, diffusivity="arrhenius", beta="inf", alloy_factor=False)
    D = float(setup.diffusivity(0.4, T925))
    tb, td = 4 * 3600.0, 2 * 3600.0
    cycle = run_recipe(setup, [Stage("boost", tb, T925, 1.2), Stage("diffuse", td, T925, 0.8)])
    x = cycle.profile.depth
    t = tb + td
    exact = 0.2 + 1.0 * erfc(x / (2 * math.sqrt(D * t))) + (0.8 - 1.2) * erfc(x / (2 * math.sqrt(D * td)))
    assert np.max(np.abs(cycle.profile.carbon - exact)) < 2e-3


def test_ramps_add_carbon_that_grows_with_ramp_time():
    setup = casedepth.setup("8620", "925C", 1.0)
    uptakes = [run_recipe(setup, [Stage.heat_up(T925, 1.0, duration=hours * 3600)]).stage_uptake[0]
               for hours in (0.5, 1.0, 2.0)]
    assert 0 < uptakes[0] < uptakes[1] < uptakes[2]


def test_carbon_taken_up_below_about_850C_is_negligible():
    """Heating through 800–850 °C in the atmosphere changes the final case by under 1 % compared with
    a load that starts taking carbon at 850 °C (the part is austenitic only above its Ac3, near 800 °C,
    and D is small there). Common practice: carbon pick-up during heat-up counts from about 850 °C."""
    setup = casedepth.setup("8620", "925C", 1.0)
    rest = [Stage("heat-up", 900, T925, 1.0), Stage("soak", 6 * 3600, T925, 1.0)]
    through = run_recipe(setup, [Stage.heat_up(850 + K, 1.0, duration=3600), *rest])
    from_850 = run_recipe(setup, rest, start_temperature=850 + K)
    assert through.stage_uptake[0] > 0
    assert through.case_depth == pytest.approx(from_850.case_depth, rel=1e-2)


def test_planned_boost_diffuse_hits_both_targets_when_rerun():
    setup = casedepth.setup("8620", "925C", 1.0)
    plan = plan_boost_diffuse(setup, 1.2e-3, (0.75, 0.85), 1.15, 0.80)
    assert plan.boost_time > 0 and plan.diffuse_time > 0
    rerun = run_recipe(setup, [Stage("boost", plan.boost_time, T925, 1.15), Stage("diffuse", plan.diffuse_time, T925, 0.80)])
    assert rerun.case_depth == pytest.approx(1.2e-3, rel=2e-3)
    assert 0.75 <= rerun.surface_carbon <= 0.85
    assert rerun.surface_carbon == pytest.approx(plan.surface_aim, abs=3e-3)
    # never above saturation during the boost
    boost_end = rerun.profile_at(plan.boost_time)
    assert boost_end.carbon.max() <= setup.saturation_carbon


def test_boost_diffuse_with_heat_up_and_drop_counts_their_carbon():
    setup = casedepth.setup("8620", "925C", 1.0)
    shop = ShopDefaults()
    plain = plan_boost_diffuse(setup, 1.0e-3, (0.75, 0.85), 1.15, 0.80)
    full = plan_boost_diffuse(setup, 1.0e-3, (0.75, 0.85), 1.15, 0.80, before=shop_stages(shop, T925, 1.15)[0],
                              after=shop_stages(shop, T925, 1.0)[1])
    assert full.cycle.case_depth == pytest.approx(1.0e-3, rel=2e-3)
    assert 0.75 <= full.cycle.surface_carbon <= 0.85
    assert full.boost_time + full.diffuse_time < plain.boost_time + plain.diffuse_time


def test_single_soak_without_shop_stages_is_the_plain_soak():
    """With nothing before or after, the soak counting the shop's stages is the isothermal soak (1e-5)."""
    setup = casedepth.setup("8620", "925C", 1.0)
    targets = [0.8e-3, 1.0e-3, 1.2e-3]
    counted = plan_single_soak(setup, targets)
    plain = soak_times_for_case_depths(setup, targets, size_for=1.0e-3)
    assert counted.soak_times == pytest.approx([r.soak_time for r in plain], rel=1e-5)


def test_single_soak_with_a_drop_against_the_time_dependent_D_solution():
    """Held surface, D constant in carbon but following the temperature: the diffusion equation with D(t) is
    solved by erfc(x / 2√T) with T = ∫ D dt (Crank, The Mathematics of Diffusion, 1975, time-dependent
    diffusion coefficient). A soak at 925 °C, a 1 h linear drop to 845 °C and 1 h equalize at one potential
    must add up to the target's ∫ D dt; soak time within 0.3 %."""
    from scipy.integrate import quad
    from scipy.special import erfcinv

    potential = 0.9
    setup = casedepth.setup("C=0.20", "925C", potential, at=0.4, diffusivity="arrhenius", beta="inf",
                            alloy_factor=False)
    hard = 845 + K

    def D(T):
        return float(setup.diffusivity(0.4, T))

    after = (Stage("drop", 3600.0, hard, potential), Stage("equalize", 3600.0, hard, potential))
    target = 1.0e-3
    plan = plan_single_soak(setup, [target], after=after, cycle_for=0)
    needed = (target / (2 * erfcinv((0.4 - 0.2) / (potential - 0.2)))) ** 2
    in_drop = quad(lambda t: D(T925 + (hard - T925) * t / 3600.0), 0, 3600.0)[0]
    exact = (needed - in_drop - D(hard) * 3600.0) / D(T925)
    assert plan.soak_times[0] == pytest.approx(exact, rel=3e-3)
    assert plan.cycle.case_depth == pytest.approx(target, rel=1e-4)


def test_single_soak_counting_heat_up_and_drop_is_shorter_and_lands_on_target():
    """The carbon of the heat-up (above Ac3) and of the drop and equalize adds case, so the soak shortens;
    re-running the whole cycle with that soak lands on each target (1e-4)."""
    setup = casedepth.setup("8620", "925C", 1.0)
    shop = ShopDefaults()
    targets = [0.8e-3, 1.0e-3, 1.2e-3]
    before, after = shop_stages(shop, T925, 1.0)[0], shop_stages(shop, T925, 1.0)[1]
    counted = plan_single_soak(setup, targets, before, after)
    plain = soak_times_for_case_depths(setup, targets, size_for=1.0e-3)
    for soak, alone, target in zip(counted.soak_times, plain, targets):
        assert soak < alone.soak_time
        rerun = run_recipe(setup, [*before, Stage("soak", soak, T925, 1.0), *after])
        assert rerun.case_depth == pytest.approx(target, rel=1e-4)


def test_unreachable_surface_window_is_explained():
    setup = casedepth.setup("20MnCr5", "925C", 0.8)
    with pytest.raises(NotReachableError, match="diffuse only"):
        plan_boost_diffuse(setup, 1.0e-3, (0.70, 0.80), 1.15, 0.80)


@pytest.mark.parametrize("stages,words", [
    ([Stage("soak", -3600, T925, 1.0)], "duration"),
    ([Stage("boost", 3600, T925, 1.5)], "above the carbon saturation"),
    ([Stage("soak", 3600, T925, 1.0), Stage("drop", 1800, 950 + K, 0.8)], "drop must end below"),
    ([Stage("soak", 3600, 700 + K, 1.0)], "Ac3"),
    ([Stage("bake", 3600, T925, 1.0)], "unknown kind"),
    ([], "at least one stage"),
])
def test_bad_recipes(stages, words):
    setup = casedepth.setup("8620", "925C", 1.0)
    with pytest.raises(InputError, match=words):
        run_recipe(setup, stages)


def test_hot_stages_are_warned_about():
    setup = casedepth.setup("8620", "925C", 1.0)
    hot = run_recipe(setup, [Stage("boost", 3600, 1000 + K, 1.2), Stage("diffuse", 3600, 1000 + K, 0.8)])
    assert len(hot.warnings) == 1 and "grain" in hot.warnings[0]
    assert run_recipe(setup, [Stage("soak", 3600, T925, 1.0)]).warnings == []


def test_quote_adds_up():
    shop = ShopDefaults(furnace_rate_per_h=100.0, parts_per_load=40)
    before, after = shop_stages(shop, T925, 1.1)
    stages = [*before, Stage("boost", 4 * 3600, T925, 1.1), Stage("diffuse", 3600, T925, 0.8), *after]
    quote = quote_lines(stage_lines(stages), shop)
    assert [label for label, _ in quote.lines] == ["Load and close", "Heat-up", "Boost", "Diffuse",
                                                   "Drop to hardening temperature", "Equalize", "Quench", "Wash", "Temper"]
    assert quote.total_h == pytest.approx(sum(h for _, h in quote.lines))
    assert quote.total_h == pytest.approx(0.25 + 1 + 4 + 1 + 0.5 + 0.5 + 0.25 + 0.5 + 2)
    assert quote.cost_per_load == pytest.approx(quote.total_h * 100.0)
    assert quote.cost_per_part == pytest.approx(quote.cost_per_load / 40)
    with pytest.raises(InputError, match="parts_per_load"):
        ShopDefaults(parts_per_load=0)
    with pytest.raises(InputError, match="unknown entry furnace_rate"):
        ShopDefaults.from_dict({"furnace_rate": 90.0})


def test_temperature_comparison_is_monotone_and_keeps_the_plan_s_policy():
    """Hotter is faster; and the plan's own temperature gives the plan's soak (the same evaluation; the temperatures
    are marched together, so to round-off)."""
    plan = Plan(case_min=1.0e-3, case_max=1.0e-3)
    pairs = compare_temperatures(plan, [T + K for T in (900, 925, 950, 980)])
    times = [t for _, t in pairs]
    assert all(a > b for a, b in zip(times, times[1:]))
    assert dict(pairs)[T925] == pytest.approx(evaluate(plan).soak_time, rel=1e-12)
    alone = Plan(case_min=1.0e-3, case_max=1.0e-3, count_shop_stages=False)
    soak = dict(compare_temperatures(alone, [T925]))[T925]
    assert soak == pytest.approx(evaluate(alone).soak_time, rel=1e-12) and soak > times[1]


def test_cli_surface_target(capsys):
    code = main(["carburize", "--steel", "8620", "--temperature", "925C", "--target", "1.2mm", "--surface-target",
                 "0.75-0.85", "--boost-potential", "1.15", "--diffuse-potential", "0.80", "--json"])
    data = json.loads(capsys.readouterr().out)
    assert code == 0
    assert data["boost_time_h"] > 0 and data["diffuse_time_h"] > 0
    assert data["soak_time_h"] == pytest.approx(data["boost_time_h"] + data["diffuse_time_h"])
    assert data["case_depth_mm"] == pytest.approx(1.2, rel=2e-3)
    assert 0.75 <= data["surface_carbon_pct"] <= 0.85


@pytest.mark.parametrize("extra,flag", [
    (["--boost-potential", "1.6", "--diffuse-potential", "0.8"], "--boost-potential"),
    (["--boost-potential", "0.7", "--diffuse-potential", "0.8"], "--boost-potential"),
    (["--boost-potential", "1.1", "--diffuse-potential", "2.5"], "--diffuse-potential"),
])
def test_cli_surface_target_bad_input(capsys, extra, flag):
    code = main(["carburize", "--steel", "8620", "--temperature", "925C", "--target", "1.0mm",
                 "--surface-target", "0.80", *extra])
    err = capsys.readouterr().err
    assert code == 2 and flag in err and len(err.strip().splitlines()) == 1


@pytest.mark.parametrize("name", ["pinion-shaft.cdplan.json", "ring-gear-boost-diffuse.cdplan.json"])
def test_cli_runs_a_saved_plan(capsys, name):
    assert main(["run", str(EXAMPLES / name), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["quote"]["total_h"] == pytest.approx(sum(s["hours"] for s in data["quote"]["stages"]))
    low, _, high = data["target_depth_mm"]
    assert low <= data["case_depth_mm"] <= high
    assert main(["run", str(EXAMPLES / name)]) == 0
    assert "Cycle quote" in capsys.readouterr().out


def test_high_surface_carbon_is_flagged_after_the_drop_not_before():
    """Common practice aims case-hardened surfaces at about 0.7–0.9 %C (the one limit, SURFACE_CARBON_PRACTICE):
    a soak at 1.2 %C ending at 1.1 %C is flagged; with the shop's drop to the hardening potential (0.80 %C) the
    surface ends lower and is not; a surface just above 0.90 %C is flagged and its text names 0.90."""
    from casedepth.carburizing.setup import SURFACE_CARBON_PRACTICE

    assert SURFACE_CARBON_PRACTICE[1] == 0.90
    alone = evaluate(Plan(carbon_potential=1.2, shop={"heat_up_h": 0, "drop_h": 0, "equalize_h": 0}))
    assert alone.surface_carbon > 0.9 and any(w.startswith("The surface ends at") for w in alone.warnings)
    dropped = evaluate(Plan(carbon_potential=1.2))
    assert dropped.surface_carbon < 0.9 and not any(w.startswith("The surface ends at") for w in dropped.warnings)
    # the command line's own example: a soak alone at potential 1.00 ends near 0.94 %C and is flagged
    soak = evaluate(Plan(case_min=1.0e-3, case_max=1.0e-3, count_shop_stages=False))
    assert 0.90 < soak.surface_carbon < 0.95
    assert any("above the 0.70–0.90 %C" in w for w in soak.warnings)


def test_joined_cycle_matches_a_fresh_run():
    """The one-soak cycle is joined from pieces already run; a fresh run of the same stages gives the same stage
    starts, carbon per stage (1e-3 relative, the solver's reproducibility over other step sequences) and case."""
    setup = casedepth.setup("8620", "925C", 1.0)
    shop = ShopDefaults()
    counted = plan_single_soak(setup, [1.0e-3], shop_stages(shop, T925, 1.0)[0], shop_stages(shop, T925, 1.0)[1], cycle_for=0)
    fresh = run_recipe(setup, counted.cycle.stages)
    assert counted.cycle.stage_start == pytest.approx(fresh.stage_start, rel=1e-12)
    assert counted.cycle.stage_uptake == pytest.approx(fresh.stage_uptake, rel=1e-3, abs=1e-9)
    assert counted.cycle.case_depth == pytest.approx(fresh.case_depth, rel=1e-4)
    assert counted.cycle.history.times[-1] == pytest.approx(fresh.history.times[-1], rel=1e-12)
