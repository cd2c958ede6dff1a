"""The plan state object and its files: edits, undo/redo, strict reading, old files keeping their numbers (no Qt)."""

import json
import math
import os
import stat
from pathlib import Path

import pytest

from casedepth import safety
from casedepth.errors import InputError
from casedepth.parameters import PARAMETERS
from casedepth.plan import SCHEMA_VERSION, Plan, PlanFileError, evaluate, from_dict, load, save, to_dict
from casedepth.treatments import TREATMENTS

PLANS = Path(__file__).parent / "data" / "plans"
OLD_FILES = sorted(PLANS.glob("schema-*.cdplan.json"))


def changed_plan() -> Plan:
    """A plan with every field away from its default."""
    plan = Plan()
    plan.choose_steel("20MnCr5")
    plan.update(title="Spline shaft SS-8", part="SS-8", revision="C", notes="two lines\nof notes", shape="cylinder", size=0.045,
                temperature=950 + 273.15, carbon_potential=1.1, case_min=0.5e-3, case_max=0.7e-3, aim=0.3,
                threshold_kind="HRC", threshold_value=52.0, diffusivity="arrhenius", d_multiplier=1.2,
                d0=2.0e-5, q=140e3, beta=2.2e-7, beta_held=True, alloy_factor=False,
                hardness_relation="as-quenched", composition={"C": 0.19, "Mn": 1.2, "Cr": 1.1},
                process="stages", surface_min=0.7, surface_max=0.9, boost_potential=1.1, diffuse_potential=0.75,
                stages=[{"kind": "soak", "duration_h": 5.0, "temperature_c": 950.0, "carbon_potential_pct": 1.0}],
                shop={"furnace_rate_per_h": 80.0, "parts_per_load": 50}, count_shop_stages=False, treatment="nitriding",
                kn=2.0, compound_min=4e-6, compound_max=8e-6, core_hardness=310.0, surface_hardness=800.0,
                n_multiplier=0.5, two_stage=True, kn_second=0.4, layer_model="rate-law-2026")
    plan.update(zone_model="sharp-front-2026", n_diffusivity="bohnenkamp-1967", nitrided_limit=400.0, quench="still-water",
                quench_temperature=40 + 273.15, temper_temperature=160 + 273.15, temper_time=3 * 3600.0,
                surface_hrc_min=58.0, surface_hrc_max=62.0, core_hrc_min=30.0, core_hrc_max=42.0, furnace="IQ-3",
                load_number="L-0042", quantity=80.0, fixture="basket 2")
    plan.update(spread_distribution="normal", spread_composition="grade-range", spread_beta_factor=3.0,
                spread_samples=512.0, spread_section=1e-3)
    plan.update(hydrocarbon="propane", carbon_flux=200e-3 / 3600.0, surface_limit=1.2, pulse_count=5.0, max_hold=120.0,
                hardening_temperature=850 + 273.15, load_area=4.0, schedule="boost 2min, diffuse 8min")
    plan.update(carrier="propane-endo", carrier_co=23.5, carrier_h2=31.5, beta_model="constant", beta_multiplier=1.3,
                gas_data="linear-first-release", control_reading="dew_point",
                calibration="Pit 2: record fit #1 of 2026-12-01 (D × 1.1)", strength_multiplier=0.9,
                spread_d_factor=1.2)
    return plan


def test_every_field_is_changed_by_the_fixture():
    assert all(changed_plan().values()[key] != Plan().values()[key] for key in PARAMETERS)


def test_undo_redo_and_listeners():
    plan = Plan()
    heard = []
    plan.subscribe(lambda name, value: heard.append((name, value)))
    plan.set("temperature", 1223.15)
    plan.choose_steel("9310")
    assert plan.steel == "9310" and plan.composition["Ni"] == 3.25
    plan.undo()
    assert plan.steel == "8620" and plan.composition["C"] == 0.205  # steel and composition go back together
    plan.undo()
    assert plan.temperature == pytest.approx(1198.15)
    assert not plan.can_undo and plan.can_redo
    plan.redo()
    assert plan.temperature == pytest.approx(1223.15)
    assert ("temperature", 1223.15) in heard


def test_typing_coalesces_into_one_edit():
    plan = Plan()
    for value in (9.0, 92.0, 925.0):
        plan.set("carbon_potential", value / 1000, coalesce=True)
    plan.undo()
    assert plan.carbon_potential == 1.0
    assert not plan.can_undo


def test_values_are_typed_and_choices_checked():
    """A plan holds the types its table rows say: a misspelt choice or a text for a number is refused, naming the key."""
    plan = Plan()
    for key, value in (("threshold_kind", "hrc "), ("temperature", "hot"), ("alloy_factor", "yes"),
                       ("diffusivity", "magic"), ("stages", [{"kind": "bake", "duration_h": 1.0}]),
                       ("shop", {"furnace_rate": 9.0}), ("composition", {"C": 0.2, "Qq": 1.0})):
        with pytest.raises(InputError) as error:
            plan.set(key, value)
        assert error.value.field == key
    plan.set("case_min", 1)  # an int is a number
    assert isinstance(plan.case_min, float)


def test_picking_a_value_brings_its_companions():
    """One edit: a threshold kind brings its usual value (ISO 18203 550 HV; SAE J423 50 HRC), a shaft a diameter,
    a treatment the values its table row starts a plan from; undo takes all of it back."""
    plan = Plan()
    plan.set("threshold_kind", "HV")
    assert plan.threshold_value == 550.0
    plan.set("shape", "cylinder")
    assert plan.size == pytest.approx(0.03)
    plan.set("treatment", "nitriding")
    assert (plan.steel, plan.temperature, plan.case_max) == ("4140", pytest.approx(793.15), pytest.approx(0.5e-3))
    plan.undo()
    assert (plan.treatment, plan.steel) == ("carburizing", "8620")
    plan.update(threshold_kind="HRC", threshold_value=52.0)  # given together, the value given wins
    assert plan.threshold_value == 52.0


@pytest.mark.parametrize("treatment", list(TREATMENTS))
def test_a_new_plan_of_a_treatment_starts_where_the_window_starts(treatment):
    """Plan(treatment=…) made in Python gives the same values as switching a new plan to it (the window's way),
    and those values evaluate."""
    made = Plan(treatment)
    switched = Plan()
    switched.set("treatment", treatment)
    assert made.values() == switched.values()
    assert evaluate(made).depth > 0


def test_save_and_open_round_trip_every_field(tmp_path):
    plan = changed_plan()
    path = tmp_path / "shaft.cdplan.json"
    save(plan, path)
    assert not plan.modified
    again = load(path)
    for key in PARAMETERS:
        a, b = plan.values()[key], again.values()[key]
        assert b == (pytest.approx(a, rel=1e-12) if isinstance(a, float) else a), key
    data = json.loads(path.read_text())
    assert data["schema_version"] == SCHEMA_VERSION
    assert {row.file_key for row in PARAMETERS.values()} | {"kind", "schema_version"} == set(data)


@pytest.mark.parametrize("path", OLD_FILES, ids=lambda p: p.name)
def test_old_files_give_the_numbers_they_gave_when_written(path):
    """Each file in tests/data/plans was evaluated by the casedepth of its own schema (commit named beside it, in
    schema-N.expected.json); opened now, it gives the same numbers within 1e-3 (the solver's stated accuracy,
    0.1 %). A regression test against the program's own earlier output, not validation."""
    expected = json.loads(path.with_name(path.name.replace(".cdplan.json", ".expected.json")).read_text())["numbers"]
    outcome = evaluate(load(path))
    got = outcome.to_dict()
    assert got["soak_time_h"] == pytest.approx(expected["soak_time_h"], rel=1e-3)
    assert got["case_depth_mm"] == pytest.approx(expected["case_depth_mm"], rel=1e-3)
    for key in ("window_soak_time_h", "surface_carbon_pct", "boost_time_h", "diffuse_time_h", "compound_layer_um",
                "surface_hardness_hrc", "core_hardness_hrc"):
        if key in expected:
            assert got[key] == pytest.approx(expected[key], rel=1e-3), key
    if "probe_mv" in expected:  # the floor's set points (schema 8: the first releases' Gibbs energy, kept)
        assert [[row["stage"], row["mv"]] for row in got["probe_mv"]] == [
            [stage, pytest.approx(mv, abs=0.05)] for stage, mv in expected["probe_mv"]]
    if "stages" in expected:
        flat = [number for stage in got["stages"] for number in (stage["time_h"], stage["kn"])]
        assert flat == pytest.approx([number for stage in expected["stages"] for number in stage], rel=1e-3)


def test_migration_writes_the_models_and_policies_explicitly_and_offers_the_newer_ones():
    """Schema 1–3 one-soak plans counted the soak alone; a schema-3 nitriding plan grew its layer by the first
    release's rate law. Opened now they say so in their values (and in the file they save to), and the newer
    choice is offered, not applied; taking it is one undoable edit that changes the numbers."""
    old = load(PLANS / "schema-1.cdplan.json")
    assert old.count_shop_stages is False
    assert to_dict(old)["shop_stages_counted"] is False
    # and β from the gas (schema 9), the readings' newer Gibbs energies, the carbon → hardness relation (schema 6)
    offer, gas_beta, gas_data, relation = old.offers()
    assert (relation.key, relation.value) == ("hardness_relation", "structure-2026")
    assert (offer.key, offer.value) == ("count_shop_stages", True) and "schema 4" in offer.text
    assert (gas_beta.key, gas_beta.value, gas_data.key, gas_data.value) == ("beta_model", "gas-2026", "gas_data",
                                                                            "nasa-glenn-2002")
    before = evaluate(old).soak_time
    old.accept(offer)
    assert old.count_shop_stages and [o.key for o in old.offers()] == ["beta_model", "gas_data", "hardness_relation"]
    assert evaluate(old).soak_time < before  # the heat-up and drop now add case
    old.undo()
    assert evaluate(old).soak_time == before
    # its 550 HV threshold was a fixed carbon; from the quench it is read at the plan's own section and quench
    fixed = evaluate(old).setup.threshold_carbon
    old.accept(relation)
    newer = evaluate(old)
    assert newer.hardened is not None and newer.setup.threshold_carbon != pytest.approx(fixed, abs=0.01)
    assert newer.soak_time != pytest.approx(before, rel=0.02)
    old.undo()
    assert evaluate(old).soak_time == before
    nitrided = load(PLANS / "schema-3.cdplan.json")
    assert nitrided.layer_model == "rate-law-2026"
    # the shop-stage policy is not a nitriding one; the diffusion zone of schema 5 and earlier was the sharp front
    assert [o.key for o in nitrided.offers()] == ["layer_model", "zone_model"]
    for name in ("schema-4.cdplan.json", "schema-5.cdplan.json"):
        older = load(PLANS / name)
        assert (older.zone_model, older.n_diffusivity, older.nitrided_limit) == ("sharp-front-2026", "bohnenkamp-1967", None)
        [offer] = older.offers()
        assert (offer.key, offer.value) == ("zone_model", "precipitation-2026")
        before = evaluate(older).soak_time
        older.accept(offer)  # the precipitation model comes with the diffusivity its grade constants were set with
        assert (older.zone_model, older.n_diffusivity) == ("precipitation-2026", "da-silva-mclellan-1976")
        assert evaluate(older).soak_time > 1.5 * before  # 4140: the sharp front ran ahead of practice
        older.undo()
        assert evaluate(older).soak_time == before
    assert Plan().offers() == [] and Plan(treatment="nitriding").offers() == []


@pytest.mark.parametrize("path", OLD_FILES, ids=lambda p: p.name)
def test_an_old_file_saved_again_keeps_its_numbers(path, tmp_path):
    plan = load(path)
    save(plan, tmp_path / "again.cdplan.json")
    assert evaluate(load(tmp_path / "again.cdplan.json")).soak_time == evaluate(plan).soak_time


def test_saving_never_loses_the_old_file_and_keeps_its_permissions(tmp_path, monkeypatch):
    path = tmp_path / "plan.cdplan.json"
    save(Plan(title="first"), path)
    os.chmod(path, 0o640)
    before = path.read_text()

    def broken(*args, **kwargs):
        raise OSError("disk full")

    with monkeypatch.context() as patch:
        patch.setattr("os.fsync", broken)
        with pytest.raises(OSError):
            save(Plan(title="second"), path)
    assert path.read_text() == before
    assert [p.name for p in tmp_path.iterdir()] == ["plan.cdplan.json"]
    save(Plan(title="third"), path)
    assert stat.S_IMODE(path.stat().st_mode) == 0o640


def _file(**changes) -> str:
    data = to_dict(Plan())
    data.update(changes)
    return json.dumps(data)


@pytest.mark.parametrize("content,words", [
    ("{not json", "not valid JSON"),
    ('{"kind": "something else"}', "not a casedepth plan"),
    ('{"kind": "casedepth plan", "schema_version": 99}', "newer casedepth"),
    (_file(temperature_c="hot"), "temperature_c: 'hot' is not a number"),
    (_file(threshold_kind="hrc "), "threshold_kind: 'hrc ' is not one of carbon, HV, HRC"),
    (_file(diffusivity_model="tibetts"), "diffusivity_model: 'tibetts' is not one of"),
    (_file(alloy_factor="yes"), "alloy_factor: 'yes' is not true or false"),
    (_file(threshold_valu=0.4), "unknown key threshold_valu"),
    (_file(temperature_c=None), "temperature_c: None is not a number"),
    (_file(shop={"furnace_rate": 9}), "unknown entry furnace_rate"),
    (_file(stages=[{"kind": "soak", "duration_h": "5"}]), "stage 1: duration_h '5' is not a number"),
    (_file(composition_pct={"C": 0.2, "Zz": 1}), "unknown element"),
    (_file(treatment="annealing"), "treatment: 'annealing' is not one of carburizing, nitriding"),
    (_file(schema_version=True), "unknown schema version"),
])
def test_unreadable_files_name_the_key(tmp_path, content, words):
    path = tmp_path / "bad.json"
    path.write_text(content)
    with pytest.raises(PlanFileError, match=words):
        load(path)


def test_non_finite_numbers_in_a_file_are_refused(tmp_path):
    path = tmp_path / "bad.json"
    path.write_text(_file().replace('"threshold_value": 0.4', '"threshold_value": Infinity'))
    with pytest.raises(PlanFileError, match="threshold_value"):
        load(path)


def test_a_file_missing_a_key_of_its_schema_is_refused_and_later_keys_are_filled_and_reported():
    """Every key a schema holds must be in a file of it (no temperature, no plan: not a silent 925 °C); a key that
    came later is filled by the migration as for a new plan, and where it matters to the plan that is reported."""
    data = json.loads(_file())
    del data["beta_cm_per_s"]
    with pytest.raises(PlanFileError, match="beta_cm_per_s: missing"):
        from_dict(data)
    old = json.loads((PLANS / "schema-1.cdplan.json").read_text())
    del old["temperature_c"]
    with pytest.raises(PlanFileError, match="temperature_c: missing"):
        from_dict(old)
    nitrided = load(PLANS / "schema-3.cdplan.json")  # written before the nitrogen multiplier and the revision
    assert nitrided.n_multiplier == 1.0 and nitrided.revision == "A"
    assert any(note.startswith("nitrogen_diffusivity_multiplier: not in this file of schema 3") for note in
               nitrided.file_notes)
    assert not any("nitriding" in note for note in load(PLANS / "schema-1.cdplan.json").file_notes)


@pytest.mark.parametrize("change,words", [
    ({"title": "x" * 201}, "title: 201 characters is more than the 200"),
    ({"notes": "y" * 20001}, "notes: 20001 characters"),
    ({"case_depth_max_mm": 1e308}, r"case_depth_max_mm: 1e\+308 mm is beyond any value"),
    ({"stages": [{"kind": "soak", "duration_h": 1.0}] * 101}, "101 stages are more than the 100"),
    ({"stages": [{"kind": "soak", "duration_h": 1.0, "extra": [[[[1]]]]}]}, "unknown entry extra"),
])
def test_absurd_values_in_a_file_are_refused(tmp_path, change, words):
    path = tmp_path / "absurd.cdplan.json"
    path.write_text(_file(**change))
    with pytest.raises(PlanFileError, match=words):
        load(path)


def test_a_deeply_nested_or_huge_file_is_refused(tmp_path):
    path = tmp_path / "deep.cdplan.json"
    path.write_text('{"kind": "casedepth plan", "notes": ' + "[" * 100000 + "]" * 100000 + "}")
    with pytest.raises(PlanFileError, match="nested too deeply|not valid JSON"):
        load(path)
    path.write_bytes(b" " * 6_000_000)
    with pytest.raises(PlanFileError, match="far more than any plan file"):
        load(path)


def test_evaluate_gives_window_times():
    outcome = evaluate(Plan())
    low, aim, high = outcome.soak_window
    assert low < aim < high
    assert outcome.depth == pytest.approx(1.0e-3)


@pytest.mark.parametrize("changes,field", [
    ({"temperature": 700 + 273.15}, "temperature"),
    ({"temperature": 1300 + 273.15}, "temperature"),
    ({"carbon_potential": 5.0}, "carbon_potential"),
    ({"case_max": 0.5e-3}, "case_max"),
    ({"shape": "cylinder", "size": 1.5e-3}, "case_max"),
    ({"threshold_value": 0.1}, "threshold_value"),
    ({"threshold_value": 1000.0}, "threshold_value"),
    ({"composition": {"Mn": 0.8}}, "composition"),
    ({"shape": "sphere", "size": 1e-5}, "size"),
    ({"shape": "cylinder", "size": None}, "size"),
    ({"process": "boost-diffuse", "boost_potential": 5.0}, "boost_potential"),
    ({"process": "boost-diffuse", "surface_min": 0.3, "surface_max": 0.35}, "surface_min"),
    ({"shop": {"heat_up_h": 2.0, "drop_temperature_c": 700.0}}, "shop"),
    ({"d_multiplier": 50.0}, "d_multiplier"),
    ({"aim": 1.5}, "aim"),
])
def test_evaluate_names_the_plan_field(changes, field):
    with pytest.raises(InputError) as error:
        evaluate(Plan(**changes))
    assert error.value.field == field
    assert error.value.message  # names the allowed range or what to change


@pytest.mark.parametrize("changes,field", [
    ({"kn": 50.0}, "kn"), ({"kn_second": 10.0, "two_stage": True}, "kn_second"), ({"temperature": 600 + 273.15}, "temperature"),
    ({"core_hardness": 2000.0}, "core_hardness"), ({"n_multiplier": 0.0}, "n_multiplier"),
    ({"compound_min": 12e-6, "compound_max": 8e-6}, "compound_max"),
])
def test_nitriding_evaluate_names_the_plan_field(changes, field):
    with pytest.raises(InputError) as error:
        evaluate(Plan("nitriding", **changes))
    assert error.value.field == field


def test_the_unused_furnace_potential_does_not_block_other_cycles():
    """In boost/diffuse the furnace step's own potential plays no part: a value left out of range there must not
    stop the plan, and the setup (and its cautions) stand for the boost atmosphere."""
    outcome = evaluate(Plan(process="boost-diffuse", carbon_potential=5.0, boost_potential=1.15))
    assert outcome.boost_time > 0
    assert outcome.setup.carbon_potential == pytest.approx(1.15)


def test_cautions_depend_on_the_inputs():
    """NFPA 86 practice: flammable atmospheres only at or above about 760 °C (1400 °F)."""
    cold = safety.cautions(700 + 273.15)
    assert cold[0].pressing and "760 °C" in cold[0].text
    hot = safety.cautions(925 + 273.15, 1.0, 1.3)
    assert not any(c.pressing for c in hot)
    assert {c.key for c in hot} >= {"flammable-toxic", "admission", "quench-oil"}
    assert any("CO" in c.text for c in hot)
    sooty = safety.cautions(925 + 273.15, 1.5, 1.3)
    assert sooty[0].key == "soot"
    assert "NFPA 86" in safety.DEFERENCE and "licensed practice" in safety.DEFERENCE
    assert math.isclose(safety.SAFE_ADMISSION_TEMPERATURE - 273.15, 760.0)


def test_every_default_passes_its_own_check():
    """A plan that keeps a choice's default is not checked against the choice's table (its module is not loaded
    for it: start-up); so every row's default must be one its table allows."""
    from casedepth.parameters import Choice

    for key, row in PARAMETERS.items():
        if isinstance(row.kind, Choice):
            assert row.kind.check(key, row.default) == row.default, key
