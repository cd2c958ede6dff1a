"""The answer side of the window: the soak time large, the facts around it, the warnings."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QFrame, QGridLayout, QLabel, QScrollArea, QVBoxLayout

from ..nitriding import PHASE_NAMES, dissociation_for_potential
from ..units import DisplayUnits, format_duration

BANNER_STYLE = "QFrame#banner { background: #eef4f8; border: 1px solid #b8cfe0; border-radius: 6px; }"
STALE_STYLE = "QFrame#banner { background: #f3f3f3; border: 1px dashed #999; border-radius: 6px; }"


class ResultPanel(QFrame):
    """Soak time, window times, surface carbon, case depth reached, threshold carbon, warnings."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("banner")
        self.setStyleSheet(BANNER_STYLE)
        layout = QVBoxLayout(self)
        self.headline = QLabel("Soak time —")
        self.headline.setObjectName("soak_time")
        font = self.headline.font()
        font.setPointSize(font.pointSize() + 10)
        font.setBold(True)
        self.headline.setFont(font)
        self.headline.setTextInteractionFlags(Qt.TextSelectableByMouse)
        layout.addWidget(self.headline)
        self.subline = QLabel()
        self.subline.setWordWrap(True)
        layout.addWidget(self.subline)
        grid = QGridLayout()
        grid.setHorizontalSpacing(18)
        self.facts: dict[str, QLabel] = {}
        self.fact_names: dict[str, QLabel] = {}
        names = [("window", "Drawing window"), ("surface", "Surface carbon at the end"),
                 ("reached", "Case depth reached"), ("threshold", "Threshold means"),
                 ("equilibrium", "Surface carbon in equilibrium"), ("saturation", "Saturation (Acm)"),
                 ("probe", "Oxygen probe"), ("cycle", "Whole cycle")]
        for i, (key, label) in enumerate(names):
            name = QLabel(label)
            name.setStyleSheet("color: #555;")
            value = QLabel("—")
            value.setObjectName(f"fact_{key}")
            value.setTextInteractionFlags(Qt.TextSelectableByMouse)
            value.setWordWrap(True)  # long facts wrap rather than widen the window
            grid.addWidget(name, i // 2, (i % 2) * 2)
            grid.addWidget(value, i // 2, (i % 2) * 2 + 1)
            self.facts[key] = value
            self.fact_names[key] = name
        layout.addLayout(grid)
        self.warnings = QLabel()
        self.warnings.setObjectName("warnings")
        self.warnings.setWordWrap(True)
        self.warnings.setStyleSheet("background: #fff4d6; padding: 4px;")
        self.warnings.setTextInteractionFlags(Qt.TextSelectableByMouse)
        # several warnings scroll inside about four lines, so the plots keep their room
        self.warnings_box = QScrollArea()
        self.warnings_box.setWidget(self.warnings)
        self.warnings_box.setWidgetResizable(True)
        self.warnings_box.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.warnings_box.setStyleSheet("QScrollArea { border: 1px solid #e0b84c; border-radius: 4px; background: #fff4d6; }")
        self.warnings_box.setMaximumHeight(4 * self.warnings.fontMetrics().lineSpacing() + 14)
        self.warnings_box.hide()
        layout.addWidget(self.warnings_box)
        self.status = QLabel()
        self.status.setObjectName("status")
        self.status.setWordWrap(True)
        self.status.hide()
        layout.addWidget(self.status)
        self.stale = False

    def show_outcome(self, outcome, units: DisplayUnits) -> None:
        if outcome.process == "nitriding":
            self._show_nitriding(outcome, units)
        elif outcome.process == "single":
            self._show_soak(outcome, units)
        else:
            self._show_cycle(outcome, units)
        if outcome.warnings:
            self.warnings.setText("\n".join(f"• {w}" for w in outcome.warnings))
            self.warnings_box.show()
        else:
            self.warnings_box.hide()
        self.set_stale(False)

    def _show_cycle(self, outcome, units: DisplayUnits) -> None:
        setup, cycle, quote = outcome.setup, outcome.cycle, outcome.quote
        if outcome.boost_time is not None:
            self.headline.setText(f"Boost {format_duration(outcome.boost_time)}, diffuse {format_duration(outcome.diffuse_time)}")
            self.subline.setText(f"at {units.format_temperature(setup.temperature)}: the cycle ends with "
                                 f"{units.format_length(cycle.case_depth)} at {setup.threshold} and the surface carbon "
                                 f"in its window; heat-up, drop and equalize are counted")
        else:
            self.headline.setText(f"Cycle {format_duration(quote.total_h * 3600)}")
            self.subline.setText(f"the stages as entered give {units.format_length(cycle.case_depth)} at {setup.threshold}")
        low, aim, high = outcome.targets
        inside = low <= cycle.case_depth <= high
        self._fact("window", "Drawing window", f"{units.format_length(low)} to {units.format_length(high)}"
                   + ("" if inside else "  — the case ends outside it"))
        self._fact("surface", "Surface carbon at the end", f"{cycle.surface_carbon:.3f} %C")
        self._fact("reached", "Case depth at the end", units.format_length(cycle.case_depth))
        self._fact("threshold", "Threshold means", f"{setup.threshold_carbon:.3f} %C")
        self._fact("equilibrium", "Richest gas, in equilibrium",
                   f"{setup.equilibrium_carbon:.3f} %C (alloy factor {setup.alloy_factor:.3f})")
        self._fact("saturation", "Saturation (Acm)", f"{setup.saturation_carbon:.2f} %C")
        self._show_probe(outcome)
        self._show_quote(quote)

    def _show_nitriding(self, outcome, units: DisplayUnits) -> None:
        setup, aim = outcome.setup, outcome.aim
        self.headline.setText(f"Nitride {format_duration(aim.time)}")
        two = outcome.schedule
        if two is None:
            how = (f"at {units.format_temperature(setup.temperature)}, K_N {setup.nitriding_potential:.2f} atm^-½ "
                   f"({100 * dissociation_for_potential(setup.nitriding_potential):.0f} % dissociation)")
        else:
            how = (f"at {units.format_temperature(setup.temperature)} in two stages: {format_duration(two.first_time)} "
                   f"at K_N {two.first_kn:.2f}, then {format_duration(two.second_time)} at K_N {two.second_kn:.2f} "
                   f"({100 * dissociation_for_potential(two.second_kn):.0f} % dissociation)")
        self.subline.setText(f"{how}, for {units.format_length(aim.nitrided_depth)} nitrided hardness depth "
                             f"(core {setup.core:.0f} HV + 50 HV)")
        self._fact("window", "Drawing window",
                   f"{units.format_length(outcome.low.nitrided_depth)} in {format_duration(outcome.low.time)}  to  "
                   f"{units.format_length(outcome.high.nitrided_depth)} in {format_duration(outcome.high.time)}")
        self._fact("surface", "Compound layer", f"{aim.layer.describe()}; window "
                   f"{outcome.compound_window[0] * 1e6:g}–{outcome.compound_window[1] * 1e6:g} µm")
        self._fact("reached", "Surface phase at the end", PHASE_NAMES[aim.layer.surface_phase])
        self._fact("threshold", "K_N for the layer window",
                   "—" if outcome.kn_for_window is None else f"{outcome.kn_for_window:.2f} atm^-½")
        self._fact("equilibrium", "Hardness", f"core {setup.core:.0f} HV, nitrided surface {setup.surface:.0f} HV")
        self._fact("saturation", "Nitride formers", f"bind {setup.capacity:.2f} wt % N")
        potentials = [setup.nitriding_potential] if two is None else [two.first_kn, two.second_kn]
        gases = []
        for kn in potentials:
            d = dissociation_for_potential(kn)
            gases.append(f"NH3 {100 * (1 - d):.0f} %, H2 {75 * d:.0f} %, N2 {25 * d:.0f} %")
        self._fact("probe", "Exhaust (ammonia feed)", "  then  ".join(gases))
        self._show_quote(outcome.quote)

    def _fact(self, key: str, name: str, value: str) -> None:
        self.fact_names[key].setText(name)
        self.facts[key].setText(value)

    def _show_soak(self, outcome, units: DisplayUnits) -> None:
        setup = outcome.setup
        low, aim, high = outcome.targets
        soak_low, soak, soak_high = outcome.soak_window
        self.headline.setText(f"Soak {format_duration(soak)}")
        counted = "heat-up and drop counted" if outcome.counts_shop_stages else "no heat-up or drop counted"
        self.subline.setText(
            f"at {units.format_temperature(setup.temperature)}, carbon potential {setup.carbon_potential:.2f} %C, "
            f"for {units.format_length(aim)} {setup.threshold.depth_name} at {setup.threshold} "
            f"({soak / 3600:.2f} h at temperature; {counted})")
        self._fact("window", "Drawing window",
                   f"{units.format_length(low)} in {format_duration(soak_low)}  to  "
                   f"{units.format_length(high)} in {format_duration(soak_high)}")
        self._fact("surface", "Surface carbon at the end", f"{outcome.surface_carbon:.3f} %C")
        self._fact("reached", "Case depth reached", units.format_length(outcome.case_depth))
        self._fact("threshold", "Threshold means", f"{setup.threshold_carbon:.3f} %C" if setup.threshold.kind != "carbon"
                   else f"{setup.threshold_carbon:.2f} %C (carbon threshold)")
        self._fact("equilibrium", "Surface carbon in equilibrium",
                   f"{setup.equilibrium_carbon:.3f} %C (alloy factor {setup.alloy_factor:.3f})")
        self._fact("saturation", "Saturation (Acm)", f"{setup.saturation_carbon:.2f} %C")
        self._show_probe(outcome)
        self._show_quote(outcome.quote)

    def _show_quote(self, quote) -> None:
        """The furnace's whole cycle for one load and what it costs (Edit → Shop times and rates)."""
        if quote is None:
            self._fact("cycle", "Whole cycle", "—")
            return
        money = f" {quote.currency}" if quote.currency else ""
        self._fact("cycle", "Whole cycle", f"{format_duration(quote.total_h * 3600)}; {quote.cost_per_load:.2f}{money} "
                   f"per load, {quote.cost_per_part:.3f}{money} per part")

    def _show_probe(self, outcome) -> None:
        """Ideal oxygen-probe voltages of the held stages, for a controller that reads millivolts."""
        text = ", ".join(f"{label.lower()} {mv:.0f} mV" for label, mv in outcome.probe) or "—"
        self._fact("probe", "Oxygen probe (ideal)", f"{text}  ({100 * outcome.carrier_co:.0f} % CO carrier)")

    def show_problem(self, where: str, message: str) -> None:
        """Bad input: say what and where, keep the last result but mark it stale."""
        self.status.setText(f"<b>{where}:</b> {message}<br><i>The figures above are from the last valid input.</i>")
        self.status.setStyleSheet("color: #8a1c2b;")
        self.status.show()
        self.set_stale(True)

    def set_stale(self, stale: bool) -> None:
        self.stale = stale
        self.setStyleSheet(STALE_STYLE if stale else BANNER_STYLE)
        if not stale:
            self.status.hide()
