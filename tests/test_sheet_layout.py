"""The floor's process sheet as printed (issue 14, the floor's papers): one page for every example plan on A4 and on
Letter, metric and imperial; a plan of very many stages flows onto numbered pages that each name the job; on every
page nothing runs off the paper, into another text, into a plot or through a box, no table cell spills over its
column, no text is smaller than 7 pt, and there is no money on it.

The checks measure what matplotlib draws (window extents at the page's resolution), not the layout's own numbers.
"""

import itertools
import shutil
import subprocess
from pathlib import Path

import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.patches import Rectangle
from matplotlib.text import Text
from matplotlib.transforms import Bbox

from casedepth.plan import Plan, evaluate, load
from casedepth.report.documents import process_sheet, save
from casedepth.units import DisplayUnits

EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"
PLANS = ["pinion-shaft", "piston-rod-nitrided", "ring-gear-boost-diffuse"]
SMALLEST = 7.0  # pt: what still reads on paper at arm's length
EDGE = 0.2  # in: what a printer leaves unprinted at the paper's edge, at most
TOLERANCE = 0.5  # pixels of anti-aliasing


def _visible(text) -> bool:
    return text.get_visible() and bool(text.get_text().strip())


def _tables(fig):
    return [table for ax in fig.axes for table in ax.tables]


def all_texts(fig) -> list:
    """Every visible text on the page: the page's own, the plots' titles, axis labels, tick labels and words, and
    the tables' cells."""
    texts = [t for t in fig.texts if _visible(t)]
    for ax in fig.axes:
        texts += [t for t in ax.findobj(Text) if _visible(t)]
    return texts


def _plots(fig, renderer) -> list[Bbox]:
    """The tight box of each plot (a plot and its twin, sharing a place on the page, as one) and of each table."""
    places: dict = {}
    for ax in fig.axes:
        box = ax.get_tightbbox(renderer)
        if box is not None:
            places.setdefault(tuple(round(v, 6) for v in ax.get_position().bounds), []).append(box)
    return [Bbox.union(boxes) for boxes in places.values()]


def layout_problems(fig, dpi: float = 200) -> list[str]:
    """What on a page drawn at ``dpi`` (printing from the window draws at 200 dpi) is clipped, overlaps, spills or
    is too small to read."""
    fig.set_dpi(dpi)
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    renderer = canvas.get_renderer()
    page = fig.bbox
    edge = EDGE * fig.dpi
    printable = Bbox.from_extents(page.x0 + edge, page.y0 + edge, page.x1 - edge, page.y1 - edge)
    problems = []

    def inside(box, outer) -> bool:
        return (box.x0 >= outer.x0 - TOLERANCE and box.y0 >= outer.y0 - TOLERANCE
                and box.x1 <= outer.x1 + TOLERANCE and box.y1 <= outer.y1 + TOLERANCE)

    def overlap(a, b) -> bool:
        return a.x0 < b.x1 - TOLERANCE and b.x0 < a.x1 - TOLERANCE and a.y0 < b.y1 - TOLERANCE and b.y0 < a.y1 - TOLERANCE

    for text in all_texts(fig):
        words = repr(text.get_text()[:40])
        if text.get_fontsize() < SMALLEST:
            problems.append(f"{words} is {text.get_fontsize()} pt")
        if not inside(text.get_window_extent(renderer), printable):
            problems.append(f"{words} runs off the printable page")
    own = [(t, t.get_window_extent(renderer)) for t in fig.texts if _visible(t)]
    for (a, box_a), (b, box_b) in itertools.combinations(own, 2):
        if overlap(box_a, box_b):
            problems.append(f"{a.get_text()[:30]!r} overlaps {b.get_text()[:30]!r}")
    plots = _plots(fig, renderer)
    for a, b in itertools.combinations(plots, 2):
        if overlap(a, b):
            problems.append(f"plots or tables overlap: {a.bounds} and {b.bounds}")
    for box in plots:
        if not inside(box, printable):
            problems.append(f"a plot or table {box.bounds} runs off the printable page")
        problems += [f"{t.get_text()[:30]!r} runs into a plot or table" for t, extent in own if overlap(extent, box)]
    frames = [p.get_window_extent(renderer) for p in fig.patches if isinstance(p, Rectangle)]
    for frame in frames:
        problems += [f"{t.get_text()[:30]!r} crosses a box's edge" for t, extent in own
                     if overlap(extent, frame) and not inside(extent, frame)]
        problems += [f"a plot or table runs into a box {frame.bounds}" for box in plots if overlap(box, frame)]
    for table in _tables(fig):
        for (row, column), cell in table.get_celld().items():
            if cell.get_text().get_text() and not inside(cell.get_text().get_window_extent(renderer),
                                                         cell.get_window_extent(renderer)):
                problems.append(f"table cell {row},{column} {cell.get_text().get_text()!r} spills over its column")
    return problems


def _words(document) -> str:
    return " ".join(t.get_text() for page in document.pages for t in all_texts(page))


@pytest.fixture(scope="module", params=PLANS)
def example(request):
    plan = load(EXAMPLES / f"{request.param}.cdplan.json")
    return plan, evaluate(plan.values())


@pytest.mark.parametrize("paper, units", [("a4", "metric"), ("letter", "imperial"), ("a4", "imperial"),
                                          ("letter", "metric")])
def test_every_example_is_one_page_with_all_the_floor_needs_and_no_money(example, paper, units):
    plan, outcome = example
    document = process_sheet(plan, outcome, paper=paper, units=units, shop="Demo shop (invented)")
    assert len(document.pages) == 1
    assert [t.get_text() for t in document.pages[0].texts if t.get_text().endswith("…")] == []  # nothing cut short
    words = _words(document)
    content = outcome.sheet(DisplayUnits(units))
    for line in content.callout:
        assert " ".join(line.split()) in " ".join(words.split()), line
    cells = {c.get_text().get_text() for table in _tables(document.pages[0]) for c in table.get_celld().values()}
    for row in content.setpoints:
        assert set(row) - {""} <= cells, row
    for words_of_the_floor in ("Drawing callout", "Furnace:", "Load no.:", "Quantity:", "Fixture:", "Inspection",
                               "Safety", "Prepared", "Approved", "Load run by (operator)", "actual", "initials",
                               "Whole cycle", "page 1/1"):
        assert words_of_the_floor in words + " ".join(cells), words_of_the_floor
    currency = outcome.quote.currency
    assert "per load" not in words and "cost" not in words.lower() and (not currency or currency not in words)


@pytest.mark.parametrize("paper, units", [("a4", "metric"), ("letter", "imperial")])
def test_nothing_on_an_example_is_clipped_overlapping_or_too_small(example, paper, units):
    plan, outcome = example
    page = process_sheet(plan, outcome, paper=paper, units=units, shop="Demo shop (invented)").pages[0]
    for dpi in (100, 200):  # the screen's resolution and the print's: glyphs are hinted a few per cent apart
        assert layout_problems(page, dpi) == [], dpi


def test_a_plan_of_many_stages_flows_onto_numbered_pages_that_name_the_job():
    """Sixty stages do not fit one page: the setpoint table goes on, under its header again, on pages that are
    numbered "n/N" and repeat the job (title, part, load, revision), with the signatures at the end."""
    stages = [{"kind": "soak", "duration_h": 0.1, "temperature_c": 925.0, "carbon_potential_pct": 1.0}] * 60
    plan = Plan(process="stages", stages=stages, title="Sixty short soaks", part="Demo pin", load_number="L-7")
    document = process_sheet(plan, evaluate(plan.values()), revision="B")
    total = len(document.pages)
    assert total >= 2
    rows = 0
    for number, page in enumerate(document.pages, 1):
        assert layout_problems(page) == [], number
        words = " ".join(t.get_text() for t in page.texts)
        assert f"page {number}/{total}" in words
        assert "Sixty short soaks" in words and "Demo pin" in words and "L-7" in words and "Revision B" in words
        for table in _tables(page):
            cells = table.get_celld()
            assert cells[0, 0].get_text().get_text() == "stage"  # the header on every page
            rows += max(row for row, _ in cells)
        assert ("Approved" in words) == (number == total)
    assert rows == 60


@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) not installed")
def test_the_pdf_text_has_the_callout_and_every_setpoint(example, tmp_path):
    """What a reader of the PDF (or a search in a filing system) finds: the callout and the setpoints."""
    plan, outcome = example
    save(process_sheet(plan, outcome, paper="letter", units="imperial"), tmp_path / "sheet.pdf")
    text = subprocess.run(["pdftotext", str(tmp_path / "sheet.pdf"), "-"], capture_output=True, text=True,
                          check=True).stdout
    flat = " ".join(text.split())
    content = outcome.sheet(DisplayUnits("imperial"))
    assert "Drawing callout" in flat and "Setpoints" in flat
    for line in content.callout:
        assert " ".join(line.split()) in flat, line
    for row in content.setpoints:
        for cell in row:
            assert " ".join(cell.split()) in flat, cell
    assert "page 1/1" in flat


@pytest.mark.parametrize("paper, units", [("a4", "metric"), ("letter", "imperial")])
def test_the_low_pressure_example_prints_its_pulse_table_cleanly(paper, units):
    """A pulse table has a row for every boost and diffuse: the low-pressure example flows to a second page, both
    numbered and naming the job, nothing clipped, overlapping or too small, every setpoint row on the sheet."""
    plan = load(EXAMPLES / "pinion-lpc.cdplan.json")
    outcome = evaluate(plan.values())
    document = process_sheet(plan, outcome, paper=paper, units=units, shop="Demo shop (invented)")
    pages = len(document.pages)
    assert pages <= 2
    words = _words(document)
    for n in range(1, pages + 1):
        assert f"page {n}/{pages}" in words
    cells = {c.get_text().get_text() for page in document.pages for table in _tables(page) for c in table.get_celld().values()}
    for row in outcome.sheet(DisplayUnits(units)).setpoints:
        assert set(row) - {""} <= cells, row
    assert "Acetylene is flammable and unstable" in words and "Safety" in words
    for page in document.pages:
        assert layout_problems(page, 100) == []
