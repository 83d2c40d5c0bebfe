"""The sheet from a site, end to end: study, sky, figures, sun chart, layout.

:func:`compute_sheet` is what the command line runs: the engine's
:func:`tiltyard.engine.exports.sheet_data`, then :func:`lay_out`. The Sheet
view runs the two apart: the engine part in a worker process, the layout
(which needs Qt) in a thread.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from tiltyard.engine.exports import SUN_STEP_MIN, SheetData, SheetFigures, sheet_data
from tiltyard.engine.site import Site
from tiltyard.engine.skyyear import SkyYear
from tiltyard.engine.sunchart import SunChart
from tiltyard.engine.tilt import StudyOptions, TiltStudy

from .content import SheetMeta
from .pages import SheetDocument, build_sheet


@dataclass(frozen=True)
class SheetResult:
    """Everything behind one sheet."""

    study: TiltStudy
    sky: SkyYear
    figures: SheetFigures
    sun: SunChart
    document: SheetDocument


def lay_out(data: SheetData, meta: SheetMeta | None = None, paper: str = "a4") -> SheetResult:
    """Lay out the pages of the sheet on the engine's :class:`SheetData`."""
    meta = meta or SheetMeta()
    document = build_sheet(data.figures, data.sun, meta, paper)
    return SheetResult(data.study, data.sky, data.figures, data.sun, document)


def compute_sheet(site: Site, study: TiltStudy | StudyOptions | None = None,
                  meta: SheetMeta | None = None, paper: str = "a4",
                  progress: Callable[[float, str], None] | None = None) -> SheetResult:
    """Study (unless given), sky, figures, sun chart and the laid-out pages.

    Parameters
    ----------
    site : Site
    study : TiltStudy or StudyOptions, optional
        A finished study of ``site`` to use as it is, or the options to run one
        with (default options when None).
    meta : SheetMeta, optional
    paper : {"a4", "letter"}
    progress : callable, optional
        ``progress(fraction, stage)``; may raise to cancel.
    """
    meta = meta or SheetMeta()

    def report(fraction, stage):
        if progress is not None:
            progress(fraction, stage)

    data = sheet_data(site, study, meta.time_basis, SUN_STEP_MIN,
                      progress=lambda f, st: report(0.93 * f, st))
    report(0.93, "laying out the pages")
    result = lay_out(data, meta, paper)
    report(1.0, "done")
    return result


__all__ = ["SUN_STEP_MIN", "SheetResult", "compute_sheet", "lay_out"]
