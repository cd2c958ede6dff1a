"""Saving and writing files: what is written replaces the old file whole or not at all, keeps what the file was
(its mode, the link that names it), refuses what it must not touch, and says why in one line.

Checked against POSIX behaviour (IEEE Std 1003.1-2017, rename(): "the rename shall be atomic") and Linux's
open(2) manual page (O_TMPFILE, linkat with AT_SYMLINK_FOLLOW); the rest is the program's own contract.
"""

from __future__ import annotations

import json
import os
import random
import signal
import stat
import subprocess
import sys
import time
import zlib
from pathlib import Path

import pytest

from casedepth import cli
from casedepth.files import STALE_AFTER, FileWriteError, atomic_write, remove_stale_temporaries
from casedepth.plan import Plan, load, save

EXAMPLE = Path(__file__).resolve().parent.parent / "resources" / "examples" / "pinion-shaft.cdplan.json"
SCALE = float(os.environ.get("CASEDEPTH_FUZZ_SCALE", "1"))


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.startswith("."))


def mode_of(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


def plain_open_mode(folder: Path) -> int:
    """The mode ``open(path, "w")`` gives a new file in ``folder`` under the current umask (POSIX open(2):
    the mode asked, 0o666, less the umask)."""
    probe = folder / "plain-open.txt"
    with open(probe, "w"):
        pass
    mode = mode_of(probe)
    probe.unlink()
    return mode


def write_text(path: Path) -> None:
    atomic_write(path, "text")


def write_through_a_writer(path: Path) -> None:  # as savefig and QImage.save do: given a name, they open it again
    atomic_write(path, lambda name: Path(name).write_text("text"))


@pytest.fixture
def no_unnamed_temporaries(monkeypatch):
    """A system (or file system) without O_TMPFILE: the named temporary is used."""
    monkeypatch.delattr(os, "O_TMPFILE", raising=False)


@pytest.mark.parametrize("umask,expected", [(0o022, 0o644), (0o077, 0o600), (0o027, 0o640), (0o277, 0o400)])
@pytest.mark.parametrize("write", [write_text, write_through_a_writer])
@pytest.mark.parametrize("unnamed", [True, False])
def test_a_new_file_gets_what_a_plain_open_gives(tmp_path, request, umask, expected, write, unnamed):
    """POSIX open(2): a new file's mode is 0o666 less the umask (0o022 → 0o644, 0o077 → 0o600); a save makes its
    new file the same way, whether written into an unnamed temporary, a named one, or by a writer given a name."""
    if not unnamed:
        request.getfixturevalue("no_unnamed_temporaries")
    old = os.umask(umask)
    try:
        write(tmp_path / "a.txt")
        assert mode_of(tmp_path / "a.txt") == expected == plain_open_mode(tmp_path)
    finally:
        os.umask(old)
    assert (tmp_path / "a.txt").read_text() == "text"
    assert leftovers(tmp_path) == []


def test_a_save_never_sets_the_umask(tmp_path, monkeypatch):
    """The umask is one per process: setting it to read it would give files other threads create meanwhile the
    wrong mode, so a save leaves it to the system."""
    def refuse(_mask):
        raise AssertionError("os.umask called")

    old = os.umask(0o022)
    try:
        monkeypatch.setattr(os, "umask", refuse)
        write_text(tmp_path / "a.txt")
        write_through_a_writer(tmp_path / "b.txt")
    finally:
        monkeypatch.undo()
        os.umask(old)
    assert mode_of(tmp_path / "a.txt") == mode_of(tmp_path / "b.txt") == 0o644


@pytest.mark.parametrize("kept", [0o640, 0o604, 0o600])
@pytest.mark.parametrize("write", [write_text, write_through_a_writer])
def test_an_existing_file_keeps_its_mode_whatever_the_umask(tmp_path, kept, write):
    path = tmp_path / "plan.txt"
    path.write_text("old")
    os.chmod(path, kept)
    old = os.umask(0o077)
    try:
        write(path)
    finally:
        os.umask(old)
    assert mode_of(path) == kept and path.read_text() == "text"


def test_an_existing_plan_keeps_its_mode(tmp_path):
    path = tmp_path / "plan.cdplan.json"
    save(Plan(title="first"), path)
    os.chmod(path, 0o604)
    save(Plan(title="second"), path)
    assert stat.S_IMODE(path.stat().st_mode) == 0o604
    assert load(path).title == "second"


def test_a_read_only_file_is_refused_not_replaced(tmp_path):
    path = tmp_path / "approved.cdplan.json"
    save(Plan(title="approved"), path)
    os.chmod(path, 0o444)
    with pytest.raises(FileWriteError, match="read-only"):
        save(Plan(title="changed"), path)
    assert load(path).title == "approved"
    assert leftovers(tmp_path) == []


def test_a_symbolic_link_is_written_through_to_its_file(tmp_path):
    (tmp_path / "shared").mkdir()
    real = tmp_path / "shared" / "plan.cdplan.json"
    save(Plan(title="first"), real)
    link = tmp_path / "plan.cdplan.json"
    link.symlink_to(real)
    save(Plan(title="second"), link)
    assert link.is_symlink() and link.resolve() == real.resolve()
    assert load(real).title == "second"


@pytest.mark.parametrize("where,reason", [
    ("no folder/plan.cdplan.json", "there is no folder"),
    ("", "it is a folder"),
    ("n" * 300 + ".cdplan.json", "too long"),
])
def test_paths_that_cannot_be_written_are_named_with_the_reason(tmp_path, where, reason):
    with pytest.raises(FileWriteError, match=reason) as raised:
        atomic_write(tmp_path / where, "x")
    assert str(tmp_path) in str(raised.value)


@pytest.mark.parametrize("failure", [OSError(28, "No space left on device"), zlib.error("Error -3 while compressing")])
def test_a_writer_that_fails_leaves_the_old_file_and_no_temporary(tmp_path, failure):
    """A full disk shows as OSError from the file system, or as an error of the writer (zlib in PDF and PNG)."""
    path = tmp_path / "sheet.pdf"
    path.write_bytes(b"old")

    def writer(name):
        Path(name).write_bytes(b"half")
        raise failure

    with pytest.raises(FileWriteError):
        atomic_write(path, writer)
    assert path.read_bytes() == b"old"
    assert leftovers(tmp_path) == []


def test_what_killed_saves_left_is_removed_on_the_next_save_or_open(tmp_path):
    path = tmp_path / "plan.cdplan.json"
    save(Plan(), path)
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"], capture_output=True, text=True)
    of_a_dead_writer = tmp_path / f".plan.cdplan.json.{dead.stdout.strip()}.0a1b2c3d.tmp.json"
    of_a_living_writer = tmp_path / f".plan.cdplan.json.{os.getppid()}.0a1b2c3d.tmp.json"  # our parent is alive
    old = tmp_path / ".plan.cdplan.json.1.ffffffff.tmp.json"
    for leftover in (of_a_dead_writer, of_a_living_writer, old):
        leftover.write_text("{")
    os.utime(old, (time.time() - 2 * STALE_AFTER,) * 2)
    load(path)
    assert leftovers(tmp_path) == [of_a_living_writer.name]  # may be a save running now in another window
    os.utime(of_a_living_writer, (time.time() - 2 * STALE_AFTER,) * 2)
    remove_stale_temporaries(path)
    assert leftovers(tmp_path) == []


SAVER = """
import sys
from casedepth.plan import Plan, save
path = sys.argv[1]
plans = [Plan(title="old", notes="o" * 15000), Plan(title="new", notes="n" * 15000)]
print("ready", flush=True)
i = 0
while True:
    save(plans[i % 2], path)
    i += 1
"""


def test_a_killed_save_leaves_the_old_file_or_the_new_one_and_nothing_else(tmp_path):
    """Kill a process that saves a plan over and over at random moments: the file is always one whole plan, and
    after the next open nothing else is left in the folder."""
    path = tmp_path / "plan.cdplan.json"
    save(Plan(title="old", notes="o" * 15000), path)
    rng = random.Random(5)
    left_at_kill = 0
    for _ in range(int(8 * SCALE)):
        saver = subprocess.Popen([sys.executable, "-c", SAVER, str(path)], stdout=subprocess.PIPE, text=True)
        assert saver.stdout.readline().strip() == "ready"
        time.sleep(rng.uniform(0.0, 0.05))
        saver.send_signal(signal.SIGKILL)
        saver.wait()
        saver.stdout.close()
        left_at_kill += len(leftovers(tmp_path))
        assert load(path).title in ("old", "new")  # whole, never half
        assert leftovers(tmp_path) == [], "the open after a killed save removes what it left"
    print(f"temporaries seen right after a kill: {left_at_kill}")


@pytest.mark.parametrize("destination,reason", [
    ("no folder/sheet.pdf", "there is no folder"),
    (".", "it is a folder"),
    ("s" * 300 + ".pdf", "too long"),
    ("read-only.pdf", "read-only"),
])
def test_the_command_line_names_an_output_it_cannot_write_in_one_line(tmp_path, capsys, monkeypatch,
                                                                      destination, reason):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "read-only.pdf").write_bytes(b"kept")
    os.chmod(tmp_path / "read-only.pdf", 0o444)
    code = cli.main(["sheet", str(EXAMPLE), "--pdf", destination])
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and err.startswith("casedepth: error: --pdf: cannot write") and reason in err
    assert (tmp_path / "read-only.pdf").read_bytes() == b"kept"
    assert leftovers(tmp_path) == []


def test_the_plan_a_command_line_saves_is_refused_where_it_cannot_go(tmp_path, capsys):
    code = cli.main(["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "1.0",
                     "--target", "1.0mm", "--save", str(tmp_path / "missing" / "p.cdplan.json")])
    assert code == 2
    assert "--save: cannot write" in capsys.readouterr().err


def test_a_saved_plan_holds_no_nan(tmp_path):
    path = tmp_path / "plan.cdplan.json"
    save(load(EXAMPLE), path)

    def refuse(constant):
        raise AssertionError(constant)

    json.loads(path.read_text(encoding="utf-8"), parse_constant=refuse)
