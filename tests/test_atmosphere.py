"""The carburizing atmosphere in the shop's readings (casedepth.models.atmosphere): probe mV, dew point, CO2 and the
carbon potential, and β from the gas (casedepth.models.surface.beta_from_gas).

Sources, named beside each check:
* NASA Glenn 9-coefficient polynomials of CO, CO2, H2O, H2 and O2, 1000–6000 K (McBride, Zehe & Gordon, "NASA Glenn
  Coefficients for Calculating Thermodynamic Properties of Individual Species", NASA TP-2002-211556, 2002), written
  out below as published in the CEA thermo.inp data;
* JANAF standard Gibbs energies of formation (Chase, NIST-JANAF Thermochemical Tables, 4th ed., 1998): values at
  1100–1300 K from memory;
* the Nernst equation of a zirconia probe with air reference (exact constants, CODATA);
* saturation vapour pressure over water: Buck, J. Appl. Meteorol. 20 (1981) 1527; the WMO table values at −10 and
  20 °C (2.86 and 23.39 hPa) from memory;
* common practice, from memory: about 1150 mV for 1.0 %C near 925 °C in endothermic gas of 20 % CO; about +15 to
  +20 °F dew point and about 0.1 % CO2 for 1.0 %C at 1700 °F in endothermic gas from natural gas; the water-gas
  shift's K = 1 near 820 °C;
* β about 1–3e-5 cm/s in endothermic gas at 900–950 °C (Karabelchtchikova, PhD thesis, WPI 2007; Ruck, Monceau &
  Grabke, steel research 1996; values from memory);
* the Fe–C Acm line (casedepth.models.austenite, CALPHAD points) as an independent check of the activity relation.
"""

import json
import math

import pytest

from casedepth.cli import main
from casedepth.errors import InputError
from casedepth.models import atmosphere as A
from casedepth.models.austenite import saturation_carbon
from casedepth.models.surface import beta_from_gas
from casedepth.numerics.solver import Ramp
from casedepth.plan import Plan, evaluate, load

K = 273.15
R = 8.314462618

# NASA Glenn coefficients a1..a7, b1, b2 for 1000–6000 K (McBride, Zehe & Gordon 2002)
NASA = {
    "CO": (4.619197250e+05, -1.944704863e+03, 5.916714180e+00, -5.664282830e-04, 1.398814540e-07,
           -1.787680361e-11, 9.620935570e-16, -2.466261084e+03, -1.387413108e+01),
    "CO2": (1.176962419e+05, -1.788791477e+03, 8.291523190e+00, -9.223156780e-05, 4.863676880e-09,
            -1.891053312e-12, 6.330036590e-16, -3.908350590e+04, -2.652669281e+01),
    "H2O": (1.034972096e+06, -2.412698562e+03, 4.646110780e+00, 2.291998307e-03, -6.836830480e-07,
            9.426468930e-11, -4.822380530e-15, -1.384286509e+04, -7.978148510e+00),
    "H2": (5.608128010e+05, -8.371504740e+02, 2.975364532e+00, 1.252249124e-03, -3.740716190e-07,
           5.936625200e-11, -3.606994100e-15, 5.339824410e+03, -2.202774769e+00),
    "O2": (-1.037939022e+06, 2.344830282e+03, 1.819732036e+00, 1.267847582e-03, -2.188067988e-07,
           2.053719572e-11, -8.193467050e-16, -1.689010929e+04, 1.738716506e+01),
}
#: JANAF ΔfG° [kJ/mol] at 1100, 1200, 1300 K (Chase 1998; from memory)
JANAF = {"CO": (-209.075, -217.819, -226.509), "CO2": (-396.001, -396.098, -396.177),
         "H2O": (-187.033, -181.425, -175.774)}


def gibbs(species: str, T: float) -> float:
    """G°(T) [J/mol] from the NASA polynomials: H/RT − S/R."""
    a1, a2, a3, a4, a5, a6, a7, b1, b2 = NASA[species]
    h = (-a1 / T ** 2 + a2 * math.log(T) / T + a3 + a4 * T / 2 + a5 * T ** 2 / 3 + a6 * T ** 3 / 4 + a7 * T ** 4 / 5
         + b1 / T)
    s = -a1 / T ** 2 / 2 - a2 / T + a3 * math.log(T) + a4 * T + a5 * T ** 2 / 2 + a6 * T ** 3 / 3 + a7 * T ** 4 / 4 + b2
    return R * T * (h - s)


# -- thermochemistry against the tables ---------------------------------------------------------------------------
@pytest.mark.parametrize("celsius", [800, 850, 900, 925, 950, 1000, 1050, 1100])
def test_the_gas_reactions_match_the_nasa_polynomials(celsius):
    """CO + ½O2 = CO2 and H2 + ½O2 = H2O, from the NASA Glenn polynomials (McBride, Zehe & Gordon 2002): the fits the
    readings use are within 60 J/mol over 800–1100 °C (the issue asks 200)."""
    T = celsius + K
    to_co2 = gibbs("CO2", T) - gibbs("CO", T) - 0.5 * gibbs("O2", T)
    to_h2o = gibbs("H2O", T) - gibbs("H2", T) - 0.5 * gibbs("O2", T)
    assert A.CO_TO_CO2[0] + A.CO_TO_CO2[1] * T == pytest.approx(to_co2, abs=60.0)
    assert A.H2_TO_H2O[0] + A.H2_TO_H2O[1] * T == pytest.approx(to_h2o, abs=60.0)


@pytest.mark.parametrize("k,T", list(enumerate([1100.0, 1200.0, 1300.0])))
def test_the_three_equilibria_match_the_janaf_tables(k, T):
    """ΔG° of C + ½O2 = CO, C + CO2 = 2CO and C + H2O = CO + H2 from JANAF ΔfG° (Chase 1998, from memory), within
    200 J/mol."""
    data = A.GAS_DATA["nasa-glenn-2002"]
    co, co2, h2o = (JANAF[s][k] * 1e3 for s in ("CO", "CO2", "H2O"))
    assert data.gibbs("probe", T) == pytest.approx(co, abs=200.0)
    assert data.gibbs("co2", T) == pytest.approx(2 * co - co2, abs=200.0)
    assert data.gibbs("dew_point", T) == pytest.approx(co - h2o, abs=200.0)


def test_the_first_releases_gibbs_energy_is_about_950_j_off_and_reads_the_probe_4_to_6_mv_low():
    """The first releases' −111 700 − 87.65 T J/mol against the tables at 925 °C, and what it did to a probe reading;
    kept only for plans made with it (offered the newer data)."""
    T = 925 + K
    old, new = A.GAS_DATA["linear-first-release"], A.GAS_DATA["nasa-glenn-2002"]
    assert old.gibbs("probe", T) == pytest.approx(-111700.0 - 87.65 * T, rel=1e-12)
    assert 800.0 < old.gibbs("probe", T) - new.gibbs("probe", T) < 1100.0
    for potential in (0.8, 1.0, 1.2):
        low = A.probe_voltage_for_potential(potential, T, data="linear-first-release")
        assert 4.0 < A.probe_voltage_for_potential(potential, T) - low < 6.0
    assert old.superseded_by == "nasa-glenn-2002" and new.superseded_by is None


def test_water_gas_shift_is_one_near_820_C():
    """The three readings of one gas agree through the water-gas shift CO + H2O = CO2 + H2, whose K is 1 near 820 °C
    (common practice, from memory): K₃/K₂ from the readings' own constants crosses 1 between 790 and 850 °C."""
    data = A.GAS_DATA["nasa-glenn-2002"]

    def shift(celsius):
        T = celsius + K
        return data.constant("dew_point", T) / data.constant("co2", T)

    assert shift(790) > 1.0 > shift(850)
    # and a gas at one potential reads consistently: its CO2 and H2O fractions obey the shift
    T = 925 + K
    gas = A.Gas(T)
    co2 = A.reading_for_potential("co2", 1.0, gas)
    water = A.water_vapour_pressure(A.reading_for_potential("dew_point", 1.0, gas)) / A.ONE_ATMOSPHERE_HPA
    assert co2 * gas.h2 / (gas.co * water) == pytest.approx(
        data.constant("dew_point", T) / data.constant("co2", T), rel=1e-9)


def test_buck_vapour_pressure():
    """Buck (1981) over water: 6.1121 hPa at 0 °C by construction; the WMO table's 23.39 hPa at 20 °C and 2.86 hPa at
    −10 °C (from memory) within 0.5 %; the dew point inverts it."""
    assert A.water_vapour_pressure(K) == pytest.approx(6.1121, rel=1e-12)
    assert A.water_vapour_pressure(20 + K) == pytest.approx(23.39, rel=5e-3)
    assert A.water_vapour_pressure(-10 + K) == pytest.approx(2.86, rel=5e-3)
    for celsius in (-30.0, -9.0, 0.0, 15.0, 45.0):
        assert A.dew_point_for_pressure(A.water_vapour_pressure(celsius + K)) == pytest.approx(celsius + K, abs=1e-9)


def test_nernst_equation_with_air_reference():
    """E = (RT ln10 / 4F) log10(0.209 / pO2); RT ln10/4F = 0.04961 mV/K (exact constants), ±0.1 %."""
    F = 96485.33212
    assert R * math.log(10) / (4 * F) * 1e3 == pytest.approx(0.0496, rel=1e-3)
    for E in (1000.0, 1150.0, 1250.0):
        pO2 = A.oxygen_probe_pressure(E, 1198.15)
        assert A.probe_voltage(pO2, 1198.15) == pytest.approx(E, rel=1e-12)
        assert E == pytest.approx(0.0496 * 1198.15 * math.log10(0.209 / pO2), rel=1e-12)


@pytest.mark.parametrize("celsius", [900, 925, 950, 1000])
def test_activity_one_is_near_the_acm_line(celsius):
    """Graphite saturation (a_C = 1) from the activity relation against the Fe–C diagram's Acm
    (casedepth.models.austenite): two independent sources agree within 0.1 %C."""
    T = celsius + K
    assert A.carbon_for_activity(1.0, T) == pytest.approx(saturation_carbon(T), abs=0.1)


# -- the readings against practice ---------------------------------------------------------------------------------
def test_one_percent_carbon_near_925C_reads_about_1150_mV():
    """Common practice: 1.0 %C at about 925 °C in endothermic gas of 20 % CO reads about 1150 mV; ±15 mV."""
    assert A.probe_voltage_for_potential(1.0, 925 + K) == pytest.approx(1150, abs=15)


def test_one_percent_carbon_at_1700F_dew_point_and_co2():
    """Common practice (from memory): 1.0 %C at 1700 °F in endothermic gas from natural gas is a dew point of about
    +15 to +20 °F and about 0.1 % CO2; the equilibria give +15 °F and 0.107 % (checked within ±8 °F and 0.07–0.15 %)."""
    gas = A.Gas((1700 - 32) / 1.8 + K)
    dew_f = (A.reading_for_potential("dew_point", 1.0, gas) - K) * 1.8 + 32.0
    assert 10.0 <= dew_f <= 25.0
    assert 0.0007 <= A.reading_for_potential("co2", 1.0, gas) <= 0.0015


@pytest.mark.parametrize("kind", ["mv", "dew_point", "co2", "carbon_potential"])
@pytest.mark.parametrize("carrier", ["natural-gas-endo", "propane-endo", "nitrogen-methanol"])
@pytest.mark.parametrize("celsius", [850, 925, 1000])
def test_every_reading_round_trips(kind, carrier, celsius):
    c = A.CARRIERS[carrier]
    gas = A.Gas(celsius + K, c.co, c.h2)
    for potential in (0.3, 0.8, 1.0):
        value = A.reading_for_potential(kind, potential, gas)
        assert A.potential_from_reading(kind, value, gas) == pytest.approx(potential, rel=1e-9)


def test_directions_of_the_readings():
    """A richer gas: a higher probe reading, a lower dew point, less CO2. At the same probe reading more CO means a
    richer gas (a_C = p_CO / (K p_O2^½))."""
    gas = A.Gas(925 + K)
    lean, rich = A.readings_for_potential(0.7, gas), A.readings_for_potential(1.1, gas)
    assert rich["mv"] > lean["mv"] and rich["dew_point"] < lean["dew_point"] and rich["co2"] < lean["co2"]
    assert A.carbon_potential_from_probe(1150, 925 + K, 0.23) > A.carbon_potential_from_probe(1150, 925 + K, 0.20)


def test_carriers_from_their_stoichiometry():
    """Endothermic gas: CH4 + ½(O2 + 3.76 N2) → CO + 2 H2 + 1.88 N2 gives 20.5 % CO, 41 % H2; C3H8 + 1.5(O2 + 3.76 N2)
    → 3 CO + 4 H2 + 5.64 N2 gives 23.7 % CO, 31.6 % H2; cracked methanol with 40 % N2 gives 20 % CO, 40 % H2. The
    carriers' common-practice figures lie within 1 % (points) of these."""
    for key, (co, h2) in {"natural-gas-endo": (1 / 4.88, 2 / 4.88), "propane-endo": (3 / 12.64, 4 / 12.64),
                          "nitrogen-methanol": (0.6 / 3, 1.2 / 3)}.items():
        carrier = A.CARRIERS[key]
        assert carrier.co == pytest.approx(co, abs=0.01) and carrier.h2 == pytest.approx(h2, abs=0.01)
    assert A.carrier_from_text("CO=30 H2=60") == ("own", 0.30, 0.60)
    assert A.carrier_from_text("propane-endo") == ("propane-endo", 0.235, 0.315)


@pytest.mark.parametrize("text,field", [("CO=60 H2=30", "carrier"), ("H2=40", "carrier"), ("CO=30 H2=90", "carrier"),
                                        ("CO=40 H2=70", "carrier"), ("argon", "carrier"), ("CO=x", "carrier")])
def test_a_carrier_that_cannot_be_is_refused(text, field):
    with pytest.raises(InputError) as error:
        A.carrier_from_text(text)
    assert error.value.field == field


# -- refusals ------------------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("call,field", [
    (lambda: A.carbon_potential_from_probe(500.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(0.0, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(math.nan, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1e9, 1198.15), "mv"),
    (lambda: A.carbon_potential_from_probe(1150.0, 1198.15, core_potential=-1.0), "core_potential"),
    (lambda: A.potential_from_reading("carbon_potential", math.nan, A.Gas(1198.15)), "carbon_potential"),
    (lambda: A.carbon_potential_from_probe(1150.0, 1198.15, 0.9), "carrier_co"),
    (lambda: A.probe_voltage_for_potential(1.0, 600 + K), "temperature"),
    (lambda: A.probe_voltage_for_potential(3.0, 1198.15), "carbon_potential"),
    (lambda: A.potential_from_reading("dew_point", 80 + K, A.Gas(1198.15)), "dew_point"),
    (lambda: A.potential_from_reading("dew_point", -7 + K, A.Gas(1198.15, 0.2, 0.0)), "carrier_h2"),
    (lambda: A.potential_from_reading("co2", 0.0, A.Gas(1198.15)), "co2"),
    (lambda: A.potential_from_reading("co2", 1.5, A.Gas(1198.15)), "co2"),
])
def test_bad_input_names_the_field(call, field):
    with pytest.raises(InputError) as error:
        call()
    assert error.value.field == field


@pytest.mark.parametrize("kind", ["mv", "dew_point", "co2"])
@pytest.mark.parametrize("celsius", [800, 925, 1100])
def test_graphite_saturation_and_the_lean_end_bound_every_reading(kind, celsius):
    """Each reading is read from the least carburizing potential (0.10 %C, the program's floor) up to graphite
    saturation (a_C = 1, where soot deposits); just beyond either end it is refused, naming the limit in the reading
    and in %C."""
    gas = A.Gas(celsius + K)
    window = A.reading_window(gas)
    assert window.graphite == pytest.approx(A.carbon_for_activity(1.0, gas.T), rel=1e-12)
    richer = 1.0 if A.READINGS[kind].richer_when_higher else -1.0
    step = {"mv": 0.5, "dew_point": 0.05, "co2": 1e-6}[kind]
    top, bottom = window.at(kind, window.graphite), window.at(kind, window.least)
    assert A.potential_from_reading(kind, top - richer * step, gas) == pytest.approx(window.graphite, abs=0.02)
    assert A.potential_from_reading(kind, bottom, gas) == pytest.approx(0.10, rel=1e-9)
    with pytest.raises(InputError, match="graphite saturation") as error:
        A.potential_from_reading(kind, top + richer * step, gas)
    assert error.value.field == kind and f"{window.graphite:.2f} %C" in error.value.message
    with pytest.raises(InputError, match="decarburizing") as error:
        A.potential_from_reading(kind, bottom - richer * 10 * step, gas)
    assert error.value.field == kind and "0.10 %C" in error.value.message


def test_a_reading_at_or_below_0_mV_is_no_furnace_atmosphere():
    """Nernst, air reference: E = 0 exactly where the gas holds the oxygen of air, E < 0 only in a gas richer in
    oxygen than air — no furnace atmosphere; refused with the field, 0 mV and the window named."""
    assert A.oxygen_probe_pressure(0.0, 1198.15) == pytest.approx(0.209, rel=1e-12)
    for E in (0.0, -5.0):
        with pytest.raises(InputError, match="above 0 mV") as error:
            A.carbon_potential_from_probe(E, 1198.15)
        assert error.value.field == "mv" and "1019–1170 mV (0.10–1.26 %C)" in error.value.message


def test_a_reading_that_decarburizes_the_steel_is_refused_naming_its_floor():
    """With the steel given, the floor is the potential that holds its core carbon: 8620 holds 0.205 %C at the
    core; Gunnarson's alloy factor 1.027 (this program's value) makes that a potential of 0.205 / 1.027 ≈ 0.20 %C."""
    T = 925 + K
    core_potential = 0.205 / 1.027
    gas = A.Gas(T)
    window = A.reading_window(gas, core_potential)
    floor_mv = window.at("mv", window.least)
    assert window.least == pytest.approx(core_potential) and floor_mv > A.reading_window(gas).at("mv", 0.10)
    reading = A.probe_voltage_for_potential(0.15, T)  # carburizes a 0.10 %C steel, decarburizes 8620
    assert A.carbon_potential_from_probe(reading, T) == pytest.approx(0.15, rel=1e-9)
    with pytest.raises(InputError, match="steel's core carbon") as error:
        A.carbon_potential_from_probe(reading, T, core_potential=core_potential)
    assert f"{floor_mv:.0f} mV" in error.value.message and "0.20 %C" in error.value.message
    assert A.reading_window(gas, 0.05).least == 0.10


# -- β from the gas ------------------------------------------------------------------------------------------------
def test_beta_from_the_gas_lies_in_the_published_range_and_follows_co_times_h2():
    """1–3e-5 cm/s in endothermic gas at 900–950 °C (Karabelchtchikova 2007; Ruck, Monceau & Grabke 1996; from
    memory); proportional to p_CO·p_H2 (Grabke's kinetics) and rising with temperature."""
    for celsius in (900, 925, 950):
        for key in ("natural-gas-endo", "propane-endo", "nitrogen-methanol"):
            c = A.CARRIERS[key]
            assert 1e-7 <= beta_from_gas(celsius + K, c.co, c.h2) <= 3e-7
    T = 925 + K
    assert beta_from_gas(T, 0.20, 0.40) == pytest.approx(1.5e-7, rel=1e-12)
    assert beta_from_gas(T, 0.30, 0.60) / beta_from_gas(T, 0.20, 0.40) == pytest.approx(2.25, rel=1e-12)
    assert beta_from_gas(950 + K, 0.2, 0.4) > beta_from_gas(T, 0.2, 0.4) > beta_from_gas(880 + K, 0.2, 0.4)


def test_a_ramp_carries_beta_at_its_temperature():
    """A drop from 925 to 845 °C with β from the gas: at each moment β is the gas's at that temperature."""
    beta_end = beta_from_gas(845 + K, 0.2, 0.4)
    ramp = Ramp(925 + K, 845 + K, 1.0, 0.8, 1.0, beta_end, 1800.0, beta_activation=110e3)
    for t in (0.0, 900.0, 1800.0):
        condition = ramp(t)
        assert condition.beta == pytest.approx(beta_from_gas(condition.temperature, 0.2, 0.4), rel=1e-12)


def test_a_soak_alone_gives_the_same_case_with_the_gas_beta_as_with_that_beta_typed():
    """The gas relation only chooses β: one soak without the shop's stages, at 950 °C, with β from the gas equals the
    same plan with that β typed in (to 1e-9)."""
    gas = Plan(temperature=950 + K, count_shop_stages=False)
    typed = Plan(temperature=950 + K, count_shop_stages=False, beta_model="constant",
                 beta=beta_from_gas(950 + K, 0.20, 0.40))
    assert evaluate(gas).soak_time == pytest.approx(evaluate(typed).soak_time, rel=1e-9)
    richer = Plan(temperature=950 + K, count_shop_stages=False, carrier="own", carrier_co=30.0, carrier_h2=60.0)
    assert evaluate(richer).soak_time < evaluate(gas).soak_time  # a faster surface reaction: a shorter soak
    assert evaluate(richer).setup.beta == pytest.approx(2.25 * evaluate(gas).setup.beta, rel=1e-12)


# -- plans ---------------------------------------------------------------------------------------------------------
def test_plans_carry_the_readings_of_their_held_stages():
    single = evaluate(Plan().values())
    assert [r.label for r in single.readings] == ["Soak", "Equalize"]
    soak = single.readings[0]
    gas = A.Gas(single.setup.temperature)
    assert soak.values["mv"] == pytest.approx(A.reading_for_potential("mv", 1.0, gas), rel=1e-12)
    assert soak.values["dew_point"] == pytest.approx(A.reading_for_potential("dew_point", 1.0, gas), rel=1e-12)
    assert soak.low["mv"] < soak.values["mv"] < soak.high["mv"]  # the shop's ±0.05 %C band
    assert soak.low["dew_point"] > soak.values["dew_point"] > soak.high["dew_point"]
    boosted = evaluate(Plan(process="boost-diffuse").values())
    assert [label for label, _ in boosted.probe][:2] == ["Boost", "Diffuse"]
    assert boosted.probe[0][1] > boosted.probe[1][1]  # the boost gas is the richer
    richer_gas = evaluate(Plan(carrier="own", carrier_co=23.0).values())
    assert richer_gas.probe[0][1] < single.probe[0][1]  # more CO: the same potential at a lower reading
    data = single.to_dict()
    assert data["atmosphere_readings"][0]["probe_mv"] == pytest.approx(soak.values["mv"])
    assert {"dew_point_c", "co2_pct", "carbon_potential_pct", "dew_point_c_band"} <= set(data["atmosphere_readings"][0])
    assert (data["carrier"], data["controlled_on"], data["gas_data"]) == ("natural-gas-endo", "probe_mv",
                                                                         "nasa-glenn-2002")


def test_the_floor_sheet_gives_the_setpoints_in_the_reading_the_furnace_runs_on():
    """Controlled on dew point: the setpoint table's reading column is the dew point with the band the shop's
    potential tolerance gives it (the rich end is the low dew point), and the result line names it."""
    from casedepth.units import DisplayUnits

    outcome = evaluate(Plan(control_reading="dew_point"))
    sheet = outcome.sheet(DisplayUnits())
    assert sheet.setpoint_header[-1] == "dew point (ideal)" and sheet.header[-1] == "dew point"
    soak = next(row for row in sheet.setpoints if row[0] == "Soak")
    reading = outcome.readings[0]
    assert soak[-1] == f"{A.READINGS['dew_point'].show(reading.high['dew_point'])} to " \
                       f"{A.READINGS['dew_point'].show(reading.low['dew_point'])}"
    assert "dew point band it gives (ideal; natural-gas endo, 20 % CO, 40 % H2)" in sheet.setpoint_notes[0]
    probe = evaluate(Plan()).sheet(DisplayUnits())
    assert probe.setpoint_header[-1] == "probe (ideal)" and next(r for r in probe.setpoints if r[0] == "Soak")[-1].endswith(" mV")


def test_a_schema_8_plan_keeps_its_probe_set_points_and_is_offered_the_tables():
    """Made with the first releases' Gibbs energy and one β (tests/data/plans/schema-8, recorded set points checked
    in test_plan): the newer thermochemistry, offered, reads the probe 4–6 mV higher and leaves the soak alone; β
    from the gas, offered, changes the soak."""
    from pathlib import Path
    old = load(Path(__file__).parent / "data" / "plans" / "schema-8.cdplan.json")
    assert (old.carrier, old.carrier_co, old.beta_model, old.gas_data) == ("own", 23.0, "constant",
                                                                           "linear-first-release")
    before = evaluate(old)
    offers = {o.key: o for o in old.offers()}
    assert set(offers) == {"beta_model", "gas_data"}
    old.accept(offers["gas_data"])
    newer = evaluate(old)
    assert newer.soak_time == before.soak_time
    assert all(4.0 < b[1] - a[1] < 6.0 for a, b in zip(before.probe, newer.probe))
    old.accept(offers["beta_model"])
    assert evaluate(old).soak_time != pytest.approx(before.soak_time, rel=1e-3)


# -- the command line ------------------------------------------------------------------------------------------------
def test_probe_command_gives_every_reading(capsys):
    assert main(["probe", "--temperature", "925C", "--potential", "1.0", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    gas = A.Gas(925 + K)
    assert data["probe_mv"] == pytest.approx(A.probe_voltage_for_potential(1.0, 925 + K))
    assert data["dew_point_c"] == pytest.approx(A.reading_for_potential("dew_point", 1.0, gas) - K)
    assert data["co2_pct"] == pytest.approx(100 * A.reading_for_potential("co2", 1.0, gas))
    assert main(["probe", "--temperature", "1700F", "--dew-point", "20F", "--carrier", "propane-endo", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["dew_point_c"] == pytest.approx(-20 / 3, abs=1e-9) and data["carrier_co_pct"] == pytest.approx(23.5)
    assert main(["probe", "--temperature", "925C", "--co2", "0.2", "--carrier", "CO=20 H2=40"]) == 0
    out = capsys.readouterr().out
    assert "0.200 %  (given)" in out and "%C" in out and "mV" in out and "°F" in out
    assert main(["probe", "--temperature", "925C", "--mv", "1150", "--carrier-co", "90"]) == 2
    assert "--carrier-co" in capsys.readouterr().err


@pytest.mark.parametrize("argv,flag,words", [
    (["--mv", "-3"], "--mv", "above 0 mV"),
    (["--mv", "1200"], "--mv", "graphite saturation (1170 mV, 1.26 %C)"),
    (["--mv", "1000"], "--mv", "0.10 %C (1019 mV)"),
    (["--mv", "1040", "--steel", "8620"], "--mv", "steel's core carbon (0.20 %C, 1056 mV)"),
    (["--potential", "0.15", "--steel", "8620"], "--potential", "steel's core carbon (0.20 %C)"),
    (["--potential", "1.3"], "--potential", "graphite saturation at 925 °C with 20 % CO, 40 % H2 (1.26 %C, 1170 mV)"),
    (["--dew-point", "40C"], "--dew-point", "decarburizing"),
    (["--co2", "0.01"], "--co2", "graphite saturation"),
    (["--co2", "x"], "--co2", ""),
    (["--mv", "1100", "--steel", "nonesuch"], "--steel", "no grade"),
    (["--mv", "1100", "--carrier", "argon"], "--carrier", "not a carrier"),
])
def test_probe_command_refuses_readings_in_one_line(capsys, argv, flag, words):
    assert main(["probe", "--temperature", "925C", *argv]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith(f"casedepth: error: {flag}: ") and words in err


def test_the_cautions_state_the_carrier_and_methanol():
    """The flammable-and-toxic caution states the plan's CO and H2; a nitrogen–methanol carrier adds methanol's
    caution (toxic, near-invisible flame; admitted hot, as NFPA 86 practice admits any flammable atmosphere)."""
    endo = evaluate(Plan())
    assert any("20 % CO, 40 % H2 and 40 % N2" in c.text for c in endo.cautions if c.key == "flammable-toxic")
    methanol = evaluate(Plan(carrier="nitrogen-methanol"))
    keys = [c.key for c in methanol.cautions]
    assert "methanol" in keys and "methanol" not in [c.key for c in endo.cautions]
    richer = evaluate(Plan(carrier="own", carrier_co=30.0, carrier_h2=60.0))
    assert any("30 % CO, 60 % H2 and 10 % N2" in c.text for c in richer.cautions)


@pytest.mark.parametrize("text,kind", [("1150mV", "mv"), ("dew point 20F", "dew_point"), ("dp -7C", "dew_point"),
                                       ("CO2 0.15%", "co2"), ("1.0%C", "carbon_potential")])
def test_a_plan_takes_its_potential_as_the_furnace_reads_it(text, kind, capsys):
    """``--potential-as``: the potential the reading means at the plan's temperature in its carrier, and the plan
    controlled on that reading; the same as converting first and typing the potential."""
    assert main(["carburize", "--steel", "8620", "--temperature", "925C", "--carrier", "propane-endo",
                 "--potential-as", text, "--target", "1mm", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    read, value = A.reading_from_text(text)
    expected = A.potential_from_reading(read, value, A.Gas(925 + K, 0.235, 0.315))
    assert read == kind and data["carbon_potential_pct"] == pytest.approx(expected, rel=1e-12)
    assert data["controlled_on"] == A.READINGS[kind if kind != "carbon_potential" else "mv"].json_key


def test_a_reading_that_is_not_one_is_refused_naming_the_option(capsys):
    assert main(["carburize", "--temperature", "925C", "--potential-as", "twenty", "--target", "1mm"]) == 2
    assert "--potential-as" in capsys.readouterr().err
    assert main(["carburize", "--temperature", "925C", "--potential", "0.9", "--potential-as", "1150mV", "--target",
                 "1mm"]) == 2
    assert "give the potential once" in capsys.readouterr().err
