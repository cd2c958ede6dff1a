"""A pulse table in the trade's words: ``"boost 2min, diffuse 8min, boost 1.5min, diffuse 10min"``.

The one reader and writer of the text form that the command line (``--schedule``), the plan file and the window
use. Boosts and diffuses alternate, starting with a boost; a table that ends on a boost has no diffuse after it.
"""

from __future__ import annotations

import re

from ..errors import InputError
from ..units import parse_time
from .pulses import Pulse, check_pulses


def parse_schedule(text: str, field: str = "schedule") -> list[Pulse]:
    """The pulses of ``text`` (times with their unit: ``2min``, ``90s``, ``1min30s``; a bare number is seconds)."""
    entries = [entry.strip() for entry in re.split(r"[,;\n]+", str(text)) if entry.strip()]
    if not entries:
        raise InputError(field, "an empty pulse table; write it as \"boost 2min, diffuse 8min, boost 1.5min, …\"")
    pulses: list[Pulse] = []
    boost = None
    for number, entry in enumerate(entries, 1):
        match = re.fullmatch(r"(boost|diffuse)\s*:?\s*(.+)", entry, flags=re.IGNORECASE)
        if not match:
            raise InputError(field, f"entry {number} {entry!r}: write \"boost 2min\" or \"diffuse 8min\"")
        kind, length = match.group(1).lower(), parse_time(match.group(2), field, default_unit="s")
        if kind == "boost":
            if boost is not None:
                raise InputError(field, f"entry {number}: two boosts in a row; put a diffuse between them")
            boost = length
        else:
            if boost is None:
                raise InputError(field, f"entry {number}: a diffuse with no boost before it (a table starts with a boost)")
            pulses.append(Pulse(boost, length))
            boost = None
    if boost is not None:
        pulses.append(Pulse(boost, 0.0))
    check_pulses(pulses, field)
    return pulses


def _time(seconds: float) -> str:
    whole = round(seconds)
    minutes, rest = divmod(whole, 60)
    if minutes and rest:
        return f"{minutes}min{rest}s"
    return f"{minutes}min" if minutes else f"{rest}s"


def format_schedule(pulses: list[Pulse]) -> str:
    """The text form of ``pulses``, to the second (what :func:`parse_schedule` reads back)."""
    parts = []
    for pulse in pulses:
        parts.append(f"boost {_time(pulse.boost)}")
        if pulse.diffuse > 0:
            parts.append(f"diffuse {_time(pulse.diffuse)}")
    return ", ".join(parts)
