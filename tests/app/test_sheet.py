"""The feasibility sheet: layout, PDF, the Sheet view's preview, exports and printing.

PDF checks read the file back with pypdf (text, page boxes, resources). Layout checks use
the display list's boxes: every text box lies in its frame, every frame on the page's
content area. View tests drive the real widget with the dialogs replaced.
"""

from __future__ import annotations

import datetime as dt
import io
import json
import os
import re

import pypdf
import pytest
from PySide6.QtCore import QRectF
from PySide6.QtGui import QImage

from tiltyard.app import settings
from tiltyard.app.sheet import SheetMeta, build_sheet, compute_sheet, pdf_bytes
from tiltyard.app.sheet.layout import ELLIPSIS, Font, Measure, fit_text, inside
from tiltyard.app.views import sheet_view as sheet_view_module
from tiltyard.app.views.sheet_view import SheetView
from tiltyard.engine.assessment import StudySettings
from tiltyard.engine.demo_sites import load_demo
from tiltyard.engine.exports import (
    hourly_csv_text,
    monthly_csv_text,
    options_csv_text,
    study_json_text,
)
from tiltyard.engine.site import Plane
from tiltyard.engine.tilt import StudyOptions, tilt_study

COARSE = StudyOptions(tilt_step_deg=5.0)
META = SheetMeta("Jane Doe", "Example Solar Ltd", dt.date(2025, 5, 12))
_STUDIES: dict = {}


def coarse_study(site_or_demo):
    """A tilt study on a 5-degree tilt grid (cached: studies are immutable)."""
    site = load_demo(site_or_demo) if isinstance(site_or_demo, str) else site_or_demo
    key = repr(site)
    if key not in _STUDIES:
        _STUDIES[key] = tilt_study(site, COARSE)
    return _STUDIES[key]


def pdf_text(data: bytes) -> str:
    """All pages' text with whitespace collapsed (the sheet draws no ligatures)."""
    reader = pypdf.PdfReader(io.BytesIO(data))
    return " ".join(" ".join(p.extract_text() for p in reader.pages).split())


def long_site():
    site = load_demo("larkmoor-dairy")
    name = ("Upper Larkmoor cooperative dairy and cheese works, north milking parlour, calf "
            "sheds and the long machinery barn by the old quarry road, Larkmoor Moor, high "
            "Pennine fells, surveyed in May of 2025")
    assert 190 <= len(name) <= 200
    planes = tuple(Plane(f"Plane {i}: the {d} roof slope over the {w} with the rooflights", t, a)
                   for i, (d, w, t, a) in enumerate([("south", "parlour", 22, 196),
                                                     ("east", "calf shed", 30, 100),
                                                     ("west", "machinery barn", 15, 260),
                                                     ("south-west", "workshop", 40, 220)]))
    return site.with_changes(name=name, planes=planes)


@pytest.fixture(scope="module")
def lark_sheet(qapp):
    site = load_demo("larkmoor-dairy")
    result = compute_sheet(site, coarse_study(site), META, "a4")
    return result, pdf_bytes(result.document)


# -- the PDF ------------------------------------------------------------------------------------

def test_pdf_has_every_section_and_the_engines_numbers(lark_sheet, artefacts_dir):
    result, data = lark_sheet
    with open(os.path.join(artefacts_dir, "sheet-larkmoor-dairy.pdf"), "wb") as fh:
        fh.write(data)
    text = pdf_text(data)
    site = result.study.site
    for words in (site.name, "53.7100° N, 2.4800° W", "elevation 162 m", "Europe/London",
                  "Prepared 12 May 2025 by Jane Doe, Example Solar Ltd", "Scope:",
                  "Key figures", "Sun path", "Monthly irradiation on the plane",
                  "Options compared", "Assumptions", "Cautions", "Reproducibility",
                  "upper bound", "Reda", "Perez", "1361 W/m²", "Turbidity", "Albedo",
                  "Time convention", "Weather data", "roof access", "licensed installers",
                  "varies from year to year", "not a design", result.figures.short_digest,
                  "Sun elevation (°)", "kWh/m² per month", "Azimuth (°"):
        assert words in text, words
    d = result.figures.document["study"]
    rec = next(r for r in d["options"] if r["label"] == d["recommended"])
    # the key figures as printed are the JSON document's, rounded for reading
    ops = {o.role: o.text for p in result.document.pages for o in p.texts()}
    annual = float(re.match(r"([\d,]+) kWh/m²", ops["key.annual"]).group(1).replace(",", ""))
    assert annual == pytest.approx(rec["annual_kwh_m2"], abs=0.5)
    for role, key in (("key.gain_horizontal", "gain_vs_horizontal_pct"),
                      ("key.gain_fixed", "gain_vs_fixed_optimal_pct")):
        shown = float(ops[role].rstrip(" %"))
        assert shown == pytest.approx(rec[key], abs=0.05), role
        assert ops[role] in text
    plane = next(r for r in d["options"] if r["kind"] == "plane")
    shown = float(ops["key.gain_plane.0"].rstrip(" %"))
    assert shown == pytest.approx(100 * (rec["annual_kwh_m2"] / plane["annual_kwh_m2"] - 1),
                                  abs=0.05)
    loss = result.figures.horizon_loss
    assert float(ops["key.horizon_loss"].rstrip(" %")) == pytest.approx(loss.loss_pct, abs=0.05)
    assert ops["key.annual"] in text and ops["key.option"] in text
    # the recommended schedule in words, e.g. "28° from 7 Apr to 6 Sep, 64° from 7 Sep ..."
    if len(result.study.recommended.schedule) == 2:
        assert re.search(r"\d+° from \d+ \w{3} to \d+ \w{3}, \d+° from", ops["key.schedule"])
    assert ops["key.schedule"] in text


def test_page_count_and_size_for_both_papers(qapp, lark_sheet):
    result, a4 = lark_sheet
    letter = pdf_bytes(build_sheet(result.figures, result.sun, META, "letter"))
    for data, (w, h) in ((a4, (595.0, 842.0)), (letter, (612.0, 792.0))):
        reader = pypdf.PdfReader(io.BytesIO(data))
        assert len(reader.pages) in (2, 3)        # the details flow on when they need to
        for page in reader.pages:
            box = page.mediabox
            # ISO 216 A4 (210 x 297 mm) and US Letter (8.5 x 11 in) in points: 1 pt
            assert float(box.width) == pytest.approx(w, abs=1.0)
            assert float(box.height) == pytest.approx(h, abs=1.0)


def _images(obj, seen=None):
    """Image XObjects reachable from a resources dictionary (forms searched too)."""
    seen = set() if seen is None else seen
    found = []
    xobjects = (obj or {}).get("/XObject") or {}
    for _name, ref in xobjects.items():
        x = ref.get_object()
        if id(x) in seen:
            continue
        seen.add(id(x))
        if x.get("/Subtype") == "/Image":
            found.append((x.get("/Width"), x.get("/Height")))
        elif x.get("/Subtype") == "/Form":
            found += _images(x.get("/Resources"), seen)
    return found


def test_pdf_is_vector_with_selectable_text_and_embedded_fonts(lark_sheet):
    _result, data = lark_sheet
    reader = pypdf.PdfReader(io.BytesIO(data))
    for i, page in enumerate(reader.pages):
        res = page["/Resources"]
        assert _images(res) == []                    # charts are paths, not bitmaps
        content = page.get_contents().get_data()
        ops = re.findall(rb"(?<=\s)(l|c|Tj|TJ)(?=\s)", content)
        # page 1's charts are thousands of path segments; page 2 has the tables' rules
        if i < 2:
            assert ops.count(b"l") + ops.count(b"c") > (1000 if i == 0 else 20)
            assert ops.count(b"Tj") + ops.count(b"TJ") > 300    # text drawn as text
        else:                                   # a continuation page: text still text
            assert ops.count(b"Tj") + ops.count(b"TJ") > 10
        fonts = res["/Font"]
        assert len(fonts) >= 1
        for _n, ref in fonts.items():
            font = ref.get_object()
            desc = (font["/DescendantFonts"][0].get_object()["/FontDescriptor"]
                    if "/DescendantFonts" in font else font["/FontDescriptor"]).get_object()
            assert any(k in desc for k in ("/FontFile", "/FontFile2", "/FontFile3")), font


def _check_in_frames(doc):
    for page in doc.pages:
        assert inside(page.content, QRectF(0, 0, page.width, page.height))
        for op in page.ops:
            assert inside(op.rect, op.frame), (op.role, getattr(op, "text", ""), op.rect,
                                               op.frame)
            assert inside(op.frame, page.content), (op.role, op.frame)


def test_long_name_and_every_option_fit(qapp):
    site = long_site()
    study = coarse_study(site)
    assert len([o for o in study.options if o.kind == "plane"]) == 4
    result = compute_sheet(site, study, META, "a4")
    for paper in ("a4", "letter"):
        doc = build_sheet(result.figures, result.sun, META, paper)
        assert doc.page_count >= 2
        _check_in_frames(doc)
        text = pdf_text(pdf_bytes(doc))
        assert site.name in text                      # the title wraps but keeps every word
        head = " ".join(o.text for o in doc.pages[1].texts() if o.role == "head.site")
        assert head.endswith(ELLIPSIS) and site.name.startswith(head[:-1].rstrip())
        for plane in site.planes:                     # each plane's row, whole or elided
            rows = [o.text for o in doc.pages[1].texts() if o.role == "options.cell.0"]
            assert any(plane.label.startswith(r.rstrip(ELLIPSIS).split("\n")[0][:20])
                       for r in rows)
        for role in ("key.gain_plane.0", "key.gain_plane.3", "key.horizon_loss"):
            assert any(o.role == role for o in doc.pages[0].texts()), role


def test_the_arctic_sheet_fits(qapp):
    site = load_demo("tarnvik-cabin")       # polar day and polar night on one chart
    result = compute_sheet(site, coarse_study(site), META, "a4")
    _check_in_frames(result.document)
    assert set(result.document.scales) == {1.0}
    legend = " ".join(o.text for o in result.document.pages[0].texts() if o.role == "legend")
    assert "stays below the horizon" in legend             # no sunrise on 21 December


def test_fit_text_wraps_shrinks_then_elides(qapp):
    m = Measure()
    box = QRectF(10, 10, 120, 30)
    words = "the quick brown fox jumps over the lazy dog " * 6
    fitted = fit_text(m, words, box, Font(10), min_size=6)
    assert fitted.elided and fitted.ops[-1].text.endswith(ELLIPSIS)
    assert fitted.size == 6
    for op in fitted.ops:
        assert inside(op.rect, box)
    short = fit_text(m, "two words", box, Font(10), min_size=6)
    assert not short.elided and short.size == 10 and [o.text for o in short.ops] == ["two words"]
    # a word wider than the box shrinks first, then is cut by characters
    narrow = QRectF(0, 0, 40, 100)
    cut = fit_text(m, "Supercalifragilisticexpialidocious", narrow, Font(10), min_size=8)
    assert len(cut.ops) > 1 and "".join(o.text for o in cut.ops) == \
        "Supercalifragilisticexpialidocious"
    assert all(inside(o.rect, narrow) for o in cut.ops)
    assert fit_text(m, "x", QRectF(0, 0, 50, 2), Font(10)).ops == []      # nothing fits


# -- the view -----------------------------------------------------------------------------------

def _view(qtbot, idle, ctx, study=None):
    if study is not False:
        ctx.publish_study(study or coarse_study(ctx.site))
    view = SheetView(ctx)
    qtbot.addWidget(view)
    view.resize(1130, 760)
    view.show()
    view.activated()
    idle(ctx.runner)
    return view


def _not_blank(img: QImage) -> bool:
    colours = {img.pixel(x, y) for x in range(0, img.width(), 7)
               for y in range(0, img.height(), 7)}
    return len(colours) > 8


@pytest.mark.parametrize("demo", ["larkmoor-dairy", "kelpie-creek-shed", "coral-lane-clinic"])
def test_view_previews_the_pages(qtbot, idle, make_ctx, artefacts_dir, demo):
    ctx = make_ctx(demo)
    view = _view(qtbot, idle, ctx)
    pv = view.preview
    assert pv is not None and len(pv.images) == pv.document.page_count >= 2
    # the sheet's study is the open assessment's, the one the Tilt study view shows
    assert pv.result.study.options_used == ctx.assessment.study_options(
        pv.result.study.options_used.irradiance)
    assert all(_not_blank(img) for img in pv.images)
    assert all(lab.pixmap().width() > 300 for lab in view.pages.labels)
    assert "Recommended" in view.status.text()
    assert view.export_button.isEnabled() and view.print_button.isEnabled()
    _check_in_frames(pv.document)
    path = os.path.join(artefacts_dir, f"sheet_view_{demo}.png")
    assert view.grab().save(path)


def test_view_follows_study_preferences_and_paper(qtbot, idle, make_ctx):
    ctx = make_ctx("larkmoor-dairy")
    view = _view(qtbot, idle, ctx)
    first = view.preview
    # the study settings are the site's: the sheet follows them
    ctx.set_settings(study=StudySettings(tilt_step_deg=10.0, objective="months",
                                         months=(11, 12, 1)))
    idle(ctx.runner)
    assert view.preview is not first
    study = view.preview.result.study
    assert study.options_used.objective == "months" and study.options_used.months == (11, 12, 1)
    page1 = view.preview.document.pages[0].text()
    # a flush roof is taken as it is; the objective is its own key figure
    assert "This roof as it is" in page1 and "the total of Nov, Dec, Jan" in page1
    assert any(o.role == "key.objective" for o in view.preview.document.pages[0].texts())
    ctx.set_preferences(settings.Preferences(preparer="Ann Example", organisation="Sunny Ltd",
                                             paper="letter"))
    idle(ctx.runner)
    doc = view.preview.document
    assert doc.paper == "letter" and (doc.width, doc.height) == (612.0, 792.0)
    assert "by Ann Example, Sunny Ltd" in doc.pages[0].text()
    assert view.paper.currentData() == "letter"
    assert view.prepared.text() == "Ann Example, Sunny Ltd"
    view.paper.setCurrentIndex(0)
    idle(ctx.runner)
    assert view.preview.document.paper == "a4"
    # a new site brings its own settings: nothing of the previous site's study is left
    ctx.document.open_demo("kelpie-creek-shed")
    idle(ctx.runner, 90.0)
    assert view.preview.result.study.site.name == ctx.site.name
    used = view.preview.result.study.options_used
    assert used.objective == "annual" and used.tilt_step_deg == 1.0


def test_view_exports_the_engines_data_and_reports_failures(qtbot, idle, make_ctx, tmp_path):
    ctx = make_ctx("larkmoor-dairy")
    view = _view(qtbot, idle, ctx)
    asked = []

    def ask(kind, suggested):
        asked.append((kind, suggested))
        return str(tmp_path / f"out-{kind}{sheet_view_module.EXPORTS[kind][2]}")

    view.ask_save_path = ask
    # untick everything but the recommendation and horizontal for the hourly CSV
    keep = {ctx.study.recommended.label, "Horizontal"}
    for i in range(view.hourly_list.count()):
        item = view.hourly_list.item(i)
        if item.data(256) not in keep:              # Qt.UserRole
            item.setCheckState(sheet_view_module.Qt.CheckState.Unchecked)
    for kind in ("pdf", "monthly", "options", "hourly", "json"):
        view.export(kind)
        idle(ctx.runner)
    assert [k for k, _s in asked] == ["pdf", "monthly", "options", "hourly", "json"]
    assert asked[0][1].endswith("larkmoor-dairy-milking-shed-roof-sheet.pdf")
    study, sky = view.preview.result.study, view.preview.result.sky
    data = (tmp_path / "out-pdf.pdf").read_bytes()
    assert data.startswith(b"%PDF") and len(pypdf.PdfReader(io.BytesIO(data)).pages) == \
        view.preview.document.page_count
    assert (tmp_path / "out-monthly.csv").read_text("utf-8") == monthly_csv_text(study)
    assert (tmp_path / "out-options.csv").read_text("utf-8") == options_csv_text(study)
    # the JSON export is the sheet's document: the study with the assessment's header
    doc = json.loads((tmp_path / "out-json.json").read_text("utf-8"))
    assert doc["study"] == json.loads(study_json_text(study))["study"]
    assert doc["assessment"]["basis"]["used"] == "monthly"
    chosen = [o for o in study.options if o.label in keep]
    assert (tmp_path / "out-hourly.csv").read_text("utf-8") == hourly_csv_text(
        sky, study.site, chosen)
    assert view.last_written.endswith("out-json.json")
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "out-hourly.csv", "out-json.json", "out-monthly.csv", "out-options.csv", "out-pdf.pdf"]
    # a folder that is not there: an error message, no file, the old file kept
    errors = []
    ctx.runner.error.connect(lambda label, msg, tb: errors.append(msg))
    target = tmp_path / "missing" / "sheet.pdf"
    view.ask_save_path = lambda kind, suggested: str(target)
    view.export("pdf")
    idle(ctx.runner)
    assert errors and "could not write" in errors[0] and "sheet.pdf" in errors[0]
    assert not target.parent.exists()
    before = (tmp_path / "out-monthly.csv").read_bytes()
    view.ask_save_path = lambda kind, suggested: None          # cancelled
    view.export("monthly")
    idle(ctx.runner)
    assert (tmp_path / "out-monthly.csv").read_bytes() == before and len(errors) == 1


def test_print_and_print_preview(qtbot, idle, make_ctx, tmp_path, monkeypatch):
    from PySide6.QtPrintSupport import QPrinter

    ctx = make_ctx("kelpie-creek-shed")
    view = _view(qtbot, idle, ctx)
    printer = QPrinter(QPrinter.PrinterMode.HighResolution)
    printer.setOutputFormat(QPrinter.OutputFormat.PdfFormat)
    out = tmp_path / "printed.pdf"
    printer.setOutputFileName(str(out))
    view.ask_print = lambda p: False
    assert view.print_sheet(printer) is False and not out.exists()
    view.ask_print = lambda p: True
    assert view.print_sheet(printer) is True
    reader = pypdf.PdfReader(str(out))
    assert len(reader.pages) == view.preview.document.page_count
    # printed on the sheet's paper, the pages as laid out
    assert float(reader.pages[0].mediabox.width) == pytest.approx(595.0, abs=1.0)
    assert "Kelpie Creek machinery shed" in pdf_text(out.read_bytes())
    calls = []
    real = sheet_view_module.paint_to
    monkeypatch.setattr(sheet_view_module, "paint_to",
                        lambda *a: (calls.append(a), real(*a)))

    def run(dlg):
        dlg.show()
        qtbot.waitUntil(lambda: bool(calls), timeout=10000)
        dlg.close()
        return 0

    view.exec_dialog = run
    dlg = view.print_preview()
    assert calls and dlg.windowTitle().startswith("Print preview")
