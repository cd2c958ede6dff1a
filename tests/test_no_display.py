"""Opening the window where it cannot open: one line naming what is missing and exit 2, never Qt's abort (134).

Sources: Qt's platform plugins (QT_QPA_PLATFORM; xcb needs DISPLAY and an X server, wayland a compositor;
offscreen and minimal need neither) and the libraries PySide6's xcb plugin loads (``readelf -d``: NEEDED);
the package names are Debian/Ubuntu's. The rest is the program's own contract.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

from casedepth.gui import app

README = Path(__file__).resolve().parent.parent / "README.md"
linux_only = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the display check is Linux's")

ENTRIES = {
    "casedepth gui": ["-m", "casedepth", "gui"],
    "casedepth": ["-m", "casedepth"],
    "casedepth-gui": ["-c", "import sys; from casedepth.gui.app import main; sys.exit(main())"],
}


def start(args: list[str], **environment: str) -> subprocess.CompletedProcess:
    """Run an entry of the window with no display server named, plus ``environment``."""
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    env.update(environment)
    return subprocess.run([sys.executable, *args], capture_output=True, text=True, env=env, timeout=60)


@linux_only
@pytest.mark.parametrize("entry", ENTRIES)
def test_no_display_is_one_line_naming_display(entry):
    done = start(ENTRIES[entry])
    assert done.returncode == 2, done.stderr
    assert done.stderr.count("\n") == 1 and done.stderr.startswith("casedepth: error: no display")
    assert "DISPLAY is not set" in done.stderr and "libxcb-cursor0" in done.stderr and "casedepth --help" in done.stderr


@linux_only
def test_xcb_asked_for_without_display_is_refused():
    done = start(ENTRIES["casedepth gui"], QT_QPA_PLATFORM="xcb")
    assert done.returncode == 2 and done.stderr.count("\n") == 1
    assert "QT_QPA_PLATFORM is xcb and DISPLAY is not set" in done.stderr


@linux_only
def test_a_display_nobody_answers_on_is_one_line_not_an_abort():
    """DISPLAY names a server that is not there: depending on the machine, the xcb plugin's missing libraries or
    the silent server are named — in one line, exit 2."""
    display = next(f":{n}" for n in range(917, 999) if not os.path.exists(f"/tmp/.X11-unix/X{n}"))
    done = start(ENTRIES["casedepth gui"], DISPLAY=display)
    assert done.returncode == 2, done.stderr
    assert done.stderr.count("\n") == 1 and done.stderr.startswith("casedepth: error: ")
    assert f"cannot connect to an X server at DISPLAY={display}" in done.stderr or "needs the system librar" in done.stderr


@linux_only
def test_the_screenshot_needs_no_display(tmp_path):
    """--screenshot renders offscreen (QT_QPA_PLATFORM=offscreen) and so works with no display server."""
    out = tmp_path / "shot.png"
    done = start(ENTRIES["casedepth gui"] + ["--screenshot", str(out)])
    assert done.returncode == 0, done.stderr
    assert out.stat().st_size > 20000


@pytest.mark.parametrize("environ,system,reason", [
    ({}, "linux", "DISPLAY is not set"),
    ({"DISPLAY": ""}, "linux", "DISPLAY is not set"),
    ({"QT_QPA_PLATFORM": "xcb"}, "linux", "QT_QPA_PLATFORM is xcb and DISPLAY is not set"),
    ({"QT_QPA_PLATFORM": "xcb", "WAYLAND_DISPLAY": "wayland-0"}, "linux", "DISPLAY is not set"),
    ({"DISPLAY": ":0"}, "linux", None),
    ({"WAYLAND_DISPLAY": "wayland-0"}, "linux", None),
    ({"QT_QPA_PLATFORM": "offscreen"}, "linux", None),
    ({"QT_QPA_PLATFORM": "minimal"}, "linux", None),
    ({"QT_QPA_PLATFORM": "offscreen:fontengine=freetype"}, "linux", None),
    ({}, "darwin", None),
    ({}, "win32", None),
])
def test_what_the_environment_alone_says(environ, system, reason):
    problem = app.display_problem(environ, system)
    assert problem == reason if reason is None else reason in problem


@linux_only
def test_every_missing_library_is_named_with_its_package(monkeypatch):
    """The loader names only the first library it misses; the message names each, with its package."""
    import ctypes

    monkeypatch.setenv("DISPLAY", ":0")
    monkeypatch.delenv("WAYLAND_DISPLAY", raising=False)
    monkeypatch.delenv("QT_QPA_PLATFORM", raising=False)
    real = ctypes.CDLL
    gone = ("libxcb-cursor.so.0", "libxkbcommon-x11.so.0")

    def loader(name, *args, **kwargs):
        if name.endswith("libqxcb.so") or name in gone:
            raise OSError(f"{gone[0]}: cannot open shared object file: No such file or directory")
        return real(name, *args, **kwargs)

    monkeypatch.setattr(ctypes, "CDLL", loader)
    problem = app.window_problem()
    assert problem is not None and "\n" not in problem
    for library, package in (("libxcb-cursor.so.0", "libxcb-cursor0"), ("libxkbcommon-x11.so.0", "libxkbcommon-x11-0")):
        assert library in problem and f" {package}" in problem  # (and any this machine truly lacks)


@pytest.fixture
def plugins_load(monkeypatch):
    """As on a machine with every library: Qt's platform plugins load (the rest is loaded for real)."""
    import ctypes

    real = ctypes.CDLL
    monkeypatch.setattr(ctypes, "CDLL", lambda name, *a, **k: object() if "/platforms/" in name else real(name, *a, **k))
    for variable in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM"):
        monkeypatch.delenv(variable, raising=False)


@linux_only
def test_a_silent_x_server_is_named(plugins_load, monkeypatch):
    display = next(f":{n}" for n in range(917, 999) if not os.path.exists(f"/tmp/.X11-unix/X{n}"))
    monkeypatch.setenv("DISPLAY", display)
    assert app.window_problem() == app.no_display_message(f"cannot connect to an X server at DISPLAY={display}")


@linux_only
def test_wayland_alone_is_used_when_its_compositor_answers(plugins_load, monkeypatch, tmp_path):
    """Only WAYLAND_DISPLAY set: the compositor's socket is tried; if it answers, Qt is told to use wayland
    (so that it does not try xcb, which has no DISPLAY, and abort); if not, it is named."""
    import socket

    monkeypatch.setenv("XDG_RUNTIME_DIR", str(tmp_path))
    monkeypatch.setenv("WAYLAND_DISPLAY", "wayland-test")
    assert "no Wayland compositor answers at" in app.window_problem()
    with socket.socket(socket.AF_UNIX, socket.SOCK_STREAM) as compositor:
        compositor.bind(str(tmp_path / "wayland-test"))
        compositor.listen(1)
        assert app.window_problem() is None
    assert os.environ["QT_QPA_PLATFORM"] == "wayland"


@linux_only
def test_the_check_is_cheap(monkeypatch):
    """Loading the plugin and asking the X server costs milliseconds; the budget is 0.3 s of start-up."""
    from PySide6.QtWidgets import QApplication  # imported by the window anyway; not part of the check  # noqa: F401

    monkeypatch.setenv("DISPLAY", ":997")
    monkeypatch.delenv("WAYLAND_DISPLAY", raising=False)
    monkeypatch.delenv("QT_QPA_PLATFORM", raising=False)
    began = time.perf_counter()
    assert app.window_problem() is not None
    assert time.perf_counter() - began < 0.3


def test_the_readme_lists_the_libraries_beside_the_set_up_commands():
    text = README.read_text(encoding="utf-8")
    set_up = text[:text.index("## The window")]
    missing = [package for package in app.WINDOW_LIBRARIES if package not in set_up]
    assert not missing
