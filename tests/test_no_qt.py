"""The library never imports Qt: only casedepth/gui may.

Checked two ways: statically, every import statement anywhere in every module outside casedepth/gui
(at module level, inside functions and classes, and through importlib/__import__ with a literal
name), as an import-linter contract would; and at run time, every such module imported with Qt blocked.
"""

import ast
import pkgutil
import subprocess
import sys
import textwrap
from pathlib import Path

import casedepth

QT = ("PySide6", "shiboken6", "PyQt5", "PyQt6", "PySide2")
PACKAGE = Path(casedepth.__file__).resolve().parent
#: the one way into the window from outside it: ``casedepth`` with no arguments (or ``casedepth gui``) hands over
#: to the window's own entry point, imported inside cli.main when asked for (so the command line loads no Qt)
DOOR = ("casedepth.cli", "casedepth.gui.app")


def _imported_names(tree: ast.AST, module: str) -> list[tuple[int, str]]:
    """(line, absolute module name) of every import in the tree, relative ones resolved against ``module``."""
    package = module.rsplit(".", 1)[0] if not module.endswith("__init__") else module.rsplit(".", 1)[0]
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            out += [(node.lineno, alias.name) for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[:len(base) - node.level + 1]
                name = ".".join(base + ([node.module] if node.module else []))
            else:
                name = node.module or ""
            out.append((node.lineno, name))
            out += [(node.lineno, f"{name}.{alias.name}") for alias in node.names]
        elif isinstance(node, ast.Call) and node.args and isinstance(node.args[0], ast.Constant) \
                and isinstance(node.args[0].value, str):
            func = node.func
            called = func.attr if isinstance(func, ast.Attribute) else getattr(func, "id", "")
            if called in ("import_module", "__import__"):
                out.append((node.lineno, node.args[0].value))
    return out


def _library_files():
    for path in sorted(PACKAGE.rglob("*.py")):
        relative = path.relative_to(PACKAGE)
        if relative.parts[0] == "gui":
            continue
        module = ".".join(("casedepth", *relative.with_suffix("").parts))
        yield path, module


def test_no_import_of_qt_anywhere_outside_the_gui_package():
    offending = []
    files = list(_library_files())
    assert len(files) > 30 and any(m == "casedepth.numerics.solver" for _, m in files)
    for path, module in files:
        tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
        for line, name in _imported_names(tree, module):
            if module == DOOR[0] and name.startswith(DOOR[1]):
                continue
            if name.split(".")[0] in QT or name.startswith("casedepth.gui") \
                    or name.startswith("matplotlib.backends.backend_qt"):
                offending.append(f"{path.relative_to(PACKAGE.parent)}:{line} imports {name}")
    assert not offending, "\n".join(offending)


def test_the_door_to_the_window_opens_only_when_asked():
    """cli.py's one import of the window's entry point sits inside a function, not at module level."""
    tree = ast.parse((PACKAGE / "cli.py").read_text(encoding="utf-8"))
    module_level = [node for node in tree.body if isinstance(node, (ast.Import, ast.ImportFrom))]
    assert not any("gui" in (getattr(node, "module", "") or "") for node in module_level)
    assert any(name.startswith(DOOR[1]) for _, name in _imported_names(tree, DOOR[0]))


def test_the_static_check_sees_imports_inside_functions():
    tree = ast.parse("def f():\n    from PySide6.QtCore import Qt\n    import importlib\n"
                     "    importlib.import_module('PyQt6')\n")
    names = [name for _, name in _imported_names(tree, "casedepth.report.x")]
    assert "PySide6.QtCore" in names and "PyQt6" in names
    relative = ast.parse("from ..gui import window\n")
    assert "casedepth.gui" in [name for _, name in _imported_names(relative, "casedepth.report.x")]


def test_library_imports_without_qt(tmp_path):
    modules = [m.name for m in pkgutil.walk_packages(casedepth.__path__, "casedepth.")
               if not m.name.startswith("casedepth.gui") and m.name != "casedepth.__main__"]
    assert "casedepth.numerics.solver" in modules
    script = textwrap.dedent(f"""
        import sys
        class Block:
            def find_spec(self, name, path=None, target=None):
                if name.split('.')[0] in {QT!r}:
                    raise ImportError('Qt is blocked in this test: ' + name)
        sys.meta_path.insert(0, Block())
        import importlib
        for name in {modules!r}:
            importlib.import_module(name)
        assert not any(m.startswith({QT!r}) for m in sys.modules)
        print('ok')
    """)
    # run outside the source tree so the installed package is what gets imported
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "ok"
