"""The plan state object: edits, undo/redo, files, evaluation, cautions (no Qt)."""

import json
import math
from pathlib import Path

import pytest

from casedepth import safety
from casedepth.errors import InputError
from casedepth.plan import FIELDS, SCHEMA_VERSION, Plan, PlanFileError, evaluate

PLANS = Path(__file__).parent / "data" / "plans"


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
                shop={"furnace_rate_per_h": 80.0, "parts_per_load": 50}, treatment="nitriding", kn=2.0,
                compound_min=4e-6, compound_max=8e-6, core_hardness=310.0, surface_hardness=800.0,
                n_multiplier=0.5, two_stage=True, kn_second=0.4)
    return plan


def test_every_field_is_changed_by_the_fixture():
    assert all(changed_plan().values()[name] != Plan().values()[name] for name in FIELDS)


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


def test_save_and_open_round_trip_every_field(tmp_path):
    plan = changed_plan()
    path = tmp_path / "shaft.cdplan.json"
    plan.save(path)
    assert not plan.modified
    again = Plan.load(path)
    for name in FIELDS:
        a, b = plan.values()[name], again.values()[name]
        assert b == (pytest.approx(a, rel=1e-12) if isinstance(a, float) else a), name
    assert json.loads(path.read_text())["schema_version"] == SCHEMA_VERSION


@pytest.mark.parametrize("path", sorted(PLANS.glob("*.json")), ids=lambda p: p.name)
def test_files_of_every_schema_version_still_open(path):
    """One example file per schema version ever released is kept in tests/data/plans."""
    plan = Plan.load(path)
    outcome = evaluate(plan.values())
    if outcome.process == "nitriding":
        assert outcome.aim.nitrided_depth > 0 and outcome.aim.time > 0
    else:
        assert outcome.case_depth > 0 and outcome.quote.total_h > 0


def test_saving_never_loses_the_old_file(tmp_path, monkeypatch):
    path = tmp_path / "plan.cdplan.json"
    Plan(title="first").save(path)
    before = path.read_text()

    def broken(*args, **kwargs):
        raise OSError("disk full")

    monkeypatch.setattr("os.fsync", broken)
    with pytest.raises(OSError):
        Plan(title="second").save(path)
    assert path.read_text() == before
    assert [p.name for p in tmp_path.iterdir()] == ["plan.cdplan.json"]


@pytest.mark.parametrize("content,words", [
    ("{not json", "not valid JSON"),
    ('{"kind": "something else"}', "not a casedepth plan"),
    ('{"kind": "casedepth plan", "schema_version": 99}', "newer casedepth"),
    ('{"kind": "casedepth plan", "schema_version": 1, "temperature_c": "hot"}', "should be a number"),
])
def test_unreadable_files(tmp_path, content, words):
    path = tmp_path / "bad.json"
    path.write_text(content)
    with pytest.raises(PlanFileError, match=words):
        Plan.load(path)


def test_evaluate_gives_window_times():
    outcome = evaluate(Plan().values())
    assert outcome.low.soak_time < outcome.aim.soak_time < outcome.high.soak_time
    assert outcome.aim.target_depth == pytest.approx(1.0e-3)


@pytest.mark.parametrize("changes,field", [
    ({"temperature": 700 + 273.15}, "temperature"),
    ({"carbon_potential": 5.0}, "carbon_potential"),
    ({"case_max": 0.5e-3}, "case_max"),
    ({"shape": "cylinder", "size": 1.5e-3}, "case_max"),
    ({"threshold_value": 0.1}, "threshold_value"),
    ({"composition": {"Mn": 0.8}}, "composition"),
    ({"shape": "sphere", "size": 1e-5}, "size"),
    ({"process": "boost-diffuse", "boost_potential": 5.0}, "boost_potential"),
])
def test_evaluate_names_the_plan_field(changes, field):
    plan = Plan(**changes)
    with pytest.raises(InputError) as error:
        evaluate(plan.values())
    assert error.value.field == field


def test_the_unused_furnace_potential_does_not_block_other_cycles():
    """In boost/diffuse the furnace step's own potential is greyed out in the window: a value left out of range
    there must not stop the plan, and the setup (and its cautions) stand for the boost atmosphere."""
    outcome = evaluate(Plan(process="boost-diffuse", carbon_potential=5.0, boost_potential=1.15).values())
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
