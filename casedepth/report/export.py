"""Exported profiles: the profile at the end of a plan's cycle as CSV (depth in mm and inches, the
carbon or nitrogen profile, estimated hardness), from the outcome's own columns
(:meth:`casedepth.outcome.Outcome.profile_columns`), so every treatment exports the same way."""

from __future__ import annotations

import csv
import io
import os

from .. import __version__
from ..files import atomic_write
from ..outcome import Outcome

#: decimals of each column, by the start of its name
_DECIMALS = {"depth_mm": 5, "depth_in": 6, "hardness": 1}


def _decimals(name: str) -> int:
    return next((d for prefix, d in _DECIMALS.items() if name.startswith(prefix)), 5)


def profile_csv(outcome: Outcome, title: str) -> str:
    """The profile at the end as CSV text: a comment line saying what it is, a header, one row per node."""
    comment, columns = outcome.profile_columns()
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow([f"# casedepth {__version__}: {title}; {comment}"])
    writer.writerow([name for name, _ in columns])
    for row in zip(*(values for _, values in columns)):
        writer.writerow([f"{value:.{_decimals(name)}f}" for (name, _), value in zip(columns, row)])
    return out.getvalue()


def write_profile_csv(outcome: Outcome, title: str, path: str | os.PathLike) -> None:
    """Write :func:`profile_csv` to ``path`` (atomically)."""
    atomic_write(path, profile_csv(outcome, title))
