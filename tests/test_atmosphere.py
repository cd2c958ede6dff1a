"""Oxygen-probe millivolts ↔ carbon potential (casedepth.atmosphere).

Sources: the Nernst equation of a zirconia probe with air reference (exact); C + ½O2 = CO standard
Gibbs energy (standard thermochemical tables, from memory); the activity of carbon in austenite (a
handbook relation, from memory); the Fe–C diagram's Acm line (casedepth.austenite) as an
independent check of the activity relation; and the common-practice reading of about 1150 mV for a
1.0 %C atmosphere near 925 °C in endothermic gas of about 20 % CO. The limits of a reading (0 mV,
graphite saturation, the least carburizing potential) follow from the same Nernst relation and
C + ½O2 = CO equilibrium; the 0.10 %C floor is the program's own policy (below the leanest
case-hardening grade), the steel's floor its core carbon over Gunnarson's alloy factor.
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
    (lambda: A.carbon_potential_from_probe(0.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(-20.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(math.nan, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(math.inf, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1e9, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1150.0, 1198.15, core_potential=-1.0), "core_potential"),
    (lambda: A.check_carburizing_potential(math.nan, 1198.15), "carbon_potential"),
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


def test_a_reading_at_or_below_0_mV_is_no_furnace_atmosphere():
    """Nernst, air reference: E = 0 exactly where the gas holds the oxygen of air (0.209 atm), and E < 0 only in
    a gas richer in oxygen than air — no furnace atmosphere; refused with the field, 0 mV and the window named."""
    assert A.oxygen_probe_pressure(0.0, 1198.15) == pytest.approx(0.209, rel=1e-12)
    for E in (0.0, -5.0):
        with pytest.raises(InputError, match="above 0 mV") as error:
            A.carbon_potential_from_probe(E, 1198.15)
        assert error.value.field == "mv" and "1014–1166 mV (0.10–1.26 %C)" in error.value.message


@pytest.mark.parametrize("celsius", [800, 925, 1100])
@pytest.mark.parametrize("CO", [0.05, 0.20, 0.50])
def test_graphite_saturation_is_the_highest_reading(celsius, CO):
    """C(graphite) + ½O2 = CO with ΔG° = −111 700 − 87.65 T J/mol: at a_C = 1, p_O2 = (p_CO / K)², and the Nernst
    relation gives the reading. Restated here from those two relations (a consistency check of the module, not an
    independent validation: that is the Acm test above). A reading 0.5 mV below is read; 0.5 mV above is refused
    naming the limit in mV and %C."""
    T = celsius + K
    R = 8.314462618
    K_CO = math.exp(-(-111700.0 - 87.65 * T) / (R * T))
    E_graphite = 0.0496 * T * math.log10(0.209 / (CO / K_CO) ** 2)
    window = A.probe_window(T, CO)
    assert window.graphite_mv == pytest.approx(E_graphite, rel=1e-12)
    assert window.graphite == pytest.approx(A.carbon_for_activity(1.0, T), rel=1e-12)
    assert A.carbon_potential_from_probe(E_graphite - 0.5, T, CO) == pytest.approx(window.graphite, abs=0.02)
    with pytest.raises(InputError, match="graphite saturation") as error:
        A.carbon_potential_from_probe(E_graphite + 0.5, T, CO)
    assert error.value.field == "mv"
    assert f"{E_graphite:.0f} mV" in error.value.message and f"{window.graphite:.2f} %C" in error.value.message


def test_more_co_saturates_at_a_lower_reading():
    """a_C = p_CO / (K p_O2^½): at the same activity, more CO needs more oxygen, so a lower reading."""
    T = 925 + K
    assert A.probe_window(T, 0.23).graphite_mv < A.probe_window(T, 0.20).graphite_mv


@pytest.mark.parametrize("celsius", [800, 925, 1100])
def test_a_decarburizing_reading_is_refused_naming_the_limit(celsius):
    """Below 0.10 %C (the program's floor: leaner than every case-hardening grade) the gas decarburizes: the
    limit's reading (Nernst and C + ½O2 = CO from the activity at 0.10 %C) and 0.10 %C are named."""
    T = celsius + K
    window = A.probe_window(T)
    assert window.least == 0.10
    assert A.carbon_potential_from_probe(window.least_mv, T) == pytest.approx(0.10, rel=1e-9)
    with pytest.raises(InputError, match="decarburizing") as error:
        A.carbon_potential_from_probe(window.least_mv - 1.0, T)
    assert error.value.field == "mv"
    assert f"0.10 %C ({window.least_mv:.0f} mV)" in error.value.message


def test_a_reading_that_decarburizes_the_steel_is_refused_naming_its_floor():
    """With the steel given, the floor is the potential that holds its core carbon: 8620 holds 0.205 %C at the
    core; Gunnarson's alloy factor 1.027 (this program's value) makes that a potential of 0.205 / 1.027 ≈ 0.20 %C."""
    T = 925 + K
    core_potential = 0.205 / 1.027
    window = A.probe_window(T, core_potential=core_potential)
    assert window.least == pytest.approx(core_potential) and window.least_mv > A.probe_window(T).least_mv
    reading = A.probe_voltage_for_potential(0.15, T)  # carburizes a 0.10 %C steel, decarburizes 8620
    assert A.carbon_potential_from_probe(reading, T) == pytest.approx(0.15, rel=1e-9)
    with pytest.raises(InputError, match="steel's core carbon") as error:
        A.carbon_potential_from_probe(reading, T, core_potential=core_potential)
    assert f"{window.least_mv:.0f} mV" in error.value.message and "0.20 %C" in error.value.message
    # a core leaner than the floor leaves the floor at 0.10 %C
    assert A.probe_window(T, core_potential=0.05).least == 0.10


@pytest.mark.parametrize("argv,flag,words", [
    (["--mv", "-3"], "--mv", "above 0 mV"),
    (["--mv", "1200"], "--mv", "graphite saturation (1166 mV, 1.26 %C)"),
    (["--mv", "1000"], "--mv", "0.10 %C (1014 mV)"),
    (["--mv", "1040", "--steel", "8620"], "--mv", "steel's core carbon (0.20 %C, 1051 mV)"),
    (["--potential", "0.15", "--steel", "8620"], "--potential", "steel's core carbon (0.20 %C, 1051 mV)"),
    (["--potential", "1.3"], "--potential", "graphite saturation at 925 °C with 20 % CO (1.26 %C, 1166 mV)"),
    (["--potential", "0.07"], "--potential", "0.10 %C (1014 mV)"),
    (["--mv", "1100", "--steel", "nonesuch"], "--steel", "no grade"),
])
def test_probe_command_refuses_readings_in_one_line(capsys, argv, flag, words):
    assert main(["probe", "--temperature", "925C", *argv]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith(f"casedepth: error: {flag}: ") and words in err


def test_probe_command_reads_a_carburizing_reading_for_the_steel(capsys):
    assert main(["probe", "--temperature", "925C", "--mv", "1100", "--steel", "8620", "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["carbon_potential_pct"] == pytest.approx(
        A.carbon_potential_from_probe(1100.0, 925 + K))
