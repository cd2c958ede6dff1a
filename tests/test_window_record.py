"""The furnace record in the window (File → Record this load, File → Furnace record): the same record and fit as
``casedepth record`` (casedepth.shop.record, casedepth.shop.furnace_fit)."""

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtWidgets import QDialog  # noqa: E402

from casedepth.shop.furnace_fit import fit_furnace  # noqa: E402
from casedepth.shop.record import Record  # noqa: E402


def test_record_a_load_add_a_coupon_and_fit_the_furnace(window, qtbot, tmp_path, monkeypatch):
    path = tmp_path / "record.sqlite"
    window.settings.setValue("record_path", str(path))
    window.record_load_dialog()
    dialog = window.record_load
    dialog.furnace.setCurrentText("Pit 2")
    dialog.number.setText("2026-118")
    dialog.soak.setValue(dialog.soak.value() + 0.5)  # run half an hour longer than planned
    dialog.accept()
    assert dialog.result() == QDialog.Accepted
    with Record(path) as record:
        (load,) = record.loads("Pit 2")
    assert load.number == "2026-118" and load.soak == pytest.approx(window.outcome.soak_time + 1800, abs=36)
    assert load.plan["title"] == window.plan.title
    # the same number again is refused in the dialog, which stays open
    window.record_load_dialog()
    again = window.record_load
    again.furnace.setCurrentText("Pit 2")
    again.number.setText("2026-118")
    again.accept()
    assert "already in the record" in again.message.text() and again.result() != QDialog.Accepted
    again.reject()

    window.record_dialog()
    view = window.record_view
    assert view.furnace.currentText() == "Pit 2" and view.table.rowCount() == 1
    assert not view.fit_button.isEnabled()  # nothing measured yet
    csv = tmp_path / "coupon.csv"
    csv.write_text("depth_mm,carbon\n0.1,0.80\n0.3,0.74\n0.6,0.58\n0.9,0.44\n1.2,0.33\n1.6,0.24\n")
    view.kind.setCurrentIndex(view.kind.findData("carbon"))
    view.table.selectRow(0)
    assert view.add_coupon(str(csv))
    assert view.table.item(0, 4).text() == "carbon (6)" and view.fit_button.isEnabled()
    view.fit()
    with Record(path) as record:
        expected = fit_furnace(record.loads("Pit 2"), "Pit 2").text()
    assert view.result.toPlainText() == expected
    bad = tmp_path / "bad.csv"
    bad.write_text("depth,C\n0.1,0.9\n0.x,0.8\n0.3,0.7\n")
    from PySide6.QtWidgets import QMessageBox

    import casedepth.gui.record as module
    told = []
    monkeypatch.setattr(QMessageBox, "warning", lambda parent, title, text: told.append(text))
    assert not view.add_coupon(str(bad))
    assert told and "row 3" in told[0]
    assert module.record_path(window.settings) == path
    view.close()
