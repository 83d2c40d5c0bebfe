"""The Preferences dialog (values kept with QSettings by :mod:`.settings`)."""

from __future__ import annotations

from PySide6.QtWidgets import QComboBox, QDialog, QDialogButtonBox, QFormLayout, QLineEdit

from .settings import MODEL_CHOICES, PAPER_CHOICES, SKY_CHOICES, TIME_CHOICES, Preferences

_LABELS = {
    "auto": "best available (weather file, else monthly values, else clear sky)",
    "clear": "clear sky (upper bound)", "monthly": "monthly GHI values",
    "perez": "Perez 1990", "haydavies": "Hay-Davies", "isotropic": "isotropic (Liu-Jordan)",
    "clock": "local clock time (with daylight saving)", "standard": "local standard time",
    "solar": "apparent solar time", "a4": "A4", "letter": "US Letter",
}


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
