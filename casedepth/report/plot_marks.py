"""What the window's plots and the printed papers draw alike on a matplotlib axes: the words on a cycle plot
(each stage's name and each moment, placed clear of the curves and of each other) and the Rockwell C scale beside
a hardness plot in HV.

The window's cycle and hardness pages and the process sheet call the same functions, so a stage is named the same
way on screen and on paper. No Qt, and nothing of the solvers: the window imports this module without loading
what the documents need (the solvers for the charts, the PDF backend).
"""

from __future__ import annotations

import itertools

import numpy as np
from matplotlib import path as mpath

from ..models.hardness import ASTM_E140_hrc_to_hv, ASTM_E140_hv_to_hrc


# -- the cycle plot's words: the window's cycle page and the floor's sheet name stages and moments alike -----------
def draw_cycle_words(ax, line, colour: str = "#2a7f62", size: float = 7.0) -> tuple[list, list]:
    """Shade every other stage of the cycle ``line`` (a :class:`~casedepth.outcome.Timeline`) in ``ax`` and write
    each stage's first word and each moment (a purge, the atmosphere going in) with its dotted line; returns the
    stages' names as (text, start [h], end [h]) and the moments' words, to be placed by :func:`place_cycle_words`
    once the axes have their size."""
    stages, moments = [], []
    words = {"fontsize": size, "clip_on": True, "in_layout": False, "parse_math": False}
    for i, (start, end, label) in enumerate(line.labels):
        if i % 2 == 0:
            ax.axvspan(start / 3600.0, end / 3600.0, color="#eef2f6", lw=0, zorder=0)
        text = ax.text((start + end) / 7200.0, 0.0, label.split(" ")[0], transform=ax.get_xaxis_transform(),
                       ha="center", va="bottom", color="#555", **words)
        stages.append((text, start / 3600.0, end / 3600.0))
    for time, what in line.markers:
        ax.axvline(time / 3600.0, color=colour, lw=1.2, ls=":")
        moments.append(ax.text(time / 3600.0, 0.97, what, transform=ax.get_xaxis_transform(), va="top", color=colour,
                               style="italic", bbox={"boxstyle": "square,pad=0.15", "fc": "white", "ec": "none",
                                                     "alpha": 0.85}, **words))
    return stages, moments


def place_cycle_words(ax, stages: list, moments: list, curves: list, gap: float = 2.0) -> None:
    """Place the words of :func:`draw_cycle_words` where they are clear, measured in display units on the axes as
    drawn now: each moment along the top, in the first row where it crosses no curve and no other word (after its
    line, or before it near the right edge or where after it is not clear; on its white ground it may cover the
    moments' dotted lines); each stage's name level if it fits in its span, else upright, at the lowest place in
    its span where it keeps ``gap`` points from every curve in ``curves`` (the temperature, the potential, the
    moments' lines) and from the other words. Words with no such place are left out (the stage table names the
    stage; the dotted line still marks the moment)."""
    if not stages and not moments:
        return
    for axes in {ax, *(curve.axes for curve in curves)}:  # limits still to be autoscaled are set now
        axes.get_xlim(), axes.get_ylim()
    x0, x1 = ax.get_xlim()
    renderer = ax.figure.canvas.get_renderer()
    frame = ax.get_window_extent(renderer)
    pad = renderer.points_to_pixels(gap)
    # (a moment's dotted line: the same time all the way up)
    paths = [(len(set(curve.get_xdata())) == 1, path) for curve in curves if curve.get_visible()
             for path in _drawn_runs(curve)]
    taken: list = []

    def clear(box, over_dotted_lines: bool = False) -> bool:
        padded = box.padded(pad)
        return (frame.x0 <= padded.x0 and padded.x1 <= frame.x1 and frame.y0 <= padded.y0 and padded.y1 <= frame.y1
                and not any(padded.overlaps(o) for o in taken)
                and not any(path.intersects_bbox(padded, filled=False) for dotted, path in paths
                            if not (dotted and over_dotted_lines)))

    rows = [0.97 - 0.1 * row for row in range(5)]
    for text in moments:
        time = text.get_position()[0]
        word = text.get_text().strip()
        sides = ("right", "left") if (time - x0) / max(x1 - x0, 1e-9) > 0.6 else ("left", "right")
        text.set_visible(True)  # (an invisible text measures as nothing)
        for side, y in itertools.product(sides, rows):
            text.set(ha=side, text=f"{word} " if side == "right" else f" {word}")
            if clear(_at(text, y, renderer), over_dotted_lines=True):
                taken.append(text.get_window_extent(renderer))
                break
        else:
            text.set_visible(False)
    to_display = ax.transData.transform
    for text, start, end in stages:
        left, right = to_display([(start, 0.0), (end, 0.0)])[:, 0]
        text.set_visible(True)  # (an invisible text measures as nothing)
        text.set_visible(any(_lift(text, rotation, right - left, frame, clear, pad, renderer) for rotation in (0, 90)))
        if text.get_visible():
            taken.append(text.get_window_extent(renderer))


def _lift(text, rotation: float, room: float, frame, clear, pad: float, renderer) -> bool:
    """Turn a stage's name by ``rotation`` and set it at the lowest place where ``clear`` holds; False if it is
    wider than its span (``room`` pixels) or no place is clear."""
    text.set(rotation=rotation, y=0.0)
    box = text.get_window_extent(renderer)
    if box.width + 2 * pad > room or box.height > 0.45 * frame.height:
        return False
    lift = pad
    while frame.y0 + lift + box.height + pad <= frame.y1:
        if clear(box.translated(0.0, frame.y0 + lift - box.y0)):
            text.set_y(lift / frame.height)
            return True
        lift += max(pad, 1.0)
    return False


def _drawn_runs(curve) -> list[mpath.Path]:
    """The runs of a line as drawn, in display units: split where it has no value (NaN), as the line is."""
    xy = curve.get_transform().transform(curve.get_xydata())
    finite = np.isfinite(xy).all(axis=1)
    runs = np.split(np.arange(len(xy)), np.flatnonzero(~finite))
    return [mpath.Path(xy[run[finite[run]]]) for run in runs if finite[run].sum() > 1]


def _at(text, y: float, renderer):
    """Move ``text`` to ``y`` (axes fraction) and return where it is drawn now."""
    text.set_y(y)
    return text.get_window_extent(renderer)


# -- the Rockwell C scale -----------------------------------------------------------------------------------------
def _hv_to_hrc(hv):
    return ASTM_E140_hv_to_hrc(np.clip(hv, 238.0, 940.0))


def _hrc_to_hv(hrc):
    return ASTM_E140_hrc_to_hv(np.clip(hrc, 20.0, 68.0))


def hrc_scale(axis, size: float | None = None, tick_size: float | None = None):
    """A Rockwell C scale on the right of a hardness plot in HV, by the conversion of ASTM E140 where it is
    tabulated (20–68 HRC; held at its ends beyond), its label ``size`` points and its tick labels ``tick_size``
    (matplotlib's defaults where None); the window's hardness page and the sheet both draw it."""
    scale = axis.secondary_yaxis("right", functions=(_hv_to_hrc, _hrc_to_hv))
    scale.set_ylabel("[HRC]", fontsize=size)
    if tick_size is not None:
        scale.tick_params(labelsize=tick_size)
    return scale
