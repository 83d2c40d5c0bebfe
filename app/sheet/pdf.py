"""Painting a laid-out sheet: to PDF (vector, fonts embedded), to a printer, to an image.

One function, :func:`paint_page`, draws a page's display list on any
QPainter; the painter is scaled so that one unit is one point, and fonts are
sized for the device's resolution (see :func:`.layout.qfont`). The PDF
comes from QPdfWriter: text stays text (selectable, subset fonts embedded),
charts are paths, and nothing is a bitmap.
"""

from __future__ import annotations

from PySide6.QtCore import QBuffer, QByteArray, QIODevice, QMarginsF, QPointF, Qt
from PySide6.QtGui import (
    QColor,
    QImage,
    QPageLayout,
    QPageSize,
    QPainter,
    QPdfWriter,
)

from .layout import ShapeOp, TextOp, qfont

#: Resolution of the PDF writer, dots per inch (coordinates are written as decimals).
PDF_DPI = 1200

PAGE_SIZE_IDS = {"a4": QPageSize.PageSizeId.A4, "letter": QPageSize.PageSizeId.Letter}


def page_layout(paper: str) -> QPageLayout:
    """A portrait page of ``paper`` with no printer margins (the sheet has its own)."""
    return QPageLayout(QPageSize(PAGE_SIZE_IDS[paper]), QPageLayout.Orientation.Portrait,
                       QMarginsF(0, 0, 0, 0), QPageLayout.Unit.Point)


def paint_page(painter: QPainter, page, dpi_x: float, dpi_y: float,
               origin: QPointF | None = None) -> None:
    """Draw one page's ops; the device has ``dpi_x`` x ``dpi_y`` dots per inch."""
    painter.save()
    if origin is not None:
        painter.translate(origin)
    painter.scale(dpi_x / 72.0, dpi_y / 72.0)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
    painter.setRenderHint(QPainter.RenderHint.TextAntialiasing, True)
    fonts = {}
    for op in page.ops:
        if isinstance(op, TextOp):
            f = fonts.get(op.font)
            if f is None:
                f = fonts[op.font] = qfont(op.font, dpi_y)
            painter.setFont(f)
            painter.setPen(QColor(op.color))
            painter.drawText(QPointF(op.x, op.baseline), op.text)
        elif isinstance(op, ShapeOp):
            painter.save()
            if op.clip is not None:
                painter.setClipRect(op.clip, Qt.ClipOperation.IntersectClip)
            if op.clip_path is not None:
                painter.setClipPath(op.clip_path, Qt.ClipOperation.IntersectClip)
            painter.setPen(op.pen if op.pen is not None else Qt.PenStyle.NoPen)
            painter.setBrush(op.brush if op.brush is not None else Qt.BrushStyle.NoBrush)
            painter.drawPath(op.path)
            painter.restore()
    painter.restore()


def pdf_bytes(doc) -> bytes:
    """The whole sheet as a PDF file's bytes (built in memory)."""
    data = QByteArray()
    buf = QBuffer(data)
    buf.open(QIODevice.OpenModeFlag.WriteOnly)
    writer = QPdfWriter(buf)
    writer.setResolution(PDF_DPI)
    writer.setPageLayout(page_layout(doc.paper))
    writer.setTitle(doc.title)
    writer.setCreator("Tiltyard")
    meta = doc.meta
    author = ", ".join(x for x in (meta.preparer.strip(), meta.organisation.strip()) if x)
    if author and hasattr(writer, "setAuthor"):
        writer.setAuthor(author)
    painter = QPainter()
    if not painter.begin(writer):
        raise OSError("could not start the PDF writer")
    try:
        for i, page in enumerate(doc.pages):
            if i:
                writer.newPage()
            paint_page(painter, page, writer.logicalDpiX(), writer.logicalDpiY())
    finally:
        painter.end()
        buf.close()
    return bytes(data.data())


def page_image(doc, index: int, dpi: float) -> QImage:
    """Page ``index`` rendered at ``dpi`` on white (for the preview)."""
    page = doc.pages[index]
    w = max(1, int(round(page.width * dpi / 72.0)))
    h = max(1, int(round(page.height * dpi / 72.0)))
    img = QImage(w, h, QImage.Format.Format_ARGB32_Premultiplied)
    dpm = int(round(dpi / 0.0254))
    img.setDotsPerMeterX(dpm)
    img.setDotsPerMeterY(dpm)
    img.fill(QColor("#ffffff"))
    painter = QPainter(img)
    try:
        paint_page(painter, page, dpi, dpi)
    finally:
        painter.end()
    return img


def print_document(doc, printer) -> None:
    """Send the sheet to a QPrinter (its own margins are the sheet's)."""
    printer.setFullPage(True)
    printer.setPageLayout(page_layout(doc.paper))
    painter = QPainter()
    if not painter.begin(printer):
        raise OSError("could not start printing")
    try:
        paint_to(painter, printer, doc)
    finally:
        painter.end()


def paint_to(painter: QPainter, printer, doc) -> None:
    """Draw every page on an active painter of ``printer`` (the print preview uses this).

    Coordinates start at the paper's corner: with a printer that keeps margins
    (``fullPage()`` false) the drawing is shifted back by the margin.
    """
    from PySide6.QtPrintSupport import QPrinter

    origin = QPointF(0.0, 0.0)
    if not printer.fullPage():
        r = printer.pageRect(QPrinter.Unit.DevicePixel)
        origin = QPointF(-r.left(), -r.top())
    for i, page in enumerate(doc.pages):
        if i:
            printer.newPage()
        paint_page(painter, page, printer.logicalDpiX(), printer.logicalDpiY(), origin)


__all__ = ["PAGE_SIZE_IDS", "PDF_DPI", "page_image", "page_layout", "paint_page", "paint_to",
           "pdf_bytes", "print_document"]
