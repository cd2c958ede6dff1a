"""Start the window: ``casedepth``, ``casedepth gui [PLAN] [--screenshot OUT.png]`` or ``casedepth-gui``.

On Linux, Qt ends the process (abort, exit 134) when its platform plugin cannot start: no display server, or a
system library the xcb plugin needs is missing. So before the application object is made the window checks
what Qt would need — a display named in the environment, the plugin's libraries (loaded as Qt would load them)
and a display server that answers — and says in one line what is missing (exit 2).
"""

from __future__ import annotations

import argparse
import ctypes
import os
import re
import socket
import sys
import tempfile
from collections.abc import Mapping
from pathlib import Path

#: Debian/Ubuntu packages of the system libraries Qt's xcb plugin loads that a minimal or server install may
#: lack (a desktop has them); the README lists them beside the set-up commands
WINDOW_LIBRARIES = ("libxcb-cursor0", "libxkbcommon-x11-0", "libxcb-icccm4", "libxcb-keysyms1", "libegl1", "libgl1",
                    "libxcb-image0", "libxcb-randr0", "libxcb-render-util0", "libxcb-shape0", "libxcb-xkb1",
                    "libfontconfig1", "libdbus-1-3")
#: the system libraries the xcb and wayland plugins of PySide6 6.x load, with the Qt libraries they load in turn
#: (readelf -d: NEEDED, less the C runtime and what the wheel brings), by file → Debian/Ubuntu package
_PACKAGES = {
    "libxcb.so.1": "libxcb1", "libxcb-cursor.so.0": "libxcb-cursor0", "libxcb-icccm.so.4": "libxcb-icccm4",
    "libxcb-keysyms.so.1": "libxcb-keysyms1", "libxcb-image.so.0": "libxcb-image0", "libxcb-randr.so.0": "libxcb-randr0",
    "libxcb-render.so.0": "libxcb-render0", "libxcb-render-util.so.0": "libxcb-render-util0",
    "libxcb-shape.so.0": "libxcb-shape0", "libxcb-shm.so.0": "libxcb-shm0", "libxcb-sync.so.1": "libxcb-sync1",
    "libxcb-util.so.1": "libxcb-util1", "libxcb-xfixes.so.0": "libxcb-xfixes0", "libxcb-xkb.so.1": "libxcb-xkb1",
    "libxkbcommon.so.0": "libxkbcommon0", "libxkbcommon-x11.so.0": "libxkbcommon-x11-0", "libX11.so.6": "libx11-6",
    "libX11-xcb.so.1": "libx11-xcb1", "libEGL.so.1": "libegl1", "libGL.so.1": "libgl1",
    "libfontconfig.so.1": "libfontconfig1", "libfreetype.so.6": "libfreetype6", "libdbus-1.so.3": "libdbus-1-3",
    "libglib-2.0.so.0": "libglib2.0-0", "libwayland-client.so.0": "libwayland-client0",
    "libwayland-cursor.so.0": "libwayland-cursor0",
}
_COMMON = ("libEGL.so.1", "libGL.so.1", "libX11.so.6", "libdbus-1.so.3", "libfontconfig.so.1", "libfreetype.so.6",
           "libglib-2.0.so.0", "libxkbcommon.so.0")
_PLUGIN_LIBRARIES = {
    "xcb": _COMMON + tuple(name for name in _PACKAGES if name.startswith(("libxcb", "libX11-xcb", "libxkbcommon-x11"))),
    "wayland": _COMMON + ("libwayland-client.so.0", "libwayland-cursor.so.0"),
}
_ADVICE = "run on a desktop, or use the command line (casedepth --help)"


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


def _requested_platform(environ: Mapping[str, str]) -> str | None:
    """The platform plugin QT_QPA_PLATFORM asks for first (without its options), or None when it is not set."""
    first = environ.get("QT_QPA_PLATFORM", "").split(";")[0].split(":")[0].strip()
    return first or None


def display_problem(environ: Mapping[str, str] | None = None, system: str | None = None) -> str | None:
    """Why there is no display to open the window on, from the environment alone (no Qt, nothing loaded), or None.

    On Linux the xcb plugin (Qt's default) needs DISPLAY and the wayland plugin a compositor; the plugins that need
    none (offscreen, minimal, vnc, eglfs, …) are taken as asked for.
    """
    environ = os.environ if environ is None else environ
    if not (sys.platform if system is None else system).startswith("linux"):
        return None
    platform = _requested_platform(environ)
    if platform is None and not environ.get("DISPLAY") and not environ.get("WAYLAND_DISPLAY"):
        return "DISPLAY is not set, nor WAYLAND_DISPLAY"
    if platform == "xcb" and not environ.get("DISPLAY"):
        return "QT_QPA_PLATFORM is xcb and DISPLAY is not set"
    return None


def no_display_message(reason: str) -> str:
    shown = ", ".join(WINDOW_LIBRARIES[:5])
    return (f"no display to open the window on ({_one_line(reason)}); {_ADVICE}; on Linux the window needs the "
            f"system libraries {shown} and the others the README lists")


def _plugin_problem(platform: str) -> str | None:
    """Which system libraries Qt's ``platform`` plugin cannot load (None if it loads, or if it is not where
    PySide6 keeps it): the plugin is loaded as Qt would load it, and the libraries Qt's plugins use are tried."""
    from PySide6.QtCore import QLibraryInfo

    plugin = Path(QLibraryInfo.path(QLibraryInfo.LibraryPath.PluginsPath)) / "platforms" / f"libq{platform}.so"
    if not plugin.is_file():
        return None
    try:
        ctypes.CDLL(str(plugin))
        return None
    except OSError as error:
        reason = _one_line(error)
    first = re.match(r"\s*([^:\s]+\.so[.\d]*):", reason)  # "libxcb-icccm.so.4: cannot open shared object file…"
    missing = [first.group(1)] if first and first.group(1) != str(plugin) else []
    for library in _PLUGIN_LIBRARIES.get(platform, ()):  # the loader names only the first it misses: name them all
        if library not in missing:
            try:
                ctypes.CDLL(library)
            except OSError:
                missing.append(library)
    if not missing:
        return f"Qt's {platform} platform plugin cannot be loaded ({reason})"
    packages = " ".join(dict.fromkeys(_PACKAGES.get(name, name) for name in missing))
    return (f"Qt's {platform} platform plugin needs the system librar{'ies' if len(missing) > 1 else 'y'} "
            f"{', '.join(missing)}, not installed (Debian/Ubuntu: apt-get install {packages}; the README lists "
            f"all the window needs); or use the command line (casedepth --help)")


def _x_server_problem() -> str | None:
    """Why no X server can be reached at DISPLAY (None if one can): connect as Qt's xcb plugin does, with libxcb."""
    try:
        xcb = ctypes.CDLL("libxcb.so.1")
    except OSError:
        return None  # the plugin's check names the library
    xcb.xcb_connect.restype = ctypes.c_void_p
    xcb.xcb_connect.argtypes = [ctypes.c_char_p, ctypes.c_void_p]
    xcb.xcb_connection_has_error.argtypes = [ctypes.c_void_p]
    xcb.xcb_disconnect.argtypes = [ctypes.c_void_p]
    connection = xcb.xcb_connect(None, None)
    failed = xcb.xcb_connection_has_error(connection)
    xcb.xcb_disconnect(connection)
    if failed:
        return f"cannot connect to an X server at DISPLAY={_one_line(os.environ.get('DISPLAY', ''))}"
    return None


def _wayland_problem() -> str | None:
    """Why no Wayland compositor answers (None if one does): its socket, as libwayland-client finds it."""
    name = os.environ.get("WAYLAND_DISPLAY") or "wayland-0"
    path = Path(name) if os.path.isabs(name) else Path(os.environ.get("XDG_RUNTIME_DIR", "")) / name
    try:
        with socket.socket(socket.AF_UNIX, socket.SOCK_STREAM) as probe:
            probe.settimeout(1.0)
            probe.connect(str(path))
    except OSError:
        return f"no Wayland compositor answers at {path} (WAYLAND_DISPLAY={os.environ.get('WAYLAND_DISPLAY', '')})"
    return None


def window_problem() -> str | None:
    """The one line to print instead of opening the window when Qt could not start its platform plugin, or None.

    The environment first (cheap); then, for the platform Qt will use, its plugin's libraries and its display
    server. Where nothing asks for a platform and only one of X11 and Wayland works, QT_QPA_PLATFORM is set to it
    so that Qt does not try the other one and abort.
    """
    reason = display_problem()
    if reason is not None:
        return no_display_message(reason)
    if not sys.platform.startswith("linux"):
        return None
    requested = _requested_platform(os.environ)
    if requested not in (None, "xcb", "wayland"):
        return None  # offscreen, minimal, vnc, eglfs …: asked for on purpose, no display server needed
    routes = [requested] if requested else [p for p, variable in (("xcb", "DISPLAY"), ("wayland", "WAYLAND_DISPLAY"))
                                            if os.environ.get(variable)]
    problems = {}
    for platform in routes:
        libraries = _plugin_problem(platform)
        if libraries is not None:
            problems[platform] = f"the window cannot open: {libraries}"
            continue
        server = _x_server_problem() if platform == "xcb" else _wayland_problem()
        if server is None:
            if requested is None and platform == "wayland":  # Qt might try xcb first, and abort without it
                os.environ["QT_QPA_PLATFORM"] = platform
            return None
        problems[platform] = no_display_message(server)
    if requested is None and len(routes) > 1:
        return problems["xcb"]
    return problems[routes[0]]


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

    if QApplication.instance() is None:
        problem = window_problem()
        if problem is not None:
            print(f"casedepth: error: {problem}", file=sys.stderr)
            return 2
    from ..files import FileWriteError, atomic_write
    from ..plan import PlanFileError, load
    from .window import MainWindow

    from PySide6.QtGui import QIcon

    from .places import DESKTOP_ID, first_run, icon_path

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("casedepth")
    app.setOrganizationName("casedepth")
    app.setDesktopFileName(DESKTOP_ID)  # the desktop entry (and its icon) the window belongs to
    app.setWindowIcon(QIcon(str(icon_path())))
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
    examples = [] if args.screenshot or args.plan else first_run(settings)
    window = MainWindow(plan, settings, args.plan)
    if examples:  # the first run: the examples in Open recent, the first of them open
        window.welcome(examples)
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
