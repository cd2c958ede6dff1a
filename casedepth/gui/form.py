"""The input side of the window: steel, part, furnace step, drawing callout, model settings.

Every widget is a thin view of one :class:`casedepth.plan.Plan` field: editing the widget sets the
field (one undoable edit), and any change of the field (undo, open, units switch) is shown back.
"""

from __future__ import annotations

import math

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (QCheckBox, QComboBox, QCompleter, QDoubleSpinBox, QFormLayout, QGroupBox, QHBoxLayout,
                               QHeaderView, QLabel, QLineEdit, QPlainTextEdit, QSlider, QTableWidget, QTableWidgetItem,
                               QToolButton, QVBoxLayout, QWidget)

from .. import steels
from ..austenite import Andrews_1965_Ac3
from ..diffusivity import METHODS
from ..errors import InputError
from ..hardness import HARDNESS_RELATIONS
from ..plan import Plan, stage_to_dict
from ..nitriding import dissociation_for_potential, nitride_capacity, nitriding_potential_from_dissociation
from ..recipe import STAGE_KINDS
from ..surface import Gunnarson_alloy_factor
from ..units import DisplayUnits, parse_velocity

# (label, shape, has a size, default size [m])
SHAPE_CHOICES = [
    ("Flat surface, thick section", "plate", False, None),
    ("Plate, carburized on both faces", "plate", True, 10e-3),
    ("Shaft or pin (solid round)", "cylinder", True, 30e-3),
    ("Bore (hole in a thick body)", "bore", True, 30e-3),
    ("Ball (sphere)", "sphere", True, 20e-3),
]
PROCESS_CHOICES = [("single", "One soak at one carbon potential"), ("boost-diffuse", "Boost and diffuse (plan both times)"),
                   ("stages", "Stages of my own")]
PROCESS_NOTES = {
    "single": "The soak time at temperature for the case at the end of the cycle: carbon moved in the shop's "
              "heat-up, drop and equalize is counted; the quote adds load, quench, wash and temper times.",
    "boost-diffuse": "Plans boost and diffuse so the case and the surface carbon are on target at the end of "
                     "the whole cycle; the shop's heat-up, drop and equalize are counted.",
    "stages": "Runs the stages as entered (temperatures ramp from the previous stage) and shows what they give.",
}
THRESHOLD_KINDS = [("%C", "carbon", 2, 0.05, 1.5), ("HV", "HV", 0, 100.0, 1000.0), ("HRC", "HRC", 1, 10.0, 70.0),
                   ("%C above core (total case)", "above core", 2, 0.01, 0.5)]

INVALID_STYLE = "border: 2px solid #d1495b; background: #fdecee;"


def _spin(decimals: int, low: float, high: float, step: float, suffix: str = "") -> QDoubleSpinBox:
    spin = QDoubleSpinBox()
    spin.setDecimals(decimals)
    spin.setRange(low, high)
    spin.setSingleStep(step)
    spin.setSuffix(suffix)
    spin.setKeyboardTracking(False)  # one edit per committed value (Enter, Tab, arrows), not per keystroke
    spin.setAccelerated(True)
    return spin


class PlanForm(QWidget):
    """The form bound to a plan. ``units`` sets how lengths and temperatures are shown."""

    input_problem = Signal(str, str)  # field, message: an entry the form itself cannot read

    def __init__(self, plan: Plan, units: DisplayUnits, parent=None):
        super().__init__(parent)
        self.plan = plan
        self.units = units
        self.planned_stages: list = []  # the cycle the last result ran, for "Copy planned cycle" (set by the window)
        self._showing = False
        self._invalid: set[str] = set()
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self._plan_group())
        layout.addWidget(self._steel_group())
        layout.addWidget(self._part_group())
        layout.addWidget(self._furnace_group())
        layout.addWidget(self._process_group())
        layout.addWidget(self._callout_group())
        layout.addWidget(self._model_group())
        notes = QGroupBox("Notes")
        notes_layout = QVBoxLayout(notes)
        self.notes = QPlainTextEdit()
        self.notes.setPlaceholderText("anything the floor or the customer should know")
        self.notes.setMaximumHeight(70)
        self.notes.textChanged.connect(lambda: self._set("notes", self.notes.toPlainText(), coalesce=True))
        notes_layout.addWidget(self.notes)
        layout.addWidget(notes)
        layout.addStretch(1)
        self.plan_replaced(plan)

    # -- building ----------------------------------------------------------------------------------
    def _plan_group(self) -> QGroupBox:
        box = QGroupBox("Plan")
        form = QFormLayout(box)
        self.title = QLineEdit()
        self.title.editingFinished.connect(lambda: self._set("title", self.title.text().strip() or "Untitled plan"))
        form.addRow("Name", self.title)
        self.part = QLineEdit()
        self.part.setPlaceholderText("part number or description")
        self.part.editingFinished.connect(lambda: self._set("part", self.part.text().strip()))
        form.addRow("Part", self.part)
        self.revision = QLineEdit()
        self.revision.setMaximumWidth(60)
        self.revision.setToolTip("Revision printed on the process sheet")
        self.revision.editingFinished.connect(lambda: self._set("revision", self.revision.text().strip() or "A"))
        form.addRow("Revision", self.revision)
        self.treatment = QComboBox()
        self.treatment.addItem("Carburizing", "carburizing")
        self.treatment.addItem("Gas nitriding", "nitriding")
        self.treatment.activated.connect(lambda i: self._treatment_picked(self.treatment.itemData(i)))
        form.addRow("Treatment", self.treatment)
        return box

    def _treatment_picked(self, treatment: str) -> None:
        """Switch treatment as one edit, moving the inputs that make no sense for it to usual values."""
        if treatment == self.plan.treatment:
            return
        changes = {"treatment": treatment}
        if all(g.name != self.plan.steel for g in steels.library(treatment)):
            usual = "4140" if treatment == "nitriding" else "8620"
            changes.update(steel=usual, composition=dict(steels.find(usual).composition))
        if treatment == "nitriding":
            changes.update(temperature=520.0 + 273.15, case_min=0.3e-3, case_max=0.5e-3)
        else:
            changes.update(temperature=925.0 + 273.15, case_min=0.8e-3, case_max=1.2e-3)
        for name in ("composition", "temperature", "case_min", "case_max"):
            self.clear_mark(name)
        self.plan.update(**changes)

    def _steel_group(self) -> QGroupBox:
        box = QGroupBox("Steel")
        form = QFormLayout(box)
        self.steel = QComboBox()
        self.steel.setEditable(True)
        self.steel.setInsertPolicy(QComboBox.NoInsert)
        self.steel.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.steel.setMinimumContentsLength(16)
        completer = QCompleter(self.steel.model(), self.steel)
        completer.setFilterMode(Qt.MatchContains)
        completer.setCaseSensitivity(Qt.CaseInsensitive)
        completer.setCompletionMode(QCompleter.PopupCompletion)
        self.steel.setCompleter(completer)
        self.steel.setToolTip("Type to filter the steel library (name or standard number)")
        self.steel.activated.connect(self._steel_picked)
        self.steel.lineEdit().editingFinished.connect(self._steel_typed)
        form.addRow("Grade", self.steel)
        self.composition = QLineEdit()
        self.composition.setToolTip("Composition in wt %, e.g. C=0.20 Mn=0.80 Cr=0.50 — edit to match the heat's certificate")
        self.composition.editingFinished.connect(self._composition_edited)
        form.addRow("Composition, wt %", self.composition)
        self.steel_facts = QLabel()
        self.steel_facts.setWordWrap(True)
        self.steel_facts.setStyleSheet("color: #555;")
        form.addRow(self.steel_facts)
        return box

    def _part_group(self) -> QGroupBox:
        box = QGroupBox("Part")
        form = QFormLayout(box)
        self.shape = QComboBox()
        self.shape.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.shape.setMinimumContentsLength(16)
        for label, *_ in SHAPE_CHOICES:
            self.shape.addItem(label)
        self.shape.activated.connect(self._shape_picked)
        form.addRow("Surface", self.shape)
        self.size_label = QLabel("Diameter")
        self.size = _spin(3, 0.001, 5000.0, 1.0)
        self.size.valueChanged.connect(lambda v: self._set("size", self.units.length_si(v)))
        form.addRow(self.size_label, self.size)
        return box

    def _furnace_group(self) -> QGroupBox:
        box = QGroupBox("Furnace step")
        form = QFormLayout(box)
        self.temperature = _spin(0, -300.0, 3000.0, 5.0)
        self.temperature.valueChanged.connect(lambda v: self._set("temperature", self.units.temperature_si(v)))
        form.addRow("Temperature", self.temperature)
        self.carbon_potential = _spin(2, 0.0, 3.0, 0.05, " %C")
        self.carbon_potential.valueChanged.connect(lambda v: self._set("carbon_potential", v))
        self.carbon_potential.setToolTip("Carbon potential of the atmosphere (carbon of plain carbon steel in equilibrium with it)")
        form.addRow("Carbon potential", self.carbon_potential)
        self.kn = _spin(2, 0.05, 30.0, 0.1, " atm^-½")
        self.kn.setToolTip("Nitriding potential K_N = p(NH3)/p(H2)^1.5")
        self.kn.valueChanged.connect(lambda v: self._set("kn", v))
        form.addRow("K_N", self.kn)
        self.dissociation = _spin(1, 1.0, 99.0, 1.0, " %")
        self.dissociation.setToolTip("Ammonia dissociation of the exhaust (burette), pure ammonia feed: sets K_N")
        self.dissociation.valueChanged.connect(self._dissociation_edited)
        form.addRow("or dissociation", self.dissociation)
        row = QHBoxLayout()
        self.compound_min = _spin(1, 0.0, 100.0, 1.0, " µm")
        self.compound_max = _spin(1, 0.0, 100.0, 1.0, " µm")
        self.compound_min.valueChanged.connect(lambda v: self._set("compound_min", v * 1e-6))
        self.compound_max.valueChanged.connect(lambda v: self._set("compound_max", v * 1e-6))
        row.addWidget(self.compound_min)
        row.addWidget(QLabel("to"))
        row.addWidget(self.compound_max)
        form.addRow("Compound layer", row)
        self.compound_row = row
        self.two_stage = QCheckBox("Two stages (second K_N thins the layer)")
        self.two_stage.setToolTip("Nitride at K_N first, then at the second K_N: the layer thins (ε turns to γ′) "
                                  "while the diffusion zone keeps growing")
        self.two_stage.toggled.connect(lambda on: self._set("two_stage", bool(on)))
        form.addRow(self.two_stage)
        self.kn_second = _spin(2, 0.0, 30.0, 0.05, " atm^-½")
        self.kn_second.setSpecialValueText("just above α/γ′")
        self.kn_second.setToolTip("K_N of the second stage; at or above the α/γ′ boundary so the ferrite stays saturated")
        self.kn_second.valueChanged.connect(lambda v: self._set("kn_second", v or None))
        form.addRow("Second-stage K_N", self.kn_second)
        self.core_hardness = _spin(0, 0.0, 1400.0, 10.0, " HV")
        self.core_hardness.setSpecialValueText("grade's typical")
        self.core_hardness.valueChanged.connect(lambda v: self._set("core_hardness", v or None))
        form.addRow("Core hardness", self.core_hardness)
        self.surface_hardness = _spin(0, 0.0, 1400.0, 10.0, " HV")
        self.surface_hardness.setSpecialValueText("grade's typical")
        self.surface_hardness.valueChanged.connect(lambda v: self._set("surface_hardness", v or None))
        form.addRow("Surface hardness", self.surface_hardness)
        self.n_multiplier = _spin(3, 0.1, 10.0, 0.05, " ×")
        self.n_multiplier.setToolTip("Calibration factor on the nitrogen diffusivity: the internal-nitriding model tends "
                                     "to run ahead of measured depths; fit it to your own sections")
        self.n_multiplier.valueChanged.connect(lambda v: self._set("n_multiplier", v))
        form.addRow("D_N multiplier", self.n_multiplier)
        self.furnace_form = form
        return box

    def _dissociation_edited(self, percent: float) -> None:
        if not self._showing:
            self._set("kn", nitriding_potential_from_dissociation(percent / 100.0))

    def _fill_steels(self, treatment: str) -> None:
        """List the grades of the treatment (keeps the current one selected)."""
        if getattr(self, "_steel_list", None) == treatment:
            return
        self._steel_list = treatment
        self.steel.clear()
        for grade in steels.library(treatment):
            self.steel.addItem(f"{grade.name}  —  {grade.standard}", grade.name)
        self.steel.addItem("custom  —  composition below", "custom")
        index = self.steel.findData(self.plan.steel)
        if index >= 0:
            self.steel.setCurrentIndex(index)
        else:
            self.steel.setEditText(self.plan.steel)

    def _process_group(self) -> QGroupBox:
        box = QGroupBox("Cycle")
        self.process_box = box
        layout = QVBoxLayout(box)
        self.process = QComboBox()
        for key, label in PROCESS_CHOICES:
            self.process.addItem(label, key)
        self.process.activated.connect(lambda i: self._set("process", self.process.itemData(i)))
        layout.addWidget(self.process)
        self.boost_box = QWidget()
        form = QFormLayout(self.boost_box)
        form.setContentsMargins(0, 0, 0, 0)
        self.boost_potential = _spin(2, 0.0, 3.0, 0.05, " %C")
        self.boost_potential.valueChanged.connect(lambda v: self._set("boost_potential", v))
        form.addRow("Boost potential", self.boost_potential)
        self.diffuse_potential = _spin(2, 0.0, 3.0, 0.05, " %C")
        self.diffuse_potential.valueChanged.connect(lambda v: self._set("diffuse_potential", v))
        form.addRow("Diffuse potential", self.diffuse_potential)
        row = QHBoxLayout()
        self.surface_min = _spin(2, 0.0, 2.0, 0.01, " %C")
        self.surface_max = _spin(2, 0.0, 2.0, 0.01, " %C")
        self.surface_min.valueChanged.connect(lambda v: self._set("surface_min", v))
        self.surface_max.valueChanged.connect(lambda v: self._set("surface_max", v))
        row.addWidget(self.surface_min)
        row.addWidget(QLabel("to"))
        row.addWidget(self.surface_max)
        form.addRow("Surface carbon", row)
        layout.addWidget(self.boost_box)
        self.stage_box = QWidget()
        stage_layout = QVBoxLayout(self.stage_box)
        stage_layout.setContentsMargins(0, 0, 0, 0)
        self.stage_table = QTableWidget(0, 4)
        self.stage_table.setHorizontalHeaderLabels(["Stage", "h", "°C", "%C"])
        self.stage_table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.stage_table.horizontalHeader().setSectionResizeMode(0, QHeaderView.ResizeToContents)
        self.stage_table.setToolTip("Hours, temperature at the end of the stage (ramps from the previous one) "
                                    "and carbon potential; leave temperature and potential empty for quench, wash, temper")
        self.stage_table.verticalHeader().setVisible(False)
        self.stage_table.setMinimumHeight(200)
        self.stage_table.setSizeAdjustPolicy(QTableWidget.AdjustIgnored)
        self.stage_table.setMinimumWidth(260)
        self.stage_table.itemChanged.connect(self._stage_cell_edited)
        stage_layout.addWidget(self.stage_table)
        buttons = QHBoxLayout()
        self.stage_buttons = {}
        for key, text, tip in (("add", "Add", "Add a stage after the selected one"),
                               ("remove", "Remove", "Remove the selected stage"),
                               ("up", "↑", "Move the selected stage earlier"), ("down", "↓", "Move the selected stage later"),
                               ("copy", "From last result", "Fill the table with the cycle of the last result")):
            button = QToolButton()
            button.setText(text)
            button.setToolTip(tip)
            button.clicked.connect(lambda _=False, k=key: self._stage_button(k))
            buttons.addWidget(button)
            self.stage_buttons[key] = button
        buttons.addStretch(1)
        stage_layout.addLayout(buttons)
        layout.addWidget(self.stage_box)
        self.process_note = QLabel()
        self.process_note.setWordWrap(True)
        self.process_note.setStyleSheet("color: #555;")
        layout.addWidget(self.process_note)
        return box

    def _stage_rows(self) -> list[dict]:
        return [dict(d) for d in self.plan.stages]

    def _stage_button(self, key: str) -> None:
        rows = self._stage_rows()
        current = self.stage_table.currentRow()
        if key == "add":
            last = rows[-1] if rows else {"temperature_c": 925.0, "carbon_potential_pct": 1.0}
            rows.insert(current + 1 if current >= 0 else len(rows),
                        {"kind": "soak", "duration_h": 1.0, "temperature_c": last.get("temperature_c", 925.0),
                         "carbon_potential_pct": last.get("carbon_potential_pct", 1.0)})
        elif key == "remove" and 0 <= current < len(rows):
            rows.pop(current)
        elif key in ("up", "down") and 0 <= current < len(rows):
            other = current - 1 if key == "up" else current + 1
            if 0 <= other < len(rows):
                rows[current], rows[other] = rows[other], rows[current]
                self._set("stages", rows)
                self.stage_table.setCurrentCell(other, 0)
                return
        elif key == "copy" and self.planned_stages:
            rows = [stage_to_dict(stage) for stage in self.planned_stages]
        else:
            return
        self._set("stages", rows)

    def _stage_kind_picked(self, row: int, kind: str) -> None:
        rows = self._stage_rows()
        if row < len(rows) and rows[row]["kind"] != kind:
            rows[row]["kind"] = kind
            if not STAGE_KINDS[kind][0]:
                rows[row].pop("carbon_potential_pct", None)
                rows[row].pop("start_potential_pct", None)
            self._set("stages", rows)

    def _stage_cell_edited(self, item) -> None:
        if self._showing:
            return
        rows = self._stage_rows()
        row, column = item.row(), item.column()
        if row >= len(rows):
            return
        key = {1: "duration_h", 2: "temperature_c", 3: "carbon_potential_pct"}.get(column)
        text = item.text().strip()
        try:
            if text == "" and column in (2, 3):
                rows[row].pop(key, None)
            else:
                value = float(text)
                if column == 2:
                    value = self.units.temperature_si(value) - 273.15
                rows[row][key] = value
        except ValueError:
            self.mark("stages", f"stage {row + 1}: cannot read {text!r} as a number")
            return
        self._set("stages", rows)

    def _show_stages(self) -> None:
        rows = self.plan.stages
        table = self.stage_table
        table.setRowCount(len(rows))
        for r, row in enumerate(rows):
            kind_box = QComboBox()
            kind_box.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            kind_box.setMinimumContentsLength(9)
            for kind, (_, label) in STAGE_KINDS.items():
                kind_box.addItem(label, kind)
            kind_box.setCurrentIndex(max(kind_box.findData(row.get("kind")), 0))
            kind_box.activated.connect(lambda i, rr=r, box=kind_box: self._stage_kind_picked(rr, box.itemData(i)))
            table.setCellWidget(r, 0, kind_box)
            temperature = row.get("temperature_c")
            shown = "" if temperature is None else f"{self.units.temperature(temperature + 273.15):.0f}"
            potential = row.get("carbon_potential_pct")
            for c, text in ((1, f"{row.get('duration_h', 0.0):.2f}"), (2, shown),
                            (3, "" if potential is None else f"{potential:g}")):
                table.setItem(r, c, QTableWidgetItem(text))
        table.horizontalHeaderItem(2).setText(self.units.temperature_unit)

    def _callout_group(self) -> QGroupBox:
        box = QGroupBox("Drawing callout: effective case depth")
        self.callout_box = box
        form = QFormLayout(box)
        self.callout_form = form
        row = QHBoxLayout()
        self.case_min = _spin(3, 0.0, 60.0, 0.05)
        self.case_max = _spin(3, 0.0, 60.0, 0.05)
        self.case_min.valueChanged.connect(lambda v: self._set("case_min", self.units.length_si(v)))
        self.case_max.valueChanged.connect(lambda v: self._set("case_max", self.units.length_si(v)))
        row.addWidget(self.case_min)
        row.addWidget(QLabel("to"))
        row.addWidget(self.case_max)
        form.addRow("Depth", row)
        aim_row = QHBoxLayout()
        self.aim = QSlider(Qt.Horizontal)
        self.aim.setRange(0, 100)
        self.aim.setToolTip("Where in the window to aim: 50 % is the middle")
        self.aim.valueChanged.connect(lambda v: self._set("aim", v / 100.0, coalesce=True))
        self.aim_value = QLabel()
        self.aim_value.setMinimumWidth(120)
        aim_row.addWidget(self.aim)
        aim_row.addWidget(self.aim_value)
        form.addRow("Aim", aim_row)
        threshold_row = QHBoxLayout()
        self.threshold_value = _spin(2, 0.0, 1000.0, 0.01)
        self.threshold_value.valueChanged.connect(lambda v: self._set("threshold_value", v))
        self.threshold_kind = QComboBox()
        for label, *_ in THRESHOLD_KINDS:
            self.threshold_kind.addItem(label)
        self.threshold_kind.activated.connect(self._threshold_kind_picked)
        threshold_row.addWidget(self.threshold_value)
        threshold_row.addWidget(self.threshold_kind)
        form.addRow("At", threshold_row)
        self.threshold_row = threshold_row
        return box

    def _model_group(self) -> QWidget:
        outer = QWidget()
        self.model_outer = outer
        layout = QVBoxLayout(outer)
        layout.setContentsMargins(0, 0, 0, 0)
        self.model_toggle = QToolButton()
        self.model_toggle.setText("Model settings")
        self.model_toggle.setCheckable(True)
        self.model_toggle.setToolButtonStyle(Qt.ToolButtonTextBesideIcon)
        self.model_toggle.setArrowType(Qt.RightArrow)
        self.model_toggle.setStyleSheet("QToolButton { border: none; font-weight: bold; }")
        layout.addWidget(self.model_toggle)
        self.model_box = QGroupBox()
        form = QFormLayout(self.model_box)
        self.diffusivity = QComboBox()
        self.diffusivity.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.diffusivity.setMinimumContentsLength(16)
        for key, method in METHODS.items():
            self.diffusivity.addItem(method.display, key)
            self.diffusivity.setItemData(self.diffusivity.count() - 1, f"{method.reference}; {method.validity}",
                                         Qt.ToolTipRole)
        self.diffusivity.activated.connect(lambda i: self._set("diffusivity", self.diffusivity.itemData(i)))
        form.addRow("Carbon diffusivity", self.diffusivity)
        self.d_multiplier = _spin(3, 0.1, 10.0, 0.05, " ×")
        self.d_multiplier.setToolTip("Calibration factor on D (1 = the published model)")
        self.d_multiplier.valueChanged.connect(lambda v: self._set("d_multiplier", v))
        form.addRow("D multiplier", self.d_multiplier)
        self.d0 = QLineEdit()
        self.d0.setToolTip("Arrhenius pre-exponential factor, m²/s")
        self.d0.editingFinished.connect(self._d0_edited)
        form.addRow("D0 [m²/s]", self.d0)
        self.q = _spin(1, 50.0, 400.0, 1.0, " kJ/mol")
        self.q.valueChanged.connect(lambda v: self._set("q", v * 1e3))
        form.addRow("Activation energy Q", self.q)
        self.beta = QLineEdit()
        self.beta.setToolTip("Mass-transfer coefficient of the atmosphere, cm/s (about 1–3e-5 in endothermic gas)")
        self.beta.editingFinished.connect(self._beta_edited)
        form.addRow("β [cm/s]", self.beta)
        self.beta_held = QCheckBox("Surface held at equilibrium (β = ∞)")
        self.beta_held.toggled.connect(lambda on: self._set("beta_held", bool(on)))
        form.addRow(self.beta_held)
        self.alloy_factor = QCheckBox("Alloy factor (Gunnarson)")
        self.alloy_factor.toggled.connect(lambda on: self._set("alloy_factor", bool(on)))
        form.addRow(self.alloy_factor)
        self.hardness_relation = QComboBox()
        self.hardness_relation.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.hardness_relation.setMinimumContentsLength(16)
        for key, relation in HARDNESS_RELATIONS.items():
            self.hardness_relation.addItem(relation.display, key)
            self.hardness_relation.setItemData(self.hardness_relation.count() - 1, relation.assumptions, Qt.ToolTipRole)
        self.hardness_relation.activated.connect(
            lambda i: self._set("hardness_relation", self.hardness_relation.itemData(i)))
        form.addRow("Carbon → hardness", self.hardness_relation)
        layout.addWidget(self.model_box)
        self.model_toggle.toggled.connect(self.show_model_settings)
        self.show_model_settings(False)
        return outer

    # -- widget -> plan --------------------------------------------------------------------------------
    def _set(self, name: str, value, coalesce: bool = False) -> None:
        if not self._showing:
            self.clear_mark(name)
            self.plan.set(name, value, coalesce=coalesce)

    def _steel_picked(self, index: int) -> None:
        self.clear_mark("composition")
        name = self.steel.itemData(index)
        if name == "custom":
            self.plan.set("steel", "custom")
            self.composition.setFocus()
        else:
            self.plan.choose_steel(name)

    def _steel_typed(self) -> None:
        text = self.steel.currentText().split("—")[0].strip()
        if not text or self._showing or text == "custom":
            return
        try:
            grade = steels.find(text)
        except InputError as error:
            self.mark("composition", error.message)
            return
        if grade.name != self.plan.steel:
            self.plan.choose_steel(grade.name)

    def _composition_edited(self) -> None:
        if self._showing:
            return
        try:
            composition = steels.parse_composition(self.composition.text(), "composition")
        except InputError as error:
            self.mark("composition", error.message)
            return
        self._set("composition", composition)

    def _shape_picked(self, index: int) -> None:
        _, shape, sized, default = SHAPE_CHOICES[index]
        size = self.plan.size if sized else None
        if sized and (size is None or shape != self.plan.shape and self.plan.shape == "plate"):
            size = size or default
        self.clear_mark("size")
        self.clear_mark("shape")
        self.plan.update(shape=shape, size=size)

    def _threshold_kind_picked(self, index: int) -> None:
        _, kind, _, _, _ = THRESHOLD_KINDS[index]
        if kind == self.plan.threshold_kind:
            return
        # ISO 18203 550 HV; SAE J423 50 HRC, and total case at 0.04 %C above the core
        usual = {"carbon": 0.40, "HV": 550.0, "HRC": 50.0, "above core": 0.04}[kind]
        self.clear_mark("threshold_value")
        self.plan.update(threshold_kind=kind, threshold_value=usual)

    def _d0_edited(self) -> None:
        try:
            value = float(self.d0.text())
            if not math.isfinite(value) or value <= 0:
                raise ValueError
        except ValueError:
            self.mark("d0", f"cannot read {self.d0.text()!r}; write a number such as 2.3e-5")
            return
        self._set("d0", value)

    def _beta_edited(self) -> None:
        text = self.beta.text().strip()
        try:
            value = parse_velocity(text, "beta")
        except InputError as error:
            self.mark("beta", error.message)
            return
        if math.isinf(value):
            self.plan.update(beta_held=True)
            return
        self._set("beta", value)

    # -- plan -> widgets -------------------------------------------------------------------------------
    def plan_replaced(self, plan: Plan) -> None:
        self.plan = plan
        plan.subscribe(lambda name, value: self.show_plan())
        self._invalid.clear()
        self.show_plan()

    def set_units(self, units: DisplayUnits) -> None:
        self.units = units
        self.show_plan()

    def show_plan(self) -> None:
        """Show every field of the plan (signals from the widgets are ignored meanwhile)."""
        p, u = self.plan, self.units
        self._showing = True
        try:
            if self.title.text() != p.title:
                self.title.setText(p.title)
            if self.part.text() != p.part:
                self.part.setText(p.part)
            if self.revision.text() != p.revision:
                self.revision.setText(p.revision)
            if self.notes.toPlainText() != p.notes:
                self.notes.setPlainText(p.notes)
            index = self.steel.findData(p.steel)
            if index >= 0:
                self.steel.setCurrentIndex(index)
            else:
                self.steel.setEditText(p.steel)
            self.steel.lineEdit().setCursorPosition(0)
            if "composition" not in self._invalid:
                self.composition.setText(" ".join(f"{el}={val:g}" for el, val in p.composition.items()))
                self.composition.setCursorPosition(0)
            self._show_steel_facts()
            choice = next(i for i, (_, shape, sized, _) in enumerate(SHAPE_CHOICES)
                          if shape == p.shape and (sized == (p.size is not None) or shape != "plate"))
            self.shape.setCurrentIndex(choice)
            sized = SHAPE_CHOICES[choice][2]
            self.size.setVisible(sized)
            self.size_label.setVisible(sized)
            self.size_label.setText("Thickness" if p.shape == "plate" else "Diameter")
            self._length_spin(self.size, p.size if p.size is not None else SHAPE_CHOICES[choice][3] or 0.0, big=True)
            self.temperature.setSuffix(f" {u.temperature_unit}")
            self.temperature.setValue(u.temperature(p.temperature))
            self.carbon_potential.setValue(p.carbon_potential)
            self._length_spin(self.case_min, p.case_min)
            self._length_spin(self.case_max, p.case_max)
            self.aim.setValue(int(round(p.aim * 100)))
            try:
                aim = p.targets()[1]
                self.aim_value.setText(f"{p.aim * 100:.0f} % → {u.format_length(aim)}")
            except InputError:
                self.aim_value.setText(f"{p.aim * 100:.0f} %")
            kind_index = next(i for i, k in enumerate(THRESHOLD_KINDS) if k[1] == p.threshold_kind)
            self.threshold_kind.setCurrentIndex(kind_index)
            _, _, decimals, _, _ = THRESHOLD_KINDS[kind_index]
            self.threshold_value.setDecimals(decimals)
            self.threshold_value.setSingleStep(10 ** -decimals if decimals else 10.0)
            self.threshold_value.setValue(p.threshold_value)
            self.diffusivity.setCurrentIndex(self.diffusivity.findData(p.diffusivity))
            self.d_multiplier.setValue(p.d_multiplier)
            arrhenius = p.diffusivity == "arrhenius"
            self.d0.setEnabled(arrhenius)
            self.q.setEnabled(arrhenius)
            if "d0" not in self._invalid:
                self.d0.setText(f"{p.d0:.3g}")
            self.q.setValue(p.q / 1e3)
            if "beta" not in self._invalid:
                self.beta.setText(f"{p.beta * 100:.3g}")
            self.beta.setEnabled(not p.beta_held)
            self.beta_held.setChecked(bool(p.beta_held))
            self.alloy_factor.setChecked(bool(p.alloy_factor))
            self.hardness_relation.setCurrentIndex(self.hardness_relation.findData(p.hardness_relation))
            nitriding = p.treatment == "nitriding"
            self.treatment.setCurrentIndex(self.treatment.findData(p.treatment))
            self._fill_steels(p.treatment)
            self.steel.lineEdit().setCursorPosition(0)  # refilling the list may have moved it to the end
            for widget in (self.carbon_potential,):
                self.furnace_form.setRowVisible(widget, not nitriding)
            for widget in (self.kn, self.dissociation, self.core_hardness, self.surface_hardness, self.n_multiplier):
                self.furnace_form.setRowVisible(widget, nitriding)
            self.furnace_form.setRowVisible(self.compound_row, nitriding)
            self.furnace_form.setRowVisible(self.two_stage, nitriding)
            self.furnace_form.setRowVisible(self.kn_second, nitriding and bool(p.two_stage))
            self.two_stage.setChecked(bool(p.two_stage))
            self.kn_second.setValue(p.kn_second or 0.0)
            self.process_box.setVisible(not nitriding)
            self.model_outer.setVisible(not nitriding)
            self.callout_form.setRowVisible(self.threshold_row, not nitriding)
            self.callout_box.setTitle("Drawing callout: nitrided hardness depth (core + 50 HV)" if nitriding
                                      else "Drawing callout: effective case depth")
            self.kn.setValue(p.kn)
            self.dissociation.setValue(100.0 * dissociation_for_potential(min(max(p.kn, 0.05), 30.0)))
            self.compound_min.setValue(p.compound_min * 1e6)
            self.compound_max.setValue(p.compound_max * 1e6)
            self.core_hardness.setValue(p.core_hardness or 0.0)
            self.surface_hardness.setValue(p.surface_hardness or 0.0)
            self.n_multiplier.setValue(p.n_multiplier)
            self.process.setCurrentIndex(max(self.process.findData(p.process), 0))
            self.boost_box.setVisible(p.process == "boost-diffuse")
            self.stage_box.setVisible(p.process == "stages")
            self.carbon_potential.setEnabled(p.process == "single")
            self.process_note.setText(PROCESS_NOTES.get(p.process, ""))
            self.boost_potential.setValue(p.boost_potential)
            self.diffuse_potential.setValue(p.diffuse_potential)
            self.surface_min.setValue(p.surface_min)
            self.surface_max.setValue(p.surface_max)
            self._show_stages()
        finally:
            self._showing = False

    def _length_spin(self, spin: QDoubleSpinBox, metres: float, big: bool = False) -> None:
        u = self.units
        spin.setDecimals(u.length_decimals)
        spin.setSuffix(f" {u.length_unit}")
        top = 5000.0 if big else 60.0
        spin.setRange(u.length(1e-6), u.length(top * 1e-3))
        spin.setSingleStep(0.002 if u.imperial else 0.05)
        spin.setValue(u.length(metres))

    def _show_steel_facts(self) -> None:
        try:
            steel = self.plan.steel_object()
        except InputError:
            self.steel_facts.setText("")
            return
        if self.plan.treatment == "nitriding":
            typical = (f" · typical core {steel.core_hardness_hv:.0f} HV, nitrided {steel.nitrided_surface_hv:.0f} HV"
                       if steel.core_hardness_hv and steel.nitrided_surface_hv else "")
            self.steel_facts.setText(f"{steel.standard}. Nitride formers bind {nitride_capacity(steel.composition):.2f} "
                                     f"wt % N{typical}")
            return
        ac3 = Andrews_1965_Ac3(steel.composition)
        factor = Gunnarson_alloy_factor(steel.composition)
        self.steel_facts.setText(f"{steel.standard}. Core {steel.carbon:.3f} %C · alloy factor {factor:.3f} · "
                                 f"Ac3 ≈ {self.units.format_temperature(ac3)} (Andrews 1965)")

    # -- marking bad input ------------------------------------------------------------------------------
    def widget_for(self, field: str) -> QWidget | None:
        return {"title": self.title, "part": self.part, "steel": self.steel, "composition": self.composition, "shape": self.shape, "size": self.size,
                "temperature": self.temperature, "carbon_potential": self.carbon_potential,
                "case_min": self.case_min, "case_max": self.case_max, "aim": self.aim,
                "threshold_value": self.threshold_value, "threshold_kind": self.threshold_kind,
                "diffusivity": self.diffusivity, "d_multiplier": self.d_multiplier, "d0": self.d0, "q": self.q,
                "beta": self.beta, "hardness_relation": self.hardness_relation, "process": self.process,
                "boost_potential": self.boost_potential, "diffuse_potential": self.diffuse_potential,
                "surface_min": self.surface_min, "surface_max": self.surface_max, "stages": self.stage_table,
                "kn": self.kn, "compound_min": self.compound_min, "compound_max": self.compound_max,
                "core_hardness": self.core_hardness, "surface_hardness": self.surface_hardness,
                "n_multiplier": self.n_multiplier,
                "treatment": self.treatment}.get(field)

    def mark(self, field: str, message: str) -> None:
        widget = self.widget_for(field)
        self._invalid.add(field)
        if widget is not None:
            widget.setStyleSheet(INVALID_STYLE)
            widget.setToolTip(message)
        self.input_problem.emit(field, message)

    def clear_mark(self, field: str) -> None:
        if field in self._invalid:
            self._invalid.discard(field)
            widget = self.widget_for(field)
            if widget is not None:
                widget.setStyleSheet("")
                widget.setToolTip("")

    def clear_marks(self, keep: set[str] = frozenset()) -> None:
        for field in list(self._invalid - set(keep)):
            self.clear_mark(field)

    def has_unread_entry(self) -> bool:
        """True while a text entry the form could not read is marked (the plan keeps its old value)."""
        return bool(self._invalid & {"composition", "d0", "beta"})

    def show_model_settings(self, shown: bool) -> None:
        self.model_box.setVisible(shown)
        self.model_toggle.setArrowType(Qt.DownArrow if shown else Qt.RightArrow)
        if self.model_toggle.isChecked() != shown:
            self.model_toggle.setChecked(shown)
