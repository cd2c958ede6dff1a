"""Start the window: ``casedepth``, ``casedepth gui [PLAN] [--screenshot OUT.png]`` or ``casedepth-gui``."""

from __future__ import annotations

import argparse
import os
import sys
import tempfile


def _screenshot_problem(path: str) -> str | None:
    """Why a picture cannot be written to ``path`` (None if it can): it must be a .png in a folder that exists."""
    if not path.strip():
        return "give the file to write, e.g. --screenshot window.png"
    target = os.path.realpath(path)
    if not path.lower().endswith(".png"):
        return f"{path}: the picture is a PNG; name it …png"
    if os.path.isdir(target):
        return f"{path} is a folder"
    if not os.path.isdir(os.path.dirname(target)):
        return f"{path}: there is no folder {os.path.dirname(target)}"
    if os.path.exists(target) and not os.access(target, os.W_OK):
        return f"{path}: the file is read-only"
    return None


def main(argv: list[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = argparse.ArgumentParser(prog="casedepth gui", description="Open the planning window.")
    parser.add_argument("plan", nargs="?", help="a plan file to open")
    parser.add_argument("--screenshot", metavar="OUT.png",
                        help="render the window offscreen after the first result, save it as PNG and exit")
    parser.add_argument("--units", choices=["metric", "imperial"], help="show metric or imperial units")
    try:
        args = parser.parse_args(argv)
    except SystemExit as stop:
        return int(stop.code or 0)
    if args.screenshot is not None:
        problem = _screenshot_problem(args.screenshot)
        if problem:
            print(f"casedepth: error: --screenshot: {problem}", file=sys.stderr)
            return 2
        os.environ["QT_QPA_PLATFORM"] = "offscreen"

    from PySide6.QtCore import QSettings, QTimer
    from PySide6.QtWidgets import QApplication

    from ..files import FileWriteError, atomic_write
    from ..plan import PlanFileError, load
    from .window import MainWindow

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("casedepth")
    app.setOrganizationName("casedepth")
    plan = None
    if args.plan:
        try:
            plan = load(args.plan)
        except PlanFileError as error:
            print(f"casedepth: error: {args.plan}: {error.message}", file=sys.stderr)
            return 2
    settings = QSettings("casedepth", "casedepth")
    if args.screenshot:  # a fixed look for pictures, whatever this user's saved layout; nothing left behind
        scratch = tempfile.TemporaryDirectory()
        settings = QSettings(os.path.join(scratch.name, "settings.ini"), QSettings.IniFormat)
    if args.units:
        settings.setValue("units", args.units)
    window = MainWindow(plan, settings, args.plan)
    if args.screenshot:
        window.resize(1320, 860)
        outcome = {"code": 1}

        def shoot():
            picture = window.grab()

            def write(name: str) -> None:
                if not picture.save(name, "PNG"):
                    raise OSError("Qt could not write a PNG")

            try:
                atomic_write(args.screenshot, write)
                outcome["code"] = 0
            except FileWriteError as error:
                print(f"casedepth: error: --screenshot: {error}", file=sys.stderr)
                outcome["code"] = 2
            app.quit()

        window.result_shown.connect(lambda: QTimer.singleShot(150, shoot))
        QTimer.singleShot(30000, app.quit)
        window.show()
        app.exec()
        window.plan.modified = False
        window.close()
        scratch.cleanup()
        return outcome["code"]
    window.show()
    return app.exec()


if __name__ == "__main__":
    sys.exit(main())
