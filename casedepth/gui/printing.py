"""Printing the documents of :mod:`casedepth.documents` through Qt (system print dialog and preview)."""

from __future__ import annotations

from matplotlib.backends.backend_agg import FigureCanvasAgg
from PySide6.QtCore import QRectF, Qt
from PySide6.QtGui import QImage, QPageLayout, QPageSize, QPainter
from PySide6.QtPrintSupport import QPrintDialog, QPrinter, QPrintPreviewDialog

PAGE_SIZES = {"a4": QPageSize.A4, "letter": QPageSize.Letter}


def page_image(figure, dpi: int = 200) -> QImage:
    """A page rendered to an image (matplotlib's Agg renderer), kept alive with its buffer."""
    canvas = FigureCanvasAgg(figure)
    figure.set_dpi(dpi)
    canvas.draw()
    width, height = canvas.get_width_height()
    buffer = bytes(canvas.buffer_rgba())
    image = QImage(buffer, width, height, QImage.Format_RGBA8888).copy()
    return image


def paint(printer: QPrinter, document) -> None:
    """Paint every page of ``document`` on ``printer``, each scaled to fit the printable area."""
    painter = QPainter(printer)
    try:
        for number, figure in enumerate(document.pages):
            if number:
                printer.newPage()
            image = page_image(figure)
            area = QRectF(printer.pageLayout().paintRectPixels(printer.resolution()))
            area.moveTo(0, 0)
            scale = min(area.width() / image.width(), area.height() / image.height())
            target = QRectF(0, 0, image.width() * scale, image.height() * scale)
            painter.drawImage(target, image)
    finally:
        painter.end()


def make_printer(paper: str) -> QPrinter:
    printer = QPrinter(QPrinter.HighResolution)
    printer.setPageSize(QPageSize(PAGE_SIZES.get(paper, QPageSize.A4)))
    printer.setPageOrientation(QPageLayout.Portrait)
    return printer


def print_with_dialog(parent, document, paper: str) -> bool:
    printer = make_printer(paper)
    dialog = QPrintDialog(printer, parent)
    dialog.setWindowTitle(f"Print {document.title}")
    if dialog.exec() != QPrintDialog.Accepted:
        return False
    paint(printer, document)
    return True


def preview(parent, document, paper: str) -> None:
    printer = make_printer(paper)
    dialog = QPrintPreviewDialog(printer, parent, Qt.Window)
    dialog.setWindowTitle(f"Preview — {document.title}")
    dialog.paintRequested.connect(lambda p: paint(p, document))
    dialog.exec()


def print_to_pdf(document, path: str, paper: str) -> None:
    """Print through Qt's own PDF printer (what the dialogs use), without asking."""
    printer = make_printer(paper)
    printer.setOutputFormat(QPrinter.PdfFormat)
    printer.setOutputFileName(path)
    paint(printer, document)
