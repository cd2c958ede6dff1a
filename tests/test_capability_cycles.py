"""Process capability of plans with no single soak: boost and diffuse, stages of one's own, two-stage nitriding.

The load runs the recipe planned for the nominal part, so each part runs the plan's held stages in the plan's split
of the time at temperature (``Outcome.held_shares``). Checks: with no spread every part is the plan itself (depth,
surface carbon, compound layer as the plan's own evaluation gives them); the same cycle entered as boost and
diffuse or as stages of one's own spreads alike (one evaluation path); at a fixed split, a held surface and a
constant D the case is self-similar in x/√t (Crank 1975, *The Mathematics of Diffusion*, §3.3: a piecewise
constant surface concentration switched at a fixed fraction of the time keeps the solution a function of x/√t), so
the depth grows exactly as √t — the rule the centred-time search rests on; one probe and controller hold every
setpoint, so a potential bias moves the final surface carbon by about the band (common practice).
"""

from __future__ import annotations

import json
import math
import pathlib

import numpy as np
import pytest

import casedepth
from casedepth.carburizing.cycle import stage_to_dict
from casedepth.cli import main
from casedepth.plan import Plan, evaluate, forward, load
from casedepth.shop.capability import Spread, capability

EXAMPLES = pathlib.Path(__file__).resolve().parents[1] / "resources" / "examples"
NONE = {"temperature": 0.0, "carbon_potential": 0.0, "beta": 1.0}


def boost_diffuse(**changes) -> dict:
    options = dict(steel="8620", temperature="925C", target="0.9-1.3mm", surface_target="0.72-0.85",
                   boost_potential=1.15, diffuse_potential=0.80)
    options.update(changes)
    return casedepth.plan(**options).values()


def as_own_stages(values: dict) -> dict:
    """The same cycle entered as stages of one's own: the planned stages that move carbon, counted as the plan
    counts them."""
    outcome = evaluate(values)
    stages = [stage_to_dict(s) for s in outcome.stages if s.moves_carbon and (outcome.counts_shop_stages
                                                                              or s.kind in ("boost", "diffuse"))]
    own = {k: v for k, v in values.items() if k != "treatment"}
    return Plan("carburizing", **{**own, "process": "stages", "stages": stages}).values()


def test_with_no_spread_every_part_is_the_planned_boost_and_diffuse():
    values = boost_diffuse()
    outcome = evaluate(values)
    found = capability(values, Spread(bands=NONE, samples=16))
    assert [name for name, _ in found.held] == ["boost", "diffuse"]
    assert sum(share for _, share in found.held) == pytest.approx(1.0, abs=1e-12)
    assert found.soak == pytest.approx(outcome.soak_time, rel=1e-12)
    assert np.allclose(found.depths, outcome.depth, rtol=1e-9, atol=0.0)
    assert np.allclose(found.figures["surface_carbon_pct"], outcome.surface_carbon, rtol=1e-9, atol=0.0)
    assert found.share_in_window == 1.0 and found.share_in_surface_window == 1.0


def test_boost_and_diffuse_spread_as_the_same_cycle_entered_as_stages():
    values = boost_diffuse()
    planned = capability(values, Spread(samples=32))
    own = capability(as_own_stages(values), Spread(samples=32))
    assert [name for name, _ in own.held] == ["boost", "diffuse"]
    assert np.allclose(planned.depths, own.depths, rtol=1e-6, atol=0.0)
    assert np.allclose(planned.figures["surface_carbon_pct"], own.figures["surface_carbon_pct"], rtol=1e-6, atol=0.0)


def test_at_a_fixed_split_the_case_grows_as_the_square_root_of_time():
    """Held surface, constant D (Arrhenius), no shop stages: x/√t similarity (Crank 1975, §3.3)."""
    values = boost_diffuse(beta="inf", diffusivity="arrhenius", shop_stages="off")
    outcome = evaluate(values)
    shares, soak = outcome.held_shares, outcome.soak_time
    first, later = (forward(values, t, shares=shares) for t in (soak, 1.5 * soak))
    assert later.case_depth / first.case_depth == pytest.approx(math.sqrt(1.5), rel=2e-3)
    assert later.surface_carbon == pytest.approx(first.surface_carbon, abs=1e-9)


def test_the_surface_window_counts_and_the_split_is_kept_when_centred():
    values = boost_diffuse()
    found = capability(values, Spread(bands={"temperature": 15.0, "carbon_potential": 0.08}, samples=64), optimize=True)
    inside = ((found.depths >= found.window[0]) & (found.depths <= found.window[1])
              & (found.surface >= found.surface_window[0]) & (found.surface <= found.surface_window[1]))
    assert found.share_in_window == pytest.approx(np.mean(inside))
    assert found.share_in_window <= min(found.share_in_depth_window, found.share_in_surface_window)
    assert found.centred.share >= found.share_in_window
    data = found.to_dict()
    assert [row["stage"] for row in data["centred_held_stages"]] == ["boost", "diffuse"]
    ratio = [row["time_h"] / data["centred_soak_time_h"] for row in data["centred_held_stages"]]
    assert ratio == pytest.approx([share for _, share in found.held])
    assert set(data["surface_sensitivity"]) == {"temperature", "carbon_potential", "beta"}
    assert data["surface_window_pct"] == [0.72, 0.85]


def test_a_potential_bias_moves_every_setpoint_so_the_final_surface_carbon_follows_it():
    """The shop's drop and equalize run at its potential at hardening temperature; one controller holds it with the
    soak's, so a bias of ±0.05 %C moves the surface carbon after equalizing by most of that (common practice)."""
    values = casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="0.8-1.2mm").values()
    found = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.05, "beta": 1.0}, samples=32))
    surface = found.figures["surface_carbon_pct"]
    assert (surface.max() - surface.min()) / 2.0 > 0.6 * 0.05


def test_two_stage_nitriding_with_no_spread_is_the_planned_schedule():
    values = Plan("nitriding", two_stage=True, kn_second=0.4).values()
    outcome = evaluate(values)
    found = capability(values, Spread(bands={"temperature": 0.0, "kn": 0.0}, samples=16))
    assert [name for name, _ in found.held] == ["first stage", "second stage"]
    assert found.held[0][1] * found.soak == pytest.approx(outcome.schedule.first_time, rel=1e-9)
    assert np.allclose(found.depths, outcome.aim.window_depth, rtol=1e-9, atol=0.0)
    assert np.allclose(found.figures["compound_layer_um"], outcome.aim.compound_layer * 1e6, rtol=1e-9, atol=0.0)


def test_the_ring_gear_example_on_the_command_line(capsys):
    assert main(["capability", str(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json"), "--samples", "32", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [row["stage"] for row in data["held_stages"]] == ["boost", "diffuse"]
    assert 0.0 <= data["share_in_window"] <= min(data["share_in_depth_window"], data["share_in_surface_window"])
    assert main(["capability", str(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json"), "--samples", "32"]) == 0
    text = capsys.readouterr().out
    assert "boost" in text and "diffuse" in text and "surface window" in text and "moves surface C" in text


def test_the_chart_of_a_boost_and_diffuse_plan_draws_no_load_band():
    from casedepth.treatments import TREATMENTS

    values = load(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json").values()
    chart = TREATMENTS["carburizing"].chart(values, load=True, temperatures=[values["temperature"]])
    assert chart is not None
