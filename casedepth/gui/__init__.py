"""The window (PySide6). The only package of casedepth that imports Qt."""
