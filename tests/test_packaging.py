"""What a desktop needs to install casedepth (packaging/linux): its own plan file type, a desktop entry that opens
it, an icon in the hicolor sizes, AppStream metadata; and the first run (casedepth.gui.places).

Sources: the freedesktop.org specifications — Shared MIME-info Database (glob weights, sub-class-of), Desktop Entry
Specification 1.5 (Exec field codes, MimeType), Icon Theme Specification (hicolor sizes) — and the AppStream
specification's required tags for a desktop-application component (id, metadata_license, name, summary,
description, launchable); ``appstreamcli validate`` where it is installed.
"""

from __future__ import annotations

import configparser
import os
import shutil
import struct
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
LINUX = ROOT / "packaging" / "linux"
MIME = "application/x-casedepth-plan+json"
MIME_NS = "{http://www.freedesktop.org/standards/shared-mime-info}"


def desktop_entry() -> configparser.SectionProxy:
    parser = configparser.ConfigParser(interpolation=None)
    parser.optionxform = str
    parser.read(LINUX / "org.casedepth.casedepth.desktop", encoding="utf-8")
    return parser["Desktop Entry"]


def test_the_plan_file_type_is_our_own_and_matches_plan_files():
    root = ET.parse(LINUX / "casedepth-plan.xml").getroot()
    (kind,) = root.findall(f"{MIME_NS}mime-type")
    assert kind.get("type") == MIME
    assert kind.find(f"{MIME_NS}sub-class-of").get("type") == "application/json"
    (glob,) = kind.findall(f"{MIME_NS}glob")
    assert glob.get("pattern") == "*.cdplan.json" and int(glob.get("weight")) > 50  # beats *.json (weight 50)
    assert all(p.name.endswith(".cdplan.json") for p in (ROOT / "resources" / "examples").iterdir()
               if p.suffix == ".json")


def test_the_desktop_entry_opens_plan_files_and_not_every_json_file():
    entry = desktop_entry()
    assert entry["Type"] == "Application" and entry["Icon"] == "casedepth" and entry["Terminal"] == "false"
    assert entry["Exec"].split()[-1] == "%f"  # one file per start: the window opens one plan
    assert entry["MimeType"].strip(";").split(";") == [MIME]
    assert "application/json" not in entry["MimeType"]


def test_the_appstream_metadata_has_what_software_centres_need():
    root = ET.parse(LINUX / "org.casedepth.casedepth.metainfo.xml").getroot()
    assert root.tag == "component" and root.get("type") == "desktop-application"
    for tag in ("id", "metadata_license", "project_license", "name", "summary", "description"):
        assert (root.findtext(tag) or root.find(tag) is not None), tag
    assert root.findtext("id") == "org.casedepth.casedepth"
    assert root.find("launchable").text == "org.casedepth.casedepth.desktop"
    assert root.find("launchable").get("type") == "desktop-id"
    assert MIME in [m.text for m in root.iter("mediatype")]
    if shutil.which("appstreamcli"):
        done = subprocess.run(["appstreamcli", "validate", "--no-net", str(LINUX / "org.casedepth.casedepth.metainfo.xml")],
                              capture_output=True, text=True, timeout=60)
        assert done.returncode == 0, done.stdout + done.stderr


@pytest.mark.parametrize("size", [16, 24, 32, 48, 64, 128, 256, 512])
def test_the_icon_comes_in_the_hicolor_sizes(size):
    data = (ROOT / "resources" / "icons" / f"casedepth-{size}.png").read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    width, height = struct.unpack(">II", data[16:24])  # the IHDR chunk
    assert (width, height) == (size, size)


def test_the_install_script_installs_the_file_type_for_the_user(tmp_path):
    """Run against a scratch XDG data folder: the desktop entry, the type, the metadata and every icon land where
    the specifications look; where update-mime-database is installed its glob table maps *.cdplan.json to the type."""
    env = {**os.environ, "XDG_DATA_HOME": str(tmp_path), "HOME": str(tmp_path)}
    env.pop("PREFIX", None)
    done = subprocess.run(["sh", str(LINUX / "install-desktop-files.sh")], env=env, capture_output=True, text=True,
                          timeout=120)
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "applications" / "org.casedepth.casedepth.desktop").exists()
    assert (tmp_path / "mime" / "packages" / "casedepth-plan.xml").exists()
    assert (tmp_path / "metainfo" / "org.casedepth.casedepth.metainfo.xml").exists()
    assert (tmp_path / "icons" / "hicolor" / "256x256" / "apps" / "casedepth.png").exists()
    assert (tmp_path / "icons" / "hicolor" / "scalable" / "apps" / "casedepth.svg").exists()
    if shutil.which("update-mime-database"):
        globs = (tmp_path / "mime" / "globs2").read_text()
        assert f"{MIME}:*.cdplan.json" in globs
    # a bundle's launcher instead of the one on the PATH
    bundle = tmp_path / "bundle"
    env["BIN"] = "/opt/casedepth/casedepth-gui"
    subprocess.run(["sh", str(LINUX / "install-desktop-files.sh")], env={**env, "XDG_DATA_HOME": str(bundle)},
                   check=True, capture_output=True, timeout=120)
    text = (bundle / "applications" / "org.casedepth.casedepth.desktop").read_text()
    assert 'Exec="/opt/casedepth/casedepth-gui" %f' in text


def test_the_package_ships_the_examples_and_the_icon():
    tomllib = pytest.importorskip("tomllib")
    data = tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["package-data"]
    shipped = data["casedepth.resources"]
    assert {"examples/*.cdplan.json", "icons/*.png", "icons/*.svg"} <= set(shipped)


def test_the_first_run_copies_the_examples_and_opens_one(window, tmp_path, monkeypatch):
    from casedepth.gui import places

    monkeypatch.setattr(places, "data_folder", lambda: tmp_path / "data")
    (tmp_path / "data" / "examples").mkdir(parents=True)
    kept = tmp_path / "data" / "examples" / "pinion-lpc.cdplan.json"
    kept.write_text("the user's own edit")  # a file the user already has there is left alone
    examples = places.first_run(window.settings)
    assert [p.name for p in examples][0] == places.FIRST_EXAMPLE
    assert {p.name for p in examples} == {p.name for p in places.shipped_examples()} and len(examples) >= 4
    assert kept.read_text() == "the user's own edit"
    assert places.first_run(window.settings) == []  # once only
    window.welcome(examples)
    assert window.path == examples[0] and window._recent()[0] == str(examples[0])
    assert set(window._recent()) == {str(p) for p in examples}
    assert places.icon_path().exists()


@pytest.mark.parametrize("script", sorted((ROOT / "packaging").rglob("*.sh")), ids=lambda p: p.name)
def test_the_packaging_scripts_parse(script):
    """``bash -n`` (``sh -n`` for the POSIX-shell installer): a quoting slip fails here, not on a user's machine."""
    shell = "sh" if script.read_text().startswith("#!/usr/bin/env sh") else "bash"
    done = subprocess.run([shell, "-n", str(script)], capture_output=True, text=True, timeout=30)
    assert done.returncode == 0, done.stderr


def test_the_installed_desktop_entry_opens_the_plan_it_is_given(tmp_path):
    """What a double-click runs: the installed entry's Exec with %f replaced by the plan's path. Run offscreen with
    --screenshot (the window exits after its first result): exit 0 and a picture of the window."""
    import sys

    launcher = Path(sys.executable).parent / "casedepth-gui"
    if not launcher.exists():
        pytest.skip("casedepth-gui is not installed beside this Python")
    env = {**os.environ, "XDG_DATA_HOME": str(tmp_path / "share"), "BIN": str(launcher)}
    subprocess.run(["sh", str(LINUX / "install-desktop-files.sh")], env=env, check=True, capture_output=True, timeout=120)
    parser = configparser.ConfigParser(interpolation=None)
    parser.optionxform = str
    parser.read(tmp_path / "share" / "applications" / "org.casedepth.casedepth.desktop", encoding="utf-8")
    import shlex
    plan = ROOT / "resources" / "examples" / "pinion-shaft.cdplan.json"
    command = [str(plan) if word == "%f" else word for word in shlex.split(parser["Desktop Entry"]["Exec"])]
    picture = tmp_path / "opened.png"
    done = subprocess.run([*command, "--screenshot", str(picture)], env={**os.environ, "HOME": str(tmp_path)},
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert picture.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and picture.stat().st_size > 20000
