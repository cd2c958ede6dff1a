"""The furnace-reading converter: one reading of a carburizing gas in, every reading and the carbon potential out.

A thin view over :func:`casedepth.models.atmosphere.convert_reading` (what ``casedepth probe`` prints): the
temperature, the carrier gas and its CO and H2, and the reading the shop has — probe millivolts, dew point, CO2,
or the carbon potential a shim-stock test measured. It starts from the plan's temperature and gas.
"""

from __future__ import annotations

from PySide6.QtWidgets import (QComboBox, QDialog, QDialogButtonBox, QDoubleSpinBox, QFormLayout, QLabel, QLineEdit,
                               QVBoxLayout)

from ..errors import InputError
from ..models.atmosphere import CARRIERS, READINGS, FurnaceGas, convert_reading
from ..parameters import PARAMETERS
from ..units import DisplayUnits, parse_number, parse_temperature

#: what the converter asks for each reading, and how a bare number is read
_ASK = {"carbon_potential": ("Carbon potential (or shim stock)", "%C, e.g. 1.00"),
        "mv": ("Oxygen probe", "mV, e.g. 1150"),
        "dew_point": ("Dew point", "e.g. 20F or -7C (a bare number in the display unit)"),
        "co2": ("CO2", "vol %, e.g. 0.15")}


class ReadingConverter(QDialog):
    """Enter any reading; see the others and the potential, live."""

    def __init__(self, values: dict, units: DisplayUnits, parent=None, plan=None):
        super().__init__(parent)
        self.plan = plan  # the plan "Use as the plan's potential" edits (None: no button effect)
        self.found: tuple[str, float] | None = None  # (reading given, potential) of the last good answer
        self.setWindowTitle("Convert a furnace reading")
        self.units = units
        outer = QVBoxLayout(self)
        outer.addWidget(QLabel("Ideal equilibria of the gas at temperature (C + ½O2 = CO, C + CO2 = 2CO,\n"
                               "C + H2O = CO + H2; NASA Glenn thermochemistry): trim as the controller is trimmed."))
        form = QFormLayout()
        outer.addLayout(form)
        self.temperature = QDoubleSpinBox()
        self.temperature.setDecimals(0)
        low, high = (units.temperature(t) for t in (800 + 273.15, 1100 + 273.15))
        self.temperature.setRange(low, high)
        self.temperature.setSuffix(f" {units.temperature_unit}")
        self.temperature.setValue(round(units.temperature(values.get("temperature", 925 + 273.15))))
        form.addRow("Furnace temperature", self.temperature)
        self.carrier = QComboBox()
        for key, carrier in CARRIERS.items():
            self.carrier.addItem(carrier.label, key)
        self.carrier.setCurrentIndex(max(self.carrier.findData(values.get("carrier", "natural-gas-endo")), 0))
        form.addRow("Carrier gas", self.carrier)
        self.co, self.h2 = QDoubleSpinBox(), QDoubleSpinBox()
        for spin, key in ((self.co, "carrier_co"), (self.h2, "carrier_h2")):
            spin.setDecimals(1)
            spin.setRange(*PARAMETERS[key].range)
            spin.setSuffix(" %")
            spin.setValue(float(values.get(key, PARAMETERS[key].default)))
        form.addRow("CO in the carrier", self.co)
        form.addRow("H2 in the carrier", self.h2)
        self.kind = QComboBox()
        for key, (words, _) in _ASK.items():
            self.kind.addItem(words, key)
        self.kind.setCurrentIndex(max(self.kind.findData(values.get("control_reading", "mv")), 0))
        form.addRow("The reading you have", self.kind)
        self.value = QLineEdit()
        form.addRow("Its value", self.value)
        self.answers: dict[str, QLabel] = {}
        for key, reading in READINGS.items():
            label = QLabel("–")
            label.setObjectName(f"answer_{key}")
            self.answers[key] = label
            form.addRow(reading.title, label)
        self.message = QLabel("")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color: #9a3412;")
        outer.addWidget(self.message)
        buttons = QDialogButtonBox(QDialogButtonBox.Close)
        buttons.rejected.connect(self.reject)
        self.use = buttons.addButton("Use as the plan's potential", QDialogButtonBox.ApplyRole)
        self.use.setToolTip("At the plan's temperature: set the plan's carbon potential (one soak) to this one, its "
                            "carrier gas to this one and the reading it is controlled on to the one given (one "
                            "undoable edit)")
        self.use.clicked.connect(self._use)
        self.use.setEnabled(False)
        outer.addWidget(buttons)
        self.carrier.currentIndexChanged.connect(self._carrier_picked)
        for signal in (self.temperature.valueChanged, self.co.valueChanged, self.h2.valueChanged,
                       self.kind.currentIndexChanged, self.value.textChanged):
            signal.connect(self.update_answers)
        self.gas_data = values.get("gas_data", "nasa-glenn-2002")
        self._kind_changed()
        self.kind.currentIndexChanged.connect(self._kind_changed)
        self.update_answers()

    def _carrier_picked(self) -> None:
        key = self.carrier.currentData()
        if key != "own":
            self.co.setValue(CARRIERS[key].co * 100.0)
            self.h2.setValue(CARRIERS[key].h2 * 100.0)

    def _kind_changed(self) -> None:
        self.value.setPlaceholderText(_ASK[self.kind.currentData()][1])

    def _read(self, kind: str, text: str) -> float:
        if kind == "dew_point":
            return parse_temperature(text, "dew_point", default_unit="f" if self.units.imperial else "c")
        number = parse_number(text.strip().rstrip("%").removesuffix("mV").removesuffix("%C").strip(), kind)
        return number / 100.0 if kind == "co2" else number

    def update_answers(self) -> None:
        """Work out every reading from the one given; a reading that cannot be read says why, naming the limit."""
        kind, text = self.kind.currentData(), self.value.text().strip()
        for label in self.answers.values():
            label.setText("–")
        self.message.setText("")
        self.found = None
        self.use.setEnabled(False)
        if not text:
            return
        try:
            T = self.units.read("temperature", f"{self.temperature.value():.0f}", "temperature")
            gas = FurnaceGas(self.carrier.currentData(), self.co.value() / 100.0, self.h2.value() / 100.0,
                             self.gas_data).at(T)
            readings = convert_reading(kind, self._read(kind, text), gas)
        except InputError as error:
            self.message.setText(error.message)
            return
        for key, value in readings.items():
            self.answers[key].setText(READINGS[key].show(value) + ("  (given)" if key == kind else ""))
        self.found = (kind, readings["carbon_potential"])
        values = self.plan.values() if self.plan is not None else None
        self.use.setEnabled(values is not None and PARAMETERS["carbon_potential"].used_by(values)
                            and abs(T - values["temperature"]) < 0.5)

    def _use(self) -> None:
        if self.found is None or self.plan is None:
            return
        kind, potential = self.found
        changes = {"carbon_potential": round(potential, 3), "carrier": self.carrier.currentData(),
                   "carrier_co": self.co.value(), "carrier_h2": self.h2.value()}
        if kind != "carbon_potential":
            changes["control_reading"] = kind
        self.plan.update(**changes)
