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
