"""Widgets bound to plan fields by key: each shows one row of the parameter table and writes it back.

A field is made for a parameter key from the row's kind (text, choice, flag, quantity with a unit,
composition, …); editing it sets the plan field (one undoable edit), and :meth:`Field.show` shows the
plan's value. Lengths and temperatures take any unit the command line takes ("1700F" in a metric
view is read as 1700 °F and shown in °C). :func:`make_field` picks the widget for a key.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from typing import Any, Callable

from PySide6.QtCore import QObject, Qt, Signal
from PySide6.QtGui import QValidator
from PySide6.QtWidgets import (QCheckBox, QComboBox, QCompleter, QDoubleSpinBox, QHBoxLayout, QHeaderView, QLabel,
                               QLineEdit, QPlainTextEdit, QSlider, QTableWidget, QTableWidgetItem, QToolButton,
                               QVBoxLayout, QWidget)

from .. import formats
from ..carburizing.cycle import STAGE_KINDS
from ..constants import ZERO_CELSIUS
from ..errors import InputError
from ..models import steels
from ..nitriding.setup import dissociation_for_potential, nitriding_potential_from_dissociation
from ..parameters import PARAMETERS, Choice, Composition, Flag, Parameter, Quantity, Text
from ..treatments import TREATMENTS
from ..units import DisplayUnits

INVALID_STYLE = "border: 2px solid #d1495b; background: #fdecee;"
#: the widest a line is made to show its whole text, in average characters (longer text scrolls in its line)
WIDEST_LINE = 52
#: the widest range a spin box takes: values outside the allowed range are let through to be refused with a message
WIDE = 1e6


def fit_text(widget: QWidget, text: str, frame: int = 16) -> None:
    """Make a line edit (or an editable combo box, with ``frame`` its button's room) wide enough to show ``text``
    whole, up to :data:`WIDEST_LINE` characters: the form then widens to what it holds."""
    metrics = widget.fontMetrics()
    widget.setMinimumWidth(min(metrics.horizontalAdvance(text), WIDEST_LINE * metrics.averageCharWidth()) + frame)


class Context(QObject):
    """What every field needs: the plan, the display units, and a way to report what it cannot read."""

    unreadable = Signal(str, str)  # key, message
    readable = Signal(str)  # key: an entry that could not be read now can

    def __init__(self, plan, units: DisplayUnits):
        super().__init__()
        self.plan, self.units = plan, units
        #: the cycle the last result ran, as rows of a stage table (:meth:`casedepth.outcome.Outcome.stage_rows`)
        self.planned_stages: list[dict] = []
        #: the last result's values with what it planned written in (:meth:`casedepth.outcome.Outcome.frozen_values`)
        self.planned_values: dict = {}

    def set(self, key: str, value: Any, coalesce: bool = False) -> None:
        try:
            self.plan.set(key, value, coalesce=coalesce)
        except InputError as error:
            self.unreadable.emit(error.field, error.message)

    def update(self, values: dict) -> None:
        try:
            self.plan.update(**values)
        except InputError as error:
            self.unreadable.emit(error.field, error.message)


class Field(ABC):
    """A widget (or a row of widgets) bound to one key. ``widget`` is what goes in the form, ``target`` what is
    marked when the key's value is at fault."""

    spans = False  # True: the widget fills the form's line (a check box carries its own label)

    def __init__(self, row: Parameter, context: Context):
        self.row, self.key, self.context = row, row.key, context
        self.showing = False
        self.target = None
        self.widget = self.build()  # which may set ``target`` to a part of a compound widget
        self.target = self.target or self.widget
        if row.help:
            self.widget.setToolTip(row.help)

    @abstractmethod
    def build(self) -> QWidget:
        """Make the widget (and connect its edits to :meth:`set`)."""

    def show(self, values: dict) -> None:
        self.showing = True
        try:
            self.display(values[self.key], values)
        finally:
            self.showing = False

    @abstractmethod
    def display(self, value, values: dict) -> None:
        """Show ``value`` (the plan's, ``values`` being all of them) without writing it back."""

    def set(self, value, coalesce: bool = False) -> None:
        if not self.showing:
            self.context.set(self.key, value, coalesce)


class TextField(Field):
    def build(self):
        longest = self.row.kind.longest
        if self.row.kind.lines > 1:
            edit = QPlainTextEdit()
            edit.setMaximumHeight(70)
            edit.setPlaceholderText(self.row.help)
            edit.textChanged.connect(lambda: self._notes_changed(edit, longest))
            return edit
        edit = QLineEdit()
        edit.setMaxLength(longest)
        if self.row.help:
            edit.setPlaceholderText(self.row.help)
        edit.editingFinished.connect(lambda: self.set(edit.text().strip() or self.row.default))
        return edit

    def _notes_changed(self, edit, longest: int) -> None:
        text = edit.toPlainText()
        if len(text) > longest:  # a paste too long to keep: cut to what a plan holds, and say so
            self.context.unreadable.emit(self.key, f"{len(text)} characters is more than the {longest} it may hold; "
                                                   f"the rest is left out")
            edit.setPlainText(text[:longest])
            return
        self.set(text, coalesce=True)

    def display(self, value, values):
        text = self.widget.toPlainText() if isinstance(self.widget, QPlainTextEdit) else self.widget.text()
        line = isinstance(self.widget, QLineEdit)
        if text != value:
            (self.widget.setText if line else self.widget.setPlainText)(value)
            if line:
                self.widget.setCursorPosition(0)  # the start of a long name, not its end
        if line:
            fit_text(self.widget, value)


class PlannedTextField(TextField):
    """Text the program can also plan (a low-pressure pulse table): the text box, and a button that puts in what the
    last result planned, to run it as it stands or edit it."""

    def build(self):
        widget = QWidget()
        layout = QVBoxLayout(widget)
        layout.setContentsMargins(0, 0, 0, 0)
        self.edit = super().build()
        layout.addWidget(self.edit)
        self.use = QToolButton()
        self.use.setText("Use the planned table")
        self.use.setToolTip("Put the table the last result planned here, to run it as it stands (or edit it)")
        self.use.clicked.connect(self._use_planned)
        layout.addWidget(self.use)
        self.target = self.edit
        return widget

    def _use_planned(self) -> None:
        planned = self.context.planned_values.get(self.key)
        if planned:
            self.set(planned)

    def display(self, value, values):
        text = self.edit.toPlainText()
        if text != value:
            self.edit.setPlainText(value)


class FlagField(Field):
    spans = True

    def build(self):
        box = QCheckBox(self.row.label)
        box.toggled.connect(lambda on: self.set(bool(on)))
        return box

    def display(self, value, values):
        self.widget.setChecked(bool(value))


class ChoiceField(Field):
    def build(self):
        box = QComboBox()
        box.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        box.setMinimumContentsLength(14)
        for key, text in self.row.kind.options.items():
            box.addItem(text, key)
        box.activated.connect(lambda i: self.set(box.itemData(i)))
        return box

    def display(self, value, values):
        self.widget.setCurrentIndex(max(self.widget.findData(value), 0))


class CycleField(ChoiceField):
    """The kind of cycle. Choosing stages of one's own with none entered yet starts the table from the cycle the
    last result ran (one edit), rather than from an empty table that cannot run."""

    def set(self, value, coalesce: bool = False) -> None:
        planned = self.context.planned_stages
        if value == "stages" and not self.showing and planned and not self.context.plan.stages:
            self.context.update({self.key: value, "stages": [dict(row) for row in planned]})
        else:
            super().set(value, coalesce)


class QuantitySpin(QDoubleSpinBox):
    """A spin box that reads what is typed with ``read`` (text → shown value, or None if it cannot) and holds
    its value within its range; a value typed outside the range is refused and passed to ``refused``, and so is
    text that cannot be read (as the text)."""

    def __init__(self, read: Callable[[str], float | None], refused: Callable[[float | str], None]):
        super().__init__()
        self._read = read
        self._refused = refused
        self._outside: float | str | None = None  # a value typed outside the range (or unreadable text), not yet told
        self.setKeyboardTracking(False)  # one edit per committed value (Enter, Tab, arrows), not per keystroke
        self.setAccelerated(True)
        self.editingFinished.connect(self._report)

    def _report(self) -> None:
        if self._outside is not None:
            value, self._outside = self._outside, None
            self._refused(value)

    def _body(self, text: str) -> str:
        text = text.strip()
        if self.suffix().strip() and text.endswith(self.suffix().strip()):
            text = text[: -len(self.suffix().strip())].strip()
        return text

    def validate(self, text, pos):
        body = self._body(text)
        if self.specialValueText() and body == self.specialValueText():
            return QValidator.Acceptable, text, pos
        if not body:
            return QValidator.Intermediate, text, pos
        value = self._read(body)
        acceptable = value is not None and self.minimum() <= value <= self.maximum()
        return (QValidator.Acceptable if acceptable else QValidator.Intermediate), text, pos

    def fixup(self, text):
        """Qt is about to put back the last value: remember a value outside the range, or text it cannot read."""
        body = self._body(text)
        value = self._read(body)
        if value is None and body and body != self.specialValueText():
            self._outside = body
        elif value is not None and not (self.minimum() <= value <= self.maximum()):
            self._outside = value
        return text

    def valueFromText(self, text):
        body = self._body(text)
        if self.specialValueText() and body == self.specialValueText():
            return self.minimum()
        value = self._read(body)
        return self.value() if value is None else value

    def textFromValue(self, value):
        return f"{value:.{self.decimals()}f}"


class QuantityField(Field):
    """A number with a unit; lengths and temperatures in the display units, typed with any unit."""

    def build(self):
        kind: Quantity = self.row.kind
        self.quantity = kind.unit.name if kind.unit.name in ("temperature", "length", "thin length") else None
        spin = QuantitySpin(self._read, self._refused)
        if kind.optional:
            spin.setSpecialValueText(kind.unset)
        spin.valueChanged.connect(self._changed)
        return spin

    def _read(self, text: str) -> float | None:
        """The value typed, in the units shown (None if it cannot be read)."""
        try:
            return self._read_or_raise(text)
        except InputError:
            return None

    def _read_or_raise(self, text: str) -> float:
        units = self.context.units
        if self.quantity is not None:
            return units.shown(self.quantity, units.read(self.quantity, text, self.key))
        unit = self.row.kind.unit
        return unit.parse(text, self.key) * unit.scale + unit.offset

    def _shown(self, si: float) -> float:
        if self.quantity is not None:
            return self.context.units.shown(self.quantity, si)
        unit = self.row.kind.unit
        return si * unit.scale + unit.offset

    def _refused(self, shown: float | str) -> None:
        """A value typed outside the allowed range, or text that is no value: say so against the key (the plan
        keeps its value)."""
        if isinstance(shown, str):
            try:
                self._read_or_raise(shown)
            except InputError as error:
                self.context.unreadable.emit(self.key, error.message)
            return
        values = self.context.plan.values()
        span = self.row.allowed(values)
        if span is not None:
            self.context.unreadable.emit(self.key, f"{self.row.describe(self._to_si(shown))} is outside "
                                                   f"{self.row.describe_range(span)}")

    def _to_si(self, shown: float) -> float:
        if self.quantity is not None:
            return self.context.units.read(self.quantity, repr(shown), self.key)
        unit = self.row.kind.unit
        return (shown - unit.offset) / unit.scale

    def _changed(self, shown: float) -> None:
        if self.row.kind.optional and shown == self.target.minimum():
            self.set(None)
        else:
            self.set(self._to_si(shown))

    def display(self, value, values):
        spin, units = self.target, self.context.units  # the spin box (a compound field holds more)
        decimals = self.row.decimals(values) if callable(self.row.decimals) else self.row.decimals
        if self.quantity in ("length",):
            decimals = units.length_decimals
        spin.setDecimals(decimals)
        spin.setSingleStep(10 ** -decimals if decimals else (10.0 if abs(value or 0) > 50 else 1.0))
        unit = units.unit(self.quantity) if self.quantity else (self.row.unit_label or self.row.kind.unit.file_unit)
        spin.setSuffix(f" {unit}" if unit else "")
        # the allowed range (with the plan's own value, so a value another choice has put out of range is shown
        # as it is and refused by the next result rather than changed by the widget)
        span = self.row.allowed(values)
        low, high = sorted(self._shown(x) for x in span) if span is not None else (-WIDE, WIDE)
        if value is not None:
            low, high = min(low, self._shown(value)), max(high, self._shown(value))
        if self.row.kind.optional:
            low = 0.0  # "not set" sits at the bottom
        spin.setRange(low, high)
        spin.setValue(spin.minimum() if value is None else self._shown(value))


class EntryField(Field):
    """A value typed as text and read only when the entry is done: a quantity in scientific notation or with a word
    such as ``inf`` (read as the command line reads it), or a composition. Text that cannot be read is marked and
    kept on show; the plan keeps its value meanwhile."""

    def build(self):
        edit = QLineEdit()
        edit.editingFinished.connect(self._edited)
        self.unread = False
        return edit

    def read(self, text: str) -> dict:
        """The plan values ``text`` means (an :class:`InputError` if it means none)."""
        row = self.row
        option = next((o for o in row.options if o.read is not None), None)
        if option is None:
            return {self.key: row.kind.parse(self.key, text)}
        unit = row.kind.unit.file_unit
        return option.read(text if any(c.isalpha() for c in text) else f"{text}{unit}", self.context.plan.values())

    def _edited(self) -> None:
        if self.showing:
            return
        try:
            updates = self.read(self.widget.text().strip())
        except InputError as error:
            self.unread = True
            self.context.unreadable.emit(self.key, error.message)
            return
        self.unread = False
        self.context.readable.emit(self.key)
        self.context.update(updates)

    def display(self, value, values):
        if not self.unread:
            self.widget.setText(self.text_of(value))
            fit_text(self.widget, self.widget.text())
            self.widget.setCursorPosition(0)

    def text_of(self, value) -> str:
        unit = self.row.kind.unit
        return f"{value * unit.scale + unit.offset:.3g}"


class CompositionField(EntryField):
    """The steel's composition as on a mill certificate: ``C=0.20 Mn=0.80 Cr=0.50`` (wt %)."""

    def read(self, text: str) -> dict:
        return {self.key: steels.parse_composition(text, self.key)}

    def text_of(self, value) -> str:
        return " ".join(f"{el}={val:g}" for el, val in value.items())


class SteelField(Field):
    """The grade: the library of the plan's treatment (type to filter), or a custom composition."""

    def build(self):
        box = QComboBox()
        box.setEditable(True)
        box.setInsertPolicy(QComboBox.NoInsert)
        box.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        box.setMinimumContentsLength(16)
        completer = QCompleter(box.model(), box)
        completer.setFilterMode(Qt.MatchContains)
        completer.setCaseSensitivity(Qt.CaseInsensitive)
        completer.setCompletionMode(QCompleter.PopupCompletion)
        box.setCompleter(completer)
        box.activated.connect(lambda i: self._picked(box.itemData(i)))
        box.lineEdit().editingFinished.connect(self._typed)
        self.listed = None
        return box

    def _picked(self, name: str) -> None:
        """A grade picked from the list brings its nominal composition, even picked again after an edit."""
        if name == "custom":
            self.set(name)
        elif not self.showing:
            self.context.update({"steel": name, "composition": dict(steels.find(name).composition)})

    def _typed(self) -> None:
        text = self.widget.currentText().split("—")[0].strip()
        if not text or self.showing or text == "custom":
            return
        try:
            grade = steels.find(text)
        except InputError as error:
            self.context.unreadable.emit("steel", error.message)
            return
        self.set(grade.name)

    def display(self, value, values):
        box = self.widget
        listed = TREATMENTS[values["treatment"]].steel_list
        if self.listed != listed:
            self.listed = listed
            box.clear()
            for grade in steels.library(listed):
                box.addItem(f"{grade.name}  —  {grade.standard}", grade.name)
            box.addItem("custom  —  composition below", "custom")
        index = box.findData(value)
        if index >= 0:
            box.setCurrentIndex(index)
        else:
            box.setEditText(value)
        fit_text(box, box.currentText(), frame=44)
        box.lineEdit().setCursorPosition(0)


class AimField(Field):
    """Where in the drawing's window to aim: a slider in per cent, with the depth it means."""

    def build(self):
        widget = QWidget()
        layout = QHBoxLayout(widget)
        layout.setContentsMargins(0, 0, 0, 0)
        self.slider = QSlider(Qt.Horizontal)
        self.slider.setRange(0, 100)
        self.slider.valueChanged.connect(lambda v: self.set(v / 100.0, coalesce=True))
        self.meaning = QLabel()
        self.meaning.setMinimumWidth(120)
        layout.addWidget(self.slider)
        layout.addWidget(self.meaning)
        self.target = self.slider
        return widget

    def display(self, value, values):
        self.slider.setValue(int(round(value * 100)))
        low, high = values["case_min"], values["case_max"]
        share = formats.percent(value * 100)
        self.meaning.setText(f"{share} → {self.context.units.format_length(low + value * (high - low))}"
                             if high >= low > 0 else share)


class PotentialField(QuantityField):
    """K_N, with the ammonia dissociation of the exhaust (burette reading) beside it as another way to set it."""

    def build(self):
        spin = super().build()
        widget = QWidget()
        layout = QHBoxLayout(widget)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(spin, 1)
        layout.addWidget(QLabel("or"))
        self.dissociation = QDoubleSpinBox()
        self.dissociation.setDecimals(1)
        self.dissociation.setRange(1.0, 99.0)
        self.dissociation.setSuffix(" % dissoc.")
        self.dissociation.setKeyboardTracking(False)
        self.dissociation.setToolTip("ammonia dissociation of the exhaust (burette), pure ammonia feed: sets K_N")
        self.dissociation.valueChanged.connect(
            lambda percent: self.set(nitriding_potential_from_dissociation(percent / 100.0)))
        layout.addWidget(self.dissociation, 1)
        self.target = spin
        return widget

    def _changed(self, shown):
        self.set(shown)

    def display(self, value, values):
        super().display(value, values)
        try:
            self.dissociation.setValue(100.0 * dissociation_for_potential(value))
        except InputError:
            pass


class StagesField(Field):
    """The stages of a cycle of one's own: a table to edit, with buttons to add, remove, reorder and copy."""

    spans = True

    def build(self):
        widget = QWidget()
        layout = QVBoxLayout(widget)
        layout.setContentsMargins(0, 0, 0, 0)
        table = self.table = QTableWidget(0, 4)
        table.setHorizontalHeaderLabels(["Stage", "h", "°C", "%C"])
        table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        table.horizontalHeader().setSectionResizeMode(0, QHeaderView.ResizeToContents)
        table.setToolTip("Hours, temperature at the end of the stage (ramps from the previous one) and carbon "
                         "potential; leave temperature and potential empty for quench, wash, temper")
        table.verticalHeader().setVisible(False)
        table.setMinimumHeight(200)
        table.setSizeAdjustPolicy(QTableWidget.AdjustIgnored)
        table.setMinimumWidth(260)
        table.itemChanged.connect(self._cell_edited)
        layout.addWidget(table)
        buttons = QHBoxLayout()
        self.buttons = {}
        for key, text, tip in (("add", "Add", "Add a stage after the selected one"),
                               ("remove", "Remove", "Remove the selected stage"),
                               ("up", "↑", "Move the selected stage earlier"), ("down", "↓", "Move the selected stage later"),
                               ("copy", "From last result", "Fill the table with the cycle of the last result")):
            button = QToolButton()
            button.setText(text)
            button.setToolTip(tip)
            button.clicked.connect(lambda _=False, k=key: self._button(k))
            buttons.addWidget(button)
            self.buttons[key] = button
        buttons.addStretch(1)
        layout.addLayout(buttons)
        self.target = table
        return widget

    def _rows(self) -> list[dict]:
        return [dict(d) for d in self.context.plan.stages]

    def _button(self, key: str) -> None:
        rows, current = self._rows(), self.table.currentRow()
        if key == "add":
            last = rows[-1] if rows else {"temperature_c": 925.0, "carbon_potential_pct": 1.0}
            rows.insert(current + 1 if current >= 0 else len(rows),
                        {"kind": "soak", "duration_h": 1.0, "temperature_c": last.get("temperature_c", 925.0),
                         "carbon_potential_pct": last.get("carbon_potential_pct", 1.0)})
        elif key == "remove" and 0 <= current < len(rows):
            rows.pop(current)
        elif key in ("up", "down") and 0 <= current < len(rows):
            other = current - 1 if key == "up" else current + 1
            if not 0 <= other < len(rows):
                return
            rows[current], rows[other] = rows[other], rows[current]
            self.set(rows)
            self.table.setCurrentCell(other, 0)
            return
        elif key == "copy" and self.context.planned_stages:
            rows = [dict(row) for row in self.context.planned_stages]
        else:
            return
        self.set(rows)

    def _kind_picked(self, row: int, kind: str) -> None:
        rows = self._rows()
        if row < len(rows) and rows[row]["kind"] != kind:
            rows[row]["kind"] = kind
            if not STAGE_KINDS[kind][0]:
                rows[row].pop("carbon_potential_pct", None)
                rows[row].pop("start_potential_pct", None)
            self.set(rows)

    def _cell_edited(self, item) -> None:
        if self.showing:
            return
        rows = self._rows()
        row, column = item.row(), item.column()
        if row >= len(rows):
            return
        key = {1: "duration_h", 2: "temperature_c", 3: "carbon_potential_pct"}.get(column)
        text = item.text().strip()
        units = self.context.units
        try:
            if text == "" and column in (2, 3):
                rows[row].pop(key, None)
            elif column == 2:
                rows[row][key] = units.read("temperature", text, "stages") - ZERO_CELSIUS
            else:
                rows[row][key] = float(text)
        except (ValueError, InputError):
            self.context.unreadable.emit("stages", f"stage {row + 1}: cannot read {text!r} as a number")
            return
        self.set(rows)

    def display(self, value, values):
        table, units = self.table, self.context.units
        table.setRowCount(len(value))
        for r, row in enumerate(value):
            kind_box = QComboBox()
            kind_box.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            kind_box.setMinimumContentsLength(9)
            for kind, (_, label) in STAGE_KINDS.items():
                kind_box.addItem(label, kind)
            kind_box.setCurrentIndex(max(kind_box.findData(row.get("kind")), 0))
            kind_box.activated.connect(lambda i, rr=r, box=kind_box: self._kind_picked(rr, box.itemData(i)))
            table.setCellWidget(r, 0, kind_box)
            temperature = row.get("temperature_c")
            shown = "" if temperature is None else f"{units.temperature(temperature + ZERO_CELSIUS):.0f}"
            potential = row.get("carbon_potential_pct")
            for c, text in ((1, f"{row.get('duration_h', 0.0):.2f}"), (2, shown),
                            (3, "" if potential is None else f"{potential:g}")):
                table.setItem(r, c, QTableWidgetItem(text))
        table.horizontalHeaderItem(2).setText(units.temperature_unit)


#: widgets chosen by key where the kind alone does not say it (a view's choice; binding is still by key)
SPECIAL: dict[str, type[Field]] = {"steel": SteelField, "aim": AimField, "kn": PotentialField, "beta": EntryField,
                                   "d0": EntryField, "stages": StagesField, "process": CycleField,
                                   "schedule": PlannedTextField}


def make_field(key: str, context: Context) -> Field:
    """The field for a parameter key."""
    row = PARAMETERS[key]
    if key in SPECIAL:
        return SPECIAL[key](row, context)
    kind = row.kind
    for kind_type, field_type in ((Text, TextField), (Flag, FlagField), (Choice, ChoiceField),
                                  (Quantity, QuantityField), (Composition, CompositionField)):
        if isinstance(kind, kind_type):
            return field_type(row, context)
    raise TypeError(f"no widget for the kind of {key!r}")
