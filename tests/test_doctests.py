"""Run the examples in every library docstring (the numbers there must stay true)."""

import doctest
import importlib
import pkgutil

import pytest

import casedepth

MODULES = sorted(m.name for m in pkgutil.walk_packages(casedepth.__path__, "casedepth.")
                 if not m.name.startswith(("casedepth.gui", "casedepth.__main__")))


@pytest.mark.parametrize("name", ["casedepth", *MODULES])
def test_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.failed == 0
