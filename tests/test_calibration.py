"""Calibration on a measured section (casedepth.calibration, `casedepth calibrate`).

Checks: with a constant diffusivity and a held surface the case grows exactly as √(D t) (erfc solution,
Crank 1975, eq. 2.45), so the multiplier must be (measured / predicted)²; and a depth made with a known
multiplier must give that multiplier back (carburizing with the shop's stages, and nitriding).
"""

import json
from pathlib import Path

import pytest

from casedepth.shop.calibration import calibrate_plan, calibrate_traverse, parse_traverse, traverse_depth
from casedepth.cli import main
from casedepth.errors import InputError, NotReachableError
from casedepth.plan import Plan, evaluate, load, save

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"
OLD_ROD = Path(__file__).resolve().parent / "data" / "piston-rod-schema-3.cdplan.json"  # the sharp front
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


# -- a hardness traverse (nitriding) -----------------------------------------------------------------------------------
# The nitrided hardness depth is read where the hardness falls to core + 50 HV (DIN 50190-3, 1979, "Härtetiefe
# wärmebehandelter Teile; Ermittlung der Nitrierhärtetiefe"). The fit is checked on profiles the model itself makes
# with a known D_N multiplier; Vickers readings on a section scatter by about ±10 HV (common practice, from memory).

TRAVERSE_SOAK = 34 * 3600.0
TRAVERSE_DEPTHS = [d * 1e-3 for d in (0.04, 0.09, 0.14, 0.19, 0.24, 0.29, 0.34, 0.39, 0.44, 0.49, 0.54, 0.6)]


def _made_traverse(multiplier, noise=None):
    """Readings of the default nitriding plan's own hardness profile made with ``multiplier``, plus ``noise`` [HV]."""
    from dataclasses import replace

    import numpy as np

    from casedepth.nitriding.nitride import nitride

    made = nitride(replace(evaluate(Plan("nitriding").values()).setup, diffusivity_multiplier=multiplier), TRAVERSE_SOAK)
    hardness = np.interp(TRAVERSE_DEPTHS, made.depth, made.hardness) + (0.0 if noise is None else np.asarray(noise))
    return [(d, float(h)) for d, h in zip(TRAVERSE_DEPTHS, hardness)], made


def test_a_traverse_made_with_a_known_multiplier_gives_it_back():
    """The model's own profile with D_N × 0.6 gives 0.6 back (1 %), the model's depth after fitting matches it, and
    the depth read off the readings agrees with the model's to the spacing of the readings."""
    readings, made = _made_traverse(0.6)
    found = calibrate_traverse(Plan("nitriding"), TRAVERSE_SOAK, readings)
    assert found.field == "n_multiplier" and found.multiplier == pytest.approx(0.6, rel=1e-2)
    assert found.rms_after < 1.0 < found.rms_before
    assert found.model_depth == pytest.approx(made.nitrided_depth, rel=1e-2)
    assert found.traverse_depth == pytest.approx(made.nitrided_depth, abs=0.05e-3)
    assert "Multiplier 0.600" in found.describe() and "RMS misfit" in found.describe()


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_a_noisy_traverse_still_gives_the_multiplier(seed):
    """±10 HV of scatter on every reading (uniform, fixed seeds): the multiplier within 5 %."""
    import numpy as np

    readings, _ = _made_traverse(0.6, np.random.default_rng(seed).uniform(-10.0, 10.0, len(TRAVERSE_DEPTHS)))
    found = calibrate_traverse(Plan("nitriding"), TRAVERSE_SOAK, readings)
    assert found.multiplier == pytest.approx(0.6, rel=5e-2)
    assert found.rms_after < 10.0


def test_the_depth_read_off_a_traverse():
    """Linear interpolation between the readings either side of the limit; None where they never fall through it."""
    assert traverse_depth([0.1e-3, 0.2e-3, 0.3e-3], [500.0, 400.0, 300.0], 350.0) == pytest.approx(0.25e-3)
    assert traverse_depth([0.1e-3, 0.2e-3, 0.3e-3], [500.0, 450.0, 400.0], 350.0) is None
    assert traverse_depth([0.1e-3, 0.2e-3, 0.3e-3], [340.0, 330.0, 320.0], 350.0) is None


def test_parse_traverse():
    assert parse_traverse("0.05mm=590, 0.1 mm = 560 HV; 0.2=480hv\n0.012in=400") == [
        (pytest.approx(0.05e-3), 590.0), (pytest.approx(0.1e-3), 560.0), (pytest.approx(0.2e-3), 480.0),
        (pytest.approx(0.012 * 0.0254), 400.0)]
    assert parse_traverse("0.004=590", "in") == [(pytest.approx(0.004 * 0.0254), 590.0)]
    for text in ("", "0.1mm", "0.1mm=abc", "0.1xx=500", "=500", "0.1mm=500=600"):
        with pytest.raises(InputError) as error:
            parse_traverse(text)
        assert error.value.field == "traverse"


GOOD = [(0.1e-3, 560.0), (0.2e-3, 480.0), (0.3e-3, 400.0)]


@pytest.mark.parametrize("traverse,words", [
    (GOOD[:2], "at least 3"),
    ([(0.1e-3, 560.0), (0.3e-3, 480.0), (0.2e-3, 400.0)], "increase strictly"),
    ([(0.1e-3, 560.0), (0.1e-3, 480.0), (0.3e-3, 400.0)], "increase strictly"),
    ([(0.0, 560.0)] + GOOD[1:], "0–10 mm"),
    ([(-0.1e-3, 560.0)] + GOOD[1:], "0–10 mm"),
    (GOOD[:2] + [(11e-3, 400.0)], "0–10 mm"),
    (GOOD[:2] + [(0.3e-3, 40.0)], "50–1500 HV"),
    (GOOD[:2] + [(0.3e-3, 1600.0)], "50–1500 HV"),
    (GOOD[:2] + [(0.3e-3, float("nan"))], "50–1500 HV"),
    (GOOD[:2] + [(0.3e-3,)], "pair"),
    (5, "list"),
], ids=["two", "backwards", "repeated", "at-surface", "negative", "too-deep", "too-soft", "too-hard", "nan",
        "not-a-pair", "not-a-list"])
def test_bad_traverses_are_refused(traverse, words):
    with pytest.raises(InputError) as error:
        calibrate_traverse(Plan("nitriding"), TRAVERSE_SOAK, traverse)
    assert error.value.field == "traverse" and words in error.value.message


def test_traverses_that_cannot_be_fitted():
    """Carburizing plans, the first release's step-hardness zone, and readings best fitted at an end of 0.1–10."""
    with pytest.raises(InputError) as error:
        calibrate_traverse(load(EXAMPLES / "pinion-shaft.cdplan.json"), 6 * 3600.0, GOOD)
    assert error.value.field == "traverse" and "--measured" in error.value.message
    with pytest.raises(InputError) as error:
        calibrate_traverse(load(OLD_ROD), TRAVERSE_SOAK, GOOD)
    assert error.value.field == "traverse" and "sharp-front" in error.value.message
    for flat in (600.0, 305.0):  # hard all through: ever faster; at the core all through: ever slower
        with pytest.raises(NotReachableError) as error:
            calibrate_traverse(Plan("nitriding"), TRAVERSE_SOAK, [(d, flat) for d, _ in GOOD])
        assert error.value.field == "traverse" and "0.1–10" in error.value.message
    with pytest.raises(InputError) as error:
        calibrate_traverse(Plan("nitriding"), 10.0, GOOD)
    assert error.value.field == "soak"


def test_calibrate_command_fits_a_traverse(tmp_path, capsys):
    path = tmp_path / "n.cdplan.json"
    save(Plan("nitriding"), path)
    readings, _ = _made_traverse(0.6)
    text = ",".join(f"{d * 1e3:.4f}mm={h:.2f}HV" for d, h in readings)
    assert main(["calibrate", str(path), "--soak", "34h", "--traverse", text, "--write", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert set(data) == {"multiplier", "field", "rms_before_hv", "rms_after_hv", "traverse_depth_mm",
                         "model_depth_mm", "soak_time_h", "written"}
    assert data["field"] == "n_multiplier" and data["multiplier"] == pytest.approx(0.6, rel=1e-2) and data["written"]
    assert load(path).values()["n_multiplier"] == pytest.approx(round(data["multiplier"], 3))
    assert main(["calibrate", str(path), "--soak", "34h", "--traverse", text]) == 0
    assert "Multiplier 0.600" in capsys.readouterr().out


@pytest.mark.parametrize("extra", [["--traverse", "0.1mm=560,0.2mm=480"], ["--traverse", "0.1mm=560,0.2mm=480,0.1mm=400"],
                                   ["--traverse", "0.1mm=560,0.2mm=480,0.3mm=4000"], ["--traverse", "0.1mm=560,0.2mm"],
                                   [], ["--measured", "0.3mm", "--traverse", "0.1mm=560,0.2mm=480,0.3mm=400"]],
                         ids=["two", "backwards", "too-hard", "no-hardness", "neither", "both"])
def test_calibrate_command_refuses_bad_traverses(tmp_path, capsys, extra):
    path = tmp_path / "n.cdplan.json"
    save(Plan("nitriding"), path)
    assert main(["calibrate", str(path), "--soak", "34h", *extra]) == 2
    err = capsys.readouterr().err
    assert "--traverse" in err and err.count("\n") == 1 and "Traceback" not in err


def test_window_calibrates_on_a_traverse(window, qtbot):
    """The window's path: readings typed as text in the window's length unit; one undoable edit."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window._attach(Plan("nitriding"))
        window.calculate()
    readings, _ = _made_traverse(0.6)
    text = ", ".join(f"{d * 1e3:.4f}={h:.2f}" for d, h in readings)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        message = window.calibrate(TRAVERSE_SOAK, traverse=text)
    assert "Multiplier 0.600" in message and window.plan.values()["n_multiplier"] == pytest.approx(0.6)
    window.undo_action.trigger()
    assert window.plan.values()["n_multiplier"] == pytest.approx(1.0)
    assert "at least 3" in window.calibrate(TRAVERSE_SOAK, traverse="0.1=560, 0.2=480")
    assert window.plan.values()["n_multiplier"] == pytest.approx(1.0)


def test_the_dialog_offers_a_traverse_for_nitriding_only(window, qtbot, monkeypatch):
    """The dialog itself, answered by a stand-in for exec(): carburizing cannot pick a traverse; nitriding can, and
    OK with it calibrates."""
    from PySide6.QtWidgets import QDialog, QDialogButtonBox, QLineEdit, QRadioButton

    seen = {}

    def answer(dialog):
        radios = {r.text(): r for r in dialog.findChildren(QRadioButton)}
        seen["enabled"] = radios["Hardness traverse"].isEnabled()
        if seen["enabled"]:
            radios["Hardness traverse"].setChecked(True)
            dialog.findChild(QLineEdit, "traverse").setText(seen["text"])
        dialog.findChild(QDialogButtonBox).button(QDialogButtonBox.Ok).click()
        return dialog.result()

    monkeypatch.setattr(QDialog, "exec", answer)
    window.calibrate_dialog()  # a new plan: carburizing
    assert seen["enabled"] is False
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window._attach(Plan("nitriding"))
        window.calculate()
    readings, _ = _made_traverse(0.6)
    seen["text"] = ", ".join(f"{d * 1e3:.4f}={h:.2f}" for d, h in readings)
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.calibrate_dialog()
    assert seen["enabled"] is True and window.plan.values()["n_multiplier"] == pytest.approx(0.6)
