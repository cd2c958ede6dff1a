"""The window under random use: no uncaught exception, no stall, no NaN shown or saved, every file write refused
cleanly or done whole.

Each run is a seeded sequence of what a person can do: type values (good, out of range, unreadable, huge,
``nan``, ``inf``) into any field on show, pick choices (the treatment and the cycle among them), tick boxes,
edit the stage table, undo and redo in bursts, save and reopen, open old and broken plan files, export
profiles, plots and documents (also to paths that cannot be written), switch units and plot tabs, scrub the
time, set the shop's figures, calibrate. After every action: no exception reached Qt's event loop, the window
answered within :data:`STALL` seconds, and, whenever the worker is idle, no NaN or infinity is on show.

A failure names the seed and the action number; ``CASEDEPTH_FUZZ_SEED=<seed> CASEDEPTH_FUZZ_ACTIONS=<n>``
replays it. The default run is short to keep the suite fast; a long run is e.g.
``CASEDEPTH_FUZZ_SCALE=50 python -m pytest tests/test_fuzz_window.py`` (50 × 200 actions per seed).
"""

from __future__ import annotations

import json
import math
import os
import random
import re
import time
from pathlib import Path

import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtWidgets import QComboBox, QFileDialog, QLabel, QLineEdit, QMessageBox, QPlainTextEdit  # noqa: E402

from casedepth.errors import CasedepthError  # noqa: E402
from casedepth.gui.fields import (AimField, ChoiceField, EntryField, FlagField, PotentialField,  # noqa: E402
                                  QuantityField, StagesField, SteelField, TextField)
from casedepth.gui.window import MainWindow  # noqa: E402
from casedepth.parameters import PARAMETERS, Text  # noqa: E402
from casedepth.shop.quote import ShopDefaults  # noqa: E402

SCALE = float(os.environ.get("CASEDEPTH_FUZZ_SCALE", "1"))
ACTIONS = int(os.environ.get("CASEDEPTH_FUZZ_ACTIONS", str(int(150 * SCALE))))
SEEDS = [int(os.environ["CASEDEPTH_FUZZ_SEED"])] if "CASEDEPTH_FUZZ_SEED" in os.environ else [11, 29]
#: the longest the window may take to answer one action [s] (the issue's bound)
STALL = 5.0
#: the longest a solve may keep the worker busy after the last edit [s] (it runs off the window's thread)
SOLVE = 30.0

ROOT = Path(__file__).resolve().parent.parent
OLD_PLANS = sorted((ROOT / "tests" / "data" / "plans").glob("*.cdplan.json")) + \
    sorted((ROOT / "resources" / "examples").glob("*.cdplan.json"))
QUOTED = re.compile(r"'[^'\n]*'|\"[^\"\n]*\"")
NOT_A_NUMBER = re.compile(r"(?<![A-Za-z])(nan|inf|infinity)(?![A-Za-z])", re.IGNORECASE)

NUMBER_TEXTS = ["0", "-1", "1e308", "-1e308", "1e-308", "nan", "inf", "-inf", "", "abc", "1,5", "0.8", "925",
                "1700F", "0.04in", "1.2mm", "5kg", "--", "1e6", "99999999999999999999", "½", "0x10", "1.2.3",
                "   7   ", "NaN C", "1000%C", "550HV", "50HRC"]
TEXTS = ["", "nan", "inf", "Ring gear, rev. B", "$\\bad$", "<b>bold</b>", "x" * 300, "é漢字🙂", "line\nbreak",
         "%s %d {0}", "\x00\x01"]


def _random_text(rng: random.Random) -> str:
    choice = rng.random()
    if choice < 0.7:
        return rng.choice(TEXTS)
    if choice < 0.9:
        return "".join(rng.choice("abcdefghij0123456789 .,-_=%$\\{}") for _ in range(rng.randint(1, 40)))
    return "w" * rng.randint(1000, 30000)  # pasted walls of text, one unbroken line


class Fuzzer:
    """One seeded session: picks actions, runs them, checks the window after each."""

    def __init__(self, window: MainWindow, qtbot, folder: Path, rng: random.Random, monkeypatch):
        self.window, self.qtbot, self.folder, self.rng = window, qtbot, folder, rng
        self.log: list[str] = []
        self.unforeseen: list[BaseException] = []
        self.slowest = (0.0, "")
        window.calculator.failed.connect(self._failed)
        self.results = self.refusals = 0
        self.seen: set[tuple[str, str]] = set()  # (treatment, cycle) pairs that were solved
        window.result_shown.connect(self._shown)
        self.save_paths = [folder / "plan.cdplan.json", folder / "no such folder" / "plan.cdplan.json", folder,
                           folder / ("n" * 300 + ".cdplan.json"), folder / "other.cdplan.json"]
        self.next_path = folder / "plan.cdplan.json"
        monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.Discard)  # unsaved changes: go on
        monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(self.next_path), ""))
        monkeypatch.setattr(QFileDialog, "getOpenFileName", lambda *a, **k: (str(self.next_path), ""))
        monkeypatch.setattr(QFileDialog, "getOpenFileNames", lambda *a, **k: ([str(p) for p in OLD_PLANS[:2]], ""))
        self.broken = folder / "broken.cdplan.json"
        self.broken.write_text('{"schema": 5, "title": "half', encoding="utf-8")

    def _shown(self) -> None:
        self.results += 1
        values = self.window.outcome.values
        self.seen.add((values["treatment"], str(values.get("process"))))

    def _failed(self, error) -> None:
        """The worker's failures must all be the program's own refusals (InputError, SolverError)."""
        self.refusals += 1
        if not isinstance(error, CasedepthError):
            self.unforeseen.append(error)

    # -- actions ------------------------------------------------------------------------------------------------
    def shown_fields(self):
        return [(key, field) for key, field in self.window.form.fields.items() if field.widget.isVisibleTo(self.window)]

    def edit_field(self) -> str:
        key, field = self.rng.choice(self.shown_fields())
        rng = self.rng
        if isinstance(field, StagesField):
            return self.edit_stages(field)
        if isinstance(field, AimField):
            field.slider.setValue(rng.randint(0, 100))
            return "aim slider"
        if isinstance(field, PotentialField) and rng.random() < 0.3:
            field.dissociation.setValue(rng.uniform(0.0, 100.0))
            return "dissociation"
        if isinstance(field, QuantityField):
            spin = field.target
            if rng.random() < 0.5:
                value = rng.choice([spin.minimum(), spin.maximum(), rng.uniform(spin.minimum(), spin.maximum())])
                spin.setValue(value)
                return f"{key} set {value!r}"
            text = rng.choice(NUMBER_TEXTS) if rng.random() < 0.5 else \
                f"{rng.uniform(spin.minimum(), spin.maximum()):.{spin.decimals()}f}"
            self.type_into(spin.lineEdit(), text)
            return f"{key} typed {text!r}"
        if isinstance(field, SteelField):
            box = field.widget
            if rng.random() < 0.6 and box.count():
                index = rng.randrange(box.count())
                box.setCurrentIndex(index)
                box.activated.emit(index)
                return f"steel picked {box.itemData(index)}"
            text = rng.choice(["8620", "4140", "custom", "no such steel", "", "20MnCr5", "x" * 100])
            box.setEditText(text)
            box.lineEdit().editingFinished.emit()
            return f"steel typed {text!r}"
        if isinstance(field, EntryField):
            text = rng.choice(NUMBER_TEXTS + ["C=0.2 Mn=0.8", "C=nan", "C=0.2 Xx=1", "C=200", "1e-5 m2/s", ""])
            field.widget.setText(text)
            field.widget.editingFinished.emit()
            return f"{key} entry {text!r}"
        if isinstance(field, ChoiceField):
            box: QComboBox = field.widget
            index = rng.randrange(box.count())
            box.setCurrentIndex(index)
            box.activated.emit(index)
            return f"{key} choice {box.itemData(index)}"
        if isinstance(field, FlagField):
            field.widget.click()
            return f"{key} toggled"
        if isinstance(field, TextField):
            text = _random_text(rng)
            edit = field.target  # the text box (a field that can also be planned holds a button beside it)
            if isinstance(edit, QPlainTextEdit):
                edit.setPlainText(text)
            else:
                edit.setText(text)
                edit.editingFinished.emit()
            return f"{key} text of {len(text)} characters"
        raise AssertionError(f"the fuzzer does not know the field of {key} ({type(field).__name__})")

    def edit_stages(self, field: StagesField) -> str:
        rng, table = self.rng, field.table
        what = rng.random()
        if what < 0.4 or table.rowCount() == 0:
            key = rng.choice(list(field.buttons))
            if table.rowCount():
                table.setCurrentCell(rng.randrange(table.rowCount()), 1)
            field.buttons[key].click()
            return f"stages button {key}"
        row = rng.randrange(table.rowCount())
        if what < 0.6:
            box = table.cellWidget(row, 0)
            index = rng.randrange(box.count())
            box.setCurrentIndex(index)
            box.activated.emit(index)
            return f"stage {row} kind {box.itemData(index)}"
        column = rng.randint(1, 3)
        text = rng.choice(NUMBER_TEXTS)
        table.item(row, column).setText(text)
        return f"stage {row} column {column} {text!r}"

    def type_into(self, edit: QLineEdit, text: str) -> None:
        edit.selectAll()
        if len(text) <= 40:
            self.qtbot.keyClicks(edit, text)
        else:
            edit.insert(text)
        self.qtbot.keyClick(edit, Qt.Key_Return)

    def undo_redo(self) -> str:
        steps = [self.rng.choice(("undo", "redo")) for _ in range(self.rng.randint(1, 25))]
        for step in steps:
            getattr(self.window, step)()
        return f"{len(steps)} undo/redo"

    def save_and_reopen(self) -> str:
        self.next_path = self.rng.choice(self.save_paths)
        saved = self.window.save_as_dialog()
        if saved:
            self.assert_no_nan_in_file(self.next_path)
            self.window.open_plan(self.next_path)
        return f"save as {self.next_path.name[:40]} ({'saved' if saved else 'refused'})"

    def open_file(self) -> str:
        path = self.rng.choice(OLD_PLANS + [self.broken, self.folder / "missing.cdplan.json", self.folder])
        before = (self.window.plan, self.window.path, self.window.windowTitle())
        self.window.plan.modified = False  # the question about unsaved changes is not the point here
        opened = self.window.open_plan(path)
        if not opened:
            assert (self.window.plan, self.window.path, self.window.windowTitle()) == before, \
                "a file that fails to open must leave the window as it was"
        return f"open {path.name} ({'opened' if opened else 'refused'})"

    def export(self) -> str:
        kind = self.rng.choice(["csv", "plot.png", "plot.svg", "sheet.pdf", "chart.png", "bad"])
        name = {"csv": "profile.csv", "bad": "x.png"}.get(kind, kind)
        self.next_path = self.folder / ("no such folder" if kind == "bad" else "") / name
        if kind == "csv":
            self.window.export_csv_dialog()
        elif kind.startswith("plot") or kind == "bad":
            self.window.export_plot_dialog()
        else:
            self.window.export_document_dialog(kind.split(".")[0])
        leftovers = [p.name for p in self.folder.glob(".*.tmp*")]
        assert not leftovers, f"an export left temporary files: {leftovers}"
        return f"export {kind}"

    def view(self) -> str:
        rng, window = self.rng, self.window
        what = rng.random()
        if what < 0.4:
            window.plots.setCurrentIndex(rng.randrange(window.plots.count()))
            return f"plot tab {window.plots.currentIndex()}"
        if what < 0.7:
            window.time_slider.setValue(rng.randint(0, 1000))
            return "time slider"
        if what < 0.85:
            system = rng.choice(("metric", "imperial"))
            window.set_units(system)
            return f"units {system}"
        window.form.show_model_settings(rng.random() < 0.5)
        return "model settings"

    def shop(self) -> str:
        rng = self.rng
        try:
            shop = ShopDefaults(heat_up_h=rng.choice([0.0, 1.0, 24.0]), drop_h=rng.choice([0.0, 0.5, 3.0]),
                                carrier_co_pct=rng.choice([5.0, 20.0, 50.0]), parts_per_load=rng.randint(1, 500))
        except CasedepthError:
            return "shop refused"
        self.window.apply_shop(shop)
        return "shop applied"

    def calibrate(self) -> str:
        soak = self.rng.choice([0.0, 60.0, 3600.0, 6 * 3600.0, 1e7, float("nan")])
        depth = self.rng.choice([0.0, 1e-4, 1e-3, 5e-3, 1.0, float("inf")])
        try:
            self.window.calibrate(soak, depth)
        except CasedepthError:
            pass
        return f"calibrate {soak} s {depth} m"

    def offers(self) -> str:
        button = self.rng.choice([self.window.offers.take, self.window.offers.keep])
        if self.window.offers.isVisible():
            button.click()
        return "offer " + button.text()

    def new_or_load(self) -> str:
        self.window.plan.modified = False
        if self.rng.random() < 0.5:
            self.window.new_plan()
            return "new plan"
        self.window.load_dialog()
        return "plan a load"

    def put_back(self) -> str:
        """What a person does with a marked entry: type the plan's value back in."""
        keys = sorted(self.window.form.unread_entries())
        for key in keys:
            field = self.window.form.fields[key]
            field.widget.setText(field.text_of(self.window.plan.values()[key]))
            field.widget.editingFinished.emit()
        return f"put back {keys}"

    ACTIONS = [("edit_field", 55), ("put_back", 8), ("undo_redo", 8), ("save_and_reopen", 5), ("open_file", 4), ("export", 4),
               ("view", 10), ("shop", 2), ("calibrate", 2), ("offers", 2), ("new_or_load", 2), ("settle", 15)]

    def settle(self) -> str:
        """Wait for the worker to finish the newest edit, then look at what is on show."""
        start = time.perf_counter()
        self.qtbot.waitUntil(self.idle, timeout=int(SOLVE * 1000))
        self.assert_nothing_shown_is_nan()
        return f"settled in {time.perf_counter() - start:.2f} s"

    def idle(self) -> bool:
        return self.window.calculator.idle()

    # -- checks ---------------------------------------------------------------------------------------------------
    def user_texts(self) -> list[str]:
        values = self.window.plan.values()
        return sorted((str(values[key]) for key, row in PARAMETERS.items()
                       if isinstance(row.kind, Text) and values.get(key)), key=len, reverse=True)

    def assert_nothing_shown_is_nan(self) -> None:
        shown = [self.window.windowTitle()] + [label.text() for label in self.window.findChildren(QLabel)
                                               if label.isVisibleTo(self.window)]
        text = "\n".join(shown)
        for own in self.user_texts():  # what the user typed may say "nan"; the program's numbers may not
            text = text.replace(own, "")
        text = QUOTED.sub("''", text)  # nor may a message quoting what it could not read
        text = text.replace("or inf)", "")  # the mass-transfer entry takes the word inf (a fixed surface carbon)
        match = NOT_A_NUMBER.search(text)
        assert match is None, f"NaN or infinity on show: …{text[max(0, match.start() - 80):match.end() + 40]}…"

    @staticmethod
    def assert_no_nan_in_file(path: Path) -> None:
        def refuse(constant):
            raise AssertionError(f"{path.name} holds {constant}")

        json.loads(path.read_text(encoding="utf-8"), parse_constant=refuse)

    def run(self, count: int) -> None:
        names, weights = zip(*self.ACTIONS)
        for number in range(count):
            name = self.rng.choices(names, weights)[0]
            start = time.perf_counter()
            with self.qtbot.captureExceptions() as raised:
                try:
                    what = getattr(self, name)()
                except AssertionError:
                    raise
                except Exception as error:  # noqa: BLE001 - a raise out of the window's own methods is a bug
                    raise AssertionError(f"action {number} ({name}) raised {type(error).__name__}: {error}\n"
                                         + "\n".join(self.log[-15:])) from error
                self.qtbot.wait(1)
            took = time.perf_counter() - start
            self.log.append(f"{number}: {what} ({took:.2f} s)")
            if took > self.slowest[0] and name != "settle":
                self.slowest = (took, what)
            assert not raised, f"action {number} ({what}) raised in Qt: {raised[0][1]!r}\n" + "\n".join(self.log[-15:])
            assert not self.unforeseen, f"after action {number} ({what}) the worker failed: " \
                                        f"{self.unforeseen[0]!r}\n" + "\n".join(self.log[-15:])
            assert name == "settle" or took < STALL, f"action {number} ({what}) took {took:.1f} s\n" + \
                "\n".join(self.log[-15:])
        self.settle()


@pytest.mark.parametrize("seed", SEEDS)
def test_random_use_of_the_window(window, qtbot, tmp_path, monkeypatch, seed):
    """Random actions: no exception, no stall over 5 s, no NaN shown or saved (seeded; see the module's note)."""
    fuzzer = Fuzzer(window, qtbot, tmp_path, random.Random(seed), monkeypatch)
    started = time.perf_counter()
    fuzzer.run(ACTIONS)
    seconds = time.perf_counter() - started
    print(f"seed {seed}: {ACTIONS} actions in {seconds:.1f} s; {fuzzer.results} results and {fuzzer.refusals} "
          f"refusals shown; solved {sorted(fuzzer.seen)}; slowest {fuzzer.slowest[0]:.2f} s ({fuzzer.slowest[1]})")


@pytest.fixture
def slow_solves(monkeypatch):
    """Solves at 850 °C take 5 s of stoppable steps (a stand-in for a long march: the real solver now finishes a
    deep case in tens of milliseconds, too fast to be caught running); the stop is the solver's own check."""
    from casedepth.gui import worker
    from casedepth.numerics.budget import check

    real = worker.evaluate

    def evaluate(values):
        if values.get("temperature") == pytest.approx(1123.15):
            end = time.perf_counter() + 5.0
            while time.perf_counter() < end:
                check()
                time.sleep(0.002)
        return real(values)

    monkeypatch.setattr(worker, "evaluate", evaluate)


def test_closing_never_waits_on_a_solve(window, qtbot, slow_solves):
    """A long solve is stopped when the window closes: closing returns within a solver step, not at the end of
    the solve."""
    window.plan.update(temperature=1123.15, case_min=4.0e-3, case_max=6.0e-3)
    qtbot.waitUntil(lambda: window.calculator._job is not None, timeout=5000)
    start = time.perf_counter()
    window.calculator.wait()
    assert time.perf_counter() - start < 1.0


def test_a_stale_solve_is_stopped_by_the_next_edit(window, qtbot, slow_solves):
    """Edits made while a solve runs stop it; only the newest edit's result is shown."""
    window.plan.update(temperature=1123.15, case_min=4.0e-3, case_max=6.0e-3)
    qtbot.waitUntil(lambda: window.calculator._job is not None, timeout=5000)
    start = time.perf_counter()
    with qtbot.waitSignal(window.result_shown, timeout=10000):
        window.plan.update(temperature=1198.15, case_min=0.8e-3, case_max=1.2e-3)
    assert time.perf_counter() - start < 3.0
    assert window.outcome.values["case_max"] == pytest.approx(1.2e-3)
    assert not math.isnan(window.outcome.soak_time)


def test_corrupted_plan_files_open_whole_or_not_at_all(window, qtbot, tmp_path):
    """The plan-file fuzzer's variants (tests/test_fuzz_plans.py), opened in the window: a file that fails leaves
    the window exactly as it was (plan, path, title, result) with one message; one that opens is solved or
    refused like any plan, and saves again."""
    import test_fuzz_plans as corrupted

    told = []
    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(QMessageBox, "warning", lambda parent, title, text: told.append(text))
        rng = random.Random(3)
        variants = [v for family in corrupted.FAMILIES for v in corrupted._sample(family)]
        rng.shuffle(variants)
        for number, variant in enumerate(variants[:int(40 * SCALE)]):
            path = tmp_path / f"variant-{number}.cdplan.json"
            path.write_bytes(variant.make())
            before = (window.plan, window.path, window.windowTitle(), window.outcome)
            told.clear()
            with qtbot.captureExceptions() as raised:
                opened = window.open_plan(path)
                qtbot.waitUntil(window.calculator.idle, timeout=int(SOLVE * 1000))
            assert not raised, f"{variant.describe()}: {raised[0][1]!r}"
            if not opened:
                assert (window.plan, window.path, window.windowTitle(), window.outcome) == before, variant.describe()
                assert len(told) == 1 and "\n" not in told[0].strip(), variant.describe()
            else:
                assert window.save_plan(tmp_path / "again.cdplan.json"), variant.describe()
                Fuzzer.assert_no_nan_in_file(tmp_path / "again.cdplan.json")
