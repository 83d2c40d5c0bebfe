"""The feasibility sheet: one or two pages for the client, on A4 or US Letter.

- :func:`compute_sheet` (``job``): study, sky, figures and sun chart from the
  engine, then the laid-out pages (:class:`SheetDocument`).
- :func:`build_sheet` (``pages``): the layout of the pages as display lists.
- :func:`pdf_bytes`, :func:`page_image`, :func:`print_document` (``pdf``):
  the same drawing code painted on a PDF writer, a preview image, a printer.

Every number comes from :func:`tiltyard.engine.exports.sheet_figures`; this
package only writes and draws it.
"""

from .content import PAPERS, SheetMeta
from .job import SheetResult, compute_sheet, lay_out
from .pages import SheetDocument, build_sheet
from .pdf import page_image, paint_page, paint_to, pdf_bytes, print_document

__all__ = ["PAPERS", "SheetDocument", "SheetMeta", "SheetResult", "build_sheet",
           "compute_sheet", "lay_out", "page_image", "paint_page", "paint_to", "pdf_bytes",
           "print_document"]
