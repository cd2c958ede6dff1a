"""The input side of the window, built from the parameter table: one field per key, bound by key.

The groups and the order of the fields follow the table's rows (:data:`casedepth.parameters.PARAMETERS`,
their ``group``); a field is shown while its row applies to the plan (its treatment, and its
``applies`` condition). The only layout choices made here are which keys share a line and the words
of those lines. Bad input is marked on the field of the key an :class:`InputError` names.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QFormLayout, QGroupBox, QHBoxLayout, QLabel, QToolButton, QVBoxLayout, QWidget

from ..errors import InputError
from ..models.steels import steel_for
from ..parameters import PARAMETERS, Choice
from ..plan import Plan
from ..treatments import TREATMENTS
from ..units import DisplayUnits
from .fields import INVALID_STYLE, Context, EntryField, Field, make_field

GROUPS = ("Plan", "Steel", "Part", "Furnace step", "Cycle", "Pulses", "Drawing callout", "Quench and temper", "Load spread",
          "Model settings", "Notes")
#: keys shown on the line of another key, and the word between them
BESIDE = {"case_max": ("case_min", "to"), "compound_max": ("compound_min", "to"), "surface_max": ("surface_min", "to"),
          "threshold_kind": ("threshold_value", "")}
#: the words of a line that holds two keys
LINE_LABELS = {"case_min": "Depth", "compound_min": "Compound layer", "surface_min": "Surface carbon",
               "threshold_value": "At"}
COLLAPSED = "Model settings"  # a group folded away behind a toggle


class PlanForm(QWidget):
    """The form bound to a plan. ``units`` sets how lengths and temperatures are shown."""

    input_problem = Signal(str, str)  # key, message: an entry the form itself cannot read

    def __init__(self, plan: Plan, units: DisplayUnits, parent=None):
        super().__init__(parent)
        self.context = Context(plan, units)
        self.context.unreadable.connect(self._unreadable)
        self.context.readable.connect(self.clear_mark)
        self.fields: dict[str, Field] = {}
        self.lines: dict[str, tuple[QFormLayout, QWidget]] = {}  # key -> (layout, the line's field widget)
        self.groups: dict[str, QGroupBox] = {}
        self.notes: dict[str, QLabel] = {}
        self.named: dict[str, QLabel] = {}  # the labels of lines whose words follow another choice
        self._invalid: set[str] = set()
        self._heard: Plan | None = None  # the plan whose changes the form is told of
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        for group in GROUPS:
            keys = [key for key, row in PARAMETERS.items() if row.group == group]
            box = QGroupBox(group if group != COLLAPSED else "")
            form = QFormLayout(box)
            for key in keys:
                self._add(form, key)
            self.groups[group] = box
            if group == COLLAPSED:
                layout.addWidget(self._collapsible(box))
            else:
                layout.addWidget(box)
        self.steel_facts = QLabel()
        self.steel_facts.setWordWrap(True)
        self.steel_facts.setStyleSheet("color: #555;")
        self.groups["Steel"].layout().addRow(self.steel_facts)
        layout.addStretch(1)
        self.plan_replaced(plan)

    # -- building -------------------------------------------------------------------------------------------
    def _add(self, form: QFormLayout, key: str) -> None:
        field = self.fields[key] = make_field(key, self.context)
        if key in BESIDE:
            first, word = BESIDE[key]
            line = self.lines[first][1].layout()
            if word:
                line.addWidget(QLabel(word))
            line.addWidget(field.widget, 1)
            self.lines[key] = self.lines[first]
            return
        if field.spans:
            form.addRow(field.widget)
            self.lines[key] = (form, field.widget)
        elif key in LINE_LABELS:
            holder = QWidget()
            line = QHBoxLayout(holder)
            line.setContentsMargins(0, 0, 0, 0)
            line.addWidget(field.widget, 1)
            form.addRow(LINE_LABELS[key], holder)
            self.lines[key] = (form, holder)
        else:
            form.addRow(field.row.label, field.widget)
            self.lines[key] = (form, field.widget)
            if field.row.named is not None:
                self.named[key] = form.labelForField(field.widget)
        kind = field.row.kind
        if isinstance(kind, Choice) and kind.notes is not None:
            note = self.notes[key] = QLabel()
            note.setWordWrap(True)
            note.setStyleSheet("color: #555;")
            form.addRow(note)

    def _collapsible(self, box: QGroupBox) -> QWidget:
        outer = self.model_outer = QWidget()
        layout = QVBoxLayout(outer)
        layout.setContentsMargins(0, 0, 0, 0)
        self.model_toggle = QToolButton()
        self.model_toggle.setText(COLLAPSED)
        self.model_toggle.setCheckable(True)
        self.model_toggle.setToolButtonStyle(Qt.ToolButtonTextBesideIcon)
        self.model_toggle.setArrowType(Qt.RightArrow)
        self.model_toggle.setStyleSheet("QToolButton { border: none; font-weight: bold; }")
        layout.addWidget(self.model_toggle)
        layout.addWidget(box)
        self.model_box = box
        self.model_toggle.toggled.connect(self.show_model_settings)
        self.show_model_settings(False)
        return outer

    # -- access -----------------------------------------------------------------------------------------------
    @property
    def plan(self) -> Plan:
        return self.context.plan

    @property
    def units(self) -> DisplayUnits:
        return self.context.units

    def field(self, key: str) -> Field:
        return self.fields[key]

    def widget(self, key: str) -> QWidget | None:
        """The widget that shows (and is marked for) ``key``; None for keys the form does not show."""
        field = self.fields.get(key)
        return None if field is None else field.target

    # -- plan -> widgets -------------------------------------------------------------------------------------------
    def plan_replaced(self, plan: Plan) -> None:
        self.context.plan = plan
        if plan is not self._heard:  # (the window hands on the plan the form was made with too: heard once)
            plan.subscribe(self._changed)
            self._heard = plan
        self._invalid.clear()
        self.show_plan()

    def _changed(self, key: str, value) -> None:
        self.clear_mark(key)  # an edited value is judged afresh by the next result
        self.show_plan()

    def set_units(self, units: DisplayUnits) -> None:
        self.context.units = units
        self.show_plan()

    def show_plan(self) -> None:
        """Show every field of the plan, and only those that apply to it."""
        values = self.plan.values()
        for key, field in self.fields.items():
            if key not in self._invalid or not isinstance(field, EntryField):
                field.show(values)
            layout, line = self.lines[key]
            if BESIDE.get(key, (key,))[0] == key:  # a line's first key decides whether the line shows
                layout.setRowVisible(line, PARAMETERS[key].used_by(values))
        for key, name in self.named.items():
            name.setText(PARAMETERS[key].label_in(values))
        for key, note in self.notes.items():
            row = PARAMETERS[key]
            note.setText(row.kind.notes(values[key]))
            note.setVisible(row.used_by(values))
        for group, box in self.groups.items():
            shown = any(PARAMETERS[key].used_by(values) for key in self.fields if PARAMETERS[key].group == group)
            (self.model_outer if group == COLLAPSED else box).setVisible(shown)
        treatment = TREATMENTS[values["treatment"]]
        self.groups["Drawing callout"].setTitle(f"Drawing callout: {treatment.depth_name}")
        try:
            self.steel_facts.setText(treatment.steel_note(steel_for(values["steel"], values["composition"]), self.units))
        except InputError:
            self.steel_facts.setText("")

    def set_planned(self, outcome) -> None:
        """What the last result ran: the stages (where stages of one's own start, and the stage table's "From last
        result") and the values with what it planned (a pulse table's "Use the planned table")."""
        self.context.planned_stages = outcome.stage_rows()
        self.context.planned_values = outcome.frozen_values()

    # -- marking bad input --------------------------------------------------------------------------------------------
    def _unreadable(self, key: str, message: str) -> None:
        self.mark(key, message)

    def mark(self, key: str, message: str) -> None:
        """Mark the field of ``key`` (and say why in its tooltip); tell the window."""
        widget = self.widget(key)
        self._invalid.add(key)
        if widget is not None:
            widget.setStyleSheet(INVALID_STYLE)
            widget.setToolTip(message)
        self.input_problem.emit(key, message)

    def clear_mark(self, key: str) -> None:
        if key in self._invalid:
            self._invalid.discard(key)
            widget = self.widget(key)
            if widget is not None:
                widget.setStyleSheet("")
                widget.setToolTip(PARAMETERS[key].help)

    def clear_marks(self, keep: set[str] = frozenset()) -> None:
        for key in list(self._invalid - set(keep)):
            self.clear_mark(key)

    def unread_entries(self) -> set[str]:
        """Keys whose typed text the form could not read (the plan keeps its old value meanwhile)."""
        return {key for key, field in self.fields.items() if getattr(field, "unread", False)}

    def has_unread_entry(self) -> bool:
        return bool(self.unread_entries())

    def show_model_settings(self, shown: bool) -> None:
        self.model_box.setVisible(shown)
        self.model_toggle.setArrowType(Qt.DownArrow if shown else Qt.RightArrow)
        if self.model_toggle.isChecked() != shown:
            self.model_toggle.setChecked(shown)
