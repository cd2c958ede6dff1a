"""The window's furnace-reading converter (Edit → Convert a furnace reading) and the atmosphere fields of the form:
the same numbers as casedepth.models.atmosphere.convert_reading and the command line's ``probe`` (one path)."""

import pytest

pytest.importorskip("pytestqt")

from casedepth.models import atmosphere as A  # noqa: E402

K = 273.15


def test_the_converter_gives_what_the_library_gives(window):
    window.plan.update(carrier="propane-endo", carrier_co=23.5, carrier_h2=31.5, temperature=930 + K)
    window.reading_dialog()
    dialog = window.reading_converter
    assert dialog.carrier.currentData() == "propane-endo" and dialog.temperature.value() == 930
    dialog.kind.setCurrentIndex(dialog.kind.findData("dew_point"))
    dialog.value.setText("20F")
    expected = A.convert_reading("dew_point", (20 - 32) / 1.8 + K, A.Gas(930 + K, 0.235, 0.315))
    for key, value in expected.items():
        assert dialog.answers[key].text().startswith(A.READINGS[key].show(value))
    assert "(given)" in dialog.answers["dew_point"].text() and dialog.message.text() == ""
    # a reading beyond graphite saturation: no numbers, the limit named
    dialog.kind.setCurrentIndex(dialog.kind.findData("mv"))
    dialog.value.setText("1250")
    assert dialog.answers["carbon_potential"].text() == "–" and "graphite saturation" in dialog.message.text()
    assert not dialog.use.isEnabled()
    # another carrier brings its CO and H2
    dialog.carrier.setCurrentIndex(dialog.carrier.findData("natural-gas-endo"))
    assert (dialog.co.value(), dialog.h2.value()) == (20.0, 40.0)
    # a reading taken as the plan's potential: one undoable edit, the carrier and the reading with it
    dialog.kind.setCurrentIndex(dialog.kind.findData("co2"))
    dialog.value.setText("0.15")
    assert dialog.use.isEnabled()
    potential = A.potential_from_reading("co2", 0.0015, A.Gas(930 + K, 0.20, 0.40))
    dialog.use.click()
    plan = window.plan
    assert plan.carbon_potential == pytest.approx(potential, abs=5e-4)
    assert (plan.carrier, plan.carrier_co, plan.control_reading) == ("natural-gas-endo", 20.0, "co2")
    plan.undo()
    assert plan.carrier == "propane-endo" and plan.control_reading == "mv"
    dialog.temperature.setValue(950)
    assert not dialog.use.isEnabled()  # a reading at another temperature is another potential
    dialog.close()


def test_the_form_shows_the_gas_and_hides_beta_when_it_comes_from_the_gas(window):
    """The carrier, its CO and H2 and the reading the furnace runs on are on the form for gas carburizing; picking a
    carrier brings its CO and H2; β is typed only when it does not come from the gas."""
    from casedepth.parameters import PARAMETERS

    form = window.form
    shown = lambda key: form.lines[key][1].isVisibleTo(window)  # noqa: E731
    assert all(shown(key) for key in ("carrier", "carrier_co", "carrier_h2", "control_reading"))
    window.plan.set("carrier", "propane-endo")
    assert (window.plan.carrier_co, window.plan.carrier_h2) == (23.5, 31.5)
    form.show_model_settings(True)
    assert shown("beta_multiplier") and not shown("beta")
    window.plan.set("beta_model", "constant")
    assert shown("beta") and not shown("beta_multiplier")
    assert PARAMETERS["beta"].used_by(window.plan.values())
    window.plan.set("treatment", "nitriding")
    assert not any(shown(key) for key in ("carrier", "carrier_co", "control_reading"))


def test_the_setpoint_fact_names_the_controlled_reading_and_holds_the_others(window, qtbot):
    """The result's setpoint line is in the reading the furnace runs on; hovering it gives every reading of every
    held stage with its band (the text the command line prints)."""
    with qtbot.waitSignal(window.result_shown, timeout=20000):
        window.plan.set("control_reading", "co2")
    name, fact = window.results.fact_names["probe"], window.results.facts["probe"]
    shown = fact.text().replace("\u00a0", " ")
    assert name.text() == "CO2 setpoints (ideal)" and shown.startswith("soak 0.1") and "mV" not in shown
    assert fact.toolTip() == "\n".join(r.text() for r in window.outcome.readings)
    assert "dew point" in fact.toolTip() and "mV" in fact.toolTip()
