"""Printed output: case-depth charts and process sheets (issue: printed output)."""

import math
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

import casedepth
from casedepth.cli import main
from casedepth.report.documents import case_depth_chart, nitriding_chart, process_sheet, save
from casedepth.nitriding import NitridingSetup, nitriding_time
from casedepth.models.steels import find
from casedepth.plan import evaluate, load
from casedepth.units import DisplayUnits

K = 273.15
EXAMPLES = Path(__file__).resolve().parent.parent / "resources" / "examples"


def page_is_not_blank(figure) -> bool:
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    canvas = FigureCanvasAgg(figure)
    canvas.draw()
    pixels = np.asarray(canvas.buffer_rgba())[..., :3]
    return float((pixels < 200).mean()) > 0.005


@pytest.mark.parametrize("paper", ["a4", "letter"])
@pytest.mark.parametrize("units", ["metric", "imperial"])
def test_chart_for_every_paper_and_unit_system(paper, units, tmp_path):
    setup = casedepth.setup("8620", "925C", 1.0)
    document = case_depth_chart(setup, temperatures=[900 + K, 925 + K, 950 + K], paper=paper, units=units)
    assert len(document.pages) == 1 and page_is_not_blank(document.pages[0])
    width, height = document.pages[0].get_size_inches()
    assert (width, height) == ((8.27, 11.69) if paper == "a4" else (8.5, 11.0))
    for fmt in ("pdf", "svg", "png"):
        written = save(document, tmp_path / f"chart.{fmt}")
        assert written and written[0].stat().st_size > 5000


def test_chart_table_equals_the_solver():
    """The printed soak times are the solver's, for every standard depth and temperature."""
    setup = casedepth.setup("8620", "925C", 1.0)
    temperatures = [900 + K, 950 + K]
    document = case_depth_chart(setup, temperatures=temperatures)
    header, *rows = document.table
    assert header[1:] == ["soak at 900 °C", "soak at 950 °C"]
    for k, T in enumerate(temperatures):
        for depth, row, printed in zip(document.values["depths"], rows, document.values["soak_times"][k]):
            alone = casedepth.soak_time_for_case_depth(casedepth.setup("8620", f"{T}K", 1.0), depth).soak_time
            assert printed == pytest.approx(alone, rel=1e-9)
            assert f"({alone / 3600:.2f} h)" in row[k + 1]


def test_chart_over_potentials():
    setup = casedepth.setup("8620", "925C", 1.0)
    document = case_depth_chart(setup, potentials=[0.9, 1.0, 1.1])
    times = document.values["soak_times"]
    assert all(a > b for a, b in zip([t[3] for t in times], [t[3] for t in times][1:]))  # richer is faster


@pytest.mark.parametrize("units", ["metric", "imperial"])
def test_nitriding_chart_table_equals_the_solver(units):
    """The printed nitriding times and compound layers are the solver's, for every standard depth."""
    setup = NitridingSetup(find("4140"), 520 + K, 3.0)
    temperatures = [500 + K, 540 + K]
    document = nitriding_chart(setup, temperatures=temperatures, units=units, hours=40)
    assert len(document.pages) == 1 and page_is_not_blank(document.pages[0])
    header, *rows = document.table
    assert header[1:] == (["at 500 °C", "at 540 °C"] if units == "metric" else ["at 932 °F", "at 1004 °F"])
    for k, T in enumerate(temperatures):
        for depth, printed, layer in zip(document.values["depths"], document.values["times"][k],
                                         document.values["compound_layers"][k]):
            alone = nitriding_time(NitridingSetup(find("4140"), T, 3.0), depth)
            assert printed == pytest.approx(alone.time, rel=1e-9)
            assert layer == pytest.approx(alone.compound_layer, rel=1e-9)


def test_nitriding_chart_over_potentials_and_on_the_command_line(tmp_path, capsys):
    setup = NitridingSetup(find("4140"), 520 + K, 3.0)
    document = nitriding_chart(setup, potentials=[0.5, 3.0, 8.0])
    layers = [row[3] for row in document.values["compound_layers"]]
    assert layers == sorted(layers)  # a higher K_N leaves a thicker layer (Somers & Mittemeijer 1995 model)
    assert main(["chart", "--treatment", "nitriding", "--steel", "4140", "--temperatures", "500,520,540", "--kn", "3",
                 "--pdf", str(tmp_path / "n.pdf")]) == 0
    assert (tmp_path / "n.pdf").stat().st_size > 5000
    assert main(["chart", "--treatment", "nitriding", "--steel", "4140", "--temperatures", "520,620",
                 "--pdf", str(tmp_path / "m.pdf")]) == 2
    assert "--temperatures" in capsys.readouterr().err and not (tmp_path / "m.pdf").exists()


@pytest.mark.parametrize("name", ["pinion-shaft.cdplan.json", "ring-gear-boost-diffuse.cdplan.json",
                                  "piston-rod-nitrided.cdplan.json"])
@pytest.mark.parametrize("paper,units", [("a4", "metric"), ("letter", "imperial")])
def test_process_sheets(name, paper, units, tmp_path):
    plan = load(EXAMPLES / name)
    document = process_sheet(plan, evaluate(plan.values()), paper=paper, units=units, shop="Demo shop (invented)")
    assert all(page_is_not_blank(page) for page in document.pages)
    texts = [t.get_text() for page in document.pages for t in page.texts]
    assert any(plan.title in t for t in texts)
    assert any("licensed practice" in t for t in texts)
    save(document, tmp_path / "sheet.pdf")


@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) not installed")
def test_pdf_text_carries_the_soak_times(tmp_path):
    setup = casedepth.setup("8620", "925C", 1.0)
    document = case_depth_chart(setup, temperatures=[925 + K])
    save(document, tmp_path / "chart.pdf")
    text = subprocess.run(["pdftotext", str(tmp_path / "chart.pdf"), "-"], capture_output=True, text=True).stdout
    assert document.table[4][1].split("(")[1].rstrip(")") in text  # e.g. "6.79 h" for 1.0 mm


def test_cli_chart_and_sheet(tmp_path, capsys):
    assert main(["chart", "--steel", "8620", "--temperatures", "900,925,950", "--potential", "1.0", "--at", "0.40%C",
                 "--pdf", str(tmp_path / "c.pdf"), "--svg", str(tmp_path / "c.svg"), "--paper", "letter",
                 "--units", "imperial"]) == 0
    assert (tmp_path / "c.pdf").stat().st_size > 5000 and (tmp_path / "c.svg").exists()
    assert main(["sheet", str(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json"), "--pdf", str(tmp_path / "s.pdf")]) == 0
    assert (tmp_path / "s.pdf").stat().st_size > 5000
    assert main(["chart", "--steel", "8620", "--temperatures", "900"]) == 2
    assert "--pdf" in capsys.readouterr().err


def test_chart_time_axis_covers_its_table():
    """By default the curves run long enough to show every tabulated time; a shorter axis given on purpose marks
    the times beyond it."""
    setup = casedepth.setup("8620", "925C", 1.0)
    document = case_depth_chart(setup, temperatures=[900 + K, 950 + K])
    longest = max(t for row in document.values["soak_times"] for t in row if not math.isnan(t))
    assert document.values["hours"] * 3600 >= longest
    short = case_depth_chart(setup, temperatures=[900 + K, 950 + K], hours=12)
    assert any("†" in cell for row in short.table[1:] for cell in row)
    nitrided = nitriding_chart(NitridingSetup(find("4140"), 520 + K, 3.0), temperatures=[500 + K, 520 + K])
    longest = max(t for row in nitrided.values["times"] for t in row if not math.isnan(t))
    assert nitrided.values["hours"] * 3600 >= longest or nitrided.values["hours"] == 200


def test_what_people_type_stays_in_its_place_on_the_sheet(tmp_path):
    """A 200-character title, a shop name and revision of hundreds of characters and notes of one unbroken line:
    each is cut with an ellipsis where its place ends (nothing runs off the page or into the next field), and
    "$…$" is printed as typed, not read as mathematics."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    plan.update(title="T" * 200, part="$\\bad$ " + "P" * 190, notes="w" * 20000)
    document = process_sheet(plan, evaluate(plan), shop="S" * 300, revision="R" * 100)
    for page in document.pages:
        renderer = FigureCanvasAgg(page).get_renderer()
        for text in page.texts:
            box = text.get_window_extent(renderer)
            assert box.x0 >= 0 and box.x1 <= page.bbox.width, text.get_text()[:40]
    first = document.pages[0]
    texts = [t.get_text() for t in first.texts]
    assert any(t.startswith("TTTT") and t.endswith("…") for t in texts)
    assert any(t.startswith("Part: $\\bad$") for t in texts)
    title = next(t for t in first.texts if t.get_text().startswith("TTTT"))
    revision = next(t for t in first.texts if t.get_text().startswith("Revision"))
    renderer = FigureCanvasAgg(first).get_renderer()
    assert title.get_window_extent(renderer).x1 < revision.get_window_extent(renderer).x0


def test_the_floor_sheet_carries_the_job_callout_setpoints_inspection_and_no_money(tmp_path):
    """Issue 14: the process sheet is one the floor can run a load from: the job, the drawing's callout, every
    setpoint with its tolerance and a column for readings, times in h:min, the inspection, signatures; the cost is
    on the office's quote sheet instead."""
    from casedepth.report.documents import quote_sheet

    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    plan.update(load_number="L-0042")
    outcome = evaluate(plan.values())
    sheet = process_sheet(plan, outcome, shop="Demo shop (invented)")
    texts = " ".join(t.get_text() for page in sheet.pages for t in page.texts)
    tables = " ".join(cell.get_text().get_text() for page in sheet.pages for ax in page.axes for table in ax.tables
                      for cell in table.get_celld().values())
    for words in ("Load no.: L-0042", "Furnace:", "Drawing callout", "0.80 mm–1.20 mm at 0.40 %C",
                  "Surface hardness 58–63 HRC", "Inspection", "Prepared", "Approved", "Whole cycle 11:01"):
        assert words in texts, words
    assert "per load" not in texts and "cost" not in texts.lower()
    for words in ("925 °C ±8", "1.00 ±0.05 %C", "mV", "actual", "initials", "6:01"):
        assert words in tables, words
    quote = quote_sheet(plan, outcome)
    quoted = " ".join(t.get_text() for page in quote.pages for t in page.texts)
    assert "Cost per load" in quoted and "per part" in quoted
    save(quote, tmp_path / "quote.pdf")
    assert (tmp_path / "quote.pdf").stat().st_size > 3000


def test_customer_chart_names_shop_and_customer_and_keeps_its_header_above_the_plot():
    """Issue 14: a chart for the customer carries the shop's and the customer's names; the header never runs into
    the plot (the plot starts below the last header line), and the time axis is the shortest round length that
    shows the whole table."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    setup = casedepth.setup("8620", "925C", 1.0, at="50HRC")
    document = case_depth_chart(setup, temperatures=[900 + K, 925 + K, 950 + K], units="imperial",
                                shop="Demo shop (invented)", customer="Demo customer (invented)")
    page = document.pages[0]
    texts = [t for t in page.texts]
    assert any("Demo shop (invented) — for Demo customer (invented)" in t.get_text() for t in texts)
    assert not any("°C" in t.get_text() or "°c" in t.get_text() for t in texts)  # imperial throughout
    renderer = FigureCanvasAgg(page).get_renderer()
    plot = page.axes[0]
    lowest_header = min(t.get_window_extent(renderer).y0 for t in texts if t.get_position()[1] > 0.8)
    assert plot.get_tightbbox(renderer).y1 <= lowest_header
    longest = max(t for row in document.values["soak_times"] for t in row if math.isfinite(t)) / 3600
    assert longest <= document.values["hours"] < 1.5 * longest


def test_the_sheet_says_where_the_loads_spread_puts_the_case():
    """Issue 16: a one-soak plan's sheet carries the spread of its load (the plan's Load spread settings, the
    shop's tolerances), the same figures `casedepth capability` gives; a boost and diffuse plan's load runs its
    boost and diffuse in the plan's split, and a part counts as inside when its surface carbon is in that window
    too."""
    from casedepth.shop.capability import capability

    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    outcome = evaluate(plan.values())
    texts = " ".join(t.get_text() for page in process_sheet(plan, outcome).pages for t in page.texts)
    expected = capability(plan.values()).sheet_line(DisplayUnits())
    assert expected.split(":")[1].split(",")[0].strip() in texts  # the 5–95 % range
    assert "Cpk\u00a0" in texts
    ring = load(EXAMPLES / "ring-gear-boost-diffuse.cdplan.json")
    other = " ".join(t.get_text() for page in process_sheet(ring, evaluate(ring.values())).pages for t in page.texts)
    assert "load spread" in other and "inside both windows" in other.replace("\n", " ")


def test_a_no_break_space_keeps_its_words_on_one_line():
    from casedepth.report.documents import _wrap

    lines = _wrap("a b c d e f g h Cpk\u00a01.64", 8.0, 0.9)
    assert any("Cpk\u00a01.64" in line for line in lines)


def test_the_plans_chart_has_its_loads_band_around_its_own_curve():
    """Issue 16: the case-depth chart printed for a plan (the window's) shades where a load's parts fall (5–95 %)
    around the plan's own temperature, in its colour; at the soak the plan's sheet states, the band is the spread
    `casedepth capability` gives there (its 5th and 95th percentiles, within the chart's reading of time)."""
    from casedepth.shop.capability import Spread, capability
    from casedepth.treatments import TREATMENTS

    plan = load(EXAMPLES / "pinion-shaft.cdplan.json")
    values = {**plan.values(), "count_shop_stages": False}  # the chart's curves are the soak at temperature alone
    treatment = TREATMENTS["carburizing"]
    chart = treatment.chart(values, temperatures=treatment.chart_temperatures(values), load=True)
    ax = chart.pages[0].axes[0]
    bands = [c for c in ax.collections if "parts, 5–95 %" in c.get_label()]
    assert len(bands) == 1
    found = capability(values, Spread())
    path = bands[0].get_paths()[0].vertices
    hours = found.soak / 3600.0
    near = path[np.abs(path[:, 0] - hours) < 0.15]
    pct = found.percentiles
    assert near[:, 1].min() == pytest.approx(pct["p5"] * 1e3, rel=0.02)
    assert near[:, 1].max() == pytest.approx(pct["p95"] * 1e3, rel=0.02)
    plain = treatment.chart(values, temperatures=treatment.chart_temperatures(values))
    assert not [c for c in plain.pages[0].axes[0].collections if "parts" in c.get_label()]


def test_the_sheet_names_the_furnace_fit_a_calibrated_plan_took():
    """Issue 20: a plan whose multipliers came from the furnace record prints which fit and its date; a plan
    without one prints nothing of the kind."""
    plan = load(EXAMPLES / "piston-rod-nitrided.cdplan.json")
    texts = " ".join(t.get_text() for page in process_sheet(plan, evaluate(plan.values())).pages for t in page.texts)
    assert "furnace record" not in texts
    plan.update(n_multiplier=0.85, spread_d_factor=1.21, calibration="Nitriding pit 1: record fit #4 of 2026-12-03 "
                                                                     "(D_N × 0.85)")
    texts = " ".join(t.get_text() for page in process_sheet(plan, evaluate(plan.values())).pages for t in page.texts)
    assert "Calibrated on the furnace record: Nitriding pit 1: record fit #4 of 2026-12-03" in texts.replace("\n", " ")
    assert "depth ±10 %, time ±21 % from the furnace fit's D_N" in texts.replace("\n", " ")
