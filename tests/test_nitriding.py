"""Gas nitriding: potentials, phases, compound layer, diffusion zone, command line.

Where a number is recalled rather than read from its source the check says "from memory"; the
internal-nitriding front is checked against its own published limits (Wagner 1959; Meijering 1971)
and the case without nitride formers against the erfc solution (Crank 1975).
"""

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from casedepth import nitriding as N
from casedepth.cli import main
from casedepth.errors import InputError
from casedepth.models.steels import Steel, find
from casedepth.plan import evaluate, load

K = 273.15


def setup(grade="4140", celsius=520.0, kn=3.0, **kw):
    return N.NitridingSetup(find(grade), celsius + K, kn, **kw)


def test_nitriding_potential_definition():
    """K_N = p(NH3)/p(H2)^1.5 (Lehrer 1930)."""
    assert N.nitriding_potential(0.5, 0.375) == pytest.approx(0.5 / 0.375**1.5, rel=1e-12)


def test_dissociation_follows_the_reaction_stoichiometry():
    """NH3 -> 1/2 N2 + 3/2 H2: a burette reading d leaves 1 - d NH3 and 3d/4 H2 in the exhaust."""
    for d in (0.15, 0.30, 0.50, 0.80):
        assert N.nitriding_potential_from_dissociation(d) == pytest.approx((1 - d) / (0.75 * d) ** 1.5, rel=1e-12)
        assert N.dissociation_for_potential(N.nitriding_potential_from_dissociation(d)) == pytest.approx(d, rel=1e-9)
    with pytest.raises(InputError):
        N.nitriding_potential_from_dissociation(1.2)


def test_lehrer_boundaries_fall_with_temperature():
    """Lehrer (1930); Mittemeijer & Somers (2015): both boundaries fall as T rises, α/γ′ below γ′/ε."""
    previous = None
    for celsius in (480, 500, 520, 550, 570, 590):
        a, e = N.Lehrer_boundaries(celsius + K)
        assert 0 < a < e
        if previous:
            assert a < previous[0] and e < previous[1]
        previous = (a, e)


@pytest.mark.parametrize("celsius,alpha_gamma,gamma_epsilon", [(500, 0.35, 2.5), (580, 0.18, 0.9)])
def test_lehrer_boundary_values(celsius, alpha_gamma, gamma_epsilon):
    """Values read off the Lehrer diagram (from memory; the fit passes through them), ±5 %."""
    a, e = N.Lehrer_boundaries(celsius + K)
    assert a == pytest.approx(alpha_gamma, rel=0.05)
    assert e == pytest.approx(gamma_epsilon, rel=0.05)


def test_surface_phase():
    T = 520 + K
    a, e = N.Lehrer_boundaries(T)
    assert N.surface_phase(T, 0.5 * a) == "alpha"
    assert N.surface_phase(T, 0.5 * (a + e)) == "gamma'"
    assert N.surface_phase(T, 2 * e) == "epsilon"


def test_ferrite_saturation_near_the_eutectoid():
    """Fe–N diagram (Wriedt, Gokcen & Nafziger 1987): about 0.10 wt % N in ferrite at 592 °C (from memory), ±10 %."""
    assert N.nitrogen_saturation_ferrite(592 + K) == pytest.approx(0.10, rel=0.10)
    assert N.nitrogen_saturation_ferrite(500 + K) < N.nitrogen_saturation_ferrite(590 + K)


def test_bohnenkamp_diffusivity_as_published():
    """Bohnenkamp (1967): D0 = 1.5e-2 cm²/s, Q = 79.9 kJ/mol."""
    T = 793.15
    assert N.Bohnenkamp_1967_nitrogen_diffusivity(T) == pytest.approx(1.5e-6 * math.exp(-79900 / (8.314462618 * T)))


def test_wagner_front_small_ratio_limit():
    """Meijering (1971): for c_s << c_M, γ² = c_s / (2 c_M), i.e. ξ² = 2 D c_s t / c_M; agreement 1 %."""
    for ratio in (1e-3, 1e-2):
        gamma = N.Wagner_front_factor(ratio, 1.0)
        assert gamma**2 == pytest.approx(ratio / 2, rel=1e-2)
        assert math.sqrt(math.pi) * gamma * math.exp(gamma**2) * math.erf(gamma) == pytest.approx(ratio, rel=1e-10)


def test_nitride_capacity_of_a_chromium_steel():
    """All Cr as CrN: 1 wt % Cr binds 14.007/51.996 = 0.269 wt % N."""
    assert N.nitride_capacity({"Cr": 1.0}) == pytest.approx(14.007 / 51.996)
    assert N.nitride_capacity({"Mo": 1.0}) == pytest.approx(0.5 * 14.007 / 95.95)
    assert N.nitride_capacity({"C": 0.2, "Mn": 0.8}) == 0.0


def test_steel_without_nitride_formers_follows_erfc():
    """Limiting case: no nitride formers, so dissolved nitrogen follows c_s erfc(x / 2√(Dt)) (Crank 1975,
    eq. 2.45) below the compound layer."""
    plain = N.NitridingSetup(Steel("plain", {"C": 0.2, "Mn": 0.5}), 570 + K, 3.0, core_hardness=150,
                             surface_hardness=300)
    t = 4 * 3600.0
    result = N.nitride(plain, t)
    x = result.depth - result.compound_layer
    exact = plain.substrate_nitrogen * np.array([math.erfc(v) for v in x / (2 * math.sqrt(plain.diffusivity * t))])
    assert np.max(np.abs(result.nitrogen - exact)) < 1e-12
    assert any("nitride formers" in w for w in result.warnings)


def test_inverse_gives_the_target():
    s = setup()
    result = N.nitriding_time(s, 0.4e-3)
    assert result.nitrided_depth == pytest.approx(0.4e-3, rel=1e-6)
    again = N.nitride(s, result.time)
    assert again.nitrided_depth == pytest.approx(0.4e-3, rel=1e-6)
    assert again.compound_layer > 0


def test_potential_for_a_compound_layer_window():
    s = setup()
    t = 20 * 3600.0
    kn = N.potential_for_compound_layer(s, t, (5e-6, 10e-6))
    assert N.nitride(setup(kn=kn), t).compound_layer == pytest.approx(7.5e-6, rel=1e-6)


def test_two_stage_schedule_lands_the_layer_in_its_window():
    s = setup(kn=6.0)
    total = N.nitriding_time(s, 0.4e-3).time
    assert N.nitride(s, total).compound_layer > 5e-6  # one stage at K_N 6 overshoots a 2–5 µm window
    two = N.two_stage_schedule(s, total, (2e-6, 5e-6))
    assert two.first_time + two.second_time == pytest.approx(total)
    assert two.compound_layer == pytest.approx(3.5e-6, rel=1e-3)
    assert two.second_kn < two.first_kn and N.surface_phase(s.temperature, two.second_kn) == "gamma'"


def test_more_nitride_formers_slow_the_sharp_front():
    """Wagner (1959): in the sharp-front model (kept for older plans) the front slows as the nitride formers trap
    more nitrogen. (Measured depths do not follow this ordering: see test_nitriding_zone.py.)"""
    times = [N.nitriding_time(setup(grade, zone_model="sharp-front-2026"), 0.3e-3).time
             for grade in ("4140", "31CrMoV9", "41CrAlMo7-10", "H13")]
    assert times == sorted(times)


RUN = settings(max_examples=25, deadline=None)


@RUN
@given(celsius=st.floats(480, 585), kn=st.floats(0.1, 20), hours=st.floats(1, 100), more=st.floats(1.01, 3))
def test_more_time_temperature_or_potential_never_thinner_or_shallower(celsius, kn, hours, more):
    base = N.nitride(setup(celsius=celsius, kn=kn), hours * 3600)
    for other in (N.nitride(setup(celsius=celsius, kn=kn), hours * more * 3600),
                  N.nitride(setup(celsius=min(celsius + 5 * more, 590), kn=kn), hours * 3600),
                  N.nitride(setup(celsius=celsius, kn=min(kn * more, 30)), hours * 3600)):
        assert other.compound_layer >= base.compound_layer * (1 - 1e-12)
        assert other.nitrided_depth >= base.nitrided_depth * (1 - 1e-12) - 1e-12


def test_cli_json(capsys):
    assert main(["nitride", "--steel", "4140", "--temperature", "520C", "--kn", "3", "--target", "0.4mm",
                 "--compound", "5-10um", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    for key in ("soak_time_h", "compound_layer_um", "nitrided_depth_mm", "surface_phase", "warnings", "profile"):
        assert key in data
    assert data["nitrided_depth_mm"] == pytest.approx(0.4, rel=1e-6)
    assert data["surface_phase"] == "epsilon"
    again = N.nitride(setup(kn=data["kn_for_compound_window"]), data["soak_time_h"] * 3600)
    assert 5 <= again.compound_layer * 1e6 <= 10
    assert data["epsilon_layer_um"] + data["gamma_prime_layer_um"] == pytest.approx(data["compound_layer_um"], rel=1e-12)


def test_cli_takes_measured_exhaust_fractions(capsys):
    """K_N = p(NH3)/p(H2)^1.5 (Lehrer 1930) from an analyser's volume percentages at 1 atm."""
    assert main(["nitride", "--steel", "4140", "--temperature", "520C", "--exhaust", "NH3=40%,H2=45%",
                 "--target", "0.4mm", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["nitriding_potential"] == pytest.approx(0.40 / 0.45**1.5, rel=1e-12)


@pytest.mark.parametrize("model", ["precipitation-2026", "sharp-front-2026"])
def test_calibration_multiplier_scales_the_zone(model):
    """The diffusion zone below the compound layer grows as √(D t) (Wagner 1959; any self-similar zone):
    halving D divides its depth by √2."""
    t = 20 * 3600.0
    plain = N.nitride(setup(zone_model=model), t)
    slow = N.nitride(setup(diffusivity_multiplier=0.5, zone_model=model), t)
    assert slow.nitrided_depth - slow.compound_layer == pytest.approx(
        (plain.nitrided_depth - plain.compound_layer) / math.sqrt(2), rel=1e-9)


@pytest.mark.parametrize("args,flag", [
    (["--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--d-multiplier", "50"], "--d-multiplier"),
    (["--temperature", "620C", "--kn", "3", "--target", "0.4mm"], "--temperature"),
    (["--temperature", "520C", "--kn", "99", "--target", "0.4mm"], "--kn"),
    (["--temperature", "520C", "--dissociation", "120", "--target", "0.4mm"], "--dissociation"),
    (["--temperature", "520C", "--exhaust", "NH3=40", "--target", "0.4mm"], "--exhaust"),
    (["--temperature", "520C", "--exhaust", "NH3=80,H2=45", "--target", "0.4mm"], "--exhaust"),
    (["--temperature", "520C", "--exhaust", "CO=20,H2=45", "--target", "0.4mm"], "--exhaust"),
    (["--temperature", "520C", "--kn", "0.01", "--target", "0.4mm"], "--kn"),
    (["--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--second-kn", "0.5"], "--second-kn"),
    (["--temperature", "520C", "--kn", "3", "--target", "5mm"], "--target"),
    (["--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--compound", "ten"], "--compound"),
    (["--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--core-hardness", "5000"], "--core-hardness"),
    (["--temperature", "520C", "--kn", "3", "--target", "0.4mm", "--surface-hardness", "310"], "--surface-hardness"),
])
def test_cli_bad_input(capsys, args, flag):
    code = main(["nitride", "--steel", "4140", *args])
    err = capsys.readouterr().err
    assert code == 2 and flag in err and len(err.strip().splitlines()) == 1


def test_cli_runs_a_saved_nitriding_plan(capsys):
    from pathlib import Path

    # the piston-rod example as the first release wrote it (schema 3)
    plan = Path(__file__).resolve().parent / "data" / "piston-rod-schema-3.cdplan.json"
    assert main(["run", str(plan), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    low, _, high = data["target_depth_mm"]
    assert low <= data["nitrided_depth_mm"] <= high
    assert data["cautions"][0] == "Ammonia is toxic"
    # a schema-3 plan keeps the first release's layer law (11.8 µm, as when it was written) and is offered the newer
    assert data["layer_model"] == "rate-law-2026" and data["compound_layer_um"] == pytest.approx(11.82, abs=0.01)
    assert [offer["parameter"] for offer in data["offers"]] == ["layer_model", "zone_model"]
    newer = load(plan)
    newer.accept(newer.offers()[0])
    assert 5 <= evaluate(newer).aim.compound_layer * 1e6 <= 10


def test_curvature_is_flagged_on_thin_parts():
    """The internal-nitriding solution is for a flat surface (Wagner 1959): a depth over a tenth of a pin's radius
    is flagged, a thick part is not."""
    from casedepth.plan import Plan, evaluate

    def plan(diameter):
        p = Plan(treatment="nitriding", shape="cylinder", size=diameter, case_min=0.3e-3, case_max=0.5e-3,
                 temperature=793.15, kn=3.0)
        p.choose_steel("4140")
        return evaluate(p.values())

    assert any("radius" in w for w in plan(4e-3).warnings)
    assert not any("radius" in w for w in plan(60e-3).warnings)


def test_two_stage_plan_lands_depth_and_layer(tmp_path, capsys):
    """Two-stage nitriding in a plan: the aim depth and the middle of the layer window both hold at the end; the
    saved plan runs the same on the command line; the layer part-way is the one the staged model gives."""
    from casedepth.plan import Plan, evaluate, save

    p = Plan(treatment="nitriding", case_min=0.3e-3, case_max=0.5e-3, temperature=793.15, kn=8.0,
             compound_min=2e-6, compound_max=5e-6, two_stage=True)
    p.choose_steel("4140")
    outcome = evaluate(p.values())
    two = outcome.schedule
    assert two is not None and two.first_kn == 8.0 and two.second_kn < 8.0
    assert outcome.aim.nitrided_depth == pytest.approx(0.4e-3, rel=1e-5)
    assert outcome.aim.compound_layer == pytest.approx(3.5e-6, rel=1e-3)
    assert two.first_time + two.second_time == pytest.approx(outcome.aim.time, rel=1e-12)
    assert outcome.at(two.first_time).layer.epsilon > 0  # ε from the first stage, gone by the end
    assert outcome.aim.layer.epsilon == 0
    path = tmp_path / "two.cdplan.json"
    save(p, path)
    assert main(["run", str(path), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [s["kn"] for s in data["stages"]] == pytest.approx([8.0, two.second_kn])
    assert data["soak_time_h"] == pytest.approx(outcome.aim.time / 3600, rel=1e-9)
    # the quote: load, purge, heat-up, both nitriding stages, cool-down, purge, at the shop's rate
    from casedepth.shop.quote import ShopDefaults

    shop = ShopDefaults()
    hours = [line["hours"] for line in data["quote"]["stages"]]
    assert len(hours) == 7 and sum(hours) == pytest.approx(data["quote"]["total_h"], rel=1e-12)
    assert hours[3] + hours[4] == pytest.approx(outcome.aim.time / 3600, rel=1e-12)
    assert data["quote"]["total_h"] == pytest.approx(outcome.aim.time / 3600 + shop.load_h + 2 * shop.nitriding_purge_h
                                                     + shop.nitriding_heat_up_h + shop.nitriding_cool_h, rel=1e-12)
    assert data["quote"]["cost_per_load"] == pytest.approx(data["quote"]["total_h"] * shop.furnace_rate_per_h)
