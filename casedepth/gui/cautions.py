"""The cautions strip: always visible, compact; pressing cautions in red; details on request."""

from __future__ import annotations

from PySide6.QtWidgets import QFrame, QHBoxLayout, QLabel, QToolButton, QVBoxLayout

from ..safety import DEFERENCE, Caution, cautions


class CautionPanel(QFrame):
    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("cautions")
        self.setStyleSheet("QFrame#cautions { background: #fbf7ee; border-top: 2px solid #e0b84c; }")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(8, 4, 8, 4)
        top = QHBoxLayout()
        self.summary = QLabel()
        self.summary.setObjectName("caution_summary")
        self.summary.setWordWrap(True)
        top.addWidget(self.summary, 1)
        self.toggle = QToolButton()
        self.toggle.setText("Details")
        self.toggle.setCheckable(True)
        self.toggle.toggled.connect(self._toggle)
        top.addWidget(self.toggle)
        layout.addLayout(top)
        self.details = QLabel()
        self.details.setObjectName("caution_details")
        self.details.setWordWrap(True)
        self.details.hide()
        layout.addWidget(self.details)
        self.items: list[Caution] = []
        self.show_cautions(cautions())

    def show_cautions(self, items: list[Caution]) -> None:
        self.items = list(items)
        parts = []
        for c in items:
            style = "color:#b00020; font-weight:bold;" if c.pressing else "color:#6b4b00;"
            parts.append(f"<span style='{style}'>⚠ {c.title}</span>")
        self.summary.setText("  ·  ".join(parts) + "  ·  <i>local codes and licensed practice govern</i>")
        self.summary.setToolTip("\n\n".join(f"{c.title}: {c.text}" for c in items))
        self.details.setText("<br>".join(
            f"<b style='color:{'#b00020' if c.pressing else '#6b4b00'}'>{c.title}.</b> {c.text}" for c in items)
            + f"<br><i>{DEFERENCE}</i>")
        if any(c.pressing for c in items):
            self.toggle.setChecked(True)

    def pressing(self) -> list[Caution]:
        return [c for c in self.items if c.pressing]

    def _toggle(self, shown: bool) -> None:
        self.details.setVisible(shown)
