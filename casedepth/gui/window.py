"""The main window: the plan form on the left, the answer and the profiles on the right, cautions below.

The window is a view: the form is bound to the plan by key, every result comes from the one
evaluation path (:func:`casedepth.plan.evaluate`, on a worker thread), and everything it shows or
writes — the facts, the plots, the exported profile, the printed documents — is the outcome's.
"""

from __future__ import annotations

import html
import json
import os
from dataclasses import fields
from pathlib import Path

from PySide6.QtCore import QSettings, Qt, QTimer, Signal
from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import (QCheckBox, QDialog, QDialogButtonBox, QDoubleSpinBox, QFileDialog, QFormLayout, QFrame,
                               QHBoxLayout, QLabel, QLineEdit, QMainWindow, QMessageBox, QPlainTextEdit, QPushButton,
                               QScrollArea, QSlider, QSplitter, QVBoxLayout, QWidget)

from .. import __version__, safety
from ..errors import InputError
from ..files import FileWriteError, atomic_write
from ..parameters import PARAMETERS, label
from ..plan import Plan, PlanFileError, load, save
from ..report.export import profile_csv, write_profile_csv
from ..shop.quote import ShopDefaults
from ..treatments import TREATMENTS
from ..units import DisplayUnits, format_duration
from .cautions import CautionPanel
from .form import PlanForm
from .plots import ProfilePlots
from .results import ResultPanel
from .worker import Calculator

PLAN_FILTER = "casedepth plans (*.cdplan.json *.json);;All files (*)"
MAX_RECENT = 8


class ShopDialog(QDialog):
    """The shop's standard times and rates: a form of the :class:`~casedepth.shop.quote.ShopDefaults` entries,
    with the labels and units they carry."""

    def __init__(self, shop: ShopDefaults, parent=None, name: str = "", logo: str = ""):
        super().__init__(parent)
        self.setWindowTitle("Shop times and rates")
        form = QFormLayout(self)
        self.name = QLineEdit(name)
        self.name.setPlaceholderText("printed in the title block of process sheets")
        form.addRow("Shop name", self.name)
        self.logo = QLineEdit(logo)
        self.logo.setPlaceholderText("path of a PNG logo for process sheets (optional)")
        self.logo_button = QPushButton("Choose…")
        self.logo_button.setToolTip("Pick the logo's picture file (PNG or JPEG)")
        self.logo_button.clicked.connect(self.choose_logo)
        logo_line = QHBoxLayout()
        logo_line.addWidget(self.logo, 1)
        logo_line.addWidget(self.logo_button)
        form.addRow("Logo file", logo_line)
        self.spins = {}
        self.shop = shop
        for item in fields(ShopDefaults):
            if item.name == "currency" or item.metadata.get("retired"):
                continue
            whole = isinstance(item.default, int)
            spin = QDoubleSpinBox()
            spin.setDecimals(0 if whole else 2)
            spin.setRange(*item.metadata["range"])
            spin.setSuffix(f" {item.metadata['unit']}" if item.metadata["unit"] else "")
            spin.setValue(float(getattr(shop, item.name)))
            form.addRow(item.metadata["label"], spin)
            self.spins[item.name] = spin
        for spin in self.spins.values():  # whole degrees, as a furnace is set ("845 °C", not "845.00 °C")
            if spin.suffix().strip() in ("°C", "°F"):
                spin.setDecimals(0)
        self.currency = QLineEdit(shop.currency)
        self.currency.setPlaceholderText("e.g. EUR, USD (optional)")
        form.addRow("Currency", self.currency)
        self.keep = QCheckBox("Use these for new plans too")
        form.addRow(self.keep)
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        form.addRow(buttons)
        self.currency.setMaxLength(20)
        self.name.setMaxLength(200)
        self.logo.setMaxLength(1000)

    def choose_logo(self) -> None:
        start = self.logo.text().strip() or str(Path.home())
        path, _ = QFileDialog.getOpenFileName(self, "Logo for process sheets", start,
                                              "Pictures (*.png *.jpg *.jpeg);;All files (*)")
        if path:
            self.logo.setText(path)

    def accept(self) -> None:
        """Close only on values the shop accepts; otherwise say which entry and its range."""
        try:
            self.values()
        except InputError as error:
            QMessageBox.warning(self, "Shop times and rates", error.message)
            return
        super().accept()

    def values(self) -> ShopDefaults:
        data = {name: spin.value() if spin.decimals() else int(round(spin.value())) for name, spin in self.spins.items()}
        retired = {f.name: getattr(self.shop, f.name) for f in fields(ShopDefaults) if f.metadata.get("retired")}
        return ShopDefaults(**data, **retired, currency=self.currency.text().strip())


class OfferBar(QFrame):
    """A newer model or policy than the plan was made with: what it is, and buttons to take it or keep the plan's."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("offers")
        self.setStyleSheet("QFrame#offers { background: #eaf3ea; border: 1px solid #7fb685; border-radius: 4px; }")
        layout = QHBoxLayout(self)
        layout.setContentsMargins(8, 4, 8, 4)
        self.text = QLabel()
        self.text.setObjectName("offer_text")
        self.text.setWordWrap(True)
        layout.addWidget(self.text, 1)
        self.take = QPushButton("Use the newer one")
        self.keep = QPushButton("Keep the plan's")
        layout.addWidget(self.take)
        layout.addWidget(self.keep)
        self.offer = None
        self.kept: set[str] = set()
        self.hide()

    def show_offers(self, offers) -> None:
        offers = [offer for offer in offers if offer.key not in self.kept]
        self.offer = offers[0] if offers else None
        if self.offer is None:
            self.hide()
            return
        self.text.setText(f"<b>A newer choice exists.</b> {html.escape(self.offer.text)} This plan keeps what it was "
                          f"made with, so it gives the numbers it gave, unless you take the newer one.")
        self.show()


class MainWindow(QMainWindow):
    """The planning window. ``settings`` (a QSettings) keeps units, layout and recent files between runs."""

    result_shown = Signal()

    def __init__(self, plan: Plan | None = None, settings: QSettings | None = None, path: str | None = None):
        super().__init__()
        self.settings = settings if settings is not None else QSettings("casedepth", "casedepth")
        from .record import adopt_record_path

        adopt_record_path(self.settings)  # the record the settings chose is the one plans are calibrated from
        self.units = DisplayUnits(str(self.settings.value("units", "metric")))
        self.plan = plan if plan is not None else Plan()
        self.path: Path | None = Path(path) if path else None
        self.outcome = None
        self.notes_to_show: list[str] = []  # what opening the plan's file had to assume, shown with the first result
        self.calculator = Calculator(parent=self)
        self.calculator.finished.connect(self._show_outcome)
        self.calculator.failed.connect(self._show_failure)
        self._build()
        self._build_menus()
        self._attach(self.plan)
        geometry = self.settings.value("window/geometry")
        if geometry is not None:
            self.restoreGeometry(geometry)
        else:
            self.resize(1280, 820)
        splitter = self.settings.value("window/splitter")
        if splitter is not None:
            self.splitter.restoreState(splitter)
        self.form.show_model_settings(self.settings.value("window/model_settings", False) in (True, "true"))
        self.calculate()

    # -- layout ------------------------------------------------------------------------------------
    def _build(self) -> None:
        self.form = PlanForm(self.plan, self.units)
        self.form.input_problem.connect(self._input_problem)
        self.form.model_toggle.toggled.connect(lambda on: self.settings.setValue("window/model_settings", on))
        scroll = self.scroll = QScrollArea()
        scroll.setWidget(self.form)
        scroll.setWidgetResizable(True)
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self._fit_form()
        self.results = ResultPanel()
        self.plots = ProfilePlots()
        self.plots.comparison_wanted.connect(self.calculator.compare)
        self.calculator.compared.connect(self.plots.show_comparison)
        self.plots.capability_wanted.connect(self.calculator.work_out_capability)
        self.calculator.capability_known.connect(self.plots.show_capability)
        slider_row = QHBoxLayout()
        slider_row.addWidget(QLabel("Time"))
        self.time_slider = QSlider(Qt.Horizontal)
        self.time_slider.setRange(0, 1000)
        self.time_slider.setValue(1000)
        self.time_slider.setToolTip("Drag to watch the profile grow during the soak or the cycle")
        self.time_slider.valueChanged.connect(self._time_moved)
        slider_row.addWidget(self.time_slider, 1)
        self.time_label = QLabel("end of soak")
        self.time_label.setMinimumWidth(150)
        slider_row.addWidget(self.time_label)
        right = QWidget()
        right_layout = QVBoxLayout(right)
        self.offers = OfferBar()
        self.offers.take.clicked.connect(self._take_offer)
        self.offers.keep.clicked.connect(self._keep_offer)
        right_layout.addWidget(self.offers)
        right_layout.addWidget(self.results)
        right_layout.addWidget(self.plots, 1)
        right_layout.addLayout(slider_row)
        self.splitter = QSplitter(Qt.Horizontal)
        self.splitter.addWidget(scroll)
        self.splitter.addWidget(right)
        self.splitter.setStretchFactor(1, 1)
        self.splitter.setSizes([self.form.sizeHint().width() + 24, 880])
        self.cautions = CautionPanel()
        central = QWidget()
        layout = QVBoxLayout(central)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(0)
        layout.addWidget(self.splitter, 1)
        layout.addWidget(self.cautions)
        self.setCentralWidget(central)
        self.statusBar()

    def _action(self, menu, text, slot, shortcut=None, tip=None) -> QAction:
        action = QAction(text, self)
        if shortcut is not None:
            action.setShortcut(shortcut)
        if tip:
            action.setStatusTip(tip)
        action.triggered.connect(slot)
        menu.addAction(action)
        return action

    def _build_menus(self) -> None:
        bar = self.menuBar()
        file_menu = bar.addMenu("&File")
        self._action(file_menu, "&New plan", self.new_plan, QKeySequence.New)
        self._action(file_menu, "&Open plan…", self.open_dialog, QKeySequence.Open)
        self.recent_menu = file_menu.addMenu("Open &recent")
        file_menu.addSeparator()
        self._action(file_menu, "&Save", self.save, QKeySequence.Save)
        self._action(file_menu, "Save &as…", self.save_as_dialog, QKeySequence.SaveAs)
        file_menu.addSeparator()
        self._action(file_menu, "Export profile as &CSV…", self.export_csv_dialog, "Ctrl+E")
        self._action(file_menu, "Export &plot (PNG, SVG, PDF)…", self.export_plot_dialog, "Ctrl+Shift+E")
        file_menu.addSeparator()
        self._action(file_menu, "Print process &sheet…", lambda: self.print_document("sheet"), QKeySequence.Print)
        self._action(file_menu, "Preview process sheet…", lambda: self.preview_document("sheet"))
        self._action(file_menu, "Export process sheet…", lambda: self.export_document_dialog("sheet"))
        self._action(file_menu, "Print case-depth &chart…", lambda: self.print_document("chart"))
        self._action(file_menu, "Preview case-depth chart…", lambda: self.preview_document("chart"))
        self._action(file_menu, "Export case-depth chart…", lambda: self.export_document_dialog("chart"))
        file_menu.addSeparator()
        self._action(file_menu, "Plan a &load from saved plans…", self.load_dialog)
        self._action(file_menu, "Record this load in the furnace record…", self.record_load_dialog, None,
                     "The plan as run, its furnace, load number, date and soak, into the shop's furnace record")
        self._action(file_menu, "Furnace record…", self.record_dialog, None,
                     "Recorded loads, their measured coupons and each furnace's fit")
        paper_menu = file_menu.addMenu("Paper")
        paper_group = QActionGroup(self)
        for key, text in (("a4", "A4"), ("letter", "US Letter")):
            action = QAction(text, self, checkable=True)
            action.setChecked(self.paper == key)
            action.triggered.connect(lambda _=False, k=key: self.settings.setValue("paper", k))
            paper_group.addAction(action)
            paper_menu.addAction(action)
        file_menu.addSeparator()
        self._action(file_menu, "&Quit", self.close, QKeySequence.Quit)
        edit_menu = bar.addMenu("&Edit")
        self.undo_action = self._action(edit_menu, "&Undo", self.undo, QKeySequence.Undo)
        self.redo_action = self._action(edit_menu, "&Redo", self.redo, QKeySequence.Redo)
        edit_menu.addSeparator()
        self._action(edit_menu, "Calibrate from a measured &section…", self.calibrate_dialog)
        self._action(edit_menu, "Convert a furnace &reading…", self.reading_dialog, None,
                     "Probe mV, dew point, CO2 and carbon potential of the carburizing gas, each from any other")
        self._action(edit_menu, "&Shop times and rates…", self.edit_shop, "Ctrl+J",
                     "Load, heat-up, drop, quench, wash and temper times, furnace rate and parts per load")
        view_menu = bar.addMenu("&View")
        group = QActionGroup(self)
        self.unit_actions = {}
        for system, text in (("metric", "&Metric units (°C, mm)"), ("imperial", "&Imperial units (°F, in)")):
            action = QAction(text, self, checkable=True)
            action.setChecked(self.units.system == system)
            action.triggered.connect(lambda _=False, s=system: self.set_units(s))
            group.addAction(action)
            view_menu.addAction(action)
            self.unit_actions[system] = action
        view_menu.addSeparator()
        view_menu.addAction(self.form.model_toggle.text(), lambda: self.form.show_model_settings(not self.form.model_box.isVisible()))
        help_menu = bar.addMenu("&Help")
        self._action(help_menu, "&Models and sources…", self.show_models)
        self._action(help_menu, "&About casedepth", self.show_about)
        self._refresh_recent()

    # -- plan wiring -------------------------------------------------------------------------------------
    def _attach(self, plan: Plan) -> None:
        self.plan = plan
        plan.subscribe(self._plan_changed)
        self.form.plan_replaced(plan)
        if hasattr(self, "scroll"):
            self._fit_form()
        self.offers.kept.clear()
        self._update_title()
        self._update_undo()
        self.offers.show_offers(plan.offers())

    def _take_offer(self) -> None:
        if self.offers.offer is not None:
            self.plan.accept(self.offers.offer)

    def _keep_offer(self) -> None:
        if self.offers.offer is not None:
            self.offers.kept.add(self.offers.offer.key)
            self.offers.show_offers(self.plan.offers())

    def _fit_form(self) -> None:
        """Keep the form panel as wide as the form needs (it changes with the treatment and the cycle)."""
        self.scroll.setMinimumWidth(self.form.minimumSizeHint().width() + self.scroll.verticalScrollBar().sizeHint().width() + 6)

    def _plan_changed(self, key, value) -> None:
        QTimer.singleShot(0, self._fit_form)  # once the form has shown the change (it may hear of it after the window)
        self._update_title()
        self._update_undo()
        self.offers.show_offers(self.plan.offers())
        if PARAMETERS[key].affects_result:  # a new name or note does not change the numbers
            self.calculate()

    def calculate(self) -> None:
        if self.form.has_unread_entry():
            return
        self.calculator.request(self.plan.values())
        self.statusBar().showMessage("Calculating…")

    def _update_title(self) -> None:
        name = self.path.name if self.path else "untitled"
        self.setWindowTitle(f"casedepth — {self.plan.title} ({name})[*]")
        self.setWindowModified(self.plan.modified)

    def _update_undo(self) -> None:
        self.undo_action.setEnabled(self.plan.can_undo)
        self.redo_action.setEnabled(self.plan.can_redo)

    def undo(self) -> None:
        self.plan.undo()

    def redo(self) -> None:
        self.plan.redo()

    # -- results -------------------------------------------------------------------------------------------
    def _show_outcome(self, outcome) -> None:
        self.outcome = outcome
        self.form.set_planned(outcome)
        self.form.clear_marks(keep=self.form.unread_entries())
        self.results.show_outcome(outcome, self.units)
        self.cautions.show_cautions(outcome.cautions)
        self.time_slider.blockSignals(True)
        self.time_slider.setValue(1000)
        self.time_slider.blockSignals(False)
        self.time_label.setText(f"end, {format_duration(outcome.duration)}")
        self.plots.show_outcome(outcome, self.units)
        notes, self.notes_to_show = self.notes_to_show, []
        self.statusBar().showMessage("Opened with: " + "; ".join(notes) if notes else "Ready", 15000 if notes else 2000)
        self.result_shown.emit()

    def _show_failure(self, error) -> None:
        if isinstance(error, InputError):
            field, message = error.field, error.message
            self.form.mark(field, message)
        else:
            field, message = "calculation", f"{type(error).__name__}: {error}"
        self.results.show_problem(label(field), message)
        values = self.plan.values()
        self.cautions.show_cautions(TREATMENTS[values["treatment"]].cautions(values))
        self.statusBar().showMessage("Input needs attention", 4000)

    def _input_problem(self, field: str, message: str) -> None:
        self.results.show_problem(label(field), message)

    def _time_moved(self, value: int) -> None:
        if self.outcome is None:
            return
        soak = self.outcome.duration
        if value >= 1000:
            self.time_label.setText(f"end, {format_duration(soak)}")
            self.plots.set_time(None)
            return
        time = max(soak * value / 1000.0, 1.0)
        self.time_label.setText(f"{format_duration(time)} of {format_duration(soak)}")
        self.plots.set_time(time)

    def set_units(self, system: str) -> None:
        """Show lengths and temperatures in ``metric`` or ``imperial`` units; the plan is not changed."""
        self.units = DisplayUnits(system)
        self.settings.setValue("units", system)
        self.unit_actions[system].setChecked(True)
        self.form.set_units(self.units)
        if self.outcome is not None:
            self.results.show_outcome(self.outcome, self.units)
            self.plots.show_outcome(self.outcome, self.units, self.plots.time)
        self.form.steel_facts.update()

    # -- files ----------------------------------------------------------------------------------------------
    def _may_discard(self) -> bool:
        """Ask before losing unsaved changes; True if it is fine to go on."""
        if not self.plan.modified:
            return True
        answer = QMessageBox.question(
            self, "Unsaved changes", f"The plan “{self.plan.title}” has changes that are not saved. Save them?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        if answer == QMessageBox.Save:
            return self.save()
        return answer == QMessageBox.Discard

    def new_plan(self) -> None:
        if self._may_discard():
            self.path = None
            plan = Plan()
            mine = self.settings.value("shop_defaults")
            if mine:
                try:
                    plan = Plan(shop=ShopDefaults.from_dict(json.loads(str(mine))).to_dict())
                except (ValueError, InputError):
                    pass
            self._attach(plan)
            self.calculate()

    def calibration_defaults(self) -> tuple[float, float]:
        """What the calibration dialog starts from: the plan's own soak at temperature for the aim [s] (not the
        whole cycle) and the aim depth [m]; taking both as they are gives the plan's multiplier back."""
        if self.outcome is None:
            return 6 * 3600.0, self.plan.case_min
        return self.outcome.soak_time, self.outcome.targets[1]

    def record_load_dialog(self) -> None:
        """Record the plan on screen as a load run (File → Record this load)."""
        from .record import RecordLoadDialog

        if self.outcome is None:
            QMessageBox.information(self, "Record this load", "The plan has no result yet to record.")
            return
        self.record_load = RecordLoadDialog(self.plan, self.outcome.soak_time, self.settings, self)
        self.record_load.show()

    def record_dialog(self) -> None:
        """The furnace record: loads, coupons, a furnace's fit (File → Furnace record)."""
        from .record import RecordDialog

        self.record_view = RecordDialog(self.settings, self)
        self.record_view.show()

    def reading_dialog(self) -> None:
        """The furnace-reading converter, starting from the plan's temperature and gas."""
        from .readings import ReadingConverter

        self.reading_converter = ReadingConverter(self.plan.values(), self.units, self, self.plan)
        self.reading_converter.show()

    def calibrate_dialog(self) -> None:
        """Ask for the soak a load had and what was measured on its section (a depth, or for nitriding a hardness
        traverse), then calibrate."""
        from PySide6.QtWidgets import QButtonGroup, QRadioButton

        from ..shop.calibration import check_traverse, parse_traverse

        soak_time, aim = self.calibration_defaults()
        nitriding = self.plan.values()["treatment"] == "nitriding"
        unit = self.units.length_unit
        dialog = QDialog(self)
        dialog.setWindowTitle("Calibrate from a measured section")
        form = QFormLayout(dialog)
        form.addRow(QLabel("The soak a load of this plan had, and what was measured on its section: the depth\n"
                           "(effective case depth at the plan's threshold, or nitrided hardness depth), or for\n"
                           "nitriding a hardness traverse (the multiplier whose profile fits the readings best)."))
        soak = QDoubleSpinBox()
        soak.setRange(0.1, 200.0)
        soak.setDecimals(2)
        soak.setSuffix(" h")
        soak.setValue(round(soak_time / 3600.0, 2))
        form.addRow("Soak at temperature", soak)
        by_depth, by_traverse = QRadioButton("Measured depth"), QRadioButton("Hardness traverse")
        choice = QButtonGroup(dialog)
        choice.addButton(by_depth)
        choice.addButton(by_traverse)
        by_depth.setChecked(True)
        depth = QDoubleSpinBox()
        depth.setDecimals(self.units.length_decimals)
        depth.setRange(0.0, 400.0)
        depth.setSuffix(f" {unit}")
        depth.setValue(self.units.length(aim))
        form.addRow(by_depth, depth)
        readings = QLineEdit()
        readings.setObjectName("traverse")
        example = "0.05=590, 0.1=560, 0.2=480, 0.3=400" if unit == "mm" else "0.002=590, 0.004=560, 0.008=480, 0.012=400"
        readings.setPlaceholderText(f"depth ({unit}) = HV, …   e.g. {example}")
        readings.setToolTip(f"Hardness readings from the surface inwards, at least 3, each written depth=HV and "
                            f"separated by commas; a depth without a unit is in {unit}.")
        readings.setMinimumWidth(360)
        form.addRow(by_traverse, readings)
        by_traverse.setEnabled(nitriding)
        if not nitriding:
            by_traverse.setToolTip("A hardness traverse calibrates nitriding plans only.")
        by_depth.toggled.connect(lambda on: (depth.setEnabled(on), readings.setEnabled(not on)))
        readings.setEnabled(False)
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)

        def accept() -> None:  # a traverse that cannot be read keeps the dialog open, with the text
            if by_traverse.isChecked():
                try:
                    check_traverse(parse_traverse(readings.text(), unit))
                except InputError as error:
                    QMessageBox.warning(dialog, "Hardness traverse", error.message)
                    return
            dialog.accept()

        buttons.accepted.connect(accept)
        buttons.rejected.connect(dialog.reject)
        form.addRow(buttons)
        if dialog.exec() == QDialog.Accepted:  # an untouched field keeps its exact value (not the rounded one shown)
            shown_soak, shown_depth = round(soak_time / 3600.0, 2), self.units.length(aim)
            soak_s = soak_time if soak.value() == shown_soak else soak.value() * 3600.0
            if by_traverse.isChecked():
                self.calibrate(soak_s, traverse=readings.text())
            else:
                self.calibrate(soak_s, aim if abs(depth.value() - shown_depth) < 0.5 * 10 ** -depth.decimals()
                               else self.units.length_si(depth.value()))

    def calibrate(self, soak_time: float, measured_depth: float | None = None, traverse=None) -> str:
        """Set the plan's diffusivity multiplier from a measured section (one undoable edit); returns the message.

        Either ``measured_depth`` [m], or ``traverse``: hardness readings, as text ``"depth=HV, …"`` (depths in the
        window's length unit unless written with one) or (depth [m], HV) pairs."""
        from ..shop.calibration import calibrate_plan, calibrate_traverse, parse_traverse

        try:
            if traverse is not None:
                if isinstance(traverse, str):
                    traverse = parse_traverse(traverse, self.units.length_unit)
                found = calibrate_traverse(self.plan, soak_time, traverse)
            else:
                found = calibrate_plan(self.plan, soak_time, measured_depth)
        except InputError as error:
            QMessageBox.warning(self, "Cannot calibrate", error.message)
            return error.message
        self.plan.set(found.field, round(found.multiplier, 3))
        message = found.describe() + f" It is now the plan's {label(found.field)} (Edit → Undo takes it back)."
        QMessageBox.information(self, "Calibrated", message)
        return message

    def edit_shop(self) -> None:
        """Edit the shop's times and rates for this plan, and optionally keep them for new plans."""
        dialog = ShopDialog(ShopDefaults.from_dict(self.plan.shop), self, str(self.settings.value("shop_name", "")),
                            str(self.settings.value("shop_logo", "")))
        if dialog.exec() == QDialog.Accepted:
            self.settings.setValue("shop_name", dialog.name.text().strip())
            self.settings.setValue("shop_logo", dialog.logo.text().strip())
            self.apply_shop(dialog.values(), dialog.keep.isChecked())

    def apply_shop(self, shop: ShopDefaults, keep: bool = False) -> None:
        """Use ``shop`` for this plan (one undoable edit); with ``keep``, also for new plans."""
        self.plan.set("shop", shop.to_dict())
        if keep:
            self.settings.setValue("shop_defaults", json.dumps(shop.to_dict()))

    def load_dialog(self) -> None:
        """Pick saved plans that share a furnace step and show the soak they can share."""
        paths, _ = QFileDialog.getOpenFileNames(self, "Plans for one load", self._start_folder(), PLAN_FILTER)
        if paths:
            self.show_load(paths)

    def show_load(self, paths: list[str]) -> str:
        """Combine the plans in ``paths`` into one load and show the answer (returned as text too)."""
        from ..shop.loads import plan_load

        try:
            text = plan_load([load(p) for p in paths]).text(self.units)
        except InputError as error:
            text = f"These plans cannot share a load: {error.message}"
        dialog = QDialog(self)
        dialog.setWindowTitle("One load")
        layout = QVBoxLayout(dialog)
        view = QPlainTextEdit(text)
        view.setReadOnly(True)
        view.setLineWrapMode(QPlainTextEdit.NoWrap)
        font = view.font()
        font.setFamily("monospace")
        view.setFont(font)
        view.setMinimumSize(760, 220)
        layout.addWidget(view)
        buttons = QDialogButtonBox(QDialogButtonBox.Close)
        buttons.rejected.connect(dialog.reject)
        layout.addWidget(buttons)
        self.load_view = dialog
        dialog.show()
        return text

    def welcome(self, examples: list[Path]) -> None:
        """The first run: the example plans (copied to the data folder) in Open recent, the first of them open, and a
        word on where they are."""
        for example in reversed(examples):
            self._remember(example)
        if examples and self.open_plan(examples[0]):
            self.statusBar().showMessage(f"Welcome: example plans are in {examples[0].parent} (File → Open recent)",
                                         20000)

    def _start_folder(self) -> str:
        """Where Open and Save as start: the plan's folder, the last one used, at first the documents folder."""
        if self.path:
            return str(self.path.parent)
        from .places import documents_folder
        return str(self.settings.value("last_folder", str(documents_folder())))

    def open_dialog(self) -> None:
        if not self._may_discard():
            return
        start = self._start_folder()
        path, _ = QFileDialog.getOpenFileName(self, "Open plan", start, PLAN_FILTER)
        if path:
            self.open_plan(path)

    def open_plan(self, path: str | os.PathLike) -> bool:
        """Open a plan file (no questions asked); False with a message if it cannot be read."""
        try:
            plan = load(path)
        except PlanFileError as error:
            QMessageBox.warning(self, "Cannot open the plan", error.message)
            return False
        self.path = Path(path)
        self._remember(self.path)
        self._attach(plan)
        self.notes_to_show = list(plan.file_notes)  # shown with the first result, not hidden by "Calculating…"
        self.calculate()
        return True

    def save(self) -> bool:
        if self.path is None:
            return self.save_as_dialog()
        return self.save_plan(self.path)

    def save_as_dialog(self) -> bool:
        start = str(self.path) if self.path else str(Path(self._start_folder()) / f"{self.plan.title}.cdplan.json")
        path, _ = QFileDialog.getSaveFileName(self, "Save plan as", start, PLAN_FILTER)
        return self.save_plan(path) if path else False

    def _written(self, title: str, path: str | os.PathLike, write) -> bool:
        """Run ``write()``; a file that cannot be written is told in one message naming the path and the reason."""
        try:
            write()
        except FileWriteError as error:
            QMessageBox.warning(self, title, str(error))
            return False
        except OSError as error:
            QMessageBox.warning(self, title, f"cannot write {path}: {error.strerror or error}")
            return False
        except InputError as error:
            QMessageBox.warning(self, title, error.message)
            return False
        self.statusBar().showMessage(f"Wrote {path}", 3000)
        return True

    def save_plan(self, path: str | os.PathLike) -> bool:
        path = Path(path)
        if not self._written("Cannot save the plan", path, lambda: save(self.plan, path)):
            return False
        self.path = path
        self._remember(path)
        self._update_title()
        self.statusBar().showMessage(f"Saved {path}", 3000)
        return True

    def _remember(self, path: Path) -> None:
        recent = [p for p in self._recent() if p != str(path)]
        recent.insert(0, str(path))
        self.settings.setValue("recent", recent[:MAX_RECENT])
        self.settings.setValue("last_folder", str(path.parent))
        self._refresh_recent()

    def _recent(self) -> list[str]:
        value = self.settings.value("recent", [])
        if isinstance(value, str):
            return [value]
        return list(value or [])

    def _refresh_recent(self) -> None:
        self.recent_menu.clear()
        for path in self._recent():
            action = self.recent_menu.addAction(path)
            action.triggered.connect(lambda _=False, p=path: self._may_discard() and self.open_plan(p))
        self.recent_menu.setEnabled(bool(self._recent()))

    def profile_csv(self) -> str:
        """The profile at the end of the last result as CSV text (:func:`casedepth.report.export.profile_csv`)."""
        return profile_csv(self.outcome, self.plan.title)

    def export_csv(self, path: str | os.PathLike) -> None:
        write_profile_csv(self.outcome, self.plan.title, path)

    def export_csv_dialog(self) -> None:
        if self.outcome is None:
            return
        path, _ = QFileDialog.getSaveFileName(self, "Export profile", f"{self.plan.title}-profile.csv", "CSV (*.csv)")
        if path:
            self._written("Cannot export the profile", path, lambda: self.export_csv(path))

    def export_plot(self, path: str | os.PathLike) -> None:
        """Save the plot on show; the format follows the extension (.png, .svg, .pdf)."""
        self.plots.draw_all(only=self.plots.currentIndex())
        atomic_write(path, lambda name: self.plots.save_current(name, dpi=200))

    def export_plot_dialog(self) -> None:
        if self.outcome is None:
            return
        path, _ = QFileDialog.getSaveFileName(self, "Export plot", f"{self.plan.title}-profile.png",
                                              "PNG image (*.png);;SVG drawing (*.svg);;PDF document (*.pdf)")
        if path:
            self._written("Cannot export the plot", path, lambda: self.export_plot(path))

    # -- printed documents --------------------------------------------------------------------------------------------
    @property
    def paper(self) -> str:
        return str(self.settings.value("paper", "letter" if self.units.imperial else "a4"))

    def document(self, kind: str):
        """The process sheet of the plan, or a case-depth chart for its steel at three temperatures around its own."""
        from ..report.documents import process_sheet

        if self.outcome is None:
            raise InputError("document", "there is no result to print yet")
        if kind == "sheet":
            return process_sheet(self.plan, self.outcome, paper=self.paper, units=self.units.system,
                                 shop=str(self.settings.value("shop_name", "")),
                                 logo=str(self.settings.value("shop_logo", "")) or None, revision=self.plan.revision)
        values = self.outcome.values
        treatment = TREATMENTS[values["treatment"]]
        return treatment.chart(values, temperatures=treatment.chart_temperatures(values), paper=self.paper,
                               units=self.units.system, load=True)

    def _document_or_message(self, kind: str):
        try:
            return self.document(kind)
        except InputError as error:
            QMessageBox.warning(self, "Nothing to print", error.message)
            return None

    def print_document(self, kind: str) -> None:
        from .printing import print_with_dialog

        document = self._document_or_message(kind)
        if document is not None:
            print_with_dialog(self, document, self.paper)

    def preview_document(self, kind: str) -> None:
        from .printing import preview

        document = self._document_or_message(kind)
        if document is not None:
            preview(self, document, self.paper)

    def export_document_dialog(self, kind: str) -> None:
        document = self._document_or_message(kind)
        if document is None:
            return
        name = f"{self.plan.title}-{'sheet' if kind == 'sheet' else 'chart'}.pdf"
        path, _ = QFileDialog.getSaveFileName(self, "Export", name,
                                              "PDF document (*.pdf);;SVG drawing (*.svg);;PNG image (*.png)")
        if path:
            from ..report.documents import save as save_document

            self._written("Cannot export", path, lambda: save_document(document, path))

    # -- help ----------------------------------------------------------------------------------------------------
    def models_text(self) -> str:
        from ..report.sources import model_sources

        rows = [f"<li><b>{html.escape(name)}</b> — {html.escape(source)}</li>" for name, source in model_sources()]
        return "<ul>" + "".join(rows) + "</ul>"

    def show_models(self) -> None:
        QMessageBox.information(self, "Models and sources", self.models_text())

    def show_about(self) -> None:
        QMessageBox.about(self, "About casedepth",
                          f"<h3>casedepth {__version__}</h3><p>Turns a drawing's case-depth callout into a furnace "
                          f"cycle ({', '.join(t.label.lower() for t in TREATMENTS.values())}), with the profiles "
                          f"it leaves.</p>{self.models_text()}"
                          f"<p><i>{safety.DEFERENCE}</i></p>")

    # -- closing ---------------------------------------------------------------------------------------------------
    def closeEvent(self, event) -> None:
        if not self._may_discard():
            event.ignore()
            return
        self.settings.setValue("window/geometry", self.saveGeometry())
        self.settings.setValue("window/splitter", self.splitter.saveState())
        self.calculator.wait()
        event.accept()
