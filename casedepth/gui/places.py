"""Where the program keeps things on this platform, and what it does the first time it runs.

* Settings (units, layout, recent files, the shop's defaults and logo path) live in ``QSettings("casedepth",
  "casedepth")``: the platform's own place (``~/.config/casedepth/casedepth.conf`` on Linux, the registry on
  Windows, a property list on macOS).
* The user's data — a copy of the example plans, made on the first run — lives in the platform's application data
  folder (``QStandardPaths.AppDataLocation``: ``~/.local/share/casedepth`` on Linux, ``%APPDATA%\\casedepth`` on
  Windows, ``~/Library/Application Support/casedepth`` on macOS).
* Plans are opened from and saved to the last folder used, at first the user's documents folder.

The example plans and the icon ship inside the package (``casedepth.resources``), so a wheel and a bundle carry
them.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from PySide6.QtCore import QSettings, QStandardPaths

from ..files import resource_path

#: the example opened on the first run (the others are beside it in the data folder and in Open recent)
FIRST_EXAMPLE = "pinion-shaft.cdplan.json"
DESKTOP_ID = "org.casedepth.casedepth"  # the .desktop file's name (packaging/linux) without its extension


def icon_path() -> Path:
    return resource_path("icons", "casedepth.svg")


def shipped_examples() -> list[Path]:
    """The example plans that ship with the program."""
    return sorted(resource_path("examples").glob("*.cdplan.json"))


def data_folder() -> Path:
    """The user's casedepth data folder (created when asked for)."""
    folder = Path(QStandardPaths.writableLocation(QStandardPaths.AppDataLocation) or Path.home() / ".casedepth")
    folder.mkdir(parents=True, exist_ok=True)
    return folder


def documents_folder() -> Path:
    return Path(QStandardPaths.writableLocation(QStandardPaths.DocumentsLocation) or Path.home())


def first_run(settings: QSettings) -> list[Path]:
    """On the first run only: copy the example plans into the data folder (leaving any the user already has there
    alone) and return them, the one to open first at the front; later runs return nothing."""
    if settings.value("first_run_done", False, type=bool):
        return []
    settings.setValue("first_run_done", True)
    target = data_folder() / "examples"
    target.mkdir(parents=True, exist_ok=True)
    copied = []
    for example in shipped_examples():
        destination = target / example.name
        if not destination.exists():
            shutil.copyfile(example, destination)
        copied.append(destination)
    copied.sort(key=lambda path: path.name != FIRST_EXAMPLE)
    return copied
