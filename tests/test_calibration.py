"""Calibration on a measured section (casedepth.calibration, `casedepth calibrate`).

Checks: with a constant diffusivity and a held surface the case grows exactly as √(D t) (erfc solution,
Crank 1975, eq. 2.45), so the multiplier must be (measured / predicted)²; and a depth made with a known
multiplier must give that multiplier back (carburizing with the shop's stages, and nitriding).
"""

import json
from pathlib import Path

import pytest

from casedepth.shop.calibration import calibrate_plan
from casedepth.cli import main
from casedepth.errors import InputError, NotReachableError
from casedepth.plan import Plan, evaluate, load, save

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"
NO_SHOP_STAGES = {"heat_up_h": 0.0, "drop_h": 0.0, "equalize_h": 0.0}


def test_constant_D_gives_the_square_of_the_depth_ratio():
    """erfc solution: depth ∝ √(D t), so m = (measured / predicted)² (Crank 1975); agreement 1e-3."""
    plan = Plan(diffusivity="arrhenius", beta_held=True, alloy_factor=False, shop=NO_SHOP_STAGES)
    soak = 6 * 3600.0
    found = calibrate_plan(plan, soak, 1.1e-3)
    assert found.field == "d_multiplier"
    assert found.multiplier == pytest.approx((1.1e-3 / found.predicted) ** 2, rel=1e-3)


@pytest.mark.parametrize("name,field,value", [("pinion-shaft.cdplan.json", "d_multiplier", 1.3),
                                              ("piston-rod-nitrided.cdplan.json", "n_multiplier", 0.45)])
def test_a_known_multiplier_comes_back(name, field, value):
    made = load(EXAMPLES / name)
    made.set(field, value)
    soak = 8 * 3600.0 if field == "d_multiplier" else 30 * 3600.0
    outcome = evaluate(made.values())
    depth = outcome.depth_after(soak)
    found = calibrate_plan(load(EXAMPLES / name), soak, depth)
    assert found.field == field and found.multiplier == pytest.approx(value, rel=1e-4)


def test_bad_and_unreachable_measurements():
    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    with pytest.raises(InputError) as error:
        calibrate_plan(plan, 10.0, 1e-3)
    assert error.value.field == "soak"
    with pytest.raises(NotReachableError) as error:
        calibrate_plan(plan, 6 * 3600.0, 9e-3)
    assert error.value.field == "measured"
    with pytest.raises(InputError) as error:
        calibrate_plan(Plan(process="boost-diffuse"), 6 * 3600.0, 1e-3)
    assert error.value.field == "process"


def test_calibrate_command_writes_the_plan(tmp_path, capsys):
    path = tmp_path / "p.cdplan.json"
    save(load(EXAMPLES / "pinion-shaft.cdplan.json"), path)
    assert main(["calibrate", str(path), "--soak", "6h", "--measured", "0.95mm", "--write", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert load(path).d_multiplier == pytest.approx(round(data["multiplier"], 3))
    assert main(["calibrate", str(path), "--soak", "6h", "--measured", "9mm"]) == 2
    assert "--measured" in capsys.readouterr().err
