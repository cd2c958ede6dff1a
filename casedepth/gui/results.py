"""The answer side of the window: the headline large, the facts around it, the warnings; all from the
outcome's :meth:`~casedepth.outcome.Outcome.summary`, whatever the treatment."""

from __future__ import annotations

import re

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QFrame, QGridLayout, QLabel, QScrollArea, QVBoxLayout

from ..outcome import Outcome
from ..units import DisplayUnits

BANNER_STYLE = "QFrame#banner { background: #eef4f8; border: 1px solid #b8cfe0; border-radius: 6px; }"
STALE_STYLE = "QFrame#banner { background: #f3f3f3; border: 1px dashed #999; border-radius: 6px; }"
#: the space between a number and the word after it (its unit), which a wrapped line keeps together
NUMBER_AND_UNIT = re.compile(r"(?<=\d) (?=[^\s\d(])")


def unbroken(text: str) -> str:
    """``text`` with each number held to its unit by a no-break space ("1112 mV" never splits over two lines)."""
    return NUMBER_AND_UNIT.sub("\u00a0", text)


class ResultPanel(QFrame):
    """Headline, the line under it, the facts in two columns, the warnings (scrolling) and input problems."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("banner")
        self.setStyleSheet(BANNER_STYLE)
        layout = QVBoxLayout(self)
        self.headline = QLabel("—")
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
        self.grid = QGridLayout()
        self.grid.setHorizontalSpacing(18)
        self.grid.setColumnStretch(1, 1)  # the values take the room, the names only what they need
        self.grid.setColumnStretch(3, 1)
        self.facts: dict[str, QLabel] = {}
        self.fact_names: dict[str, QLabel] = {}
        layout.addLayout(self.grid)
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

    def _fact(self, index: int, key: str, name: str, value: str, detail: str = "") -> None:
        if key not in self.facts:
            label, text = QLabel(), QLabel()
            label.setStyleSheet("color: #555;")
            text.setObjectName(f"fact_{key}")
            text.setTextInteractionFlags(Qt.TextSelectableByMouse)
            text.setWordWrap(True)  # long facts wrap rather than widen the window
            self.fact_names[key], self.facts[key] = label, text
        label, text = self.fact_names[key], self.facts[key]
        self.grid.addWidget(label, index // 2, (index % 2) * 2)
        self.grid.addWidget(text, index // 2, (index % 2) * 2 + 1)
        label.setText(name)
        text.setText(unbroken(value))
        text.setToolTip(detail)
        label.show()
        text.show()

    def show_outcome(self, outcome: Outcome, units: DisplayUnits) -> None:
        summary = outcome.summary(units)
        self.headline.setText(summary.headline)
        self.subline.setText(summary.subline)
        shown = set()
        for index, fact in enumerate(summary.facts):
            self._fact(index, fact.key, fact.label, fact.text, fact.detail)
            shown.add(fact.key)
        for key in set(self.facts) - shown:
            self.facts[key].hide()
            self.fact_names[key].hide()
        if outcome.warnings:
            self.warnings.setText("\n".join(f"• {w}" for w in outcome.warnings))
            self.warnings_box.show()
        else:
            self.warnings_box.hide()
        self.set_stale(False)

    def show_problem(self, where: str, message: str) -> None:
        """Bad input: say what and where, keep the last result but mark it stale."""
        self.status.setText(f"<b>{where}:</b> {message}<br><i>The figures above are from the last valid input.</i>")
        self.status.setStyleSheet("color: #8a1c2b;")
        self.status.show()
        self.set_stale(True)

    def set_stale(self, stale: bool) -> None:
        if stale != self.stale:  # (a style sheet set again costs as much as a new one)
            self.setStyleSheet(STALE_STYLE if stale else BANNER_STYLE)
        self.stale = stale
        if not stale:
            self.status.hide()
