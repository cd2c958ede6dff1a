"""Shapes of carburized parts and the graded grid the solver uses on them.

Depth ``x`` is measured from the carburized surface into the part. Areas and volumes are
per unit of carburized surface, so carbon uptake comes out per m² of surface whatever the shape.

================  ==================================================  =====================
shape             what it is                                          size
================  ==================================================  =====================
``plate``         flat surface; semi-infinite, or a plate carburized  thickness (optional)
                  from both faces (mid-plane is a symmetry plane)
``cylinder``      solid round (shaft, pin), carburized on its         diameter
                  outside: convex, carbon converges toward the axis
``bore``          round hole in a thick body, carburized from the     bore diameter
                  inside: concave, carbon spreads into a growing area
``sphere``        solid ball                                          diameter
================  ==================================================  =====================
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from .. import formats
from ..errors import InputError
from ..units import both_lengths, length_range

SHAPES = ("plate", "cylinder", "bore", "sphere")
MIN_SIZE = 0.1e-3  # m
MAX_SIZE = 2.0  # m


@dataclass(frozen=True)
class Geometry:
    """A carburized shape.

    Parameters
    ----------
    shape : str
        One of :data:`SHAPES`.
    size : float or None
        Plate thickness, cylinder or sphere diameter, or bore diameter, [m]. ``None`` for a
        plate means semi-infinite (a section much thicker than the case).
    """

    shape: str = "plate"
    size: float | None = None

    def __post_init__(self):
        if self.shape not in SHAPES:
            raise InputError("shape", f"unknown shape {self.shape!r}; choose one of {', '.join(SHAPES)}")
        if self.size is None:
            if self.shape != "plate":
                raise InputError("size", f"a {self.shape} needs its diameter ({length_range(MIN_SIZE, MAX_SIZE)})")
            return
        if not (math.isfinite(self.size) and MIN_SIZE <= self.size <= MAX_SIZE):
            name = "thickness" if self.shape == "plate" else "diameter"
            raise InputError("size", f"the {name} {both_lengths(self.size)} is outside {length_range(MIN_SIZE, MAX_SIZE)}")

    @property
    def half_section(self) -> float:
        """Depth from the surface to the centre (mid-plane or axis), [m]; ``inf`` for a semi-infinite body."""
        if self.shape == "bore" or self.size is None:
            return math.inf
        return self.size / 2.0

    @property
    def finite(self) -> bool:
        return math.isfinite(self.half_section)

    def area(self, x):
        """Area of the surface at depth ``x`` [m] per unit carburized surface, [-]."""
        x = np.asarray(x, dtype=float)
        if self.shape == "plate":
            return np.ones_like(x)
        if self.shape == "bore":
            return 1.0 + x / (self.size / 2.0)
        fraction = np.maximum(1.0 - x / (self.size / 2.0), 0.0)
        return fraction if self.shape == "cylinder" else fraction**2

    def volume(self, x_from, x_to):
        """Volume between depths ``x_from`` < ``x_to`` [m] per unit carburized surface, [m]."""
        x_from = np.asarray(x_from, dtype=float)
        x_to = np.asarray(x_to, dtype=float)
        if self.shape == "plate":
            return x_to - x_from
        a = self.size / 2.0
        if self.shape == "bore":
            return ((a + x_to) ** 2 - (a + x_from) ** 2) / (2.0 * a)
        r_out, r_in = a - x_from, np.maximum(a - x_to, 0.0)
        if self.shape == "cylinder":
            return (r_out**2 - r_in**2) / (2.0 * a)
        return (r_out**3 - r_in**3) / (3.0 * a**2)

    def describe(self) -> str:
        if self.shape == "plate":
            return ("flat surface, thick section" if self.size is None else
                    f"plate {formats.typed(self.size * 1e3, 'mm')} thick, both faces")
        return f"{self.shape}, diameter {formats.typed(self.size * 1e3, 'mm')}"


def graded_nodes(depth: float, cells: int, stretch: float, section: float = math.inf) -> np.ndarray:
    """Node depths [m] from the surface: ``cells`` cells over ``depth``, each wider than the last,
    the last ``stretch`` times the first.

    If the section (depth to the centre, ``section``) lies deeper than ``depth``, cells keep
    growing at the same ratio until the centre, where the last node is placed exactly; a last
    cell of under half its neighbour is merged into it. With ``section = inf`` the result is the
    grid of a semi-infinite body over ``depth``; :func:`extend_nodes` continues it.
    """
    span = min(depth, section)
    ratio, sums, total = _cell_sums(cells, stretch)
    nodes = np.concatenate(([0.0], sums * (span / total)))
    if math.isfinite(section) and section > span:
        nodes = extend_nodes(nodes, section, ratio, finite=True)
    return nodes


@functools.lru_cache(maxsize=16)
def _cell_sums(cells: int, stretch: float) -> tuple[float, np.ndarray, float]:
    """(ratio of neighbouring cells, the cells' running sum, their sum) for :func:`graded_nodes`, in units of the
    first cell; the same for every solve at one accuracy, so kept (read-only)."""
    ratio = stretch ** (1.0 / max(cells - 1, 1))
    widths = ratio ** np.arange(cells)
    sums = np.cumsum(widths)
    sums.flags.writeable = False
    return ratio, sums, float(widths.sum())


def extend_nodes(nodes: np.ndarray, depth: float, ratio: float, finite: bool) -> np.ndarray:
    """Continue a grid whose cells grow by ``ratio`` until ``depth`` [m] (exactly, if ``finite``)."""
    width = nodes[-1] - nodes[-2]
    added = []
    x = nodes[-1]
    while x < depth:
        width *= ratio
        x += width
        added.append(x)
    out = np.concatenate((nodes, added))
    if finite:
        out = out[out < depth]
        if depth - out[-1] < 0.5 * (out[-1] - out[-2]):
            out = out[:-1]
        out = np.append(out, depth)
    return out
