"""The README's Python example runs as written (keeps the documented API true)."""

import contextlib
import io
from pathlib import Path

README = Path(__file__).resolve().parent.parent / "README.md"


def test_readme_python_example_runs():
    text = README.read_text(encoding="utf-8")
    start = text.index("```python", text.index("## Python")) + len("```python")
    code = text[start:text.index("```", start)]
    with contextlib.redirect_stdout(io.StringIO()) as out:
        exec(compile(code, "README.md", "exec"), {})
    assert "ε" in out.getvalue() and "µm" in out.getvalue()


def test_every_planning_option_is_in_the_readme():
    """The command-line options come from the parameter table; the README's reference must name each of them."""
    from casedepth.parameters import options_for
    from casedepth.treatments import TREATMENTS

    text = README.read_text(encoding="utf-8")
    missing = sorted({option.flag for key in TREATMENTS for _, option in options_for(key) if option.flag not in text})
    assert not missing


def test_the_contributor_guide_names_every_module():
    """The layout in DEVELOPERS.md stays true: every module of the package is named there, under its folder."""
    guide = (README.parent / "DEVELOPERS.md").read_text(encoding="utf-8")
    package = README.parent / "casedepth"
    missing = [str(path.relative_to(package)) for path in package.rglob("*.py")
               if path.name != "__init__.py" and path.name not in guide]
    assert not missing
    for folder in (p for p in package.iterdir() if p.is_dir() and (p / "__init__.py").exists()):
        assert f"{folder.name}/" in guide, folder.name


def test_every_package_is_installed():
    """pyproject.toml lists the packages an install (not an editable one) copies: every folder of the package with an
    __init__.py must be among them, or `pip install .` leaves it out."""
    import tomllib

    root = README.parent
    listed = set(tomllib.loads((root / "pyproject.toml").read_text(encoding="utf-8"))["tool"]["setuptools"]["packages"])
    folders = {".".join(path.parent.relative_to(root).parts) for path in (root / "casedepth").rglob("__init__.py")}
    folders = {"casedepth.resources" if name == "resources" else name for name in folders}
    assert folders - listed == set()
