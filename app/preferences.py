"""The Preferences dialog (values kept with QSettings by :mod:`.settings`)."""

from __future__ import annotations

from PySide6.QtWidgets import QComboBox, QDialog, QDialogButtonBox, QFormLayout, QLineEdit

from tiltyard.engine.words import MODEL_NAMES, SKY_CHOICE_WORDS, TIME_BASIS_WORDS

from .settings import MODEL_CHOICES, PAPER_CHOICES, SKY_CHOICES, TIME_CHOICES, Preferences
from .sheet.content import PAPERS

_LABELS = {**SKY_CHOICE_WORDS, **MODEL_NAMES, **TIME_BASIS_WORDS,
           **{key: name for key, (name, _w, _h) in PAPERS.items()}}


class PreferencesDialog(QDialog):
    def __init__(self, prefs: Preferences, parent=None):
        super().__init__(parent)
        self.setWindowTitle("Preferences")
        form = QFormLayout(self)
        self.preparer = QLineEdit(prefs.preparer)
        self.preparer.setPlaceholderText("shown on the feasibility sheet")
        self.organisation = QLineEdit(prefs.organisation)
        form.addRow("Prepared by", self.preparer)
        form.addRow("Organisation", self.organisation)
        self.combos = {}
        for name, label, choices in (("sky", "Sky basis of a new site", SKY_CHOICES),
                                     ("model", "Transposition model of a new site",
                                      MODEL_CHOICES),
                                     ("time_basis", "Time shown", TIME_CHOICES),
                                     ("paper", "Paper size", PAPER_CHOICES)):
            box = QComboBox()
            for c in choices:
                box.addItem(_LABELS[c], c)
            box.setCurrentIndex(list(choices).index(getattr(prefs, name)))
            self.combos[name] = box
            form.addRow(label, box)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok
                                   | QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        form.addRow(buttons)

    def preferences(self) -> Preferences:
        return Preferences(preparer=self.preparer.text().strip(),
                           organisation=self.organisation.text().strip(),
                           **{k: box.currentData() for k, box in self.combos.items()})
