"""Furnace loads: one soak for several parts (casedepth.loads and `casedepth load`).

The load's soak must lie in every part's own soak range; each part's case at that soak is recomputed
by running its whole cycle afresh (run_recipe), an independent path from the planner that found the
ranges, so at a part's own range ends the case must come back to its drawing's minimum or maximum
(agreement 2e-4: the planner lands window ends to 1e-4, and the solver reproduces itself across step
sequences to about 2e-5).
"""

import json
from pathlib import Path

import pytest

from casedepth.cli import main
from casedepth.errors import InputError
from casedepth.shop.loads import plan_load
from casedepth.plan import Plan, evaluate, load, save

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"


def pinion(**changes) -> Plan:
    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    if "steel" in changes:
        plan.choose_steel(changes.pop("steel"))
    plan.update(**changes)
    return plan


def test_two_parts_share_a_soak_inside_both_windows():
    a = pinion()
    b = pinion(steel="20MnCr5", title="Idler pin IP-4 (demo)", case_min=0.9e-3, case_max=1.3e-3)
    loaded = plan_load([a, b])
    lo, hi = loaded.common
    assert lo == pytest.approx(max(p.soak_range[0] for p in loaded.parts))
    assert hi == pytest.approx(min(p.soak_range[1] for p in loaded.parts))
    assert lo <= loaded.soak <= hi
    assert all(part.inside for part in loaded.parts) and not loaded.warnings


def test_a_parts_range_ends_give_its_window_ends_when_rerun():
    plan = pinion()
    outcome = evaluate(plan.values())
    low, _, high = outcome.soak_window
    assert outcome.depth_after(low) == pytest.approx(plan.case_min, rel=2e-4)
    assert outcome.depth_after(high) == pytest.approx(plan.case_max, rel=2e-4)


def test_windows_that_do_not_overlap_split_the_load():
    loaded = plan_load([pinion(), pinion(title="Spacer SP-2 (demo)", case_min=0.5e-3, case_max=0.7e-3)])
    assert loaded.common is None and loaded.soak is None
    assert any("split the load" in w for w in loaded.warnings)


def test_nitrided_parts_share_a_load():
    rod = load(EXAMPLES / "piston-rod-nitrided.cdplan.json")
    pin = load(EXAMPLES / "piston-rod-nitrided.cdplan.json")
    pin.update(title="Guide pin GP-7 (demo)", case_min=0.35e-3, case_max=0.6e-3)
    loaded = plan_load([rod, pin])
    assert loaded.treatment == "nitriding" and all(part.inside for part in loaded.parts)


@pytest.mark.parametrize("other", [
    {"temperature": 950 + 273.15}, {"carbon_potential": 0.9}, {"process": "boost-diffuse"}, {"treatment": "nitriding"},
])
def test_parts_must_share_the_furnace_step(other):
    with pytest.raises(InputError) as error:
        plan_load([pinion(), pinion(**other)])
    assert error.value.field == "plan"


def test_load_command(tmp_path, capsys):
    save(pinion(), tmp_path / "a.cdplan.json")
    save(pinion(steel="20MnCr5", title="Idler pin IP-4 (demo)", case_min=0.9e-3, case_max=1.3e-3), tmp_path / "b.cdplan.json")
    assert main(["load", str(tmp_path / "a.cdplan.json"), str(tmp_path / "b.cdplan.json"), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["soak_time_h"] is not None and all(p["inside"] for p in data["parts"])
    save(pinion(temperature=950 + 273.15), tmp_path / "c.cdplan.json")
    assert main(["load", str(tmp_path / "a.cdplan.json"), str(tmp_path / "c.cdplan.json")]) == 2
    assert "PLAN" in capsys.readouterr().err
