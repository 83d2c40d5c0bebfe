"""The sheet as a client reads it: clean text, print-safe sizes and contrast, nothing
overlapping or outside the printable area, on every bundled demo site and both papers."""

from __future__ import annotations

import dataclasses
import datetime as dt
import io
import re

import pypdf
import pytest
from PySide6.QtCore import QRectF
from PySide6.QtGui import QColor

from tiltyard.app import theme
from tiltyard.app.sheet import SheetMeta, lay_out, pdf_bytes
from tiltyard.app.sheet.layout import ShapeOp, TextOp
from tiltyard.app.sheet.pages import BODY_MIN_PT, FOOTER_PT
from tiltyard.app.sheet.pdf import page_image
from tiltyard.engine.assess import assess
from tiltyard.engine.assessment import demo_assessment
from tiltyard.engine.demo_sites import demo_site_names
from tiltyard.engine.words import MONTH_NAMES

META = SheetMeta("Jane Doe", "Example Solar Ltd", dt.date(2025, 5, 12))
#: Printable area: printers leave up to a quarter inch unprinted on each edge of A4 and
#: Letter (18 pt; common practice, no source).
PRINTER_MARGIN_PT = 18.0
_DATA: dict = {}


def sheet_data(name):
    if name not in _DATA:
        a = demo_assessment(name)
        _DATA[name] = assess(a.with_changes(study=dataclasses.replace(a.study,
                                                                      tilt_step_deg=5.0)))
    return _DATA[name].sheet_data()


def luminance(color: str) -> float:
    """WCAG relative luminance of an sRGB colour (W3C, WCAG 2.1, 2018, sec. 1.4.3, with the
    definition of relative luminance in its glossary)."""
    c = QColor(color)

    def lin(v):
        v = v / 255.0
        return v / 12.92 if v <= 0.04045 else ((v + 0.055) / 1.055) ** 2.4

    return 0.2126 * lin(c.red()) + 0.7152 * lin(c.green()) + 0.0722 * lin(c.blue())


def contrast(a: str, b: str) -> float:
    la, lb = sorted((luminance(a), luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


def grey(color: str) -> str:
    """The colour as a grey printer or Qt's greyscale conversion renders it (qGray)."""
    c = QColor(color)
    g = (c.red() * 11 + c.green() * 16 + c.blue() * 5) // 32
    return QColor(g, g, g).name()


def backgrounds(page):
    """Each text op with the fill under it: the last filled shape drawn before it that holds
    its box (white paper where there is none)."""
    fills = []
    for op in page.ops:
        if isinstance(op, ShapeOp) and op.brush is not None:
            fills.append(op)
        elif isinstance(op, TextOp):
            under = "#ffffff"
            for f in reversed(fills):
                if f.path.boundingRect().contains(op.rect):
                    under = QColor(f.brush).name() if isinstance(f.brush, (str, QColor)) else f.brush.color().name()
                    break
            yield op, under


@pytest.fixture(scope="module", params=demo_site_names())
def sheet(request, qapp):
    data = sheet_data(request.param)
    return {paper: lay_out(data, META, paper) for paper in ("a4", "letter")}


def test_client_text_has_no_program_words(sheet):
    for result in sheet.values():
        data = pdf_bytes(result.document)
        reader = pypdf.PdfReader(io.BytesIO(data))
        text = " ".join(" ".join(p.extract_text() for p in reader.pages).split())
        assert not re.findall(r"\b[a-z]+_[a-z0-9_]+\b", text)      # no snake_case names
        assert "…" not in text                                    # nothing cut off
        assert "=" not in text                                    # no code literals
        assert not re.findall(r"°[a-z]", text)                   # no "1°ree"
        assert not re.findall(r"\b1 (?:[a-z]+ )?(obstacles|points|planes|days|warnings|"
                              r"errors|positions)\b", text)          # "1 obstacle"
        assert "preliminary" in text.lower() and "licensed installers" in text


def test_print_safe_sizes(sheet):
    for result in sheet.values():
        for page in result.document.pages:
            for op in page.texts():
                if op.role.startswith("footer"):
                    assert op.font.size >= FOOTER_PT - 1e-6, (op.role, op.text)
                elif op.frame.height() > 0 and _in_chart(page, op):
                    assert op.font.size >= 6.5 - 1e-6, (op.role, op.text, op.font.size)
                else:
                    assert op.font.size >= BODY_MIN_PT - 1e-6, (op.role, op.text, op.font.size)


def _in_chart(page, op) -> bool:
    return any(name in ("sunpath", "monthly") and frame.contains(op.rect)
               for name, frame in page.frames.items())


def test_every_text_has_contrast_in_colour_and_in_grey(sheet):
    for result in sheet.values():
        for page in result.document.pages:
            for op, under in backgrounds(page):
                # W3C, WCAG 2.1 (2018), sec. 1.4.3: at least 4.5:1 for text; tolerance 0
                assert contrast(op.color, under) >= 4.5, (op.role, op.color, under)
                assert contrast(grey(op.color), grey(under)) >= 4.5, (op.role, op.color, under)
    # the accent itself on the paper and on its soft panel
    for bg in ("#ffffff", theme.ACCENT_SOFT):
        assert contrast(theme.ACCENT, bg) >= 4.5
        assert contrast(grey(theme.ACCENT), grey(bg)) >= 4.5


def test_text_boxes_do_not_overlap_and_stay_printable(sheet):
    for paper, result in sheet.items():
        doc = result.document
        printable = QRectF(PRINTER_MARGIN_PT, PRINTER_MARGIN_PT,
                           doc.width - 2 * PRINTER_MARGIN_PT, doc.height - 2 * PRINTER_MARGIN_PT)
        for i, page in enumerate(doc.pages):
            texts = [o for o in page.texts() if o.text.strip()]
            for a_i, a in enumerate(texts):
                for b in texts[a_i + 1:]:
                    inter = a.rect.intersected(b.rect)
                    # boxes of neighbouring lines may touch by a hair (0.5 pt)
                    assert inter.isEmpty() or min(inter.width(), inter.height()) < 0.5, (
                        paper, i, a.role, a.text, b.role, b.text)
            for op in page.ops:
                assert printable.contains(op.rect.intersected(op.frame)) or \
                    op.rect.intersected(op.frame).isEmpty(), (paper, i, op.role)
            # rendered: nothing but white outside the printable area
            img = page_image(doc, i, 36)
            k = 36 / 72.0
            x0, y0 = int(printable.left() * k) - 1, int(printable.top() * k) - 1
            x1, y1 = int(printable.right() * k) + 1, int(printable.bottom() * k) + 1
            for y in range(img.height()):
                for x in list(range(0, max(0, x0))) + list(range(min(img.width(), x1),
                                                                 img.width())):
                    assert QColor(img.pixel(x, y)).lightness() == 255, (paper, i, x, y)
            for y in list(range(0, max(0, y0))) + list(range(min(img.height(), y1),
                                                             img.height())):
                for x in range(img.width()):
                    assert QColor(img.pixel(x, y)).lightness() == 255, (paper, i, x, y)


def test_the_chart_series_differ_by_more_than_colour(sheet):
    result = sheet["a4"]
    page = result.document.pages[0]
    series = [o for o in page.ops if isinstance(o, ShapeOp) and o.role.startswith("series.")]
    styles = {(o.pen.style(), tuple(o.pen.dashPattern()), round(o.pen.widthF(), 2))
              for o in series}
    assert len(styles) == len(series)               # every monthly series its own line
    # the sun chart's arcs: each its own colour, width and dash, and the arcs of each kind
    # (solstice, equinox, month pair) share a pattern that no other kind has
    arcs = [o for o in page.ops if isinstance(o, ShapeOp) and o.role.startswith("path.")]
    assert arcs
    looks = {(o.pen.color().name(), tuple(o.pen.dashPattern()), round(o.pen.widthF(), 2))
             for o in arcs}
    assert len(looks) == len(arcs)


def _month_words(text):
    return {i + 1 for i, name in enumerate(MONTH_NAMES) if name in text}


@pytest.mark.parametrize("name", demo_site_names())
def test_every_month_drawn_on_the_sun_chart_is_in_its_key(name):
    data = sheet_data(name)
    doc = lay_out(data, META, paper="a4").document
    page = doc.pages[0]
    drawn = {o.role[len("path."):] for o in page.ops
             if isinstance(o, ShapeOp) and o.role.startswith("path.")}
    key = " ".join(o.text for o in page.texts() if o.role == "legend")
    chart = data.sun
    months_drawn = set()
    for arc in chart.arcs:
        if arc.label in drawn:
            months_drawn |= set(arc.months)
            # the key names the arc's dates in full
            assert _month_words(key) >= set(arc.months), (arc.label, key)
    # every month is drawn (on its own arc or on the arc it shares)
    assert months_drawn == set(range(1, 13)) or any(not len(a.curve) for a in chart.arcs)
    # and every arc the sun draws carries its own name on it (each label tries several
    # places along its arc before giving up: arc_label_candidates)
    labels = {o.text for o in page.texts() if o.role == "arc-label"}
    assert labels == {a.label for a in chart.arcs if len(a.curve)}, name


@pytest.mark.parametrize("paper", ["a4", "letter"])
def test_the_cautions_never_stand_alone_on_a_page(paper):
    for name in demo_site_names():
        doc = lay_out(sheet_data(name), META, paper=paper).document
        for i, page in enumerate(doc.pages):
            if not any(isinstance(o, ShapeOp) and o.role == "cautions-box" for o in page.ops):
                continue
            others = [o for o in page.texts() if not o.role.startswith(
                ("head.", "footer", "caution", "section.cautions"))]
            assert others, (name, paper, i + 1)


@pytest.mark.parametrize("name", demo_site_names())
def test_the_sheet_leads_with_the_chart_the_app_leads_with(name):
    data = sheet_data(name)
    roles = {o.role for o in lay_out(data, META, paper="a4").document.pages[0].ops}
    # from above in the tropics, where a flat chart would cut or squeeze a path
    # (tiltyard.engine.sunchart_design.lead_chart); the same key either way
    assert ("horizon-ring" in roles) == (data.sun.lead == "above"), name
    assert ("hour-band" in roles) == (data.sun.lead == "flat"), name
