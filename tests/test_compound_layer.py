"""Compound-layer growth (Somers & Mittemeijer 1995 layer-growth model) and the Fe–N surface contents.

The quasi-steady model is checked against the exact moving-boundary (Neumann) solutions of the
same problem (Crank 1975, The Mathematics of Diffusion, 2nd ed., ch. 13 "Moving boundaries"): they
differ only by the linear-profile approximation, which is of order Δc/(c_γ′ − c_α) ≈ 4 %, so the
parabolic constants agree to about 1 %. Layer thicknesses on steels are compared with common
practice, with wide bands, because the nitride diffusivities are an order of magnitude from memory.
"""

import math

import pytest
from scipy.optimize import brentq

from casedepth.nitriding import layer as CL
from casedepth.models import iron_nitrogen as fen
from casedepth import nitriding as N
from casedepth.models.steels import Steel, find

K = 273.15
T = 843.0  # K, 570 °C: the temperature of Somers & Mittemeijer (1995)


def gamma_prime_kn(T):
    a, e = fen.Lehrer_boundaries(T)
    return math.sqrt(a * e)  # the middle of the γ′ field on a log scale


def test_surface_nitrogen_spans_each_phase():
    """Fe–N diagram (Wriedt, Gokcen & Nafziger 1987; from memory): γ′ holds 5.7–5.9 wt % N, ε from 7.4 wt %
    upwards; the surface content rises with K_N and is continuous inside each field."""
    a, e = fen.Lehrer_boundaries(T)
    assert fen.surface_nitrogen(T, a) == pytest.approx(fen.GAMMA_PRIME_WITH_ALPHA)
    assert fen.surface_nitrogen(T, e * (1 - 1e-12)) == pytest.approx(fen.GAMMA_PRIME_WITH_EPSILON)
    assert fen.surface_nitrogen(T, e) == pytest.approx(fen.EPSILON_WITH_GAMMA_PRIME)
    assert fen.surface_nitrogen(T, 0.5 * a) == pytest.approx(0.5 * fen.nitrogen_saturation_ferrite(T))
    values = [fen.surface_nitrogen(T, k) for k in (0.05, 0.1, 0.3, 0.5, 1.0, 3.0, 10.0, 30.0)]
    assert values == sorted(values) and values[-1] <= fen.EPSILON_MAX


def test_gamma_prime_layer_matches_the_neumann_solution_without_loss():
    """A γ′ layer fed at c_s and losing nothing to the substrate: exact s = 2λ√(Dt) with
    Δc e^{−λ²} / (√π erf λ) = (c^{γ′/α} − c^{α/γ′}) λ (Crank 1975, ch. 13). Agreement 1 %."""
    kn = gamma_prime_kn(T)
    _, k = CL.parabolic_constants(T, kn, 0.0)
    D = CL.nitrogen_diffusivity_gamma_prime(T)
    drive = fen.surface_nitrogen(T, kn) - fen.GAMMA_PRIME_WITH_ALPHA
    jump = fen.GAMMA_PRIME_WITH_ALPHA - fen.nitrogen_saturation_ferrite(T)
    lam = brentq(lambda x: drive * math.exp(-x * x) / (math.sqrt(math.pi) * math.erf(x)) - jump * x, 1e-6, 2.0)
    assert k == pytest.approx(2 * lam * math.sqrt(D), rel=0.01)


def test_layer_on_pure_iron_matches_the_two_phase_neumann_solution():
    """γ′ layer on pure iron, nitrogen also diffusing on into the ferrite: exact two-phase Neumann solution
    (Crank 1975, ch. 13) with erf in the layer and erfc in the ferrite. Agreement 1 %."""
    iron = N.NitridingSetup(Steel("pure iron", {}), T, gamma_prime_kn(T), core_hardness=100, surface_hardness=200)
    assert iron.front_factor is None
    _, k = CL.parabolic_constants(T, iron.nitriding_potential, iron.uptake)
    Dg, Da = CL.nitrogen_diffusivity_gamma_prime(T), iron.diffusivity
    c_s, c_1, c_a = fen.surface_nitrogen(T, iron.nitriding_potential), fen.GAMMA_PRIME_WITH_ALPHA, iron.substrate_nitrogen

    def balance(lam):
        mu = lam * math.sqrt(Dg / Da)
        into_layer = math.sqrt(Dg) * (c_s - c_1) * math.exp(-lam * lam) / (math.sqrt(math.pi) * math.erf(lam))
        into_ferrite = math.sqrt(Da) * c_a * math.exp(-mu * mu) / (math.sqrt(math.pi) * math.erfc(mu))
        return into_layer - into_ferrite - (c_1 - c_a) * lam * math.sqrt(Dg)

    lam = brentq(balance, 1e-6, 2.0)
    assert k == pytest.approx(2 * lam * math.sqrt(Dg), rel=0.01)
    # the loss to the ferrite matters: without it the layer would grow about twice as fast
    assert CL.parabolic_constants(T, iron.nitriding_potential, 0.0)[1] > 1.5 * k


@pytest.mark.parametrize("kn", [0.5, 3.0])
def test_time_integration_stays_on_the_parabolic_solution(kn):
    """At constant conditions the interfaces move as √t (Somers & Mittemeijer 1995); integrating the interface
    mass balances in time from the parabolic state at 4 h must reproduce it at 12 h (1e-5): this checks the
    algebraic solution against the rate equations it comes from."""
    s = N.NitridingSetup(find("4140"), T, kn)
    staged = CL.grow_compound_layer(T, [(4 * 3600.0, kn), (8 * 3600.0, kn)], s.uptake)
    direct = CL.compound_layer(T, kn, 12 * 3600.0, s.uptake)
    assert staged.thickness == pytest.approx(direct.thickness, rel=1e-5)
    assert staged.epsilon == pytest.approx(direct.epsilon, rel=1e-5, abs=1e-12)
    assert (direct.epsilon > 0) == (fen.surface_phase(T, kn) == "epsilon")


def test_no_layer_below_the_alpha_gamma_boundary_and_none_jumps_at_gamma_epsilon():
    """Lehrer diagram: no compound layer below α/γ′; the model's layer is continuous where ε appears."""
    s = N.NitridingSetup(find("4140"), T, 3.0)
    a, e = fen.Lehrer_boundaries(T)
    assert CL.compound_layer(T, 0.99 * a, 3600.0 * 20, s.uptake).thickness == 0.0
    below = CL.compound_layer(T, e * (1 - 1e-9), 3600.0 * 20, s.uptake).thickness
    above = CL.compound_layer(T, e * (1 + 1e-9), 3600.0 * 20, s.uptake).thickness
    assert above == pytest.approx(below, rel=1e-6)


def test_nitride_formers_thin_the_compound_layer():
    """Common practice: under the same gas, alloyed nitriding steels carry thinner compound layers than plain
    carbon steel, because their diffusion zone draws more nitrogen from under the layer (the model's A/√t)."""
    plain = Steel("plain carbon", {"C": 0.45, "Mn": 0.7})
    layers = [N.nitride(N.NitridingSetup(steel, 793.15, 3.0, core_hardness=250, surface_hardness=600),
                        20 * 3600.0).compound_layer
              for steel in (plain, find("4140"), find("41CrAlMo7-10"), find("H13"))]
    assert layers == sorted(layers, reverse=True)


def test_layer_thickness_is_in_the_range_of_common_practice():
    """Common practice (no single source): gas nitriding of 4140 at 520 °C, K_N about 3, for 20 h leaves an ε+γ′
    layer of about 5–20 µm; 4 h at 570 °C, K_N 3, about 5–20 µm; in the γ′ field (K_N about 1 at 520 °C) a
    thinner, γ′-only layer of a few µm."""
    eps = N.nitride(N.NitridingSetup(find("4140"), 793.15, 3.0), 20 * 3600.0).layer
    hot = N.nitride(N.NitridingSetup(find("4140"), 843.15, 3.0), 4 * 3600.0).layer
    gam = N.nitride(N.NitridingSetup(find("4140"), 793.15, 1.0), 20 * 3600.0).layer
    assert 5e-6 <= eps.thickness <= 20e-6 and eps.epsilon > 0 and eps.gamma_prime > 0
    assert 5e-6 <= hot.thickness <= 20e-6
    assert gam.epsilon == 0 and 1e-6 <= gam.thickness < eps.thickness


def test_two_stage_schedule_turns_epsilon_into_a_thinner_gamma_prime_layer():
    """A second stage just above the α/γ′ boundary starves the layer while the diffusion zone keeps drawing on it
    (Somers & Mittemeijer 1995 model): the ε made in the first stage is used up and the layer thins into its
    window; the nitrided depth, set by the saturated ferrite beneath, is that of one stage."""
    s = N.NitridingSetup(find("4140"), 793.15, 8.0)
    total = N.nitriding_time(s, 0.4e-3).time
    one = N.nitride(s, total)
    two = N.two_stage_schedule(s, total, (2e-6, 5e-6))
    assert one.layer.epsilon > 5e-6
    assert two.layer.epsilon == 0.0 and 2e-6 <= two.compound_layer <= 5e-6
    staged = N.nitride(s, total, layer=two.layer)
    assert staged.nitrided_depth - staged.compound_layer == pytest.approx(one.nitrided_depth - one.compound_layer,
                                                                           rel=1e-12)


def test_staged_layer_refuses_a_stage_below_alpha_gamma():
    from casedepth.errors import InputError

    a, _ = fen.Lehrer_boundaries(T)
    with pytest.raises(InputError):
        CL.grow_compound_layer(T, [(3600.0, 3.0), (3600.0, 0.5 * a)], 1e-7)
