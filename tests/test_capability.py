"""Process capability (casedepth.shop.capability): where a load's spread puts the case.

Checks against sources outside the project: the first-order propagation of Crank's (1975, *The Mathematics
of Diffusion*, eq. 3.13) erfc solution at constant D for small spreads; a plain Monte Carlo of the same model
on independent samples (the Latin hypercube's percentiles agree within their sampling error); the
definitions of Cp and Cpk (ISO 22514-2, from memory); and properties (no spread gives the nominal; a wider
band never narrows the spread).
"""

from __future__ import annotations

import json
import pathlib
import math
import statistics

import numpy as np
import pytest

import casedepth
from casedepth.cli import main
from casedepth.constants import GAS_CONSTANT
from casedepth.errors import InputError
from casedepth.models.diffusivity import ARRHENIUS_Q
from casedepth.plan import forward
from casedepth.shop.capability import Capability, Spread, capability, survey_class
from casedepth.units import DisplayUnits


def plain(**changes):
    """An isothermal plan (the shop's stages off) with a constant D and a held surface: Crank's erfc case."""
    options = dict(steel="8620", temperature="925C", potential=1.0, target="0.8-1.2mm", shop_stages="off",
                   diffusivity="arrhenius", beta="inf")
    options.update(changes)
    return casedepth.plan(**options).values()


NONE = {"temperature": 0.0, "carbon_potential": 0.0}


def test_no_spread_gives_the_nominal_for_every_part():
    values = plain()
    found = capability(values, Spread(bands=NONE, samples=16))
    assert np.all(found.depths == found.nominal)
    assert found.nominal == pytest.approx(1.0e-3, rel=1e-4)  # the aim's soak gives the aim's depth
    assert found.share_in_window == 1.0 and math.isinf(found.cp)


def test_a_wider_band_never_narrows_the_spread():
    values = plain()
    narrow = capability(values, Spread(bands={"temperature": 5.0, "carbon_potential": 0.0}, samples=64))
    wide = capability(values, Spread(bands={"temperature": 15.0, "carbon_potential": 0.0}, samples=64))
    spread = [c.percentiles["p95"] - c.percentiles["p5"] for c in (narrow, wide)]
    assert spread[1] > spread[0] > 0.0


def test_temperature_spread_matches_first_order_erfc_propagation():
    """x = 2√(Dt) erfc⁻¹(θ) with D = D0 exp(−Q/RT): dx/dT = x Q / (2 R T²) (Crank 1975, eq. 3.13). A normal
    band of ±2 K (σ = 1 K) gives σ_x / x = Q / (2 R T²) · 1 K; 256 parts estimate σ to about 4.5 %."""
    values = plain()
    found = capability(values, Spread(bands={"temperature": 2.0, "carbon_potential": 0.0}, distribution="normal"))
    T = values["temperature"]
    expected = ARRHENIUS_Q / (2.0 * GAS_CONSTANT * T**2) * 1.0
    assert np.std(found.depths, ddof=1) / found.nominal == pytest.approx(expected, rel=0.12)


def test_potential_spread_matches_first_order_erfc_propagation():
    """dx/dC_s = 2√(Dt) · (√π/2) exp(erfc⁻¹(θ)²) · (C_t − C_0)/(C_s − C_0)², θ = (C_t − C_0)/(C_s − C_0) (Crank
    1975, eq. 3.13, differentiated); C_s follows the potential through the alloy factor."""
    values = plain()
    found = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.02}, distribution="normal"))
    setup = casedepth.setup("8620", "925C", 1.0, diffusivity="arrhenius", beta="inf")
    c0, ct, cs = setup.steel.carbon, setup.threshold_carbon, setup.equilibrium_carbon
    slope = (casedepth.setup("8620", "925C", 1.01, diffusivity="arrhenius", beta="inf").equilibrium_carbon
             - casedepth.setup("8620", "925C", 0.99, diffusivity="arrhenius", beta="inf").equilibrium_carbon) / 0.02
    theta = (ct - c0) / (cs - c0)
    u = -statistics.NormalDist().inv_cdf(theta / 2.0) / math.sqrt(2.0)  # erfc⁻¹(θ)
    root = found.nominal / (2.0 * u)  # √(Dt)
    dx_dcs = 2.0 * root * (math.sqrt(math.pi) / 2.0) * math.exp(u * u) * (ct - c0) / (cs - c0) ** 2
    expected = dx_dcs * slope * 0.01  # σ of the potential: half of the ±0.02 band
    assert np.std(found.depths, ddof=1) == pytest.approx(expected, rel=0.12)


def test_latin_hypercube_agrees_with_plain_monte_carlo():
    """Percentiles of the Latin hypercube against a plain Monte Carlo of the same model on independent parts
    (uniform temperature ±10 K): within three standard errors of a percentile (normal approximation:
    SE = √(p(1 − p)/n) / φ(z_p) · σ)."""
    values = plain()
    found = capability(values, Spread(bands={"temperature": 10.0, "carbon_potential": 0.0}, samples=128))
    rng = np.random.default_rng(7)
    mc = np.array([forward({**values, "temperature": values["temperature"] + rng.uniform(-10.0, 10.0)},
                           found.soak).window_depth for _ in range(128)])
    sigma = np.std(mc, ddof=1)
    normal = statistics.NormalDist()
    for p in (5, 50, 95):
        q = p / 100.0
        se = math.sqrt(q * (1 - q) / 128) / normal.pdf(normal.inv_cdf(q)) * sigma
        assert abs(found.percentiles[f"p{p}"] - np.percentile(mc, p)) <= 3.0 * se * math.sqrt(2.0), p


def test_cp_cpk_and_share_definitions():
    depths = np.array([0.9, 1.0, 1.1, 1.0, 1.3]) * 1e-3
    found = Capability({}, 3600.0, 1e-3, depths, (0.8e-3, 1.2e-3), {}, Spread(), {}, {})
    sigma = np.std(depths, ddof=1)
    assert found.cp == pytest.approx(0.4e-3 / (6 * sigma))
    assert found.cpk == pytest.approx((1.2e-3 - depths.mean()) / (3 * sigma))
    assert found.share_in_window == pytest.approx(0.8)


def test_grade_range_moves_the_depth_and_custom_steels_are_refused():
    values = plain()
    found = capability(values, Spread(bands=NONE, composition="grade-range", samples=32))
    assert np.std(found.depths) > 0 and "composition" in found.sensitivity
    custom = plain(steel="C=0.20 Mn=0.80 Cr=0.50")
    with pytest.raises(InputError, match="composition"):
        capability(custom, Spread(composition="grade-range", samples=16))


def test_refusals():
    with pytest.raises(InputError, match="samples"):
        Spread(samples=4)
    with pytest.raises(InputError, match="distribution"):
        Spread(distribution="triangular")
    # stages of one's own with nothing held at temperature: no time at temperature to spread or centre
    ramps = casedepth.Plan("carburizing", process="stages", stages=[
        {"kind": "heat-up", "duration_h": 1.0, "temperature_c": 925.0, "carbon_potential_pct": 1.0},
        {"kind": "drop", "duration_h": 0.5, "temperature_c": 845.0, "carbon_potential_pct": 0.8}]).values()
    with pytest.raises(InputError, match="no time at temperature"):
        capability(ramps, Spread(samples=16))


def test_survey_classes():
    # AMS 2750 furnace classes: ±5, 10, 15, 20, 25, 50 °F (from memory)
    assert "class 2" in survey_class(5.0) and "class 3" in survey_class(8.0) and "class 5" in survey_class(13.0)


def test_command_line_json(tmp_path, capsys):
    path = tmp_path / "p.cdplan.json"
    casedepth.save(casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="0.8-1.2mm",
                                  shop_stages="off"), path)
    assert main(["capability", str(path), "--samples", "16", "--temperature-band", "18F",
                 "--beta-range", "1e-5-2e-5cm/s", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert set(data["case_depth_percentiles_mm"]) == {"p1", "p5", "p50", "p95", "p99"}
    assert data["spread"]["bands"]["temperature"] == pytest.approx(10.0)
    assert {"share_in_window", "cp", "cpk", "sensitivity"} <= set(data)
    assert main(["capability", str(path), "--beta-range", "2e-5"]) == 2


def test_centred_soak_puts_at_least_as_many_parts_inside_and_its_depths_hold():
    """The soak found from each part's depth² line (final² ≈ stop² + c) puts at least the plan's share inside,
    and the depths it predicts there are what a run at that soak gives (0.3 %), with the shop's stages counted."""
    values = casedepth.plan(steel="8620", temperature="925C", potential=1.0, target="0.9-1.1mm", aim="80%").values()
    found = capability(values, Spread(bands={"temperature": 12.0}, samples=24), optimize=True)
    assert found.centred.share >= found.share_in_window
    assert found.centred.soak < found.soak  # the aim sits high in the window: the centred soak is shorter
    # the line checked on the nominal part: its predicted depth at the centred soak against a run there
    line = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.0, "beta": 1.0}, samples=16),
                      optimize=True)
    exact = forward(values, line.centred.soak).window_depth
    assert line.centred.depths[0] == pytest.approx(exact, rel=3e-3)


def test_other_figures_spread_too():
    """Surface carbon (carburizing) and the compound layer (nitriding) get percentiles beside the depth; a wider
    potential band never narrows the surface carbon's spread."""
    values = plain(beta="1.5e-5cm/s")
    narrow = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.02, "beta": 1.0}, samples=32))
    wide = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.08, "beta": 1.0}, samples=32))
    width = [c.figure_percentiles("surface_carbon_pct")["p95"] - c.figure_percentiles("surface_carbon_pct")["p5"]
             for c in (narrow, wide)]
    assert width[1] > width[0] > 0.0
    assert "surface_carbon_percentiles_pct" in wide.to_dict()
    nitrided = casedepth.load(pathlib.Path(__file__).parents[1]
                              / "resources/examples/piston-rod-nitrided.cdplan.json").values()
    found = capability(nitrided, Spread(samples=16))
    layer = found.figure_percentiles("compound_layer_um")
    assert 0.0 < layer["p5"] < layer["p95"]


def test_default_bands_are_the_shops_tolerances():
    """One source of truth: the spread a load is judged with is the band the process sheet tells the floor to
    hold (the shop's tolerances), unless the command line gives another."""
    from casedepth.shop.quote import ShopDefaults

    values = plain()
    shop = ShopDefaults.from_dict(values["shop"])
    bands = Spread().resolved(values)
    assert bands["temperature"] == shop.temperature_tolerance_c
    assert bands["carbon_potential"] == shop.potential_tolerance_pct
    assert "kn" not in bands and "beta" not in bands  # a held surface has no β to spread


def test_hardness_spreads_as_the_plan_reads_it():
    """Where the plan's hardness comes from the quench (the structure relation), the parts' surface and core
    hardness get percentiles: with no spread each part reads what the plan's outcome reads (one path), and a heat
    anywhere in the grade's range (SAE J404 ranges, from memory) spreads the core far more than the nominal does,
    its hardenability changing with it (ASTM A255 factors)."""
    values = casedepth.load(pathlib.Path(__file__).parents[1] / "resources/examples/pinion-shaft.cdplan.json").values()
    outcome = casedepth.evaluate(values)
    still = capability(values, Spread(bands={"temperature": 0.0, "carbon_potential": 0.0, "beta": 1.0}, samples=16),
                       soak=outcome.soak_time)
    for name, expected in (("surface_hardness_hrc", outcome.hardened.surface_hrc),
                           ("core_hardness_hrc", outcome.hardened.core_hrc)):
        spread = still.figure_percentiles(name)
        assert spread["p1"] == pytest.approx(expected, abs=0.05) and spread["p99"] == pytest.approx(expected, abs=0.05)
    nominal = capability(values, Spread(samples=32))
    heats = capability(values, Spread(samples=32, composition="grade-range"))
    width = [c.figure_percentiles("core_hardness_hrc")["p95"] - c.figure_percentiles("core_hardness_hrc")["p5"]
             for c in (nominal, heats)]
    assert width[1] > 3 * width[0]
    text = heats.text(DisplayUnits())
    assert "core hardness" in text and "±3 HRC" in text
    assert heats.to_dict()["hardness_uncertainty_hrc"] == 3.0


def test_the_profile_band_crosses_the_threshold_at_the_depths_percentiles():
    """For profiles that fall monotonically with depth, a part's carbon at a depth is under the threshold exactly
    when its case is shallower, so the pointwise 5th (95th) percentile of the carbon crosses the threshold at the
    5th (95th) percentile of the depths: the band and the histogram tell one story."""
    from casedepth.numerics.solver import threshold_depth

    values = plain(beta="1.5e-5cm/s")
    found = capability(values, Spread(samples=128))
    depth, low, high = found.profile_band
    threshold = casedepth.evaluate(values).setup.threshold_carbon
    pct = found.percentiles
    assert threshold_depth(depth, low, threshold) == pytest.approx(pct["p5"], rel=0.01)
    assert threshold_depth(depth, high, threshold) == pytest.approx(pct["p95"], rel=0.01)
    assert np.all(low <= high)


def test_a_section_spread_spreads_the_core_and_is_none_unless_set():
    """Part-to-part section (the plan's Load spread setting, none by default): a 32 mm shaft ±2 mm cools its core at
    a different rate from part to part (Carslaw & Jaeger 1959 series through the section), so the core hardness
    spreads; with no section spread every part reads the plan's core. A band over a quarter of the size is
    refused, naming the setting."""
    values = casedepth.load(pathlib.Path(__file__).parents[1] / "resources/examples/pinion-shaft.cdplan.json").values()
    still = {"temperature": 0.0, "carbon_potential": 0.0, "beta": 1.0}
    assert "size" not in Spread().resolved(values)
    fixed = capability(values, Spread(bands=still, samples=16)).figure_percentiles("core_hardness_hrc")
    assert fixed["p1"] == pytest.approx(fixed["p99"], abs=1e-9)
    varied = capability({**values, "spread_section": 2e-3}, Spread(bands=still, samples=16))
    core = varied.figure_percentiles("core_hardness_hrc")
    assert core["p99"] - core["p1"] > 0.5
    assert "section ±2.00 mm" in varied.text(DisplayUnits())
    with pytest.raises(InputError) as refused:
        casedepth.evaluate({**values, "spread_section": 9e-3})
    assert refused.value.field == "spread_section"


def test_the_models_own_uncertainty_stands_beside_the_spread():
    """A nitrided depth is sure to ±25 % until calibrated (the zone model says so on every depth it gives): the
    load's spread is printed with it, in text and JSON; the carburizing depth states none."""
    nitrided = casedepth.load(pathlib.Path(__file__).parents[1]
                              / "resources/examples/piston-rod-nitrided.cdplan.json").values()
    found = capability(nitrided, Spread(samples=16))
    assert "±25 %" in found.model_uncertainty and "the model's own" in found.text(DisplayUnits())
    assert found.to_dict()["model_uncertainty"] == found.model_uncertainty
    assert capability(plain(), Spread(samples=16)).model_uncertainty is None
