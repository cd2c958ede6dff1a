"""Model functions against their published sources (diffusivity, alloy factor, Acm, Ac3, hardness).

Where a reference value is recalled rather than read from the source at hand, the check says
"from memory"; those tolerances are loose on purpose.
"""

import math

import numpy as np
import pytest

from casedepth.models import hardness
from casedepth.models.austenite import Andrews_1965_Ac3, saturation_carbon
from casedepth.models.diffusivity import Agren_1986, Arrhenius, Diffusivity, Tibbetts_1980
from casedepth.errors import InputError
from casedepth.models.surface import Gunnarson_alloy_factor
from casedepth.units import Threshold

K = 273.15


# -- diffusivity ---------------------------------------------------------------------------------
def test_tibbetts_as_published_in_cgs():
    """Tibbetts 1980, J. Appl. Phys. 51, 4813: D = 0.47 exp(-1.6 C) exp(-(37000 - 6600 C)/RT) cm²/s."""
    T, C = 1198.15, 0.8
    cgs = 0.47 * math.exp(-1.6 * C) * math.exp(-(37000 - 6600 * C) / (1.987 * T))
    assert Tibbetts_1980(C, T) == pytest.approx(cgs * 1e-4, rel=1e-12)


def test_agren_as_published():
    """Ågren 1986, Scripta Metall. 20, 1507, with y = x_C/(1 - x_C) from wt % for binary Fe–C."""
    T, wt = 1273.15, 0.6
    x = (wt / 12.011) / (wt / 12.011 + (100 - wt) / 55.845)
    y = x / (1 - x)
    expected = 4.53e-7 * (1 + y * (1 - y) * 8339.9 / T) * math.exp(-(1 / T - 2.221e-4) * (17767 - 26436 * y))
    assert Agren_1986(wt, T) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("celsius", [850, 925, 1000, 1050])
@pytest.mark.parametrize("carbon", [0.2, 0.5, 0.8, 1.1])
def test_tibbetts_and_agren_agree(celsius, carbon):
    """Two independent assessments of carbon diffusion in austenite agree within 20 % (in austenite)."""
    T = celsius + K
    if carbon > saturation_carbon(T):
        pytest.skip("above the Acm line: not austenite")
    assert Tibbetts_1980(carbon, T) == pytest.approx(Agren_1986(carbon, T), rel=0.20)


def test_textbook_arrhenius_within_a_factor_two_of_tibbetts():
    """Textbook tables (Callister & Rethwisch, Table 5.2, and others quoting 0.15 cm²/s, 135 kJ/mol) differ by about
    2× at 925 °C; Tibbetts (1980) must lie within a factor two of the Arrhenius default (common practice)."""
    ratio = Tibbetts_1980(0.4, 925 + K) / Arrhenius(0.4, 925 + K)
    assert 0.5 < ratio < 2.0


def test_diffusivity_rises_with_carbon_and_temperature():
    """Both published carbon-dependent models: D rises with C in austenite at carburizing temperatures."""
    for model in (Tibbetts_1980, Agren_1986):
        c = np.linspace(0.1, 1.2, 12)
        assert np.all(np.diff(model(c, 1198.15)) > 0)
        assert model(0.5, 1273.15) > model(0.5, 1173.15)


def test_diffusivity_settings_are_checked():
    with pytest.raises(InputError, match="multiplier"):
        Diffusivity("tibbetts", multiplier=0.0)
    with pytest.raises(InputError, match="diffusivity"):
        Diffusivity("fick")
    assert Diffusivity("tibbetts", multiplier=2.0)(0.4, 1200.0) == pytest.approx(2 * Tibbetts_1980(0.4, 1200.0))


# -- alloy factor -------------------------------------------------------------------------------
def test_gunnarson_plain_iron_is_one():
    assert Gunnarson_alloy_factor({"C": 0.2}) == 1.0


def test_gunnarson_coefficients():
    """Gunnarson (as quoted in ASM Handbook Vol. 4; from memory): log10(%C_plain/%C_alloy) =
    0.055 Si - 0.013 Mn - 0.040 Cr + 0.014 Ni - 0.013 Mo."""
    assert Gunnarson_alloy_factor({"Cr": 1.0}) == pytest.approx(10 ** 0.040)
    assert Gunnarson_alloy_factor({"Si": 1.0}) == pytest.approx(10 ** -0.055)
    assert Gunnarson_alloy_factor({"Ni": 1.0}) == pytest.approx(10 ** -0.014)
    assert Gunnarson_alloy_factor({"Mn": 1.0, "Mo": 1.0}) == pytest.approx(10 ** 0.026)


# -- austenite limits ---------------------------------------------------------------------------------
def test_acm_end_points_of_the_iron_carbon_diagram():
    """Fe–C diagram: eutectoid 727 °C / 0.77 % C, eutectic 1148 °C / 2.11 % C."""
    assert saturation_carbon(727 + K) == pytest.approx(0.77, abs=1e-9)
    assert saturation_carbon(1148 + K) == pytest.approx(2.11, abs=1e-9)


@pytest.mark.parametrize("celsius,wt", [(800, 0.948), (850, 1.084), (900, 1.227), (925, 1.301), (950, 1.377),
                                        (1000, 1.535), (1050, 1.701), (1100, 1.876)])
def test_acm_calphad_points(celsius, wt):
    """Acm points computed with pycalphad 0.11.2 for this project from Gustafson, Scand. J. Metall. 14 (1985) 259
    (austenite) and Hallstedt et al., Calphad 34 (2010) 129 (cementite); the table must pass through them."""
    assert saturation_carbon(celsius + K) == pytest.approx(wt, abs=1e-9)


def test_acm_outside_its_table_is_refused():
    with pytest.raises(InputError, match="727–1148"):
        saturation_carbon(700 + K)


def test_andrews_ac3_limits():
    """Andrews 1965: pure iron transforms near 910 °C (the A3 of pure iron is 912 °C), and the
    formula meets the eutectoid (727 °C) near 0.77 % C."""
    assert Andrews_1965_Ac3({"C": 0.0}) - K == pytest.approx(912, abs=3)
    assert Andrews_1965_Ac3({"C": 0.77}) - K == pytest.approx(727, abs=6)
    assert Andrews_1965_Ac3({"C": 0.2, "Ni": 3.5}) < Andrews_1965_Ac3({"C": 0.2})


# -- hardness -------------------------------------------------------------------------------------
def test_astm_e140_pairs():
    """ASTM E140 Table 1 (from memory): 50 HRC ≈ 513 HV, 550 HV ≈ 52.3 HRC."""
    assert hardness.ASTM_E140_hrc_to_hv(50) == pytest.approx(513, abs=1)
    assert hardness.ASTM_E140_hv_to_hrc(550) == pytest.approx(52.3, abs=0.2)
    hv = hardness.ASTM_E140_hrc_to_hv(np.arange(20, 69))
    assert np.all(np.diff(hv) > 0)
    assert hardness.ASTM_E140_hv_to_hrc(hardness.ASTM_E140_hrc_to_hv(57.5)) == pytest.approx(57.5)


@pytest.mark.parametrize("carbon,hrc,tol", [(0.2, 50, 4.0), (0.4, 58, 1.5), (0.6, 65, 1.5), (0.9, 65, 1.5)])
def test_martensite_hardness_against_published_curves(carbon, hrc, tol):
    """Krauss, Steels: Processing, Structure, and Performance (2005); Hodge & Orehoski, Trans. AIME 167 (1946) 627
    (from memory): about 50 HRC at 0.2 % C, 58 at 0.4 %,
    a 64–66 HRC plateau from about 0.6 % C, for 100 % as-quenched martensite."""
    assert hardness.Just_1968_martensite_hrc(carbon) == pytest.approx(hrc, abs=tol)


def test_tempered_case_50_hrc_near_0_35_to_0_40_carbon():
    """Common practice: in carburized-and-tempered cases 50 HRC falls near 0.35–0.40 % C."""
    carbon = hardness.threshold_carbon(Threshold(50, "HRC"), "tempered")
    assert 0.35 <= carbon <= 0.40


def test_hardness_threshold_conversions():
    c_hv = hardness.threshold_carbon(Threshold(550, "HV"), "tempered")
    c_hrc = hardness.threshold_carbon(Threshold(hardness.ASTM_E140_hv_to_hrc(550), "HRC"), "tempered")
    assert c_hv == pytest.approx(c_hrc)
    assert hardness.threshold_carbon(Threshold(0.4, "carbon")) == 0.4
    with pytest.raises(InputError, match="HRC"):
        hardness.threshold_carbon(Threshold(66, "HRC"), "tempered")


def test_tibbetts_fast_path_is_the_published_form():
    """The solver's one-exponential path for Tibbetts (1980) equals the function as published (1e-12)."""
    import numpy as np

    from casedepth.models.diffusivity import Diffusivity, Tibbetts_1980

    c = np.linspace(0.1, 1.3, 13)
    for T in (1123.15, 1198.15, 1273.15):
        assert np.allclose(Diffusivity("tibbetts", 1.3)(c, T), 1.3 * Tibbetts_1980(c, T), rtol=1e-12, atol=0)
