import os
import sys
from pathlib import Path

import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
sys.path.insert(0, str(Path(__file__).resolve().parent))


@pytest.fixture(autouse=True)
def scratch_record(tmp_path_factory, monkeypatch):
    """Every test's furnace record is a scratch file (CASEDEPTH_RECORD), never the user's own."""
    from casedepth.shop import record

    path = tmp_path_factory.mktemp("record") / "record.sqlite"
    monkeypatch.setenv("CASEDEPTH_RECORD", str(path))
    monkeypatch.setattr(record, "_chosen", None)  # a window's choice of file does not outlive its test
    return path


@pytest.fixture
def window(qtbot, tmp_path, monkeypatch):
    """The planning window on a new plan, its first result shown; settings in a scratch file, message boxes
    answered at once (a test that wants the answer patches them itself), no "unsaved changes" question at
    teardown."""
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QMessageBox

    from casedepth.gui.window import MainWindow

    for name in ("warning", "information", "about", "critical"):
        monkeypatch.setattr(QMessageBox, name, lambda *a, **k: QMessageBox.Ok)
    settings = QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)
    win = MainWindow(settings=settings)
    qtbot.addWidget(win, before_close_func=lambda w: setattr(w.plan, "modified", False))
    win.show()
    qtbot.waitUntil(lambda: win.outcome is not None, timeout=10000)
    yield win
    win.plan.modified = False
    win.calculator.wait()


@pytest.fixture
def threads_of(monkeypatch):
    """``threads_of(name)``: the window worker's function ``name`` (a name in casedepth.gui.worker) patched to
    record the thread each call runs on; returns the list the threads are appended to."""
    import threading

    from casedepth.gui import worker

    def record(name: str) -> list:
        threads = []
        original = getattr(worker, name)

        def on_which_thread(*arguments, **keywords):
            threads.append(threading.current_thread())
            return original(*arguments, **keywords)

        monkeypatch.setattr(worker, name, on_which_thread)
        return threads

    return record
