"""Sheet view: where the feasibility sheet will be previewed and exported."""

from __future__ import annotations

from PySide6.QtWidgets import QLabel, QVBoxLayout

from ..widgets import View


class SheetView(View):
    title = "Sheet"

    def __init__(self, ctx, parent=None):
        super().__init__(ctx, parent)
        lay = QVBoxLayout(self)
        lay.setContentsMargins(24, 18, 24, 18)
        head = QLabel("Feasibility sheet")
        head.setProperty("role", "heading")
        lay.addWidget(head)
        self.note = QLabel("The printable feasibility sheet (PDF export, printing and data "
                           "exports) is not part of this version yet. The command line's "
                           "`tiltyard study SITE --json` gives the study's figures meanwhile.")
        self.note.setWordWrap(True)
        lay.addWidget(self.note)
        lay.addStretch(1)
