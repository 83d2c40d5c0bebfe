"""What every view shares: the open document (the site's assessment), the task runner and
preferences.

Views talk to each other only through this object. The assessment the
document holds (site, sky basis, weather file, models, study settings,
mounting) is what every view computes from, through
:func:`tiltyard.engine.assess.assessment_part` in a worker process; the study
result the Tilt study view publishes is what the Irradiance bars and the
Sheet show.
"""

from __future__ import annotations

import datetime as _dt

from PySide6.QtCore import QObject, Signal

from tiltyard.engine.assessment import Assessment
from tiltyard.engine.choices import REFERENCE_YEAR
from tiltyard.engine.site import Site

from .document import SiteDocument
from .settings import Preferences
from .tasks import TaskRunner


class AppContext(QObject):
    """Shared state with change signals."""

    study_changed = Signal(object)      # TiltStudy or None
    design_date_changed = Signal(object)  # datetime.date
    preferences_changed = Signal(object)
    message = Signal(str, str, str)     # level ("error"|"warning"|"info"), text, owner
    resolved = Signal(str)              # owner whose cause is fixed

    def __init__(self, document: SiteDocument, runner: TaskRunner, prefs: Preferences,
                 parent=None):
        super().__init__(parent)
        self.document = document
        self.runner = runner
        self.prefs = prefs
        self.study = None
        self.design_date = self.default_design_date(document.site)
        document.replaced.connect(self._on_replaced)

    @property
    def site(self) -> Site:
        return self.document.site

    @property
    def assessment(self) -> Assessment:
        return self.document.assessment

    def set_settings(self, **changes) -> bool:
        """Change the open site's settings; an error goes to the message banner."""
        return self._edited(self.document.set_settings(**changes), "settings", changes)

    def propose(self, **changes) -> bool:
        """Change the open site itself; an error goes to the message banner."""
        return self._edited(self.document.propose(**changes), "site", changes)

    def _edited(self, err, kind: str, changes: dict) -> bool:
        """Say an edit's error, owned by the fields it touched; a good edit of the same
        fields takes that error away."""
        owner = f"{kind}:" + ",".join(sorted(changes))
        if err is not None:
            self.notify("error", str(err), owner)
            return False
        self.resolve(owner)
        return True

    def resolve(self, owner: str) -> None:
        """What raised the message owned by ``owner`` is fixed: the message goes."""
        self.resolved.emit(owner)

    def publish_study(self, study) -> None:
        self.study = study
        self.study_changed.emit(study)

    @staticmethod
    def default_design_date(site: Site) -> _dt.date:
        """The day every view shows first: the summer solstice of the site's hemisphere in
        the reference year (21 June north of the equator, 21 December south)."""
        return _dt.date(REFERENCE_YEAR, 6, 21) if site.latitude_deg >= 0 else \
            _dt.date(REFERENCE_YEAR, 12, 21)

    def set_design_date(self, day: _dt.date) -> None:
        """The one design date the Sun path and Irradiance views share."""
        if day != self.design_date:
            self.design_date = day
            self.design_date_changed.emit(day)

    def _on_replaced(self, assessment) -> None:
        """A new document: nothing computed for the previous site stays."""
        self.publish_study(None)
        self.set_design_date(self.default_design_date(assessment.site))

    def set_preferences(self, prefs: Preferences) -> None:
        self.prefs = prefs
        self.preferences_changed.emit(prefs)

    def notify(self, level: str, text: str, owner: str = "") -> None:
        """Show a message in the banner; ``owner`` names what raised it (see
        :meth:`MessageBanner.resolve`)."""
        self.message.emit(level, text, owner)
