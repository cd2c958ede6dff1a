"""Units, steels and the refusals of the setup: every bad input names its field and the allowed range."""

import math

import pytest

import casedepth
from casedepth.models import steels
from casedepth.models.austenite import Andrews_1965_Ac3
from casedepth.errors import InputError
from casedepth.units import format_duration, parse_length, parse_temperature, parse_threshold, parse_time, parse_velocity


def test_temperature_units():
    assert parse_temperature("925C") == pytest.approx(1198.15)
    assert parse_temperature("1700F") == pytest.approx((1700 - 32) / 1.8 + 273.15)
    assert parse_temperature("1198 K") == 1198.0
    assert parse_temperature("925 °C") == pytest.approx(1198.15)
    assert parse_temperature(925) == pytest.approx(1198.15)


def test_lengths_times_velocities():
    assert parse_length("0.040in") == pytest.approx(1.016e-3)
    assert parse_length("800um") == pytest.approx(0.8e-3)
    assert parse_length("1.0") == pytest.approx(1e-3)
    assert parse_time("5h30min") == 5.5 * 3600
    assert parse_time("90min") == 5400
    assert parse_velocity("1.5e-5cm/s") == pytest.approx(1.5e-7)
    assert parse_velocity("inf") == math.inf
    assert format_duration(5.5 * 3600 + 29) == "5 h 30 min"


def test_thresholds():
    assert parse_threshold("0.40%C").kind == "carbon"
    assert parse_threshold("550HV").kind == "HV"
    assert parse_threshold("550 HV1").kind == "HV"
    assert parse_threshold("50HRC").value == 50


@pytest.mark.parametrize("call,field", [
    (lambda: parse_temperature("hot"), "temperature"),
    (lambda: parse_temperature("925X"), "temperature"),
    (lambda: parse_length("1.0 furlong"), "length"),
    (lambda: parse_time("6 days"), "time"),
    (lambda: parse_velocity("fast"), "beta"),
    (lambda: parse_threshold("50 Brinell"), "threshold"),
    (lambda: casedepth.plan(steel="8620", temperature="925C", potential="lots"), "potential"),
    (lambda: casedepth.plan(steel="8620", temperature="1700 furlongs"), "temperature"),
])
def test_unreadable_values(call, field):
    with pytest.raises(InputError) as error:
        call()
    assert error.value.field == field


def test_library_grades_are_sound():
    grades = steels.library()
    assert len(grades) >= 12
    for steel in grades:
        assert 0.08 <= steel.carbon <= 0.3, steel.name
        assert Andrews_1965_Ac3(steel.composition) < 900 + 273.15, steel.name
    assert steels.find("SAE 8620").name == "8620"
    assert steels.find("1.7131").name == "16MnCr5"


def test_custom_compositions():
    steel = steels.steel_from_text("C=0.20 Mn=0.80, Cr=0.50 ni=0.55")
    assert steel.composition == {"C": 0.20, "Mn": 0.80, "Cr": 0.50, "Ni": 0.55}
    for bad, words in [("C=0.2 Xy=1", "unknown element"), ("Mn=0.8", "carbon content"), ("C=2", "0–0.8"),
                       ("C=0.2 Cr=abc", "not a number"), ("C=0.2 junk", "cannot read")]:
        with pytest.raises(InputError, match=words):
            steels.steel_from_text(bad)
    with pytest.raises(InputError, match="no grade"):
        steels.find("unobtainium")


@pytest.mark.parametrize("kwargs,field,words", [
    ({"temperature": "700C"}, "temperature", "below the Ac3"),
    ({"temperature": "1200C"}, "temperature", "798–1100 °C"),
    ({"potential": 3.0}, "potential", "0.05–2"),
    ({"potential": "nan"}, "potential", "finite"),
    ({"beta": "1e-12"}, "beta", "cm/s"),
    ({"at": "0.15%C"}, "at", "core carbon"),
    ({"at": "40HRC", "hardness_relation": "tempered"}, "at", "core carbon"),
    ({"at": "70HRC", "hardness_relation": "tempered"}, "at", "13.5–60 HRC"),
    ({"at": "20HRC"}, "at", "the core .* already reaches"),
    ({"at": "70HRC"}, "at", "above the .* HRC the case reaches"),
    ({"at": "1000HV"}, "at", "238–940 HV"),
    ({"geometry": "cylinder"}, "diameter", "needs its diameter"),
    ({"geometry": "cylinder", "diameter": "0.01mm"}, "diameter", "0.1–2000 mm"),
    ({"geometry": "cube"}, "geometry", "plate, cylinder, bore, sphere"),
    ({"diffusivity": "agren", "d0": 1e-5}, "d0", "arrhenius"),
    ({"hardness_relation": "annealed"}, "hardness_relation", "tempered"),
])
def test_setup_refusals(kwargs, field, words):
    args = {"steel": "8620", "temperature": "925C", "potential": 1.0, **kwargs}
    with pytest.raises(InputError, match=words) as error:
        casedepth.setup(**args)
    assert error.value.field == field


def test_unreachable_and_out_of_range_targets():
    setup = casedepth.setup("8620", "925C", 1.0)
    with pytest.raises(InputError, match="0.01–10 mm"):
        casedepth.soak_time_for_case_depth(setup, 20e-3)
    with pytest.raises(InputError, match=r"20 mm \(0.787 in\) is outside .* \(0.000394–0.394 in\)"):
        casedepth.soak_time_for_case_depth(setup, 20e-3)  # lengths in messages in both systems
    with pytest.raises(InputError, match="half the section"):
        casedepth.soak_time_for_case_depth(casedepth.setup("8620", "925C", 1.0, geometry="cylinder", diameter="2mm"), 1.5e-3)
    with pytest.raises(casedepth.NotReachableError, match="not below the surface carbon"):
        casedepth.setup("8620", "925C", 0.38)  # a threshold the case cannot reach is refused by the setup
    with pytest.raises(InputError, match="time"):
        casedepth.carburize(setup, 500 * 3600.0 + 1)


def test_warnings_for_carbides_and_grain_growth():
    rich = casedepth.setup("8620", "925C", 1.4)
    assert any("carbides" in w for w in rich.warnings())
    hot = casedepth.setup("8620", "1000C", 1.0)
    assert any("grain" in w for w in hot.warnings())
    assert casedepth.setup("8620", "925C", 1.0).warnings() == []


def test_plain_carbon_grades_with_a_hardness_threshold_are_flagged():
    """Common practice: plain-carbon case-hardening grades need a fast quench for the case to harden through to a
    hardness threshold. Under the first release's fixed relation they get a note (alloy grades and carbon
    thresholds do not); from the quench, an oil-quenched 1018 case never reaches 50 HRC and the threshold is refused
    with what would help, while a water or brine quench reaches it."""
    def notes(grade, at):
        return [w for w in casedepth.setup(grade, "925C", 1.0, at=at, hardness_relation="tempered").warnings()
                if "plain-carbon" in w]

    assert notes("1018", "50HRC") and notes("C15E", "550HV")
    assert not notes("8620", "50HRC") and not notes("1018", "0.40%C")
    with pytest.raises(InputError, match="harsher quench") as error:
        casedepth.setup("1018", "925C", 1.0, at="50HRC")
    assert error.value.field == "at"
    assert 0.3 <= casedepth.setup("1018", "925C", 1.0, at="50HRC", quench="brine").threshold_carbon <= 0.45


def test_total_case_threshold():
    """SAE J423: total case depth is where the carbon is 0.04 %C above the core. 'total' on 8620 (core 0.205 %C)
    must give exactly the soak of a 0.245 %C carbon threshold."""
    from casedepth.units import Threshold, parse_threshold

    assert parse_threshold("total") == Threshold(0.04, "above core")
    assert parse_threshold("core+0.05%C") == Threshold(0.05, "above core")
    with pytest.raises(InputError):
        parse_threshold("core+2%C")
    total = casedepth.setup("8620", "925C", 1.0, at="total")
    carbon = casedepth.setup("8620", "925C", 1.0, at=0.205 + 0.04)
    assert total.threshold_carbon == pytest.approx(0.245)
    assert str(total.threshold) == "core + 0.04 %C"
    assert casedepth.soak_time_for_case_depth(total, 1.5e-3).soak_time == pytest.approx(
        casedepth.soak_time_for_case_depth(carbon, 1.5e-3).soak_time, rel=1e-12)
    assert not any("taken as" in w for w in total.warnings())  # no hardness relation is involved
