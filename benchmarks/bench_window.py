"""Responsiveness of the planning window (a measurement, not a test).

What it measures
----------------
* launch: wall time from starting a fresh Python process to the window being shown, and to the
  first result drawn (offscreen Qt platform, new process each time, median of 5);
* edit to redraw: wall time from an edited input (the plan's temperature changed, as a spin box
  does) to the carbon plot having been redrawn with the new result: debounce, solve on the worker
  thread, hand-back, result panel, and matplotlib drawing. Median of 40 edits, for a new carburizing
  plan and for a nitriding plan (4140, 520/525 °C, K_N 3, 0.3–0.5 mm, compound layer 10–20 µm: the
  diffusion zone solved afresh and the layer advice searched on every edit).

Goals (issue: the planning window): edit to redraw ≤ 100 ms, launch to window shown ≤ 2 s, on a
2-core machine.

How to run
----------
From the repository root::

    python benchmarks/bench_window.py
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

LAUNCH_SCRIPT = r"""
import time, sys
start = float(sys.argv[1])
from PySide6.QtWidgets import QApplication
from PySide6.QtCore import QSettings, QTimer
app = QApplication([])
from casedepth.gui.window import MainWindow
settings = QSettings(sys.argv[2], QSettings.IniFormat)
window = MainWindow(settings=settings)
window.show()
app.processEvents()
shown = time.time() - start
def done():
    print(f"{shown:.4f} {time.time() - start:.4f}")
    window.plan.modified = False
    app.quit()
window.result_shown.connect(lambda: QTimer.singleShot(0, done))
QTimer.singleShot(60000, app.quit)
app.exec()
"""


def launch_times(repeats: int = 5) -> tuple[float, float]:
    shown, first = [], []
    with tempfile.TemporaryDirectory() as folder:
        for _ in range(repeats):
            start = time.time()
            out = subprocess.run([sys.executable, "-c", LAUNCH_SCRIPT, repr(start), os.path.join(folder, "s.ini")],
                                 capture_output=True, text=True, timeout=120, check=True).stdout.split()
            shown.append(float(out[0]))
            first.append(float(out[1]))
    return statistics.median(shown), statistics.median(first)


def nitriding_plan():
    from casedepth.plan import Plan

    plan = Plan(treatment="nitriding", title="Bench piston rod (demo)", temperature=793.15, kn=3.0, case_min=0.3e-3,
                case_max=0.5e-3, compound_min=10e-6, compound_max=20e-6)
    plan.choose_steel("4140")
    return plan


def edit_to_redraw(edits: int = 40, treatment: str = "carburizing") -> list[float]:
    from PySide6.QtCore import QEventLoop, QSettings, QTimer
    from PySide6.QtWidgets import QApplication

    from casedepth.gui.window import MainWindow

    app = QApplication.instance() or QApplication([])
    base = 1198.15 if treatment == "carburizing" else 793.15
    with tempfile.TemporaryDirectory() as folder:
        window = MainWindow(nitriding_plan() if treatment == "nitriding" else None,
                            settings=QSettings(os.path.join(folder, "s.ini"), QSettings.IniFormat))
        window.resize(1320, 860)
        window.show()
        canvas = window.plots.carbon_page.canvas
        state = {"waiting": False, "start": 0.0, "times": []}
        loop = QEventLoop()

        def drawn(_event):
            if state["waiting"] and window.outcome is not None and window.outcome.setup.temperature == state["wanted"]:
                state["times"].append(time.perf_counter() - state["start"])
                state["waiting"] = False
                loop.quit()

        canvas.mpl_connect("draw_event", drawn)
        QTimer.singleShot(3000, loop.quit)
        loop.exec()  # first result
        for k in range(edits):
            wanted = base + (5.0 if k % 2 == 0 else 0.0)
            state.update(waiting=True, wanted=wanted, start=time.perf_counter())
            window.plan.set("temperature", wanted)
            QTimer.singleShot(5000, loop.quit)
            loop.exec()
        window.plan.modified = False
        window.close()
        app.processEvents()
    return state["times"]


def main() -> None:
    shown, first = launch_times()
    print(f"launch to window shown:       median {shown * 1e3:6.0f} ms (goal ≤ 2000 ms)")
    print(f"launch to first result drawn: median {first * 1e3:6.0f} ms")
    for treatment in ("carburizing", "nitriding"):
        times = edit_to_redraw(treatment=treatment)
        print(f"edit to redrawn plot, {treatment + ':':13s} median {statistics.median(times) * 1e3:6.1f} ms, "
              f"90th percentile {sorted(times)[int(0.9 * len(times))] * 1e3:.1f} ms over {len(times)} edits "
              f"(goal ≤ 100 ms)")


if __name__ == "__main__":
    main()
