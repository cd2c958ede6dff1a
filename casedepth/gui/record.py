"""The furnace record in the window: File → Record this load, and File → Furnace record (the loads, their
measured coupons, a furnace's fit). Thin views over :mod:`casedepth.shop.record` and
:mod:`casedepth.shop.furnace_fit`, the same calls ``casedepth record`` makes.

The record's file is the settings' ``record_path`` (default :func:`casedepth.shop.record.default_database`).
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

from PySide6.QtGui import QTextCursor
from PySide6.QtWidgets import (QComboBox, QDialog, QDialogButtonBox, QDoubleSpinBox, QFileDialog, QFormLayout,
                               QHBoxLayout, QLabel, QLineEdit, QMessageBox, QPlainTextEdit, QPushButton, QTableWidget,
                               QTableWidgetItem, QVBoxLayout)

from .. import formats
from ..errors import CasedepthError, InputError
from ..plan.fileformat import to_dict
from ..models.hardness import SCALES
from ..shop.record import (KINDS, Measurement, Record, default_database, parse_measured, read_csv,
                           use_database)
from ..units import format_duration


def record_path(settings) -> Path:
    return Path(str(settings.value("record_path", str(default_database()))))


def adopt_record_path(settings) -> None:
    """Make the settings' record file the process's (:func:`casedepth.shop.record.use_database`): the file the
    record views open is the one new plans that name a furnace are calibrated from."""
    if settings.contains("record_path"):
        use_database(record_path(settings))


def _dates(ax) -> None:
    """A few concise dates along the x axis (a record spans days to years)."""
    from matplotlib.dates import AutoDateLocator, ConciseDateFormatter

    locator = AutoDateLocator(minticks=2, maxticks=5)
    ax.xaxis.set_major_locator(locator)
    ax.xaxis.set_major_formatter(ConciseDateFormatter(locator))


class RecordLoadDialog(QDialog):
    """Record the load the plan on screen was run as: furnace, load number, date, the soak actually run."""

    def __init__(self, plan, soak: float, settings, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Record this load")
        self.plan, self.settings = plan, settings
        form = QFormLayout(self)
        form.addRow(QLabel(f"The plan “{plan.title}” goes into the furnace record as run:\n{record_path(settings)}"))
        self.furnace = QComboBox()
        self.furnace.setEditable(True)
        try:
            with Record(record_path(settings)) as record:
                self.furnace.addItems(record.furnaces())
        except InputError:
            pass
        self.furnace.setCurrentText(plan.furnace or self.furnace.currentText())
        form.addRow("Furnace", self.furnace)
        self.number = QLineEdit(plan.load_number)
        form.addRow("Load number", self.number)
        self.day = QLineEdit(date.today().isoformat())
        form.addRow("Date (YYYY-MM-DD)", self.day)
        self.soak = QDoubleSpinBox()
        self.soak.setRange(0.02, 500.0)
        self.soak.setDecimals(2)
        self.soak.setSuffix(" h")
        self.soak.setValue(round(soak / 3600.0, 2))
        self.planned = round(soak / 3600.0, 2)
        form.addRow("Soak actually run", self.soak)
        self.message = QLabel("")
        self.message.setStyleSheet("color: #9a3412;")
        form.addRow(self.message)
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        form.addRow(buttons)

    def accept(self) -> None:
        soak = None if abs(self.soak.value() - self.planned) < 1e-9 else self.soak.value() * 3600.0
        try:
            with Record(record_path(self.settings)) as record:
                record.add_load(self.furnace.currentText(), self.number.text(), to_dict(self.plan), self.day.text().strip(),
                                soak)
        except InputError as error:
            self.message.setText(error.message)
            return
        super().accept()


class RecordDialog(QDialog):
    """The furnace record: its loads (date, furnace, number, plan, soak run, coupons), a coupon's readings added from a
    lab's CSV, and a furnace's fit."""

    def __init__(self, settings, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Furnace record")
        self.settings = settings
        self.resize(940, 680)
        layout = QVBoxLayout(self)
        self.where = QLabel()
        layout.addWidget(self.where)
        top = QHBoxLayout()
        self.furnace = QComboBox()
        self.furnace.currentIndexChanged.connect(self.show_loads)
        top.addWidget(QLabel("Furnace"))
        top.addWidget(self.furnace, 1)
        self.choose = QPushButton("Another record file…")
        self.choose.clicked.connect(self.choose_file)
        top.addWidget(self.choose)
        layout.addLayout(top)
        about = QHBoxLayout()  # the furnace's own details (record furnace NAME --kind … --survey-class … --notes …)
        self.oven_kind = QLineEdit()
        self.oven_kind.setPlaceholderText("pit, integral quench, vacuum …")
        self.survey = QComboBox()
        self.survey.addItem("not said", "")
        for number in range(1, 7):
            self.survey.addItem(f"AMS 2750 class {number}", str(number))
        self.oven_notes = QLineEdit()
        self.oven_notes.setPlaceholderText("notes")
        self.save_oven = QPushButton("Save furnace details")
        self.save_oven.clicked.connect(self.describe_furnace)
        for text, widget, stretch in (("Type", self.oven_kind, 2), ("Survey", self.survey, 0),
                                      ("Notes", self.oven_notes, 3)):
            about.addWidget(QLabel(text))
            about.addWidget(widget, stretch)
        about.addWidget(self.save_oven)
        layout.addLayout(about)
        self.table = QTableWidget(0, 7)
        self.table.setHorizontalHeaderLabels(["Date", "Load", "Plan", "Soak run", "Coupons", "Depth planned",
                                              "Depth measured"])
        self.table.horizontalHeaderItem(5).setToolTip("The plan's model (as calibrated when planned) for the soak run")
        self.table.horizontalHeaderItem(6).setToolTip("A measured depth, or where a coupon's traverse crosses the "
                                                      "drawing's threshold")
        self.table.horizontalHeader().setStretchLastSection(True)
        self.table.setSelectionBehavior(QTableWidget.SelectRows)
        self.table.setEditTriggers(QTableWidget.NoEditTriggers)
        layout.addWidget(self.table, 2)
        row = QHBoxLayout()
        self.kind = QComboBox()
        for kind in (k for k in KINDS.values() if k.traverse):  # a lab's CSV is a traverse
            self.kind.addItem(f"{kind.label.capitalize()} ({kind.unit})", kind.key)
        self.scale = QComboBox()
        self.scale.addItems(SCALES)
        self.scale.setCurrentText("HV1")
        self.add_csv = QPushButton("Add a coupon from CSV…")
        self.add_csv.clicked.connect(self.add_coupon)
        self.grade = QComboBox()
        self.grade.setToolTip("Fit every load of the furnace, or one steel grade's (plans of that grade take it)")
        self.fit_button = QPushButton("Fit this furnace")
        self.fit_button.clicked.connect(self.fit)
        self.save_fit = QPushButton("Keep this fit for new plans")
        self.save_fit.setToolTip("Plans that name this furnace take the fitted multipliers (as record fit --save)")
        self.save_fit.clicked.connect(self.keep_fit)
        self.save_fit.setEnabled(False)
        for widget in (self.kind, self.scale, self.add_csv, self.grade, self.fit_button, self.save_fit):
            row.addWidget(widget)
        layout.addLayout(row)
        single = QHBoxLayout()
        self.single_kind = QComboBox()
        for kind in (k for k in KINDS.values() if not k.traverse):
            self.single_kind.addItem(f"{kind.label.capitalize()} ({kind.unit})", kind.key)
        self.single_value = QLineEdit()
        self.single_value.setPlaceholderText("0.95mm, 8um, 60HRC or 720HV")
        self.add_single = QPushButton("Add to the selected load")
        self.add_single.clicked.connect(self.add_value)
        single.addWidget(QLabel("One value:"))
        for widget in (self.single_kind, self.single_value, self.add_single):
            single.addWidget(widget)
        layout.addLayout(single)
        below = QHBoxLayout()
        self.result = QPlainTextEdit()
        self.result.setReadOnly(True)
        self.result.setObjectName("fit_result")
        below.addWidget(self.result, 3)
        from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
        from matplotlib.figure import Figure

        self.figure = Figure(figsize=(4, 4.4))
        self.canvas = FigureCanvasQTAgg(self.figure)
        self.canvas.setMinimumWidth(420)
        below.addWidget(self.canvas, 3)
        layout.addLayout(below, 3)
        self.found = None
        buttons = QDialogButtonBox(QDialogButtonBox.Close)
        buttons.rejected.connect(self.reject)
        layout.addWidget(buttons)
        self.loads = []
        self.refresh()

    def refresh(self) -> None:
        path = record_path(self.settings)
        self.where.setText(f"Record: {path}")
        try:
            with Record(path) as record:
                furnaces = record.furnaces()
        except InputError as error:
            self.result.setPlainText(error.message)
            furnaces = []
        current = self.furnace.currentText()
        self.furnace.blockSignals(True)
        self.furnace.clear()
        self.furnace.addItems(furnaces)
        if current in furnaces:
            self.furnace.setCurrentText(current)
        self.furnace.blockSignals(False)
        self.show_loads()

    def show_loads(self) -> None:
        name = self.furnace.currentText()
        self.loads = []
        oven = None
        if name:
            with Record(record_path(self.settings)) as record:
                self.loads = record.loads(name)
                oven = record.furnace(name)
        self.oven_kind.setText(oven.kind if oven else "")
        self.survey.setCurrentIndex(max(self.survey.findData(oven.survey_class if oven else ""), 0))
        self.oven_notes.setText(oven.notes if oven else "")
        self.save_oven.setEnabled(oven is not None)
        from ..shop.furnace_fit import depth_check
        from ..shop.record import grade_of

        self.table.setRowCount(len(self.loads))
        for r, load in enumerate(self.loads):
            coupons = ", ".join(f"{m.kind} ({len(m.points)})" for m in load.measurements) or "none yet"
            planned = measured = ""
            if load.measurements:
                try:
                    check = depth_check(load)
                    planned = formats.length(check.predicted)
                    measured = "—" if check.measured is None else formats.length(check.measured)
                except CasedepthError as error:
                    planned = getattr(error, "message", str(error))
            cells = (load.date, load.number, load.plan.get("title", ""),
                     "as planned" if load.soak is None else format_duration(load.soak), coupons, planned, measured)
            for c, text in enumerate(cells):
                self.table.setItem(r, c, QTableWidgetItem(text))
        grades = sorted({grade_of(load) for load in self.loads})
        self.grade.clear()
        self.grade.addItem("Every grade", None)
        for grade in grades:
            self.grade.addItem(f"Grade {grade}", grade)
        self.fit_button.setEnabled(any(load.measurements for load in self.loads))
        self.add_csv.setEnabled(bool(self.loads))
        self.plot(None)

    def describe_furnace(self) -> bool:
        """Keep the furnace's type, survey class and notes (as ``casedepth record furnace NAME --kind …``)."""
        try:
            with Record(record_path(self.settings)) as record:
                record.describe_furnace(self.furnace.currentText(), self.oven_kind.text(), self.survey.currentData(),
                                        self.oven_notes.text())
        except InputError as error:
            QMessageBox.warning(self, "Cannot keep the furnace's details", error.message)
            return False
        return True

    def choose_file(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Furnace record", str(record_path(self.settings)),
                                              "Furnace records (*.sqlite);;All files (*)",
                                              options=QFileDialog.DontConfirmOverwrite)
        if path:
            self.settings.setValue("record_path", path)
            adopt_record_path(self.settings)  # plans naming a furnace are calibrated from this file from now on
            self.refresh()

    def add_coupon(self, path: str | None = None) -> bool:
        """Add a coupon's readings to the selected load from a lab's CSV (a header row, depth mm and value per row)."""
        row = self.table.currentRow()
        if row < 0:
            row = len(self.loads) - 1
        if not path:
            path, _ = QFileDialog.getOpenFileName(self, "Coupon readings", "", "CSV (*.csv *.txt);;All files (*)")
        if not path:
            return False
        kind = self.kind.currentData()
        scale = self.scale.currentText() if kind == "hardness" else ""
        load = self.loads[row]
        try:
            points = read_csv(Path(path).read_text(encoding="utf-8-sig"), kind, scale)
            with Record(record_path(self.settings)) as record:
                record.add_measurement(load.number, Measurement(kind, points, scale=scale), load.furnace)
        except (InputError, OSError) as error:
            QMessageBox.warning(self, "Cannot add the readings", getattr(error, "message", str(error)))
            return False
        self.show_loads()
        return True

    def fit(self) -> None:
        from ..shop.furnace_fit import fit_furnace

        name = self.furnace.currentText()
        self.result.setPlainText(f"Fitting {name} to {len(self.loads)} loads…")
        self.repaint()
        try:
            found = fit_furnace(self.loads, name, self.grade.currentData())
        except CasedepthError as error:
            self.result.setPlainText(getattr(error, "message", str(error)))
            return
        self.result.setPlainText(found.text())
        self.result.moveCursor(QTextCursor.Start)
        self.found = found
        self.save_fit.setEnabled(True)
        self.plot(found)

    def plot(self, found) -> None:
        """The furnace's saved fits over time (its trend), and under them each coupon's miss against the last fit."""
        self.figure.clear()
        trend = self.figure.add_subplot(2, 1, 1)
        self.plot_trend(trend)
        ax = self.figure.add_subplot(2, 1, 2)
        if found is None:
            ax.text(0.5, 0.5, "Fit the furnace to see each coupon's miss", ha="center", va="center", fontsize=8,
                    transform=ax.transAxes)
            ax.set_axis_off()
        else:
            self.plot_misses(found, ax)
        self.figure.tight_layout()
        self.canvas.draw_idle()

    def plot_trend(self, ax) -> None:
        """The diffusivity multiplier of each saved fit of the furnace with its 95 % interval, against the day it was
        made (one colour per grade; every grade in dark blue)."""
        from datetime import date as _day

        name = self.furnace.currentText()
        saved = []
        if name:
            with Record(record_path(self.settings)) as record:
                saved = record.calibrations(name)
        ax.set_title("Saved fits: diffusivity multiplier, 95 % interval", fontsize=9)
        ax.tick_params(labelsize=7)
        if not saved:
            ax.text(0.5, 0.5, "No fit kept yet", ha="center", va="center", fontsize=8, transform=ax.transAxes)
            return
        colours = ["#1e3550", "#b45309", "#15803d", "#7c3aed", "#0e7490"]
        grades = [None] + sorted({f.grade for f in saved if f.grade is not None})
        for i, grade in enumerate(grades):
            rows = [f for f in saved if f.grade == grade]
            points = []
            for f in rows:
                key = next((k for k in ("diffusivity_multiplier", "nitrogen_diffusivity_multiplier") if k in f.fit), None)
                if key is not None:
                    low, high = f.fit[f"{key}_ci"]
                    points.append((_day.fromisoformat(f.made), f.fit[key], low, high))
            if not points:
                continue
            days, values, lows, highs = zip(*points)
            ax.errorbar(days, values, yerr=[[v - lo for v, lo in zip(values, lows)],
                                           [hi - v for v, hi in zip(values, highs)]],
                        fmt="o-", ms=4, capsize=3, color=colours[i % len(colours)],
                        label="every grade" if grade is None else f"grade {grade}")
        ax.axhline(1.0, color="#888", lw=0.8)
        ax.set_ylabel("D ×", fontsize=8)
        ax.legend(fontsize=7, loc="best")
        _dates(ax)

    def plot_misses(self, found, ax) -> None:
        """Each coupon's mean miss, in its readings' usual scatters, against the load's date: the furnace's drift and
        its outliers at a glance."""
        from datetime import date as _day

        from ..shop.furnace_fit import SCATTER

        for kind, marker in (("carbon", "o"), ("hardness", "s"), ("case_depth", "^"), ("nitrided_depth", "v"),
                             ("surface_hardness", "D")):
            rows = [load for load in found.loads if load.kind == kind]
            if not rows:
                continue
            days = [_day.fromisoformat(load.date) for load in rows]
            misses = [load.mean_miss / SCATTER[kind] for load in rows]
            colours = ["#b42318" if load.outlier else "#1e3550" for load in rows]
            ax.scatter(days, misses, marker=marker, c=colours, label=KINDS[kind].label)
        ax.axhline(0.0, color="#888", lw=0.8)
        ax.margins(x=0.06, y=0.25)  # room for the markers at the ends
        ax.set_ylabel("miss [scatters]", fontsize=8)
        ax.set_title("Model − measured, per coupon (red: outlier)", fontsize=9)
        ax.tick_params(labelsize=7)
        ax.legend(fontsize=7, loc="best")
        _dates(ax)

    def keep_fit(self) -> None:
        """Keep the last fit as the one new plans for this furnace take (as ``casedepth record fit --save``)."""
        if self.found is None:
            return
        with Record(record_path(self.settings)) as record:
            record.save_calibration(self.found.furnace, self.found.treatment, self.found.to_dict())
            saved = record.calibration(self.found.furnace, self.found.treatment, self.found.grade)
        which = saved.furnace if saved.grade is None else f"{saved.furnace} and grade {saved.grade}"
        self.result.appendPlainText(f"\nKept: plans that name {which} take it ({saved.label()}).")
        self.save_fit.setEnabled(False)
        self.plot(self.found)

    def add_value(self) -> bool:
        """Add one measured value (a depth, a layer, a hardness) to the selected load."""
        row = self.table.currentRow()
        if row < 0 or not self.loads:
            QMessageBox.warning(self, "Cannot add the value", "Select the load it was measured on.")
            return False
        kind = self.single_kind.currentData()
        load = self.loads[row]
        try:
            value = parse_measured(kind, self.single_value.text())
            with Record(record_path(self.settings)) as record:
                record.add_measurement(load.number, Measurement(kind, [(0.0, value)]), load.furnace)
        except InputError as error:
            QMessageBox.warning(self, "Cannot add the value", error.message)
            return False
        self.single_value.clear()
        self.show_loads()
        return True

