"""The library never imports Qt: every module outside casedepth/gui imports with PySide6 blocked."""

import pkgutil
import subprocess
import sys
import textwrap

import casedepth


def test_library_imports_without_qt(tmp_path):
    modules = [m.name for m in pkgutil.walk_packages(casedepth.__path__, "casedepth.") if not m.name.startswith("casedepth.gui")]
    assert "casedepth.solver" in modules
    script = textwrap.dedent(f"""
        import sys
        class Block:
            def find_spec(self, name, path=None, target=None):
                if name.split('.')[0] in ('PySide6', 'shiboken6', 'PyQt5', 'PyQt6'):
                    raise ImportError('Qt is blocked in this test: ' + name)
        sys.meta_path.insert(0, Block())
        import importlib
        for name in {modules!r}:
            if name == 'casedepth.__main__':
                continue
            importlib.import_module(name)
        assert not any(m.startswith(('PySide6', 'shiboken6')) for m in sys.modules)
        import matplotlib
        print('ok')
    """)
    # run outside the source tree so the installed package is what gets imported
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "ok"
