"""Oxygen-probe millivolts ↔ carbon potential (casedepth.atmosphere).

Sources: the Nernst equation of a zirconia probe with air reference (exact); C + ½O2 = CO standard
Gibbs energy (standard thermochemical tables, from memory); the activity of carbon in austenite (a
handbook relation, from memory); the Fe–C diagram's Acm line (casedepth.austenite) as an
independent check of the activity relation; and the common-practice reading of about 1150 mV for a
1.0 %C atmosphere near 925 °C in endothermic gas of about 20 % CO.
"""

import json
import math

import pytest

from casedepth.models import atmosphere as A
from casedepth.models.austenite import saturation_carbon
from casedepth.cli import main
from casedepth.errors import InputError
from casedepth.plan import Plan, evaluate

K = 273.15


def test_nernst_equation_with_air_reference():
    """E = (RT ln10 / 4F) log10(0.209 / pO2); RT ln10/4F = 0.04961 mV/K (exact constants), ±0.1 %."""
    R, F = 8.314462618, 96485.33212
    assert R * math.log(10) / (4 * F) * 1e3 == pytest.approx(0.0496, rel=1e-3)
    for E in (1000.0, 1150.0, 1250.0):
        pO2 = A.oxygen_probe_pressure(E, 1198.15)
        assert A.probe_voltage(pO2, 1198.15) == pytest.approx(E, rel=1e-12)
        assert E == pytest.approx(0.0496 * 1198.15 * math.log10(0.209 / pO2), rel=1e-12)


def test_one_percent_carbon_near_925C_reads_about_1150_mV():
    """Common practice: a 1.0 %C atmosphere at about 925 °C (1700 °F) in endothermic gas (20 % CO) reads about
    1150 mV on an air-reference probe; ±15 mV."""
    assert A.probe_voltage_for_potential(1.0, 925 + K) == pytest.approx(1150, abs=15)


@pytest.mark.parametrize("celsius", [900, 925, 950, 1000])
def test_activity_one_is_near_the_acm_line(celsius):
    """Graphite saturation (a_C = 1) from the activity relation against the Fe–C diagram's Acm
    (casedepth.austenite): two independent sources agree within 0.1 %C."""
    T = celsius + K
    assert A.carbon_for_activity(1.0, T) == pytest.approx(saturation_carbon(T), abs=0.1)


def test_round_trip_and_directions():
    T = 925 + K
    for potential in (0.6, 0.8, 1.0, 1.2):
        mv = A.probe_voltage_for_potential(potential, T)
        assert A.carbon_potential_from_probe(mv, T) == pytest.approx(potential, rel=1e-9)
    # a higher reading means a richer gas; more CO at the same reading means a richer gas too
    assert A.carbon_potential_from_probe(1160, T) > A.carbon_potential_from_probe(1140, T)
    assert A.carbon_potential_from_probe(1150, T, 0.23) > A.carbon_potential_from_probe(1150, T, 0.20)


@pytest.mark.parametrize("call,field", [
    (lambda: A.carbon_potential_from_probe(500.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1150.0, 1198.15, 0.9), "carrier_co"),
    (lambda: A.probe_voltage_for_potential(1.0, 600 + K), "temperature"),
    (lambda: A.probe_voltage_for_potential(3.0, 1198.15), "carbon_potential"),
])
def test_bad_input_names_the_field(call, field):
    with pytest.raises(InputError) as error:
        call()
    assert error.value.field == field


def test_plans_carry_probe_setpoints_for_their_held_stages():
    single = evaluate(Plan().values())
    assert [label for label, _ in single.probe] == ["Soak", "Equalize"]
    assert single.probe[0][1] == pytest.approx(A.probe_voltage_for_potential(single.setup.carbon_potential,
                                                                             single.setup.temperature), rel=1e-12)
    boosted = evaluate(Plan(process="boost-diffuse").values())
    labels = [label for label, _ in boosted.probe]
    assert labels[:2] == ["Boost", "Diffuse"]
    assert boosted.probe[0][1] > boosted.probe[1][1]  # the boost gas is the richer
    richer_gas = evaluate(Plan(shop={"carrier_co_pct": 23.0}).values())
    assert richer_gas.probe[0][1] < single.probe[0][1]  # more CO: the same potential at a lower reading


def test_probe_command(capsys):
    assert main(["probe", "--temperature", "925C", "--potential", "1.0", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["probe_mv"] == pytest.approx(A.probe_voltage_for_potential(1.0, 925 + K))
    assert main(["probe", "--temperature", "925C", "--mv", "1150"]) == 0
    assert "%C" in capsys.readouterr().out
    assert main(["probe", "--temperature", "925C", "--mv", "1150", "--carrier-co", "90"]) == 2
    assert "--carrier-co" in capsys.readouterr().err
