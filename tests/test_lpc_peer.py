"""The low-pressure carburizing peer (``tests/lpc_peer.py``) against published analytic solutions.

The peer is the independent reference that the project's own pulse solver is checked against, so it is
itself checked here, at constant diffusivity, against closed forms:

* J. Crank, *The Mathematics of Diffusion*, 2nd ed., Oxford: Clarendon Press, 1975.
* H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford: Clarendon Press, 1959.
* L. Boltzmann, Annalen der Physik 53 (1894) 959 (the similarity variable x/√t for a concentration-dependent D).

Equation and section numbers are quoted from memory; each formula is also stated in full beside its check.
Units: carbon in wt %, depth in m, time in s, D in m²/s, influx in wt % · m/s.
"""

import math

import numpy as np
import pytest
from scipy.special import erfc, erfcinv

import lpc_peer

D_CONST = 1.2e-11  # m²/s, about carbon in austenite near 925 °C
C0, LIMIT = 0.20, 1.10  # wt %
T = 1198.15  # K; ignored by the constant D


def constant(c, T):
    """A carbon- and temperature-independent diffusivity [m²/s]."""
    return np.full(np.shape(c), D_CONST)


def flux_for_saturation(t_sat, D=D_CONST):
    """Influx [wt % · m/s] that brings the surface from C0 to LIMIT at t_sat [s] (inverse of the
    constant-flux surface formula below)."""
    return (LIMIT - C0) / 2.0 * math.sqrt(math.pi * D / t_sat)


def flux_profile(x, t, F, D=D_CONST):
    """Constant influx F into a semi-infinite medium at C0 (Carslaw & Jaeger 1959, §2.9, eq. (7);
    Crank 1975, §3.3)::

        C(x, t) = C0 + (2F/D) [ sqrt(D t / π) exp(−x² / 4Dt) − (x/2) erfc(x / 2 sqrt(Dt)) ]

    so that the surface carbon is C(0, t) = C0 + 2F sqrt(t / (π D)).
    """
    s = math.sqrt(D * t)
    return C0 + 2.0 * F / D * (s / math.sqrt(math.pi) * np.exp(-x**2 / (4 * s * s)) - x / 2.0 * erfc(x / (2 * s)))


@pytest.fixture(scope="module")
def held():
    """One 3 h boost with the surface held at LIMIT (influx = inf) at constant D."""
    return lpc_peer.run_pulses(constant, T, C0, LIMIT, math.inf, [(3 * 3600.0, 0.0)])


def test_held_surface_is_the_erfc_solution(held):
    """Crank 1975, eq. (3.13), §3.3.1: surface held at Cs from t = 0,
    C(x, t) = C0 + (Cs − C0) erfc(x / (2 sqrt(Dt))); depths of three thresholds within 0.5 % (measured about
    1e-5), the whole profile within 0.1 % of Cs − C0 (measured about 5e-6)."""
    t = 3 * 3600.0
    for threshold in (0.35, 0.65, 0.95):
        exact = 2.0 * math.sqrt(D_CONST * t) * erfcinv((threshold - C0) / (LIMIT - C0))
        assert held.depth_at(threshold) == pytest.approx(exact, rel=5e-3)
        assert held.depth_at(threshold) == pytest.approx(exact, rel=2e-4)  # what the peer actually does
    exact_profile = C0 + (LIMIT - C0) * erfc(held.depth / (2.0 * math.sqrt(D_CONST * t)))
    assert np.max(np.abs(held.carbon - exact_profile)) < 1e-3 * (LIMIT - C0)
    assert held.surface_carbon == pytest.approx(LIMIT, abs=1e-12)
    assert held.saturation_times == (0.0,)


def test_held_surface_uptake(held):
    """Crank 1975, eq. (3.15), §3.3.1: carbon taken up through a held surface,
    M_t = 2 (Cs − C0) sqrt(D t / π) [wt % · m]; within 0.2 % (measured about 1e-5). The peer's own tally of what
    crossed the surface equals the integral of the profile (conservation)."""
    t = 3 * 3600.0
    exact = 2.0 * (LIMIT - C0) * math.sqrt(D_CONST * t / math.pi)
    assert held.carbon_added == pytest.approx(exact, rel=2e-3)
    assert held.carbon_entered == pytest.approx(held.carbon_added, rel=1e-9)


def test_constant_flux_surface_and_saturation_time():
    """Carslaw & Jaeger 1959, §2.9 (Crank 1975, §3.3): constant influx F [wt % · m/s] into a semi-infinite
    medium raises the surface as C(0, t) = C0 + 2F sqrt(t / (π D)), so it reaches the limit at
    t_sat = π D ((limit − C0) / (2F))². Surface history before saturation within 0.5 % of C(0, t) − C0 (from
    t_sat / 20 on; measured about 6e-5 at the earliest time, 1e-5 near saturation), t_sat within 0.5 %
    (measured about 2e-5); after it the surface stays at the limit."""
    t_sat = 1000.0
    F = flux_for_saturation(t_sat)
    assert math.pi * D_CONST * ((LIMIT - C0) / (2 * F)) ** 2 == pytest.approx(t_sat)
    result = lpc_peer.run_pulses(constant, T, C0, LIMIT, F, [(3000.0, 0.0)])
    (measured,) = result.saturation_times
    assert measured == pytest.approx(t_sat, rel=5e-3)
    assert measured == pytest.approx(t_sat, rel=2e-4)
    times, surface = result.surface_history
    rising = (times >= t_sat / 20) & (times < measured)
    assert rising.sum() > 10
    exact = C0 + 2.0 * F * np.sqrt(times[rising] / (math.pi * D_CONST))
    assert np.max(np.abs(surface[rising] - exact) / (exact - C0)) < 5e-3
    assert np.all(surface[times >= measured] == pytest.approx(LIMIT, abs=1e-9))
    assert np.all(np.diff(times) >= 0) and times[-1] == pytest.approx(3000.0)


def test_constant_flux_profile_and_mass_balance():
    """Flux only (the limit never reached): the whole profile is Carslaw & Jaeger 1959, §2.9, eq. (7) (see
    :func:`flux_profile`) within 0.1 % of its surface rise, and the carbon added is F·t within 0.2 % (measured
    about 1e-15: the finite volumes conserve carbon exactly)."""
    t = 2 * 3600.0
    F = 1e-7  # the surface rises by about 2.8 wt %, short of the limit of 5 wt %
    result = lpc_peer.run_pulses(constant, T, C0, 5.0, F, [(t, 0.0)])
    assert math.isnan(result.saturation_times[0])
    exact = flux_profile(result.depth, t, F)
    assert np.max(np.abs(result.carbon - exact)) < 1e-3 * (exact[0] - C0)
    assert result.carbon_added == pytest.approx(F * t, rel=2e-3)
    assert result.carbon_entered == pytest.approx(F * t, rel=1e-9)


def test_flux_pulse_diffuse_and_tail_by_superposition():
    """Influx F for t1, then zero flux (a diffuse, then a tail at another temperature): by superposition of a
    flux +F from 0 and −F from t1 (Carslaw & Jaeger 1959, §2.9 with Duhamel's theorem, §1.14), the surface is
    C(0, t) = C0 + 2F/sqrt(π D) · (sqrt(t) − sqrt(t − t1)) for t > t1. A tail at a temperature where D is k
    times larger counts as k times as long at the first D. Within 0.5 % of C(0, t) − C0 (measured about
    2e-5); carbon added F·t1 within 0.2 % (measured about 1e-15)."""
    k = 2.5

    def two_temperatures(c, T_K):
        return np.full(np.shape(c), D_CONST * (k if T_K > 1250.0 else 1.0))

    F, t1, diffuse, tail = 1.5e-7, 1200.0, 1800.0, 600.0
    result = lpc_peer.run_pulses(two_temperatures, T, C0, 5.0, F, [(t1, diffuse)], tail=[(tail, 1273.15)])
    times, surface = result.surface_history
    assert times[-1] == pytest.approx(t1 + diffuse + tail)

    def exact(t):  # t in equivalent time at D_CONST
        return C0 + 2.0 * F / math.sqrt(math.pi * D_CONST) * (np.sqrt(t) - np.sqrt(np.clip(t - t1, 0.0, None)))

    diffusing = (times > t1 + 60.0) & (times <= t1 + diffuse)
    assert np.max(np.abs(surface[diffusing] - exact(times[diffusing])) / (exact(times[diffusing]) - C0)) < 5e-3
    end = exact(t1 + diffuse + k * tail)
    assert (result.surface_carbon - C0) == pytest.approx(end - C0, rel=5e-3)
    assert result.carbon_added == pytest.approx(F * t1, rel=2e-3)


def test_boltzmann_similarity_with_carbon_dependent_diffusivity():
    """Boltzmann 1894 (Crank 1975, §7.2): with the surface held and D = D(C) the profile is a function of
    x / sqrt(t) alone, so a threshold's depth doubles when the time is four times as long, and the uptake
    doubles; within 0.5 % (measured about 1e-5), with the concentration-dependent Tibbetts (1980) diffusivity.
    The long run uses twice as many cells, so that its grid is not the short one's scaled by √t (on a scaled
    grid the discrete solution is itself exactly self-similar and the check would prove nothing)."""

    def tibbetts(c, T_K):  # Tibbetts, J. Appl. Phys. 51 (1980) 4813; m²/s
        return 0.47e-4 * np.exp(-1.6 * c) * np.exp(-(37000.0 - 6600.0 * c) / (1.987 * T_K))

    short = lpc_peer.run_pulses(tibbetts, 1223.15, C0, LIMIT, math.inf, [(900.0, 0.0)])
    long = lpc_peer.run_pulses(tibbetts, 1223.15, C0, LIMIT, math.inf, [(3600.0, 0.0)], cells=800)
    for threshold in (0.35, 0.6, 0.9):
        assert long.depth_at(threshold) == pytest.approx(2.0 * short.depth_at(threshold), rel=5e-3)
    assert long.carbon_added == pytest.approx(2.0 * short.carbon_added, rel=2e-3)


def test_pulse_table_conserves_carbon_and_keeps_the_limit():
    """A vacuum-carburizing pulse table with finite influx and a carbon-dependent D: the surface never
    exceeds the limit, every boost saturates after the first instant, each diffuse lowers the surface, and
    the tally of carbon through the surface equals the integral of the profile. The diffusivity is the
    project's own model object (Tibbetts 1980), called as ``D(carbon, T)``."""
    from casedepth.models.diffusivity import Diffusivity

    diffusivity = Diffusivity("tibbetts")
    pulses = [(60.0, 120.0), (45.0, 240.0), (30.0, 400.0), (30.0, 600.0)]
    result = lpc_peer.run_pulses(diffusivity, 1223.15, C0, 1.2, 4e-6, pulses, tail=[(900.0, 1123.15)])
    times, surface = result.surface_history
    assert surface.max() <= 1.2 + 1e-9
    assert all(0.0 < s < b for s, (b, _) in zip(result.saturation_times, pulses))
    assert result.carbon_entered == pytest.approx(result.carbon_added, rel=1e-9)
    start = 0.0
    for boost, diffuse in pulses:
        in_diffuse = (times > start + boost) & (times <= start + boost + diffuse)
        assert np.all(np.diff(surface[in_diffuse]) <= 1e-12)
        start += boost + diffuse
    assert np.all(np.diff(result.carbon) <= 1e-12)  # the profile falls monotonically into the core


def test_depth_at_edges(held):
    """depth_at: 0 when the surface is at or below the threshold, an error when the profile never falls to it."""
    assert held.depth_at(LIMIT) == 0.0
    assert held.depth_at(2.0) == 0.0
    with pytest.raises(ValueError):
        held.depth_at(C0 - 0.01)


def test_inputs_are_checked():
    with pytest.raises(ValueError):
        lpc_peer.run_pulses(constant, T, 1.2, 1.1, math.inf, [(60.0, 60.0)])
    with pytest.raises(ValueError):
        lpc_peer.run_pulses(constant, T, C0, LIMIT, 0.0, [(60.0, 60.0)])
    with pytest.raises(ValueError):
        lpc_peer.run_pulses(constant, T, C0, LIMIT, math.inf, [(-1.0, 60.0)])
