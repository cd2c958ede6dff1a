"""The answer side of the window: the soak time large, the facts around it, the warnings."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QFrame, QGridLayout, QLabel, QVBoxLayout

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
        names = [("window", "Drawing window"), ("surface", "Surface carbon at the end"),
                 ("reached", "Case depth reached"), ("threshold", "Threshold means"),
                 ("equilibrium", "Surface carbon in equilibrium"), ("saturation", "Saturation (Acm)")]
        for i, (key, label) in enumerate(names):
            name = QLabel(label)
            name.setStyleSheet("color: #555;")
            value = QLabel("—")
            value.setObjectName(f"fact_{key}")
            value.setTextInteractionFlags(Qt.TextSelectableByMouse)
            grid.addWidget(name, i // 2, (i % 2) * 2)
            grid.addWidget(value, i // 2, (i % 2) * 2 + 1)
            self.facts[key] = value
        layout.addLayout(grid)
        self.warnings = QLabel()
        self.warnings.setObjectName("warnings")
        self.warnings.setWordWrap(True)
        self.warnings.setStyleSheet("background: #fff4d6; border: 1px solid #e0b84c; border-radius: 4px; padding: 4px;")
        self.warnings.hide()
        layout.addWidget(self.warnings)
        self.status = QLabel()
        self.status.setObjectName("status")
        self.status.setWordWrap(True)
        self.status.hide()
        layout.addWidget(self.status)
        self.stale = False

    def show_outcome(self, outcome, units: DisplayUnits) -> None:
        setup, aim = outcome.setup, outcome.aim
        self.headline.setText(f"Soak {format_duration(aim.soak_time)}")
        self.subline.setText(
            f"at {units.format_temperature(setup.temperature)}, carbon potential {setup.carbon_potential:.2f} %C, "
            f"for {units.format_length(aim.target_depth)} effective case depth at {setup.threshold} "
            f"({aim.soak_time / 3600:.2f} h at temperature; heat-up and drop not included)")
        self.facts["window"].setText(
            f"{units.format_length(outcome.low.target_depth)} in {format_duration(outcome.low.soak_time)}  to  "
            f"{units.format_length(outcome.high.target_depth)} in {format_duration(outcome.high.soak_time)}")
        self.facts["surface"].setText(f"{aim.surface_carbon:.3f} %C")
        self.facts["reached"].setText(units.format_length(aim.case_depth))
        self.facts["threshold"].setText(f"{setup.threshold_carbon:.3f} %C" if setup.threshold.kind != "carbon"
                                        else f"{setup.threshold_carbon:.2f} %C (carbon threshold)")
        self.facts["equilibrium"].setText(f"{setup.equilibrium_carbon:.3f} %C (alloy factor {setup.alloy_factor:.3f})")
        self.facts["saturation"].setText(f"{setup.saturation_carbon:.2f} %C")
        if outcome.warnings:
            self.warnings.setText("\n".join(f"• {w}" for w in outcome.warnings))
            self.warnings.show()
        else:
            self.warnings.hide()
        self.set_stale(False)

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
