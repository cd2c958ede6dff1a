"""The dependencies installed work together: a Qt binding that leaks references aborts the window after a few
hundred edits, so a bad release must fail here rather than for a user."""

import sys

import pytest

pytest.importorskip("PySide6")

from PySide6.QtWidgets import QDoubleSpinBox, QLineEdit  # noqa: E402


def test_calls_that_return_nothing_do_not_leak_none(qtbot):
    """5,000 widget calls returning None must leave the reference count of None where it was (give or take a
    few): PySide6 6.12.0 on Python 3.11 lost one reference per call and the interpreter aborted with
    "none_dealloc" once the count ran out."""
    spin, edit = QDoubleSpinBox(), QLineEdit()
    qtbot.addWidget(spin)
    qtbot.addWidget(edit)
    before = sys.getrefcount(None)
    for i in range(2500):
        spin.setValue(i % 7)
        edit.setText("x" if i % 2 else "y")
    assert sys.getrefcount(None) >= before - 50
