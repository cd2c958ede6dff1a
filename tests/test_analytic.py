"""Validation of the analytic reference solutions in ``analytic.py``.

The references themselves must be right before they can judge the solver, so each is
checked against published tables, published closed forms for uptake, limiting cases, and
the diffusion equation with its boundary condition. Sources are given beside each check;
values recalled without the source at hand are marked "from memory".
"""

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import special

try:
    from . import analytic
except ImportError:
    # tests/ is not a package; under --import-mode=importlib it is not on sys.path either.
    sys.path.insert(0, str(Path(__file__).resolve().parent))
    import analytic


def _ierfc(z):
    # ierfc(z) = exp(-z^2)/sqrt(pi) - z erfc(z): A&S (1964) eq. 7.2.3 (from memory).
    return np.exp(-z * z) / math.sqrt(math.pi) - z * special.erfc(z)


def _integrate(f, a, b, panels=64, order=20):
    """Composite Gauss-Legendre quadrature; panels narrower than the boundary layer."""
    nodes, weights = np.polynomial.legendre.leggauss(order)
    edges = np.linspace(a, b, panels + 1)
    mid, half = 0.5 * (edges[:-1] + edges[1:]), 0.5 * np.diff(edges)
    x = (mid[:, None] + half[:, None] * nodes).ravel()
    w = (half[:, None] * weights).ravel()
    return float(np.sum(w * f(x)))


def _d1(f, x, h):
    return (-f(x + 2 * h) + 8 * f(x + h) - 8 * f(x - h) + f(x - 2 * h)) / (12 * h)


def _d2(f, x, h):
    return (-f(x + 2 * h) + 16 * f(x + h) - 30 * f(x) + 16 * f(x - h) - f(x - 2 * h)) / (12 * h * h)


def _d1_forward(f, h):
    # Fourth-order one-sided first derivative at 0, for boundary conditions.
    return (-25 * f(0.0) + 48 * f(h) - 36 * f(2 * h) + 16 * f(3 * h) - 3 * f(4 * h)) / (12 * h)


# Carburizing-like numbers: D of carbon in austenite near 925 C, a 4 h cycle, a 20 mm bar.
D_C = 2.5e-11  # m^2/s
T_4H = 4 * 3600.0  # s
RADIUS = 10e-3  # m
BETA = 1.0e-7  # m/s


# --------------------------------------------------------------------- published tables


@pytest.mark.parametrize("u, erf_u", [
    (0.1, 0.1124629160),  # A&S (1964) Table 7.1
    (0.5, 0.5204998778),  # A&S (1964) Table 7.1
    (1.0, 0.8427007929),  # A&S (1964) Table 7.1
    (1.5, 0.9661051465),  # A&S (1964) Table 7.1
    (2.0, 0.9953222650),  # A&S (1964) Table 7.1
])
def test_erfc_plane_matches_abramowitz_stegun_erf_table(u, erf_u):
    # With D t = 1/4 the similarity variable x / (2 sqrt(D t)) equals x.
    assert abs((1.0 - analytic.erfc_plane(u, 0.25, 1.0)) - erf_u) < 1e-9
    assert abs((1.0 - analytic.erfc_plane(u * 2e-3, 1e5, 1e-11)) - erf_u) < 1e-9  # 2 sqrt(D t) = 2 mm


def test_j0_zeros_match_abramowitz_stegun_table():
    # A&S (1964) Table 9.5: j_{0,1}, j_{0,2}, j_{0,3}.
    published = [2.404825558, 5.520078110, 8.653727913]
    assert np.allclose(analytic._j0_zeros(3), published, rtol=0, atol=1e-8)
    # The mass-transfer roots tend to the J0 zeros as L -> infinity (Dirichlet limit).
    assert np.allclose(analytic.cylinder_evaporation_roots(1e12, 3), published, rtol=0, atol=1e-8)


@pytest.mark.parametrize("L, roots", [
    (0.1, [0.4417, 3.8577, 7.0298, 10.1833]),  # Crank (1975) Table 5.2 (from memory)
    (1.0, [1.2558, 4.0795, 7.1558, 10.2710]),  # Crank (1975) Table 5.2 (from memory)
    (10.0, [2.1795, 5.0332, 7.9569, 10.9363]),  # Crank (1975) Table 5.2 (from memory)
])
def test_cylinder_mass_transfer_roots_match_table(L, roots):
    assert np.allclose(analytic.cylinder_evaporation_roots(L, 4), roots, rtol=0, atol=6e-5)


def test_cylinder_mass_transfer_roots_solve_their_equation():
    for L in (1e-6, 0.3, 3.0, 300.0, 1e9):
        b = analytic.cylinder_evaporation_roots(L, 300)
        # Newton step |f / f'| bounds the root error; f'(b) = b J0(b) + L J1(b).
        f = b * special.j1(b) - L * special.j0(b)
        slope = b * special.j0(b) + L * special.j1(b)
        assert np.max(np.abs(f / slope) / b) < 1e-13
        assert np.all(np.diff(b) > 0)
        # Interlacing with the zeros of J1 and J0 (Crank 1975, ch. 5; from memory).
        assert np.all(b <= special.jn_zeros(0, 300) + 1e-12)
        assert np.all(b[1:] >= special.jn_zeros(1, 299) - 1e-12)
    # Small L: b_1^2 = 2L - L^2/2 + O(L^3), from the power series of J0 and J1.
    L = 1e-6
    assert analytic.cylinder_evaporation_roots(L, 1)[0] ** 2 == pytest.approx(2 * L - L * L / 2, rel=1e-10)


# ------------------------------------------------------------------ semi-infinite plane


def test_evaporation_plane_tends_to_erfc_plane_as_beta_grows():
    x = np.linspace(0.0, 8.0, 81) * math.sqrt(D_C * T_4H)
    exact = analytic.erfc_plane(x, T_4H, D_C)
    assert np.array_equal(analytic.evaporation_plane(x, T_4H, D_C, math.inf), exact)
    previous = np.inf
    for beta in (1e-6, 1e-4, 1e-2, 1.0, 10.0):
        k = beta * math.sqrt(T_4H / D_C)  # h sqrt(D t)
        gap = np.max(np.abs(analytic.evaporation_plane(x, T_4H, D_C, beta) - exact))
        # The correction term exp(-u^2) erfcx(u + k) is below 1 / (sqrt(pi) k).
        assert gap <= 1.0 / (math.sqrt(math.pi) * k)
        assert gap < previous
        previous = gap
    assert previous < 1e-8


def test_evaporation_plane_has_no_overflow():
    # h x + h^2 D t here is ~1e10: the textbook product form overflows to inf * 0.
    x = np.linspace(0.0, 20.0, 41) * math.sqrt(D_C * T_4H)
    F = analytic.evaporation_plane(x, T_4H, D_C, 10.0)
    assert np.all(np.isfinite(F)) and np.all((F >= 0.0) & (F <= 1.0))
    assert analytic.evaporation_plane(0.0, T_4H, D_C, 0.0) == 0.0


def test_evaporation_plane_matches_textbook_form_where_that_is_safe():
    x = np.linspace(0.0, 4.0, 17) * math.sqrt(D_C * T_4H)
    h = BETA / D_C
    u = x / (2 * math.sqrt(D_C * T_4H))
    textbook = special.erfc(u) - np.exp(h * x + h * h * D_C * T_4H) * special.erfc(u + h * math.sqrt(D_C * T_4H))
    assert np.allclose(analytic.evaporation_plane(x, T_4H, D_C, BETA), textbook, rtol=0, atol=1e-13)


def test_evaporation_plane_boundary_condition():
    # -D dF/dx = beta (1 - F) at x = 0: the stated mass-transfer condition.
    for t in (60.0, T_4H, 1e6):
        step = 1e-3 * math.sqrt(D_C * t)
        slope = _d1_forward(lambda x: analytic.evaporation_plane(x, t, D_C, BETA), step)
        F0 = analytic.evaporation_plane(0.0, t, D_C, BETA)
        assert -D_C * slope == pytest.approx(BETA * (1.0 - F0), rel=1e-8)


@pytest.mark.parametrize("beta", [1e-8, BETA, 1e-5, math.inf])
def test_evaporation_plane_mass_balance(beta):
    # Integral of F over depth against Crank (1975) ch. 3 uptake
    # M_t = (Cs - C0)/h [exp(h^2 D t) erfc(h sqrt(D t)) - 1 + 2 h sqrt(D t / pi)].
    for t in (600.0, T_4H, 1e6):
        depth = 40.0 * math.sqrt(D_C * t)
        integral = _integrate(lambda x: analytic.evaporation_plane(x, t, D_C, beta), 0.0, depth)
        if math.isinf(beta):
            published = 2.0 * math.sqrt(D_C * t / math.pi)  # Crank (1975) eq. (2.48) (from memory)
        else:
            h, k = beta / D_C, beta * math.sqrt(t / D_C)
            # exp(k^2) erfc(k) is written erfcx(k) only because exp(k^2) overflows for k > 26.
            published = (special.erfcx(k) - 1.0 + 2.0 * k / math.sqrt(math.pi)) / h
        assert integral == pytest.approx(published, rel=1e-9)
        assert analytic.evaporation_plane_uptake(t, D_C, beta) == pytest.approx(published, rel=1e-9)


def test_evaporation_plane_uptake_rate_equals_surface_flux():
    # dM/dt = beta (Cs - C(0, t)): the carbon that crosses the surface stays in the body.
    for t in (30.0, T_4H, 1e6):
        rate = _d1(lambda s: analytic.evaporation_plane_uptake(s, D_C, BETA), t, 1e-3 * t)
        assert rate == pytest.approx(BETA * (1.0 - analytic.evaporation_plane(0.0, t, D_C, BETA)), rel=1e-8)


def test_evaporation_plane_uptake_small_argument_series_is_continuous():
    # The Taylor branch (h sqrt(D t) < 0.5) must join the erfcx branch smoothly.
    k = np.array([0.5 - 1e-12, 0.5 + 1e-12])
    t = (k / BETA) ** 2 * D_C
    values = analytic.evaporation_plane_uptake(t, D_C, BETA)
    assert values[0] == pytest.approx(values[1], rel=1e-10)


def test_evaporation_plane_surface_approaches_saturation():
    # F(0, t) = 1 - erfcx(h sqrt(D t)) -> 1 - 1/(sqrt(pi) h sqrt(D t)) as t grows.
    for t in (1e4, 1e6, 1e8):
        k = BETA * math.sqrt(t / D_C)
        F0 = analytic.evaporation_plane(0.0, t, D_C, BETA)
        assert 1.0 - F0 == pytest.approx(special.erfcx(k), rel=1e-12)
    # Asymptotic erfcx(k) ~ 1/(sqrt(pi) k) (1 - 1/(2 k^2)), A&S (1964) eq. 7.1.23 (from memory).
    k = BETA * math.sqrt(1e8 / D_C)
    assert 1.0 - analytic.evaporation_plane(0.0, 1e8, D_C, BETA) == pytest.approx(
        (1 - 0.5 / k**2) / (math.sqrt(math.pi) * k), rel=1e-8)


# ------------------------------------------------------------------------- plane sheet


@pytest.mark.parametrize("tau", [1e-6, 1e-4, 1e-2, 0.3, 1.0, 3.0])
def test_slab_fourier_and_image_series_agree(tau):
    # Crank (1975) eqs. (4.17) and (4.15) (from memory) are two forms of one solution.
    xi = np.linspace(0.0, 1.0, 201)
    assert np.max(np.abs(analytic._slab_fourier(xi, tau) - analytic._slab_images(xi, tau))) < 1e-13


def test_slab_with_large_half_thickness_equals_erfc_plane():
    x = np.linspace(0.0, 10.0, 101) * math.sqrt(D_C * T_4H)
    slab = analytic.slab_dirichlet(x, T_4H, D_C, 0.5)
    assert np.max(np.abs(slab - analytic.erfc_plane(x, T_4H, D_C))) < 1e-10


def test_slab_is_symmetric_about_its_mid_plane():
    l = 5e-3
    x = np.linspace(0.0, l, 51)
    for t in (T_4H, 1e6):
        assert np.allclose(analytic.slab_dirichlet(x, t, D_C, l),
                           analytic.slab_dirichlet(2 * l - x, t, D_C, l), rtol=0, atol=1e-15)


def test_slab_truncation_is_converged_at_small_tau():
    xi = np.linspace(0.0, 1.0, 401)
    for tau in (1e-4, 1e-3):
        base = analytic._slab_fourier(xi, tau)
        assert np.max(np.abs(base - analytic._slab_fourier(xi, tau, n_terms=4000))) < 1e-13


@pytest.mark.parametrize("tau", [1e-3, 0.01, 0.1, 0.5, 2.0])
def test_slab_mass_balance(tau):
    # (1/l) * integral of F over the half-sheet = Crank (1975) eq. (4.18).
    l = 4e-3
    t = tau * l * l / D_C
    integral = _integrate(lambda x: analytic.slab_dirichlet(x, t, D_C, l), 0.0, l) / l
    k = 2 * np.arange(200) + 1
    published = 1.0 - np.sum(8.0 / (k * np.pi) ** 2 * np.exp(-(k * np.pi) ** 2 * tau / 4))
    assert integral == pytest.approx(published, rel=1e-9)
    assert analytic.slab_uptake(t, D_C, l) == pytest.approx(published, rel=1e-12)


@pytest.mark.parametrize("tau", [1e-4, 0.01, 0.3, 1.0])
def test_slab_uptake_matches_small_time_form(tau):
    # M_t/M_inf = 2 sqrt(tau) [pi^-1/2 + 2 sum_{n>=1} (-1)^n ierfc(n / sqrt(tau))],
    # Crank (1975) eq. (4.16) (from memory).
    n = np.arange(1, 30)
    small_time = 2 * math.sqrt(tau) * (1 / math.sqrt(math.pi) + 2 * np.sum((-1.0) ** n * _ierfc(n / math.sqrt(tau))))
    assert analytic.slab_uptake(tau, 1.0, 1.0) == pytest.approx(small_time, rel=1e-12)


# ---------------------------------------------------------------------------- cylinder


def test_cylinder_truncation_is_converged_at_small_tau():
    rho = np.linspace(0.0, 1.0, 301)
    for tau in (1e-4, 1e-5):
        base = analytic._cylinder_series(rho, tau)
        n_default = analytic._eigen_terms(tau, special.jn_zeros(0, 1)[0], math.pi)
        doubled = analytic._cylinder_series(rho, tau, n_terms=2 * n_default)
        assert np.max(np.abs(base - doubled)) < 1e-13
        # Deep inside, the true F is below erfc(15): the cancelling terms must sum to ~0.
        assert np.max(np.abs(base[rho < 0.7])) < 1e-13


def test_cylinder_matches_small_time_expansion():
    # Large-argument expansion of I0 (A&S 1964, eq. 9.7.1, from memory) in the Laplace
    # transform of the cylinder problem gives
    # F = sqrt(a/r) erfc(u) + (a - r) sqrt(D t) / (4 sqrt(a) r^1.5) ierfc(u) + O((D t / a^2) x / a),
    # Carslaw & Jaeger (1959) section 7.4 (from memory). Near the surface at tau = 1e-6 the
    # remainder is ~1e-10, so this checks the 2 140-term Bessel sum far below the 1e-3 gap to erfc.
    a, tau = RADIUS, 1e-6
    t = tau * a * a / D_C
    x = np.linspace(0.0, 8.0, 81) * math.sqrt(D_C * t)
    r, u = a - x, x / (2 * math.sqrt(D_C * t))
    expansion = np.sqrt(a / r) * special.erfc(u) + x * math.sqrt(D_C * t) / (4 * math.sqrt(a) * r**1.5) * _ierfc(u)
    assert np.max(np.abs(analytic.cylinder_dirichlet(x, t, D_C, a) - expansion)) < 1e-9


@pytest.mark.parametrize("tau", [1e-3, 0.01, 0.1, 0.5])
def test_cylinder_mass_balance(tau):
    # (2/a^2) * integral of F r dr = Crank (1975) eq. (5.23).
    a = RADIUS
    t = tau * a * a / D_C
    integral = 2 / a**2 * _integrate(lambda x: analytic.cylinder_dirichlet(x, t, D_C, a) * (a - x), 0.0, a)
    alpha = special.jn_zeros(0, 400)
    published = 1.0 - np.sum(4.0 / alpha**2 * np.exp(-(alpha**2) * tau))
    assert integral == pytest.approx(published, rel=1e-9)
    assert analytic.cylinder_uptake(t, D_C, a) == pytest.approx(published, rel=1e-12)


def test_cylinder_uptake_matches_small_time_expansion():
    # M_t/M_inf = 4 sqrt(tau/pi) - tau - (1/3) sqrt(tau^3/pi) + O(tau^2),
    # Crank (1975) eq. (5.24) (from memory).
    for tau in (1e-6, 1e-4):
        expansion = 4 * math.sqrt(tau / math.pi) - tau - math.sqrt(tau**3 / math.pi) / 3
        assert analytic.cylinder_uptake(tau, 1.0, 1.0) == pytest.approx(expansion, abs=2 * tau**2)


@pytest.mark.parametrize("L", [0.1, 1.0, 10.0, 100.0])
def test_cylinder_evaporation_mass_balance(L):
    # (2/a^2) * integral of F r dr = Crank (1975) eq. (5.52) (from memory), summed here
    # independently of analytic.py except for the roots.
    a = RADIUS
    beta = L * D_C / a
    b = analytic.cylinder_evaporation_roots(L, 200)
    for tau in (1e-3, 0.05, 0.4):
        t = tau * a * a / D_C
        integral = 2 / a**2 * _integrate(lambda x: analytic.cylinder_evaporation(x, t, D_C, beta, a) * (a - x), 0.0, a)
        published = 1.0 - np.sum(4 * L * L * np.exp(-(b**2) * tau) / (b**2 * (b**2 + L * L)))
        assert integral == pytest.approx(published, rel=1e-9)
        assert analytic.cylinder_evaporation_uptake(t, D_C, beta, a) == pytest.approx(published, rel=1e-12)


def test_cylinder_evaporation_limits():
    a = RADIUS
    x = np.linspace(0.0, a, 101)
    t = 0.02 * a * a / D_C
    dirichlet = analytic.cylinder_dirichlet(x, t, D_C, a)
    assert np.array_equal(analytic.cylinder_evaporation(x, t, D_C, math.inf, a), dirichlet)
    assert np.max(np.abs(analytic.cylinder_evaporation(x, t, D_C, 1e8 * D_C / a, a) - dirichlet)) < 1e-6
    assert np.all(analytic.cylinder_evaporation(x, t, D_C, 0.0, a) == 0.0)
    # Small L: the bar fills uniformly, F ~ 1 - exp(-2 L tau) (lumped, Biot number -> 0).
    L, tau = 1e-4, 2000.0
    F = analytic.cylinder_evaporation(x, tau * a * a / D_C, D_C, L * D_C / a, a)
    assert np.allclose(F, 1 - math.exp(-2 * L * tau), rtol=1e-3)
    # Saturation: beta_1^2 tau = 1.577 * 50 leaves exp(-79).
    F = analytic.cylinder_evaporation(x, 50.0 * a * a / D_C, D_C, D_C / a, a)
    assert np.max(np.abs(F - 1.0)) < 1e-14


def test_cylinder_evaporation_tends_to_evaporation_plane_at_small_times():
    a = RADIUS
    t = 1e-6 * a * a / D_C
    x = np.linspace(0.0, 8.0, 41) * math.sqrt(D_C * t)
    plane = analytic.evaporation_plane(x, t, D_C, 1e-6)
    assert np.max(np.abs(analytic.cylinder_evaporation(x, t, D_C, 1e-6, a) - plane)) < 1e-3


def test_cylinder_evaporation_boundary_condition():
    # -dF/dx * a = L (1 - F) at the surface.
    a = RADIUS
    for L in (0.5, 20.0):
        beta = L * D_C / a
        for tau in (1e-3, 0.1):
            t = tau * a * a / D_C
            slope = _d1_forward(lambda x: analytic.cylinder_evaporation(x, t, D_C, beta, a), 1e-3 * math.sqrt(tau) * a)
            F0 = analytic.cylinder_evaporation(0.0, t, D_C, beta, a)
            assert -D_C * slope == pytest.approx(beta * (1 - F0), rel=1e-7)


# ------------------------------------------------------------------------------ sphere


@pytest.mark.parametrize("tau", [1e-4, 1e-3, 5e-3, 0.01, 0.05, 0.3, 2.0])
def test_sphere_fourier_and_image_series_agree(tau):
    # Crank (1975) eq. (6.18) and its image form (eq. (6.16), from memory).
    rho = np.concatenate(([0.0, 1e-12, 1e-9], np.linspace(1e-6, 1.0, 200)))
    if tau > analytic._SPHERE_IMAGE_TAU:
        # Above the switch the image form loses ~1e-16 a/r near the centre and is not used.
        rho = rho[rho > 1e-2]
    assert np.max(np.abs(analytic._sphere_fourier(rho, tau) - analytic._sphere_images(rho, tau))) < 1e-13


@pytest.mark.parametrize("tau", [1e-3, 0.008, 0.02, 0.1, 0.5])
def test_sphere_centre_value(tau):
    # Crank (1975) eq. (6.19): F(0) = 1 + 2 sum_{n>=1} (-1)^n exp(-n^2 pi^2 tau).
    a = RADIUS
    n = np.arange(1, 400)
    published = 1 + 2 * np.sum((-1.0) ** n * np.exp(-((n * np.pi) ** 2) * tau))
    t = tau * a * a / D_C
    assert analytic.sphere_dirichlet(a, t, D_C, a) == pytest.approx(published, rel=1e-10, abs=1e-14)
    # Continuity into the r -> 0 limit.
    assert analytic.sphere_dirichlet(a * (1 - 1e-10), t, D_C, a) == pytest.approx(published, rel=1e-9, abs=1e-14)


@pytest.mark.parametrize("tau", [1e-3, 0.01, 0.1, 0.5])
def test_sphere_mass_balance(tau):
    # (3/a^3) * integral of F r^2 dr = Crank (1975) eq. (6.20).
    a = RADIUS
    t = tau * a * a / D_C
    integral = 3 / a**3 * _integrate(lambda x: analytic.sphere_dirichlet(x, t, D_C, a) * (a - x) ** 2, 0.0, a)
    n = np.arange(1, 400)
    published = 1.0 - 6 / np.pi**2 * np.sum(np.exp(-((n * np.pi) ** 2) * tau) / n**2)
    assert integral == pytest.approx(published, rel=1e-9)
    assert analytic.sphere_uptake(t, D_C, a) == pytest.approx(published, rel=1e-12)


@pytest.mark.parametrize("tau", [1e-4, 0.01, 0.2])
def test_sphere_uptake_matches_small_time_form(tau):
    # M_t/M_inf = 6 sqrt(tau) [pi^-1/2 + 2 sum_{n>=1} ierfc(n / sqrt(tau))] - 3 tau,
    # Crank (1975) eq. (6.21) (from memory).
    n = np.arange(1, 30)
    small_time = 6 * math.sqrt(tau) * (1 / math.sqrt(math.pi) + 2 * np.sum(_ierfc(n / math.sqrt(tau)))) - 3 * tau
    assert analytic.sphere_uptake(tau, 1.0, 1.0) == pytest.approx(small_time, rel=1e-12)


# ------------------------------------------------------------------ shared properties


def _dirichlet_bodies():
    a = RADIUS
    return {
        "slab": (lambda x, t: analytic.slab_dirichlet(x, t, D_C, a), 0),
        "cylinder": (lambda x, t: analytic.cylinder_dirichlet(x, t, D_C, a), 1),
        "sphere": (lambda x, t: analytic.sphere_dirichlet(x, t, D_C, a), 2),
    }


@pytest.mark.parametrize("body", ["slab", "cylinder", "sphere"])
def test_small_times_approach_erfc_plane(body):
    # Curvature and the far face are invisible when sqrt(D t) << a.
    f, _ = _dirichlet_bodies()[body]
    a = RADIUS
    t = 1e-6 * a * a / D_C
    x = np.linspace(0.0, 10.0, 101) * math.sqrt(D_C * t)
    assert np.max(np.abs(f(x, t) - analytic.erfc_plane(x, t, D_C))) < 1e-3


@pytest.mark.parametrize("body", ["slab", "cylinder", "sphere"])
def test_surface_value_and_saturation(body):
    f, _ = _dirichlet_bodies()[body]
    a = RADIUS
    for tau in (1e-5, 1e-3, 0.1):
        assert f(0.0, tau * a * a / D_C) == pytest.approx(1.0, abs=1e-13)
    x = np.linspace(0.0, a, 51)
    assert np.max(np.abs(f(x, 20.0 * a * a / D_C) - 1.0)) < 1e-14


@pytest.mark.parametrize("body", ["slab", "cylinder", "sphere"])
@pytest.mark.parametrize("tau", [1e-3, 0.05, 0.3])
def test_profiles_satisfy_the_diffusion_equation(body, tau):
    # dF/dt = D (F_rr + (m/r) F_r), m = 0, 1, 2; with x = a - r, F_r = -F_x.
    f, m = _dirichlet_bodies()[body]
    a = RADIUS
    t = tau * a * a / D_C
    for x in np.array([0.2, 0.5, 0.8]) * min(1.0, 3.0 * math.sqrt(tau)) * a:
        dx = 3e-3 * math.sqrt(tau) * a
        F_t = _d1(lambda s: f(x, s), t, 1e-3 * t)
        laplacian = _d2(lambda s: f(s, t), x, dx) - m / (a - x) * _d1(lambda s: f(s, t), x, dx)
        assert F_t * t == pytest.approx(D_C * laplacian * t, abs=1e-7)


@pytest.mark.parametrize("tau", [1e-3, 0.05, 0.3])
def test_cylinder_evaporation_satisfies_the_diffusion_equation(tau):
    a, L = RADIUS, 3.0
    beta = L * D_C / a
    t = tau * a * a / D_C

    def f(x, s):
        return analytic.cylinder_evaporation(x, s, D_C, beta, a)

    for x in np.array([0.2, 0.5, 0.8]) * min(1.0, 3.0 * math.sqrt(tau)) * a:
        dx = 3e-3 * math.sqrt(tau) * a
        F_t = _d1(lambda s: f(x, s), t, 1e-3 * t)
        laplacian = _d2(lambda s: f(s, t), x, dx) - _d1(lambda s: f(s, t), x, dx) / (a - x)
        assert F_t * t == pytest.approx(D_C * laplacian * t, abs=1e-7)


def test_evaporation_plane_satisfies_the_diffusion_equation():
    for t in (600.0, T_4H):
        for x in np.array([0.3, 1.0, 2.5]) * math.sqrt(D_C * t):
            dx = 3e-3 * math.sqrt(D_C * t)
            F_t = _d1(lambda s: analytic.evaporation_plane(x, s, D_C, BETA), t, 1e-3 * t)
            F_xx = _d2(lambda s: analytic.evaporation_plane(s, t, D_C, BETA), x, dx)
            assert F_t * t == pytest.approx(D_C * F_xx * t, abs=1e-7)


@pytest.mark.parametrize("tau", [1e-3, 0.02, 0.2])
def test_convergence_of_carbon_orders_the_shapes(tau):
    # Comparison principle: erfc_plane is a sub-solution in the cylinder, the cylinder
    # profile a sub-solution in the sphere, and the slab gains from its second face.
    a = RADIUS
    t = tau * a * a / D_C
    x = np.linspace(0.0, a, 201)
    plane = analytic.erfc_plane(x, t, D_C)
    slab = analytic.slab_dirichlet(x, t, D_C, a)
    cylinder = analytic.cylinder_dirichlet(x, t, D_C, a)
    sphere = analytic.sphere_dirichlet(x, t, D_C, a)
    assert np.all(plane <= slab + 1e-14)
    assert np.all(plane <= cylinder + 1e-14)
    assert np.all(cylinder <= sphere + 1e-14)


# ---------------------------------------------------------------- depth and time helpers


def test_depth_at_and_time_to_depth_for_erfc_plane():
    # F = 0.5 at x = 2 sqrt(D t) erfc^-1(0.5); erfc^-1(0.5) = 0.4769362762044699 (from memory).
    root = 0.4769362762044699
    depth = analytic.depth_at(analytic.erfc_plane, 0.5, T_4H, 40 * math.sqrt(D_C * T_4H), args=(D_C,))
    assert depth == pytest.approx(2 * math.sqrt(D_C * T_4H) * root, rel=1e-12)
    t = analytic.time_to_depth(analytic.erfc_plane, 0.5, 1e-3, 100.0, args=(D_C,))
    assert t == pytest.approx((1e-3 / (2 * root)) ** 2 / D_C, rel=1e-12)


@pytest.mark.parametrize("name", ["slab", "cylinder", "sphere", "cylinder_evaporation", "evaporation_plane"])
def test_depth_and_time_round_trip(name):
    a = RADIUS
    profiles = {
        "slab": lambda x, t: analytic.slab_dirichlet(x, t, D_C, a),
        "cylinder": lambda x, t: analytic.cylinder_dirichlet(x, t, D_C, a),
        "sphere": lambda x, t: analytic.sphere_dirichlet(x, t, D_C, a),
        "cylinder_evaporation": lambda x, t: analytic.cylinder_evaporation(x, t, D_C, BETA, a),
        "evaporation_plane": lambda x, t: analytic.evaporation_plane(x, t, D_C, BETA),
    }
    f = profiles[name]
    target = 1.2e-3
    t = analytic.time_to_depth(f, 0.3, target, T_4H)
    assert f(target, t) == pytest.approx(0.3, abs=1e-13)
    assert analytic.depth_at(f, 0.3, t, a) == pytest.approx(target, rel=1e-11)


def test_depth_at_edge_cases():
    # Early in a mass-transfer cycle the surface itself is below the threshold.
    assert analytic.depth_at(analytic.evaporation_plane, 0.5, 10.0, 1e-2, args=(D_C, BETA)) == 0.0
    a = RADIUS
    with pytest.raises(ValueError):
        analytic.depth_at(lambda x, t: analytic.sphere_dirichlet(x, t, D_C, a), 0.5, 5 * a * a / D_C, a)
    with pytest.raises(ValueError):
        analytic.time_to_depth(analytic.erfc_plane, 1.0, 1e-3, T_4H, args=(D_C,))


def test_input_validation_and_shapes():
    with pytest.raises(ValueError):
        analytic.erfc_plane(1e-3, 0.0, D_C)
    with pytest.raises(ValueError):
        analytic.cylinder_dirichlet(1.1 * RADIUS, T_4H, D_C, RADIUS)
    with pytest.raises(ValueError):
        analytic.cylinder_dirichlet(1e-3, 1e-12 * RADIUS**2 / D_C, D_C, RADIUS)
    with pytest.raises(ValueError):
        analytic.evaporation_plane(1e-3, T_4H, D_C, -1.0)
    assert isinstance(analytic.sphere_dirichlet(1e-3, T_4H, D_C, RADIUS), float)
    grid = analytic.cylinder_dirichlet(np.linspace(0, RADIUS, 5)[:, None], np.array([T_4H, 2 * T_4H]), D_C, RADIUS)
    assert grid.shape == (5, 2)
    assert np.all(grid[:, 1] >= grid[:, 0])
