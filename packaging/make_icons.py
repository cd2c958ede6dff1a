"""Render the icon's PNG sizes from resources/icons/casedepth.svg (Qt's SVG renderer, no display needed).

    QT_QPA_PLATFORM=offscreen python packaging/make_icons.py
"""

from __future__ import annotations

import sys
from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtGui import QGuiApplication, QImage, QPainter
from PySide6.QtSvg import QSvgRenderer

ICONS = Path(__file__).resolve().parents[1] / "resources" / "icons"
SIZES = (16, 24, 32, 48, 64, 128, 256, 512)  # the hicolor theme's usual sizes


def main() -> int:
    app = QGuiApplication.instance() or QGuiApplication(sys.argv)  # noqa: F841 (painting needs one)
    renderer = QSvgRenderer(str(ICONS / "casedepth.svg"))
    if not renderer.isValid():
        print("casedepth.svg cannot be read", file=sys.stderr)
        return 1
    for size in SIZES:
        image = QImage(size, size, QImage.Format_ARGB32)
        image.fill(Qt.transparent)
        painter = QPainter(image)
        painter.setRenderHint(QPainter.Antialiasing)
        renderer.render(painter)
        painter.end()
        image.save(str(ICONS / f"casedepth-{size}.png"))
    print(f"wrote {len(SIZES)} sizes to {ICONS}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
